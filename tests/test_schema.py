"""The published schema and the typed model must describe the same format."""

import dataclasses

import pytest

from speccheck import model, schema

S = schema.build_schema()
D = S["$defs"]
P = S["properties"]


def _obj(node):
    if "$ref" in node:
        return D[node["$ref"].split("/")[-1]]
    if "additionalProperties" in node and isinstance(node["additionalProperties"], dict) and \
            "properties" not in node:
        return _obj(node["additionalProperties"])
    if node.get("type") == "array":
        return _obj(node["items"])
    return node


PAIRS = [
    (S, model.Build), (_obj(P["build"]), model.BuildInfo), (_obj(P["signals"]), model.Signal),
    (_obj(P["source"]), model.Source), (_obj(P["source"]["properties"]["preselector"]), model.Preselector),
    (_obj(P["supply"]), model.Supply), (_obj(P["supply"]["properties"]["mains"]), model.Mains),
    (_obj(P["rails"]), model.Rail), (_obj(P["nodes"]), model.NodeInfo), (_obj(P["devices"]), model.Device),
    (_obj(_obj(P["devices"])["properties"]["heat_sink"]), model.HeatSink),
    (D["profile"], model.Profile), (D["pin"], model.Pin), (D["part"], model.Part), (D["core"], model.Core),
    (D["stage"], model.Stage), (D["oscillator"], model.Oscillator), (D["if_path"], model.IfPath),
    (D["tank"], model.Tank), (_obj(D["stage"]["properties"]["output_network"]), model.OutputNetwork),
]
SPECIAL = {("Part", "value"), ("Part", "adjust")}  # their dimension follows the part's kind


def _dim(prop):
    ref = prop.get("$ref", "")
    return D.get(ref.split("/")[-1], {}).get("x-dimension") if ref else prop.get("x-dimension")


@pytest.mark.parametrize("node,cls", PAIRS, ids=[c.__name__ for _, c in PAIRS])
def test_every_schema_key_has_a_model_field_of_the_same_dimension(node, cls):
    fields = {f.metadata.get("key", f.name): f for f in dataclasses.fields(cls)}
    for key, prop in node["properties"].items():
        assert key in fields, f"{cls.__name__} has no field for schema key '{key}'"
        if (cls.__name__, key) in SPECIAL:
            continue
        want = _dim(prop)
        got = fields[key].metadata.get("dim")
        assert got == want, f"{cls.__name__}.{key}: schema says {want}, model says {got}"


def test_schema_is_valid_draft_2020_12():
    from jsonschema import Draft202012Validator

    Draft202012Validator.check_schema(S)


def test_every_dimension_in_the_schema_is_known_to_units():
    from speccheck import units

    for name, d in D.items():
        if "x-dimension" in d:
            assert d["x-dimension"] in units.DIMENSIONS, name


S2 = schema.build_schema(2)
D2, P2 = S2["$defs"], S2["properties"]


def _obj2(node):
    if "$ref" in node:
        return D2[node["$ref"].split("/")[-1]]
    if "additionalProperties" in node and isinstance(node["additionalProperties"], dict) and \
            "properties" not in node:
        return _obj2(node["additionalProperties"])
    if node.get("type") == "array":
        return _obj2(node["items"])
    return node


PAIRS_V2 = [
    (S2, model.Build),
    (_obj2(P2["signals"]), model.Signal),
    (_obj2(P2["source"]), model.Source),
    (_obj2(P2["supply"]), model.Supply),
    (_obj2(P2["supply"]["properties"]["battery"]), model.Battery),
    (D2["pin"], model.Pin),
    (D2["part"], model.Part),
    (D2["stage"], model.Stage),
    (D2["if_path"], model.IfPath),
    (D2["tank"], model.Tank),
    (_obj2(P2["taps"]), model.Tap),
    (_obj2(D2["part"]["properties"]["poles"]), model.Pole),
]
LISTS_V2 = {("Source", "bandwidth_settings")}  # a mapping of quantities, filled by the loader


@pytest.mark.parametrize("node,cls", PAIRS_V2, ids=[c.__name__ for _, c in PAIRS_V2])
def test_every_v2_schema_key_has_a_model_field_of_the_same_dimension(node, cls):
    fields = {f.metadata.get("key", f.name): f for f in dataclasses.fields(cls)}
    for key, prop in node["properties"].items():
        assert key in fields, f"{cls.__name__} has no field for schema key '{key}'"
        if (cls.__name__, key) in SPECIAL | LISTS_V2 or "anyOf" in prop:
            continue
        ref = prop.get("$ref", "")
        want = D2.get(ref.split("/")[-1], {}).get("x-dimension") if ref else prop.get("x-dimension")
        assert fields[key].metadata.get("dim") == want, f"{cls.__name__}.{key}"


def test_v2_schema_is_valid_draft_2020_12():
    from jsonschema import Draft202012Validator

    Draft202012Validator.check_schema(S2)
