"""The freqplan family: conversion arithmetic, image, necessary bandwidth, spurs, tank, crystal, audio corner.

The rules read the walk along the chain in speccheck/chain.py (`frequency_plan`), report what
does not fit and publish every number they derived to the design sheet. The arithmetic is in
speccheck/formulas/ (bandwidth, mixing, resonators, shapes, harmonics, audio). The modules are imported in the
order their rules run.
"""

import importlib

PARTS = ("conversion", "passband", "spurs", "resonators", "audio")
for _part in PARTS:
    importlib.import_module(f"{__name__}.{_part}")
