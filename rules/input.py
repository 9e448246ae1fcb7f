"""The input family: problems with the file itself (unreadable, YAML, schema, units, ranges,
references). Not run on the model: speccheck/loader.py reports these while it reads a file, and
they cannot be waived. Defined here so that every rule is defined in rules/."""

from __future__ import annotations

from speccheck.registry import define

INPUT_RULES = {
    "input.unreadable": ("error", "The file cannot be read",
                         "speccheck could not read the file as UTF-8 text.", "Save the file as UTF-8 text."),
    "input.yaml-syntax": ("error", "The file is not valid YAML",
                          "The YAML could not be parsed at the position shown, so nothing else was checked.",
                          "Fix the YAML at the position shown; indentation and unclosed brackets are the "
                          "usual cause."),
    "input.duplicate-key": ("error", "A key appears twice in the same mapping",
                            "YAML keeps only one of two equal keys, so half of what you wrote would be lost "
                            "without a word. speccheck refuses the file instead.",
                            "Remove or rename one of the two keys."),
    "input.not-accepted": ("error", "A YAML feature a build file does not accept",
                           "Anchors, aliases and merge keys make a plan hard to read in a diff and can be "
                           "used to blow up the size of a document; a build file spells every value out. "
                           "Tags other than YAML's core ones (a language's object tags, binary data) belong "
                           "to other programs' files, not to a build plan.",
                           "Write the value out where it is used."),
    "input.schema": ("error", "The file does not follow the build format",
                     "Every build file follows the format its build_spec names (1 or 2), published as a JSON "
                     "Schema (`speccheck schema --version 2`). "
                     "A key that is unknown, missing, or of the wrong kind is reported at its position. "
                     "Rules do not run on a file with such errors, because they would guess.",
                     "Correct the key or value shown; `speccheck schema` prints the format, and an editor "
                     "with YAML schema support completes keys for you."),
    "input.unit": ("error", "A value has the wrong unit or no unit",
                   "Every physical value carries its unit, and each field expects one kind of quantity: a "
                   "frequency in Hz, a capacitance in F, a level in dBm. A value in the wrong dimension "
                   "(an inductance where a frequency belongs) is a typing slip that would make every number "
                   "derived from it wrong.",
                   "Write the value with the unit the field expects, e.g. '455 kHz', '100 nF', '-60 dBm'."),
    "input.value-range": ("error", "A value is physically meaningless",
                          "A frequency, capacitance, inductance, resistance or current must be greater than "
                          "zero; zero or a negative number there would divide by zero or flip a sign in the "
                          "arithmetic.",
                          "Give the real, positive value."),
    "input.shorted-part": ("error", "A part with both ends on the same net",
                           "A two-ended part whose two ends connect to the same net does nothing: it is "
                           "shorted out. In a plan it is nearly always a typing slip in 'ends'.",
                           "Write the two different nets the part's ends connect to."),
    "input.rail-loop": ("error", "Rails that feed each other",
                        "A rail made by a regulator that is itself powered from that rail (directly or "
                        "through other regulators) has no source; the current budget and the regulator "
                        "rules cannot follow it back to the supply.",
                        "Name in 'from' the device that really makes the rail, and power that device from a "
                        "rail nearer the supply."),
    "input.parts-file": ("error", "A parts file that cannot be used",
                         "A build names its parts files relative to itself, inside the project folder (the "
                         "folder of the project file, else the repository, else the build file's own "
                         "folder), and each parts file starts with the line 'parts_spec: 1'. An absolute "
                         "path, a path that climbs out with '..' or through a link, or a file without that "
                         "line is refused before any of it is read into a report: a review posted on a "
                         "shared repository must never show what lies outside it.",
                         "Keep the parts file inside the project, name it relative to the build file, and "
                         "give it the line 'parts_spec: 1'."),
    "input.reference": ("error", "A name refers to nothing",
                        "Parts, devices, profiles, rails and IF paths are referred to by name. A name that "
                        "is not declared is usually a typing slip, and the rule that needs it cannot run.",
                        "Declare the part, device, profile or rail, or correct the name."),
}
for _id, (_level, _title, _why, _fix) in INPUT_RULES.items():
    define(
        _id, level=_level, title=_title, explanation=_why, fix=_fix, source="speccheck build formats 1 and 2"
    )
