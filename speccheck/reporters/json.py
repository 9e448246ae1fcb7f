"""The JSON report, shape version 1 (documented in README.md, "Report formats")."""

from __future__ import annotations

import json

from speccheck import __version__
from speccheck.reporters.common import value_dict

REPORT_VERSION = 1


def finding_dict(f) -> dict:
    loc = f.location
    return {"rule": f.rule, "level": f.level, "message": f.message,
            "location": {"file": loc.file, "line": loc.line, "column": loc.col, "path": loc.path,
                         "end_line": loc.end_line, "end_column": loc.end_col},
            "values": [value_dict(v) for v in f.values], "fix": f.fix, "stage": f.stage,
            "waived": f.waived is not None, "waiver_reason": f.waived, "fingerprint": f.fingerprint,
            "signal": f.signal, "position": f.position}


def sheet_dict(entry) -> dict:
    return {"section": entry.section, "owner": entry.owner, "rule": entry.rule, "signal": entry.signal,
            "position": entry.position, **value_dict(entry.value)}


def file_dict(result, hidden: int = 0) -> dict:
    return {"path": result.path, "build": result.build_name, "checked": result.checked,
            "counts": result.counts(), "waived": sum(1 for f in result.findings if f.waived),
            "hidden_by_baseline": hidden, "cautions": list(result.cautions),
            "findings": [finding_dict(f) for f in result.findings]}


def report(results, settings, run=None) -> dict:
    from speccheck.reporters.common import RunInfo, totals

    run = run or RunInfo()
    counted = totals(results)
    counted["hidden_by_baseline"] = run.hidden_total
    return {"report": "speccheck-findings", "version": REPORT_VERSION,
            "tool": {"name": "speccheck", "version": __version__},
            "fail_level": settings.fail_level, "project_file": run.config or None,
            "baseline": run.baseline or None, "totals": counted,
            "files": [file_dict(r, run.hidden.get(r.path, 0)) for r in results],
            "skipped": [str(p) for p in run.skipped], "excluded": [str(p) for p in run.excluded],
            "set_aside": [{"path": str(p), "reason": why} for p, why in run.set_aside]}


def render(results, settings, run=None) -> str:
    from speccheck.reporters.neutral import json_text

    return json_text(json.dumps(report(results, settings, run), indent=2, ensure_ascii=False)) + "\n"
