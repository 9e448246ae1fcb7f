"""Waivers written in the build file, and the review.* findings that keep them honest
(the review family itself is defined in rules/review.py).

A waiver is a YAML comment of this shape, on the line a finding points at or on a comment
line just above it (a run of comment lines directly above counts; a blank line ends it):

    C33: {kind: capacitor, ...}   # waive wiring.cap-voltage because the 10 V part is a bench stand-in

    # waive wiring.crystal-dc, wiring.polarity-unstated because this board is a test fixture
    X1:
      kind: crystal

The comment starts with the word `waive`, names one or more rule ids (comma separated), optionally the one
signal it is limited to (`for broadcast FM`, format v2: findings found per signal and switch position name
their signal), and gives the reason after `because`. It covers the findings of those rules that point at
that line, or anywhere inside the part, device, stage or section whose key is on that line.

A waived finding stays in every report, marked waived with its reason, and is counted as
waived; it does not count toward the exit code. A waiver with no reason waives nothing and is
itself a finding, and so is one that matches no finding or names no rule.
"""

from __future__ import annotations

import re

from speccheck import registry
from speccheck.findings import Finding, Location

_ID = r"[a-z][a-z0-9-]*\.[a-z0-9][a-z0-9-]*"
WAIVER = re.compile(rf"^waive\s+(?P<ids>{_ID}(?:\s*,\s*{_ID})*)(?P<rest>.*)$", re.IGNORECASE | re.DOTALL)
REASON = re.compile(r"^because\b[\s:,-]*(?P<reason>.*)$", re.IGNORECASE | re.DOTALL)
FOR_SIGNAL = re.compile(r"^for\s+(?P<signal>.+?)\s+(?=because\b)", re.IGNORECASE | re.DOTALL)
NOT_WAIVABLE = ("input", "review")
STAGE = "review"
class Waiver:
    __slots__ = ("col", "covers", "end_col", "ids", "line", "problem", "reason", "signal", "target", "used")

    def __init__(self, line, col, end_col, ids, reason, problem, signal=""):
        self.line, self.col, self.end_col = line, col, end_col
        self.ids, self.reason, self.problem = ids, reason, problem
        self.target, self.covers, self.used = None, [], set()
        self.signal = signal  # v2: covers only the findings for this signal ("" for all)


def parse_comment(text: str):
    """Comment text (without '#') -> (rule ids, reason or None, problem or None), or None when the
    comment is not a waiver at all."""
    m = WAIVER.match(text.strip())
    if not m:
        return None
    ids = [i.strip().lower() for i in m.group("ids").split(",")]
    rest = m.group("rest").strip()
    named = FOR_SIGNAL.match(rest)
    if named:
        rest = rest[named.end():]
    if not rest:
        return ids, None, "gives no reason"
    r = REASON.match(rest)
    if not r:
        return ids, None, f"gives its reason without the word 'because' ('{rest[:40]}')"
    reason = " ".join(r.group("reason").split())
    if not reason:
        return ids, None, "gives no reason after 'because'"
    return ids, reason, None


def signal_named(text: str) -> str:
    """The signal a waiver is limited to (`# waive RULE for SIGNAL because ...`), or ''."""
    m = WAIVER.match(text.strip())
    named = FOR_SIGNAL.match(m.group("rest").strip()) if m else None
    return " ".join(named.group("signal").split()) if named else ""


def _comment_col(line: str, text: str) -> int:
    for i, ch in enumerate(line):
        if ch == "#" and line[i + 1:].strip() == text:
            return i + 1
    return max(1, line.find("#") + 1)


def _is_comment_only(line: str) -> bool:
    return line.lstrip().startswith("#")


def collect(text: str, comments: dict) -> list[Waiver]:
    lines = text.splitlines()
    found = []
    for no, body in sorted(comments.items()):
        parsed = parse_comment(body)
        if parsed is None:
            continue
        ids, reason, problem = parsed
        line = lines[no - 1] if 0 < no <= len(lines) else ""
        w = Waiver(no, _comment_col(line, body), len(line) + 1, ids, reason, problem, signal_named(body))
        if not _is_comment_only(line):
            w.target = no
        else:
            nxt = no + 1
            while nxt <= len(lines) and _is_comment_only(lines[nxt - 1]):
                nxt += 1
            if nxt <= len(lines) and lines[nxt - 1].strip():
                w.target = nxt
        found.append(w)
    return found


def _dotted(path) -> str:
    from speccheck.schema import dotted

    return dotted(path)


def _covered_paths(doc, line: int) -> list[str]:
    """Document paths whose key (or list item) starts on this line."""
    out = [_dotted(p) for p, mark in doc.keys.items() if mark.line == line]
    out += [_dotted(p) for p, mark in doc.values.items()
            if p and isinstance(p[-1], int) and mark.line == line]
    return [p for p in out if p]


def _inside(path: str, holder: str) -> bool:
    return path == holder or path.startswith((holder + ".", holder + "["))


def _report(result, settings, rule_id, message, w: Waiver, path=""):
    own = registry.load_rules()[rule_id]
    result.findings.append(
        Finding(
            rule_id,
            settings.level_for(rule_id, own.level),
            message,
            Location(result.path, w.line, w.col, path, w.line, w.end_col),
            stage=STAGE,
            fix=own.fix,
        )
    )


def apply(result, loaded, settings):
    """Mark the findings the build file's waivers cover, and report the waivers that are wrong."""
    doc = getattr(loaded, "doc", None)
    if doc is None or not doc.comments:
        return None
    rules = registry.load_rules()
    waivers = collect(loaded.text or "", doc.comments)
    if not waivers:
        return None
    ran = loaded.can_check
    here = [f for f in result.findings if f.location.file == result.path and f.stage != "internal"]
    for w in waivers:
        covers = _covered_paths(doc, w.target) if w.target else []
        target_path = covers[0] if covers else ""
        for rule_id in w.ids:
            family = rule_id.split(".", 1)[0]
            if rule_id not in rules or family in NOT_WAIVABLE:
                why = (
                    f"{family} findings cannot be waived"
                    if rule_id in rules or family in NOT_WAIVABLE
                    else f"there is no rule '{rule_id}'{_suggest(rule_id, rules)}"
                )
                _report(
                    result,
                    settings,
                    "review.waiver-unknown-rule",
                    f"waiver for {rule_id}: {why}",
                    w,
                    target_path,
                )
                continue
            if w.problem:
                continue
            for f in here:
                if f.rule != rule_id or f.waived:
                    continue
                if w.signal and f.signal.lower() != w.signal.lower():
                    continue
                if w.target and (
                    f.location.line == w.target or any(_inside(f.location.path, c) for c in covers)
                ):
                    f.waived = w.reason
                    w.used.add(rule_id)
            if rule_id not in w.used and ran and settings.enabled(rule_id):
                where = f"line {w.target}" if w.target else "nothing (no line follows it directly)"
                _report(
                    result,
                    settings,
                    "review.waiver-unused",
                    f"waiver for {rule_id} matches no finding: it covers {where}, where {rule_id} "
                    "found nothing",
                    w,
                    target_path,
                )
        if w.problem:
            _report(
                result,
                settings,
                "review.waiver-reason",
                f"waiver for {', '.join(w.ids)} {w.problem}, so it waives nothing; a waiver needs a "
                f"reason: '# waive {w.ids[0]} because ...'",
                w,
                target_path,
            )
    return None


def _suggest(word, choices) -> str:
    import difflib

    close = difflib.get_close_matches(word, list(choices), n=1)
    return f"; did you mean '{close[0]}'?" if close else ""
