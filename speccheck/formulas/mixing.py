"""Mixing: the LO for a wanted IF, the image, and the spurious responses of a mixer.

A mixer makes every |m f_s + k f_LO|; the wanted response is m = 1, k = -1 (textbook mixer
analysis, e.g. the ARRL Handbook's chapter on mixers, and any receiver-design text). Hz in and out.
"""

from __future__ import annotations

from collections.abc import Iterator


def lo_for(f_in: float, f_if: float, injection: str) -> float:
    """Local oscillator for a wanted IF: low side f_LO = f_in - f_IF, high side f_in + f_IF."""
    return f_in - f_if if injection == "low" else f_in + f_if


def image_frequency(f_in: float, f_lo: float) -> float:
    """The other input that mixes to the same IF: mirrored about the LO (2 f_LO - f_in)."""
    return 2.0 * f_lo - f_in


def spur_inputs(f_lo: float, f_if: float, order: int) -> Iterator[tuple[int, int, int, float]]:
    """Every (m, k, s, f_s) with m = 1..order, k = -order..order and s = +1/-1 for which
    m f_s + k f_LO = s f_IF has a positive root f_s. The wanted response and the image are
    m = 1, k = -1; callers drop them."""
    for m in range(1, order + 1):
        for k in range(-order, order + 1):
            for s in (1, -1):
                fs = (s * f_if - k * f_lo) / m
                if fs > 0:
                    yield m, k, s, fs
