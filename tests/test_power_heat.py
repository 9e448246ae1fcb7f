"""Power family, whole findings: power.heat (amplifiers and regulators) and power.regulator-dropout.

Sources of the arithmetic, named again beside each check:
- junction temperature T_j = T_a + P·θ_JA, and the heat sink θ_SA = (T_j,max − T_a)/P − θ_JC − θ_CS
  (handbook form of the series thermal-resistance model; test_power.py checks it against a worked
  example: P 5 W, θJC 3, θCS 1, 150 °C, 50 °C -> 16 °C/W);
- a linear regulator dissipates (V_in − V_out)·I_out + V_in·I_q (common practice);
- class-B worst-case dissipation: single-ended on V_s into R_L: V_s²/(2π²·R_L); split supply ±V:
  V²/(π²·R_L) per device (Sedra & Smith, from memory; Boylestad & Nashelsky Example 12.8); a full
  sine rail to rail on a single supply peaks at V_s/2, P = (V_s/2)²/(2·R_L);
- the 25 °C junction margin, the assumed θCS of 1 °C/W and the 0.5 V dropout margin are the rules'
  settings (common practice).
The plans here use binary-exact figures (2 W, 30 °C/W, 8 V) so that an edge lands exactly on its
threshold and `<` against `<=` shows.
"""

from __future__ import annotations

import math

import pytest
from conftest import EXAMPLES, check, edited, facts, line_of, of, sheet_rows

REG = """\
build_spec: 2
build:
  name: regulator heat
  ambient_max: 40 degC
supply:
  kind: bench
  voltage: 12 V
  rail: V12
  max_current: 2 A
rails:
  V12: {voltage: 12 V, from: supply}
  V4: {voltage: 4 V, from: U3}
  GND: {voltage: 0 V}
profiles:
  reg-chip:
    class: linear-regulator
    dropout: 2 V
    theta_ja: 30 degC/W
    theta_jc: 5 degC/W
    tj_max: 125 degC
  load-chip:
    class: other
    quiescent_current: 0.25 A
devices:
  U3: {profile: reg-chip, rail: V12, output_rail: V4}
  U4: {profile: load-chip, rail: V4}
parts: {}
chain: []
"""

HOT = (EXAMPLES / "power-hot-amplifier.yaml").read_text("utf-8")

HEAT_FIX = ("Fit a heat sink of the θSA shown (or more copper area, stated as theta_ja on the device), lower "
            "the supply voltage, or use a higher-impedance speaker.")
DROPOUT_FIX = ("Raise the input rail, use a Schottky series diode or a shunt protection diode behind "
               "the fuse, "
               "choose a low-dropout regulator, or lower the output voltage.")
AMBIENT_FIX = ("State 'ambient_max:' under build: the hottest air the build will sit in (40 degC indoors is "
               "a usual worst case).")


def at(text: str, needle: str, fragment: str, nth: int = 0) -> tuple[int, int]:
    """(line, column) of `fragment` on the nth line holding `needle`, both 1-based."""
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


def g4(x: float) -> str:
    return f"{x:.4g}"


# ---- regulators: power.heat ------------------------------------------------------------------------
# U3 makes V4 (4 V) from V12 (12 V) for U4's 0.25 A, no ground current stated:
# P = (12 − 4)·0.25 + 12·0 = 2 W; at 40 °C through 30 °C/W: T_j = 40 + 2·30 = 100 °C, exactly the
# limit less its margin (125 − 25): not above it.
P_REG = (12 - 4) * 0.25


def reg_rows(theta, extra=()):
    tj = 40 + P_REG * theta
    return rows(("heat", "U3", "regulator dissipation", P_REG, "W", "", ""),
                ("heat", "U3", "thermal resistance junction to ambient", theta, "°C/W", "", ""),
                ("heat", "U3", "junction temperature at 40 °C ambient", tj, "°C", "", ""),
                ("heat", "U3", "junction limit (tj_max 125 °C less 25 °C)", 125 - 25, "°C", "", ""),
                *extra)


def test_regulator_exactly_at_its_margin_is_fine():
    result = check(REG)
    assert of(result, "power.heat") == []
    assert sheet_rows(result, "power.heat") == reg_rows(30.0)


def reg_values(theta, need=None):
    values = {"V_in": (12.0, "V"), "V_out": (4.0, "V"), "I_out": (0.25, "A"), "ambient": (40.0, "°C"),
              "θ junction to ambient": (theta, "°C/W"), "junction temperature": (40 + P_REG * theta, "°C"),
              "tj_max": (125.0, "°C")}
    if need is not None:
        values["heat sink needed θSA"] = (need, "°C/W")
    return values


@pytest.mark.parametrize("theta, level, limit", [(30.5, "warning", "within 25 °C of its 125 °C limit"),
                                                 (42.5, "warning", "within 25 °C of its 125 °C limit"),
                                                 (43.0, "error", "above its 125 °C limit")])
def test_regulator_too_hot_needs_a_heat_sink(theta, level, limit):
    # 40 + 2·42.5 = 125 °C: at tj_max is still a warning (not above it); θSA = (100 − 40)/2 − 5 − 1 =
    # 24 °C/W, at the absolute limit (125 − 40)/2 − 6 = 36.5 °C/W
    text = edited(REG, "theta_ja: 30 degC/W", f"theta_ja: {theta} degC/W")
    need, need_abs = (100 - 40) / P_REG - 5 - 1, (125 - 40) / P_REG - 5 - 1
    result = check(text)
    assert [facts(f) for f in of(result, "power.heat")] == [finding(
        "power.heat", level, at(text, "U3:", "{"), "devices.U3",
        "U3 dissipates up to 2 W (8 V across it at 250 mA, plus its ground current); with θJA "
        f"{theta:g} °C/W "
        f"from profile reg-chip its junction reaches {g4(40 + P_REG * theta)} °C at 40 °C ambient, {limit}; "
        f"it needs a heat sink of θSA {g4(need)} °C/W or less (θCS 1 °C/W assumed; {g4(need_abs)} °C/W at "
        "the absolute limit), or more copper area under it",
        reg_values(theta, need), HEAT_FIX)]
    assert sheet_rows(result, "power.heat") == reg_rows(
        theta, [("heat", "U3", "heat sink needed for 100 °C (θSA at most)", need, "°C/W", "", "")])


def test_regulator_theta_ja_as_mounted_overrides_the_profile():
    text = edited(REG, "output_rail: V4}", "output_rail: V4, theta_ja: 31 degC/W}")
    need, need_abs = 60 / P_REG - 6, 85 / P_REG - 6
    assert whole(text, "power.heat") == [finding(
        "power.heat", "warning", at(text, "U3:", "31 degC/W"), "devices.U3.theta_ja",
        f"U3 dissipates up to 2 W (8 V across it at 250 mA, plus its ground current); with θJA 31 °C/W as "
        f"mounted its junction reaches 102 °C at 40 °C ambient, within 25 °C of its 125 °C limit; it needs a "
        f"heat sink of θSA {g4(need)} °C/W or less (θCS 1 °C/W assumed; {g4(need_abs)} °C/W at the absolute "
        "limit), or more copper area under it",
        reg_values(31.0, need), HEAT_FIX)]


@pytest.mark.parametrize("jc, hopeless", [(29, True), (28, False)])
def test_regulator_that_no_heat_sink_can_hold(jc, hopeless):
    # θSA = (100 − 40)/2 − θJC − 1: 0 with θJC 29 (no sink can do it), 1 °C/W with θJC 28
    text = edited(edited(REG, "theta_jc: 5 degC/W", f"theta_jc: {jc} degC/W"),
                  "theta_ja: 30 degC/W", "theta_ja: 40 degC/W")
    need, need_abs = 60 / P_REG - jc - 1, 85 / P_REG - jc - 1
    head = ("U3 dissipates up to 2 W (8 V across it at 250 mA, plus its ground current); with θJA 40 "
            "°C/W from "
            "profile reg-chip its junction reaches 120 °C at 40 °C ambient, within 25 °C of its 125 °C limit")
    tail = (f"; no heat sink can hold it at 100 °C (θJC {jc} °C/W and θCS 1 °C/W assumed already take it "
            "there): lower the supply, raise the load impedance or choose a larger part" if hopeless else
            f"; it needs a heat sink of θSA {g4(need)} °C/W or less (θCS 1 °C/W assumed; {g4(need_abs)} °C/W "
            "at the absolute limit), or more copper area under it")
    assert whole(text, "power.heat") == [finding(
        "power.heat", "warning", at(text, "U3:", "{"), "devices.U3", head + tail, reg_values(40.0, need),
        HEAT_FIX)]


@pytest.mark.parametrize("theta, level, tj, limit", [
    (45, "error", 130, "above its 125 °C limit"), (40, "warning", 120, "within 25 °C of its 125 °C limit")])
def test_regulator_too_hot_without_theta_jc(theta, level, tj, limit):
    # T_j = 40 + 2·θJA: 130 °C above tj_max, 120 °C inside the 25 °C margin
    assert tj == 40 + P_REG * theta
    text = edited(REG, "    theta_jc: 5 degC/W\n", "")
    text = edited(text, "theta_ja: 30 degC/W", f"theta_ja: {theta} degC/W")
    assert whole(text, "power.heat") == [finding(
        "power.heat", level, at(text, "U3:", "{"), "devices.U3",
        f"U3 dissipates up to 2 W (8 V across it at 250 mA, plus its ground current); with θJA {theta} "
        "°C/W from "
        f"profile reg-chip its junction reaches {tj} °C at 40 °C ambient, {limit}; state "
        "theta_jc in profile reg-chip to size a heat sink",
        reg_values(float(theta)), HEAT_FIX)]


@pytest.mark.parametrize("sink, theta_sa, cs, cs_text", [
    ("{theta_sa: 30 degC/W}", 30.0, 1.0, "θCS 1 °C/W assumed"),
    ("{theta_sa: 30 degC/W, theta_cs: 0.5 degC/W}", 30.0, 0.5, "θCS 0.5 °C/W"),
])
def test_regulator_with_a_heat_sink_too_small(sink, theta_sa, cs, cs_text):
    # θ = θJC 5 + θCS + θSA 30; T_j = 40 + 2·θ is above 100 °C: θSA needed (100 − 40)/2 − 5 − θCS
    text = edited(REG, "output_rail: V4}", f"output_rail: V4, heat_sink: {sink}}}")
    theta = 5 + cs + theta_sa
    need, need_abs = 60 / P_REG - 5 - cs, 85 / P_REG - 5 - cs
    how = f"θJC 5 °C/W + θCS {g4(cs)} °C/W{'' if 'theta_cs' in sink else ' (assumed)'} + θSA 30 °C/W"
    assert whole(text, "power.heat") == [finding(
        "power.heat", "warning", at(text, "U3:", "30 degC/W"), "devices.U3.heat_sink.theta_sa",
        f"U3 dissipates up to 2 W (8 V across it at 250 mA, plus its ground current); with {how} its "
        "junction "
        f"reaches {g4(40 + P_REG * theta)} °C at 40 °C ambient, within 25 °C of its 125 °C limit; the "
        "declared "
        f"heat sink (30 degC/W) is not enough: it needs θSA of {g4(need)} °C/W or less ({cs_text}; "
        f"{g4(need_abs)} °C/W at the absolute limit)",
        reg_values(theta, need), HEAT_FIX)]


def test_heat_notes_for_what_the_profile_does_not_state():
    no_tj = edited(REG, "    tj_max: 125 degC\n", "")
    assert whole(no_tj, "power.heat") == [finding(
        "power.heat", "note", at(no_tj, "class: linear-regulator", "class"), "profiles.reg-chip",
        "profile reg-chip states no tj_max (profiles.reg-chip.tj_max); the junction temperature of U3 is not "
        "checked")]
    no_ja = edited(REG, "    theta_ja: 30 degC/W\n", "")
    assert whole(no_ja, "power.heat") == [finding(
        "power.heat", "note", at(no_ja, "U3:", "{"), "devices.U3",
        "no theta_ja for U3: state it on the device (as mounted, with its copper area) or in profile "
        "reg-chip")]
    sink_no_jc = edited(edited(REG, "    theta_jc: 5 degC/W\n", ""), "output_rail: V4}",
                        "output_rail: V4, heat_sink: {theta_sa: 4 degC/W}}")
    assert whole(sink_no_jc, "power.heat") == [finding(
        "power.heat", "note", at(sink_no_jc, "U3:", "4 degC/W"), "devices.U3.heat_sink.theta_sa",
        "U3 has a heat sink but profile reg-chip states no theta_jc (profiles.reg-chip.theta_jc); the "
        "junction "
        "temperature is not checked")]


def test_regulators_skipped_and_one_without_load():
    # U0 is no regulator, U2 names no rail (both skipped); U5 makes V9 from V12 with nothing on it
    # and no load_current: 0 A out,
    # P = 0 W, nothing to heat; U6 has no output rail and takes its 4 V from its profile's
    # output_voltage, with its stated 0.25 A load: (12 − 4)·0.25 = 2 W like U3
    text = edited(REG, "  V4: {voltage: 4 V, from: U3}\n",
                  "  V4: {voltage: 4 V, from: U3}\n  V9: {voltage: 9 V, from: U5}\n")
    text = edited(text, "  load-chip:\n", "  fixed-chip:\n    class: linear-regulator\n    "
                                          "output_voltage: 4 V\n"
                  "    theta_ja: 30 degC/W\n    tj_max: 125 degC\n  load-chip:\n")
    text = edited(text, "  U3: {profile: reg-chip, rail: V12, output_rail: V4}\n",
                  "  U0: {profile: load-chip, rail: V12}\n"
                  "  U2: {profile: reg-chip}\n  U5: {profile: reg-chip, rail: V12, output_rail: V9}\n"
                  "  U6: {profile: fixed-chip, rail: V12, load_current: 0.25 A}\n"
                  "  U3: {profile: reg-chip, rail: V12, output_rail: V4}\n")
    result = check(text)
    assert of(result, "power.heat") == []
    assert [r for r in sheet_rows(result, "power.heat") if r[2] == "regulator dissipation"] == rows(
        ("heat", "U5", "regulator dissipation", 0.0, "W", "", ""),
        ("heat", "U6", "regulator dissipation", P_REG, "W", "", ""),
        ("heat", "U3", "regulator dissipation", P_REG, "W", "", ""))
    assert [r[1] for r in sheet_rows(result, "power.heat")].count("U5") == 1  # 0 W: no junction figures


def test_missing_ambient_is_one_note_naming_each_device():
    text = edited(edited(REG, "  ambient_max: 40 degC\n", ""), "  U4: {profile: load-chip, rail: V4}\n",
                  "  U4: {profile: load-chip, rail: V4}\n  U7: "
                  "{profile: reg-chip, rail: V12, output_rail: V4}\n")
    assert whole(text, "power.heat") == [finding(
        "power.heat", "note", at(text, "name: regulator heat", "name"), "build",
        "build.ambient_max is not stated: the junction temperature of U3, U7 is not checked",
        fix=AMBIENT_FIX)]


# ---- amplifiers: power.heat -----------------------------------------------------------------------
# The example: U2 single-ended on 18 V into SPK1 (4 ohm), 40 mA quiescent, θJA 50, θJC 3, tj_max 150,
# 40 °C ambient (examples/power-hot-amplifier.yaml).

def hot_figures(v=18.0, r=4.0, iq=0.040):
    total = v ** 2 / (2 * math.pi ** 2 * r)  # Sedra & Smith form, single-ended
    return total, iq * v, total + iq * v


def test_hot_amplifier_whole_finding_and_sheet():
    total, p_q, p = hot_figures()
    tj = 40 + p * 50
    need, need_abs = (125 - 40) / p - 3 - 1, (150 - 40) / p - 3 - 1
    result = check(HOT)
    assert [facts(f) for f in of(result, "power.heat")] == [finding(
        "power.heat", "error", at(HOT, "U2: {profile", "{"), "devices.U2",
        f"U2 dissipates up to {g4(p)} W (single-ended on 18 V into SPK1 (4 ohm)); with θJA 50 °C/W from "
        f"profile audio-power-amp-tab its junction reaches {g4(tj)} °C at 40 °C ambient, above its 150 °C "
        f"limit; it needs a heat sink of θSA {g4(need)} °C/W or less (θCS 1 °C/W assumed; "
        f"{g4(need_abs)} °C/W "
        "at the absolute limit), or more copper area under it",
        {"output stage worst case": (total, "W"), "quiescent": (p_q, "W"), "ambient": (40.0, "°C"),
         "θ junction to ambient": (50.0, "°C/W"), "junction temperature": (tj, "°C"), "tj_max": (150.0, "°C"),
         "heat sink needed θSA": (need, "°C/W")}, HEAT_FIX, stage="audio-amp")]
    assert sheet_rows(result, "power.heat") == rows(
        # rail to rail: peak 9 V into 4 ohm, 9²/(2·4) W
        ("heat", "U2", "full sine output power (rail to rail (the profile states no saturation))",
         9.0 ** 2 / (2 * 4.0), "W", "", ""),
        ("heat", "U2", "output stage dissipation, worst case (single-ended)", total, "W", "", ""),
        ("heat", "U2", "quiescent dissipation", p_q, "W", "", ""),
        ("heat", "U2", "package dissipation", p, "W", "", ""),
        ("heat", "U2", "thermal resistance junction to ambient", 50.0, "°C/W", "", ""),
        ("heat", "U2", "junction temperature at 40 °C ambient", tj, "°C", "", ""),
        ("heat", "U2", "junction limit (tj_max 150 °C less 25 °C)", 125.0, "°C", "", ""),
        ("heat", "U2", "heat sink needed for 125 °C (θSA at most)", need, "°C/W", "", ""))


def test_split_supply_amplifier_counts_both_rails():
    # ±18 V into 4 ohm: 18²/(π²·4) per device, twice for the package; quiescent 40 mA across 36 V
    text = edited(HOT, "output_topology: single-ended", "output_topology: split-supply")
    text = edited(text, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n  VNEG: "
                                                   "{voltage: -18 V, from: supply}\n")
    text = edited(text, 'rail: V18, note: "power tab bolted to nothing yet"}', "rail: V18, "
                                                                               "negative_rail: VNEG}")
    per = 18.0 ** 2 / (math.pi ** 2 * 4.0)
    p_q = 0.040 * 36
    result = check(text)
    named = {r[2]: r[3] for r in sheet_rows(result, "power.heat")}
    assert named["output stage dissipation, worst case (split-supply)"] == pytest.approx(2 * per)
    assert named["per output device, worst case"] == pytest.approx(per)
    assert named["quiescent dissipation"] == pytest.approx(p_q)
    assert named["package dissipation"] == pytest.approx(2 * per + p_q)
    (found,) = of(result, "power.heat")
    assert found.message.startswith(f"U2 dissipates up to {g4(2 * per + p_q)} W (split-supply on ±18 V "
                                    "into SPK1 "
                                    "(4 ohm)); with θJA 50 °C/W")


def test_bridge_amplifier_per_device_share():
    # a bridge-tied load: two push-pull pairs, each device (V_s/2)²/(π²·R_L/2), four of them
    text = edited(HOT, "output_topology: single-ended", "output_topology: bridge")
    per = (18.0 / 2) ** 2 / (math.pi ** 2 * 4.0 / 2)
    named = {r[2]: r[3] for r in sheet_rows(check(text), "power.heat")}
    assert named["output stage dissipation, worst case (bridge)"] == pytest.approx(4 * per)
    assert named["package dissipation"] == pytest.approx(4 * per + 0.040 * 18)
    assert ("heat", "U2", "per output device, worst case", pytest.approx(per), "W", "", "") in \
        sheet_rows(check(text), "power.heat")


def test_amplifier_without_load_is_a_note_and_the_next_one_still_checked():
    # U0 (not an amplifier) and U1 (same profile, no audio-amp stage of its own) come first: U1's
    # dissipation is not computed; U2 is still judged
    text = edited(HOT, "  U2: {profile: audio-power-amp-tab,",
                  "  U0: {profile: rf-amplifier-small-signal, rail: V18}\n"
                  "  U1: {profile: audio-power-amp-tab, rail: V18}\n  U2: {profile: audio-power-amp-tab,")
    found = whole(text, "power.heat")
    assert found[0] == finding(
        "power.heat", "note", at(text, "U1: {profile", "{"), "devices.U1",
        "no load impedance for U1: name its speaker in the audio-amp stage (chain[].load, with the speaker's "
        "value); its dissipation is not computed", stage="audio-amp")
    assert [(f["level"], f["message"][:3]) for f in found] == [("note", "no "), ("error", "U2 ")]


def test_amplifier_without_ambient_is_named_in_the_note():
    text = edited(HOT, "  ambient_max: 40 degC\n", "")
    assert [f["message"] for f in whole(text, "power.heat")] == [
        "build.ambient_max is not stated: the junction temperature of U2 is not checked"]


# ---- power.regulator-dropout ---------------------------------------------------------------------

def on_rail(volts: str) -> str:
    return edited(edited(REG, "voltage: 12 V\n", f"voltage: {volts}\n"), "V12: {voltage: 12 V",
                  f"V12: {{voltage: {volts}")


@pytest.mark.parametrize("volts, headroom", [("6.5 V", 2.5), ("12 V", 8.0)])
def test_regulator_headroom_clear_of_the_margin(volts, headroom):
    # headroom = V_in − V_out; 2.5 V is exactly the 2 V dropout plus the 0.5 V margin: fine
    result = check(on_rail(volts))
    assert of(result, "power.regulator-dropout") == []
    assert sheet_rows(result, "power.regulator-dropout") == rows(
        ("power", "U3", "input headroom V_in − V_out", headroom, "V", "", ""))


@pytest.mark.parametrize("volts, headroom, level", [("6 V", 2.0, "warning"), ("6.4 V", 2.4, "warning"),
                                                    ("5.9 V", 1.9, "error")])
def test_regulator_headroom_edges(volts, headroom, level):
    # exactly the dropout is thin (a warning), below it an error
    text = on_rail(volts)
    tail = ("less than its 2 V dropout; the output will sag and carry the input's ripple"
            if level == "error" else
            "within 500 mV of its 2 V dropout: ripple troughs or a low supply will take it out of regulation")
    assert whole(text, "power.regulator-dropout") == [finding(
        "power.regulator-dropout", level, at(text, "U3:", "V12"), "devices.U3.rail",
        f"U3 makes 4 V from V12 at {volts}: {g4(headroom)} V of headroom, {tail}",
        {"headroom": (headroom, "V"), "dropout": (2.0, "V")}, DROPOUT_FIX)]


def test_regulator_headroom_after_a_series_diode_and_resistor():
    # 7 V less a series diode (0.7 V assumed for silicon, common practice) and R1 1 ohm at the 0.25 A
    # budget (I·R = 0.25 V): 6.05 V in, 2.05 V above the 4 V output: within the margin
    text = on_rail("7 V")
    text = edited(text, "  max_current: 2 A\n", "  max_current: 2 A\n  reverse_protection: D1\n"
                  "  series_resistor: R1\n")
    text = edited(text, "parts: {}\n", "parts:\n  R1: {kind: resistor, value: 1 ohm, power_rating: 1 W, "
                  "ends: [DC_IN, DC_R]}\n  D1: {kind: diode, ends: [DC_R, V12], positive: DC_R}\n")
    v_in = 7 - 0.7 - 0.25 * 1
    result = check(text)
    assert [facts(f) for f in of(result, "power.regulator-dropout")] == [finding(
        "power.regulator-dropout", "warning", at(text, "U3:", "V12"), "devices.U3.rail",
        f"U3 makes 4 V from V12 at {g4(v_in)} V after series diode D1, 0.7 V assumed (700 mV), R1 1 ohm at "
        f"0.25 A (250 mV): {g4(v_in - 4)} V of headroom, within 500 mV of its 2 V dropout: ripple "
        "troughs or a "
        "low supply will take it out of regulation",
        {"headroom": (v_in - 4, "V"), "dropout": (2.0, "V")}, DROPOUT_FIX)]
    assert sheet_rows(result, "power.regulator-dropout") == rows(
        ("power", "U3", "input after series drops", v_in, "V", "", ""),
        ("power", "U3", "input headroom V_in − V_out", v_in - 4, "V", "", ""))


def test_dropout_skips_regulators_it_cannot_judge():
    # U0 is no regulator, U2 names no rail (no input), U5's profile states no dropout (headroom shown,
    # not judged): all
    # come before U3, which is still judged (5.9 V in, 1.9 V of headroom: an error)
    text = edited(on_rail("5.9 V"), "  load-chip:\n",
                  "  open-chip:\n    class: linear-regulator\n    output_voltage: 3 V\n  load-chip:\n")
    text = edited(text, "  U3: {profile: reg-chip, rail: V12, output_rail: V4}\n",
                  "  U0: {profile: load-chip, rail: V12}\n"
                  "  U2: {profile: reg-chip}\n  U5: {profile: open-chip, rail: V12}\n"
                  "  U3: {profile: reg-chip, rail: V12, output_rail: V4}\n")
    result = check(text)
    assert [f.level for f in of(result, "power.regulator-dropout")] == ["error"]
    assert sheet_rows(result, "power.regulator-dropout") == rows(
        ("power", "U5", "input headroom V_in − V_out", 5.9 - 3, "V", "", ""),
        ("power", "U3", "input headroom V_in − V_out", 5.9 - 4, "V", "", ""))


def test_regulator_asked_for_more_than_its_input_heats_nothing_and_has_no_headroom():
    # V4 declared at 14 V from a 12 V input: (12 − 14)·0.25 = −0.5 W is no heat (no junction figures);
    # the headroom 12 − 14 = −2 V is far below the 2 V dropout
    text = edited(REG, "V4: {voltage: 4 V", "V4: {voltage: 14 V")
    result = check(text)
    assert of(result, "power.heat") == []
    assert sheet_rows(result, "power.heat") == rows(("heat", "U3", "regulator dissipation", (12 - 14) * 0.25,
                                                     "W", "", ""))
    assert [f.level for f in of(result, "power.regulator-dropout")] == ["error"]
