"""The JSON report, shape version 1 (documented in README.md, "Report formats")."""

from __future__ import annotations

import json

from speccheck import __version__

REPORT_VERSION = 1


def finding_dict(f) -> dict:
    loc = f.location
    return {"rule": f.rule, "level": f.level, "message": f.message,
            "location": {"file": loc.file, "line": loc.line, "column": loc.col, "path": loc.path,
                         "end_line": loc.end_line, "end_column": loc.end_col},
            "values": [v.as_dict() for v in f.values], "fix": f.fix, "stage": f.stage,
            "waived": f.waived is not None, "waiver_reason": f.waived, "fingerprint": f.fingerprint}


def sheet_dict(entry) -> dict:
    return {"section": entry.section, "owner": entry.owner, "rule": entry.rule, **entry.value.as_dict()}


def file_dict(result) -> dict:
    return {"path": result.path, "build": result.build_name, "checked": result.checked,
            "counts": result.counts(), "cautions": list(result.cautions),
            "findings": [finding_dict(f) for f in result.findings]}


def report(results, settings) -> dict:
    totals = {"error": 0, "warning": 0, "note": 0, "waived": 0}
    for r in results:
        for f in r.findings:
            totals["waived" if f.waived else f.level] += 1
    return {"report": "speccheck-findings", "version": REPORT_VERSION,
            "tool": {"name": "speccheck", "version": __version__},
            "fail_level": settings.fail_level, "totals": totals,
            "files": [file_dict(r) for r in results]}


def render(results, settings) -> str:
    return json.dumps(report(results, settings), indent=2, ensure_ascii=False) + "\n"
