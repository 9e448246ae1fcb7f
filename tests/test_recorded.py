"""Every example and starter still gives the findings and design sheet recorded in
tests/data/recorded/, and every rule keeps its id, level and texts. A change on purpose is
recorded again with `.venv/bin/python tests/record.py` (see DEVELOPERS.md)."""

from __future__ import annotations

import importlib.util
import json
from pathlib import Path

import pytest

_HERE = Path(__file__).resolve().parent
_spec = importlib.util.spec_from_file_location("speccheck_record", _HERE / "record.py")
record = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(record)

_NOW = record.recordings()


@pytest.mark.parametrize("target", sorted(_NOW), ids=lambda p: p.name)
def test_output_matches_the_recorded_copy(target: Path):
    assert target.exists(), f"{target.name} was never recorded: run .venv/bin/python tests/record.py"
    recorded = target.read_text("utf-8")
    if _NOW[target] == recorded:
        return
    # Numbers may differ in the last bits between library versions (scipy, mpmath): those
    # compare to 1e-9; anything else that moved fails, shown as text.
    if record.same(json.loads(_NOW[target]), json.loads(recorded)):
        return
    assert _NOW[target] == recorded, (
        "output differs from the recorded copy; if on purpose, run .venv/bin/python tests/record.py")
