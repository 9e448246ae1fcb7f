"""The one registry of rules. A rule family is a module in rules/; each rule in it is a
function decorated with `@rule(...)`, which records its id, default level, title, the long
explanation for a beginner, the fix hint and the source of its numbers."""

from __future__ import annotations

import importlib
import importlib.util
import sys
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from types import ModuleType

from speccheck.findings import LEVELS


@dataclass(frozen=True)
class Rule:
    id: str
    level: str
    title: str
    explanation: str
    fix: str
    source: str
    check: Callable | None = field(default=None, compare=False)
    settings: dict = field(default_factory=dict, compare=False)  # setting name -> default value
    verify: str = ""  # how to confirm the finding (or its fix) on the bench, in plain words

    @property
    def family(self) -> str:
        return self.id.split(".", 1)[0]


RULES: dict[str, Rule] = {}


def _clean(text: str) -> str:
    lines = [line.strip() for line in text.strip().splitlines()]
    paragraphs, current = [], []
    for line in lines:
        if line:
            current.append(line)
        elif current:
            paragraphs.append(" ".join(current))
            current = []
    if current:
        paragraphs.append(" ".join(current))
    return "\n\n".join(paragraphs)


def define(id: str, *, level: str, title: str, explanation: str, fix: str, source: str,
           settings: dict | None = None, check: Callable | None = None, verify: str = "") -> Rule:
    if level not in LEVELS:
        raise ValueError(f"{id}: level must be one of {LEVELS}")
    if id in RULES and RULES[id].check is not check:
        raise ValueError(f"rule id {id} is defined twice")
    made = Rule(id, level, title, _clean(explanation), _clean(fix), source, check, dict(settings or {}),
                _clean(verify))
    RULES[id] = made
    return made


def rule(id: str, **meta):
    """Decorator: register a check function `fn(build, ctx)` under a stable rule id."""

    def wrap(fn):
        define(id, check=fn, **meta)
        return fn

    return wrap


_LOADED = False


def _import_families() -> ModuleType:
    try:
        return importlib.import_module("speccheck.rules")
    except ModuleNotFoundError:
        # A source checkout run without installing: rules/ sits beside speccheck/.
        return load_folder(Path(__file__).resolve().parent.parent / "rules")


def load_folder(folder: Path) -> ModuleType:
    """Make `folder` (a rules/ tree) the package speccheck.rules, before anything imports it:
    a source checkout that was not installed, or a mutation run's copy of the tree."""
    here = folder / "__init__.py"
    spec = importlib.util.spec_from_file_location("speccheck.rules", here,
                                                  submodule_search_locations=[str(folder)])
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules["speccheck.rules"] = module
    spec.loader.exec_module(module)
    return module


def load_rules() -> dict[str, Rule]:
    global _LOADED
    if not _LOADED:
        families = _import_families()
        for name in families.FAMILIES:
            importlib.import_module(f"speccheck.rules.{name}")
        # Rules run (and fill the design sheet) family by family in the order FAMILIES lists,
        # whatever imported a family module first (a test, a reporter).
        order = {name: i for i, name in enumerate(families.FAMILIES)}
        ranked = sorted(RULES.values(), key=lambda r: order.get(r.family, len(order)))
        RULES.clear()
        RULES.update((r.id, r) for r in ranked)
        _LOADED = True
    return RULES


def get(id: str) -> Rule | None:
    return load_rules().get(id)
