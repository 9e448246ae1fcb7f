"""Shared test helpers: check a YAML text, pick findings, find the line a text sits on."""

from __future__ import annotations

from pathlib import Path

import pytest

from speccheck import engine
from speccheck.config import Settings

ROOT = Path(__file__).resolve().parent.parent
if ROOT.name == "mutants" and (ROOT / "rules").is_dir():  # a copy of the tree: its own rules/
    from speccheck import registry

    registry.load_folder(ROOT / "rules")
EXAMPLES = ROOT / "examples"
CLEAN = EXAMPLES / "vhf-monitor-455k.yaml"


def check(text: str, file: str = "plan.yaml", settings: Settings | None = None):
    return engine.check_text(text, file, settings)


def of(result, rule: str) -> list:
    return [f for f in result.findings if f.rule == rule]


def line_of(text: str, needle: str, nth: int = 0) -> int:
    """1-based line of the nth line containing needle."""
    hits = [i for i, line in enumerate(text.splitlines(), 1) if needle in line]
    return hits[nth]


def edited(text: str, old: str, new: str) -> str:
    assert text.count(old) == 1, f"{old!r} must appear exactly once"
    return text.replace(old, new)


@pytest.fixture
def clean_text() -> str:
    return CLEAN.read_text("utf-8")


def facts(finding) -> dict:
    """Everything a finding promises, in one comparable dict: a family test that asserts this whole
    dict pins the rule's level, place, text and numbers at once (values as {name: (value, unit)})."""
    return {
        "rule": finding.rule,
        "level": finding.level,
        "line": finding.location.line,
        "col": finding.location.col,
        "path": finding.location.path,
        "message": finding.message,
        "values": {v.name: (v.value, v.unit) for v in finding.values},
        "fix": finding.fix,
        "stage": finding.stage,
        "signal": finding.signal,
        "position": finding.position,
    }


def sheet_of(result, rule: str) -> dict:
    """The sheet entries a rule published, as {name: (value, unit)} (owner and section kept apart
    by sheet_rows)."""
    return {e.value.name: (e.value.value, e.value.unit) for e in result.sheet if e.rule == rule}


def sheet_rows(result, rule: str) -> list[tuple]:
    """Every sheet entry of a rule as (section, owner, name, value, unit, signal, position)."""
    return [(e.section, e.owner, e.value.name, e.value.value, e.value.unit, e.signal, e.position)
            for e in result.sheet if e.rule == rule]
