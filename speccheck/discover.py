"""Which files a `check` of some paths covers: named files always, and in folders the YAML
files that carry the format-version key `build_spec`. Other YAML in a folder is skipped."""

from __future__ import annotations

import os
import re
from pathlib import Path

EXTENSIONS = (".yaml", ".yml")
_VERSION_KEY = re.compile(r"^build_spec\s*:", re.MULTILINE)
SKIP_DIRS = {".git", ".hg", ".svn", "node_modules", "__pycache__", ".venv", "venv", ".tox"}


def is_build_file(path: Path) -> bool:
    try:
        with open(path, "rb") as fh:
            head = fh.read(65536).decode("utf-8", "ignore")
    except OSError:
        return False
    return bool(_VERSION_KEY.search(head))


def expand(paths) -> tuple[list[Path], list[Path], list[str]]:
    """-> (build files in a stable order, YAML files skipped, paths that do not exist)."""
    files, skipped, missing = [], [], []
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            for root, dirs, names in os.walk(path):
                dirs[:] = sorted(d for d in dirs if d not in SKIP_DIRS)
                for name in sorted(names):
                    if name.endswith(EXTENSIONS):
                        candidate = Path(root) / name
                        (files if is_build_file(candidate) else skipped).append(candidate)
        elif path.exists():
            files.append(path)
        else:
            missing.append(str(raw))
    seen, unique = set(), []
    for f in files:
        key = os.path.normpath(f)
        if key not in seen:
            seen.add(key)
            unique.append(f)
    return unique, skipped, missing
