"""Frequency-plan formulas against their published check values, and each freqplan rule firing
on a planted mistake at its line and staying quiet on the clean plan.

Every expected number is typed in from the source named beside it, or computed in the test
independently (scipy, plain arithmetic of the published formula), never taken from the code.
"""

import math

import pytest
from conftest import EXAMPLES, check, edited, line_of, of

from speccheck import engine
from speccheck.config import Settings
from speccheck.formulas import audio, bandwidth, mixing, resonators

# ---- necessary bandwidth and emission designators -------------------------------------------


def test_sm1138_narrowband_fm():
    # ITU-R SM.1138 / Radio Regulations Appendix 1: 5 kHz deviation, 3 kHz audio -> 16 kHz, 16K0F3E
    assert bandwidth.necessary_bandwidth("fm", 5e3, 3e3) == pytest.approx(16e3)
    assert bandwidth.emission_designator(16e3, "fm", "voice") == "16K0F3E"


def test_sm1138_broadcast_fm():
    # ITU-R SM.1138: 75 kHz deviation (47 CFR 73.1570; ITU-R BS.450-3), 15 kHz audio -> 180 kHz, 180KF3E
    bn = bandwidth.necessary_bandwidth("fm", 75e3, 15e3)
    assert bn == pytest.approx(180e3)
    assert bandwidth.emission_designator(bn, "fm", "broadcast") == "180KF3E"


def test_carson_rule_matches_sm1138_for_fm():
    # Carson's rule B = 2 (deviation + audio): 2 (75 + 15) kHz = 180 kHz, the SM.1138 value above
    assert bandwidth.carson_bandwidth(75e3, 15e3) == pytest.approx(180e3)
    assert bandwidth.carson_bandwidth(5e3, 3e3) == pytest.approx(16e3)


@pytest.mark.parametrize("hz, code", [
    # Radio Regulations Appendix 1 (issue check values)
    (2.4e3, "2K40"), (12.5e3, "12K5"), (180.5e3, "181K"),
])
def test_designator_spelling_rr_appendix_1(hz, code):
    assert bandwidth.bandwidth_code(hz) == code


@pytest.mark.parametrize("hz, code", [
    # Radio Regulations Appendix 1 §1 examples, recalled from memory
    (0.002, "H002"), (0.1, "H100"), (25.3, "25H3"), (400.0, "400H"), (6e3, "6K00"), (180.4e3, "180K"),
    (180.7e3, "181K"), (1.25e6, "1M25"), (2e6, "2M00"), (10e6, "10M0"), (202e6, "202M"), (5.65e9, "5G65"),
])
def test_designator_spelling_more_examples(hz, code):
    assert bandwidth.bandwidth_code(hz) == code


def test_designator_rounding_carries_into_the_next_letter():
    # 999.5 Hz has three significant figures 1.00 kHz: written 1K00 (RR Appendix 1 rule: 1.00 to 999 per
    # letter)
    assert bandwidth.bandwidth_code(999.5) == "1K00"


# ---- conversion arithmetic and image ----------------------------------------------------------


def test_image_textbook_tooley():
    # Tooley, Electronic Circuits: 455 kHz IF tuned to 1200 kHz -> LO 1655 kHz, image 2110 kHz
    lo = mixing.lo_for(1200e3, 455e3, "high")
    assert lo == pytest.approx(1655e3)
    assert mixing.image_frequency(1200e3, lo) == pytest.approx(2110e3)


def test_low_side_lo_common_practice():
    # common practice: 21.4 MHz converted to 455 kHz, low side, needs a 20.945 MHz oscillator
    assert mixing.lo_for(21.4e6, 455e3, "low") == pytest.approx(20.945e6)


def test_spur_inputs_solve_the_mixing_equation():
    # independent check: every yielded input satisfies |m fs + k fLO| = IF (the definition of a response),
    # and the wanted low-side response fs = fLO + fIF is among them (m = 1, k = -1)
    lo, fif = 10.245e6, 455e3
    found = list(mixing.spur_inputs(lo, fif, 5))
    for m, k, _s, fs in found:
        assert abs(m * fs + k * lo) == pytest.approx(fif)
    assert any(m == 1 and k == -1 and fs == pytest.approx(10.7e6) for m, k, s, fs in found)
    assert any(m == 1 and k == -1 and fs == pytest.approx(9.79e6) for m, k, s, fs in found)  # the image
    # the half-IF response 2 fs - 2 fLO = IF sits at fLO + IF/2 (plain arithmetic)
    assert any(m == 2 and k == -2 and fs == pytest.approx(lo + fif / 2) for m, k, s, fs in found)


# ---- parallel RLC, crystal, RC corners -----------------------------------------------------------


def test_parallel_rlc_wikibooks():
    # Wikibooks, Practical Electronics / Parallel RLC: 10.7 MHz, 1 µH, 10 kΩ -> C 221.2 pF, Q 148.7, BW 71.9
    # kHz
    c = resonators.capacitance_for(10.7e6, 1e-6)
    assert c == pytest.approx(221.2e-12, rel=1e-3)
    q = resonators.parallel_q(10e3, 10.7e6, 1e-6)
    assert q == pytest.approx(148.7, rel=1e-3)
    assert 10.7e6 / q == pytest.approx(71.9e3, rel=1e-3)
    assert resonators.resonance(1e-6, 221.2e-12) == pytest.approx(10.7e6, rel=1e-3)


def test_tank_1mh_120pf_near_455k_common_practice():
    # common practice: a 1 mH coil with 120 pF resonates near 455 kHz (within the few % a slug covers)
    assert resonators.resonance(1e-3, 120e-12) == pytest.approx(455e3, rel=0.02)


def test_crystal_pulling_check_values():
    # crystal pulling D = C1m / (2 (C0 + CL)): 20 fF, 5 pF -> 400.0 ppm at 20 pF, 434.8 ppm at 18 pF
    assert resonators.pulling(20e-15, 5e-12, 20e-12) * 1e6 == pytest.approx(400.0, abs=0.05)
    assert resonators.pulling(20e-15, 5e-12, 18e-12) * 1e6 == pytest.approx(434.8, abs=0.05)
    assert resonators.pulling_shift(20e-15, 5e-12, 18e-12, 20e-12) * 1e6 == pytest.approx(34.8, abs=0.05)


def test_series_load_capacitance():
    # C_L = C1 C2 / (C1 + C2) + C_stray; two 33 pF in series are 16.5 pF (plain arithmetic), plus 4 pF stray
    expected = 1 / (1 / 33e-12 + 1 / 33e-12) + 4e-12
    assert resonators.series_load(33e-12, 33e-12, 4e-12) == pytest.approx(expected)


@pytest.mark.parametrize("tau, corner", [(50e-6, 3183.1), (75e-6, 2122.1)])
def test_de_emphasis_corners(tau, corner):
    # ITU-R BS.450-3 / 47 CFR 73.317: 50 µs and 75 µs de-emphasis -> corners 3183.1 Hz and 2122.1 Hz
    assert audio.corner_from_tau(tau) == pytest.approx(corner, abs=0.05)
    assert audio.rc_time_constant(corner) == pytest.approx(tau, rel=1e-4)


@pytest.mark.parametrize("tau", [50e-6, 75e-6])
def test_rc_corner_against_scipy(tau):
    # scipy.signal.freqs of 1 / (s tau + 1) gives -3.01 dB at 1/tau rad/s, i.e. at our corner in Hz
    from scipy import signal

    _w, h = signal.freqs([1.0], [tau, 1.0], worN=[2 * math.pi * audio.corner_from_tau(tau)])
    assert 20 * math.log10(abs(h[0])) == pytest.approx(-3.0103, abs=1e-3)


# ---- rules on the clean plan ----------------------------------------------------------------------


def test_clean_plan_has_no_freqplan_warning_or_error(clean_text):
    bad = [f for f in check(clean_text).findings if f.rule.startswith("freqplan.") and f.level != "note"]
    assert bad == [], [f.message for f in bad]


def _sheet(result):
    return {(e.section, e.owner, e.value.name): e.value for e in result.sheet}


def test_clean_plan_design_sheet_lists_the_frequency_plan(clean_text):
    sheet = _sheet(check(clean_text))
    lo = sheet[("conversion", "conversion", "LO frequency")]
    assert lo.unit == "Hz"
    # LO = crystal 10.245 MHz moved by its pulling D(20.5 pF) - D(20 pF), with C1m 15 fF, C0 4 pF (formula
    # above)
    pull = 15e-15 / (2 * (4e-12 + 20.5e-12)) - 15e-15 / (2 * (4e-12 + 20e-12))
    assert lo.value == pytest.approx(10.245e6 * (1 + pull))
    assert sheet[("conversion", "conversion", "IF (nominal)")].value == pytest.approx(
        10.7e6 - 10.245e6 * (1 + pull)
    )
    spread = 500 + 20e-6 * 10.245e6  # source drift + 20 ppm of the crystal
    assert sheet[("conversion", "conversion", "IF highest (worst case)")].value == pytest.approx(
        10.7e6 - 10.245e6 * (1 + pull) + spread
    )
    assert sheet[("conversion", "conversion", "image frequency")].value == pytest.approx(
        2 * 10.245e6 * (1 + pull) - 10.7e6
    )
    assert sheet[("signals", "repeater voice", "emission designator")].value == "16K0F3E"
    assert sheet[("signals", "repeater voice", "necessary bandwidth (ITU-R SM.1138)")].unit == "Hz"
    margin = sheet[("if-filter", "narrow path", "margin for repeater voice (worst case)")]
    assert margin.unit == "Hz" and margin.value > 0
    spurs = [k for k in sheet if k[0] == "spurs"]
    assert any("2·fs − 2·fLO" in k[2] for k in spurs)
    assert all(sheet[k].unit == ("dBm" if k[2].endswith("estimated level") else "Hz") for k in spurs)
    assert sheet[("discriminator", "discriminator", "tank resonance f0")].value == pytest.approx(
        1 / (2 * math.pi * math.sqrt(1e-3 * 120e-12))
    )
    for name in ("loaded Q", "linear range (f0/Q)", "tuning range low", "tuning range high"):
        assert ("discriminator", "discriminator", name) in sheet
    assert sheet[("crystal", "X1", "load capacitance from the oscillator")].value == pytest.approx(20.5e-12)
    assert sheet[("crystal", "X1", "load capacitance from the oscillator")].unit == "F"


def test_filter_in_clean_plan_passes_nbfm_with_drift(clean_text):
    # common practice: a 455 kHz ceramic filter of ±10 kHz at 6 dB passes 16 kHz NBFM with 20 ppm and 500 Hz
    # drift
    assert of(check(clean_text), "freqplan.filter-fit") == []


# ---- freqplan.conversion --------------------------------------------------------------------------


def test_injection_side_contradiction_is_a_warning(clean_text):
    text = edited(clean_text, "injection: low, mode", "injection: high, mode")
    found = of(check(text), "freqplan.conversion")
    assert [f.level for f in found] == ["warning"]
    assert "injection is declared high side, but the LO" in found[0].message
    assert "is below the input" in found[0].message
    assert found[0].location.line == line_of(text, "oscillator: {crystal: X1")


def test_conversion_without_oscillator_is_a_note(clean_text):
    text = edited(
        clean_text,
        "    oscillator: {crystal: X1, injection: low, mode: fundamental, load_caps: [C6, C7], "
        "stray: 4 pF}\n",
        "",
    )
    found = of(check(text), "freqplan.conversion")
    assert [f.level for f in found] == ["note"]
    assert "chain[1].oscillator is not given" in found[0].message


def test_conversion_with_no_filter_after_it_is_a_note(clean_text):
    text = edited(
        clean_text,
        "  - stage: if-filter\n    paths:\n      narrow: {filter: FL1}\n"
        "      wide: {bandwidth: 180 kHz, note: \"bypass link for wideband signals\"}\n",
        "",
    )
    found = of(check(text), "freqplan.conversion")
    assert len(found) == 1 and found[0].level == "note"
    assert "no if-filter stage follows" in found[0].message


def test_multi_conversion_chain_carries_the_if_and_its_spread():
    # 45 MHz -> 10.7 MHz (high side, LO 55.7 MHz) -> 455 kHz (low side, LO 10.245 MHz): plain arithmetic
    text = _two_conversions("10.245 MHz")
    result = check(text)
    sheet = _sheet(result)
    assert sheet[("conversion", "conversion 1", "IF (nominal)")].value == pytest.approx(10.7e6)
    assert sheet[("conversion", "conversion 2", "input frequency")].value == pytest.approx(10.7e6)
    assert sheet[("conversion", "conversion 2", "IF (nominal)")].value == pytest.approx(455e3)
    spread = 200 + 55.7e6 * 5e-6 + 10.245e6 * 10e-6  # source drift + both crystals' tolerance
    assert sheet[("conversion", "conversion 2", "IF highest (worst case)")].value == pytest.approx(
        455e3 + spread
    )
    errors = [f for f in result.findings if f.rule.startswith("freqplan.") and f.level == "error"]
    assert errors == [], [f.message for f in errors]


def test_multi_conversion_wrong_second_crystal_is_caught_at_its_line():
    text = _two_conversions("10.235 MHz")
    found = of(check(text), "freqplan.filter-fit")
    assert [f.level for f in found] == ["error"]
    assert found[0].location.line == line_of(text, "X2: {kind: crystal")
    assert "does not fit the second path" in found[0].message


def _two_conversions(x2: str) -> str:
    return f"""build_spec: 1
build: {{name: double conversion}}
signals:
  - {{name: voice, modulation: fm, deviation: 5 kHz, audio_max: 3 kHz}}
source: {{kind: receiver-if, frequency: 45 MHz, impedance: 50 ohm, bandwidth: 100 kHz, drift: 200 Hz}}
parts:
  X1: {{kind: crystal, frequency: 55.7 MHz, overtone: 3, tolerance: 5 ppm}}
  X2: {{kind: crystal, frequency: {x2}, tolerance: 10 ppm}}
  FL1: {{kind: filter, center: 10.7 MHz, bandwidth: 30 kHz, bandwidth_at: 3 dB}}
  FL2: {{kind: filter, center: 455 kHz, bandwidth: 20 kHz, bandwidth_at: 6 dB}}
chain:
  - stage: conversion
    if_frequency: 10.7 MHz
    oscillator: {{crystal: X1, injection: high, mode: overtone}}
  - stage: if-filter
    paths:
      first: {{filter: FL1}}
  - stage: conversion
    if_frequency: 455 kHz
    oscillator: {{crystal: X2, injection: low, mode: fundamental}}
  - stage: if-filter
    paths:
      second: {{filter: FL2}}
"""


# ---- freqplan.filter-fit ------------------------------------------------------------------------


def test_wrong_crystal_puts_the_signal_outside_the_filter(clean_text):
    # 10.235 MHz instead of 10.245 MHz: the IF moves 10 kHz up, onto the filter's upper 6 dB edge
    text = edited(clean_text, "frequency: 10.245 MHz", "frequency: 10.235 MHz")
    found = of(check(text), "freqplan.filter-fit")
    assert [f.level for f in found] == ["error"]
    assert found[0].message.startswith("repeater voice does not fit the narrow path at the worst-case IF")
    assert "of the power of a 3 kHz tone" in found[0].message and " dB)" in found[0].message
    assert found[0].location.line == line_of(text, "frequency: 10.235 MHz")
    assert found[0].location.path == "parts.X1.frequency"


def test_small_offset_on_a_wide_enough_filter_is_no_finding(clean_text):
    # 5 kHz off: 10.240 MHz gives a 460 kHz IF; the ±10 kHz filter still passes over 80 % of a
    # full-deviation 3 kHz tone (warning_share): the old brick-wall check called this an error
    text = edited(clean_text, "frequency: 10.245 MHz", "frequency: 10.240 MHz")
    assert [f for f in of(check(text), "freqplan.filter-fit") if f.level == "error"] == []


def test_thin_margin_is_a_warning_at_the_filter(clean_text):
    # 7 kHz of source drift on a ±10 kHz filter: at the worst case the signal sits on the skirt
    text = edited(clean_text, "drift: 500 Hz", "drift: 7 kHz")
    found = of(check(text), "freqplan.filter-fit")
    assert [f.level for f in found] == ["warning"]
    assert "sits on the skirt of the narrow path" in found[0].message
    assert found[0].location.line == line_of(text, "FL1: {kind: filter")


def test_share_levels_are_settings(clean_text):
    # 4 kHz of drift: the filter still passes over 80 % at the worst-case IF (no finding by default),
    # but under the 95 % asked for here
    text = edited(clean_text, "drift: 500 Hz", "drift: 4 kHz")
    assert of(check(text), "freqplan.filter-fit") == []
    settings = Settings(rule_settings={"freqplan.filter-fit": {"warning_share": 0.95}})
    found = of(check(text, settings=settings), "freqplan.filter-fit")
    assert [f.level for f in found] == ["warning"]


def test_crystal_off_filter_example():
    path = EXAMPLES / "freq-crystal-off-filter.yaml"
    found = of(engine.check_file(path), "freqplan.filter-fit")
    assert [f.level for f in found] == ["error"]
    assert found[0].location.line == line_of(path.read_text("utf-8"), "frequency: 10.235 MHz")


# ---- freqplan.image --------------------------------------------------------------------------------


def test_image_with_nothing_ahead_is_a_warning(clean_text):
    text = edited(
        clean_text, "  bandwidth: 1 MHz          # the receiver's first IF bandwidth ahead of the tap\n", ""
    )
    found = of(check(text), "freqplan.image")
    assert [f.level for f in found] == ["warning"]
    assert "nothing declared ahead of the mixer rejects it" in found[0].message
    assert found[0].location.line == line_of(text, "oscillator: {crystal: X1")


def test_image_inside_a_wide_upstream_passband(clean_text):
    # image at 2 fLO - fin = 9.79 MHz lies inside 10.7 MHz ± 1.5 MHz (plain arithmetic)
    text = edited(clean_text, "bandwidth: 1 MHz ", "bandwidth: 3 MHz ")
    found = of(check(text), "freqplan.image")
    assert len(found) == 1 and "lies inside the upstream bandwidth" in found[0].message


UPSTREAM_SHAPE = ("  bandwidth_at: 6 dB\n"
                  "  stopband: 2 MHz           # its skirts: 2 MHz wide at 60 dB down\n"
                  "  stopband_at: 60 dB\n")


def test_image_rejected_by_the_upstream_bandwidth_is_stated_in_db(clean_text):
    # 1 MHz at 6 dB with no skirts stated: the typical ceramic skirts (twice as wide at 40 dB); an
    # image 910 kHz off is down by the equivalent Butterworth through both points (Williams & Taylor
    # order equation)
    n = math.log10((1e4 - 1) / (10**0.6 - 1)) / (2 * math.log10(2))
    expected = 10 * math.log10(1 + (10**0.6 - 1) * (0.91 / 0.5) ** (2 * n))
    found = of(check(edited(clean_text, UPSTREAM_SHAPE, "")), "freqplan.image")
    assert [f.level for f in found] == ["note"]  # between 20 and 40 dB
    assert f"rejects it by only {expected:.1f} dB" in found[0].message


def test_image_against_a_gaussian_resolution_filter(clean_text):
    # an instrument's 1 MHz resolution filter quoted at 3 dB is Gaussian: 3 dB x (910/500)^2 = 9.9 dB
    text = edited(
        edited(clean_text, "  kind: receiver-if\n", "  kind: instrument-if\n"),
        UPSTREAM_SHAPE,
        "  bandwidth_at: 3 dB\n",
    )
    found = of(check(text), "freqplan.image")
    assert [f.level for f in found] == ["warning"]
    assert f"rejects it by only {3 * (0.91 / 0.5) ** 2:.1f} dB" in found[0].message


def test_stated_stopband_gives_real_rejection(clean_text):
    # the clean plan's 1 MHz (6 dB) upstream filter is stated 2 MHz wide at 60 dB: the image 910 kHz
    # off is far down its skirt (equivalent Butterworth through both points, Williams & Taylor)
    n = math.log10((1e6 - 1) / (10**0.6 - 1)) / (2 * math.log10(2))
    expected = 10 * math.log10(1 + (10**0.6 - 1) * (0.91 / 0.5) ** (2 * n))
    result = check(clean_text)
    assert of(result, "freqplan.image") == []
    got = [e.value.value for e in result.sheet if e.value.name == "image rejection ahead of the mixer"]
    assert got == [pytest.approx(expected, abs=0.06)]


def test_preselector_rejection_is_one_tuned_circuit(clean_text):
    # one tuned circuit 400 kHz wide at 3 dB: 10 log10(1 + (910/200)^2) = 13.5 dB at the image (one-pole
    # response)
    text = edited(
        clean_text,
        "  bandwidth: 1 MHz          # the receiver's first IF bandwidth ahead of the tap\n",
        "  preselector: {center: 10.7 MHz, bandwidth: 400 kHz}\n",
    )
    found = of(check(text), "freqplan.image")
    assert [f.level for f in found] == ["warning"]
    expected = 10 * math.log10(1 + (10**0.3 - 1) * (0.91 / 0.2) ** 2)
    assert f"by only {expected:.1f} dB" in found[0].message


# ---- freqplan.path-width ------------------------------------------------------------------------------


def test_broadcast_through_the_narrow_path_is_an_error():
    path = EXAMPLES / "freq-broadcast-through-narrow.yaml"
    text = path.read_text("utf-8")
    found = of(engine.check_file(path), "freqplan.path-width")
    assert [f.level for f in found] == ["error"]
    f = found[0]
    assert f.message.startswith(
        "local FM station needs 180 kHz (180KF3E) but the narrow path passes only 20 kHz"
    )
    assert "the wide path (230 kHz) would pass" in f.message
    assert f.location.line == line_of(text, "    path: narrow", nth=1)


def test_voice_through_a_very_wide_path_is_a_warning(clean_text):
    text = edited(clean_text, "    path: narrow\n", "    path: wide\n")
    found = of(check(text), "freqplan.path-width")
    assert [f.level for f in found] == ["warning"]
    assert "is 11.2 times the 16 kHz (16K0F3E)" in found[0].message  # 180 / 16 (plain arithmetic)
    assert found[0].location.line == line_of(text, "path: wide")


def test_missing_deviation_is_a_note(clean_text):
    text = edited(clean_text, "    deviation: 5 kHz\n", "")
    found = of(check(text), "freqplan.path-width")
    assert [f.level for f in found] == ["note"]
    assert "signals[0].deviation is not given" in found[0].message


# ---- freqplan.upstream-bandwidth -------------------------------------------------------------------------


def test_upstream_narrower_than_broadcast_fm(clean_text):
    text = edited(
        clean_text,
        "    service: voice\n    path: narrow\n",
        "    service: voice\n    path: narrow\n"
        "  - {name: broadcast, modulation: fm, deviation: 75 kHz, audio_max: 15 kHz, service: broadcast, "
        "path: wide}\n",
    )
    text = edited(text, "bandwidth: 1 MHz ", "bandwidth: 100 kHz ")
    found = of(check(text), "freqplan.upstream-bandwidth")
    assert [f.level for f in found] == ["error"]
    assert "upstream bandwidth 100 kHz" in found[0].message
    assert "the 180 kHz (180KF3E) that broadcast needs" in found[0].message
    assert found[0].location.line == line_of(text, "bandwidth: 100 kHz")


def test_one_megahertz_upstream_suits_broadcast_fm(clean_text):
    # common practice: about 1 MHz of upstream resolution bandwidth suits broadcast FM
    text = edited(
        clean_text,
        "    service: voice\n    path: narrow\n",
        "    service: voice\n    path: narrow\n"
        "  - {name: broadcast, modulation: fm, deviation: 75 kHz, audio_max: 15 kHz, service: broadcast, "
        "path: wide}\n",
    )
    assert of(check(text), "freqplan.upstream-bandwidth") == []


# ---- freqplan.mixer-spurs -----------------------------------------------------------------------------


def test_if_harmonic_on_the_tuned_frequency_is_a_birdie(clean_text):
    # 23 x 455 kHz = 10.465 MHz (plain arithmetic): tune the source there, LO 10.010 MHz, and the
    # limiter's 23rd harmonic sits on the wanted signal
    text = edited(clean_text, "  frequency: 10.7 MHz\n", "  frequency: 10.465 MHz\n")
    text = edited(text, "frequency: 10.245 MHz", "frequency: 10.010 MHz")
    found = of(check(text), "freqplan.mixer-spurs")
    assert [f.level for f in found] == ["warning"]
    # the LO is pulled by its load: D = C1m / (2 (C0 + CL)) (crystal pulling, issue check value form);
    # X1: C1m 15 fF, C0 4 pF, specified 20 pF, oscillator load 33 pF || 33 pF + 4 pF stray = 20.5 pF
    shift = 15e-15 / (2 * (4e-12 + 20.5e-12)) - 15e-15 / (2 * (4e-12 + 20e-12))
    f_if = 10.465e6 - 10.010e6 * (1 + shift)
    assert f"IF harmonic 23 at {23 * f_if / 1e6:.6g}" in found[0].message
    assert found[0].location.line == line_of(text, "oscillator: {crystal: X1")


def test_clean_plan_spurs_are_listed_but_not_close(clean_text):
    result = check(clean_text)
    assert of(result, "freqplan.mixer-spurs") == []
    # the half-IF response 2 fs - 2 fLO = IF lies at fLO + IF/2, 227.5 kHz below the wanted 10.7 MHz
    half_if = [
        e
        for e in result.sheet
        if e.section == "spurs" and "2·fs − 2·fLO" in e.value.name and e.value.unit == "Hz"
    ]
    assert len(half_if) == 1 and abs(half_if[0].value.value - (10.7e6 - 455e3 / 2)) < 200


def test_close_window_is_a_setting(clean_text):
    settings = Settings(rule_settings={"freqplan.mixer-spurs": {"close": 250e3}})
    found = of(check(clean_text, settings=settings), "freqplan.mixer-spurs")
    # with the window widened to 250 kHz the half-IF spur (227.5 kHz off) is in it, and a -30 dBm
    # neighbour there is estimated well above the -100 dBm weakest signal: a warning; the IF
    # harmonics 23 and 24 (about 230 kHz either side) are in it too, but far down the narrow
    # filter's skirt: a note with their levels
    assert [f.level for f in found] == ["warning", "note"]
    assert "2·fs − 2·fLO = IF" in found[0].message
    assert "IF harmonic 24" in found[1].message and "dBm" in found[1].message


def test_close_window_does_not_grow_with_a_wide_path(clean_text):
    # a 180 kHz path used to widen the window to 900 kHz; it stays at 50 kHz
    text = edited(clean_text, "    path: narrow\n", "    path: wide\n")
    assert of(check(text), "freqplan.mixer-spurs") == []


def test_if_harmonic_far_above_the_old_order_is_found_with_its_level(clean_text):
    # the case: 29.6 MHz in, 455 kHz IF low side: LO 29.145 MHz; 65 x 455 kHz = 29.575 MHz lies
    # 25 kHz below the wanted signal (plain arithmetic); the old search stopped at harmonic 25
    text = edited(clean_text, "  frequency: 10.7 MHz\n", "  frequency: 29.6 MHz\n")
    text = edited(text, "frequency: 10.245 MHz", "frequency: 29.145 MHz")
    text = edited(text, "    path: narrow\n", "    path: wide\n")
    found = of(check(text), "freqplan.mixer-spurs")
    assert [f.level for f in found] == ["warning"]
    assert "IF harmonic 65" in found[0].message
    # level: 0 dBm limiter; odd harmonic 65 of a square wave at 1/65, -36.3 dB (Fourier series; the
    # envelope over duty cycles 48 to 52 % adds 1/cos(0.02 pi), 0.02 dB); 60 dB isolation; next to
    # nothing off the wide path's 180 kHz top: about -96 dBm, above -100 - 10 dBm
    assert "about -96 dBm" in found[0].message
    # on the narrow path the same harmonic is 25 kHz off a ±10 kHz filter: a note, not a warning
    narrow = of(check(edited(text, "    path: wide\n", "    path: narrow\n")), "freqplan.mixer-spurs")
    assert [f.level for f in narrow] == ["note"] and "IF harmonic 65" in narrow[0].message


# ---- freqplan.tank-tuning / tank-range ------------------------------------------------------------------


def test_tank_that_cannot_tune_to_the_if():
    path = EXAMPLES / "freq-tank-off-if.yaml"
    text = path.read_text("utf-8")
    found = of(engine.check_file(path), "freqplan.tank-tuning")
    assert [f.level for f in found] == ["error"]
    # 1 / (2 pi sqrt(L C)) with L 1.1 mH .. 0.9 mH and 82 pF: 529.9 kHz .. 585.9 kHz (plain arithmetic)
    low = 1 / (2 * math.pi * math.sqrt(1.1e-3 * 82e-12))
    assert f"tunes only {low / 1e3:.6g} kHz" in found[0].message
    assert "is outside that range" in found[0].message
    assert found[0].location.line == line_of(text, "L2: {kind: inductor")
    assert found[0].location.path == "parts.L2.adjust"


def test_fixed_tank_far_off_the_if(clean_text):
    old = "L2: {kind: inductor, value: 1 mH, adjust: {min: 0.9 mH, max: 1.1 mH}, q: 60,"
    text = edited(clean_text, old, "L2: {kind: inductor, value: 1 mH, q: 60,")
    text = edited(text, "value: 120 pF", "value: 150 pF")
    found = of(check(text), "freqplan.tank-tuning")
    assert [f.level for f in found] == ["error"] and "has no adjustment" in found[0].message


def test_clean_tank_tunes_to_the_if(clean_text):
    assert of(check(clean_text), "freqplan.tank-tuning") == []
    assert of(check(clean_text), "freqplan.tank-range") == []


def test_broadcast_deviation_exceeds_the_linear_range():
    path = EXAMPLES / "freq-broadcast-through-narrow.yaml"
    text = path.read_text("utf-8")
    found = of(engine.check_file(path), "freqplan.tank-range")
    assert [f.level for f in found] == ["warning"]
    # 2 x (75 kHz deviation + drift): source drift 500 Hz + crystal 20 ppm of 10.245 MHz (plain arithmetic)
    need = 2 * (75e3 + 500 + 20e-6 * 10.245e6)
    assert f"less than the {need / 1e3:.4g} kHz that local FM station swings" in found[0].message
    assert found[0].location.line == line_of(text, "R5: {kind: resistor")


# ---- freqplan.crystal-load / crystal-overtone --------------------------------------------------------------


def test_wrong_load_caps_pull_the_crystal(clean_text):
    text = edited(clean_text, "C6: {kind: capacitor, value: 33 pF", "C6: {kind: capacitor, value: 47 pF")
    text = edited(text, "C7: {kind: capacitor, value: 33 pF", "C7: {kind: capacitor, value: 47 pF")
    found = of(check(text), "freqplan.crystal-load")
    assert [f.level for f in found] == ["warning"]
    shift = 15e-15 / (2 * (4e-12 + 27.5e-12)) - 15e-15 / (2 * (4e-12 + 20e-12))  # D(27.5 pF) - D(20 pF)
    assert f"pulls it {shift * 1e6:+.1f} ppm" in found[0].message
    assert "X1 sees 27.5 pF (C6 and C7 plus 4 pF stray)" in found[0].message
    assert found[0].location.line == line_of(text, "oscillator: {crystal: X1")


def test_clean_crystal_load_is_fine(clean_text):
    assert of(check(clean_text), "freqplan.crystal-load") == []


def test_load_mismatch_without_motional_data(clean_text):
    text = edited(clean_text, "    motional_capacitance: 15 fF\n", "")
    text = edited(
        text,
        "value: 33 pF, dielectric: ceramic, ends: [U1.osc_emitter, GND]",
        "value: 15 pF, dielectric: ceramic, ends: [U1.osc_emitter, GND]",
    )
    found = of(check(text), "freqplan.crystal-load")
    assert [f.level for f in found] == ["warning"] and "will run high" in found[0].message


def test_overtone_crystal_on_fundamental_oscillator():
    path = EXAMPLES / "freq-overtone-on-fundamental.yaml"
    text = path.read_text("utf-8")
    found = of(engine.check_file(path), "freqplan.crystal-overtone")
    assert [f.level for f in found] == ["error"]
    assert "X1 is a 3rd-overtone crystal marked 44.545 MHz" in found[0].message
    assert "about 14.85 MHz" in found[0].message  # a third of 44.545 MHz (plain arithmetic)
    assert found[0].location.line == line_of(
        text, "oscillator: {crystal: X1, injection: low, mode: fundamental}"
    )
    assert found[0].location.path == "chain[1].oscillator.mode"


def test_fundamental_crystal_on_its_own_mode_is_fine(clean_text):
    assert of(check(clean_text), "freqplan.crystal-overtone") == []


# ---- freqplan.de-emphasis / audio-corner -------------------------------------------------------------------


def test_broadcast_example_de_emphasis_matches_region_1():
    assert (
        of(engine.check_file(EXAMPLES / "freq-broadcast-through-narrow.yaml"), "freqplan.de-emphasis") == []
    )


def test_75us_in_region_1_is_a_warning():
    path = EXAMPLES / "freq-broadcast-through-narrow.yaml"
    text = edited(
        path.read_text("utf-8"),
        "value: 5.1 kohm, ends: [U1.audio, DE1]",
        "value: 7.5 kohm, ends: [U1.audio, DE1]",
    )
    found = of(check(text), "freqplan.de-emphasis")
    assert [f.level for f in found] == ["warning"]
    assert "does not match the 50 µs of itu-region-1" in found[0].message
    assert found[0].location.line == line_of(text, "C13: {kind: capacitor")


def test_75us_in_region_2_is_fine():
    path = EXAMPLES / "freq-broadcast-through-narrow.yaml"
    text = edited(
        path.read_text("utf-8"),
        "value: 5.1 kohm, ends: [U1.audio, DE1]",
        "value: 7.5 kohm, ends: [U1.audio, DE1]",
    )
    text = edited(text, "region: itu-region-1", "region: itu-region-2")
    assert of(check(text), "freqplan.de-emphasis") == []


def test_broadcast_without_de_emphasis(clean_text):
    text = edited(clean_text, "    service: voice\n", "    service: broadcast\n")
    found = of(check(text), "freqplan.de-emphasis")
    assert [f.level for f in found] == ["warning"]
    assert "has no de-emphasis stage" in found[0].message
    assert found[0].location.line == line_of(text, "service: broadcast")


def test_audio_low_pass_cuts_broadcast_audio():
    path = EXAMPLES / "freq-broadcast-through-narrow.yaml"
    text = path.read_text("utf-8")
    found = of(engine.check_file(path), "freqplan.audio-corner")
    assert [f.level for f in found] == ["warning"]
    # the 10 kohm volume track loads the output: R10 || RV1 = 5 kohm (Thevenin; Horowitz & Hill, The Art
    # of Electronics, ch. 1), 1 / (2 pi 5 kohm 4.7 nF) = 6.773 kHz as wired, 3.386 kHz for the RC alone,
    # 20 log10(2) = 6.0 dB of flat loss (plain arithmetic)
    assert (
        f"corner {1 / (2 * math.pi * 5e3 * 4.7e-9) / 1e3:.4g} kHz as wired "
        f"({1 / (2 * math.pi * 10e3 * 4.7e-9) / 1e3:.4g} kHz for the RC alone; RV1 (10 kΩ through C12) loads "
        "its output, 6.0 dB of flat loss) is below the 15 kHz"
    ) in found[0].message
    assert found[0].location.line == line_of(text, "C11: {kind: capacitor")


def test_clean_audio_corner_is_fine(clean_text):
    assert of(check(clean_text), "freqplan.audio-corner") == []


def test_loaded_corner_on_the_sheet_and_the_rc_alone_beside_it(clean_text):
    """The clean plan's low-pass: R10 10 kohm, C11 4.7 nF, RV1 10 kohm through C12 1 uF (213 x C11,
    so a short at the corner). Thevenin (Horowitz & Hill, The Art of Electronics, ch. 1): source
    5 kohm, corner 6.773 kHz as wired beside 3.386 kHz alone, loss 20 log10(2) = 6.02 dB. For
    3 kHz voice a 6.8 kHz corner is 2.3 x the top: no finding at all."""
    result = check(clean_text)
    sheet = {e.value.name: e.value.value for e in result.sheet if e.owner == "audio-filter"}
    assert sheet["low-pass corner"] == pytest.approx(1 / (2 * math.pi * 10e3 * 4.7e-9))
    assert sheet["low-pass corner as wired"] == pytest.approx(1 / (2 * math.pi * 5e3 * 4.7e-9))
    assert sheet["low-pass passband loss as wired"] == pytest.approx(20 * math.log10(2))
    assert sheet["load on the low-pass output"] == "RV1 (10 kΩ through C12)"
    assert of(result, "freqplan.audio-corner") == []


def test_small_coupling_capacitor_leaves_the_rc_alone(clean_text):
    """C12 of 100 nF is only 21 x C11 (under the 100 x that makes it a short at the corner, its own
    corner with 10 kohm lies less than two decades below): the load is no plain resistance, so the
    sheet names it and the corner stays the RC alone's 3.386 kHz."""
    text = edited(clean_text, "C12: {kind: capacitor, value: 1 uF", "C12: {kind: capacitor, value: 100 nF")
    result = check(text)
    sheet = {e.value.name: e.value.value for e in result.sheet if e.owner == "audio-filter"}
    assert "low-pass corner as wired" not in sheet
    assert "not a plain resistance" in sheet["load on the low-pass output"]
    assert "C12 too small" in sheet["load on the low-pass output"]


def test_audio_corner_far_above_voice_is_a_note(clean_text):
    text = edited(clean_text, "C11: {kind: capacitor, value: 4.7 nF", "C11: {kind: capacitor, value: 1 nF")
    found = of(check(text), "freqplan.audio-corner")
    assert [f.level for f in found] == ["note"]


# ---- robustness ---------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "text",
    [
        "build_spec: 1\nbuild: {name: empty}\nparts: {}\n",
        "build_spec: 1\nbuild: {name: x}\nparts: {}\nchain:\n  - {stage: conversion}\n"
        "  - {stage: if-filter}\n  - {stage: discriminator}\n  - {stage: de-emphasis}\n"
        "  - {stage: audio-filter}\n",
        "build_spec: 1\nbuild: {name: x}\nsignals: [{name: s, modulation: cw}]\n"
        "source: {kind: antenna, frequency: 7 MHz}\nparts:\n  X1: {kind: crystal}\n"
        "  L1: {kind: inductor, value: 1 uH}\n  C1: {kind: capacitor, value: 1 pF}\nchain:\n"
        "  - {stage: conversion, oscillator: {crystal: X1, injection: low, load_caps: [C1, C9]}}\n"
        "  - {stage: if-filter, paths: {a: {filter: NOPE}, b: {}}}\n"
        "  - {stage: discriminator, tank: {inductor: L1, capacitor: C1}}\n",
    ],
)
def test_sparse_plans_give_no_internal_error(text):
    result = check(text)
    assert [f for f in result.findings if "internal error" in f.message] == []


def test_tank_range_is_checked_for_every_signal(clean_text):
    # a high-Q tank (R5 470 kohm with the coil's Q of 60) and a broadcast signal beside the voice:
    # both shortfalls are reported, not only the worst one
    text = edited(clean_text, "R5: {kind: resistor, value: 47 kohm", "R5: {kind: resistor, value: 470 kohm")
    text = edited(
        text,
        "    service: voice\n    path: narrow\n",
        "    service: voice\n    path: narrow\n"
        "  - {name: broadcast, modulation: fm, deviation: 75 kHz, audio_max: 15 kHz, service: broadcast, "
        "path: wide}\n",
    )
    found = of(check(text), "freqplan.tank-range")
    assert sorted(f.message.split(" swings")[0].rsplit(" that ", 1)[1] for f in found) == [
        "broadcast",
        "repeater voice",
    ]
    # the label says what is computed: 2 x (deviation + drift) (quadrature detector centred on f0)
    sheet = {(e.owner, e.value.name) for e in check(text).sheet}
    assert ("discriminator", "needed range for repeater voice, 2·(deviation + drift)") in sheet


def test_adjacent_channel_rejection_on_the_sheet(clean_text):
    # FL1 stated ±7.5 kHz at 6 dB and ±15 kHz at 40 dB, voice on 25 kHz channels: the equivalent
    # Butterworth through both points (Williams & Taylor order equation) at 25 kHz off
    old = "FL1: {kind: filter, center: 455 kHz, bandwidth: 20 kHz, bandwidth_at: 6 dB,"
    new = "15 kHz, bandwidth_at: 6 dB, stopband: 30 kHz, stopband_at: 40 dB,"
    text = edited(clean_text, old, old.replace("20 kHz, bandwidth_at: 6 dB,", new))
    text = edited(text, "    service: voice\n", "    service: voice\n    channel_spacing: 25 kHz\n")
    n = math.log10((1e4 - 1) / (10 ** 0.6 - 1)) / (2 * math.log10(2))
    expected = 10 * math.log10(1 + (10 ** 0.6 - 1) * (25 / 7.5) ** (2 * n))
    got = [e.value.value for e in check(text).sheet if e.value.name.startswith("adjacent-channel rejection")]
    assert got == [pytest.approx(min(expected, 80.0), abs=0.06)]


def test_the_tank_picture_reads_the_widest_needed_range():
    # the HTML figure marks the widest range the tank's signals need: 2 x (75 kHz + drift) for the
    # broadcast example (drift: 500 Hz source + 20 ppm of 10.245 MHz, plain arithmetic)
    from speccheck.reporters import figure_data

    result = engine.check_file(EXAMPLES / "freq-broadcast-through-narrow.yaml")
    tank = figure_data.tanks(figure_data.Sheet(result.sheet))[0]
    assert tank.need == pytest.approx(2 * (75e3 + 500 + 20e-6 * 10.245e6), rel=1e-3)


def test_audio_corner_is_judged_for_every_signal(clean_text):
    # a 1 kHz data signal beside the 3 kHz voice: the clean low-pass (R10 10 kohm, C11 4.7 nF, loaded by
    # the 10 kohm RV1: 1 / (2 pi (R10 || RV1) C) = 6.77 kHz, Thevenin) suits the voice and is 6.8 times
    # the data signal's top: a note for that one only
    voice = "    service: voice\n    path: narrow\n"
    text = edited(clean_text, voice, voice + "  - {name: telemetry, modulation: fm, deviation: 2 kHz, "
                                             "audio_max: 1 kHz, service: data, path: narrow}\n")
    found = of(check(text), "freqplan.audio-corner")
    assert [(f.level, "telemetry" in f.message) for f in found] == [("note", True)]
    assert f"{1 / (2 * math.pi * 5e3 * 4.7e-9) / 1e3:.1f} times the 1 kHz of telemetry" in found[0].message
