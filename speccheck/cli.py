"""The command line: check, baseline, explain, rules, schema, sheet, starter.

Start-up stays light: only click is imported here; the engine, the rules and the reporters
are imported inside the command that needs them.
"""

from __future__ import annotations

import os
import sys

import click

from speccheck import __version__
from speccheck.findings import LEVELS, RANK

EXIT_CLEAN, EXIT_FINDINGS, EXIT_TROUBLE = 0, 1, 2
REPORT_FORMATS = ("text", "json", "sarif", "markdown", "html")


def _plain(text) -> str:
    from speccheck.reporters.neutral import plain

    return plain(text)


def _trouble(message: str):
    click.echo(f"speccheck: {message}", err=True)
    sys.exit(EXIT_TROUBLE)


def _settings(paths, config, no_config, fail_level=None, skip=()):
    from speccheck import config as config_mod

    try:
        settings = config_mod.for_paths(paths, config, use_file=not no_config)
        return config_mod.apply_options(settings, fail_level=fail_level, skip=skip)
    except config_mod.ConfigError as exc:
        for line in exc.messages:
            click.echo(f"speccheck: {_plain(line)}", err=True)
        sys.exit(EXIT_TROUBLE)


def _gather(paths, settings, build_files_only: bool):
    """-> (build files to check, RunInfo); exits 2 for a path that does not exist."""
    from speccheck import discover
    from speccheck.reporters import RunInfo
    from speccheck.reporters.neutral import plain

    found = discover.expand(paths, named_must_be_build=build_files_only)
    for path in found.missing:
        click.echo(f"speccheck: {plain(path)}: no such file or folder", err=True)
    if found.missing:
        sys.exit(EXIT_TROUBLE)
    run = RunInfo(
        skipped=[str(p) for p in found.skipped],
        config=settings.source,
        set_aside=[(str(p), why) for p, why in found.set_aside],
    )
    wanted = []
    for f in found.files:
        if settings.wants(f):
            wanted.append(f)
        else:
            run.excluded.append(str(f))
    if not wanted and not run.excluded and not run.set_aside and not build_files_only:
        _trouble("no build files found (a build file has a 'build_spec:' key)")
    return wanted, run


def _write(output: str, text: str, force: bool, protected, what: str):
    """Write a report, baseline or starter atomically; never onto a file the run reads."""
    from speccheck import files
    from speccheck.reporters.neutral import plain

    for other in protected:
        if other and files.same_file(output, other):
            _trouble(
                f"{plain(output)}: refusing to write the {what} onto {plain(other)}, which this run reads"
            )
    try:
        files.write_atomic(output, text, force=force)
    except files.FileTrouble as exc:
        _trouble(f"{plain(output)} {exc}")


def _parts_read(results) -> list[str]:
    """The parts files the checked builds read: protected from every write, as the builds are."""
    return [path for r in results for path in r.reads]


def _force_option(fn):
    return click.option("--force", is_flag=True, help="Replace the output file if it exists.")(fn)


def _jobs_option(fn):
    return click.option(
        "--jobs",
        "-j",
        type=click.IntRange(min=0),
        default=1,
        show_default=True,
        help="Check this many files at once in worker processes (0: one per CPU).",
    )(fn)


def _project_options(fn):
    fn = click.option(
        "--no-config", is_flag=True, help="Ignore any project file; use the built-in defaults."
    )(fn)
    fn = click.option(
        "--config",
        type=click.Path(dir_okay=False),
        default=None,
        help="The project file to use [default: speccheck-project.yaml found by walking up "
        "from the checked paths].",
    )(fn)
    return fn


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="speccheck")
def main():
    """Review the plan of a receive-side radio build before you build it."""


@main.command()
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--format", "fmt", type=click.Choice(REPORT_FORMATS), default="text", show_default=True,
              help="How to write the report (sarif: for code-scanning views; markdown: for a pull-request "
                   "comment or a mentor; html: a page with pictures a mentor can send).")
@click.option("--fail-level", type=click.Choice(LEVELS), default=None,
              help="Exit 1 when a finding at this level or above remains [default: the project file's, "
                   "else error].")
@click.option("--output", "-o", type=click.Path(writable=True), default=None,
              help="Write the report to this file instead of standard output; with --format html, a folder "
                   "(existing, or named with a trailing /) gets one page per build and an index page.")
@_project_options
@click.option(
    "--skip",
    multiple=True,
    metavar="RULE",
    help="Do not run this rule or family (repeatable); adds to the project file's rules.skip.",
)
@click.option(
    "--baseline",
    type=click.Path(dir_okay=False),
    default=None,
    help="Report only findings that are not in this baseline file (see `speccheck baseline`).",
)
@click.option(
    "--build-files-only",
    is_flag=True,
    help="Skip named files that are not build files (no 'build_spec:' key), as in folders; "
    "for hooks that pass every changed YAML file.",
)
@_force_option
@_jobs_option
def check(paths, fmt, fail_level, output, config, no_config, skip, baseline, build_files_only, force, jobs):
    """Check build plans (files, or folders holding them).

    Exit 0 when nothing at the fail level remains, 1 when something does, 2 when speccheck
    could not do its job (a path that does not exist, a file it cannot read, a wrong project
    file or baseline).
    """
    from speccheck import discover, engine, reporters

    settings = _settings(paths, config, no_config, fail_level, skip)
    files, run = _gather(paths, settings, build_files_only)
    known = None
    if not baseline and settings.baseline:
        from speccheck import files as files_mod

        baseline = settings.baseline
        if files_mod.not_regular(baseline):
            _trouble(
                f"{_plain(baseline)}: the project file names this baseline, but it cannot be read; "
                "write it with `speccheck baseline PATHS`"
            )
    if baseline:
        from speccheck import baseline as baseline_mod

        try:
            known = baseline_mod.load(baseline)
        except baseline_mod.BaselineError as exc:
            _trouble(str(exc))
    results = discover.check_files(files, settings, jobs)
    if known is not None:
        from speccheck import baseline as baseline_mod

        run.baseline = baseline
        run.hidden = baseline_mod.hide(results, known)
    color = fmt == "text" and output is None and sys.stdout.isatty()
    protected = [*files, settings.source, baseline, *_parts_read(results)]
    if output and (output.endswith(("/", "\\")) or os.path.isdir(output)):  # a folder: one page per build
        if fmt != "html":
            _trouble(f"{_plain(output)} is a folder; only --format html writes a folder (one page per build)")
        _write_pages(output, results, settings, run, force, protected)
    elif output:
        from speccheck.reporters.text import tail_line

        text = reporters.render(fmt, results, settings, color=color, run=run)
        _write(output, text, force, protected, "report")
        click.echo(f"{tail_line(results, run)}; report written to {_plain(output)}", err=True)
    else:
        click.echo(reporters.render(fmt, results, settings, color=color, run=run), nl=False)
    if any(f.rule == "input.unreadable" for r in results for f in r.findings):
        sys.exit(EXIT_TROUBLE)
    worst = engine.worst(results)
    sys.exit(EXIT_FINDINGS if worst and RANK[worst] >= RANK[settings.fail_level] else EXIT_CLEAN)


def _write_pages(folder: str, results, settings, run, force: bool, protected):
    """One HTML page per build and index.html into `folder` (made if missing), each by _write."""
    from speccheck.reporters.html import render_folder
    from speccheck.reporters.text import tail_line

    try:
        os.makedirs(folder, exist_ok=True)
    except OSError as exc:
        _trouble(f"{_plain(folder)}: cannot make the folder: {exc.strerror}")
    for name, text in (pages := render_folder(results, settings, run)).items():
        _write(os.path.join(folder, name), text, force, protected, "report page")
    click.echo(f"{tail_line(results, run)}; {len(pages) - 1} pages, index.html: {_plain(folder)}", err=True)


@main.command("baseline")
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option(
    "--output",
    "-o",
    type=click.Path(dir_okay=False),
    default=None,
    help="The baseline file to write (JSON) [default: the one the project file names].",
)
@_project_options
@_force_option
@_jobs_option
def baseline_cmd(paths, output, config, no_config, force, jobs):
    """Record the current findings, so that later checks report only new ones.

    A club adopting speccheck on an existing repository writes a baseline once and commits
    it; `speccheck check --baseline FILE` then hides every finding the baseline knows (matched
    by its stable fingerprint) and says how many it hid.
    """
    from speccheck import baseline as baseline_mod
    from speccheck import discover

    settings = _settings(paths, config, no_config)
    files, _run = _gather(paths, settings, False)
    results = discover.check_files(files, settings, jobs)
    output = output or settings.baseline
    if not output:
        _trouble("name the baseline file with -o FILE (or 'baseline:' in the project file)")
    text = baseline_mod.dumps(results, settings)
    _write(output, text, force, [*files, settings.source, *_parts_read(results)], "baseline")
    count = sum(len(r.findings) for r in results)
    click.echo(
        f"speccheck: wrote {count} finding{'' if count == 1 else 's'} from {len(results)} "
        f"file{'' if len(results) == 1 else 's'} to {_plain(output)}",
        err=True,
    )
    if any(f.rule == "input.unreadable" for r in results for f in r.findings):
        sys.exit(EXIT_TROUBLE)


@main.command()
@click.argument("rule_id")
def explain(rule_id):
    """Explain one rule: what it checks, why, how to fix it, and where its numbers come from."""
    from speccheck import registry

    rules = registry.load_rules()
    found = rules.get(rule_id)
    if not found:
        import difflib

        close = difflib.get_close_matches(rule_id, list(rules), n=3)
        hint = f" (did you mean {', '.join(close)}?)" if close else ""
        click.echo(f"speccheck: no rule '{rule_id}'{hint}; `speccheck rules` lists them", err=True)
        sys.exit(EXIT_TROUBLE)
    click.echo(f"{found.id} ({found.level}): {found.title}\n")
    click.echo(click.wrap_text(found.explanation, 88, preserve_paragraphs=True))
    click.echo(f"\nFix: {found.fix}")
    if found.verify:
        click.echo(f"Verify on the bench: {found.verify}")
    click.echo(f"Source of the numbers: {found.source}")
    if found.settings:
        shown = ", ".join(f"{k} = {v}" for k, v in found.settings.items())
        click.echo(f"Settings (project file, rules.settings.{found.id}): {shown}")


@main.command("rules")
@click.option("--family", default=None, help="Only the rules of this family (e.g. wiring).")
def list_rules(family):
    """List every rule with its default level and title."""
    from speccheck import registry

    for r in sorted(registry.load_rules().values(), key=lambda r: r.id):
        if family and r.family != family:
            continue
        click.echo(f"{r.id:32} {r.level:8} {r.title}")


@main.command()
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--format", "fmt", type=click.Choice(["text", "json", "markdown", "html"]), default="text",
              show_default=True, help="How to write the sheet (html: a page with the pictures).")
@click.option("--output", "-o", type=click.Path(dir_okay=False, writable=True), default=None,
              help="Write the sheet to this file instead of standard output.")
@_project_options
@_force_option
def sheet(path, fmt, output, config, no_config, force):
    """Print the design sheet of one build: every value the rules derived, with units."""
    from pathlib import Path

    from speccheck import engine
    from speccheck.reporters import sheet as sheet_reporter
    from speccheck.reporters.text import finding_lines

    if not Path(path).exists():
        click.echo(f"speccheck: {path}: no such file", err=True)
        sys.exit(EXIT_TROUBLE)
    settings = _settings([path], config, no_config)
    result = engine.check_file(path, settings)
    text = sheet_reporter.render(result, fmt, settings)
    if output:
        _write(output, text, force, [path, settings.source, *result.reads], "sheet")
    else:
        click.echo(text, nl=False)
    blocking = [f for f in result.findings if f.rule.startswith("input.")]
    for f in blocking:
        click.echo(finding_lines(f)[0], err=True)
    unreadable = any(f.rule == "input.unreadable" for f in blocking)
    sys.exit(EXIT_TROUBLE if unreadable else EXIT_FINDINGS if blocking else EXIT_CLEAN)


@main.command()
@click.argument("kind", type=click.Choice(["build", "project"]), default="build", required=False)
@click.option(
    "--version",
    "version",
    type=click.Choice(["1", "2"]),
    default="2",
    show_default=True,
    help="Which build format version to print.",
)
def schema(kind, version):
    """Print a JSON Schema: of the build format (default), or of the project file."""
    from importlib import resources

    from speccheck.config import PROJECT_SCHEMA
    from speccheck.schema import SCHEMA_FILES

    name = SCHEMA_FILES[int(version)] if kind == "build" else PROJECT_SCHEMA
    click.echo(resources.files("speccheck").joinpath("schema").joinpath(name).read_text("utf-8"), nl=False)


@main.command()
@click.argument("name", required=False)
@click.option(
    "--build",
    "build_file",
    type=click.Path(dir_okay=False),
    default=None,
    help="Also look in this build file's own profiles and its parts files.",
)
def profile(name, build_file):
    """Show a device profile's values and pins (built in, or declared in --build FILE); no NAME lists them."""
    from speccheck import profileview

    shown, trouble = profileview.show(name, build_file)
    click.echo("\n".join(_plain(line) for line in shown), err=bool(trouble))
    if trouble:
        _trouble(_plain(trouble))


@main.command()
@click.argument("path", type=click.Path(dir_okay=False))
@click.option(
    "--output",
    "-o",
    type=click.Path(dir_okay=False),
    default=None,
    help="Write the format-2 plan to this file instead of standard output.",
)
@click.option("--in-place", is_flag=True, help="Rewrite the file itself (atomically).")
@_force_option
def upgrade(path, output, in_place, force):
    """Rewrite a format-1 build file as format 2, keeping its comments, order and layout."""
    import os

    from speccheck import files
    from speccheck.upgrade import upgrade_file

    if output and in_place:
        _trouble("give either --output or --in-place, not both")
    done = upgrade_file(path)
    if done.trouble:
        _trouble(f"{_plain(path)}: {done.trouble}")
    if done.current:
        click.echo(f"{_plain(path)}: already format 2; nothing to change, nothing written", err=True)
        return
    if in_place:
        try:
            files.write_atomic(path, done.text, force=True, mode=os.stat(path).st_mode & 0o7777)
        except files.FileTrouble as exc:
            _trouble(f"{_plain(path)} {exc}")
    elif output:
        _write(output, done.text, force, [path], "format-2 plan")
    else:
        click.echo(done.text, nl=False)
    if in_place or output:
        for change in done.changes:
            click.echo(f"{_plain(path)}: {change}", err=True)


@main.command()
@click.option(
    "--layout", default=None, metavar="NAME", help="Which configuration to start from; `--list` shows them."
)
@click.option("--list", "list_layouts", is_flag=True, help="List the layouts and exit.")
@click.option(
    "--output",
    "-o",
    type=click.Path(dir_okay=False, writable=True),
    default=None,
    help="Write the starter to this file instead of standard output.",
)
@click.option("--force", is_flag=True, help="Overwrite the output file if it exists.")
def starter(layout, list_layouts, output, force):
    """Write a commented starter build file that checks clean as written."""
    from speccheck import starters

    if list_layouts or not layout:
        for name, about in starters.LAYOUTS.items():
            click.echo(f"{name:20} {about}")
        if not list_layouts:
            click.echo("\nspeccheck: choose one with --layout NAME", err=True)
            sys.exit(EXIT_TROUBLE)
        return
    if layout not in starters.LAYOUTS:
        import difflib

        close = difflib.get_close_matches(layout, list(starters.LAYOUTS), n=1)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        _trouble(f"no starter layout '{layout}'{hint} (`speccheck starter --list` shows them)")
    text = starters.text(layout)
    if output is None:
        click.echo(text, nl=False)
        return
    _write(output, text, force, [], "starter")
    click.echo(
        f"speccheck: wrote the {layout} starter to {_plain(output)}; check it with "
        f"`speccheck check {_plain(output)}`",
        err=True,
    )


@main.command()
@click.argument("path", type=click.Path(dir_okay=False))
@click.option(
    "--output",
    "-o",
    "folder",
    type=click.Path(file_okay=False),
    required=True,
    help="The folder to write the decks into (made if missing).",
)
@click.option("--force", is_flag=True, help="Replace deck files that already exist.")
@_project_options
def spice(path, folder, force, config, no_config):
    """Write SPICE decks of the reviewed sub-circuits, for ngspice in batch mode.

    One deck per sub-circuit the design sheet has numbers for: the input network, the
    quadrature tank, the audio RC stages and the amplifier's output side, the supply
    switch-on. Each deck's .measure lines reproduce the sheet's values; run one with
    `ngspice -b DECK`.
    """
    from pathlib import Path

    from speccheck import engine, loader
    from speccheck import spice as spice_mod
    from speccheck.files import FileTrouble, write_atomic
    from speccheck.reporters.text import finding_lines

    if not Path(path).exists():
        _trouble(f"{path}: no such file")
    settings = _settings([path], config, no_config)
    loaded = loader.load(path, settings.root or None)
    result = engine.check_loaded(loaded, settings)
    blocking = [f for f in result.findings if f.rule.startswith("input.")]
    for f in blocking:
        click.echo(finding_lines(f)[0], err=True)
    if not loaded.can_check:
        click.echo(f"speccheck: {path}: no decks written: the plan has input errors", err=True)
        sys.exit(EXIT_TROUBLE if any(f.rule == "input.unreadable" for f in blocking) else EXIT_FINDINGS)
    decks = spice_mod.decks(loaded.build, result.sheet)
    if not decks:
        _trouble(f"{path}: the design sheet has no sub-circuit to simulate")
    target = Path(folder)
    paths = [spice_mod.deck_path(target, path, d) for d in decks]
    clash = [p for p in paths if p.exists() or p.is_symlink()]
    if clash and not force:
        _trouble(f"{clash[0]} exists; add --force to replace the decks")
    try:
        target.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        _trouble(f"{folder}: cannot make the folder: {exc.strerror}")
    for deck, deck_file in zip(decks, paths, strict=True):
        try:
            write_atomic(deck_file, deck.text(result.build_name, str(path)), force=force)
        except FileTrouble as exc:
            _trouble(f"{_plain(deck_file)} {exc}")
    click.echo(
        f"speccheck: wrote {len(decks)} deck{'' if len(decks) == 1 else 's'} to {folder}: "
        f"{', '.join(p.name for p in paths)}; run one with `ngspice -b DECK`",
        err=True,
    )


@main.command()
@click.argument("path", type=click.Path(dir_okay=False))
@click.option(
    "--series",
    type=click.Choice(["E12", "E24", "E96"]),
    default=None,
    help="The IEC 60063 series to pick resistors, capacitors and coils from (coils stop at E24) "
    "[default: the project file's parts_series, else E12].",
)
@click.option(
    "--apply",
    "apply_changes",
    is_flag=True,
    help="Write the proposed changes into the plan (atomically), then check it again.",
)
@click.option(
    "--format",
    "fmt",
    type=click.Choice(["text", "json"]),
    default="text",
    show_default=True,
    help="Text for people; JSON (our own shape, 'solve_version': 1) for tools.",
)
@_project_options
def solve(path, series, apply_changes, fmt, config, no_config):
    """Propose buyable part values that clear the plan's findings, as a diff of the plan.

    Each change is checked on the plan in memory first: it is proposed only when it clears its
    finding and makes no other finding appear. Comments, order and layout of the plan stay as
    they are. Exit 0 when it ran, 2 when it could not (unreadable plan, input errors with --apply).
    """
    from speccheck.solver import show

    settings = _settings([path], config, no_config)
    try:
        text = show.run_command(path, settings, series or settings.parts_series, apply_changes, fmt)
    except show.CommandTrouble as exc:
        _trouble(_plain(str(exc)))
    click.echo(text, nl=False)
