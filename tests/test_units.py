"""Units: SI prefixes (SI Brochure, 9th edition, Table 7) both ways, and dimension checks."""

import pytest

from speccheck import units


@pytest.mark.parametrize("text,dim,si", [
    ("455 kHz", "frequency", 455e3), ("10.7 MHz", "frequency", 10.7e6), ("100 nF", "capacitance", 100e-9),
    ("4.7 µF", "capacitance", 4.7e-6), ("20 fF", "capacitance", 20e-15), ("3.3 uH", "inductance", 3.3e-6),
    ("4.7 kΩ", "resistance", 4.7e3), ("1 Mohm", "resistance", 1e6), ("250 mA", "current", 0.25),
    ("50 us", "time", 50e-6), ("0.5 in", "length", 0.0127),  # 1 in = 25.4 mm exactly (ISO 80000-3 annex)
    ("20 ppm", "fraction", 20e-6), ("5 %", "fraction", 0.05), ("12 degC/W", "thermal_resistance", 12.0),
    ("4.9 nH/turn^2", "inductance_factor", 4.9e-9), ("300 K", "temperature", 26.85),  # 0 °C = 273.15 K
])
def test_parse_by_si_prefix(text, dim, si):
    assert units.parse(text, dim) == pytest.approx(si)


@pytest.mark.parametrize("value,unit,text", [
    (455e3, "Hz", "455 kHz"), (10.245e6, "Hz", "10.245 MHz"), (4.7e-6, "F", "4.7 µF"),
    (0.912, "W", "912 mW"), (12.25e-6, "H", "12.25 µH"), (40.0, "°C", "40 °C"), (-100.0, "dBm", "-100 dBm"),
])
def test_format_with_si_prefix(value, unit, text):
    assert units.fmt(value, unit) == text


def test_frequencies_keep_digits_to_one_hertz():
    # a plan is about offsets of a few hundred hertz on megahertz carriers
    assert units.fmt(10_244_934.66, "Hz") == "10.244935 MHz"
    assert units.fmt(3386.27, "Hz") == "3.386 kHz"


@pytest.mark.parametrize("text", ["3.3 uH", "12 V", "5 furlong", "kHz", "1e999 Hz", "10 Hz Hz Hz ^9"])
def test_frequency_field_refuses(text):
    with pytest.raises(units.UnitError):
        units.parse(text, "frequency")


def test_refuses_long_text():
    with pytest.raises(units.UnitError, match="longer than"):
        units.parse("1" * 100 + " Hz", "frequency")


def test_infinite_values_read_as_infinity_and_are_null_in_json():
    import json

    from speccheck.findings import Value

    v = Value("return loss", float("inf"), "dB")
    assert v.text == "∞ dB"
    assert json.loads(json.dumps(v.as_dict()))["value"] is None
