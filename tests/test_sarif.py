"""SARIF 2.1.0: valid against the OASIS schema (tests/data, draft-04), and the right content."""

import json
from pathlib import Path

import jsonschema
import pytest
from click.testing import CliRunner
from conftest import EXAMPLES, edited, line_of

from speccheck import engine, registry
from speccheck.cli import main
from speccheck.config import Settings
from speccheck.reporters import RunInfo, sarif

SCHEMA = json.loads((Path(__file__).parent / "data" / "sarif-schema-2.1.0.json").read_text("utf-8"))
BEGINNER = EXAMPLES / "beginner-plan.yaml"
C33 = (
    "  C33: {kind: capacitor, value: 220 uF, dielectric: electrolytic, voltage_rating: 10 V, ends: [V12, "
    "GND], positive: V12}"
)


def valid(doc):
    errors = sorted(jsonschema.Draft4Validator(SCHEMA).iter_errors(doc), key=lambda e: list(e.absolute_path))
    assert errors == [], "\n".join(f"{list(e.absolute_path)}: {e.message[:200]}" for e in errors[:5])
    return doc


@pytest.fixture
def plans(tmp_path, monkeypatch):
    """A folder with the beginner's plan and a waived copy, as the working folder."""
    monkeypatch.chdir(tmp_path)
    text = BEGINNER.read_text("utf-8")
    (tmp_path / "builds").mkdir()
    (tmp_path / "builds" / "beginner.yaml").write_text(text, encoding="utf-8")
    waived = edited(text, C33, C33 + "  # waive wiring.cap-voltage because the 10 V part is a bench stand-in")
    (tmp_path / "builds" / "waived.yaml").write_text(waived, encoding="utf-8")
    return text, waived


def sarif_of(*args):
    res = CliRunner().invoke(main, ["check", "--format", "sarif", *map(str, args)])
    assert res.exit_code in (0, 1), res.output
    return valid(json.loads(res.stdout)), res


def test_the_schema_copy_is_the_oasis_one():
    assert SCHEMA["id"].startswith("https://docs.oasis-open.org/sarif/sarif/v2.1.0/")
    jsonschema.Draft4Validator.check_schema(SCHEMA)


def test_one_run_with_every_rule_in_the_driver(plans):
    doc, res = sarif_of("builds")
    assert res.exit_code == 1
    assert doc["version"] == "2.1.0" and len(doc["runs"]) == 1
    driver = doc["runs"][0]["tool"]["driver"]
    assert driver["name"] == "speccheck"
    rules = registry.load_rules()
    assert [r["id"] for r in driver["rules"]] == sorted(rules)
    tank = next(r for r in driver["rules"] if r["id"] == "wiring.tank-return")
    meta = rules["wiring.tank-return"]
    assert tank["shortDescription"]["text"] == meta.title
    assert tank["fullDescription"]["text"] == meta.explanation
    assert tank["defaultConfiguration"]["level"] == "error"
    assert f"Fix: {meta.fix}" in tank["help"]["text"] and meta.source in tank["help"]["text"]
    assert f"Verify on the bench: {meta.verify}" in tank["help"]["text"]
    assert tank["name"] == "WiringTankReturn"


def test_results_carry_rule_level_location_and_numbers(plans):
    text, _ = plans
    doc, _ = sarif_of("builds/beginner.yaml")
    run = doc["runs"][0]
    rules = run["tool"]["driver"]["rules"]
    result = next(r for r in run["results"] if r["ruleId"] == "wiring.tank-return")
    assert rules[result["ruleIndex"]]["id"] == "wiring.tank-return"
    assert result["level"] == "error"
    assert result["message"]["text"].startswith("L2 returns U1.quad to GND (0 V)")
    loc = result["locations"][0]["physicalLocation"]
    assert loc["artifactLocation"]["uri"] == "builds/beginner.yaml"
    assert loc["artifactLocation"]["uriBaseId"] == "%SRCROOT%"
    # optional; an absolute path of this machine has no place in the log
    assert "originalUriBaseIds" not in run
    assert str(Path.cwd()) not in json.dumps(doc)
    line = line_of(text, "L2: {kind: inductor")
    col = text.splitlines()[line - 1].index("[U1.quad, GND]") + 1
    assert loc["region"] == {
        "startLine": line,
        "startColumn": col,
        "endLine": line,
        "endColumn": col + len("[U1.quad, GND]"),
    }
    assert result["locations"][0]["logicalLocations"][0]["fullyQualifiedName"] == "parts.L2.ends"
    props = result["properties"]
    assert props["stage"] == "discriminator"
    assert {"name": "supply V6", "value": 6.0, "unit": "V", "text": "6 V"} in props["values"]
    assert run["columnKind"] == "unicodeCodePoints"
    assert run["invocations"][0]["executionSuccessful"] is True


def test_fingerprints_are_the_findings_own(plans):
    doc, _ = sarif_of("builds/beginner.yaml")
    found = engine.check_file("builds/beginner.yaml")
    assert sorted(
        r["partialFingerprints"]["speccheckFinding/v1"] for r in doc["runs"][0]["results"]
    ) == sorted(f.fingerprint for f in found.findings)
    assert len({f.fingerprint for f in found.findings}) == len(found.findings)


def test_waived_finding_is_a_suppression_with_its_justification(plans):
    doc, _res = sarif_of("builds/waived.yaml")
    results = doc["runs"][0]["results"]
    waived = [r for r in results if "suppressions" in r]
    assert len(waived) == 1
    assert waived[0]["ruleId"] == "wiring.cap-voltage" and "C33" in waived[0]["message"]["text"]
    assert waived[0]["suppressions"] == [
        {"kind": "inSource", "status": "accepted", "justification": "the 10 V part is a bench stand-in"}
    ]
    # the same findings as the beginner's plan, one of them waived
    assert len(results) == len(engine.check_file("builds/beginner.yaml").findings)


def test_cautions_are_visible_as_note_results_and_notifications(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    result = engine.check_file(BEGINNER)
    result.cautions.append("Hazardous voltage: unplug and discharge before work.")
    doc = valid(json.loads(sarif.render([result], Settings())))
    run = doc["runs"][0]
    notes = [r for r in run["results"] if r["ruleId"] == "review.safety-caution"]
    assert len(notes) == 1 and notes[0]["level"] == "note"
    assert (
        notes[0]["message"]["text"] == "Safety caution: Hazardous voltage: unplug and discharge before work."
    )
    assert run["results"][0] is notes[0]  # first, before the findings
    told = run["invocations"][0]["toolExecutionNotifications"]
    assert any("Hazardous voltage" in n["message"]["text"] and n["level"] == "warning" for n in told)


def test_overrides_skipped_files_and_baseline_are_reported(plans):
    settings = Settings(levels={"wiring.tank-return": "warning"}, disabled={"wiring.crystal-dc"})
    result = engine.check_file("builds/beginner.yaml", settings)
    run_info = RunInfo(
        skipped=["builds/notes.yaml"], baseline="base.json", hidden={"builds/beginner.yaml": 2}
    )
    doc = valid(json.loads(sarif.render([result], settings, run_info)))
    inv = doc["runs"][0]["invocations"][0]
    by_id = {o["descriptor"]["id"]: o["configuration"] for o in inv["ruleConfigurationOverrides"]}
    assert by_id == {"wiring.tank-return": {"level": "warning"}, "wiring.crystal-dc": {"enabled": False}}
    texts = [n["message"]["text"] for n in inv["toolExecutionNotifications"]]
    assert "builds/notes.yaml: skipped, not a build file (no 'build_spec:' key)" in texts
    assert "2 findings hidden by the baseline base.json" in texts
    assert all(r["baselineState"] == "new" for r in doc["runs"][0]["results"])
    tank = next(r for r in doc["runs"][0]["results"] if r["ruleId"] == "wiring.tank-return")
    assert tank["level"] == "warning"


def test_unreadable_file_and_files_outside_the_working_folder(tmp_path, monkeypatch):
    (tmp_path / "work").mkdir()
    monkeypatch.chdir(tmp_path / "work")
    bad = tmp_path / "bad.yaml"
    bad.write_bytes(b"build_spec: 1\n\xff\xfe\n")
    result = engine.check_file(bad)
    doc = valid(json.loads(sarif.render([result], Settings())))
    run = doc["runs"][0]
    assert run["invocations"][0]["executionSuccessful"] is False
    uri = run["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"]
    assert uri == {"uri": "../bad.yaml", "uriBaseId": "%SRCROOT%", "index": 0}
    assert str(tmp_path) not in json.dumps(doc)


def test_sarif_to_a_file_says_the_totals_on_stderr(plans, tmp_path):
    res = CliRunner().invoke(main, ["check", "--format", "sarif", "-o", "results.sarif", "builds"])
    assert res.exit_code == 1
    doc = valid(json.loads((tmp_path / "results.sarif").read_text("utf-8")))
    open_ = [r for r in doc["runs"][0]["results"] if "suppressions" not in r]
    count = {level: sum(1 for r in open_ if r["level"] == level) for level in ("error", "warning", "note")}
    said = ", ".join(
        f"{count[lv]} {lv}{'' if count[lv] == 1 else 's'}" for lv in ("error", "warning", "note")
    )
    assert f"speccheck: 2 files checked: {said} (1 waived); report written to results.sarif" in res.stderr
