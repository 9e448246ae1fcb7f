"""Every example and starter still gives the findings and design sheet recorded in
tests/data/recorded/, and every rule keeps its id, level and texts. A change on purpose is
recorded again with `.venv/bin/python tests/record.py` (see DEVELOPERS.md)."""

from __future__ import annotations

import importlib.util
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
    # Compared as text so the failure shows the lines that moved.
    assert _NOW[target] == target.read_text("utf-8"), (
        "output differs from the recorded copy; if on purpose, run .venv/bin/python tests/record.py")


def test_nothing_recorded_is_stale():
    kept = {p.name for p in record.RECORDED.glob("*.json")}
    assert kept == {p.name for p in _NOW}, "remove recorded copies of files that no longer exist"
