"""Mains and hazardous-voltage rules: the cautions in every format, and the checks behind them.

Check values:
- extra-low-voltage limits, IEC 62368-1 ES1 (from memory): 30 V rms AC, 60 V DC; the SELV
  set of IEC 61140 / IEC 61558-1 (50 V rms AC, 120 V ripple-free DC) as the alternative setting;
- fuse and switch in the line (hot) conductor, never only in the neutral: common practice of
  every national wiring code;
- primary fuse from the transformer rating: I_p = VA / V_mains (common practice), time-lag,
  about twice I_p for the magnetising inrush (from memory), rounded up to R10
  (IEC 60127-1 Annex A: 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8).
"""

import json
import math

import pytest
from click.testing import CliRunner
from conftest import EXAMPLES, check, edited, line_of, of

from speccheck.cli import main
from speccheck.config import Settings

MAINS_FILE = EXAMPLES / "mains-bench-unit.yaml"
MAINS = MAINS_FILE.read_text("utf-8")

CAUTION_WORDS = [
    "HAZARDOUS VOLTAGE",
    "discharge every capacitor",
    "line (live) conductor on the primary",
    "protective earth",
    "double-insulated (class II)",
    "strain relief",
    "insulated (shrouded) terminals",
    "mains-rated wire",
    "creepage and clearance",
    "local electrical codes",
    "licensed electrician",
]


def fused(
    text=MAINS,
    fuse="{kind: fuse, current_rating: 125 mA, speed: time-lag, voltage_rating: 250 V, ends: [L, L_F]}",
):
    """The bench unit with a primary fuse ahead of the switch in the line, and the earth bonded."""
    text = edited(
        text, "S1: {kind: switch, ends: [L, L_SW]", f"F2: {fuse}\n  S1: {{kind: switch, ends: [L_F, L_SW]"
    )
    text = edited(text, "    switch: S1\n", "    switch: S1\n    primary_fuse: F2\n")
    return edited(text, "earth: none", "earth: bonded")


def r10_up(x):
    for decade in range(-4, 3):
        for step in [1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8]:
            if step * 10**decade >= x:
                return step * 10**decade


# ---- cautions ----------------------------------------------------------------------------------


def test_mains_build_gets_every_caution_and_a_note():
    result = check(MAINS)
    joined = "\n".join(result.cautions)
    for words in CAUTION_WORDS:
        assert words in joined, words
    assert (
        result.cautions[0]
        == "HAZARDOUS VOLTAGE: this build runs from the mains (230 V). Touching it can kill."
    )
    assert result.cautions[-1].startswith("speccheck is a review aid, not an approval")
    found = of(result, "mains.hazard")
    assert [f.level for f in found] == ["note"]
    assert found[0].location.line == line_of(MAINS, "kind: mains-transformer")


def test_low_voltage_build_has_no_caution(clean_text):
    result = check(clean_text)
    assert result.cautions == [] and of(result, "mains.hazard") == []


def test_rail_above_the_es1_dc_limit(clean_text):
    # IEC 62368-1 ES1 (from memory): 60 V DC
    text = edited(clean_text, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n  HV: {voltage: 65 V}\n")
    result = check(text)
    assert result.cautions[0].startswith("HAZARDOUS VOLTAGE: rail HV at 65 V is above the 60 V DC limit")
    assert of(result, "mains.hazard")[0].location.line == line_of(text, "HV: {voltage: 65 V}")
    below = edited(clean_text, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n  HV: {voltage: 59 V}\n")
    assert check(below).cautions == []


def test_selv_limits_by_setting(clean_text):
    # SELV, IEC 61140 / IEC 61558-1: 120 V ripple-free DC
    text = edited(clean_text, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n  HV: {voltage: 65 V}\n")
    settings = Settings(rule_settings={"mains.hazard": {"limit_dc": 120.0, "limit_ac_rms": 50.0}})
    assert check(text, settings=settings).cautions == []


def test_transformer_secondary_above_the_ac_limit():
    text = edited(MAINS, "secondary_voltage: 15 V", "secondary_voltage: 36 V")
    assert "transformer T1's secondary (36 V) is above the 30 V rms AC limit" in check(text).cautions[0]


def test_cautions_in_text_and_json_output():
    text_out = CliRunner().invoke(main, ["check", str(MAINS_FILE)]).output
    for words in CAUTION_WORDS:
        assert words in text_out, words
    assert text_out.index("HAZARDOUS VOLTAGE") < text_out.index("mains.primary-fuse")
    report = json.loads(CliRunner().invoke(main, ["check", "--format", "json", str(MAINS_FILE)]).output)
    cautions = report["files"][0]["cautions"]
    for words in CAUTION_WORDS:
        assert any(words in c for c in cautions), words


@pytest.mark.parametrize("fmt", ["sarif", "markdown"])
def test_cautions_in_the_other_formats(fmt):
    out = CliRunner().invoke(main, ["check", "--format", fmt, str(MAINS_FILE)]).output
    for words in CAUTION_WORDS:
        assert words in out, (fmt, words)


# ---- primary fuse --------------------------------------------------------------------------------


def test_missing_primary_fuse_is_an_error():
    found = of(check(MAINS), "mains.primary-fuse")
    assert [f.level for f in found] == ["error"]
    # 12 VA / 230 V = 52 mA; twice that for the inrush, rerated for 40 °C, up to R10 -> 125 mA
    preferred = r10_up(2 * 12 / 230 / (1 - 0.005 * 15))
    assert preferred == 0.125
    assert found[0].message.startswith(
        "the mains primary has no fuse (supply.mains.primary_fuse); fit a "
        "time-lag 125 mA fuse in the line conductor"
    )
    assert found[0].location.line == line_of(MAINS, "transformer: T1")


def test_primary_fuse_in_the_line_sized_right_is_fine():
    text = fused()
    assert of(check(text), "mains.primary-fuse") == []
    assert of(check(text), "mains.switch-line") == []


def test_primary_fuse_in_the_neutral_is_an_error():
    text = edited(fused(), "ends: [L, L_F]}", "ends: [N, N_F]}")
    text = edited(text, "primary: [L_SW, N]", "primary: [L_SW, N_F]")
    text = edited(text, "S1: {kind: switch, ends: [L_F, L_SW]", "S1: {kind: switch, ends: [L, L_SW]")
    found = of(check(text), "mains.primary-fuse")
    assert [f.level for f in found] == ["error"]
    assert found[0].message.startswith("F2 (N, N_F) is in the neutral (L is the line)")
    assert found[0].location.line == line_of(text, "F2: {kind: fuse")


def test_quick_acting_primary_fuse_is_a_warning():
    found = of(
        check(
            edited(
                fused(),
                "speed: time-lag, voltage_rating: 250 V",
                "speed: quick-acting, voltage_rating: 250 V",
            )
        ),
        "mains.primary-fuse",
    )
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith("F2 is quick-acting: the transformer's magnetising inrush")


def test_primary_fuse_below_the_primary_current_is_an_error():
    found = of(
        check(edited(fused(), "current_rating: 125 mA", "current_rating: 50 mA")), "mains.primary-fuse"
    )
    assert [f.level for f in found] == ["error"]
    primary = 12 / 230  # VA / V mains
    assert found[0].message.startswith(
        f"F2 (50 mA) is below the {primary * 1e3:.4g} mA primary current of T1"
    )


def test_primary_fuse_without_inrush_room_is_a_warning():
    found = of(
        check(edited(fused(), "current_rating: 125 mA", "current_rating: 100 mA")), "mains.primary-fuse"
    )
    assert [f.level for f in found] == ["warning"]
    assert "too little room" in found[0].message


def test_primary_fuse_far_too_large_is_a_warning():
    found = of(check(edited(fused(), "current_rating: 125 mA", "current_rating: 1 A")), "mains.primary-fuse")
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith("F2 (1 A) is 8 times the 125 mA that T1 (12 VA) needs")


def test_primary_fuse_voltage_rating():
    found = of(check(edited(fused(), "voltage_rating: 250 V", "voltage_rating: 32 V")), "mains.primary-fuse")
    assert [f.message for f in found] == ["F2 is rated 32 V, below the 230 V mains"]


# ---- switch ------------------------------------------------------------------------------------------


def test_switch_in_the_neutral_is_a_warning():
    text = edited(fused(), "S1: {kind: switch, ends: [L_F, L_SW]", "S1: {kind: switch, ends: [N, N_SW]")
    text = edited(text, "primary: [L_SW, N]", "primary: [L_F, N_SW]")
    found = of(check(text), "mains.switch-line")
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith("mains switch S1 (N, N_SW) is in the neutral only")
    assert found[0].location.line == line_of(text, "S1: {kind: switch")


# ---- earth ---------------------------------------------------------------------------------------------


def test_no_earth_on_a_metal_case_is_an_error():
    found = of(check(MAINS), "mains.earth")
    assert [f.level for f in found] == ["error"]
    assert found[0].message.startswith("earth: none and the enclosure is metal")
    assert found[0].location.line == line_of(MAINS, "earth: none")


def test_undeclared_earth_is_an_error():
    text = edited(MAINS, "    earth: none\n", "")
    found = of(check(text), "mains.earth")
    assert [f.level for f in found] == ["error"]
    assert found[0].message.startswith("no earth is declared (supply.mains.earth)")


def test_class_ii_in_metal_is_a_warning():
    text = edited(MAINS, "earth: none", "earth: class-ii")
    found = of(check(text), "mains.earth")
    assert [f.level for f in found] == ["warning"]
    assert found[0].location.line == line_of(text, "enclosure: metal")


def test_bonded_earth_is_fine():
    assert of(check(fused()), "mains.earth") == []


# ---- ratings, transformer primary -------------------------------------------------------------------------


def test_mains_frequency_missing():
    found = of(check(edited(MAINS, "    frequency: 50 Hz\n", "")), "mains.ratings-declared")
    assert [f.message for f in found] == ["supply.mains does not state its frequency"]


def test_mains_frequency_odd():
    found = of(check(edited(MAINS, "frequency: 50 Hz", "frequency: 400 Hz")), "mains.ratings-declared")
    assert [f.level for f in found] == ["warning"]
    assert found[0].location.line == line_of(MAINS, "frequency: 50 Hz")


def test_mains_declared_is_fine():
    assert of(check(MAINS), "mains.ratings-declared") == []


def test_transformer_primary_against_the_mains():
    text = edited(MAINS, "primary_voltage: 230 V", "primary_voltage: 115 V")
    found = of(check(text), "mains.transformer-primary")
    assert [f.message for f in found] == ["T1's primary is wound for 115 V but the mains is 230 V"]
    assert found[0].location.line == line_of(text, "T1: {kind: transformer")
    assert of(check(MAINS), "mains.transformer-primary") == []


# ---- bleeder ---------------------------------------------------------------------------------------------

HV_CAP = (
    "  C50: {kind: capacitor, value: 100 uF, dielectric: electrolytic, voltage_rating: 250 V, "
    "ends: [HV, GND], positive: HV}\n"
)


def with_hv(clean_text, bleeder=""):
    text = edited(clean_text, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n  HV: {voltage: 150 V}\n")
    return edited(text, "  # input match", HV_CAP + bleeder + "\n  # input match")


def test_high_voltage_capacitor_without_bleeder(clean_text):
    text = with_hv(clean_text)
    found = of(check(text), "mains.bleeder")
    assert [f.level for f in found] == ["warning"]
    energy = 0.5 * 100e-6 * 150**2  # ½CV²
    assert found[0].message == (
        f"C50 (100 uF) holds 150 V ({energy:.4g} J) with no bleeder resistor across "
        "it: it stays charged after switch-off"
    )
    assert found[0].location.line == line_of(text, "C50: {kind: capacitor")


def test_bleeder_fast_enough(clean_text):
    text = with_hv(
        clean_text, "  R50: {kind: resistor, value: 100 kohm, power_rating: 1 W, ends: [HV, GND]}\n"
    )
    assert of(check(text), "mains.bleeder") == []


def test_bleeder_too_slow(clean_text):
    text = with_hv(clean_text, "  R50: {kind: resistor, value: 10 Mohm, ends: [HV, GND]}\n")
    found = of(check(text), "mains.bleeder")
    t = 10e6 * 100e-6 * math.log(150 / 60)  # V e^(-t/RC) falls to 60 V
    assert [f.message.split(" through")[0] for f in found] == [f"C50 takes {t:.4g} s to fall below 60 V"]
    assert found[0].location.line == line_of(text, "R50: {kind: resistor")


def test_bleeder_running_hot(clean_text):
    text = with_hv(
        clean_text, "  R50: {kind: resistor, value: 100 kohm, power_rating: 250 mW, ends: [HV, GND]}\n"
    )
    found = of(check(text), "mains.bleeder")
    watts = 150**2 / 100e3
    assert [f.message for f in found] == [
        f"bleeder R50 dissipates {watts * 1e3:.4g} mW, {watts / 0.25:.0%} of its 250 mW rating"
    ]


@pytest.mark.parametrize(
    "rule",
    [
        "mains.primary-fuse",
        "mains.earth",
        "mains.switch-line",
        "mains.bleeder",
        "mains.transformer-primary",
        "mains.ratings-declared",
    ],
)
def test_low_voltage_build_has_no_mains_finding(clean_text, rule):
    assert of(check(clean_text), rule) == []
