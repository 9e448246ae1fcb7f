"""What every report format shares: what a run knows beyond the results, totals, values as data."""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass
class RunInfo:
    """What a run knows beyond the per-file results."""

    skipped: list = field(default_factory=list)  # YAML files in folders that are not build files
    excluded: list = field(default_factory=list)  # build files the project file's globs leave out
    set_aside: list = field(default_factory=list)  # (path, why): not regular files, links out of the tree
    hidden: dict = field(default_factory=dict)  # file path -> findings hidden by the baseline
    baseline: str = ""  # the baseline file, if one was used
    config: str = ""  # the project file, if one was used

    @property
    def hidden_total(self) -> int:
        return sum(self.hidden.values())


def value_dict(v) -> dict:
    """A Value as JSON-safe data (Value.as_dict writes a non-finite number as null; its text says it)."""
    return v.as_dict()


def totals(results) -> dict:
    """Open findings by level (waived ones not included) and the waived count."""
    out = {"error": 0, "warning": 0, "note": 0, "waived": 0}
    for r in results:
        for f in r.findings:
            out["waived" if f.waived else f.level] += 1
    return out
