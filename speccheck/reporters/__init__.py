"""Reporters turn results into text. They read FileResults and rule metadata only.

This module only dispatches to the format modules; what they share is in reporters/common.py,
so that no format module imports the package it sits in.

Every format shows the same findings: waived ones are kept and marked with their reason,
findings hidden by a baseline are counted, and the safety cautions come first."""

from __future__ import annotations

from speccheck.reporters.common import RunInfo, totals, value_dict

__all__ = ["FORMATS", "RunInfo", "render", "totals", "value_dict"]

FORMATS = ("text", "json", "sarif", "markdown", "html")


def render(fmt: str, results, settings, color: bool = False, run: RunInfo | None = None) -> str:
    run = run or RunInfo()
    if fmt == "text":
        from speccheck.reporters import text
        return text.render(results, settings, color=color, run=run)
    if fmt == "json":
        from speccheck.reporters import json
        return json.render(results, settings, run=run)
    if fmt == "sarif":
        from speccheck.reporters import sarif
        return sarif.render(results, settings, run=run)
    if fmt == "markdown":
        from speccheck.reporters import markdown
        return markdown.render(results, settings, run=run)
    if fmt == "html":
        from speccheck.reporters import html
        return html.render(results, settings, run=run)
    raise ValueError(f"unknown format {fmt}")
