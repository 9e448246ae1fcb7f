"""The solver's plain-text output: what it proposes, what it holds back, the diff, and the
check after writing. Text from the plan goes through the reporters' neutraliser."""

from __future__ import annotations

from speccheck.reporters.neutral import plain as _plain
from speccheck.reporters.text import finding_lines
from speccheck.solver.base import Proposal
from speccheck.solver.run import Outcome


def _at(f) -> str:
    return f"{f.rule} at line {f.location.line}"


def _proposal_lines(p: Proposal) -> list[str]:
    lines = [f"{_plain(p.title)}  ({_at(p.finding)})"]
    if p.chosen is not None:
        lines.append(f"  change: {_plain(p.chosen.summary)}")
        lines.append(f"  gives:  {_plain(p.chosen.result)}")
        others = [o for o in p.options if o is not p.chosen]
        for other in others:
            lines.append(f"  or:     {_plain(other.summary)}: {_plain(other.result)}")
        said = [_at(f) for f in p.clears]
        cleared = ", ".join(
            dict.fromkeys(f"{at} ({said.count(at)} findings)" if said.count(at) > 1 else at for at in said)
        )
        lines.append(f"  clears: {cleared}")
    else:
        lines.append(f"  held back: {_plain(p.held)}")
        for option in p.options:
            lines.append(f"  tried:  {_plain(option.summary)}: {_plain(option.result)}")
    if p.note:
        lines.append(f"  note:   {_plain(p.note)}")
    if p.source:
        lines.append(f"  from:   {_plain(p.source)}")
    return lines


def render(outcome: Outcome, show_diff: bool = True) -> str:
    name = _plain(str(outcome.path))
    if outcome.refused:
        return f"{name}: nothing solved: {_plain(outcome.refused)}\n"
    live = [f for f in outcome.before.findings if not f.waived]
    taken = outcome.taken
    held = [p for p in outcome.proposals if p.chosen is None and not p.covered_by]
    out = (
        [
            f"{name}: SAFETY CAUTIONS for this build:",
            *(f"  ! {_plain(c)}" for c in outcome.before.cautions),
            "",
        ]
        if outcome.before.cautions
        else []
    )
    out += [
        f"{name}: {len(live)} finding{'s' if len(live) != 1 else ''}; "
        f"{len(taken)} change{'s' if len(taken) != 1 else ''} proposed"
        + (f", {len(held)} held back" if held else "")
        + (f", {len(outcome.unsolved)} with no computed remedy" if outcome.unsolved else ""),
        "",
    ]
    for p in taken:
        out += _proposal_lines(p) + [""]
    if held:
        out.append("held back (the plan stays as it is there):")
        for p in held:
            out += ["  " + line for line in _proposal_lines(p)]
        out.append("")
    if outcome.unsolved:
        out.append("no computed remedy (see each finding's fix):")
        out += [f"  {line}" for f in outcome.unsolved for line in finding_lines(f)[:1]]
        out.append("")
    if show_diff and outcome.new_text != outcome.text:
        out += [_plain(line) for line in outcome.diff().splitlines()]
        out.append("")
    return "\n".join(out) + "\n"


def render_after(outcome: Outcome) -> str:
    """After writing: which findings the changes cleared and which remain."""
    if outcome.after is None:
        return ""
    before = {f.fingerprint: f for f in outcome.before.findings if not f.waived}
    after = [f for f in outcome.after.findings if not f.waived]
    gone = [f for fp, f in before.items() if fp not in {a.fingerprint for a in after}]
    head = (
        f"written {_plain(str(outcome.path))}; checked again: {len(gone)} "
        f"finding{'s' if len(gone) != 1 else ''} gone, {len(after)} "
        f"remain{'s' if len(after) == 1 else ''}"
    )
    out = [head]
    for f in gone:
        out.append(f"  gone:   {_at(f)}: {_plain(f.message)}")
    for f in after:
        out.append(f"  remains: {finding_lines(f)[0]}")
    return "\n".join(out) + "\n"


# ---- JSON: our own shape, versioned by "solve_version" ------------------------------------------

def _finding(f) -> dict:
    return {"rule": f.rule, "level": f.level, "line": f.location.line, "column": f.location.col,
            "path": f.location.path, "message": f.message}


def _option(o) -> dict:
    return {"change": o.summary, "gives": o.result}


def _proposal(p: Proposal) -> dict:
    return {
        "finding": _finding(p.finding),
        "title": p.title,
        "taken": _option(p.chosen) if p.chosen is not None else None,
        "options": [_option(o) for o in p.options],
        "held_back": p.held or None,
        "cleared_by": p.covered_by or None,
        "clears": [_finding(f) for f in p.clears],
        "note": p.note or None,
        "source": p.source,
    }


def as_dict(outcome: Outcome) -> dict:
    doc: dict = {"solve_version": 1, "file": str(outcome.path), "cautions": list(outcome.before.cautions)}
    if outcome.refused:
        doc["refused"] = outcome.refused
        return doc
    doc["proposals"] = [_proposal(p) for p in outcome.proposals]
    doc["unsolved"] = [_finding(f) for f in outcome.unsolved]
    doc["diff"] = outcome.diff()
    if outcome.after is not None:
        before = {f.fingerprint: f for f in outcome.before.findings if not f.waived}
        remain = [f for f in outcome.after.findings if not f.waived]
        still = {f.fingerprint for f in remain}
        doc["after"] = {"gone": [_finding(f) for fp, f in before.items() if fp not in still],
                        "remain": [_finding(f) for f in remain]}
    return doc


def render_json(outcome: Outcome) -> str:
    import json

    from speccheck.reporters.neutral import json_text

    return json_text(json.dumps(as_dict(outcome), indent=2, ensure_ascii=False)) + "\n"


# ---- the command -----------------------------------------------------------------------------

class CommandTrouble(Exception):
    """`speccheck solve` cannot do its job (exit 2); the message is fit to show."""


def run_command(path, settings, series: str, apply_changes: bool, fmt: str) -> str:
    """What `speccheck solve` prints: solve, show, write when asked, show the check after."""
    from pathlib import Path

    from speccheck import solver

    if not Path(path).exists():
        raise CommandTrouble(f"{path}: no such file")
    try:
        outcome = solver.solve(path, settings, series)
        out = render(outcome) if fmt == "text" else ""
        if outcome.refused and apply_changes:
            raise CommandTrouble(f"{path}: not written: {outcome.refused}")
        if apply_changes and outcome.new_text != outcome.text:
            solver.write(outcome, settings)
            out += render_after(outcome) if fmt == "text" else ""
        elif apply_changes and fmt == "text":
            out += "nothing to write: the plan stays as it is\n"
    except solver.SolveTrouble as exc:
        raise CommandTrouble(str(exc)) from None
    return out + (render_json(outcome) if fmt == "json" else "")
