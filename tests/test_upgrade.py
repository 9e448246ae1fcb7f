"""`speccheck upgrade`: a format-1 plan rewritten as format 2, comments and layout kept, same findings."""

from __future__ import annotations

from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import EXAMPLES, ROOT, check

from speccheck import textedit
from speccheck.cli import main
from speccheck.upgrade import upgrade_text

V1 = ROOT / "tests" / "data" / "v1"
V1_FILES = sorted(V1.glob("*.yaml"))


def shipped(v1: Path) -> Path:
    if v1.name.startswith("starter-"):
        return ROOT / "speccheck" / "starters" / v1.name[len("starter-") :]
    return EXAMPLES / v1.name


def _seen(result):
    return (
        [(f.rule, f.level, f.location.line, f.location.col, f.message) for f in result.findings],
        [(s.section, s.owner, s.value.name, s.value.text) for s in result.sheet],
    )


@pytest.mark.parametrize("v1", [p for p in V1_FILES if shipped(p).exists()], ids=lambda p: p.name)
def test_every_shipped_v1_plan_upgrades_to_the_shipped_v2_with_the_same_findings(v1: Path):
    old = v1.read_text("utf-8")
    done = upgrade_text(old)
    assert done.trouble == ""
    assert done.text == shipped(v1).read_text("utf-8"), "the shipped v2 file is the upgrade of its v1 copy"
    assert _seen(check(old, "plan.yaml")) == _seen(check(done.text, "plan.yaml"))
    # only the edited lines changed; every comment line is still there, byte for byte
    changed = textedit.changed_lines(old, done.text)
    assert 0 < len(changed) <= len(done.changes)
    assert [line for line in old.splitlines() if line.lstrip().startswith("#")] == [
        line for line in done.text.splitlines() if line.lstrip().startswith("#")
    ]
    assert "build_spec: 2" in done.text


def test_the_v1_path_still_checks():
    for v1 in V1_FILES:
        assert check(v1.read_text("utf-8"), "plan.yaml").checked, v1.name


def test_load_impedance_is_renamed_by_stage_kind():
    text = (
        "build_spec: 1  # a comment\nbuild: {name: x}\nparts: {}\nchain:\n"
        "  - stage: input-match\n    load_impedance: 1.5 kohm   # the chip's input\n"
        "  - {stage: audio-amp, load_impedance: 8 ohm}\n"
    )
    done = upgrade_text(text)
    assert done.text == (
        "build_spec: 2  # a comment\nbuild: {name: x}\nparts: {}\nchain:\n"
        "  - stage: input-match\n    works_into: 1.5 kohm   # the chip's input\n"
        "  - {stage: audio-amp, load_resistance: 8 ohm}\n"
    )
    assert check(done.text).checked


def test_upgrade_refuses_what_is_not_a_v1_plan():
    v2 = upgrade_text((EXAMPLES / "bench-demod-selector.yaml").read_text())
    assert v2.current and not v2.trouble and not v2.changes
    assert "no `build_spec: 1`" in upgrade_text("build: {name: x}\n").trouble
    assert upgrade_text("a: [\n").trouble


def test_upgrade_command_prints_writes_and_rewrites(tmp_path):
    src = tmp_path / "plan.yaml"
    src.write_text((V1 / "vhf-monitor-455k.yaml").read_text("utf-8"))
    runner = CliRunner()
    out = runner.invoke(main, ["upgrade", str(src)])
    assert out.exit_code == 0 and "build_spec: 2" in out.output
    assert "build_spec: 1" in src.read_text()  # nothing written unless asked
    target = tmp_path / "v2.yaml"
    assert runner.invoke(main, ["upgrade", str(src), "-o", str(target)]).exit_code == 0
    assert target.read_text() == out.output
    again = runner.invoke(main, ["upgrade", str(src), "-o", str(target)])
    assert again.exit_code == 2 and "exists" in again.output  # never overwritten without --force
    assert runner.invoke(main, ["upgrade", str(src), "--in-place"]).exit_code == 0
    assert src.read_text() == out.output
    upgraded = src.read_bytes()
    for how in (["--in-place"], ["-o", str(tmp_path / "again.yaml")], []):
        again = runner.invoke(main, ["upgrade", str(src), *how])
        # already format 2: one line saying so, exit 0, nothing written or printed as a plan
        assert again.exit_code == 0 and again.output.strip().endswith("already format 2; nothing to change, "
                                                                       "nothing written")
        assert len(again.output.strip().splitlines()) == 1
    assert src.read_bytes() == upgraded and not (tmp_path / "again.yaml").exists()


def test_profile_command_lists_and_shows_typical_values():
    runner = CliRunner()
    listing = runner.invoke(main, ["profile"])
    assert listing.exit_code == 0 and "fm-if-subsystem" in listing.output and "typical" in listing.output
    shown = runner.invoke(main, ["profile", "fm-if-subsystem"])
    assert shown.exit_code == 0
    assert "quad         quadrature, at its supply" in shown.output
    assert "supply_max         8 V  (typical)" in shown.output
    assert runner.invoke(main, ["profile", "fm-if-subsystm"]).exit_code == 2


def test_profile_command_reads_a_builds_own_profile(tmp_path):
    plan = tmp_path / "plan.yaml"
    plan.write_text(
        "build_spec: 2\nbuild: {name: x}\nparts: {}\nprofiles:\n  my-amp:\n    class: op-amp\n"
        "    supply_max: 30 V\n    pins:\n      out: {role: output, dc: half-supply}\n"
    )
    shown = CliRunner().invoke(main, ["profile", "my-amp", "--build", str(plan)])
    assert shown.exit_code == 0, shown.output
    assert "values as declared" in shown.output and "supply_max  30 V\n" in shown.output
    assert "(typical)" not in shown.output


def test_the_two_signal_plan_in_v1_keeps_its_v1_findings_and_upgrades_unchanged():
    text = (V1 / "two-signals-single-path.yaml").read_text("utf-8")
    result = check(text, "plan.yaml")
    # one shared tank and one low-pass for both signals: format 1 cannot say a switch changes them
    assert sorted(f.rule for f in result.findings) == [
        "freqplan.audio-corner",
        "freqplan.de-emphasis",
        "freqplan.tank-range",
    ]
    assert all(f.signal == "" for f in result.findings)
    assert _seen(result) == _seen(check(upgrade_text(text).text, "plan.yaml"))
