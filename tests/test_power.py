"""Power and heat rules: formulas against their sources, each rule firing at its line and quiet
on the clean plan.

Sources of the check values (named again beside each check):
- class-B dissipation: textbook derivation (Sedra & Smith, Microelectronic Circuits, from memory):
  single-ended capacitor-coupled on V_s: V_s²/(2π²·R_L), 12 V into 8 Ω -> 0.912 W; bridge-tied
  load four times that, 3.648 W; split supply ±V_CC: V_CC²/(π²·R_L) per device;
- Boylestad & Nashelsky, Electronic Devices and Circuit Theory, Example 12.8: V_CC = 30 V,
  R_L = 16 Ω -> P_o(max) = 28.125 W, P_i = 35.81 W, about 5.7 W per transistor;
- heat-sink selection worked example: P = 5 W, θJC 3 °C/W, θCS 1 °C/W, Tj,max 150 °C,
  Ta 50 °C -> θSA <= 16 °C/W;
- UL 248-14 (carry 100 %), IEC 60127-2 (time-lag gate: not open before 10 ms at 10 × I_n,
  from memory), 75 % continuous-use derating (common practice);
- R10 preferred ratings 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8 (IEC 60127-1 Annex A / ISO 3);
- inrush 12 V, 4700 µF, 0.1 Ω -> 120 A peak, 3.384 A²s (cross-checked with scipy.integrate.quad);
- chassis-wiring ampacity (Handbook of Electronic Tables and Formulas): AWG 18 16 A, 20 11 A,
  22 7 A, 24 3.5 A, 30 0.86 A; 26 2.2 A and 28 1.4 A from memory.
"""

import math

import pytest
from conftest import EXAMPLES, check, edited, line_of, of
from scipy import integrate, optimize

from speccheck import engine
from speccheck.config import Settings
from speccheck.formulas import amplifiers, fuses, preferred, thermal

HOT = (EXAMPLES / "power-hot-amplifier.yaml").read_text("utf-8")
TOO_LARGE = (EXAMPLES / "power-fuse-too-large.yaml").read_text("utf-8")
QUICK = (EXAMPLES / "power-quick-fuse-inrush.yaml").read_text("utf-8")

R10_FROM_THE_STANDARD = [1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8]  # IEC 60127-1 Annex A, typed in


def sheet(result, owner, name):
    hits = [e.value.value for e in result.sheet if e.owner == owner and e.value.name == name]
    assert hits, f"no sheet entry {owner} / {name}"
    return hits[0]


def half_wave_average(peak):
    """Average of a half-wave rectified sine of this peak, by numerical integration (independent)."""
    return integrate.quad(lambda t: max(0.0, peak * math.sin(2 * math.pi * t)), 0, 1, limit=200)[0]


# The builtin low-voltage amplifier profile loses 3 V at clipping (typical, from memory): on 12 V its
# output peaks at (12 - 3) / 2 = 4.5 V, 0.5625 A into 8 ohm.
U2_PEAK = (12.0 - 3.0) / 2 / 8.0


def clean_budget():
    """The clean plan's supply input at full output, computed independently of the code:
    U2 quiescent 6 mA + its half-wave supply current at full swing (peak 4.5 V / 8 Ω),
    U3 quiescent 5 mA + its stated 10 mA load (profiles in speccheck/profiles/builtin.yaml)."""
    return 0.006 + half_wave_average(U2_PEAK) + 0.005 + 0.010


def rms_of(dc, peak):
    """RMS of a steady current plus a half-wave of this peak, by numerical integration (independent)."""
    mean_square = integrate.quad(lambda t: (dc + max(0.0, peak * math.sin(2 * math.pi * t))) ** 2, 0, 1,
                                 limit=200)[0]
    return math.sqrt(mean_square)


def clean_rms():
    """The clean plan's supply current as the fuse sees it: the RMS of 21 mA steady plus U2's half-waves."""
    return rms_of(0.006 + 0.005 + 0.010, U2_PEAK)


def r10_from_the_list(x):
    for decade in range(-4, 4):
        for step in R10_FROM_THE_STANDARD:
            if step * 10 ** decade >= x * (1 - 1e-12):
                return step * 10 ** decade


# ---- formulas against their sources --------------------------------------------------------

def test_single_ended_and_bridge_dissipation_textbook():
    # Sedra & Smith (from memory): single-ended 12 V into 8 ohm -> 0.912 W, bridge-tied load 3.648 W
    single, _ = amplifiers.class_b_dissipation("single-ended", 12.0, 8.0)
    bridge, _ = amplifiers.class_b_dissipation("bridge", 12.0, 8.0)
    assert single == pytest.approx(0.912, abs=5e-4)
    assert bridge == pytest.approx(3.648, abs=2e-3)


def test_split_supply_boylestad_example_12_8():
    # Boylestad & Nashelsky Example 12.8: VCC 30 V, RL 16 ohm -> Po(max) 28.125 W, Pi 35.81 W, ~5.7 W per
    # transistor
    full = amplifiers.class_b_full_output("split-supply", 30.0, 16.0, -30.0)
    assert full["p_out"] == pytest.approx(28.125, rel=1e-6)
    assert full["p_in"] == pytest.approx(35.81, abs=0.005)
    _, per_device = amplifiers.class_b_dissipation("split-supply", 30.0, 16.0, -30.0)
    assert per_device == pytest.approx(5.7, abs=0.01)


@pytest.mark.parametrize("topology", ["single-ended", "bridge", "split-supply"])
def test_dissipation_maximum_cross_checked_numerically(topology):
    # Independent: integrate supply power minus load power over one cycle of a sine of amplitude A,
    # then let scipy find the amplitude of worst dissipation.
    vs, rl = 12.0, 8.0

    def dissipation(amplitude):
        def supply_power(t):
            v = amplitude * math.sin(2 * math.pi * t)
            if topology == "bridge":
                return vs * abs(v) / rl  # the bridge draws |i| from the one supply
            rail = vs / 2 if topology == "single-ended" else vs
            return rail * abs(v) / rl  # each half-wave from its half-supply (single-ended: ±Vs/2)
        load = amplitude ** 2 / (2 * rl)
        return integrate.quad(supply_power, 0, 1, limit=200)[0] - load

    top = vs if topology != "single-ended" else vs / 2
    best = optimize.minimize_scalar(lambda a: -dissipation(a), bounds=(0, top), method="bounded")
    total, _ = amplifiers.class_b_dissipation(topology, vs, rl, -vs)
    assert total == pytest.approx(-best.fun, rel=1e-4)


def test_heat_sink_worked_example():
    # handbook heat-sink selection: P 5 W, θJC 3, θCS 1, Tj 150 °C, Ta 50 °C -> θSA <= 16 °C/W
    assert thermal.heat_sink_needed(5.0, 150.0, 50.0, 3.0, 1.0) == pytest.approx(16.0)
    assert thermal.junction_temperature(50.0, 5.0, 3.0 + 1.0 + 16.0) == pytest.approx(150.0)


def test_regulator_dissipation():
    # (Vin - Vout) * I: 12 V to 6 V at 10 mA is 60 mW, plus 12 V x 5 mA of ground current (common practice)
    assert thermal.regulator_dissipation(12.0, 6.0, 0.010, 0.005) == pytest.approx(0.06 + 0.06)


def test_r10_series_is_the_standard_list():
    # IEC 60127-1 Annex A / ISO 3: written out, 3.15 and 6.3 are not 10^(i/10)
    assert list(preferred.R10) == R10_FROM_THE_STANDARD
    for x in [0.0374, 0.374, 1.09, 2.0, 3.0, 6.0, 7.99, 8.01, 0.0631, 12.0]:
        assert preferred.r10_up(x) == pytest.approx(r10_from_the_list(x))
    assert preferred.r10_up(2.5) == 2.5 and preferred.r10_up(0.4) == 0.4


def test_inrush_check_value_and_scipy_cross_check():
    # 12 V onto 4700 µF through 0.1 ohm: 120 A peak, 3.384 A²s (I²t = V²C/(2R))
    peak, tau, i2t = fuses.inrush(12.0, 4700e-6, 0.1)
    assert peak == pytest.approx(120.0)
    assert i2t == pytest.approx(3.384)
    numeric = integrate.quad(lambda t: (12.0 / 0.1 * math.exp(-t / (0.1 * 4700e-6))) ** 2, 0, 50 * tau)[0]
    assert i2t == pytest.approx(numeric, rel=1e-6)


def test_awg_table_handbook_values():
    # Handbook of Electronic Tables and Formulas, chassis wiring (26, 28 from memory)
    for gauge, amps in {18: 16, 20: 11, 22: 7, 24: 3.5, 30: 0.86, 26: 2.2, 28: 1.4}.items():
        assert fuses.awg_ampacity(gauge) == (amps, gauge)
    assert fuses.awg_ampacity(23) == (3.5, 24)  # odd gauge: the next thinner row


def test_time_lag_gate_i2t():
    # IEC 60127-2 time-lag (from memory): not open before 10 ms at 10 x In -> (10 A)² x 10 ms for 1 A
    assert fuses.fuse_gate_i2t("time-lag", 1.0) == pytest.approx(10.0 ** 2 * 0.010)
    assert fuses.fuse_gate_i2t("quick-acting", 1.0) == pytest.approx(4.0 ** 2 * 0.003)


# ---- the clean plan ------------------------------------------------------------------------

def test_clean_plan_reports_budget_heat_and_fuse_with_no_power_finding(clean_text):
    result = check(clean_text)
    assert [f for f in result.findings if f.rule.startswith("power.")] == []
    assert sheet(result, "supply", "input current budget") == pytest.approx(clean_budget(), rel=1e-6)
    p_u2 = 12.0 ** 2 / (2 * math.pi ** 2 * 8.0) + 12.0 * 0.006  # Sedra & Smith form plus Vs x Iq
    assert sheet(result, "U2", "package dissipation") == pytest.approx(p_u2)
    assert sheet(result, "U2", "junction temperature at 40 °C ambient") == pytest.approx(40 + p_u2 * 60)
    # fuse: RMS supply current / (0.75 x rerating at 40 °C), rounded up to R10 -> 500 mA; fitted 500 mA
    # time-lag
    rms_name = "RMS of the supply current (class-B half-wave draw)"
    assert sheet(result, "F1", rms_name) == pytest.approx(clean_rms(),
                                                                                                    rel=1e-6)
    least = clean_rms() / (0.75 * (1 - 0.005 * 15))
    assert sheet(result, "F1", "preferred rating (R10)") == pytest.approx(r10_from_the_list(least))
    assert sheet(result, "F1", "preferred rating (R10)") == pytest.approx(0.5)
    assert sheet(result, "F1", "fitted rating") == 0.5


# ---- current budget ------------------------------------------------------------------------

def test_budget_above_the_supply_is_an_error(clean_text):
    text = edited(clean_text, "max_current: 1.5 A", "max_current: 200 mA")
    found = of(check(text), "power.current-budget")
    assert [f.level for f in found] == ["error"]
    shown = f"{clean_budget() * 1e3:.4g} mA"
    assert found[0].message == (f"the build draws {shown} at full output but the dc-adapter supply "
                                "delivers at most 200 mA")
    assert found[0].location.line == line_of(text, "max_current: 200 mA")


def test_budget_near_the_supply_limit_is_a_warning(clean_text):
    text = edited(clean_text, "max_current: 1.5 A", "max_current: 240 mA")
    found = of(check(text), "power.current-budget")
    assert [f.level for f in found] == ["warning"]
    assert f"{clean_budget() / 0.24:.0%} of the 240 mA" in found[0].message


def test_regulator_load_below_its_rail_is_a_warning(clean_text):
    text = edited(clean_text, "load_current: 10 mA", "load_current: 1 mA")
    found = of(check(text), "power.current-budget")
    assert [f.level for f in found] == ["warning"]
    # V6 carries U1's 4 mA quiescent (fm-if-subsystem profile)
    assert found[0].message.startswith("U3 is stated to deliver 1 mA but V6 draws 4 mA")
    assert found[0].location.line == line_of(text, "load_current: 1 mA")


# ---- device supply range -------------------------------------------------------------------


def test_device_above_its_supply_max_is_an_error():
    text = edited(HOT, "supply_max: 24 V", "supply_max: 15 V")
    found = of(check(text), "power.device-supply")
    assert [f.level for f in found] == ["error"]
    assert (
        found[0].message
        == "U2 runs from V18 (18 V), above the 15 V supply_max of profile audio-power-amp-tab"
    )
    assert found[0].location.line == line_of(text, "U2: {profile: audio-power-amp-tab")


def test_device_below_its_supply_min_is_a_warning():
    text = edited(HOT, "supply_min: 8 V", "supply_min: 20 V")
    found = of(check(text), "power.device-supply")
    assert [f.level for f in found] == ["warning"]
    assert "below the 20 V supply_min" in found[0].message


def test_devices_inside_their_range_are_fine(clean_text):
    assert of(check(clean_text), "power.device-supply") == []
    assert of(check(HOT), "power.device-supply") == []


# ---- heat ------------------------------------------------------------------------------------


def hot_power():
    # Sedra & Smith form for single-ended on 18 V into 4 ohm, plus 18 V x 40 mA quiescent (the example's
    # profile)
    return 18.0**2 / (2 * math.pi**2 * 4.0) + 18.0 * 0.040


def test_hot_amplifier_without_heat_sink_is_an_error_with_the_sink_it_needs():
    found = of(check(HOT), "power.heat")
    assert [f.level for f in found] == ["error"]
    f = found[0]
    p = hot_power()
    tj = 40 + p * 50  # T_j = T_a + P·θJA
    need = (150 - 25 - 40) / p - 3 - 1  # θSA = (Tj,max less the margin − Ta)/P − θJC − θCS
    assert f.message.startswith(
        f"U2 dissipates up to {p:.4g} W (single-ended on 18 V into SPK1 (4 ohm)); "
        "with θJA 50 °C/W from profile audio-power-amp-tab its junction reaches "
        f"{tj:.4g} °C"
    )
    assert "above its 150 °C limit" in f.message
    assert f"it needs a heat sink of θSA {need:.4g} °C/W or less (θCS 1 °C/W assumed" in f.message
    assert f.location.line == line_of(HOT, "U2: {profile: audio-power-amp-tab")


def test_declared_heat_sink_that_is_enough_is_fine():
    text = edited(
        HOT,
        'rail: V18, note: "power tab bolted to nothing yet"}',
        "rail: V18, heat_sink: {theta_sa: 5 degC/W, theta_cs: 0.5 degC/W}}",
    )
    result = check(text)
    assert of(result, "power.heat") == []
    assert sheet(result, "U2", "junction temperature at 40 °C ambient") == pytest.approx(
        40 + hot_power() * 8.5
    )


def test_declared_heat_sink_too_small():
    text = edited(
        HOT,
        'rail: V18, note: "power tab bolted to nothing yet"}',
        "rail: V18, heat_sink: {theta_sa: 20 degC/W}}",
    )
    found = of(check(text), "power.heat")
    assert [f.level for f in found] == ["error"]  # 40 + 4.82 W x 24 °C/W is above 150 °C
    need = (125 - 40) / hot_power() - 3 - 1
    assert (
        f"the declared heat sink (20 degC/W) is not enough: it needs θSA of {need:.4g} °C/W or less"
        in found[0].message
    )
    assert found[0].location.line == line_of(text, "heat_sink: {theta_sa: 20 degC/W}")


def test_junction_within_the_margin_is_a_warning():
    text = edited(
        HOT,
        'rail: V18, note: "power tab bolted to nothing yet"}',
        "rail: V18, heat_sink: {theta_sa: 15 degC/W}}",
    )
    found = of(check(text), "power.heat")
    assert [f.level for f in found] == ["warning"]
    assert "within 25 °C of its 150 °C limit" in found[0].message


def test_copper_area_theta_ja_overrides_the_profile(clean_text):
    # without the stated copper area U2 falls back to the profile's 100 °C/W: 40 + 0.984 W x 100 = 138 °C >
    # 125 °C
    text = edited(
        clean_text,
        'U2: {profile: audio-power-amp-lv, rail: V12, theta_ja: 60 degC/W, note: "copper area under the '
        'package"}',
        "U2: {profile: audio-power-amp-lv, rail: V12}",
    )
    found = of(check(text), "power.heat")
    assert [f.level for f in found] == ["warning"]
    p = 12.0**2 / (2 * math.pi**2 * 8.0) + 12.0 * 0.006
    assert (
        f"with θJA 100 °C/W from profile audio-power-amp-lv its junction reaches {40 + p * 100:.4g} °C"
        in found[0].message
    )
    assert found[0].location.line == line_of(text, "U2: {profile: audio-power-amp-lv")


def test_bridge_profile_dissipates_four_times():
    text = edited(HOT, "output_topology: single-ended", "output_topology: bridge")
    result = check(text)
    single = 18.0**2 / (2 * math.pi**2 * 4.0)
    assert sheet(result, "U2", "output stage dissipation, worst case (bridge)") == pytest.approx(4 * single)


def test_split_supply_needs_its_negative_rail():
    text = edited(HOT, "output_topology: single-ended", "output_topology: split-supply")
    found = of(check(text), "power.heat")
    assert [f.level for f in found] == ["note"]
    assert "devices.U2.negative_rail" in found[0].message


def test_split_supply_with_both_rails():
    text = edited(HOT, "output_topology: single-ended", "output_topology: split-supply")
    text = edited(
        text, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n  VNEG: {voltage: -18 V, from: supply}\n"
    )
    text = edited(
        text, 'rail: V18, note: "power tab bolted to nothing yet"}', "rail: V18, negative_rail: VNEG}"
    )
    result = check(text)
    # ±18 V into 4 ohm: 18²/(π²·4) per device, twice for the package
    assert sheet(result, "U2", "per output device, worst case") == pytest.approx(18.0**2 / (math.pi**2 * 4.0))
    assert sheet(result, "VNEG", "rail current budget") == pytest.approx(
        0.040 + half_wave_average(18.0 / 4.0)
    )


def test_missing_ambient_is_one_note(clean_text):
    text = edited(clean_text, "  ambient_max: 40 degC\n", "")
    found = of(check(text), "power.heat")
    assert [f.level for f in found] == ["note"]
    assert (
        found[0].message
        == "build.ambient_max is not stated: the junction temperature of U2, U3 is not checked"
    )


def test_hot_regulator(clean_text):
    text = edited(clean_text, "load_current: 10 mA", "load_current: 500 mA")
    found = of(check(text), "power.heat")
    assert [f.level for f in found] == ["error"]
    p = (12 - 6) * 0.5 + 12 * 0.005
    assert found[0].message.startswith(
        f"U3 dissipates up to {p:.4g} W (6 V across it at 500 mA, plus its ground current)"
    )
    assert found[0].location.line == line_of(text, "U3: {profile: regulator-3-terminal")


# ---- regulator dropout ----------------------------------------------------------------------


def test_regulator_without_headroom(clean_text):
    text = edited(clean_text, "V12: {voltage: 12 V, from: supply}", "V12: {voltage: 7.5 V, from: supply}")
    found = of(check(text), "power.regulator-dropout")
    assert [f.level for f in found] == ["error"]
    assert found[0].message.startswith(
        "U3 makes 6 V from V12 at 7.5 V: 1.5 V of headroom, less than its 2 V dropout"
    )
    assert found[0].location.line == line_of(text, "U3: {profile: regulator-3-terminal")


def test_regulator_with_headroom_is_fine(clean_text):
    assert of(check(clean_text), "power.regulator-dropout") == []


# ---- fuse size ------------------------------------------------------------------------------


def fuse_line(text):
    return line_of(text, "F1: {kind: fuse")


def test_fuse_below_the_normal_current_is_an_error(clean_text):
    text = edited(clean_text, "current_rating: 500 mA", "current_rating: 100 mA")
    found = of(check(text), "power.fuse-size")
    assert [f.level for f in found] == ["error"]
    # rerated 0.5 %/°C above 25 °C at 40 °C (from memory): 100 mA carries 92.5 mA
    assert found[0].message.startswith(f"F1 (100 mA; 92.5 mA at 40 °C) is far below the build's normal "
                                       f"current of {clean_rms() * 1e3:.4g} mA, its budget at full output "
                                       "held continuously")
    # IEC 60127-2 (from memory): a link carries 1.5 x I_n for an hour; past that it opens in use
    assert f"{clean_rms() / 0.0925:.0%} of its rerated rating, past the 1.5 × rating" in found[0].message
    # derate to 75 % (common practice), rerate 0.5 %/°C above 25 °C at 40 °C (from memory), round up to R10
    pick = r10_from_the_list(clean_rms() / (0.75 * (1 - 0.005 * 15)))
    assert found[0].message.endswith(f"so it opens in normal use; fit {pick * 1e3:.4g} mA")
    assert found[0].location.line == fuse_line(text)


def test_fuse_above_75_percent_is_a_nuisance_warning(clean_text):
    text = edited(clean_text, "current_rating: 500 mA", "current_rating: 400 mA")
    found = of(check(text), "power.fuse-size")
    assert [f.level for f in found] == ["warning"]
    share = clean_rms() / (0.4 * (1 - 0.005 * 15))
    assert f"runs at {share:.0%} of its rerated rating (keep under 75%) at the build's normal current" in \
        found[0].message
    assert "held continuously" in found[0].message  # the current assumed is said


def test_fuse_a_little_below_the_full_output_current_is_a_warning(clean_text):
    # The normal current assumes full output held continuously; an IEC 60127-2 link carries
    # 1.5 x I_n for an hour (from memory), so a fuse a few per cent under it is a thin margin.
    carry = clean_rms() / (1 - 0.005 * 15)  # the rating that carries the RMS current at 40 °C
    text = edited(clean_text, "current_rating: 500 mA", f"current_rating: {carry * 0.98 * 1e3:.0f} mA")
    found = of(check(text), "power.fuse-size")
    assert [f.level for f in found] == ["warning"]
    assert "runs at 102% of its rerated rating" in found[0].message


def test_fuse_past_its_hour_gate_is_an_error(clean_text):
    # IEC 60127-2 (from memory): a link carries 1.5 x I_n for an hour; at 25 °C (no rerating) a
    # rating just above RMS / 1.5 is a warning, just below it an error.
    text = edited(clean_text, "ambient_max: 40 degC", "ambient_max: 25 degC")
    assert 0.290 < clean_rms() < 0.300
    gate = clean_rms() / 1.5
    above = edited(text, "current_rating: 500 mA", f"current_rating: {math.ceil(gate * 1e3) + 1} mA")
    below = edited(text, "current_rating: 500 mA", f"current_rating: {math.floor(gate * 1e3) - 1} mA")
    assert [f.level for f in of(check(above), "power.fuse-size")] == ["warning"]
    assert [f.level for f in of(check(below), "power.fuse-size")] == ["error"]


def test_fuse_several_times_too_large_is_a_warning():
    found = of(check(TOO_LARGE), "power.fuse-size")
    assert [f.level for f in found] == ["warning"]
    # U2 (builtin low-voltage amplifier profile, 6 mA) at full output on 12 V into 8 ohm, derated and
    # rerated, R10
    normal = rms_of(0.006, U2_PEAK)
    preferred = r10_from_the_list(normal / (0.75 * (1 - 0.005 * 15)))
    assert found[0].message.startswith(
        f"F1 (5 A) is {5 / preferred:.3g} times the {preferred * 1e3:.4g} mA "
        f"the build needs (normal current {normal * 1e3:.4g} mA"
    )
    assert found[0].location.line == fuse_line(TOO_LARGE)


def test_fuse_settings_are_read_from_the_project(clean_text):
    # derating 0.9: RMS / (0.9 x 0.925) -> R10 400 mA; the fitted 500 mA is 1.25 times that, above 1.2
    settings = Settings(rule_settings={"power.fuse-size": {"oversize_factor": 1.2, "derating": 0.9}})
    assert r10_from_the_list(clean_rms() / (0.9 * 0.925)) == 0.4
    found = of(check(clean_text, settings=settings), "power.fuse-size")
    assert [f.level for f in found] == ["warning"] and "1.25 times the 400 mA" in found[0].message


# ---- fuse against the wiring --------------------------------------------------------------


def test_fuse_above_the_wire_ampacity_is_an_error():
    found = of(check(TOO_LARGE), "power.fuse-wire")
    assert [f.level for f in found] == ["error"]
    # 24 AWG chassis wiring: 3.5 A (Handbook of Electronic Tables and Formulas)
    assert found[0].message == (
        "F1 (5 A) is above the 3.5 A that the 24 AWG supply wiring carries: a fault "
        "can overheat the wire before the fuse opens"
    )
    assert found[0].location.line == fuse_line(TOO_LARGE)


def test_odd_gauge_uses_the_thinner_row():
    text = edited(TOO_LARGE, "wire_gauge: 24", "wire_gauge: 23")
    found = of(check(text), "power.fuse-wire")
    assert "23 AWG (checked as 24 AWG)" in found[0].message


def test_build_drawing_more_than_the_wire():
    text = edited(HOT, "wire_gauge: 20", "wire_gauge: 32")
    found = of(check(text), "power.fuse-wire")
    assert [f.level for f in found] == ["error", "error"]
    # 32 AWG: 0.53 A (chassis-wiring table, from memory)
    wire = next(f for f in found if f.message.startswith("The build draws"))
    assert wire.message.startswith(
        f"The build draws {hot_budget() * 1e3:.4g} mA at full output, more than the 530 mA"
    )
    assert wire.location.line == line_of(text, "wire_gauge: 32")


def hot_budget():
    return 0.040 + half_wave_average(9.0 / 4.0)


def test_fuse_inside_the_wire_rating_is_fine(clean_text):
    assert of(check(clean_text), "power.fuse-wire") == []


# ---- fuse and inrush ------------------------------------------------------------------------


def test_quick_acting_fuse_behind_a_large_reservoir():
    found = of(check(QUICK), "power.fuse-inrush")
    assert [f.level for f in found] == ["warning"]
    f = found[0]
    # 12 V onto 2200 µF through the assumed 0.5 ohm: I²t by numerical integration of (V/R e^(-t/RC))²
    i2t = integrate.quad(lambda t: (12 / 0.5 * math.exp(-t / (0.5 * 2200e-6))) ** 2, 0, 0.1)[0]
    assert f.message.startswith(
        "Switching 12 V onto C30 (2.2 mF) through 500 mΩ (an assumed 500 mΩ of "
        "supply, leads, fuse and ESR: the plan states no source_resistance) gives a 24 A peak and "
        f"{i2t:.4g} A²s"
    )
    # IEC 60127-2 quick-acting gate (from memory): 4 x 630 mA for 3 ms
    assert f"more than the {(4 * 0.63) ** 2 * 0.003:.4g} A²s a quick-acting link withstands" in f.message
    assert f.message.endswith(
        "the quick-acting F1 will open at switch-on; fit a time-lag fuse of the same rating"
    )
    assert f.location.line == line_of(QUICK, "F1: {kind: fuse")


def test_time_lag_fuse_rides_the_same_surge():
    assert of(check(edited(QUICK, "speed: quick-acting", "speed: time-lag")), "power.fuse-inrush") == []


def test_declared_melting_i2t_is_used():
    text = edited(QUICK, "speed: quick-acting,", "speed: quick-acting, melting_i2t: 5 A^2 s,")
    assert of(check(text), "power.fuse-inrush") == []


def test_inrush_check_value_in_a_plan(clean_text):
    # 12 V, 4700 µF, 0.1 ohm -> 120 A and 3.384 A²s, above what a 500 mA time-lag link withstands
    text = edited(clean_text, "  wire_gauge: 22\n", "  wire_gauge: 22\n  source_resistance: 0.1 ohm\n")
    text = edited(text, "C30: {kind: capacitor, value: 1000 uF", "C30: {kind: capacitor, value: 4700 uF")
    found = of(check(text), "power.fuse-inrush")
    assert [f.level for f in found] == ["warning"]
    assert "gives a 120 A peak and 3.384 A²s" in found[0].message
    assert found[0].message.endswith(
        "F1 may open at switch-on; add series resistance or a soft-start ahead of the capacitor"
    )


def test_clean_fuse_rides_its_inrush(clean_text):
    assert of(check(clean_text), "power.fuse-inrush") == []


# ---- fuse voltage and missing fuse ------------------------------------------------------------


def test_fuse_voltage_rating_below_the_supply(clean_text):
    text = edited(clean_text, "current_rating: 500 mA,", "current_rating: 500 mA, voltage_rating: 6 V,")
    found = of(check(text), "power.fuse-voltage")
    assert [f.level for f in found] == ["error"]
    assert found[0].message == "F1 is rated 6 V but protects a 12 V supply"


def test_fuse_voltage_rating_enough(clean_text):
    text = edited(clean_text, "current_rating: 500 mA,", "current_rating: 500 mA, voltage_rating: 250 V,")
    assert of(check(text), "power.fuse-voltage") == []


def test_missing_fuse_is_a_warning(clean_text):
    text = edited(clean_text, "  fuse: F1\n", "")
    found = of(check(text), "power.fuse-missing")
    assert [f.level for f in found] == ["warning"]
    pick = r10_from_the_list(clean_rms() / (0.75 * (1 - 0.005 * 15)))  # as in the fuse-size checks above
    assert found[0].message == (f"The dc-adapter supply (up to 1.5 A) has no fuse; the build needs about "
                                f"{pick * 1e3:.4g} mA")
    assert found[0].location.line == line_of(text, "kind: dc-adapter")


def test_supply_limited_below_the_need_needs_no_fuse(clean_text):
    text = edited(edited(clean_text, "  fuse: F1\n", ""), "max_current: 1.5 A", "max_current: 200 mA")
    assert of(check(text), "power.fuse-missing") == []


# ---- resistor as a fuse -----------------------------------------------------------------------


def with_resistor(clean_text, part, as_fuse=True):
    text = edited(
        clean_text, "  fuse: F1\n", "  fuse: R1\n" if as_fuse else "  fuse: F1\n  series_resistor: R1\n"
    )
    if as_fuse:
        text = edited(
            text, "F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, V12]}", part
        )
    else:
        text = edited(
            text,
            "F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, V12]}",
            "F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, DC_F]}\n  " + part,
        )
    return text


def test_plain_resistor_as_the_only_protection_is_an_error(clean_text):
    text = with_resistor(
        clean_text, "R1: {kind: resistor, value: 1 ohm, power_rating: 500 mW, ends: [DC_IN, V12]}"
    )
    found = of(check(text), "power.resistor-fuse")
    assert [f.level for f in found] == ["error"]
    # the 12 V adapter would push 12 A through 1 ohm but is limited to its 1.5 A: I²R = 2.25 W, 4.5 times
    # the 0.5 W rating (plain arithmetic)
    assert found[0].message.startswith("R1 (1 ohm) is the only protection on the supply input but is a plain "
                                       "resistor: into a short it takes 2.25 W (limited to 1.5 A by the "
                                       "dc-adapter "
                                       "supply), 4.5 times its 500 mW rating")
    assert found[0].location.line == line_of(text, "R1: {kind: resistor")


def test_resistor_fuse_behind_a_1_a_adapter_takes_about_1_w(clean_text):
    # the case: 1 ohm as the only fuse behind an adapter limited to 1 A: 1 W into a short, not 144 W
    text = with_resistor(edited(clean_text, "max_current: 1.5 A", "max_current: 1 A"),
                         "R1: {kind: resistor, value: 1 ohm, power_rating: 500 mW, ends: [DC_IN, V12]}")
    result = check(text)
    assert sheet(result, "R1", "power into a short at its far end") == pytest.approx(1.0)
    # 2 times its rating: hot, not afire
    assert [f.level for f in of(result, "power.resistor-fuse")] == ["warning"]
    # behind a 500 mA limit it stays inside its rating: a note
    text = edited(text, "max_current: 1 A", "max_current: 500 mA")
    assert [f.level for f in of(check(text), "power.resistor-fuse")] == ["note"]


def test_resistor_fuse_on_a_battery_uses_its_internal_resistance(clean_text):
    # a 12 V battery stated to deliver 40 A into a short: R_int = 12/40 = 0.3 ohm; through 1 ohm,
    # I = 12 / 1.3 = 9.23 A and I²R = 85.2 W (plain arithmetic)
    text = edited(clean_text, "  kind: dc-adapter\n", "  kind: battery\n")
    text = edited(text, "max_current: 1.5 A", "max_current: 40 A")
    text = with_resistor(text, "R1: {kind: resistor, value: 1 ohm, power_rating: 500 mW, ends: [DC_IN, V12]}")
    result = check(text)
    assert sheet(result, "R1", "power into a short at its far end") == pytest.approx((12 / 1.3) ** 2)
    assert [f.level for f in of(result, "power.resistor-fuse")] == ["error"]


def test_fusible_resistor_as_fuse_is_accepted(clean_text):
    text = with_resistor(clean_text, "R1: "
                                     "{kind: resistor, value: 1 ohm, power_rating: 500 mW, fusible: true, "
                                     "ends: [DC_IN, V12]}")
    # behind the adapter's 1.5 A limit it takes 2.25 W and will not open, but the limit holds the fault:
    # a note
    assert [f.level for f in of(check(text), "power.resistor-fuse")] == ["note"]
    assert of(check(text), "power.fuse-missing") == []


def test_series_resistor_running_hot(clean_text):
    text = with_resistor(
        clean_text,
        "R1: {kind: resistor, value: 1 ohm, power_rating: 125 mW, ends: [DC_F, V12]}",
        as_fuse=False,
    )
    found = of(check(text), "power.resistor-fuse")
    assert [f.level for f in found] == ["warning"]
    watts = clean_rms() ** 2 * 1.0  # it heats on the RMS of the supply current
    assert found[0].message == (f"R1 dissipates {watts * 1e3:.4g} mW in normal use, {watts / 0.125:.0%} "
                                f"of its 125 mW "
                                f"rating (keep under 50%)")


def test_series_resistor_dropping_too_much(clean_text):
    text = with_resistor(
        clean_text, "R1: {kind: resistor, value: 10 ohm, power_rating: 2 W, ends: [DC_F, V12]}", as_fuse=False
    )
    found = of(check(text), "power.resistor-fuse")
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith(f"R1 drops {clean_budget() * 10:.4g} V at the build's")


# ---- reverse polarity -----------------------------------------------------------------------------


def test_no_reverse_protection_is_a_warning(clean_text):
    text = edited(clean_text, "  reverse_protection: D1\n", "")
    found = of(check(text), "power.reverse-polarity")
    assert [f.level for f in found] == ["warning"]
    assert (
        found[0].message
        == "nothing protects C30, C31, C20, U1, U2, U3 if the adapter is connected the wrong way round"
    )
    assert found[0].location.line == line_of(text, "kind: dc-adapter")


def test_reverse_protection_none_is_pointed_at(clean_text):
    text = edited(clean_text, "reverse_protection: D1", "reverse_protection: none")
    found = of(check(text), "power.reverse-polarity")
    assert found[0].message.endswith("(reverse_protection: none)")
    assert found[0].location.line == line_of(text, "reverse_protection: none")


def test_shunt_diode_is_protection(clean_text):
    assert of(check(clean_text), "power.reverse-polarity") == []
    assert of(check(clean_text), "power.reverse-diode") == []


def test_shunt_diode_turned_round_shorts_the_supply(clean_text):
    text = edited(clean_text, "ends: [GND, V12], positive: GND,", "ends: [GND, V12], positive: V12,")
    found = of(check(text), "power.reverse-diode")
    assert [f.level for f in found] == ["error"]
    assert (
        found[0].message
        == "D1 has its anode on V12 and its cathode on GND: it conducts in normal use and shorts the supply"
    )
    assert found[0].location.line == line_of(text, "D1: {kind: diode")


def test_shunt_diode_without_fuse(clean_text):
    text = edited(clean_text, "  fuse: F1\n", "")
    found = of(check(text), "power.reverse-diode")
    assert [f.level for f in found] == ["warning"]
    assert "no fuse is declared ahead of it" in found[0].message


def test_series_diode_turned_round_blocks_the_supply(clean_text):
    text = edited(
        clean_text,
        "D1: {kind: diode, ends: [GND, V12], positive: GND,",
        "D1: {kind: diode, ends: [DC_IN2, V12], positive: V12,",
    )
    found = of(check(text), "power.reverse-diode")
    assert [f.level for f in found] == ["error"]
    assert found[0].message.startswith("series diode D1 has its cathode toward the input")


# ---- incomplete inputs ------------------------------------------------------------------------------


def test_unknown_load_is_a_note_and_keeps_the_fuse_unjudged(clean_text):
    text = edited(clean_text, "    load: SPK1\n", "")
    result = check(text)
    found = of(result, "power.heat")
    assert [f.level for f in found] == ["note"]
    assert found[0].message.startswith("no load impedance for U2: name its speaker in the audio-amp stage")
    assert found[0].location.line == line_of(text, "- stage: audio-amp")
    # the budget is then a lower bound: the fuse is not called too large on it
    assert of(result, "power.fuse-size") == []


@pytest.mark.parametrize("name", ["power-hot-amplifier.yaml", "mains-bench-unit.yaml"])
def test_any_line_left_out_gives_findings_not_tracebacks(name):
    lines = (EXAMPLES / name).read_text("utf-8").splitlines(keepends=True)
    for i in range(len(lines)):
        result = check("".join(lines[:i] + lines[i + 1 :]))
        crashed = [f.message for f in result.findings if f.stage == "internal"]
        assert crashed == [], f"line {i + 1} left out: {crashed}"


def test_fuse_on_the_rectifier_side_is_sized_on_the_pulse_rms():
    # a capacitor-input rectifier draws its current in pulses whose RMS is about 1.8 x the DC
    # (1.5 to 2.5 by conduction angle: common practice); F1 sits between the bridge and the reservoir
    result = engine.check_file(EXAMPLES / "mains-bench-unit.yaml")
    sheet = {(e.owner, e.value.name): e.value.value for e in result.sheet if e.section == "fuse"}
    dc = sheet[("F1", "normal current (budget at full output)")]
    assert sheet[("F1", "RMS of the rectifier charging pulses")] == pytest.approx(1.8 * dc)


def test_fuse_of_a_dc_adapter_carries_smooth_dc(clean_text):
    result = check(clean_text)
    assert not [e for e in result.sheet if e.value.name == "RMS of the rectifier charging pulses"]


# ---- headroom after series drops; inrush without a fuse ---------------------------------------------

def nine_volt_with_series_diode(clean_text, diode="D1: {kind: diode, ends: [DC_F, V12], positive: DC_F}"):
    """The clean plan on 9 V, its shunt diode replaced by a series diode between the fuse and V12."""
    text = clean_text.replace("voltage: 12 V", "voltage: 9 V")
    text = edited(text, "F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, V12]}",
                  "F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, DC_F]}")
    return edited(text, 'D1: {kind: diode, ends: [GND, V12], positive: GND, note: "shunt diode behind the '
                        'fuse, cathode on V12"}', diode)


def test_regulator_headroom_counts_the_series_diode(clean_text):
    # the case: 9 V less a 0.7 V silicon diode (common practice) leaves 2.3 V above the 6 V
    # output, not 3 V: inside the 0.5 V margin over the 2 V dropout (builtin regulator profile): a warning
    text = nine_volt_with_series_diode(clean_text)
    result = check(text)
    assert sheet(result, "U3", "input headroom V_in − V_out") == pytest.approx(9.0 - 0.7 - 6.0)
    found = of(result, "power.regulator-dropout")
    assert [f.level for f in found] == ["warning"] and "series diode D1" in found[0].message
    # a stated Schottky drop of 0.35 V leaves 2.65 V: clear of the margin
    schottky = nine_volt_with_series_diode(
        clean_text, "D1: {kind: diode, forward_voltage: 0.35 V, ends: [DC_F, V12], positive: DC_F}")
    assert of(check(schottky), "power.regulator-dropout") == []


def test_inrush_is_computed_without_a_fuse(clean_text):
    # 12 V onto C30 (1000 uF) through the assumed 0.5 ohm loop: 24 A peak, I²t = V²C/(2R) = 0.144 A²s
    text = edited(clean_text, "  fuse: F1\n", "")
    result = check(text)
    assert sheet(result, "supply input", "inrush peak") == pytest.approx(12.0 / 0.5)
    assert sheet(result, "supply input", "inrush I²t") == pytest.approx(12.0 ** 2 * 1000e-6 / (2 * 0.5))


def test_inrush_counts_a_resistor_used_as_the_fuse(clean_text):
    # 1 ohm as the fuse plus the assumed 0.5 ohm: 12 / 1.5 = 8 A peak (plain arithmetic)
    text = with_resistor(clean_text, "R1: {kind: resistor, value: 1 ohm, power_rating: 2 W, fusible: true, "
                                     "ends: [DC_IN, V12]}")
    assert sheet(check(text), "supply input", "inrush peak") == pytest.approx(12.0 / 1.5)


# ---- thresholds just inside and just outside --------------------------------------------


def test_fuse_size_thresholds_at_their_edges(clean_text):
    # The clean plan's normal (RMS) current clean_rms() at 40 °C ambient, rerated by 0.5 %/°C above
    # 25 °C (from memory) and derated to 75 % (common practice), gives the least rating; rounded up
    # to R10 (IEC 60127-1) the preferred one; oversize warning above 2 × preferred. Each rating is
    # tried 1 mA inside and 1 mA outside its edge.
    carry = clean_rms() / (1 - 0.005 * 15)  # the rating whose rerated value carries the RMS current
    least = carry / 0.75
    gate = carry / 1.5  # IEC 60127-2 (from memory): 1.5 x I_n for an hour; below it the fuse opens in use
    preferred = r10_from_the_list(least)

    def levels(milliamps: float):
        text = edited(clean_text, "current_rating: 500 mA", f"current_rating: {milliamps:.0f} mA")
        return [f.level for f in of(check(text), "power.fuse-size")]

    assert levels(math.ceil(least * 1e3)) == []  # just above the least rating
    assert levels(math.floor(least * 1e3) - 1) == ["warning"]  # just below it
    assert levels(2 * preferred * 1e3) == []  # exactly twice the preferred rating
    assert levels(2 * preferred * 1e3 + 10) == ["warning"]  # just over twice
    assert levels(math.floor(carry * 1e3) - 1) == ["warning"]  # below the full-output current: thin margin
    assert levels(math.ceil(gate * 1e3) + 1) == ["warning"]
    assert levels(math.floor(gate * 1e3) - 1) == ["error"]


def test_melting_i2t_share_at_its_edge(clean_text):
    # The clean plan switches 12 V onto C30 (1000 µF) through the assumed 0.5 ohm loop: I²t =
    # V²·C/(2R) = 0.144 A²s. A stated melting I²t is used at 30 % for repeated switch-on (the
    # pulse_share setting, from memory): 0.48 A²s gives exactly 0.144 (fine), 0.47 A²s gives 0.141.
    i2t = 12.0 ** 2 * 1000e-6 / (2 * 0.5)

    def found(melting: str):
        text = edited(clean_text, "speed: time-lag, ends: [DC_IN, V12]",
                      f"speed: time-lag, melting_i2t: {melting}, ends: [DC_IN, V12]")
        return of(check(text), "power.fuse-inrush")

    assert found(f"{i2t / 0.3 * 1.001:.5f} A^2 s") == []
    below = found(f"{i2t / 0.3 * 0.999:.5f} A^2 s")
    assert [f.level for f in below] == ["warning"]
    assert "× 30% for repeated switch-on" in below[0].message


def test_regulator_dissipation_and_junction_in_the_clean_plan(clean_text):
    # U3: 12 V in, 6 V out (rail V6), its stated 10 mA load, 5 mA ground current (builtin
    # regulator profile): (12 − 6)·0.010 + 12·0.005 = 0.12 W; at 65 °C/W and 40 °C: 47.8 °C.
    result = check(clean_text)
    assert sheet(result, "U3", "regulator dissipation") == pytest.approx(0.12)
    assert sheet(result, "U3", "junction temperature at 40 °C ambient") == pytest.approx(40 + 0.12 * 65)
    # the output voltage from the profile when the regulator names no output rail: the same figure
    text = edited(clean_text, "rail: V12, output_rail: V6, load_current: 10 mA}",
                  "rail: V12, load_current: 10 mA}")
    assert sheet(check(text), "U3", "regulator dissipation") == pytest.approx(0.12)
