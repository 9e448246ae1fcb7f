"""Power family, whole findings: the current budget, each device's supply range, reverse polarity
and the protection diode. Every finding is asserted whole (facts(): rule, level, place, message,
values, fix, stage), each threshold just inside and just outside, on small plans written here.

The arithmetic is plain: a rail's budget is the sum of the currents on it (Kirchhoff's current law);
a regulator draws from its input what its output rail draws plus its own ground current (common
practice: a linear regulator's input current is its output current plus its quiescent current).
The 80 % headroom share is the rule's setting (common practice). Numbers inside messages are shown
with four significant digits and an SI prefix (our own display convention, written out in `si`).
"""

from __future__ import annotations

import pytest
from conftest import EXAMPLES, check, edited, facts, line_of, of, sheet_of, sheet_rows

BASE = """\
build_spec: 2
build:
  name: bench load
  ambient_max: 25 degC
supply:
  kind: bench
  voltage: 12 V
  rail: V12
  max_current: 1 A
  fuse: F1
  reverse_protection: D1
rails:
  V12: {voltage: 12 V, from: supply}
  GND: {voltage: 0 V}
profiles:
  load-chip:
    class: other
    quiescent_current: 100 mA
    supply_min: 5 V
    supply_max: 15 V
devices:
  U1: {profile: load-chip, rail: V12}
parts:
  F1: {kind: fuse, current_rating: 200 mA, speed: time-lag, ends: [DC_IN, V12]}
  D1: {kind: diode, ends: [GND, V12], positive: GND}
  C30: {kind: capacitor, value: 100 uF, dielectric: electrolytic, ends: [V12, GND], positive: V12}
chain: []
"""

BUDGET_FIX = ("Choose a supply rated above the budget with some headroom (or lower the amplifier's supply "
              "or raise its load impedance); state each regulator's load_current at least at what its rail "
              "draws.")
SUPPLY_FIX = ("Power the device from a rail inside its range, or declare the profile of a part made for this "
              "supply.")
POLARITY_FIX = ("Add a series diode (mind its drop) or a shunt diode from ground to the rail behind the "
                "fuse, and name it in supply.reverse_protection.")
DIODE_FIX = ("Fit the shunt diode from ground (anode) to the rail behind the fuse (cathode); a series diode "
             "anode to the input.")

PREFIXES = [(1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"),
            (1e-12, "p")]


def si(value: float, unit: str) -> str:
    """Four significant digits with an SI prefix: 0.1 A -> '100 mA' (our display convention)."""
    if value == 0:
        return f"0 {unit}"
    scale, prefix = next(((s, p) for s, p in PREFIXES if abs(value) >= s), PREFIXES[-1])
    return f"{value / scale:.4g} {prefix}{unit}"


def at(text: str, needle: str, fragment: str, nth: int = 0) -> tuple[int, int]:
    """(line, column) of `fragment` on the nth line holding `needle`, both 1-based."""
    line = line_of(text, needle, nth)
    return line, text.splitlines()[line - 1].index(fragment) + 1


def finding(rule, level, place, path, message, values=None, fix="", stage="power"):
    """The facts() dict a finding must equal; numbers in values compared with pytest.approx."""
    line, col = place
    return {"rule": rule, "level": level, "line": line, "col": col, "path": path, "message": message,
            "values": {k: (pytest.approx(v), u) for k, (v, u) in (values or {}).items()},
            "fix": fix, "stage": stage, "signal": "", "position": ""}


def rows(*expected):
    """sheet_rows() tuples with the numbers compared with pytest.approx."""
    return [tuple(pytest.approx(x) if isinstance(x, float) else x for x in row) for row in expected]


def whole(text: str, rule: str) -> list[dict]:
    return [facts(f) for f in of(check(text), rule)]


# ---- power.current-budget ------------------------------------------------------------------------

REGULATED = edited(edited(edited(BASE, "  V12: {voltage: 12 V, from: supply}\n",
                                 "  VX: {voltage: 3 V, from: supply}\n  V12: {voltage: 12 V, from: supply}\n"
                                 "  V5: {voltage: 5 V, from: U3}\n"),
                          "  U1: {profile: load-chip, rail: V12}\n",
                          "  U1: {profile: load-chip, rail: V12}\n"
                          "  U3: {profile: reg-chip, rail: V12, output_rail: V5}\n"
                          "  U4: {profile: small-chip, rail: V5}\n"),
                   "devices:\n",
                   "  reg-chip:\n    class: linear-regulator\n    quiescent_current: 5 mA\n    dropout: 1 V\n"
                   "  small-chip:\n    class: other\n    quiescent_current: 20 mA\n"
                   "devices:\n")


def test_budget_sheet_lists_every_draw_rail_by_rail():
    # VX carries nothing and comes first (its rows are skipped, the other rails still published);
    # V5: U4's 20 mA; V12: U1 100 mA + U3's own 5 mA + the 20 mA it delivers to V5 = 125 mA
    # (Kirchhoff's current law; a regulator's input current is its output plus its ground current)
    result = check(REGULATED)
    assert sheet_rows(result, "power.current-budget") == rows(
        ("power", "V5", "U4 quiescent", 0.020, "A", "", ""),
        ("power", "V5", "rail current budget", 0.020, "A", "", ""),
        ("power", "V12", "U1 quiescent", 0.100, "A", "", ""),
        ("power", "V12", "U3 quiescent", 0.005, "A", "", ""),
        ("power", "V12", "U3 delivered to V5", 0.020, "A", "", ""),
        ("power", "V12", "rail current budget", 0.100 + 0.005 + 0.020, "A", "", ""),
        ("power", "supply", "input current budget", 0.100 + 0.005 + 0.020, "A", "", ""),
    )
    assert of(result, "power.current-budget") == []


def test_regulator_stated_below_what_its_rail_draws():
    # U4 draws 20 mA from V5: a stated 20 mA is enough, 19 mA is a warning
    enough = edited(REGULATED, "output_rail: V5}", "output_rail: V5, load_current: 20 mA}")
    assert whole(enough, "power.current-budget") == []
    short = edited(REGULATED, "output_rail: V5}", "output_rail: V5, load_current: 19 mA}")
    assert whole(short, "power.current-budget") == [finding(
        "power.current-budget", "warning", at(short, "U3:", "19 mA"), "devices.U3.load_current",
        f"U3 is stated to deliver 19 mA but V5 draws {si(0.020, 'A')}; the budget counts {si(0.020, 'A')}",
        {"stated load_current": (0.019, "A"), "V5 draws": (0.020, "A")}, BUDGET_FIX)]


def test_budget_above_the_supply_limit_is_an_error():
    # U1 draws 100 mA; a 99 mA supply is short of it
    text = edited(BASE, "max_current: 1 A", "max_current: 99 mA")
    assert whole(text, "power.current-budget") == [finding(
        "power.current-budget", "error", at(text, "max_current", "99 mA"), "supply.max_current",
        "the build draws 100 mA at full output but the bench supply delivers at most 99 mA",
        {"input current budget": (0.100, "A"), "supply max_current": (0.099, "A")}, BUDGET_FIX)]


@pytest.mark.parametrize("limit_ma, level", [(100, "warning"), (124, "warning"), (125, None), (126, None)])
def test_budget_headroom_edges(limit_ma, level):
    # warning above 80 % of the supply's limit (headroom_share, common practice): 100 mA / 0.8 = 125 mA
    # is the edge (100 mA is exactly 80 % of 125 mA: not above it); at 100 mA it is not yet an error
    text = edited(BASE, "max_current: 1 A", f"max_current: {limit_ma} mA")
    expected = [] if level is None else [finding(
        "power.current-budget", level, at(text, "max_current", f"{limit_ma} mA"), "supply.max_current",
        f"the build draws 100 mA at full output, {0.100 / (limit_ma / 1000):.0%} of the {limit_ma} mA the "
        "supply delivers (keep under 80%)",
        {"input current budget": (0.100, "A"), "supply max_current": (limit_ma / 1000, "A")}, BUDGET_FIX)]
    assert whole(text, "power.current-budget") == expected


def test_device_without_rail_and_profile_without_quiescent_are_notes():
    # U5 names no rail: left out; U6 and U7 share a profile without quiescent_current: counted at 0 A
    text = edited(BASE, "devices:\n", "  bare-chip:\n    class: other\ndevices:\n")
    text = edited(text, "  U1: {profile: load-chip, rail: V12}\n",
                  "  U1: {profile: load-chip, rail: V12}\n  U5: {profile: load-chip}\n"
                  "  U6: {profile: bare-chip, rail: V12}\n  U7: {profile: bare-chip, rail: V12}\n")
    result = check(text)
    assert [facts(f) for f in of(result, "power.current-budget")] == [  # sorted by line
        finding("power.current-budget", "note", at(text, "class: other", "class", 1), "profiles.bare-chip",
                "profile bare-chip states no quiescent_current (profiles.bare-chip.quiescent_current); "
                "U6, U7 counted at 0 A in the budget"),
        finding("power.current-budget", "note", at(text, "U5:", "{"), "devices.U5",
                "U5 names no supply rail (devices.U5.rail); it is left out of the current budget"),
    ]
    # the input budget is still U1's 100 mA
    assert sheet_of(result, "power.current-budget")["input current budget"] == (pytest.approx(0.1), "A")


# ---- power.device-supply -------------------------------------------------------------------------

def supply_range(low: str, high: str) -> str:
    text = edited(BASE, "supply_min: 5 V", f"supply_min: {low}")
    return edited(text, "supply_max: 15 V", f"supply_max: {high}")


@pytest.mark.parametrize("low, high", [("12 V", "15 V"), ("5 V", "12 V"), ("12 V", "12 V")])
def test_device_supply_at_its_limits_is_fine(low, high):
    # 12 V on V12: exactly at supply_min or supply_max is inside the range
    assert whole(supply_range(low, high), "power.device-supply") == []


def test_device_supply_above_its_max_is_an_error():
    text = supply_range("5 V", "11.9 V")
    assert whole(text, "power.device-supply") == [finding(
        "power.device-supply", "error", at(text, "U1:", "V12"), "devices.U1.rail",
        "U1 runs from V12 (12 V), above the 11.9 V supply_max of profile load-chip",
        {"supply across the device": (12.0, "V"), "supply_max": (11.9, "V")}, SUPPLY_FIX)]


def test_device_supply_below_its_min_is_a_warning():
    text = supply_range("12.1 V", "15 V")
    assert whole(text, "power.device-supply") == [finding(
        "power.device-supply", "warning", at(text, "U1:", "V12"), "devices.U1.rail",
        "U1 runs from V12 (12 V), below the 12.1 V supply_min of profile load-chip",
        {"supply across the device": (12.0, "V"), "supply_min": (12.1, "V")}, SUPPLY_FIX)]


def test_device_supply_with_only_a_minimum_stated():
    text = edited(supply_range("12.1 V", "15 V"), "    supply_max: 15 V\n", "")
    assert [f["level"] for f in whole(text, "power.device-supply")] == ["warning"]


def test_device_supply_across_two_rails_and_devices_skipped_before_it():
    # U0 (no supply range in its profile) and U9 (no rail) come first and are passed over; U1 from
    # V12 to VN (-12 V) sees 12 - (-12) = 24 V, above its 15 V supply_max
    text = edited(BASE, "  GND: {voltage: 0 V}\n",
                  "  GND: {voltage: 0 V}\n  VN: {voltage: -12 V, from: supply}\n")
    text = edited(text, "devices:\n",
                  "  bare-chip:\n    class: other\n    quiescent_current: 1 mA\ndevices:\n")
    text = edited(text, "  U1: {profile: load-chip, rail: V12}\n",
                  "  U0: {profile: bare-chip, rail: V12}\n  U9: {profile: load-chip}\n"
                  "  U1: {profile: load-chip, rail: V12, negative_rail: VN}\n")
    assert whole(text, "power.device-supply") == [finding(
        "power.device-supply", "error", at(text, "U1:", "V12"), "devices.U1.rail",
        "U1 runs from V12 to VN (24 V across it), above the 15 V supply_max of profile load-chip",
        {"supply across the device": (24.0, "V"), "supply_max": (15.0, "V")}, SUPPLY_FIX)]


# ---- power.reverse-polarity ----------------------------------------------------------------------

@pytest.mark.parametrize("kind, said", [("bench", "bench supply"), ("battery", "battery"),
                                        ("dc-adapter", "adapter")])
def test_no_reverse_protection_names_the_parts_at_risk(kind, said):
    text = edited(edited(BASE, "  reverse_protection: D1\n", ""), "kind: bench", f"kind: {kind}")
    assert whole(text, "power.reverse-polarity") == [finding(
        "power.reverse-polarity", "warning", at(text, f"kind: {kind}", kind), "supply.kind",
        f"nothing protects C30, U1 if the {said} is connected the wrong way round",
        {"polarized capacitors": (1, ""), "devices": (1, "")}, POLARITY_FIX)]


def test_reverse_protection_none_is_pointed_at():
    text = edited(BASE, "reverse_protection: D1", "reverse_protection: none")
    assert whole(text, "power.reverse-polarity") == [finding(
        "power.reverse-polarity", "warning", at(text, "reverse_protection", "none"),
        "supply.reverse_protection",
        "nothing protects C30, U1 if the bench supply is connected the wrong way round (reverse_protection: "
        "none)", {"polarized capacitors": (1, ""), "devices": (1, "")}, POLARITY_FIX)]


def test_reverse_polarity_with_only_capacitors_only_chips_or_neither():
    bare = edited(BASE, "  reverse_protection: D1\n", "")
    no_chip = edited(bare, "  U1: {profile: load-chip, rail: V12}\n", "")
    no_chip = edited(no_chip, "devices:\n", "devices: {}\n")
    assert [f["message"] for f in whole(no_chip, "power.reverse-polarity")] == [
        "nothing protects C30 if the bench supply is connected the wrong way round"]
    electrolytic, film = "dielectric: electrolytic, ends: [V12, GND], positive: V12}", "dielectric: film,"
    no_cap = edited(bare, electrolytic, film + " ends: [V12, GND]}")
    assert [f["values"] for f in whole(no_cap, "power.reverse-polarity")] == [
        {"polarized capacitors": (0, ""), "devices": (1, "")}]
    neither = edited(no_chip, electrolytic, film + " ends: [V12, GND]}")
    assert whole(neither, "power.reverse-polarity") == []


# ---- power.reverse-diode -------------------------------------------------------------------------

def test_shunt_diode_either_way_round_in_its_ends_is_published():
    for ends in ("[GND, V12]", "[V12, GND]"):
        text = edited(BASE, "ends: [GND, V12], positive: GND", f"ends: {ends}, positive: GND")
        result = check(text)
        assert of(result, "power.reverse-diode") == []
        assert sheet_rows(result, "power.reverse-diode") == [
            ("power", "D1", "reverse protection", "shunt diode across V12", "", "", "")]


def test_protection_that_is_not_a_diode_is_a_note():
    text = edited(BASE, "reverse_protection: D1", "reverse_protection: C30")
    assert whole(text, "power.reverse-diode") == [finding(
        "power.reverse-diode", "note", at(text, "reverse_protection", "C30"), "supply.reverse_protection",
        "supply.reverse_protection names C30, a capacitor; expected a diode")]


def test_diode_without_its_anode_noted():
    text = edited(BASE, "ends: [GND, V12], positive: GND}", "ends: [GND, V12]}")
    assert whole(text, "power.reverse-diode") == [finding(
        "power.reverse-diode", "warning", at(text, "D1:", "{"), "parts.D1",
        "D1 protects against reversed polarity but its anode is not noted (positive: NET)", fix=DIODE_FIX)]


def test_shunt_diode_turned_round():
    text = edited(BASE, "ends: [GND, V12], positive: GND}", "ends: [GND, V12], positive: V12}")
    assert whole(text, "power.reverse-diode") == [finding(
        "power.reverse-diode", "error", at(text, "D1:", "V12}"), "parts.D1.positive",
        "D1 has its anode on V12 and its cathode on GND: it conducts in normal use and shorts the supply",
        fix=DIODE_FIX)]


def test_shunt_diode_without_a_fuse():
    text = edited(BASE, "  fuse: F1\n", "")
    assert whole(text, "power.reverse-diode") == [finding(
        "power.reverse-diode", "warning", at(text, "D1:", "[GND"), "parts.D1.ends",
        "D1 is a shunt diode but no fuse is declared ahead of it: on reversal it carries the supply's whole "
        "short-circuit current", fix=DIODE_FIX)]


def test_shunt_diode_ahead_of_the_fuse():
    text = edited(BASE, "ends: [GND, V12], positive: GND}", "ends: [GND, DC_IN], positive: GND}")
    assert whole(text, "power.reverse-diode") == [finding(
        "power.reverse-diode", "warning", at(text, "D1:", "[GND"), "parts.D1.ends",
        "D1 sits on DC_IN, ahead of fuse F1: on reversal nothing opens", fix=DIODE_FIX)]


SERIES = edited(BASE, "ends: [DC_IN, V12]}", "ends: [DC_IN, DC_F]}")


def test_series_diode_turned_round_blocks_the_supply():
    text = edited(SERIES, "ends: [GND, V12], positive: GND}", "ends: [DC_F, V12], positive: V12}")
    assert whole(text, "power.reverse-diode") == [finding(
        "power.reverse-diode", "error", at(text, "D1:", "V12}"), "parts.D1.positive",
        "series diode D1 has its cathode toward the input and its anode on V12: it blocks the supply",
        fix=DIODE_FIX)]


def test_series_diode_the_right_way_publishes_its_stated_drop():
    text = edited(SERIES, "ends: [GND, V12], positive: GND}", "ends: [DC_F, V12], positive: DC_F}")
    result = check(text)
    assert of(result, "power.reverse-diode") == []
    assert sheet_rows(result, "power.reverse-diode") == []  # no forward_voltage stated: nothing to show
    stated = edited(text, "D1: {kind: diode,", "D1: {kind: diode, forward_voltage: 0.35 V,")
    assert sheet_rows(check(stated), "power.reverse-diode") == rows(
        ("power", "D1", "series diode drop", 0.35, "V", "", ""))


# ---- switch positions and an amplifier of unknown draw -------------------------------------------

def switched_lamp() -> str:
    """BASE with a 150 mA lamp driver U4 on V12_LAMP, which selector S2 feeds from V12 only when on."""
    text = edited(BASE, "  GND: {voltage: 0 V}\n", "  V12_LAMP: {voltage: 12 V}\n  GND: {voltage: 0 V}\n")
    text = edited(text, "  U1: {profile: load-chip, rail: V12}\n",
                  "  U1: {profile: load-chip, rail: V12}\n  U4: {profile: lamp-chip, rail: V12_LAMP}\n")
    text = edited(text, "devices:\n", "  lamp-chip:\n    class: other\n    quiescent_current: 150 "
                                      "mA\ndevices:\n")
    return edited(text, "parts:\n", "parts:\n  S2:\n    kind: switch\n    positions: [off, on]\n    poles:\n"
                  "      a: {common: V12, throws: {on: V12_LAMP}}\n")


def test_budget_in_the_switch_position_that_draws_most():
    # off: U1's 100 mA; on: 100 + 150 = 250 mA (Kirchhoff's current law), and on is the worst
    text = edited(switched_lamp(), "max_current: 1 A", "max_current: 240 mA")
    result = check(text)
    assert sheet_rows(result, "power.current-budget") == rows(
        ("power", "V12_LAMP", "U4 quiescent", 0.150, "A", "", ""),
        ("power", "V12_LAMP", "rail current budget", 0.150, "A", "", ""),
        ("power", "V12", "U1 quiescent", 0.100, "A", "", ""),
        ("power", "V12", "S2 switched to V12_LAMP", 0.150, "A", "", ""),
        ("power", "V12", "rail current budget", 0.250, "A", "", ""),
        ("power", "supply", "input current budget", 0.250, "A", "", ""),
        ("power", "supply", "worst switch position", "S2 on", "", "", ""),
        ("power", "supply", "input current budget with S2 off", 0.100, "A", "", ""),
        ("power", "supply", "input current budget with S2 on", 0.250, "A", "", ""))
    assert [facts(f) for f in of(result, "power.current-budget")] == [finding(
        "power.current-budget", "error", at(text, "max_current", "240 mA"), "supply.max_current",
        "the build draws 250 mA at full output with S2 on but the bench supply delivers at most 240 mA",
        {"input current budget": (0.250, "A"), "supply max_current": (0.240, "A")}, BUDGET_FIX)]
    # the fuse is sized in that position too: 0.25 / 0.75 = 0.333 A -> R10 400 mA (IEC 60127-1)
    assert [r[2:4] for r in sheet_rows(result, "power.fuse-size")][:2] == [
        ("normal current (budget at full output)", pytest.approx(0.250)), ("worst switch position", "S2 on")]


def test_budget_of_an_amplifier_without_a_load_is_not_known():
    hot = (EXAMPLES / "power-hot-amplifier.yaml").read_text("utf-8")
    text = edited(hot, "    load: SPK1\n", "")
    assert ("power", "U2", "full-output supply current", "not known (see power.heat)", "", "", "") in \
        sheet_rows(check(text), "power.current-budget")


def test_shunt_diode_on_another_net_behind_the_fuse_is_not_ahead_of_it():
    # D1 across V5 (a second rail): not on a fuse end at all; D1 across DC_F between the fuse and a
    # series resistor: on a fuse end, but the fuse does not touch the supply rail V12; neither is
    # "ahead of the fuse"
    other = edited(edited(BASE, "  GND: {voltage: 0 V}\n", "  V5: {voltage: 5 V, from: supply}\n  GND: "
                                                           "{voltage: 0 V}\n"),
                   "ends: [GND, V12], positive: GND}", "ends: [GND, V5], positive: GND}")
    result = check(other)
    assert of(result, "power.reverse-diode") == []
    assert sheet_rows(result, "power.reverse-diode") == [
        ("power", "D1", "reverse protection", "shunt diode across V5", "", "", "")]
    behind = edited(SERIES, "ends: [GND, V12], positive: GND}", "ends: [GND, DC_F], positive: GND}")
    behind = edited(behind, "  C30:", "  R1: {kind: resistor, value: 1 ohm, ends: [DC_F, V12]}\n  C30:")
    assert of(check(behind), "power.reverse-diode") == []


def test_series_diode_ahead_of_the_fuse_publishes_its_drop():
    # D1 from DC_IN (anode) to DC_F, F1 from DC_F to V12: the diode does not touch the rail
    text = edited(BASE, "ends: [DC_IN, V12]}", "ends: [DC_F, V12]}")
    text = edited(text, "D1: {kind: diode, ends: [GND, V12], positive: GND}",
                  "D1: {kind: diode, forward_voltage: 0.4 V, ends: [DC_IN, DC_F], positive: DC_IN}")
    result = check(text)
    assert of(result, "power.reverse-diode") == []
    assert sheet_rows(result, "power.reverse-diode") == rows(
        ("power", "D1", "series diode drop", 0.4, "V", "", ""))


def test_no_reverse_polarity_check_on_a_mains_supply():
    text = edited(edited(BASE, "kind: bench", "kind: mains-transformer"), "  reverse_protection: D1\n", "")
    assert of(check(text), "power.reverse-polarity") == []


def test_a_position_that_draws_nothing_is_budgeted_at_zero():
    # U1 taken out: with S2 off nothing draws (0 A), with S2 on the lamp driver's 150 mA
    text = edited(switched_lamp(), "  U1: {profile: load-chip, rail: V12}\n", "")
    rows_ = sheet_rows(check(text), "power.current-budget")
    assert rows_[-3:] == rows(("power", "supply", "worst switch position", "S2 on", "", "", ""),
                              ("power", "supply", "input current budget with S2 off", 0.0, "A", "", ""),
                              ("power", "supply", "input current budget with S2 on", 0.150, "A", "", ""))
