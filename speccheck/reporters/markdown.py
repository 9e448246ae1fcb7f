"""Markdown, for a pull-request comment and for a mentor reading a beginner's plan.

Layout: the safety cautions first (when any build has them), a summary line and a table of
counts by level, then one section per file: findings grouped by stage of the signal chain,
each with its numbers, the why in plain words, the fix and how to verify it on the bench;
waived findings stay, marked with their reason; then the design sheet's derived values.
"""

from __future__ import annotations

from speccheck.findings import LEVELS
from speccheck.reporters.neutral import md_code, md_text

_ESCAPE = {c: "\\" + c for c in "\\`*_[]<>|"}
_PROSE = {c: e for c, e in _ESCAPE.items() if c != "`"}


def md(text: str) -> str:
    """Text that may come from a build file, made unable to change the document (neutral.md_text)."""
    return md_text(text)


def prose(text: str) -> str:
    """Our own rule texts: the same, but `code` in backticks stays code."""
    return "".join(_PROSE.get(ch, ch) for ch in _one_line(str(text)))


def code(text: str) -> str:
    return md_code(text)


def _plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def _counts_words(counts: dict) -> str:
    return ", ".join(_plural(counts[level], level) for level in reversed(LEVELS))


def _chain_kinds() -> list[str]:
    from speccheck.schema import build_schema

    try:
        return list(build_schema()["$defs"]["stage"]["properties"]["stage"]["enum"])
    except (KeyError, TypeError):
        return []


# Sections that are not chain stages, in the order a reviewer reads them.
_BEFORE = ("input", "signals", "source")
_AFTER = ("supply", "power", "mains", "wiring", "audio", "general")
_LAST = ("review", "internal")


def _stage_order(findings) -> list[str]:
    """Input first, then the chain stages in signal order (stages named by the plan where their
    first finding falls), then supply, power and the rest, review last."""
    seen: list[str] = []
    for f in findings:
        label = f.stage or "general"
        if label not in seen:
            seen.append(label)
    chain = _chain_kinds()

    def key(label: str):
        if label in _BEFORE:
            return (0, _BEFORE.index(label))
        if label in chain:
            return (1, chain.index(label))
        if label in _LAST:
            return (4, _LAST.index(label))
        if label in _AFTER:
            return (3, _AFTER.index(label))
        return (2, seen.index(label))

    return sorted(seen, key=key)


def _one_line(text: str) -> str:
    return " ".join(text.split())


def finding_block(f, rule, explained: set) -> list[str]:
    loc = f.location
    where = f"line {loc.line}, col {loc.col}" + (f" ({code(loc.path)})" if loc.path else "")
    level = f"**{f.level}**"
    if f.waived:
        level = f"waived {f.level}"
    lines = [f"- {level} {code(f.rule)} at {where}: {md(f.message)}"]
    if f.waived:
        lines.append(f"  - **Waived because:** {md(f.waived)}")
    if f.values:
        lines.append("  - **Numbers:** " + "; ".join(f"{md(v.name)} {md(v.text)}" for v in f.values))
    if f.waived:
        return lines
    if rule is not None and rule.explanation:
        if f.rule in explained:
            lines.append(f"  - **Why:** as for the first {code(f.rule)} finding above.")
        else:
            lines.append(f"  - **Why:** {prose(rule.explanation)}")
            explained.add(f.rule)
    if f.fix:
        lines.append(f"  - **Fix:** {prose(f.fix)}")
    if rule is not None and rule.verify:
        lines.append(f"  - **Verify on the bench:** {prose(rule.verify)}")
    return lines


def sheet_block(result) -> list[str]:
    if not result.sheet:
        return []
    lines = [
        "",
        f"<details><summary>Design sheet: {_plural(len(result.sheet), 'derived value')}</summary>",
        "",
        "| section | part or path | quantity | value |",
        "|---|---|---|---|",
    ]
    for e in result.sheet:
        lines.append(f"| {md(e.section)} | {md(e.owner)} | {md(e.value.name)} | {md(e.value.text)} |")
    lines += ["", "</details>"]
    return lines


def file_block(result, rules: dict, hidden: int) -> list[str]:
    title = code(result.path) + (f" ({md(result.build_name)})" if result.build_name else "")
    lines = ["", f"## {title}", ""]
    open_counts = result.counts()
    waived = sum(1 for f in result.findings if f.waived)
    summary = _counts_words(open_counts) if any(open_counts.values()) else "No open findings"
    extra = []
    if waived:
        extra.append(f"{waived} waived")
    if hidden:
        extra.append(f"{hidden} hidden by the baseline")
    lines.append(summary + (f" ({', '.join(extra)})" if extra else "") + ".")
    if not result.checked:
        lines += ["", "The rules did not run on this file: fix the input findings below first."]
    explained: set = set()
    for stage in _stage_order(result.findings):
        in_stage = [f for f in result.findings if (f.stage or "general") == stage]
        in_stage.sort(key=lambda f: (f.waived is not None, -_rank(f.level), f.location.line, f.location.col))
        lines += ["", f"### Stage: {md(stage)}", ""]
        for f in in_stage:
            lines.extend(finding_block(f, rules.get(f.rule), explained))
    lines.extend(sheet_block(result))
    return lines


def _rank(level: str) -> int:
    return LEVELS.index(level)


def render(results, settings, run=None) -> str:
    from speccheck import registry
    from speccheck.reporters.common import RunInfo, totals

    run = run or RunInfo()
    rules = registry.load_rules()
    lines = ["# speccheck review", ""]
    cautioned = [r for r in results if r.cautions]
    if cautioned:
        lines += [
            "> **Safety first.** These builds can hurt someone. The cautions below apply before "
            "anything else in this report.",
            ">",
        ]
        by_text: dict = {}
        for r in cautioned:
            for c in r.cautions:
                by_text.setdefault(c, []).append(r.path)
        groups: dict = {}
        for c, paths in by_text.items():
            groups.setdefault(tuple(paths), []).append(c)
        for paths, texts in groups.items():
            lines.append(f"> For {', '.join(code(p) for p in paths)}:")
            lines.append(">")
            lines += [f"> - {md(c)}" for c in texts]
            lines.append(">")
        if not any("electrical code" in c for c in by_text):
            lines.append(
                "> speccheck is a review aid, not an approval: local electrical codes and licensed "
                "practice decide."
            )
        if lines[-1] == ">":
            lines.pop()
        lines.append("")
    counts = totals(results)
    extra = []
    if counts["waived"]:
        extra.append(f"{counts['waived']} waived")
    if run.baseline:
        extra.append(f"{run.hidden_total} hidden by the baseline")
    lines.append(
        f"**{_plural(len(results), 'file')} checked: {_counts_words(counts)}"
        + (f" ({', '.join(extra)})" if extra else "")
        + f"**; fail level: {settings.fail_level}."
    )
    waived_by_level = dict.fromkeys(LEVELS, 0)
    for r in results:
        for f in r.findings:
            if f.waived:
                waived_by_level[f.level] += 1
    lines += ["", "| level | open | waived |", "|---|---:|---:|"]
    for level in reversed(LEVELS):
        lines.append(f"| {level} | {counts[level]} | {waived_by_level[level]} |")
    clean = [r for r in results if r.checked and not r.findings]
    if clean:
        lines += ["", "Clean: " + ", ".join(code(r.path) for r in clean) + "."]
    if run.skipped or run.excluded or run.set_aside:
        lines.append("")
        lines += [f"- note: {code(p)} skipped, not a build file (no `build_spec:` key)" for p in run.skipped]
        lines += [f"- note: {code(p)} skipped, excluded by the project file" for p in run.excluded]
        lines += [f"- note: {code(p)} skipped, {md(why)}" for p, why in run.set_aside]
    for r in results:
        lines.extend(file_block(r, rules, run.hidden.get(r.path, 0)))
    return "\n".join(lines) + "\n"
