"""The frequency plan of a build: one walk along the chain, shared by every reader.

What frequency, with what worst-case spread, arrives at each stage (source drift, crystal
tolerance in ppm, crystal pulling by its load capacitors, oscillator drift times any
multiplier); the LO and IF of every conversion (a multi-conversion chain feeds one IF into the
next); the passband ahead of each mixer (upstream bandwidth, preselector, an earlier IF path)
and the IF paths after it. Walked once per build and cached (`frequency_plan`). The freqplan
and rfpath rule families read it, and so can reporters; the arithmetic is in speccheck.formulas.
"""

from __future__ import annotations

import weakref
from dataclasses import dataclass, field
from typing import Any

from speccheck import units
from speccheck.formulas import bandwidth, resonators, shapes


def hz(value: float) -> str:
    """A frequency with enough digits to tell 455.065 kHz from 455 kHz."""
    return units.fmt(value, "Hz", 6)


def khz(value: float) -> str:
    return units.fmt(value, "Hz", 4)


@dataclass
class Band:
    low: float
    high: float
    what: str
    responses: list = field(default_factory=list)  # (centre, Shape) of each filter in cascade

    @property
    def center(self) -> float:
        return (self.low + self.high) / 2

    def attenuation(self, f: float) -> float:
        """Attenuation in dB at f of the filters that make this band, in cascade."""
        return shapes.cascade_attenuation(self.responses, f)

    def holds(self, f: float) -> bool:
        return self.low <= f <= self.high


@dataclass(frozen=True)
class Passband:
    """A path's passband with its centre and width both known (Hz): what a verdict that weighs
    the signal against the edges reads, once `PathBand.passband()` has said there is one."""

    center: float
    width: float

    @property
    def low(self) -> float:
        return self.center - self.width / 2

    @property
    def high(self) -> float:
        return self.center + self.width / 2


@dataclass
class PathBand:
    name: str
    center: float | None
    width: float | None
    path: Any
    part: Any
    stage: Any
    shape: shapes.Shape | None = None

    def attenuation(self, f: float) -> float:
        """The path's attenuation in dB at frequency f (its response shape about its centre)."""
        if self.shape is None or self.center is None:
            return 0.0
        return self.shape.attenuation(f - self.center)

    def passband(self) -> Passband | None:
        """The path's centre and width, when both are known; None for a path missing either."""
        if self.center is None or self.width is None:
            return None
        return Passband(self.center, self.width)

    @property
    def low(self) -> float | None:
        band = self.passband()
        return None if band is None else band.low

    @property
    def high(self) -> float | None:
        band = self.passband()
        return None if band is None else band.high

    def at(self):
        if self.part is not None and self.part.given("bandwidth"):
            return self.part.at("bandwidth")
        return self.path.at("bandwidth")

    def describe(self) -> str:
        what = f"{self.part.name}" if self.part is not None else "no filter part"
        if self.width is None:
            return what
        return (
            f"{what}, {khz(self.center)} ± {khz(self.width / 2)}"
            if self.center
            else f"{what}, {khz(self.width)}"
        )


@dataclass
class Conversion:
    stage: Any
    owner: str
    f_in: float | None
    in_unc: float
    ahead: Band | None
    lo: float | None = None
    lo_unc: float = 0.0
    f_osc: float | None = None
    pull: float = 0.0  # fractional shift of the crystal from its load capacitance
    crystal: Any = None
    lo_at: Any = None  # Location of the value that sets the LO
    side: str | None = None
    f_if: float | None = None
    if_unc: float = 0.0
    intended: float | None = None
    filter: FilterPoint | None = None
    missing: list = field(default_factory=list)  # (field path, Location)
    assumed: list = field(default_factory=list)  # (field path, what was counted instead)
    parts_of_unc: list = field(default_factory=list)  # words for the message

    def why(self) -> str:
        return ", ".join(self.parts_of_unc) or "no tolerance or drift given"


@dataclass
class FilterPoint:
    stage: Any
    f: float | None
    unc: float
    paths: dict[str, PathBand]
    conversion: Conversion | None
    why: str = ""


@dataclass
class Plan:
    conversions: list = field(default_factory=list)
    filters: list = field(default_factory=list)
    at: dict = field(default_factory=dict)  # id(stage) -> (f, unc)
    source_why: str = ""


_PLANS: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()


def owner(build, stage) -> str:
    """The sheet owner of a stage: its label, numbered when the label repeats in the chain."""
    same = [s for s in build.chain if s.label == stage.label]
    if len(same) < 2:
        return stage.label
    return f"{stage.label} {same.index(stage) + 1}"


def response_shape(width: float, *holders, default: str = shapes.DEFAULT_CLASS) -> shapes.Shape:
    """The response shape of a filter of this width from what its holders state (the first that
    states a key wins: an IF path over its filter part): bandwidth_at, response (the class),
    stopband with stopband_at, or shape_factor. What is not stated comes from the class's
    typical shape (speccheck.formulas.shapes.TYPICAL)."""

    def pick(name):
        for h in holders:
            value = getattr(h, name, None) if h is not None else None
            if value is not None:
                return value
        return None

    at, cls = pick("bandwidth_at"), pick("response") or default
    typical = shapes.TYPICAL[cls]
    at_db = at.si if at is not None and at.si > 0 else typical.at_db
    if cls == "gaussian":
        return shapes.gaussian(width, at_db, typical=at is None)
    stop, factor, stop_at = pick("stopband"), pick("shape_factor"), pick("stopband_at")
    if stop is not None or factor:
        stop_db = stop_at.si if stop_at is not None else (typical.stop_db or 40.0)
        stop_width = stop.si if stop is not None else factor * width
        try:
            return shapes.from_stopband(
                width,
                at_db,
                stop_width,
                stop_db,
                what=f"{khz(width)} at {at_db:g} dB, {khz(stop_width)} at {stop_db:g} dB",
            )
        except ValueError:
            pass  # a stopband no wider than the passband: the class's typical shape stands in
    return shapes.from_class(cls, width, at_db)


def source_shape(src) -> shapes.Shape | None:
    """The upstream bandwidth's shape: an instrument's resolution filter is Gaussian unless stated."""
    if src is None or src.bandwidth is None:
        return None
    default = "gaussian" if src.kind == "instrument-if" else shapes.DEFAULT_CLASS
    return response_shape(src.bandwidth.si, src, default=default)


def _source_band(src) -> Band | None:
    if src is None:
        return None
    bands = []
    if src.bandwidth is not None and src.frequency is not None:
        f, bw = src.frequency.si, src.bandwidth.si
        bands.append(
            Band(
                f - bw / 2,
                f + bw / 2,
                f"the upstream bandwidth ({khz(bw)} around {hz(f)})",
                [(f, source_shape(src))],
            )
        )
    pre = src.preselector
    if pre is not None and pre.center is not None and pre.bandwidth is not None:
        c, bw = pre.center.si, pre.bandwidth.si
        bands.append(
            Band(
                c - bw / 2,
                c + bw / 2,
                f"the preselector ({khz(bw)} around {hz(c)})",
                [(c, response_shape(bw, pre, default="lc"))],
            )
        )
    if not bands:
        return None
    if len(bands) == 1:
        return bands[0]
    low, high = max(b.low for b in bands), min(b.high for b in bands)
    return Band(
        low, max(low, high), " and ".join(b.what for b in bands), [r for b in bands for r in b.responses]
    )


def part_value(build, ref):
    part = build.part(ref)
    return part.value.si if part is not None and part.value is not None else None


def _conversion(build, stage, f, unc, ahead, source_why) -> Conversion:
    c = Conversion(stage, owner(build, stage), f, unc, ahead)
    if stage.input_frequency is not None:
        c.f_in = stage.input_frequency.si
    if stage.if_frequency is not None:
        c.intended = stage.if_frequency.si
    if source_why and unc:
        c.parts_of_unc.append(source_why)
    where = f"chain[{stage.index}]"
    if c.f_in is None:
        c.missing.append((f"source.frequency (or {where}.input_frequency)", stage.loc))
    osc = stage.oscillator
    if osc is None:
        c.missing.append((f"{where}.oscillator", stage.loc))
        return _finish(c)
    mult = osc.multiplier if isinstance(osc.multiplier, int) and osc.multiplier > 0 else 1
    if osc.crystal:
        x = build.part(osc.crystal)
        if x is None or x.kind != "crystal":
            return _finish(c)  # the loader reports the reference
        c.crystal = x
        if x.frequency is None:
            c.missing.append((f"parts.{x.name}.frequency", x.loc))
            return _finish(c)
        c.f_osc = x.frequency.si
        c.lo_at = x.at("frequency")
        tol = x.tolerance.si if x.tolerance is not None else 0.0
        if x.tolerance is None:
            c.assumed.append((f"parts.{x.name}.tolerance", "0 ppm"))
        c.pull = crystal_shift(build, osc, x) or 0.0
        c.lo = c.f_osc * (1 + c.pull) * mult
        c.lo_unc = c.f_osc * tol * mult
        if tol:
            c.parts_of_unc.append(f"±{tol * 1e6:g} ppm on {x.name} ({khz(c.lo_unc)})")
        if c.pull:
            c.parts_of_unc.append(f"{c.pull * 1e6:+.1f} ppm pulling of {x.name} by its load")
    elif osc.frequency is not None:
        c.f_osc = osc.frequency.si
        c.lo = c.f_osc * mult
        c.lo_at = osc.at("frequency")
    else:
        c.missing.append((f"{where}.oscillator.crystal or .frequency", osc.loc))
        return _finish(c)
    if osc.drift is not None:
        c.lo_unc += osc.drift.si * mult
        c.parts_of_unc.append(f"±{khz(osc.drift.si * mult)} oscillator drift")
    return _finish(c)


def _finish(c: Conversion) -> Conversion:
    if c.lo is not None and c.f_in is not None:
        c.side = "low" if c.lo < c.f_in else "high"
        c.f_if = abs(c.f_in - c.lo)
        c.if_unc = c.in_unc + c.lo_unc
    return c


def crystal_load(build, osc):
    """(effective load capacitance, stray counted, stray given) of an oscillator's two caps, or None."""
    if not osc or len(osc.load_caps) != 2:
        return None
    c1, c2 = (part_value(build, ref) for ref in osc.load_caps)
    if c1 is None or c2 is None:
        return None
    stray = osc.stray.si if osc.stray is not None else 0.0
    return resonators.series_load(c1, c2, stray), stray, osc.stray is not None


def crystal_shift(build, osc, x) -> float | None:
    """Fractional pulling of crystal x by the load the oscillator gives it, if computable."""
    load = crystal_load(build, osc)
    if (
        load is None
        or x.load_capacitance is None
        or x.motional_capacitance is None
        or x.shunt_capacitance is None
    ):
        return None
    return resonators.pulling_shift(
        x.motional_capacitance.si, x.shunt_capacitance.si, load[0], x.load_capacitance.si
    )


def _paths(build, stage, default_center) -> dict[str, PathBand]:
    out = {}
    for name, path in stage.paths.items():
        part = build.part(path.filter)
        center = width = None
        if part is not None:
            center = part.center.si if part.center is not None else None
            width = part.bandwidth.si if part.bandwidth is not None else None
        if path.center is not None:
            center = path.center.si
        if path.bandwidth is not None and width is None:
            width = path.bandwidth.si
        if center is None:
            center = default_center
        shape = response_shape(width, path, part) if width else None
        out[name] = PathBand(name, center, width, path, part, stage, shape)
    return out


def path_for(signal, paths: dict[str, PathBand]) -> PathBand | None:
    """The path of one if-filter stage that carries a signal: the one it names, or the only one."""
    if signal.path and signal.path in paths:
        return paths[signal.path]
    if len(paths) == 1:
        return next(iter(paths.values()))
    return None


def used_paths(build, paths: dict[str, PathBand]) -> list[PathBand]:
    """The paths the declared signals travel; all of them when no signal is declared."""
    if not build.signals:
        return list(paths.values())
    seen = []
    for sig in build.signals:
        pb = path_for(sig, paths)
        if pb is not None and pb not in seen:
            seen.append(pb)
    return seen


def frequency_plan(build) -> Plan:
    cached = _PLANS.get(build)
    if cached is not None:
        return cached
    plan = Plan()
    src = build.source
    f = src.frequency.si if src is not None and src.frequency is not None else None
    unc = src.drift.si if src is not None and src.drift is not None else 0.0
    plan.source_why = f"±{khz(unc)} source drift" if unc else ""
    why = plan.source_why
    ahead = _source_band(src)
    last = None
    for stage in build.chain:
        plan.at[id(stage)] = (f, unc)
        if stage.kind == "conversion":
            c = _conversion(build, stage, f, unc, ahead, why)
            plan.conversions.append(c)
            if c.f_if is not None:
                f, unc = c.f_if, c.if_unc
            else:
                f, unc = (c.intended, 0.0)
            why, ahead, last = c.why(), None, c
        elif stage.kind == "if-filter":
            default = last.intended if last is not None and last.intended is not None else f
            point = FilterPoint(stage, f, unc, _paths(build, stage, default), last, why)
            plan.filters.append(point)
            if last is not None and last.filter is None:
                last.filter = point
            bands = [(p, band) for p in used_paths(build, point.paths) if (band := p.passband()) is not None]
            if bands:
                names = ", ".join(p.name for p, _ in bands)
                widest, wide = max(bands, key=lambda pb: pb[1].width)  # the path that lets most through
                ahead = Band(
                    min(band.low for _, band in bands),
                    max(band.high for _, band in bands),
                    f"the IF path ({names})",
                    [(wide.center, widest.shape)] if widest.shape else [],
                )
    plan.at["final"] = (f, unc)
    _PLANS[build] = plan
    return plan


def necessary(sig):
    """(Bn, Carson bandwidth or None, designator or None) of a signal, None when not computable."""
    dev = sig.deviation.si if sig.deviation is not None else None
    top = sig.audio_max.si if sig.audio_max is not None else None
    bn = bandwidth.necessary_bandwidth(sig.modulation, dev, top)
    if not bn:
        return None
    carson = None
    if sig.modulation == "fm" and dev is not None and top is not None:
        carson = bandwidth.carson_bandwidth(dev, top)
    return bn, carson, bandwidth.emission_designator(bn, sig.modulation, sig.service)
