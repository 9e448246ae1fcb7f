"""Starter build files: commented plans for common configurations that check clean as
written, so that a beginner starts from something right and changes one thing at a time."""

from __future__ import annotations

from importlib import resources

LAYOUTS = {
    "single-conversion": "10.7 MHz IF tap to a 455 kHz second IF, narrow filter and wide bypass paths, "
                         "12 V DC adapter",
    "mains-bench": "the same receiver as a bench unit on a mains transformer, rectifier and regulator "
                   "(mains safety cautions apply)",
}


def text(layout: str) -> str:
    if layout not in LAYOUTS:
        raise KeyError(layout)
    return resources.files("speccheck.starters").joinpath(f"{layout}.yaml").read_text("utf-8")
