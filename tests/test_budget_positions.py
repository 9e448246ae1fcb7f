"""The power budget per switch position (format 2): a device fed through a switch throw draws only
in that position, and the budget, fuse and battery take the position that draws most."""

from __future__ import annotations

import pytest
from conftest import EXAMPLES, check, edited, of

BENCH = EXAMPLES / "bench-demod-selector.yaml"
PORTABLE = EXAMPLES / "portable-9v-battery.yaml"

LAMP_PROFILE = (
    "profiles:\n"
    "  panel-lamp-driver:\n"
    "    class: other\n"
    "    description: dial and meter lamps with their driver\n"
    "    quiescent_current: 150 mA\n"
    "    pins:\n"
    "      vs: {role: supply, dc: supply}\n"
    "      gnd: {role: ground, dc: ground}\n\n"
)
S2 = (
    "  S2:\n"
    "    kind: switch\n"
    "    positions: [off, on]\n"
    "    poles:\n"
    "      a: {common: RAIL, throws: {on: RAIL_LAMP}}\n"
)


def lamp_plan(text: str, rail: str) -> str:
    """The plan with a 150 mA lamp driver U4 on RAIL_LAMP, which S2 feeds from the supply rail when on."""
    text = edited(text, "\nsignals:\n", "\n" + LAMP_PROFILE + "signals:\n")
    text = edited(
        text,
        "  GND: {voltage: 0 V}\n",
        f"  {rail}_LAMP: {{voltage: {rail[1:]} V}}\n  GND: {{voltage: 0 V}}\n",
    )
    text = edited(text, "\nparts:\n", f"\n  U4: {{profile: panel-lamp-driver, rail: {rail}_LAMP}}\nparts:\n")
    return edited(text, "  # supply input\n", "  # supply input\n" + S2.replace("RAIL", rail))


def sheet(result) -> dict:
    return {(e.section, e.owner, e.value.name): e.value.value for e in result.sheet}


def test_a_lamp_switched_on_in_one_position_is_budgeted_in_that_position():
    base = sheet(check(BENCH.read_text("utf-8"), "bench.yaml"))[("power", "supply", "input current budget")]
    result = check(lamp_plan(BENCH.read_text("utf-8"), "V12"), "bench.yaml")
    got = sheet(result)
    # the lamp driver's 150 mA (its profile) comes on top of the unswitched build's budget
    assert got[("power", "supply", "input current budget")] == pytest.approx(base + 0.150, rel=1e-9)
    assert got[("power", "supply", "worst switch position")] == "S2 on"
    assert got[("power", "supply", "input current budget with S2 off")] == pytest.approx(base, rel=1e-9)
    assert got[("power", "supply", "input current budget with S2 on")] == pytest.approx(
        base + 0.150, rel=1e-9
    )
    assert got[("power", "V12", "S2 switched to V12_LAMP")] == pytest.approx(0.150, rel=1e-9)
    # the fuse is sized on the worst position and says so
    assert got[("fuse", "F1", "normal current (budget at full output)")] == pytest.approx(
        base + 0.150, rel=1e-9
    )
    assert got[("fuse", "F1", "worst switch position")] == "S2 on"


def test_the_battery_runs_down_at_the_worst_position():
    base = sheet(check(PORTABLE.read_text("utf-8"), "portable.yaml"))
    result = check(lamp_plan(PORTABLE.read_text("utf-8"), "V9"), "portable.yaml")
    got = sheet(result)
    current = base[("power", "battery", "budget current")] + 0.150
    assert got[("power", "battery", "budget current")] == pytest.approx(current, rel=1e-9)
    assert got[("power", "battery", "budget current taken with")] == "S2 on"
    # Peukert (Linden): H = 0.55 Ah / 25 mA = 22 h; t = H (C / (I H))^k, k = 1.3 for alkaline (from memory)
    hours = 22 * (0.55 / (current * 22)) ** 1.3
    assert got[("power", "battery", "running time at the budget current")] == pytest.approx(hours, rel=1e-9)
    run = of(result, "battery.running-time")
    assert run and "with S2 on" in run[0].message


def test_a_switch_that_feeds_no_rail_leaves_the_budget_as_it_was():
    # the shipped examples' S1 switches signal paths only: no worst position is named
    got = sheet(check(BENCH.read_text("utf-8"), "bench.yaml"))
    assert ("power", "supply", "worst switch position") not in got
