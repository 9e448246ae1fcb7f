"""Reporters turn results into text. They read FileResults and rule metadata only."""

from __future__ import annotations

FORMATS = ("text", "json")


def render(fmt: str, results, settings, color: bool = False) -> str:
    if fmt == "text":
        from speccheck.reporters.text import render as out
        return out(results, settings, color=color)
    if fmt == "json":
        from speccheck.reporters.json import render as out
        return out(results, settings)
    raise ValueError(f"unknown format {fmt}")
