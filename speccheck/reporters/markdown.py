"""Markdown, for a pull-request comment and for a mentor reading a beginner's plan.

Layout: the safety cautions first (when any build has them), a summary line and a table of
counts by level, then one section per file in the order a beginner should act (reading.py, the
same order as the HTML page): fix these first (errors, with related findings under their common
cause), worth a look (warnings), good to know (notes), waived findings with their reason, the
design sheet as tables per section, and last the rule ids, document paths and settings used.
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


def _one_line(text: str) -> str:
    return " ".join(text.split())


# ---- one file, in the order a beginner should act ------------------------------------------------
# Nested lines are indented four spaces: CommonMark nests them under their finding, and so do the
# renderers that want four (Python-Markdown and the like).

_IN = "    "
LEVEL_WORDS = {"error": "must fix", "warning": "worth a look", "note": "good to know"}


def _words(text, rule) -> str:
    from speccheck.reporters.reading import plain

    return md(_one_line(plain(text, rule)))


def finding_block(f, rule, explained: set, number: int) -> list[str]:
    """One finding: a list item with its numbers, fix, bench check and why nested under it."""
    title = rule.title if rule is not None else f.rule
    lines = [
        (
            f"- **{LEVEL_WORDS.get(f.level, f.level)}: {_words(title, rule)}** (line {f.location.line}, "
            f"item {number}): {_words(f.message, rule)}"
        )
    ]
    signal, position = getattr(f, "signal", ""), getattr(f, "position", "")
    if signal or position:  # format v2: which signal, in which switch positions
        lines.append(f"{_IN}- **For:** {md(signal)}{', with ' if signal and position else ''}{md(position)}")
    if f.values:
        lines.append(f"{_IN}- **The numbers:** " + "; ".join(f"{md(v.name)} {md(v.text)}" for v in f.values))
    if f.fix:
        lines.append(f"{_IN}- **What to do:** {_words(f.fix, rule)}")
    if rule is not None and rule.verify:
        lines.append(f"{_IN}- **Check it on the bench:** {_words(rule.verify, rule)}")
    if rule is not None and rule.explanation:
        if f.rule in explained:
            lines.append(f"{_IN}- **Why it matters:** as explained above for \"{_words(title, rule)}\".")
        else:
            explained.add(f.rule)
            lines.append(f"{_IN}- **Why it matters:** {_words(rule.explanation, rule)}")
    return lines


def _group_blocks(heading: str, intro: str, groups, parts: dict, rules: dict, explained: set, order: list):
    from speccheck.reporters.reading import group_title

    if not groups:
        return []
    lines = ["", f"### {heading}", "", intro]
    for g in groups:
        title = group_title(g, parts)
        shared = f" ({len(g.findings)} findings, one cause)" if len(g.findings) > 1 else ""
        lines += ["", f"#### {md(title[:1].upper() + title[1:])}{shared}", ""]
        for f in g.findings:
            order.append(f)
            lines.extend(finding_block(f, rules.get(f.rule), explained, len(order)))
    return lines


def _waived_block(findings, rules: dict, order: list) -> list[str]:
    if not findings:
        return []
    lines = [
        "",
        "### Set aside on purpose",
        "",
        "Waived in the plan, each with its reason; they do not count.",
        "",
    ]
    for f in findings:
        order.append(f)
        lines.append(
            f"- **waived {f.level}** (line {f.location.line}, item {len(order)}): "
            f"{_words(f.message, rules.get(f.rule))}"
        )
        lines.append(f"{_IN}- **Waived because:** {md(f.waived)}")
    return lines


def sheet_block(result) -> list[str]:
    """The design sheet as one table per section, in the open (not folded away)."""
    from speccheck.reporters.figure_data import for_words
    from speccheck.reporters.sheet import grouped

    if not result.sheet:
        return []
    lines = [
        "",
        "### The design sheet",
        "",
        f"Every value the check worked out ({_plural(len(result.sheet), 'value')}).",
    ]
    per_signal = any(getattr(e, "signal", "") for e in result.sheet)  # format v2: values per signal
    head = "| part or stage | quantity | value |" + (" for |" if per_signal else "")
    rule = "|---|---|---:|" + ("---|" if per_signal else "")
    for section, owners in grouped(result).items():
        lines += ["", f"#### {md(section)}", "", head, rule]
        for owner, entries in owners.items():
            for i, e in enumerate(entries):
                row = f"| {md(owner) if i == 0 else ''} | {md(e.value.name)} | {md(e.value.text)} |"
                if per_signal:
                    held = for_words(getattr(e, "signal", ""), getattr(e, "position", ""))
                    row += f" {md(held) if held else 'all'} |"
                lines.append(row)
    return lines


def settings_block(order: list, rules: dict, settings, result) -> list[str]:
    """Rule ids, document paths and settings: for those who want them, at the end."""
    from speccheck.reporters.reading import settings_of

    if not order:
        return []
    lines = [
        "",
        "### Settings used",
        "",
        "| item | rule | level | place in the plan | line:col | waived because |",
        "|---:|---|---|---|---|---|",
    ]
    for i, f in enumerate(order, 1):
        lines.append(
            f"| {i} | {code(f.rule)} | {f.level} | {code(f.location.path) if f.location.path else ''} | "
            f"{f.location.line}:{f.location.col} | {md(f.waived) if f.waived else ''} |"
        )
    rows = []
    for rule_id in dict.fromkeys(f.rule for f in order):
        for name, value in settings_of(rules.get(rule_id), settings).items():
            rows.append(f"| {code(rule_id)} | {code(name)} | {md(value)} |")
    if rows:
        lines += ["", "| rule | setting | value |", "|---|---|---|"] + rows
    return lines


def file_block(result, rules: dict, hidden: int, settings=None) -> list[str]:
    from speccheck.reporters.reading import read

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
        lines += ["", "The rules did not run on this file: fix the problems with the file itself first."]
    reading = read(result)
    explained: set = set()
    order: list = []
    parts = getattr(result, "parts", {}) or {}
    lines += _group_blocks(
        "Fix these first",
        "Each of these stops the build working, or damages a part, as planned.",
        reading.first,
        parts,
        rules,
        explained,
        order,
    )
    lines += _group_blocks(
        "Worth a look",
        "Thin margins and missing protection: where the build will give trouble.",
        reading.then,
        parts,
        rules,
        explained,
        order,
    )
    lines += _group_blocks(
        "Good to know",
        "Choices worth knowing, and values the check needed but the plan does not give.",
        reading.notes,
        parts,
        rules,
        explained,
        order,
    )
    lines += _waived_block(reading.waived, rules, order)
    lines.extend(sheet_block(result))
    lines.extend(settings_block(order, rules, settings, result))
    return lines


def render(results, settings, run=None) -> str:
    from speccheck import registry
    from speccheck.reporters.common import RunInfo, totals

    run = run or RunInfo()
    rules = registry.load_rules()
    lines = ["# speccheck review", ""]
    cautioned = [r for r in results if r.cautions]
    if cautioned:
        lines += [
            "> **Safety first.** These builds can hurt someone. The cautions below apply before anything "
            "else in this report.",
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
        lines.extend(file_block(r, rules, run.hidden.get(r.path, 0), settings))
    return "\n".join(lines) + "\n"
