"""freqplan.conversion: an if_frequency that the plan's own LO and input do not give (by more than
1 %, setting intended_share) is a warning: one of the numbers is wrong. Mixer arithmetic, low side:
f_IF = f_in - f_LO (textbook mixer arithmetic, e.g. Tooley, Electronic Circuits)."""

import pytest
from conftest import CLEAN, check, edited, line_of, of
from freqplan_pins import F_IF, LO, hz6

PLAN = CLEAN.read_text("utf-8")


def stated(if_text: str) -> str:
    return edited(PLAN, "    if_frequency: 455 kHz\n", f"    if_frequency: {if_text}\n")


def warnings_of(text: str) -> list:
    return [f for f in of(check(text), "freqplan.conversion") if f.level == "warning"]


def test_a_stated_if_of_the_input_frequency_is_a_warning():
    # the clean plan's LO and IF written out in tests/freqplan_pins.py: the crystal pulled by its
    # oscillator's load (C1m / 2(C0 + CL)), then f_IF = f_in - f_LO, low side
    text = stated("10.7 MHz")
    found = warnings_of(text)
    assert len(found) == 1
    assert found[0].message == (
        f"conversion: the plan states an IF of 10.7 MHz, but the LO ({hz6(LO)}) and the input (10.7 MHz) "
        f"give {hz6(F_IF)}, {hz6(10.7e6 - F_IF)} from it: one of these numbers is wrong")
    assert found[0].location.line == line_of(text, "if_frequency: 10.7 MHz")
    values = {v.name: v.value for v in found[0].values}
    assert values == {"IF stated": 10.7e6, "IF computed": pytest.approx(F_IF), "LO": pytest.approx(LO),
                      "input": 10.7e6}

@pytest.mark.parametrize(("if_text", "count"), [
    ("459.6 kHz", 0),  # 455.065 kHz is 0.99 % below it
    ("459.7 kHz", 1),  # 1.01 % below it
    ("450.6 kHz", 0),  # 0.99 % above it
    ("450.5 kHz", 1),  # 1.01 % above it
])
def test_the_share_trips_at_one_percent(if_text, count):
    assert len(warnings_of(stated(if_text))) == count
