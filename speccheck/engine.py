"""The engine: load a file, run every enabled rule on its model, collect findings and the
design sheet. Rules never see YAML, reporters never see rules' internals."""

from __future__ import annotations

import hashlib
import os
import re
import traceback
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from speccheck import loader, registry
from speccheck.config import Settings
from speccheck.findings import RANK, Finding, Location, SheetEntry, Value


@dataclass
class FileResult:
    path: str
    findings: list[Finding] = field(default_factory=list)
    sheet: list[SheetEntry] = field(default_factory=list)
    cautions: list[str] = field(default_factory=list)  # safety texts, shown first in every format
    checked: bool = False  # False when the file could not be read or parsed far enough for rules
    build_name: str = ""
    parts: dict[str, str] = field(default_factory=dict)  # reference designator -> kind (or "device")
    chain: list[tuple[str, str]] = field(default_factory=list)  # (label, stage kind) in signal order
    reads: list[str] = field(default_factory=list)  # other files the check read: its parts files

    def counts(self, include_waived: bool = False) -> dict[str, int]:
        out = {"error": 0, "warning": 0, "note": 0}
        for f in self.findings:
            if include_waived or not f.waived:
                out[f.level] += 1
        return out


class Context:
    """What a rule gets besides the model: a way to report, publish and read its settings."""

    def __init__(self, result: FileResult, rule: registry.Rule, settings: Settings, build: Any):
        self.result, self.rule, self.settings, self.build = result, rule, settings, build

    def setting(self, name: str, of: str | None = None) -> Any:
        """A setting of this rule, or of rule `of` (the fuse rules share power.fuse-size's):
        the project file's value first, then the rule's default."""
        rule = self.rule if of is None else registry.RULES[of]
        return self.settings.rule_settings.get(rule.id, {}).get(name, rule.settings[name])

    def report(self, message: str, at: Location, values: Iterable[Value] = (), fix: str | None = None,
               level: str | None = None, stage: str = "") -> Finding:
        if fix is None:
            # A note a rule lowers itself to says what it could not check; the rule's fix (for
            # the mistake it looks for) would read as advice about something not found.
            fix = "" if level == "note" and self.rule.level != "note" else self.rule.fix
        found = Finding(
            self.rule.id,
            self.settings.level_for(self.rule.id, level or self.rule.level),
            message,
            at or Location(self.result.path),
            list(values),
            fix,
            stage,
        )
        self.result.findings.append(found)
        return found

    def publish(self, section: str, owner: str, name: str, value: float | str, unit: str = "") -> Value:
        shown = Value(name, value, unit)
        self.result.sheet.append(SheetEntry(section, owner, shown, self.rule.id))
        return shown

    def caution(self, text: str) -> None:
        if text not in self.result.cautions:
            self.result.cautions.append(text)


def _run_one(rule: registry.Rule, build: Any, result: FileResult, settings: Settings) -> bool:
    ctx = Context(result, rule, settings, build)
    assert rule.check is not None  # run_rules passes only rules that run on the model
    try:
        rule.check(build, ctx)
    except Exception as exc:  # a rule bug must not hide the other findings, nor crash the run
        where = traceback.extract_tb(exc.__traceback__)[-1]
        result.findings.append(
            Finding(
                rule.id,
                "error",
                f"internal error in rule {rule.id}: {type(exc).__name__}: {exc} "
                f"({Path(where.filename).name}:{where.lineno}); please report it",
                Location(result.path),
                stage="internal",
            )
        )
        return False
    return True


def run_rules(build: Any, result: FileResult, settings: Settings) -> None:
    from speccheck import configs

    switched = build.switched
    for rule in registry.load_rules().values():
        if rule.check is None or not settings.enabled(rule.id):
            continue
        if switched and rule.id in configs.PER_CONFIGURATION:
            _run_per_configuration(rule, build, result, settings)
        else:
            _run_one(rule, build, result, settings)


def _run_per_configuration(rule: registry.Rule, build: Any, result: FileResult, settings: Settings) -> None:
    """Run a rule once per (signal, positions) on the view of the build that is in circuit
    there; name the signal and positions in what it finds, unless every configuration found
    the same (then it is said once, for all)."""
    from speccheck import configs

    cfgs = build.configurations()
    per_cfg = []
    for cfg in cfgs:
        f0, s0 = len(result.findings), len(result.sheet)
        ok = _run_one(rule, configs.view(build, cfg), result, settings)
        per_cfg.append((cfg, result.findings[f0:], result.sheet[s0:]))
        del result.findings[f0:], result.sheet[s0:]
        if not ok:
            result.findings.append(per_cfg[-1][1][-1])
            return
    result.findings.extend(_tagged(per_cfg, 1, len(cfgs)))
    result.sheet.extend(_tagged(per_cfg, 2, len(cfgs)))


def _tagged(per_cfg: list[Any], which: int, count: int) -> list[Any]:
    def key(item: Any) -> tuple[Any, ...]:
        if isinstance(item, Finding):
            return item.rule, item.location, item.message
        return item.section, item.owner, item.value.name, repr(item.value.value)

    seen: dict[tuple[Any, ...], list[Any]] = {}
    for cfg, *found in per_cfg:
        for item in found[which - 1]:
            seen.setdefault(key(item), []).append((cfg, item))
    out: list[Any] = []
    for hits in seen.values():
        if len(hits) == count:  # the same in every configuration: said once, for all
            out.append(hits[0][1])
            continue
        for cfg, item in hits:
            if isinstance(item, Finding):
                item.signal, item.position = cfg.signal_name, cfg.position_label
                item.message = f"{item.message} [{cfg.label}]"
                out.append(item)
            else:
                out.append(
                    SheetEntry(
                        item.section, item.owner, item.value, item.rule, cfg.signal_name, cfg.position_label
                    )
                )
    return out


_NUMBER = re.compile(r"[-+]?\d+(?:[.,]\d+)*(?:[eE][-+]?\d+)?")


def fingerprint_file(file: str, settings: Settings) -> str:
    """The file as a fingerprint sees it: from the project root, so that a check run from a
    sub-folder, or with './' in front, gives the same identity."""
    if file.startswith("<"):
        return file
    rel = settings.relative(file)
    return rel if rel is not None else Path(os.path.normpath(file)).as_posix()


def _fingerprint(f: Finding, seen: dict[str, int], file: str) -> str:
    """Stable across unrelated edits: rule, file (from the project root), document path and the
    message with its numbers blanked; never the line or column, which move when lines are
    inserted above. Equal bases are told apart by their order in the file."""
    shape = _NUMBER.sub("#", f.message)
    base = f"{f.rule}|{file}|{f.location.path}|{shape}"
    n = seen.get(base, 0)
    seen[base] = n + 1
    return hashlib.sha256(f"{base}|{n}".encode()).hexdigest()[:32]


def finish(result: FileResult, settings: Settings) -> None:
    result.findings = [f for f in result.findings if settings.enabled(f.rule)]
    for f in result.findings:
        f.level = settings.level_for(f.rule, f.level)
    result.findings.sort(key=Finding.sort_key)
    unique: list[Finding] = []
    said: set[tuple[str, int, int, str]] = set()
    for f in result.findings:  # two stages may see the same slip (schema and units): say it once
        key = (f.rule, f.location.line, f.location.col, f.message)
        if key not in said:
            said.add(key)
            unique.append(f)
    result.findings = unique
    seen: dict[str, int] = {}
    files: dict[str, str] = {}
    for f in result.findings:
        file = files.get(f.location.file)
        if file is None:
            file = files[f.location.file] = fingerprint_file(f.location.file, settings)
        f.fingerprint = _fingerprint(f, seen, file)


_WARM = False


def warm_up() -> None:
    """Load once what every check needs (rules, unit registry, schema validator, built-in
    profiles), then hide those long-lived objects from the garbage collector (gc.freeze):
    a many-file check otherwise spends a fifth of its time re-scanning them."""
    global _WARM
    if _WARM:
        return
    import gc

    from speccheck import schema, units

    registry.load_rules()
    units.registry()
    schema.validator("build")
    loader.builtin_profiles()
    gc.freeze()
    _WARM = True


def _describe(build: Any, result: FileResult) -> None:
    """What a report needs to name things: each part's kind and the chain's stages in order."""
    result.parts = {name: getattr(p, "kind", "") or "" for name, p in build.parts.items()}
    result.parts.update(dict.fromkeys(build.devices, "device"))
    result.chain = [(s.label, s.kind) for s in build.chain]


def check_loaded(loaded: loader.Loaded, settings: Settings) -> FileResult:
    result = FileResult(loaded.path, list(loaded.findings), reads=list(loaded.reads))
    result.build_name = loaded.name
    if loaded.can_check:
        _describe(loaded.build, result)
        run_rules(loaded.build, result, settings)
        result.checked = True
    from speccheck import waivers

    waivers.apply(result, loaded, settings)  # type: ignore[no-untyped-call]
    finish(result, settings)
    return result


def check_file(path: str | Path, settings: Settings | None = None) -> FileResult:
    settings = settings or Settings()
    return check_loaded(loader.load(path, settings.root or None), settings)


def check_text(text: str, file: str = "<text>", settings: Settings | None = None) -> FileResult:
    return check_loaded(loader.load_text(text, file), settings or Settings())


def worst(results: Iterable[FileResult]) -> str | None:
    levels = [f.level for r in results for f in r.findings if not f.waived]
    return max(levels, key=lambda level: RANK[level]) if levels else None
