"""The layout stays as DEVELOPERS.md draws it: no import circle (lazy imports counted too), the
trade arithmetic imports nothing of the model, YAML or pint, and no module grows past 600 lines."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
MAX_LINES = 600
LONGER_ALLOWED: dict[str, str] = {  # module path -> why it may be longer (for now)
}


def _modules() -> dict[str, Path]:
    mods = {}
    for base, pkg in (("speccheck", "speccheck"), ("rules", "speccheck.rules")):
        for p in (ROOT / base).rglob("*.py"):
            parts = [x for x in p.relative_to(ROOT / base).with_suffix("").parts if x != "__init__"]
            mods[".".join([pkg, *parts])] = p
    return mods


def _absolute(node: ast.ImportFrom, path: Path, mods: dict) -> str:
    """The module an import names, relative imports (`from .common import x`) resolved."""
    if node.level == 0:
        return node.module or ""
    here = next(name for name, p in mods.items() if p == path).split(".")
    package = here if path.name == "__init__.py" else here[:-1]
    base = package[: len(package) - (node.level - 1)]
    return ".".join(base + ([node.module] if node.module else []))


def _imports(path: Path, mods: dict) -> set[str]:
    out = set()
    for node in ast.walk(ast.parse(path.read_text("utf-8"))):
        if isinstance(node, ast.ImportFrom):
            module = _absolute(node, path, mods)
            for alias in node.names:
                full = f"{module}.{alias.name}"
                out.add(full if full in mods else module)
        elif isinstance(node, ast.Import):
            out.update(alias.name for alias in node.names)
    return out


def test_no_import_circle():
    mods = _modules()
    edges = {m: {t for t in _imports(p, mods) if t in mods and t != m} for m, p in mods.items()}
    state: dict[str, int] = {}  # 1 = on the current path, 2 = done

    def visit(m: str, path: list[str]):
        state[m] = 1
        for t in sorted(edges[m]):
            assert state.get(t) != 1, "import circle: " + " -> ".join(path[path.index(t):] + [m, t])
            if t not in state:
                visit(t, path + [m])
        state[m] = 2

    for m in sorted(edges):
        if m not in state:
            visit(m, [])


def test_formulas_import_no_model_yaml_or_pint():
    banned = (
        "speccheck.model",
        "speccheck.loader",
        "speccheck.yamlnodes",
        "speccheck.units",
        "ruamel",
        "pint",
        "speccheck.rules",
        "speccheck.chain",
        "speccheck.budget",
    )
    mods = _modules()
    for name, path in mods.items():
        if name.startswith("speccheck.formulas"):
            bad = [i for i in _imports(path, mods) if i.startswith(banned)]
            assert not bad, f"{path.name} imports {bad}"


@pytest.mark.skipif(ROOT.name == "mutants", reason="a mutation run's copy carries its mutants inline")
def test_no_module_over_the_size_limit():
    over = {
        str(p.relative_to(ROOT)): n
        for p in _modules().values()
        if (n := len(p.read_text("utf-8").splitlines())) > MAX_LINES
    }
    assert set(over) <= set(LONGER_ALLOWED), f"split these modules (or say why in LONGER_ALLOWED): {over}"
