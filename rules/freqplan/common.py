"""Helpers the freqplan rules share: settings read with a fallback, percentages, missing inputs."""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from speccheck.chain import Conversion


def pct(x: float) -> str:
    return f"{x * 100:+.1f} %"


def setting(ctx, name: str, cast=float):
    try:
        return cast(ctx.setting(name))
    except (TypeError, ValueError):
        return cast(ctx.rule.settings[name])


def missing_note(ctx, c: Conversion, stage_label: str):
    for path, loc in c.missing[:1]:
        ctx.report(f"{c.owner}: {path} is not given, so the LO and the IF it makes cannot be computed",
                   loc, level="note", stage=stage_label,
                   fix=f"Give {path} so the conversion can be checked.")

