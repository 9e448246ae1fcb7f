"""freqplan.mixer-spurs pinned whole. The responses are enumerated here from the mixing equation
m f_s + k f_LO = ±f_IF (common practice: spur charts), their levels from the rule's stated model:
the strongest input less the band ahead's attenuation, the LO's k-th harmonic and per_order dB per
order above the first; the limiter's harmonics from the rectangular wave's Fourier series (Oppenheim
& Willsky, Signals and Systems) bounded over duty cycles 50 % ± asymmetry."""

from __future__ import annotations

import math

import pytest
from conftest import check, edited, facts, of, sheet_rows
from freqplan_pins import F_IF, LO, OSC, butterworth, ceramic, clean, hz6, khz4, where

from speccheck.config import Settings

RULE = "freqplan.mixer-spurs"
UPSTREAM = butterworth(1e6, 6.0, 2e6, 60.0)  # the clean plan's source band ahead of the mixer
FL1 = ceramic(20e3)
FIX = (
    "Move the LO (other injection side or another IF), narrow the passband ahead of the mixer, or shield "
    "and decouple the limiter and oscillator from the input."
)


def envelope_db(n: int, asym: float = 0.02) -> float:
    """The n-th harmonic of a rectangular wave relative to its fundamental, the most it can be for
    a duty cycle within asym of 50 %: 1 / (n cos(pi asym)) for odd n, min(1, pi n asym) / (n cos(pi
    asym)) for even n (|sin(pi n d)| / (n sin(pi d)) bounded), in dB, floored at -160 dB."""
    if n == 1:
        return 0.0
    a = (1 if n % 2 else min(1.0, math.pi * n * asym)) / (n * math.cos(math.pi * asym))
    return max(-160.0, 20 * math.log10(a)) if a > 1e-8 else -160.0


def _settings(**values: object) -> Settings:
    return Settings(rule_settings={RULE: values})


def _spurs(lo: float, centre: float, width: float, low: float, high: float, order: int = 5) -> list:
    """(name, f_s, m, k) of every mixer response whose input lies inside the band ahead (its IF
    width, divided by m at the input, overlapping it), the wanted and image (m = 1, k = -1) left out."""
    out = []
    for m in range(1, order + 1):
        for k in range(-order, order + 1):
            for s in (1, -1):
                fs = (s * centre - k * lo) / m
                if fs <= 0 or (m == 1 and k == -1):
                    continue
                if fs + width / (2 * m) < low or fs - width / (2 * m) > high:
                    continue
                ms = "fs" if m == 1 else f"{m}·fs"
                ns = "fLO" if abs(k) == 1 else f"{abs(k)}·fLO"
                name = (
                    f"{ms} = IF"
                    if k == 0
                    else f"{ms} + {ns} = IF"
                    if k > 0
                    else f"{ms} − {ns} = IF"
                    if s > 0
                    else f"{ns} − {ms} = IF"
                )
                out.append(("spur " + name, fs, m, k))
    return out


def _spur_level(fs: float, m: int, k: int, strongest: float = -30.0) -> float:
    return strongest - UPSTREAM(fs - 10.7e6) + envelope_db(abs(k)) - (m - 1) * 20.0


def _if_harmonic_level(n: int) -> float:
    """limiter 0 dBm + harmonic n - 60 dB isolation - the narrow path's response at |h - f_LO|."""
    h = n * F_IF
    return 0.0 + envelope_db(n) - 60.0 - FL1(abs(h - LO) - 455e3)


def _clean_responses() -> list:
    """Every response of the clean plan, nearest the wanted 10.7 MHz first: (name, f, level)."""
    out = [(name, fs, _spur_level(fs, m, k)) for name, fs, m, k in _spurs(LO, 455e3, 20e3, 10.2e6, 11.2e6)]
    out += [
        (f"IF harmonic {n}", n * F_IF, _if_harmonic_level(n))
        for n in range(2, 25)
        if 10.2e6 <= n * F_IF <= 11.2e6
    ]
    return sorted(out, key=lambda t: abs(t[1] - 10.7e6))


def test_clean_plan_lists_every_response_with_its_level():
    expected = []
    for name, f, level in _clean_responses():
        expected += [
            ("spurs", "conversion", name, pytest.approx(f), "Hz", "", ""),
            ("spurs", "conversion", f"{name} estimated level", pytest.approx(round(level, 1)), "dBm", "", ""),
        ]
    assert sheet_rows(check(clean()), RULE) == expected
    assert len(expected) == 12 and of(check(clean()), RULE) == []


def test_max_listed_cuts_the_list_and_counts_the_rest():
    rows = sheet_rows(check(clean(), settings=_settings(max_listed=2)), RULE)
    first = _clean_responses()[:2]
    assert [r[2] for r in rows] == [
        first[0][0],
        f"{first[0][0]} estimated level",
        first[1][0],
        f"{first[1][0]} estimated level",
        "more responses not listed",
    ]
    assert rows[-1][3] == len(_clean_responses()) - 2
    assert [r[2] for r in sheet_rows(check(clean(), settings=_settings(max_listed=-3)), RULE)] == [
        "more responses not listed"
    ]


def _text(name: str, f: float, level: float | None, tag: str = "") -> str:
    off = f - 10.7e6
    lv = f", about {level:.0f} dBm" if level is not None else ", level not estimated"
    return f"{name}{tag} at {hz6(f)} ({'+' if off >= 0 else '−'}{khz4(abs(off))}{lv})"


def test_wider_window_warns_of_the_half_if_spur_and_notes_the_harmonics():
    # close 250 kHz: the half-IF spur 2 fs - 2 fLO = IF (at f_LO + 227.5 kHz) and the IF harmonics 23 and
    # 24 lie inside; the spur is strong enough to hear, the harmonics are not
    text = clean()
    found = [facts(f) for f in of(check(text, settings=_settings(close=250e3)), RULE)]
    half = LO + 455e3 / 2
    spur_level = _spur_level(half, 2, -2)
    h23, h24 = 23 * F_IF, 24 * F_IF
    where_ = where(text, OSC, "low,", "chain[1].oscillator.injection")
    assert found == [
        {
            "rule": RULE,
            "level": "warning",
            **where_,
            "message": "conversion: 1 response within 250 kHz of the wanted 10.7 MHz (LO "
            f"{hz6(LO)}) strong enough to hear (within 10 dB of the weakest wanted -100 dBm): "
            f"{_text('spur 2·fs − 2·fLO = IF', half, spur_level)} (a -30 dBm signal there, "
            f"{UPSTREAM(half - 10.7e6):.0f} dB down ahead of the mixer, LO harmonic 2 at "
            f"{envelope_db(2):.0f} "
            "dB, 20 dB for signal order 2)",
            "values": {
                "LO": (pytest.approx(LO), "Hz"),
                "spur 2·fs − 2·fLO = IF": (pytest.approx(half), "Hz"),
                "offset": (pytest.approx(half - 10.7e6), "Hz"),
                "estimated level": (pytest.approx(spur_level), "dBm"),
                "weakest wanted": (-100.0, "dBm"),
            },
            "fix": FIX,
            "stage": "conversion",
            "signal": "",
            "position": "",
        },
        {
            "rule": RULE,
            "level": "note",
            **where_,
            "message": "conversion: 2 harmonics of the build's own IF or LO within 250 kHz of the wanted "
            "10.7 MHz, "
            f"estimated too weak to hear: {_text('IF harmonic 24', h24, _if_harmonic_level(24))}; "
            f"{_text('IF harmonic 23', h23, _if_harmonic_level(23))} (limiter 0 dBm, harmonic 24 at "
            f"{envelope_db(24):.0f} dB, 60 dB isolation to the input, {FL1(abs(h24 - LO) - 455e3):.0f} dB "
            "down in the narrow path)",
            "values": {
                "LO": (pytest.approx(LO), "Hz"),
                "IF harmonic 24": (pytest.approx(h24), "Hz"),
                "offset": (pytest.approx(h24 - 10.7e6), "Hz"),
                "estimated level": (pytest.approx(_if_harmonic_level(24)), "dBm"),
                "weakest wanted": (-100.0, "dBm"),
            },
            "fix": "",
            "stage": "conversion",
            "signal": "",
            "position": "",
        },
    ]


@pytest.mark.parametrize("margin, heard", [(-25.9, True), (-26.1, False)])
def test_audible_margin_edge(margin, heard):
    # audible = weakest - margin = -100 - margin dBm; the half-IF spur at about -74.02 dBm is heard
    # when audible is -74.1, not when it is -73.9
    level = _spur_level(LO + 455e3 / 2, 2, -2)
    assert (level >= -100 - margin) == heard
    found = of(check(clean(), settings=_settings(close=230e3, audible_margin=margin)), RULE)
    assert [f.level for f in found if "2·fs − 2·fLO" in f.message] == (["warning"] if heard else [])


def test_close_window_edge():
    # the half-IF spur lies |f_LO + 227.5 kHz - 10.7 MHz| off; a window just wider takes it in
    off = abs(LO + 455e3 / 2 - 10.7e6)
    inside = of(check(clean(), settings=_settings(close=off + 1)), RULE)
    outside = of(check(clean(), settings=_settings(close=off - 1)), RULE)
    # the IF harmonic 24 (221.6 kHz off) is inside both windows: a note either way
    assert [f.level for f in inside] == ["warning", "note"] and [f.level for f in outside] == ["note"]
    assert of(check(clean(), settings=_settings(close=-5.0)), RULE) == []  # a negative window is no window


def test_many_heard_responses_are_cut_at_four():
    # a 1 MHz window and every estimated level heard (audible margin 300 dB): all six responses, four
    # shown and "and 2 more"
    found = of(check(clean(), settings=_settings(close=1e6, audible_margin=300.0)), RULE)
    resp = _clean_responses()
    assert [f.level for f in found] == ["warning"]
    shown = "; ".join(_text(n, f, lv) for n, f, lv in resp[:4])
    assert found[0].message.startswith(
        f"conversion: 6 responses within 1 MHz of the wanted 10.7 MHz (LO {hz6(LO)}) strong enough to hear "
        "(within "
        f"300 dB of the weakest wanted -100 dBm): {shown} and 2 more ("
    )


def test_without_a_strongest_level_spurs_have_no_level():
    # no level_max: the spurs get no estimate and are never heard; the IF harmonics keep theirs
    text = edited(clean(), "  level_max: -30 dBm\n", "")
    rows = sheet_rows(check(text, settings=_settings(close=250e3)), RULE)
    names = [r[2] for r in rows]
    assert "spur 2·fs − 2·fLO = IF" in names and "spur 2·fs − 2·fLO = IF estimated level" not in names
    assert "IF harmonic 24 estimated level" in names
    found = of(check(text, settings=_settings(close=250e3, audible_margin=300.0)), RULE)
    assert [f.level for f in found] == ["warning"] and "2·fs" not in found[0].message


def test_weakest_falls_back_to_the_setting():
    # no level_min: the weakest wanted is the setting (-110 dBm by default; -60 here), so audible is -70
    text = edited(clean(), "  level_min: -100 dBm\n", "")
    found = of(check(text, settings=_settings(close=250e3, weakest=-60.0)), RULE)
    assert found == [] or all("2·fs" not in f.message for f in found)
    found = of(check(text, settings=_settings(close=250e3, weakest=-70.0)), RULE)
    f = next(x for x in found if x.level == "warning")
    assert "(within 10 dB of the weakest wanted -70 dBm)" in f.message
    assert {v.name: v.value for v in f.values}["weakest wanted"] == -70.0


def test_order_is_clamped_and_limits_the_search():
    # order 1: only m = 1 products (fs ± k fLO with |k| <= 1): none but the wanted and image, so the
    # list holds the IF harmonics alone; order 0 counts as 1
    for order in (1, 0, -4):
        names = [r[2] for r in sheet_rows(check(clean(), settings=_settings(order=order)), RULE)]
        assert names == [
            "IF harmonic 24",
            "IF harmonic 24 estimated level",
            "IF harmonic 23",
            "IF harmonic 23 estimated level",
        ]
    # order 2: the half-IF spur joins
    names = [r[2] for r in sheet_rows(check(clean(), settings=_settings(order=2)), RULE)]
    assert "spur 2·fs − 2·fLO = IF" in names and "spur 3·fs − 3·fLO = IF" not in names
    # order 99 is held at 15: the 15th-order spur 15 fs - 15 fLO = IF is listed, none of order 16
    names = [r[2] for r in sheet_rows(check(clean(), settings=_settings(order=99, max_listed=999)), RULE)]
    assert "spur 15·fs − 15·fLO = IF" in names and not any("16·fs" in n for n in names)


@pytest.mark.parametrize("asym, used", [(-1.0, 0.0), (0.03, 0.03), (0.9, 0.49)])
def test_asymmetry_is_clamped(asym, used):
    # the half-IF spur's LO harmonic 2 weighs min(1, 2 pi a) / (2 cos(pi a)): a = 0 gives no even harmonic
    settings = _settings(close=250e3, asymmetry=asym, audible_margin=300.0)
    rows = {r[2]: r[3] for r in sheet_rows(check(clean(), settings=settings), RULE)}
    half = LO + 455e3 / 2
    expected = -30 - UPSTREAM(half - 10.7e6) + envelope_db(2, used) - 20
    assert rows["spur 2·fs − 2·fLO = IF estimated level"] == pytest.approx(round(expected, 1))


def test_per_order_and_isolation_and_limiter_level_are_settings():
    settings = _settings(per_order=30.0, isolation=40.0, limiter_level=6.0)
    rows = {r[2]: r[3] for r in sheet_rows(check(clean(), settings=settings), RULE)}
    f3 = (455e3 + 3 * LO) / 3
    assert rows["spur 3·fs − 3·fLO = IF estimated level"] == pytest.approx(
        round(-30 - UPSTREAM(f3 - 10.7e6) + envelope_db(3) - 2 * 30.0, 1)
    )
    h = 23 * F_IF
    assert rows["IF harmonic 23 estimated level"] == pytest.approx(
        round(6.0 + envelope_db(23) - 40.0 - FL1(abs(h - LO) - 455e3), 1)
    )


def test_two_paths_in_use_tag_each_response():
    text = edited(
        clean(),
        "    service: voice\n    path: narrow\n",
        "    service: voice\n    path: narrow\n  - {name: wide one, modulation: fm, deviation: 75 kHz, "
        "audio_max: 15 kHz, path: wide}\n",
    )
    names = [r[2] for r in sheet_rows(check(text, settings=_settings(max_listed=999)), RULE)]
    assert "IF harmonic 23 (narrow)" in names and "IF harmonic 23 (wide)" in names
    assert "spur 2·fs − 2·fLO = IF (narrow)" in names


def test_nothing_ahead_looks_around_the_wanted_input_only():
    # no band ahead: only what lies within the close window (50 kHz) of 10.7 MHz; a 250 kHz window
    # takes in the IF harmonics 23 and 24 and the half-IF spur, which is then taken 0 dB down
    text = edited(
        clean(), "  bandwidth: 1 MHz          # the receiver's first IF bandwidth ahead of the tap\n", ""
    )
    assert sheet_rows(check(text), RULE) == []
    rows = {r[2]: r[3] for r in sheet_rows(check(text, settings=_settings(close=250e3)), RULE)}
    half = LO + 455e3 / 2
    assert rows["spur 2·fs − 2·fLO = IF estimated level"] == pytest.approx(
        round(-30 + envelope_db(2) - 20, 1)
    )
    assert rows["spur 2·fs − 2·fLO = IF"] == pytest.approx(half)
    assert set(rows) == {
        "spur 2·fs − 2·fLO = IF",
        "spur 2·fs − 2·fLO = IF estimated level",
        "IF harmonic 23",
        "IF harmonic 23 estimated level",
        "IF harmonic 24",
        "IF harmonic 24 estimated level",
    }


def test_spur_names_of_every_form():
    # a 455 kHz IF from 682.5 kHz with a 227.5 kHz LO (low side, from a frequency): the input band
    # 182.5 kHz to 1.1825 MHz holds products of every form, and the LO's 2nd harmonic lands on the IF
    text = edited(clean(), OSC, "oscillator: {frequency: 227.5 kHz, injection: low}")
    text = edited(text, "  frequency: 10.7 MHz\n", "  frequency: 682.5 kHz\n")
    rows = sheet_rows(check(text, settings=_settings(max_listed=999)), RULE)
    names = {r[2] for r in rows if r[4] == "Hz"}
    low, high = 682.5e3 - 0.5e6, 682.5e3 + 0.5e6
    expected = {n for n, *_ in _spurs(227.5e3, 455e3, 20e3, low, high)}
    expected |= {f"IF harmonic {n}" for n in range(2, 4) if low <= n * 455e3 <= high}
    expected |= {f"LO harmonic {n}" for n in range(2, 6) if low <= n * 227.5e3 <= high}
    expected |= {
        f"LO harmonic {n} inside the IF passband" for n in range(1, 6) if 445e3 <= n * 227.5e3 <= 465e3
    }
    assert names == expected
    assert {
        "spur fs = IF",
        "spur fs + fLO = IF",
        "spur 3·fLO − fs = IF",
        "spur 2·fs − fLO = IF",
        "LO harmonic 2 inside the IF passband",
    } <= names


def test_a_setting_that_is_not_a_number_falls_back_to_the_default():
    # close "wide" and order "many" cannot be read: the defaults (50 kHz, order 5) stand
    settings = _settings(close="wide", order="many")
    assert sheet_rows(check(clean(), settings=settings), RULE) == sheet_rows(check(clean()), RULE)
    assert of(check(clean(), settings=settings), RULE) == []
    # and a window given as text that reads as a number is taken
    wide = _settings(close="250000")
    assert [f.level for f in of(check(clean(), settings=wide), RULE)] == ["warning", "note"]


def test_lo_harmonics_on_the_if_and_on_the_input_are_noted_and_spurs_there_warned():
    # the same 682.5 kHz plan: 2 x 227.5 kHz lands in the IF passband and 3 x 227.5 kHz on the input
    # (both birdies, no level estimated); the products 5 fLO - fs and 2 fs - 4 fLO answer at the input
    # itself, each at -30 dBm less its LO harmonic's weight and 20 dB per signal order above the first
    text = edited(clean(), OSC, "oscillator: {frequency: 227.5 kHz, injection: low}")
    text = edited(text, "  frequency: 10.7 MHz\n", "  frequency: 682.5 kHz\n")
    found = [facts(f) for f in of(check(text), RULE)]
    at = where(text, "oscillator: {frequency", "low}", "chain[1].oscillator.injection")
    l5, l4 = -30 + envelope_db(5), -30 + envelope_db(4) - 20
    assert sorted(found, key=lambda f: f["level"]) == [
        {
            "rule": RULE,
            "level": "note",
            **at,
            "message": "conversion: 2 harmonics of the build's own IF or LO within 50 kHz of the wanted "
            "682.5 kHz, estimated too weak to hear: LO harmonic 2 inside the IF passband at 455 kHz (+0 Hz, "
            "level not "
            "estimated); LO harmonic 3 at 682.5 kHz (+0 Hz, level not estimated)",
            "values": {
                "LO": (227.5e3, "Hz"),
                "LO harmonic 2 inside the IF passband": (455e3, "Hz"),
                "offset": (0.0, "Hz"),
            },
            "fix": "",
            "stage": "conversion",
            "signal": "",
            "position": "",
        },
        {
            "rule": RULE,
            "level": "warning",
            **at,
            "message": "conversion: 2 responses within 50 kHz of the wanted 682.5 kHz (LO 227.5 kHz) strong "
            "enough to "
            "hear (within 10 dB of the weakest wanted -100 dBm): spur 5·fLO − fs = IF at 682.5 kHz "
            "(+0 Hz, "
            f"about {l5:.0f} dBm); spur 2·fs − 4·fLO = IF at 682.5 kHz (+0 Hz, about {l4:.0f} dBm) "
            "(a -30 "
            f"dBm signal there, 0 dB down ahead of the mixer, LO harmonic 5 at {envelope_db(5):.0f} "
            "dB, 0 dB "
            "for signal order 1)",
            "values": {
                "LO": (227.5e3, "Hz"),
                "spur 5·fLO − fs = IF": (pytest.approx(682.5e3), "Hz"),
                "offset": (pytest.approx(0.0, abs=1e-6), "Hz"),
                "estimated level": (pytest.approx(l5), "dBm"),
                "weakest wanted": (-100.0, "dBm"),
            },
            "fix": FIX,
            "stage": "conversion",
            "signal": "",
            "position": "",
        },
    ]


def test_ordinal_words_past_the_schema():
    from speccheck.rules.freqplan.resonators import _ordinal

    # the schema stops at the 9th overtone; the word for any other n is "nth"
    assert [_ordinal(n) for n in (3, 5, 7, 9, 11, 13)] == ["3rd", "5th", "7th", "9th", "11th", "13th"]
