"""What a check produces: findings with positions and the numbers behind them."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from speccheck import units

LEVELS = ("note", "warning", "error")  # SARIF's level words, least severe first
RANK = {name: i for i, name in enumerate(LEVELS)}


@dataclass(frozen=True, slots=True)
class Location:
    file: str
    line: int = 1
    col: int = 1
    path: str = ""  # where in the document, e.g. "parts.C12.positive"
    end_line: int = 0
    end_col: int = 0


@dataclass(frozen=True, slots=True)
class Value:
    """One computed or quoted number, with its SI unit, shown beside a finding or on the sheet."""

    name: str
    value: float | str
    unit: str = ""

    @property
    def text(self) -> str:
        if isinstance(self.value, str):
            return self.value
        return units.fmt(self.value, self.unit)

    def as_dict(self) -> dict[str, object]:
        value: float | str | None = self.value
        if isinstance(value, float) and not math.isfinite(value):
            value = None  # JSON has no infinity; the text says it
        return {"name": self.name, "value": value, "unit": self.unit, "text": self.text}


@dataclass(slots=True)
class Finding:
    rule: str
    level: str
    message: str
    location: Location
    values: list[Value] = field(default_factory=list)
    fix: str = ""
    stage: str = ""  # the signal-chain stage or section it belongs to, for grouping in reports
    waived: str | None = None  # the reason, when a waiver covers it
    fingerprint: str = ""
    signal: str = ""  # v2: the signal it was found for, when what is in circuit depends on it
    position: str = ""  # v2: the switch positions and upstream setting, e.g. "S1 wide; upstream 1m"

    def sort_key(self) -> tuple[str, int, int, str, str]:
        loc = self.location
        return (loc.file, loc.line, loc.col, self.rule, self.message)


@dataclass(frozen=True, slots=True)
class SheetEntry:
    """One derived quantity on the design sheet."""

    section: str  # e.g. "conversion", "if-filter", "power"
    owner: str  # the part, path or stage it belongs to
    value: Value
    rule: str = ""
    signal: str = ""  # v2: the signal and switch positions it holds for ("" when for all)
    position: str = ""
