"""Plain text in the file:line:col: level rule-id message shape, with the numbers and the fix."""

from __future__ import annotations

import click

from speccheck.findings import LEVELS
from speccheck.reporters.neutral import plain

COLORS = {"error": "red", "warning": "yellow", "note": "cyan"}


def _plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def counts_line(counts: dict) -> str:
    return ", ".join(_plural(counts[level], level) for level in reversed(LEVELS))


def finding_lines(f, color: bool = False) -> list[str]:
    loc = f.location
    level = click.style(f.level, fg=COLORS[f.level], bold=True) if color else f.level
    head = f"{plain(loc.file)}:{loc.line}:{loc.col}: {level} {f.rule} {plain(f.message)}"
    if f.waived:
        head += f" [waived: {plain(f.waived)}]"
    lines = [head]
    if f.values:
        lines.append("    numbers: " + plain("; ".join(f"{v.name} {v.text}" for v in f.values)))
    if f.fix and not f.waived:
        lines.append(f"    fix: {plain(f.fix)}")
    return lines


def tail_line(results, run) -> str:
    from speccheck.reporters.common import totals

    counts = totals(results)
    tail = f"speccheck: {_plural(len(results), 'file')} checked: {counts_line(counts)}"
    extra = []
    if counts["waived"]:
        extra.append(f"{counts['waived']} waived")
    if run is not None and run.baseline:
        extra.append(f"{run.hidden_total} hidden by the baseline")
    if extra:
        tail += f" ({', '.join(extra)})"
    return tail


def render(results, settings, color: bool = False, run=None) -> str:
    out: list[str] = []
    for result in results:
        if result.cautions:
            out.append(f"{plain(result.path)}: SAFETY CAUTIONS for this build:")
            out.extend(f"  ! {plain(c)}" for c in result.cautions)
        for f in result.findings:
            out.extend(finding_lines(f, color))
    if run is not None:
        out.extend(
            f"{plain(path)}: note: skipped, not a build file (no 'build_spec:' key)" for path in run.skipped
        )
        out.extend(f"{plain(path)}: note: skipped, excluded by the project file" for path in run.excluded)
        out.extend(f"{plain(path)}: note: skipped, {why}" for path, why in run.set_aside)
    out.append(tail_line(results, run))
    return "\n".join(out) + "\n"
