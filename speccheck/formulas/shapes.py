"""Filter response shapes: the attenuation of a band-pass filter at any offset from its centre.

A filter is described the way its data sheet quotes it: a bandwidth at a stated attenuation
(15 kHz at 6 dB), plus either a stopband bandwidth at a second attenuation (30 kHz at 40 dB)
or a shape factor (the ratio of the two widths). Two published models turn that into a curve:

- An equivalent Butterworth response, A(x) = 10·log10(1 + (ε·x)^(2N)) with x the offset from
  the centre, fitted through the two points. N is the textbook order equation
  N = log10((10^(0.1·As) − 1)/(10^(0.1·Ap) − 1)) / (2·log10(Bs/Bp)) (Williams & Taylor,
  Electronic Filter Design Handbook, ch. 2), kept as a real number: it describes a shape, not a
  circuit. The band-pass filter is taken as its low-pass prototype mirrored about the centre
  (arithmetic symmetry, the usual narrow-band approximation). A single tuned circuit is N = 1.
- A Gaussian response, |H| = exp(−f²/(2σ²)): the attenuation in dB grows with the square of
  the offset, A(x) = A_ref·(2x/B)² for a bandwidth B quoted at A_ref (3 dB for the resolution
  filter of a spectrum analyser). Its 60 dB : 3 dB shape factor is √20 ≈ 4.47.

Generic shapes for common filter classes (marked typical, values from memory of the usual
data-sheet figures for the class, never a product) fill in what a plan does not state.
Everything here is SI floats in, dB out; no model, YAML or pint.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

# The most attenuation a shape reports: real filters stop at their ultimate attenuation
# (feed-through around the filter, pin to pin capacitance); 80 dB is a usual ceramic or crystal
# filter's figure (from memory), so no model promises more.
ULTIMATE_DB = 80.0


@dataclass(frozen=True)
class Typical:
    """A generic shape for a class of filter: its bandwidth is quoted at `at_db`, and its
    stopband is `factor` times as wide at `stop_db`. All typical values, from memory."""

    at_db: float
    factor: float | None
    stop_db: float | None
    what: str


TYPICAL = {
    # 455 kHz ceramic IF filter: ±7.5 kHz at 6 dB, about ±15 kHz at 40 dB (typical, from memory)
    "ceramic": Typical(6.0, 2.0, 40.0, "typical ceramic-filter skirts, twice as wide at 40 dB"),
    # multi-pole crystal filter: 6 dB : 60 dB shape factor about 1.8 (typical, from memory)
    "crystal": Typical(6.0, 1.8, 60.0, "typical crystal-filter skirts, 1.8 times as wide at 60 dB"),
    # mechanical filter: 6 dB : 60 dB shape factor about 2 (typical, from memory)
    "mechanical": Typical(6.0, 2.0, 60.0, "typical mechanical-filter skirts, twice as wide at 60 dB"),
    # one tuned circuit: a one-pole response, 3 dB at the quoted width (textbook)
    "lc": Typical(3.0, None, None, "one tuned circuit"),
    # a spectrum analyser's or receiver's resolution filter quoted at 3 dB (common practice)
    "gaussian": Typical(3.0, None, None, "Gaussian"),
}

# The shape assumed for an IF path or upstream bandwidth whose class is not stated.
DEFAULT_CLASS = "ceramic"


def butterworth_order(pass_width: float, pass_db: float, stop_width: float, stop_db: float) -> float:
    """The (real) order N of the Butterworth response through both points (Williams & Taylor)."""
    if not (stop_width > pass_width > 0 and stop_db > pass_db > 0):
        raise ValueError("the stopband must be wider and more attenuated than the passband")
    k_pass, k_stop = 10 ** (pass_db / 10) - 1, 10 ** (stop_db / 10) - 1
    return math.log10(k_stop / k_pass) / (2 * math.log10(stop_width / pass_width))


@dataclass(frozen=True)
class Shape:
    """A band-pass response: `width` at `at_db`, and how it falls outside.

    kind "butterworth" uses `order` (from a stopband or a shape factor, or 1 for a tuned
    circuit); kind "gaussian" the quadratic law; kind "flat" is the old brick wall (0 dB
    inside, ULTIMATE_DB outside), kept only for what has no shape at all."""

    width: float
    at_db: float = 6.0
    kind: str = "butterworth"
    order: float = 1.0
    ultimate_db: float = ULTIMATE_DB
    typical: bool = False
    what: str = ""

    def attenuation(self, offset: float) -> float:
        """Attenuation in dB relative to the centre, `offset` Hz from it (either side)."""
        x = abs(offset) / (self.width / 2)
        if self.kind == "gaussian":
            a = self.at_db * x * x
        elif self.kind == "flat":
            a = 0.0 if x <= 1 else self.ultimate_db
        else:
            eps2n = 10 ** (self.at_db / 10) - 1  # (ε·B/2)^(2N)
            a = 10 * math.log10(1 + eps2n * x ** (2 * self.order)) if x > 0 else 0.0
        return min(a, self.ultimate_db)

    def width_at(self, db: float) -> float:
        """The full bandwidth at which the response is `db` down (inverse of attenuation)."""
        if db <= 0:
            return 0.0
        if self.kind == "gaussian":
            return self.width * math.sqrt(db / self.at_db)
        if self.kind == "flat":
            return self.width
        ratio = (10 ** (db / 10) - 1) / (10 ** (self.at_db / 10) - 1)
        return float(self.width * ratio ** (1 / (2 * self.order)))


def gaussian(width: float, at_db: float = 3.0, typical: bool = False) -> Shape:
    return Shape(width, at_db, "gaussian", typical=typical, what="Gaussian")


def from_stopband(width: float, at_db: float, stop_width: float, stop_db: float, typical: bool = False,
                  what: str = "") -> Shape:
    """An equivalent Butterworth through (width at at_db) and (stop_width at stop_db)."""
    order = butterworth_order(width, at_db, stop_width, stop_db)
    return Shape(width, at_db, "butterworth", order, typical=typical, what=what)


def from_class(name: str, width: float, at_db: float | None = None) -> Shape:
    """The typical shape of a filter class for a bandwidth quoted at at_db (the class's own
    quoting attenuation when None). A width quoted at another attenuation than the class's
    keeps the class's steepness (its order)."""
    t = TYPICAL[name]
    at = t.at_db if at_db is None else at_db
    if name == "gaussian":
        return Shape(width, at, "gaussian", typical=True, what=t.what)
    if t.factor is None:
        return Shape(width, at, "butterworth", 1.0, typical=True, what=t.what)
    assert t.stop_db is not None  # every class with a shape factor quotes its stopband attenuation
    order = butterworth_order(1.0, t.at_db, t.factor, t.stop_db)
    return Shape(width, at, "butterworth", order, typical=True, what=t.what)


def rejection(shape: Shape, center: float, wanted: float, unwanted: float) -> float:
    """How much more the shape attenuates `unwanted` than `wanted`, in dB (image or adjacent
    channel rejection of a filter centred on `center`)."""
    return shape.attenuation(unwanted - center) - shape.attenuation(wanted - center)


def cascade_attenuation(responses: list[tuple[float, Shape]], f: float) -> float:
    """Attenuation in dB at f of filters in cascade, each given as (centre, Shape).

    The cascade adds in dB (cascaded two-ports, any circuits text) but stops at the largest
    ultimate attenuation of its filters: on one board, feed-through around the filters (shared
    ground, pin-to-pin and wiring capacitance) bypasses the whole cascade, not one filter at a
    time (common practice)."""
    if not responses:
        return 0.0
    total = sum(shape.attenuation(f - centre) for centre, shape in responses)
    return min(total, max(shape.ultimate_db for _, shape in responses))
