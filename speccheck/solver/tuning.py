"""Remedies that pick values: crystal loading capacitors, the quadrature tank's capacitor and damping
resistor, RC time constants (de-emphasis, audio low-pass), the coupling capacitor, the output
network's capacitor, and the input L-network."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from speccheck import loads, units
from speccheck.chain import owner
from speccheck.findings import Finding
from speccheck.formulas import audio, matching, mixing, picks, resonators
from speccheck.solver.base import (
    ASSUMED_STRAY,
    BEST_FEW,
    Change,
    Option,
    Proposal,
    Situation,
    number,
    pct,
    remedy,
    value_change,
)

# ---- crystal ----------------------------------------------------------------------------------


@remedy("freqplan.crystal-load")
def crystal_load(s: Situation, f: Finding) -> Proposal | None:
    stage = s.stage_for(f)
    osc = stage.oscillator if stage is not None else None
    if osc is None or len(osc.load_caps) != 2 or not osc.crystal:
        return None
    x = s.build.part(osc.crystal)
    c1, c2 = (s.build.part(ref) for ref in osc.load_caps)
    if (
        x is None
        or x.load_capacitance is None
        or c1 is None
        or c2 is None
        or number(f, "specified load") is None
    ):
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
    ranked = sorted(
        pairs, key=lambda p: (abs(resonators.series_load(p[0], p[1], stray) / spec - 1), p[1] - p[0], p)
    )
    options = []
    for a, b in ranked[:BEST_FEW]:
        load = resonators.series_load(a, b, stray)
        fitted = (
            c1.value is not None
            and c2.value is not None
            and {round(c1.value.si, 15), round(c2.value.si, 15)} == {round(a, 15), round(b, 15)}
        )
        changes = [] if fitted else [value_change(c1, a, "F"), value_change(c2, b, "F")]
        if not stray_given:
            changes.append(Change(osc.doc_path, units.plan_text(stray, "F"), key="stray"))
        what = (
            f"{c1.name} = {c2.name} = {units.fmt(a, 'F')}"
            if a == b
            else f"{c1.name} {units.fmt(a, 'F')}, {c2.name} {units.fmt(b, 'F')}"
        )
        what += " as fitted" if fitted else ""
        what += f", stating the {units.fmt(stray, 'F')} stray" if not stray_given else ""
        options.append(
            Option(
                changes,
                what,
                f"load {units.fmt(load, 'F')} with {units.fmt(stray, 'F')} stray against "
                f"the specified {units.fmt(spec, 'F')} ({pct(load / spec - 1)})",
            )
        )
    note = (
        ""
        if stray_given
        else (
            f"no stray is stated: {units.fmt(stray, 'F')} (a compact board) is "
            "assumed and written as oscillator.stray; measure or estimate yours"
        )
    )
    return Proposal(
        f,
        f"{x.name} loading capacitors",
        options,
        note=note,
        source="C_L = C1 C2 / (C1 + C2) + C_stray (crystal makers' application notes); "
        f"values from IEC 60063 {series}",
    )


# ---- quadrature tank --------------------------------------------------------------------------


@dataclass
class _Tank:
    stage: Any
    coil: Any
    cap: Any
    damping: Any
    f0: float
    f_if: float | None


def _tank(s: Situation, f: Finding) -> _Tank | None:
    """The discriminator tank a finding is about, with the resonance and IF its rules published."""
    stage, part = s.stage_for(f), s.part_for(f)
    candidates = (
        [stage] if stage is not None and stage.kind == "discriminator" else s.build.stages("discriminator")
    )
    for st in candidates:
        if st.tank is None:
            continue
        coil, cap, damping = (
            s.build.part(ref) for ref in (st.tank.inductor, st.tank.capacitor, st.tank.damping)
        )
        if coil is None or cap is None or coil.value is None or cap.value is None:
            continue
        if stage is None and part not in (coil, cap, damping):
            continue
        who = owner(s.build, st)
        f0 = s.sheet("discriminator", who, "tank resonance f0")
        if f0 is not None:
            return _Tank(st, coil, cap, damping, f0, s.sheet("discriminator", who, "final IF"))
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
    """The tank capacitor that centres the IF in the coil's range; or, keeping the capacitor, the coil
    (its slug range scaled with it) whose range the IF sits in the middle of."""
    t = _tank(s, f)
    if t is None or t.f_if is None:
        return None
    extra = t.stage.tank.extra_capacitance.si if t.stage.tank.extra_capacitance is not None else 0.0
    l_low, l_high = _coil_range(t.coil)
    caps = [] if t.cap.adjust is not None else _tank_capacitors(s, t, l_low, l_high, extra)
    ranked = sorted(
        caps + _tank_coils(s, t, l_low, l_high, extra),
        key=lambda item: (abs(item[0] - 0.5) > 0.25 or item[2], abs(item[0] - 0.5)),
    )
    # a capacitor that puts the IF in the middle half of the range comes first: it is the easier change
    options = [option for where, option, _ in ranked if 0.0 < where < 1.0]
    return Proposal(
        f,
        f"tank {t.cap.name} or {t.coil.name}",
        options,
        source=f"f0 = 1/(2 pi sqrt(L C)) at the geometric centre of the tuning range; IEC 60063 "
        f"{s.series_for('capacitor')}",
    )


def _where(t: _Tank, low: float, high: float) -> tuple[float, str]:
    where = picks.position_in_range(t.f_if or 0.0, low, high)
    return where, (
        f"tunes {units.fmt(low, 'Hz')} to {units.fmt(high, 'Hz')}; the IF {units.fmt(t.f_if or 0.0, 'Hz')} "
        f"sits at {where:.0%} of the range (50 % is the centre)"
    )


def _tank_capacitors(s: Situation, t: _Tank, l_low: float, l_high: float, extra: float) -> list:
    ideal = picks.centre_capacitance(t.f_if or 0.0, l_low, l_high) - extra
    if ideal <= 0:
        return []
    options = []
    near = sorted(
        picks.preferred_around(ideal, s.series_for("capacitor"), 2),
        key=lambda c: (abs(math.log(c / ideal)), c),
    )
    for c in near[:BEST_FEW]:
        where, said = _where(
            t, resonators.resonance(l_high, c + extra), resonators.resonance(l_low, c + extra)
        )
        options.append(
            (where, Option([value_change(t.cap, c, "F")], f"{t.cap.name} {units.fmt(c, 'F')}", said), False)
        )
    return options


def _tank_coils(s: Situation, t: _Tank, l_low: float, l_high: float, extra: float) -> list:
    """A coil of the series near the one that centres the IF, its adjust range scaled in proportion."""
    c_total = t.cap.value.si + extra
    nominal = t.coil.value.si
    ideal = picks.inductance_for(t.f_if or 0.0, c_total) * nominal / math.sqrt(l_low * l_high)
    options = []
    near = sorted(
        picks.preferred_around(ideal, s.series_for("inductor"), 1), key=lambda v: abs(math.log(v / ideal))
    )
    for henries in near[:2]:
        scale = henries / nominal
        low, high = (
            resonators.resonance(l_high * scale, c_total),
            resonators.resonance(l_low * scale, c_total),
        )
        changes = [value_change(t.coil, henries, "H")]
        span = ""
        adjust = t.coil.places.get("adjust")
        if adjust is not None and t.coil.adjust.min is not None and t.coil.adjust.max is not None:
            for end in ("min", "max"):
                q = getattr(t.coil.adjust, end)
                changes.append(Change(tuple(adjust) + (end,), units.plan_text(q.si * scale, "H", q.text)))
            span = f" (slug {units.fmt(l_low * scale, 'H')} to {units.fmt(l_high * scale, 'H')})"
        where, said = _where(t, low, high)
        options.append((where, Option(changes, f"{t.coil.name} {units.fmt(henries, 'H')}{span}", said), True))
    return options


@remedy("freqplan.tank-range")
def tank_range(s: Situation, f: Finding) -> Proposal | None:
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
        options.append(
            Option(
                [value_change(t.damping, r, "Ω")],
                f"{t.damping.name} {units.fmt(r, 'Ω')}",
                f"loaded Q {q:.3g}, linear range {units.fmt(t.f0 / q, 'Hz')} against the "
                f"{units.fmt(need, 'Hz')} needed",
            )
        )
    return Proposal(
        f,
        f"damping resistor {t.damping.name}",
        options,
        note="a lower resistor widens the linear range and gives less recovered audio",
        source=f"Q = R_p / (omega0 L), linear range about f0 / Q (the rule's); IEC 60063 {series}",
    )


# ---- audio ------------------------------------------------------------------------------------


def _rc_options(s: Situation, stage, tau: float, what: str) -> list:
    """Options for an RC stage with a wanted time constant: keep C and pick R, or keep R and pick C.
    The time constant is the one as wired, as the rule takes it: with a plain resistive load R_L on
    the output, tau = (R || R_L)·C (Thevenin; formulas.audio)."""
    res, cap = s.build.part(stage.resistor), s.build.part(stage.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return []
    load = loads.resistive_load(s.build, stage)
    r_load = load.ohms if isinstance(load, loads.Load) else None

    def source(r: float) -> float:  # the resistance behind C
        return audio.parallel(r, r_load) if r_load else r

    options = []
    for change, unit in ((res, "Ω"), (cap, "F")):
        if change is res:
            wanted: float | None = picks.rc_partner(tau, cap.value.si)
            if r_load and wanted is not None:
                wanted = audio.parallel_partner(wanted, r_load)
            if wanted is None:
                continue  # the load alone is already too low for this C: change C instead
            ideal = wanted
        else:
            ideal = picks.rc_partner(tau, source(res.value.si))
        for value in sorted(
            picks.preferred_around(ideal, s.series_for(change.kind), 1),
            key=lambda v: abs(math.log(v / ideal)),
        ):
            got = source(value) * cap.value.si if change is res else source(res.value.si) * value
            options.append(
                (
                    abs(got / tau - 1),
                    Option(
                        [value_change(change, value, unit)],
                        f"{change.name} {units.fmt(value, unit)}",
                        f"{what} {units.fmt(got, 's')} (corner "
                        f"{units.fmt(audio.corner_from_tau(got), 'Hz')}"
                        f"{' as wired' if r_load else ''}) against {units.fmt(tau, 's')} "
                        f"({pct(got / tau - 1)})",
                    ),
                )
            )
    return [o for _, o in sorted(options, key=lambda item: item[0])][:BEST_FEW]


@remedy("freqplan.de-emphasis")
def de_emphasis(s: Situation, f: Finding) -> Proposal | None:
    stage = s.rc_stage_for(f, "de-emphasis")
    want = number(f, "wanted")
    if stage is None or not want:
        return None
    if stage.time_constant is not None:
        return Proposal(
            f,
            "de-emphasis time constant",
            [
                Option(
                    [Change(stage.places["time_constant"], units.plan_text(want, "s"))],
                    f"time_constant {units.fmt(want, 's')}",
                    "the region's value",
                )
            ],
            source="ITU-R BS.450-3",
        )
    options = _rc_options(s, stage, want, "de-emphasis")
    return Proposal(
        f, "de-emphasis R and C", options, source=f"tau = R C (ITU-R BS.450-3 values); IEC 60063 {s.series}"
    )


@remedy("freqplan.audio-corner")
def audio_corner(s: Situation, f: Finding) -> Proposal | None:
    stage = s.rc_stage_for(f, "audio-filter")
    top = number(f, "highest audio")
    if stage is None or not top or stage.resistor is None:
        return None
    tau = audio.rc_time_constant(top * 1.2)  # a little above the highest audio frequency
    return Proposal(
        f,
        "audio low-pass R and C",
        _rc_options(s, stage, tau, "time constant"),
        source=(
            f"f = 1/(2 pi (R || R_L) C) as wired (Thevenin), corner 1.2 x the highest audio (common "
            f"practice); IEC 60063 {s.series}"
        ),
    )


@remedy("audio.coupling-corner")
def coupling_corner(s: Situation, f: Finding) -> Proposal | None:
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
        options.append(
            Option(
                [value_change(cap, c, "F")],
                f"{cap.name} {units.fmt(c, 'F')}",
                f"corner {units.fmt(corner, 'Hz')} into {load.name} ({load.value.text})",
            )
        )
    return Proposal(
        f,
        f"coupling capacitor {cap.name}",
        options,
        source=f"f_c = 1/(2 pi R_L C) (circuit theory); IEC 60063 {series}",
    )


@remedy("rfpath.input-match")
def input_match(s: Situation, f: Finding) -> Proposal | None:
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
    zin = (
        matching.zin_series_l_shunt_c
        if stage.topology == "series-l-shunt-c"
        else matching.zin_shunt_c_series_l
    )
    ranked = []
    for henries in picks.preferred_around(l_ideal, s.series_for("inductor"), 2):
        for farads in picks.preferred_around(c_ideal, s.series_for("capacitor"), 2):
            loss = matching.return_loss_db(zin(freq, henries, farads, rl), rs)
            ranked.append((-loss, henries, farads, loss))
    ranked.sort()
    options = [
        Option(
            [value_change(coil, henries, "H"), value_change(cap, farads, "F")],
            f"{coil.name} {units.fmt(henries, 'H')}, {cap.name} {units.fmt(farads, 'F')}",
            f"return loss {loss:.1f} dB at {units.fmt(freq, 'Hz')} (ideal "
            f"{units.fmt(l_ideal, 'H')} and {units.fmt(c_ideal, 'F')})",
        )
        for _, henries, farads, loss in ranked[:BEST_FEW]
    ]
    return Proposal(
        f,
        f"input network {coil.name} and {cap.name}",
        options,
        source=f"L-network design and its input impedance (the rule's formulas); IEC 60063 {s.series}",
    )


@remedy("freqplan.filter-fit")
def filter_fit(s: Situation, f: Finding) -> Proposal | None:
    """The crystal that puts the IF on the filter's centre: LO = f_in -/+ f_centre, over the multiplier."""
    crystal = s.part_for(f)
    low, high = number(f, "passband low"), number(f, "passband high")
    if (
        crystal is None
        or crystal.kind != "crystal"
        or crystal.frequency is None
        or low is None
        or high is None
    ):
        return None
    stage = next(
        (
            st
            for st in s.build.stages("conversion")
            if st.oscillator is not None and st.oscillator.crystal == crystal.name
        ),
        None,
    )
    if stage is None:
        return None
    f_in = s.sheet("conversion", owner(s.build, stage), "input frequency")
    if f_in is None:
        return None
    osc = stage.oscillator
    mult = osc.multiplier if isinstance(osc.multiplier, int) and osc.multiplier > 0 else 1
    centre = (low + high) / 2
    marked = mixing.lo_for(f_in, centre, osc.injection) / mult
    ordered = round(marked / 1e3) * 1e3  # crystals are ordered to the kilohertz (common practice)
    if_after = abs(f_in - ordered * mult)
    return Proposal(
        f,
        f"{crystal.name} frequency",
        [
            Option(
                [Change(crystal.places["frequency"], units.plan_text(ordered, "Hz"))],
                f"{crystal.name} {units.fmt(ordered, 'Hz')}",
                f"LO {units.fmt(ordered * mult, 'Hz')}, IF {units.fmt(if_after, 'Hz')} against the filter's "
                f"centre {units.fmt(centre, 'Hz')}",
            )
        ],
        note="the load pulling of the crystal is left as it is: check the crystal-load finding too",
        source="f_LO = f_in - f_IF (low side) or f_in + f_IF (high side), the rule's conversion arithmetic",
    )
