"""Rewrite a format-1 build file as format 2, keeping its comments, order and layout.

Every v1 construct is a valid v2 shape, so the rewrite is a few text edits at the positions
yamlnodes gives (speccheck/textedit.py); nothing is dumped and every other byte stays:

- `build_spec: 1` becomes `build_spec: 2`;
- a stage's `load_impedance` becomes `works_into` (input-match, preamp, conversion: what the network
  works into) or `load_resistance` (audio-amp: the load when no load part is named);
- a potentiometer whose note only says where its wiper goes (`note: "wiper to U2.in_plus"`) gets
  that as its `wiper:` terminal.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from speccheck import files, textedit, yamlnodes

WIPER_NOTE = re.compile(r"^\s*wiper\s+(?:to|on|at)\s+(?P<net>[A-Za-z0-9+_-][A-Za-z0-9+_.-]{0,47})\s*$", re.I)
LOAD_KEY = {"audio-amp": "load_resistance", "speaker": "load_resistance"}  # others: works_into


@dataclass
class Upgraded:
    text: str
    changes: list = field(default_factory=list)  # what was edited, in words, with the line
    trouble: str = ""  # why the file could not be upgraded ("" when it was)
    current: bool = False  # the file is already format 2: nothing to change, nothing to write


def upgrade_text(text: str) -> Upgraded:
    doc = yamlnodes.parse(text)
    if doc.problems or not isinstance(doc.data, dict):
        return Upgraded(
            text, trouble="the file is not YAML a build plan can be read from; `speccheck check` shows where"
        )
    spec = doc.data.get("build_spec")
    if spec == 2:
        return Upgraded(text, current=True)
    if spec != 1 or isinstance(spec, bool):
        return Upgraded(text, trouble="the file has no `build_spec: 1`, so it is not a format-1 build plan")
    edits, changes = [], []

    def note(path, what):
        changes.append(f"line {doc.mark(path).line}: {what}")

    edits.append(textedit.replace_value(text, doc, ("build_spec",), 2))
    note(("build_spec",), "build_spec 1 -> 2")
    for i, stage in enumerate(doc.data.get("chain") or []):
        if isinstance(stage, dict) and "load_impedance" in stage:
            new = LOAD_KEY.get(str(stage.get("stage")), "works_into")
            edits.append(textedit.rename_key(text, doc, ("chain", i, "load_impedance"), new))
            note(("chain", i, "load_impedance"), f"chain[{i}].load_impedance -> {new}")
    parts = doc.data.get("parts")
    for ref, part in parts.items() if isinstance(parts, dict) else ():
        if not isinstance(part, dict) or part.get("kind") != "potentiometer" or "wiper" in part:
            continue
        m = WIPER_NOTE.match(str(part.get("note") or ""))
        if m:
            path = ("parts", ref, "note")
            span = doc.value_span(path)  # a net name reads plain: no quotes
            if span is None:
                continue
            edits.append(textedit.rename_key(text, doc, path, "wiper"))
            edits.append(textedit.Edit(span.start, span.end, m.group("net")))
            note(path, f"parts.{ref}: note \"{part['note']}\" -> wiper: {m.group('net')}")
    try:
        return Upgraded(textedit.apply(text, edits), changes)
    except textedit.EditTrouble as exc:
        return Upgraded(text, trouble=str(exc))


def upgrade_file(path) -> Upgraded:
    """The upgrade of a file on disk (read bounded, as UTF-8); `trouble` says why not."""
    try:
        text = files.read_bytes_bounded(path, yamlnodes.MAX_BYTES).decode("utf-8-sig")
    except files.FileTrouble as exc:
        return Upgraded("", trouble=str(exc))
    except UnicodeDecodeError:
        return Upgraded("", trouble="is not UTF-8 text")
    return upgrade_text(text)
