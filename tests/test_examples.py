from conftest import CLEAN, EXAMPLES

from speccheck import engine


def test_clean_example_has_no_error_or_warning():
    result = engine.check_file(CLEAN)
    assert result.checked
    bad = [f for f in result.findings if f.level in ("error", "warning")]
    assert bad == [], "\n".join(f"{f.rule} {f.message}" for f in bad)


def test_every_example_loads_past_the_schema():
    for path in sorted(EXAMPLES.glob("*.yaml")):
        result = engine.check_file(path)
        schema_trouble = [f for f in result.findings if f.rule.startswith("input.")]
        assert schema_trouble == [], f"{path.name}: {[f.message for f in schema_trouble]}"
