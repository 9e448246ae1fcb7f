"""The IF paths, the passband ahead and the signals drawn as the rules modelled them: the curves come
from the shapes freqplan publishes on the design sheet, the lines from the tone it tests with, so
the picture and the verdict cannot disagree (checked here by recomputing the verdict's numbers
from what the pictures read)."""

import math

import pytest
from conftest import EXAMPLES

from speccheck import engine, responses
from speccheck.formulas import shapes
from speccheck.reporters import figure_spectra, figures

SWITCHED = EXAMPLES / "bench-demod-selector.yaml"
BEGINNER = EXAMPLES / "beginner-plan.yaml"


def _conversion(path):
    result = engine.check_file(path)
    sheet = figures.Sheet(result.sheet)
    return result, sheet, figures.conversions(sheet)[0]


@pytest.mark.parametrize("shape", [
    shapes.from_class("ceramic", 15e3, 6.0),
    shapes.gaussian(1e6),
    shapes.from_class("lc", 280e3),
    shapes.from_stopband(20e3, 6.0, 50e3, 60.0, what="20 kHz at 6 dB, 50 kHz at 60 dB"),
])
def test_a_published_shape_reads_back_as_the_same_curve(shape):
    entries = {name: value for name, value, _ in responses.shape_entries(shape, "p: ", 455e3)}
    back = responses.shape_from(entries.get, "p: ")
    assert back is not None and entries["p: centre"] == 455e3
    for offset in (0.0, 3e3, 7.5e3, 12e3, 40e3, 900e3):
        assert back.attenuation(offset) == shape.attenuation(offset)


@pytest.mark.parametrize("example", [SWITCHED, BEGINNER])
def test_the_drawn_share_is_the_share_the_rule_found(example):
    # The worst end of the worst-case IF, recomputed from the curve and tone the picture draws,
    # gives the share freqplan.filter-fit published (rounded there to 0.01 %).
    _, _, c = _conversion(example)
    checked = 0
    for sig in c.signals:
        path = next(p for p in c.paths if sig.path is None or p.name == sig.path)
        assert path.shape is not None and sig.tone is not None and sig.share is not None
        _, share = figure_spectra.worst_end(c, sig, path)
        assert share * 100 == pytest.approx(sig.share, abs=0.006)
        checked += 1
    assert checked == len(c.signals) >= 1


@pytest.mark.parametrize("example", [SWITCHED, BEGINNER])
def test_the_drawn_image_rejection_is_the_rules(example):
    # The passband ahead as drawn (its filters in cascade) rejects the image by the dB that
    # freqplan.image published for each signal and position (rounded there to 0.1 dB).
    _, _, c = _conversion(example)
    groups = figure_spectra.ahead_groups(c)
    assert groups
    for _, resp, rejection in groups:
        drawn = figure_spectra.ahead_attenuation(resp, c.image)
        drawn -= figure_spectra.ahead_attenuation(resp, c.f_in)
        assert drawn == pytest.approx(rejection, abs=0.051)


def test_bessel_lines_are_the_textbook_levels():
    # Abramowitz & Stegun, Table 9.1: J0(1) = 0.7651976866, J1(1) = 0.4400505857; a line's power
    # is J_n², so its level is 20·log10|J_n| dB relative to the unmodulated carrier.
    lines = dict(figure_spectra.lines_of((1e3, 1e3)))
    assert lines[0] == pytest.approx(20 * math.log10(0.7651976866), abs=1e-6)
    assert lines[1] == pytest.approx(20 * math.log10(0.4400505857), abs=1e-6)
    assert lines[-1] == lines[1]
    assert min(lines.values()) > figure_spectra.FLOOR_DB


def test_switched_pictures_state_share_and_image_rejection_per_signal():
    result, _, _ = _conversion(SWITCHED)
    figs = {f.key: f for f in figures.figures(result)}
    alt, plan = figs["paths0"].alt, figs["plan0"].alt
    for e in result.sheet:
        if e.value.name.startswith("share of") and e.value.name.endswith("at the worst-case IF"):
            assert f"passes {e.value.value:.1f} % (" in alt
        if e.value.name == "image rejection ahead of the mixer":
            assert f"rejects the image by {e.value.value:.1f} dB" in alt
            assert f"the image rejected by {e.value.value:.1f} dB" in plan
    for signal, position in {(e.signal, e.position) for e in result.sheet if e.signal}:
        assert f"{signal} ({position})" in alt
    assert "Bessel lines of a 15 kHz tone at ±75 kHz deviation" in alt
    assert "<svg" in figs["paths0"].svg


def test_a_flat_top_stands_in_where_no_shape_is_published():
    p = figures.PathBand("narrow path", 445e3, 465e3)
    assert p.attenuation(455e3) == 0.0 and p.attenuation(470e3) == shapes.ULTIMATE_DB
