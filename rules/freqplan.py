"""Frequency plan: conversion arithmetic, image, necessary bandwidth, spurs, tank, crystal, audio corner.

The chain is walked once per build (`frequency_plan`): what frequency, with what worst-case
uncertainty, arrives at each stage; which LO each conversion really makes; which passband
stands ahead of each mixer and which IF paths follow it. The rules below read that walk,
report what does not fit and publish every number they derived to the design sheet.
All formulas live in speccheck.rf.
"""

from __future__ import annotations

import weakref
from dataclasses import dataclass, field

from speccheck import rf, units
from speccheck.findings import Value
from speccheck.formulas import harmonics, shapes
from speccheck.registry import rule


def hz(value: float) -> str:
    """A frequency with enough digits to tell 455.065 kHz from 455 kHz."""
    return units.fmt(value, "Hz", 6)


def khz(value: float) -> str:
    return units.fmt(value, "Hz", 4)


def _pct(x: float) -> str:
    return f"{x * 100:+.1f} %"


def _setting(ctx, name: str, cast=float):
    try:
        return cast(ctx.setting(name))
    except (TypeError, ValueError):
        return cast(ctx.rule.settings[name])


# ---- the walk along the chain ----------------------------------------------------------------

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
        return sum(shape.attenuation(f - c) for c, shape in self.responses)

    def holds(self, f: float) -> bool:
        return self.low <= f <= self.high


@dataclass
class PathBand:
    name: str
    center: float | None
    width: float | None
    path: object
    part: object
    stage: object
    shape: shapes.Shape | None = None

    def attenuation(self, f: float) -> float:
        """The path's attenuation in dB at frequency f (its response shape about its centre)."""
        if self.shape is None or self.center is None:
            return 0.0
        return self.shape.attenuation(f - self.center)

    @property
    def low(self):
        return None if self.center is None or self.width is None else self.center - self.width / 2

    @property
    def high(self):
        return None if self.center is None or self.width is None else self.center + self.width / 2

    def at(self):
        if self.part is not None and self.part.given("bandwidth"):
            return self.part.at("bandwidth")
        return self.path.at("bandwidth")

    def describe(self) -> str:
        what = f"{self.part.name}" if self.part is not None else "no filter part"
        if self.width is None:
            return what
        return f"{what}, {khz(self.center)} ± {khz(self.width / 2)}" if self.center else f"{what}, {khz(self.width)}"


@dataclass
class Conversion:
    stage: object
    owner: str
    f_in: float | None
    in_unc: float
    ahead: Band | None
    lo: float | None = None
    lo_unc: float = 0.0
    f_osc: float | None = None
    pull: float = 0.0  # fractional shift of the crystal from its load capacitance
    crystal: object = None
    lo_at: object = None  # Location of the value that sets the LO
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
    stage: object
    f: float | None
    unc: float
    paths: dict
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
            return shapes.from_stopband(width, at_db, stop_width, stop_db,
                                        what=f"{khz(width)} at {at_db:g} dB, {khz(stop_width)} at {stop_db:g} dB")
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
        bands.append(Band(f - bw / 2, f + bw / 2, f"the upstream bandwidth ({khz(bw)} around {hz(f)})",
                          [(f, source_shape(src))]))
    pre = src.preselector
    if pre is not None and pre.center is not None and pre.bandwidth is not None:
        c, bw = pre.center.si, pre.bandwidth.si
        bands.append(Band(c - bw / 2, c + bw / 2, f"the preselector ({khz(bw)} around {hz(c)})",
                          [(c, response_shape(bw, pre, default="lc"))]))
    if not bands:
        return None
    if len(bands) == 1:
        return bands[0]
    low, high = max(b.low for b in bands), min(b.high for b in bands)
    return Band(low, max(low, high), " and ".join(b.what for b in bands), [r for b in bands for r in b.responses])


def _value(build, ref):
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
    c1, c2 = (_value(build, ref) for ref in osc.load_caps)
    if c1 is None or c2 is None:
        return None
    stray = osc.stray.si if osc.stray is not None else 0.0
    return rf.series_load(c1, c2, stray), stray, osc.stray is not None


def crystal_shift(build, osc, x) -> float | None:
    """Fractional pulling of crystal x by the load the oscillator gives it, if computable."""
    load = crystal_load(build, osc)
    if load is None or x.load_capacitance is None or x.motional_capacitance is None or x.shunt_capacitance is None:
        return None
    return rf.pulling_shift(x.motional_capacitance.si, x.shunt_capacitance.si, load[0], x.load_capacitance.si)


def _paths(build, stage, default_center) -> dict:
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


def path_for(signal, paths: dict):
    """The path of one if-filter stage that carries a signal: the one it names, or the only one."""
    if signal.path and signal.path in paths:
        return paths[signal.path]
    if len(paths) == 1:
        return next(iter(paths.values()))
    return None


def used_paths(build, paths: dict) -> list:
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
            bands = [p for p in used_paths(build, point.paths) if p.low is not None]
            if bands:
                names = ", ".join(p.name for p in bands)
                widest = max(bands, key=lambda p: p.width)  # the path that lets most through
                ahead = Band(min(p.low for p in bands), max(p.high for p in bands), f"the IF path ({names})",
                             [(widest.center, widest.shape)] if widest.shape else [])
    plan.at["final"] = (f, unc)
    _PLANS[build] = plan
    return plan


def necessary(sig):
    """(Bn, Carson bandwidth or None, designator or None) of a signal, None when not computable."""
    dev = sig.deviation.si if sig.deviation is not None else None
    top = sig.audio_max.si if sig.audio_max is not None else None
    bn = rf.necessary_bandwidth(sig.modulation, dev, top)
    if not bn:
        return None
    carson = rf.carson_bandwidth(dev, top) if sig.modulation == "fm" else None
    return bn, carson, rf.emission_designator(bn, sig.modulation, sig.service)


def _missing_note(ctx, c: Conversion, stage_label: str):
    for path, loc in c.missing[:1]:
        ctx.report(f"{c.owner}: {path} is not given, so the LO and the IF it makes cannot be computed",
                   loc, level="note", stage=stage_label,
                   fix=f"Give {path} so the conversion can be checked.")


# ---- 1. conversion arithmetic -----------------------------------------------------------------

@rule("freqplan.conversion", verify='Measure the LO with a frequency counter at a buffered output or a loosely coupled probe, and the IF at the mixer output with a receiver or spectrum analyser.',
      level="error",
      title="The IF each local oscillator really produces",
      explanation="""
      A mixer makes the difference between its input and the local oscillator (LO). With low-side
      injection the LO sits below the input, f_LO = f_in - f_IF; with high-side injection above,
      f_LO = f_in + f_IF. A crystal LO runs at its marked frequency (an overtone crystal at the
      overtone it is marked for), times any multiplier after the oscillator; the oscillator's drift
      is taken at the oscillator and multiplied with it. speccheck computes the LO and the IF that
      result, the worst-case spread of that IF (crystal tolerance in ppm, the crystal's pulling by
      the load the oscillator gives it, oscillator drift, and the drift of the source), and puts
      them on the design sheet. In a chain of several conversions the IF out of one is the input
      of the next, spread and all.

      An LO on the other side of the input from what the plan says still gives the same IF, but
      the spectrum comes out inverted and the image moves to the other side; the plan should say
      which it is. An LO equal to the input gives no IF at all.
      """,
      fix="Choose the LO as f_in - f_IF (low side) or f_in + f_IF (high side) and declare the side.",
      source="textbook mixer arithmetic (e.g. Tooley, Electronic Circuits); common practice: a 21.4 MHz IF to "
             "455 kHz low side needs a 20.945 MHz LO")
def conversion(build, ctx):
    plan = frequency_plan(build)
    for c in plan.conversions:
        stage = c.stage
        if c.missing:
            _missing_note(ctx, c, stage.label)
            continue
        if c.lo is None:
            continue
        osc = stage.oscillator
        ctx.publish("conversion", c.owner, "input frequency", c.f_in, "Hz")
        ctx.publish("conversion", c.owner, "LO frequency", c.lo, "Hz")
        if c.pull:
            ctx.publish("conversion", c.owner, "LO shift by crystal pulling", round(c.lo - c.lo / (1 + c.pull), 3), "Hz")
        ctx.publish("conversion", c.owner, "LO worst-case spread (±)", c.lo_unc, "Hz")
        ctx.publish("conversion", c.owner, "injection", f"{c.side} side")
        if c.f_if <= 0:
            ctx.report(f"{c.owner}: the LO ({hz(c.lo)}) equals the input ({hz(c.f_in)}); the mixer makes no IF",
                       c.lo_at or osc.loc, [Value("LO", c.lo, "Hz"), Value("input", c.f_in, "Hz")],
                       stage=stage.label)
            continue
        ctx.publish("conversion", c.owner, "IF (nominal)", c.f_if, "Hz")
        ctx.publish("conversion", c.owner, "IF lowest (worst case)", c.f_if - c.if_unc, "Hz")
        ctx.publish("conversion", c.owner, "IF highest (worst case)", c.f_if + c.if_unc, "Hz")
        if c.intended is not None:
            ctx.publish("conversion", c.owner, "IF offset from intended", round(c.f_if - c.intended, 3), "Hz")
        if c.assumed or (c is plan.conversions[0] and build.source is not None and build.source.drift is None):
            counted = [f"{p} (counted as {v})" for p, v in c.assumed]
            if c is plan.conversions[0] and build.source is not None and build.source.drift is None:
                counted.append("source.drift (counted as 0 Hz)")
            only_source = not c.assumed  # then the note is about the source section, so point there
            ctx.report(f"{c.owner}: the worst-case IF leaves out what is not given: {', '.join(counted)}",
                       build.source.loc if only_source else (c.lo_at or osc.loc), level="note", stage=stage.label,
                       fix="Give the crystal tolerance and the source drift so the worst case is real.")
        if osc.injection in ("low", "high") and osc.injection != c.side:
            image = rf.image_frequency(c.f_in, c.lo)
            ctx.report(f"{c.owner}: injection is declared {osc.injection} side, but the LO ({hz(c.lo)}) is "
                       f"{'below' if c.side == 'low' else 'above'} the input ({hz(c.f_in)}): the IF is still "
                       f"{hz(c.f_if)}, but the spectrum is {'not ' if c.side == 'low' else ''}inverted and the image "
                       f"lies at {hz(image)}", osc.at("injection"),
                       [Value("LO", c.lo, "Hz"), Value("input", c.f_in, "Hz"), Value("image", image, "Hz")],
                       level="warning", stage=stage.label,
                       fix=f"Declare injection: {c.side}, or choose the LO on the {osc.injection} side "
                           f"({hz(rf.lo_for(c.f_in, c.intended or c.f_if, osc.injection))}).")
        if c.filter is None:
            ctx.report(f"{c.owner}: no if-filter stage follows, so the IF of {hz(c.f_if)} is checked against no "
                       f"passband", stage.loc, [Value("IF", c.f_if, "Hz")], level="note", stage=stage.label,
                       fix="Add the if-filter stage (with its filter part or passband) after the conversion.")


# ---- 1b. the signal inside the filter at the worst-case IF ------------------------------------

@rule("freqplan.filter-fit", verify="Feed a generator at the input frequency, step it across the signal's width, and watch the level after the filter: the whole signal must sit on the filter's flat top.",
      level="error",
      title="Signal must stay inside the IF filter at the worst-case IF",
      explanation="""
      The filter after the mixer passes a fixed band around its centre. The signal arrives at the IF
      the LO actually makes, give or take the crystal tolerance, the crystal's pulling, oscillator
      drift and the drift of the source. At the worst case the signal's occupied band (its
      necessary bandwidth, centred on the shifted IF) must still lie inside the passband, or one
      sideband is cut: distortion, lost audio, squelch chatter. A wrong crystal, or one pulled by
      the wrong load capacitors, can put the whole signal outside the filter.

      A warning comes when the room left between the signal's worst-case edge and the filter's
      edge is under a share of the filter's half-bandwidth (setting margin_share, default 0.1):
      filter skirts, part tolerances and ageing eat that room. Filters are taken at the bandwidth
      their part states (bandwidth_at, often 6 dB).
      """,
      fix="Use the crystal (and load capacitors) that put the IF on the filter's centre, or a filter centred on "
          "the IF the oscillator makes; reduce drift where the margin is thin.",
      source="common practice: a 455 kHz ceramic filter of ±10 kHz at 6 dB passes 16 kHz narrowband FM",
      settings={"margin_share": 0.1})
def filter_fit(build, ctx):
    plan = frequency_plan(build)
    share_min = _setting(ctx, "margin_share")
    published = set()
    for point in plan.filters:
        if point.f is None:
            continue
        for sig in build.signals:
            need = necessary(sig)
            pb = path_for(sig, point.paths)
            if need is None or pb is None or pb.width is None or pb.center is None:
                continue
            bn = need[0]
            owner_name = f"{pb.name} path"
            if id(pb) not in published:
                published.add(id(pb))
                ctx.publish("if-filter", owner_name, "passband low edge", pb.low, "Hz")
                ctx.publish("if-filter", owner_name, "passband high edge", pb.high, "Hz")
            if bn > pb.width:
                continue  # freqplan.path-width reports a path narrower than the signal
            sig_lo, sig_hi = point.f - point.unc - bn / 2, point.f + point.unc + bn / 2
            margin = min(pb.high - sig_hi, sig_lo - pb.low)
            share = margin / (pb.width / 2)
            ctx.publish("if-filter", owner_name, f"margin for {sig.name} (worst case)", margin, "Hz")
            if margin >= 0 and share >= share_min:
                continue
            conv = point.conversion
            # Would the IF on the filter's centre clear it? Then the offset is the cause: point at
            # what sets the frequency (the crystal, the LO); otherwise at the filter's width.
            centred = (pb.width / 2 - bn / 2 - point.unc) / (pb.width / 2) >= share_min
            if centred and conv is not None and conv.lo_at is not None:
                where = conv.lo_at
            elif centred and conv is None and build.source is not None:
                where = build.source.at("frequency")
            else:
                where = pb.at()
            cause = f"LO {hz(conv.lo)}" if conv is not None and conv.lo is not None else "the input"
            values = [Value("IF (nominal)", point.f, "Hz"), Value("IF spread (±)", point.unc, "Hz"),
                      Value("necessary bandwidth", bn, "Hz"), Value("passband low", pb.low, "Hz"),
                      Value("passband high", pb.high, "Hz"), Value("margin", margin, "Hz")]
            spread = f"{hz(point.f)} ± {khz(point.unc)} ({cause}; {point.why})"
            if margin < 0:
                ctx.report(f"{sig.name} does not fit the {pb.name} path at the worst-case IF: the IF is {spread}, "
                           f"so the {khz(bn)} signal reaches {hz(sig_lo)} to {hz(sig_hi)}, {khz(-margin)} past the "
                           f"passband {hz(pb.low)} to {hz(pb.high)} ({pb.describe()})", where, values,
                           stage=point.stage.label)
            else:
                ctx.report(f"{sig.name} fits the {pb.name} path with only {khz(margin)} to spare at the worst-case IF "
                           f"({share:.0%} of the half passband, under {share_min:.0%}): the IF is {spread}, the "
                           f"passband {hz(pb.low)} to {hz(pb.high)} ({pb.describe()})", where, values,
                           level="warning", stage=point.stage.label)


# ---- 2. image ----------------------------------------------------------------------------

@rule("freqplan.image", verify="Set a generator to the image frequency at the wanted signal's level and compare the RSSI or audio with the wanted signal: the difference is the image rejection.",
      level="warning",
      title="Image frequency with nothing ahead of the mixer to reject it",
      explanation="""
      A mixer answers two inputs with the same IF: the wanted one and its image, mirrored about the
      LO on the far side (f_image = 2 f_LO - f_in, that is f_in - 2 f_IF for low-side and
      f_in + 2 f_IF for high-side injection). Whatever sits on the image frequency comes out in the
      IF on top of the wanted signal, and the IF filter cannot tell them apart. Only something ahead
      of the mixer can reject it: the bandwidth of the receiver or instrument whose IF output feeds
      the build, a preselector, or an earlier IF filter in a multi-conversion chain. The image
      should lie outside that passband, preferably well outside.
      """,
      fix="Declare what limits the input (source.bandwidth or source.preselector), add a preselector, or choose "
          "the injection side or IF that puts the image outside the upstream passband.",
      source="textbook (Tooley, Electronic Circuits: 455 kHz IF, tuned to 1200 kHz, LO 1655 kHz, image 2110 kHz)")
def image(build, ctx):
    for c in frequency_plan(build).conversions:
        if c.lo is None or c.f_in is None or not c.f_if:
            continue
        img = rf.image_frequency(c.f_in, c.lo)
        ctx.publish("conversion", c.owner, "image frequency", img, "Hz")
        osc = c.stage.oscillator
        where = osc.at("injection") if osc is not None else c.stage.loc
        values = [Value("input", c.f_in, "Hz"), Value("LO", c.lo, "Hz"), Value("image", img, "Hz")]
        band = c.ahead
        if band is None:
            ctx.report(f"{c.owner}: the image at {hz(img)} ({khz(abs(img - c.f_in))} from the wanted "
                       f"{hz(c.f_in)}) converts to the IF too, and nothing declared ahead of the mixer rejects it",
                       where, values, stage=c.stage.label)
        elif band.holds(img):
            ctx.report(f"{c.owner}: the image at {hz(img)} lies inside {band.what}, so it reaches the mixer and "
                       f"lands on the IF with the wanted {hz(c.f_in)}", where,
                       values + [Value("passband low", band.low, "Hz"), Value("passband high", band.high, "Hz")],
                       stage=c.stage.label)
        else:
            outside = min(abs(img - band.low), abs(img - band.high))
            ctx.publish("conversion", c.owner, "image outside the passband ahead by", outside, "Hz")


# ---- 3. necessary bandwidth against the IF path --------------------------------------------------

@rule("freqplan.path-width", verify='Apply a carrier at full deviation and watch the recovered audio on a scope: a path narrower than the signal distorts the peaks; compare with the other path.',
      level="error",
      title="IF path narrower than the signal, or many times wider",
      explanation="""
      Every signal occupies a band: for FM, Carson's rule gives B = 2(peak deviation + highest audio
      frequency), and ITU-R SM.1138 gives the necessary bandwidth Bn = 2M + 2DK with K = 1, the same
      number. The emission designator writes it the ITU way (Radio Regulations Appendix 1): three
      significant figures with the unit letter standing for the decimal point, then the class,
      e.g. 16K0F3E for 5 kHz deviation and 3 kHz audio, 180KF3E for broadcast FM.

      The IF path that carries a signal (the narrow filter, or a wide bypass) must be at least that
      wide, or the detector sees a clipped spectrum: heavy distortion, and for broadcast FM through
      a narrowband filter hardly anything intelligible. A path several times wider than the signal
      (setting wide_factor, default 3) works but lets in noise and adjacent channels: a warning.
      """,
      fix="Route the signal through a path at least as wide as its necessary bandwidth (name it in the signal's "
          "path), or fit a filter closer to the signal's width.",
      source="ITU-R SM.1138 (Bn = 2M + 2DK); Radio Regulations Appendix 1 (designators); common practice: a 455 kHz "
             "ceramic filter of ±10 kHz is far too narrow for broadcast FM",
      settings={"wide_factor": 3.0})
def path_width(build, ctx):
    plan = frequency_plan(build)
    factor = _setting(ctx, "wide_factor")
    for i, sig in enumerate(build.signals):
        need = necessary(sig)
        if need is None:
            if sig.modulation == "fm" and (sig.deviation is None or sig.audio_max is None):
                missing = "deviation" if sig.deviation is None else "audio_max"
                ctx.report(f"signal {sig.name}: signals[{i}].{missing} is not given, so its necessary bandwidth "
                           f"cannot be computed", sig.loc, level="note", stage="signals",
                           fix=f"Give signals[{i}].{missing}.")
            elif sig.modulation in ("am", "ssb") and sig.audio_max is None:
                ctx.report(f"signal {sig.name}: signals[{i}].audio_max is not given, so its necessary bandwidth "
                           f"cannot be computed", sig.loc, level="note", stage="signals",
                           fix=f"Give signals[{i}].audio_max.")
            continue
        bn, carson, designator = need
        if carson is not None:
            ctx.publish("signals", sig.name, "Carson bandwidth", carson, "Hz")
        ctx.publish("signals", sig.name, "necessary bandwidth (ITU-R SM.1138)", bn, "Hz")
        if designator:
            ctx.publish("signals", sig.name, "emission designator", designator)
        for point in plan.filters:
            pb = path_for(sig, point.paths)
            if pb is None or pb.width is None:
                continue
            where = sig.at("path")
            values = [Value("necessary bandwidth", bn, "Hz"), Value("path bandwidth", pb.width, "Hz")]
            if pb.width < bn:
                wider = [p for p in point.paths.values() if p.width is not None and p.width >= bn]
                hint = f"; the {wider[0].name} path ({khz(wider[0].width)}) would pass it" if wider else ""
                ctx.report(f"{sig.name} needs {khz(bn)}{f' ({designator})' if designator else ''} but the "
                           f"{pb.name} path passes only "
                           f"{khz(pb.width)} ({pb.describe()}){hint}", where, values, stage=point.stage.label,
                           fix=(f"Set the signal's path to {wider[0].name}." if wider else None))
            elif pb.width > factor * bn:
                ctx.report(f"the {pb.name} path ({khz(pb.width)}) is {pb.width / bn:.1f} times the {khz(bn)}"
                           f"{f' ({designator})' if designator else ''} that {sig.name} needs: it lets in noise "
                           "and neighbouring channels",
                           where, values, level="warning", stage=point.stage.label,
                           fix="Use a filter nearer the signal's necessary bandwidth for this signal.")


# ---- 4. upstream bandwidth ---------------------------------------------------------------

@rule("freqplan.upstream-bandwidth", verify="Step a generator across the upstream receiver's input and read the level at its IF output: the -6 dB points give its IF bandwidth.",
      level="error",
      title="Upstream IF or resolution bandwidth narrower than the signal",
      explanation="""
      When the build taps another receiver's or instrument's IF output, that equipment has already
      filtered the signal with its own IF or resolution bandwidth. Nothing downstream can restore
      what it cut: its bandwidth must cover each signal's necessary bandwidth. About 1 MHz of
      upstream bandwidth suits broadcast FM; a spectrum analyser's IF output at a narrow
      resolution bandwidth does not.
      """,
      fix="Set the upstream receiver or instrument to a wider IF or resolution bandwidth.",
      source="ITU-R SM.1138 (necessary bandwidth); common practice: about 1 MHz upstream suits broadcast FM")
def upstream_bandwidth(build, ctx):
    src = build.source
    if src is None or src.kind not in ("receiver-if", "instrument-if"):
        return
    needs = [(sig, necessary(sig)) for sig in build.signals]
    needs = [(sig, n) for sig, n in needs if n is not None]
    if not needs:
        return
    if src.bandwidth is None:
        ctx.report("source.bandwidth is not given: the upstream IF or resolution bandwidth cannot be checked "
                   "against the signals", src.loc, level="note", stage="source",
                   fix="Give source.bandwidth (the upstream IF or resolution bandwidth).")
        return
    bw = src.bandwidth.si
    for sig, (bn, _, designator) in needs:
        if bw < bn:
            ctx.report(f"the upstream bandwidth {khz(bw)} is narrower than the {khz(bn)}"
                       f"{f' ({designator})' if designator else ''} that "
                       f"{sig.name} needs: the source has cut the signal before it reaches the build",
                       src.at("bandwidth"), [Value("upstream bandwidth", bw, "Hz"),
                                             Value("necessary bandwidth", bn, "Hz")], stage="source")


# ---- 5. mixer spurious responses -------------------------------------------------------------

def _spur_name(m: int, k: int, s: int) -> str:
    ms = "fs" if m == 1 else f"{m}·fs"
    n = abs(k)
    ns = "fLO" if n == 1 else f"{n}·fLO"
    if k == 0:
        return f"{ms} = IF"
    if k > 0:
        return f"{ms} + {ns} = IF"
    return f"{ms} − {ns} = IF" if s > 0 else f"{ns} − {ms} = IF"


@dataclass
class Response:
    """One spurious response or self-made carrier of a conversion, for one IF path."""

    name: str
    f: float  # the input frequency it answers to (or where the harmonic lies)
    offset: float  # from the wanted input
    level: float | None  # estimated level at the build's input, as a wanted signal giving the same IF, dBm
    how: str  # how that level was estimated
    harmonic: bool  # a harmonic the build makes itself (a birdie), not a response to an outside signal


def _spur_level_settings(ctx) -> dict:
    return {name: _setting(ctx, name) for name in ("limiter_level", "isolation", "asymmetry", "per_order")}


def spur_responses(c: Conversion, pb: PathBand, order: int, s: dict, strongest: float | None) -> list:
    """The responses of conversion c that land in IF path pb: mixer products |m·fs ± n·fLO| up to
    `order`, and the IF and LO harmonics that fall inside the passband ahead of the mixer (all
    of them, up to the input frequency, whatever the order), each with an estimated level."""
    band = c.ahead
    duty = 0.5 - s["asymmetry"]
    out = []
    for m, k, sign, fs in rf.spur_inputs(c.lo, pb.center, order):
        if m == 1 and k == -1:
            continue  # the wanted response and the image
        half = pb.width / (2 * m)
        if fs + half < band.low or fs - half > band.high:
            continue
        level = how = None
        if strongest is not None:
            # the LO switches the mixer: its k-th harmonic weighs in as a rectangular wave's would;
            # each order of the signal above the first costs per_order dB
            lo_db = harmonics.pulse_harmonic_db(abs(k), duty) if k else 0.0
            level = strongest - band.attenuation(fs) + lo_db - (m - 1) * s["per_order"]
            how = (f"a {strongest:g} dBm signal there, {band.attenuation(fs):.0f} dB down ahead of the mixer, "
                   f"LO harmonic {abs(k)} at {lo_db:.0f} dB, {(m - 1) * s['per_order']:.0f} dB for signal order {m}")
        out.append(Response("spur " + _spur_name(m, k, sign), fs, fs - c.f_in, level, how or "", False))
    for n in range(1, order + 1):
        if pb.low <= n * c.lo <= pb.high:
            out.append(Response(f"LO harmonic {n} inside the IF passband", n * c.lo, 0.0, None, "", True))
    top = band.high
    for what, base in (("IF", c.f_if), ("LO", c.lo)):
        for n in range(2, harmonics.harmonics_reaching(base, top) + 1):
            h = n * base
            if not band.holds(h):
                continue
            level, how = None, ""
            if what == "IF":
                # the limiter's output is near a rectangular wave: odd harmonics at 1/n, even ones
                # from its asymmetry; it reaches the input through the board's isolation
                h_db = harmonics.pulse_harmonic_db(n, duty)
                through = pb.attenuation(abs(h - c.lo))
                level = s["limiter_level"] + h_db - s["isolation"] - through
                how = (f"limiter {s['limiter_level']:g} dBm, harmonic {n} at {h_db:.0f} dB, {s['isolation']:g} dB "
                       f"isolation to the input, {through:.0f} dB down in the {pb.name} path")
            out.append(Response(f"{what} harmonic {n}", h, h - c.f_in, level, how, True))
    return out


@rule("freqplan.mixer-spurs", verify='Sweep a strong generator across the input band and note each frequency where the squelch opens or the RSSI rises: each one is a spurious response.',
      level="warning",
      title="Mixer spurious response or harmonic that can be heard",
      explanation="""
      A real mixer is not an ideal multiplier: harmonics of the input and of the LO mix too, so an
      input f_s gives an output wherever |m f_s ± n f_LO| falls in the IF passband. speccheck
      searches every m and n up to the setting order (default 5) for the IF path each signal
      travels, keeps the inputs that lie inside the passband ahead of the mixer, leaves out the
      wanted response and the image, and lists the rest on the design sheet. It also lists every
      harmonic of the IF and of the LO that falls inside that input passband, up to the input
      frequency whatever the order (the 65th harmonic of a 455 kHz IF lies 25 kHz below
      29.6 MHz): radiated back into the input they become self-made carriers ("birdies").

      Each response gets an estimated level, as the wanted-signal level at the input that would
      give the same IF. A limiter's output is close to a square wave: its odd harmonics fall only
      as 1/n (Fourier series of a rectangular wave), and an asymmetry of its duty cycle (setting
      asymmetry, default 0.02, i.e. 48 %) adds even ones about 24 dB down; it leaves the limiter
      at the setting limiter_level (default 0 dBm) and reaches the input through the board's
      isolation (setting isolation, default 60 dB), then the IF path's own response at the
      offset. A mixer spur takes the strongest signal (source.level_max) at its input, less what
      the filters ahead of the mixer take off, the LO harmonic's weight (the LO switches the
      mixer like a rectangular wave) and the setting per_order (default 20 dB) for each order of
      the signal above the first. The defaults are from memory, for a compact unshielded board
      and a small IF chip: state your own where you know better.

      A warning comes only where a response lies within the setting close (default 50 kHz,
      two 25 kHz channels; the window does not grow with the path) of the wanted signal and its
      level comes within audible_margin (default 10 dB) of the weakest wanted signal
      (source.level_min, else -110 dBm): there it opens the squelch or whistles in the audio.
      An IF or LO harmonic that is close but too weak to hear is a note with its level.
      """,
      fix="Move the LO (other injection side or another IF), narrow the passband ahead of the mixer, or shield "
          "and decouple the limiter and oscillator from the input.",
      source="Fourier series of a rectangular wave (Oppenheim & Willsky, Signals and Systems); mixer spur "
             "arithmetic: common practice (spur charts); limiter level, asymmetry, isolation and per-order "
             "suppression: from memory",
      settings={"order": 5, "close": 50e3, "max_listed": 24, "limiter_level": 0.0, "isolation": 60.0,
                "asymmetry": 0.02, "per_order": 20.0, "audible_margin": 10.0, "weakest": -110.0})
def mixer_spurs(build, ctx):
    order = max(1, min(_setting(ctx, "order", int), 15))
    close = max(0.0, _setting(ctx, "close"))
    max_listed = max(0, _setting(ctx, "max_listed", int))
    s = _spur_level_settings(ctx)
    s["asymmetry"] = min(max(s["asymmetry"], 0.0), 0.49)
    src = build.source
    strongest = src.level_max.si if src is not None and src.level_max is not None else None
    weakest = src.level_min.si if src is not None and src.level_min is not None else _setting(ctx, "weakest")
    audible = weakest - _setting(ctx, "audible_margin")
    for c in frequency_plan(build).conversions:
        band = c.ahead
        if c.lo is None or not c.f_if or c.filter is None:
            continue
        if band is None:  # nothing declared ahead: look around the wanted input only
            band = Band(c.f_in - close, c.f_in + close, "the close window")
            c = Conversion(**{**c.__dict__, "ahead": band})
        paths = [p for p in used_paths(build, c.filter.paths) if p.width is not None and p.center is not None]
        found = []
        for pb in paths:
            tag = f" ({pb.name})" if len(paths) > 1 else ""
            found += [(r, pb, tag) for r in spur_responses(c, pb, order, s, strongest)]
        found.sort(key=lambda t: abs(t[0].offset))
        seen = set()
        listed = []
        for r, pb, tag in found:
            if (r.name + tag) not in seen:
                seen.add(r.name + tag)
                listed.append((r, pb, tag))
        for r, _, tag in listed[:max_listed]:
            ctx.publish("spurs", c.owner, r.name + tag, r.f, "Hz")
            if r.level is not None:
                ctx.publish("spurs", c.owner, f"{r.name}{tag} estimated level", round(r.level, 1), "dBm")
        if len(listed) > max_listed:
            ctx.publish("spurs", c.owner, "more responses not listed", len(listed) - max_listed)
        near = [t for t in listed if abs(t[0].offset) <= close]
        heard = [t for t in near if t[0].level is not None and t[0].level >= audible]
        quiet = [t for t in near if t not in heard and t[0].harmonic]
        osc = c.stage.oscillator
        where = osc.at("injection") if osc else c.stage.loc
        for group, level in ((heard, "warning"), (quiet, "note")):
            if not group:
                continue
            shown = "; ".join(_response_text(r, tag) for r, _, tag in group[:4])
            more = f" and {len(group) - 4} more" if len(group) > 4 else ""
            r0 = group[0][0]
            values = [Value("LO", c.lo, "Hz"), Value(r0.name, r0.f, "Hz"), Value("offset", r0.offset, "Hz")]
            if r0.level is not None:
                values += [Value("estimated level", r0.level, "dBm"), Value("weakest wanted", weakest, "dBm")]
            if level == "warning":
                head = (f"{c.owner}: {len(group)} response{'s' if len(group) > 1 else ''} within {khz(close)} of the "
                        f"wanted {hz(c.f_in)} (LO {hz(c.lo)}) strong enough to hear (within "
                        f"{_setting(ctx, 'audible_margin'):g} dB of the weakest wanted {weakest:g} dBm): ")
            else:
                head = (f"{c.owner}: {'a harmonic' if len(group) == 1 else f'{len(group)} harmonics'} of the build's "
                        f"own IF or LO within {khz(close)} of the wanted {hz(c.f_in)}, estimated too weak to hear: ")
            ctx.report(head + shown + more + (f" ({r0.how})" if r0.how else ""), where, values, level=level,
                       stage=c.stage.label)


def _response_text(r: Response, tag: str) -> str:
    level = f", about {r.level:.0f} dBm" if r.level is not None else ", level not estimated"
    return f"{r.name}{tag} at {hz(r.f)} ({'+' if r.offset >= 0 else '−'}{khz(abs(r.offset))}{level})"


# ---- 6. quadrature tank -------------------------------------------------------------------

def _range(part):
    """(lowest, highest) value of a part from its adjust range, else its tolerance, else None."""
    if part.adjust is not None and part.adjust.min is not None and part.adjust.max is not None:
        return min(part.adjust.min.si, part.adjust.max.si), max(part.adjust.min.si, part.adjust.max.si), "adjust"
    if part.tolerance is not None and part.value is not None:
        v, t = part.value.si, abs(part.tolerance.si)
        return v * (1 - t), v * (1 + t), "tolerance"
    return None


@dataclass
class TankFacts:
    stage: object
    coil: object
    cap: object
    damping: object
    f0: float
    f_low: float
    f_high: float
    tunable: str | None
    q: float | None
    f_if: float | None
    if_unc: float


def tank_facts(build, stage, ctx=None):
    tank = stage.tank
    if tank is None:
        return None
    coil, cap = build.part(tank.inductor), build.part(tank.capacitor)
    if coil is None or cap is None:
        return None
    if coil.value is None or cap.value is None:
        if ctx is not None:
            part = coil if coil.value is None else cap
            ctx.report(f"{stage.label}: parts.{part.name}.value is not given, so the tank's resonance cannot be "
                       f"computed", part.loc, level="note", stage=stage.label)
        return None
    extra = tank.extra_capacitance.si if tank.extra_capacitance is not None else 0.0
    L, C = coil.value.si, cap.value.si + extra
    f0 = rf.resonance(L, C)
    lr, cr = _range(coil), _range(cap)
    l_lo, l_hi = (lr[0], lr[1]) if lr else (L, L)
    c_lo, c_hi = (cr[0] + extra, cr[1] + extra) if cr else (C, C)
    tunable = " and ".join(f"{p.name} {r[2]}" for p, r in ((coil, lr), (cap, cr)) if r) or None
    rps = []
    damping = build.part(tank.damping)
    if damping is not None and damping.value is not None:
        rps.append(damping.value.si)
    if coil.q:
        rps.append(rf.coil_parallel_resistance(coil.q, f0, L))
    q = rf.parallel_q(rf.parallel(*rps), f0, L) if rps else None
    f_if, unc = frequency_plan(build).at.get(id(stage), (None, 0.0))
    return TankFacts(stage, coil, cap, damping, f0, rf.resonance(l_hi, c_hi), rf.resonance(l_lo, c_lo), tunable, q,
                     f_if, unc)


@rule("freqplan.tank-tuning", verify="With a steady carrier at the IF applied, turn the coil's slug through its range: the detector output must pass through its centre inside the range.",
      level="error",
      title="Quadrature tank cannot tune to the final IF",
      explanation="""
      A quadrature (phase-shift) detector compares the IF with a copy shifted by a parallel tuned
      circuit. It gives its linear, undistorted audio only when the tank resonates at the IF:
      f0 = 1 / (2 pi sqrt(L C)), with any pin and stray capacitance added to C. The adjustable part
      (a slug-tuned coil or a trimmer) gives a range of f0; the final IF must lie inside it, or no
      amount of turning the slug centres the detector and the audio stays weak and distorted. With
      no adjustable part, the parts' tolerance gives the range.
      """,
      fix="Choose L and C so that the middle of the tuning range sits on the final IF (C = 1 / ((2 pi f_IF)^2 L)).",
      source="parallel resonance (Wikibooks, Practical Electronics / Parallel RLC); common practice: 1 mH with "
             "120 pF resonates near 455 kHz")
def tank_tuning(build, ctx):
    for stage in build.stages("discriminator"):
        t = tank_facts(build, stage, ctx)
        if t is None:
            continue
        who = owner(build, stage)
        ctx.publish("discriminator", who, "tank resonance f0", t.f0, "Hz")
        ctx.publish("discriminator", who, "tuning range low", t.f_low, "Hz")
        ctx.publish("discriminator", who, "tuning range high", t.f_high, "Hz")
        if t.f_if is None:
            continue
        ctx.publish("discriminator", who, "final IF", t.f_if, "Hz")
        values = [Value("final IF", t.f_if, "Hz"), Value("f0", t.f0, "Hz"), Value("tuning low", t.f_low, "Hz"),
                  Value("tuning high", t.f_high, "Hz")]
        where = t.coil.at("adjust") if t.coil.adjust is not None else t.coil.at("value")
        if t.tunable is None:
            if t.q is None:
                continue
            half = t.f0 / t.q / 2
            if abs(t.f_if - t.f0) > half:
                ctx.report(f"the tank ({t.coil.name}, {t.cap.name}) resonates at {hz(t.f0)} and has no adjustment: "
                           f"the final IF {hz(t.f_if)} lies {khz(abs(t.f_if - t.f0))} off, outside its linear range "
                           f"(±{khz(half)})", where, values, stage=stage.label,
                           fix=f"Tune C to {units.fmt(rf.capacitance_for(t.f_if, t.coil.value.si), 'F')} for this "
                               f"coil, or use a slug-tuned coil.")
            continue
        if not (t.f_low <= t.f_if <= t.f_high):
            c_need = rf.capacitance_for(t.f_if, t.coil.value.si)
            ext = t.stage.tank.extra_capacitance.si if t.stage.tank.extra_capacitance is not None else 0.0
            ctx.report(f"the tank ({t.coil.name}, {t.cap.name}) tunes only {hz(t.f_low)} to {hz(t.f_high)} "
                       f"({t.tunable}); the final IF {hz(t.f_if)} is outside that range", where, values,
                       stage=stage.label,
                       fix=f"For {t.coil.value.text} the tank needs about "
                           f"{units.fmt(max(c_need - ext, 0.0), 'F')} at {khz(t.f_if)}; or choose L and C so the "
                           f"range centres on the IF.")


@rule("freqplan.tank-range", verify="Apply a carrier at full deviation and watch the audio on a scope: flattened peaks mean the detector's linear range is too small.",
      level="warning",
      title="Detector linear range narrower than the deviation plus drift",
      explanation="""
      The tank's loaded Q sets the detector: Q = R_p / (omega0 L), where R_p is the damping resistor
      in parallel with the coil's own loss resistance (Q_coil omega0 L). The phase slope, and with
      it the recovered audio, rises with Q; the linear range, about f0 / Q, falls with it. The
      linear range must cover the whole swing of the signal, twice the peak deviation, plus the
      worst-case drift of the IF either way; past it the audio distorts on peaks. The design sheet
      shows the loaded Q, the linear range and the highest Q the deviation allows: a lower damping
      resistor widens the range and costs audio, a higher one the other way.
      """,
      fix="Lower the damping resistor across the tank (or use a lower-Q coil) until f0 / Q covers 2 x deviation "
          "plus drift.",
      source="parallel RLC Q and bandwidth (Wikibooks, Practical Electronics / Parallel RLC); common practice "
             "(quadrature detector linear range ~ f0/Q)")
def tank_range(build, ctx):
    fm = [s for s in build.signals if s.modulation == "fm" and s.deviation is not None]
    for stage in build.stages("discriminator"):
        t = tank_facts(build, stage)
        if t is None:
            continue
        who = owner(build, stage)
        if t.q is None:
            ctx.report(f"{stage.label}: the tank has no damping resistor and its coil no q, so the loaded Q and the "
                       f"linear range cannot be computed", stage.at("tank"), level="note", stage=stage.label,
                       fix="Name the damping resistor (tank.damping) or give the coil's q.")
            continue
        linear = t.f0 / t.q
        ctx.publish("discriminator", who, "loaded Q", round(t.q, 2))
        ctx.publish("discriminator", who, "linear range (f0/Q)", linear, "Hz")
        if not fm:
            continue
        dev = max(s.deviation.si for s in fm)
        sig = max(fm, key=lambda s: s.deviation.si)
        need = 2 * (dev + t.if_unc)
        q_max = t.f0 / need
        ctx.publish("discriminator", who, "needed range (2·deviation + drift)", need, "Hz")
        ctx.publish("discriminator", who, "highest Q for this deviation", round(q_max, 2))
        if linear < need:
            where = t.damping.at("value") if t.damping is not None else t.coil.at("value")
            rp_max = q_max * rf.TWO_PI * t.f0 * t.coil.value.si
            ctx.report(f"the tank's loaded Q of {t.q:.3g} gives a linear range of {khz(linear)} (f0/Q), less than "
                       f"the {khz(need)} that {sig.name} swings (2 × {khz(dev)} deviation plus ±{khz(t.if_unc)} "
                       f"drift): peaks will distort; a Q of {q_max:.3g} or less would pass it, at less recovered "
                       f"audio", where,
                       [Value("loaded Q", round(t.q, 3)), Value("linear range", linear, "Hz"),
                        Value("needed", need, "Hz"), Value("highest Q", round(q_max, 3))],
                       stage=stage.label,
                       fix=f"Bring the total parallel resistance across the tank down to about "
                           f"{units.fmt(rp_max, 'Ω')} (damping resistor in parallel with the coil's loss).")


# ---- 7. crystal ------------------------------------------------------------------------------

@rule("freqplan.crystal-load", verify="Measure the oscillator with a counter through a buffer or a loosely coupled probe, and compare with the crystal's marked frequency.",
      level="warning",
      title="Crystal load capacitance differs from the crystal's specified load",
      explanation="""
      A parallel-resonant crystal is calibrated at the load capacitance its maker states. The
      oscillator presents C_L = C1 C2 / (C1 + C2) + C_stray from its two loading capacitors and
      the board's stray capacitance (typically 2 to 5 pF). A different load pulls the frequency:
      the crystal runs above series resonance by D = C1m / (2 (C0 + C_L)) (motional capacitance
      C1m, shunt capacitance C0), so going from the specified load to the actual one moves it by
      the difference of the two. A smaller load makes it run high, a larger one low. speccheck
      adds that shift to the LO it uses for the IF, and warns when it is larger than the crystal's
      own tolerance (or when C0 and C1m are not given and the load is off by more than the setting
      load_share, default 10 %).
      """,
      fix="Choose the loading capacitors so that C1 C2 / (C1 + C2) plus stray equals the crystal's specified load.",
      source="crystal pulling D = C1m / (2 (C0 + CL)): 20 fF, 5 pF gives 400 ppm at 20 pF and 434.8 ppm at 18 pF "
             "(crystal makers' application notes); typical stray from memory",
      settings={"load_share": 0.1, "pull_limit_ppm": 20.0})
def crystal_load_rule(build, ctx):
    for stage in build.stages("conversion"):
        osc = stage.oscillator
        if osc is None or not osc.crystal:
            continue
        x = build.part(osc.crystal)
        if x is None or x.kind != "crystal":
            continue
        load = crystal_load(build, osc)
        if load is None:
            continue
        cl, stray, stray_given = load
        ctx.publish("crystal", x.name, "load capacitance from the oscillator", cl, "F")
        if not stray_given:
            ctx.report(f"{x.name}: chain[{stage.index}].oscillator.stray is not given; the load capacitance "
                       f"{units.fmt(cl, 'F')} counts no stray (a board typically adds 2 to 5 pF)", osc.at("load_caps"),
                       level="note", stage=stage.label,
                       fix="Give oscillator.stray (about 3 pF for a compact board).")
        if x.load_capacitance is None:
            ctx.report(f"{x.name}: parts.{x.name}.load_capacitance is not given, so the load "
                       f"{units.fmt(cl, 'F')} cannot be compared with it", x.loc, level="note", stage=stage.label,
                       fix=f"Give parts.{x.name}.load_capacitance from the crystal's data.")
            continue
        spec = x.load_capacitance.si
        ctx.publish("crystal", x.name, "specified load capacitance", spec, "F")
        values = [Value("load from oscillator", cl, "F"), Value("specified load", spec, "F")]
        caps = f"{osc.load_caps[0]} and {osc.load_caps[1]}" + (f" plus {units.fmt(stray, 'F')} stray" if stray else "")
        shift = crystal_shift(build, osc, x)
        if shift is not None and x.frequency is not None:
            fx = x.frequency.si
            ctx.publish("crystal", x.name, "pulling at the specified load",
                        rf.pulling(x.motional_capacitance.si, x.shunt_capacitance.si, spec) * 1e6, "ppm")
            ctx.publish("crystal", x.name, "pulling at the actual load",
                        rf.pulling(x.motional_capacitance.si, x.shunt_capacitance.si, cl) * 1e6, "ppm")
            ctx.publish("crystal", x.name, "shift from the specified frequency", shift * 1e6, "ppm")
            ctx.publish("crystal", x.name, "shift in frequency", shift * fx, "Hz")
            limit = abs(x.tolerance.si) if x.tolerance is not None else _setting(ctx, "pull_limit_ppm") * 1e-6
            if abs(shift) > limit:
                ctx.report(f"{x.name} sees {units.fmt(cl, 'F')} ({caps}) instead of its specified "
                           f"{units.fmt(spec, 'F')}: that pulls it {shift * 1e6:+.1f} ppm ({shift * fx:+.0f} Hz), more "
                           f"than {limit * 1e6:g} ppm", osc.at("load_caps"),
                           values + [Value("shift", shift * 1e6, "ppm"), Value("shift", shift * fx, "Hz")],
                           stage=stage.label)
            continue
        share = cl / spec - 1
        if abs(share) > _setting(ctx, "load_share"):
            ctx.report(f"{x.name} sees {units.fmt(cl, 'F')} ({caps}) instead of its specified {units.fmt(spec, 'F')} "
                       f"({_pct(share)}); it will run {'high' if share < 0 else 'low'} by an amount that needs the "
                       f"crystal's motional and shunt capacitance to estimate", osc.at("load_caps"), values,
                       stage=stage.label)


@rule("freqplan.crystal-overtone", verify='Read the oscillator with a counter: an overtone crystal on a fundamental-mode circuit runs near a third of its marked frequency, or not at all.',
      level="error",
      title="Overtone crystal on an oscillator built for fundamental mode",
      explanation="""
      An overtone crystal is marked with its overtone frequency (3rd, 5th ...), but the quartz
      still has its fundamental at about a third (fifth ...) of that. An oscillator built for
      fundamental mode has no tuned circuit to pick the overtone, so it starts on the fundamental:
      near a third of the marked frequency, and the IF comes out nowhere near the filter. The
      reverse mistake, a fundamental crystal in an overtone oscillator, leaves the tuned circuit
      looking for a response the crystal hardly has: it fails to start or runs on the tank.
      """,
      fix="Use an oscillator with a tuned circuit at the overtone (declare mode: overtone), or a fundamental-mode "
          "crystal for the frequency.",
      source="common practice (crystal oscillator design)")
def crystal_overtone(build, ctx):
    for c in frequency_plan(build).conversions:
        osc, x = c.stage.oscillator, c.crystal
        if osc is None or x is None or x.frequency is None:
            continue
        n = x.overtone if isinstance(x.overtone, int) else 1
        if n > 1 and osc.mode == "fundamental":
            f_start = x.frequency.si / n
            mult = osc.multiplier if isinstance(osc.multiplier, int) and osc.multiplier > 0 else 1
            extra = ""
            values = [Value("marked", x.frequency.si, "Hz"), Value("fundamental (about)", f_start, "Hz")]
            if c.f_in is not None:
                f_if = abs(c.f_in - f_start * mult)
                extra = f", which would give an IF near {khz(f_if)} instead of {khz(c.f_if or 0)}"
                values.append(Value("IF it would give", f_if, "Hz"))
            ctx.report(f"{x.name} is a {_ordinal(n)}-overtone crystal marked {hz(x.frequency.si)}, on an oscillator "
                       f"declared for fundamental mode: it will start near its fundamental, about {khz(f_start)}"
                       f"{extra}", osc.at("mode"), values, stage=c.stage.label)
        elif n == 1 and osc.mode == "overtone":
            ctx.report(f"{x.name} is a fundamental-mode crystal ({hz(x.frequency.si)}) on an oscillator declared "
                       f"for overtone mode: it may not start, or run on the tuned circuit instead of the crystal",
                       osc.at("mode"), [Value("marked", x.frequency.si, "Hz")], level="warning", stage=c.stage.label,
                       fix="Declare the crystal's overtone (parts.X.overtone) or use a fundamental-mode oscillator.")


def _ordinal(n: int) -> str:
    return {3: "3rd", 5: "5th", 7: "7th", 9: "9th"}.get(n, f"{n}th")


# ---- 10. audio corner and de-emphasis ----------------------------------------------------------

def _rc(build, stage):
    """(time constant, Location to point at) of an RC stage: from R and C, time_constant or corner."""
    if stage.time_constant is not None:
        return stage.time_constant.si, stage.at("time_constant")
    if stage.corner is not None:
        return rf.rc_time_constant(stage.corner.si), stage.at("corner")
    r, c = _value(build, stage.resistor), _value(build, stage.capacitor)
    if r is None or c is None:
        return None, None
    return r * c, build.part(stage.capacitor).at("value")


DEEMPHASIS = {"itu-region-1": 50e-6, "itu-region-2": 75e-6, "itu-region-3": 50e-6}


@rule("freqplan.de-emphasis", verify='Feed tones at constant deviation and read the audio output: the level is 3 dB down at the de-emphasis corner frequency.',
      level="warning",
      title="De-emphasis time constant for broadcast FM",
      explanation="""
      FM broadcasting boosts the treble before transmission (pre-emphasis) so that the receiver can
      cut it again together with the hiss. The receiver's de-emphasis must use the same time
      constant as the transmitters it hears: 50 µs or 75 µs (ITU-R BS.450-3; 75 µs in the United
      States per 47 CFR 73.317). speccheck takes 75 µs for ITU Region 2 (the Americas) and 50 µs
      for Regions 1 and 3 (that mapping is from memory; a few countries differ, so check your own). The
      corner of a first-order de-emphasis is f = 1 / (2 pi tau): 3183 Hz for 50 µs, 2122 Hz for
      75 µs. The wrong one makes the audio dull or shrill; none at all leaves it harsh and hissy.
      """,
      fix="Make R x C of the de-emphasis network equal to the region's time constant (e.g. 5.1 kohm with 10 nF "
          "for 50 µs, 7.5 kohm with 10 nF for 75 µs).",
      source="ITU-R BS.450-3 (50 µs / 75 µs, peak deviation 75 kHz); 47 CFR 73.317 and 73.1570; region mapping "
             "from memory",
      settings={"tolerance": 0.1})
def de_emphasis(build, ctx):
    stages = build.stages("de-emphasis")
    measured = []
    for stage in stages:
        tau, where = _rc(build, stage)
        if tau is None:
            continue
        who = owner(build, stage)
        ctx.publish("audio", who, "de-emphasis time constant", tau, "s")
        ctx.publish("audio", who, "de-emphasis corner", rf.rc_corner(tau), "Hz")
        measured.append((stage, tau, where))
    broadcast = [s for s in build.signals if s.service == "broadcast" and s.modulation == "fm"]
    if not broadcast:
        return
    region = build.build.region if build.build is not None else None
    if region not in DEEMPHASIS:
        ctx.report("build.region is not given, so the broadcast de-emphasis (50 µs or 75 µs) cannot be checked",
                   build.build.loc if build.build is not None else build.loc, level="note", stage="audio",
                   fix="Give build.region (itu-region-1, -2 or -3).")
        return
    want = DEEMPHASIS[region]
    sig = broadcast[0]
    if not stages:
        ctx.report(f"{sig.name} is broadcast FM but the chain has no de-emphasis stage: the audio will be harsh "
                   f"and hissy ({region} uses {want * 1e6:g} µs)", sig.at("service"), [Value("wanted", want, "s")],
                   stage="audio",
                   fix=f"Add a de-emphasis stage with R x C = {want * 1e6:g} µs after the detector.")
        return
    tol = _setting(ctx, "tolerance")
    for stage, tau, where in measured:
        if abs(tau / want - 1) > tol:
            ctx.report(f"de-emphasis of {units.fmt(tau, 's')} (corner {khz(rf.rc_corner(tau))}) does not match the "
                       f"{want * 1e6:g} µs of {region} (corner {khz(rf.rc_corner(want))}) for {sig.name}",
                       where, [Value("time constant", tau, "s"), Value("wanted", want, "s")], stage=stage.label)


@rule("freqplan.audio-corner", verify='Sweep an audio tone at constant deviation and read the output with an AC voltmeter: the level falls 3 dB at the corner.',
      level="warning",
      title="Audio low-pass corner against the highest modulating frequency",
      explanation="""
      The audio low-pass after the detector should pass the highest modulating frequency of the
      signals the build receives (about 3 kHz for voice, 15 kHz for broadcast FM) and cut what
      lies above: detector noise, which in FM rises with frequency, and leftovers of the IF. A
      first-order RC has its corner at f = 1 / (2 pi R C). A corner below the highest audio
      frequency (by more than the setting low_share, default 10 %) dulls the audio; one far above
      it (more than high_factor times, default 3) lets the noise through.
      """,
      fix="Choose R x C = 1 / (2 pi f_c) with f_c a little above the highest audio frequency.",
      source="first-order RC corner (scipy.signal.freqs cross-check in tests); common practice (3 kHz voice, "
             "15 kHz broadcast)",
      settings={"low_share": 0.1, "high_factor": 3.0})
def audio_corner(build, ctx):
    tops = [(s, s.audio_max.si) for s in build.signals if s.audio_max is not None]
    for stage in build.stages("audio-filter"):
        tau, where = _rc(build, stage)
        if tau is None:
            continue
        fc = rf.rc_corner(tau)
        ctx.publish("audio", owner(build, stage), "low-pass corner", fc, "Hz")
        if not tops:
            continue
        sig, top = max(tops, key=lambda t: t[1])
        low_sig, low_top = min(tops, key=lambda t: t[1])
        values = [Value("corner", fc, "Hz"), Value("highest audio", top, "Hz")]
        if fc < top * (1 - _setting(ctx, "low_share")):
            ctx.report(f"the audio low-pass corner {khz(fc)} is below the {khz(top)} of {sig.name}: its top "
                       f"octave is cut", where, values, stage=stage.label)
        elif fc > low_top * _setting(ctx, "high_factor"):
            ctx.report(f"the audio low-pass corner {khz(fc)} is {fc / low_top:.1f} times the {khz(low_top)} of "
                       f"{low_sig.name}: detector noise above the audio passes", where, values, level="note",
                       stage=stage.label)
