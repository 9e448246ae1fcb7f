"""The trade arithmetic: pure functions, SI floats in and out, grouped by subject.

Nothing here imports the model, YAML or pint. Each function's docstring gives its formula and
the published source it is checked against in tests/test_formulas_*.py.
"""
