"""The design sheet: every value the rules derived, grouped by section and owner."""

from __future__ import annotations

import json

from speccheck import __version__
from speccheck.reporters.neutral import json_text, md_code, md_text, plain

SHEET_VERSION = 1


def grouped(result) -> dict:
    out: dict = {}
    for entry in result.sheet:
        tag = "; ".join(w for w in (entry.signal, entry.position) if w)
        owner = f"{entry.owner} [{tag}]" if tag else entry.owner
        out.setdefault(entry.section, {}).setdefault(owner, []).append(entry)
    return out


def as_text(result) -> str:
    lines = [f"Design sheet: {plain(result.build_name)} ({plain(result.path)})" if result.build_name
             else f"Design sheet: {plain(result.path)}"]
    for caution in result.cautions:
        lines.append(f"  ! {plain(caution)}")
    for section, owners in grouped(result).items():
        lines.append(f"\n{section}")
        for owner, entries in owners.items():
            lines.append(f"  {plain(owner)}")
            width = max(len(e.value.name) for e in entries)
            lines.extend(plain(f"    {e.value.name:<{width}}  {e.value.text}") for e in entries)
    if not result.sheet:
        lines.append("  (no derived values: the plan could not be checked, or no rule had what it needs)")
    return "\n".join(lines) + "\n"


def as_markdown(result) -> str:
    lines = [
        f"## Design sheet: {md_text(result.build_name or result.path)}",
        "",
        f"File: {md_code(result.path)}",
        "",
    ]
    if result.cautions:
        lines += ["**Safety cautions**", ""] + [f"- {md_text(c)}" for c in result.cautions] + [""]
    for section, owners in grouped(result).items():
        lines += [f"### {section}", "", "| part or path | quantity | value |", "|---|---|---|"]
        for owner, entries in owners.items():
            lines += [
                f"| {md_text(owner)} | {md_text(e.value.name)} | {md_text(e.value.text)} |" for e in entries
            ]
        lines.append("")
    return "\n".join(lines)


def as_json(result) -> str:
    from speccheck.reporters.json import sheet_dict

    doc = {
        "report": "speccheck-design-sheet",
        "version": SHEET_VERSION,
        "tool": {"name": "speccheck", "version": __version__},
        "file": result.path,
        "build": result.build_name,
        "cautions": list(result.cautions),
        "entries": [sheet_dict(e) for e in result.sheet],
    }
    return json_text(json.dumps(doc, indent=2, ensure_ascii=False)) + "\n"


def render(result, fmt: str, settings=None) -> str:
    if fmt == "html":  # a page with the pictures (reporters/html.py)
        from speccheck.reporters.html import render_sheet

        return render_sheet(result, settings)
    return {"text": as_text, "markdown": as_markdown, "json": as_json}[fmt](result)
