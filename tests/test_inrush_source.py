"""power.fuse-inrush with the plan's own source: the RC charge peak V/R and I²t = V²·C/(2R)
(i = (V/R)·e^(−t/RC), any circuits text), R being the plan's figure where it states one; a
bench supply's current limit I caps the peak, I²t = I·C·V − I²·R·C/2 (constant current until
the capacitor is at V − I·R, Q = C·V, then the RC tail from I), cross-checked here by numerical
integration with scipy. The expected numbers are hand arithmetic from the plans' values."""

from __future__ import annotations

import math

import pytest
from conftest import EXAMPLES, check, edited, of
from scipy import integrate

PORTABLE = (EXAMPLES / "portable-9v-battery.yaml").read_text("utf-8")
HOT = (EXAMPLES / "power-hot-amplifier.yaml").read_text("utf-8")
FUSE_LARGE = (EXAMPLES / "power-fuse-too-large.yaml").read_text("utf-8")


def _sheet(result, name):
    return next(e.value.value for e in result.sheet if e.section == "fuse" and e.value.name == name)


def test_battery_with_its_stated_internal_resistance():
    # 9 V onto C30 220 uF through the stated 2 ohm: peak 4.5 A, I²t = 81 x 220e-6 / 4 = 4.455e-3 A²s
    text = edited(PORTABLE, "    cells: 6 ", "    internal_resistance: 2 ohm\n    cells: 6 ")
    result = check(text)
    assert _sheet(result, "inrush loop resistance") == pytest.approx(2.0)
    assert _sheet(result, "inrush peak") == pytest.approx(4.5)
    assert _sheet(result, "inrush I²t") == pytest.approx(81 * 220e-6 / 4)
    assert "stated internal resistance" in _sheet(result, "inrush source")


def test_battery_typical_internal_resistance_by_chemistry():
    # six alkaline cells at 0.25 ohm each (speccheck/formulas/battery.py, from memory): 1.5 ohm,
    # 9 / 1.5 = 6 A, I²t = 81 x 220e-6 / 3 = 5.94e-3 A²s; said to be typical, not the plan's
    result = check(PORTABLE)
    assert _sheet(result, "inrush peak") == pytest.approx(6.0)
    assert _sheet(result, "inrush I²t") == pytest.approx(81 * 220e-6 / 3)
    assert "typical" in _sheet(result, "inrush source") and "from memory" in _sheet(result, "inrush source")


def test_battery_short_circuit_current_sets_its_resistance():
    # a 12 V pack good for 40 A into a short: R = 12/40 = 0.3 ohm, so the peak is 40 A (not the
    # 24 A of an assumed 0.5 ohm) and I²t = 144 x 470e-6 / 0.6 = 0.1128 A²s
    result = check(FUSE_LARGE)
    assert _sheet(result, "inrush loop resistance") == pytest.approx(0.3)
    assert _sheet(result, "inrush peak") == pytest.approx(40.0)
    assert _sheet(result, "inrush I²t") == pytest.approx(144 * 470e-6 / 0.6)


def test_bench_supply_limit_caps_the_peak_against_scipy():
    # 18 V, 3 A limit, 2200 uF, the assumed 0.5 ohm of leads and ESR: V/R = 36 A, capped at 3 A.
    # I²t = 3 x 2200e-6 x 18 - 9 x 0.5 x 2200e-6 / 2 = 0.1188 - 0.00495 = 0.11385 A²s (hand), and by
    # integrating the piecewise current: 3 A until the capacitor is at 18 - 1.5 = 16.5 V
    # (t1 = C x 16.5 / 3), then 3 e^(-(t - t1)/RC)
    result = check(HOT)
    v, r, limit = 18.0, 0.5, 3.0
    c = _sheet(result, "bulk capacitance behind it")  # C30 2200 uF and the 100 nF beside it
    assert c == pytest.approx(2200.1e-6)
    t1 = c * (v - limit * r) / limit
    tail, _ = integrate.quad(lambda t: (limit * math.exp(-t / (r * c))) ** 2, 0, 40 * r * c)
    assert _sheet(result, "inrush peak") == pytest.approx(3.0)
    assert _sheet(result, "inrush current limit") == pytest.approx(3.0)
    assert _sheet(result, "inrush I²t") == pytest.approx(limit ** 2 * t1 + tail, rel=1e-6)
    assert _sheet(result, "inrush I²t") == pytest.approx(0.11385, rel=1e-4)
    assert _sheet(result, "inrush I²t") < limit * c * v  # below the bound of a charge all at the limit
    assert "assumed" in _sheet(result, "inrush source")


def test_adapter_source_resistance_from_the_plan(clean_text):
    # the clean plan's adapter given 0.2 ohm: 12 / 0.2 = 60 A peak; its 1.5 A rating is no limit at
    # switch-on (its own output capacitor delivers the surge); I²t = 144 x 1000e-6 / 0.4 = 0.36 A²s
    stated = "  max_current: 1.5 A\n  source_resistance: 0.2 ohm\n"
    text = edited(clean_text, "  max_current: 1.5 A\n", stated)
    result = check(text)
    assert _sheet(result, "inrush peak") == pytest.approx(60.0)
    assert _sheet(result, "inrush I²t") == pytest.approx(144 * 1000e-6 / 0.4)
    assert "supply.source_resistance 0.2 ohm" in _sheet(result, "inrush source")


def test_assumed_loop_resistance_is_said_in_the_finding():
    text = (EXAMPLES / "power-quick-fuse-inrush.yaml").read_text("utf-8")
    (found,) = of(check(text), "power.fuse-inrush")
    said = "an assumed 500 mΩ of supply, leads, fuse and ESR: the plan states no source_resistance"
    assert said in found.message


def test_resistor_as_fuse_on_a_battery_counts_its_internal_resistance():
    # a 1 ohm resistor as the only fuse of the six-cell alkaline pack (1.5 ohm typical, from memory in
    # formulas/battery.py): 9 / (1 + 1.5) = 3.6 A into a short at its far end, 3.6² x 1 = 12.96 W (hand),
    # not the 81 W of a stiff 9 V; the inrush loop is the same 1.5 + 1 ohm: 9 / 2.5 = 3.6 A peak
    text = edited(PORTABLE, "F1: {kind: fuse, current_rating: 500 mA, speed: time-lag,",
                  "F1: {kind: resistor, value: 1 ohm, power_rating: 2 W, fusible: true,")
    result = check(text)
    short = next(e.value.value for e in result.sheet
                 if e.owner == "F1" and e.value.name == "current into a short at its far end")
    assert short == pytest.approx(9 / 2.5)
    power = next(e.value.value for e in result.sheet
                 if e.owner == "F1" and e.value.name == "power into a short at its far end")
    assert power == pytest.approx(3.6 ** 2 * 1.0)
    assert _sheet(result, "inrush peak") == pytest.approx(9 / 2.5)
