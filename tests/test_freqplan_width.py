"""freqplan.path-width and freqplan.upstream-bandwidth pinned whole: the share of a signal's Bessel
spectrum a path or the upstream band passes (freqplan_pins.share, scipy's J_n), graded at the
share levels just either side, the fix that names a better path or the width that would pass 98 %
(found here with scipy's brentq), the brick-wall verdict for AM, and the notes for missing figures.
Necessary bandwidths: ITU-R SM.1138 (FM 2(D + M), AM 2M)."""

from __future__ import annotations

import math

import pytest
from conftest import check, edited, facts, of, sheet_rows
from freqplan_pins import butterworth, ceramic, clean, gaussian, khz4, share, share_text, where
from scipy.optimize import brentq
from scipy.special import jv

from speccheck.config import Settings

RULE = "freqplan.path-width"
UP = "freqplan.upstream-bandwidth"
VOICE = "  - {name: voice, modulation: fm, deviation: 5 kHz, audio_max: 3 kHz, path: p}\n"
BROADCAST = (
    "  - {name: station, modulation: fm, deviation: 75 kHz, audio_max: 15 kHz, service: broadcast, path: p}\n"
)
AM = "  - {name: talk, modulation: am, audio_max: 3 kHz, path: p}\n"
TONE = "a 3 kHz tone at the full ±5 kHz deviation"
CERAMIC = "typical ceramic-filter skirts, twice as wide at 40 dB"
WIDE_FIX = "Use a filter nearer the signal's necessary bandwidth for this signal."


def _plan(signals: str, paths: str) -> str:
    """A source straight into one if-filter stage with the given paths (path: {bandwidth: ...})."""
    return f"""build_spec: 1
build: {{name: paths}}
signals:
{signals}source: {{kind: antenna, frequency: 455 kHz, impedance: 50 ohm}}
parts: {{}}
chain:
  - stage: if-filter
    paths:
{paths}"""


def _path(name: str, width: str) -> str:
    return f"      {name}: {{bandwidth: {width}}}\n"


def _found(text: str, rule: str = RULE, settings: Settings | None = None) -> list:
    return [facts(f) for f in of(check(text, settings=settings), rule)]


def _at_path(text: str, nth: int = 0, index: int = 0) -> dict:
    return where(text, "path: p", "p}", f"signals[{index}].path", nth)


def _need_width(dev: float, tone: float, target: float = 0.98) -> float:
    """The narrowest typical ceramic width (6 dB) that passes `target` of the signal (brentq)."""
    return brentq(lambda w: share(dev, tone, ceramic(w)) - target, 2e3, 1e6, xtol=1e-3)


def test_signal_sheet_rows_and_the_share_on_centre():
    text = _plan(VOICE, _path("p", "20 kHz"))
    beta = 5 / 3
    # Carson's band 2(5 + 3) kHz holds the lines |n| <= floor(8/3) = 2: J0^2 + 2 (J1^2 + J2^2)
    carson = jv(0, beta) ** 2 + 2 * (jv(1, beta) ** 2 + jv(2, beta) ** 2)
    s = share(5e3, 3e3, ceramic(20e3))
    assert sheet_rows(check(text), RULE) == [
        ("signals", "voice", "Carson bandwidth", 16e3, "Hz", "", ""),
        (
            "signals",
            "voice",
            "power inside Carson's band (worst tone)",
            pytest.approx(round(carson * 100, 2)),
            "%",
            "",
            "",
        ),
        ("signals", "voice", "necessary bandwidth (ITU-R SM.1138)", 16e3, "Hz", "", ""),
        ("signals", "voice", "test tone (highest audio at full deviation)", 3e3, "Hz", "", ""),
        ("signals", "voice", "test tone deviation (peak)", 5e3, "Hz", "", ""),
        ("signals", "voice", "emission designator", "16K0F3E", "", "", ""),
        ("if-filter", "p path", "share of voice passed", pytest.approx(round(s * 100, 2)), "%", "", ""),
    ]
    assert _found(text) == []


def test_adjacent_channel_rejection_row():
    text = _plan(VOICE.replace("path: p", "path: p, channel_spacing: 25 kHz"), _path("p", "20 kHz"))
    acr = ceramic(20e3)(25e3)  # the response 25 kHz off its centre
    rows = [r for r in sheet_rows(check(text), RULE) if r[2].startswith("adjacent")]
    assert rows == [
        (
            "if-filter",
            "p path",
            "adjacent-channel rejection for voice (±25 kHz)",
            pytest.approx(round(acr, 1)),
            "dB",
            "",
            "",
        )
    ]


@pytest.mark.parametrize(
    "width, level",
    [
        # shares (ceramic, 6 dB): 15 kHz 96.0 % and 12 kHz 87.4 % (notes), 8 kHz 77.5 % (a warning),
        # 7 kHz 61.9 % (a warning), 6 kHz 34.1 % (an error); 20 kHz 99.2 % (nothing)
        ("20 kHz", None),
        ("15 kHz", "note"),
        ("12 kHz", "note"),
        ("8 kHz", "warning"),
        ("7 kHz", "warning"),
        ("6 kHz", "error"),
    ],
)
def test_levels_by_the_share_passed(width, level):
    w = float(width.split()[0]) * 1e3
    s = share(5e3, 3e3, ceramic(w))
    expected = None if s >= 0.98 else "note" if s >= 0.8 else "warning" if s >= 0.5 else "error"
    assert expected == level
    text = _plan(VOICE, _path("p", width))
    found = _found(text)
    if level is None:
        assert found == []
        return
    values = {
        "necessary bandwidth": (16e3, "Hz"),
        "path bandwidth": (w, "Hz"),
        "share passed": (pytest.approx(s * 100), "%"),
        "loss": (pytest.approx(-10 * math.log10(s)), "dB"),
    }
    if level == "note":
        message = (
            f"the p path ({khz4(w)}, {CERAMIC}) passes {share_text(s)} of the power of {TONE} for voice "
            "(16 kHz (16K0F3E)): only the outermost sidebands of the highest tones are trimmed; usual "
            "practice, no change needed"
        )
        fix = ""
    else:
        tail = (
            ": the spectrum is clearly cut and the audio distorts badly"
            if level == "error"
            else ": the peaks of high tones at full deviation distort"
        )
        message = (
            f"voice needs 16 kHz (16K0F3E) but the p path passes only {khz4(w)} (no filter part, 455 kHz ± "
            f"{khz4(w / 2)}; {CERAMIC}): {share_text(s)} of the power of {TONE}{tail}"
        )
        fix = (
            f"Fit a filter of about {khz4(_need_width(5e3, 3e3))} at 6 dB (it passes 98%), or reduce the "
            "deviation or the highest audio frequency."
        )
    assert found == [
        {
            "rule": RULE,
            "level": level,
            **_at_path(text),
            "message": message,
            "values": values,
            "fix": fix,
            "stage": "if-filter",
            "signal": "",
            "position": "",
        }
    ]


def test_a_better_path_is_named_in_the_hint_and_the_fix():
    # the 8 kHz path trims the voice (a warning); of the other two, the 20 kHz one passes 99.2 % and
    # the 15 kHz one 96.0 %: the larger share is named
    text = _plan(VOICE, _path("p", "8 kHz") + _path("mid", "15 kHz") + _path("q", "20 kHz"))
    best = share(5e3, 3e3, ceramic(20e3))
    f = _found(text)[0]
    assert f["level"] == "warning"
    assert f["message"].endswith(
        f": the peaks of high tones at full deviation distort; the q path (20 kHz) would "
        f"pass {share_text(best)} of it"
    )
    assert f["fix"] == "Set the signal's path to q."


def test_a_too_wide_path_is_no_better_for_a_warning_but_is_for_an_error():
    # a 180 kHz path is over 3 x 16 kHz: not offered for a trimmed voice ...
    text = _plan(VOICE, _path("p", "8 kHz") + _path("q", "180 kHz"))
    assert _found(text)[0]["fix"].startswith("Fit a filter of about")
    # ... but offered when the narrow path cuts the signal outright (6 kHz: an error)
    text = _plan(VOICE, _path("p", "6 kHz") + _path("q", "180 kHz"))
    f = _found(text)[0]
    assert f["level"] == "error" and f["fix"] == "Set the signal's path to q."
    assert f["message"].endswith(
        f"; the q path (180 kHz) would pass {share_text(share(5e3, 3e3, ceramic(180e3)))} of it"
    )


def test_broadcast_through_a_narrow_path_is_an_error():
    text = _plan(BROADCAST, _path("p", "20 kHz") + _path("wide", "230 kHz"))
    s, s_wide = share(75e3, 15e3, ceramic(20e3)), share(75e3, 15e3, ceramic(230e3))
    assert _found(text) == [
        {
            "rule": RULE,
            "level": "error",
            **_at_path(text),
            "message": "station needs 180 kHz (180KF3E) but the p path passes only 20 kHz (no filter part, "
            "455 kHz ± "
            f"10 kHz; {CERAMIC}): {share_text(s)} of the power of a 15 kHz tone at the full ±75 kHz "
            f"deviation: the spectrum is clearly cut and the audio distorts badly; the wide path (230 kHz) "
            f"would pass {share_text(s_wide)} of it",
            "values": {
                "necessary bandwidth": (180e3, "Hz"),
                "path bandwidth": (20e3, "Hz"),
                "share passed": (pytest.approx(s * 100), "%"),
                "loss": (pytest.approx(-10 * math.log10(s)), "dB"),
            },
            "fix": "Set the signal's path to wide.",
            "stage": "if-filter",
            "signal": "",
            "position": "",
        }
    ]


@pytest.mark.parametrize("width, wide", [("48 kHz", False), ("49 kHz", True)])
def test_wide_factor_trips_past_three_times_the_need(width, wide):
    # wide_factor 3: 3 x 16 kHz = 48 kHz is still fine, 49 kHz is too wide
    text = _plan(VOICE, _path("p", width))
    w = float(width.split()[0]) * 1e3
    expected = [
        {
            "rule": RULE,
            "level": "warning",
            **_at_path(text),
            "message": f"the p path ({khz4(w)}) is {w / 16e3:.1f} times the 16 kHz (16K0F3E) that voice "
            "needs: it lets "
            "in noise and neighbouring channels",
            "values": {"necessary bandwidth": (16e3, "Hz"), "path bandwidth": (w, "Hz")},
            "fix": WIDE_FIX,
            "stage": "if-filter",
            "signal": "",
            "position": "",
        }
    ]
    assert _found(text) == (expected if wide else [])


@pytest.mark.parametrize(
    "width, level", [("5.9 kHz", "error"), ("6 kHz", None), ("18 kHz", None), ("18.1 kHz", "warning")]
)
def test_am_against_the_path_width(width, level):
    # AM: Bn = 2 x 3 kHz = 6 kHz; narrower is an error (with the other path that passes it), more than
    # 3 x 6 kHz = 18 kHz is too wide
    text = _plan(AM, _path("p", width) + _path("other", "10 kHz"))
    w = float(width.split()[0]) * 1e3
    found = _found(text)
    values = {"necessary bandwidth": (6e3, "Hz"), "path bandwidth": (w, "Hz")}
    if level is None:
        assert found == []
    elif level == "error":
        assert found == [
            {
                "rule": RULE,
                "level": "error",
                **_at_path(text),
                "message": f"talk needs 6 kHz (6K00A3E) but the p path passes only {khz4(w)} (no filter "
                "part, 455 kHz ± "
                f"{khz4(w / 2)}); the other path (10 kHz) would pass it",
                "values": values,
                "fix": "Set the signal's path to other.",
                "stage": "if-filter",
                "signal": "",
                "position": "",
            }
        ]
    else:
        assert found == [
            {
                "rule": RULE,
                "level": "warning",
                **_at_path(text),
                "message": f"the p path ({khz4(w)}) is {w / 6e3:.1f} times the 6 kHz (6K00A3E) that talk "
                "needs: it lets "
                "in noise and neighbouring channels",
                "values": values,
                "fix": WIDE_FIX,
                "stage": "if-filter",
                "signal": "",
                "position": "",
            }
        ]


def test_am_narrower_with_no_other_path_has_no_hint():
    text = _plan(AM, _path("p", "5 kHz"))
    f = _found(text)[0]
    assert (
        f["message"]
        == "talk needs 6 kHz (6K00A3E) but the p path passes only 5 kHz (no filter part, 455 kHz ± "
        "2.5 kHz)"
    )
    # no fix of its own: the rule's
    assert f["fix"] == (
        "Route the signal through a path that passes its spectrum (name it in the signal's path), "
        "or fit a filter of at least the width shown."
    )


def test_am_other_path_exactly_as_wide_as_needed_is_offered():
    text = _plan(AM, _path("p", "5 kHz") + _path("exact", "6 kHz"))
    f = _found(text)[0]
    assert f["message"].endswith("; the exact path (6 kHz) would pass it")
    assert f["fix"] == "Set the signal's path to exact."


@pytest.mark.parametrize(
    "signal, missing",
    [
        ("  - {name: s, modulation: fm, audio_max: 3 kHz, path: p}\n", "deviation"),
        ("  - {name: s, modulation: fm, deviation: 5 kHz, path: p}\n", "audio_max"),
        ("  - {name: s, modulation: am, path: p}\n", "audio_max"),
        ("  - {name: s, modulation: ssb, path: p}\n", "audio_max"),
    ],
)
def test_missing_figures_are_notes_naming_the_signal(signal, missing):
    # the second signal (index 1) misses the figure
    text = _plan(VOICE + signal, _path("p", "20 kHz"))
    assert _found(text) == [
        {
            "rule": RULE,
            "level": "note",
            **where(text, "{name: s,", "{name: s", "signals[1]"),
            "message": f"signal s: signals[1].{missing} is not given, so its necessary bandwidth cannot be "
            "computed",
            "values": {},
            "fix": f"Give signals[1].{missing}.",
            "stage": "signals",
            "signal": "",
            "position": "",
        }
    ]


def test_a_cw_signal_without_a_bandwidth_is_silent():
    text = _plan("  - {name: s, modulation: cw, path: p}\n" + VOICE, _path("p", "20 kHz"))
    assert _found(text) == []


# ---- freqplan.upstream-bandwidth ----------------------------------------------------------------------

UPSTREAM_SHAPE = (
    "  bandwidth_at: 6 dB\n  stopband: 2 MHz           # its skirts: 2 MHz wide at 60 dB down\n"
    "  stopband_at: 60 dB\n"
)


def _upstream(bandwidth: str, kind: str = "receiver-if") -> str:
    text = edited(clean(), UPSTREAM_SHAPE, "")
    text = edited(text, "  kind: receiver-if\n", f"  kind: {kind}\n")
    return edited(text, "bandwidth: 1 MHz ", f"bandwidth: {bandwidth} ")


@pytest.mark.parametrize(
    "bandwidth, level",
    [("17 kHz", None), ("15 kHz", "note"), ("8 kHz", "warning"), ("7 kHz", "warning"), ("6 kHz", "error")],
)
def test_upstream_levels(bandwidth, level):
    text = _upstream(bandwidth)
    w = float(bandwidth.split()[0]) * 1e3
    s = share(5e3, 3e3, ceramic(w))
    expected = None if s >= 0.98 else "note" if s >= 0.8 else "warning" if s >= 0.5 else "error"
    assert expected == level
    found = _found(text, UP)
    rows = sheet_rows(check(text), UP)
    assert rows == [
        (
            "source",
            "upstream",
            "share of repeater voice passed",
            pytest.approx(round(s * 100, 2)),
            "%",
            "",
            "",
        )
    ]
    if level is None:
        assert found == []
        return
    tone = "a 3 kHz tone at the full ±5 kHz deviation"
    if level == "note":
        message = (
            f"the upstream bandwidth {khz4(w)} ({CERAMIC}) passes {share_text(s)} of the power of {tone} for "
            "repeater voice (16 kHz (16K0F3E)): only the outermost sidebands are trimmed; usual practice"
        )
        fix = ""
    else:
        what = (
            "cut the signal before it reaches the build"
            if level == "error"
            else "trimmed the signal's high tones at full deviation"
        )
        message = (
            f"the upstream bandwidth {khz4(w)} ({CERAMIC}) passes only {share_text(s)} of the power of "
            f"{tone}, "
            f"the 16 kHz (16K0F3E) that repeater voice needs: the source has {what}"
        )
        fix = f"Set the upstream receiver or instrument to about {khz4(_need_width(5e3, 3e3))} or more."
    assert found == [
        {
            "rule": UP,
            "level": level,
            **where(text, "bandwidth:", bandwidth, "source.bandwidth"),
            "message": message,
            "values": {
                "upstream bandwidth": (w, "Hz"),
                "necessary bandwidth": (16e3, "Hz"),
                "share passed": (pytest.approx(s * 100), "%"),
                "loss": (pytest.approx(-10 * math.log10(s)), "dB"),
            },
            "fix": fix,
            "stage": "source",
            "signal": "",
            "position": "",
        }
    ]


def test_an_instruments_resolution_filter_is_gaussian():
    # 10 kHz quoted at 3 dB, Gaussian: A = 3 (2 f / 10 kHz)^2 dB
    text = _upstream("10 kHz", "instrument-if")
    s = share(5e3, 3e3, gaussian(10e3))
    assert 0.5 <= s < 0.8
    f = _found(text, UP)[0]
    assert f["level"] == "warning" and f["values"]["share passed"] == (pytest.approx(s * 100), "%")
    assert "(Gaussian)" in f["message"]
    need = brentq(lambda w: share(5e3, 3e3, gaussian(w)) - 0.98, 2e3, 1e6, xtol=1e-3)
    assert f["fix"] == f"Set the upstream receiver or instrument to about {khz4(need)} or more."


def test_upstream_without_a_bandwidth_is_a_note():
    text = edited(
        clean(), "  bandwidth: 1 MHz          # the receiver's first IF bandwidth ahead of the tap\n", ""
    )
    assert _found(text, UP) == [
        {
            "rule": UP,
            "level": "note",
            **where(text, "kind: receiver-if", "kind", "source"),
            "message": "source.bandwidth is not given: the upstream IF or resolution bandwidth cannot be "
            "checked against "
            "the signals",
            "values": {},
            "fix": "Give source.bandwidth (the upstream IF or resolution bandwidth).",
            "stage": "source",
            "signal": "",
            "position": "",
        }
    ]


def test_upstream_is_checked_only_for_a_tapped_if_with_signals():
    text = _upstream("6 kHz", "antenna")
    assert _found(text, UP) == []
    bare = edited(_upstream("6 kHz"), "    deviation: 5 kHz\n", "")  # no signal with a bandwidth
    assert _found(bare, UP) == []


@pytest.mark.parametrize("bandwidth, cut", [("5.9 kHz", True), ("6 kHz", False)])
def test_upstream_against_an_am_signal(bandwidth, cut):
    text = edited(_upstream(bandwidth), "    modulation: fm\n    deviation: 5 kHz\n", "    modulation: am\n")
    w = float(bandwidth.split()[0]) * 1e3
    expected = [
        {
            "rule": UP,
            "level": "error",
            **where(text, "bandwidth:", bandwidth, "source.bandwidth"),
            "message": f"the upstream bandwidth {khz4(w)} is narrower than the 6 kHz (6K00A3E) that repeater "
            "voice needs: "
            "the source has cut the signal before it reaches the build",
            "values": {"upstream bandwidth": (w, "Hz"), "necessary bandwidth": (6e3, "Hz")},
            "fix": "Set the upstream receiver or instrument to a wider IF or resolution bandwidth.",
            "stage": "source",
            "signal": "",
            "position": "",
        }
    ]
    assert _found(text, UP) == (expected if cut else [])


def test_upstream_fix_keeps_the_stated_shape_factor():
    # 8 kHz at 6 dB with a shape factor of 4 (32 kHz at the class's 40 dB): gentler skirts than the typical
    # ceramic's, so both the share and the width that passes 98 % come from that stated shape
    text = edited(_upstream("8 kHz"), "  drift: 500 Hz\n", "  drift: 500 Hz\n  shape_factor: 4\n")
    s = share(5e3, 3e3, butterworth(8e3, 6.0, 32e3, 40.0))
    level = "error" if s < 0.5 else "warning"
    need = brentq(lambda w: share(5e3, 3e3, butterworth(w, 6.0, 4 * w, 40.0)) - 0.98, 2e3, 1e6, xtol=1e-3)
    f = _found(text, UP)[0]
    assert f["level"] == level and s < 0.8
    assert f["values"]["share passed"] == (pytest.approx(s * 100), "%")
    assert "(8 kHz at 6 dB, 32 kHz at 40 dB)" in f["message"]
    assert f["fix"] == f"Set the upstream receiver or instrument to about {khz4(need)} or more."
