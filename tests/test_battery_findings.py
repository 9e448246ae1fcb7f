"""The battery family whole: every finding's level, place, text and numbers, and the sheet entries.

Every expected number is worked out here from its formula. The plan is the shipped portable
example (a 9 V block of six alkaline cells) edited one line at a time. Its budget current, the
input of every battery check, follows from the built-in profiles (typical values, from memory):
U2 (audio amplifier) 6 mA quiescent, U3 (regulator) 5 mA quiescent and its declared 10 mA load
(more than U1's 4 mA behind it), and U2's full output into the 8 ohm speaker: a single-ended
class-B stage on 9 V with 3 V saturation swings (9 - 3)/2 = 3 V peak, 3/8 A peak, and draws a
half-wave averaging I_peak/pi from its supply (Boylestad & Nashelsky, ch. 12).

Per-cell alkaline figures: nominal 1.5 V (IEC 60086-1); fresh 1.6 V, flat at 0.9 V, 0.25 ohm, Peukert
exponent 1.3 (all from memory, the chemistry table of speccheck/formulas/battery.py).
"""

from __future__ import annotations

import math

import pytest
from conftest import EXAMPLES, check, edited, facts, line_of, of, sheet_rows

from speccheck.config import Settings
from speccheck.units import fmt

PORTABLE = EXAMPLES / "portable-9v-battery.yaml"

# budget current (see the module docstring): quiescent currents plus the amplifier's half-wave average
CURRENT = 0.006 + 0.005 + 0.010 + ((9.0 - 3.0) / 2 / 8.0) / math.pi
CELLS = 6
FRESH = CELLS * 1.6  # V open-circuit, new (from memory)
END = CELLS * 0.9  # V counted as flat (from memory)
NOMINAL = CELLS * 1.5  # V (IEC 60086-1)
R_TYPICAL = CELLS * 0.25  # ohm, six cells in series (from memory)
U3_NEEDS = 6.0 + 2.0  # V: the 6 V rail it makes plus the profile's 2 V dropout (typical, from memory)
U2_NEEDS = 4.0  # V: the amplifier profile's least supply (typical, from memory)

SAG_FIX = ("Use a larger battery (bigger cells, or cells in parallel), a chemistry with a lower internal "
           "resistance, or reduce the current (a smaller speaker output, a lower supply for the amplifier).")
EOL_FIX = ("Use a low-dropout regulator, a lower output voltage, more cells, or a chemistry whose voltage "
           "stays up longer; keep every chip's supply range above the battery's end voltage.")
RUN_FIX = "Use a battery with more capacity (larger cells, or a pack), or lower the current the build draws."
CAPACITY_LINE = "    capacity: 550 mAh         # at the light drain the maker rates it at\n"


def portable() -> str:
    return PORTABLE.read_text("utf-8")


def with_battery(extra: str, text: str | None = None) -> str:
    """The plan with more keys under supply.battery (after capacity_at)."""
    return edited(text or portable(), "    capacity_at: 25 mA\n", "    capacity_at: 25 mA\n" + extra)


def col_of(text: str, line_needle: str, value: str) -> int:
    """1-based column of `value` on the line holding `line_needle`."""
    line = text.splitlines()[line_of(text, line_needle) - 1]
    return line.index(value, line.index(line_needle)) + 1


def at(text: str, line_needle: str, value: str, path: str) -> dict:
    return {"line": line_of(text, line_needle), "col": col_of(text, line_needle, value), "path": path}


def u3_rail(text: str) -> dict:
    return at(text, "  U3: {profile", "V9", "devices.U3.rail")


def u2_rail(text: str) -> dict:
    return at(text, "  U2: {profile", "V9", "devices.U2.rail")


def chemistry_at(text: str) -> dict:
    name = text.split("    chemistry: ")[1].split("\n")[0]
    return at(text, "    chemistry: ", name, "supply.battery.chemistry")


def finding(rule: str, level: str, where: dict, message: str, values: dict, fix: str) -> dict:
    return {"rule": rule, "level": level, **where, "message": message, "values": values, "fix": fix,
            "stage": "power", "signal": "", "position": ""}


def approx_values(values: dict) -> dict:
    return {k: (pytest.approx(v, rel=1e-9), u) if isinstance(v, float) else (v, u)
            for k, (v, u) in values.items()}


def peukert(capacity_ah: float, current: float, rated: float, k: float) -> float:
    """Peukert's law as Linden's Handbook of Batteries writes it: t = H (C / (I H))^k, H = C / I_rated."""
    h = capacity_ah / rated
    return h * (capacity_ah / (current * h)) ** k


# ---- the shipped example ----------------------------------------------------------------------

def test_the_portable_sheet_and_its_one_finding():
    text = portable()
    result = check(text, "portable.yaml")
    fresh_loaded = FRESH - CURRENT * R_TYPICAL  # Thevenin: V = V_open - I R
    end_loaded = END - CURRENT * R_TYPICAL
    hours = peukert(0.55, CURRENT, 0.025, 1.3)
    assert sheet_rows(result, "battery.sag") == [
        ("power", "battery", "cells in series", CELLS, "", "", ""),
        ("power", "battery", "nominal voltage", pytest.approx(NOMINAL), "V", "", ""),
        ("power", "battery", "fresh open-circuit voltage", pytest.approx(FRESH), "V", "", ""),
        ("power", "battery", "internal resistance", pytest.approx(R_TYPICAL), "Ω", "", ""),
        ("power", "battery", "budget current", pytest.approx(CURRENT), "A", "", ""),
        ("power", "battery", "sag at the budget current", pytest.approx(CURRENT * R_TYPICAL), "V", "", ""),
        ("power", "battery", "fresh voltage under load", pytest.approx(fresh_loaded), "V", "", ""),
    ]
    assert sheet_rows(result, "battery.end-of-life") == [
        ("power", "battery", "end voltage (flat)", pytest.approx(END), "V", "", ""),
        ("power", "battery", "end voltage under load", pytest.approx(end_loaded), "V", "", ""),
        ("power", "U3", "stops when the battery falls to (under load)", pytest.approx(U3_NEEDS), "V", "", ""),
    ]
    assert sheet_rows(result, "battery.running-time") == [
        ("power", "battery", "capacity", pytest.approx(0.55), "Ah", "", ""),
        ("power", "battery", "running time at the budget current", pytest.approx(hours), "h", "", ""),
    ]
    assert hours > 2.0  # so no running-time finding under the default 2 h
    assert of(result, "battery.sag") == [] and of(result, "battery.running-time") == []
    used = (fresh_loaded - U3_NEEDS) / (fresh_loaded - end_loaded)  # share of the voltage window left
    (eol,) = of(result, "battery.end-of-life")
    assert facts(eol) == finding(
        "battery.end-of-life", "warning", u3_rail(text),
        f"U3 needs {fmt(U3_NEEDS, 'V')} (6 V out plus its 2 V dropout), so the build stops when the battery "
        f"falls to {fmt(U3_NEEDS, 'V')} under load, long before it is flat at {fmt(END, 'V')} "
        f"(6 × {fmt(0.9, 'V')}): only {used:.0%} of the battery's voltage range is used",
        approx_values({"needed": (U3_NEEDS, "V"), "end voltage": (END, "V"),
                       "fresh under load": (fresh_loaded, "V")}),
        EOL_FIX)


def test_cells_left_out_are_the_voltage_over_the_nominal():
    # 9 V / 1.5 V per alkaline cell (IEC 60086-1) = 6 cells: the same sheet as with `cells: 6`
    text = edited(portable(), "    cells: 6                  # a 9 V block is six small cells in series\n",
                  "")
    rows = sheet_rows(check(text, "portable.yaml"), "battery.sag")
    assert rows[0] == ("power", "battery", "cells in series", 6, "", "", "")
    assert rows[2][3] == pytest.approx(FRESH)


def test_a_supply_that_is_not_a_battery_has_no_battery_check():
    text = edited(portable(), "  kind: battery\n", "  kind: bench\n")
    result = check(text, "portable.yaml")
    assert [f for f in result.findings if f.rule.startswith("battery.")] == []
    assert [e for e in result.sheet if e.rule.startswith("battery.")] == []


# ---- battery.sag ------------------------------------------------------------------------------

def sag_warning(text: str, r: float, r_text: str, current: float = CURRENT, tail: str = "") -> dict:
    drop = current * r  # Ohm's law across the internal resistance
    return finding(
        "battery.sag", "warning", chemistry_at(text),
        f"the alkaline battery sags {fmt(drop, 'V')} ({drop / NOMINAL:.0%} of its {fmt(NOMINAL, 'V')}) "
        f"at the budget current of {fmt(current, 'A')} through {r_text}{tail}",
        approx_values({"fresh open-circuit": (FRESH, "V"), "budget current": (current, "A"),
                       "internal resistance": (r, "Ω"), "under load": (FRESH - drop, "V")}),
        SAG_FIX)


@pytest.mark.parametrize("ohms, fires", [(6.3, False), (6.5, True)])
def test_a_sag_past_a_tenth_of_the_nominal_voltage_is_a_warning(ohms, fires):
    # the warning starts where I x R passes 0.1 x 9 V = 0.9 V, at R = 0.9 V / I = 6.41 ohm
    assert CURRENT * 6.3 < 0.1 * NOMINAL < CURRENT * 6.5
    text = with_battery(f"    internal_resistance: {ohms} ohm\n")
    found = of(check(text, "portable.yaml"), "battery.sag")
    assert [facts(f) for f in found] == ([sag_warning(text, ohms, fmt(ohms, "Ω"))] if fires else [])


@pytest.mark.parametrize("share, fires", [(0.024, False), (0.023, True)])
def test_the_sag_share_setting_and_the_typical_resistance(share, fires):
    # the typical 1.5 ohm sags I x 1.5 ohm = 0.2105 V = 2.34 % of 9 V: over 2.3 %, under 2.4 %
    assert 0.023 * NOMINAL < CURRENT * R_TYPICAL < 0.024 * NOMINAL
    text = portable()
    settings = Settings(rule_settings={"battery.sag": {"share": share}})
    found = of(check(text, "portable.yaml", settings), "battery.sag")
    expected = sag_warning(text, R_TYPICAL, f"{fmt(R_TYPICAL, 'Ω')} (typical for the chemistry)")
    assert [facts(f) for f in found] == ([expected] if fires else [])


def sag_error(text: str, dev: str, needs: float, what: str, where: dict, r: float, current: float = CURRENT,
              tail: str = "") -> dict:
    loaded = FRESH - current * r
    return finding(
        "battery.sag", "error", where,
        f"even a fresh alkaline battery ({fmt(FRESH, 'V')} open-circuit, {fmt(r, 'Ω')}) falls to "
        f"{fmt(loaded, 'V')} at the budget current of {fmt(current, 'A')}{tail}, below the {fmt(needs, 'V')} "
        f"that {dev} needs ({what}): it will not run from this battery",
        approx_values({"fresh open-circuit": (FRESH, "V"), "budget current": (current, "A"),
                       "internal resistance": (r, "Ω"), "under load": (loaded, "V"), "needed": (needs, "V")}),
        SAG_FIX)


U3_WHAT = "6 V out plus its 2 V dropout"
U2_WHAT = "its 4 V least supply"


@pytest.mark.parametrize("ohms", [11.3, 11.5])
def test_a_fresh_battery_under_what_the_regulator_needs_is_an_error(ohms):
    # the fresh battery under load meets U3's 8 V at R = (9.6 V - 8 V) / I = 11.40 ohm
    assert FRESH - CURRENT * 11.5 < U3_NEEDS < FRESH - CURRENT * 11.3
    text = with_battery(f"    internal_resistance: {ohms} ohm\n")
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.sag")]
    if ohms == 11.5:  # short of 8 V: the error, and no sag warning beside it
        assert found == [sag_error(text, "U3", U3_NEEDS, U3_WHAT, u3_rail(text), ohms)]
    else:  # 8.01 V holds the regulator up; the 1.59 V sag is over 0.9 V: the warning
        assert found == [sag_warning(text, ohms, fmt(ohms, "Ω"))]


def test_every_device_the_battery_cannot_hold_up_is_named():
    # 50 ohm: 9.6 V - I x 50 ohm = 2.58 V, under U2's 4 V and U3's 8 V (devices in plan order)
    text = with_battery("    internal_resistance: 50 ohm\n")
    assert FRESH - CURRENT * 50 < U2_NEEDS
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.sag")]
    assert found == [sag_error(text, "U2", U2_NEEDS, U2_WHAT, u2_rail(text), 50.0),
                     sag_error(text, "U3", U3_NEEDS, U3_WHAT, u3_rail(text), 50.0)]


# ---- where the budget current holds --------------------------------------------------------------

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
    "      a: {common: V9, throws: {on: V9_LAMP}}\n"
)
LAMP = 0.150  # A, the lamp driver profile's quiescent current (written above)
INCOMPLETE = " (the budget is incomplete, so the real current is higher)"


def lamp_plan(text: str) -> str:
    """A 150 mA lamp driver U4 on V9_LAMP, which S2 feeds from the battery's rail V9 when on."""
    text = edited(text, "\nsignals:\n", "\n" + LAMP_PROFILE + "signals:\n")
    text = edited(text, "  GND: {voltage: 0 V}\n", "  V9_LAMP: {voltage: 9 V}\n  GND: {voltage: 0 V}\n")
    text = edited(text, "\nparts:\n", "\n  U4: {profile: panel-lamp-driver, rail: V9_LAMP}\nparts:\n")
    return edited(text, "  # supply input\n", "  # supply input\n" + S2)


def no_rail_device(text: str) -> str:
    """U5 with no rail: its draw is unknown, so the budget is only a lower bound."""
    return edited(text, "  U3: {profile", "  U5: {profile: fm-if-subsystem}\n  U3: {profile")


def test_the_switch_position_that_draws_most_is_named():
    text = lamp_plan(with_battery("    internal_resistance: 11.5 ohm\n"))
    current = CURRENT + LAMP  # S2 on: the lamp on top of the rest
    result = check(text, "portable.yaml")
    assert ("power", "battery", "budget current taken with", "S2 on", "", "", "") in \
        sheet_rows(result, "battery.sag")
    found = [facts(f) for f in of(result, "battery.sag")]
    assert found == [sag_error(text, "U3", U3_NEEDS, U3_WHAT, u3_rail(text), 11.5, current, " with S2 on")]
    hours = peukert(0.55, current, 0.025, 1.3)
    (run,) = of(result, "battery.running-time")
    assert run.message == (
        f"the battery's 550 mAh lasts about {hours:.2g} h at the budget current of {fmt(current, 'A')} "
        f"(Peukert exponent 1.3 from the {fmt(0.025, 'A')} rating) with S2 on, under the 2 h a battery build "
        "should run")


def test_an_incomplete_budget_is_said_to_be_a_lower_bound():
    text = no_rail_device(with_battery("    internal_resistance: 6.5 ohm\n"))
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.sag")]
    assert found == [sag_warning(text, 6.5, fmt(6.5, "Ω"), tail=INCOMPLETE)]
    text = no_rail_device(with_battery("    internal_resistance: 11.5 ohm\n"))
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.sag")]
    assert found == [sag_error(text, "U3", U3_NEEDS, U3_WHAT, u3_rail(text), 11.5, tail=INCOMPLETE)]


# ---- battery.running-time ---------------------------------------------------------------------

def capacity_at(text: str) -> dict:
    return at(text, "    capacity: ", text.split("    capacity: ")[1].split()[0], "supply.battery.capacity")


def running(text: str, capacity: str, capacity_ah: float, hours: float, how: str, current: float = CURRENT,
            tail: str = "", least: str = "2") -> dict:
    return finding(
        "battery.running-time", "warning", capacity_at(text),
        f"the battery's {capacity} lasts about {hours:.2g} h at the budget current of {fmt(current, 'A')} "
        f"({how}){tail}, under the {least} h a battery build should run",
        approx_values({"capacity": (capacity_ah, "Ah"), "budget current": (current, "A"),
                       "running time": (hours, "h")}),
        RUN_FIX)


PEUKERT_HOW = f"Peukert exponent 1.3 from the {fmt(0.025, 'A')} rating"


@pytest.mark.parametrize("mah", [460, 480])
def test_a_running_time_under_two_hours_is_a_warning(mah):
    # Peukert (Linden): t = H (C/(I H))^k, H = C / 25 mA, k = 1.3 for alkaline (from memory); 2 h falls
    # between 460 and 480 mAh
    hours = peukert(mah / 1000, CURRENT, 0.025, 1.3)
    assert (hours < 2.0) == (mah == 460)
    text = edited(portable(), CAPACITY_LINE, f"    capacity: {mah} mAh\n")
    result = check(text, "portable.yaml")
    assert ("power", "battery", "running time at the budget current", pytest.approx(hours), "h", "", "") in \
        sheet_rows(result, "battery.running-time")
    expected = [running(text, f"{mah} mAh", mah / 1000, hours, PEUKERT_HOW)] if hours < 2.0 else []
    assert [facts(f) for f in of(result, "battery.running-time")] == expected


@pytest.mark.parametrize("mah", [270, 290])
def test_without_a_rating_current_the_time_is_capacity_over_current(mah):
    hours = mah / 1000 / CURRENT  # t = C / I: 2 h falls between 270 and 290 mAh
    assert (hours < 2.0) == (mah == 270)
    text = edited(portable(), CAPACITY_LINE, f"    capacity: {mah} mAh\n")
    text = edited(text, "    capacity_at: 25 mA\n", "")
    result = check(text, "portable.yaml")
    assert ("power", "battery", "running time at the budget current", pytest.approx(hours), "h", "", "") in \
        sheet_rows(result, "battery.running-time")
    how = "capacity over current"
    expected = [running(text, f"{mah} mAh", mah / 1000, hours, how)] if hours < 2.0 else []
    assert [facts(f) for f in of(result, "battery.running-time")] == expected


@pytest.mark.parametrize("least, fires", [(2.3, False), (2.4, True)])
def test_the_min_hours_setting(least, fires):
    hours = peukert(0.55, CURRENT, 0.025, 1.3)  # 2.34 h: over 2.3, under 2.4
    assert 2.3 < hours < 2.4
    text = portable()
    settings = Settings(rule_settings={"battery.running-time": {"min_hours": least}})
    found = [facts(f) for f in of(check(text, "portable.yaml", settings), "battery.running-time")]
    expected = running(text, "550 mAh", 0.55, hours, PEUKERT_HOW, least=f"{least:g}")
    assert found == ([expected] if fires else [])


def test_the_chemistry_sets_the_peukert_exponent():
    # three lithium-ion cells (3 x 3.6 V = 10.8 V nominal, IEC 61960), Peukert exponent 1.05 (from memory)
    text = edited(portable(), "chemistry: alkaline\n    cells: 6", "chemistry: lithium-ion\n    cells: 3")
    text = edited(text, CAPACITY_LINE, "    capacity: 250 mAh\n")
    hours = peukert(0.25, CURRENT, 0.025, 1.05)
    assert hours < 2.0
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.running-time")]
    how = f"Peukert exponent 1.05 from the {fmt(0.025, 'A')} rating"
    assert found == [running(text, "250 mAh", 0.25, hours, how)]


def test_no_capacity_is_a_note_and_no_time():
    text = edited(portable(), CAPACITY_LINE, "")
    result = check(text, "portable.yaml")
    assert sheet_rows(result, "battery.running-time") == []
    assert [facts(f) for f in of(result, "battery.running-time")] == [{
        "rule": "battery.running-time", "level": "note", "line": line_of(text, "    chemistry: alkaline"),
        "col": 5, "path": "supply.battery",
        "message": "supply.battery.capacity is not given, so the running time cannot be computed",
        "values": {}, "fix": "Give supply.battery.capacity (e.g. '500 mAh').", "stage": "power", "signal": "",
        "position": ""}]


# ---- battery.end-of-life ----------------------------------------------------------------------

def eol_warning(text: str, dev: str, needs: float, what: str, where: dict, end: float,
                r: float = R_TYPICAL) -> dict:
    fresh_loaded = FRESH - CURRENT * r  # Thevenin: V = V_open - I R
    end_loaded = end - CURRENT * r
    used = (fresh_loaded - needs) / (fresh_loaded - end_loaded)
    return finding(
        "battery.end-of-life", "warning", where,
        f"{dev} needs {fmt(needs, 'V')} ({what}), so the build stops when the battery falls to "
        f"{fmt(needs, 'V')} under load, long before it is flat at {fmt(end, 'V')} (6 × {fmt(end / 6, 'V')}): "
        f"only {used:.0%} of the battery's voltage range is used",
        approx_values({"needed": (needs, "V"), "end voltage": (end, "V"),
                       "fresh under load": (fresh_loaded, "V")}),
        EOL_FIX)


@pytest.mark.parametrize("end", [8.2, 8.3])
def test_a_regulator_that_stops_above_the_end_voltage_is_a_warning(end):
    # the end voltage under load, end - I x 1.5 ohm, passes U3's 8 V between 8.2 V and 8.3 V
    assert end - CURRENT * R_TYPICAL < U3_NEEDS if end == 8.2 else end - CURRENT * R_TYPICAL > U3_NEEDS
    text = with_battery(f"    end_voltage: {end} V\n")
    result = check(text, "portable.yaml")
    assert sheet_rows(result, "battery.end-of-life")[:2] == [
        ("power", "battery", "end voltage (flat)", pytest.approx(end), "V", "", ""),
        ("power", "battery", "end voltage under load", pytest.approx(end - CURRENT * R_TYPICAL), "V", "", ""),
    ]
    found = [facts(f) for f in of(result, "battery.end-of-life")]
    assert found == ([eol_warning(text, "U3", U3_NEEDS, U3_WHAT, u3_rail(text), end)] if end == 8.2 else [])


def test_every_device_that_stops_early_is_named():
    # flat at 3.9 V: under load 3.69 V, below U2's 4 V and U3's 8 V, so both stop before the end
    text = with_battery("    end_voltage: 3.9 V\n")
    assert 3.9 - CURRENT * R_TYPICAL < U2_NEEDS
    result = check(text, "portable.yaml")
    found = [facts(f) for f in of(result, "battery.end-of-life")]
    assert found == [eol_warning(text, "U2", U2_NEEDS, U2_WHAT, u2_rail(text), 3.9),
                     eol_warning(text, "U3", U3_NEEDS, U3_WHAT, u3_rail(text), 3.9)]
    assert sheet_rows(result, "battery.end-of-life")[2:] == [
        ("power", "U2", "stops when the battery falls to (under load)", pytest.approx(U2_NEEDS), "V", "", ""),
        ("power", "U3", "stops when the battery falls to (under load)", pytest.approx(U3_NEEDS), "V", "", ""),
    ]


def test_a_device_the_fresh_battery_cannot_reach_is_the_sag_error_not_this_warning():
    # 11.5 ohm: fresh under load 7.99 V, below U3's 8 V: battery.sag reports it, end-of-life does not.
    # Flat under load at 5.4 V - I x 11.5 ohm = 3.79 V, under U2's 4 V: U2 stops before the end.
    text = with_battery("    internal_resistance: 11.5 ohm\n")
    assert FRESH - CURRENT * 11.5 < U3_NEEDS and END - CURRENT * 11.5 < U2_NEEDS
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.end-of-life")]
    assert found == [eol_warning(text, "U2", U2_NEEDS, U2_WHAT, u2_rail(text), END, 11.5)]


def over_max(text: str, dev: str, cells: int, limit: float, where: dict) -> dict:
    fresh = cells * 1.6  # V, alkaline cells when new (from memory)
    return {"rule": "battery.end-of-life", "level": "error", **where,
            "message": f"a fresh alkaline battery reads {fmt(fresh, 'V')} ({cells} × {fmt(1.6, 'V')}), "
                       f"above the {fmt(limit, 'V')} that {dev} takes",
            "values": approx_values({"fresh open-circuit": (fresh, "V"), "supply_max": (limit, "V")}),
            "fix": EOL_FIX, "stage": "power", "signal": "", "position": ""}


@pytest.mark.parametrize("cells", [7, 8])
def test_a_fresh_battery_above_a_chip_supply_max_is_an_error(cells):
    # U2 takes at most 12 V (its profile, typical): 7 x 1.6 V = 11.2 V is under it, 8 x 1.6 V = 12.8 V over.
    # U1 (8 V at most) is on the regulated 6 V rail, not on the battery: not judged.
    text = edited(portable(), "    cells: 6 ", f"    cells: {cells} ")
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.end-of-life") if f.level == "error"]
    assert found == ([over_max(text, "U2", 8, 12.0, u2_rail(text))] if cells == 8 else [])


def test_every_chip_on_the_battery_above_its_limit_is_named():
    # U1 moved onto the battery rail: 8 x 1.6 V = 12.8 V is over its 8 V and U2's 12 V (typical profiles)
    text = edited(portable(), "  U1: {profile: fm-if-subsystem, rail: V6}",
                  "  U1: {profile: fm-if-subsystem, rail: V9}")
    text = edited(text, "    cells: 6 ", "    cells: 8 ")
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.end-of-life") if f.level == "error"]
    assert found == [over_max(text, "U1", 8, 8.0, at(text, "  U1: {profile", "V9", "devices.U1.rail")),
                     over_max(text, "U2", 8, 12.0, u2_rail(text))]


# ---- what a device on the battery needs -----------------------------------------------------------

REGULATORS = (
    "profiles:\n"
    "  reg-5v:\n"
    "    class: linear-regulator\n"
    "    description: a 5 V regulator\n"
    "    output_voltage: 5 V\n"
    "    dropout: 1 V\n"
    "    quiescent_current: 2 mA\n"
    "    pins:\n"
    "      in: {role: input, dc: supply}\n"
    "      gnd: {role: ground, dc: ground}\n"
    "  reg-bare:\n"
    "    class: linear-regulator\n"
    "    description: a regulator stating no dropout\n"
    "    output_voltage: 5 V\n"
    "    quiescent_current: 1 mA\n"
    "    pins:\n"
    "      in: {role: input, dc: supply}\n"
    "      gnd: {role: ground, dc: ground}\n"
    "  reg-open:\n"
    "    class: linear-regulator\n"
    "    description: a regulator stating no output voltage\n"
    "    dropout: 1 V\n"
    "    quiescent_current: 1 mA\n"
    "    pins:\n"
    "      in: {role: input, dc: supply}\n"
    "      gnd: {role: ground, dc: ground}\n\n"
)


def test_a_regulator_with_no_output_rail_needs_its_profiles_output_plus_dropout():
    # U8 (5 V out, 1 V dropout) on the battery and feeding no rail needs 6 V; U7 states no dropout and
    # U6 no output voltage, so neither is judged. Their 2 + 1 + 1 mA add to the budget current.
    text = edited(portable(), "\nsignals:\n", "\n" + REGULATORS + "signals:\n")
    text = edited(text, "\nparts:\n", "\n  U7: {profile: reg-bare, rail: V9}\n"
                                      "  U8: {profile: reg-5v, rail: V9}\n"
                                      "  U6: {profile: reg-open, rail: V9}\nparts:\n")
    current = CURRENT + 0.002 + 0.001 + 0.001
    fresh_loaded = FRESH - current * R_TYPICAL
    end_loaded = END - current * R_TYPICAL
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.end-of-life")]
    assert [f["message"].split()[0] for f in found] == ["U3", "U8"]
    used = (fresh_loaded - 6.0) / (fresh_loaded - end_loaded)
    assert found[1] == finding(
        "battery.end-of-life", "warning", at(text, "  U8: {profile", "V9", "devices.U8.rail"),
        f"U8 needs {fmt(6.0, 'V')} (5 V out plus its 1 V dropout), so the build stops when the battery falls "
        f"to {fmt(6.0, 'V')} under load, long before it is flat at {fmt(END, 'V')} (6 × {fmt(0.9, 'V')}): "
        f"only {used:.0%} of the battery's voltage range is used",
        approx_values({"needed": (6.0, "V"), "end voltage": (END, "V"),
                       "fresh under load": (fresh_loaded, "V")}),
        EOL_FIX)


def test_a_single_cell_counted_from_the_voltage():
    # 3.7 V over lithium-ion's 3.6 V nominal (IEC 61960) rounds to one cell, fresh at 4.2 V (from memory)
    text = edited(portable(), "chemistry: alkaline\n    cells: 6                  # a 9 V block is six small "
                              "cells in series\n", "chemistry: lithium-ion\n")
    text = edited(text, "  voltage: 9 V\n  rail: V9", "  voltage: 3.7 V\n  rail: V9")
    rows = sheet_rows(check(text, "portable.yaml"), "battery.sag")
    assert rows[:3] == [("power", "battery", "cells in series", 1, "", "", ""),
                        ("power", "battery", "nominal voltage", pytest.approx(3.6), "V", "", ""),
                        ("power", "battery", "fresh open-circuit voltage", pytest.approx(4.2), "V", "", "")]


def test_without_supply_rail_the_rail_from_the_supply_is_the_battery():
    # supply.rail is optional: V9 (`from: supply`) is then the battery's rail, and both the regulator's need
    # and the amplifier's 12 V limit are judged as before (8 x 1.6 V = 12.8 V fresh, from memory)
    text = edited(portable(), "    cells: 6 ", "    cells: 8 ")
    text = edited(text, "  voltage: 9 V\n  rail: V9\n", "  voltage: 9 V\n")
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.end-of-life")]
    assert [(f["level"], f["path"]) for f in found] == [("error", "devices.U2.rail"),
                                                        ("warning", "devices.U3.rail")]
    assert found[0] == over_max(text, "U2", 8, 12.0, u2_rail(text))


def test_the_pack_figures_other_families_read():
    # power.source reads the pack's resistance through these: six alkaline cells x 0.25 ohm (from memory),
    # typical; a stated resistance as given; none without a described battery
    from speccheck import loader
    from speccheck.rules.battery import cell_count, internal_resistance

    build = loader.load_text(portable(), "portable.yaml").build
    assert cell_count(build) == CELLS
    assert internal_resistance(build) == (pytest.approx(R_TYPICAL), True)
    stated = loader.load_text(with_battery("    internal_resistance: 2.5 ohm\n"), "portable.yaml").build
    assert internal_resistance(stated) == (pytest.approx(2.5), False)
    bench_text = edited(portable(), "  kind: battery\n", "  kind: bench\n")
    bench = loader.load_text(bench_text, "portable.yaml").build
    assert cell_count(bench) is None and internal_resistance(bench) is None


def test_the_supply_rail_is_the_battery_even_when_not_marked_from_supply():
    # V9 without `from: supply` is still supply.rail: the regulator on it is judged as before
    text = edited(portable(), "  V9: {voltage: 9 V, from: supply}", "  V9: {voltage: 9 V}")
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.end-of-life")]
    assert [f["path"] for f in found] == ["devices.U3.rail"]


def test_a_chip_rated_for_exactly_the_fresh_voltage_is_fine():
    # U9 takes up to 12.8 V, exactly 8 x 1.6 V (8 = 2^3, so the product is exact in binary): only a voltage
    # above the limit is an error, so U2 (12 V) is named and U9 is not
    profile = ("profiles:\n  panel-meter:\n    class: other\n    description: a panel meter driver\n"
               "    supply_max: 12.8 V\n    quiescent_current: 1 mA\n    pins:\n"
               "      vs: {role: supply, dc: supply}\n\n")
    assert 8 * 1.6 == 12.8
    text = edited(portable(), "\nsignals:\n", "\n" + profile + "signals:\n")
    text = edited(text, "\nparts:\n", "\n  U9: {profile: panel-meter, rail: V9}\nparts:\n")
    text = edited(text, "    cells: 6 ", "    cells: 8 ")
    found = [facts(f) for f in of(check(text, "portable.yaml"), "battery.end-of-life") if f.level == "error"]
    assert found == [over_max(text, "U2", 8, 12.0, u2_rail(text))]
