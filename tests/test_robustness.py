"""Every value of the shipped plans replaced by the wrong kind of thing: never a traceback,
never an internal error, always a positioned finding."""

import copy
import io

import pytest
from conftest import EXAMPLES

from speccheck import engine

WRONG = [[], {"a": 1}, None]


def _leaves(node, path=()):
    if isinstance(node, dict):
        for key, value in node.items():
            yield from _leaves(value, path + (key,))
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from _leaves(value, path + (i,))
    else:
        yield path


def _set(data, path, value):
    for step in path[:-1]:
        data = data[step]
    data[path[-1]] = value


@pytest.mark.parametrize(
    "example", ["vhf-monitor-455k.yaml", "mains-bench-unit.yaml", "bench-demod-selector.yaml"]
)
def test_wrong_kinds_everywhere(example):
    from ruamel.yaml import YAML

    yaml = YAML(typ="safe", pure=True)
    data = yaml.load((EXAMPLES / example).read_text("utf-8"))
    failures = []
    for path in _leaves(data):
        for wrong in WRONG:
            variant = copy.deepcopy(data)
            _set(variant, path, wrong)
            out = io.StringIO()
            yaml.dump(variant, out)
            try:
                result = engine.check_text(out.getvalue(), "variant.yaml")
            except Exception as exc:  # the point of the test
                failures.append(f"{path} = {wrong!r}: {type(exc).__name__}: {exc}")
                continue
            internal = [f.message for f in result.findings if f.stage == "internal"]
            if internal:
                failures.append(f"{path} = {wrong!r}: {internal[0]}")
            if any(f.location.line < 1 for f in result.findings):
                failures.append(f"{path} = {wrong!r}: a finding without a line")
    assert failures == [], "\n".join(failures[:20])
