"""Power and heat: current budget, dissipation and heat sink, supply fuse, reverse polarity.

The arithmetic lives in small pure functions at the top (tested one by one against their
sources in tests/test_power.py); the rules below read the model, call them and report. All
values are SI floats: amperes, volts, ohms, watts, °C, °C/W, A²s.
"""

from __future__ import annotations

import math
import weakref
from dataclasses import dataclass, field

from speccheck.findings import Value
from speccheck.registry import RULES, rule
from speccheck.units import fmt

AMPLIFIER = "audio-power-amplifier"
REGULATOR = "linear-regulator"
DC_KINDS = ("battery", "dc-adapter", "bench")

# ---- tables ------------------------------------------------------------------------------

# Preferred fuse ratings: the R10 series of IEC 60127-1 Annex A (ISO 3 preferred numbers),
# written out as the standard lists them, not computed as 10^(i/10) (3.15 and 6.3 are not
# what the formula gives).
R10 = (1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0)

# Chassis-wiring ampacity of copper wire by AWG (Handbook of Electronic Tables and Formulas,
# chassis wiring column): 18, 20, 22, 24 and 30 from the handbook table; 10-16, 26, 28 and
# 32-40 from memory of the same table.
AWG_CHASSIS_AMPS = {10: 55.0, 12: 41.0, 14: 32.0, 16: 22.0, 18: 16.0, 20: 11.0, 22: 7.0, 24: 3.5,
                    26: 2.2, 28: 1.4, 30: 0.86, 32: 0.53, 34: 0.33, 36: 0.21, 38: 0.13, 40: 0.092}

# IEC 60127-2 (miniature fuse-links, standard sheets for 5 x 20 mm cartridges), from memory:
# the shortest gate with a least pre-arcing time. A time-lag link must not open before 10 ms
# at 10 x I_n; a quick-acting link must not open before 3 ms at 4 x I_n (at 10 x I_n it only
# has an upper limit). (multiple of I_n, least pre-arcing time in s)
FUSE_GATES = {"time-lag": (10.0, 0.010), "quick-acting": (4.0, 0.003)}


# ---- formulas ----------------------------------------------------------------------------

def r10_up(amps: float) -> float:
    """The smallest R10 preferred rating at or above `amps` (IEC 60127-1 Annex A)."""
    if not amps or amps <= 0 or not math.isfinite(amps):
        raise ValueError("a rating must be a positive number")
    decade = math.floor(math.log10(amps))
    for d in (decade - 1, decade, decade + 1):
        for step in R10:
            value = float(f"{step * 10.0 ** d:.6g}")
            if value >= amps * (1 - 1e-9):
                return value
    return float(f"{10.0 ** (decade + 1):.6g}")  # not reached


def awg_ampacity(gauge: int) -> tuple[float, int] | None:
    """(amperes, gauge of the table row used); an odd gauge takes the next thinner even row."""
    if gauge is None:
        return None
    row = gauge if gauge in AWG_CHASSIS_AMPS else gauge + 1
    return (AWG_CHASSIS_AMPS[row], row) if row in AWG_CHASSIS_AMPS else None


def split_rails(topology: str, v_supply: float, v_negative: float | None = None) -> tuple[float, float]:
    """The two half-supplies the output stage swings between, as magnitudes (V+, V-).

    A single-ended capacitor-coupled stage on one supply V_s behaves as a split supply of
    ±V_s/2 (its output idles at half the supply); a split supply is ±V_CC as given."""
    if topology == "split-supply":
        return abs(v_supply), abs(v_negative if v_negative is not None else v_supply)
    return abs(v_supply) / 2, abs(v_supply) / 2


def class_b_dissipation(topology: str, v_supply: float, r_load: float,
                        v_negative: float | None = None) -> tuple[float, float]:
    """Worst-case output-stage dissipation of a class-B/AB stage: (package total, per output device).

    Each device of a push-pull pair on ±V_CC into R_L dissipates at most V_CC²/(π²·R_L), at an
    output amplitude of 2·V_CC/π (textbook class-B derivation, e.g. Sedra & Smith, from memory;
    Boylestad & Nashelsky Example 12.8). Single-ended on V_s: V_CC = V_s/2, total V_s²/(2π²·R_L).
    Bridge-tied load: two such stages in antiphase, each seeing R_L/2, total 2·V_s²/(π²·R_L),
    four times the single-ended figure.
    """
    if topology == "bridge":
        per_device = (v_supply / 2) ** 2 / (math.pi ** 2 * (r_load / 2))
        return 4 * per_device, per_device
    vp, vn = split_rails(topology, v_supply, v_negative)
    upper, lower = vp ** 2 / (math.pi ** 2 * r_load), vn ** 2 / (math.pi ** 2 * r_load)
    return upper + lower, max(upper, lower)


def class_b_full_output(topology: str, v_supply: float, r_load: float,
                        v_negative: float | None = None) -> dict:
    """Ideal full (clipping-limited) sine output: peak load voltage, output power, supply
    current drawn from each rail, input power. A half-wave of peak I_p averages I_p/π; the
    bridge draws a full-wave, 2·I_p/π (Boylestad & Nashelsky §12: P_i = V_CC·(2/π)·I_p)."""
    if topology == "bridge":
        v_peak = abs(v_supply)
        i_peak = v_peak / r_load
        i_pos, i_neg = 2 * i_peak / math.pi, 0.0
        p_in = abs(v_supply) * i_pos
    else:
        vp, vn = split_rails(topology, v_supply, v_negative)
        v_peak = min(vp, vn)
        i_peak = v_peak / r_load
        i_half = i_peak / math.pi
        if topology == "split-supply":
            i_pos, i_neg = i_half, i_half
            p_in = (vp + vn) * i_half
        else:  # single-ended: only the upper device draws from the one supply
            i_pos, i_neg = i_half, 0.0
            p_in = abs(v_supply) * i_half
    p_out = v_peak ** 2 / (2 * r_load)
    return {"v_peak": v_peak, "i_peak": i_peak, "i_pos": i_pos, "i_neg": i_neg, "p_in": p_in, "p_out": p_out}


def junction_temperature(t_ambient: float, power: float, theta: float) -> float:
    """T_j = T_a + P·θ (series thermal-resistance model)."""
    return t_ambient + power * theta


def heat_sink_needed(power: float, tj_max: float, t_ambient: float, theta_jc: float, theta_cs: float) -> float:
    """Largest sink-to-ambient resistance that holds T_j at tj_max:
    θ_SA = (T_j,max − T_a)/P − θ_JC − θ_CS (handbook heat-sink selection)."""
    return (tj_max - t_ambient) / power - theta_jc - theta_cs


def regulator_dissipation(v_in: float, v_out: float, i_out: float, i_q: float = 0.0) -> float:
    """Linear regulator: (V_in − V_out)·I_out plus V_in·I_q for its own ground current."""
    return (v_in - v_out) * i_out + v_in * i_q


def inrush(volts: float, farads: float, ohms: float) -> tuple[float, float, float]:
    """Switching V onto C through R: i = (V/R)·e^(−t/RC). Returns (peak V/R, τ = RC, I²t = V²C/(2R))."""
    return volts / ohms, ohms * farads, volts ** 2 * farads / (2 * ohms)


def fuse_gate_i2t(speed: str, rating: float) -> float:
    """The least I²t an IEC 60127-2 fuse-link of this speed withstands at its shortest gate:
    (k·I_n)²·t_min."""
    k, t_min = FUSE_GATES[speed]
    return (k * rating) ** 2 * t_min


def rerate(t_ambient: float | None, per_degc: float, above: float) -> float:
    """Share of its rating a fuse carries at t_ambient (linear fall above `above` °C)."""
    if t_ambient is None or t_ambient <= above:
        return 1.0
    return max(0.05, 1.0 - per_degc * (t_ambient - above))


# ---- helpers -----------------------------------------------------------------------------

def setting_of(ctx, rule_id: str, name: str):
    """A setting of another rule of this family (the fuse sizing shares the fuse-size rule's)."""
    return ctx.settings.rule_settings.get(rule_id, {}).get(name, RULES[rule_id].settings[name])


def rail_volts(build, name: str | None) -> float | None:
    rail = build.rails.get(name) if name else None
    return rail.voltage.si if rail and rail.voltage else None


def ambient(build) -> float | None:
    info = build.build
    return info.ambient_max.si if info and info.ambient_max else None


RESERVOIR_MIN = 10e-6  # F; a capacitor this large on a rectifier output is its reservoir


def supply_fuse(build):
    """The supply's fuse part, when supply.fuse names a part of kind fuse."""
    part = build.part(build.supply.fuse) if build.supply else None
    return part if part and part.kind == "fuse" else None


def fused_rail(build) -> str | None:
    supply = build.supply
    if supply is None:
        return None
    if supply.rail:
        return supply.rail
    fuse = supply_fuse(build)
    for end in (fuse.ends if fuse else ()):
        if end in build.rails:
            return end
    return None


def bulk_capacitors(build, rail: str | None) -> list:
    """Capacitors straight across the rail to a ground."""
    if not rail:
        return []
    nets = build.nets
    out = []
    for part in nets.parts_on(rail):
        if part.kind == "capacitor" and part.value and nets.is_ground(part.other_end(rail) or ""):
            out.append(part)
    return out


def stage_label(build, ref: str, default: str) -> str:
    stage = build.stage_of_part(ref) if ref else None
    return stage.label if stage else default


@dataclass
class AmpPoint:
    device: object
    topology: str
    v_supply: float
    v_negative: float | None
    r_load: float
    load_text: str
    stage: object

    @property
    def label(self) -> str:
        return self.stage.label if self.stage else "audio-amp"


def amp_point(build, dev) -> tuple[AmpPoint | None, list]:
    """The operating point of an audio amplifier device, or the missing inputs as (message, location)."""
    prof = dev.profile
    missing = []
    stage = next((s for s in build.stages("audio-amp") if s.device == dev.name), None)
    topology = prof.output_topology
    if not topology:
        missing.append((f"profile {prof.name} of {dev.name} does not state output_topology "
                        f"(profiles.{prof.name}.output_topology: single-ended, bridge or split-supply)", prof.loc))
    v_supply = rail_volts(build, dev.rail)
    if v_supply is None:
        missing.append((f"{dev.name} has no supply rail with a voltage (devices.{dev.name}.rail)", dev.loc))
    v_negative = None
    if topology == "split-supply":
        v_negative = rail_volts(build, dev.negative_rail)
        if v_negative is None:
            missing.append((f"{dev.name} is a split-supply amplifier but devices.{dev.name}.negative_rail does not "
                            f"name a rail with a voltage", dev.at("negative_rail")))
    r_load, load_text = None, ""
    load = build.part(stage.load) if stage else None
    if load is not None and load.value is not None and load.kind in ("speaker", "resistor"):
        r_load, load_text = load.value.si, f"{load.name} ({load.value.text})"
    elif stage is not None and stage.load_impedance is not None:
        r_load, load_text = stage.load_impedance.si, stage.load_impedance.text
    if r_load is None:
        where = stage.at("load") if stage else dev.loc
        missing.append((f"no load impedance for {dev.name}: name its speaker in the audio-amp stage "
                        f"(chain[].load, with the speaker's value)", where))
    if missing or v_supply == 0:
        return None, missing
    return AmpPoint(dev, topology, v_supply, v_negative, r_load, load_text, stage), []


# ---- the current budget ------------------------------------------------------------------

@dataclass
class Budget:
    items: dict = field(default_factory=dict)  # rail -> [(owner, what, amps)]
    totals: dict = field(default_factory=dict)  # rail -> amps
    delivered: dict = field(default_factory=dict)  # regulator -> (amps out, computed from its rail)
    full_output: dict = field(default_factory=dict)  # amplifier -> {rail: amps}
    unknown_amps: list = field(default_factory=list)  # amplifiers whose full-output current is unknown
    no_rail: list = field(default_factory=list)  # devices with no rail
    bad_rail: list = field(default_factory=list)  # devices on a rail that is not declared (input.reference)
    no_quiescent: dict = field(default_factory=dict)  # profile name -> [devices]
    input: float | None = None
    input_rails: list = field(default_factory=list)

    @property
    def complete(self) -> bool:
        """False when some draw is unknown: the budget is then only a lower bound."""
        return not (self.unknown_amps or self.no_rail or self.bad_rail or self.no_quiescent)

    def gaps(self) -> str:
        parts = [f"{n}'s full-output current" for n in self.unknown_amps]
        parts += [f"{d.name} (no rail)" for d in self.no_rail + self.bad_rail]
        parts += [f"{', '.join(devs)} (no quiescent current)" for devs in self.no_quiescent.values()]
        return ", ".join(parts)


_BUDGETS: "weakref.WeakKeyDictionary" = weakref.WeakKeyDictionary()


def regulator_outputs(build, dev) -> list:
    if dev.output_rail:
        return [dev.output_rail] if dev.output_rail in build.rails else []
    return [name for name, r in build.rails.items() if r.source == dev.name]


def budget(build) -> Budget:
    """Quiescent currents, amplifier supply current at full output, regulators' input draw."""
    cached = _BUDGETS.get(build)
    if cached is not None:
        return cached
    b = Budget()
    direct: dict = {}

    def add(rail, owner, what, amps):
        direct.setdefault(rail, []).append((owner, what, amps))

    regulators = []
    for dev in build.devices.values():
        prof = dev.profile
        if prof is None:
            continue
        if not dev.rail or dev.rail not in build.rails:
            (b.no_rail if not dev.rail else b.bad_rail).append(dev)
            continue
        iq = prof.quiescent_current.si if prof.quiescent_current else None
        if iq is None:
            b.no_quiescent.setdefault(prof.name, []).append(dev.name)
        else:
            add(dev.rail, dev.name, "quiescent", iq)
        if prof.cls == AMPLIFIER:
            point, _ = amp_point(build, dev)
            if point is None:
                b.unknown_amps.append(dev.name)
            else:
                full = class_b_full_output(point.topology, point.v_supply, point.r_load, point.v_negative)
                add(dev.rail, dev.name, "full output", full["i_pos"])
                b.full_output[dev.name] = {dev.rail: full["i_pos"]}
                if point.topology == "split-supply" and dev.negative_rail in build.rails:
                    add(dev.negative_rail, dev.name, "full output", full["i_neg"])
                    b.full_output[dev.name][dev.negative_rail] = full["i_neg"]
                    if iq is not None:
                        add(dev.negative_rail, dev.name, "quiescent", iq)
        elif prof.cls == REGULATOR:
            regulators.append(dev)

    feeding = {}
    for reg in regulators:
        for out in regulator_outputs(build, reg):
            feeding.setdefault(reg.rail, []).append((reg, out))

    def total(rail, seen):
        if rail in b.totals:
            return b.totals[rail]
        if rail in seen:
            return 0.0
        seen = seen | {rail}
        items = list(direct.get(rail, []))
        for reg, out in feeding.get(rail, []):
            computed = total(out, seen)
            declared = reg.load_current.si if reg.load_current else None
            amps = max(declared, computed) if declared is not None else computed
            prior = b.delivered.get(reg.name, (0.0, 0.0))
            b.delivered[reg.name] = (prior[0] + amps, prior[1] + computed)
            items.append((reg.name, f"delivered to {out}", amps))
        b.items[rail] = items
        b.totals[rail] = sum(a for _, _, a in items)
        return b.totals[rail]

    for name, rail in build.rails.items():
        if not rail.is_ground:
            total(name, frozenset())
    supply = build.supply
    if supply and supply.rail in b.totals:
        b.input_rails = [supply.rail]
    else:
        made = {out for reg in regulators for out in regulator_outputs(build, reg)}
        b.input_rails = [n for n, r in build.rails.items()
                         if not r.is_ground and r.source in (None, "supply") and n not in made]
    b.input = sum(b.totals.get(n, 0.0) for n in b.input_rails) if b.input_rails else None
    _BUDGETS[build] = b
    return b


@rule("power.current-budget", verify='Measure the supply current with a meter in series: idle, then with a tone at full volume into the speaker.',
      level="error",
      title="Current budget of each rail and of the supply input",
      explanation="""
      The current each rail must deliver is the sum of what hangs on it: the quiescent (no
      signal) current of every device from its profile, plus the audio amplifier's supply
      current at full output into its load, plus whatever the regulators on it deliver to the
      rails they make (and their own ground current). The amplifier dominates: a class-B/AB
      stage drawing a sine of peak I_p = V_peak/R_L through one output device takes an
      average of I_p/π from the supply (a bridge-tied load, 2·I_p/π). The supply input must
      carry the total. A supply that cannot deliver it sags or shuts down at high volume; one
      that runs near its limit runs hot. The budget also sizes the fuse.
      """,
      fix="Choose a supply rated above the budget with some headroom (or lower the amplifier's supply "
          "or raise its load impedance); state each regulator's load_current at least at what its rail draws.",
      source="class-B supply current: Boylestad & Nashelsky, Electronic Devices and Circuit Theory, §12 "
             "(P_i = V_CC·(2/π)·I_p); headroom share: common practice",
      settings={"headroom_share": 0.8})
def current_budget(build, ctx):
    b = budget(build)
    for rail, items in b.items.items():
        if not items:
            continue
        for owner, what, amps in items:
            ctx.publish("power", rail, f"{owner} {what}", amps, "A")
        ctx.publish("power", rail, "rail current budget", b.totals[rail], "A")
    for name in b.unknown_amps:
        ctx.publish("power", name, "full-output supply current", "not known (see power.heat)")
    if b.input is not None and b.totals:
        ctx.publish("power", "supply", "input current budget", b.input, "A")
    for dev in b.no_rail:
        ctx.report(f"{dev.name} names no supply rail (devices.{dev.name}.rail); it is left out of the current "
                   f"budget", dev.loc, level="note", stage="power")
    for prof_name, devs in b.no_quiescent.items():
        prof = build.profiles.get(prof_name)
        ctx.report(f"profile {prof_name} states no quiescent_current (profiles.{prof_name}.quiescent_current); "
                   f"{', '.join(devs)} counted at 0 A in the budget", prof.loc if prof else build.loc,
                   level="note", stage="power")
    for name, (amps, computed) in b.delivered.items():
        dev = build.devices[name]
        if dev.load_current is not None and computed > dev.load_current.si * (1 + 1e-9):
            outs = ", ".join(regulator_outputs(build, dev))
            ctx.report(f"{name} is stated to deliver {dev.load_current.text} but {outs} draws {fmt(computed, 'A')}; "
                       f"the budget counts {fmt(computed, 'A')}", dev.at("load_current"),
                       [Value("stated load_current", dev.load_current.si, "A"), Value(f"{outs} draws", computed, "A")],
                       level="warning", stage="power")
    supply = build.supply
    if supply is None or supply.max_current is None or b.input is None:
        return
    limit, share = supply.max_current.si, ctx.setting("headroom_share")
    values = [Value("input current budget", b.input, "A"), Value("supply max_current", limit, "A")]
    if b.input > limit:
        ctx.report(f"the build draws {fmt(b.input, 'A')} at full output but the {supply.kind} supply delivers at most "
                   f"{supply.max_current.text}", supply.at("max_current"), values, stage="power")
    elif b.input > share * limit:
        ctx.report(f"the build draws {fmt(b.input, 'A')} at full output, {b.input / limit:.0%} of the "
                   f"{supply.max_current.text} the supply delivers (keep under {share:.0%})", supply.at("max_current"),
                   values, level="warning", stage="power")


# ---- device supply range -------------------------------------------------------------------

@rule("power.device-supply", verify="Measure the voltage between the device's supply and ground pins with the build running.",
      level="error",
      title="Device supply voltage inside its profile's range",
      explanation="""
      Every device profile states the supply range the part is made for. Above supply_max the
      part is overstressed (and an amplifier dissipates more than its package was sized for);
      below supply_min it does not work properly: an IF chip loses limiting, an amplifier clips
      early. For a split-supply amplifier the span from the negative to the positive rail is
      compared.
      """,
      fix="Power the device from a rail inside its range, or declare the profile of a part made for this supply.",
      source="the device profile (your datasheet's values)")
def device_supply(build, ctx):
    for dev in build.devices.values():
        prof = dev.profile
        if prof is None or (prof.supply_max is None and prof.supply_min is None):
            continue
        top = rail_volts(build, dev.rail)
        if top is None:
            continue
        bottom = rail_volts(build, dev.negative_rail) if dev.negative_rail else 0.0
        if bottom is None:
            continue
        span = abs(top - bottom)
        what = f"{dev.rail} ({fmt(top, 'V')})" if not dev.negative_rail else \
            f"{dev.rail} to {dev.negative_rail} ({fmt(span, 'V')} across it)"
        values = [Value("supply across the device", span, "V")]
        if prof.supply_max is not None and span > prof.supply_max.si * (1 + 1e-9):
            ctx.report(f"{dev.name} runs from {what}, above the {prof.supply_max.text} supply_max of profile {prof.name}",
                       dev.at("rail"), values + [Value("supply_max", prof.supply_max.si, "V")], stage="power")
        elif prof.supply_min is not None and span < prof.supply_min.si * (1 - 1e-9):
            ctx.report(f"{dev.name} runs from {what}, below the {prof.supply_min.text} supply_min of profile {prof.name}",
                       dev.at("rail"), values + [Value("supply_min", prof.supply_min.si, "V")], level="warning",
                       stage="power")


# ---- heat -------------------------------------------------------------------------------------

def _thermal(build, ctx, dev, power: float, what: str, stage: str, values: list):
    """Junction temperature of one device dissipating `power`; findings when it runs too hot."""
    prof = dev.profile
    ta = ambient(build)
    if ta is None:
        return "no-ambient"
    if not power or power <= 0:
        return None
    if prof.tj_max is None:
        ctx.report(f"profile {prof.name} states no tj_max (profiles.{prof.name}.tj_max); the junction temperature "
                   f"of {dev.name} is not checked", prof.loc, level="note", stage=stage)
        return None
    tj_max, margin = prof.tj_max.si, ctx.setting("tj_margin")
    target = tj_max - margin
    jc = prof.theta_jc.si if prof.theta_jc else None
    sink = dev.heat_sink if dev.heat_sink and dev.heat_sink.theta_sa else None
    cs_default = ctx.setting("theta_cs")
    if sink:
        if jc is None:
            ctx.report(f"{dev.name} has a heat sink but profile {prof.name} states no theta_jc "
                       f"(profiles.{prof.name}.theta_jc); the junction temperature is not checked", sink.at("theta_sa"),
                       level="note", stage=stage)
            return None
        cs = sink.theta_cs.si if sink.theta_cs is not None else cs_default
        theta = jc + cs + sink.theta_sa.si
        how = (f"θJC {fmt(jc, '°C/W')} + θCS {fmt(cs, '°C/W')}{'' if sink.theta_cs is not None else ' (assumed)'}"
               f" + θSA {fmt(sink.theta_sa.si, '°C/W')}")
        where = sink.at("theta_sa")
    else:
        q = dev.theta_ja or prof.theta_ja
        if q is None:
            ctx.report(f"no theta_ja for {dev.name}: state it on the device (as mounted, with its copper area) or in "
                       f"profile {prof.name}", dev.loc, level="note", stage=stage)
            return None
        theta = q.si
        how = f"θJA {fmt(q.si, '°C/W')}" + (" as mounted" if dev.theta_ja else f" from profile {prof.name}")
        where = dev.at("theta_ja") if dev.theta_ja else dev.loc
    tj = junction_temperature(ta, power, theta)
    ctx.publish("heat", dev.name, "thermal resistance junction to ambient", theta, "°C/W")
    ctx.publish("heat", dev.name, f"junction temperature at {fmt(ta, '°C')} ambient", tj, "°C")
    ctx.publish("heat", dev.name, f"junction limit (tj_max {fmt(tj_max, '°C')} less {fmt(margin, '°C')})", target, "°C")
    values = values + [Value("ambient", ta, "°C"), Value("θ junction to ambient", theta, "°C/W"),
                       Value("junction temperature", tj, "°C"), Value("tj_max", tj_max, "°C")]
    if tj <= target:
        return None
    cs = sink.theta_cs.si if sink and sink.theta_cs is not None else cs_default
    level = "error" if tj > tj_max else "warning"
    head = (f"{dev.name} dissipates up to {fmt(power, 'W')} ({what}); with {how} its junction reaches "
            f"{fmt(tj, '°C')} at {fmt(ta, '°C')} ambient, "
            + (f"above its {fmt(tj_max, '°C')} limit" if tj > tj_max else
               f"within {fmt(margin, '°C')} of its {fmt(tj_max, '°C')} limit"))
    if jc is None:
        ctx.report(head + f"; state theta_jc in profile {prof.name} to size a heat sink", where, values,
                   level=level, stage=stage)
        return None
    need = heat_sink_needed(power, target, ta, jc, cs)
    need_abs = heat_sink_needed(power, tj_max, ta, jc, cs)
    ctx.publish("heat", dev.name, f"heat sink needed for {fmt(target, '°C')} (θSA at most)", need, "°C/W")
    values.append(Value("heat sink needed θSA", need, "°C/W"))
    cs_note = f"θCS {fmt(cs, '°C/W')}{'' if sink and sink.theta_cs is not None else ' assumed'}"
    if need <= 0:
        ctx.report(head + f"; no heat sink can hold it at {fmt(target, '°C')} (θJC {fmt(jc, '°C/W')} and {cs_note} "
                   f"already take it there): lower the supply, raise the load impedance or choose a larger part",
                   where, values, level=level, stage=stage)
        return None
    if sink:
        msg = (f"; the declared heat sink ({sink.theta_sa.text}) is not enough: it needs θSA of "
               f"{fmt(need, '°C/W')} or less ({cs_note}; {fmt(need_abs, '°C/W')} at the absolute limit)")
    else:
        msg = (f"; it needs a heat sink of θSA {fmt(need, '°C/W')} or less ({cs_note}; "
               f"{fmt(need_abs, '°C/W')} at the absolute limit), or more copper area under it")
    ctx.report(head + msg, where, values, level=level, stage=stage)
    return None


@rule("power.heat", verify='After ten minutes at full output, measure the package or tab temperature with a thermocouple; add the junction-to-case rise for the junction.',
      level="error",
      title="Dissipation, junction temperature and heat sink of amplifiers and regulators",
      explanation="""
      A class-B or class-AB output stage dissipates most not at full output but at an output
      amplitude of 2·V_CC/π, about 64 % of the full swing (about 40 % of the full power). Each device of a push-pull pair on ±V_CC into
      R_L then dissipates V_CC²/(π²·R_L). A single-ended stage on one supply V_s with a
      coupling capacitor works on ±V_s/2, so the package dissipates V_s²/(2π²·R_L) (12 V into
      8 Ω: 0.91 W). A bridge-tied load puts two such stages in antiphase across the speaker:
      four times as much, 2·V_s²/(π²·R_L). The quiescent current adds V_s·I_q.

      The junction then sits at T_j = T_a + P·θ_JA, with the build's worst-case ambient. The
      θ_JA stated on the device (the copper area it is soldered to) overrides the profile's
      bare-package figure. When T_j comes within a margin of T_j,max the part needs a heat
      sink: its junction-to-ambient path becomes θ_JC + θ_CS + θ_SA, so the sink must reach
      θ_SA ≤ (T_j,max − T_a)/P − θ_JC − θ_CS. Too hot, the part goes into thermal shutdown
      (the audio cuts in and out at high volume) or fails.
      """,
      fix="Fit a heat sink of the θSA shown (or more copper area, stated as theta_ja on the device), lower the "
          "supply voltage, or use a higher-impedance speaker.",
      source="class-B dissipation: Sedra & Smith, Microelectronic Circuits (from memory) and Boylestad & "
             "Nashelsky, Example 12.8; θSA: handbook form of the series thermal-resistance model; margin and "
             "assumed θCS: common practice",
      settings={"tj_margin": 25.0, "theta_cs": 1.0})
def heat(build, ctx):
    no_ambient = []
    for dev in build.devices.values():
        if dev.profile is None or dev.profile.cls != AMPLIFIER:
            continue
        point, missing = amp_point(build, dev)
        stage = next((s.label for s in build.stages("audio-amp") if s.device == dev.name), "audio-amp")
        if point is None:
            for message, where in missing:
                ctx.report(message + "; its dissipation is not computed", where, level="note", stage=stage)
            continue
        total, per_device = class_b_dissipation(point.topology, point.v_supply, point.r_load, point.v_negative)
        iq = dev.profile.quiescent_current.si if dev.profile.quiescent_current else 0.0
        vp, vn = split_rails(point.topology, point.v_supply, point.v_negative)
        span = vp + vn if point.topology == "split-supply" else abs(point.v_supply)
        p_q = iq * span
        power = total + p_q
        full = class_b_full_output(point.topology, point.v_supply, point.r_load, point.v_negative)
        ctx.publish("heat", dev.name, "full sine output power (ideal)", full["p_out"], "W")
        ctx.publish("heat", dev.name, f"output stage dissipation, worst case ({point.topology})", total, "W")
        if point.topology != "single-ended":
            ctx.publish("heat", dev.name, "per output device, worst case", per_device, "W")
        ctx.publish("heat", dev.name, "quiescent dissipation", p_q, "W")
        ctx.publish("heat", dev.name, "package dissipation", power, "W")
        supply_text = (f"±{fmt(vp, 'V')}" if point.topology == "split-supply" else fmt(abs(point.v_supply), "V"))
        what = f"{point.topology} on {supply_text} into {point.load_text}"
        values = [Value("output stage worst case", total, "W"), Value("quiescent", p_q, "W")]
        if _thermal(build, ctx, dev, power, what, point.label, values) == "no-ambient":
            no_ambient.append(dev.name)
    for dev in build.devices.values():
        if dev.profile is None or dev.profile.cls != REGULATOR:
            continue
        p = _regulator_power(build, dev)
        if p is None:
            continue
        power, v_in, v_out, i_out = p
        ctx.publish("heat", dev.name, "regulator dissipation", power, "W")
        values = [Value("V_in", v_in, "V"), Value("V_out", v_out, "V"), Value("I_out", i_out, "A")]
        what = f"{fmt(v_in - v_out, 'V')} across it at {fmt(i_out, 'A')}, plus its ground current"
        if _thermal(build, ctx, dev, power, what, "power", values) == "no-ambient":
            no_ambient.append(dev.name)
    if no_ambient:
        info = build.build
        ctx.report(f"build.ambient_max is not stated: the junction temperature of {', '.join(no_ambient)} is not "
                   f"checked", info.loc if info else build.loc, level="note", stage="power",
                   fix="State 'ambient_max:' under build: the hottest air the build will sit in (40 degC indoors "
                       "is a usual worst case).")


def _regulator_power(build, dev):
    outs = regulator_outputs(build, dev)
    v_in = rail_volts(build, dev.rail)
    v_out = rail_volts(build, outs[0]) if outs else None
    if v_out is None and dev.profile.output_voltage is not None:
        v_out = dev.profile.output_voltage.si
    if v_in is None or v_out is None:
        return None
    delivered = budget(build).delivered.get(dev.name)
    i_out = delivered[0] if delivered else (dev.load_current.si if dev.load_current else 0.0)
    iq = dev.profile.quiescent_current.si if dev.profile.quiescent_current else 0.0
    return regulator_dissipation(v_in, v_out, i_out, iq), v_in, v_out, i_out


@rule("power.regulator-dropout", verify='Measure input and output of the regulator at the lowest supply voltage and full load: the output must stay at its nominal value.',
      level="error",
      title="Linear regulator input headroom (dropout)",
      explanation="""
      A linear regulator holds its output only while its input stays above the output by at
      least its dropout voltage (about 2 V for a classic three-terminal part, a few hundred
      millivolts for a low-dropout one). Below that the output follows the input down, with
      the input's ripple and noise on it. The regulator turns the rest, (V_in − V_out)·I, into
      heat; that part is checked with the other heat rules.
      """,
      fix="Raise the input rail, choose a low-dropout regulator, or lower the output voltage.",
      source="common practice (linear regulator datasheets)")
def regulator_dropout(build, ctx):
    for dev in build.devices.values():
        prof = dev.profile
        if prof is None or prof.cls != REGULATOR:
            continue
        outs = regulator_outputs(build, dev)
        v_in = rail_volts(build, dev.rail)
        v_out = rail_volts(build, outs[0]) if outs else (prof.output_voltage.si if prof.output_voltage else None)
        if v_in is None or v_out is None:
            continue
        headroom = v_in - v_out
        ctx.publish("power", dev.name, "input headroom V_in − V_out", headroom, "V")
        if prof.dropout is None:
            continue
        if headroom < prof.dropout.si - 1e-9:
            ctx.report(f"{dev.name} makes {fmt(v_out, 'V')} from {dev.rail} at {fmt(v_in, 'V')}: {fmt(headroom, 'V')} of "
                       f"headroom, less than its {prof.dropout.text} dropout; the output will sag and carry the input's "
                       f"ripple", dev.at("rail"), [Value("headroom", headroom, "V"), Value("dropout", prof.dropout.si, "V")],
                       stage="power")


# ---- fuse sizing ----------------------------------------------------------------------------

def carries_rectifier_pulses(build, fuse) -> bool:
    """A fuse on the rectifier side of a capacitor-input supply (in the secondary, or between
    the rectifier and the reservoir) carries the charging pulses, not a smooth DC: one of its
    nets has a rectifier diode on it and no reservoir capacitor."""
    if build.supply is None or build.supply.kind != "mains-transformer":
        return False
    nets = build.nets
    for net in fuse.ends:
        on_net = nets.parts_on(net)
        has_diode = any(p.kind == "diode" for p in on_net)
        has_reservoir = any(p.kind == "capacitor" and p.value is not None and p.value.si >= RESERVOIR_MIN
                            for p in on_net)
        if has_diode and not has_reservoir:
            return True
    return False


def fuse_choice(build, ctx, normal: float) -> dict:
    """The fuse the normal current asks for: derated for continuous use and rerated for the ambient."""
    share = setting_of(ctx, "power.fuse-size", "derating")
    ta = ambient(build)
    factor = rerate(ta, setting_of(ctx, "power.fuse-size", "rerate_per_degc"),
                    setting_of(ctx, "power.fuse-size", "rerate_above"))
    least = normal / (share * factor)
    return {"share": share, "ambient": ta, "rerate": factor, "least": least, "preferred": r10_up(least)}


@rule("power.fuse-size", verify='Measure the normal current with a meter in series and compare it with the fuse rating.',
      level="warning",
      title="Supply fuse rating against the build's normal current",
      explanation="""
      A fuse is sized from the current the build draws in normal use (its current budget at
      full output). A fuse is only guaranteed to carry its rated current under the test
      conditions of its standard: UL 248-14 fuses carry 100 % and open at 135 % within an
      hour and at 200 % within two minutes; IEC 60127-2 fuse-links must not open at 1.5 × I_n
      within an hour. In continuous use, and warm, a fuse ages and opens early, so common
      practice runs it at no more than 75 % of its rating, and rerates it further above 25 °C
      ambient. The rating is then rounded UP to the preferred ratings series, R10 of
      IEC 60127-1 Annex A (1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8 × 10ⁿ A).

      Smaller than that the fuse opens in normal use or after weeks of nuisance; much larger
      and it does not protect: a fault that draws a few times the normal current (a shorted
      capacitor, a stalled amplifier) leaves it intact while the wiring and the parts burn.
      """,
      fix="Fit the preferred rating shown (the next R10 value above the derated current).",
      source="UL 248-14; IEC 60127-2; R10 series: IEC 60127-1 Annex A / ISO 3; 75 % continuous-use "
             "derating: common practice; temperature rerating slope: from memory; RMS of the charging "
             "pulses of a capacitor-input rectifier about 1.8 times the DC (1.5 to 2.5): common practice",
      settings={"derating": 0.75, "rerate_per_degc": 0.005, "rerate_above": 25.0, "oversize_factor": 2.0,
                "pulse_form_factor": 1.8})
def fuse_size(build, ctx):
    supply = build.supply
    if supply is None or not supply.fuse:
        return
    part = build.part(supply.fuse)
    if part is None or part.kind == "resistor":
        return  # missing: input.reference; a resistor: power.resistor-fuse
    if part.kind != "fuse":
        ctx.report(f"supply.fuse names {part.name}, a {part.kind}, not a fuse", supply.at("fuse"), level="note",
                   stage="power")
        return
    b = budget(build)
    normal = b.input
    if not normal:
        ctx.report(f"{part.name} cannot be sized: the build's current budget is unknown (no device on the supply "
                   f"rail states a quiescent current)", part.loc, level="note", stage="power")
        return
    ctx.publish("fuse", part.name, "normal current (budget at full output)", normal, "A")
    if carries_rectifier_pulses(build, part):
        form = setting_of(ctx, "power.fuse-size", "pulse_form_factor")
        normal *= form  # the fuse heats on the RMS of the charging pulses
        ctx.publish("fuse", part.name, "RMS of the rectifier charging pulses", normal, "A")
    c = fuse_choice(build, ctx, normal)
    ctx.publish("fuse", part.name, "continuous-use share of rating", c["share"] * 100, "%")
    if c["ambient"] is not None:
        ctx.publish("fuse", part.name, f"temperature rerating at {fmt(c['ambient'], '°C')}", c["rerate"] * 100, "%")
    ctx.publish("fuse", part.name, "least rating", c["least"], "A")
    ctx.publish("fuse", part.name, "preferred rating (R10)", c["preferred"], "A")
    if part.current_rating is None:
        ctx.report(f"{part.name} states no current_rating; the build needs {fmt(c['preferred'], 'A')}", part.loc,
                   [Value("preferred rating", c["preferred"], "A")], level="note", stage="power")
        return
    rating = part.current_rating.si
    ctx.publish("fuse", part.name, "fitted rating", rating, "A")
    if part.speed:
        ctx.publish("fuse", part.name, "fitted speed", part.speed)
    carry = rating * c["rerate"]
    values = [Value("normal current", normal, "A"), Value("fitted", rating, "A"),
              Value("preferred", c["preferred"], "A")]
    warm = f" (at {fmt(c['ambient'], '°C')} it carries {fmt(carry, 'A')})" if c["rerate"] < 1 else ""
    if normal > carry:
        ctx.report(f"{part.name} ({part.current_rating.text}) is below the build's normal current of {fmt(normal, 'A')}"
                   f"{warm}: it will open in normal use; fit {fmt(c['preferred'], 'A')}", part.at("current_rating"),
                   values, level="error", stage="power")
    elif rating < c["least"] * (1 - 1e-9):
        ctx.report(f"{part.name} ({part.current_rating.text}) runs at {normal / carry:.0%} of its rating"
                   f"{' after rerating' if c['rerate'] < 1 else ''} in normal use (keep under {c['share']:.0%}): "
                   f"expect nuisance opening; fit {fmt(c['preferred'], 'A')}", part.at("current_rating"), values,
                   stage="power")
    elif not b.complete:
        ctx.publish("fuse", part.name, "budget left out", b.gaps())
    elif rating > ctx.setting("oversize_factor") * c["preferred"] * (1 + 1e-9):
        ctx.report(f"{part.name} ({part.current_rating.text}) is {rating / c['preferred']:.3g} times the "
                   f"{fmt(c['preferred'], 'A')} the build needs (normal current {fmt(normal, 'A')}, derated to "
                   f"{c['share']:.0%}{' and rerated for the ambient' if c['rerate'] < 1 else ''}, rounded up to R10): "
                   f"a fault drawing a few times the normal current leaves it intact", part.at("current_rating"),
                   values, stage="power")


@rule("power.fuse-wire", verify='Check the wire gauge printed on the insulation, or measure the conductor diameter, against the fuse rating.',
      level="error",
      title="Supply fuse larger than the wiring can carry",
      explanation="""
      The fuse protects the wiring behind it. If the fuse is rated above what the supply wiring
      can carry, a fault heats the wire (its insulation softens, smokes, can catch fire) long
      before the fuse opens. The chassis-wiring ampacity of copper wire by AWG (Handbook of
      Electronic Tables and Formulas): 18 AWG 16 A, 20 AWG 11 A, 22 AWG 7 A, 24 AWG 3.5 A,
      26 AWG 2.2 A, 28 AWG 1.4 A, 30 AWG 0.86 A. Wire bundled or in a warm case carries less.
      An odd gauge is checked against the next thinner row of the table.
      """,
      fix="Fit the fuse the build needs (see power.fuse-size), or use heavier wire.",
      source="Handbook of Electronic Tables and Formulas, chassis wiring ampacity (26 and 28 AWG from memory)")
def fuse_wire(build, ctx):
    supply = build.supply
    if supply is None or supply.wire_gauge is None:
        return
    row = awg_ampacity(supply.wire_gauge)
    if row is None:
        ctx.report(f"{supply.wire_gauge} AWG is not in the chassis-wiring table (10 to 40 AWG); the fuse is not "
                   f"checked against the wiring", supply.at("wire_gauge"), level="note", stage="power")
        return
    amps, used = row
    gauge = f"{supply.wire_gauge} AWG" + (f" (checked as {used} AWG)" if used != supply.wire_gauge else "")
    ctx.publish("fuse", "supply wiring", f"{gauge} chassis-wiring ampacity", amps, "A")
    normal = budget(build).input
    fuse = supply_fuse(build)
    if fuse is not None and fuse.current_rating is not None and fuse.current_rating.si > amps * (1 + 1e-9):
        ctx.report(f"{fuse.name} ({fuse.current_rating.text}) is above the {fmt(amps, 'A')} that the {gauge} supply "
                   f"wiring carries: a fault can overheat the wire before the fuse opens", fuse.at("current_rating"),
                   [Value("fuse rating", fuse.current_rating.si, "A"), Value("wire ampacity", amps, "A")],
                   stage="power")
    if normal and normal > amps:
        ctx.report(f"the build draws {fmt(normal, 'A')} at full output, more than the {fmt(amps, 'A')} the {gauge} supply "
                   f"wiring carries", supply.at("wire_gauge"),
                   [Value("input current budget", normal, "A"), Value("wire ampacity", amps, "A")], stage="power")


@rule("power.fuse-inrush", verify='Switch on repeatedly from cold: a quick-acting fuse that survives a few times may still open later; a current probe on a scope shows the inrush peak.',
      level="warning",
      title="Fuse speed against the bulk capacitor's inrush",
      explanation="""
      At switch-on the bulk capacitor behind the fuse charges through the loop resistance R
      (the supply's output resistance, its leads, connector, the fuse itself and the
      capacitor's ESR): i = (V/R)·e^(−t/RC), a peak of V/R that falls with time constant RC.
      The Joule integral the fuse sees is I²t = V²C/(2R): 12 V into 4700 µF through 0.1 Ω is
      a 120 A peak and 3.4 A²s. A quick-acting fuse of a small rating melts on far less. A
      fuse is checked against its datasheet melting I²t (less a share for the thousands of
      switch-ons over its life) when the plan states it, else against the least I²t a
      fuse-link of its speed withstands under IEC 60127-2: a time-lag link must not open
      before 10 ms at 10 × I_n, a quick-acting one before 3 ms at 4 × I_n. Real links are
      usually several times above that floor.
      """,
      fix="Use a time-lag fuse, add series resistance (or a soft-start) ahead of the bulk capacitor, or state the "
          "fuse's melting_i2t from its datasheet.",
      source="inrush of an RC charge: circuit theory (cross-checked with scipy in the tests); fuse gates: "
             "IEC 60127-2 (from memory); loop resistance and pulse share: from memory",
      settings={"loop_resistance": 0.5, "pulse_share": 0.3})
def fuse_inrush(build, ctx):
    supply = build.supply
    fuse = supply_fuse(build)
    if supply is None or fuse is None or supply.voltage is None or fuse.current_rating is None:
        return
    caps = bulk_capacitors(build, fused_rail(build))
    farads = sum(c.value.si for c in caps)
    if farads <= 0:
        return
    volts, rating = abs(supply.voltage.si), fuse.current_rating.si
    series = build.part(supply.series_resistor)
    r_series = series.value.si if series is not None and series.kind == "resistor" and series.value else 0.0
    if supply.source_resistance is not None:
        r_source, source_text = supply.source_resistance.si, f"supply.source_resistance {supply.source_resistance.text}"
    else:
        r_source = ctx.setting("loop_resistance")
        source_text = f"an assumed {fmt(r_source, 'Ω')} of supply, leads, fuse and ESR"
    ohms = r_series + r_source
    if ohms <= 0 or volts <= 0:
        return
    peak, tau, i2t = inrush(volts, farads, ohms)
    if supply.kind in ("battery", "bench") and supply.max_current is not None and supply.max_current.si < peak:
        limit = supply.max_current.si
        peak, i2t = limit, min(i2t, limit * farads * volts)  # a current-limited charge: I²t <= I·C·V
    owner = fuse.name
    ctx.publish("fuse", owner, "bulk capacitance behind it", farads, "F")
    ctx.publish("fuse", owner, "inrush loop resistance", ohms, "Ω")
    ctx.publish("fuse", owner, "inrush peak", peak, "A")
    ctx.publish("fuse", owner, "inrush time constant RC", tau, "s")
    ctx.publish("fuse", owner, "inrush I²t", i2t, "A²s")
    names = ", ".join(c.name for c in caps)
    if fuse.melting_i2t is not None:
        share = ctx.setting("pulse_share")
        allowed = fuse.melting_i2t.si * share
        basis = f"its melting I²t {fuse.melting_i2t.text} × {share:.0%} for repeated switch-on"
    elif fuse.speed in FUSE_GATES:
        allowed = fuse_gate_i2t(fuse.speed, rating)
        k, t_min = FUSE_GATES[fuse.speed]
        basis = f"the {fmt(allowed, 'A²s')} a {fuse.speed} link withstands ({k:g} × I_n for {fmt(t_min, 's')}, IEC 60127-2)"
    else:
        ctx.report(f"{fuse.name} states neither speed nor melting_i2t; its inrush withstand is not checked "
                   f"({fmt(i2t, 'A²s')} into {names})", fuse.loc, level="note", stage="power")
        return
    ctx.publish("fuse", owner, "I²t it withstands", allowed, "A²s")
    if i2t <= allowed:
        return
    values = [Value("inrush peak", peak, "A"), Value("time constant", tau, "s"), Value("inrush I²t", i2t, "A²s"),
              Value("fuse withstands", allowed, "A²s")]
    head = (f"switching {fmt(volts, 'V')} onto {names} ({fmt(farads, 'F')}) through {fmt(ohms, 'Ω')} ({source_text}"
            f"{f' plus {series.name}' if r_series else ''}) gives a {fmt(peak, 'A')} peak and {fmt(i2t, 'A²s')}, more "
            f"than {basis}")
    where = fuse.at("speed") if fuse.given("speed") else fuse.loc
    if fuse.speed == "quick-acting":
        slow = fuse_gate_i2t("time-lag", rating)
        tail = (f": the quick-acting {fuse.name} will open at switch-on; fit a time-lag fuse of the same rating"
                + ("" if slow >= i2t else f", and add series resistance (a time-lag link withstands only "
                                            f"{fmt(slow, 'A²s')})"))
    else:
        tail = f": {fuse.name} may open at switch-on; add series resistance or a soft-start ahead of the capacitor"
    ctx.report(head + tail, where, values, stage="power")


@rule("power.fuse-voltage", verify='Read the voltage rating printed on the fuse body or its end cap.',
      level="error",
      title="Fuse voltage rating below the circuit voltage",
      explanation="""
      A fuse's voltage rating is the highest voltage it can safely interrupt: above it, the arc
      that forms when the element melts may keep burning and the fault current keeps flowing.
      The rating must be at least the voltage of the circuit it protects.
      """,
      fix="Fit a fuse rated for at least the circuit voltage.",
      source="UL 248-14; IEC 60127-1 (rated voltage)")
def fuse_voltage(build, ctx):
    supply = build.supply
    fuse = supply_fuse(build)
    if supply is None or fuse is None or fuse.voltage_rating is None or supply.voltage is None:
        return
    if fuse.voltage_rating.si < abs(supply.voltage.si) - 1e-9:
        ctx.report(f"{fuse.name} is rated {fuse.voltage_rating.text} but protects a {supply.voltage.text} supply",
                   fuse.at("voltage_rating"), [Value("fuse voltage rating", fuse.voltage_rating.si, "V"),
                                               Value("supply", supply.voltage.si, "V")], stage="power")


@rule("power.fuse-missing", verify='Follow the supply lead from the connector: the first part on the positive conductor should be the fuse.',
      level="warning",
      title="No fuse on a supply that can deliver more than the build needs",
      explanation="""
      Any supply that can deliver more current than the build needs can feed a fault (a shorted
      capacitor, a solder splash, a reversed part) until something burns: a battery delivers
      tens of amperes into a short, a bench supply its current limit, an adapter its rating and
      more. A fuse at the supply input, sized from the build's current budget, opens first.
      Only a supply whose own limit sits below what the build needs protects the build by
      itself.
      """,
      fix="Add a fuse at the supply input (supply.fuse) of the preferred rating from power.fuse-size.",
      source="common practice")
def fuse_missing(build, ctx):
    supply = build.supply
    if supply is None or supply.fuse or supply.series_resistor or supply.kind == "mains-transformer":
        return
    b = budget(build)
    if supply.max_current is not None and b.input and supply.max_current.si <= b.input:
        return
    values = []
    need = ""
    if b.input and b.complete:
        c = fuse_choice(build, ctx, b.input)
        values = [Value("normal current", b.input, "A"), Value("preferred rating", c["preferred"], "A")]
        need = f"; the build needs about {fmt(c['preferred'], 'A')}"
    can = f" (up to {supply.max_current.text}{' into a short' if supply.kind == 'battery' else ''})" \
        if supply.max_current is not None else ""
    ctx.report(f"the {supply.kind} supply{can} has no fuse{need}", supply.at("kind"), values, stage="power")


# ---- a resistor as a fuse ---------------------------------------------------------------------

@rule("power.resistor-fuse", verify="Read the resistor's marking or datasheet for 'fusible' or 'flame-proof'; measure its drop with the build at full output.",
      level="warning",
      title="A resistor in series with the supply, or used as its fuse",
      explanation="""
      A small resistor in series with the supply input (about 1 Ω with a large bulk capacitor)
      is used to knock down noise and to soften the inrush. It costs a voltage drop I·R and a
      dissipation I²·R in normal use, which must stay well inside its power rating. It is no
      substitute for a fuse: into a short at its far end it takes V²/R (144 W for 1 Ω on 12 V)
      and a plain resistor then glows, chars the board and may set it alight before it opens,
      if it opens at all. Only a fusible (flame-proof) resistor, made to open safely, may serve
      as the fuse, and only when the fault power is well above its rating so that it does open.
      """,
      fix="Fit a real fuse at the supply input; where the resistor must also protect, use a fusible "
          "(flame-proof) type whose fusing curve opens at the fault power shown.",
      source="common practice; fusing power of fusible resistors: from memory",
      settings={"power_share": 0.5, "drop_share": 0.05, "fusing_factor": 10.0})
def resistor_fuse(build, ctx):
    supply = build.supply
    if supply is None:
        return
    fuse_part = build.part(supply.fuse)
    as_fuse_ref = supply.fuse if fuse_part is not None and fuse_part.kind == "resistor" else None
    ref = as_fuse_ref or supply.series_resistor
    part = build.part(ref)
    if part is None or part.kind != "resistor":
        return
    as_fuse = as_fuse_ref is not None or not supply.fuse
    stage = "power"
    if part.value is None:
        return
    ohms = part.value.si
    volts = abs(supply.voltage.si) if supply.voltage else None
    normal = budget(build).input or 0.0
    p_normal, drop = normal ** 2 * ohms, normal * ohms
    ctx.publish("power", part.name, "drop in normal use", drop, "V")
    ctx.publish("power", part.name, "dissipation in normal use", p_normal, "W")
    values = [Value("normal current", normal, "A"), Value("drop", drop, "V"), Value("dissipation", p_normal, "W")]
    p_short = None
    if volts is not None:
        r_int = volts / supply.max_current.si if supply.kind == "battery" and supply.max_current else 0.0
        i_short = volts / (ohms + r_int)
        p_short = i_short ** 2 * ohms
        ctx.publish("power", part.name, "power into a short at its far end", p_short, "W")
        values.append(Value("power at a short", p_short, "W"))
    where = part.at("fusible") if part.given("fusible") else part.loc
    if as_fuse and not part.fusible:
        short = f": into a short it takes {fmt(p_short, 'W')}" if p_short is not None else ""
        ctx.report(f"{part.name} ({part.value.text}) is the only protection on the supply input but is a plain "
                   f"resistor{short}, glows and can set the board alight before it opens; fit a fuse or a fusible "
                   f"(flame-proof) resistor", where, values, level="error", stage=stage)
    elif as_fuse and part.power_rating is not None and p_short is not None and \
            p_short < ctx.setting("fusing_factor") * part.power_rating.si:
        ctx.report(f"fusible {part.name} takes only {fmt(p_short, 'W')} into a short, {p_short / part.power_rating.si:.3g} "
                   f"times its {part.power_rating.text} rating: it may sit hot instead of opening (check its fusing "
                   f"curve)", part.at("power_rating"), values, stage=stage)
    if part.power_rating is None:
        if p_normal > 0:
            ctx.report(f"{part.name} dissipates {fmt(p_normal, 'W')} in normal use; state its power_rating",
                       part.loc, values, level="note", stage=stage)
    elif p_normal > ctx.setting("power_share") * part.power_rating.si:
        ctx.report(f"{part.name} dissipates {fmt(p_normal, 'W')} in normal use, {p_normal / part.power_rating.si:.0%} "
                   f"of its {part.power_rating.text} rating (keep under {ctx.setting('power_share'):.0%})",
                   part.at("power_rating"), values, stage=stage)
    if volts and drop > ctx.setting("drop_share") * volts:
        ctx.report(f"{part.name} drops {fmt(drop, 'V')} at the build's {fmt(normal, 'A')}, {drop / volts:.0%} of the "
                   f"{supply.voltage.text} supply", part.at("value"), values, stage=stage)


# ---- reverse polarity ------------------------------------------------------------------------

@rule("power.reverse-polarity", verify='With a current-limited bench supply set low, apply reversed polarity briefly: no current should flow (series diode) or the fuse opens (shunt diode).',
      level="warning",
      title="No reverse-polarity protection on a DC input with polarized parts",
      explanation="""
      A battery snap touched on the wrong way, a bench supply's leads swapped, an adapter with
      the other centre polarity: the DC input gets reversed sooner or later. Electrolytic and
      tantalum capacitors then conduct and can vent or burn, and the ICs' substrate diodes
      carry the supply's full current. The usual fixes: a series diode (it blocks the reversed
      supply, at the cost of its forward drop, about 0.7 V for silicon and 0.3 to 0.4 V for a
      Schottky part) or a shunt diode across the rail behind the fuse, cathode on the rail (it
      conducts on reversal and opens the fuse; no drop in normal use).
      """,
      fix="Add a series diode (mind its drop) or a shunt diode from ground to the rail behind the fuse, and name it "
          "in supply.reverse_protection.",
      source="common practice")
def reverse_polarity(build, ctx):
    supply = build.supply
    if supply is None or supply.kind not in DC_KINDS:
        return
    if supply.reverse_protection not in (None, "none"):
        return
    caps = [p.name for p in build.parts.values() if p.polarized]
    chips = [d.name for d in build.devices.values()]
    if not caps and not chips:
        return
    at_risk = ", ".join(caps + chips)
    stated = " (reverse_protection: none)" if supply.reverse_protection == "none" else ""
    what = {"battery": "battery", "dc-adapter": "adapter", "bench": "bench supply"}[supply.kind]
    ctx.report(f"nothing protects {at_risk} if the {what} is connected the wrong way round{stated}",
               supply.at("reverse_protection") if supply.given("reverse_protection") else supply.at("kind"),
               [Value("polarized capacitors", len(caps), ""), Value("devices", len(chips), "")], stage="power")


@rule("power.reverse-diode", verify='Measure the voltage across the protection diode at full load: that drop is lost from the rail.',
      level="error",
      title="Reverse-polarity diode wired the right way and in the right place",
      explanation="""
      A shunt protection diode sits across the rail with its anode on ground and its cathode on
      the rail: it is off in normal use and conducts only when the input is reversed, which
      opens the fuse ahead of it. Turned round, it shorts the supply the moment it is switched
      on. Without a fuse ahead of it (or placed ahead of the fuse) it carries the whole short-
      circuit current until it fails. A series diode has its anode toward the input and its
      cathode toward the rail; turned round, it blocks the supply.
      """,
      fix="Fit the shunt diode from ground (anode) to the rail behind the fuse (cathode); a series diode anode to "
          "the input.",
      source="common practice")
def reverse_diode(build, ctx):
    supply = build.supply
    if supply is None or supply.reverse_protection in (None, "none"):
        return
    diode = build.part(supply.reverse_protection)
    if diode is None:
        return
    if diode.kind != "diode" or len(diode.ends) != 2:
        ctx.report(f"supply.reverse_protection names {diode.name}, a {diode.kind}; expected a diode",
                   supply.at("reverse_protection"), level="note", stage="power")
        return
    nets = build.nets
    a, b = diode.ends
    ground = a if nets.is_ground(a) else b if nets.is_ground(b) else None
    if not diode.positive:
        ctx.report(f"{diode.name} protects against reversed polarity but its anode is not noted (positive: NET)",
                   diode.loc, level="warning", stage="power")
        return
    fuse = supply_fuse(build)
    if ground is not None:
        hot = diode.other_end(ground)
        if diode.positive == hot:
            ctx.report(f"{diode.name} has its anode on {hot} and its cathode on {ground}: it conducts in normal use and "
                       f"shorts the supply", diode.at("positive"), stage="power")
            return
        ctx.publish("power", diode.name, "reverse protection", f"shunt diode across {hot}")
        if fuse is None:
            ctx.report(f"{diode.name} is a shunt diode but no fuse is declared ahead of it: on reversal it carries the "
                       f"supply's whole short-circuit current", diode.at("ends"), level="warning", stage="power")
        elif hot in fuse.ends and supply.rail and hot != supply.rail and supply.rail in fuse.ends:
            ctx.report(f"{diode.name} sits on {hot}, ahead of fuse {fuse.name}: on reversal nothing opens",
                       diode.at("ends"), level="warning", stage="power")
        return
    rail = supply.rail
    if rail in diode.ends and diode.positive == rail:
        ctx.report(f"series diode {diode.name} has its cathode toward the input and its anode on {rail}: it blocks "
                   f"the supply", diode.at("positive"), stage="power")
        return
    if diode.forward_voltage is not None:
        ctx.publish("power", diode.name, "series diode drop", diode.forward_voltage.si, "V")
