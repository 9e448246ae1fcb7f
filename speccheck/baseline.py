"""Baselines: the findings a repository already has, so that a check reports only new ones.

`speccheck baseline PATHS -o FILE` writes the fingerprints of the current findings (the same
stable fingerprints SARIF carries, see engine._fingerprint); `speccheck check --baseline FILE`
then hides every finding whose fingerprint is in the file and says how many it hid.

File shape (JSON, versioned):

    {"baseline": "speccheck-baseline", "version": 1,
     "tool": {"name": "speccheck", "version": "..."},
     "count": 3,
     "findings": [{"fingerprint": "...", "rule": "wiring.cap-voltage", "file": "builds/a.yaml",
                   "line": 43, "message": "..."}, ...]}

Only `fingerprint` is used for matching; rule, file, line and message are there so that a person
reading the file (or its diff) knows what was accepted.
"""

from __future__ import annotations

import json

from speccheck import __version__

KIND = "speccheck-baseline"
VERSION = 1
LIMIT = 50_000_000  # about 200 000 findings: far past any repository, short of exhausting memory


class BaselineError(Exception):
    pass


def build(results, settings) -> dict:
    from speccheck.engine import fingerprint_file

    entries = []
    for r in results:
        for f in r.findings:
            entries.append({"fingerprint": f.fingerprint, "rule": f.rule,
                            "file": fingerprint_file(f.location.file, settings),
                            "line": f.location.line, "message": f.message})
    entries.sort(key=lambda e: (e["file"], e["line"], e["rule"], e["fingerprint"]))
    return {"baseline": KIND, "version": VERSION, "tool": {"name": "speccheck", "version": __version__},
            "count": len(entries), "findings": entries}


def dumps(results, settings) -> str:
    return json.dumps(build(results, settings), indent=2, ensure_ascii=False) + "\n"


def load(path) -> set[str]:
    """-> the fingerprints in a baseline file (raises BaselineError with a plain message)."""
    from speccheck import files

    try:
        data = json.loads(files.read_bytes_bounded(path, LIMIT).decode("utf-8"))
    except files.FileTrouble as exc:
        raise BaselineError(f"{path}: the baseline {exc}") from None
    except (UnicodeDecodeError, json.JSONDecodeError, RecursionError) as exc:
        raise BaselineError(f"{path}: not a speccheck baseline (not JSON: {exc})") from None
    if not isinstance(data, dict) or data.get("baseline") != KIND:
        raise BaselineError(f"{path}: not a speccheck baseline (no \"baseline\": \"{KIND}\" key); "
                            "write one with `speccheck baseline PATHS -o FILE`")
    if data.get("version") != VERSION:
        raise BaselineError(f"{path}: baseline version {data.get('version')!r}; this speccheck reads version "
                            f"{VERSION}")
    findings = data.get("findings")
    if not isinstance(findings, list):
        raise BaselineError(f"{path}: the baseline has no \"findings\" list")
    out = set()
    for i, entry in enumerate(findings):
        fp = entry.get("fingerprint") if isinstance(entry, dict) else None
        if not isinstance(fp, str) or not fp:
            raise BaselineError(f"{path}: findings[{i}] has no fingerprint")
        out.add(fp)
    return out


def hide(results, known: set[str]) -> dict:
    """Remove the findings the baseline knows; -> {file path: how many were hidden}."""
    hidden = {}
    for r in results:
        keep = [f for f in r.findings if f.fingerprint not in known]
        if len(keep) != len(r.findings):
            hidden[r.path] = len(r.findings) - len(keep)
        r.findings = keep
    return hidden
