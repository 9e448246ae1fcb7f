"""Waiver comments: syntax, placement, the review.* findings about waivers, and what waived means."""

import pytest
from click.testing import CliRunner
from conftest import check, edited, line_of, of

from speccheck.cli import main
from speccheck.config import Settings
from speccheck.waivers import parse_comment

C31 = (
    "  C31: {kind: capacitor, value: 100 uF, dielectric: electrolytic, voltage_rating: 16 V, ends: [V6, "
    "GND], positive: V6}"
)
C31_LOW = C31.replace("voltage_rating: 16 V", "voltage_rating: 6.3 V")  # 6 V on a 6.3 V part: over 80 %


@pytest.fixture
def thin(clean_text):
    """The clean example with one warning: C31 runs at 95 % of its rating."""
    return edited(clean_text, C31, C31_LOW)


# ---- the syntax ---------------------------------------------------------------------------

def test_parse_comment_reads_ids_and_reason():
    assert parse_comment("waive wiring.cap-voltage because the part is a bench stand-in") == (
        ["wiring.cap-voltage"], "the part is a bench stand-in", None)
    ids, reason, problem = parse_comment("waive wiring.cap-voltage, wiring.crystal-dc because test fixture")
    assert ids == ["wiring.cap-voltage", "wiring.crystal-dc"] and reason == "test fixture" and problem is None


@pytest.mark.parametrize("text, problem", [
    ("waive wiring.cap-voltage", "gives no reason"),
    ("waive wiring.cap-voltage because", "gives no reason after 'because'"),
    ("waive wiring.cap-voltage: rated for surge", "without the word 'because'"),
])
def test_parse_comment_without_a_reason(text, problem):
    ids, reason, found = parse_comment(text)
    assert ids == ["wiring.cap-voltage"] and reason is None
    assert problem in found


@pytest.mark.parametrize("text", ["waive this later", "the waiver office", "C31 rating: see datasheet",
                                  "waiver wiring.cap-voltage because x"])
def test_ordinary_comments_are_not_waivers(text):
    assert parse_comment(text) is None


# ---- placement ----------------------------------------------------------------------------

def test_trailing_waiver_waives_the_finding_on_its_line(thin):
    text = edited(
        thin, C31_LOW, C31_LOW + "  # waive wiring.cap-voltage because the 6.3 V part is a stand-in"
    )
    found = of(check(text), "wiring.cap-voltage")
    assert len(found) == 1
    assert found[0].waived == "the 6.3 V part is a stand-in"
    assert found[0].location.line == line_of(text, "C31:")
    assert not of(check(text), "review.waiver-unused")


def test_waiver_on_the_comment_line_just_above(thin):
    text = edited(thin, C31_LOW, "  # waive wiring.cap-voltage because bench stand-in\n" + C31_LOW)
    assert of(check(text), "wiring.cap-voltage")[0].waived == "bench stand-in"


def test_a_run_of_comment_lines_above_counts_but_a_blank_line_ends_it(thin):
    text = edited(
        thin,
        C31_LOW,
        "  # waive wiring.cap-voltage because bench stand-in\n  # (ordered a 16 V part)\n" + C31_LOW,
    )
    assert of(check(text), "wiring.cap-voltage")[0].waived == "bench stand-in"
    text = edited(thin, C31_LOW, "  # waive wiring.cap-voltage because bench stand-in\n\n" + C31_LOW)
    result = check(text)
    assert of(result, "wiring.cap-voltage")[0].waived is None
    unused = of(result, "review.waiver-unused")
    assert len(unused) == 1 and unused[0].location.line == line_of(text, "# waive wiring.cap-voltage")
    assert "matches no finding" in unused[0].message


def test_waiver_above_a_block_key_covers_the_findings_inside_it(clean_text):
    # DC across the crystal: its far end on GND instead of V6; the finding points at `ends:`, two
    # lines into the block; the waiver sits above `X1:`.
    text = edited(clean_text, "    ends: [U1.osc_base, V6]", "    ends: [U1.osc_base, GND]")
    text = edited(
        text, "  X1:\n", "  # waive wiring.crystal-dc because this oscillator is a test fixture\n  X1:\n"
    )
    found = of(check(text), "wiring.crystal-dc")
    assert len(found) == 1 and found[0].location.line == line_of(text, "ends: [U1.osc_base, GND]")
    assert found[0].waived == "this oscillator is a test fixture"


def test_a_waiver_names_the_rule_it_waives(thin):
    text = edited(thin, C31_LOW, C31_LOW + "  # waive wiring.crystal-dc because wrong rule")
    result = check(text)
    assert of(result, "wiring.cap-voltage")[0].waived is None
    unused = of(result, "review.waiver-unused")
    assert [u.message for u in unused] == [
        f"waiver for wiring.crystal-dc matches no finding: it covers line {line_of(text, 'C31:')}, where "
        "wiring.crystal-dc found nothing"
    ]


def test_one_waiver_may_name_several_rules(thin):
    text = edited(thin, "ends: [V12, GND], positive: V12}", "ends: [V12, GND]}")  # C30: polarity unstated
    text = edited(
        text, "  C30:", "  # waive wiring.polarity-unstated, wiring.cap-voltage because bench jig\n  C30:"
    )
    result = check(text)
    assert of(result, "wiring.polarity-unstated")[0].waived == "bench jig"
    unused = of(result, "review.waiver-unused")
    assert len(unused) == 1 and "wiring.cap-voltage" in unused[0].message  # C30 itself is within rating


# ---- waivers that are themselves findings -------------------------------------------------


def test_a_waiver_without_a_reason_waives_nothing_and_is_a_finding(thin):
    text = edited(thin, C31_LOW, C31_LOW + "  # waive wiring.cap-voltage")
    result = check(text)
    assert of(result, "wiring.cap-voltage")[0].waived is None
    (bad,) = of(result, "review.waiver-reason")
    assert bad.level == "warning"
    assert bad.location.line == line_of(text, "# waive wiring.cap-voltage")
    assert bad.location.col == text.splitlines()[bad.location.line - 1].index("#") + 1
    assert bad.message.startswith("waiver for wiring.cap-voltage gives no reason, so it waives nothing")
    assert bad.stage == "review"


def test_an_unknown_rule_in_a_waiver_is_a_finding_with_a_suggestion(thin):
    text = edited(thin, C31_LOW, C31_LOW + "  # waive wiring.cap-volts because typo")
    (bad,) = of(check(text), "review.waiver-unknown-rule")
    assert (
        bad.message == "waiver for wiring.cap-volts: there is no rule 'wiring.cap-volts'; did you mean "
        "'wiring.cap-voltage'?"
    )
    assert bad.location.line == line_of(text, "C31:")


def test_input_findings_cannot_be_waived(clean_text):
    text = edited(
        clean_text, "  lowest_audio: 300 Hz", "  lowest_audio: 300 kF  # waive input.unit because test"
    )
    result = check(text)
    assert of(result, "input.unit")[0].waived is None
    (bad,) = of(result, "review.waiver-unknown-rule")
    assert "input findings cannot be waived" in bad.message


def test_no_unused_waiver_for_a_rule_that_is_switched_off(thin):
    text = edited(thin, C31_LOW, "  # waive wiring.crystal-dc because not this one\n" + C31_LOW)
    assert of(check(text, settings=Settings(disabled={"wiring.crystal-dc"})), "review.waiver-unused") == []


def test_quoted_hash_is_not_a_waiver(thin):
    text = edited(
        thin,
        C31_LOW,
        C31_LOW.replace("positive: V6}", 'positive: V6, note: "# waive wiring.cap-voltage because quoted"}'),
    )
    assert of(check(text), "wiring.cap-voltage")[0].waived is None


# ---- what waived means ---------------------------------------------------------------------


def test_waived_findings_stay_counted_and_do_not_fail_the_check(tmp_path, clean_text):
    # C33 at 12 V on a 10 V part: an error, waived with a reason
    c33 = (
        "  C33: {kind: capacitor, value: 220 uF, dielectric: electrolytic, voltage_rating: 10 V, ends: "
        "[V12, GND], positive: V12}"
    )
    plan = tmp_path / "plan.yaml"
    text = edited(
        clean_text, "  C32:", c33 + "  # waive wiring.cap-voltage because a 10 V part is all we have\n  C32:"
    )
    plan.write_text(text)
    res = CliRunner().invoke(main, ["check", str(plan)])
    assert res.exit_code == 0, res.output
    assert f"{plan}:{line_of(text, 'C33:')}:" in res.output
    assert "[waived: a 10 V part is all we have]" in res.output
    assert (
        res.output.splitlines()[-1] == "speccheck: 1 file checked: 0 errors, 0 warnings, 0 notes (1 waived)"
    )
    plan.write_text(text.replace("  # waive wiring.cap-voltage because a 10 V part is all we have", ""))
    assert CliRunner().invoke(main, ["check", str(plan)]).exit_code == 1
