"""The Markdown report: cautions first, then each file in the order a beginner should act (fix these
first, worth a look, good to know, waived), related findings under their common cause, the design
sheet as open tables, and rule ids, document paths and settings only at the end.

The structure is checked on the rendered tree of a CommonMark parser (markdown-it-py), so a
finding's numbers, fix, bench check and why must really nest under it."""

import re

import pytest
from click.testing import CliRunner
from conftest import CLEAN, EXAMPLES, edited

from speccheck import engine, registry
from speccheck.cli import main
from speccheck.config import Settings
from speccheck.reporters import RunInfo, markdown, reading

markdown_it = pytest.importorskip("markdown_it")
SyntaxTreeNode = pytest.importorskip("markdown_it.tree").SyntaxTreeNode

BEGINNER = EXAMPLES / "beginner-plan.yaml"
C33 = (
    "  C33: {kind: capacitor, value: 220 uF, dielectric: electrolytic, voltage_rating: 10 V, ends: [V12, "
    "GND], positive: V12}"
)
CRYSTAL = "  X1: {kind: crystal, frequency: 10.245 MHz,"
OFF_CRYSTAL = "  X1: {kind: crystal, frequency: 10.232 MHz,"


def render(results, settings=None, run=None):
    return markdown.render(results, settings or Settings(), run)


def tree(text: str) -> SyntaxTreeNode:
    return SyntaxTreeNode(markdown_it.MarkdownIt("commonmark").parse(text))


def headings(node, level: str) -> list[str]:
    return [inline_text(n) for n in node.walk() if n.type == "heading" and n.tag == level]


def inline_text(node) -> str:
    return "".join(n.content for n in node.walk() if n.type == "text" or n.type == "code_inline")


def finding_items(node) -> list:
    """Top-level list items that are findings (their first line says the level)."""
    out = []
    for lst in (n for n in node.walk() if n.type == "bullet_list"):
        for item in lst.children:
            first = item.children[0] if item.children else None
            if (
                first is not None
                and first.type == "paragraph"
                and re.match(r"(must fix|worth a look|good to know|waived)", inline_text(first))
            ):
                out.append(item)
    return out


def sections(text: str) -> dict:
    """### heading -> the text under it (up to the next ### or ##)."""
    out = {}
    for m in re.finditer(r"^### ([^\n]+)\n(.*?)(?=^### |^## |\Z)", text, re.MULTILINE | re.DOTALL):
        out[m.group(1)] = m.group(2)
    return out


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


def test_reading_order_errors_first_then_warnings_notes_sheet_settings():
    out = render([engine.check_file(BEGINNER)])
    order = headings(tree(out), "h3")
    assert order == ["Fix these first", "Worth a look", "Good to know", "The design sheet", "Settings used"]
    assert headings(tree(out), "h2") == [f"{BEGINNER} (my first IF converter)"]
    parts = sections(out)
    assert "wiring.tank-return" not in parts["Fix these first"]  # rule ids only at the end
    assert "must fix: Quadrature tank must return to the supply rail" in parts["Fix these first"]
    assert "worth a look" not in parts["Fix these first"].split("####")[1].split("\n- ")[1][:20]


def test_details_nest_under_their_finding_in_commonmark():
    result = engine.check_file(BEGINNER)
    items = finding_items(tree(render([result])))
    assert len(items) == len(result.findings)
    tank = registry.get("wiring.tank-return")
    first = next(i for i in items if inline_text(i.children[0]).startswith(
        "must fix: Quadrature tank must return to the supply rail"
    ))
    nested = [c for c in first.children if c.type == "bullet_list"]
    assert len(nested) == 1, "numbers, fix, bench check and why must be one list nested in the finding's item"
    labels = [inline_text(li.children[0]).split(":", 1)[0] for li in nested[0].children]
    assert labels == ["The numbers", "What to do", "Check it on the bench", "Why it matters"]
    why = inline_text(nested[0].children[3].children[0])
    assert " ".join(tank.explanation.split()) in why
    assert "pin U1.quad; coil far end GND; supply V6 6 V" in inline_text(nested[0].children[0])


def test_related_findings_share_one_group():
    out = render([engine.check_file(BEGINNER)])
    parts = sections(out)
    crystal = (
        parts["Fix these first"].split("#### X1, the crystal (3 findings, one cause)", 1)[1].split("####")[0]
    )
    assert "DC standing across a crystal" in crystal
    assert crystal.count(": Crystal load capacitance differs") == 2
    coupling = (
        parts["Fix these first"]
        .split("#### C20, the capacitor (2 findings, one cause)", 1)[1]
        .split("####")[0]
    )
    assert "Speaker coupling capacitor orientation" in coupling
    assert "Output coupling capacitor against the lowest audio frequency" in coupling


def test_a_crystal_that_moves_the_if_off_the_filter_is_one_cause(tmp_path):
    plan = tmp_path / "plan.yaml"
    plan.write_text(edited(BEGINNER.read_text("utf-8"), CRYSTAL, OFF_CRYSTAL))
    result = engine.check_file(plan)
    assert any(f.rule == "freqplan.filter-fit" and f.level == "error" for f in result.findings)
    groups = reading.read(result).first
    crystal = next(g for g in groups if any(f.rule == "freqplan.filter-fit" for f in g.findings))
    assert {f.rule for f in crystal.findings} >= {
        "freqplan.filter-fit",
        "freqplan.crystal-load",
        "wiring.crystal-dc",
    }
    first = sections(render([result]))["Fix these first"]
    group = first.split("#### X1, the crystal (4 findings, one cause)", 1)[1].split("####")[0]
    assert group.index("must fix: ") < group.index("worth a look: Crystal load capacitance differs")


def test_no_setting_names_or_document_paths_before_the_settings_part():
    result = engine.check_file(BEGINNER)
    out = render([result])
    body, tail = out.split("### Settings used", 1)
    names = {name for r in registry.load_rules().values() for name in r.settings if "_" in name}
    for name in names:
        assert not re.search(rf"\b{re.escape(name)}\b", body.replace("\\_", "_")), name
    assert not reading._PATH.search(body.replace("\\_", "_")), reading._PATH.search(body.replace("\\_", "_"))
    for f in result.findings:
        assert f"`{f.location.path}`" in tail and f"`{f.rule}`" in tail


def test_plain_words_drop_settings_and_paths_but_keep_plan_names():
    spurs = registry.get("freqplan.mixer-spurs")
    said = reading.plain(spurs.explanation, spurs)
    assert "close_factor" not in said and "harmonic_order" not in said and "setting order" not in said
    assert reading.plain("Give chain[1].oscillator.stray.") == "Give the stray of the oscillator."
    assert reading.plain("State 'lowest_audio:' under build") == "State “lowest audio” under build"
    assert (
        reading.plain("pin osc_base of U1; U1.osc_base; f_c = 1/(2 pi R_L C)")
        == "pin osc_base of U1; U1.osc_base; f_c = 1/(2 pi R_L C)"
    )


def test_why_is_told_once_per_rule_and_file():
    out = render([engine.check_file(BEGINNER)])
    explanation = " ".join(registry.get("wiring.cap-voltage").explanation.split())
    assert out.count(explanation) == 1
    assert (
        '    - **Why it matters:** as explained above for "Capacitor voltage rating against the voltage '
        'across it".' in out
    )


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
    waived = sections(out)["Set aside on purpose"]
    assert "- **waived error** (line 43, item " in waived
    assert "    - **Waived because:** stand-in" in waived
    assert re.search(
        r"^\| \d+ \| `wiring.cap-voltage` \| error \| `parts.C33.voltage_rating` \| 43:83 \| stand-in \|$",
        out,
        re.MULTILINE,
    )
    assert re.search(r"^\| error \| \d+ \| 1 \|$", out, re.MULTILINE)
    assert "(1 waived)" in out


def test_design_sheet_is_open_tables_per_section_and_clean_files_say_so():
    result = engine.check_file(CLEAN)
    out = render([result])
    assert f"Clean: `{CLEAN}`." in out
    assert "No open findings" in out
    assert "<details>" not in out
    sheet = sections(out)["The design sheet"]
    sections_seen = re.findall(r"^#### (.+)$", sheet, re.MULTILINE)
    assert sections_seen == list(dict.fromkeys(markdown.md(e.section) for e in result.sheet))
    e = result.sheet[0]
    assert f"| {markdown.md(e.owner)} | {markdown.md(e.value.name)} | {markdown.md(e.value.text)} |" in sheet
    tables = [n for n in tree(out).walk() if n.type == "table"]
    assert tables == []  # CommonMark has no tables: they stay plain text lines, still readable


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
