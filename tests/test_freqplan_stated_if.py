"""freqplan.conversion: an if_frequency that the plan's own LO and input do not give (by more than
1 %, setting intended_share) is a warning: one of the numbers is wrong. Mixer arithmetic, low side:
f_IF = f_in - f_LO (textbook mixer arithmetic, e.g. Tooley, Electronic Circuits)."""

import pytest
from conftest import CLEAN, check, edited, line_of, of

PLAN = CLEAN.read_text("utf-8")


def stated(if_text: str) -> str:
    return edited(PLAN, "    if_frequency: 455 kHz\n", f"    if_frequency: {if_text}\n")


def warnings_of(text: str) -> list:
    return [f for f in of(check(text), "freqplan.conversion") if f.level == "warning"]


def test_a_stated_if_of_the_input_frequency_is_a_warning():
    text = stated("10.7 MHz")
    found = warnings_of(text)
    assert len(found) == 1
    values = {v.name: v.value for v in found[0].values}
    computed = values["IF computed"]
    assert computed == pytest.approx(10.7e6 - values["LO"])  # low side: f_in - f_LO
    assert computed == pytest.approx(455e3, abs=200)  # 10.7 MHz - 10.245 MHz, the crystal pulled
    off = abs(computed - 10.7e6) / 10.7e6
    assert found[0].message.startswith(
        "conversion: the plan states an IF of 10.7 MHz, but the LO (10.2449 MHz) and the input (10.7 MHz) "
        f"give 455.065 kHz, {off:.1%} away: one of these numbers is wrong")
    assert found[0].location.line == line_of(text, "if_frequency: 10.7 MHz")
    assert values["IF stated"] == 10.7e6 and values["input"] == 10.7e6


@pytest.mark.parametrize(("if_text", "count"), [
    ("459.6 kHz", 0),  # 455.065 kHz is 0.99 % below it
    ("459.7 kHz", 1),  # 1.01 % below it
    ("450.6 kHz", 0),  # 0.99 % above it
    ("450.5 kHz", 1),  # 1.01 % above it
])
def test_the_share_trips_at_one_percent(if_text, count):
    assert len(warnings_of(stated(if_text))) == count
