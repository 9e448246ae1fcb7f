"""SPICE decks: what `speccheck spice` writes, and ngspice confirming the design sheet.

The simulator is the independent reference here: for every shipped example and starter each
deck is run with ngspice (Debian package `ngspice`) in batch mode, and every `.measure` that
stands for a design-sheet value must agree with the sheet within 0.5 %, or the difference has
its reason stated below (REASONS; empty now). Without ngspice these tests skip with the install hint;
with the environment variable CI set they fail instead, so CI cannot pass without them.
"""

from __future__ import annotations

import math
import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import CLEAN, EXAMPLES, ROOT, edited

from speccheck import engine, loader, spice
from speccheck.cli import main
from speccheck.config import Settings

STARTERS = ROOT / "speccheck" / "starters"
PLANS = sorted(EXAMPLES.glob("*.yaml")) + sorted(STARTERS.glob("*.yaml"))
TOLERANCE = 0.005  # 0.5 %

# Differences between the simulator and the sheet that are expected, with the reason:
# (what the deck models, measure) -> (how the simulated value must stand to the sheet's, reason).
# None at present: the loaded RC corner and the current-limited inrush are on the sheet as wired.
REASONS: dict = {}


def _models(deck) -> str:
    return "current-limited supply" if any(line.startswith("B_SOURCE ") for line in deck.lines) else deck.kind


_MEASURE = re.compile(r"^([a-z_][a-z0-9_]*)\s*=\s*(\S+)", re.MULTILINE)


def _ngspice() -> str:
    found = shutil.which("ngspice")
    if found:
        return found
    hint = "ngspice is not installed; install it with `apt-get install ngspice` (Debian/Ubuntu)"
    if os.environ.get("CI"):
        pytest.fail(hint + " -- CI must run the simulator tests")
    pytest.skip(hint)


def simulate(deck_file: Path) -> dict:
    """Run one deck in batch mode; -> {measure: value} (nan for a measure that failed)."""
    run = subprocess.run(
        [_ngspice(), "-b", str(deck_file)],
        capture_output=True,
        text=True,
        timeout=60,
        check=False,
        cwd=deck_file.parent,
    )
    out = run.stdout + run.stderr
    assert run.returncode == 0, out
    errors = [line for line in out.splitlines() if line.lower().startswith("error")]
    assert not errors, f"{deck_file.name}: {errors}"
    values = {}
    for name, text in _MEASURE.findall(run.stdout):
        try:
            values[name] = float(text)
        except ValueError:
            values[name] = math.nan
    return values


def export(plan: Path, folder: Path):
    """-> (decks, files) for one plan, as `speccheck spice` writes them."""
    loaded = loader.load(plan)
    result = engine.check_loaded(loaded, Settings())
    assert loaded.can_check, [f.message for f in result.findings if f.rule.startswith("input.")]
    decks = spice.decks(loaded.build, result.sheet)
    files = []
    for deck in decks:
        path = spice.deck_path(folder, plan, deck)
        path.write_text(deck.text(result.build_name, plan.name), encoding="utf-8")
        files.append(path)
    return decks, files


@pytest.mark.parametrize("plan", PLANS, ids=lambda p: p.stem)
def test_simulator_confirms_the_design_sheet(plan, tmp_path):
    _ngspice()
    decks, files = export(plan, tmp_path)
    assert decks, f"{plan.name}: no deck"
    compared = 0
    for deck, path in zip(decks, files, strict=True):
        measured = simulate(path)
        for check in deck.checks:
            got = measured.get(check.measure)
            assert got is not None and math.isfinite(got), (
                f"{path.name}: measure {check.measure} missing: {measured}"
            )
            want = check.value
            rel = abs(got - want) / abs(want)
            how = REASONS.get((_models(deck), check.measure))
            if how is None:
                assert rel <= TOLERANCE, (
                    f"{plan.name} {deck.label}: {check.name} on the sheet {want:.6g}, "
                    f"ngspice {got:.6g} ({rel:.2%} apart)"
                )
            elif how[0] == "at-most-10%-below":
                assert want * 0.9 <= got <= want, (
                    f"{check.name}: {got:.6g} against the bound {want:.6g} ({how[1]})"
                )
            compared += 1
    assert compared >= 2


def test_clean_example_values_that_have_decks(tmp_path):
    """Which sheet values of the clean example the decks cover: a dropped deck or measure fails here."""
    decks, _ = export(CLEAN, tmp_path)
    covered = {(c.section, c.owner, c.name) for d in decks for c in d.checks}
    assert covered == {
        ("input-match", "input-match", "impedance seen by the source (real)"),
        ("input-match", "input-match", "impedance seen by the source (imaginary)"),
        ("input-match", "input-match", "return loss"),
        ("input-match", "input-match", "VSWR"),
        ("discriminator", "discriminator", "tank resonance f0"),
        ("discriminator", "discriminator", "tuning range low"),
        ("discriminator", "discriminator", "tuning range high"),
        ("discriminator", "discriminator", "loaded Q"),
        ("discriminator", "discriminator", "linear range (f0/Q)"),
        ("audio", "audio-filter", "low-pass corner"),
        ("audio", "audio-filter", "low-pass corner as wired"),
        ("audio", "audio-filter", "low-pass passband loss as wired"),
        ("audio", "audio-amp", "coupling C20 into SPK1 corner"),
        ("audio", "audio-amp", "output network R21 + C21 turnover"),
        ("fuse", "F1", "inrush peak"),
        ("fuse", "F1", "inrush time constant RC"),
        ("fuse", "F1", "inrush I²t"),
        ("crystal", "X1", "load capacitance from the oscillator"),
        ("crystal", "X1", "pulling at the specified load"),
        ("crystal", "X1", "pulling at the actual load"),
        ("crystal", "X1", "shift from the specified frequency"),
        ("crystal", "X1", "shift in frequency"),
    }
    assert sorted(d.kind for d in decks) == [
        "audio-output",
        "audio-rc",
        "crystal",
        "input-match",
        "switch-on",
        "tank",
    ]


def test_termination_and_de_emphasis_decks(tmp_path, clean_text):
    """The other input shapes and a de-emphasis stage also agree with the sheet."""
    _ngspice()
    text = edited(
        clean_text,
        "topology: series-l-shunt-c\n    parts: [L1, C1]",
        "topology: termination\n    parts: [R1]",
    )
    text = edited(
        text,
        "  C1: {kind: capacitor, value: 56 pF",
        "  R1: {kind: resistor, value: 51 ohm, ends: [IF_IN, GND]}\n  C1: {kind: capacitor, value: 56 pF",
    )
    text = edited(
        text,
        "  - stage: audio-filter\n",
        "  - stage: de-emphasis\n    resistor: R11\n    capacitor: C13\n  - stage: audio-filter\n",
    )
    text = edited(
        text,
        "  C11: {kind",
        "  R11: {kind: resistor, value: 5.1 kohm, ends: [U1.audio, DE1]}\n"
        "  C13: {kind: capacitor, value: 10 nF, dielectric: film, ends: [DE1, GND]}\n"
        "  C11: {kind",
    )
    plan = tmp_path / "variant.yaml"
    plan.write_text(text, encoding="utf-8")
    decks, files = export(plan, tmp_path)
    names = set()
    for deck, path in zip(decks, files, strict=True):
        measured = simulate(path)
        for check in deck.checks:
            names.add(check.name)
            assert measured[check.measure] == pytest.approx(check.value, rel=TOLERANCE), (
                path.name,
                check.name,
            )
    assert {"signal lost in the termination", "de-emphasis corner", "de-emphasis time constant"} <= names


# ---- the command --------------------------------------------------------------------------


def test_command_writes_the_decks_and_replaces_only_with_force(tmp_path):
    folder = tmp_path / "decks" / "new"
    runner = CliRunner()
    got = runner.invoke(main, ["spice", str(CLEAN), "-o", str(folder)])
    assert got.exit_code == 0, got.output
    written = sorted(p.name for p in folder.iterdir())
    assert written == [
        "vhf-monitor-455k.audio-filter.cir",
        "vhf-monitor-455k.audio-output.cir",
        "vhf-monitor-455k.crystal-x1.cir",
        "vhf-monitor-455k.input-match.cir",
        "vhf-monitor-455k.switch-on.cir",
        "vhf-monitor-455k.tank.cir",
    ]
    tank = folder / "vhf-monitor-455k.tank.cir"
    assert "L_L2 u1_quad tank_ret 0.001" in tank.read_text()
    tank.write_text("kept\n")
    again = runner.invoke(main, ["spice", str(CLEAN), "-o", str(folder)])
    assert again.exit_code == 2 and "--force" in again.output
    assert tank.read_text() == "kept\n"
    forced = runner.invoke(main, ["spice", str(CLEAN), "-o", str(folder), "--force"])
    assert forced.exit_code == 0, forced.output
    assert tank.read_text().startswith("* quadrature tank")
    assert not [p for p in folder.iterdir() if p.name.startswith(".")]  # no temporary file left


def test_command_writes_nothing_for_a_broken_plan(tmp_path, clean_text):
    plan = tmp_path / "broken.yaml"
    plan.write_text(edited(clean_text, "value: 120 pF", "value: 120 pH"), encoding="utf-8")
    got = CliRunner().invoke(main, ["spice", str(plan), "-o", str(tmp_path / "decks")])
    assert got.exit_code == 1
    assert "input.unit" in got.output and "no decks written" in got.output
    assert not (tmp_path / "decks").exists()
    missing = CliRunner().invoke(main, ["spice", str(tmp_path / "nope.yaml"), "-o", str(tmp_path / "d")])
    assert missing.exit_code == 2


# ---- text from the build file -------------------------------------------------------------

HOSTILE = [
    "x\n.control\nshell touch PWNED\n.endc",
    "x\r.include /etc/passwd",
    "x\u2028.shell touch PWNED",
    "x\u0085+ .control",
    "x\x0b.end\x0c.ac",
    "ends with a backslash \\",
    "\x1b[31m red \u202e reversed",
]


@pytest.mark.parametrize("text", HOSTILE)
def test_comment_text_stays_on_its_line(text):
    line = spice.comment(text)
    assert "\n" not in line and "\r" not in line and "\\" not in line
    assert all(" " <= ch <= "~" for ch in line)
    assert len(spice.comment(text * 100)) <= 160


@pytest.mark.parametrize("text", [*HOSTILE, "+.control", "9lives", "", "U1.quad", "A-B", "a b",
                                  "DC__RETURN_1"])
def test_safe_names(text):
    name = spice.safe_name(text)
    assert re.fullmatch(r"[a-z][a-z0-9_]{0,39}", name) and "__" not in name, name


def test_names_stay_distinct_when_spice_folds_case():
    names = spice.Names(grounds={"GND"})
    nodes = {names.net(n) for n in ("C1", "c1", "C-1", "C_1")}
    assert len(nodes) == 4
    assert names.net("GND") == "0"
    assert names.element("R", "R1") != names.element("R", "r1")


def test_hostile_text_cannot_reach_a_deck_line(tmp_path, clean_text):
    """Names and notes with line breaks and dot lines end up inside comments, and ngspice runs
    the decks without obeying them."""
    evil = "\\n.control\\nshell touch PWNED\\n.endc\\r.include /etc/passwd\\u2028.shell touch PWNED \\\\"
    text = edited(clean_text, "name: VHF monitor, 10.7 MHz IF tap to 455 kHz", f'name: "monitor{evil}"')
    text = edited(text, 'note: "455 kHz ceramic filter, ±10 kHz at 6 dB"', f'note: "filter{evil}"')
    text = edited(
        text,
        "  L2: {kind: inductor, value: 1 mH,",
        f'  L2: {{note: "coil{evil}", kind: inductor, value: 1 mH,',
    )
    text = edited(text, "  - name: repeater voice", '  - name: "v\\n.control\\nshell touch PWNED\\n.endc"')
    text = text.replace("TANK_RET", "+control")
    plan = tmp_path / "evil.yaml"
    plan.write_text(text, encoding="utf-8")
    loaded = loader.load(plan)
    assert loaded.can_check, [f.message for f in loaded.findings]
    result = engine.check_loaded(loaded, Settings())
    decks = spice.decks(loaded.build, result.sheet)
    assert len(decks) == 6
    allowed_dot = re.compile(r"^\.(ac|tran|save|measure|end)\b")
    element = re.compile(r"^[VRLCIEB]_[A-Z0-9_]+ ")  # R__DC_RETURN_n: the deck's own DC returns
    for deck in decks:
        body = deck.text(result.build_name, str(plan))
        for line in body.splitlines():
            assert line.startswith("* ") or allowed_dot.match(line) or element.match(line), repr(line)
            if not line.startswith("*"):
                assert not re.search(
                    r"\.(control|shell|include|endc)|shell|pwned|passwd", line, re.IGNORECASE
                ), line
    if shutil.which("ngspice") or os.environ.get("CI"):
        _, files = export(plan, tmp_path)
        for path in files:
            simulate(path)
        assert not (tmp_path / "PWNED").exists()


def test_as_wired_copy_confirms_the_loaded_corner_on_the_sheet(tmp_path):
    """The RC alone has its corner at 1/(2 pi R10 C11) = 3.386 kHz. As wired, the 10 kohm volume
    track RV1 (through the 1 uF C12) loads AF1, so the source behind C11 is R10 || RV1 = 5 kohm
    (Thevenin's theorem; Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 1) and the corner
    is 1/(2 pi 5 kohm 4.7 nF) = 6.773 kHz, with the divider's 20 log10(2) = 6.02 dB of flat loss.
    The sheet now states both, and ngspice on the as-wired copy (C12 and all) agrees within 0.5 %."""
    _ngspice()
    decks, files = export(CLEAN, tmp_path)
    deck, path = next((d, f) for d, f in zip(decks, files, strict=True) if d.label == "audio-filter")
    text = path.read_text()
    assert "C_C12_WIRED wired_af1 wired_vol_top 1e-06" in text and "R_RV1_WIRED wired_vol_top 0 10000" in text
    sheet = {c.measure: c.value for c in deck.checks}
    thevenin = 1 / (2 * math.pi * (10e3 * 10e3 / 20e3) * 4.7e-9)
    assert sheet["corner_as_wired"] == pytest.approx(thevenin, rel=1e-4)
    assert sheet["passband_loss_as_wired"] == pytest.approx(20 * math.log10(2), rel=1e-4)
    measured = simulate(path)
    assert measured["corner_as_wired"] == pytest.approx(thevenin, rel=TOLERANCE)
    assert measured["passband_loss_as_wired"] == pytest.approx(20 * math.log10(2), rel=TOLERANCE)
    assert measured["corner"] == pytest.approx(1 / (2 * math.pi * 10e3 * 4.7e-9), rel=TOLERANCE)


def test_switched_plan_gets_a_deck_per_position_only_where_the_circuit_differs(tmp_path):
    """Format 2: S1 puts R7 across the tank only in 'wide', and C13 on the audio filter only in
    'narrow'; every other sub-circuit is the same in both positions and is written once."""
    decks, _ = export(EXAMPLES / "bench-demod-selector.yaml", tmp_path)
    by_label = {d.label: d for d in decks}
    narrow = "repeater-voice-s1-narrow-upstream-rbw-100k"
    wide = "broadcast-fm-s1-wide-upstream-rbw-1m"
    wanted = {f"tank.{narrow}", f"tank.{wide}", f"audio-filter.{narrow}", f"audio-filter.{wide}"}
    assert wanted <= set(by_label)
    assert by_label[f"tank.{wide}"].stands_for == "broadcast FM; S1 wide; upstream rbw-1m"
    assert any(line.startswith("R_R7 ") for line in by_label[f"tank.{wide}"].lines)
    assert not any(line.startswith("R_R7 ") for line in by_label[f"tank.{narrow}"].lines)
    assert any(line.startswith("C_C13 ") for line in by_label[f"audio-filter.{narrow}"].lines)
    for once in ("input-match", "audio-output", "switch-on", "de-emphasis"):
        assert by_label[once].stands_for == "every signal and switch position of this plan"
