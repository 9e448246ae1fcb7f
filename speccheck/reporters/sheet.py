"""The design sheet: every value the rules derived, grouped by section and owner."""

from __future__ import annotations

import json

from speccheck import __version__

SHEET_VERSION = 1


def grouped(result) -> dict:
    out: dict = {}
    for entry in result.sheet:
        out.setdefault(entry.section, {}).setdefault(entry.owner, []).append(entry)
    return out


def as_text(result) -> str:
    lines = [f"Design sheet: {result.build_name} ({result.path})" if result.build_name
             else f"Design sheet: {result.path}"]
    for caution in result.cautions:
        lines.append(f"  ! {caution}")
    for section, owners in grouped(result).items():
        lines.append(f"\n{section}")
        for owner, entries in owners.items():
            lines.append(f"  {owner}")
            width = max(len(e.value.name) for e in entries)
            lines.extend(f"    {e.value.name:<{width}}  {e.value.text}" for e in entries)
    if not result.sheet:
        lines.append("  (no derived values: the plan could not be checked, or no rule had what it needs)")
    return "\n".join(lines) + "\n"


def as_markdown(result) -> str:
    lines = [f"## Design sheet: {result.build_name or result.path}", "", f"File: `{result.path}`", ""]
    if result.cautions:
        lines += ["**Safety cautions**", ""] + [f"- {c}" for c in result.cautions] + [""]
    for section, owners in grouped(result).items():
        lines += [f"### {section}", "", "| part or path | quantity | value |", "|---|---|---|"]
        for owner, entries in owners.items():
            lines += [f"| {owner} | {e.value.name} | {e.value.text} |" for e in entries]
        lines.append("")
    return "\n".join(lines)


def as_json(result) -> str:
    from speccheck.reporters.json import sheet_dict

    return json.dumps({"report": "speccheck-design-sheet", "version": SHEET_VERSION,
                       "tool": {"name": "speccheck", "version": __version__},
                       "file": result.path, "build": result.build_name, "cautions": list(result.cautions),
                       "entries": [sheet_dict(e) for e in result.sheet]}, indent=2, ensure_ascii=False) + "\n"


def render(result, fmt: str) -> str:
    return {"text": as_text, "markdown": as_markdown, "json": as_json}[fmt](result)
