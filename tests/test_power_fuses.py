"""Power family, whole findings: the supply fuse (size, wire, inrush, voltage, presence) and a resistor in
series with the supply or used as its fuse, on a small plan written here: a 12 V adapter feeding one chip
that draws a steady 0.3 A, so the fuse's normal current is 0.3 A (no amplifier: its RMS is its DC).

Sources, named again beside each check:
- 75 % continuous-use derating (common practice), rerating 0.5 %/°C above 25 °C (from memory): the least
  rating is I / (0.75 · rerate), rounded up to R10 (IEC 60127-1 Annex A: 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5,
  6.3, 8 × 10ⁿ A);
- IEC 60127-2 (from memory): a link carries 1.5 × I_n for an hour; time-lag gate 10 × I_n for 10 ms,
  quick-acting 4 × I_n for 3 ms, so a rating I_n withstands (k·I_n)²·t;
- RC inrush: peak V/R, τ = RC, I²t = V²C/(2R); current-limited: I²t = I·C·V − I²·R·C/2 (circuit theory,
  cross-checked with scipy in tests/test_inrush_source.py); 0.5 Ω assumed loop (the rule's setting);
- chassis-wiring ampacity (Handbook of Electronic Tables and Formulas): 22 AWG 7 A, 24 AWG 3.5 A,
  30 AWG 0.86 A;
- a resistor into a short at its far end takes I²R with I = V/(R + R_source), capped by a limiting
  supply's max_current (Ohm's law); glow factor 4, fusing factor 10, power share 50 %, drop share 5 %
  and the assumed 0.25 W are the rule's settings (common practice / from memory).
"""

from __future__ import annotations

import math

import pytest
from conftest import EXAMPLES, check, edited, facts, line_of, of, sheet_rows

from speccheck.config import Settings

FUSED = """\
build_spec: 2
build:
  name: fused load
  ambient_max: 25 degC
supply:
  kind: dc-adapter
  voltage: 12 V
  rail: V12
  max_current: 2 A
  fuse: F1
  reverse_protection: D1
  wire_gauge: 22
rails:
  V12: {voltage: 12 V, from: supply}
  GND: {voltage: 0 V}
profiles:
  load-chip:
    class: other
    quiescent_current: 0.3 A
devices:
  U1: {profile: load-chip, rail: V12}
parts:
  F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, V12]}
  D1: {kind: diode, ends: [GND, V12], positive: GND}
  C30: {kind: capacitor, value: 1000 uF, dielectric: electrolytic, ends: [V12, GND], positive: V12}
chain: []
"""

SIZE_FIX = "Fit the preferred rating shown (the next R10 value above the derated current)."
WIRE_FIX = "Fit the fuse the build needs (see power.fuse-size), or use heavier wire."
INRUSH_FIX = ("Use a time-lag fuse, add series resistance (or a soft-start) ahead of the bulk capacitor, or "
              "state the fuse's melting_i2t from its datasheet.")
VOLTAGE_FIX = "Fit a fuse rated for at least the circuit voltage."
MISSING_FIX = "Add a fuse at the supply input (supply.fuse) of the preferred rating from power.fuse-size."
RESISTOR_FIX = ("Fit a real fuse at the supply input; where the resistor must also protect, use a fusible "
                "(flame-proof) type whose fusing curve opens at the fault power shown.")
ASSUMED = "an assumed 500 mΩ of supply, leads, fuse and ESR: the plan states no source_resistance"
R10 = [1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8]  # IEC 60127-1 Annex A, typed in

NORMAL = 0.3  # A: U1's steady draw


def r10_up(x: float) -> float:
    return min(step * 10.0 ** d for d in range(-4, 4) for step in R10 if step * 10.0 ** d >= x * (1 - 1e-12))


def at(text: str, needle: str, fragment: str, nth: int = 0) -> tuple[int, int]:
    line = line_of(text, needle, nth)
    return line, text.splitlines()[line - 1].index(fragment) + 1


def finding(rule, level, place, path, message, values=None, fix="", stage="power"):
    line, col = place
    return {"rule": rule, "level": level, "line": line, "col": col, "path": path, "message": message,
            "values": {k: (pytest.approx(v), u) for k, (v, u) in (values or {}).items()},
            "fix": fix, "stage": stage, "signal": "", "position": ""}


def rows(*expected):
    return [tuple(pytest.approx(x) if isinstance(x, float) else x for x in row) for row in expected]


def whole(text: str, rule: str) -> list[dict]:
    return [facts(f) for f in of(check(text), rule)]


def rated(amps: str, text: str = FUSED) -> str:
    return edited(text, "current_rating: 500 mA", f"current_rating: {amps}")


def warm(text: str = FUSED) -> str:
    return edited(text, "ambient_max: 25 degC", "ambient_max: 45 degC")


# ---- power.fuse-size -------------------------------------------------------------------------------
# at 25 °C no rerating: least 0.3 / 0.75 = 0.4 A, which is an R10 value itself

def test_fuse_size_sheet():
    least = NORMAL / 0.75
    result = check(FUSED)
    assert of(result, "power.fuse-size") == []
    assert sheet_rows(result, "power.fuse-size") == rows(
        ("fuse", "F1", "normal current (budget at full output)", NORMAL, "A", "", ""),
        ("fuse", "F1", "continuous-use share of rating", 75.0, "%", "", ""),
        ("fuse", "F1", "temperature rerating at 25 °C", 100.0, "%", "", ""),
        ("fuse", "F1", "least rating", least, "A", "", ""),
        ("fuse", "F1", "preferred rating (R10)", r10_up(least), "A", "", ""),
        ("fuse", "F1", "fitted rating", 0.5, "A", "", ""),
        ("fuse", "F1", "fitted speed", "time-lag", "", "", ""))


def size_values(fitted, preferred=0.4):
    return {"normal current": (NORMAL, "A"), "fitted": (fitted, "A"), "preferred": (preferred, "A")}


@pytest.mark.parametrize("amps", ["400 mA", "800 mA"])
def test_fuse_size_at_its_edges_is_fine(amps):
    # exactly the least rating (0.4 A), exactly twice the preferred one (0.8 A)
    assert whole(rated(amps), "power.fuse-size") == []


def test_fuse_just_under_the_least_rating_is_a_warning():
    text = rated("399 mA")
    assert whole(text, "power.fuse-size") == [finding(
        "power.fuse-size", "warning", at(text, "F1:", "399 mA"), "parts.F1.current_rating",
        f"F1 (399 mA) runs at {NORMAL / 0.399:.0%} of its rating (keep under 75%) at the build's normal "
        "current "
        "of 300 mA, its budget at full output held continuously: it ages and may open after hours at full "
        "output; fit 400 mA", size_values(0.399), SIZE_FIX)]


def test_fuse_at_the_hour_gate_is_a_warning_below_it_an_error():
    # IEC 60127-2: 1.5 × 0.2 A = 0.3 A is carried for an hour (a warning); 199 mA is past it
    assert [f["level"] for f in whole(rated("200 mA"), "power.fuse-size")] == ["warning"]
    text = rated("199 mA")
    assert whole(text, "power.fuse-size") == [finding(
        "power.fuse-size", "error", at(text, "F1:", "199 mA"), "parts.F1.current_rating",
        "F1 (199 mA) is far below the build's normal current of 300 mA, its budget at full output held "
        f"continuously: that is {NORMAL / 0.199:.0%} of its rating, past the 1.5 × rating a fuse-link "
        "carries "
        "for an hour under IEC 60127-2, so it opens in normal use; fit 400 mA", size_values(0.199), SIZE_FIX)]


def test_fuse_more_than_twice_the_preferred_rating():
    text = rated("810 mA")
    assert whole(text, "power.fuse-size") == [finding(
        "power.fuse-size", "warning", at(text, "F1:", "810 mA"), "parts.F1.current_rating",
        f"F1 (810 mA) is {0.81 / 0.4:.3g} times the 400 mA the build needs (normal current 300 mA, "
        "derated to "
        "75%, rounded up to R10): a fault drawing a few times the normal current leaves it intact",
        size_values(0.81), SIZE_FIX)]


def test_fuse_rerated_for_a_warm_ambient():
    # 45 °C: rerate 1 − 0.005·20 = 0.9; least 0.3 / (0.75·0.9) = 0.444 A -> R10 500 mA
    factor = 1 - 0.005 * (45 - 25)
    least = NORMAL / (0.75 * factor)
    preferred = r10_up(least)
    assert preferred == 0.5
    result = check(warm())
    assert of(result, "power.fuse-size") == []
    named = {r[2]: r[3] for r in sheet_rows(result, "power.fuse-size")}
    assert named["temperature rerating at 45 °C"] == pytest.approx(factor * 100)
    assert named["least rating"] == pytest.approx(least)
    text = rated("400 mA", warm())
    carry = 0.4 * factor
    assert whole(text, "power.fuse-size") == [finding(
        "power.fuse-size", "warning", at(text, "F1:", "400 mA"), "parts.F1.current_rating",
        f"F1 (400 mA; {carry * 1e3:.4g} mA at 45 °C) runs at {NORMAL / carry:.0%} of its rerated rating "
        "(keep "
        "under 75%) at the build's normal current of 300 mA, its budget at full output held continuously: it "
        "ages and may open after hours at full output; fit 500 mA", size_values(0.4, preferred), SIZE_FIX)]
    text = rated("200 mA", warm())
    carry = 0.2 * factor
    assert [f["message"][:100] for f in whole(text, "power.fuse-size")] == [
        (f"F1 (200 mA; {carry * 1e3:.4g} mA at 45 °C) is far below the build's normal current of 300 mA, its "
         "budget at full output held continuously: that is "
         f"{NORMAL / carry:.0%} of its rerated rating")[:100]]
    text = rated("1.01 A", warm())
    assert [f["message"] for f in whole(text, "power.fuse-size")] == [
        f"F1 (1.01 A) is {1.01 / 0.5:.3g} times the 500 mA the build needs (normal current 300 mA, "
        "derated to "
        "75% and rerated for the ambient, rounded up to R10): a fault drawing a few times the normal current "
        "leaves it intact"]


def test_fuse_size_notes():
    no_rating = edited(FUSED, "current_rating: 500 mA, ", "")
    assert whole(no_rating, "power.fuse-size") == [finding(
        "power.fuse-size", "note", at(no_rating, "F1:", "{"), "parts.F1",
        "F1 states no current_rating; the build needs 400 mA", {"preferred rating": (0.4, "A")})]
    not_fuse = edited(FUSED, "  fuse: F1\n", "  fuse: D1\n")
    assert whole(not_fuse, "power.fuse-size") == [finding(
        "power.fuse-size", "note", at(not_fuse, "fuse: D1", "D1"), "supply.fuse",
        "supply.fuse names D1, a diode, not a fuse")]
    no_draw = edited(FUSED, "    quiescent_current: 0.3 A\n", "")
    assert whole(no_draw, "power.fuse-size") == [finding(
        "power.fuse-size", "note", at(no_draw, "F1:", "{"), "parts.F1",
        "F1 cannot be sized: the build's current budget is unknown (no device on the supply rail states a "
        "quiescent current)")]


def test_fuse_size_with_a_budget_left_incomplete_and_no_ambient():
    # U5 names no rail: the budget is a lower bound, so a large fuse is not called too large
    text = edited(edited(rated("5 A"), "  U1: {profile: load-chip, rail: V12}\n",
                         "  U1: {profile: load-chip, rail: V12}\n  U5: {profile: load-chip}\n"),
                  "  ambient_max: 25 degC\n", "")
    result = check(text)
    assert of(result, "power.fuse-size") == []
    assert [r[2:4] for r in sheet_rows(result, "power.fuse-size")] == [
        ("normal current (budget at full output)", pytest.approx(NORMAL)),
        ("continuous-use share of rating", pytest.approx(75.0)), ("least rating", pytest.approx(0.4)),
        ("preferred rating (R10)", pytest.approx(0.4)), ("fitted rating", pytest.approx(5.0)),
        ("fitted speed", "time-lag"), ("budget left out", "U5 (no rail)")]


def test_a_resistor_named_as_the_fuse_is_left_to_its_own_rule():
    text = edited(FUSED, "F1: {kind: fuse, current_rating: 500 mA, speed: time-lag,",
                  "F1: {kind: resistor, value: 1 ohm, power_rating: 5 W,")
    assert sheet_rows(check(text), "power.fuse-size") == []


# ---- power.fuse-wire -------------------------------------------------------------------------------

def test_fuse_wire_sheet_and_edge():
    result = check(rated("7 A"))  # exactly the 7 A of 22 AWG: fine
    assert of(result, "power.fuse-wire") == []
    assert sheet_rows(result, "power.fuse-wire") == rows(
        ("fuse", "supply wiring", "22 AWG chassis-wiring ampacity", 7.0, "A", "", ""))


def test_fuse_above_the_wire():
    text = rated("8 A")
    assert whole(text, "power.fuse-wire") == [finding(
        "power.fuse-wire", "error", at(text, "F1:", "8 A"), "parts.F1.current_rating",
        "F1 (8 A) is above the 7 A that the 22 AWG supply wiring carries: a fault can overheat the wire "
        "before the fuse opens", {"fuse rating": (8.0, "A"), "wire ampacity": (7.0, "A")}, WIRE_FIX)]


@pytest.mark.parametrize("draw, over", [("860 mA", False), ("870 mA", True)])
def test_build_drawing_more_than_thin_wire(draw, over):
    # 30 AWG carries 0.86 A: a build drawing exactly that is fine, 0.87 A is not
    text = edited(edited(FUSED, "wire_gauge: 22", "wire_gauge: 30"), "quiescent_current: 0.3 A",
                  f"quiescent_current: {draw}")
    amps = float(draw.split()[0]) / 1000
    expected = [finding(
        "power.fuse-wire", "error", at(text, "wire_gauge", "30"), "supply.wire_gauge",
        f"The build draws {draw} at full output, more than the 860 mA the 30 AWG supply wiring carries",
        {"input current budget": (amps, "A"), "wire ampacity": (0.86, "A")}, WIRE_FIX)] if over else []
    assert whole(text, "power.fuse-wire") == expected


def test_odd_gauge_is_checked_as_the_next_thinner_row():
    odd = edited(FUSED, "wire_gauge: 22", "wire_gauge: 23")
    assert sheet_rows(check(odd), "power.fuse-wire") == rows(
        ("fuse", "supply wiring", "23 AWG (checked as 24 AWG) chassis-wiring ampacity", 3.5, "A", "", ""))
    # a gauge outside the table cannot reach the rule: the schema holds wire_gauge to 10..40, and
    # every gauge there has a row (odd ones the next thinner)


# ---- power.fuse-inrush -----------------------------------------------------------------------------
# 12 V onto C30 1000 µF through the assumed 0.5 ohm: 24 A, τ = 0.5 ms, I²t = 144·1e-3/(2·0.5) = 0.144 A²s

I2T = 12.0 ** 2 * 1000e-6 / (2 * 0.5)


def inrush_rows(owner="F1", ohms=0.5, source=ASSUMED, farads=1000e-6, extra=()):
    peak, tau, i2t = 12.0 / ohms, ohms * farads, 12.0 ** 2 * farads / (2 * ohms)
    return rows(("fuse", owner, "bulk capacitance behind it", farads, "F", "", ""),
                ("fuse", owner, "inrush loop resistance", ohms, "Ω", "", ""),
                ("fuse", owner, "inrush source", source, "", "", ""),
                ("fuse", owner, "inrush peak", peak, "A", "", ""),
                ("fuse", owner, "inrush time constant RC", tau, "s", "", ""),
                ("fuse", owner, "inrush I²t", i2t, "A²s", "", ""), *extra)


def test_inrush_sheet_with_a_time_lag_fuse():
    # time-lag 500 mA withstands (10·0.5)²·0.01 = 0.25 A²s > 0.144
    result = check(FUSED)
    assert of(result, "power.fuse-inrush") == []
    assert sheet_rows(result, "power.fuse-inrush") == inrush_rows(
        extra=[("fuse", "F1", "I²t it withstands", (10 * 0.5) ** 2 * 0.010, "A²s", "", "")])


def test_inrush_without_a_fuse_or_its_rating_is_only_published():
    unfused = edited(FUSED, "  fuse: F1\n", "")
    assert sheet_rows(check(unfused), "power.fuse-inrush") == inrush_rows("supply input")
    unrated = edited(FUSED, "current_rating: 500 mA, ", "")
    assert sheet_rows(check(unrated), "power.fuse-inrush") == inrush_rows()
    assert of(check(unrated), "power.fuse-inrush") == []


def inrush_values(peak, tau, i2t, allowed):
    return {"inrush peak": (peak, "A"), "time constant": (tau, "s"), "inrush I²t": (i2t, "A²s"),
            "fuse withstands": (allowed, "A²s")}


def test_quick_acting_fuse_opens_at_switch_on():
    # quick-acting 500 mA: (4·0.5)²·0.003 = 0.012 A²s < 0.144; a time-lag link (0.25 A²s) would ride it
    text = edited(FUSED, "speed: time-lag", "speed: quick-acting")
    gate = (4 * 0.5) ** 2 * 0.003
    assert whole(text, "power.fuse-inrush") == [finding(
        "power.fuse-inrush", "warning", at(text, "F1:", "quick-acting"), "parts.F1.speed",
        f"Switching 12 V onto C30 (1 mF) through 500 mΩ ({ASSUMED}) gives a 24 A peak and {I2T:.4g} "
        "A²s, more "
        f"than the {gate:.4g} A²s a quick-acting link withstands (4 × I_n for 3 ms, IEC 60127-2): the "
        "quick-acting F1 will open at switch-on; fit a time-lag fuse of the same rating",
        inrush_values(24.0, 0.5e-3, I2T, gate), INRUSH_FIX)]


def test_time_lag_too_small_and_quick_that_needs_more_than_time_lag():
    # C30 4700 µF: I²t = 144·4.7e-3 = 0.6768 A²s, above even the 0.25 A²s of a time-lag 500 mA link
    big = edited(FUSED, "value: 1000 uF", "value: 4700 uF")
    i2t = 12.0 ** 2 * 4700e-6 / (2 * 0.5)
    gate = (10 * 0.5) ** 2 * 0.010
    assert whole(big, "power.fuse-inrush") == [finding(
        "power.fuse-inrush", "warning", at(big, "F1:", "time-lag"), "parts.F1.speed",
        f"Switching 12 V onto C30 (4.7 mF) through 500 mΩ ({ASSUMED}) gives a 24 A peak and {i2t:.4g} A²s, "
        f"more than the {gate:.4g} A²s a time-lag link withstands (10 × I_n for 10 ms, IEC 60127-2): F1 may "
        "open at switch-on; add series resistance or a soft-start ahead of the capacitor",
        inrush_values(24.0, 0.5 * 4700e-6, i2t, gate), INRUSH_FIX)]
    quick = edited(big, "speed: time-lag", "speed: quick-acting")
    assert [f["message"].rsplit(": ", 1)[1] for f in whole(quick, "power.fuse-inrush")] == [
        f"the quick-acting F1 will open at switch-on; fit a time-lag fuse of the same rating, and add series "
        f"resistance (a time-lag link withstands only {gate:.4g} A²s)"]


def test_melting_i2t_without_a_speed_and_neither():
    # a stated melting I²t counts at 30 % for repeated switch-on: 0.4 A²s -> 0.12 < 0.144
    text = edited(FUSED, "speed: time-lag,", "melting_i2t: 0.4 A^2 s,")
    assert whole(text, "power.fuse-inrush") == [finding(
        "power.fuse-inrush", "warning", at(text, "F1:", "{"), "parts.F1",
        f"Switching 12 V onto C30 (1 mF) through 500 mΩ ({ASSUMED}) gives a 24 A peak and {I2T:.4g} "
        "A²s, more "
        "than its melting I²t 0.4 A^2 s × 30% for repeated switch-on: F1 may open at switch-on; add series "
        "resistance or a soft-start ahead of the capacitor",
        inrush_values(24.0, 0.5e-3, I2T, 0.4 * 0.3), INRUSH_FIX)]
    neither = edited(FUSED, "speed: time-lag, ", "")
    assert whole(neither, "power.fuse-inrush") == [finding(
        "power.fuse-inrush", "note", at(neither, "F1:", "{"), "parts.F1",
        f"F1 states neither speed nor melting_i2t; its inrush withstand is not checked ({I2T:.4g} A²s into "
        "C30)")]


def test_bench_limit_and_series_resistor_in_the_inrush():
    # bench supply limited to 2 A, R1 1 ohm in series: loop 1.5 ohm, V/R = 8 A, capped at 2 A;
    # I²t = 2·C·12 − 2²·1.5·C/2 with C = C31's 1000 µF + C30's 1000 µF (both named, in plan order)
    text = edited(FUSED, "kind: dc-adapter", "kind: bench")
    text = edited(text, "  wire_gauge: 22\n", "  wire_gauge: 22\n  series_resistor: R1\n")
    text = edited(text, "ends: [DC_IN, V12]}", "ends: [DC_IN, DC_R]}")
    text = edited(text, "  D1:",
                  "  R1: {kind: resistor, value: 1 ohm, power_rating: 5 W, ends: [DC_R, V12]}\n"
                  "  C31: {kind: capacitor, value: 1000 uF, dielectric: film, ends: [V12, GND]}\n  D1:")
    text = edited(text, "speed: time-lag", "speed: quick-acting")
    farads, ohms, limit = 2000e-6, 1.5, 2.0
    i2t = limit * farads * 12 - limit ** 2 * ohms * farads / 2
    gate = (4 * 0.5) ** 2 * 0.003
    result = check(text)
    source = ASSUMED + " plus R1"
    assert sheet_rows(result, "power.fuse-inrush") == rows(
        ("fuse", "F1", "bulk capacitance behind it", farads, "F", "", ""),
        ("fuse", "F1", "inrush loop resistance", ohms, "Ω", "", ""),
        ("fuse", "F1", "inrush source", source, "", "", ""),
        ("fuse", "F1", "inrush current limit", limit, "A", "", ""),
        ("fuse", "F1", "inrush peak", limit, "A", "", ""),
        ("fuse", "F1", "inrush time constant RC", ohms * farads, "s", "", ""),
        ("fuse", "F1", "inrush I²t", i2t, "A²s", "", ""),
        ("fuse", "F1", "I²t it withstands", gate, "A²s", "", ""))
    assert [facts(f)["message"] for f in of(result, "power.fuse-inrush")] == [
        f"Switching 12 V onto C31, C30 (2 mF) through 1.5 Ω ({source}) gives a 2 A peak (the supply current "
        f"limit) and {i2t:.4g} A²s, more than the {gate:.4g} A²s a quick-acting link withstands (4 × I_n for "
        "3 ms, IEC 60127-2): the quick-acting F1 will open at switch-on; fit a time-lag fuse of the same "
        "rating"]


def test_inrush_source_texts():
    # a stated source resistance (the bench limit stays: 12/0.1 = 120 A capped at 2 A)
    stated = edited(edited(FUSED, "kind: dc-adapter", "kind: bench"), "  wire_gauge: 22\n",
                    "  wire_gauge: 22\n  source_resistance: 0.1 ohm\n")
    named = {r[2]: r[3] for r in sheet_rows(check(stated), "power.fuse-inrush")}
    assert named["inrush source"] == "supply.source_resistance 0.1 ohm"
    assert named["inrush current limit"] == pytest.approx(2.0)
    # a battery's 40 A short-circuit current: R = 12/40 = 0.3 ohm, no limit
    battery = edited(FUSED, "kind: dc-adapter", "kind: battery")
    battery = edited(battery, "max_current: 2 A", "max_current: 40 A")
    named = {r[2]: r[3] for r in sheet_rows(check(battery), "power.fuse-inrush")}
    assert named["inrush source"] == ("the battery's 300 mΩ internal resistance from its 40 A "
                                      "short-circuit current")
    assert named["inrush peak"] == pytest.approx(12 / 0.3) and "inrush current limit" not in named
    # a battery with nothing stated about it: the assumed loop stands
    bare = edited(edited(FUSED, "kind: dc-adapter", "kind: battery"), "  max_current: 2 A\n", "")
    assert {r[2]: r[3] for r in sheet_rows(check(bare), "power.fuse-inrush")}["inrush source"] == ASSUMED


def test_no_bulk_capacitor_no_inrush():
    text = edited(FUSED, "  C30: {kind: capacitor, value: 1000 uF, dielectric: electrolytic, "
                  "ends: [V12, GND], positive: V12}\n", "")
    assert sheet_rows(check(text), "power.fuse-inrush") == []


# ---- power.fuse-voltage ----------------------------------------------------------------------------

def test_fuse_voltage_edges():
    assert whole(edited(FUSED, "speed: time-lag,", "speed: time-lag, voltage_rating: 12 V,"),
                 "power.fuse-voltage") == []
    text = edited(FUSED, "speed: time-lag,", "speed: time-lag, voltage_rating: 11.9 V,")
    assert whole(text, "power.fuse-voltage") == [finding(
        "power.fuse-voltage", "error", at(text, "F1:", "11.9 V"), "parts.F1.voltage_rating",
        "F1 is rated 11.9 V but protects a 12 V supply",
        {"fuse voltage rating": (11.9, "V"), "supply": (12.0, "V")}, VOLTAGE_FIX)]


# ---- power.fuse-missing ----------------------------------------------------------------------------

UNFUSED = edited(FUSED, "  fuse: F1\n", "")


def test_missing_fuse_whole():
    assert whole(UNFUSED, "power.fuse-missing") == [finding(
        "power.fuse-missing", "warning", at(UNFUSED, "kind: dc-adapter", "dc-adapter"), "supply.kind",
        "The dc-adapter supply (up to 2 A) has no fuse; the build needs about 400 mA",
        {"normal current": (NORMAL, "A"), "preferred rating": (0.4, "A")}, MISSING_FIX)]


@pytest.mark.parametrize("limit, expected", [
    ("300 mA", None),  # the supply's own limit is the build's need: it protects by itself
    ("301 mA", "The dc-adapter supply (up to 301 mA) has no fuse; the build needs about 400 mA"),
])
def test_missing_fuse_edge_of_the_supply_limit(limit, expected):
    text = edited(UNFUSED, "max_current: 2 A", f"max_current: {limit}")
    assert [f["message"] for f in whole(text, "power.fuse-missing")] == ([expected] if expected else [])


def test_missing_fuse_variants():
    battery = edited(UNFUSED, "kind: dc-adapter", "kind: battery")
    assert [f["message"] for f in whole(battery, "power.fuse-missing")] == [
        "The battery supply (up to 2 A into a short) has no fuse; the build needs about 400 mA"]
    unlimited = edited(UNFUSED, "  max_current: 2 A\n", "")
    assert [f["message"] for f in whole(unlimited, "power.fuse-missing")] == [
        "The dc-adapter supply has no fuse; the build needs about 400 mA"]
    incomplete = edited(UNFUSED, "  U1: {profile: load-chip, rail: V12}\n",
                        "  U1: {profile: load-chip, rail: V12}\n  U5: {profile: load-chip}\n")
    assert [(f["message"], f["values"]) for f in whole(incomplete, "power.fuse-missing")] == [
        ("The dc-adapter supply (up to 2 A) has no fuse", {})]
    with_resistor = edited(edited(UNFUSED, "  wire_gauge: 22\n", "  wire_gauge: 22\n  series_resistor: R1\n"),
                           "  D1:", "  R1: {kind: resistor, value: 1 ohm, ends: [DC_IN, V12]}\n  D1:")
    assert whole(with_resistor, "power.fuse-missing") == []


# ---- a fuse on the rectifier side of a capacitor-input supply --------------------------------------
# the charging pulses' RMS is about 1.8 × the DC (1.5 to 2.5 by conduction angle: common practice)

MAINS = """\
build_spec: 2
build:
  name: rectified load
  ambient_max: 25 degC
supply:
  kind: mains-transformer
  voltage: 18 V
  rail: V18
  fuse: F1
rails:
  V18: {voltage: 18 V, from: supply}
  GND: {voltage: 0 V}
profiles:
  load-chip:
    class: other
    quiescent_current: 0.3 A
devices:
  U1: {profile: load-chip, rail: V18}
parts:
  D1: {kind: diode, ends: [AC1, RECT], positive: AC1}
  C39: {kind: capacitor, value: 9.9 uF, dielectric: film, ends: [RECT, GND]}
  F1: {kind: fuse, current_rating: 1 A, speed: time-lag, ends: [RECT, V18]}
  C40: {kind: capacitor, value: 2200 uF, dielectric: electrolytic, ends: [V18, GND], positive: V18}
chain: []
"""


def test_fuse_between_rectifier_and_reservoir_carries_the_pulses():
    # RECT has the diode and only 9.9 µF (below the 10 µF a reservoir needs): 1.8 × 0.3 = 0.54 A,
    # least 0.54 / 0.75 = 0.72 A -> R10 800 mA
    result = check(MAINS)
    assert sheet_rows(result, "power.fuse-size")[:2] == rows(
        ("fuse", "F1", "normal current (budget at full output)", NORMAL, "A", "", ""),
        ("fuse", "F1", "RMS of the rectifier charging pulses", 1.8 * NORMAL, "A", "", ""))
    named = {r[2]: r[3] for r in sheet_rows(result, "power.fuse-size")}
    assert named["least rating"] == pytest.approx(1.8 * NORMAL / 0.75)
    assert named["preferred rating (R10)"] == pytest.approx(r10_up(1.8 * NORMAL / 0.75))


@pytest.mark.parametrize("edit", [
    ("value: 9.9 uF", "value: 10 uF"),  # 10 µF on RECT is a reservoir: smooth DC through F1
    ("ends: [AC1, RECT], positive: AC1}", "ends: [AC1, RAW], positive: AC1}"),  # no diode at F1
])
def test_fuse_on_the_smooth_side_carries_dc(edit):
    names = [r[2] for r in sheet_rows(check(edited(MAINS, *edit)), "power.fuse-size")]
    assert "RMS of the rectifier charging pulses" not in names
    assert names[0] == "normal current (budget at full output)"


def test_fuse_behind_the_reservoir_on_the_other_end():
    # F1 the other way round (V18 first): its RECT end still carries the pulses
    text = edited(MAINS, "ends: [RECT, V18]}", "ends: [V18, RECT]}")
    names = [r[2] for r in sheet_rows(check(text), "power.fuse-size")]
    assert "RMS of the rectifier charging pulses" in names


def test_inrush_with_no_loop_resistance_at_all_is_not_computed():
    # a project that sets the assumed loop to 0 ohm: V/R has no finite value, so nothing is published
    settings = Settings(rule_settings={"power.fuse-inrush": {"loop_resistance": 0.0}})
    result = check(FUSED, settings=settings)
    assert sheet_rows(result, "power.fuse-inrush") == [] and of(result, "power.fuse-inrush") == []


def test_fuse_of_a_class_b_amplifier_heats_on_the_rms_of_its_half_waves():
    # the example's U2 on 18 V into 4 ohm swings rail to rail: half-waves of I_p = 9 V / 4 ohm from the
    # supply, over its steady 40 mA. A half-wave's mean is I_p/π and its mean square I_p²/4 (Boylestad &
    # Nashelsky §12), so the RMS of DC plus half-wave is √(I_dc² + 2·I_dc·I_p/π + I_p²/4)
    hot = (EXAMPLES / "power-hot-amplifier.yaml").read_text("utf-8")
    i_dc, i_p = 0.040, 9.0 / 4.0
    rms = math.sqrt(i_dc ** 2 + 2 * i_dc * i_p / math.pi + i_p ** 2 / 4)
    assert sheet_rows(check(hot), "power.fuse-size")[:2] == rows(
        ("fuse", "F1", "normal current (budget at full output)", i_dc + i_p / math.pi, "A", "", ""),
        ("fuse", "F1", "RMS of the supply current (class-B half-wave draw)", rms, "A", "", ""))


POWER_RULES = ["power.current-budget", "power.device-supply", "power.heat", "power.regulator-dropout",
               "power.fuse-size", "power.fuse-wire", "power.fuse-inrush", "power.fuse-voltage",
               "power.fuse-missing", "power.resistor-fuse", "power.reverse-polarity", "power.reverse-diode"]


def test_a_plan_without_a_supply_section_gives_no_power_finding():
    # nothing to fuse, wire or protect: each rule stands back (and none fails on the missing supply)
    text = FUSED[:FUSED.index("supply:\n")] + FUSED[FUSED.index("rails:\n"):]
    result = check(text)
    found = {rule: [f.message for f in of(result, rule)] for rule in POWER_RULES}
    assert found == {rule: [] for rule in POWER_RULES}
    fuse_rules = [r for r in POWER_RULES if r.startswith("power.fuse") or r == "power.resistor-fuse"]
    assert [e for e in result.sheet if e.rule in fuse_rules] == []


def test_no_wire_gauge_no_wire_check():
    result = check(edited(FUSED, "  wire_gauge: 22\n", ""))
    assert of(result, "power.fuse-wire") == [] and sheet_rows(result, "power.fuse-wire") == []
