"""power.resistor-fuse asserted whole: a resistor used as the supply's fuse or in series with it.

The plan: a 12 V adapter limited to 2 A feeding one chip that draws a steady 0.3 A; R1 1 ohm is the fuse.
Arithmetic (Ohm's law and Joule heating, any circuits text): into a short at its far end R1 carries
I = V/(R + R_source), no more than a limiting supply's max_current, and takes I²·R; in normal use it
drops I·R and dissipates I²·R at the 0.3 A budget. The glow factor 4, fusing factor 10, power share
50 %, drop share 5 % and the 0.25 W assumed for an unrated resistor are the rule's settings (common
practice / from memory). A battery's resistance is V / its short-circuit current, or its stated
internal_resistance, or 0.25 ohm per fresh alkaline cell (speccheck/formulas/battery.py, from memory).
"""

from __future__ import annotations

import pytest
from conftest import check, edited, facts, line_of, of, sheet_rows

PLAN = """\
build_spec: 2
build:
  name: resistor as the fuse
  ambient_max: 25 degC
supply:
  kind: dc-adapter
  voltage: 12 V
  rail: V12
  max_current: 2 A
  fuse: R1
  reverse_protection: D1
rails:
  V12: {voltage: 12 V, from: supply}
  GND: {voltage: 0 V}
profiles:
  load-chip:
    class: other
    quiescent_current: 0.3 A
devices:
  U1: {profile: load-chip, rail: V12}
parts:
  R1: {kind: resistor, value: 1 ohm, power_rating: 1 W, ends: [DC_IN, V12]}
  D1: {kind: diode, ends: [GND, V12], positive: GND}
  C30: {kind: capacitor, value: 1000 uF, dielectric: electrolytic, ends: [V12, GND], positive: V12}
chain: []
"""

FIX = ("Fit a real fuse at the supply input; where the resistor must also protect, use a fusible "
       "(flame-proof) type whose fusing curve opens at the fault power shown.")
LIMITED = "limited to 2 A by the dc-adapter supply"
NORMAL = 0.3


def si(value: float, unit: str) -> str:
    """Four significant digits with an SI prefix, as the messages show numbers (our display convention)."""
    scale, prefix = next(((s, p) for s, p in ((1e3, "k"), (1.0, ""), (1e-3, "m")) if abs(value) >= s),
                         (1e-3, "m"))
    return f"{value / scale:.4g} {prefix}{unit}"


def at(text: str, needle: str, fragment: str) -> tuple[int, int]:
    line = line_of(text, needle)
    return line, text.splitlines()[line - 1].index(fragment) + 1


def finding(level, place, path, message, values, fix=FIX):
    line, col = place
    return {"rule": "power.resistor-fuse", "level": level, "line": line, "col": col, "path": path,
            "message": message, "values": {k: (pytest.approx(v), u) for k, (v, u) in values.items()},
            "fix": fix, "stage": "power", "signal": "", "position": ""}


def values(ohms=1.0, i_short=2.0):
    """normal current, drop I·R, dissipation I²·R, the short-circuit current and I²·R at a short"""
    return {"normal current": (NORMAL, "A"), "drop": (NORMAL * ohms, "V"),
            "dissipation": (NORMAL ** 2 * ohms, "W"),
            "short-circuit current": (i_short, "A"), "power at a short": (i_short ** 2 * ohms, "W")}


def whole(text: str) -> list[dict]:
    return [facts(f) for f in of(check(text), "power.resistor-fuse")]


def watts(rating: str, text: str = PLAN) -> str:
    """R1's power_rating as written (the messages quote the plan's own text of it)"""
    return edited(text, "power_rating: 1 W", f"power_rating: {rating}")


def test_sheet_of_a_resistor_as_the_fuse():
    # 12 V / 1 ohm = 12 A from a stiff source, capped at the adapter's 2 A: 2² · 1 = 4 W
    result = check(watts("4 W"))
    assert sheet_rows(result, "power.resistor-fuse") == [
        ("power", "R1", "drop in normal use", pytest.approx(NORMAL * 1.0), "V", "", ""),
        ("power", "R1", "dissipation in normal use", pytest.approx(NORMAL ** 2), "W", "", ""),
        ("power", "R1", "current into a short at its far end", pytest.approx(2.0), "A", "", ""),
        ("power", "R1", "power into a short at its far end", pytest.approx(4.0), "W", "", "")]


def test_plain_resistor_at_the_glow_factor_is_an_error():
    # 4 W is exactly 4 × its 1 W rating
    assert whole(PLAN) == [finding(
        "error", at(PLAN, "R1: {", "{"), "parts.R1",
        f"R1 (1 ohm) is the only protection on the supply input but is a plain resistor: into a short it "
        f"takes 4 W ({LIMITED}), 4 times its 1 W rating; it glows and can set the board alight before it "
        "opens; fit a fuse or a fusible (flame-proof) resistor", values())]


def test_plain_resistor_above_its_rating_is_a_warning():
    text = watts("1.01 W")
    assert whole(text) == [finding(
        "warning", at(text, "R1: {", "{"), "parts.R1",
        f"R1 (1 ohm) is the only protection on the supply input: into a short it takes 4 W ({LIMITED}), "
        "above "
        "its 1.01 W rating; it runs hot and disconnects nothing; fit a fuse", values())]


def test_plain_resistor_inside_its_rating_is_a_note():
    text = watts("4 W")  # exactly its rating: inside
    assert whole(text) == [finding(
        "note", at(text, "R1: {", "{"), "parts.R1",
        f"R1 (1 ohm) is the only protection on the supply input: into a short it takes 4 W ({LIMITED}), "
        "inside "
        "its 4 W rating, so the supply's own limit protects the build; a fuse would also disconnect a fault",
        values(), fix="")]


def test_fusible_resistor_at_the_fusing_factor():
    # 4 W is exactly 10 × 0.4 W: it opens as made; at 0.41 W (9.76 times) it may sit hot, and the
    # adapter's limit holds the fault meanwhile (a note)
    fusible = edited(PLAN, "value: 1 ohm,", "value: 1 ohm, fusible: true,")
    assert whole(watts("0.4 W", fusible)) == []
    text = watts("0.41 W", fusible)
    assert whole(text) == [finding(
        "note", at(text, "R1: {", "0.41 W"), "parts.R1.power_rating",
        f"Fusible R1 takes only 4 W into a short ({LIMITED}), {4 / 0.41:.3g} times its 0.41 W rating: it may "
        "sit hot instead of opening (check its fusing curve); the supply's limit holds the fault meanwhile",
        values(), fix="")]


def test_fusible_resistor_on_an_unlimited_supply_is_a_warning():
    # a bench supply with no limit stated, 0.2 ohm of its own: 12 / 1.2 = 10 A, 100 W, 5 × 20 W
    text = edited(edited(PLAN, "kind: dc-adapter", "kind: bench"), "  max_current: 2 A\n",
                  "  source_resistance: 0.2 ohm\n")
    text = watts("20 W", edited(text, "value: 1 ohm,", "value: 1 ohm, fusible: true,"))
    i_short = 12 / (1 + 0.2)
    assert whole(text) == [finding(
        "warning", at(text, "R1: {", "20 W"), "parts.R1.power_rating",
        f"Fusible R1 takes only {i_short ** 2:.4g} W into a short (through the supply's 0.2 ohm), "
        f"{i_short ** 2 / 20:.3g} times its 20 W rating: it may sit hot instead of opening (check its fusing "
        "curve)", values(i_short=i_short))]


def test_plain_resistor_marked_not_fusible_is_pointed_at_there():
    text = edited(PLAN, "value: 1 ohm,", "value: 1 ohm, fusible: false,")
    assert [(f["line"], f["col"], f["path"]) for f in whole(text)] == [
        (*at(text, "R1: {", "false"), "parts.R1.fusible")]


@pytest.mark.parametrize("supply, how, i_short", [
    # a stiff supply: 12 / 1 ohm
    ("  kind: bench\n", "from a stiff supply", 12.0),
    # a battery good for 40 A into a short: 12/40 = 0.3 ohm inside, 12 / 1.3 A through R1
    ("  kind: battery\n  max_current: 40 A\n",
     "through the battery's 300 mΩ internal resistance from its 40 A short-circuit current", 12 / 1.3),
    # a small battery good for only 800 mA into a short: 12/0.8 = 15 ohm inside, 12 / 16 A through R1
    ("  kind: battery\n  max_current: 800 mA\n",
     "through the battery's 15 Ω internal resistance from its 800 mA short-circuit current", 12 / 16.0),
    # eight fresh alkaline cells at 0.25 ohm each (from memory): 2 ohm, 12 / 3 A
    ("  kind: battery\n  battery: {chemistry: alkaline, cells: 8}\n",
     "through the typical 2 Ω of 8 fresh alkaline cells, from memory: state battery.internal_resistance for "
     "yours", 12 / 3.0),
    # a stated internal resistance wins over the short-circuit current
    ("  kind: battery\n  max_current: 40 A\n  battery: {chemistry: alkaline, cells: 8, internal_resistance: "
     "0.5 ohm}\n", "through the battery's stated internal resistance 500 mΩ", 12 / 1.5),
])
def test_short_circuit_current_by_source(supply, how, i_short):
    text = edited(PLAN, "  kind: dc-adapter\n  voltage: 12 V\n  rail: V12\n  max_current: 2 A\n",
                  supply + "  voltage: 12 V\n  rail: V12\n")
    text = watts("1000 W", text)
    assert whole(text) == [finding(
        "note", at(text, "R1: {", "{"), "parts.R1",
        "R1 (1 ohm) is the only protection on the supply input: into a short it takes "
        f"{si(i_short ** 2, 'W')} "
        f"({how}), inside its 1000 W rating, so the supply's own limit protects the build; a fuse would also "
        "disconnect a fault", values(i_short=i_short), fix="")]


def test_unrated_resistor_is_taken_as_a_quarter_watt():
    text = edited(PLAN, "power_rating: 1 W, ", "")
    assert whole(text) == [
        finding("error", at(text, "R1: {", "{"), "parts.R1",
                "R1 (1 ohm) is the only protection on the supply input but is a plain resistor: into a "
                "short "
                f"it takes 4 W ({LIMITED}), 16 times its 250 mW (assumed: no power_rating) rating; it "
                "glows and "
                "can set the board alight before it opens; fit a fuse or a fusible (flame-proof) resistor",
                values()),
        finding("note", at(text, "R1: {", "{"), "parts.R1",
                f"R1 dissipates {NORMAL ** 2 * 1e3:.4g} mW in normal use; state its power_rating", values(),
                fix=""),
    ]


SERIES = edited(edited(PLAN, "  fuse: R1\n", "  fuse: F1\n  series_resistor: R1\n"), "  R1:",
                "  F1: {kind: fuse, current_rating: 500 mA, speed: time-lag, ends: [DC_IN, DC_F]}\n  R1:")
SERIES = edited(SERIES, "ends: [DC_IN, V12]}", "ends: [DC_F, V12]}")


def test_series_resistor_behind_a_fuse_is_not_judged_as_protection():
    assert whole(SERIES) == []
    assert [r[2] for r in sheet_rows(check(SERIES), "power.resistor-fuse")] == [
        "drop in normal use", "dissipation in normal use", "current into a short at its far end",
        "power into a short at its far end"]


@pytest.mark.parametrize("rating, level", [("0.18 W", None), ("0.17 W", "warning")])
def test_series_resistor_dissipation_edge(rating, level):
    # 0.3² · 1 = 0.09 W: exactly half of 0.18 W is fine, 53 % of 0.17 W is not
    text = watts(rating, SERIES)
    expected = [] if level is None else [finding(
        level, at(text, "R1: {", "0.17 W"), "parts.R1.power_rating",
        f"R1 dissipates 90 mW in normal use, {0.09 / 0.17:.0%} of its 0.17 W rating (keep under 50%)",
        values())]
    assert whole(text) == expected


@pytest.mark.parametrize("ohms, level", [(2.0, None), (2.1, "warning")])
def test_series_resistor_drop_edge(ohms, level):
    # I·R = 0.3 · 2 = 0.6 V is 5 % of 12 V: fine; 0.3 · 2.1 = 0.63 V is above it
    text = edited(SERIES, "value: 1 ohm", f"value: {ohms:g} ohm")
    short = 12 / ohms  # no limit reached below 2 A? 6 A and 5.7 A: both capped at the adapter's 2 A
    assert short > 2
    expected = [] if level is None else [finding(
        level, at(text, "R1: {", f"{ohms:g} ohm"), "parts.R1.value",
        f"R1 drops {NORMAL * ohms * 1e3:.4g} mV at the build's 300 mA, {NORMAL * ohms / 12:.0%} of the 12 V "
        "supply", values(ohms=ohms))]
    assert whole(text) == expected


def test_series_resistor_with_no_fuse_is_the_protection_and_a_resistor_fuse_wins():
    alone = edited(SERIES, "  fuse: F1\n", "")
    assert [f["level"] for f in whole(alone)] == ["error"]  # as in the glow-factor case: 4 W, 4 × 1 W
    both = edited(edited(PLAN, "  fuse: R1\n", "  fuse: R1\n  series_resistor: R2\n"), "  D1:",
                  "  R2: {kind: resistor, value: 10 ohm, power_rating: 1 W, ends: [V12, V12B]}\n  D1:")
    assert [f["message"][:3] for f in whole(both)] == ["R1 "]


def test_resistor_without_a_value_is_left_alone():
    text = edited(PLAN, "value: 1 ohm, ", "")
    assert whole(text) == [] and sheet_rows(check(text), "power.resistor-fuse") == []


def test_a_build_that_draws_nothing_heats_its_resistor_not_at_all():
    # no quiescent current stated: a 0 A budget, so 0 V dropped and 0 W in normal use
    text = edited(PLAN, "    quiescent_current: 0.3 A\n", "")
    assert sheet_rows(check(text), "power.resistor-fuse")[:2] == [
        ("power", "R1", "drop in normal use", 0.0, "V", "", ""),
        ("power", "R1", "dissipation in normal use", 0.0, "W", "", "")]
