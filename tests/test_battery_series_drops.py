"""battery.end-of-life and battery.sag count the series drops between the battery and its rail.

A series reverse-polarity diode or a series resistor sits between the battery and the supply's own
rail: a regulator on that rail needs its output plus its dropout at its input, so the battery must
give that plus the drops (Kirchhoff's voltage law around the supply loop; common practice: a silicon
rectifier drops about 0.7 V at a few hundred mA).
"""

import pytest
from conftest import EXAMPLES, check, edited, of

PORTABLE = (EXAMPLES / "portable-9v-battery.yaml").read_text("utf-8")
SHUNT = ('  D1: {kind: diode, ends: [GND, V9], positive: GND, '
         'note: "shunt diode behind the fuse, cathode on V9"}\n')


def with_series_diode(forward: str) -> str:
    fuse = "  F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [BAT_PLUS, "
    text = edited(PORTABLE, fuse + "V9]}\n", fuse + "FUSED]}\n")
    return edited(text, SHUNT, f"  D1: {{kind: diode, ends: [FUSED, V9], positive: FUSED{forward}}}\n")


@pytest.mark.parametrize(("forward", "drop", "said"), [
    (", forward_voltage: 0.3 V", 0.3, "series diode D1 (300 mV)"),
    ("", 0.7, "series diode D1, 0.7 V assumed (700 mV)"),
])
def test_the_regulator_needs_its_output_dropout_and_the_series_diode(forward, drop, said):
    found = of(check(with_series_diode(forward)), "battery.end-of-life")
    need = 6.0 + 2.0 + drop  # V6 out, the 3-terminal regulator profile's 2 V dropout, the diode
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith(
        f"U3 needs {need:g} V (6 V out plus its 2 V dropout, plus {said} on the way), so the build stops "
        f"when the battery falls to {need:g} V under load")
    assert {v.name: v.value for v in found[0].values}["needed"] == pytest.approx(need)


def test_a_shunt_diode_adds_no_drop():
    found = of(check(PORTABLE), "battery.end-of-life")
    assert {v.name: v.value for v in found[0].values}["needed"] == pytest.approx(8.0)  # 6 V + 2 V dropout
