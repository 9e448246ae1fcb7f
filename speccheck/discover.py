"""Which files a `check` of some paths covers: named files always (unless asked to treat them
like the rest), and in folders the YAML files that carry the format-version key `build_spec`.
Other YAML in a folder is skipped, and the report says so with a note line."""

from __future__ import annotations

import os
import re
from pathlib import Path

EXTENSIONS = (".yaml", ".yml")
_VERSION_KEY = re.compile(r"^build_spec\s*:", re.MULTILINE)
SKIP_DIRS = {".git", ".hg", ".svn", "node_modules", "__pycache__", ".venv", "venv", ".tox"}
QUIET = {"speccheck-project.yaml"}  # our own project file is YAML too, but no news in a folder walk


def is_build_file(path: Path) -> bool:
    try:
        with open(path, "rb") as fh:
            head = fh.read(65536).decode("utf-8", "ignore")
    except OSError:
        return False
    return bool(_VERSION_KEY.search(head))


def _key(path: Path) -> str:
    return Path(os.path.normpath(path)).as_posix()


def expand(paths, named_must_be_build: bool = False) -> tuple[list[Path], list[Path], list[str]]:
    """-> (build files sorted by path, YAML files skipped, paths that do not exist).

    With named_must_be_build (the pre-commit hook's case, which passes every changed YAML file),
    a named file without the `build_spec` key is skipped like one found in a folder."""
    files, skipped, missing = [], [], []
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            for root, dirs, names in os.walk(path):
                dirs[:] = sorted(d for d in dirs if d not in SKIP_DIRS)
                for name in sorted(names):
                    if name.endswith(EXTENSIONS) and name not in QUIET:
                        candidate = Path(root) / name
                        (files if is_build_file(candidate) else skipped).append(candidate)
        elif path.exists():
            if named_must_be_build and not is_build_file(path):
                skipped.append(path)
            else:
                files.append(path)
        else:
            missing.append(str(raw))
    return _unique(files), _unique(skipped), missing


def _unique(paths) -> list[Path]:
    seen, out = set(), []
    for p in sorted(paths, key=_key):
        key = _key(p)
        if key not in seen:
            seen.add(key)
            out.append(p)
    return out


def check_files(files, settings, jobs: int = 1) -> list:
    """Check each file; with jobs > 1 in that many worker processes. Results keep the order of
    `files` whatever the number of workers."""
    from speccheck import engine

    if jobs == 0:
        jobs = os.cpu_count() or 1
    if jobs <= 1 or len(files) < 2:
        if len(files) > 1:
            engine.warm_up()
        return [engine.check_file(f, settings) for f in files]
    from concurrent.futures import ProcessPoolExecutor

    workers = min(jobs, len(files))
    with ProcessPoolExecutor(max_workers=workers, initializer=engine.warm_up) as pool:
        return list(pool.map(_check_one, files, [settings] * len(files),
                             chunksize=max(1, len(files) // (workers * 4))))


def _check_one(path, settings):
    from speccheck import engine

    return engine.check_file(path, settings)
