"""The value solver: from findings to buyable parts, written back into the plan's own text.

    outcome = solve(path, settings, series="E12")   # proposals, each checked, and the new text
    write(outcome)                                    # atomic write, then the check after it

How it works:
1. The plan is checked as `speccheck check` does. A file with input errors is not solved.
2. For each finding whose rule has a remedy (solver/circuit.py, solver/tuning.py), the remedy reads the
   model and the finding's numbers and proposes options: changes of values (snapped to the
   preferred series, formulas/picks.py) with the figure each gives, best first.
3. Every option is tried on the text in memory (speccheck/textedit.py) and the plan is checked
   again: an option is taken only when the finding it targets is gone and no finding appears
   that was not there before. Options are tried in order; taken changes accumulate, so the
   final text is checked as a whole too. The same plan always gives the same proposal.
4. The changes are shown as a unified diff; with apply they are written atomically
   (speccheck/files.write_atomic) and the file is checked once more.

Nothing here computes a rule's verdict: the engine does, before and after each change.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field
from pathlib import Path

from speccheck import engine, files, loader, textedit, yamlnodes
from speccheck.config import Settings
from speccheck.findings import RANK, Finding
from speccheck.solver import base, circuit, heat, returns, tuning  # noqa: F401  (importing them registers the remedies)

SERIES_NAMES = ("E12", "E24", "E96")


@dataclass
class Outcome:
    path: Path
    text: str  # the plan as read (without any byte-order mark)
    bom: bool
    before: engine.FileResult
    proposals: list = field(default_factory=list)
    unsolved: list = field(default_factory=list)  # findings with no remedy
    new_text: str = ""
    edits: list = field(default_factory=list)  # the textedit.Edits taken, against `text`
    refused: str = ""  # why the file was not solved (input errors)
    after: engine.FileResult | None = None  # the check after writing

    @property
    def taken(self) -> list:
        return [p for p in self.proposals if p.chosen is not None]

    def diff(self) -> str:
        name = str(self.path)
        return "".join(
            difflib.unified_diff(
                self.text.splitlines(keepends=True),
                self.new_text.splitlines(keepends=True),
                fromfile=name,
                tofile=f"{name} (solved)",
            )
        )


class SolveTrouble(Exception):
    """The plan could not be read or written; the message is fit to show."""


def _fingerprints(result: engine.FileResult) -> dict:
    return {f.fingerprint: f for f in result.findings if not f.waived}


class _Checker:
    """Checks versions of one plan's text with the same name, folder and settings."""

    def __init__(self, path: Path, settings: Settings):
        self.path, self.settings = path, settings

    def __call__(self, text: str) -> engine.FileResult:
        return engine.check_loaded(self.load(text), self.settings)

    def load(self, text: str) -> loader.Loaded:
        return loader.load_text(text, str(self.path), self.path.parent, self.settings.root or None)


def read_plan(path: Path) -> tuple[str, bool]:
    try:
        raw = files.read_bytes_bounded(path, yamlnodes.MAX_BYTES)
    except files.FileTrouble as exc:
        raise SolveTrouble(f"{path}: {exc}") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise SolveTrouble(f"{path}: not UTF-8 text; `speccheck check` shows where") from None
    bom = text.startswith("\ufeff")
    return (text[1:] if bom else text), bom


def solve(path: str | Path, settings: Settings | None = None, series: str = "E12") -> Outcome:
    path = Path(path)
    settings = settings or Settings()
    text, bom = read_plan(path)
    check = _Checker(path, settings)
    loaded = check.load(text)
    before = engine.check_loaded(loaded, settings)
    outcome = Outcome(path, text, bom, before, new_text=text)
    if not loaded.can_check or loaded.doc is None:
        errors = sum(1 for f in before.findings if f.rule.startswith("input.") and f.level == "error")
        outcome.refused = (
            f"the plan has {errors} input error{'s' if errors != 1 else ''}; fix "
            f"{'them' if errors != 1 else 'it'} first (`speccheck check {path}` shows where)"
        )
        return outcome
    situation = base.Situation(loaded, before, settings, series)
    seen: set = set()  # titles: two findings about one thing get one proposal
    for finding in before.findings:
        if finding.waived:
            continue
        proposal = _propose(situation, finding)
        if proposal is None or not proposal.options or proposal.title in seen:
            outcome.unsolved.append(finding)
            continue
        seen.add(proposal.title)
        outcome.proposals.append(proposal)
    _choose(outcome, loaded.doc, check)
    cleared = {id(f) for p in outcome.proposals for f in p.clears}
    outcome.unsolved = [f for f in outcome.unsolved if id(f) not in cleared]
    return outcome


def _propose(situation, finding: Finding):
    """The remedy's proposal; a remedy that fails is a finding left unsolved, never a crash."""
    remedy = base.REMEDIES.get(finding.rule)
    if remedy is None:
        return None
    try:
        return remedy(situation, finding)
    except Exception:
        return None


def _choose(outcome: Outcome, doc: yamlnodes.Document, check) -> None:
    """Take, in order, the first option of each proposal that clears its finding and fires nothing new."""
    text = outcome.text
    taken_edits: list[textedit.Edit] = []
    current = outcome.before
    for proposal in outcome.proposals:
        if proposal.finding.fingerprint not in _fingerprints(current):
            by = [p.title for p in outcome.proposals if proposal.finding in p.clears]
            proposal.covered_by = by[0] if by else "a change above"
            continue
        reasons = []
        for option in proposal.options:
            try:
                edits = [change.edit(text, doc) for change in option.changes]
                trial = textedit.apply(text, taken_edits + edits)
            except textedit.EditTrouble as exc:
                reasons.append(f"cannot be written in place: {exc}")
                continue
            result = check(trial)
            was, now = _fingerprints(current), _fingerprints(result)
            new = [f for fp, f in now.items() if fp not in was]
            if new:
                first = new[0]
                reasons.append(f"{option.summary} would bring a new finding, {first.rule}: {first.message}")
                continue
            worse = [f for fp, f in now.items() if RANK[f.level] > RANK[was[fp].level]]
            if worse:
                first = worse[0]
                reasons.append(f"{option.summary} would raise {first.rule} to {first.level}: {first.message}")
                continue
            if proposal.finding.fingerprint in now:
                reasons.append(f"{option.summary} does not clear it")
                continue
            proposal.chosen = option
            _add_checked_figure(option, result)
            original = _fingerprints(outcome.before)
            proposal.clears = [original.get(fp, f) for fp, f in was.items() if fp not in now]
            taken_edits += edits
            current = result
            break
        if proposal.chosen is None:
            proposal.held = reasons[0] if reasons else "no option"
    outcome.edits = taken_edits
    outcome.new_text = textedit.apply(text, taken_edits)


def _add_checked_figure(option: base.Option, result: engine.FileResult) -> None:
    """The figure the option names, as the re-check of the changed plan published it."""
    if option.figure is None:
        return
    section, owner, prefix = option.figure
    for entry in result.sheet:
        if entry.section == section and entry.owner == owner and entry.value.name.startswith(prefix):
            option.result += f"; the check then gives {entry.value.name} {entry.value.text}"
            return


def write(outcome: Outcome, settings: Settings | None = None) -> engine.FileResult:
    """Write the solved text over the plan (atomically) and check the file again."""
    if outcome.refused:
        raise SolveTrouble(f"{outcome.path}: not written: {outcome.refused}")
    # edit the plan, keep the link
    target = outcome.path.resolve() if outcome.path.is_symlink() else outcome.path
    try:
        mode = target.stat().st_mode & 0o7777
        files.write_atomic(
            target, ("\ufeff" if outcome.bom else "") + outcome.new_text, force=True, mode=mode
        )
    except OSError as exc:
        raise SolveTrouble(f"{outcome.path}: cannot be written: {exc.strerror}") from None
    except files.FileTrouble as exc:
        raise SolveTrouble(f"{outcome.path}: {exc}") from None
    outcome.after = _Checker(outcome.path, settings or Settings())(read_plan(outcome.path)[0])
    return outcome.after
