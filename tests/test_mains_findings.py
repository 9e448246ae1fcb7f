"""Mains family, pinned whole: every finding's level, place, text, numbers and fix, every branch, each
threshold just inside and just outside, and every safety caution word for word.

Sources of the numbers (each check names the one it uses):
- extra-low-voltage limits: IEC 62368-1 ES1, 30 V rms AC and 60 V DC (from memory); the SELV set of
  IEC 61140 / IEC 61558-1, 50 V rms AC and 120 V ripple-free DC, as the alternative setting;
- primary current I_p = VA / V_mains (common practice); a fuse derated to 75 % for continuous use
  (common practice), rerated by 0.5 %/°C above 25 °C (from memory); a time-lag fuse of twice I_p rides
  through the magnetising inrush (from memory); ratings rounded up to R10 (IEC 60127-1 Annex A: 1, 1.25,
  1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8 x 10^n A);
- mains tolerance ±10 % (IEC 60038, from memory); mains at 50 Hz or 60 Hz within 5 % (common practice);
- a capacitor through a resistor: V(t) = V0·e^(-t/RC), so t = RC·ln(V0/V_limit) (any circuit-theory
  textbook); stored energy ½·C·V²; a resistor dissipates V²/R, run at no more than half its rating
  (common practice).
"""

from __future__ import annotations

import pytest
from conftest import EXAMPLES, check, edited, facts, line_of, of, sheet_of, sheet_rows

from speccheck.config import Settings

MAINS = (EXAMPLES / "mains-bench-unit.yaml").read_text("utf-8")

# the rules' fix texts, ours, asserted word for word
FIX = {
    "mains.hazard": "Read the cautions; follow your local electrical code and have the work checked by a "
    "qualified person.",
    "mains.primary-fuse": "Fit a time-lag fuse of the rating shown in the line conductor, ahead of the "
    "switch, and name it in supply.mains.primary_fuse.",
    "mains.switch-line": "Wire the switch into the line conductor, after the fuse (or use a double-pole "
    "switch).",
    "mains.earth": "Bond the earth conductor of a three-core cord to the metal enclosure (earth: bonded), or "
    "build it double-insulated in an insulating enclosure (earth: class-ii).",
    "mains.ratings-declared": "State supply.mains.voltage (e.g. '230 V') and supply.mains.frequency "
    "(e.g. '50 Hz').",
    "mains.transformer-primary": "Use a transformer (or primary tap) for the mains voltage the build runs "
    "on.",
    "mains.bleeder": "Fit a bleeder resistor across the capacitor: R at most t / (C·ln(V/V_limit)), rated at "
    "least 2·V²/R.",
}

# every caution after the first, word for word and in this order: the safety text a user reads first
CAUTIONS_AFTER_FIRST = [
    "Unplug the build and discharge every capacitor (through a resistor, then check with a meter) "
    "before you touch anything inside; capacitors keep their charge after the plug is out.",
    "Put the fuse and the switch in the line (live) conductor on the primary side of the transformer, "
    "never only in the neutral, so that opening them leaves nothing inside live.",
    "Bond the protective earth conductor securely to a metal enclosure, or build the unit "
    "double-insulated (class II) in an insulating enclosure.",
    "Clamp the mains cord with a strain relief so that a pull on the cord cannot reach the terminals.",
    "Use insulated (shrouded) terminals and sleeve every joint that carries mains or another hazardous "
    "voltage.",
    "Use mains-rated wire, switch, fuse holder and connectors, and route that wiring apart from the "
    "low-voltage wiring.",
    "Keep the creepage and clearance distances that the safety standard asks for between hazardous "
    "parts and everything a person can touch, including the low-voltage circuits.",
    "speccheck is a review aid, not an approval: follow your local electrical codes and regulations, "
    "and have mains work done or checked by a licensed electrician or another qualified person.",
]

# ---- the numbers of the bench unit, derived here ----

VA, V_MAINS = 12.0, 230.0  # T1's rating and the declared mains (examples/mains-bench-unit.yaml)
PRIMARY = VA / V_MAINS  # I_p = VA / V_mains (common practice)
RERATE_40C = 1 - 0.005 * (40 - 25)  # 0.5 %/°C above 25 °C (from memory), ambient_max 40 °C
LEAST = max(PRIMARY / (0.75 * RERATE_40C), PRIMARY * 2 / RERATE_40C)  # 75 % derating, 2 x inrush
R10 = [1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8]  # IEC 60127-1 Annex A


def r10_up(x: float) -> float:
    return min(step * 10.0**decade for decade in range(-4, 4) for step in R10 if step * 10.0**decade >= x)


PREFERRED = r10_up(LEAST)


def milli(amps: float) -> str:
    """An SI text with 4 significant digits, as a person writes it (the family's messages do)."""
    return f"{amps * 1e3:.4g} mA"


def at(text: str, needle: str, nth: int = 0) -> tuple[int, int]:
    """(line, col), both from 1, of `needle` on the nth line that holds it; a "|" in the needle marks the
    character pointed at (else its first)."""
    plain = needle.replace("|", "")
    line = line_of(text, plain, nth)
    return line, text.splitlines()[line - 1].index(plain) + max(needle.find("|"), 0) + 1


def finding(rule, level, text, needle, path, message, values=None, fix=None, nth=0):
    """The whole finding a test expects; `needle` is the text the finding points at."""
    line, col = at(text, needle, nth)
    return {
        "rule": rule, "level": level, "line": line, "col": col, "path": path, "message": message,
        "values": values or {}, "fix": FIX[rule] if fix is None else fix, "stage": "mains", "signal": "",
        "position": "",
    }


def found(text: str, rule: str, settings: Settings | None = None) -> list[dict]:
    return [facts(f) for f in of(check(text, settings=settings), rule)]


def with_fuse(fuse: str = "current_rating: 125 mA, speed: time-lag, voltage_rating: 250 V", text: str = MAINS,
              ends: str = "[L, L_F]") -> str:
    """The bench unit with a primary fuse F2 ahead of the switch in the line, and the earth bonded."""
    text = edited(text, "S1: {kind: switch, ends: [L, L_SW]",
                  f"F2: {{kind: fuse, {fuse}, ends: {ends}}}\n  S1: {{kind: switch, ends: [L_F, L_SW]")
    text = edited(text, "    switch: S1\n", "    switch: S1\n    primary_fuse: F2\n")
    return edited(text, "earth: none", "earth: bonded")


def fuse_values(fitted: float) -> dict:
    return {"primary current": (pytest.approx(PRIMARY), "A"), "fitted": (pytest.approx(fitted), "A"),
            "preferred": (pytest.approx(PREFERRED), "A")}


# ---- mains.hazard: the cautions ----


def test_bench_unit_cautions_word_for_word():
    result = check(MAINS)
    assert result.cautions == [
        "HAZARDOUS VOLTAGE: this build runs from the mains (230 V). Touching it can kill.",
        *CAUTIONS_AFTER_FIRST,
    ]
    assert [facts(f) for f in of(result, "mains.hazard")] == [finding(
        "mains.hazard", "note", MAINS, "mains-transformer", "supply.kind",
        "hazardous voltage: this build runs from the mains (230 V); read the safety cautions at the top of "
        "this report",
        # IEC 62368-1 ES1 (from memory): 30 V rms AC, 60 V DC
        {"AC limit (rms)": (30.0, "V"), "DC limit": (60.0, "V")},
    )]


def test_mains_without_a_stated_voltage_still_cautions():
    text = edited(MAINS, "    voltage: 230 V\n", "")
    result = check(text)
    assert result.cautions == [
        "HAZARDOUS VOLTAGE: this build runs from the mains. Touching it can kill.", *CAUTIONS_AFTER_FIRST]
    assert [f["message"] for f in found(text, "mains.hazard")] == [
        "hazardous voltage: this build runs from the mains; read the safety cautions at the top of this "
        "report"]
    # and the transformer's primary cannot be compared with it
    assert of(result, "mains.transformer-primary") == []


def test_a_mains_block_makes_any_supply_a_mains_supply():
    # a bench supply kind with a mains block: still mains (is_mains reads either)
    text = edited(MAINS, "kind: mains-transformer", "kind: bench")
    assert check(text).cautions[0] == (
        "HAZARDOUS VOLTAGE: this build runs from the mains (230 V). Touching it can kill.")
    assert [f["level"] for f in found(text, "mains.earth")] == ["error"]


def test_every_reason_joined_in_order():
    # the mains, then each rail above 60 V DC, then each secondary above 30 V rms (ES1, from memory)
    text = edited(MAINS, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n  HV: {voltage: 61 V}\n")
    text = edited(text, "secondary_voltage: 15 V", "secondary_voltage: 31 V")
    reasons = ("this build runs from the mains (230 V); rail HV at 61 V is above the 60 V DC limit; "
               "transformer T1's secondary (31 V) is above the 30 V rms AC limit")
    result = check(text)
    assert result.cautions == [f"HAZARDOUS VOLTAGE: {reasons}. Touching it can kill.", *CAUTIONS_AFTER_FIRST]
    assert [facts(f) for f in of(result, "mains.hazard")] == [finding(
        "mains.hazard", "note", text, "mains-transformer", "supply.kind",
        f"hazardous voltage: {reasons}; read the safety cautions at the top of this report",
        {"AC limit (rms)": (30.0, "V"), "DC limit": (60.0, "V")},
    )]


@pytest.mark.parametrize(("volts", "hazardous"), [("60 V", False), ("60.5 V", True), ("-60 V", False),
                                                  ("-60.5 V", True)])
def test_rail_at_the_es1_dc_limit(clean_text, volts, hazardous):
    # IEC 62368-1 ES1 (from memory): above 60 V DC, either polarity, is hazardous
    text = edited(clean_text, "  GND: {voltage: 0 V}\n",
                  f"  GND: {{voltage: 0 V}}\n  HV: {{voltage: {volts}}}\n")
    result = check(text)
    if not hazardous:
        assert result.cautions == [] and of(result, "mains.hazard") == []
        return
    reason = f"rail HV at {volts} is above the 60 V DC limit"
    assert result.cautions == [f"HAZARDOUS VOLTAGE: {reason}. Touching it can kill.", *CAUTIONS_AFTER_FIRST]
    assert [facts(f) for f in of(result, "mains.hazard")] == [finding(
        "mains.hazard", "note", text, volts + "}", "rails.HV.voltage",
        f"hazardous voltage: {reason}; read the safety cautions at the top of this report",
        {"AC limit (rms)": (30.0, "V"), "DC limit": (60.0, "V")},
    )]


@pytest.mark.parametrize(("volts", "hazardous"), [("30 V", False), ("30.5 V", True)])
def test_secondary_at_the_es1_ac_limit(volts, hazardous):
    # IEC 62368-1 ES1 (from memory): above 30 V rms AC is hazardous
    text = edited(MAINS, "secondary_voltage: 15 V", f"secondary_voltage: {volts}")
    extra = f"; transformer T1's secondary ({volts}) is above the 30 V rms AC limit" if hazardous else ""
    assert check(text).cautions[0] == (
        f"HAZARDOUS VOLTAGE: this build runs from the mains (230 V){extra}. Touching it can kill.")


def test_step_up_transformer_in_a_low_voltage_build(clean_text):
    # no mains and no high rail: the secondary alone makes it hazardous, and the finding points at it
    last = "  SPK1: {kind: speaker, value: 8 ohm, power_rating: 3 W, ends: [SPK, GND]}\n"
    text = edited(clean_text, last, last + "  T9: {kind: transformer, rating: 5 VA, primary_voltage: 12 V, "
                  "secondary_voltage: 36 V, primary: [V12, GND], secondary: [HV_A, HV_B]}\n")
    reason = "transformer T9's secondary (36 V) is above the 30 V rms AC limit"  # ES1 (from memory)
    result = check(text)
    assert result.cautions == [f"HAZARDOUS VOLTAGE: {reason}. Touching it can kill.", *CAUTIONS_AFTER_FIRST]
    assert [facts(f) for f in of(result, "mains.hazard")] == [finding(
        "mains.hazard", "note", text, "secondary_voltage: |36 V", "parts.T9.secondary_voltage",
        f"hazardous voltage: {reason}; read the safety cautions at the top of this report",
        {"AC limit (rms)": (30.0, "V"), "DC limit": (60.0, "V")},
    )]


def test_selv_limits_by_setting(clean_text):
    # SELV, IEC 61140 / IEC 61558-1: 50 V rms AC, 120 V ripple-free DC; 121 V is above, 120 V is not
    settings = Settings(rule_settings={"mains.hazard": {"limit_dc": 120.0, "limit_ac_rms": 50.0}})
    rail = "  GND: {voltage: 0 V}\n  HV: {voltage: %s}\n"
    below = edited(clean_text, "  GND: {voltage: 0 V}\n", rail % "120 V")
    assert check(below, settings=settings).cautions == []
    text = edited(clean_text, "  GND: {voltage: 0 V}\n", rail % "121 V")
    result = check(text, settings=settings)
    assert result.cautions[0] == (
        "HAZARDOUS VOLTAGE: rail HV at 121 V is above the 120 V DC limit. Touching it can kill.")
    assert [f["values"] for f in found(text, "mains.hazard", settings)] == [
        {"AC limit (rms)": (50.0, "V"), "DC limit": (120.0, "V")}]
    secondary = edited(MAINS, "secondary_voltage: 15 V", "secondary_voltage: 51 V")
    assert check(secondary, settings=settings).cautions[0] == (
        "HAZARDOUS VOLTAGE: this build runs from the mains (230 V); transformer T1's secondary (51 V) is "
        "above the 50 V rms AC limit. Touching it can kill.")


def test_rule_texts_keep_their_safety_advice():
    from speccheck import registry

    rules = registry.load_rules()
    assert rules["mains.hazard"].verify == (
        "Do not measure on a live mains circuit unless you are trained and equipped for it; unplug and "
        "discharge the capacitors before touching anything.")
    for rule in ("mains.primary-fuse", "mains.switch-line", "mains.earth"):
        assert rules[rule].verify.startswith("With the set unplugged, "), rule
    assert "review aid, not an approval" in rules["mains.hazard"].explanation
    assert {r: rules[r].fix for r in FIX} == FIX


# ---- mains.primary-fuse ---------------------------------------------------------------------------


def test_no_primary_fuse_names_the_rating_and_the_sheet():
    # 12 VA / 230 V, twice for the inrush, rerated for 40 °C, up to R10
    assert PREFERRED == 0.125
    result = check(MAINS)
    assert [facts(f) for f in of(result, "mains.primary-fuse")] == [finding(
        "mains.primary-fuse", "error", MAINS, "transformer: |T1", "supply.mains.transformer",
        f"the mains primary has no fuse (supply.mains.primary_fuse); fit a time-lag {milli(PREFERRED)} fuse "
        "in the line conductor: a fault in the transformer or its wiring is then limited only by the "
        "building's circuit breaker",
        {"preferred rating": (pytest.approx(PREFERRED), "A")},
    )]
    assert sheet_rows(result, "mains.primary-fuse") == [
        ("mains", "T1", "primary current at full load (VA / V mains)", pytest.approx(PRIMARY), "A", "", ""),
        ("mains", "T1", "least primary fuse rating (time-lag)", pytest.approx(LEAST), "A", "", ""),
    ]


def test_no_primary_fuse_and_no_transformer_named_points_at_the_mains_block():
    # the single transformer part is found all the same, so the rating is still named
    text = edited(MAINS, "    transformer: T1\n", "")
    assert found(text, "mains.primary-fuse") == [finding(
        "mains.primary-fuse", "error", text, "voltage: 230 V", "supply.mains",
        f"the mains primary has no fuse (supply.mains.primary_fuse); fit a time-lag {milli(PREFERRED)} fuse "
        "in the line conductor: a fault in the transformer or its wiring is then limited only by the "
        "building's circuit breaker",
        {"preferred rating": (pytest.approx(PREFERRED), "A")},
    )]


@pytest.mark.parametrize("edit", [("rating: 12 VA, ", ""), ("    voltage: 230 V\n", "")])
def test_no_primary_fuse_without_the_figures_names_no_rating(edit):
    text = edited(MAINS, *edit)
    result = check(text)
    assert [f["message"] for f in found(text, "mains.primary-fuse")] == [
        "the mains primary has no fuse (supply.mains.primary_fuse): a fault in the transformer or its "
        "wiring is then limited only by the building's circuit breaker"]
    assert [f["values"] for f in found(text, "mains.primary-fuse")] == [{}]
    assert sheet_of(result, "mains.primary-fuse") == {}


def test_fuse_in_the_line_sized_right_is_fine_and_on_the_sheet():
    text = with_fuse()
    result = check(text)
    assert of(result, "mains.primary-fuse") == []
    assert sheet_rows(result, "mains.primary-fuse") == [
        ("mains", "T1", "primary current at full load (VA / V mains)", pytest.approx(PRIMARY), "A", "", ""),
        ("mains", "T1", "least primary fuse rating (time-lag)", pytest.approx(LEAST), "A", "", ""),
        ("mains", "F2", "preferred rating (R10)", pytest.approx(PREFERRED), "A", "", ""),
        ("mains", "F2", "fitted rating", pytest.approx(0.125), "A", "", ""),
    ]


def test_fuse_behind_the_switch_and_a_connector_is_still_in_the_line():
    # the line conductor runs on through switches, fuses and connectors unchanged
    text = edited(MAINS, "S1: {kind: switch, ends: [L, L_SW]",
                  "J1: {kind: connector, ends: [L, L_J]}\n  S1: {kind: switch, ends: [L_J, L_SW]")
    text = edited(text, "primary: [L_SW, N]",
                  "primary: [L_F, N]}\n  F2: {kind: fuse, current_rating: 125 mA, speed: time-lag, "
                  "ends: [L_SW, L_F]")
    text = edited(text, "    switch: S1\n", "    switch: S1\n    primary_fuse: F2\n")
    assert found(text, "mains.primary-fuse") == []
    assert found(text, "mains.switch-line") == []


def test_primary_fuse_that_is_no_fuse():
    text = edited(MAINS, "    switch: S1\n", "    switch: S1\n    primary_fuse: S1\n")
    assert found(text, "mains.primary-fuse") == [finding(
        "mains.primary-fuse", "error", text, "primary_fuse: |S1", "supply.mains.primary_fuse",
        "supply.mains.primary_fuse names S1, a switch, not a fuse",
    )]


@pytest.mark.parametrize("neutral_stated", [True, False])
def test_fuse_in_the_neutral(neutral_stated):
    # behind a connector in the neutral: the conductor runs on through it; without neutral_net the rule
    # can only say that the fuse is not in the line
    text = with_fuse(ends="[N_J, N_F]")
    text = edited(text, "primary: [L_SW, N]",
                  "primary: [L_SW, N_F]}\n  J2: {kind: connector, ends: [N, N_J]")
    text = edited(text, "S1: {kind: switch, ends: [L_F, L_SW]", "S1: {kind: switch, ends: [L, L_SW]")
    where = "in the neutral" if neutral_stated else "not in the line conductor"
    if not neutral_stated:
        text = edited(text, "    neutral_net: N\n", "")
    # an X capacitor across the mains joins no conductors: only fuses, switches and connectors pass one on
    text = edited(text, "  J2: {kind: connector", "  CX1: {kind: capacitor, value: 100 nF, dielectric: film, "
                  "voltage_rating: 275 V, ends: [L, N]}\n  J2: {kind: connector")
    assert found(text, "mains.primary-fuse") == [finding(
        "mains.primary-fuse", "error", text, "[N_J, N_F]", "parts.F2.ends",
        f"F2 (N_J, N_F) is {where} (L is the line): a blown fuse leaves the transformer connected to the "
        "line",
    )]


def test_fuse_on_the_secondary_is_not_in_the_line():
    # F1 sits after the bridge: neither conductor of the mains; 500 mA is 4 x the 125 mA preferred
    # (findings come in the order of their place in the file)
    text = edited(MAINS, "    switch: S1\n", "    switch: S1\n    primary_fuse: F1\n")
    assert found(text, "mains.primary-fuse") == [
        finding("mains.primary-fuse", "warning", text, "500 mA", "parts.F1.current_rating",
                f"F1 (500 mA) is {0.5 / PREFERRED:.3g} times the {milli(PREFERRED)} that T1 (12 VA) needs: "
                "an overloaded or shorted secondary leaves it intact", fuse_values(0.5)),
        finding("mains.primary-fuse", "error", text, "[RECT, V18]", "parts.F1.ends",
                "F1 (RECT, V18) is not in the line conductor (L is the line): a blown fuse leaves the "
                "transformer connected to the line"),
    ]


def test_line_net_not_stated_is_a_note_and_the_size_is_still_checked():
    text = edited(with_fuse("current_rating: 1 A, speed: time-lag, voltage_rating: 250 V"),
                  "    line_net: L\n", "")
    ratio = 1.0 / PREFERRED  # 1 A against the preferred 125 mA
    assert found(text, "mains.primary-fuse") == [
        finding("mains.primary-fuse", "note", text, "voltage: 230 V", "supply.mains",
                "supply.mains.line_net is not stated: whether F2 sits in the line conductor is not checked",
                fix=""),
        finding("mains.primary-fuse", "warning", text, "1 A,", "parts.F2.current_rating",
                f"F2 (1 A) is {ratio:.3g} times the {milli(PREFERRED)} that T1 (12 VA) needs: an overloaded "
                "or shorted secondary leaves it intact", fuse_values(1.0)),
    ]
    assert found(text, "mains.switch-line") == []


@pytest.mark.parametrize(("rating", "flagged"), [("229 V", True), ("230 V", False)])
def test_fuse_voltage_rating_against_the_mains(rating, flagged):
    # a fuse must be rated for at least the mains voltage (IEC 60127-1: rated voltage, common practice)
    text = with_fuse(f"current_rating: 125 mA, speed: time-lag, voltage_rating: {rating}")
    expected = [finding("mains.primary-fuse", "error", text, rating, "parts.F2.voltage_rating",
                        f"F2 is rated {rating}, below the 230 V mains")]
    assert found(text, "mains.primary-fuse") == (expected if flagged else [])


def test_fuse_without_a_current_rating_is_a_note():
    text = with_fuse("speed: time-lag")
    result = check(text)
    assert [facts(f) for f in of(result, "mains.primary-fuse")] == [finding(
        "mains.primary-fuse", "note", text, "{kind: fuse, speed", "parts.F2",
        f"F2 states no current_rating; the transformer needs a time-lag {milli(PREFERRED)}", fix="",
    )]
    assert "fitted rating" not in sheet_of(result, "mains.primary-fuse")


def test_quick_acting_fuse_is_a_warning():
    text = with_fuse("current_rating: 125 mA, speed: quick-acting, voltage_rating: 250 V")
    assert found(text, "mains.primary-fuse") == [finding(
        "mains.primary-fuse", "warning", text, "quick-acting", "parts.F2.speed",
        f"F2 is quick-acting: the transformer's magnetising inrush at switch-on will open it; fit a "
        f"time-lag {milli(PREFERRED)}", fuse_values(0.125),
    )]


# the primary current itself, rerated for 40 °C: below it the fuse opens in use (an error)
OPENS = PRIMARY / RERATE_40C


@pytest.mark.parametrize("milliamps", [56, 57])
def test_fuse_below_the_rerated_primary_current(milliamps):
    amps = milliamps / 1000
    assert (amps < OPENS) == (milliamps == 56)  # 52.17 mA / 0.925 = 56.4 mA
    text = with_fuse(f"current_rating: {milliamps} mA, speed: time-lag, voltage_rating: 250 V")
    where = ("mains.primary-fuse", text, f"{milliamps} mA", "parts.F2.current_rating")
    if amps < OPENS:
        expected = finding(where[0], "error", *where[1:],
                           f"F2 ({milliamps} mA) is below the {milli(PRIMARY)} primary current of T1 at full "
                           f"load: it will open in use; fit {milli(PREFERRED)}", fuse_values(amps))
    else:  # above it, still short of the inrush allowance
        expected = finding(where[0], "warning", *where[1:],
                           f"F2 ({milliamps} mA) leaves too little room for the continuous primary current "
                           f"({milli(PRIMARY)}) and the switch-on inrush; fit {milli(PREFERRED)}",
                           fuse_values(amps))
    assert found(text, "mains.primary-fuse") == [expected]


@pytest.mark.parametrize("milliamps", [112, 113])
def test_fuse_at_the_inrush_allowance(milliamps):
    amps = milliamps / 1000
    assert (amps < LEAST) == (milliamps == 112)  # 2 x 52.17 mA / 0.925 = 112.8 mA
    text = with_fuse(f"current_rating: {milliamps} mA, speed: time-lag, voltage_rating: 250 V")
    expected = [finding("mains.primary-fuse", "warning", text, f"{milliamps} mA", "parts.F2.current_rating",
                        f"F2 ({milliamps} mA) leaves too little room for the continuous primary current "
                        f"({milli(PRIMARY)}) and the switch-on inrush; fit {milli(PREFERRED)}",
                        fuse_values(amps))]
    assert found(text, "mains.primary-fuse") == (expected if amps < LEAST else [])


@pytest.mark.parametrize("milliamps", [250, 260])
def test_fuse_at_the_oversize_limit(milliamps):
    amps = milliamps / 1000
    too_big = amps > 2 * PREFERRED  # oversize_factor 2 (common practice)
    assert too_big == (milliamps == 260)
    text = with_fuse(f"current_rating: {milliamps} mA, speed: time-lag, voltage_rating: 250 V")
    expected = [finding("mains.primary-fuse", "warning", text, f"{milliamps} mA", "parts.F2.current_rating",
                        f"F2 ({milliamps} mA) is {amps / PREFERRED:.3g} times the {milli(PREFERRED)} that T1 "
                        "(12 VA) needs: an overloaded or shorted secondary leaves it intact",
                        fuse_values(amps))]
    assert found(text, "mains.primary-fuse") == (expected if too_big else [])


def test_inrush_allowance_and_oversize_by_setting():
    # allowance 1: the 75 % derating sets the least rating, 52.17 mA / (0.75 x 0.925) = 75.2 mA -> 80 mA
    least = max(PRIMARY / (0.75 * RERATE_40C), PRIMARY * 1.0 / RERATE_40C)
    preferred = r10_up(least)
    assert preferred == 0.08
    settings = Settings(rule_settings={"mains.primary-fuse": {"inrush_allowance": 1.0,
                                                              "oversize_factor": 3.0}})
    result = check(MAINS, settings=settings)
    assert [f["message"].split(":")[0] for f in found(MAINS, "mains.primary-fuse", settings)] == [
        f"the mains primary has no fuse (supply.mains.primary_fuse); fit a time-lag {milli(preferred)} fuse "
        "in the line conductor"]
    assert sheet_of(result, "mains.primary-fuse")["least primary fuse rating (time-lag)"] == (
        pytest.approx(least), "A")
    # 3 x 80 mA = 240 mA may be fitted; 250 mA is past it
    fine = with_fuse("current_rating: 240 mA, speed: time-lag, voltage_rating: 250 V")
    assert found(fine, "mains.primary-fuse", settings) == []
    big = with_fuse("current_rating: 250 mA, speed: time-lag, voltage_rating: 250 V")
    assert [f["message"] for f in found(big, "mains.primary-fuse", settings)] == [
        f"F2 (250 mA) is {0.25 / preferred:.3g} times the {milli(preferred)} that T1 (12 VA) needs: an "
        "overloaded or shorted secondary leaves it intact"]


def test_fuse_rerating_follows_the_ambient_and_its_settings():
    # at 80 °C: 1 - 0.005 x 55 = 0.725; 2 x 52.17 mA / 0.725 = 143.9 mA -> 160 mA (R10)
    hot = edited(MAINS, "ambient_max: 40 degC", "ambient_max: 80 degC")
    least = max(PRIMARY / (0.75 * 0.725), 2 * PRIMARY / 0.725)
    assert r10_up(least) == pytest.approx(0.16)
    assert sheet_of(check(hot), "mains.primary-fuse")["least primary fuse rating (time-lag)"] == (
        pytest.approx(least), "A")
    # the shared power.fuse-size settings: 60 % derating sets the least rating when it is the larger
    # (52.17 mA / (0.45 x 0.925) = 125.3 mA), the rerating starting at 40 °C removes it
    settings = Settings(rule_settings={"power.fuse-size": {"derating": 0.45, "rerate_above": 40.0,
                                                           "rerate_per_degc": 0.01}})
    least = max(PRIMARY / 0.45, 2 * PRIMARY)
    assert sheet_of(check(MAINS, settings=settings), "mains.primary-fuse")[
        "least primary fuse rating (time-lag)"] == (pytest.approx(least), "A")
    settings = Settings(rule_settings={"power.fuse-size": {"rerate_per_degc": 0.01}})
    least = 2 * PRIMARY / (1 - 0.01 * 15)
    assert sheet_of(check(MAINS, settings=settings), "mains.primary-fuse")[
        "least primary fuse rating (time-lag)"] == (pytest.approx(least), "A")


def test_primary_fuse_sized_from_any_positive_mains_voltage():
    # 1 V is no mains, but the arithmetic still holds: I_p = 12 VA / 1 V = 12 A, twice that over the 40 °C
    # rerating, up to R10: 2 x 12 / 0.925 = 25.9 A -> 31.5 A
    text = edited(MAINS, "    voltage: 230 V\n", "    voltage: 1 V\n")
    least = max(12.0 / (0.75 * RERATE_40C), 2 * 12.0 / RERATE_40C)
    preferred = r10_up(least)
    assert preferred == pytest.approx(31.5)
    assert [f["values"] for f in found(text, "mains.primary-fuse")] == [
        {"preferred rating": (pytest.approx(preferred), "A")}]


@pytest.mark.parametrize(("milliamps", "level"),
                         [(100, "warning"), (200, None), (400, None), (500, "warning")])
def test_fuse_exactly_at_each_threshold(milliamps, level):
    # no ambient stated: no rerating. 23 VA / 230 V = 100 mA exactly (I_p = VA / V_mains, common practice);
    # the least rating is max(100 / 0.75, 2 x 100) = 200 mA, itself an R10 value (IEC 60127-1 Annex A);
    # a fuse at exactly I_p is short of the inrush room but not below I_p, one at exactly 200 mA or
    # exactly twice it (the oversize factor) is fine
    text = edited(with_fuse(f"current_rating: {milliamps} mA, speed: time-lag, voltage_rating: 250 V"),
                  "  ambient_max: 40 degC\n", "")
    text = edited(text, "rating: 12 VA", "rating: 23 VA")
    primary, least = 23 / 230, max(23 / 230 / 0.75, 2 * 23 / 230)
    preferred = r10_up(least)
    assert (primary, least, preferred) == pytest.approx((0.1, 0.2, 0.2))
    messages = {
        100: f"F2 (100 mA) leaves too little room for the continuous primary current ({milli(primary)}) and "
             f"the switch-on inrush; fit {milli(preferred)}",
        500: f"F2 (500 mA) is {0.5 / preferred:.3g} times the {milli(preferred)} that T1 (23 VA) needs: an "
             "overloaded or shorted secondary leaves it intact",
    }
    assert [(f["level"], f["message"]) for f in found(text, "mains.primary-fuse")] == (
        [(level, messages[milliamps])] if level else [])
