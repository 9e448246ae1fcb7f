"""Format v2: named terminals, selector switches, per-(signal, position) evaluation."""

from __future__ import annotations

import json
import subprocess
import sys

from conftest import EXAMPLES, ROOT, check, edited, line_of, of

from speccheck import loader, schema

BENCH = EXAMPLES / "bench-demod-selector.yaml"


def bench() -> str:
    return BENCH.read_text("utf-8")


def test_committed_v2_schema_is_what_the_generator_writes(tmp_path):
    sys.path.insert(0, str(ROOT / "tools"))
    try:
        import make_schema_v2
    finally:
        sys.path.pop(0)
    v1 = json.loads((ROOT / "speccheck" / "schema" / "build-v1.json").read_text("utf-8"))
    assert make_schema_v2.v2(v1) == schema.build_schema(2), "run: python tools/make_schema_v2.py"


def test_v2_keeps_every_v1_key_but_the_renamed_one():
    v1, v2 = schema.build_schema(1), schema.build_schema(2)
    assert set(v1["properties"]) <= set(v2["properties"])
    for name, node in v1["$defs"].items():
        if "properties" in node:
            missing = set(node["properties"]) - set(v2["$defs"][name]["properties"])
            assert missing == ({"load_impedance"} if name == "stage" else set()), name


def test_v2_example_checks_clean_and_is_switched():
    result = check(bench(), "bench.yaml")
    assert result.checked
    assert [f for f in result.findings if not f.waived and f.level in ("error", "warning")] == []
    build = loader.load_text(bench(), "bench.yaml").build
    assert build.switched
    labels = [c.label for c in build.configurations()]
    assert labels == [
        "repeater voice; S1 narrow; upstream rbw-100k",
        "broadcast FM; S1 wide; upstream rbw-1m",
    ]


def test_terminals_are_named_for_every_kind_of_part():
    build = loader.load_text(bench(), "bench.yaml").build
    assert build.parts["RV2"].terminals == {"end1": "V6", "end2": "GND", "wiper": "SQ_SET"}
    assert build.parts["C20"].terminals == {"positive": "U2.out", "negative": "SPK"}
    assert build.parts["S1"].terminals["a.common"] == "U1.mixer_out"
    assert build.parts["S1"].terminals["b.wide"] == "U1.quad"


def test_what_is_in_circuit_follows_the_switch():
    from speccheck import configs

    build = loader.load_text(bench(), "bench.yaml").build
    narrow, wide = build.configurations()
    assert configs.out_of_circuit(build, narrow) == {"C40", "R7"}
    assert configs.out_of_circuit(build, wide) == {"FL1", "C13"}
    v = configs.view(build, wide)
    assert list(v.chain[2].paths) == ["wide"]
    assert v.chain[4].tank.damping == "R5+R7"
    # 47 kohm in parallel with 6.8 kohm: 1 / (1/47k + 1/6.8k) = 5.9405 kohm (plain arithmetic)
    assert abs(v.part("R5+R7").value.si - 1 / (1 / 47e3 + 1 / 6.8e3)) < 1e-6
    assert v.nets.dc("DAMP").volts == 6.0  # the wide throw joins DAMP to U1.quad, whose DC is the supply
    assert configs.view(build, narrow).nets.dc("DAMP") is None  # pole b is open on narrow


def test_a_finding_names_its_signal_and_position():
    # R7 too large: the tank is too narrow for broadcast FM only
    text = edited(bench(), "R7: {kind: resistor, value: 6.8 kohm", "R7: {kind: resistor, value: 68 kohm")
    result = check(text, "bench.yaml")
    found = of(result, "freqplan.tank-range")
    assert len(found) == 1
    assert found[0].signal == "broadcast FM" and found[0].position == "S1 wide; upstream rbw-1m"
    assert found[0].message.endswith("[broadcast FM; S1 wide; upstream rbw-1m]")
    assert found[0].location.line == line_of(text, "tank: {inductor: L2")  # the list that makes R5 || R7


def test_a_waiver_can_name_the_signal_it_covers():
    text = edited(bench(), "R7: {kind: resistor, value: 6.8 kohm", "R7: {kind: resistor, value: 68 kohm")
    text = edited(
        text,
        "tank: {inductor: L2, capacitor: C9, damping: [R5, R7]}",
        "tank: {inductor: L2, capacitor: C9, damping: [R5, R7]}  "
        "# waive freqplan.tank-range for repeater voice because testing",
    )
    result = check(text, "bench.yaml")
    assert not of(result, "freqplan.tank-range")[0].waived  # it is the broadcast signal's finding
    assert of(result, "review.waiver-unused")
    text = text.replace("for repeater voice because", "for Broadcast FM because")
    result = check(text, "bench.yaml")
    assert of(result, "freqplan.tank-range")[0].waived == "testing"


def test_upstream_setting_per_signal():
    text = edited(bench(), "upstream: rbw-1m", "upstream: rbw-100k")
    found = of(check(text, "bench.yaml"), "freqplan.upstream-bandwidth")
    assert len(found) == 1 and found[0].signal == "broadcast FM"
    assert "100 kHz" in found[0].message


def test_bad_switch_references_are_input_errors():
    text = edited(bench(), "switches: {S1: wide}", "switches: {S1: medium}")
    found = of(check(text, "bench.yaml"), "input.reference")
    assert found and "S1 has no position 'medium'" in found[0].message
    text = edited(bench(), "upstream: rbw-1m", "upstream: rbw-3m")
    assert of(check(text, "bench.yaml"), "input.reference")


def test_v1_build_spec_refuses_v2_keys_and_v2_refuses_load_impedance(clean_text):
    text = edited(bench(), "build_spec: 2", "build_spec: 1")
    assert any("unknown key" in f.message for f in of(check(text), "input.schema"))
    text = edited(
        clean_text,
        "    topology: series-l-shunt-c\n",
        "    topology: series-l-shunt-c\n    load_impedance: 1.5 kohm\n",
    )
    found = of(check(text), "input.schema")
    assert found and "load_impedance" in found[0].message and "works_into" in found[0].message


def test_schema_command_prints_either_version():
    out = subprocess.run(
        [sys.executable, "-m", "speccheck", "schema", "--version", "1"],
        capture_output=True,
        text=True,
        cwd=ROOT,
    )
    assert json.loads(out.stdout)["$id"].endswith(":1")


def test_bad_squelch_pin_and_tap_references_are_input_errors():
    text = edited(bench(), "    pin: U1.squelch_in\n", "    pin: U1.squelch\n")
    found = of(check(text, "bench.yaml"), "input.reference")
    assert found and "has no pin 'squelch'" in found[0].message
    text = edited(bench(), "    after: discriminator\n", "    after: detector\n")
    assert of(check(text, "bench.yaml"), "input.reference")
    text = edited(bench(), "    coupling: C15\n", "    coupling: C99\n")
    assert of(check(text, "bench.yaml"), "input.reference")


def test_works_into_that_overrides_the_device_is_said():
    text = edited(
        bench(),
        "    topology: series-l-shunt-c\n",
        "    topology: series-l-shunt-c\n    works_into: 3 kohm\n",
    )
    found = [f for f in of(check(text, "bench.yaml"), "rfpath.input-match") if "replaces" in f.message]
    assert len(found) == 1 and found[0].level == "note" and "1.5 kohm" in found[0].message
    text = edited(
        bench(),
        "    topology: series-l-shunt-c\n",
        "    topology: series-l-shunt-c\n    works_into: 1.5 kohm\n",
    )
    assert not [f for f in of(check(text, "bench.yaml"), "rfpath.input-match") if "replaces" in f.message]


def test_a_pot_written_with_three_named_terminals_has_a_track_and_a_wiper():
    text = edited(
        bench(),
        "RV2: {kind: potentiometer, value: 10 kohm, ends: [V6, GND], wiper: SQ_SET}",
        "RV2: {kind: potentiometer, value: 10 kohm, terminals: {cw: V6, ccw: GND, wiper: SQ_SET}}",
    )
    build = loader.load_text(text, "bench.yaml").build
    assert build.parts["RV2"].ends == ["V6", "GND"] and build.parts["RV2"].wiper == "SQ_SET"
    assert build.nets.span("SQ_SET") == (0.0, 6.0)  # a wiper sits between its track's ends


# ---- a capacitor switched onto an RC node but not listed in the stage ---------------------------

def test_a_capacitor_switched_onto_the_node_counts_and_is_named():
    import math

    # C13 (3.9 nF) reaches AF1 through S2 pole c in the narrow position; the stage lists C11 only
    text = edited(bench(), "    capacitor: [C11, C13]\n", "    capacitor: C11\n")
    result = check(text)
    found = of(result, "freqplan.audio-corner")
    named = [f for f in found if f.message.startswith("C13 is on AF1")]
    assert len(named) == 1 and named[0].level == "note"
    assert named[0].message.startswith("C13 is on AF1 in S1 narrow but not in the audio-filter stage: it is "
                                       "counted in parallel with C11")
    assert named[0].location.line == line_of(text, "  C13: {kind")
    # RC low-pass corner 1/(2·π·R·C) (Horowitz & Hill ch. 1): 10 kΩ with 1 nF + 3.9 nF in the narrow position
    corners = {e.position: e.value.value for e in result.sheet if e.value.name == "low-pass corner"}
    narrow = next(v for k, v in corners.items() if "narrow" in k)
    wide = next(v for k, v in corners.items() if "wide" in k)
    assert math.isclose(narrow, 1 / (2 * math.pi * 10e3 * 4.9e-9), rel_tol=1e-9)
    assert math.isclose(wide, 1 / (2 * math.pi * 10e3 * 1e-9), rel_tol=1e-9)
    # listed as the plan does it, the same corner and no note
    listed = check(bench())
    notes = of(listed, "freqplan.audio-corner")
    assert not [f for f in notes if "not in the audio-filter stage" in f.message]
    assert {e.position: e.value.value for e in listed.sheet if e.value.name == "low-pass corner"} == corners
