"""Which files a `check` of some paths covers: named files always (unless asked to treat them
like the rest), and in folders the YAML files that carry the format-version key `build_spec`.
Other YAML in a folder is skipped, and the report says so with a note line."""

from __future__ import annotations

import os
import re
from dataclasses import dataclass, field
from pathlib import Path

from speccheck import files

EXTENSIONS = (".yaml", ".yml")
_VERSION_KEY = re.compile(rb"^build_spec\s*:", re.MULTILINE)
SKIP_DIRS = {".git", ".hg", ".svn", "node_modules", "__pycache__", ".venv", "venv", ".tox"}
# YAML that is plainly not a build plan and no news in a report: our own project file, and the
# configuration of the commit-hook framework that runs us. Passed over without a note.
QUIET = {"speccheck-project.yaml", ".pre-commit-config.yaml", ".pre-commit-hooks.yaml"}
HEAD = 65536


_PARTS_KEY = re.compile(rb"^parts_spec\s*:", re.MULTILINE)


def kind_of(path: Path) -> str | None:
    """'build' or 'parts' by the format key near the top of the file; None for other YAML."""
    try:
        head = files.read_head(path, HEAD)
    except files.FileTrouble:
        return None
    if _VERSION_KEY.search(head):
        return "build"
    return "parts" if _PARTS_KEY.search(head) else None


def _key(path: Path) -> str:
    return Path(os.path.normpath(path)).as_posix()


@dataclass
class Found:
    files: list = field(default_factory=list)  # build files to check, sorted by path
    skipped: list = field(default_factory=list)  # YAML files that are not build files
    set_aside: list = field(default_factory=list)  # (path, why) never opened: not regular, or a link out
    missing: list = field(default_factory=list)  # named paths that do not exist


def _sort_out(candidate: Path, tree: Path | None, found: Found, must_be_build: bool):
    """Put one YAML file where it belongs; look at its type before opening it."""
    if tree is not None and candidate.is_symlink() and not files.inside(candidate, tree):
        found.set_aside.append((candidate, "a link that leads out of the checked folder"))
        return
    why = files.not_regular(candidate)
    if why:
        found.set_aside.append((candidate, why))
        return
    kind = kind_of(candidate) if must_be_build else "build"
    if kind == "build":
        found.files.append(candidate)
    elif kind is None:
        found.skipped.append(candidate)
    # a parts file is read through the build that names it: no news in a folder walk


def expand(paths, named_must_be_build: bool = False) -> Found:
    """The files a check of these paths covers.

    Named files are checked whatever they hold (the loader reports what is wrong with them),
    unless named_must_be_build (the pre-commit hook's case, which passes every changed YAML
    file): then they are sorted like files met in a folder. In a folder walk, a file that is not
    a regular file, or a link leading out of the walked folder, is set aside unopened."""
    found = Found()
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            for root, dirs, names in os.walk(path):
                dirs[:] = sorted(d for d in dirs if d not in SKIP_DIRS)
                for name in sorted(names):
                    if name.endswith(EXTENSIONS) and name not in QUIET:
                        _sort_out(Path(root) / name, path, found, True)
        elif path.exists() or path.is_symlink():
            if named_must_be_build:
                if path.name not in QUIET:
                    _sort_out(path, _tree_of(path), found, True)
            else:
                found.files.append(path)
        else:
            found.missing.append(str(raw))
    found.files, found.skipped = _unique(found.files), _unique(found.skipped)
    found.set_aside = sorted(set(found.set_aside), key=lambda pair: _key(pair[0]))
    return found


def _tree_of(path: Path) -> Path:
    """For a file a hook names: the repository holding it, else its own folder."""
    from speccheck.config import repo_root

    here = Path(os.path.abspath(path)).parent
    return repo_root(here) or here


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
