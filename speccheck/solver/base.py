"""What every remedy shares: the Change/Option/Proposal shapes, the registry, the Situation.

Remedies: for a finding, the changes to the plan that would clear it, best first.

One function per rule id, registered with @remedy. A remedy reads the model (the parts and
stages the finding is about) and the numbers the rule put on the finding (`Situation.number`),
and returns a Proposal whose Options each list Changes (a value to replace, or an entry to add)
with the figure after the change. The arithmetic comes from speccheck/formulas (the picks of
preferred values and the inverse formulas live in formulas/picks.py); a remedy never decides
whether a change clears the finding: the solver checks every option with the engine.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from speccheck import schema, textedit, units, yamlnodes
from speccheck.config import Settings
from speccheck.findings import Finding


@dataclass
class Change:
    """One edit of the plan: replace the value at `path`, or add `key: value` to the mapping at it."""

    path: tuple
    value: object  # str | int | float | bool | dict (a flow mapping)
    key: str | None = None
    after: str | None = None

    def edit(self, text: str, doc: yamlnodes.Document) -> textedit.Edit:
        value: textedit.Value = self.value  # type: ignore[assignment]
        if self.key is None:
            return textedit.replace_value(text, doc, self.path, value)  # type: ignore[arg-type]
        return textedit.insert_entry(text, doc, self.path, self.key, value, after=self.after)


@dataclass
class Option:
    """One way to clear a finding: the changes, what they are in words, and the figure after them."""

    changes: list
    summary: str
    result: str
    # a figure the check publishes on the design sheet after the change: (section, owner, name
    # prefix); the solver reads it from its re-check and adds it to `result`
    figure: tuple | None = None


@dataclass
class Proposal:
    finding: Finding
    title: str
    options: list  # of Option, best first
    source: str = ""
    note: str = ""  # an assumption or a caution the builder must see
    chosen: Option | None = None
    held: str = ""  # why no option was taken
    covered_by: str = ""  # the title of an earlier proposal whose change already cleared this finding
    clears: list = field(default_factory=list)  # the findings the chosen option clears


REMEDIES: dict = {}
BEST_FEW = 3  # options shown where two parts trade against each other
ASSUMED_STRAY = 3e-12


def remedy(rule_id: str):
    def register(fn):
        REMEDIES[rule_id] = fn
        return fn

    return register


@dataclass
class Situation:
    loaded: Any  # loader.Loaded
    before: Any  # engine.FileResult
    settings: Settings
    series: str = "E12"
    proposed_names: set = field(default_factory=set)

    @property
    def build(self):
        return self.loaded.build

    def sheet(self, section: str, owner: str, name: str) -> float | None:
        """A number a rule published on the design sheet."""
        for entry in self.before.sheet:
            if (
                entry.section == section
                and entry.owner == owner
                and entry.value.name == name
                and isinstance(entry.value.value, (int, float))
            ):
                return float(entry.value.value)
        return None

    def new_name(self, prefix: str) -> str:
        """The next free reference designator with this prefix (R, C ...), never one proposed already."""
        used = set(self.build.parts) | self.proposed_names
        numbers = [int(n[len(prefix) :]) for n in used if n.startswith(prefix) and n[len(prefix) :].isdigit()]
        name = f"{prefix}{max(numbers, default=0) + 1}"
        self.proposed_names.add(name)
        return name

    def new_net(self, base: str) -> str:
        known = (
            set(self.build.nets.potentials)
            | set(self.build.rails)
            | self.proposed_names
            | {end for part in self.build.parts.values() for end in part.ends}
        )
        name, n = base, 1
        while name in known:
            n += 1
            name = f"{base}{n}"
        self.proposed_names.add(name)
        return name

    def ground(self) -> str | None:
        return next((name for name, rail in self.build.rails.items() if rail.is_ground), None)

    def series_for(self, kind: str) -> str:
        """Inductors are stocked in E12 and E24 only; E96 applies to resistors and capacitors."""
        return "E24" if kind == "inductor" and self.series == "E96" else self.series

    def part_for(self, finding: Finding):
        """The part a finding points into (parts.C31.voltage_rating -> C31)."""
        for part in self.build.parts.values():
            if within(finding.location.path, schema.dotted(part.doc_path)):
                return part
        return None

    def stage_for(self, finding: Finding):
        for stage in self.build.chain:
            if within(finding.location.path, schema.dotted(stage.doc_path)):
                return stage
        return None

    def rc_stage_for(self, finding: Finding, kind: str):
        """The RC stage of `kind` a finding is about: the stage it points into, else the one whose
        resistor or capacitor is the part it points into."""
        stage = self.stage_for(finding)
        if stage is not None:
            return stage
        part = self.part_for(finding)
        for st in self.build.stages(kind):
            if part in (self.build.part(st.resistor), self.build.part(st.capacitor)):
                return st
        return None

    def device_for(self, finding: Finding):
        for dev in self.build.devices.values():
            if within(finding.location.path, schema.dotted(dev.doc_path)):
                return dev
        return None


def within(path: str, prefix: str) -> bool:
    return path == prefix or path.startswith((prefix + ".", prefix + "["))


def number(finding: Finding, name: str) -> float | None:
    """A number the rule put on the finding, by its name."""
    for value in finding.values:
        if value.name == name and isinstance(value.value, (int, float)):
            return float(value.value)
    return None


def value_change(part, si: float, unit: str) -> Change:
    like = part.value.text if part.value is not None else ""
    return Change(part.places["value"], units.plan_text(si, unit, like))


def set_or_add(holder, field_name: str, value, after: str | None = None) -> Change:
    """Replace holder.field when the plan gives it, else add it to holder's mapping."""
    if field_name in holder.places:
        return Change(holder.places[field_name], value)
    return Change(holder.doc_path, value, key=field_name, after=after)


def pct(share: float) -> str:
    return f"{share * 100:+.1f} %"
