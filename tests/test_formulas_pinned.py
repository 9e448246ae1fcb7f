"""Formula edges a mutation run found unpinned (DEVELOPERS.md, "Mutation runs"): the guards with
their exact messages, the floors near where they act, the branches the middle-of-the-range tests
never take. Every expected number comes from the source named beside it, derived here by hand,
never from the function under test."""

from __future__ import annotations

import math
import random

import pytest

from speccheck.formulas import (
    amplifiers,
    bandwidth,
    battery,
    dividers,
    fmspectrum,
    harmonics,
    picks,
    preferred,
    shapes,
)

# ---- preferred values (IEC 60063, IEC 60127-1 Annex A) ----------------------------------------


def test_e24_as_published():
    # IEC 60063, the E24 series as the standard lists it (not the rounded powers 10^(i/24))
    assert preferred.E24 == (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
                             3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1)
    assert preferred.SERIES == {"E12": preferred.E12, "E24": preferred.E24, "E96": preferred.E96}


@pytest.mark.parametrize("bad", [0.0, -4.7, math.inf, -math.inf, math.nan])
def test_nearest_preferred_refuses_what_is_not_a_value(bad):
    with pytest.raises(ValueError, match=r"^a preferred value needs a positive number$"):
        preferred.nearest_preferred(bad)


@pytest.mark.parametrize("bad", [0.0, -1.0, math.inf, math.nan])
def test_r10_up_message_is_exact(bad):
    with pytest.raises(ValueError, match=r"^a rating must be a positive number$"):
        preferred.r10_up(bad)


@pytest.mark.parametrize("amps,rating", [
    (1.0, 1.0), (1.01, 1.25), (2.6, 3.15), (6.3, 6.3), (6.31, 8.0), (8.01, 10.0),  # IEC 60127-1 Annex A R10
    (0.26, 0.315), (0.0051, 0.0063), (31.6, 40.0), (100.0, 100.0)])
def test_r10_up_in_every_decade(amps, rating):
    assert preferred.r10_up(amps) == pytest.approx(rating, rel=1e-12)


# ---- batteries (Peukert's law as in Linden's Handbook of Batteries) ---------------------------


def test_running_hours_without_a_rated_current_ignores_the_exponent():
    # Peukert's law needs the capacity's rated current (H = C / I_r); without one, t = C / I
    # (definition of the ampere-hour): 2.5 Ah at 0.5 A is 5 h whatever exponent is given
    assert battery.running_hours(2.5, 0.5, None, 1.3) == pytest.approx(5.0)
    assert battery.running_hours(2.5, 0.5, 0.0, 1.3) == pytest.approx(5.0)


def test_running_hours_with_a_negative_draw_is_endless():
    assert battery.running_hours(2.5, -0.1) == math.inf  # nothing drawn: no end (the guard's meaning)


# ---- harmonics (Fourier series of a rectangular wave, Oppenheim & Willsky) ------------------


@pytest.mark.parametrize("n,duty", [(0, 0.5), (-1, 0.5), (1, 0.0), (1, 1.0), (3, -0.2)])
def test_pulse_harmonic_message_is_exact(n, duty):
    with pytest.raises(ValueError, match=r"^n must be 1 or more and the duty cycle between 0 and 1$"):
        harmonics.pulse_harmonic(n, duty)


def test_pulse_harmonic_db_just_above_its_floor():
    # n = 2: |sin(2πd)| / (2 sin(πd)) = |cos(πd)| (double-angle identity); at d = 0.5 − 6e-9 that is
    # sin(π·6e-9) = 1.885e-8, i.e. −154.5 dB: above the −160 dB floor, so reported as it is
    delta = 6e-9
    expected = 20 * math.log10(math.sin(math.pi * delta))
    assert -155.0 < expected < -154.0
    assert harmonics.pulse_harmonic_db(2, 0.5 - delta) == pytest.approx(expected, abs=1e-4)


@pytest.mark.parametrize("n,asym", [(0, 0.0), (-2, 0.01), (3, -0.01), (3, 0.5), (2, 0.7), (2, 1.0)])
def test_limiter_harmonic_guards(n, asym):
    with pytest.raises(ValueError, match=r"^n must be 1 or more and the asymmetry between 0 and 0\.5$"):
        harmonics.limiter_harmonic(n, asym)


def _envelope(n: int, delta: float) -> float:
    # upper envelope of the Fourier coefficients for duty cycles 0.5 ± δ (Oppenheim & Willsky's
    # pulse-train series written with d = 0.5 − δ): odd n |cos(πnδ)|/(n cos πδ) <= 1/(n cos πδ);
    # even n |sin(πnδ)|/(n cos πδ) <= min(1, πnδ)/(n cos πδ) (|sin x| <= min(1, x))
    top = 1.0 if n % 2 else min(1.0, math.pi * n * delta)
    return top / (n * math.cos(math.pi * delta))


@pytest.mark.parametrize("n,delta", [(2, 0.02), (4, 0.02), (24, 0.02), (3, 0.02), (3, 0.1),
                                     (2, 0.1), (6, 0.1), (65, 0.1), (2, 0.3), (5, 0.3)])
def test_limiter_harmonic_is_the_envelope_of_the_series(n, delta):
    assert harmonics.limiter_harmonic(n, delta) == pytest.approx(_envelope(n, delta), rel=1e-12)
    assert harmonics.limiter_harmonic_db(n, delta) == pytest.approx(20 * math.log10(_envelope(n, delta)),
                                                                    abs=1e-9)


def test_limiter_harmonic_at_the_edges():
    # the fundamental is the reference; a symmetric limiter (δ = 0) is a square wave: 1/n odd, no even
    assert harmonics.limiter_harmonic(1, 0.3) == 1.0
    assert harmonics.limiter_harmonic(1, 0.0) == 1.0
    assert harmonics.limiter_harmonic(5, 0.0) == pytest.approx(1 / 5)
    assert harmonics.limiter_harmonic(2, 0.0) == 0.0
    assert harmonics.limiter_harmonic_db(2, 0.0) == harmonics.FLOOR_DB
    assert harmonics.limiter_harmonic_db(3, 0.0) == pytest.approx(-20 * math.log10(3))  # −9.54 dB
    # without an asymmetry given the limiter is symmetric: the square wave's 1/n
    assert harmonics.limiter_harmonic(3) == pytest.approx(1 / 3)
    assert harmonics.limiter_harmonic_db(3) == pytest.approx(-20 * math.log10(3))


def test_limiter_harmonic_db_just_above_its_floor():
    # n = 2 at δ: π·2·δ / (2 cos πδ) ≈ πδ; δ = 6.4e-9 gives 2.01e-8, −153.9 dB, above the floor
    delta = 6.4e-9
    expected = 20 * math.log10(math.pi * 2 * delta / (2 * math.cos(math.pi * delta)))
    assert -154.5 < expected < -153.5
    assert harmonics.limiter_harmonic_db(2, delta) == pytest.approx(expected, abs=1e-6)


@pytest.mark.parametrize("f_base,f_top,n", [
    (455e3, 300e3, 1),  # below the fundamental: still the fundamental itself
    (455e3, 455e3, 1), (455e3, 909e3, 1), (455e3, 910e3, 2),
    (455e3, 1365e3, 3),  # exactly the third harmonic (3 x 455 kHz) reaches
    (455e3, 1364.9e3, 2), (10.7e6, 107e6, 10)])
def test_harmonics_reaching(f_base, f_top, n):
    # the n-th harmonic lies at n·f_base (Fourier series): the highest n with n·f_base <= f_top
    assert harmonics.harmonics_reaching(f_base, f_top) == n


# ---- FM spectrum (Bessel functions, Abramowitz & Stegun Table 9.1) ----------------------------

# A&S Table 9.1 / 9.2, ten decimals: J_n(1) for n = 0..2 and J_n(5) for n = 0..8
J_AT_1 = (0.7651976866, 0.4400505857, 0.1149034849)
J_AT_5 = (-0.1775967713, -0.3275791376, 0.0465651163, 0.3648312306, 0.3912323605, 0.2611405461,
          0.1310487318, 0.0533764102, 0.0184052166)


def test_an_unmodulated_carrier_is_one_line():
    # J_0(0) = 1 and J_n(0) = 0 for n >= 1 (A&S 9.1.10): all the power in the carrier
    assert fmspectrum.sideband_powers(0.0) == [(0, pytest.approx(1.0))]


@pytest.mark.parametrize("bad", [-0.1, math.inf, math.nan])
def test_sideband_powers_refuses_a_bad_index(bad):
    with pytest.raises(ValueError, match=r"^a modulation index must be a finite number, zero or more$"):
        fmspectrum.sideband_powers(bad)


@pytest.mark.parametrize("f_mod", [0.0, -1e3])
def test_passed_share_needs_a_modulating_frequency(f_mod):
    with pytest.raises(ValueError, match=r"^the modulating frequency must be positive$"):
        fmspectrum.passed_share(5e3, f_mod, lambda f: 0.0)


def test_passed_share_of_a_carrier_off_the_filter_centre():
    # β = 1 (1 kHz deviation, 1 kHz tone), carrier 1 kHz off a filter that passes only its centre:
    # the line n = −1 lands on the centre, so J_1(1)² passes (A&S Table 9.1)
    def only_centre(f: float) -> float:
        return 0.0 if abs(f) < 1 else 300.0

    off_centre = fmspectrum.passed_share(1e3, 1e3, only_centre, offset=1e3)
    assert off_centre == pytest.approx(J_AT_1[1] ** 2, rel=1e-6)
    assert fmspectrum.passed_share(1e3, 1e3, only_centre) == pytest.approx(J_AT_1[0] ** 2, rel=1e-6)
    # a filter 3.0103 dB down everywhere passes half (definition of the decibel)
    half = fmspectrum.passed_share(5e3, 1e3, lambda f: 10 * math.log10(2))
    assert half == pytest.approx(0.5, abs=1e-6)


def test_share_within_a_number_of_line_pairs():
    # A&S Table 9.1: the carrier alone J_0(1)², with the first pair J_0² + 2 J_1²
    assert fmspectrum.share_within(1.0, 0) == pytest.approx(J_AT_1[0] ** 2, rel=1e-8)
    assert fmspectrum.share_within(1.0, 1) == pytest.approx(J_AT_1[0] ** 2 + 2 * J_AT_1[1] ** 2, rel=1e-8)


def test_carson_share_counts_the_line_at_the_band_edge():
    # Δf = 5 kHz, f_m = 1 kHz: Carson's band ±6 kHz holds the lines |n| <= 6, the sixth exactly on its edge
    # (A&S Table 9.2): J_0(5)² + 2 Σ_{n=1..6} J_n(5)² = 0.9944
    expected = J_AT_5[0] ** 2 + 2 * sum(j * j for j in J_AT_5[1:7])
    assert fmspectrum.carson_share(5e3, 1e3) == pytest.approx(expected, rel=1e-8)
    # β = 1: lines |n| <= 2, J_0² + 2 (J_1² + J_2²) = 0.9989
    expected_1 = J_AT_1[0] ** 2 + 2 * (J_AT_1[1] ** 2 + J_AT_1[2] ** 2)
    assert fmspectrum.carson_share(1e3, 1e3) == pytest.approx(expected_1, rel=1e-8)


def test_loss_in_db_edges():
    # −10·log10(share) (definition of the decibel)
    assert fmspectrum.loss_db(1.0) == 0.0
    assert fmspectrum.loss_db(0.1) == pytest.approx(10.0)
    assert fmspectrum.loss_db(-0.1) == math.inf


def test_small_lines_left_out_and_large_kept():
    # J_8(5)² = 3.39e-4 (A&S Table 9.2) is kept; every line kept but the carrier carries more than
    # NEGLIGIBLE
    lines = dict(fmspectrum.sideband_powers(5.0))
    assert lines[8] == pytest.approx(J_AT_5[8] ** 2, rel=1e-8)
    assert all(p > fmspectrum.NEGLIGIBLE for n, p in lines.items() if n != 0)
    assert fmspectrum.NEGLIGIBLE == 1e-9
    # J_n(5) at n = 20 is about 2.8e-11 (A&S 9.1.7: J_n(x) ~ (x/2)^n / n!) so its power is far below
    assert 20 not in lines and (2.5 ** 20 / math.factorial(20)) ** 2 < fmspectrum.NEGLIGIBLE


# ---- filter shapes (Butterworth order equation, Williams & Taylor ch. 2; Gaussian law) ---------


def _order(pass_width: float, pass_db: float, stop_width: float, stop_db: float) -> float:
    # Williams & Taylor, Electronic Filter Design Handbook, ch. 2:
    # N = log10((10^(As/10) − 1) / (10^(Ap/10) − 1)) / (2 log10(Bs/Bp))
    ratio = (10 ** (stop_db / 10) - 1) / (10 ** (pass_db / 10) - 1)
    return math.log10(ratio) / (2 * math.log10(stop_width / pass_width))


@pytest.mark.parametrize("name,width,factor,stop_db", [
    ("ceramic", 15e3, 2.0, 40.0),  # ±7.5 kHz at 6 dB, about ±15 kHz at 40 dB (typical, from memory)
    ("crystal", 2.4e3, 1.8, 60.0),  # 6 dB : 60 dB shape factor 1.8 (typical, from memory)
    ("mechanical", 2.4e3, 2.0, 60.0)])  # 6 dB : 60 dB shape factor 2 (typical, from memory)
def test_a_typical_class_hits_its_two_points(name, width, factor, stop_db):
    s = shapes.from_class(name, width)
    assert (s.kind, s.at_db, s.typical, s.what) == ("butterworth", 6.0, True, shapes.TYPICAL[name].what)
    assert s.order == pytest.approx(_order(1.0, 6.0, factor, stop_db), rel=1e-12)
    assert s.attenuation(width / 2) == pytest.approx(6.0, abs=1e-9)
    assert s.attenuation(factor * width / 2) == pytest.approx(stop_db, abs=1e-9)


def test_a_class_quoted_at_another_attenuation_keeps_its_steepness():
    s = shapes.from_class("ceramic", 12e3, 3.0)
    assert s.at_db == 3.0 and s.order == pytest.approx(_order(1.0, 6.0, 2.0, 40.0), rel=1e-12)
    assert s.attenuation(6e3) == pytest.approx(3.0, abs=1e-9)


def test_tuned_circuit_and_gaussian_classes():
    lc = shapes.from_class("lc", 10e3)
    assert (lc.kind, lc.order, lc.at_db, lc.typical) == ("butterworth", 1.0, 3.0, True)
    assert lc.what == "one tuned circuit"
    # one pole quoted 3 dB at ±5 kHz: at ±15 kHz 10 log10(1 + (10^0.3 − 1)·3²) (first-order response)
    assert lc.attenuation(15e3) == pytest.approx(10 * math.log10(1 + (10 ** 0.3 - 1) * 9), abs=1e-9)
    g = shapes.from_class("gaussian", 1e6)
    assert (g.kind, g.at_db, g.typical, g.what) == ("gaussian", 3.0, True, "Gaussian")
    assert g.attenuation(1e6) == pytest.approx(12.0)  # 3 dB · (2·1 MHz / 1 MHz)² (Gaussian law)
    assert shapes.from_class("gaussian", 1e6, 6.0).at_db == 6.0
    assert shapes.DEFAULT_CLASS == "ceramic"


def test_shape_defaults_centre_and_ultimate():
    s = shapes.Shape(10e3)
    assert (s.at_db, s.kind, s.order, s.ultimate_db) == (6.0, "butterworth", 1.0, 80.0)
    assert (s.typical, s.what) == (False, "")
    assert s.attenuation(0.0) == 0.0
    assert s.attenuation(-5e3) == pytest.approx(6.0) and s.attenuation(5e3) == pytest.approx(6.0)
    # first order 6 dB at ±5 kHz: (10^0.6 − 1)·x² reaches 10^8 − 1 (80 dB) near x = 5800; far beyond, 80 dB
    assert s.attenuation(1e9) == shapes.ULTIMATE_DB == 80.0
    assert shapes.Shape(10e3, ultimate_db=50.0).attenuation(1e9) == 50.0
    assert s.width_at(-3.0) == 0.0
    assert s.width_at(20.0) == pytest.approx(10e3 * math.sqrt((10 ** 2 - 1) / (10 ** 0.6 - 1)))
    flat = shapes.Shape(10e3, 6.0, "flat")
    assert flat.attenuation(5e3) == 0.0 and flat.attenuation(5.001e3) == 80.0 and flat.width_at(0.0) == 0.0


WIDER = r"^the stopband must be wider and more attenuated than the passband$"


def test_butterworth_order_guards():
    for args in ((2.0, 6.0, 1.0, 40.0), (1.0, 6.0, 1.0, 40.0), (0.0, 6.0, 2.0, 40.0), (1.0, 40.0, 2.0, 6.0),
                 (1.0, 6.0, 2.0, 6.0), (1.0, 0.0, 2.0, 40.0)):
        with pytest.raises(ValueError, match=WIDER):
            shapes.butterworth_order(*args)


def test_cascade_adds_in_db_up_to_the_largest_ultimate():
    # cascaded two-ports add in dB (any circuits text); feed-through caps the whole (common practice)
    g = shapes.gaussian(10e3)  # 3 dB at ±5 kHz, 12 dB at ±10 kHz
    assert shapes.cascade_attenuation([], 465e3) == 0.0
    assert shapes.cascade_attenuation([(455e3, g), (455e3, g)], 465e3) == pytest.approx(24.0)
    assert shapes.cascade_attenuation([(455e3, g), (460e3, g)], 465e3) == pytest.approx(12.0 + 3.0)
    low = shapes.Shape(10e3, ultimate_db=50.0)
    high = shapes.Shape(10e3, ultimate_db=70.0)
    assert shapes.cascade_attenuation([(455e3, low), (455e3, high)], 10.7e6) == 70.0


# ---- picks (IEC 60063 walks, ISO 3 R5 voltage ratings, circuit theory) -----------------------


@pytest.mark.parametrize("low,high", [(0.0, 1e3), (-1.0, 1e3), (2e3, 1e3), (1e3, math.inf)])
def test_series_values_guard(low, high):
    with pytest.raises(ValueError, match=r"^a range of positive values is needed$"):
        picks.series_values("E12", low, high)


def test_series_values_include_both_ends():
    # IEC 60063 E12: 1.0 1.2 1.5 1.8 2.2 ...
    assert picks.series_values("E12", 1e3, 2.2e3) == [1e3, 1.2e3, 1.5e3, 1.8e3, 2.2e3]
    assert picks.series_values("E12", 4.7e3, 4.7e3) == [4.7e3]
    assert picks.series_values("E24", 0.95, 1.15) == [1.0, 1.1]
    assert picks.series_values("E12", 8.0, 12.5) == [8.2, 10.0, 12.0]  # across a decade


def test_walks_at_and_across_decades():
    # IEC 60063 E12 / E24
    assert picks.preferred_down(4.7e3, "E12") == 4.7e3
    assert picks.preferred_up(9.5, "E12") == 10.0
    assert picks.preferred_down(1.05, "E12") == 1.0
    assert picks.preferred_down(0.99, "E12") == 0.82
    assert picks.preferred_around(34e-12, "E12", 1) == [33e-12, 39e-12]
    assert picks.preferred_around(33e-12, "E12", 1) == [27e-12, 33e-12]
    assert picks.preferred_around(1.05, "E24", 3) == [0.82, 0.91, 1.0, 1.1, 1.2, 1.3]


def test_ratings_and_wires():
    # ISO 3 R5 and the stocked steps (common practice): 630 V is the top of the table
    assert picks.voltage_rating_up(630.0) == 630.0 and picks.voltage_rating_up(631.0) is None
    assert picks.voltage_rating_up(3.0) == 4.0 and picks.voltage_rating_up(35.0) == 35.0
    assert picks.rating_up(5.0, (1.0, 5.0, 10.0)) == 5.0 and picks.rating_up(5.01, (1.0, 5.0, 10.0)) == 10.0
    # a table of ampacities {AWG: A} (made up for the test): the thinnest gauge that carries the current
    table = {24: 0.5, 22: 0.8, 20: 1.5, 18: 2.3}
    assert picks.thinnest_wire_for(1.5, table) == 20
    assert picks.thinnest_wire_for(1.51, table) == 18
    assert picks.thinnest_wire_for(0.1, table) == 24
    assert picks.thinnest_wire_for(2.31, table) is None
    assert picks.highest_below(10.0, (4.0, 8.0, 12.0, 6.0), lambda v: v != 8.0) == 6.0
    assert picks.highest_below(8.0, (4.0, 8.0), lambda v: True) == 4.0
    assert picks.highest_below(4.0, (4.0, 8.0), lambda v: True) is None


def test_smallest_heat_sink_by_package():
    # from memory: a tab package (θJC up to about 5 °C/W) takes a bolt-on sink to 1 °C/W, a small one 5 °C/W
    assert picks.smallest_heat_sink(5.0) == 1.0
    assert picks.smallest_heat_sink(1.5) == 1.0
    assert picks.smallest_heat_sink(5.01) == 5.0
    assert picks.smallest_heat_sink(83.0) == 5.0


def test_inverse_resonance_and_range_position():
    # f0 = 1 / (2π sqrt(L C)) (Thomson's formula): the inductance found resonates back at f0
    inductance = picks.inductance_for(455e3, 120e-12)
    assert 1 / (2 * math.pi * math.sqrt(inductance * 120e-12)) == pytest.approx(455e3, rel=1e-12)
    assert inductance == pytest.approx(1.0196e-3, rel=1e-4)  # 1 / ((2π·455 kHz)²·120 pF) = 1 / 980.76
    # log position: 0 at low, 1 at high, 0.5 at the geometric mean sqrt(100·1000) = 316.2
    assert picks.position_in_range(100.0, 100.0, 1000.0) == 0.0
    assert picks.position_in_range(1000.0, 100.0, 1000.0) == pytest.approx(1.0)
    assert picks.position_in_range(math.sqrt(1e5), 100.0, 1000.0) == pytest.approx(0.5)
    assert picks.position_in_range(10.0, 100.0, 1000.0) == pytest.approx(-1.0)
    assert picks.position_in_range(500.0, 100.0, 100.0) == 0.5
    assert picks.position_in_range(500.0, 200.0, 100.0) == 0.5
    # parallel resistances: a coil loss equal to the wanted total leaves nothing to add; none given: the total
    assert math.isinf(picks.damping_for(10e3, 10e3))
    assert picks.damping_for(10e3, math.inf) == 10e3
    assert picks.damping_for(10e3, 30e3) == pytest.approx(15e3)  # 1/10k − 1/30k = 1/15k


def test_second_run_survivors():
    # a half-hertz tone is a tone: Δf = 1 Hz at f_m = 0.5 Hz is β = 2, all its power through a flat filter
    # (A&S 9.1.76, Σ J_n² = 1)
    assert fmspectrum.passed_share(1.0, 0.5, lambda f: 0.0) == pytest.approx(1.0, abs=1e-6)
    # a passband quoted at 0.5 dB (a ripple-band edge) is a passband: Williams & Taylor's order equation
    expected = _order(1.0, 0.5, 2.0, 40.0)
    assert shapes.butterworth_order(1.0, 0.5, 2.0, 40.0) == pytest.approx(expected, rel=1e-12)
    # two E12 neighbours each side by default (IEC 60063 E12: 22, 27 | 33, 39 pF around 30 pF)
    assert picks.preferred_around(30e-12, "E12") == [22e-12, 27e-12, 33e-12, 39e-12]


def test_nearest_preferred_agrees_with_a_search_of_every_decade():
    # the definition (IEC 60063 values, nearest on a log scale) searched by brute force over 26 decades
    rng = random.Random(60063)
    for _ in range(500):
        value = 10 ** rng.uniform(-14, 7)
        for series in (preferred.E12, preferred.E24, preferred.E96):
            every = [float(f"{m * 10.0 ** d:.6g}") for d in range(-16, 10) for m in series]
            best = min(abs(math.log(c / value)) for c in every)
            pick, error = preferred.nearest_preferred(value, series)
            assert abs(math.log(pick / value)) == pytest.approx(best, abs=1e-12)
            assert error == pytest.approx(pick / value - 1.0)


# ---- dividers (Millman's theorem / nodal analysis; Thevenin's theorem, Horowitz & Hill ch. 1) ----


def test_dividers_edges():
    with pytest.raises(ValueError, match=r"^a node needs at least one source$"):
        dividers.node_voltage([])
    # a wiper cannot leave its track: past either end it sits at that end (V_b behind 0 ohm, V_a behind 0 ohm)
    assert dividers.wiper_source(0.0, 6.0, 10e3, 1.5) == (6.0, 0.0)
    assert dividers.wiper_source(0.0, 6.0, 10e3, -0.5) == (0.0, 0.0)
    # a 1 ohm drive still divides: 6 V · 1 / (1 + 1 Mohm) (Schmitt trigger hysteresis, Horowitz & Hill ch. 4)
    assert dividers.feedback_width(1.0, None, 1e6, 6.0) == pytest.approx(6.0 / (1 + 1e6), rel=1e-12)


def test_knob_at_the_ends_of_its_track():
    # 1 ohm from the wiper, 4 ohm feedback to an output at 6 V, track 0 V .. 6 V (numbers chosen exact in
    # binary). Wiper at the 0 V end: Millman (0/1 + 6/4) / (1/1 + 1/4) = 1.2 V; at the 6 V end 6 V.
    assert dividers.wiper_fraction_for(1.2, 0.0, 6.0, 10e3, 1.0, None, 4.0, 6.0) == 0.0
    assert dividers.wiper_fraction_for(6.0, 0.0, 6.0, 10e3, 1.0, None, 4.0, 6.0) == pytest.approx(1.0)


def test_knob_on_a_track_that_falls():
    # track from 6 V down to 0 V, 100 kohm from the wiper, 2.2 Mohm to an output at 0 V: find x for 5.5 V and
    # check it by hand: Thevenin 6 (1 − x) behind x (1 − x) 10 kohm, then Millman at the node
    x = dividers.wiper_fraction_for(5.5, 6.0, 0.0, 10e3, 100e3, None, 2.2e6, 0.0)
    assert x is not None and 0.0 < x < 1.0
    v_w, r = 6.0 * (1 - x), x * (1 - x) * 10e3 + 100e3
    assert (v_w / r) / (1 / r + 1 / 2.2e6) == pytest.approx(5.5, abs=1e-9)


# ---- class-B full output per rail (Boylestad & Nashelsky §12; RMS of rectified sines) ----------


def test_full_output_currents_of_each_rail():
    # half-wave of peak I_p: average I_p/π, RMS I_p/2; full-wave: 2·I_p/π, I_p/√2 (circuit theory)
    bridge = amplifiers.class_b_full_output("bridge", 12.0, 8.0, saturation=3.0)
    ip = 9.0 / 8.0  # 12 V − 3 V across 8 ohm
    assert bridge == pytest.approx({"v_peak": 9.0, "i_peak": ip, "i_pos": 2 * ip / math.pi, "i_neg": 0.0,
                                    "rms_pos": ip / math.sqrt(2), "rms_neg": 0.0,
                                    "p_in": 12.0 * 2 * ip / math.pi, "p_out": 81.0 / 16.0})
    split = amplifiers.class_b_full_output("split-supply", 15.0, 8.0, -15.0, saturation=4.0)
    ip = 13.0 / 8.0  # 15 V − 4 V / 2 to the peak
    assert split == pytest.approx({"v_peak": 13.0, "i_peak": ip, "i_pos": ip / math.pi, "i_neg": ip / math.pi,
                                   "rms_pos": ip / 2, "rms_neg": ip / 2, "p_in": 30.0 * ip / math.pi,
                                   "p_out": 169.0 / 16.0})
    single = amplifiers.class_b_full_output("single-ended", 12.0, 8.0, saturation=3.0)
    ip = 4.5 / 8.0  # (12 V − 3 V) / 2 to the peak
    assert single == pytest.approx({"v_peak": 4.5, "i_peak": ip, "i_pos": ip / math.pi, "i_neg": 0.0,
                                    "rms_pos": ip / 2, "rms_neg": 0.0, "p_in": 12.0 * ip / math.pi,
                                    "p_out": 4.5 ** 2 / 16.0})


def test_full_output_when_saturation_eats_the_supply():
    # more saturation than supply leaves no swing at all (peak = max(0, V − V_sat)), never a negative one
    assert amplifiers.class_b_full_output("bridge", 2.0, 8.0, saturation=3.0)["v_peak"] == 0.0
    assert amplifiers.class_b_full_output("single-ended", 2.0, 8.0, saturation=5.0)["v_peak"] == 0.0
    # a rated output of 0 W is no rating: the clipping limit stands, (12 − 3)/2 = 4.5 V peak
    assert amplifiers.class_b_full_output("single-ended", 12.0, 8.0, saturation=3.0,
                                          rated_output=0.0)["v_peak"] == pytest.approx(4.5)


def test_bandwidth_designator_refusals():
    # Radio Regulations Appendix 1: four characters, three figures and H, K, M or G; nothing above 999 GHz
    for bad in (0.0, -1.0, math.inf, math.nan):
        with pytest.raises(ValueError, match=r"^a bandwidth must be a positive number$"):
            bandwidth.bandwidth_code(bad)
    with pytest.raises(ValueError, match=r"^a bandwidth above 999 GHz has no designator$"):
        bandwidth.bandwidth_code(1e13)
    assert bandwidth.bandwidth_code(999e9) == "999G"
