"""Settings that shape one run: which rules, at what level, with which rule settings.

The project file and the command-line options both end up in one `Settings`; precedence is
option, then project file, then the rules' built-in defaults.
"""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass
class Settings:
    disabled: set = field(default_factory=set)  # rule ids, or family names ending in "."
    levels: dict = field(default_factory=dict)  # rule id -> level
    fail_level: str = "error"
    rule_settings: dict = field(default_factory=dict)  # rule id -> {name: value}
    include: list = field(default_factory=list)
    exclude: list = field(default_factory=list)
    source: str = ""  # the project file these came from, if any

    def enabled(self, rule_id: str) -> bool:
        family = rule_id.split(".", 1)[0] + "."
        return rule_id not in self.disabled and family not in self.disabled

    def level_for(self, rule_id: str, level: str) -> str:
        return self.levels.get(rule_id, level)
