"""Hostile build files, as a pull request from anyone may bring them: each class of attack gets a
positioned finding or a one-line error with exit 1 or 2, quickly, with nothing of any file outside
the project in any report, and every write is atomic and asked for."""

import json
import os
import subprocess
import sys
import time
from pathlib import Path

import pytest
from click.testing import CliRunner
from conftest import CLEAN, check, edited, line_of, of

from speccheck import engine, files
from speccheck.cli import main
from speccheck.config import Settings
from speccheck.reporters import markdown, sarif, text

FORMATS = ("text", "json", "sarif", "markdown")
SECRET = "HOSTILE_SECRET_VALUE_42"


def run(*args, **kwargs):
    return CliRunner().invoke(main, [str(a) for a in args], **kwargs)


def all_reports(paths, *extra) -> str:
    """Every report format of one check, joined (to search for leaked text)."""
    return "\n".join(run("check", "--format", fmt, *extra, *paths).output for fmt in FORMATS)


@pytest.fixture
def project(tmp_path, monkeypatch):
    """A repository (with .git) holding the clean plan; the working folder is its root."""
    repo = tmp_path / "repo"
    (repo / ".git").mkdir(parents=True)
    (repo / "builds").mkdir()
    (repo / "builds" / "plan.yaml").write_text(CLEAN.read_text("utf-8"), "utf-8")
    outside = tmp_path / "outside"
    outside.mkdir()
    (outside / "secret.yaml").write_text(f"{SECRET}: 1\npassword: {SECRET}\n", "utf-8")
    monkeypatch.chdir(repo)
    return repo


def check_plan(plan: Path, repo: Path):
    return engine.check_file(plan, Settings(root=str(repo)))


def with_parts_files(repo: Path, *entries: str) -> Path:
    plan = repo / "builds" / "plan.yaml"
    listed = ", ".join(json.dumps(e) for e in entries)
    plan.write_text(
        edited(CLEAN.read_text("utf-8"), "build_spec: 2\n", f"build_spec: 2\nparts_files: [{listed}]\n")
    )
    return plan


# ---- 1. unit texts that would make the unit library compute a tower -----------------------


@pytest.mark.parametrize(
    "field, value",
    [
        ("  frequency: 10.7 MHz\n", "1 Hz**3**3**3**3"),
        ("  frequency: 10.7 MHz\n", "1 Hz^3^3^3^3"),
        ("  frequency: 10.7 MHz\n", "1 MHz**2**2**2**2**2**2"),
        ("  frequency: 10.7 MHz\n", "1 Hz*1e300*1e300"),
        ("  frequency: 10.7 MHz\n", "1 Hz Hz Hz Hz Hz s s"),
    ],
)
def test_unit_towers_are_refused_at_their_position_at_once(field, value):
    plan = edited(CLEAN.read_text("utf-8"), field, f'  frequency: "{value}"\n')
    engine.warm_up()
    start = time.process_time()
    found = of(check(plan), "input.unit")
    assert time.process_time() - start < 1.0
    assert found and found[0].location.line == line_of(plan, value)
    assert found[0].location.path == "source.frequency"


def test_a_tower_in_an_inductance_factor_is_refused():
    plan = edited(
        CLEAN.read_text("utf-8"),
        "parts:\n",
        "parts:\n  L9: {kind: inductor, value: 1 uH, ends: [GND, GND2],"
        ' core: {size: 0.5 in, material: ferrite, al: "4.9 nH/turn^2**3**3**3"}}\n',
    )
    found = of(check(plan), "input.unit")
    assert found and "power to a power" in found[0].message
    assert found[0].location.line == line_of(plan, "turn^2**3")


# ---- 2. files outside the repository --------------------------------------------------------


@pytest.mark.parametrize(
    "entry",
    [
        "/etc/passwd",
        "/proc/self/environ",
        "../../outside/secret.yaml",
        "../../../../../../../../etc/hostname",
        "~/secret.yaml",
        "/dev/zero",
    ],
)
def test_parts_files_outside_the_project_are_refused_by_the_entry_as_written(project, entry):
    plan = with_parts_files(project, entry)
    found = of(check_plan(plan, project), "input.parts-file")
    assert len(found) == 1 and found[0].location.path == "parts_files[0]"
    assert found[0].message.startswith(f"parts_files[0] '{entry}' ")
    reports = all_reports(["builds/plan.yaml"])
    assert SECRET not in reports and "root:x:" not in reports and str(project.parent) not in reports


def test_a_link_out_of_the_project_is_refused_whether_or_not_its_target_exists(project):
    (project / "builds" / "there.yaml").symlink_to(project.parent / "outside" / "secret.yaml")
    (project / "builds" / "nowhere.yaml").symlink_to(project.parent / "outside" / "missing.yaml")
    plan = with_parts_files(project, "there.yaml", "nowhere.yaml")
    found = of(check_plan(plan, project), "input.parts-file")
    assert [f.message.split("' ", 1)[1] for f in found] == [found[0].message.split("' ", 1)[1]] * 2
    assert SECRET not in all_reports(["builds/plan.yaml"])


def test_a_file_without_the_parts_marker_is_refused_unread(project):
    (project / "builds" / "notes.yaml").write_text(f"{SECRET}: 1\nprofiles: {{{SECRET}: x}}\n\xff")
    with_parts_files(project, "notes.yaml")
    reports = all_reports(["builds/plan.yaml"])
    assert "is not a parts file" in reports and SECRET not in reports


def test_a_marked_parts_file_inside_the_project_is_used(project):
    (project / "builds" / "mine.yaml").write_text(
        "parts_spec: 1\nprofiles:\n  my-amp:\n    class: audio-power-amp\n    pins: {in: {}}\n"
    )
    plan = with_parts_files(project, "mine.yaml")
    result = check_plan(plan, project)
    assert not of(result, "input.parts-file")


def test_a_build_file_link_out_of_the_checked_folder_is_skipped_with_a_note(project):
    (project.parent / "outside" / "other.yaml").write_text(
        CLEAN.read_text("utf-8").replace("name: ", f"name: {SECRET} ", 1)
    )
    (project / "builds" / "linked.yaml").symlink_to(project.parent / "outside" / "other.yaml")
    res = run("check", "builds")
    assert "builds/linked.yaml: note: skipped, a link that leads out of the checked folder" in res.output
    assert SECRET not in res.output and res.exit_code == 0


# ---- 3. reads with no bound, or that block --------------------------------------------------


@pytest.mark.parametrize("device", ["/dev/zero", "/dev/urandom"])
def test_a_device_is_refused_without_reading_it(device):
    if not os.path.exists(device):
        pytest.skip(f"{device} is missing here")
    res = run("check", device)
    assert res.exit_code == 2
    assert "input.unreadable the file is a device, not a regular file" in res.output
    res = run("check", "--baseline", device, CLEAN)
    assert res.exit_code == 2 and "the baseline is a device" in res.output


def test_a_huge_sparse_file_costs_no_more_than_the_limit(tmp_path):
    big = tmp_path / "big.yaml"
    with open(big, "wb") as fh:
        fh.truncate(3_000_000_000)
    start = time.perf_counter()
    res = run("check", big)
    assert time.perf_counter() - start < 2.0
    assert res.exit_code == 2 and "is larger than 1000 kB" in res.output
    with pytest.raises(files.FileTrouble, match="larger than"):
        files.read_bytes_bounded(big, 10)


def in_thread(fn, seconds: float = 30.0):
    """Run fn in a daemon thread; fail (instead of hanging the suite) if it has not ended in time."""
    import threading

    out: list = []
    worker = threading.Thread(target=lambda: out.append(fn()), daemon=True)
    worker.start()
    worker.join(seconds)
    assert not worker.is_alive(), "blocked"
    return out[0]


@pytest.fixture
def folder_with_a_pipe(tmp_path):
    folder = tmp_path / "builds"
    folder.mkdir()
    (folder / "a.yaml").write_text(CLEAN.read_text("utf-8"))
    (folder / "c.yaml").write_text(CLEAN.read_text("utf-8"))
    os.mkfifo(folder / "b.yaml")
    os.mkfifo(tmp_path / "named.yaml")
    return folder


def _walk_report(raw: str, folder: Path) -> dict:
    report = json.loads(raw)
    assert [Path(f["path"]).name for f in report["files"]] == ["a.yaml", "c.yaml"]
    assert report["set_aside"] == [
        {"path": str(folder / "b.yaml"), "reason": "is a named pipe, not a regular file"}
    ]
    return report


def test_a_pipe_named_yaml_never_blocks_the_run_and_no_result_is_lost(folder_with_a_pipe):
    folder = folder_with_a_pipe
    walked = in_thread(lambda: run("check", "--format", "json", folder))
    _walk_report(walked.output, folder)
    assert walked.exit_code == 0
    named = in_thread(
        lambda: run("check", "--format", "json", folder.parent / "named.yaml", folder / "a.yaml")
    )
    report = json.loads(named.output)
    assert named.exit_code == 2 and len(report["files"]) == 2
    assert report["files"][1]["findings"][0]["message"] == "the file is a named pipe, not a regular file"


def test_a_pipe_blocks_no_worker_process(folder_with_a_pipe):
    cmd = [
        sys.executable,
        "-m",
        "speccheck",
        "check",
        "--jobs",
        "2",
        "--format",
        "json",
        str(folder_with_a_pipe),
        str(folder_with_a_pipe.parent / "named.yaml"),
    ]
    done = subprocess.run(cmd, check=False, capture_output=True, text=True, timeout=60)
    assert done.returncode == 2
    assert [Path(f["path"]).name for f in json.loads(done.stdout)["files"]] == [
        "a.yaml",
        "c.yaml",
        "named.yaml",
    ]


def test_a_pipe_given_as_a_parts_file_is_refused(project):
    os.mkfifo(project / "builds" / "pipe.yaml")
    plan = with_parts_files(project, "pipe.yaml")
    found = of(check_plan(plan, project), "input.parts-file")
    assert found[0].message == "parts_files[0] 'pipe.yaml' is a named pipe, not a regular file"


# ---- 4. report spoofing through control characters and markup ------------------------------

HOSTILE_KEY = '"C99\\n\\n## \\u2705 all clear, approved @maintainer\\e]0;owned\\a\\e[2J\\x9b\\r\\x7f"'


def hostile_result():
    plan = edited(
        CLEAN.read_text("utf-8"),
        "parts:\n",
        f"parts:\n  {HOSTILE_KEY}: {{kind: capacitor, value: 100 nF, ends: [NOWHERE, GND]}}\n",
    )
    result = check(plan)
    assert any("C99" in f.message for f in result.findings)
    return result


def test_text_report_shows_control_characters_and_forges_no_line():
    shown = text.render([hostile_result()], Settings())
    assert not any((ord(ch) < 0x20 and ch != "\n") or 0x7F <= ord(ch) < 0xA0 for ch in shown)
    assert "\\x1b]0;owned\\x07" in shown and "\\x9b" in shown and "\\r" in shown
    assert all(line.startswith(("plan.yaml:", "    ", "speccheck:")) for line in shown.splitlines())


def test_markdown_report_gains_no_heading_mention_or_raw_escape():
    page = markdown.render([hostile_result()], Settings())
    assert "\x1b" not in page and "\x9b" not in page and "\r" not in page
    assert not any(line.lstrip("> -").startswith("#") and "approved" in line for line in page.splitlines())
    assert "@maintainer" not in page and "@&#8203;maintainer" in page


def strings(node):
    if isinstance(node, dict):
        for v in node.values():
            yield from strings(v)
    elif isinstance(node, list):
        for v in node:
            yield from strings(v)
    elif isinstance(node, str):
        yield node


def test_json_and_sarif_keep_the_text_as_data_with_every_control_escaped():
    from speccheck.reporters import json as json_reporter

    result = hostile_result()
    for render in (sarif.render, json_reporter.render):
        raw = render([result], Settings())
        assert not any((ord(ch) < 0x20 and ch != "\n") or 0x7F <= ord(ch) < 0xA0 for ch in raw)
        assert any("@maintainer\x1b]0;owned\x07\x1b[2J\x9b\r\x7f" in t for t in strings(json.loads(raw)))


# ---- 5. writes that clobber or leave half a file --------------------------------------------


def test_check_never_writes_onto_a_checked_file_even_with_force(tmp_path):
    plan = tmp_path / "plan.yaml"
    plan.write_text(CLEAN.read_text("utf-8"))
    for extra in ([], ["--force"]):
        res = run("check", plan, "-o", plan, *extra)
        assert res.exit_code == 2 and "which this run reads" in res.output
    assert plan.read_text() == CLEAN.read_text("utf-8")


def test_baseline_and_reports_overwrite_only_with_force(tmp_path):
    plan, other = tmp_path / "plan.yaml", tmp_path / "other.yaml"
    plan.write_text(CLEAN.read_text("utf-8"))
    other.write_text(CLEAN.read_text("utf-8"))
    res = run("baseline", plan, "-o", other)
    assert res.exit_code == 2 and "exists; add --force" in res.output
    assert other.read_text() == CLEAN.read_text("utf-8")
    assert run("baseline", plan, "-o", other, "--force").exit_code == 0
    assert json.loads(other.read_text())["baseline"] == "speccheck-baseline"
    report = tmp_path / "r.md"
    assert run("check", plan, "--format", "markdown", "-o", report).exit_code == 0
    assert run("check", plan, "--format", "markdown", "-o", report).exit_code == 2
    assert run("check", plan, "--format", "markdown", "-o", report, "--force").exit_code == 0


def test_a_write_that_fails_part_way_leaves_the_old_file_and_no_litter(tmp_path, monkeypatch):
    target = tmp_path / "base.json"
    target.write_text("old")

    def broken_fsync(fd):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "fsync", broken_fsync)
    with pytest.raises(files.FileTrouble, match="No space left"):
        files.write_atomic(target, "new" * 1000, force=True)
    assert target.read_text() == "old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["base.json"]



@pytest.mark.parametrize("command", [["check", "builds/plan.yaml"], ["check", "--format", "json", "builds"],
                                     ["baseline", "builds"], ["sheet", "builds/plan.yaml"]])
def test_no_write_lands_on_a_parts_file_the_check_read(project, command):
    parts = project / "builds" / "mine.yaml"
    parts.write_text("parts_spec: 1\nprofiles:\n  my-amp:\n    class: audio-power-amp\n    pins: {in: {}}\n")
    with_parts_files(project, "mine.yaml")
    before = parts.read_bytes()
    for extra in ([], ["--force"]):
        res = run(*command, "-o", "builds/mine.yaml", *extra)
        assert res.exit_code == 2 and "mine.yaml, which this run reads" in res.output
    assert parts.read_bytes() == before

def test_starter_follows_no_link_to_create_a_file(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "away").mkdir()
    Path("link.yaml").symlink_to(tmp_path / "away" / "made.yaml")
    res = run("starter", "--layout", "single-conversion", "-o", "link.yaml")
    assert res.exit_code == 2 and "symbolic link" in res.output
    assert not (tmp_path / "away" / "made.yaml").exists()
    assert run("starter", "--layout", "single-conversion", "-o", "link.yaml", "--force").exit_code == 0
    assert not Path("link.yaml").is_symlink() and not (tmp_path / "away" / "made.yaml").exists()


# ---- 6. tags of other programs --------------------------------------------------------------


def test_a_language_tag_on_a_value_is_refused_at_its_position():
    plan = edited(CLEAN.read_text("utf-8"), "  frequency: 10.7 MHz\n", "  frequency: !!python/str 10.7 MHz\n")
    found = of(check(plan), "input.not-accepted")
    assert found and "!!python/str" in found[0].message
    assert (found[0].location.line, found[0].location.col) == (line_of(plan, "!!python/str"), 14)


def test_a_tagged_document_root_is_refused():
    found = of(check("--- !!python/object/apply:os.system\n- echo\n"), "input.not-accepted")
    assert found and found[0].location.line == 1



def test_an_explicit_core_tag_is_honoured_like_quotes():
    # YAML 1.2.2, section 10.3: `!!str 3` is the string "3", as '"3"' is; `!!int "7"` the integer 7;
    # an untagged plain 3 resolves by the core schema to the integer
    from speccheck import yamlnodes

    doc = yamlnodes.parse('a: !!str 3\nb: 3\nc: "3"\nd: !!int "7"\ne: !!str true\nf: [1, !!str 2.5]\n')
    assert doc.problems == []
    assert doc.data == {"a": "3", "b": 3, "c": "3", "d": 7, "e": "true", "f": [1, "2.5"]}

# ---- 7. supplies that mean nothing ----------------------------------------------------------


@pytest.mark.parametrize("volts", ["0 V", "-12 V"])
def test_a_supply_of_zero_or_negative_volts_is_refused(volts):
    plan = edited(CLEAN.read_text("utf-8"), "  voltage: 12 V\n", f"  voltage: {volts}\n")
    found = of(check(plan), "input.value-range")
    assert found and found[0].location.path == "supply.voltage"
    assert found[0].location.line == line_of(plan, f"voltage: {volts}")


# ---- the pull-request run -------------------------------------------------------------------


def test_the_project_file_names_the_baseline_and_the_hook_passes_over_its_own_files(project):
    plan = project / "builds" / "plan.yaml"
    plan.write_text(edited(plan.read_text(), "ends: [V12, GND], positive: V12}", "ends: [V12, GND]}"))
    (project / "speccheck-project.yaml").write_text("speccheck_project: 1\nbaseline: known.json\n")
    assert run("baseline", "builds").exit_code == 0
    assert (project / "known.json").exists()
    (project / ".pre-commit-config.yaml").write_text("repos: []\n")
    (project / "notes.yaml").write_text("just: notes\n")
    res = run(
        "check",
        "--build-files-only",
        "builds/plan.yaml",
        ".pre-commit-config.yaml",
        "speccheck-project.yaml",
        "notes.yaml",
    )
    assert res.exit_code == 0, res.output
    assert "hidden by the baseline" in res.output
    assert "pre-commit" not in res.output and "speccheck-project" not in res.output
    assert res.output.count("files checked") + res.output.count("file checked") == 1


def test_a_project_baseline_outside_the_project_is_refused(project):
    (project / "speccheck-project.yaml").write_text(
        "speccheck_project: 1\nbaseline: ../outside/secret.yaml\n"
    )
    res = run("check", "builds")
    assert res.exit_code == 2 and "speccheck-project.yaml:2:11: baseline" in res.output
    assert SECRET not in res.output


def test_sarif_holds_no_absolute_path(project):
    doc = run("check", "--format", "sarif", str(project / "builds")).output
    assert str(project) not in doc and "file://" not in doc


def test_the_shipped_parts_file_serves_a_build_and_a_folder_walk_passes_it_over_quietly(project):
    import shutil

    from conftest import EXAMPLES

    (project / "builds" / "parts").mkdir()
    shutil.copy(EXAMPLES / "parts" / "bench-amp-profiles.yaml", project / "builds" / "parts")
    plan = with_parts_files(project, "parts/bench-amp-profiles.yaml")
    plan.write_text(edited(plan.read_text(), "U2: {profile: audio-power-amp-lv,", "U2: {profile: bench-amp,"))
    result = check_plan(plan, project)
    assert not [f for f in result.findings if f.rule.startswith("input.")]
    assert result.checked
    res = run("check", "builds")
    assert res.exit_code == 0 and "bench-amp-profiles" not in res.output
