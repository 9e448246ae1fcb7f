"""The value solver (`speccheck solve`): from findings to buyable parts, written back into the
plan's own text. run.py checks and tries the options, base.py holds the shapes and the registry,
circuit.py and tuning.py the remedies, show.py the text output. See run.py for how it works."""

from speccheck.solver.base import Change, Option, Proposal
from speccheck.solver.run import (
    SERIES_NAMES,
    Outcome,
    SolveTrouble,
    read_plan,
    solve,
    write,
)

__all__ = [
    "SERIES_NAMES",
    "Change",
    "Option",
    "Outcome",
    "Proposal",
    "SolveTrouble",
    "read_plan",
    "solve",
    "write",
]
