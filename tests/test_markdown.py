"""The Markdown report: cautions first, summary and counts, findings by stage with the why, the
fix and the bench check, waived findings marked, the design sheet."""

import re

from click.testing import CliRunner
from conftest import CLEAN, EXAMPLES, edited

from speccheck import engine, registry
from speccheck.cli import main
from speccheck.config import Settings
from speccheck.reporters import RunInfo, markdown

BEGINNER = EXAMPLES / "beginner-plan.yaml"
C33 = (
    "  C33: {kind: capacitor, value: 220 uF, dielectric: electrolytic, voltage_rating: 10 V, ends: [V12, "
    "GND], positive: V12}"
)


def render(results, settings=None, run=None):
    return markdown.render(results, settings or Settings(), run)


def test_summary_line_and_table_of_counts():
    result = engine.check_file(BEGINNER)
    out = render([result])
    lines = out.splitlines()
    assert lines[0] == "# speccheck review"
    counts = {lv: sum(1 for f in result.findings if f.level == lv) for lv in ("error", "warning", "note")}
    said = ", ".join(
        f"{counts[lv]} {lv}{'' if counts[lv] == 1 else 's'}" for lv in ("error", "warning", "note")
    )
    assert f"**1 file checked: {said}**; fail level: error." in lines
    head = lines.index("| level | open | waived |")
    assert lines[head + 1] == "|---|---:|---:|"
    assert lines[head + 2 : head + 5] == [
        f"| error | {counts['error']} | 0 |",
        f"| warning | {counts['warning']} | 0 |",
        f"| note | {counts['note']} | 0 |",
    ]


def test_findings_grouped_by_stage_with_numbers_why_fix_and_bench_check():
    result = engine.check_file(BEGINNER)
    out = render([result])
    assert f"## `{BEGINNER}` (my first IF converter)" in out
    section = out.split("### Stage: discriminator", 1)[1].split("\n### ", 1)[0]
    tank = registry.get("wiring.tank-return")
    assert (
        "- **error** `wiring.tank-return` at line 55, col 79 (`parts.L2.ends`): L2 returns U1.quad to GND "
        "(0 V)"
        in section
    )
    assert "  - **Numbers:** pin U1.quad; coil far end GND; supply V6 6 V" in section
    assert f"  - **Why:** {' '.join(tank.explanation.split())}" in section
    assert f"  - **Fix:** {tank.fix}" in section
    assert f"  - **Verify on the bench:** {tank.verify}" in section
    stages = re.findall(r"^### Stage: (.+)$", out, re.MULTILINE)
    assert len(stages) == len(set(stages))  # each stage once
    assert set(stages) == {f.stage or "general" for f in result.findings}


def test_why_is_told_once_per_rule_and_file():
    result = engine.check_file(BEGINNER)
    out = render([result])
    explanation = " ".join(registry.get("wiring.cap-voltage").explanation.split())
    assert out.count(explanation) == 1
    assert "  - **Why:** as for the first `wiring.cap-voltage` finding above." in out


def test_cautions_come_first():
    result = engine.check_file(CLEAN)
    result.cautions.append("Mains voltage inside: unplug and discharge before work.")
    out = render([result])
    first = out.index("Safety first")
    assert first < out.index("1 file checked")
    assert f"> For `{CLEAN}`:" in out and "> - Mains voltage inside: unplug and discharge before work." in out
    assert "local electrical codes and licensed practice" in out


def test_waived_findings_stay_marked_with_their_reason(tmp_path):
    plan = tmp_path / "plan.yaml"
    plan.write_text(
        edited(BEGINNER.read_text("utf-8"), C33, C33 + "  # waive wiring.cap-voltage because stand-in")
    )
    result = engine.check_file(plan)
    out = render([result])
    assert "- waived error `wiring.cap-voltage` at line 43, col 83" in out
    assert "  - **Waived because:** stand-in" in out
    assert "| error | " in out and re.search(r"^\| error \| \d+ \| 1 \|$", out, re.MULTILINE)
    assert "(1 waived)" in out


def test_design_sheet_and_clean_files():
    result = engine.check_file(CLEAN)
    out = render([result])
    assert f"Clean: `{CLEAN}`." in out
    assert "No open findings" in out
    if result.sheet:  # the sheet holds what the rules derived
        e = result.sheet[0]
        assert "<details><summary>Design sheet:" in out
        assert f"| {markdown.md(e.section)} | {markdown.md(e.owner)} | {markdown.md(e.value.name)} | " in out


def test_skipped_files_and_baseline_are_said():
    result = engine.check_file(BEGINNER)
    out = render(
        [result],
        run=RunInfo(
            skipped=["notes.yaml"], excluded=["old/x.yaml"], baseline="b.json", hidden={str(BEGINNER): 3}
        ),
    )
    assert "- note: `notes.yaml` skipped, not a build file (no `build_spec:` key)" in out
    assert "- note: `old/x.yaml` skipped, excluded by the project file" in out
    assert "3 hidden by the baseline" in out


def test_text_from_the_plan_cannot_break_the_markdown():
    assert markdown.md("a|b *c* _d_ <b> `x` [l](u)") == "a\\|b \\*c\\* \\_d\\_ \\<b\\> \\`x\\` \\[l\\](u)"


def test_cli_markdown_format():
    res = CliRunner().invoke(main, ["check", "--format", "markdown", str(BEGINNER)])
    assert res.exit_code == 1
    assert res.stdout.startswith("# speccheck review\n")
