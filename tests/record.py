"""Record what every example and starter gives today: its findings and its design sheet.

    .venv/bin/python tests/record.py            # rewrite tests/data/recorded/*.json
    .venv/bin/python tests/record.py --check    # exit 1 and name the files that differ

tests/test_recorded.py compares the current output with these copies, so a refactoring that
changes a verdict, a position, a message or a sheet value fails a test. When a verdict is
changed on purpose, run the first command and commit the changed JSON files with the change
(the diff shows exactly what moved).
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
RECORDED = ROOT / "tests" / "data" / "recorded"
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))


def sources() -> dict[str, str]:
    """name -> YAML text, for every example and every starter layout."""
    from speccheck import starters

    found = {f"examples/{p.name}": p.read_text("utf-8") for p in sorted((ROOT / "examples").glob("*.yaml"))}
    for layout in sorted(starters.LAYOUTS):
        found[f"starters/{layout}.yaml"] = starters.text(layout)
    return found


def observe(name: str, text: str) -> dict:
    """The findings (rule, level, position, message, values, fix) and the design sheet of one file."""
    from speccheck import engine
    from speccheck.config import Settings

    result = engine.check_text(text, name, Settings())
    findings = []
    for f in result.findings:
        loc = f.location
        findings.append({
            "rule": f.rule, "level": f.level, "line": loc.line, "col": loc.col, "path": loc.path,
            "message": f.message, "values": [v.as_dict() for v in f.values], "fix": f.fix,
            "stage": f.stage,
        })
    sheet = [{"section": e.section, "owner": e.owner, "rule": e.rule, **e.value.as_dict()}
             for e in result.sheet]
    return {"file": name, "cautions": list(result.cautions), "findings": findings, "sheet": sheet}


def catalogue() -> dict:
    """Every rule as `speccheck explain` knows it: id, level, texts (whitespace as cleaned), settings."""
    from speccheck import registry

    return {"rules": [{"id": r.id, "level": r.level, "title": r.title, "explanation": r.explanation,
                       "fix": r.fix, "source": r.source, "verify": r.verify, "settings": r.settings}
                      for r in sorted(registry.load_rules().values(), key=lambda r: r.id)]}


def recordings() -> dict[Path, str]:
    """target file -> the JSON text it should hold now."""
    out = {path_for(name): dump(observe(name, text)) for name, text in sources().items()}
    out[RECORDED / "rules.json"] = dump(catalogue())
    return out


def path_for(name: str) -> Path:
    return RECORDED / (name.replace("/", "__").removesuffix(".yaml") + ".json")


def dump(data: dict) -> str:
    return json.dumps(data, indent=1, ensure_ascii=False, sort_keys=True) + "\n"


def same(a: object, b: object) -> bool:
    """Equal, with numbers equal to 1e-9: library versions (scipy, mpmath) move the last bits."""
    numbers = isinstance(a, (int, float)) and isinstance(b, (int, float))
    if numbers and (isinstance(a, float) or isinstance(b, float)):
        return math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-15)
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(same(a[k], b[k]) for k in a)
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(same(x, y) for x, y in zip(a, b, strict=True))
    return a == b


def main(argv: list[str]) -> int:
    check_only = "--check" in argv
    differ = []
    RECORDED.mkdir(parents=True, exist_ok=True)
    for target, now in recordings().items():
        if check_only:
            if not target.exists() or not same(json.loads(target.read_text("utf-8")), json.loads(now)):
                differ.append(target.name)
        else:
            target.write_text(now, "utf-8")
    if check_only and differ:
        print("differs from the recorded copy:", *differ, sep="\n  ")
        return 1
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
