"""The command line as a user meets it: exit codes, text shape, JSON shape, explain, schema."""

import json
import subprocess
import sys

import pytest
from click.testing import CliRunner
from conftest import CLEAN, EXAMPLES, line_of

from speccheck.cli import main

BEGINNER = EXAMPLES / "beginner-plan.yaml"


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def test_clean_example_exits_zero():
    res = run("check", CLEAN)
    assert res.exit_code == 0, res.output
    assert "0 errors" in res.output.splitlines()[-1]


def test_findings_exit_one_with_compiler_shape():
    res = run("check", BEGINNER)
    assert res.exit_code == 1
    text = BEGINNER.read_text("utf-8")
    want = f"{BEGINNER}:{line_of(text, 'L2: {kind: inductor')}:"
    line = next(x for x in res.output.splitlines() if "wiring.tank-return" in x)
    assert line.startswith(want)
    assert ": error wiring.tank-return L2 returns U1.quad to GND" in line
    assert "\x1b[" not in res.output  # no colour when not on a terminal


def test_fail_level_decides_the_exit_code(tmp_path):
    plan = tmp_path / "p.yaml"
    text = CLEAN.read_text("utf-8").replace("ends: [V12, GND], positive: V12}", "ends: [V12, GND]}")
    plan.write_text(text)
    assert run("check", plan).exit_code == 0  # only a warning
    assert run("check", "--fail-level", "warning", plan).exit_code == 1
    assert run("check", "--fail-level", "note", CLEAN).exit_code in (0, 1)


def test_missing_path_exits_two():
    res = run("check", "no/such/plan.yaml")
    assert res.exit_code == 2
    assert "no such file or folder" in res.output


def test_bad_usage_exits_two():
    assert run("check", "--format", "nonsense", CLEAN).exit_code == 2
    assert run("check").exit_code == 2


def test_broken_file_gets_a_positioned_finding_and_no_traceback(tmp_path):
    plan = tmp_path / "broken.yaml"
    plan.write_text("build_spec: 1\nbuild: {name: x\nparts: {}\n")
    res = run("check", plan)
    assert res.exit_code == 1
    assert "Traceback" not in res.output
    assert f"{plan}:" in res.output and "input.yaml-syntax" in res.output


def test_wrong_unit_in_a_file(tmp_path):
    plan = tmp_path / "unit.yaml"
    plan.write_text(CLEAN.read_text("utf-8").replace("frequency: 10.7 MHz", "frequency: 10.7 uH"))
    res = run("check", plan)
    assert res.exit_code == 1
    assert "input.unit source.frequency: expected a frequency, got '10.7 uH' (an inductance)" in res.output


def test_unreadable_file_exits_two(tmp_path):
    plan = tmp_path / "bin.yaml"
    plan.write_bytes(b"build_spec: 1\n\xff\xfe\x00")
    res = run("check", plan)
    assert res.exit_code == 2


def test_json_shape_is_versioned_and_complete():
    res = run("check", "--format", "json", BEGINNER)
    assert res.exit_code == 1
    data = json.loads(res.output)
    assert data["report"] == "speccheck-findings" and data["version"] == 1
    assert data["totals"]["error"] >= 3
    (file,) = data["files"]
    f = next(x for x in file["findings"] if x["rule"] == "wiring.tank-return")
    assert set(f) >= {"rule", "level", "message", "location", "values", "fix", "fingerprint", "waived"}
    assert set(f["location"]) >= {"file", "line", "column", "path"}
    assert f["location"]["path"] == "parts.L2.ends"
    assert {"name", "value", "unit", "text"} <= set(f["values"][-1])


def test_folder_is_walked_and_other_yaml_skipped(tmp_path):
    (tmp_path / "a.yaml").write_text(CLEAN.read_text("utf-8"))
    (tmp_path / "other.yml").write_text("just: some other yaml\n")
    res = run("check", "--format", "json", tmp_path)
    paths = [f["path"] for f in json.loads(res.output)["files"]]
    assert paths == [str(tmp_path / "a.yaml")]


def test_explain_and_rules():
    res = run("explain", "wiring.tank-return")
    assert res.exit_code == 0
    assert "supply rail" in res.output and "Fix:" in res.output and "Source" in res.output
    assert run("explain", "wiring.tank-retrun").exit_code == 2
    listing = run("rules").output
    assert "wiring.crystal-dc" in listing and "input.unit" in listing


def test_schema_export_is_a_valid_2020_12_schema():
    from jsonschema import Draft202012Validator

    res = run("schema")
    schema = json.loads(res.output)
    Draft202012Validator.check_schema(schema)
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"


def test_every_example_validates_against_the_exported_schema():
    from jsonschema import Draft202012Validator
    from ruamel.yaml import YAML

    validators = {v: Draft202012Validator(json.loads(run("schema", "--version", str(v)).output))
                  for v in (1, 2)}
    for path in sorted(EXAMPLES.glob("*.yaml")):
        data = YAML(typ="safe").load(path.read_text("utf-8"))
        errors = list(validators[data["build_spec"]].iter_errors(data))
        assert errors == [], f"{path.name}: {errors[0].message}"


def test_version():
    from speccheck import __version__

    assert __version__ in run("--version").output


def test_console_script_runs_as_a_process():
    out = subprocess.run(
        [sys.executable, "-m", "speccheck", "check", str(CLEAN)], capture_output=True, text=True
    )
    assert out.returncode == 0, out.stderr
    assert "Traceback" not in out.stderr


@pytest.mark.parametrize("fmt", ["text", "json", "markdown"])
def test_design_sheet_command(fmt):
    res = run("sheet", "--format", fmt, CLEAN)
    assert res.exit_code == 0, res.output
