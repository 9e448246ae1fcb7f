"""What the pictures draw, read from the design sheet: conversions (input, LO, IF and its worst
case, image, the passband ahead, spurs), IF paths, signals and detector tanks.

The names looked up are those the rules publish; tests/test_html.py checks that each picture
appears for the examples, so a renamed sheet entry shows up there.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field


class Sheet:
    """The design sheet of one file, looked up by (section, owner, name)."""

    def __init__(self, entries):
        self.entries = list(entries)
        self._at = {(e.section, e.owner, e.value.name): e.value.value for e in self.entries}

    def num(self, section: str, owner: str, name: str) -> float | None:
        value = self._at.get((section, owner, name))
        return float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) else None

    def text(self, section: str, owner: str, name: str) -> str | None:
        value = self._at.get((section, owner, name))
        return value if isinstance(value, str) else None

    def owners(self, section: str) -> list[str]:
        seen: list[str] = []
        for e in self.entries:
            if e.section == section and e.owner not in seen:
                seen.append(e.owner)
        return seen

    def of(self, section: str, owner: str) -> list:
        return [e for e in self.entries if e.section == section and e.owner == owner]


@dataclass
class SignalBand:
    name: str
    width: float  # necessary bandwidth, Hz
    path: str | None = None  # the IF path that serves it, when the sheet says


@dataclass
class PathBand:
    name: str  # e.g. "narrow path"
    low: float
    high: float
    # Room for a response shape (frequency, dB) when the rules publish one; a flat top until then.
    shape: list = field(default_factory=list)


@dataclass
class Conversion:
    owner: str
    f_in: float
    lo: float
    f_if: float
    if_low: float
    if_high: float
    image: float | None
    ahead: tuple | None  # (low, high) of the passband ahead of the mixer
    spurs: list  # (name, frequency)
    paths: list  # PathBand after this conversion
    signals: list  # SignalBand


def signals(sheet: Sheet) -> list[SignalBand]:
    out = []
    for name in sheet.owners("signals"):
        width = sheet.num("signals", name, "necessary bandwidth (ITU-R SM.1138)")
        if width:
            out.append(SignalBand(name, width))
    for path in sheet.owners("if-filter"):
        for e in sheet.of("if-filter", path):
            m = re.fullmatch(r"margin for (.+) \(worst case\)", e.value.name)
            for sig in out:
                if m and m.group(1) == sig.name and sig.path is None:
                    sig.path = path
    return out


def paths(sheet: Sheet) -> list[PathBand]:
    out = []
    for owner in sheet.owners("if-filter"):
        low = sheet.num("if-filter", owner, "passband low edge")
        high = sheet.num("if-filter", owner, "passband high edge")
        if low is not None and high is not None and high > low:
            out.append(PathBand(owner, low, high))
    return out


def conversions(sheet: Sheet) -> list[Conversion]:
    out = []
    all_paths, all_signals = paths(sheet), signals(sheet)
    for owner in sheet.owners("conversion"):
        got = {
            n: sheet.num("conversion", owner, n)
            for n in (
                "input frequency",
                "LO frequency",
                "IF (nominal)",
                "IF lowest (worst case)",
                "IF highest (worst case)",
                "image frequency",
                "passband ahead low edge",
                "passband ahead high edge",
            )
        }
        f_in, lo, f_if = got["input frequency"], got["LO frequency"], got["IF (nominal)"]
        if f_in is None or lo is None or f_if is None:
            continue
        low, high = got["passband ahead low edge"], got["passband ahead high edge"]
        spurs = [
            (e.value.name, float(e.value.value))
            for e in sheet.of("spurs", owner)
            if isinstance(e.value.value, (int, float)) and e.value.unit == "Hz"
        ]
        near = [p for p in all_paths if p.low - 3 * (p.high - p.low) <= f_if <= p.high + 3 * (p.high - p.low)]
        out.append(
            Conversion(
                owner,
                f_in,
                lo,
                f_if,
                got["IF lowest (worst case)"] or f_if,
                got["IF highest (worst case)"] or f_if,
                got["image frequency"],
                (low, high) if low is not None and high is not None else None,
                spurs,
                near,
                all_signals,
            )
        )
    return out


@dataclass
class Tank:
    owner: str
    f0: float
    q: float
    f_if: float | None
    need: float | None  # the widest swing its signals need: 2 x (deviation + drift), Hz
    tune_low: float | None
    tune_high: float | None
    linear: float | None = None  # the linear range as the rule computed it (f0/Q)

    @property
    def half(self) -> float:
        return (self.linear or self.f0 / self.q) / 2


def needed_range(sheet: Sheet, owner: str) -> float | None:
    """The widest range the tank's signals need: freqplan.tank-range publishes one
    'needed range …, 2·(deviation + drift)' per signal (one, unnamed, for a single signal)."""
    needs = [float(e.value.value) for e in sheet.of("discriminator", owner)
             if e.value.name.startswith("needed range") and isinstance(e.value.value, (int, float))]
    return max(needs) if needs else None


def tanks(sheet: Sheet) -> list[Tank]:
    out = []
    for owner in sheet.owners("discriminator"):
        f0 = sheet.num("discriminator", owner, "tank resonance f0")
        q = sheet.num("discriminator", owner, "loaded Q")
        if f0 and q:
            out.append(
                Tank(
                    owner,
                    f0,
                    q,
                    sheet.num("discriminator", owner, "final IF"),
                    needed_range(sheet, owner),
                    sheet.num("discriminator", owner, "tuning range low"),
                    sheet.num("discriminator", owner, "tuning range high"),
                    sheet.num("discriminator", owner, "linear range (f0/Q)"),
                )
            )
    return out
