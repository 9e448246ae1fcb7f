"""What the pictures draw, read from the design sheet: conversions (input, LO, IF and its worst
case, image, the passband ahead, spurs), IF paths, signals and detector tanks.

The names looked up are those the rules publish; tests/test_html.py checks that each picture
appears for the examples, so a renamed sheet entry shows up there.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from functools import partial

from speccheck import responses
from speccheck.formulas import shapes


class Sheet:
    """The design sheet of one file, looked up by section, owner and name (a name may be given by
    its start, so that a wording change after a comma or bracket does not lose the value).

    Format v2 publishes some values once per signal (the switch positions it is received in):
    `signal` picks that signal's entry, falling back to an entry for all signals."""

    def __init__(self, entries):
        self.entries = list(entries)

    def _find(self, section: str, owner: str, name: str, signal: str | None):
        found = [
            e
            for e in self.entries
            if e.section == section
            and e.owner == owner
            and (e.value.name == name or (name.endswith("…") and e.value.name.startswith(name[:-1])))
        ]
        if signal is not None:
            for wanted in (signal, ""):
                for e in found:
                    if getattr(e, "signal", "") == wanted:
                        return e
        return found[0] if found else None

    def value(self, section: str, owner: str, name: str, signal: str | None = None):
        e = self._find(section, owner, name, signal)
        return e.value.value if e is not None else None

    def num(self, section: str, owner: str, name: str, signal: str | None = None) -> float | None:
        e = self._find(section, owner, name, signal)
        value = e.value.value if e is not None else None
        return float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) else None

    def text(self, section: str, owner: str, name: str, signal: str | None = None) -> str | None:
        e = self._find(section, owner, name, signal)
        return e.value.value if e is not None and isinstance(e.value.value, str) else None

    def owners(self, section: str) -> list[str]:
        seen: list[str] = []
        for e in self.entries:
            if e.section == section and e.owner not in seen:
                seen.append(e.owner)
        return seen

    def of(self, section: str, owner: str) -> list:
        return [e for e in self.entries if e.section == section and e.owner == owner]

    def signals_of(self, section: str, owner: str, name: str) -> list[tuple[str, str]]:
        """(signal, positions) of each entry of this name, in sheet order; [("", "")] for one for all."""
        seen: list[tuple[str, str]] = []
        for e in self.of(section, owner):
            key = (getattr(e, "signal", ""), getattr(e, "position", ""))
            if e.value.name == name and key not in seen:
                seen.append(key)
        return seen


def for_words(signal: str, position: str) -> str:
    """'repeater voice (S1 narrow; upstream rbw-100k)', or '' for a value that holds for all."""
    if not signal:
        return ""
    return f"{signal} ({position})" if position else signal


@dataclass
class SignalBand:
    name: str
    width: float  # necessary bandwidth, Hz
    path: str | None = None  # the IF path that serves it, when the sheet says
    position: str = ""  # v2: the switch positions it is received in
    ahead: tuple | None = None  # v2: the passband ahead of the mixer in those positions
    tone: tuple | None = None  # (peak deviation, tone) the rules test it with (FM only)
    responses_ahead: list = field(default_factory=list)  # (centre, Shape) of each filter ahead of the mixer
    image_rejection: float | None = None  # dB, by the passband ahead in its positions
    share: float | None = None  # % of its power its path passes at the worst-case IF (as the rule found)
    share_centre: float | None = None  # % on the path's centre
    share_upstream: float | None = None  # % the upstream bandwidth passes


@dataclass
class PathBand:
    name: str  # e.g. "narrow path"
    low: float
    high: float
    shape: shapes.Shape | None = None  # the response the rules judged it with, as published

    @property
    def centre(self) -> float:
        return (self.low + self.high) / 2

    def attenuation(self, f: float) -> float:
        """dB at frequency f; a flat top (0 dB inside) where no shape was published."""
        if self.shape is None:
            return 0.0 if self.low <= f <= self.high else shapes.ULTIMATE_DB
        return self.shape.attenuation(f - self.centre)


@dataclass
class Conversion:
    owner: str
    f_in: float
    lo: float
    f_if: float
    if_low: float
    if_high: float
    image: float | None
    ahead: tuple | None  # (low, high) of the passband ahead of the mixer (the first, in v2)
    spurs: list  # (name, frequency)
    paths: list  # PathBand after this conversion
    signals: list  # SignalBand
    responses_ahead: list = field(default_factory=list)  # (centre, Shape), when one for all signals
    image_rejection: float | None = None  # dB, when one for all signals

    @property
    def low_side(self) -> bool:
        return self.lo < self.f_in

    def input_of(self, f_if: float) -> float:
        """The input frequency that lands on f_if (the wanted side of the LO)."""
        return self.lo + f_if if self.low_side else self.lo - f_if


def signals(sheet: Sheet) -> list[SignalBand]:
    out = []
    for name in sheet.owners("signals"):
        width = sheet.num("signals", name, "necessary bandwidth…", name)
        if width:
            where = sheet.signals_of("signals", name, "necessary bandwidth (ITU-R SM.1138)")
            out.append(SignalBand(name, width, position=where[0][1] if where else ""))
    for path in sheet.owners("if-filter"):
        for e in sheet.of("if-filter", path):
            m = re.fullmatch(r"margin for (.+) \(worst case\)", e.value.name)
            for sig in out:
                if m and m.group(1) == sig.name and sig.path is None:
                    sig.path = path
    for sig in out:
        dev = sheet.num("signals", sig.name, responses.DEVIATION, sig.name)
        tone = sheet.num("signals", sig.name, responses.TONE, sig.name)
        sig.tone = (dev, tone) if dev is not None and tone else None
        sig.share_upstream = sheet.num("source", "upstream", f"share of {sig.name} passed", sig.name)
        if sig.path is not None:
            sig.share = sheet.num(
                "if-filter", sig.path, f"share of {sig.name} passed at the worst-case IF", sig.name
            )
            sig.share_centre = sheet.num("if-filter", sig.path, f"share of {sig.name} passed", sig.name)
    return out


def ahead_responses(sheet: Sheet, owner: str, signal: str | None) -> list:
    """(centre, Shape) of each filter ahead of the mixer, as freqplan.image published them."""
    out = []
    for k in range(8):
        prefix = responses.ahead_prefix(k)
        centre = sheet.num("conversion", owner, f"{prefix}centre", signal)
        shape = responses.shape_from(lambda n: sheet.value("conversion", owner, n, signal), prefix)
        if centre is None or shape is None:
            break
        out.append((centre, shape))
    return out


def paths(sheet: Sheet) -> list[PathBand]:
    out = []
    for owner in sheet.owners("if-filter"):
        low = sheet.num("if-filter", owner, "passband low edge")
        high = sheet.num("if-filter", owner, "passband high edge")
        if low is not None and high is not None and high > low:
            shape = responses.shape_from(partial(sheet.value, "if-filter", owner), width=high - low)
            out.append(PathBand(owner, low, high, shape))
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
        for sig in all_signals:
            s_low = sheet.num("conversion", owner, "passband ahead low edge", sig.name)
            s_high = sheet.num("conversion", owner, "passband ahead high edge", sig.name)
            sig.ahead = (s_low, s_high) if s_low is not None and s_high is not None else None
            sig.responses_ahead = ahead_responses(sheet, owner, sig.name)
            sig.image_rejection = sheet.num(
                "conversion", owner, "image rejection ahead of the mixer", sig.name
            )
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
                ahead_responses(sheet, owner, None),
                sheet.num("conversion", owner, "image rejection ahead of the mixer"),
            )
        )
    return out


@dataclass
class Tank:
    owner: str
    f0: float
    q: float
    f_if: float | None
    need: float | None  # the swing its signal (or the widest of its signals) needs: 2 x (deviation + drift)
    tune_low: float | None
    tune_high: float | None
    linear: float | None = None  # the linear range as the rule computed it (f0/Q)
    label: str = ""  # v2: the signal and switch positions this Q holds for

    @property
    def half(self) -> float:
        return (self.linear or self.f0 / self.q) / 2


def needed_range(sheet: Sheet, owner: str) -> float | None:
    """The widest range the tank's signals need: freqplan.tank-range publishes one
    'needed range …, 2·(deviation + drift)' per signal (one, unnamed, for a single signal)."""
    needs = [
        float(e.value.value)
        for e in sheet.of("discriminator", owner)
        if e.value.name.startswith("needed range") and isinstance(e.value.value, (int, float))
    ]
    return max(needs) if needs else None


def tanks(sheet: Sheet) -> list[Tank]:
    """One tank per discriminator, or per signal where the damping depends on the switch positions."""
    out = []
    for owner in sheet.owners("discriminator"):
        f0 = sheet.num("discriminator", owner, "tank resonance f0")
        for signal, position in sheet.signals_of("discriminator", owner, "loaded Q"):
            q = sheet.num("discriminator", owner, "loaded Q", signal)
            if not (f0 and q):
                continue
            out.append(
                Tank(
                    owner,
                    f0,
                    q,
                    sheet.num("discriminator", owner, "final IF", signal),
                    sheet.num("discriminator", owner, "needed range…", signal)
                    if signal
                    else needed_range(sheet, owner),
                    sheet.num("discriminator", owner, "tuning range low", signal),
                    sheet.num("discriminator", owner, "tuning range high", signal),
                    sheet.num("discriminator", owner, "linear range (f0/Q)", signal),
                    for_words(signal, position),
                )
            )
    return out
