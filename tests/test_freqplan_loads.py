"""speccheck/loads.py pinned: the load on an RC stage's output as a plain resistance (series and
parallel arithmetic, a rail as AC ground, a device pin open), a coupling capacitor of at least 100
times the stage's capacitor as a short (its reactance then under 1 % of R: common practice, "two
decades away"), anything smaller or a coil as no plain resistance, parts that carry no current
left out."""

from __future__ import annotations

import pytest
from test_freqplan_audio import RC_LP, VOICE, lp_parts, plan

from speccheck import loader, loads


def _load(extra: str, c: str = "4.7 nF", rails: str = "", stage: str = RC_LP):
    text = plan(lp_parts("10 kohm", c, extra), stage, signals=VOICE)
    if rails:
        text = text.replace("  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n" + rails)
    build = loader.load_text(text, "plan.yaml").build
    return loads.resistive_load(build, build.stages("audio-filter")[0])


def test_nothing_on_the_output_is_no_load():
    assert _load("") is None


def test_a_resistor_to_ground():
    assert _load("  RL: {kind: resistor, value: 22 kohm, ends: [AF, GND]}\n") == loads.Load(22e3, ("RL",), ())


def test_a_resistor_to_a_rail_is_to_ac_ground():
    rail = "  V12: {voltage: 12 V}\n"
    assert _load("  R3: {kind: resistor, value: 22 kohm, ends: [AF, V12]}\n", rails=rail) == loads.Load(
        22e3, ("R3",), ()
    )


def test_resistors_in_series_and_in_parallel():
    # 22 kohm + 10 kohm in series (32 kohm) ...
    got = _load(
        "  R3: {kind: resistor, value: 22 kohm, ends: [AF, X]}\n"
        "  R4: {kind: resistor, value: 10 kohm, ends: [X, GND]}\n"
    )
    assert got == loads.Load(pytest.approx(32e3), ("R3", "R4"), ())
    # ... and 22 kohm behind a shorted 1 uF beside 22 kohm straight to ground: 11 kohm
    got = _load(
        "  C3: {kind: capacitor, value: 1 uF, ends: [AF, X]}\n"
        "  R3: {kind: resistor, value: 22 kohm, ends: [X, GND]}\n"
        "  R4: {kind: resistor, value: 22 kohm, ends: [AF, GND]}\n"
    )
    assert got == loads.Load(pytest.approx(11e3), ("C3", "R4", "R3"), ("C3",))


def test_a_large_coupling_capacitor_is_a_short():
    got = _load(
        "  C3: {kind: capacitor, value: 1 uF, ends: [AF, X]}\n"
        "  RL: {kind: resistor, value: 22 kohm, ends: [X, GND]}\n"
    )
    assert got == loads.Load(22e3, ("C3", "RL"), ("C3",))


@pytest.mark.parametrize("c3, plain", [("99 nF", False), ("101 nF", True)])
def test_the_short_ratio_is_one_hundred(c3, plain):
    # the stage's capacitor is 1 nF: 99 nF is under 100 x, 101 nF over
    got = _load(
        f"  C3: {{kind: capacitor, value: {c3}, ends: [AF, X]}}\n"
        "  RL: {kind: resistor, value: 22 kohm, ends: [X, GND]}\n",
        c="1 nF",
    )
    assert got == (
        loads.Load(22e3, ("C3", "RL"), ("C3",)) if plain else loads.NotPlain(("C3", "RL"), ("C3",))
    )


def test_a_coil_is_never_plain():
    got = _load(
        "  L3: {kind: inductor, value: 1 mH, ends: [AF, X]}\n"
        "  RL: {kind: resistor, value: 22 kohm, ends: [X, GND]}\n"
    )
    assert got == loads.NotPlain(("L3", "RL"), ("L3",))


def test_a_large_capacitor_straight_to_ground_shorts_the_output():
    assert _load("  C3: {kind: capacitor, value: 1 uF, ends: [AF, GND]}\n") == loads.NotPlain(
        ("C3",), ("C3",)
    )


def test_parts_that_carry_no_current_are_left_out():
    # a resistor to nowhere, a chain of two to nowhere, one into a device pin (open)
    assert _load("  R3: {kind: resistor, value: 22 kohm, ends: [AF, X]}\n") is None
    assert (
        _load(
            "  R3: {kind: resistor, value: 22 kohm, ends: [AF, X]}\n"
            "  R4: {kind: resistor, value: 22 kohm, ends: [X, Y]}\n"
        )
        is None
    )
    assert _load("  R3: {kind: resistor, value: 22 kohm, ends: [AF, U1.in]}\n") is None
    # beside a real load they do not count
    got = _load(
        "  R3: {kind: resistor, value: 22 kohm, ends: [AF, X]}\n"
        "  RL: {kind: resistor, value: 47 kohm, ends: [AF, GND]}\n"
    )
    assert got == loads.Load(47e3, ("RL",), ())


def test_a_part_without_a_value_is_not_counted():
    got = _load(
        "  R3: {kind: resistor, ends: [AF, GND]}\n  RL: {kind: resistor, value: 47 kohm, ends: [AF, GND]}\n"
    )
    assert got == loads.Load(47e3, ("RL",), ())


def test_a_stage_without_a_shared_net_has_no_output():
    text = plan(
        "  R2: {kind: resistor, value: 10 kohm, ends: [IN, AF]}\n"
        "  C2: {kind: capacitor, value: 1 nF, ends: [OTHER, GND]}\n"
        "  RL: {kind: resistor, value: 47 kohm, ends: [AF, GND]}\n",
        RC_LP,
        signals=VOICE,
    )
    build = loader.load_text(text, "plan.yaml").build
    stage = build.stages("audio-filter")[0]
    assert loads.rc_output(build, stage) is None and loads.resistive_load(build, stage) is None


def test_rc_output_names_the_input_and_output_nets():
    text = plan(lp_parts("10 kohm", "1 nF"), RC_LP, signals=VOICE)
    build = loader.load_text(text, "plan.yaml").build
    res, cap, inp, out = loads.rc_output(build, build.stages("audio-filter")[0])
    assert (res.name, cap.name, inp, out) == ("R2", "C2", "IN", "AF")


def test_members_of_a_listed_pair_of_capacitors():
    # capacitor: [C2, C4] stands for both in parallel; neither is part of the load
    text = plan(
        lp_parts(
            "10 kohm",
            "1 nF",
            "  C4: {kind: capacitor, value: 2.2 nF, ends: [AF, GND]}\n"
            "  RL: {kind: resistor, value: 47 kohm, ends: [AF, GND]}\n",
        ),
        RC_LP.replace("capacitor: C2", "capacitor: [C2, C4]"),
        signals=VOICE,
    )
    build = loader.load_text(text, "plan.yaml").build
    stage = build.stages("audio-filter")[0]
    stand_in = build.part(stage.capacitor)
    assert [p.name for p in loads.members(build, stand_in)] == ["C2", "C4"]
    assert loads.resistive_load(build, stage) == loads.Load(47e3, ("RL",), ())
    assert [p.name for p in loads.members(build, build.part("RL"))] == ["RL"]


def test_a_resistor_without_a_value_gives_no_output():
    text = plan(
        "  R2: {kind: resistor, ends: [IN, AF]}\n  C2: {kind: capacitor, value: 1 nF, ends: [AF, GND]}\n"
        "  RL: {kind: resistor, value: 47 kohm, ends: [AF, GND]}\n",
        RC_LP,
        signals=VOICE,
    )
    build = loader.load_text(text, "plan.yaml").build
    stage = build.stages("audio-filter")[0]
    assert loads.rc_output(build, stage) is None and loads.resistive_load(build, stage) is None
