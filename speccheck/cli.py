"""The command line: check, explain, rules, schema."""

from __future__ import annotations

import sys

import click

from speccheck import __version__
from speccheck.findings import LEVELS, RANK

EXIT_CLEAN, EXIT_FINDINGS, EXIT_TROUBLE = 0, 1, 2


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="speccheck")
def main():
    """Review the plan of a receive-side radio build before you build it."""


@main.command()
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text", show_default=True,
              help="How to write the report.")
@click.option("--fail-level", type=click.Choice(LEVELS), default=None,
              help="Exit 1 when a finding at this level or above remains [default: error].")
@click.option("--output", "-o", type=click.Path(dir_okay=False, writable=True), default=None,
              help="Write the report to this file instead of standard output.")
def check(paths, fmt, fail_level, output):
    """Check build plans (files, or folders holding them).

    Exit 0 when nothing at the fail level remains, 1 when something does, 2 when speccheck
    could not do its job (a path that does not exist, a file it cannot read).
    """
    from speccheck import discover, engine, reporters
    from speccheck.config import Settings

    settings = Settings()
    if fail_level:
        settings.fail_level = fail_level
    files, _skipped, missing = discover.expand(paths)
    for path in missing:
        click.echo(f"speccheck: {path}: no such file or folder", err=True)
    if missing:
        sys.exit(EXIT_TROUBLE)
    if not files:
        click.echo("speccheck: no build files found (a build file has a 'build_spec:' key)", err=True)
        sys.exit(EXIT_TROUBLE)
    results = [engine.check_file(f, settings) for f in files]
    color = fmt == "text" and output is None and sys.stdout.isatty()
    text = reporters.render(fmt, results, settings, color=color)
    if output:
        with open(output, "w", encoding="utf-8") as fh:
            fh.write(text)
    else:
        click.echo(text, nl=False)
    if any(f.rule == "input.unreadable" for r in results for f in r.findings):
        sys.exit(EXIT_TROUBLE)
    worst = engine.worst(results)
    sys.exit(EXIT_FINDINGS if worst and RANK[worst] >= RANK[settings.fail_level] else EXIT_CLEAN)


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
    click.echo(f"Source of the numbers: {found.source}")
    if found.settings:
        shown = ", ".join(f"{k} = {v}" for k, v in found.settings.items())
        click.echo(f"Settings (project file): {shown}")


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
@click.option("--format", "fmt", type=click.Choice(["text", "json", "markdown"]), default="text",
              show_default=True, help="How to write the sheet.")
def sheet(path, fmt):
    """Print the design sheet of one build: every value the rules derived, with units."""
    from pathlib import Path

    from speccheck import engine
    from speccheck.reporters import sheet as sheet_reporter

    if not Path(path).exists():
        click.echo(f"speccheck: {path}: no such file", err=True)
        sys.exit(EXIT_TROUBLE)
    result = engine.check_file(path)
    click.echo(sheet_reporter.render(result, fmt), nl=False)
    blocking = [f for f in result.findings if f.rule.startswith("input.")]
    for f in blocking:
        click.echo(f"{f.location.file}:{f.location.line}:{f.location.col}: {f.level} {f.rule} {f.message}", err=True)
    sys.exit(EXIT_TROUBLE if any(f.rule == "input.unreadable" for f in blocking) else
             EXIT_FINDINGS if blocking else EXIT_CLEAN)


@main.command()
def schema():
    """Print the JSON Schema of the build format (for editors and other tools)."""
    from importlib import resources

    from speccheck.schema import SCHEMA_FILE

    click.echo(resources.files("speccheck").joinpath("schema", SCHEMA_FILE).read_text("utf-8"), nl=False)
