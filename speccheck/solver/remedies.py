"""Remedies: for a finding, the changes to the plan that would clear it, best first.

One function per rule id, registered with @remedy. A remedy reads the model (the parts and
stages the finding is about) and the numbers the rule put on the finding (`Situation.number`),
and returns a Proposal whose Options each list Changes (a value to replace, or an entry to add)
with the figure after the change. The arithmetic comes from speccheck/formulas (the picks of
preferred values and the inverse formulas live in formulas/picks.py); a remedy never decides
whether a change clears the finding: the solver checks every option with the engine.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from speccheck import schema, units
from speccheck.config import Settings
from speccheck.findings import Finding
from speccheck.formulas import picks
from speccheck.solver import Change, Option, Proposal

REMEDIES: dict = {}
BEST_FEW = 3  # options shown where two parts trade against each other
ASSUMED_STRAY = 3e-12  # a compact board's stray across a crystal, as freqplan.crystal-load suggests (from memory)


def remedy(rule_id: str):
    def register(fn):
        REMEDIES[rule_id] = fn
        return fn
    return register


@dataclass
class Situation:
    loaded: Any  # loader.Loaded
    before: Any  # engine.FileResult
    settings: Settings
    series: str = "E12"
    proposed_names: set = field(default_factory=set)

    @property
    def build(self):
        return self.loaded.build

    def sheet(self, section: str, owner: str, name: str) -> float | None:
        """A number a rule published on the design sheet."""
        for entry in self.before.sheet:
            if entry.section == section and entry.owner == owner and entry.value.name == name \
                    and isinstance(entry.value.value, (int, float)):
                return float(entry.value.value)
        return None

    def new_name(self, prefix: str) -> str:
        """The next free reference designator with this prefix (R, C ...), never one proposed already."""
        used = set(self.build.parts) | self.proposed_names
        numbers = [int(n[len(prefix):]) for n in used if n.startswith(prefix) and n[len(prefix):].isdigit()]
        name = f"{prefix}{max(numbers, default=0) + 1}"
        self.proposed_names.add(name)
        return name

    def new_net(self, base: str) -> str:
        known = set(self.build.nets.potentials) | set(self.build.rails) | self.proposed_names | {
            end for part in self.build.parts.values() for end in part.ends}
        name, n = base, 1
        while name in known:
            n += 1
            name = f"{base}{n}"
        self.proposed_names.add(name)
        return name

    def ground(self) -> str | None:
        return next((name for name, rail in self.build.rails.items() if rail.is_ground), None)

    def series_for(self, kind: str) -> str:
        """Inductors are stocked in E12 and E24 only; E96 applies to resistors and capacitors."""
        return "E24" if kind == "inductor" and self.series == "E96" else self.series

    def part_for(self, finding: Finding):
        """The part a finding points into (parts.C31.voltage_rating -> C31)."""
        for part in self.build.parts.values():
            if _within(finding.location.path, schema.dotted(part.doc_path)):
                return part
        return None

    def stage_for(self, finding: Finding):
        for stage in self.build.chain:
            if _within(finding.location.path, schema.dotted(stage.doc_path)):
                return stage
        return None

    def device_for(self, finding: Finding):
        for dev in self.build.devices.values():
            if _within(finding.location.path, schema.dotted(dev.doc_path)):
                return dev
        return None


def _within(path: str, prefix: str) -> bool:
    return path == prefix or path.startswith((prefix + ".", prefix + "["))


def number(finding: Finding, name: str) -> float | None:
    """A number the rule put on the finding, by its name."""
    for value in finding.values:
        if value.name == name and isinstance(value.value, (int, float)):
            return float(value.value)
    return None


def _value_change(part, si: float, unit: str) -> Change:
    like = part.value.text if part.value is not None else ""
    return Change(part.places["value"], units.plan_text(si, unit, like))


def _set_or_add(holder, field_name: str, value, after: str | None = None) -> Change:
    """Replace holder.field when the plan gives it, else add it to holder's mapping."""
    if field_name in holder.places:
        return Change(holder.places[field_name], value)
    return Change(holder.doc_path, value, key=field_name, after=after)


def _pct(share: float) -> str:
    return f"{share * 100:+.1f} %"


# ---- wiring -----------------------------------------------------------------------------------

@remedy("wiring.cap-voltage")
def cap_voltage(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    working = (number(f, "DC across") or 0.0) + (number(f, "AC peak") or 0.0)
    rating = number(f, "rating")
    allowed = next((v.value for v in f.values if v.name.startswith("allowed at")), None)
    if part is None or not working or not rating or not isinstance(allowed, float):
        return None
    share = allowed / rating
    options: list[Option] = []
    pick = picks.voltage_rating_up(working / share)
    while pick is not None and len(options) < 2:
        options.append(Option([_set_or_add(part, "voltage_rating", units.plan_text(pick, "V"))],
                              f"{part.name} rated {units.fmt(pick, 'V')}",
                              f"{working:.3g} V is {working / pick:.0%} of {units.fmt(pick, 'V')} (keep under "
                              f"{share:.0%})"))
        pick = picks.voltage_rating_up(pick * 1.001)
    return Proposal(f, f"{part.name} voltage rating", options,
                    source="stocked capacitor voltage ratings (R5 of ISO 3, and common practice); derating: the rule's")


def _polarity(s: Situation, f: Finding, positive: str | None, why: str) -> Proposal | None:
    part = s.part_for(f)
    if part is None or not positive:
        return None
    change = _set_or_add(part, "positive", positive)
    return Proposal(f, f"{part.name} polarity", [Option([change], f"{part.name} positive: {positive}", why)],
                    source="common practice: + toward the higher DC potential")


def _higher_end(s: Situation, part) -> tuple[str, str] | None:
    known = s.build.nets.across(part)
    if known is None:
        return None
    a, pa, b, pb, _ = known
    if pa.volts == pb.volts:
        return None
    high, low = (a, b) if pa.volts > pb.volts else (b, a)
    return high, f"{high} sits at {max(pa.volts, pb.volts):g} V, {low} at {min(pa.volts, pb.volts):g} V"


@remedy("wiring.polarity-unstated")
def polarity_unstated(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    found = _higher_end(s, part) if part is not None else None
    return _polarity(s, f, *found) if found else None


@remedy("wiring.polarity-reversed")
def polarity_reversed(s: Situation, f: Finding) -> Proposal | None:
    return polarity_unstated(s, f)


@remedy("wiring.speaker-coupling")
def speaker_coupling(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.rules.wiring import speaker_coupling_caps

    part = s.part_for(f)
    nets = speaker_coupling_caps(s.build).get(part.name) if part is not None else None
    if nets is None:
        return None
    return _polarity(s, f, nets[0], f"+ toward the amplifier output {nets[0]}, - toward the speaker")


def _swap_end(s: Situation, f: Finding, part, old: str, new: str, why: str, title: str) -> Proposal | None:
    if old not in part.ends or new in part.ends:
        return None
    index = part.ends.index(old)
    path = part.places["ends"] + (index,)
    return Proposal(f, title, [Option([Change(path, new)], f"{part.name} ends: {old} -> {new}", why)],
                    source="common practice (the fix the rule names)")


@remedy("wiring.tank-return")
def tank_return(s: Situation, f: Finding) -> Proposal | None:
    coil = s.part_for(f)
    far = next((v.value for v in f.values if v.name == "coil far end"), None)
    pin = next((v.value for v in f.values if v.name == "pin"), None)
    dev = s.build.device(str(pin).split(".")[0]) if pin else None
    if coil is None or not isinstance(far, str) or dev is None or not dev.rail:
        return None
    return _swap_end(s, f, coil, far, dev.rail,
                     f"the coil returns {pin} to its supply {dev.rail}; better still through about 10 ohm with "
                     f"100 nF to ground at the junction", f"{coil.name} return")


@remedy("wiring.crystal-dc")
def crystal_dc(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    if part is None or len(part.ends) != 2:
        return None
    nets = s.build.nets
    pots = [nets.dc(end) for end in part.ends]
    if any(p is None for p in pots):
        return None
    pin_index = 0 if "." in part.ends[0] else 1
    pin, other = part.ends[pin_index], part.ends[1 - pin_index]
    dev = s.build.device(pin.split(".")[0])
    if dev is None or not dev.rail or nets.dc(dev.rail) is None:
        return None
    if abs(nets.dc(dev.rail).volts - pots[pin_index].volts) > 1e-9:
        return None  # the pin does not sit at its supply: returning there would not remove the DC
    return _swap_end(s, f, part, other, dev.rail,
                     f"both ends at {pots[pin_index].volts:g} V; {dev.rail} must be bypassed to ground at the crystal",
                     f"{part.name} return")


# ---- crystal ----------------------------------------------------------------------------------

@remedy("freqplan.crystal-load")
def crystal_load(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.solver._formulas import resonators

    stage = s.stage_for(f)
    osc = stage.oscillator if stage is not None else None
    if osc is None or len(osc.load_caps) != 2 or not osc.crystal:
        return None
    x = s.build.part(osc.crystal)
    c1, c2 = (s.build.part(ref) for ref in osc.load_caps)
    if x is None or x.load_capacitance is None or c1 is None or c2 is None or number(f, "specified load") is None:
        return None  # the note that no stray is given is cleared, if at all, with the load
    spec = x.load_capacitance.si
    stray_given = osc.stray is not None
    stray = osc.stray.si if stray_given else ASSUMED_STRAY
    if spec <= stray:
        return None
    series = s.series_for("capacitor")
    ideal = picks.equal_load_capacitors(spec, stray)
    near = picks.preferred_around(ideal, series, 3)
    # the two stay within 1.5 : 1 so the oscillator's feedback ratio stays near the design's (common practice)
    pairs = {(a, b) if a <= b else (b, a) for a in near for b in near if max(a, b) <= 1.5 * min(a, b)}
    ranked = sorted(pairs, key=lambda p: (abs(resonators.series_load(*p, stray) / spec - 1), p[1] - p[0], p))
    options = []
    for a, b in ranked[:BEST_FEW]:
        load = resonators.series_load(a, b, stray)
        fitted = c1.value is not None and c2.value is not None and \
            {round(c1.value.si, 15), round(c2.value.si, 15)} == {round(a, 15), round(b, 15)}
        changes = [] if fitted else [_value_change(c1, a, "F"), _value_change(c2, b, "F")]
        if not stray_given:
            changes.append(Change(osc.doc_path, units.plan_text(stray, "F"), key="stray"))
        what = (f"{c1.name} = {c2.name} = {units.fmt(a, 'F')}" if a == b else
                f"{c1.name} {units.fmt(a, 'F')}, {c2.name} {units.fmt(b, 'F')}")
        what += " (as fitted; the stray is stated)" if fitted else ""
        options.append(Option(changes, what, f"load {units.fmt(load, 'F')} with {units.fmt(stray, 'F')} stray against "
                                             f"the specified {units.fmt(spec, 'F')} ({_pct(load / spec - 1)})"))
    note = "" if stray_given else (f"no stray is stated: {units.fmt(stray, 'F')} (a compact board) is assumed and "
                                   f"written as oscillator.stray; measure or estimate yours")
    return Proposal(f, f"{x.name} loading capacitors", options, note=note,
                    source="C_L = C1 C2 / (C1 + C2) + C_stray (crystal makers' application notes); "
                           f"values from IEC 60063 {series}")


# ---- quadrature tank --------------------------------------------------------------------------

def _tank(s: Situation, f: Finding):
    from speccheck.rules.freqplan import tank_facts

    stage = s.stage_for(f)
    for candidate in ([stage] if stage is not None else []) + s.build.stages("discriminator"):
        if candidate is not None and candidate.kind == "discriminator":
            facts = tank_facts(s.build, candidate)
            if facts is not None and (stage is not None or s.part_for(f) in (facts.coil, facts.cap, facts.damping)):
                return facts
    return None


def _coil_range(coil) -> tuple[float, float]:
    if coil.adjust is not None and coil.adjust.min is not None and coil.adjust.max is not None:
        return min(coil.adjust.min.si, coil.adjust.max.si), max(coil.adjust.min.si, coil.adjust.max.si)
    if coil.tolerance is not None:
        t = abs(coil.tolerance.si)
        return coil.value.si * (1 - t), coil.value.si * (1 + t)
    return coil.value.si, coil.value.si


@remedy("freqplan.tank-tuning")
def tank_tuning(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.solver._formulas import resonators

    t = _tank(s, f)
    if t is None or t.f_if is None or t.cap.adjust is not None:
        return None
    extra = t.stage.tank.extra_capacitance.si if t.stage.tank.extra_capacitance is not None else 0.0
    l_low, l_high = _coil_range(t.coil)
    ideal = picks.centre_capacitance(t.f_if, l_low, l_high) - extra
    if ideal <= 0:
        return None
    series = s.series_for("capacitor")
    options = []
    for c in sorted(picks.preferred_around(ideal, series, 2), key=lambda c: (abs(math.log(c / ideal)), c))[:BEST_FEW]:
        low, high = resonators.resonance(l_high, c + extra), resonators.resonance(l_low, c + extra)
        where = picks.position_in_range(t.f_if, low, high)
        options.append(Option([_value_change(t.cap, c, "F")], f"{t.cap.name} {units.fmt(c, 'F')}",
                              f"tunes {units.fmt(low, 'Hz')} to {units.fmt(high, 'Hz')}; the IF "
                              f"{units.fmt(t.f_if, 'Hz')} sits at {where:.0%} of the range (50 % is the centre)"))
    return Proposal(f, f"tank capacitor {t.cap.name}", options,
                    source=f"f0 = 1/(2 pi sqrt(L C)) at the geometric centre of the coil's range; IEC 60063 {series}")


@remedy("freqplan.tank-range")
def tank_range(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.solver._formulas import resonators

    t = _tank(s, f)
    need, q_max = number(f, "needed"), number(f, "highest Q")
    if t is None or t.damping is None or t.damping.value is None or not need or not q_max:
        return None
    L = t.coil.value.si
    total = q_max * 2 * math.pi * t.f0 * L
    coil_loss = resonators.coil_parallel_resistance(t.coil.q, t.f0, L) if t.coil.q else None
    most = picks.damping_for(total, coil_loss)
    if not math.isfinite(most) or most <= 0:
        return None
    series = s.series_for("resistor")
    options = []
    for r in reversed(picks.series_values(series, most / 3, most)[-BEST_FEW:]):
        rp = resonators.parallel(r, coil_loss) if coil_loss else r
        q = resonators.parallel_q(rp, t.f0, L)
        options.append(Option([_value_change(t.damping, r, "Ω")], f"{t.damping.name} {units.fmt(r, 'Ω')}",
                              f"loaded Q {q:.3g}, linear range {units.fmt(t.f0 / q, 'Hz')} against the "
                              f"{units.fmt(need, 'Hz')} needed"))
    return Proposal(f, f"damping resistor {t.damping.name}", options,
                    note="a lower resistor widens the linear range and gives less recovered audio",
                    source=f"Q = R_p / (omega0 L), linear range about f0 / Q (the rule's); IEC 60063 {series}")


# ---- audio ------------------------------------------------------------------------------------

def _rc_options(s: Situation, stage, tau: float, what: str) -> list:
    """Options for an RC stage with a wanted time constant: keep C and pick R, or keep R and pick C."""
    from speccheck.solver._formulas import audio

    res, cap = s.build.part(stage.resistor), s.build.part(stage.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return []
    options = []
    for keep, change, unit in ((cap, res, "Ω"), (res, cap, "F")):
        ideal = picks.rc_partner(tau, keep.value.si)
        for value in sorted(picks.preferred_around(ideal, s.series_for(change.kind), 1),
                            key=lambda v: abs(math.log(v / ideal))):
            got = value * keep.value.si
            options.append((abs(got / tau - 1), Option(
                [_value_change(change, value, unit)], f"{change.name} {units.fmt(value, unit)}",
                f"{what} {units.fmt(got, 's')} (corner {units.fmt(audio.corner_from_tau(got), 'Hz')}) against "
                f"{units.fmt(tau, 's')} ({_pct(got / tau - 1)})")))
    return [o for _, o in sorted(options, key=lambda item: item[0])][:BEST_FEW]


@remedy("freqplan.de-emphasis")
def de_emphasis(s: Situation, f: Finding) -> Proposal | None:
    stage = s.stage_for(f) or next((st for st in s.build.stages("de-emphasis")
                                    if s.part_for(f) in (s.build.part(st.resistor), s.build.part(st.capacitor))),
                                   None)
    want = number(f, "wanted")
    if stage is None or not want:
        return None
    if stage.time_constant is not None:
        return Proposal(f, "de-emphasis time constant", [Option(
            [Change(stage.places["time_constant"], units.plan_text(want, "s"))],
            f"time_constant {units.fmt(want, 's')}", "the region's value")], source="ITU-R BS.450-3")
    options = _rc_options(s, stage, want, "de-emphasis")
    return Proposal(f, "de-emphasis R and C", options, source=f"tau = R C (ITU-R BS.450-3 values); IEC 60063 {s.series}")


@remedy("freqplan.audio-corner")
def audio_corner(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.solver._formulas import audio

    stage = s.stage_for(f) or next((st for st in s.build.stages("audio-filter")
                                    if s.part_for(f) in (s.build.part(st.resistor), s.build.part(st.capacitor))),
                                   None)
    top = number(f, "highest audio")
    if stage is None or not top or stage.resistor is None:
        return None
    tau = audio.rc_time_constant(top * 1.2)  # a little above the highest audio frequency
    return Proposal(f, "audio low-pass R and C", _rc_options(s, stage, tau, "time constant"),
                    source=f"f = 1/(2 pi R C), corner 1.2 x the highest audio (common practice); IEC 60063 {s.series}")


@remedy("audio.coupling-corner")
def coupling_corner(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.solver._formulas import audio

    need = number(f, "capacitance needed")
    cap = s.part_for(f)
    stage = s.build.stage_of_part(cap.name) if cap is not None else None
    load = s.build.part(stage.load) if stage is not None else None
    if not need or cap is None or load is None or load.value is None:
        return None
    series = s.series_for("capacitor")
    options = []
    for c in picks.series_values(series, need, need * 3)[:2]:
        corner = audio.rc_corner(load.value.si, c)
        options.append(Option([_value_change(cap, c, "F")], f"{cap.name} {units.fmt(c, 'F')}",
                              f"corner {units.fmt(corner, 'Hz')} into {load.name} ({load.value.text})"))
    return Proposal(f, f"coupling capacitor {cap.name}", options,
                    source=f"f_c = 1/(2 pi R_L C) (circuit theory); IEC 60063 {series}")


@remedy("audio.output-network")
def output_network(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.solver._formulas import audio

    stage = s.stage_for(f)
    net = stage.output_network if stage is not None else None
    if net is None:
        return _add_output_network(s, f, stage)
    res, cap = s.build.part(net.resistor), s.build.part(net.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return None
    lowest = s.settings.rule_settings.get("audio.output-network", {}).get("lowest_corner", 20e3)
    most = 1 / (2 * math.pi * res.value.si * lowest)
    series = s.series_for("capacitor")
    options = []
    for c in reversed(picks.series_values(series, most / 3, most)[-2:]):
        options.append(Option([_value_change(cap, c, "F")], f"{cap.name} {units.fmt(c, 'F')}",
                              f"turnover {units.fmt(audio.rc_corner(res.value.si, c), 'Hz')}, above the audio band"))
    return Proposal(f, f"output network {cap.name}", options, source=f"f = 1/(2 pi R C); IEC 60063 {series}")


# ---- power ------------------------------------------------------------------------------------

@remedy("power.fuse-size")
def fuse_size(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    preferred = number(f, "preferred")
    if part is None or not preferred:
        return None
    return Proposal(f, f"{part.name} rating", [Option(
        [_set_or_add(part, "current_rating", units.plan_text(preferred, "A"))], f"{part.name} {units.fmt(preferred, 'A')}",
        f"normal current {units.fmt(number(f, 'normal current') or 0.0, 'A')} within the derated share of "
        f"{units.fmt(preferred, 'A')}")], source="R10 series, IEC 60127-1 Annex A (the rule's pick)")


@remedy("power.fuse-inrush")
def fuse_inrush(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    if part is None or part.kind != "fuse" or part.speed == "time-lag":
        return None
    return Proposal(f, f"{part.name} speed", [Option([_set_or_add(part, "speed", "time-lag")],
                                                     f"{part.name} time-lag", "a time-lag fuse rides through the "
                                                     "charging surge of the bulk capacitor")],
                    source="IEC 60127-2 time-lag characteristic (the rule's comparison)")


@remedy("power.heat")
def heat(s: Situation, f: Finding) -> Proposal | None:
    need = number(f, "heat sink needed θSA")
    dev = s.device_for(f)
    if dev is None or not need or need <= 0:
        return None
    options = []
    for pick in _heat_sink_steps(need):
        text = units.plan_text(pick, "°C/W")
        if dev.heat_sink is not None and dev.heat_sink.theta_sa is not None:
            change = Change(dev.heat_sink.places["theta_sa"], text)
        elif dev.heat_sink is not None:
            change = Change(dev.heat_sink.doc_path, text, key="theta_sa")
        else:
            change = Change(dev.doc_path, {"theta_sa": text}, key="heat_sink")
        options.append(Option([change], f"{dev.name} heat sink θSA {units.fmt(pick, '°C/W')}",
                              f"needs {units.fmt(need, '°C/W')} or less; choose a heat sink rated at or below "
                              f"{units.fmt(pick, '°C/W')} in its mounting"))
    return Proposal(f, f"{dev.name} heat sink", options,
                    source="θSA = (Tj,max - Ta)/P - θJC - θCS (the rule's figure), rounded down")


def _heat_sink_steps(need: float) -> list[float]:
    """Round numbers at or below the needed θSA (heat sinks have no preferred series): two figures."""
    exponent = math.floor(math.log10(need)) - 1
    first = math.floor(need / 10 ** exponent) * 10 ** exponent
    return [float(f"{first:.2g}")] + ([float(f"{first * 0.8:.2g}")] if first * 0.8 > 0 else [])


def _pins(dev, role: str) -> list[str]:
    if dev is None or dev.profile is None:
        return []
    return [f"{dev.name}.{pin.name}" for pin in dev.profile.pins.values() if pin.role == role]


def _add_output_network(s: Situation, f: Finding, stage) -> Proposal | None:
    """The usual series R-C from the output to ground: 10 ohm with 100 nF (the rule's fix)."""
    from speccheck.solver._formulas import audio

    dev = s.build.device(stage.device)
    outs, ground = _pins(dev, "audio-out"), s.ground()
    if not outs or ground is None:
        return None
    r_name, c_name, middle = s.new_name("R"), s.new_name("C"), s.new_net("OUT_RC")
    ohms, farads = 10.0, 100e-9
    changes = [
        Change(("parts",), {"kind": "resistor", "value": units.plan_text(ohms, "Ω"), "ends": [outs[0], middle]},
               key=r_name),
        Change(("parts",), {"kind": "capacitor", "value": units.plan_text(farads, "F"), "dielectric": "film",
                            "ends": [middle, ground]}, key=c_name),
        Change(stage.doc_path, {"resistor": r_name, "capacitor": c_name}, key="output_network"),
    ]
    return Proposal(f, f"output network of {dev.name}", [Option(
        changes, f"add {r_name} {units.fmt(ohms, 'Ω')} and {c_name} {units.fmt(farads, 'F')} in series from "
                 f"{outs[0]} to {ground}",
        f"turnover {units.fmt(audio.rc_corner(ohms, farads), 'Hz')}, far above the audio band")],
        note="fit them close to the amplifier's output and ground pins",
        source="common practice (audio amplifier IC application circuits)")


@remedy("audio.input-bypass")
def input_bypass(s: Situation, f: Finding) -> Proposal | None:
    stage = s.stage_for(f)
    if stage is None or stage.input_bypass is not None:
        return None
    dev = s.build.device(stage.device)
    inputs, ground = _pins(dev, "input"), s.ground()
    if not inputs or ground is None:
        return None
    wired = {end for part in s.build.parts.values() for end in part.ends}
    inputs.sort(key=lambda net: (net not in wired, "plus" not in net and "+" not in net, net))
    name = s.new_name("C")
    farads = 470e-12
    changes = [Change(("parts",), {"kind": "capacitor", "value": units.plan_text(farads, "F"), "dielectric": "ceramic",
                                   "ends": [inputs[0], ground]}, key=name),
               Change(stage.doc_path, name, key="input_bypass")]
    return Proposal(f, f"RF bypass at {dev.name}'s input", [Option(
        changes, f"add {name} {units.fmt(farads, 'F')} from {inputs[0]} to {ground}",
        "shorts RF at the amplifier input; against a 10 kohm source it turns over near 34 kHz")],
        note="fit it right at the input pin", source="common practice (the rule's fix)")


@remedy("rfpath.input-match")
def input_match(s: Situation, f: Finding) -> Proposal | None:
    from speccheck.rules.freqplan import owner
    from speccheck.solver._formulas import matching

    stage = s.stage_for(f)
    if stage is None or stage.topology not in ("series-l-shunt-c", "shunt-c-series-l"):
        return None
    who = owner(s.build, stage)
    freq = s.sheet("input-match", who, "working frequency")
    rs = s.sheet("input-match", who, "source resistance")
    rl = s.sheet("input-match", who, "load resistance")
    l_ideal = s.sheet("input-match", who, "ideal series L")
    c_ideal = s.sheet("input-match", who, "ideal shunt C")
    parts = [s.build.part(ref) for ref in stage.parts]
    coil = next((p for p in parts if p is not None and p.kind == "inductor"), None)
    cap = next((p for p in parts if p is not None and p.kind == "capacitor"), None)
    if freq is None or rs is None or rl is None or l_ideal is None or c_ideal is None:
        return None
    if coil is None or cap is None or coil.value is None or cap.value is None:
        return None
    zin = matching.zin_series_l_shunt_c if stage.topology == "series-l-shunt-c" else matching.zin_shunt_c_series_l
    ranked = []
    for henries in picks.preferred_around(l_ideal, s.series_for("inductor"), 2):
        for farads in picks.preferred_around(c_ideal, s.series_for("capacitor"), 2):
            loss = matching.return_loss_db(zin(freq, henries, farads, rl), rs)
            ranked.append((-loss, henries, farads, loss))
    ranked.sort()
    options = [Option([_value_change(coil, henries, "H"), _value_change(cap, farads, "F")],
                      f"{coil.name} {units.fmt(henries, 'H')}, {cap.name} {units.fmt(farads, 'F')}",
                      f"return loss {loss:.1f} dB at {units.fmt(freq, 'Hz')} (ideal {units.fmt(l_ideal, 'H')} "
                      f"and {units.fmt(c_ideal, 'F')})")
               for _, henries, farads, loss in ranked[:BEST_FEW]]
    return Proposal(f, f"input network {coil.name} and {cap.name}", options,
                    source=f"L-network design and its input impedance (the rule's formulas); IEC 60063 {s.series}")
