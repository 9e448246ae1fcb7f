"""Write speccheck/schema/build-v2.json: the v1 schema plus what v2 adds (run after changing v1).

v2 only adds keys to v1, except the two renamed ones (`load_impedance` of a stage). Run:
    python tools/make_schema_v2.py
tests/test_schema.py fails when the committed file differs from what this script writes.
"""

from __future__ import annotations

import copy
import json
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent.parent / "speccheck" / "schema"


def ref(name: str, description: str = "") -> dict:
    out = {"$ref": f"#/$defs/{name}"}
    if description:
        out["description"] = description
    return out


def one_or_list(name: str, description: str) -> dict:
    return {"description": description,
            "anyOf": [ref(name), {"type": "array", "items": ref(name), "minItems": 1, "maxItems": 8}]}


SELECTION = {"type": "object", "maxProperties": 8,
             "propertyNames": {"pattern": "^[A-Za-z][A-Za-z0-9_-]{0,31}$"},
             "additionalProperties": {"anyOf": [ref("position"), {"type": "array", "items": ref("position"),
                                                                  "minItems": 1, "maxItems": 12}]}}


def v2(v1: dict) -> dict:
    s = copy.deepcopy(v1)
    s["$id"] = "urn:speccheck:build-spec:2"
    s["title"] = "speccheck build plan, format 2"
    s["description"] = ("A plain-text plan of a small receive-side build as it is built: signals and the "
                        "switch positions they are received in, source, supply and battery, rails, devices, parts "
                        "with "
                        "their named terminals, the signal chain and the taps taken off it.")
    p, d = s["properties"], s["$defs"]
    p["build_spec"] = {"const": 2, "description": "format version of this file: 2"}
    d["position"] = {"type": "string", "pattern": "^[A-Za-z0-9][A-Za-z0-9_+-]{0,23}$",
                     "description": "a switch position name, e.g. narrow, wide, on"}
    d["selection"] = {**SELECTION, "description": "switch -> the position (or positions) meant"}
    sig = p["signals"]["items"]["properties"]
    sig["switches"] = ref("selection", "the position(s) of each selecting switch this signal is received in")
    sig["upstream"] = {"type": "string", "maxLength": 24,
                       "description": "the source bandwidth setting this signal is received with "
                                      "(a key of source.bandwidth_settings)"}
    src = p["source"]["properties"]
    src["bandwidth_settings"] = {"type": "object", "maxProperties": 12,
                                 "propertyNames": {"pattern": "^[A-Za-z0-9][A-Za-z0-9_+-]{0,23}$"},
                                 "additionalProperties": ref("frequency"),
                                 "description": "the selectable IF or resolution bandwidths upstream, by name"}
    src["output_impedance"] = ref("resistance", "the output impedance of the upstream equipment "
                                                "(the same as impedance; either may be given)")
    src["net"] = ref("net", "the net the source's signal enters the build on (its connector or cable)")
    supply = p["supply"]["properties"]
    supply["battery"] = {
        "type": "object", "additionalProperties": False, "required": ["chemistry"],
        "description": "what the battery is: chemistry, cells, capacity, internal resistance, end voltage",
        "properties": {
            "chemistry": {"enum": ["alkaline", "carbon-zinc", "lithium-primary", "nimh", "nicd", "lithium-ion",
                                   "lead-acid"], "description": "cell chemistry"},
            "cells": {"type": "integer", "minimum": 1, "maximum": 64, "description": "cells in series"},
            "capacity": {"$ref": "#/$defs/charge", "description": "rated capacity, e.g. '500 mAh'"},
            "capacity_at": ref("current", "the discharge current the capacity is rated at"),
            "internal_resistance": ref("resistance", "internal resistance of the whole pack"),
            "end_voltage": ref("voltage", "the pack voltage counted as flat (end of life)"),
            "note": {"type": "string", "maxLength": 400, "description": "free text"},
        }}
    d["charge"] = {"type": "string", "maxLength": 64, "x-dimension": "charge",
                   "description": "a charge or battery capacity, e.g. '500 mAh'"}
    pin = d["pin"]["properties"]
    pin["threshold_min"] = ref("voltage", "lowest voltage at which a squelch or threshold input switches")
    pin["threshold_max"] = ref("voltage", "highest voltage at which a squelch or threshold input switches")
    pin["v_min"] = ref("voltage", "lowest voltage the pin may see (default: ground less 0.3 V)")
    pin["v_max"] = ref("voltage", "highest voltage the pin may see (default: the device's supply plus 0.3 V)")
    pin["output_impedance"] = ref("resistance", "output resistance of an output pin")
    pin["input_impedance"] = ref("resistance", "input resistance of an input pin")
    pin["needs_dc_blocked"] = {"type": "boolean", "description": "an input that must not be fed DC"}
    pin["output_low"] = ref("voltage", "a switching output's low level (default: ground)")
    pin["output_high"] = ref("voltage", "a switching output's high level (default: the device's supply)")
    part = d["part"]["properties"]
    part["kind"]["enum"] = part["kind"]["enum"] + ["transistor", "module"]
    part["terminals"] = {"type": "object", "minProperties": 1, "maxProperties": 24,
                         "propertyNames": {"pattern": "^[a-z][a-z0-9_-]{0,23}$"},
                         "additionalProperties": ref("net"),
                         "description": "named terminals and the net each connects to (any part; two-terminal "
                                        "parts may use ends instead)"}
    part["wiper"] = ref("net", "for a potentiometer: the net its wiper connects to")
    part["positions"] = {"type": "array", "items": ref("position"), "minItems": 2, "maxItems": 12,
                         "description": "for a selector switch: its positions, in order"}
    part["poles"] = {"type": "object", "minProperties": 1, "maxProperties": 8,
                     "propertyNames": {"pattern": "^[a-z][a-z0-9_-]{0,11}$"},
                     "additionalProperties": {
                         "type": "object", "additionalProperties": False, "required": ["common", "throws"],
                         "properties": {"common": ref("net", "the net of the pole's common terminal"),
                                        "throws": {"type": "object", "minProperties": 1, "maxProperties": 12,
                                                   "propertyNames": {"pattern": "^[A-Za-z0-9][A-Za-z0-9_+-]{0,23}$"},
                                                   "additionalProperties": ref("net"),
                                                   "description": "position -> the net the common meets there "
                                                                  "(a position not listed leaves it open)"}}},
                     "description": "for a selector switch: each pole's common and throws"}
    part["in_circuit"] = ref("selection", "the switch position(s) in which this part is in circuit (normally "
                                          "found from the switch's throws)")
    path = d["if_path"]["properties"]
    path["bypass"] = ref("ref", "the part (link or capacitor) that makes this path when there is no filter")
    path["in_circuit"] = ref("selection", "the switch position(s) in which this path carries the signal")
    d["tank"]["properties"]["damping"] = one_or_list("ref", "the damping resistor(s) across the tank; "
                                                            "those in circuit act in parallel")
    st = d["stage"]["properties"]
    del st["load_impedance"]
    st["works_into"] = ref("resistance", "input-match: the impedance the network works into (overrides the "
                                         "device's input impedance)")
    st["load_resistance"] = ref("resistance", "audio-amp: the load resistance when no load part is named")
    st["resistor"] = one_or_list("ref", "the R of an RC network; a list when a switch changes it")
    st["capacitor"] = one_or_list("ref", "the C of an RC network; a list when a switch adds capacitors "
                                         "(those in circuit act in parallel)")
    st["control"] = ref("ref", "squelch: the threshold potentiometer")
    st["pin"] = ref("pin_net", "squelch: the device pin the threshold is set on")
    st["series"] = ref("ref", "squelch: the resistor from the pot's wiper to the pin")
    st["shunt"] = ref("ref", "squelch: the resistor from the pin to ground")
    st["hysteresis"] = ref("ref", "squelch: the resistor that feeds back for hysteresis")
    d["pin_net"] = {"type": "string", "pattern": "^[A-Za-z][A-Za-z0-9_-]{0,31}\\.[A-Za-z0-9_+-]{1,24}$",
                    "description": "a device pin: device.pin, e.g. U1.squelch"}
    p["taps"] = {"type": "array", "maxItems": 8, "description": "outputs taken off the signal chain",
                 "items": {"type": "object", "additionalProperties": False, "required": ["name", "net"],
                           "properties": {
                               "name": {"type": "string", "maxLength": 60, "description": "a name"},
                               "after": {"type": "string", "maxLength": 80,
                                         "description": "the stage it is taken after (its kind or name)"},
                               "net": ref("net", "the net it is taken from"),
                               "series": ref("ref", "an isolating resistor in series"),
                               "coupling": ref("ref", "the capacitor that blocks DC"),
                               "load": ref("resistance", "the input resistance of what the tap feeds"),
                               "needs_dc_blocked": {"type": "boolean",
                                                    "description": "what the tap feeds must not see DC"},
                               "note": {"type": "string", "maxLength": 400, "description": "free text"}}}}
    order = list(v1["properties"]) + ["taps"]
    s["properties"] = {k: p[k] for k in order}
    return s


def main() -> int:
    v1 = json.loads((HERE / "build-v1.json").read_text("utf-8"))
    text = json.dumps(v2(v1), indent=1, ensure_ascii=False) + "\n"
    (HERE / "build-v2.json").write_text(text, "utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
