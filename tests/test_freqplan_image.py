"""freqplan.image pinned whole: the image 2 f_LO - f_in (Tooley, Electronic Circuits) and its
rejection by the responses ahead of the mixer (equivalent Butterworth through the stated points,
Williams & Taylor; a preselector is one tuned circuit, a one-pole response), graded at warning_db
and note_db just either side of the computed figure."""

from __future__ import annotations

import math

import pytest
from conftest import check, edited, facts, of, sheet_rows
from freqplan_pins import LO, OSC, butterworth, ceramic, clean, hz6, khz4, where

from speccheck.config import Settings

RULE = "freqplan.image"
IMG = 2 * LO - 10.7e6
FIX = (
    "Declare what limits the input (source.bandwidth or source.preselector) with its shape, add a "
    "preselector, or choose the injection side or IF that puts the image further out."
)
UPSTREAM = butterworth(1e6, 6.0, 2e6, 60.0)  # the clean plan's source: 1 MHz at 6 dB, 2 MHz at 60 dB
SHAPE = (
    "  bandwidth_at: 6 dB\n  stopband: 2 MHz           # its skirts: 2 MHz wide at 60 dB down\n"
    "  stopband_at: 60 dB\n"
)
TYPICAL = "; state its stopband or shape_factor for a real figure"


def _settings(**values: float) -> Settings:
    return Settings(rule_settings={RULE: values})


def _found(text: str, settings: Settings | None = None) -> list:
    return [facts(f) for f in of(check(text, settings=settings), RULE)]


def _verdict(
    text: str, level: str, rejection: float, inside: bool, what: str, shape: str, low: float, high: float
) -> dict:
    return {
        "rule": RULE,
        "level": level,
        **where(text, OSC, "low,", "chain[1].oscillator.injection"),
        "message": f"conversion: the image at {hz6(IMG)} lies {'inside' if inside else 'outside'} {what}, "
        "which "
        f"rejects it by only {rejection:.1f} dB ({shape}): a signal there lands on the IF with the "
        "wanted 10.7 MHz",
        "values": {
            "input": (10.7e6, "Hz"),
            "LO": (pytest.approx(LO), "Hz"),
            "image": (pytest.approx(IMG), "Hz"),
            "passband low": (low, "Hz"),
            "passband high": (high, "Hz"),
            "image rejection": (pytest.approx(rejection), "dB"),
        },
        "fix": FIX if level == "warning" else "",
        "stage": "conversion",
        "signal": "",
        "position": "",
    }


def test_clean_plan_sheet_rows():
    c, pre = ("conversion", "conversion"), "passband ahead, filter 1: "
    assert sheet_rows(check(clean()), RULE) == [
        (*c, "image frequency", pytest.approx(IMG), "Hz", "", ""),
        (*c, "passband ahead low edge", 10.2e6, "Hz", "", ""),
        (*c, "passband ahead high edge", 11.2e6, "Hz", "", ""),
        (*c, pre + "centre", 10.7e6, "Hz", "", ""),
        (*c, pre + "width", 1e6, "Hz", "", ""),
        (*c, pre + "response model", "equivalent Butterworth", "", "", ""),
        (*c, pre + "width quoted at", 6.0, "dB", "", ""),
        (*c, pre + "response order", pytest.approx(UPSTREAM.order), "", "", ""),
        (
            *c,
            "image rejection ahead of the mixer",
            pytest.approx(round(UPSTREAM(IMG - 10.7e6), 1)),
            "dB",
            "",
            "",
        ),
        # the image's distance from the nearer edge, 10.2 MHz
        (*c, "image outside the passband ahead by", pytest.approx(10.2e6 - IMG), "Hz", "", ""),
    ]


@pytest.mark.parametrize("delta, level", [(-0.01, None), (0.01, "note")])
def test_stated_skirts_are_graded_at_note_db(delta, level):
    # 52.5 dB of rejection: note_db just below it is quiet, just above it a note
    rejection = UPSTREAM(IMG - 10.7e6)
    found = _found(clean(), _settings(note_db=rejection + delta))
    expected = _verdict(
        clean(),
        "note",
        rejection,
        False,
        "the upstream bandwidth (1 MHz around 10.7 MHz)",
        "1 MHz at 6 dB, 2 MHz at 60 dB",
        10.2e6,
        11.2e6,
    )
    assert found == ([] if level is None else [expected])


@pytest.mark.parametrize("delta, level", [(-0.01, "note"), (0.01, "warning")])
def test_typical_skirts_are_graded_at_warning_db(delta, level):
    text = edited(clean(), SHAPE, "")
    rejection = ceramic(1e6)(IMG - 10.7e6)  # about 35 dB: a note by default
    found = _found(text, _settings(warning_db=rejection + delta))
    shape = "typical ceramic-filter skirts, twice as wide at 40 dB" + TYPICAL
    assert found == [
        _verdict(
            text,
            level,
            rejection,
            False,
            "the upstream bandwidth (1 MHz around 10.7 MHz)",
            shape,
            10.2e6,
            11.2e6,
        )
    ]
    assert 20 < rejection < 40 and [f["level"] for f in _found(text)] == ["note"]


def test_image_inside_a_wide_upstream_band_is_a_warning():
    text = edited(clean(), "bandwidth: 1 MHz ", "bandwidth: 3 MHz ")
    wide = ceramic(3e6)
    rejection = wide(IMG - 10.7e6)
    shape = "typical ceramic-filter skirts, twice as wide at 40 dB" + TYPICAL
    # the stated 2 MHz stopband is no wider than 3 MHz: the class's typical shape stands in
    assert _found(text) == [
        _verdict(
            text,
            "warning",
            rejection,
            True,
            "the upstream bandwidth (3 MHz around 10.7 MHz)",
            shape,
            9.2e6,
            12.2e6,
        )
    ]
    names = [r[2] for r in sheet_rows(check(text), RULE)]
    assert "image outside the passband ahead by" not in names


def test_preselector_and_upstream_band_add_up():
    text = edited(
        clean(),
        "  drift: 500 Hz\n",
        "  drift: 500 Hz\n  preselector: {center: 10.7 MHz, bandwidth: 400 kHz}\n",
    )
    # one tuned circuit 400 kHz wide at 3 dB: 10 log10(1 + (10^0.3 - 1)(910 kHz / 200 kHz)^2) (one-pole)
    pre = 10 * math.log10(1 + (10**0.3 - 1) * ((10.7e6 - IMG) / 200e3) ** 2)
    rejection = UPSTREAM(IMG - 10.7e6) + pre
    what = "the upstream bandwidth (1 MHz around 10.7 MHz) and the preselector (400 kHz around 10.7 MHz)"
    shape = "1 MHz at 6 dB, 2 MHz at 60 dB; one tuned circuit" + TYPICAL
    # the band ahead is where both pass: 10.5 to 10.9 MHz
    assert _found(text, _settings(note_db=90.0)) == [
        _verdict(text, "note", rejection, False, what, shape, 10.5e6, 10.9e6)
    ]
    rows = {r[2]: r[3] for r in sheet_rows(check(text), RULE)}
    assert rows["passband ahead, filter 2: width quoted at"] == 3.0
    assert rows["passband ahead, filter 2: response order"] == 1.0
    assert rows["image outside the passband ahead by"] == pytest.approx(10.5e6 - IMG)


def test_nothing_ahead_is_a_warning():
    text = edited(
        clean(), "  bandwidth: 1 MHz          # the receiver's first IF bandwidth ahead of the tap\n", ""
    )
    assert _found(text) == [
        {
            "rule": RULE,
            "level": "warning",
            **where(text, OSC, "low,", "chain[1].oscillator.injection"),
            "message": f"conversion: the image at {hz6(IMG)} ({khz4(10.7e6 - IMG)} from the wanted 10.7 MHz) "
            "converts "
            "to the IF too, and nothing declared ahead of the mixer rejects it",
            "values": {
                "input": (10.7e6, "Hz"),
                "LO": (pytest.approx(LO), "Hz"),
                "image": (pytest.approx(IMG), "Hz"),
            },
            "fix": FIX,
            "stage": "conversion",
            "signal": "",
            "position": "",
        }
    ]
    assert [r[2] for r in sheet_rows(check(text), RULE)] == ["image frequency"]


def test_no_image_without_an_if():
    text = edited(clean(), OSC, "oscillator: {frequency: 10.7 MHz, injection: low}")
    assert _found(text) == [] and sheet_rows(check(text), RULE) == []


def test_second_conversion_image_is_weighed_against_the_first_if_path():
    from test_freqplan import _two_conversions

    # conversion 2: 10.7 MHz in, LO 10.245 MHz: image 9.79 MHz, against FL1 (30 kHz at 3 dB, typical
    # ceramic skirts) ahead of it: far down, no finding; its sheet rows name the IF path
    text = _two_conversions("10.245 MHz")
    rows = {(r[1], r[2]): r[3] for r in sheet_rows(check(text), RULE)}
    assert rows[("conversion 2", "image frequency")] == pytest.approx(2 * 10.245e6 - 10.7e6)
    assert rows[("conversion 2", "passband ahead low edge")] == pytest.approx(10.7e6 - 15e3)
    # conversion 1: 45 MHz in, LO 55.7 MHz above: image 66.4 MHz
    assert rows[("conversion 1", "image frequency")] == pytest.approx(2 * 55.7e6 - 45e6)
    assert of(check(text), RULE) == []
