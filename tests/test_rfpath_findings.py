"""The rfpath family's findings and sheet entries asserted whole (rule, level, place, text, numbers,
fix, stage), with two stages or devices where a rule loops over them, so that a loop that stops at the
first one shows.

Sources of the expected numbers (each also named beside its check):
- L-network: Q = sqrt(R_high/R_low - 1), X_series = Q·R_low, X_shunt = R_high/Q (Bowick, RF Circuit
  Design, ch. 4, from memory; checked against scikit-rf in tests/test_rfpath.py);
- input impedance of the declared network, reflection Γ = (Z - Z0)/(Z + Z0), return loss -20·log10|Γ|,
  VSWR (1 + |Γ|)/(1 - |Γ|), mismatch loss -10·log10(1 - |Γ|²) (transmission-line theory: circuit
  arithmetic written out here);
- a plain shunt termination R = R_s·R_L/(R_L - R_s) and its cost 10·log10(R_L/R_s) dB (power division);
- preferred values: IEC 60063 E12/E24, nearest on a log scale;
- toroid: L = AL·N², N = sqrt(L/AL) (powdered-iron toroid handbook table);
- levels: dBm plus dB of gain (plain level arithmetic).
"""

from __future__ import annotations

import math

import pytest
from conftest import CLEAN, check, edited, facts, line_of, of, sheet_rows

from speccheck.config import Settings

# IEC 60063, typed in from the standard's table
E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2,
       6.8, 7.5, 8.2, 9.1)
F = 10.7e6  # the clean plan's source frequency, which the input-match stage works at
W = 2 * math.pi * F
AL = 4.9e-9  # L1's core: 0.5 in powdered iron, mix 2 (handbook table: 49 µH per 100 turns)
FIX = {
    "rfpath.input-match": "Use the ideal L-network values (nearest preferred parts), with the shunt C "
                          "across the higher resistance, and check the match on the bench with a "
                          "return-loss bridge.",
    "rfpath.coil-turns": "Wind N = sqrt(L / AL) turns, or correct the declared value or core.",
    "rfpath.gain-ahead": "Reduce the preamplifier gain (or add a pad after it) to the profile's limit.",
    "rfpath.max-input": "Add attenuation ahead of the device, reduce the preamplifier gain, or lower the "
                        "source level.",
}
CLEAN_TEXT = CLEAN.read_text("utf-8")


def nearest(value: float, series: tuple[float, ...]) -> float:
    """The nearest preferred value on a log scale (IEC 60063 series, every decade around value)."""
    decade = math.floor(math.log10(value))
    cands = [m * 10.0**d for d in (decade - 1, decade, decade + 1) for m in series]
    return min(cands, key=lambda c: abs(math.log(c / value)))


def l_net(rs: float, rl: float) -> tuple[float, float, float]:
    """(Q, series L, shunt C) of the L-network between rs and rl at F (Bowick ch. 4)."""
    lo, hi = min(rs, rl), max(rs, rl)
    q = math.sqrt(hi / lo - 1)
    return q, q * lo / W, q / (W * hi)  # X_L = Q·R_low; X_C = R_high/Q, so C = Q/(ω·R_high)


def gamma(z: complex, z0: float = 50.0) -> float:
    return abs((z - z0) / (z + z0))


def expect(rule: str, level: str, text: str, line_needle: str, at: str, path: str, message: str,
           values: dict | None = None, stage: str = "input-match", fix: str | None = None,
           nth: int = 0) -> dict:
    """The facts() of a finding at the nth line holding line_needle, column where `at` starts there."""
    line = line_of(text, line_needle, nth)
    col = text.splitlines()[line - 1].index(at) + 1
    return {
        "rule": rule, "level": level, "line": line, "col": col, "path": path, "message": message,
        "values": values or {}, "fix": FIX[rule] if fix is None else fix, "stage": stage, "signal": "",
        "position": "",
    }


def found(result, rule: str) -> list[dict]:
    return [facts(f) for f in of(result, rule)]


def in_order(*expected: dict) -> list[dict]:
    return sorted(expected, key=lambda e: (e["line"], e["col"]))


def approx(x: float):
    return pytest.approx(x, rel=1e-9)


# ---- rfpath.input-match ---------------------------------------------------------------------------


def si(value: float, unit: str) -> str:
    """A small value written with its SI prefix and 4 significant digits (our messages' style)."""
    scale, prefix = next((s, p) for s, p in ((1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"), (1e-12, "p"))
                         if value >= s)
    return f"{value / scale:.4g} {prefix}{unit}"


def picks(ideal: float, unit: str) -> str:
    """The E12 and E24 picks as the message words them: 'E12 3.9 µH -2.6 %, E24 ...'."""
    words = []
    for name, series in (("E12", E12), ("E24", E24)):
        pick = nearest(ideal, series)
        words.append(f"{name} {si(pick, unit)} {(pick / ideal - 1) * 100:+.1f} %")
    return ", ".join(words)


def suggest(ideal_l: float, ideal_c: float, side: str) -> str:
    return (f"series {si(ideal_l, 'H')} ({picks(ideal_l, 'H')}), shunt {si(ideal_c, 'F')} "
            f"({picks(ideal_c, 'F')}) across the {side} side")


def pick_rows(owner: str, what: str, ideal: float, unit: str) -> list[tuple]:
    rows = []
    for name, series in (("E12", E12), ("E24", E24)):
        pick = nearest(ideal, series)
        error = approx(round((pick / ideal - 1) * 100, 2))
        rows += [("input-match", owner, f"{what}, nearest {name}", approx(pick), unit, "", ""),
                 ("input-match", owner, f"{what}, {name} error", error, "%", "", "")]
    return rows


def test_clean_plan_sheet_of_the_match():
    # 3.9 µH series, 56 pF across the 1.5 kohm chip input, from 50 ohm at 10.7 MHz
    q, ideal_l, ideal_c = l_net(50.0, 1500.0)
    zin = 1j * W * 3.9e-6 + 1 / (1 / 1500 + 1j * W * 56e-12)
    g = gamma(zin)
    assert sheet_rows(check(CLEAN_TEXT), "rfpath.input-match") == [
        ("input-match", "input-match", "working frequency", approx(F), "Hz", "", ""),
        ("input-match", "input-match", "source resistance", approx(50.0), "Ω", "", ""),
        ("input-match", "input-match", "load resistance", approx(1500.0), "Ω", "", ""),
        # R·1500/(1500 - R) = 50: R = 50·1500/1450 (power division)
        ("input-match", "input-match", "shunt termination resistor instead", approx(50 * 1500 / 1450), "Ω",
         "", ""),
        ("input-match", "input-match", "signal lost with a shunt termination",
         approx(round(10 * math.log10(1500 / 50), 2)), "dB", "", ""),
        ("input-match", "input-match", "L-network Q", approx(round(q, 3)), "", "", ""),
        ("input-match", "input-match", "ideal series L", approx(ideal_l), "H", "", ""),
        ("input-match", "input-match", "ideal shunt C", approx(ideal_c), "F", "", ""),
        *pick_rows("input-match", "series L", ideal_l, "H"),
        *pick_rows("input-match", "shunt C", ideal_c, "F"),
        ("input-match", "input-match", "turns for the ideal L on L1's core",
         approx(round(math.sqrt(ideal_l / AL), 1)), "", "", ""),
        ("input-match", "input-match", "impedance seen by the source (real)", approx(zin.real), "Ω", "", ""),
        ("input-match", "input-match", "impedance seen by the source (imaginary)", approx(zin.imag), "Ω", "",
         ""),
        ("input-match", "input-match", "return loss", approx(round(-20 * math.log10(g), 2)), "dB", "", ""),
        ("input-match", "input-match", "VSWR", approx(round((1 + g) / (1 - g), 3)), "", "", ""),
    ]
    assert found(check(CLEAN_TEXT), "rfpath.input-match") == []


SECOND = "  - stage: input-match\n    name: second\n    topology: direct\n    works_into: 200 ohm\n"


def two_matches(second: str = SECOND, text: str = CLEAN_TEXT) -> str:
    """A second input-match stage named 'second' after the first one."""
    return edited(text, "  - stage: conversion\n", second + "  - stage: conversion\n")


def mismatch(text: str, rl: float, zin: complex, topo: str, stage: str, path: str, needle: str,
             min_rl: float = 10.0, suggestion: str | None = None, nth: int = 0) -> dict:
    g = gamma(zin)
    rloss, vswr = -20 * math.log10(g), (1 + g) / (1 - g)
    if suggestion is None:
        _, ideal_l, ideal_c = l_net(50.0, rl)
        suggestion = suggest(ideal_l, ideal_c, "load" if rl > 50 else "source")
    sign = "+" if zin.imag >= 0 else "−"
    rl_text = f"{rl / 1e3:g} kΩ" if rl >= 1e3 else f"{rl:g} Ω"
    return expect("rfpath.input-match", "warning", text, needle, topo, path,
                  f"at 10.7 MHz the 50 Ω source sees {zin.real:.1f} {sign} j{abs(zin.imag):.1f} Ω through "
                  f"the {topo} input: return loss {rloss:.1f} dB (VSWR {vswr:.2f}), under {min_rl:g} dB; "
                  f"ideal for {rl_text}: {suggestion}",
                  {"return loss": (approx(round(rloss, 2)), "dB"), "VSWR": (approx(round(vswr, 3)), ""),
                   "mismatch loss": (approx(round(-10 * math.log10(1 - g**2), 2)), "dB")},
                  stage=stage, nth=nth)


def second_warning(text: str) -> dict:
    # 200 ohm straight on a 50 ohm source: Γ = 150/250 = 0.6
    return mismatch(text, 200.0, complex(200.0), "direct", "second", "chain[1].topology",
                    "    topology: direct")


def test_second_stage_direct_mismatch_is_a_warning():
    text = two_matches()
    result = check(text)
    assert found(result, "rfpath.input-match") == [second_warning(text)]
    q, _, _ = l_net(50.0, 200.0)
    rows = [r for r in sheet_rows(result, "rfpath.input-match") if r[1] == "second"]
    assert [r[2] for r in rows][:3] == ["working frequency", "source resistance", "load resistance"]
    assert rows[3:6] == [
        ("input-match", "second", "shunt termination resistor instead", approx(50 * 200 / 150), "Ω", "", ""),
        ("input-match", "second", "signal lost with a shunt termination",
         approx(round(10 * math.log10(200 / 50), 2)), "dB", "", ""),
        ("input-match", "second", "L-network Q", approx(round(q, 3)), "", "", ""),
    ]
    rloss = round(-20 * math.log10(0.6), 2)
    assert ("input-match", "second", "return loss", approx(rloss), "dB", "", "") in rows


def by_place(items: list[dict]) -> list[dict]:
    return sorted(items, key=lambda e: (e["line"], e["col"], e["message"]))


MY_CHIP = ("profiles:\n  my-chip:\n    class: mixer\n    pins:\n      mixer_in: {role: input}\n"
           "      osc_base: {role: oscillator}\n      osc_emitter: {role: oscillator-out}\n"
           "      mixer_out: {role: mixer-out}\n      limiter_in: {role: limiter-in}\n"
           "      quad: {role: quadrature}\n      audio: {role: output}\n\ndevices:\n")


def note(text: str, needle: str, at: str, path: str, message: str, stage: str = "input-match",
         fix: str = "", nth: int = 0) -> dict:
    return expect("rfpath.input-match", "note", text, needle, at, path, message, stage=stage, fix=fix,
                  nth=nth)


FIRST_TOPO = ("    topology: series-l-shunt-c", "series-l-shunt-c", "chain[0].topology")


@pytest.mark.parametrize(("old", "new", "first"), [
    # a transformer: no data to compute, nothing said
    ("topology: series-l-shunt-c", "topology: transformer", None),
    # an L-network without its capacitor
    ("    parts: [L1, C1]\n", "    parts: [L1]\n",
     (*FIRST_TOPO, "input-match: a series-l-shunt-c network needs an inductor and a capacitor with values in "
                   "chain[0].parts")),
    # a termination without its resistor
    ("topology: series-l-shunt-c", "topology: termination",
     ("    topology: termination", "termination", "chain[0].topology",
      "input-match: a termination needs its resistor with a value in chain[0].parts")),
])
def test_first_stage_not_computed_second_still_checked(old, new, first):
    text = two_matches(text=edited(CLEAN_TEXT, old, new))
    expected = [second_warning(text)]
    if first is not None:
        expected.append(note(text, *first))
    assert by_place(found(check(text), "rfpath.input-match")) == by_place(expected)


def test_device_without_input_impedance_is_a_note_per_stage():
    text = edited(CLEAN_TEXT, "{profile: fm-if-subsystem, rail: V6}", "{profile: my-chip, rail: V6}")
    text = two_matches(text=edited(text, "devices:\n", MY_CHIP))
    assert by_place(found(check(text), "rfpath.input-match")) == by_place([
        note(text, "  - stage: input-match", "stage", "chain[0]",
             "input-match: profiles.my-chip.input_impedance is not given, so the match cannot be computed",
             fix="Give profiles.my-chip.input_impedance."),
        second_warning(text),
    ])


def test_stage_with_neither_works_into_nor_device_is_a_note():
    text = two_matches(SECOND.replace("    works_into: 200 ohm\n", ""))
    assert found(check(text), "rfpath.input-match") == [
        note(text, "  - stage: input-match", "stage", "chain[1]",
             "second: chain[1].works_into or .device is not given, so the match cannot be computed",
             stage="second", fix="Give chain[1].works_into or .device.", nth=1),
    ]


def test_source_without_impedance_is_a_note_for_each_stage():
    text = two_matches(text=edited(CLEAN_TEXT, "  impedance: 50 ohm\n", ""))
    fix = "Give source.impedance (50 ohm for most receivers and instruments)."
    assert by_place(found(check(text), "rfpath.input-match")) == by_place([
        note(text, "  kind: receiver-if", "kind", "source",
             "input-match: source.impedance is not given, so the match cannot be computed", fix=fix),
        note(text, "  kind: receiver-if", "kind", "source",
             "second: source.impedance is not given, so the match cannot be computed", stage="second",
             fix=fix),
    ])


def test_network_turned_the_wrong_way_is_two_warnings():
    text = edited(CLEAN_TEXT, "topology: series-l-shunt-c", "topology: shunt-c-series-l")
    # C across the 50 ohm source, then L into 1.5 kohm: Z = 1/(jωC + 1/(R_L + jωL))
    zin = 1 / (1j * W * 56e-12 + 1 / (1500 + 1j * W * 3.9e-6))
    where = ("    topology: shunt-c-series-l", "shunt-c-series-l", "chain[0].topology")
    assert by_place(found(check(text), "rfpath.input-match")) == by_place([
        expect("rfpath.input-match", "warning", text, *where,
               "a shunt-c-series-l network puts its shunt C across the source side, but the higher "
               "resistance is on the load side (50 Ω source, 1.5 kΩ load): this shape cannot match them",
               {"source": (approx(50.0), "Ω"), "load": (approx(1500.0), "Ω")},
               fix="Turn the network round: the shunt C goes across the higher resistance."),
        mismatch(text, 1500.0, zin, "shunt-c-series-l", "input-match", where[2], where[0]),
    ])


def test_badly_tuned_network_is_a_warning_with_its_numbers():
    text = edited(CLEAN_TEXT, "C1: {kind: capacitor, value: 56 pF", "C1: {kind: capacitor, value: 150 pF")
    zin = 1j * W * 3.9e-6 + 1 / (1 / 1500 + 1j * W * 150e-12)  # series L, then C across the load
    assert found(check(text), "rfpath.input-match") == [
        mismatch(text, 1500.0, zin, "series-l-shunt-c", "input-match", FIRST_TOPO[2], FIRST_TOPO[0])]


CLEAN_ZIN = 1j * W * 3.9e-6 + 1 / (1 / 1500 + 1j * W * 56e-12)
CLEAN_RL = -20 * math.log10(gamma(CLEAN_ZIN))  # 23.49 dB


@pytest.mark.parametrize(("setting", "warns"), [
    (CLEAN_RL + 0.005, True),    # just above the plan's return loss
    (CLEAN_RL - 0.005, False),   # just below it
    ("30", True),                # a number given as text counts
    ("lots", False),             # not a number: the default 10 dB
])
def test_min_return_loss_setting(setting, warns):
    settings = Settings(rule_settings={"rfpath.input-match": {"min_return_loss": setting}})
    got = found(check(CLEAN_TEXT, settings=settings), "rfpath.input-match")
    expected = [mismatch(CLEAN_TEXT, 1500.0, CLEAN_ZIN, "series-l-shunt-c", "input-match", FIRST_TOPO[2],
                         FIRST_TOPO[0], min_rl=float(setting))] if warns else []
    assert got == expected


@pytest.mark.parametrize(("given", "said"), [
    ("1.66 kohm", True),    # +10.7 % from the profile's 1.5 kohm
    ("1.64 kohm", False),   # +9.3 %
    ("1.34 kohm", True),    # -10.7 %
    ("1.36 kohm", False),   # -9.3 %
])
def test_works_into_that_differs_from_the_device_is_said(given, said):
    text = edited(CLEAN_TEXT, "    parts: [L1, C1]\n", f"    parts: [L1, C1]\n    works_into: {given}\n")
    result = check(text)
    ohms = float(given.split()[0]) * 1e3
    zin = 1j * W * 3.9e-6 + 1 / (1 / ohms + 1j * W * 56e-12)
    assert -20 * math.log10(gamma(zin)) > 10  # the match itself stays good
    expected = [expect("rfpath.input-match", "note", text, "    works_into:", given, "chain[0].works_into",
                       f"input-match: works_into {given} replaces the 1.5 kohm input impedance of U1 "
                       "(fm-if-subsystem profile) in the match arithmetic",
                       {"works_into": (approx(ohms), "Ω"), "device input": (approx(1500.0), "Ω")}, fix="")]
    assert found(result, "rfpath.input-match") == (expected if said else [])
    assert ("input-match", "input-match", "load resistance", approx(ohms), "Ω", "", "") in sheet_rows(
        result, "rfpath.input-match")


TERMINATED = ("  - stage: input-match\n    topology: termination\n    parts: [R1]\n")


def test_plain_termination_is_a_note_with_its_cost():
    text = edited(CLEAN_TEXT, "  - stage: input-match\n    topology: series-l-shunt-c\n    parts: [L1, C1]\n",
                  TERMINATED)
    text = edited(text, "  C1: {kind: capacitor, value: 56 pF",
                  "  R1: {kind: resistor, value: 51.7 ohm, ends: [IF_IN, GND]}\n"
                  "  C1: {kind: capacitor, value: 56 pF")
    # 51.7 ohm || 1.5 kohm; the chip's share of the source's available power: Re(Z)/R_L·(1 - |Γ|²)
    zin = 1 / (1 / 51.7 + 1 / 1500)
    lost = -10 * math.log10(zin / 1500 * (1 - gamma(complex(zin)) ** 2))
    _, ideal_l, ideal_c = l_net(50.0, 1500.0)
    suggestion = suggest(ideal_l, ideal_c, "load")
    result = check(text)
    assert found(result, "rfpath.input-match") == [
        expect("rfpath.input-match", "note", text, "    topology: termination", "termination",
               "chain[0].topology",
               f"R1 terminates the 50 Ω source across the 1.5 kΩ input: the chip gets {lost:.1f} dB less "
               f"signal than through a lossless L-network ({suggestion})",
               {"lost": (approx(round(lost, 2)), "dB"), "ideal L": (approx(ideal_l), "H"),
                "ideal C": (approx(ideal_c), "F")},
               fix=f"Replace the termination with an L-network: {suggestion}."),
    ]
    assert ("input-match", "input-match", "signal lost in the termination", approx(round(lost, 2)), "dB", "",
            "") in sheet_rows(result, "rfpath.input-match")


R9 = "  R9: {kind: resistor, value: 50 ohm, ends: [IF_IN, GND]}\n"


def test_termination_on_an_equal_load_needs_no_network():
    second = "  - stage: input-match\n    name: second\n    topology: termination\n    parts: [R9]\n" \
             "    works_into: 50 ohm\n"
    text = two_matches(second, edited(CLEAN_TEXT, "  C1: {kind: capacitor", R9 + "  C1: {kind: capacitor"))
    # 50 ohm || 50 ohm = 25 ohm on a 50 ohm source: Γ = 1/3, 9.54 dB return loss
    assert found(check(text), "rfpath.input-match") == [
        mismatch(text, 50.0, complex(25.0), "termination", "second", "chain[1].topology",
                 "    topology: termination", suggestion="no network: source and load are equal")]
    rows = [r[2] for r in sheet_rows(check(text), "rfpath.input-match") if r[1] == "second"]
    assert "L-network Q" not in rows and "shunt termination resistor instead" not in rows


def test_termination_on_a_lower_load_suggests_the_shunt_on_the_source_side():
    second = "  - stage: input-match\n    name: second\n    topology: termination\n    parts: [R9]\n" \
             "    works_into: 20 ohm\n"
    text = two_matches(second, edited(CLEAN_TEXT, "  C1: {kind: capacitor",
                                      R9.replace("50 ohm", "1 kohm") + "  C1: {kind: capacitor"))
    zin = complex(1 / (1 / 1000 + 1 / 20))  # 1 kohm || 20 ohm
    assert found(check(text), "rfpath.input-match") == [
        mismatch(text, 20.0, zin, "termination", "second", "chain[1].topology", "    topology: termination")]


def test_direct_into_an_equal_load_is_a_perfect_match():
    text = two_matches(SECOND.replace("200 ohm", "50 ohm"))
    result = check(text)
    assert found(result, "rfpath.input-match") == []
    rows = {r[2]: r[3] for r in sheet_rows(result, "rfpath.input-match") if r[1] == "second"}
    # Γ = 0: an infinite return loss, VSWR 1 (transmission-line theory)
    assert rows == {"working frequency": approx(F), "source resistance": approx(50.0),
                    "load resistance": approx(50.0), "impedance seen by the source (real)": approx(50.0),
                    "impedance seen by the source (imaginary)": 0.0, "return loss": math.inf, "VSWR": 1.0}


def without_source(text: str) -> str:
    """The plan with no source block at all."""
    start, end = text.index("source:\n"), text.index("supply:\n")
    return text[:start] + text[end:]


def test_plan_without_a_source_is_a_note_at_each_stage():
    text = without_source(two_matches())
    fix = "Give source.impedance (50 ohm for most receivers and instruments)."
    assert by_place(found(check(text), "rfpath.input-match")) == by_place([
        note(text, "  - stage: input-match", "stage", "chain[0]",
             "input-match: source.impedance is not given, so the match cannot be computed", fix=fix),
        note(text, "  - stage: input-match", "stage", "chain[1]",
             "second: source.impedance is not given, so the match cannot be computed", stage="second",
             fix=fix, nth=1),
    ])


def test_l_network_between_equal_resistances_suggests_none():
    second = ("  - stage: input-match\n    name: second\n    topology: series-l-shunt-c\n"
              "    parts: [L1, C1]\n    works_into: 50 ohm\n")
    text = two_matches(second)
    zin = 1j * W * 3.9e-6 + 1 / (1 / 50 + 1j * W * 56e-12)  # series L, then C across the 50 ohm load
    assert found(check(text), "rfpath.input-match") == [
        mismatch(text, 50.0, zin, "series-l-shunt-c", "second", "chain[1].topology", "    topology: series-l",
                 suggestion="no network: source and load are equal", nth=1)]


def test_works_into_on_a_device_whose_profile_states_no_input_is_not_compared():
    text = edited(CLEAN_TEXT, "{profile: fm-if-subsystem, rail: V6}", "{profile: my-chip, rail: V6}")
    text = edited(edited(text, "devices:\n", MY_CHIP), "    parts: [L1, C1]\n",
                  "    parts: [L1, C1]\n    works_into: 1.5 kohm\n")
    result = check(text)
    assert found(result, "rfpath.input-match") == []
    assert ("input-match", "input-match", "load resistance", approx(1500.0), "Ω", "", "") in sheet_rows(
        result, "rfpath.input-match")


def test_stage_after_a_conversion_of_unknown_if_is_a_note():
    # a second conversion that states neither its oscillator nor its IF: the frequency reaching the
    # stage after it is unknown (the note used to blame source.frequency, which the schema requires)
    third = SECOND.replace("name: second", "name: third")
    text = edited(CLEAN_TEXT, "  - stage: limiter\n",
                  "  - stage: conversion\n    name: conv2\n" + SECOND + third + "  - stage: limiter\n")
    assert found(check(text), "rfpath.input-match") == [
        note(text, "  - stage: input-match", "stage", f"chain[{4 + n}]",
             f"{name}: the IF of a conversion ahead of it is not known, so the match cannot be computed at "
             "its working frequency", stage=name, nth=1 + n)
        for n, name in enumerate(("second", "third"))
    ]


def test_l_network_part_without_a_value_is_a_note():
    text = two_matches(text=edited(CLEAN_TEXT, "C1: {kind: capacitor, value: 56 pF, ",
                                   "C1: {kind: capacitor, "))
    assert by_place(found(check(text), "rfpath.input-match")) == by_place([
        note(text, *FIRST_TOPO,
             "input-match: a series-l-shunt-c network needs an inductor and a capacitor with values in "
             "chain[0].parts"),
        second_warning(text),
    ])


def test_poorly_matched_termination_counts_the_reflection():
    text = edited(CLEAN_TEXT, "  - stage: input-match\n    topology: series-l-shunt-c\n    parts: [L1, C1]\n",
                  TERMINATED)
    text = edited(text, "  C1: {kind: capacitor, value: 56 pF",
                  "  R1: {kind: resistor, value: 100 ohm, ends: [IF_IN, GND]}\n"
                  "  C1: {kind: capacitor, value: 56 pF")
    # 100 ohm || 1.5 kohm = 93.75 ohm: Γ = 43.75/143.75 = 0.304, so the chip's share of the available
    # power is Re(Z)/R_L·(1 - |Γ|²) (power division and reflection)
    zin = 1 / (1 / 100 + 1 / 1500)
    g = gamma(complex(zin))
    assert -20 * math.log10(g) > 10  # no mismatch warning, only the termination note
    lost = -10 * math.log10(zin / 1500 * (1 - g**2))
    result = check(text)
    assert [(f["level"], f["values"]["lost"]) for f in found(result, "rfpath.input-match")] == [
        ("note", (approx(round(lost, 2)), "dB"))]
