"""freqplan.conversion pinned whole: every finding's level, place, text, numbers and fix, and the
design-sheet rows, each number derived here from the mixer arithmetic (f_IF = |f_in - f_LO|,
image 2 f_LO - f_in: Tooley, Electronic Circuits) and crystal pulling (freqplan_pins.pulling)."""

from __future__ import annotations

import pytest
from conftest import check, edited, facts, of, sheet_rows
from freqplan_pins import F_IF, IF_UNC, LO, LO_UNC, OSC, PULL, clean, hz6, where
from test_freqplan import _two_conversions

RULE = "freqplan.conversion"
FIX = "Choose the LO as f_in - f_IF (low side) or f_in + f_IF (high side) and declare the side."


def _one(text: str, rule: str = RULE):
    found = of(check(text), rule)
    assert len(found) == 1, [f.message for f in found]
    return facts(found[0])


def test_clean_plan_sheet_rows():
    rows = sheet_rows(check(clean()), RULE)
    c = ("conversion", "conversion")
    assert rows == [
        (*c, "input frequency", pytest.approx(10.7e6), "Hz", "", ""),
        (*c, "LO frequency", pytest.approx(LO), "Hz", "", ""),
        # the LO moved by pulling: f_LO - f_LO / (1 + D) (plain arithmetic), to the mHz
        (*c, "LO shift by crystal pulling", pytest.approx(LO - LO / (1 + PULL), abs=1e-3), "Hz", "", ""),
        (*c, "LO worst-case spread (±)", pytest.approx(LO_UNC), "Hz", "", ""),
        (*c, "injection", "low side", "", "", ""),
        (*c, "IF (nominal)", pytest.approx(F_IF), "Hz", "", ""),
        (*c, "IF lowest (worst case)", pytest.approx(F_IF - IF_UNC), "Hz", "", ""),
        (*c, "IF highest (worst case)", pytest.approx(F_IF + IF_UNC), "Hz", "", ""),
        (*c, "IF offset from intended", pytest.approx(F_IF - 455e3, abs=1e-3), "Hz", "", ""),
    ]
    assert of(check(clean()), RULE) == []


def test_unpulled_crystal_and_no_intended_if_leave_their_rows_out():
    # no motional capacitance: no pulling to compute; no if_frequency: no offset from it
    text = edited(clean(), "    motional_capacitance: 15 fF\n", "")
    text = edited(text, "    if_frequency: 455 kHz\n", "")
    names = [r[2] for r in sheet_rows(check(text), RULE)]
    assert "LO shift by crystal pulling" not in names and "IF offset from intended" not in names
    assert "IF (nominal)" in names and "LO worst-case spread (±)" in names


def test_missing_oscillator_is_a_note_at_the_stage():
    text = edited(clean(), "    " + OSC + "\n", "")
    assert _one(text) == {
        "rule": RULE,
        "level": "note",
        **where(text, "- stage: conversion", "stage", "chain[1]"),
        "message": "conversion: chain[1].oscillator is not given, so the LO and the IF it makes cannot be "
        "computed",
        "values": {},
        "fix": "Give chain[1].oscillator so the conversion can be checked.",
        "stage": "conversion",
        "signal": "",
        "position": "",
    }
    assert sheet_rows(check(text), RULE) == []


def test_lo_equal_to_the_input_is_an_error_and_nothing_after_it():
    text = edited(clean(), OSC, "oscillator: {frequency: 10.7 MHz, injection: low}")
    assert _one(text) == {
        "rule": RULE,
        "level": "error",
        **where(text, "oscillator: {frequency", "10.7 MHz", "chain[1].oscillator.frequency"),
        "message": "conversion: the LO (10.7 MHz) equals the input (10.7 MHz); the mixer makes no IF",
        "values": {"LO": (10.7e6, "Hz"), "input": (10.7e6, "Hz")},
        "fix": FIX,
        "stage": "conversion",
        "signal": "",
        "position": "",
    }
    names = [r[2] for r in sheet_rows(check(text), RULE)]
    assert names[-1] == "injection" and "IF (nominal)" not in names


def test_high_side_declared_for_a_low_side_lo():
    text = edited(clean(), "injection: low, mode", "injection: high, mode")
    image = 2 * LO - 10.7e6  # f_image = 2 f_LO - f_in
    assert _one(text) == {
        "rule": RULE,
        "level": "warning",
        **where(text, "oscillator: {crystal: X1", "high,", "chain[1].oscillator.injection"),
        "message": f"conversion: injection is declared high side, but the LO ({hz6(LO)}) is below the input "
        f"(10.7 MHz): the IF is still {hz6(F_IF)}, but the spectrum is not inverted and the image "
        f"lies at {hz6(image)}",
        "values": {
            "LO": (pytest.approx(LO), "Hz"),
            "input": (10.7e6, "Hz"),
            "image": (pytest.approx(image), "Hz"),
        },
        # the high-side LO for the intended 455 kHz: f_in + f_IF = 11.155 MHz
        "fix": f"Declare injection: low, or choose the LO on the high side ({hz6(10.7e6 + 455e3)}).",
        "stage": "conversion",
        "signal": "",
        "position": "",
    }


def test_low_side_declared_for_a_high_side_lo():
    # an 11.155 MHz crystal (pulled as in the clean plan) sits above the 10.7 MHz input: high side, an
    # inverted spectrum, the image above
    text = edited(clean(), "frequency: 10.245 MHz", "frequency: 11.155 MHz")
    lo = 11.155e6 * (1 + PULL)
    image = 2 * lo - 10.7e6
    assert _one(text) == {
        "rule": RULE,
        "level": "warning",
        **where(text, "oscillator: {crystal: X1", "low,", "chain[1].oscillator.injection"),
        "message": f"conversion: injection is declared low side, but the LO ({hz6(lo)}) is above the input "
        f"(10.7 MHz): the IF is still {hz6(lo - 10.7e6)}, but the spectrum is inverted and the "
        f"image lies at {hz6(image)}",
        "values": {
            "LO": (pytest.approx(lo), "Hz"),
            "input": (10.7e6, "Hz"),
            "image": (pytest.approx(image), "Hz"),
        },
        "fix": f"Declare injection: high, or choose the LO on the low side ({hz6(10.7e6 - 455e3)}).",
        "stage": "conversion",
        "signal": "",
        "position": "",
    }


def test_no_filter_after_the_conversion_is_a_note():
    text = edited(
        clean(),
        "  - stage: if-filter\n    paths:\n      narrow: {filter: FL1}\n"
        "      wide: {bandwidth: 180 kHz, note: \"bypass link for wideband signals\"}\n",
        "",
    )
    assert _one(text) == {
        "rule": RULE,
        "level": "note",
        **where(text, "- stage: conversion", "stage", "chain[1]"),
        "message": f"conversion: no if-filter stage follows, so the IF of {hz6(F_IF)} is checked against no "
        "passband",
        "values": {"IF": (pytest.approx(F_IF), "Hz")},
        "fix": "Add the if-filter stage (with its filter part or passband) after the conversion.",
        "stage": "conversion",
        "signal": "",
        "position": "",
    }


ASSUMED_FIX = "Give the crystal tolerance and the source drift so the worst case is real."


def test_no_tolerance_and_no_drift_note_points_at_the_crystal():
    text = edited(edited(clean(), "    tolerance: 20 ppm\n", ""), "  drift: 500 Hz\n", "")
    assert _one(text) == {
        "rule": RULE,
        "level": "note",
        **where(text, "frequency: 10.245 MHz", "10.245", "parts.X1.frequency"),
        "message": "conversion: the worst-case IF leaves out what is not given: parts.X1.tolerance (counted "
        "as 0 ppm), source.drift (counted as 0 Hz)",
        "values": {},
        "fix": ASSUMED_FIX,
        "stage": "conversion",
        "signal": "",
        "position": "",
    }
    rows = {r[2]: r[3] for r in sheet_rows(check(text), RULE)}
    assert rows["LO worst-case spread (±)"] == 0.0 and rows["IF lowest (worst case)"] == pytest.approx(F_IF)


def test_no_tolerance_alone_names_only_the_crystal():
    text = edited(clean(), "    tolerance: 20 ppm\n", "")
    assert _one(text)["message"] == (
        "conversion: the worst-case IF leaves out what is not given: parts.X1.tolerance (counted as 0 ppm)"
    )


def test_no_source_drift_alone_points_at_the_source():
    text = edited(clean(), "  drift: 500 Hz\n", "")
    assert _one(text) == {
        "rule": RULE,
        "level": "note",
        **where(text, "kind: receiver-if", "kind", "source"),
        "message": "conversion: the worst-case IF leaves out what is not given: source.drift (counted as 0 "
        "Hz)",
        "values": {},
        "fix": ASSUMED_FIX,
        "stage": "conversion",
        "signal": "",
        "position": "",
    }


def test_source_drift_is_named_by_the_first_conversion_only():
    text = _two_conversions("10.245 MHz").replace(", drift: 200 Hz", "")
    found = of(check(text), RULE)
    assert [(f.level, f.message) for f in found] == [
        (
            "note",
            "conversion 1: the worst-case IF leaves out what is not given: source.drift (counted as 0 Hz)",
        )
    ]
    # both conversions are worked out: the second takes the first's IF as its input
    rows = {(r[1], r[2]): r[3] for r in sheet_rows(check(text), RULE)}
    assert rows[("conversion 2", "input frequency")] == pytest.approx(10.7e6)  # 55.7 MHz - 45 MHz
    assert rows[("conversion 2", "injection")] == "low side"
    assert rows[("conversion 1", "injection")] == "high side"


def test_a_missing_first_oscillator_does_not_stop_the_second():
    text = _two_conversions("10.245 MHz").replace(
        "    oscillator: {crystal: X1, injection: high, mode: overtone}\n", ""
    )
    found = of(check(text), RULE)
    assert [f.message for f in found] == [
        "conversion 1: chain[0].oscillator is not given, so the LO and the IF it makes cannot be computed"
    ]
    rows = {(r[1], r[2]): r[3] for r in sheet_rows(check(text), RULE)}
    # the second conversion runs from the first's intended 10.7 MHz: 10.7 MHz - 10.245 MHz
    assert rows[("conversion 2", "IF (nominal)")] == pytest.approx(455e3)


def test_only_the_first_missing_input_of_a_conversion_is_named():
    # conversion 1 has no oscillator and no intended IF, so conversion 2 has no input frequency; it has
    # no oscillator either, but one note per conversion names the first thing missing
    text = _two_conversions("10.245 MHz")
    for line in (
        "    oscillator: {crystal: X1, injection: high, mode: overtone}\n",
        "    if_frequency: 10.7 MHz\n",
        "    oscillator: {crystal: X2, injection: low, mode: fundamental}\n",
    ):
        text = edited(text, line, "")
    assert [f.message for f in of(check(text), RULE)] == [
        "conversion 1: chain[0].oscillator is not given, so the LO and the IF it makes cannot be computed",
        "conversion 2: source.frequency (or chain[2].input_frequency) is not given, so the LO and the IF it "
        "makes "
        "cannot be computed",
    ]
