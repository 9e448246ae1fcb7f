"""The published JSON Schema of the build format, and plain-words messages for its errors."""

from __future__ import annotations

import difflib
import json
from functools import lru_cache
from importlib import resources

SCHEMA_FILE = "build-v1.json"
SCHEMA_FILES = {1: "build-v1.json", 2: "build-v2.json"}
LATEST = 2
MAX_SCHEMA_FINDINGS = 20
# Keys format 2 renamed: the hint an unknown-key message gives instead of a close match
RENAMED = {"load_impedance": "; format 2 calls it works_into on an input-match stage and load_resistance on "
                             "an audio-amp stage (`speccheck upgrade` renames it)"}


@lru_cache(maxsize=2)
def build_schema(version: int = 1) -> dict:
    name = SCHEMA_FILES[version]
    return json.loads(resources.files("speccheck").joinpath("schema").joinpath(name).read_text("utf-8"))


def version_of(data) -> int:
    """The format version a document declares: 1 or 2; anything else is checked as the latest."""
    spec = data.get("build_spec") if isinstance(data, dict) else None
    return spec if isinstance(spec, int) and not isinstance(spec, bool) and spec in SCHEMA_FILES else LATEST


@lru_cache(maxsize=1)
def parts_file_schema() -> dict:
    """A parts file beside a build holds only device profiles; it reuses the build's $defs (v2, a
    superset of v1's profile keys)."""
    build = build_schema(LATEST)
    return {"$schema": build["$schema"], "type": "object", "additionalProperties": False,
            "required": ["parts_spec", "profiles"],
            "properties": {"parts_spec": {"const": 1, "description": "marks the file as a parts file"},
                           "profiles": build["properties"]["profiles"], "note": {"type": "string"}},
            "$defs": build["$defs"]}


def inline_refs(node, defs: dict):
    """The schema with every local '#/$defs/...' reference replaced by its target.

    Same meaning, but jsonschema no longer resolves a reference at each use, which was a
    third of the time of checking a file. The format has no recursive definitions.
    """
    if isinstance(node, dict):
        ref = node.get("$ref", "")
        if ref.startswith("#/$defs/"):
            target = inline_refs(defs[ref[len("#/$defs/"):]], defs)
            rest = {k: inline_refs(v, defs) for k, v in node.items() if k != "$ref"}
            return {**target, **rest}
        return {k: inline_refs(v, defs) for k, v in node.items() if k != "$defs"}
    if isinstance(node, list):
        return [inline_refs(v, defs) for v in node]
    return node


@lru_cache(maxsize=4)
def validator(kind: str = "build"):
    """kind: 'build' (v1), 'build-2', or 'parts'."""
    from jsonschema import Draft202012Validator

    if kind == "parts":
        published = parts_file_schema()
    else:
        published = build_schema(2 if kind == "build-2" else 1)
    return Draft202012Validator(inline_refs(published, published["$defs"]))


def dotted(path) -> str:
    out = ""
    for step in path:
        out += f"[{step}]" if isinstance(step, int) else (f".{step}" if out else str(step))
    return out


def _where(path) -> str:
    return f" in {dotted(path)}" if path else ""


def _suggest(word, choices) -> str:
    close = difflib.get_close_matches(str(word), [str(c) for c in choices], n=1)
    return f"; did you mean '{close[0]}'?" if close else ""


def _dimension(schema: dict) -> str | None:
    if "x-dimension" in schema:
        return schema["x-dimension"]
    ref = schema.get("$ref", "")
    if ref.startswith("#/$defs/"):
        return build_schema(LATEST)["$defs"].get(ref[8:], {}).get("x-dimension")
    return None


def shown(value) -> str:
    """A value as the user wrote it in YAML, not as Python spells it."""
    if value is None:
        return "an empty value"
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, str):
        return f"'{value[:60]}'"
    return f"{value:g}" if isinstance(value, float) else str(value)


def explain(error) -> list[tuple[tuple, str, bool]]:
    """One jsonschema error -> [(path, message, at_key)]; at_key points the finding at the key."""
    from speccheck import units

    path = tuple(error.absolute_path)
    kind, inst, schema = error.validator, error.instance, error.schema
    if kind in ("anyOf", "oneOf") and error.context:
        from jsonschema.exceptions import best_match

        return explain(best_match(error.context))
    if kind == "additionalProperties" and isinstance(inst, dict):
        allowed = sorted(schema.get("properties", {}))
        extra = [k for k in inst if k not in schema.get("properties", {})]
        return [
            (path + (k,), f"unknown key '{k}'{_where(path)}{RENAMED.get(k) or _suggest(k, allowed)}", True)
            for k in extra
        ]
    if kind == "required":
        missing = error.message.split("'")[1] if "'" in error.message else error.message
        return [(path, f"missing key '{missing}'{_where(path)}", False)]
    if kind == "enum":
        choices = ", ".join(str(c) for c in error.validator_value)
        hint = _suggest(inst, error.validator_value) if isinstance(inst, str) else ""
        return [(path, f"{shown(inst)} is not allowed here; use one of: {choices}{hint}", False)]
    if kind == "const":
        return [(path, f"{dotted(path)} must be {shown(error.validator_value)}, got {shown(inst)}", False)]
    if kind == "type":
        dim = _dimension(schema)
        if dim:
            try:
                units.parse(inst, dim)
            except units.UnitError as exc:
                return [(path, f"{dotted(path)}: {exc}", False)]
        want = error.validator_value
        want = " or ".join(want) if isinstance(want, list) else want
        return [
            (
                path,
                f"{dotted(path) or 'the file'} should be {'an' if want[0] in 'aeiou' else 'a'} {want}, "
                f"got {shown(inst)}",
                False,
            )
        ]
    if kind == "pattern":
        what = schema.get("description", "a name of letters, digits and _ - + .").split(":")[0]
        return [(path, f"{shown(inst)} is not a valid name here: expected {what}", False)]
    if kind == "propertyNames":
        return [(path, f"'{inst}' is not a valid name{_where(path[:-1] if path else path)}", True)]
    if kind in ("minItems", "maxItems"):
        lo, hi = schema.get("minItems"), schema.get("maxItems")
        count = f"exactly {lo}" if lo == hi else f"at least {lo}" if kind == "minItems" else f"at most {hi}"
        return [(path, f"{dotted(path)} needs {count} entries, got {len(inst)}", False)]
    if kind in ("maxLength", "maxProperties", "maximum", "minimum", "exclusiveMinimum"):
        return [(path, f"{dotted(path)}: value out of bounds ({kind} {error.validator_value})", False)]
    return [(path, f"{dotted(path) or 'the file'}: {error.message[:200]}", False)]


def problems(data, kind: str = "build") -> list[tuple[tuple, str, bool]]:
    """All schema errors of a document, explained, one per place, in document order."""
    seen, out = set(), []
    for error in validator(kind).iter_errors(data):
        for path, message, at_key in explain(error):
            if (path, message) not in seen:
                seen.add((path, message))
                out.append((path, message, at_key))
    return out
