"""SARIF 2.1.0 (OASIS Static Analysis Results Interchange Format), for code-scanning views.

One run. The driver lists every rule (id, title, help text with the fix, the bench check and
the source, default level); each finding becomes a result with its physical location (uri from
the working folder, region with start and end), the stable fingerprint as a partial
fingerprint, and the numbers in its property bag. Waived findings carry a suppression of kind
"inSource" with the waiver's reason as justification. Safety cautions are results of level
"note" (rule review.safety-caution) at the top of their file, and also tool notifications, so a
code-scanning view shows them beside the findings.
"""

from __future__ import annotations

import hashlib
import json
import os
from pathlib import Path
from typing import Any
from urllib.parse import quote

from speccheck import __version__

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
BASE_ID = "%SRCROOT%"
FINGERPRINT_KEY = "speccheckFinding/v1"
CAUTION_RULE = "review.safety-caution"


def _name(rule_id: str) -> str:
    return "".join(word.capitalize() for word in rule_id.replace(".", "-").split("-") if word)


def _help(rule, markdown: bool = False) -> str:
    """The rule's help, as plain text or as Markdown (the same words either way)."""
    bold = (lambda t: f"**{t}**") if markdown else (lambda t: t)
    code = (lambda t: f"`{t}`") if markdown else (lambda t: t)
    parts = [rule.explanation, f"{bold('Fix:')} {rule.fix}"]
    if rule.verify:
        parts.append(f"{bold('Verify on the bench:')} {rule.verify}")
    parts.append(f"{bold('Source of the numbers:')} {rule.source}")
    if rule.settings:
        parts.append(f"{bold('Settings')} (project file, {code('rules.settings')}): "
                     + ", ".join(f"{code(k)} = {code(repr(v))}" for k, v in rule.settings.items()))
    return "\n\n".join(parts)


def descriptor(rule) -> dict:
    props = {"tags": [rule.family], "source": rule.source}
    if rule.settings:
        props["settings"] = dict(rule.settings)
    if rule.verify:
        props["verify"] = rule.verify
    return {"id": rule.id, "name": _name(rule.id),
            "shortDescription": {"text": rule.title},
            "fullDescription": {"text": rule.explanation or rule.title},
            "help": {"text": _help(rule), "markdown": _help(rule, markdown=True)},
            "defaultConfiguration": {"level": rule.level},
            "properties": props}


def artifact_location(file: str) -> dict:
    """uri relative to the working folder, with the base id the consumer resolves (the checkout).

    No absolute path of the machine that ran the check goes into the log: a file outside the
    working folder is reached with '../' steps, and the optional originalUriBaseIds is left out,
    so the consumer supplies the base itself."""
    if file.startswith("<"):
        return {"uri": quote(file.strip("<>"))}
    try:
        rel = os.path.relpath(os.path.abspath(file), os.getcwd())
    except ValueError:  # another drive: there is no relative path
        rel = Path(file).name
    return {"uri": quote(Path(rel).as_posix(), safe="/"), "uriBaseId": BASE_ID}


def _shown(path) -> str:
    """A path for a message: as the artifact uri has it, never absolute."""
    return str(path) if str(path).startswith("<") else artifact_location(str(path))["uri"]


def region(loc) -> dict:
    out = {"startLine": max(1, loc.line), "startColumn": max(1, loc.col)}
    if loc.end_line and (loc.end_line, loc.end_col) > (loc.line, loc.col):
        out["endLine"] = loc.end_line
        out["endColumn"] = max(1, loc.end_col)
    return out


def _value_props(f) -> list:
    from speccheck.reporters.common import value_dict

    return [value_dict(v) for v in f.values]


def result_of(f, index: dict, artifacts: dict, with_baseline: bool) -> dict:
    loc = f.location
    where: dict[str, Any] = dict(artifact_location(loc.file))
    if loc.file in artifacts:
        where["index"] = artifacts[loc.file]
    physical = {"artifactLocation": where, "region": region(loc)}
    location: dict[str, Any] = {"physicalLocation": physical}
    if loc.path:
        location["logicalLocations"] = [{"fullyQualifiedName": loc.path, "kind": "member"}]
    props = {"stage": f.stage, "fix": f.fix, "values": _value_props(f)}
    if loc.path:
        props["documentPath"] = loc.path
    if f.signal or f.position:
        props["signal"], props["position"] = f.signal, f.position
    out = {"ruleId": f.rule, "level": f.level, "message": {"text": f.message}, "locations": [location],
           "partialFingerprints": {FINGERPRINT_KEY: f.fingerprint}, "properties": props}
    if f.rule in index:
        out["ruleIndex"] = index[f.rule]
    if f.waived:
        out["suppressions"] = [{"kind": "inSource", "status": "accepted", "justification": f.waived}]
    if with_baseline:
        out["baselineState"] = "new"
    return out


def caution_result(result, text: str, index: dict, artifacts: dict) -> dict:
    where = dict(artifact_location(result.path))
    if result.path in artifacts:
        where["index"] = artifacts[result.path]
    digest = hashlib.sha256(f"{CAUTION_RULE}|{where['uri']}|{text}".encode()).hexdigest()[:32]
    out = {"ruleId": CAUTION_RULE, "level": "note", "message": {"text": f"Safety caution: {text}"},
           "locations": [{"physicalLocation": {"artifactLocation": where, "region": {"startLine": 1,
                                                                                     "startColumn": 1}}}],
           "partialFingerprints": {FINGERPRINT_KEY: digest},
           "properties": {"stage": "safety", "caution": True}}
    if CAUTION_RULE in index:
        out["ruleIndex"] = index[CAUTION_RULE]
    return out


def _note(text: str, level: str = "note", file: str | None = None) -> dict:
    out: dict[str, Any] = {"level": level, "message": {"text": text}}
    if file:
        out["locations"] = [{"physicalLocation": {"artifactLocation": artifact_location(file)}}]
    return out


def _overrides(settings, rules: list, index: dict) -> list:
    out = []
    for r in rules:
        config = {}
        if not settings.enabled(r.id):
            config["enabled"] = False
        level = settings.level_for(r.id, r.level)
        if level != r.level:
            config["level"] = level
        if config:
            out.append({"descriptor": {"id": r.id, "index": index[r.id]}, "configuration": config})
    return out


def report(results, settings, run=None) -> dict:
    from speccheck import registry
    from speccheck.reporters.common import RunInfo

    run = run or RunInfo()
    rules = sorted(registry.load_rules().values(), key=lambda r: r.id)
    index = {r.id: i for i, r in enumerate(rules)}
    artifacts: dict = {}
    artifact_list: list[dict[str, Any]] = []
    for r in results:
        if r.path not in artifacts:
            artifacts[r.path] = len(artifact_list)
            artifact_list.append({"location": artifact_location(r.path), "roles": ["analysisTarget"]})
    out_results, notes = [], []
    for r in results:
        for text in r.cautions:
            out_results.append(caution_result(r, text, index, artifacts))
            notes.append(_note(f"Safety caution for {_shown(r.path)}: {text}", "warning", r.path))
        out_results.extend(result_of(f, index, artifacts, bool(run.baseline)) for f in r.findings)
    notes += [_note(f"{_shown(p)}: skipped, not a build file (no 'build_spec:' key)", file=str(p))
              for p in run.skipped]
    notes += [_note(f"{_shown(p)}: skipped, excluded by the project file", file=str(p)) for p in run.excluded]
    notes += [_note(f"{_shown(p)}: skipped, {why}", file=str(p)) for p, why in run.set_aside]
    if run.baseline:
        notes.append(_note(f"{run.hidden_total} findings hidden by the baseline {_shown(run.baseline)}"))
    unreadable = any(f.rule == "input.unreadable" for r in results for f in r.findings)
    invocation = {"executionSuccessful": not unreadable, "toolExecutionNotifications": notes}
    overrides = _overrides(settings, rules, index)
    if overrides:
        invocation["ruleConfigurationOverrides"] = overrides
    invocation["properties"] = {"failLevel": settings.fail_level,
                                "projectFile": _shown(run.config) if run.config else None,
                                "baseline": _shown(run.baseline) if run.baseline else None,
                                "hiddenByBaseline": run.hidden_total}
    sarif_run = {
        "tool": {"driver": {"name": "speccheck", "version": __version__, "semanticVersion": __version__,
                            "rules": [descriptor(r) for r in rules]}},
        "invocations": [invocation],
        "artifacts": artifact_list,
        "columnKind": "unicodeCodePoints",
        "results": out_results,
    }
    return {"$schema": SARIF_SCHEMA, "version": SARIF_VERSION, "runs": [sarif_run]}


def render(results, settings, run=None) -> str:
    from speccheck.reporters.neutral import json_text

    return json_text(json.dumps(report(results, settings, run), indent=2, ensure_ascii=False)) + "\n"
