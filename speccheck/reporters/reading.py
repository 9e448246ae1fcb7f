"""The order a beginner should act in, shared by the HTML and Markdown reports.

Findings are gathered into groups that share one cause: the part a finding points at (or the
first part its message names), so that a crystal's wrong load and its DC problem sit together.
An error whose message names a few parts takes in the groups about those parts: the filter that
misses the IF and the crystal whose load moved it become one group. Groups with an error come
first ("fix these first"), then those with a warning, then notes. Waived findings go last.

`plain` turns our rule texts into plain words for the page: setting names and document paths
go to the "settings used" part at the end of a report, not into the reading text.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from speccheck.findings import RANK

# A finding naming more parts than this is about a collection (every polarized part, say):
# it is grouped by its stage, and it never pulls other groups in.
_FEW = 3

# Top-level keys of the build format: a dotted word starting with one is a document path.
_TOP = (
    "build",
    "signals",
    "source",
    "supply",
    "rails",
    "nodes",
    "profiles",
    "parts_files",
    "devices",
    "parts",
    "chain",
)
_PATH = re.compile(r"\b(?:" + "|".join(_TOP) + r")(?:\[\d+\])?(?:\.[A-Za-z0-9_\-]+(?:\[\d+\])?)+")
_INDEX = re.compile(r"\[\d+\]")

KIND_WORDS = {
    "device": "the device",
    "capacitor": "the capacitor",
    "crystal": "the crystal",
    "inductor": "the coil",
    "resistor": "the resistor",
    "filter": "the filter",
    "fuse": "the fuse",
    "speaker": "the speaker",
    "diode": "the diode",
    "transformer": "the transformer",
}

# Findings that belong to no chain stage carry one of these sections.
SECTION_WORDS = {
    "general": "the build as a whole",
    "power": "the power supply",
    "supply": "the power supply",
    "mains": "mains safety",
    "wiring": "the wiring",
    "source": "the signal source",
    "signals": "the signals",
    "input": "the plan file itself",
    "review": "the waivers",
    "internal": "speccheck itself",
    "audio": "the audio side",
    "heat": "heat",
    "fuse": "the fuse",
}


@dataclass
class Group:
    """Findings with one cause: a part (`subject` in `parts`) or a stage."""

    subject: str
    findings: list = field(default_factory=list)
    also: list = field(default_factory=list)  # subjects of groups merged in (their parts named by an error)

    @property
    def level(self) -> str:
        return max((f.level for f in self.findings), key=RANK.__getitem__)

    @property
    def first_line(self) -> int:
        return min(f.location.line for f in self.findings)


@dataclass
class Reading:
    """One file's findings in reading order."""

    first: list  # groups with an error
    then: list  # groups with a warning (and no error)
    notes: list  # groups of notes only
    waived: list  # waived findings, in file order

    def groups(self) -> list:
        return self.first + self.then + self.notes

    def ordered(self) -> list:
        """Every finding in the order the report shows it (numbered 1, 2, ... on the page)."""
        return [f for g in self.groups() for f in g.findings] + list(self.waived)


def named_parts(message: str, parts: dict, causes_only: bool = False) -> list[str]:
    """The known parts and devices a message names, in the order it names them (a pin U1.quad names U1).

    `causes_only`: only parts that can be a cause by themselves, named as parts: not a device
    (an IC hosts many functions) and not a pin, which says where, not why."""
    if not parts:
        return []
    found = []
    for m in re.finditer(r"(?<![\w.])([A-Za-z][A-Za-z0-9_]*)(\.\w)?", message):
        word, pin = m.group(1), m.group(2)
        if word not in parts or word in found:
            continue
        if causes_only and (pin or parts[word] == "device"):
            continue
        found.append(word)
    return found


def subject_of(f, parts: dict) -> str:
    """The part a finding is about: the one its position points into, else the first it names,
    else (for a finding about many parts, or none) its stage."""
    path = f.location.path or ""
    head = path.split(".")
    if len(head) >= 2 and head[0] in ("parts", "devices") and head[1] in parts:
        return head[1]
    named = named_parts(f.message, parts)
    if named and len(named) <= _FEW:
        return named[0]
    return f.stage or "general"


def _chain_rank(stage: str, chain: list) -> int:
    labels = [label for label, _ in chain]
    kinds = [kind for _, kind in chain]
    if stage in labels:
        return labels.index(stage)
    if stage in kinds:
        return kinds.index(stage)
    return len(labels)


def _sorted_findings(findings) -> list:
    return sorted(findings, key=lambda f: (-RANK[f.level], f.location.line, f.location.col, f.rule))


def read(result) -> Reading:
    parts = getattr(result, "parts", {}) or {}
    chain = getattr(result, "chain", []) or []
    open_findings = [f for f in result.findings if not f.waived]
    groups: dict[str, Group] = {}
    for f in open_findings:
        subject = subject_of(f, parts)
        groups.setdefault(subject, Group(subject)).findings.append(f)
    _merge_by_cause(groups, parts)
    ordered = []
    for g in groups.values():
        g.findings = _sorted_findings(g.findings)
        ordered.append(g)
    stage_of = {g.subject: g.findings[0].stage or "general" for g in ordered}
    ordered.sort(
        key=lambda g: (-RANK[g.level], _chain_rank(stage_of[g.subject], chain), g.first_line, g.subject)
    )
    waived = sorted((f for f in result.findings if f.waived), key=lambda f: (f.location.line, f.location.col))
    return Reading(
        [g for g in ordered if g.level == "error"],
        [g for g in ordered if g.level == "warning"],
        [g for g in ordered if g.level == "note"],
        waived,
    )


def _merge_by_cause(groups: dict, parts: dict):
    """An error that names a few parts takes in the groups about those parts: they share its cause."""
    for subject in list(groups):
        group = groups.get(subject)
        if group is None:
            continue
        for f in list(group.findings):
            if f.level != "error":
                continue
            named = named_parts(f.message, parts, causes_only=True)
            if len(named) > _FEW:
                continue
            for other in named:
                if other != subject and other in groups and other not in group.also:
                    taken = groups.pop(other)
                    group.findings.extend(taken.findings)
                    group.also.append(other)
                    group.also.extend(s for s in taken.also if s not in group.also)


def subject_words(subject: str, parts: dict) -> str:
    """'X1, the crystal' for a part, 'the audio amp stage' for a stage."""
    if subject in parts:
        kind = parts[subject]
        words = KIND_WORDS.get(kind, f"the {kind}" if kind else "")
        return f"{subject}, {words}" if words else subject
    if subject in SECTION_WORDS:
        return SECTION_WORDS[subject]
    return f"the {subject.replace('-', ' ')} stage" if subject else "the build as a whole"


def group_title(group: Group, parts: dict) -> str:
    names = [group.subject] + group.also
    return " and ".join(subject_words(s, parts) for s in names)


# ---- plain words ----------------------------------------------------------------------------


def path_words(path: str) -> str:
    """A document path as words: 'chain[1].oscillator.stray' -> 'the stray of the oscillator'."""
    keys = [k for k in _INDEX.sub("", path).split(".") if k]
    if not keys:
        return path
    last = keys[-1].replace("_", " ")
    if len(keys) == 1:
        return f"the {last} section"
    parent = keys[-2].replace("_", " ")
    if keys[-2] in ("parts", "devices", "rails", "nodes", "profiles"):
        return keys[-1]  # a part's name is its own word
    if len(keys) >= 3 and keys[-3] in ("parts", "devices"):
        return f"the {last} of {keys[-2]}"
    if parent == "chain":
        return "the stage"
    return f"the {last} of the {parent}"


def _setting_parens(names) -> re.Pattern | None:
    if not names:
        return None
    alts = "|".join(re.escape(n) for n in names)
    return re.compile(r"\s*\((?:[^()]*\b(?:setting|" + alts + r")\b[^()]*)\)")


def plain(text: str, rule=None) -> str:
    """Our rule texts in plain words: no setting names, no document paths, no code marks."""
    text = str(text)
    names = list(getattr(rule, "settings", {}) or {})
    if names:  # "below warning_db (default 20 dB)" -> "below 20 dB (by default)"
        alts = "|".join(re.escape(n) for n in names)
        text = re.sub(
            r"\b(?:the )?(?:setting )?(?:" + alts + r")\s*\(default,? ([^()]*)\)", r"\1 (by default)", text
        )
    pattern = _setting_parens([n for n in names if "_" in n] + ["default"])
    if pattern is not None:
        text = pattern.sub("", text)
    if names:
        alts = "|".join(re.escape(n) for n in names)
        text = re.sub(r"\b(?:the )?setting (?:" + alts + r")\b", "a setting", text)
        named = "|".join(re.escape(n) for n in names if "_" in n)  # plain words like "order" stay words
        if named:
            text = re.sub(r"\b(?:" + named + r")\b", "a setting", text)
    text = _PATH.sub(lambda m: path_words(m.group(0)), text)
    keys = format_keys()
    text = _KEY_PATH.sub(
        lambda m: (
            f"the {_words(m.group(2))} of the {_words(m.group(1))}" if m.group(2) in keys else m.group(0)
        ),
        text,
    )
    text = _QUOTED_KEY.sub(lambda m: f"“{_words(m.group(1))}”" if m.group(1) in keys else m.group(0), text)
    text = _SNAKE.sub(lambda m: _words(m.group(0)) if m.group(0) in keys else m.group(0), text)
    return text.replace("`", "")


_KEYS: set = set()


def format_keys() -> set:
    """Every key the build format defines (from its JSON Schema): the words `plain` may rewrite.
    Names a plan gives (pins, nets, parts) are never among them unless they repeat a key."""
    if not _KEYS:
        from speccheck.schema import build_schema

        def walk(node):
            if isinstance(node, dict):
                for key, value in node.items():
                    if key == "properties" and isinstance(value, dict):
                        _KEYS.update(value)
                    walk(value)
            elif isinstance(node, list):
                for item in node:
                    walk(item)

        for version in (1, 2):  # both build formats: format 2 adds keys (switches, terminals, ...)
            try:
                walk(build_schema(version))
            except (KeyError, ValueError, OSError):
                continue
    return _KEYS


# A key path without its section ('oscillator.stray'), a quoted key ('lowest_audio:'), a bare
# snake_case key (input_bypass). Names from the build file (U1.osc_base) are not touched: they
# follow a capital letter or a digit and a dot.
_KEY_PATH = re.compile(r"(?<![\w.-])([a-z][a-z_]{2,})\.([a-z][a-z_]{2,})(?![\w-]|\.\w)")
_QUOTED_KEY = re.compile(r"'([a-z][a-z_]*):'")
_SNAKE = re.compile(r"(?<![\w.-])[a-z]+(?:_[a-z]+)+(?![\w-]|\.\w)")


def _words(key: str) -> str:
    return key.replace("_", " ")


def settings_of(rule, settings) -> dict:
    """The settings a rule ran with: the project file's values over the rule's defaults."""
    if rule is None or not rule.settings:
        return {}
    given = getattr(settings, "rule_settings", {}).get(rule.id, {}) if settings is not None else {}
    return {name: given.get(name, default) for name, default in rule.settings.items()}
