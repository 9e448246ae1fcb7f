"""A catalogue of trade practice: plans built the way experienced builders build them must give
no error, and the classic mistakes beside them must.

Every plan starts from the clean example (examples/vhf-monitor-455k.yaml: a 10.7 MHz IF tap to
455 kHz, ±5 kHz narrowband voice with 3 kHz audio, a small audio amplifier on 12 V) and changes
only what the case is about. Where each check value comes from is said beside it:
- narrowband voice: ±5 kHz peak deviation and 3 kHz highest audio on 25 kHz channels, ±2.5 kHz on
  12.5 kHz channels (ITU-R SM.1138 Annex: 16K0F3E and 11K0F3E are the usual land-mobile
  designators); a 455 kHz ceramic filter of ±7.5 kHz or ±10 kHz at 6 dB for 25 kHz channels and
  ±6 kHz for 12.5 kHz channels (common practice);
- broadcast FM: ±75 kHz deviation, 15 kHz audio (ITU-R BS.450-3) through a wide path of 180 to
  230 kHz (common practice: 10.7 MHz ceramic filters of 180 to 230 kHz at 3 dB);
- a usual crystal: ±30 ppm tolerance (common practice for a general-purpose through-hole crystal
  at 25 °C);
- a small low-voltage audio amplifier on 9 V and 12 V into 8 Ω (common practice).
"""

from __future__ import annotations

import pytest
from conftest import CLEAN, check, edited, of

BASE = CLEAN.read_text("utf-8")

VOICE = "    deviation: 5 kHz\n    audio_max: 3 kHz\n    service: voice\n    path: narrow\n"
FILTER = "FL1: {kind: filter, center: 455 kHz, bandwidth: 20 kHz, bandwidth_at: 6 dB,"
WIDE = "      wide: {bandwidth: 180 kHz, note: \"bypass link for wideband signals\"}"
DEEMPHASIS_AND_AUDIO = ("  - stage: audio-filter\n    resistor: R10\n    capacitor: C11\n",
                        ("  - stage: de-emphasis\n    time_constant: 50 us\n"
                         "  - stage: audio-filter\n    corner: 16 kHz\n"))


def errors(text: str) -> list:
    return [f for f in check(text).findings if f.level == "error"]


def filter_width(text: str, width: str) -> str:
    return edited(text, FILTER, FILTER.replace("bandwidth: 20 kHz", f"bandwidth: {width}"))


def broadcast(text: str, path_width: str, path: str = "wide") -> str:
    """The voice signal replaced by broadcast FM on `path`, the wide path `path_width` wide, with
    the de-emphasis of region 1 and an audio low-pass for 15 kHz (ITU-R BS.450-3)."""
    text = edited(text, VOICE, f"    deviation: 75 kHz\n    audio_max: 15 kHz\n    service: broadcast\n"
                                f"    path: {path}\n")
    text = edited(text, WIDE, WIDE.replace("180 kHz", path_width))
    return edited(text, *DEEMPHASIS_AND_AUDIO)


# ---- correct practice: no error ----------------------------------------------------------------


def test_the_clean_example_has_no_error_and_no_warning():
    result = check(BASE)
    assert [f for f in result.findings if f.level in ("error", "warning")] == []


@pytest.mark.parametrize("width", ["12 kHz", "15 kHz", "20 kHz"])
def test_narrowband_voice_through_a_usual_ceramic_filter(width):
    # ±6 kHz, ±7.5 kHz and ±10 kHz at 6 dB for ±5 kHz deviation and 3 kHz audio (common practice;
    # the product brief names ±6 kHz and ±7.5 kHz as correct practice for narrowband voice)
    text = filter_width(BASE, width)
    assert errors(text) == []
    assert all(f.level == "note" for f in of(check(text), "freqplan.path-width"))


def test_narrowband_voice_through_7_5_khz_gives_a_note_with_the_share_in_db():
    found = of(check(filter_width(BASE, "15 kHz")), "freqplan.path-width")
    assert [f.level for f in found] == ["note"]
    assert "dB" in found[0].message and "%" in found[0].message


def test_narrow_deviation_through_a_12_5_khz_channel_filter():
    # ±2.5 kHz deviation, 3 kHz audio (11K0F3E) through ±6 kHz at 6 dB (common practice)
    text = filter_width(edited(BASE, "    deviation: 5 kHz\n", "    deviation: 2.5 kHz\n"), "12 kHz")
    assert errors(text) == []


def test_upstream_if_of_7_5_khz_for_narrowband_voice():
    # a receiver's own ±7.5 kHz IF ahead of the tap passes ±5 kHz voice (common practice)
    text = edited(BASE, "  bandwidth: 1 MHz ", "  bandwidth: 15 kHz ")
    text = edited(text, "  stopband: 2 MHz ", "  stopband: 30 kHz ")  # ±15 kHz at 60 dB
    assert of(check(text), "freqplan.upstream-bandwidth") == [] or all(
        f.level == "note" for f in of(check(text), "freqplan.upstream-bandwidth"))
    assert [f for f in errors(text) if f.rule.startswith("freqplan")] == []


@pytest.mark.parametrize("width", ["180 kHz", "200 kHz", "230 kHz"])
def test_broadcast_fm_through_a_wide_path(width):
    # ±75 kHz, 15 kHz audio through 180 to 230 kHz (common practice for 10.7 MHz ceramic filters)
    text = broadcast(BASE, width)
    assert [f for f in errors(text) if f.rule.startswith("freqplan")] == []


def test_usual_crystal_tolerance():
    # ±30 ppm (common practice) on the 10.245 MHz crystal: 307 Hz of LO spread
    text = edited(BASE, "    tolerance: 20 ppm\n", "    tolerance: 30 ppm\n")
    assert [f for f in check(text).findings if f.rule == "freqplan.filter-fit"] == []
    assert errors(text) == []


@pytest.mark.parametrize("volts", ["9 V", "12 V"])
def test_small_amplifier_on_9_and_12_volts(volts):
    # a low-voltage 8-pin audio amplifier on 9 V or 12 V into 8 ohm (common practice)
    text = BASE.replace("voltage: 12 V", f"voltage: {volts}")
    assert [f for f in errors(text) if f.rule.startswith(("power", "audio"))] == []


# ---- the mistakes: errors -------------------------------------------------------------------------


def test_broadcast_fm_through_the_narrow_filter_is_an_error():
    # 180 kHz of broadcast FM through a 20 kHz ceramic filter: the spectrum is cut (ITU-R SM.1138 Bn)
    text = broadcast(BASE, "180 kHz", path="narrow")
    found = [f for f in of(check(text), "freqplan.path-width") if f.level == "error"]
    assert len(found) == 1 and "dB" in found[0].message
    assert "wide" in found[0].fix


def test_broadcast_fm_through_a_20_khz_path_is_an_error():
    text = broadcast(BASE, "20 kHz")
    assert [f.level for f in of(check(text), "freqplan.path-width")] == ["error"]


def test_voice_with_wide_deviation_through_a_12_5_khz_channel_filter_is_cut():
    # ±5 kHz deviation through ±3 kHz: far narrower than the 16 kHz it needs (common practice mistake)
    text = filter_width(BASE, "6 kHz")
    assert [f.level for f in of(check(text), "freqplan.path-width")] == ["error"]


def test_fuse_above_the_wire_is_an_error():
    # 22 AWG chassis wiring carries 7 A (Handbook of Electronic Tables and Formulas); a 10 A fuse does not
    # protect it
    text = edited(BASE, "current_rating: 500 mA", "current_rating: 10 A")
    assert "power.fuse-wire" in [f.rule for f in errors(text)]


def test_plain_resistor_as_the_only_protection_is_an_error():
    text = edited(BASE, "  F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, V12]}",
                  "  F1: {kind: resistor, value: 1 ohm, power_rating: 0.5 W, ends: [DC_IN, V12]}")
    assert "power.resistor-fuse" in [f.rule for f in errors(text)]
