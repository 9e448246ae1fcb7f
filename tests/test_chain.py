"""The walk along the chain (speccheck/chain.py): the LO each conversion makes and the spread
that reaches the IF, each number derived by hand from the plan's values: f_LO = f_osc·(1 + D)·n
for a crystal pulled by D and multiplied n times, f_osc·n for an oscillator given by frequency;
the LO spread n·(tolerance·f_x + drift); the IF spread adds the source drift."""

from __future__ import annotations

import pytest
from conftest import CLEAN, edited

from speccheck import chain, loader

OSC = "oscillator: {crystal: X1, injection: low, mode: fundamental, load_caps: [C6, C7], stray: 4 pF}"


def plan_of(text: str) -> chain.Plan:
    loaded = loader.load_text(text, "plan.yaml")
    assert loaded.can_check, [f.message for f in loaded.findings]
    return chain.frequency_plan(loaded.build)


def test_oscillator_given_by_frequency_and_multiplied():
    text = edited(CLEAN.read_text("utf-8"), OSC,
                  "oscillator: {frequency: 3.415 MHz, multiplier: 3, injection: low, drift: 100 Hz}")
    c = plan_of(text).conversions[0]
    assert c.lo == pytest.approx(3 * 3.415e6)  # 10.245 MHz
    assert c.lo_unc == pytest.approx(3 * 100.0)  # the drift is multiplied too
    assert c.f_if == pytest.approx(10.7e6 - 10.245e6)
    assert c.if_unc == pytest.approx(500.0 + 300.0)  # source drift + LO spread
    assert c.side == "low"


def test_crystal_pulled_and_multiplied():
    text = edited(CLEAN.read_text("utf-8"), OSC, OSC.replace("stray: 4 pF}", "stray: 4 pF, multiplier: 2}"))
    c = plan_of(text).conversions[0]
    # X1: 10.245 MHz, 20 ppm, calibrated at 20 pF, C1 15 fF, C0 4 pF; C6 = C7 = 33 pF plus 4 pF stray
    # give 20.5 pF. Pulling D = C1/(2(C0 + CL)): the shift is D(20.5 pF) − D(20 pF) = −7.65 ppm.
    shift = 15e-15 / (2 * (4e-12 + 20.5e-12)) - 15e-15 / (2 * (4e-12 + 20e-12))
    assert c.pull == pytest.approx(shift)
    assert c.lo == pytest.approx(2 * 10.245e6 * (1 + shift))
    assert c.lo_unc == pytest.approx(2 * 10.245e6 * 20e-6)  # 2 × 20 ppm of 10.245 MHz = 409.8 Hz
    assert c.side == "high"  # 20.49 MHz is above the 10.7 MHz input
    assert c.f_if == pytest.approx(c.lo - 10.7e6)
    assert c.if_unc == pytest.approx(500.0 + 2 * 10.245e6 * 20e-6)


def test_filter_fit_margin_of_the_clean_plan():
    # freqplan.filter-fit publishes the worst-case margin: the signal's necessary band (SM.1138:
    # 2·3 kHz + 2·5 kHz = 16 kHz) around the worst-case IF against FL1's 445-465 kHz passband
    # (455 kHz ± 10 kHz at 6 dB). The IF and its spread come from the walk (pinned above).
    from conftest import check

    text = CLEAN.read_text("utf-8")
    c = plan_of(text).conversions[0]
    low_side = (c.f_if - c.if_unc - 16e3 / 2) - 445e3
    high_side = 465e3 - (c.f_if + c.if_unc + 16e3 / 2)
    margin = next(e.value.value for e in check(text).sheet
                  if e.value.name == "margin for repeater voice (worst case)")
    assert margin == pytest.approx(min(low_side, high_side))


def test_cascade_adds_in_db_but_stops_at_the_ultimate_attenuation():
    """Two filters in cascade add their attenuations in dB (cascade of two-ports, any circuits
    text), but feed-through on the board bypasses the whole cascade: the total stops at the
    largest ultimate attenuation of the filters (common practice), never 2 x 80 dB."""
    from speccheck.chain import Band
    from speccheck.formulas import shapes

    first = shapes.Shape(1e6, 6.0, "butterworth", 2.0)
    second = shapes.Shape(1e6, 6.0, "butterworth", 2.0, ultimate_db=70.0)
    band = Band(10.2e6, 11.2e6, "two filters", [(10.7e6, first), (10.7e6, second)])
    # At the 6 dB edge each Butterworth is 6 dB down by definition: 12 dB in cascade.
    assert band.attenuation(10.7e6 + 0.5e6) == pytest.approx(12.0, abs=1e-9)
    # Far out each one stops at its own ultimate (80 and 70 dB); the cascade at the larger, 80 dB.
    assert band.attenuation(10.7e6 + 50e6) == pytest.approx(80.0)
    assert Band(0.0, 1.0, "none").attenuation(5.0) == 0.0
    # The same sum serves the pictures, so a drawn curve and a verdict cannot disagree.
    responses = [(10.7e6, first), (10.7e6, second)]
    assert shapes.cascade_attenuation(responses, 10.7e6 + 50e6) == pytest.approx(80.0)
