"""Stable fingerprints, and baselines built on them: only new findings are reported."""

import json

import pytest
from click.testing import CliRunner
from conftest import EXAMPLES, check, edited

from speccheck import baseline, engine
from speccheck.cli import main

BEGINNER = EXAMPLES / "beginner-plan.yaml"


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def prints(result) -> dict:
    """(rule, document path, n-th of those) -> fingerprint."""
    out, seen = {}, {}
    for f in result.findings:
        key = (f.rule, f.location.path)
        seen[key] = seen.get(key, -1) + 1
        out[key + (seen[key],)] = f.fingerprint
    return out


# ---- fingerprints --------------------------------------------------------------------------

def test_fingerprint_survives_lines_inserted_above_and_unrelated_edits():
    text = BEGINNER.read_text("utf-8")
    before = check(text, "builds/plan.yaml")
    moved = edited(text, "build:\n", "# a comment block added later\n# by a second author\n\nbuild:\n")
    moved = edited(moved, "  C30:", "  R99: {kind: resistor, value: 1 kohm, ends: [V12, LED]}\n  C30:")
    moved = edited(moved, "ambient_max: 30 degC", "ambient_max: 35 degC")
    after = check(moved, "builds/plan.yaml")
    shared = set(prints(before)) & set(prints(after))
    assert len(shared) >= 6
    for key in shared:
        assert prints(before)[key] == prints(after)[key], key
    moved_lines = {f.location.path: f.location.line for f in after.findings}
    assert any(moved_lines[p] != f.location.line for p, f in
               ((f.location.path, f) for f in before.findings) if p in moved_lines)


def test_fingerprint_ignores_the_numbers_but_not_the_rule_file_or_place():
    text = BEGINNER.read_text("utf-8")
    a = check(text, "builds/plan.yaml")
    # the same mistake with other numbers keeps its identity
    b = check(edited(text, "voltage_rating: 10 V, ends: [V12, GND], positive: V12}",
                     "voltage_rating: 6.3 V, ends: [V12, GND], positive: V12}"), "builds/plan.yaml")
    key = ("wiring.cap-voltage", "parts.C33.voltage_rating", 0)
    assert prints(a)[key] == prints(b)[key]
    c = check(text, "builds/other.yaml")
    assert prints(a)[key] != prints(c)[key]
    assert len({f.fingerprint for f in a.findings}) == len(a.findings)


def test_fingerprint_is_the_same_from_a_sub_folder(tmp_path, monkeypatch):
    (tmp_path / ".git").mkdir()
    (tmp_path / "builds").mkdir()
    plan = tmp_path / "builds" / "plan.yaml"
    plan.write_text(BEGINNER.read_text("utf-8"))
    monkeypatch.chdir(tmp_path)
    top = json.loads(run("check", "--format", "json", "builds/plan.yaml").stdout)
    monkeypatch.chdir(tmp_path / "builds")
    inside = json.loads(run("check", "--format", "json", "plan.yaml").stdout)
    assert [f["fingerprint"] for f in top["files"][0]["findings"]] == \
        [f["fingerprint"] for f in inside["files"][0]["findings"]]


# ---- the baseline file -----------------------------------------------------------------------

def test_baseline_roundtrip_and_hide():
    result = engine.check_file(BEGINNER)
    data = json.loads(baseline.dumps([result], engine.Settings()))
    assert data["baseline"] == "speccheck-baseline" and data["version"] == 1
    assert data["count"] == len(result.findings)
    assert {e["fingerprint"] for e in data["findings"]} == {f.fingerprint for f in result.findings}
    entry = next(e for e in data["findings"] if e["rule"] == "wiring.tank-return")
    assert entry["file"] == "examples/beginner-plan.yaml" and entry["line"] == 55
    known = {f.fingerprint for f in result.findings if f.rule != "wiring.tank-return"}
    hidden = baseline.hide([result], known)
    assert hidden == {result.path: len(known)}
    assert [f.rule for f in result.findings] == ["wiring.tank-return"]


@pytest.mark.parametrize("content, says", [
    ("not json", "not JSON"),
    ('{"some": "thing"}', 'no "baseline": "speccheck-baseline" key'),
    ('{"baseline": "speccheck-baseline", "version": 9, "findings": []}', "baseline version 9"),
    ('{"baseline": "speccheck-baseline", "version": 1, "findings": [{"rule": "x"}]}',
     "findings[0] has no fingerprint"),
])
def test_a_bad_baseline_is_refused_with_exit_two(tmp_path, content, says):
    path = tmp_path / "base.json"
    path.write_text(content)
    with pytest.raises(baseline.BaselineError, match=says.replace("[", r"\[").replace("]", r"\]")):
        baseline.load(path)
    res = run("check", "--baseline", path, BEGINNER)
    assert res.exit_code == 2 and says in res.output
    assert run("check", "--baseline", tmp_path / "missing.json", BEGINNER).exit_code == 2


def test_cli_baseline_then_check_reports_only_new_findings(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / ".git").mkdir()
    plan = tmp_path / "plan.yaml"
    text = BEGINNER.read_text("utf-8")
    plan.write_text(text)
    res = run("baseline", "plan.yaml", "-o", "base.json")
    assert res.exit_code == 0, res.output
    count = len(engine.check_file("plan.yaml").findings)
    assert f"speccheck: wrote {count} findings from 1 file to base.json" in res.output
    res = run("check", "--baseline", "base.json", "plan.yaml")
    assert res.exit_code == 0, res.output
    assert res.output.splitlines()[-1] == (f"speccheck: 1 file checked: 0 errors, 0 warnings, 0 notes "
                                           f"({count} hidden by the baseline)")
    # a new mistake: the regulator's output capacitor C31 now rated 4 V on the 6 V rail
    plan.write_text(edited(text, "voltage_rating: 6.3 V", "voltage_rating: 4 V"))
    res = run("check", "--baseline", "base.json", "plan.yaml")
    assert res.exit_code == 1
    shown = [line for line in res.output.splitlines() if line.startswith("plan.yaml:")]
    assert len(shown) == 1 and "error wiring.cap-voltage C31 sees 6 V but is rated 4 V" in shown[0]
    assert res.output.splitlines()[-1].endswith(f"({count - 1} hidden by the baseline)")
