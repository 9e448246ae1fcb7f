"""Mutation runs, one area at a time (DEVELOPERS.md, "Mutation runs").

    nice .venv/bin/python tests/mutation.py formulas    # or power, freqplan, rfpath, audio, mains,
    #                                                     wiring, battery, squelch, tap, connect
    nice .venv/bin/python tests/mutation.py formulas --report-only
    nice .venv/bin/python tests/mutation.py formulas:preferred     # one module of the area

Copies the tree into .mutation/<area>/ with a [tool.mutmut] section scoped to that area (the
modules to change and the tests that pin them), runs mutmut there (one change at a time: an
operator, a constant, a comparison...), then prints the killed share and the survivors. The
copy holds rules/ where it installs, as speccheck/rules/.
"""

from __future__ import annotations

import ast
import json
import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
AREAS: dict[str, tuple[list[str], list[str]]] = {  # area -> (modules to mutate, tests that pin them)
    "formulas": (["speccheck/formulas/*"],
                 ["tests/test_formulas_*.py", "tests/test_chain.py", "tests/test_solver.py"]),
    # a rule family against its own test files (tests/test_<family>*.py), so the figure says how
    # well those pin it
    "power": (["rules/power/*"], ["tests/test_power*.py", "tests/test_inrush_source.py"]),
    "freqplan": (["rules/freqplan/*", "speccheck/loads.py"],
                 ["tests/test_freqplan*.py", "tests/test_chain.py"]),
    "rfpath": (["rules/rfpath.py"], ["tests/test_rfpath*.py"]),
    "audio": (["rules/audio.py"], ["tests/test_audio*.py"]),
    "mains": (["rules/mains.py"], ["tests/test_mains*.py"]),
    "wiring": (["rules/wiring.py"], ["tests/test_wiring*.py"]),
    "battery": (["rules/battery.py"], ["tests/test_v2_rules.py", "tests/test_battery*.py"]),
    "squelch": (["rules/squelch.py"], ["tests/test_v2_rules.py", "tests/test_squelch*.py"]),
    "tap": (["rules/tap.py"], ["tests/test_v2_rules.py", "tests/test_tap*.py"]),
    "connect": (["rules/connect.py"], ["tests/test_v2_rules.py", "tests/test_connect*.py"]),
}


def undecorate(path: Path) -> None:
    """Rewrite `@rule(...)` above a check into a `rule(...)(check)` call after it: mutmut leaves
    decorated functions alone, and the rule bodies hold the thresholds. Same rules, same order."""
    src = path.read_text("utf-8")
    tree = ast.parse(src)
    lines = src.splitlines(keepends=True)
    edits = []
    for node in tree.body:
        if not isinstance(node, ast.FunctionDef) or len(node.decorator_list) != 1:
            continue
        deco = node.decorator_list[0]
        if not (isinstance(deco, ast.Call) and isinstance(deco.func, ast.Name) and deco.func.id == "rule"):
            continue
        call = ast.get_source_segment(src, deco)
        edits.append((deco.lineno - 1, node.lineno - 1, node.end_lineno, f"{call}({node.name})\n"))
    for start, def_line, end, call in reversed(edits):
        lines[end:end] = ["\n", call]
        del lines[start:def_line]
    path.write_text("".join(lines), "utf-8")


def _toml_list(items: list[str]) -> str:
    return "[" + ", ".join(json.dumps(i) for i in items) + "]"


def scoped(area: str) -> tuple[list[str], list[str]]:
    """`formulas:preferred` is the formulas area with only speccheck/formulas/preferred.py changed
    (same tests): one module at a time, for a short run."""
    base, _, module = area.partition(":")
    mutate, tests = AREAS[base]
    if module:  # a folder's module, or a listed file of that name (mains:mains, freqplan:loads)
        mutate = [m.replace("*", f"{module}.py") if m.endswith("/*") else m for m in mutate
                  if m.endswith("/*") or Path(m).stem == module]
        mutate = [m for m in mutate if (ROOT / m).exists()]
    return mutate, tests


def prepare(area: str) -> Path:
    mutate, tests = scoped(area)
    work = ROOT / ".mutation" / area.replace(":", "-")
    if work.exists():
        shutil.rmtree(work)
    work.mkdir(parents=True)
    for name in ("speccheck", "tests", "examples"):
        shutil.copytree(ROOT / name, work / name, ignore=shutil.ignore_patterns("__pycache__"))
    # rules/ goes where it is installed (speccheck/rules), so that the module names the tests
    # import (speccheck.rules.power...) are the ones mutmut changes
    skip = shutil.ignore_patterns("__pycache__")
    shutil.copytree(ROOT / "rules", work / "speccheck" / "rules", ignore=skip)
    for module in (work / "speccheck" / "rules").rglob("*.py"):
        undecorate(module)
    mutate = [m.replace("rules/", "speccheck/rules/", 1) if m.startswith("rules/") else m for m in mutate]
    selected = sorted(str(p.relative_to(ROOT)) for pattern in tests for p in ROOT.glob(pattern))
    (work / "pyproject.toml").write_text(
        "[tool.mutmut]\n"
        f"source_paths = {_toml_list(['speccheck/'])}\n"
        f"only_mutate = {_toml_list(mutate)}\n"
        f"also_copy = {_toml_list(['examples/'])}\n"
        f"pytest_add_cli_args = {_toml_list(['-p', 'no:cacheprovider', '-q', '-x'])}\n"
        f"pytest_add_cli_args_test_selection = {_toml_list(selected)}\n", "utf-8")
    return work


def report(work: Path) -> dict[str, int]:
    out = subprocess.run([sys.executable, "-m", "mutmut", "results", "--all", "true"], cwd=work,
                         capture_output=True, text=True).stdout
    counts: dict[str, int] = {}
    survivors = []
    for line in out.splitlines():
        name, _, status = line.strip().rpartition(": ")
        if not name:
            continue
        counts[status] = counts.get(status, 0) + 1
        if status != "killed":
            survivors.append(f"{status:>10}  {name}")
    total = sum(counts.values())
    killed = counts.get("killed", 0)
    print("\n".join(survivors))
    share = f"{killed / total:.0%}" if total else "-"
    print(f"{work.name}: {killed} of {total} mutants killed ({share})")
    print(json.dumps(counts))
    return counts


def main(argv: list[str]) -> int:
    area = argv[0] if argv else "formulas"
    if area.partition(":")[0] not in AREAS:
        print(f"areas: {', '.join(AREAS)} (AREA:module scopes to one module, e.g. formulas:preferred)")
        return 2
    work = ROOT / ".mutation" / area.replace(":", "-")
    if "--report-only" not in argv:
        work = prepare(area)
        subprocess.run([sys.executable, "-m", "mutmut", "run", "--max-children", "2"], cwd=work)
    report(work)
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
