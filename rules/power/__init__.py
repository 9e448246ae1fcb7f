"""The power family: current budget, supply range, heat, regulators, fuses, reverse polarity.

The budget each rule reads is speccheck/budget.py; the arithmetic is in speccheck/formulas/
(amplifiers, thermal, fuses, preferred). All values are SI floats: amperes, volts, ohms,
watts, °C, °C/W, A²s. The modules are imported in the order their rules run.
"""

import importlib

PARTS = ("supply", "heat", "fuses", "polarity")
for _part in PARTS:
    importlib.import_module(f"{__name__}.{_part}")
