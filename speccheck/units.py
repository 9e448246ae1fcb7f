"""The one place that knows about units.

User text such as "455 kHz", "-100 dBm" or "4.7 µF" becomes a float in SI units here,
checked for the dimension the field expects. pint (with the small registry in units.txt)
decides what a unit means; this module bounds the untrusted text before pint sees it,
handles logarithmic levels (dBm, dB) that a plain pint parse rejects, and formats numbers
back with SI prefixes for every report. Rules work on SI floats so that the arithmetic of a
thousand-file check is not spent inside unit objects.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from importlib import resources
from typing import Any, cast

MAX_TEXT = 64

# dimension name -> (SI unit pint converts to, symbol shown in reports, an example for messages)
DIMENSIONS: dict[str, tuple[str, str, str]] = {
    "frequency": ("Hz", "Hz", "455 kHz"),
    "capacitance": ("F", "F", "100 nF"),
    "inductance": ("H", "H", "1 mH"),
    "resistance": ("ohm", "Ω", "4.7 kohm"),
    "voltage": ("V", "V", "12 V"),
    "current": ("A", "A", "250 mA"),
    "power": ("W", "W", "1.5 W"),
    "apparent_power": ("VA", "VA", "10 VA"),
    "time": ("s", "s", "50 us"),
    "temperature": ("degC", "°C", "40 degC"),
    "thermal_resistance": ("K/W", "°C/W", "12 degC/W"),
    "length": ("m", "m", "12 mm"),
    "inductance_factor": ("H", "H/turn²", "4.9 nH/turn^2"),
    "i2t": ("A**2*s", "A²s", "3.4 A^2 s"),
    "charge": ("C", "C", "500 mAh"),
    "fraction": ("", "", "20 ppm"),
    "level": ("dBm", "dBm", "-60 dBm"),
    "gain": ("dB", "dB", "10 dB"),
}

# Bounds no receive-side bench build comes near: past them a value is a slip of the finger
# (a wrong prefix, a stray exponent), and arithmetic on it would only print nonsense.
# Magnitudes in SI units; temperatures in °C, levels in dBm, gains in dB.
PLAUSIBLE: dict[str, tuple[float, float]] = {
    "frequency": (0.0, 1e12), "capacitance": (0.0, 100.0), "inductance": (0.0, 1e3),
    "resistance": (0.0, 1e13), "voltage": (-1e6, 1e6), "current": (0.0, 1e5), "power": (0.0, 1e7),
    "apparent_power": (0.0, 1e7), "time": (0.0, 1e7), "temperature": (-273.15, 1e4),
    "thermal_resistance": (0.0, 1e4), "length": (0.0, 1e4), "inductance_factor": (0.0, 1e-3),
    "i2t": (0.0, 1e9), "charge": (0.0, 1e9),
    "fraction": (0.0, 10.0), "level": (-300.0, 100.0), "gain": (-200.0, 200.0),
}

ARTICLE = {"inductance": "an inductance", "apparent_power": "an apparent power", "i2t": "an I²t value",
           "inductance_factor": "an inductance factor (AL)",
           "charge": "a charge (battery capacity)", "fraction": "a plain ratio"}

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d{1,3})?"
_SPLIT = re.compile(rf"^\s*({_NUMBER})\s*(.*?)\s*$")
_UNIT_OK = re.compile(r"^[A-Za-z%][A-Za-z0-9_/*^. %]*$")
_REPLACE = (("µ", "u"), ("μ", "u"), ("Ω", "ohm"), ("°C/W", "K/W"), ("degC/W", "K/W"), ("C/W", "K/W"),
            ("°C", "degC"), ("²", "^2"), ("·", "*"))
_PER_TURN = re.compile(r"\s*/\s*(turn|t)(\^2|\*\*2)\s*$")


class UnitError(ValueError):
    """A value that cannot stand for the quantity the field wants; the text says why."""


def implausible(value: float, dim: str) -> str | None:
    """Why a value lies outside what any build could mean, or None."""
    low, high = PLAUSIBLE[dim]
    if dim == "temperature" and value < low:
        return "is below absolute zero"
    if abs(value) > max(abs(low), high) or (dim in ("level", "gain") and not low <= value <= high):
        return f"is far beyond any bench build (limit {fmt(high, DIMENSIONS[dim][1])})"
    return None


def article(dim: str) -> str:
    return ARTICLE.get(dim) or f"a {dim.replace('_', ' ')}"


def _pint() -> Any:
    """pint, imported as if numpy were absent (unless something loaded numpy already).

    pint imports numpy at its own import time whenever numpy is installed, and the plotting
    library of the HTML report brings numpy along: a tenth of a second or more on every plain
    check. speccheck gives pint plain floats only, so it never needs pint's numpy support."""
    import sys

    if "pint" in sys.modules or "numpy" in sys.modules:
        import pint

        return pint
    sys.modules["numpy"] = None  # type: ignore[assignment]  # `import numpy` fails inside pint
    try:
        import pint
    finally:
        del sys.modules["numpy"]
    return pint


@lru_cache(maxsize=1)
def registry() -> Any:
    pint = _pint()

    path = resources.files("speccheck").joinpath("units.txt")
    with resources.as_file(path) as real:
        return pint.UnitRegistry(str(real), autoconvert_offset_to_baseunit=True)


@lru_cache(maxsize=4096)
def _dimension_of(unit: str) -> str | None:
    reg = registry()
    try:
        have = reg.Unit(unit).dimensionality
    except Exception:
        return None
    for name, (si, _, _) in DIMENSIONS.items():
        if si and name not in ("level", "gain") and reg.Unit(si).dimensionality == have:
            return name
    return "dimensionless" if not have else None


@lru_cache(maxsize=4096)
def _factor(unit: str, dim: str) -> float:
    """SI value of one `unit`, after checking it is of dimension `dim`. Raises UnitError."""
    reg = registry()
    si = DIMENSIONS[dim][0]
    try:
        parsed = reg.Unit(unit)
    except Exception:
        raise UnitError(f"'{unit}' is not a unit speccheck knows") from None
    try:
        return float(reg.Quantity(1.0, parsed).to(si or "dimensionless").magnitude)
    except Exception:
        got = _dimension_of(unit)
        what = article(got) if got else "something else"
        raise UnitError(f"expected {article(dim)}, got {{text}} ({what})") from None


# A unit text is bounded as a whole before pint sees it (pint evaluates what it is given, and a
# tower of powers such as "Hz**3**3**3" takes it minutes and gigabytes). The grammar: at most
# MAX_FACTORS unit names, joined by '*', '/' or a space, each with at most one power of a whole
# number between -MAX_POWER and MAX_POWER; no number inside a unit, no power of a power. With
# the registry's largest unit scale (giga times hour, 3.6e12) every intermediate product then
# stays below (3.6e12)**(MAX_FACTORS * MAX_POWER), about 1e151: finite, and reached without
# any loop whose length the text decides.
MAX_FACTORS = 4
MAX_POWER = 3
_UNIT_TOKENS = re.compile(r"\*\*|\^|[*/]|[A-Za-z%][A-Za-z_%]*|[+-]?\d+(?:\.\d*)?|\S")


def _unit_shape_trouble(unit: str) -> str | None:
    """Why a unit text is outside the bounded grammar above, or None."""
    names, expect_name, after = 0, True, ""
    for token in _UNIT_TOKENS.findall(unit):
        if token[0].isalpha() or token[0] == "%":
            names += 1
            if names > MAX_FACTORS:
                return f"'{unit}' has more than {MAX_FACTORS} units multiplied together"
            expect_name, after = False, "name"
        elif token in ("**", "^"):
            if after == "power":
                return f"'{unit}' raises a power to a power; write one power per unit"
            if after != "name":
                return f"'{unit}' is not a unit speccheck knows"
            after = "op-power"
        elif token in ("*", "/"):
            if expect_name:
                return f"'{unit}' is not a unit speccheck knows"
            expect_name, after = True, "op"
        elif after == "op-power" and re.fullmatch(r"[+-]?\d+", token):
            if not 0 < abs(int(token)) <= MAX_POWER:
                return f"power {token} in '{unit}' is not a unit of this trade"
            after = "power"
        else:
            return f"'{unit}' is not a unit speccheck knows (a unit holds no number)" \
                if token[0].isdigit() else f"'{unit}' is not a unit speccheck knows"
    if expect_name or after == "op-power":
        return f"'{unit}' is not a unit speccheck knows"
    return None


def _clean_unit(unit: str) -> str:
    for a, b in _REPLACE:
        unit = unit.replace(a, b)
    if not _UNIT_OK.match(unit):
        raise UnitError(f"'{unit}' is not a unit speccheck knows")
    trouble = _unit_shape_trouble(unit)
    if trouble:
        raise UnitError(trouble)
    return unit.replace("^", "**")


def _log_level(value: float, unit: str, dim: str, text: str) -> float:
    key = unit.strip()
    if dim == "gain":
        if key == "dB":
            return value
        raise UnitError(f"expected a gain in dB, got '{text}'")
    offsets = {"dBm": 0.0, "dBW": 30.0}
    if key in offsets:
        return value + offsets[key]
    if key in ("dBuV", "dBµV", "dBμV"):
        raise UnitError(f"'{key}' needs an impedance to become a power; give the level in dBm")
    watts = value * _factor(_clean_unit(key), "power")
    if watts <= 0:
        raise UnitError(f"a power of {text} has no level in dBm")
    return 10.0 * math.log10(watts / 1e-3)


def parse(text: object, dim: str) -> float:
    """User text -> SI float of dimension `dim` (dBm for levels, dB for gains, °C for temperatures)."""
    if isinstance(text, str) and len(text) <= MAX_TEXT:
        ok, value = _parse_text(text, dim)
        if ok:
            return cast(float, value)
        raise UnitError(str(value))
    return _parse(text, dim)


@lru_cache(maxsize=8192)
def _parse_text(text: str, dim: str) -> tuple[bool, float | str]:
    """Cached: the same few hundred values ('100 nF', '0 V') fill every build file."""
    try:
        return True, _parse(text, dim)
    except UnitError as exc:
        return False, str(exc)


def _parse(text: object, dim: str) -> float:
    if dim not in DIMENSIONS:
        raise KeyError(dim)
    example = DIMENSIONS[dim][2]
    if isinstance(text, bool) or text is None or isinstance(text, (list, dict)):
        raise UnitError(f"expected {article(dim)} such as '{example}'")
    if not isinstance(text, (str, int, float)):
        raise UnitError(f"expected {article(dim)} such as '{example}'")
    if isinstance(text, (int, float)):
        if dim != "fraction":
            raise UnitError(f"expected {article(dim)} with its unit, such as '{example}', got a bare number "
                            f"{text}")
        value = float(text)
        if not math.isfinite(value):
            raise UnitError("not a finite number")
        return value
    if len(text) > MAX_TEXT:
        raise UnitError(f"value is longer than {MAX_TEXT} characters")
    m = _SPLIT.match(text)
    if not m:
        raise UnitError(f"expected {article(dim)} such as '{example}', got '{text}'")
    value = float(m.group(1))
    unit = m.group(2)
    if not math.isfinite(value):
        raise UnitError(f"'{text}' is not a finite number")
    if dim in ("level", "gain"):
        return _log_level(value, unit, dim, text)
    if dim == "inductance_factor":
        unit = _PER_TURN.sub("", unit)
    if not unit:
        if dim == "fraction":
            return value
        raise UnitError(f"'{text}' has no unit: expected {article(dim)} such as '{example}'")
    unit = _clean_unit(unit)
    try:
        factor = _factor(unit, dim)  # also checks the dimension
    except UnitError as exc:
        raise UnitError(str(exc).replace("{text}", f"'{text.strip()}'")) from None
    if dim == "temperature":
        reg = registry()
        return float(reg.Quantity(value, reg.Unit(unit)).to("degC").magnitude)
    si = value * factor
    if not math.isfinite(si):
        raise UnitError(f"'{text.strip()}' is beyond any number speccheck can work with")
    return si


# ---- formatting ------------------------------------------------------------------------

_PREFIXES = [(1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"),
             (1e-12, "p"), (1e-15, "f")]
_NO_PREFIX = {"h", "°C", "°C/W", "dB", "dBm", "dBc", "%", "ppm", "", "A²s", "turns", "AWG"}


def fmt(value: float, unit: str, digits: int | None = None) -> str:
    """A number with its SI unit as a person writes it: 455 kHz, 4.7 µF, 912 mW.

    Frequencies keep every digit down to 1 Hz (a 10.245 MHz oscillator must not read
    10.24 MHz, and a frequency plan is about such offsets); every other quantity gets 4
    significant digits.
    """
    if value is None:
        return unit
    if not math.isfinite(value):
        shown = "not a number" if math.isnan(value) else ("∞" if value > 0 else "-∞")
        return f"{shown} {unit}".strip()
    if unit in _NO_PREFIX or value == 0:
        return f"{value:.{digits or 4}g} {unit}".strip()
    mag = abs(value)
    for scale, prefix in _PREFIXES:  # noqa: B007 (the pair found is used after the loop)
        if mag >= scale:
            break
    else:
        scale, prefix = _PREFIXES[-1]
    scaled = value / scale
    return f"{scaled:.{digits or _digits(value, unit)}g} {prefix}{unit}"


def _digits(value: float, unit: str) -> int:
    """Significant digits: down to 1 Hz for frequencies (at least 4, at most 9), else 4."""
    if unit != "Hz" or value == 0:
        return 4
    return max(4, min(9, math.floor(math.log10(abs(value))) + 1))


def symbol(dim: str) -> str:
    return DIMENSIONS[dim][1]


# How a value is spelled in a build file (plain ASCII by default, as the examples and starters
# write it), for the edits the solver proposes. The units that keep their SI prefixes:
_PLAN_SPELLING = {"F": "F", "H": "H", "Ω": "ohm", "V": "V", "A": "A", "Hz": "Hz", "s": "s", "W": "W",
                  "°C/W": "degC/W", "°C": "degC"}
_PLAN_PREFIXES = {"F": ((1e-6, "u"), (1e-9, "n"), (1e-12, "p")),  # capacitors are sold in uF, nF, pF
                  "°C/W": (), "°C": ()}


def plan_text(value: float, unit: str, like: str = "") -> str:
    """A value as a builder writes it in a plan: '27 pF', '4.7 kohm', '470 uF', '1.25 A', '8 degC/W'.

    `like` is the text it replaces: a file that writes 'µ' or 'Ω' keeps doing so."""
    spelled = _PLAN_SPELLING.get(unit, unit)
    if unit == "Ω" and "Ω" in like:
        spelled = "Ω"
    ascii_prefixes = tuple((s, p if p != "µ" else "u") for s, p in _PREFIXES if s >= 1e-12)
    prefixes = _PLAN_PREFIXES.get(unit, ascii_prefixes)
    scale, prefix = 1.0, ""
    for candidate, letter in prefixes:
        if abs(value) >= candidate * (1 - 1e-9):
            scale, prefix = candidate, letter
            break
    else:
        if prefixes:
            scale, prefix = prefixes[-1]
    if prefix == "u" and ("µ" in like or "μ" in like):
        prefix = "µ"
    number = f"{value / scale:.6g}"
    return f"{number} {prefix}{spelled}"
