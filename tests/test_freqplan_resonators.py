"""freqplan.tank-tuning, tank-range, crystal-load and crystal-overtone pinned whole. The tank:
f0 = 1 / (2 pi sqrt(L C)), loaded Q = R_p / (omega0 L) with R_p the damping resistor in parallel
with the coil's Q omega0 L (Wikibooks, Practical Electronics / Parallel RLC); the crystal: load
C1 C2 / (C1 + C2) + stray and pulling D = C1m / (2 (C0 + C_L)) (crystal makers' application
notes). Each threshold is tripped just inside and just outside with part values solved here."""

from __future__ import annotations

import math

import pytest
from conftest import check, edited, facts, of, sheet_rows
from freqplan_pins import F_IF, IF_UNC, OSC, PULL, clean, hz6, khz4, pulling, where

from speccheck import units

TWO_PI = 2 * math.pi
L2, C9, R5, Q_COIL = 1e-3, 120e-12, 47e3, 60.0
TANK = "L2: {kind: inductor, value: 1 mH, adjust: {min: 0.9 mH, max: 1.1 mH}, q: 60,"


def f_res(ind: float, c: float) -> float:
    return 1 / (TWO_PI * math.sqrt(ind * c))


def loaded_q(f0: float, ind: float, *rs: float) -> float:
    """R_p / (omega0 L), R_p the parallel of the given resistances and the coil's Q omega0 L."""
    rp = 1 / sum(1 / r for r in (*rs, Q_COIL * TWO_PI * f0 * ind))
    return rp / (TWO_PI * f0 * ind)


def _found(text: str, rule: str) -> list:
    return [facts(f) for f in of(check(text), rule)]


# ---- freqplan.tank-tuning -----------------------------------------------------------------------------


def test_clean_tank_rows():
    f0 = f_res(L2, C9)
    d = ("discriminator", "discriminator")
    assert sheet_rows(check(clean()), "freqplan.tank-tuning") == [
        (*d, "tank resonance f0", pytest.approx(f0), "Hz", "", ""),
        (*d, "tuning range low", pytest.approx(f_res(1.1e-3, C9)), "Hz", "", ""),
        (*d, "tuning range high", pytest.approx(f_res(0.9e-3, C9)), "Hz", "", ""),
        (*d, "final IF", pytest.approx(F_IF), "Hz", "", ""),
    ]
    q = loaded_q(f0, L2, R5)
    need = 2 * (5e3 + IF_UNC)  # 2 x (deviation + drift)
    assert sheet_rows(check(clean()), "freqplan.tank-range") == [
        (*d, "loaded Q", pytest.approx(round(q, 2)), "", "", ""),
        (*d, "linear range (f0/Q)", pytest.approx(f0 / q), "Hz", "", ""),
        (*d, "needed range, 2·(deviation + drift)", pytest.approx(need), "Hz", "", ""),
        (*d, "highest Q for this deviation", pytest.approx(round(f0 / need, 2)), "", "", ""),
    ]


@pytest.mark.parametrize("factor, error", [(0.995, True), (1.005, False)])
def test_adjustable_tank_range_edge(factor, error):
    # the range's low end is 1 / (2 pi sqrt(1.1 mH C)): at C = 1 / ((2 pi f_IF)^2 1.1 mH) it sits on the
    # IF; 0.5 % less C lifts it above the IF (outside), 0.5 % more keeps the IF inside
    c = factor / ((TWO_PI * F_IF) ** 2 * 1.1e-3)
    shown = f"{c * 1e12:.6g} pF"
    text = edited(clean(), "value: 120 pF", f"value: {shown}")
    c = float(shown.split()[0]) * 1e-12
    f0, low, high = f_res(L2, c), f_res(1.1e-3, c), f_res(0.9e-3, c)
    expected = {
        "rule": "freqplan.tank-tuning",
        "level": "error",
        **where(text, TANK, "{min", "parts.L2.adjust"),
        "message": f"the tank (L2, C9) tunes only {hz6(low)} to {hz6(high)} (L2 adjust); the final IF "
        f"{hz6(F_IF)} "
        "is outside that range",
        "values": {
            "final IF": (pytest.approx(F_IF), "Hz"),
            "f0": (pytest.approx(f0), "Hz"),
            "tuning low": (pytest.approx(low), "Hz"),
            "tuning high": (pytest.approx(high), "Hz"),
        },
        # C = 1 / ((2 pi f)^2 L) for the 1 mH coil at the IF
        "fix": f"For 1 mH the tank needs about {units.fmt(1 / ((TWO_PI * F_IF) ** 2 * L2), 'F')} at "
        f"{khz4(F_IF)}; or choose L and C so the range centres on the IF.",
        "stage": "discriminator",
        "signal": "",
        "position": "",
    }
    assert _found(text, "freqplan.tank-tuning") == ([expected] if error else [])


def test_extra_capacitance_is_added_to_the_tank_and_taken_off_the_fix():
    # 82 pF plus 20 pF of pin capacitance: the tank tunes 1 / (2 pi sqrt(L 102 pF)); the fix asks for
    # the capacitor without the extra
    text = edited(clean(), "value: 120 pF", "value: 82 pF")
    text = edited(
        text,
        "tank: {inductor: L2, capacitor: C9, damping: R5}",
        "tank: {inductor: L2, capacitor: C9, damping: R5, extra_capacitance: 20 pF}",
    )
    c = 102e-12
    f = _found(text, "freqplan.tank-tuning")[0]
    assert f["values"]["f0"] == (pytest.approx(f_res(L2, c)), "Hz")
    assert f["values"]["tuning low"] == (pytest.approx(f_res(1.1e-3, c)), "Hz")
    need = 1 / ((TWO_PI * F_IF) ** 2 * L2) - 20e-12
    assert f["fix"].startswith(f"For 1 mH the tank needs about {units.fmt(need, 'F')} at")


@pytest.mark.parametrize("c_text, error", [("131 pF", False), ("132 pF", True)])
def test_fixed_tank_is_judged_by_its_linear_range(c_text, error):
    # no adjust and no tolerance: the IF must lie within ±f0 / (2 Q) of f0
    text = edited(clean(), TANK, "L2: {kind: inductor, value: 1 mH, q: 60,")
    text = edited(text, "value: 120 pF", f"value: {c_text}")
    c = float(c_text.split()[0]) * 1e-12
    f0 = f_res(L2, c)
    half = f0 / loaded_q(f0, L2, R5) / 2
    assert (abs(F_IF - f0) > half) == error
    expected = {
        "rule": "freqplan.tank-tuning",
        "level": "error",
        **where(text, "L2: {kind: inductor", "1 mH", "parts.L2.value"),
        "message": f"the tank (L2, C9) resonates at {hz6(f0)} and has no adjustment: the final IF "
        f"{hz6(F_IF)} lies "
        f"{khz4(abs(F_IF - f0))} off, outside its linear range (±{khz4(half)})",
        "values": {
            "final IF": (pytest.approx(F_IF), "Hz"),
            "f0": (pytest.approx(f0), "Hz"),
            "tuning low": (pytest.approx(f0), "Hz"),
            "tuning high": (pytest.approx(f0), "Hz"),
        },
        "fix": f"Tune C to {units.fmt(1 / ((TWO_PI * F_IF) ** 2 * L2), 'F')} for this coil, or use a "
        "slug-tuned coil.",
        "stage": "discriminator",
        "signal": "",
        "position": "",
    }
    assert _found(text, "freqplan.tank-tuning") == ([expected] if error else [])


def test_fixed_tank_without_any_q_is_not_judged():
    text = edited(clean(), TANK, "L2: {kind: inductor, value: 1 mH,")
    text = edited(text, "value: 120 pF", "value: 150 pF")
    text = edited(
        text, "tank: {inductor: L2, capacitor: C9, damping: R5}", "tank: {inductor: L2, capacitor: C9}"
    )
    assert _found(text, "freqplan.tank-tuning") == []


def test_tolerances_give_the_range_of_a_tank_without_adjustment():
    # 150 pF ± 5 % with the 1 mH coil ± 10 %: f runs from 1 / (2 pi sqrt(1.1 mH 157.5 pF)) to
    # 1 / (2 pi sqrt(0.9 mH 142.5 pF))
    text = edited(clean(), TANK, "L2: {kind: inductor, value: 1 mH, tolerance: 10 %, q: 60,")
    text = edited(text, "value: 120 pF,", "value: 150 pF, tolerance: 5 %,")
    low, high = f_res(1.1e-3, 157.5e-12), f_res(0.9e-3, 142.5e-12)
    f = _found(text, "freqplan.tank-tuning")[0]
    assert f["message"] == (
        f"the tank (L2, C9) tunes only {hz6(low)} to {hz6(high)} (L2 tolerance and C9 tolerance); "
        f"the final IF {hz6(F_IF)} is outside that range"
    )
    assert {k: f[k] for k in ("line", "col", "path")} == where(
        text, "L2: {kind: inductor", "1 mH", "parts.L2.value"
    )


def test_reversed_adjust_limits_give_the_same_range():
    text = edited(clean(), "adjust: {min: 0.9 mH, max: 1.1 mH}", "adjust: {min: 1.1 mH, max: 0.9 mH}")
    rows = {r[2]: r[3] for r in sheet_rows(check(text), "freqplan.tank-tuning")}
    assert rows["tuning range low"] == pytest.approx(f_res(1.1e-3, C9))
    assert rows["tuning range high"] == pytest.approx(f_res(0.9e-3, C9))


def test_missing_tank_value_is_a_note():
    text = edited(clean(), "C9: {kind: capacitor, value: 120 pF,", "C9: {kind: capacitor,")
    assert _found(text, "freqplan.tank-tuning") == [
        {
            "rule": "freqplan.tank-tuning",
            "level": "note",
            **where(text, "C9: {kind", "{kind", "parts.C9"),
            "message": "discriminator: parts.C9.value is not given, so the tank's resonance cannot be "
            "computed",
            "values": {},
            "fix": "",
            "stage": "discriminator",
            "signal": "",
            "position": "",
        }
    ]
    assert _found(text, "freqplan.tank-range") == []  # said once, by tank-tuning


# ---- freqplan.tank-range ------------------------------------------------------------------------------


def _r5_for(q_target: float, f0: float) -> float:
    """The damping resistor that makes the loaded Q q_target: 1 / R = 1 / R_p - 1 / (Q_coil omega0 L)."""
    rp = q_target * TWO_PI * f0 * L2
    return 1 / (1 / rp - 1 / (Q_COIL * TWO_PI * f0 * L2))


@pytest.mark.parametrize("factor, warn", [(0.99, False), (1.01, True)])
def test_linear_range_edge(factor, warn):
    f0 = f_res(L2, C9)
    need = 2 * (5e3 + IF_UNC)
    r = _r5_for(factor * f0 / need, f0)
    shown = f"{r / 1e3:.6g} kohm"
    text = edited(clean(), "R5: {kind: resistor, value: 47 kohm", f"R5: {{kind: resistor, value: {shown}")
    r = float(shown.split()[0]) * 1e3
    q = loaded_q(f0, L2, r)
    linear, q_max = f0 / q, f0 / need
    expected = {
        "rule": "freqplan.tank-range",
        "level": "warning",
        **where(text, "R5: {kind", shown, "parts.R5.value"),
        "message": f"the tank's loaded Q of {q:.3g} gives a linear range of {khz4(linear)} (f0/Q), less than "
        "the "
        f"{khz4(need)} that repeater voice swings (2 × (5 kHz deviation + {khz4(IF_UNC)} drift)): peaks "
        f"will distort; a Q of {q_max:.3g} or less would pass it, at less recovered audio",
        "values": {
            "loaded Q": (pytest.approx(round(q, 3)), ""),
            "linear range": (pytest.approx(linear), "Hz"),
            "needed": (pytest.approx(need), "Hz"),
            "highest Q": (pytest.approx(round(q_max, 3)), ""),
        },
        # the parallel resistance that gives q_max: q_max omega0 L
        "fix": f"Bring the total parallel resistance across the tank down to about "
        f"{units.fmt(q_max * TWO_PI * f0 * L2, 'Ω')} (damping resistor in parallel with the coil's loss).",
        "stage": "discriminator",
        "signal": "",
        "position": "",
    }
    assert _found(text, "freqplan.tank-range") == ([expected] if warn else [])


def test_without_damping_the_coil_is_named():
    # no damping resistor: the coil's own Q 60 sets the range (f0 / 60, 7.6 kHz), short of 2 x 5.7 kHz
    text = edited(
        clean(), "tank: {inductor: L2, capacitor: C9, damping: R5}", "tank: {inductor: L2, capacitor: C9}"
    )
    f = _found(text, "freqplan.tank-range")[0]
    assert f["values"]["loaded Q"] == (pytest.approx(60.0), "")
    assert {k: f[k] for k in ("line", "col", "path")} == where(
        text, "L2: {kind: inductor", "1 mH", "parts.L2.value"
    )


def test_no_q_at_all_is_a_note():
    text = edited(
        clean(), "tank: {inductor: L2, capacitor: C9, damping: R5}", "tank: {inductor: L2, capacitor: C9}"
    )
    text = edited(text, "q: 60, ", "")
    assert _found(text, "freqplan.tank-range") == [
        {
            "rule": "freqplan.tank-range",
            "level": "note",
            **where(text, "tank: {inductor", "{inductor", "chain[4].tank"),
            "message": "discriminator: the tank has no damping resistor and its coil no q, so the loaded Q "
            "and the "
            "linear range cannot be computed",
            "values": {},
            "fix": "Name the damping resistor (tank.damping) or give the coil's q.",
            "stage": "discriminator",
            "signal": "",
            "position": "",
        }
    ]


def test_two_signals_each_get_their_rows_and_findings():
    text = edited(
        clean(),
        "    service: voice\n    path: narrow\n",
        "    service: voice\n    path: narrow\n  - {name: wide one, modulation: fm, deviation: 75 kHz, "
        "audio_max: 15 kHz, path: wide}\n",
    )
    f0 = f_res(L2, C9)
    rows = {r[2]: r[3] for r in sheet_rows(check(text), "freqplan.tank-range")}
    for name, dev in (("repeater voice", 5e3), ("wide one", 75e3)):
        need = 2 * (dev + IF_UNC)
        assert rows[f"needed range for {name}, 2·(deviation + drift)"] == pytest.approx(need)
        assert rows[f"highest Q for {name} for this deviation"] == pytest.approx(round(f0 / need, 2))
    assert [
        f["message"].split(" swings")[0].rsplit("that ", 1)[1] for f in _found(text, "freqplan.tank-range")
    ] == ["wide one"]


def test_no_fm_signal_gives_q_rows_only():
    text = edited(clean(), "    modulation: fm\n    deviation: 5 kHz\n", "    modulation: am\n")
    names = [r[2] for r in sheet_rows(check(text), "freqplan.tank-range")]
    assert names == ["loaded Q", "linear range (f0/Q)"]


# ---- freqplan.crystal-load ----------------------------------------------------------------------------

LOAD_FIX = (
    "Choose the loading capacitors so that C1 C2 / (C1 + C2) plus stray equals the crystal's specified load."
)


def _caps(c: str) -> str:
    text = edited(clean(), "C6: {kind: capacitor, value: 33 pF", f"C6: {{kind: capacitor, value: {c}")
    return edited(text, "C7: {kind: capacitor, value: 33 pF", f"C7: {{kind: capacitor, value: {c}")


def test_clean_crystal_rows():
    x = ("crystal", "X1")
    cl = 16.5e-12 + 4e-12
    assert sheet_rows(check(clean()), "freqplan.crystal-load") == [
        (*x, "load capacitance from the oscillator", pytest.approx(cl), "F", "", ""),
        (*x, "specified load capacitance", 20e-12, "F", "", ""),
        (
            *x,
            "pulling at the specified load",
            pytest.approx(pulling(15e-15, 4e-12, 20e-12) * 1e6),
            "ppm",
            "",
            "",
        ),
        (*x, "pulling at the actual load", pytest.approx(pulling(15e-15, 4e-12, cl) * 1e6), "ppm", "", ""),
        (*x, "shift from the specified frequency", pytest.approx(PULL * 1e6), "ppm", "", ""),
        (*x, "shift in frequency", pytest.approx(PULL * 10.245e6), "Hz", "", ""),
    ]


@pytest.mark.parametrize("c, warn", [("35 pF", False), ("36 pF", True)])
def test_pulling_beyond_the_tolerance(c, warn):
    # 20 ppm: C/2 + 4 pF from 35 pF (21.5 pF, -18.4 ppm) is inside, 36 pF (22 pF, -24.0 ppm) past it
    v = float(c.split()[0]) * 1e-12
    cl = v / 2 + 4e-12
    shift = pulling(15e-15, 4e-12, cl) - pulling(15e-15, 4e-12, 20e-12)
    assert (abs(shift) > 20e-6) == warn
    text = _caps(c)
    expected = {
        "rule": "freqplan.crystal-load",
        "level": "warning",
        **where(text, OSC, "[C6", "chain[1].oscillator.load_caps"),
        "message": f"X1 sees {units.fmt(cl, 'F')} (C6 and C7 plus 4 pF stray) instead of its specified 20 "
        "pF: that "
        f"pulls it {shift * 1e6:+.1f} ppm ({shift * 10.245e6:+.0f} Hz), more than 20 ppm",
        "values": {
            "load from oscillator": (pytest.approx(cl), "F"),
            "specified load": (20e-12, "F"),
            "shift": (pytest.approx(shift * 10.245e6), "Hz"),
        },
        "fix": LOAD_FIX,
        "stage": "conversion",
        "signal": "",
        "position": "",
    }
    assert _found(text, "freqplan.crystal-load") == ([expected] if warn else [])
    if warn:  # both shifts are given: in ppm, then in Hz
        f = of(check(text), "freqplan.crystal-load")[0]
        assert [(v.name, v.unit) for v in f.values][-2:] == [("shift", "ppm"), ("shift", "Hz")]
        assert f.values[-2].value == pytest.approx(shift * 1e6)


def test_without_a_tolerance_the_pull_limit_setting_counts():
    # no tolerance: pull_limit_ppm (20) is the limit; raised to 60 the 53 ppm of 33 pF pairs without
    # stray passes
    from speccheck.config import Settings

    text = edited(edited(clean(), "    tolerance: 20 ppm\n", ""), "stray: 4 pF}", "stray: 0 pF}")
    shift = pulling(15e-15, 4e-12, 16.5e-12) - pulling(15e-15, 4e-12, 20e-12)
    f = _found(text, "freqplan.crystal-load")
    assert [x["level"] for x in f] == ["warning"]
    assert f[0]["message"] == (
        f"X1 sees 16.5 pF (C6 and C7) instead of its specified 20 pF: that pulls it "
        f"{shift * 1e6:+.1f} ppm ({shift * 10.245e6:+.0f} Hz), more than 20 ppm"
    )
    wide = Settings(rule_settings={"freqplan.crystal-load": {"pull_limit_ppm": 60.0}})
    assert of(check(text, settings=wide), "freqplan.crystal-load") == []


def test_missing_stray_is_a_note():
    text = edited(clean(), "stray: 4 pF}", "}")
    found = _found(text, "freqplan.crystal-load")
    assert {
        "rule": "freqplan.crystal-load",
        "level": "note",
        **where(text, "oscillator: {crystal: X1", "[C6", "chain[1].oscillator.load_caps"),
        "message": "X1: chain[1].oscillator.stray is not given; the load capacitance 16.5 pF counts no stray "
        "(a "
        "board typically adds 2 to 5 pF)",
        "values": {},
        "fix": "Give oscillator.stray (about 3 pF for a compact board).",
        "stage": "conversion",
        "signal": "",
        "position": "",
    } in found


def test_missing_specified_load_is_a_note():
    text = edited(clean(), "    load_capacitance: 20 pF\n", "")
    assert _found(text, "freqplan.crystal-load") == [
        {
            "rule": "freqplan.crystal-load",
            "level": "note",
            **where(text, "    kind: crystal", "kind", "parts.X1"),
            "message": "X1: parts.X1.load_capacitance is not given, so the load 20.5 pF cannot be compared "
            "with it",
            "values": {},
            "fix": "Give parts.X1.load_capacitance from the crystal's data.",
            "stage": "conversion",
            "signal": "",
            "position": "",
        }
    ]
    assert [r[2] for r in sheet_rows(check(text), "freqplan.crystal-load")] == [
        "load capacitance from the oscillator"
    ]


@pytest.mark.parametrize("c, level", [("35 pF", None), ("38 pF", "low"), ("30 pF", None), ("26 pF", "high")])
def test_load_share_without_motional_data(c, level):
    # no C1m: the load against the specified 20 pF, load_share 10 %: C/2 + 4 pF = 21.5 pF (+7.5 %),
    # 23 pF (+15 %), 19 pF (-5 %), 17 pF (-15 %); a smaller load makes it run high
    text = edited(_caps(c), "    motional_capacitance: 15 fF\n", "")
    cl = float(c.split()[0]) * 1e-12 / 2 + 4e-12
    share = cl / 20e-12 - 1
    found = _found(text, "freqplan.crystal-load")
    if level is None:
        assert found == []
        return
    assert found == [
        {
            "rule": "freqplan.crystal-load",
            "level": "warning",
            **where(text, OSC, "[C6", "chain[1].oscillator.load_caps"),
            "message": f"X1 sees {units.fmt(cl, 'F')} (C6 and C7 plus 4 pF stray) instead of its specified "
            "20 pF "
            f"({share * 100:+.1f} %); it will run {level} by an amount that needs the crystal's motional and "
            "shunt capacitance to estimate",
            "values": {"load from oscillator": (pytest.approx(cl), "F"), "specified load": (20e-12, "F")},
            "fix": LOAD_FIX,
            "stage": "conversion",
            "signal": "",
            "position": "",
        }
    ]


# ---- freqplan.crystal-overtone ------------------------------------------------------------------------


@pytest.mark.parametrize(
    "n, word", [(3, "3rd"), (5, "5th"), (7, "7th"), (9, "9th")]
)  # the schema allows 1 to 9
def test_overtone_crystal_on_a_fundamental_oscillator(n, word):
    text = edited(clean(), "    overtone: 1\n", f"    overtone: {n}\n")
    f_start = 10.245e6 / n  # it starts near its fundamental: the marked frequency / n
    f_if = abs(10.7e6 - f_start)
    assert _found(text, "freqplan.crystal-overtone") == [
        {
            "rule": "freqplan.crystal-overtone",
            "level": "error",
            **where(text, OSC, "fundamental", "chain[1].oscillator.mode"),
            "message": f"X1 is a {word}-overtone crystal marked 10.245 MHz, on an oscillator declared for "
            "fundamental "
            f"mode: it will start near its fundamental, about {khz4(f_start)}, which would give an IF near "
            f"{khz4(f_if)} instead of {khz4(F_IF)}",
            "values": {
                "marked": (10.245e6, "Hz"),
                "fundamental (about)": (pytest.approx(f_start), "Hz"),
                "IF it would give": (pytest.approx(f_if), "Hz"),
            },
            "fix": "Use an oscillator with a tuned circuit at the overtone (declare mode: overtone), or a "
            "fundamental-mode "
            "crystal for the frequency.",
            "stage": "conversion",
            "signal": "",
            "position": "",
        }
    ]


def test_multiplied_overtone_start():
    # a x2 multiplier after the oscillator: the IF it would give is |f_in - 2 f_x / 3|
    text = edited(clean(), "    overtone: 1\n", "    overtone: 3\n")
    text = edited(text, "mode: fundamental, load_caps", "mode: fundamental, multiplier: 2, load_caps")
    f = _found(text, "freqplan.crystal-overtone")[0]
    assert f["values"]["IF it would give"] == (pytest.approx(abs(10.7e6 - 2 * 10.245e6 / 3)), "Hz")


def test_fundamental_crystal_on_an_overtone_oscillator():
    text = edited(clean(), "mode: fundamental, load_caps", "mode: overtone, load_caps")
    assert _found(text, "freqplan.crystal-overtone") == [
        {
            "rule": "freqplan.crystal-overtone",
            "level": "warning",
            **where(text, "oscillator: {crystal: X1", "overtone,", "chain[1].oscillator.mode"),
            "message": "X1 is a fundamental-mode crystal (10.245 MHz) on an oscillator declared for overtone "
            "mode: it may "
            "not start, or run on the tuned circuit instead of the crystal",
            "values": {"marked": (10.245e6, "Hz")},
            "fix": "Declare the crystal's overtone (parts.X.overtone) or use a fundamental-mode oscillator.",
            "stage": "conversion",
            "signal": "",
            "position": "",
        }
    ]


def test_second_conversion_overtone_is_caught_too():
    from test_freqplan import _two_conversions

    # X1 (55.7 MHz, 3rd overtone) on an overtone oscillator is right; X2 marked 3rd overtone on a
    # fundamental one is not
    text = _two_conversions("10.245 MHz").replace(
        "X2: {kind: crystal, frequency: 10.245 MHz,",
        "X2: {kind: crystal, frequency: 10.245 MHz, overtone: 3,",
    )
    found = _found(text, "freqplan.crystal-overtone")
    assert [(f["level"], f["message"][:40]) for f in found] == [
        ("error", "X2 is a 3rd-overtone crystal marked 10.2")
    ]
    assert found[0]["values"]["IF it would give"] == (pytest.approx(abs(10.7e6 - 10.245e6 / 3)), "Hz")
    assert hz6(10.245e6) == "10.245 MHz"
