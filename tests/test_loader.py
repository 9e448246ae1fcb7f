"""The loader: positions, duplicate keys, units and dimensions, dBm levels, bounds."""

import math

import pytest
from conftest import check, edited, line_of, of
from hypothesis import given, settings
from hypothesis import strategies as st

from speccheck import loader, units, yamlnodes

MINI = """build_spec: 1
build:
  name: test rig
parts:
  R1: {kind: resistor, value: 10 kohm, ends: [A, B]}
"""


def test_positions_of_values_and_keys():
    doc = yamlnodes.parse(MINI)
    mark = doc.mark(("parts", "R1", "value"))
    assert (mark.line, mark.col) == (5, MINI.splitlines()[4].index("10 kohm") + 1)
    key = doc.key_mark(("build", "name"))
    assert (key.line, key.col) == (3, 3)


def test_model_quantity_is_si_with_position():
    loaded = loader.load_text(MINI, "mini.yaml")
    r1 = loaded.build.parts["R1"]
    assert (
        r1.value.si == 10_000.0
    )  # 10 kohm = 10 000 ohm by the SI prefix kilo (SI Brochure, 9th ed., Table 7)
    col = MINI.splitlines()[4].index("10 kohm") + 1
    assert (r1.value.loc.line, r1.value.loc.col, r1.value.loc.path) == (5, col, "parts.R1.value")


def test_duplicate_key_is_a_finding_at_the_second_key():
    text = MINI + "  R1: {kind: resistor, value: 22 kohm, ends: [A, B]}\n"
    result = check(text)
    dup = of(result, "input.duplicate-key")
    assert len(dup) == 1
    assert (dup[0].location.line, dup[0].location.col) == (6, 3)
    assert "appears twice" in dup[0].message and "line 5" in dup[0].message


def test_yaml_syntax_error_is_positioned_and_stops_rules():
    result = check("build_spec: 1\nbuild: {name: x\nparts: {}\n")
    syn = of(result, "input.yaml-syntax")
    assert syn and syn[0].location.line >= 2
    assert not result.checked


def test_wrong_dimension_names_field_and_units():
    text = edited(MINI, "value: 10 kohm", "value: 3.3 uH")
    result = check(text)
    bad = of(result, "input.unit")
    assert len(bad) == 1
    assert bad[0].message == "parts.R1.value: expected a resistance, got '3.3 uH' (an inductance)"
    assert bad[0].location.line == 5


def test_frequency_field_rejects_inductance():
    text = MINI + "source: {kind: generator, frequency: 3.3 uH}\n"
    bad = of(check(text), "input.unit")
    assert bad and "expected a frequency, got '3.3 uH' (an inductance)" in bad[0].message
    assert bad[0].location.line == line_of(text, "3.3 uH")


def test_bare_number_needs_its_unit():
    text = MINI + "source: {kind: generator, frequency: 455000}\n"
    bad = [f for f in check(text).findings if f.rule in ("input.unit", "input.schema")]
    assert bad and "with its unit" in bad[0].message


@pytest.mark.parametrize(
    "text,dim,expected",
    [
        ("-100 dBm", "level", -100.0),  # dBm is the level relative to 1 mW (ITU-R V.574-5 §3)
        ("1 mW", "level", 0.0),  # 1 mW is 0 dBm by definition (ITU-R V.574-5)
        ("-30 dBW", "level", 0.0),  # 0 dBW = +30 dBm (ITU-R V.574-5)
        ("10 dB", "gain", 10.0),
    ],
)
def test_logarithmic_levels(text, dim, expected):
    assert units.parse(text, dim) == pytest.approx(expected)


def test_dbm_field_in_a_file():
    text = MINI + "source: {kind: generator, frequency: 10.7 MHz, level_max: -30 dBm, level_min: -100 dBm}\n"
    loaded = loader.load_text(text, "x.yaml")
    assert loaded.build.source.level_min.si == -100.0
    assert loaded.build.source.level_max.si == -30.0


@pytest.mark.parametrize("value", [".nan", ".inf", "nan kHz", "1e999 kHz"])
def test_non_finite_values_are_findings(value):
    text = MINI + f"source: {{kind: generator, frequency: {value}}}\n"
    result = check(text)
    assert [f for f in result.findings if f.rule in ("input.unit", "input.schema")], value


@pytest.mark.parametrize("value", ["0 Hz", "-455 kHz"])
def test_zero_or_negative_frequency_is_a_finding(value):
    text = MINI + f"source: {{kind: generator, frequency: {value}}}\n"
    bad = of(check(text), "input.value-range")
    assert bad and "must be greater than zero" in bad[0].message


def test_negative_rail_voltage_is_allowed():
    text = MINI + "rails: {VEE: {voltage: -12 V}}\n"
    assert not [f for f in check(text).findings if f.rule.startswith("input.")]


def test_unknown_key_points_at_the_key_with_a_suggestion():
    text = edited(MINI, "  name: test rig", "  name: test rig\n  ambiant_max: 40 degC")
    bad = of(check(text), "input.schema")
    assert bad[0].message.startswith("unknown key 'ambiant_max' in build; did you mean 'ambient_max'?")
    assert (bad[0].location.line, bad[0].location.col) == (4, 3)


def test_missing_required_key():
    bad = of(check("build_spec: 1\nbuild: {name: x}\n"), "input.schema")
    assert any("missing key 'parts'" in f.message for f in bad)


def test_wrong_enum_suggests_the_close_one():
    text = edited(MINI, "kind: resistor", "kind: resistorr")
    bad = of(check(text), "input.schema")
    assert "did you mean 'resistor'" in bad[0].message
    assert bad[0].location.line == 5


def test_aliases_are_refused():
    text = MINI + "nodes:\n  A: &v {dc: 1 V}\n  B: *v\n"
    bad = of(check(text), "input.not-accepted")
    assert bad and bad[0].location.line == line_of(text, "*v")


def test_undeclared_reference():
    text = MINI + "devices: {U1: {profile: fm-if-subsytem}}\n"
    bad = of(check(text), "input.reference")
    assert "did you mean 'fm-if-subsystem'" in bad[0].message


def test_unknown_pin_of_a_device():
    text = MINI + "devices: {U1: {profile: fm-if-subsystem}}\n"
    text = edited(text, "ends: [A, B]", "ends: [U1.quadrature, B]")
    bad = of(check(text), "input.reference")
    assert bad and "quadrature" in bad[0].message and bad[0].location.line == 5


def test_positive_must_be_one_of_the_ends():
    text = (
        MINI + "  C1: {kind: capacitor, value: 1 uF, dielectric: electrolytic, ends: [A, B], positive: C}\n"
    )
    bad = of(check(text), "input.reference")
    assert bad and "not one of its ends" in bad[0].message


def test_big_file_is_refused_without_reading_it_all():
    doc = yamlnodes.parse("a: b\n" * 300_000)
    assert doc.problems and doc.problems[0].kind == "limit"


def test_deep_nesting_is_bounded():
    text = "a: " + "[" * 200 + "]" * 200 + "\n"
    doc = yamlnodes.parse(text)
    assert doc.problems


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=80))
def test_any_quantity_text_parses_or_fails_cleanly(text):
    """Untrusted text: either a finite float or a UnitError, never another exception or a hang."""
    try:
        value = units.parse(text, "frequency")
    except units.UnitError:
        return
    assert math.isfinite(value)


@settings(max_examples=150, deadline=None)
@given(st.text(alphabet="ab: -[]{}\n&*!'\"#%", max_size=120))
def test_any_yaml_text_loads_or_reports(text):
    result = check("build_spec: 1\n" + text)
    assert result is not None  # no exception escaped


PATHOLOGICAL = {
    "flow brackets": "'a: ' + '[' * 100000 + ']' * 100000",
    "compact sequences": "'- ' * 100000 + 'x'",
    "complex keys": "'? ' * 100000 + 'x'",
    "mixed indicators": "'- ? ' * 50000 + 'x'",
    "deep block indentation": "'a:\\n' + ''.join(' ' * i + '- \\n' for i in range(1, 1400))",
    "billion laughs": "'a: &a [x, x]\\n' + ''.join(f'{chr(98 + i)}: &{chr(98 + i)} [*{chr(97 + i)}, "
    "*{chr(97 + i)}]\\n' for i in range(20))",
}


@pytest.mark.parametrize("name", sorted(PATHOLOGICAL))
def test_hostile_yaml_is_refused_without_crash_or_hang(name):
    """Run in a child process: a C-stack overflow would kill pytest itself otherwise."""
    import subprocess
    import sys

    code = (
        "from speccheck import yamlnodes\n"
        f"doc = yamlnodes.parse({PATHOLOGICAL[name]})\n"
        "print(len(doc.problems))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr[-500:]
    assert int(out.stdout.strip()) >= 1


def test_undeclared_negative_rail_is_a_reference_error():
    text = (
        MINI
        + "rails: {V12: {voltage: 12 V}}\n"
        + "devices: {U2: {profile: audio-power-amp-lv, rail: V12, negative_rail: VEE}}\n"
    )
    bad = of(check(text), "input.reference")
    assert bad and bad[0].message.startswith("rail 'VEE' is not declared")
    assert bad[0].location.path == "devices.U2.negative_rail"


def test_part_with_both_ends_on_one_net_is_refused(clean_text):
    from conftest import edited

    text = edited(clean_text, "ends: [U1.osc_base, V6]", "ends: [V6, V6]")
    bad = of(check(text), "input.shorted-part")
    assert bad and bad[0].message == "both ends of X1 connect to V6: the part is shorted out"
    assert bad[0].location.line == line_of(text, "ends: [V6, V6]")


def test_rail_that_feeds_itself_is_refused(clean_text):
    from conftest import edited

    text = edited(clean_text, "V12: {voltage: 12 V, from: supply}", "V12: {voltage: 12 V, from: U3}")
    bad = of(check(text), "input.rail-loop")
    assert bad and bad[0].message.startswith("rail V12 feeds itself: V12 from U3 on V12")


@pytest.mark.parametrize("value,why", [("-300 degC", "below absolute zero"), ("1e300 kHz", "far beyond")])
def test_impossible_values_are_refused(clean_text, value, why):
    from conftest import edited

    field = "ambient_max: 40 degC" if "degC" in value else "deviation: 5 kHz"
    text = edited(clean_text, field, field.split(":")[0] + ": " + value)
    bad = of(check(text), "input.value-range")
    assert bad and why in bad[0].message
