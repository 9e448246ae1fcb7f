"""freqplan: the quadrature tank (tuning and linear range) and the crystal (load, overtone)."""

from __future__ import annotations

from dataclasses import dataclass

from speccheck import units
from speccheck.chain import crystal_load, crystal_shift, frequency_plan, hz, khz, owner
from speccheck.findings import Value
from speccheck.formulas import resonators
from speccheck.model import Part, Stage
from speccheck.registry import rule

from .common import pct, setting


def _range(part):
    """(lowest, highest) value of a part from its adjust range, else its tolerance, else None."""
    if part.adjust is not None and part.adjust.min is not None and part.adjust.max is not None:
        return (
            min(part.adjust.min.si, part.adjust.max.si),
            max(part.adjust.min.si, part.adjust.max.si),
            "adjust",
        )
    if part.tolerance is not None and part.value is not None:
        v, t = part.value.si, abs(part.tolerance.si)
        return v * (1 - t), v * (1 + t), "tolerance"
    return None


@dataclass
class TankFacts:
    stage: Stage
    coil: Part
    cap: Part
    damping: Part | None
    inductance: float  # the coil's value (H): tank_facts returns facts only for a coil that has one
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
            ctx.report(
                f"{stage.label}: parts.{part.name}.value is not given, so the tank's resonance "
                "cannot be computed",
                part.loc,
                level="note",
                stage=stage.label,
            )
        return None
    extra = tank.extra_capacitance.si if tank.extra_capacitance is not None else 0.0
    L, C = coil.value.si, cap.value.si + extra
    f0 = resonators.resonance(L, C)
    lr, cr = _range(coil), _range(cap)
    l_lo, l_hi = (lr[0], lr[1]) if lr else (L, L)
    c_lo, c_hi = (cr[0] + extra, cr[1] + extra) if cr else (C, C)
    tunable = " and ".join(f"{p.name} {r[2]}" for p, r in ((coil, lr), (cap, cr)) if r) or None
    rps = []
    damping = build.part(tank.damping)
    if damping is not None and damping.value is not None:
        rps.append(damping.value.si)
    if coil.q:
        rps.append(resonators.coil_parallel_resistance(coil.q, f0, L))
    q = resonators.parallel_q(resonators.parallel(*rps), f0, L) if rps else None
    f_if, unc = frequency_plan(build).at.get(id(stage), (None, 0.0))
    return TankFacts(
        stage,
        coil,
        cap,
        damping,
        L,
        f0,
        resonators.resonance(l_hi, c_hi),
        resonators.resonance(l_lo, c_lo),
        tunable,
        q,
        f_if,
        unc,
    )


@rule(
    "freqplan.tank-tuning",
    verify="""
      With a steady carrier at the IF applied, turn the coil's slug through its range: the detector output
      must pass through its centre inside the range.
      """,
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
    fix="Choose L and C so that the middle of the tuning range sits on the final IF (C = 1 / ((2 pi "
    "f_IF)^2 L)).",
    source="parallel resonance (Wikibooks, Practical Electronics / Parallel RLC); common practice: 1 mH "
    "with 120 pF resonates near 455 kHz",
)
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
        values = [
            Value("final IF", t.f_if, "Hz"),
            Value("f0", t.f0, "Hz"),
            Value("tuning low", t.f_low, "Hz"),
            Value("tuning high", t.f_high, "Hz"),
        ]
        where = t.coil.at("adjust") if t.coil.adjust is not None else t.coil.at("value")
        if t.tunable is None:
            if t.q is None:
                continue
            half = t.f0 / t.q / 2
            if abs(t.f_if - t.f0) > half:
                ctx.report(
                    f"the tank ({t.coil.name}, {t.cap.name}) resonates at {hz(t.f0)} and has no "
                    f"adjustment: the final IF {hz(t.f_if)} lies {khz(abs(t.f_if - t.f0))} off, "
                    f"outside its linear range (±{khz(half)})",
                    where,
                    values,
                    stage=stage.label,
                    fix="Tune C to "
                    f"{units.fmt(resonators.capacitance_for(t.f_if, t.coil.value.si), 'F')} for "
                    "this coil, or use a slug-tuned coil.",
                )
            continue
        if not (t.f_low <= t.f_if <= t.f_high):
            c_need = resonators.capacitance_for(t.f_if, t.coil.value.si)
            ext = t.stage.tank.extra_capacitance.si if t.stage.tank.extra_capacitance is not None else 0.0
            ctx.report(
                f"the tank ({t.coil.name}, {t.cap.name}) tunes only {hz(t.f_low)} to {hz(t.f_high)} "
                f"({t.tunable}); the final IF {hz(t.f_if)} is outside that range",
                where,
                values,
                stage=stage.label,
                fix=f"For {t.coil.value.text} the tank needs about "
                f"{units.fmt(max(c_need - ext, 0.0), 'F')} at {khz(t.f_if)}; or choose L and C "
                "so the range centres on the IF.",
            )


@rule(
    "freqplan.tank-range",
    verify="""
      Apply a carrier at full deviation and watch the audio on a scope: flattened peaks mean the
      detector's linear range is too small.
      """,
    level="warning",
    title="Detector linear range narrower than the deviation plus drift",
    explanation="""
      The tank's loaded Q sets the detector: Q = R_p / (omega0 L), where R_p is the damping resistor
      in parallel with the coil's own loss resistance (Q_coil omega0 L). The phase slope, and with
      it the recovered audio, rises with Q; the linear range, about f0 / Q, falls with it. The
      linear range, centred on the tank's tuning, must cover the whole swing of each signal: the
      IF may sit anywhere within the worst-case drift of the tuning and swings the peak deviation
      either way about it, so the range must span 2 x (deviation + drift); past it the audio
      distorts on peaks. Each signal is checked on its own: a tank that passes broadcast FM's
      swing may still be checked for the narrowband signal, and the reverse. The design sheet
      shows the loaded Q, the linear range and the highest Q the deviation allows: a lower damping
      resistor widens the range and costs audio, a higher one the other way.
      """,
    fix="Lower the damping resistor across the tank (or use a lower-Q coil) until f0 / Q covers 2 x "
    "deviation plus drift.",
    source="parallel RLC Q and bandwidth (Wikibooks, Practical Electronics / Parallel RLC); common "
    "practice (quadrature detector linear range ~ f0/Q)",
)
def tank_range(build, ctx):
    fm = [s for s in build.signals if s.modulation == "fm" and s.deviation is not None]
    for stage in build.stages("discriminator"):
        t = tank_facts(build, stage)
        if t is None:
            continue
        who = owner(build, stage)
        if t.q is None:
            ctx.report(
                f"{stage.label}: the tank has no damping resistor and its coil no q, so the loaded Q "
                "and the linear range cannot be computed",
                stage.at("tank"),
                level="note",
                stage=stage.label,
                fix="Name the damping resistor (tank.damping) or give the coil's q.",
            )
            continue
        linear = t.f0 / t.q
        ctx.publish("discriminator", who, "loaded Q", round(t.q, 2))
        ctx.publish("discriminator", who, "linear range (f0/Q)", linear, "Hz")
        if not fm:
            continue
        for sig in fm:
            range_one(ctx, t, who, sig, t.q, linear, named=len(fm) > 1)


def range_one(ctx, t: TankFacts, who: str, sig, q: float, linear: float, named: bool) -> None:
    """tank-range for one signal (one configuration of the build). The tank is tuned to the nominal
    IF; the IF may sit anywhere within ±drift of it and swings ±deviation about that, so the
    linear range, centred on f0, must span 2·(deviation + drift)."""
    dev = sig.deviation.si
    need = 2 * (dev + t.if_unc)
    q_max = t.f0 / need
    whose = f" for {sig.name}" if named else ""
    ctx.publish("discriminator", who, f"needed range{whose}, 2·(deviation + drift)", need, "Hz")
    ctx.publish("discriminator", who, f"highest Q{whose} for this deviation", round(q_max, 2))
    if linear >= need:
        return
    where = t.damping.at("value") if t.damping is not None else t.coil.at("value")
    rp_max = q_max * resonators.TWO_PI * t.f0 * t.inductance
    ctx.report(
        f"the tank's loaded Q of {q:.3g} gives a linear range of {khz(linear)} (f0/Q), less than "
        f"the {khz(need)} that {sig.name} swings (2 × ({khz(dev)} deviation + {khz(t.if_unc)} "
        f"drift)): peaks will distort; a Q of {q_max:.3g} or less would pass it, at less recovered "
        f"audio",
        where,
        [
            Value("loaded Q", round(q, 3)),
            Value("linear range", linear, "Hz"),
            Value("needed", need, "Hz"),
            Value("highest Q", round(q_max, 3)),
        ],
        stage=t.stage.label,
        fix=f"Bring the total parallel resistance across the tank down to about "
        f"{units.fmt(rp_max, 'Ω')} (damping resistor in parallel with the coil's loss).",
    )


@rule(
    "freqplan.crystal-load",
    verify="""
      Measure the oscillator with a counter through a buffer or a loosely coupled probe, and compare with
      the crystal's marked frequency.
      """,
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
    fix="Choose the loading capacitors so that C1 C2 / (C1 + C2) plus stray equals the crystal's "
    "specified load.",
    source="crystal pulling D = C1m / (2 (C0 + CL)): 20 fF, 5 pF gives 400 ppm at 20 pF and 434.8 ppm at "
    "18 pF (crystal makers' application notes); typical stray from memory",
    settings={"load_share": 0.1, "pull_limit_ppm": 20.0},
)
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
            ctx.report(
                f"{x.name}: chain[{stage.index}].oscillator.stray is not given; the load capacitance "
                f"{units.fmt(cl, 'F')} counts no stray (a board typically adds 2 to 5 pF)",
                osc.at("load_caps"),
                level="note",
                stage=stage.label,
                fix="Give oscillator.stray (about 3 pF for a compact board).",
            )
        if x.load_capacitance is None:
            ctx.report(
                f"{x.name}: parts.{x.name}.load_capacitance is not given, so the load "
                f"{units.fmt(cl, 'F')} cannot be compared with it",
                x.loc,
                level="note",
                stage=stage.label,
                fix=f"Give parts.{x.name}.load_capacitance from the crystal's data.",
            )
            continue
        spec = x.load_capacitance.si
        ctx.publish("crystal", x.name, "specified load capacitance", spec, "F")
        values = [Value("load from oscillator", cl, "F"), Value("specified load", spec, "F")]
        caps = f"{osc.load_caps[0]} and {osc.load_caps[1]}" + (
            f" plus {units.fmt(stray, 'F')} stray" if stray else ""
        )
        shift = crystal_shift(build, osc, x)
        if shift is not None and x.frequency is not None:
            fx = x.frequency.si
            ctx.publish(
                "crystal",
                x.name,
                "pulling at the specified load",
                resonators.pulling(x.motional_capacitance.si, x.shunt_capacitance.si, spec) * 1e6,
                "ppm",
            )
            ctx.publish(
                "crystal",
                x.name,
                "pulling at the actual load",
                resonators.pulling(x.motional_capacitance.si, x.shunt_capacitance.si, cl) * 1e6,
                "ppm",
            )
            ctx.publish("crystal", x.name, "shift from the specified frequency", shift * 1e6, "ppm")
            ctx.publish("crystal", x.name, "shift in frequency", shift * fx, "Hz")
            limit = abs(x.tolerance.si) if x.tolerance is not None else setting(ctx, "pull_limit_ppm") * 1e-6
            if abs(shift) > limit:
                ctx.report(
                    f"{x.name} sees {units.fmt(cl, 'F')} ({caps}) instead of its specified "
                    f"{units.fmt(spec, 'F')}: that pulls it {shift * 1e6:+.1f} ppm "
                    f"({shift * fx:+.0f} Hz), more than {limit * 1e6:g} ppm",
                    osc.at("load_caps"),
                    values + [Value("shift", shift * 1e6, "ppm"), Value("shift", shift * fx, "Hz")],
                    stage=stage.label,
                )
            continue
        share = cl / spec - 1
        if abs(share) > setting(ctx, "load_share"):
            ctx.report(
                f"{x.name} sees {units.fmt(cl, 'F')} ({caps}) instead of its specified "
                f"{units.fmt(spec, 'F')} ({pct(share)}); it will run "
                f"{'high' if share < 0 else 'low'} by an amount that needs the crystal's motional "
                "and shunt capacitance to estimate",
                osc.at("load_caps"),
                values,
                stage=stage.label,
            )


@rule(
    "freqplan.crystal-overtone",
    verify="""
      Read the oscillator with a counter: an overtone crystal on a fundamental-mode circuit runs near a
      third of its marked frequency, or not at all.
      """,
    level="error",
    title="Overtone crystal on an oscillator built for fundamental mode",
    explanation="""
      An overtone crystal is marked with its overtone frequency (3rd, 5th ...), but the quartz
      still has its fundamental at about a third (fifth ...) of that. An oscillator built for
      fundamental mode has no tuned circuit to pick the overtone, so it starts on the fundamental:
      near a third of the marked frequency, and the IF comes out nowhere near the filter. The
      reverse mistake, a fundamental crystal in an overtone oscillator, leaves the tuned circuit
      looking for a response the crystal hardly has: it fails to start or runs on the tank.

      A crystal declared fundamental above about 30 MHz (setting fundamental_max) is a warning:
      AT-cut crystals are seldom made in fundamental mode above it, because the quartz blank gets
      too thin to grind (common practice; the figure from memory), so what a supplier sends for
      that frequency is usually a 3rd-overtone unit, which a fundamental-mode oscillator starts
      near a third of the marked frequency.
      """,
    fix="Use an oscillator with a tuned circuit at the overtone (declare mode: overtone), or a "
    "fundamental-mode crystal for the frequency.",
    source="common practice (crystal oscillator design); the 30 MHz top of ordinary AT-cut fundamental "
    "crystals from memory",
    settings={"fundamental_max": 30e6},
)
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
            ctx.report(
                f"{x.name} is a {_ordinal(n)}-overtone crystal marked {hz(x.frequency.si)}, on an "
                "oscillator declared for fundamental mode: it will start near its fundamental, "
                f"about {khz(f_start)}{extra}",
                osc.at("mode"),
                values,
                stage=c.stage.label,
            )
        elif n == 1 and osc.mode == "overtone":
            ctx.report(
                f"{x.name} is a fundamental-mode crystal ({hz(x.frequency.si)}) on an oscillator "
                "declared for overtone mode: it may not start, or run on the tuned circuit instead "
                "of the crystal",
                osc.at("mode"),
                [Value("marked", x.frequency.si, "Hz")],
                level="warning",
                stage=c.stage.label,
                fix="Declare the crystal's overtone (parts.X.overtone) or use a fundamental-mode oscillator.",
            )
        elif n == 1 and x.frequency.si > setting(ctx, "fundamental_max"):
            top = setting(ctx, "fundamental_max")
            ctx.report(
                f"{x.name} is declared a fundamental-mode crystal at {hz(x.frequency.si)}, above the "
                f"{hz(top)} or so where ordinary AT-cut fundamental crystals stop: the part supplied for "
                f"that frequency is usually a 3rd-overtone unit, which an oscillator without a tuned "
                f"circuit at the overtone starts near {khz(x.frequency.si / 3)}",
                x.at("frequency"),
                [Value("marked", x.frequency.si, "Hz"), Value("fundamental_max", top, "Hz")],
                level="warning",
                stage=c.stage.label,
                fix="Check the crystal's mode with its maker; for a 3rd-overtone part declare overtone: 3 "
                "and an oscillator with a tuned circuit at the overtone (mode: overtone).",
            )


def _ordinal(n: int) -> str:
    return {3: "3rd", 5: "5th", 7: "7th", 9: "9th"}.get(n, f"{n}th")
