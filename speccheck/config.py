"""Settings that shape one run: which rules, at what level, with which rule settings.

The project file and the command-line options both end up in one `Settings`; precedence is
option, then project file, then the rules' built-in defaults.

The project file is `speccheck-project.yaml`, found by walking up from the checked path to the
root of the repository (the folder holding `.git`), or named with `--config`. Its format is
published as a JSON Schema of its own (speccheck/schema/project-v1.json); a key, rule id or
setting that speccheck does not know is an error naming it at file:line:col, never ignored.
"""

from __future__ import annotations

import difflib
import math
import os
import re
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

PROJECT_FILE = "speccheck-project.yaml"
PROJECT_SCHEMA = "project-v1.json"
PROJECT_FILE_LIMIT = 100_000  # a project file is a screenful
FAMILY_ONLY_PROTECTED = ("input", "review")  # always on when `only` is used; input can never be skipped


@dataclass
class Settings:
    disabled: set = field(default_factory=set)  # rule ids, or family names ending in "."
    levels: dict = field(default_factory=dict)  # rule id -> level
    fail_level: str = "error"
    rule_settings: dict = field(default_factory=dict)  # rule id -> {name: value}
    include: list = field(default_factory=list)
    exclude: list = field(default_factory=list)
    source: str = ""  # the project file these came from, if any
    root: str = ""  # the project's root folder (project file's folder, else repository root); "" = cwd
    baseline: str = ""  # the baseline the project file names (a path), if any
    parts_series: str = "E12"  # the E-series `speccheck solve` picks from

    def enabled(self, rule_id: str) -> bool:
        family = rule_id.split(".", 1)[0] + "."
        return rule_id not in self.disabled and family not in self.disabled

    def level_for(self, rule_id: str, level: str) -> str:
        return self.levels.get(rule_id, level)

    def relative(self, path) -> str | None:
        """path as seen from the project root (posix), or None when it lies outside the root."""
        return relative_to(path, self.root)

    def wants(self, path) -> bool:
        """Whether the project's include/exclude globs let this build file be checked."""
        if not self.include and not self.exclude:
            return True
        rel = self.relative(path)
        if rel is None:
            return True  # outside the project: its globs say nothing about it
        if self.include and not any(glob_match(g, rel) for g in self.include):
            return False
        return not any(glob_match(g, rel) for g in self.exclude)


class ConfigError(Exception):
    """The project file (or an option) is wrong; `messages` are 'file:line:col: text' lines."""

    def __init__(self, messages: list[str]):
        super().__init__("\n".join(messages))
        self.messages = messages


# ---- paths ---------------------------------------------------------------------------------

def relative_to(path, root: str = "") -> str | None:
    return _relative_to(os.fspath(path), root, os.getcwd())


@lru_cache(maxsize=4096)
def _relative_to(path: str, root: str, cwd: str) -> str | None:
    """Cached: resolving a path costs system calls, and every finding's file needs it."""
    base = Path(root or cwd).resolve()
    target = Path(os.path.abspath(path))
    try:
        return target.resolve().relative_to(base).as_posix()
    except ValueError:
        try:
            return target.relative_to(base).as_posix()
        except ValueError:
            return None


def _glob_regex(pattern: str) -> re.Pattern:
    """A path glob of our own small dialect: '*' and '?' stay inside one folder, '**' spans folders."""
    out, i, p = [], 0, pattern.strip()
    if p.startswith("./"):
        p = p[2:]
    while i < len(p):
        if p.startswith("**/", i):
            out.append("(?:.*/)?")
            i += 3
        elif p.startswith("**", i):
            out.append(".*")
            i += 2
        elif p[i] == "*":
            out.append("[^/]*")
            i += 1
        elif p[i] == "?":
            out.append("[^/]")
            i += 1
        else:
            out.append(re.escape(p[i]))
            i += 1
    return re.compile("".join(out).rstrip("/") + r"\Z")


def glob_match(pattern: str, rel: str) -> bool:
    """True when the pattern matches the path or one of the folders above it ('archive/**' and
    'archive' both cover 'archive/old.yaml')."""
    rx = _glob_regex(pattern)
    parts = rel.split("/")
    return any(rx.match("/".join(parts[:n])) for n in range(len(parts), 0, -1))


def repo_root(start: Path) -> Path | None:
    for folder in [start, *start.parents]:
        if (folder / ".git").exists():
            return folder
    return None


def find_project_file(start) -> Path | None:
    """Walk up from a checked path to the repository root (or the file system root)."""
    here = Path(os.path.abspath(start))
    if not here.is_dir():
        here = here.parent
    for folder in [here, *here.parents]:
        candidate = folder / PROJECT_FILE
        if candidate.is_file():
            return candidate
        if (folder / ".git").exists():
            return None
    return None


# ---- reading the project file -------------------------------------------------------------

def _schema():
    import json
    from importlib import resources

    schema_file = resources.files("speccheck").joinpath("schema").joinpath(PROJECT_SCHEMA)
    return json.loads(schema_file.read_text("utf-8"))


def _suggest(word, choices) -> str:
    close = difflib.get_close_matches(str(word), [str(c) for c in choices], n=1)
    return f"; did you mean '{close[0]}'?" if close else ""


class _Reader:
    def __init__(self, file: str, doc):
        self.file, self.doc = file, doc
        self.errors: list[Any] = []
        self._at: list[tuple[int, int]] = []

    def error(self, path, message: str, at_key: bool = False):
        mark = self.doc.key_mark(tuple(path)) if at_key else self.doc.mark(tuple(path))
        self.errors.append(f"{self.file}:{mark.line}:{mark.col}: {message}")
        self._at.append((mark.line, mark.col))

    def sorted(self) -> list[str]:
        at = self._at + [(0, 0)] * (len(self.errors) - len(self._at))
        return [e for _, e in sorted(zip(at, self.errors, strict=True), key=lambda pair: pair[0])]


def _schema_errors(reader: _Reader, data):
    from jsonschema import Draft202012Validator

    from speccheck import schema as build_schema_mod

    seen = set()
    for error in Draft202012Validator(_schema()).iter_errors(data):
        path = tuple(error.absolute_path)
        container = _at(data, path)
        if (error.validator == "pattern" and isinstance(container, dict) and isinstance(error.instance, str)
                and error.instance in container):  # from propertyNames: point at the key itself
            what = error.schema.get("description", "a rule id").split(":")[0]
            explained = [
                (
                    path + (error.instance,),
                    f"'{error.instance}' is not a valid name here: expected {what}",
                    True,
                )
            ]
        else:
            explained = build_schema_mod.explain(error)
        for where, message, at_key in explained:
            if (where, message) not in seen:
                seen.add((where, message))
                reader.error(where, message, at_key)


def _at(data, path):
    for step in path:
        try:
            data = data[step]
        except (KeyError, IndexError, TypeError):
            return None
    return data


def _known(name: str, rules: dict) -> bool:
    return name in rules or any(r.family == name for r in rules.values())


def _names_check(reader: _Reader, rules: dict, names, path, what: str, at_key: bool):
    families = sorted({r.family for r in rules.values()})
    for i, name in enumerate(names):
        where = path + ((name,) if at_key else (i,))
        if not _known(name, rules):
            kind = "rule id" if "." in name else "rule family"
            reader.error(
                where, f"unknown {kind} '{name}' in {what}{_suggest(name, [*rules, *families])}", at_key
            )


def _expand(name: str, rules: dict) -> list[str]:
    return [name] if name in rules else sorted(r.id for r in rules.values() if r.family == name)


def _type_ok(value, default) -> bool:
    if isinstance(default, bool):
        return isinstance(value, bool)
    if isinstance(default, int):
        return isinstance(value, int) and not isinstance(value, bool)
    if isinstance(default, float):
        return isinstance(value, (int, float)) and not isinstance(value, bool)
    if isinstance(default, (list, tuple)):
        return isinstance(value, list)
    if isinstance(default, str):
        return isinstance(value, str)
    return True


# Bounds of rule settings: every default is a positive number; shares are fractions of one;
# search orders are bounded so that a project file cannot make a check run for hours.
_SHARE_WORDS = ("share", "derating", "tolerance")
_MOST = {"order": 15, "harmonic_order": 200, "max_listed": 500}


def _range_problem(name: str, value) -> str | None:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return None
    if not math.isfinite(value) or value <= 0:
        return "must be a number greater than 0"
    if any(word in name for word in _SHARE_WORDS) and value > 1:
        return "is a share and must be at most 1"
    if name in _MOST and value > _MOST[name]:
        return f"must be at most {_MOST[name]}"
    return None


def _kind(value) -> str:
    if isinstance(value, bool):
        return "true or false"
    if isinstance(value, int):
        return "a whole number"
    if isinstance(value, float):
        return "a number"
    if isinstance(value, (list, tuple)):
        return "a list"
    return "a text"


def load_project(path) -> Settings:
    """Read and validate a project file -> Settings (raises ConfigError naming every problem)."""
    from speccheck import registry, yamlnodes

    file = str(path)
    from speccheck import files as files_mod

    try:
        text = files_mod.read_bytes_bounded(path, PROJECT_FILE_LIMIT).decode("utf-8-sig")
    except files_mod.FileTrouble as exc:
        raise ConfigError([f"{file}: the project file {exc}"]) from None
    except UnicodeDecodeError as exc:
        raise ConfigError([f"{file}: the project file is not UTF-8 text (byte {exc.start})"]) from None
    doc = yamlnodes.parse(text)
    reader = _Reader(file, doc)
    for p in doc.problems:
        reader.errors.append(f"{file}:{p.mark.line}:{p.mark.col}: {p.message}")
    if reader.errors:
        raise ConfigError(reader.errors)
    data = doc.data
    if data is None:
        data = {}
    if not isinstance(data, dict):
        raise ConfigError(
            [
                f"{file}:1:1: the project file should be a mapping of keys (speccheck_project, "
                "rules, files, fail_level)"
            ]
        )
    _schema_errors(reader, data)
    if reader.errors:
        raise ConfigError(reader.sorted())

    rules = registry.load_rules()
    settings = Settings(source=file, root=str(Path(os.path.abspath(path)).parent))
    section = data.get("rules") or {}
    _names_check(reader, rules, section.get("only") or [], ("rules", "only"), "rules.only", False)
    _names_check(reader, rules, section.get("skip") or [], ("rules", "skip"), "rules.skip", False)
    _names_check(reader, rules, list(section.get("levels") or {}), ("rules", "levels"), "rules.levels", True)
    for i, name in enumerate(section.get("skip") or []):
        if name.split(".", 1)[0] == "input":
            reader.error(
                ("rules", "skip", i),
                f"'{name}' cannot be skipped: input findings say the file could "
                "not be read as a build plan, and every other rule depends on that",
            )
    for rule_id, values in (section.get("settings") or {}).items():
        found = rules.get(rule_id)
        where = ("rules", "settings", rule_id)
        if found is None:
            reader.error(
                where, f"unknown rule id '{rule_id}' in rules.settings{_suggest(rule_id, rules)}", True
            )
            continue
        if not found.settings:
            reader.error(where, f"rule {rule_id} has no settings", True)
            continue
        for name, value in (values or {}).items():
            if name not in found.settings:
                have = ", ".join(sorted(found.settings))
                reader.error(
                    where + (name,),
                    f"rule {rule_id} has no setting '{name}' (it has: {have})"
                    f"{_suggest(name, found.settings)}",
                    True,
                )
            elif not _type_ok(value, found.settings[name]):
                default = found.settings[name]
                reader.error(
                    where + (name,),
                    f"{rule_id}.{name} should be {_kind(default)} like its default "
                    f"{default!r}, got {value!r}",
                )
            elif _range_problem(name, value):
                reader.error(
                    where + (name,), f"{rule_id}.{name} is {value!r}, but it {_range_problem(name, value)}"
                )
    if reader.errors:
        raise ConfigError(reader.sorted())

    if "fail_level" in data:
        settings.fail_level = data["fail_level"]
    if "parts_series" in data:
        settings.parts_series = data["parts_series"]
    if data.get("baseline"):
        target, why = files_mod.confined(data["baseline"], settings.root, settings.root, "the project file")
        if target is None:
            reader.error(("baseline",), f"baseline '{data['baseline']}' {why}")
            raise ConfigError(reader.sorted())
        shown = os.path.relpath(target)  # reports name it as the user would, not from the machine's root
        settings.baseline = shown if not shown.startswith("..") else str(target)
    only = section.get("only") or []
    if only:
        wanted = {rid for name in only for rid in _expand(name, rules)}
        settings.disabled |= {
            rid for rid in rules if rid not in wanted and rules[rid].family not in FAMILY_ONLY_PROTECTED
        }
    for name in section.get("skip") or []:
        settings.disabled |= set(_expand(name, rules))
    for name, level in (section.get("levels") or {}).items():
        for rid in _expand(name, rules):
            settings.levels[rid] = level
    for rule_id, values in (section.get("settings") or {}).items():
        settings.rule_settings[rule_id] = dict(values or {})
    globs = data.get("files") or {}
    settings.include = list(globs.get("include") or [])
    settings.exclude = list(globs.get("exclude") or [])
    return settings


def apply_options(settings: Settings, *, fail_level: str | None = None, skip=()) -> Settings:
    """Command-line options win over the project file."""
    from speccheck import registry

    if fail_level:
        settings.fail_level = fail_level
    if skip:
        rules = registry.load_rules()
        problems = []
        for name in skip:
            if not _known(name, rules):
                families = sorted({r.family for r in rules.values()})
                problems.append(
                    f"--skip: unknown rule id or family '{name}'{_suggest(name, [*rules, *families])}"
                )
            elif name.split(".", 1)[0] == "input":
                problems.append(f"--skip: '{name}' cannot be skipped")
            else:
                settings.disabled |= set(_expand(name, rules))
        if problems:
            raise ConfigError(problems)
    return settings


def for_paths(paths, config: str | None = None, use_file: bool = True) -> Settings:
    """The settings for a check of these paths: the named project file, else the one found by walking
    up from the paths (all paths must agree on it), else the built-in defaults."""
    if config:
        if not Path(config).is_file():
            raise ConfigError([f"{config}: no such project file"])
        return load_project(config)
    if use_file:
        found: dict[Any, Any] = {}
        for raw in paths:
            hit = find_project_file(raw) if os.path.exists(raw) else None
            if hit is not None:
                found.setdefault(str(hit.resolve()), hit)
        if len(found) > 1:
            names = ", ".join(sorted(str(p) for p in found.values()))
            raise ConfigError(
                [
                    f"the paths belong to different projects ({names}); check them separately or "
                    "name one project file with --config"
                ]
            )
        if found:
            return load_project(next(iter(found.values())))
    settings = Settings()
    for raw in paths:
        if os.path.exists(raw):
            root = repo_root(Path(os.path.abspath(raw)))
            if root is not None:
                settings.root = str(root)
                break
    return settings
