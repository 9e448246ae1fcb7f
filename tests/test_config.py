"""The project file: where it is found, what it may say, how it is validated, and precedence."""

import json
from pathlib import Path

import jsonschema
import pytest
from click.testing import CliRunner
from conftest import CLEAN, EXAMPLES, ROOT, check, edited, of

from speccheck import config
from speccheck.cli import main
from speccheck.config import ConfigError, Settings, find_project_file, glob_match, load_project

BEGINNER = EXAMPLES / "beginner-plan.yaml"


def write(folder, text, name=config.PROJECT_FILE):
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def messages(path):
    with pytest.raises(ConfigError) as caught:
        load_project(path)
    return caught.value.messages


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def test_the_project_schema_is_a_valid_json_schema():
    schema = json.loads((ROOT / "speccheck" / "schema" / config.PROJECT_SCHEMA).read_text("utf-8"))
    jsonschema.Draft202012Validator.check_schema(schema)
    assert (
        run("schema", "project").output == (ROOT / "speccheck" / "schema" / config.PROJECT_SCHEMA).read_text()
    )


# ---- finding the file ----------------------------------------------------------------------


def test_found_by_walking_up_and_not_past_the_repository_root(tmp_path):
    (tmp_path / "repo" / ".git").mkdir(parents=True)
    deep = tmp_path / "repo" / "builds" / "club"
    deep.mkdir(parents=True)
    plan = deep / "p.yaml"
    plan.write_text("build_spec: 1\n")
    assert find_project_file(plan) is None
    here = write(tmp_path / "repo", "speccheck_project: 1\n")
    assert find_project_file(plan) == here
    assert find_project_file(deep) == here
    # a project file above the repository root belongs to something else
    here.unlink()
    write(tmp_path, "speccheck_project: 1\n")
    assert find_project_file(plan) is None


def test_settings_from_a_full_file(tmp_path):
    path = write(
        tmp_path,
        """\
speccheck_project: 1
fail_level: warning
rules:
  skip: [wiring.crystal-dc]
  levels:
    wiring.polarity-unstated: note
    review: error
  settings:
    wiring.cap-voltage: {derating: 0.7}
files:
  include: ["builds/**"]
  exclude: ["builds/archive/**"]
""",
    )
    s = load_project(path)
    assert s.fail_level == "warning"
    assert "wiring.crystal-dc" in s.disabled and s.enabled("wiring.tank-return")
    assert s.levels["wiring.polarity-unstated"] == "note"
    assert s.levels["review.waiver-reason"] == "error" and s.levels["review.waiver-unused"] == "error"
    assert s.rule_settings == {"wiring.cap-voltage": {"derating": 0.7}}
    assert s.root == str(tmp_path) and s.source == str(path)
    assert s.wants(tmp_path / "builds" / "a.yaml")
    assert not s.wants(tmp_path / "builds" / "archive" / "old.yaml")
    assert not s.wants(tmp_path / "elsewhere" / "b.yaml")


def test_family_names_switch_whole_families(tmp_path):
    s = load_project(write(tmp_path, "speccheck_project: 1\nrules:\n  skip: [wiring]\n"))
    assert not s.enabled("wiring.tank-return") and not s.enabled("wiring.cap-voltage")
    s = load_project(write(tmp_path, "speccheck_project: 1\nrules:\n  only: [wiring.tank-return]\n"))
    assert s.enabled("wiring.tank-return") and not s.enabled("wiring.cap-voltage")
    assert s.enabled("input.schema") and s.enabled("review.waiver-reason")  # never switched off by `only`


def test_rule_settings_reach_the_rule(tmp_path, clean_text):
    # C31: 6 V on a 16 V part is 37.5 %; a project derating of 0.3 makes that a warning
    s = load_project(
        write(
            tmp_path, "speccheck_project: 1\nrules:\n  settings:\n    wiring.cap-voltage: {derating: 0.3}\n"
        )
    )
    found = [f for f in of(check(clean_text, settings=s), "wiring.cap-voltage") if "C31" in f.message]
    assert found and found[0].level == "warning"
    assert "keep under 30%" in found[0].message
    assert not [f for f in of(check(clean_text), "wiring.cap-voltage") if "C31" in f.message]


def test_level_override_changes_the_level(tmp_path):
    s = load_project(
        write(tmp_path, "speccheck_project: 1\nrules:\n  levels: {wiring.tank-return: warning}\n")
    )
    from speccheck import engine

    found = of(engine.check_file(BEGINNER, s), "wiring.tank-return")
    assert found and all(f.level == "warning" for f in found)


# ---- errors that name the problem ------------------------------------------------------------


def test_unknown_key_is_an_error_with_its_position(tmp_path):
    text = "speccheck_project: 1\nrules:\n  skip: []\n  sikp: [wiring]\n"
    path = write(tmp_path, text)
    assert messages(path) == [f"{path}:4:3: unknown key 'sikp' in rules; did you mean 'skip'?"]


def test_unknown_top_level_key(tmp_path):
    path = write(tmp_path, "speccheck_project: 1\nfail-level: warning\n")
    (msg,) = messages(path)
    assert msg.startswith(f"{path}:2:1: unknown key 'fail-level'") and "fail_level" in msg


def test_unknown_rule_ids_and_families(tmp_path):
    text = (
        "speccheck_project: 1\nrules:\n  skip: [wiring.tank-retrun, wirng]\n"
        "  levels:\n    wiring.cap-volts: note\n  settings:\n    wiring.crystal-dcc: {x: 1}\n"
    )
    path = write(tmp_path, text)
    got = messages(path)
    assert (
        f"{path}:3:10: unknown rule id 'wiring.tank-retrun' in rules.skip; did you mean 'wiring.tank-return'?"
        in got
    )
    assert any(
        m.startswith(f"{path}:3:30: unknown rule family 'wirng' in rules.skip; did you mean 'wiring'")
        for m in got
    )
    assert any(m.startswith(f"{path}:5:5: unknown rule id 'wiring.cap-volts' in rules.levels") for m in got)
    assert any(
        m.startswith(f"{path}:7:5: unknown rule id 'wiring.crystal-dcc' in rules.settings") for m in got
    )


def test_unknown_setting_and_wrong_type(tmp_path):
    text = "speccheck_project: 1\nrules:\n  settings:\n    wiring.cap-voltage:\n      deratng: 0.7\n"
    path = write(tmp_path, text)
    (msg,) = messages(path)
    assert msg.startswith(
        f"{path}:5:7: rule wiring.cap-voltage has no setting 'deratng' (it has: derating, "
        "tantalum_derating); did you mean 'derating'?"
    )
    path = write(
        tmp_path, "speccheck_project: 1\nrules:\n  settings:\n    wiring.cap-voltage: {derating: high}\n"
    )
    (msg,) = messages(path)
    assert (
        msg == f"{path}:4:36: wiring.cap-voltage.derating should be a number like its default 0.8, got 'high'"
    )
    path = write(tmp_path, "speccheck_project: 1\nrules:\n  settings:\n    wiring.tank-return: {x: 1}\n")
    assert messages(path) == [f"{path}:4:5: rule wiring.tank-return has no settings"]


def test_bad_values_and_names_from_the_schema(tmp_path):
    path = write(tmp_path, "speccheck_project: 1\nfail_level: fatal\n")
    (msg,) = messages(path)
    assert msg.startswith(f"{path}:2:13: 'fatal' is not allowed here; use one of: note, warning, error")
    path = write(tmp_path, "speccheck_project: 1\nrules:\n  levels:\n    Wiring.Tank: note\n")
    (msg,) = messages(path)
    assert msg.startswith(f"{path}:4:5: 'Wiring.Tank' is not a valid name here")
    path = write(tmp_path, "speccheck_project: 2\n")
    (msg,) = messages(path)
    assert msg.startswith(f"{path}:1:20: ")
    path = write(tmp_path, "fail_level: error\n")
    assert messages(path) == [f"{path}:1:1: missing key 'speccheck_project'"]


def test_yaml_trouble_and_input_skips_are_errors(tmp_path):
    path = write(tmp_path, "speccheck_project: 1\nfail_level: error\nfail_level: note\n")
    (msg,) = messages(path)
    assert msg.startswith(f"{path}:3:1: key 'fail_level' appears twice")
    path = write(tmp_path, "speccheck_project: 1\nrules:\n  skip: [input]\n")
    (msg,) = messages(path)
    assert msg.startswith(f"{path}:3:10: 'input' cannot be skipped")


def test_cli_reports_a_bad_project_file_and_exits_two(tmp_path):
    (tmp_path / ".git").mkdir()
    path = write(tmp_path, "speccheck_project: 1\nrulez: {}\n")
    plan = tmp_path / "p.yaml"
    plan.write_text(CLEAN.read_text("utf-8"))
    res = run("check", plan)
    assert res.exit_code == 2
    assert f"speccheck: {path}:2:1: unknown key 'rulez'" in res.output
    assert run("check", "--no-config", plan).exit_code == 0
    assert run("check", "--config", tmp_path / "none.yaml", plan).exit_code == 2


# ---- precedence -------------------------------------------------------------------------------


def test_option_then_file_then_default(tmp_path):
    (tmp_path / ".git").mkdir()
    plan = tmp_path / "p.yaml"
    # one warning only: C30's polarity unstated
    plan.write_text(edited(CLEAN.read_text("utf-8"), "ends: [V12, GND], positive: V12}", "ends: [V12, GND]}"))
    assert run("check", plan).exit_code == 0  # default fail level: error
    write(tmp_path, "speccheck_project: 1\nfail_level: warning\n")
    assert run("check", plan).exit_code == 1  # the file
    assert run("check", "--fail-level", "error", plan).exit_code == 0  # the option wins
    other = write(tmp_path, "speccheck_project: 1\nfail_level: error\n", "other.yaml")
    assert run("check", "--config", other, plan).exit_code == 0  # the named file instead of the found one
    assert run("check", "--skip", "wiring.polarity-unstated", plan).exit_code == 0
    res = run("check", "--skip", "wiring.polarity-unstatd", plan)
    assert res.exit_code == 2 and "did you mean 'wiring.polarity-unstated'" in res.output


def test_paths_from_two_projects_are_refused(tmp_path):
    for name in ("a", "b"):
        (tmp_path / name / ".git").mkdir(parents=True)
        write(tmp_path / name, "speccheck_project: 1\n")
        (tmp_path / name / "p.yaml").write_text(CLEAN.read_text("utf-8"))
    res = run("check", tmp_path / "a" / "p.yaml", tmp_path / "b" / "p.yaml")
    assert res.exit_code == 2 and "different projects" in res.output


# ---- globs ------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "pattern, path, hit",
    [
        ("builds/**", "builds/a.yaml", True),
        ("builds/**/*.yaml", "builds/x/y/a.yaml", True),
        ("builds/*.yaml", "builds/x/a.yaml", False),
        ("archive", "archive/old.yaml", True),
        ("**/draft-*.yaml", "builds/draft-1.yaml", True),
        ("*.yaml", "builds/a.yaml", False),
        ("./builds/a.yaml", "builds/a.yaml", True),
        ("build?/a.yaml", "builds/a.yaml", True),
    ],
)
def test_glob_dialect(pattern, path, hit):
    assert glob_match(pattern, path) is hit


def test_defaults_want_everything():
    assert Settings().wants("anything.yaml")


def test_setting_out_of_range_is_refused_at_its_position(tmp_path):
    from click.testing import CliRunner

    from speccheck.cli import main

    (tmp_path / "plan.yaml").write_text(
        (Path(__file__).parent.parent / "examples" / "vhf-monitor-455k.yaml").read_text("utf-8")
    )
    (tmp_path / "speccheck-project.yaml").write_text(
        "speccheck_project: 1\nrules:\n  settings:\n    wiring.cap-voltage: {derating: 1.5}\n"
        "    freqplan.mixer-spurs: {order: 1000}\n"
    )
    res = CliRunner().invoke(main, ["check", str(tmp_path)])
    assert res.exit_code == 2
    assert "speccheck-project.yaml:4:" in res.output and "is a share and must be at most 1" in res.output
    assert "speccheck-project.yaml:5:" in res.output and "must be at most 15" in res.output
