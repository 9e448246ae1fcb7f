"""From a file on disk to a typed, unit-converted `Build`, and the input.* findings
(the input family itself is defined in rules/input.py).

The narrow interface: `load(path) -> Loaded`. It reads text, asks yamlnodes for plain data
with positions, validates against the published schema, converts every quantity through
units, resolves device profiles and references, and reports every problem as a finding at
its file:line:col. Nothing here raises for bad input.
"""

from __future__ import annotations

import dataclasses
import os
import re
from dataclasses import dataclass, field
from functools import cache, lru_cache
from importlib import resources
from pathlib import Path

from speccheck import files, model, references, registry, schema, units, yamlnodes
from speccheck.findings import Finding, Location

ZERO_ALLOWED = {"drift", "stray", "extra_capacitance", "theta_cs", "tolerance", "ac_peak", "forward_voltage"}
POSITIVE_DIMS = {"frequency", "capacitance", "inductance", "resistance", "current", "power", "apparent_power",
                 "time", "length", "inductance_factor", "thermal_resistance", "i2t", "fraction", "charge"}


def _level(rule_id: str) -> str:
    return (
        registry.RULES[rule_id].level if rule_id in registry.RULES else registry.load_rules()[rule_id].level
    )


def _fix(rule_id: str) -> str:
    return registry.load_rules()[rule_id].fix


@dataclass
class Loaded:
    path: str
    build: model.Build | None
    findings: list = field(default_factory=list)
    doc: yamlnodes.Document | None = None
    text: str = ""
    reads: list = field(default_factory=list)  # other files it reads (its parts files), as paths

    @property
    def can_check(self) -> bool:
        """Rules run only on a file with no input error: on a broken one they would guess, or
        call a value that was given but refused 'not given'."""
        return self.build is not None and not any(
            f.rule.startswith("input.") and f.level == "error" for f in self.findings
        )

    @property
    def name(self) -> str:
        """The build's name, even when the file did not get as far as a model."""
        info = (
            self.doc.data.get("build") if self.doc is not None and isinstance(self.doc.data, dict) else None
        )
        name = info.get("name") if isinstance(info, dict) else None
        return name if isinstance(name, str) else ""


class _Context:
    def __init__(self, file: str, doc: yamlnodes.Document, findings: list):
        self.file, self.doc, self.findings = file, doc, findings
        self._locations: dict = {}

    def loc(self, path, at_key: bool = False) -> Location:
        """The Location of a document path (made once, when first asked for)."""
        key = (path, at_key)
        found = self._locations.get(key)
        if found is None:
            mark = self.doc.key_mark(path) if at_key else self.doc.mark(path)
            found = Location(self.file, mark.line, mark.col, schema.dotted(path), mark.end_line, mark.end_col)
            self._locations[key] = found
        return found

    def report(self, rule: str, message: str, path, at_key: bool = False):
        level = _level(rule)
        self.findings.append(
            Finding(rule, level, message, self.loc(path, at_key), fix=_fix(rule), stage="input")
        )

    def quantity(self, raw, dim: str, path, name: str):
        try:
            si = units.parse(raw, dim)
        except units.UnitError as exc:
            self.report("input.unit", f"{schema.dotted(path)}: {exc}", path)
            return None
        if dim in POSITIVE_DIMS and (si < 0 or (si == 0 and name not in ZERO_ALLOWED)):
            self.report(
                "input.value-range",
                f"{schema.dotted(path)} is {raw}: {units.article(dim)} here must be greater than zero",
                path,
            )
            return None
        why = units.implausible(si, dim)
        if why:
            self.report("input.value-range", f"{schema.dotted(path)} is {raw}, which {why}", path)
            return None
        return model.Q(si, dim, str(raw).strip(), self, path)


@cache
def _field_specs(cls) -> dict:
    """YAML key -> (field name, metadata) of a model class."""
    specs: dict = {}
    for f in dataclasses.fields(cls):
        if f.name in ("src", "doc_path", "places") or f.metadata.get("derived"):
            continue
        key = f.metadata.get("key", f.name)
        if key in specs:
            raise TypeError(f"{cls.__name__}: fields {specs[key][0]} and {f.name} both read key '{key}'")
        specs[key] = (f.name, f.metadata)
    return specs


def _build_obj(cls, data, path, ctx: _Context, **extra):
    obj = cls(**extra)
    obj.src, obj.doc_path = ctx, path
    if not isinstance(data, dict):
        return obj
    specs = _field_specs(cls)
    for key, raw in data.items():  # a part names 5 of its 40 possible fields: walk what is there
        spec = specs.get(key)
        if spec is None:
            continue
        name, meta = spec
        here = path + (key,)
        obj.places[name] = here
        if raw is None:
            continue
        if "dim" in meta:
            value = ctx.quantity(raw, meta["dim"], here, name)
        elif "node" in meta:
            value = _build_obj(meta["node"], raw, here, ctx)
        elif "nodes" in meta:
            value = (
                {k: _build_obj(meta["nodes"], v, here + (k,), ctx, name=k) for k, v in raw.items()}
                if isinstance(raw, dict)
                else {}
            )
        elif "items" in meta:
            value = (
                [_build_obj(meta["items"], v, here + (i,), ctx) for i, v in enumerate(raw)]
                if isinstance(raw, list)
                else []
            )
        else:
            value = raw
        setattr(obj, name, value)
    _special_fields(obj, data, path, ctx)
    return obj


def _special_fields(obj, data, path, ctx: _Context):
    """Fields whose dimension depends on another field."""
    if isinstance(obj, model.Part):
        dim = model.VALUE_DIMENSION.get(obj.kind)
        if "value" in data and data["value"] is not None:
            if dim:
                obj.value = ctx.quantity(data["value"], dim, path + ("value",), "value")
            else:
                ctx.report(
                    "input.schema",
                    f"{schema.dotted(path)}: a {obj.kind} has no 'value'; use the "
                    "fields of its kind (frequency, center, current_rating ...)",
                    path + ("value",),
                    True,
                )
        adjust = data.get("adjust")
        if isinstance(adjust, dict) and dim:
            obj.adjust = model.Adjust(src=ctx, doc_path=path + ("adjust",))
            for end in ("min", "max"):
                if end in adjust:
                    setattr(obj.adjust, end, ctx.quantity(adjust[end], dim, path + ("adjust", end), end))
        obj.ends = [str(e) for e in obj.ends]
        _terminals(obj, data)
    elif isinstance(obj, model.Source) and isinstance(data.get("bandwidth_settings"), dict):
        obj.bandwidth_settings = {}
        for name, raw in data["bandwidth_settings"].items():
            q = ctx.quantity(raw, "frequency", path + ("bandwidth_settings", name), "bandwidth")
            if q is not None:
                obj.bandwidth_settings[str(name)] = q
    elif isinstance(obj, (model.Tank, model.Stage)):
        for name in ("damping", "resistor", "capacitor"):
            refs = getattr(obj, name, None)
            if isinstance(refs, list):  # v2: several parts, those in circuit acting together
                obj.choices[name] = [str(r) for r in refs]
                setattr(obj, name, "+".join(obj.choices[name]) if len(refs) > 1 else str(refs[0]))
    elif (
        isinstance(obj, model.Pin)
        and isinstance(obj.dc, str)
        and obj.dc not in ("supply", "half-supply", "ground", "none")
    ):
        obj.dc = ctx.quantity(obj.dc, "voltage", path + ("dc",), "dc")
    if isinstance(obj, model.Stage):
        obj.index = path[-1] if path and isinstance(path[-1], int) else 0
    if isinstance(obj, (model.Part, model.IfPath)) and isinstance(obj.in_circuit, dict):
        obj.in_circuit = {
            str(k): [str(p) for p in (v if isinstance(v, list) else [v])] for k, v in obj.in_circuit.items()
        }


def _terminals(part: model.Part, data: dict):
    """Every part's terminals by name (v2), from whichever way the file wrote them."""
    given = {str(k): str(v) for k, v in (part.terminals or {}).items()}
    if given and not part.ends and len(given) == 2:
        part.ends = list(given.values())  # a two-terminal part written with named terminals
        if part.positive is None and "positive" in given:
            part.positive = given["positive"]
    track = {k: v for k, v in given.items() if k != "wiper"}
    if part.kind == "potentiometer" and "wiper" in given and len(track) == 2 and not part.ends:
        part.ends, part.wiper = list(track.values()), part.wiper or given["wiper"]  # the track's two ends
    out = {}
    if len(part.ends) == 2:
        a, b = part.ends
        if part.positive in (a, b):
            out["positive"], out["negative"] = part.positive, b if part.positive == a else a
        else:
            out["end1"], out["end2"] = a, b
    if part.wiper:
        part.wiper = str(part.wiper)
        out["wiper"] = part.wiper
    for name, winding in (("primary", part.primary), ("secondary", part.secondary)):
        for i, net in enumerate(winding[:2]):
            out[f"{name}{i + 1}"] = str(net)
    part.positions = [str(p) for p in part.positions]
    for pole in part.poles.values():
        pole.throws = {str(k): str(v) for k, v in (pole.throws or {}).items()}
        if pole.common:
            out[f"{pole.name}.common"] = str(pole.common)
        for position, net in pole.throws.items():
            out[f"{pole.name}.{position}"] = net
    part.terminals = given or out  # the file's own names when it gave them, else names made here


# ---- profiles --------------------------------------------------------------------------


def _profiles_from(data, file: str, doc, findings: list, builtin: bool) -> dict:
    ctx = _Context(file, doc, findings)
    out = {}
    for name, raw in (data.get("profiles") or {}).items():
        prof = _build_obj(model.Profile, raw, ("profiles", name), ctx, name=name)
        prof.builtin = builtin
        out[name] = prof
    return out


def _parse_file(text: str, file: str, kind: str, findings: list):
    doc = yamlnodes.parse(text)
    ctx = _Context(file, doc, findings)
    if kind == "build" and schema.version_of(doc.data) == 2:
        kind = "build-2"
    for p in doc.problems:
        rule = {
            "duplicate-key": "input.duplicate-key",
            "alias": "input.not-accepted",
            "tag": "input.not-accepted",
        }.get(p.kind, "input.yaml-syntax")
        findings.append(
            Finding(
                rule,
                "error",
                p.message,
                Location(
                    file, p.mark.line, p.mark.col, schema.dotted(p.path), p.mark.end_line, p.mark.end_col
                ),
                fix=_fix(rule),
                stage="input",
            )
        )
    if any(f.rule == "input.yaml-syntax" for f in findings):
        return doc, False
    if not isinstance(doc.data, dict):
        ctx.report("input.schema", "the file should be a mapping of keys (build_spec, build, parts, ...)", ())
        return doc, False
    schema_ok = True
    problems = schema.problems(doc.data, kind)
    for path, message, at_key in problems[: schema.MAX_SCHEMA_FINDINGS]:
        rule = (
            "input.unit"
            if message.startswith(schema.dotted(path) + ":") and "expected" in message
            else "input.schema"
        )
        ctx.report(rule, message, path, at_key)
        schema_ok = False
    if len(problems) > schema.MAX_SCHEMA_FINDINGS:
        ctx.report(
            "input.schema", f"{len(problems) - schema.MAX_SCHEMA_FINDINGS} more format errors not shown", ()
        )
    return doc, schema_ok


@lru_cache(maxsize=1)
def builtin_profiles() -> dict:
    text = resources.files("speccheck").joinpath("profiles").joinpath("builtin.yaml").read_text("utf-8")
    findings: list = []
    doc, _ok = _parse_file(text, "<built-in profiles>", "parts", findings)
    if findings:
        raise RuntimeError(f"built-in profiles are broken: {findings[0].message}")
    return _profiles_from(doc.data, "<built-in profiles>", doc, findings, builtin=True)


def _read(
    path: Path,
    findings: list,
    file: str,
    at: Location | None = None,
    shown: str | None = None,
    marker: re.Pattern | None = None,
) -> str | None:
    """The file's text, or None with an input finding. `shown` names the file in messages (a parts
    file by its entry as written); with `marker`, a file without that line is refused unread."""
    name = shown or "the file"  # the finding points at the file already; no path of the machine in it
    try:
        raw = files.read_bytes_bounded(path, yamlnodes.MAX_BYTES)
    except files.FileTrouble as exc:
        rule = "input.parts-file" if marker is not None else "input.unreadable"
        findings.append(Finding(rule, "error", f"{name} {exc}", at or Location(file), stage="input"))
        return None
    if marker is not None and not marker.search(raw):
        findings.append(
            Finding(
                "input.parts-file",
                "error",
                f"{name} is not a parts file (it has no line 'parts_spec: 1'); nothing of it was read",
                at or Location(file),
                stage="input",
                fix=_fix("input.parts-file"),
            )
        )
        return None
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw.count(b"\n", 0, exc.start) + 1
        col = exc.start - (raw.rfind(b"\n", 0, exc.start) + 1) + 1
        findings.append(
            Finding(
                "input.unreadable",
                "error",
                f"{name} is not UTF-8 text: byte 0x{raw[exc.start]:02x} at line {line}, col {col}",
                at or Location(file, line, col),
                stage="input",
            )
        )
        return None


_PARTS_MARKER = re.compile(rb"^parts_spec[ \t]*:[ \t]*1[ \t]*(?:#[^\n]*)?\r?$", re.MULTILINE)


def load_text(text: str, file: str, base_dir: Path | None = None, root: str | Path | None = None) -> Loaded:
    findings: list = []
    doc, ok = _parse_file(text, file, "build", findings)
    result = Loaded(file, None, findings, doc, text)
    if not ok:  # a structure the schema refused: building a model on it would only guess
        return result
    ctx = _Context(file, doc, findings)
    build = _build_obj(model.Build, doc.data, (), ctx, file=file)
    build.profiles = _all_profiles(build, doc, file, findings, base_dir, root, result.reads)
    references.check(build, ctx)
    if build.build_spec == 2:
        from speccheck import configs

        configs.check_references(build, ctx.findings)
        configs.prepare(build)
    result.build = build
    return result


def load(path: str | Path, root: str | Path | None = None) -> Loaded:
    """Read and load one build file. `root` is the project folder its parts files must stay in
    (the project file's folder or the repository root); without it, the repository holding the
    file, else the file's own folder."""
    path = Path(path)
    findings: list = []
    text = _read(path, findings, str(path))
    if text is None:
        return Loaded(str(path), None, findings)
    return load_text(text, str(path), path.parent, root)


def parts_root(base_dir: Path | None, root: str | Path | None) -> Path:
    """The folder parts files must stay in."""
    if root:
        return Path(root)
    from speccheck.config import repo_root

    here = Path(os.path.abspath(base_dir or "."))
    return repo_root(here) or here


def _all_profiles(build, doc, file: str, findings: list, base_dir: Path | None, root, reads: list) -> dict:
    profiles = dict(builtin_profiles())
    if build.parts_files:
        root = parts_root(base_dir, root)
    for i, name in enumerate(build.parts_files):
        line, col = _line_col(doc, ("parts_files", i))
        at = Location(file, line, col, path=f"parts_files[{i}]")
        shown = f"parts_files[{i}] {_quoted(name)}"
        more: list = []
        target, why = files.confined(str(name), base_dir or Path("."), root)
        if target is None:
            more.append(
                Finding(
                    "input.parts-file",
                    "error",
                    f"{shown} {why}",
                    at,
                    stage="input",
                    fix=_fix("input.parts-file"),
                )
            )
            findings.extend(more)
            continue
        reads.append(str(target))  # no report may be written onto it
        text = _read(target, more, file, at, shown, _PARTS_MARKER)
        if text is not None:
            pdoc, ok = _parse_file(text, str(target), "parts", more)
            if ok and isinstance(pdoc.data, dict):
                profiles.update(_profiles_from(pdoc.data, str(target), pdoc, more, builtin=False))
        findings.extend(more)
    profiles.update(build.profiles)  # declared in the build file itself: wins
    return profiles


def _quoted(name) -> str:
    return "'" + str(name)[:80] + ("...'" if len(str(name)) > 80 else "'")


def _line_col(doc, path):
    m = doc.mark(path)
    return m.line, m.col
