"""The review workflow end to end, as a club's build repository meets it: a git repository with
a project file and several build files, checked from its root in every format; the baseline;
exit codes that follow the fail level; many files in parallel; the hook file; the starters."""

import json
import re
import shutil
import subprocess
import sys
from pathlib import Path

import jsonschema
import pytest
from click.testing import CliRunner
from conftest import CLEAN, EXAMPLES, ROOT, edited, line_of

from speccheck import engine, starters
from speccheck.cli import main

SARIF_SCHEMA = json.loads((Path(__file__).parent / "data" / "sarif-schema-2.1.0.json").read_text("utf-8"))
BEGINNER = EXAMPLES / "beginner-plan.yaml"
C31 = (
    "  C31: {kind: capacitor, value: 100 uF, dielectric: electrolytic, voltage_rating: 16 V, ends: [V6, "
    "GND], positive: V6}"
)
C33 = (
    "  C33: {kind: capacitor, value: 220 uF, dielectric: electrolytic, voltage_rating: 10 V, ends: [V12, "
    "GND], positive: V12}"
)
PROJECT = """\
# the club's project settings
speccheck_project: 1
fail_level: error
rules:
  levels:
    review: error          # a waiver without a reason fails the check here
  settings:
    wiring.cap-voltage: {derating: 0.8}
files:
  exclude: ["builds/archive/**"]
"""


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture
def repo(tmp_path, monkeypatch):
    """A git repository holding the club's builds, as the working folder."""
    try:
        subprocess.run(["git", "init", "-q", str(tmp_path)], check=True, capture_output=True)
    except (OSError, subprocess.CalledProcessError):  # no git on this machine: the folder is what matters
        (tmp_path / ".git").mkdir(exist_ok=True)
    monkeypatch.chdir(tmp_path)
    clean = CLEAN.read_text("utf-8")
    builds = tmp_path / "builds"
    (builds / "club").mkdir(parents=True)
    (builds / "archive").mkdir()
    (tmp_path / "speccheck-project.yaml").write_text(PROJECT)
    (builds / "clean.yaml").write_text(clean)
    (builds / "club" / "starter.yaml").write_text(starters.text("single-conversion"))
    (builds / "beginner.yaml").write_text(BEGINNER.read_text("utf-8"))
    # 6 V on a 6.3 V part: a warning, waived with a reason
    low = C31.replace("16 V", "6.3 V")
    (builds / "waived.yaml").write_text(
        edited(
            clean, C31, low + "  # waive wiring.cap-voltage because a 10 V part is on order; the rail is 6 V"
        )
    )
    # 12 V on a 10 V part: an error, "waived" without a reason
    (builds / "unwaived.yaml").write_text(
        edited(clean, "  C32:", C33 + "  # waive wiring.cap-voltage\n  C32:")
    )
    (builds / "archive" / "old.yaml").write_text(BEGINNER.read_text("utf-8"))
    (builds / "notes.yaml").write_text("shopping: [ferrite beads, solder wick]\n")
    return tmp_path


# ---- reading each format back into the same shape: (file, line, col, rule, waived reason) ----

TEXT_LINE = re.compile(
    r"^(?P<file>[^\s:][^:]*):(?P<line>\d+):(?P<col>\d+): (?P<level>error|warning|note) "
    r"(?P<rule>\S+) (?P<message>.*?)(?: \[waived: (?P<reason>.*)\])?$"
)
MD_FILE = re.compile(r"^## `(?P<file>[^`]+)`")
# The Markdown report's "settings used" table: item, rule, level, place, line:col, waived because.
MD_FINDING = re.compile(
    r"^\| \d+ \| `(?P<rule>[^`]+)` \| (?P<level>\w+) \| [^|]* \| (?P<line>\d+):(?P<col>\d+) \| "
    r"(?P<reason>.*) \|$"
)
HTML_FILE = re.compile(r'<p class="meta">Plan file <code>(?P<file>[^<]+)</code>')
HTML_FINDING = re.compile(
    r'<tr><td><a href="#[^"]*">\d+</a></td><td><code>(?P<rule>[^<]+)</code></td>'
    r"<td>(?P<level>\w+)</td><td><code>[^<]*</code></td><td>(?P<line>\d+):(?P<col>\d+)</td>"
    r"<td>(?P<reason>[^<]*)</td></tr>"
)


def from_text(out):
    found = set()
    for line in out.splitlines():
        m = TEXT_LINE.match(line)
        if m:
            found.add((m["file"], int(m["line"]), int(m["col"]), m["rule"], m["level"], m["reason"]))
    return found


def from_json(out):
    doc = json.loads(out)
    return {
        (
            f["location"]["file"],
            f["location"]["line"],
            f["location"]["column"],
            f["rule"],
            f["level"],
            f["waiver_reason"],
        )
        for r in doc["files"]
        for f in r["findings"]
    }


def from_sarif(out):
    doc = json.loads(out)
    errors = list(jsonschema.Draft4Validator(SARIF_SCHEMA).iter_errors(doc))
    assert errors == [], errors[0].message
    found = set()
    for r in doc["runs"][0]["results"]:
        if r["ruleId"] == "review.safety-caution":
            continue
        loc = r["locations"][0]["physicalLocation"]
        reason = r["suppressions"][0]["justification"] if r.get("suppressions") else None
        found.add(
            (
                loc["artifactLocation"]["uri"],
                loc["region"]["startLine"],
                loc["region"]["startColumn"],
                r["ruleId"],
                r["level"],
                reason,
            )
        )
    return found


def from_markdown(out):
    found, file = set(), None
    for line in out.splitlines():
        m = MD_FILE.match(line)
        if m:
            file = m["file"]
        m = MD_FINDING.match(line)
        if m:
            reason = m["reason"].strip().replace("\\", "") or None
            found.add((file, int(m["line"]), int(m["col"]), m["rule"], m["level"], reason))
    return found


def from_html(out):
    import html as html_mod

    found, file = set(), None
    for line in out.splitlines():
        m = HTML_FILE.search(line)
        if m:
            file = html_mod.unescape(m["file"])
        for m in HTML_FINDING.finditer(line):
            found.add(
                (
                    file,
                    int(m["line"]),
                    int(m["col"]),
                    m["rule"],
                    m["level"],
                    html_mod.unescape(m["reason"]) or None,
                )
            )
    return found


def test_every_format_agrees_on_the_same_findings(repo):
    outs = {}
    for fmt in ("text", "json", "sarif", "markdown", "html"):
        res = run("check", "--format", fmt, ".")
        assert res.exit_code == 1, (fmt, res.output)
        outs[fmt] = res.stdout
    text, js, sa, md, page = (
        from_text(outs["text"]),
        from_json(outs["json"]),
        from_sarif(outs["sarif"]),
        from_markdown(outs["markdown"]),
        from_html(outs["html"]),
    )
    assert text == js == sa == md == page
    files = {f for f, *_ in text}
    assert files == {"builds/beginner.yaml", "builds/waived.yaml", "builds/unwaived.yaml"} | (
        {"builds/clean.yaml", "builds/club/starter.yaml"} & files
    )  # clean ones may carry notes only
    assert not any(
        lv in ("error", "warning")
        for f, _, _, _, lv, _ in text
        if f in ("builds/clean.yaml", "builds/club/starter.yaml")
    )

    waived_text = (repo / "builds" / "waived.yaml").read_text()
    waived = [x for x in text if x[5]]
    assert waived == [
        (
            "builds/waived.yaml",
            line_of(waived_text, "C31:"),
            waived_text.splitlines()[line_of(waived_text, "C31:") - 1].index("voltage_rating:") + 17,
            "wiring.cap-voltage",
            "warning",
            "a 10 V part is on order; the rail is 6 V",
        )
    ]
    unwaived_text = (repo / "builds" / "unwaived.yaml").read_text()
    c33_line = line_of(unwaived_text, "C33:")
    assert (
        "builds/unwaived.yaml",
        c33_line,
        unwaived_text.splitlines()[c33_line - 1].index("voltage_rating:") + 17,
        "wiring.cap-voltage",
        "error",
        None,
    ) in text
    reason = [x for x in text if x[3] == "review.waiver-reason"]
    assert reason == [
        (
            "builds/unwaived.yaml",
            c33_line,
            unwaived_text.splitlines()[c33_line - 1].index("#") + 1,
            "review.waiver-reason",
            "error",
            None,
        )
    ]  # raised to error by the project file

    doc = json.loads(outs["json"])
    assert doc["project_file"].endswith("speccheck-project.yaml")
    assert doc["skipped"] == ["builds/notes.yaml"] and doc["excluded"] == ["builds/archive/old.yaml"]
    assert doc["totals"]["waived"] == 1
    assert "builds/notes.yaml: note: skipped, not a build file (no 'build_spec:' key)" in outs["text"]
    assert "builds/archive/old.yaml: note: skipped, excluded by the project file" in outs["text"]
    assert "(1 waived)" in outs["text"].splitlines()[-1]


def test_the_baseline_hides_old_findings_and_shows_a_new_one(repo):
    res = run("baseline", ".", "-o", "speccheck-baseline.json")
    assert res.exit_code == 0, res.output
    res = run("check", "--baseline", "speccheck-baseline.json", ".")
    assert res.exit_code == 0, res.output
    assert from_text(res.stdout) == set()
    old = json.loads(Path("speccheck-baseline.json").read_text())["count"]
    assert res.stdout.splitlines()[-1].endswith(f"({old} hidden by the baseline)")
    # lines added above the old findings keep them hidden; a new mistake shows
    clean = Path("builds/clean.yaml")
    text = clean.read_text()
    text = edited(text, "build_spec: 2\n", "# reviewed at the club night\nbuild_spec: 2\n")
    text = edited(text, "ends: [U1.osc_base, V6]", "ends: [U1.osc_base, GND]")
    clean.write_text(text)
    begin = Path("builds/beginner.yaml")
    begin.write_text("# kept as written\n\n" + begin.read_text())
    for fmt in ("text", "sarif"):
        res = run("check", "--format", fmt, "--baseline", "speccheck-baseline.json", ".")
        assert res.exit_code == 1  # crystal DC is an error: the new mistake fails the check
        new = from_text(res.stdout) if fmt == "text" else from_sarif(res.stdout)
        assert [(f, line, rule) for f, line, _, rule, _, _ in new] == [
            ("builds/clean.yaml", line_of(text, "ends: [U1.osc_base, GND]"), "wiring.crystal-dc")
        ]
    assert (
        run("check", "--baseline", "speccheck-baseline.json", "--fail-level", "warning", ".").exit_code == 1
    )


def test_exit_codes_follow_the_fail_level(repo):
    assert run("check", ".").exit_code == 1  # errors in the beginner's plan and in unwaived.yaml
    assert run("check", "builds/waived.yaml").exit_code == 0  # its one warning is waived
    assert run("check", "--fail-level", "warning", "builds/waived.yaml").exit_code == 0  # waived never counts
    assert run("check", "builds/clean.yaml", "builds/club").exit_code == 0
    Path("speccheck-project.yaml").write_text(PROJECT.replace("fail_level: error", "fail_level: warning"))
    assert run("check", "builds/unwaived.yaml").exit_code == 1
    Path("speccheck-project.yaml").write_text("speccheck_project: 1\nrules:\n  levels: {review: note}\n")
    res = run("check", "--skip", "wiring.cap-voltage", "builds/unwaived.yaml")
    assert res.exit_code == 0, res.output  # the error is skipped; the review note does not fail
    assert run("check", "no-such-folder").exit_code == 2
    Path("speccheck-project.yaml").write_text("speccheck_project: 1\nfail_level: sometimes\n")
    assert run("check", ".").exit_code == 2


def test_excluded_or_non_build_files_alone_are_not_trouble(repo):
    res = run("check", "builds/archive/old.yaml")
    assert res.exit_code == 0 and "excluded by the project file" in res.output
    res = run("check", "--build-files-only", "builds/notes.yaml", "builds/clean.yaml")
    assert res.exit_code == 0 and "builds/notes.yaml: note: skipped" in res.output
    assert run("check", "--build-files-only", "builds/notes.yaml").exit_code == 0
    assert run("check", "builds/notes.yaml").exit_code == 1  # named without the option: checked, and wrong


def test_parallel_check_gives_the_same_report_in_path_order(repo):
    for i in range(6):
        shutil.copy("builds/beginner.yaml", f"builds/club/copy-{5 - i}.yaml")
    one = run("check", "--format", "json", "--jobs", "1", "builds", ".")
    many = run("check", "--format", "json", "--jobs", "3", ".", "builds")
    assert one.exit_code == many.exit_code == 1
    assert json.loads(one.stdout) == json.loads(many.stdout)
    paths = [f["path"] for f in json.loads(many.stdout)["files"]]
    assert paths == sorted(paths) and len(paths) == len(set(paths))
    assert run("check", "--jobs", "0", "builds").exit_code == 1


# ---- starters --------------------------------------------------------------------------------


@pytest.mark.parametrize("layout", sorted(starters.LAYOUTS))
def test_each_starter_checks_clean_as_written(tmp_path, layout):
    out = tmp_path / f"{layout}.yaml"
    res = run("starter", "--layout", layout, "-o", out)
    assert res.exit_code == 0, res.output
    result = engine.check_file(out)
    assert result.checked
    bad = [f for f in result.findings if f.level in ("error", "warning")]
    assert bad == [], "\n".join(f"{f.location.line}: {f.rule} {f.message}" for f in bad)
    assert out.read_text().startswith("# speccheck starter:")
    assert run("check", out).exit_code == 0


def test_mains_starter_says_its_cautions():
    assert "can kill" in starters.text("mains-bench") and "local electrical code" in starters.text(
        "mains-bench"
    )


def test_starter_command_lists_refuses_and_protects_files(tmp_path):
    res = run("starter", "--list")
    assert res.exit_code == 0 and all(name in res.output for name in starters.LAYOUTS)
    assert run("starter").exit_code == 2
    res = run("starter", "--layout", "single-conversio")
    assert res.exit_code == 2 and "did you mean 'single-conversion'" in res.output
    out = tmp_path / "mine.yaml"
    out.write_text("my own plan\n")
    res = run("starter", "--layout", "single-conversion", "-o", out)
    assert res.exit_code == 2 and out.read_text() == "my own plan\n"
    assert run("starter", "--layout", "single-conversion", "-o", out, "--force").exit_code == 0
    assert out.read_text() == starters.text("single-conversion")
    assert run("starter", "--layout", "mains-bench").stdout == starters.text("mains-bench")


# ---- hook file and start-up ------------------------------------------------------------------


def test_pre_commit_hook_definition():
    from ruamel.yaml import YAML

    hooks = YAML(typ="safe").load((ROOT / ".pre-commit-hooks.yaml").read_text("utf-8"))
    (hook,) = hooks
    assert hook["id"] == "speccheck" and hook["language"] == "python"
    assert hook["entry"].split()[:2] == ["speccheck", "check"]
    assert re.search(hook["files"], "builds/plan.yaml") and re.search(hook["files"], "a/b.yml")
    assert not re.search(hook["files"], "README.md")
    # every option in the entry is one `check` accepts
    res = CliRunner().invoke(main, [*hook["entry"].split()[1:], "--help"])
    assert res.exit_code == 0


def test_cli_start_up_stays_light():
    code = (
        "import sys, speccheck.cli; heavy = [m for m in ('pint', 'jsonschema', 'ruamel.yaml', "
        "'concurrent.futures', 'speccheck.engine') if m in sys.modules]; print(heavy)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"
