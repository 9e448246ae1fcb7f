"""Property tests (hypothesis): generated values and structures, put into a real plan and fed
through the whole check in-process, never raise, never take long, and never put a raw control
character into a text or Markdown report."""

import json
import os

from conftest import CLEAN
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from speccheck import engine, yamlnodes
from speccheck.config import Settings
from speccheck.reporters import markdown, text

BASE = yamlnodes.parse(CLEAN.read_text("utf-8")).data
# Every place in the clean plan where a value sits: the generated one goes there.
PLACES: list = []


def _collect(node, path):
    PLACES.append(path)
    if isinstance(node, dict):
        for k, v in node.items():
            _collect(v, path + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            _collect(v, path + (i,))


_collect(BASE, ())

NUMBER = st.one_of(st.integers(-10**40, 10**40), st.floats(allow_nan=False, allow_infinity=False),
                   st.sampled_from(["0", "-0", "1e308", "1e-320", ".5", "9" * 40, ".nan", "-.inf", "1e999"]))
UNIT_TOKENS = st.sampled_from(
    [
        "Hz",
        "kHz",
        "MHz",
        "nH",
        "turn",
        "V",
        "mA",
        "ohm",
        "Ω",
        "µF",
        "degC",
        "dBm",
        "dB",
        "W",
        "s",
        "%",
        "ppm",
        "*",
        "/",
        "**",
        "^",
        "3",
        "-3",
        "9",
        " ",
        "(",
        ")",
        "e",
    ]
)
UNIT_TEXT = st.builds(lambda n, toks: f"{n} {''.join(toks)}", NUMBER, st.lists(UNIT_TOKENS, max_size=12))
HOSTILE_TEXT = st.text(alphabet=st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=40)
SCALAR = st.one_of(st.none(), st.booleans(), NUMBER, UNIT_TEXT, HOSTILE_TEXT)
VALUE = st.recursive(
    SCALAR,
    lambda inner: st.one_of(
        st.lists(inner, max_size=4),
        st.dictionaries(
            st.one_of(HOSTILE_TEXT, st.sampled_from(["kind", "value", "ends"])), inner, max_size=4
        ),
    ),
    max_leaves=12,
)


def _replaced(data, path, value):
    if not path:
        return value
    copy = dict(data) if isinstance(data, dict) else list(data)
    copy[path[0]] = _replaced(data[path[0]], path[1:], value)
    return copy


def _no_raw_control(report: str) -> bool:
    return not any((ord(ch) < 0x20 and ch != "\n") or 0x7F <= ord(ch) < 0xA0 for ch in report)


def _check_is_well_behaved(document: str):
    result = engine.check_text(document, "plan.yaml", Settings())
    for f in result.findings:
        assert f.location.line >= 1 and f.location.col >= 1
        assert not f.message.startswith("internal error"), f.message
    assert _no_raw_control(text.render([result], Settings()))
    assert _no_raw_control(markdown.render([result], Settings()))


@settings(
    max_examples=int(os.environ.get("SPECCHECK_EXAMPLES", "60")),
    deadline=2000,
    derandomize=True,
    suppress_health_check=[HealthCheck.too_slow],
)
@given(place=st.sampled_from(PLACES), value=VALUE)
def test_any_value_anywhere_in_a_plan(place, value):
    # JSON is YAML: the generated structure goes in exactly as generated.
    _check_is_well_behaved(json.dumps(_replaced(BASE, place, value), ensure_ascii=False))


@settings(
    max_examples=int(os.environ.get("SPECCHECK_EXAMPLES", "60")),
    deadline=2000,
    derandomize=True,
    suppress_health_check=[HealthCheck.too_slow],
)
@given(
    value=st.one_of(UNIT_TEXT, HOSTILE_TEXT),
    where=st.sampled_from(["  frequency: 10.7 MHz\n", "  voltage: 12 V\n"]),
)
def test_any_text_in_a_quantity_field(value, where):
    plan = CLEAN.read_text("utf-8")
    key = where.split(":")[0]
    _check_is_well_behaved(plan.replace(where, f"{key}: {json.dumps(value, ensure_ascii=False)}\n", 1))
