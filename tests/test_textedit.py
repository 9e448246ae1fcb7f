"""speccheck/textedit.py: edits in the text keep every untouched byte, and read back as meant."""

from __future__ import annotations

import pytest
from conftest import EXAMPLES, ROOT
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from speccheck import textedit, yamlnodes

PLANS = (sorted(EXAMPLES.glob("*.yaml")) + sorted((ROOT / "speccheck" / "starters").glob("*.yaml"))
         + sorted((ROOT / "tests" / "data" / "v1").glob("*.yaml")))
BEGINNER = (EXAMPLES / "beginner-plan.yaml").read_text("utf-8")


def _untouched_lines_same(old: str, new: str, touched: set[int]) -> None:
    """Every line of old outside `touched` appears, byte for byte, in new in the same order."""
    import difflib

    a, b = old.splitlines(keepends=True), new.splitlines(keepends=True)
    for tag, i1, i2, _, _ in difflib.SequenceMatcher(None, a, b, autojunk=False).get_opcodes():
        if tag in ("replace", "delete"):
            assert set(range(i1 + 1, i2 + 1)) <= touched, (tag, a[i1:i2])


def _line(text: str, offset: int) -> int:
    return text.count("\n", 0, offset) + 1


def test_mixed_edits_on_beginner_plan_change_only_their_lines():
    doc = yamlnodes.parse(BEGINNER)
    edits = [
        textedit.replace_value(BEGINNER, doc, ("parts", "C6", "value"), "39 pF"),
        textedit.replace_value(BEGINNER, doc, ("parts", "C20", "positive"), "U2.out"),
        textedit.insert_entry(BEGINNER, doc, ("parts", "C30"), "positive", "V12", after="ends"),
        textedit.insert_entry(BEGINNER, doc, ("chain", 1, "oscillator"), "stray", "3 pF"),
        textedit.insert_entry(BEGINNER, doc, ("build",), "lowest_audio", "300 Hz"),
        textedit.rename_key(BEGINNER, doc, ("source", "level_min"), "weakest"),
        textedit.replace_value(BEGINNER, doc, ("build_spec",), 2),
    ]
    new = textedit.apply(BEGINNER, edits)
    touched = {_line(BEGINNER, e.start) for e in edits}
    _untouched_lines_same(BEGINNER, new, touched)
    # every comment line of the original is still there, in order
    comments = [ln for ln in BEGINNER.splitlines() if ln.lstrip().startswith("#")]
    assert [ln for ln in new.splitlines() if ln.lstrip().startswith("#")] == comments
    data = yamlnodes.parse(new).data
    assert data["parts"]["C6"]["value"] == "39 pF"
    assert data["parts"]["C20"]["positive"] == "U2.out"
    assert list(data["parts"]["C30"])[-1] == "positive"  # after 'ends', the last key
    assert data["chain"][1]["oscillator"]["stray"] == "3 pF"
    assert data["build"]["lowest_audio"] == "300 Hz"
    assert "weakest" in data["source"] and "level_min" not in data["source"]
    assert data["build_spec"] == 2
    assert "  lowest_audio: 300 Hz\n" in new  # block mapping: its own line, the mapping's indent


def test_quoting_style_is_kept_and_widened_only_when_needed():
    text = "a: 'x y'\nb: \"p\"\nc: plain\nd: {e: f}\n"
    doc = yamlnodes.parse(text)
    new = textedit.apply(
        text,
        [
            textedit.replace_value(text, doc, ("a",), "it's"),
            textedit.replace_value(text, doc, ("b",), "q"),
            textedit.replace_value(text, doc, ("c",), "12"),  # a str that plain would read as a number
            textedit.replace_value(text, doc, ("d", "e"), "g, h"),  # a comma inside a flow mapping
        ],
    )
    assert new == "a: 'it''s'\nb: \"q\"\nc: \"12\"\nd: {e: \"g, h\"}\n"
    assert yamlnodes.parse(new).data == {"a": "it's", "b": "q", "c": "12", "d": {"e": "g, h"}}


def test_crlf_files_keep_their_line_ending():
    text = "top:\r\n  a: 1 V  # note\r\n\r\nnext: 2\r\n"
    doc = yamlnodes.parse(text)
    new = textedit.apply(text, [textedit.insert_entry(text, doc, ("top",), "b", "2 V")])
    assert new == "top:\r\n  a: 1 V  # note\r\n  b: 2 V\r\n\r\nnext: 2\r\n"


def test_block_list_append_and_flow_list_append():
    text = "xs:\n  - one  # first\n  - two\nys: [a, b]\nzs: []\n"
    doc = yamlnodes.parse(text)
    new = textedit.apply(
        text,
        [
            textedit.append_item(text, doc, ("xs",), "three"),
            textedit.append_item(text, doc, ("ys",), "c"),
            textedit.append_item(text, doc, ("zs",), "z"),
        ],
    )
    assert new == "xs:\n  - one  # first\n  - two\n  - three\nys: [a, b, c]\nzs: [z]\n"


def test_remove_entry_block_and_flow():
    text = "m:\n  a: 1  # keep me? no, the line goes\n  b: 2\nf: {x: 1, y: 2, z: 3}\n"
    doc = yamlnodes.parse(text)
    new = textedit.apply(
        text,
        [
            textedit.remove_entry(text, doc, ("m", "a")),
            textedit.remove_entry(text, doc, ("f", "y")),
            textedit.remove_entry(text, doc, ("f", "z")),
        ],
    )
    assert yamlnodes.parse(new).data == {"m": {"b": 2}, "f": {"x": 1}}
    assert new == "m:\n  b: 2\nf: {x: 1}\n"


def test_refusals_are_clear():
    text = "a: |\n  block\nb: {c: 1}\n"
    doc = yamlnodes.parse(text)
    with pytest.raises(textedit.EditTrouble, match="block scalar"):
        textedit.replace_value(text, doc, ("a",), "x")
    with pytest.raises(textedit.EditTrouble, match="no value"):
        textedit.replace_value(text, doc, ("nope",), "x")
    with pytest.raises(textedit.EditTrouble, match="already has"):
        textedit.insert_entry(text, doc, ("b",), "c", "2")
    edit = textedit.replace_value(text, doc, ("b", "c"), 2)
    with pytest.raises(textedit.EditTrouble, match="overlap"):
        textedit.apply(text, [edit, edit])


# -- property tests ----------------------------------------------------------------------------


def _scalar_paths(doc: yamlnodes.Document) -> list[tuple]:
    return sorted(
        (
            p
            for p, n in doc.value_nodes.items()
            if doc.value_span(p).kind == "scalar"
            and doc.value_span(p).style in ("plain", "'", '"')
            and doc.value_span(p).start < doc.value_span(p).end
        ),
        key=repr,
    )


def _mapping_paths(doc: yamlnodes.Document) -> list[tuple]:
    return sorted((p for p in doc.value_nodes if doc.value_span(p).kind == "mapping"), key=repr)


def _set(data, path, value):
    for part in path[:-1]:
        data = data[part]
    data[path[-1]] = value


VALUES = st.one_of(
    st.text(max_size=30),
    st.integers(-(10**9), 10**9),
    st.booleans(),
    st.floats(allow_nan=False, allow_infinity=True),
    st.sampled_from(
        [
            "12 V",
            "-100 dBm",
            "4.7 kohm",
            "a: b",
            "x #y",
            "[1]",
            "null",
            "1e3",
            "- item",
            "?q",
            "it's",
            "'",
            '"',
            "\\",
            "é µ €",
            "\u2028",
            "\t",
        ]
    ),
)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(plan=st.sampled_from(PLANS), pick=st.integers(0, 10**6), value=VALUES)
def test_replacing_any_value_reads_back_and_keeps_every_other_line(plan, pick, value):
    text = plan.read_text("utf-8")
    doc = yamlnodes.parse(text)
    paths = _scalar_paths(doc)
    path = paths[pick % len(paths)]
    edit = textedit.replace_value(text, doc, path, value)
    new = textedit.apply(text, [edit])
    after = yamlnodes.parse(new)
    assert not after.problems, (path, value, new[edit.start - 40 : edit.start + 60])
    expected = yamlnodes.parse(text).data
    _set(expected, path, value)
    assert after.data == expected
    _untouched_lines_same(text, new, {_line(text, edit.start)})


KEYS = st.text(st.characters(codec="utf-8", exclude_categories=("Cs", "Cc")), min_size=1, max_size=12)


@settings(max_examples=100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(plan=st.sampled_from(PLANS), pick=st.integers(0, 10**6), key=KEYS, value=VALUES)
def test_inserting_an_entry_reads_back_and_keeps_every_line(plan, pick, key, value):
    text = plan.read_text("utf-8")
    doc = yamlnodes.parse(text)
    paths = _mapping_paths(doc)
    path = paths[pick % len(paths)]
    expected = yamlnodes.parse(text).data
    target = expected
    for part in path:
        target = target[part]
    if key in target or key == "<<":
        return
    edit = textedit.insert_entry(text, doc, path, key, value)
    new = textedit.apply(text, [edit])
    after = yamlnodes.parse(new)
    assert not after.problems, (path, key, value, new[edit.start - 40 : edit.start + 60])
    target[key] = value
    assert after.data == expected
    # an insertion touches no existing line, except the flow mapping it goes into
    touched = {_line(text, edit.start)} if doc.value_span(path).style == "flow" else set()
    _untouched_lines_same(text, new, touched)
