"""freqplan.crystal-overtone: a crystal declared fundamental above the usual top of AT-cut
fundamental crystals (about 30 MHz: common practice, the figure from memory) is a warning, since the
part supplied for that frequency is usually a 3rd-overtone unit that starts near a third of it."""

import pytest
from conftest import CLEAN, check, edited, line_of, of

PLAN = CLEAN.read_text("utf-8")


def with_crystal(marked: str, overtone: int = 1) -> str:
    return edited(PLAN, "    frequency: 10.245 MHz\n    overtone: 1\n",
                  f"    frequency: {marked}\n    overtone: {overtone}\n")


def test_a_44_mhz_fundamental_crystal_is_a_warning_with_its_third():
    text = with_crystal("44.545 MHz")
    found = of(check(text), "freqplan.crystal-overtone")
    assert [f.level for f in found] == ["warning"]
    assert found[0].message == (
        "X1 is declared a fundamental-mode crystal at 44.545 MHz, above the 30 MHz or so where ordinary "
        "AT-cut fundamental crystals stop: the part supplied for that frequency is usually a 3rd-overtone "
        f"unit, which an oscillator without a tuned circuit at the overtone starts near {44.545 / 3:.2f} MHz")
    assert (found[0].location.line, found[0].location.col) == (line_of(text, "frequency: 44.545 MHz"), 16)
    assert {v.name: v.value for v in found[0].values} == {"marked": pytest.approx(44.545e6),
                                                         "fundamental_max": 30e6}


@pytest.mark.parametrize(("marked", "count"), [("30 MHz", 0), ("30.001 MHz", 1)])
def test_the_limit_is_inclusive(marked, count):
    assert len(of(check(with_crystal(marked)), "freqplan.crystal-overtone")) == count


def test_an_overtone_crystal_declared_as_such_is_not_this_warning():
    found = of(check(with_crystal("44.545 MHz", overtone=3)), "freqplan.crystal-overtone")
    assert all("declared a fundamental-mode crystal" not in f.message for f in found)
