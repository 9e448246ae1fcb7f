"""Response shapes and test tones as design-sheet entries: written by the rules, read by the pictures.

A rule that judges a signal through a filter publishes the very shape it used (the model, the
width it is quoted at, the equivalent Butterworth order) and the tone it tested with, so the
report draws the same curve and the same Bessel lines the verdict came from: the picture and the
verdict cannot disagree. Both directions live here so the entry names cannot drift apart.
Reporters may import this module (it reads no rule); it imports only speccheck.formulas.
"""

from __future__ import annotations

from collections.abc import Callable

from speccheck.formulas import shapes

# The words a model is published as, and back.
_MODELS = {"butterworth": "equivalent Butterworth", "gaussian": "Gaussian", "flat": "flat top"}
_KINDS = {words: kind for kind, words in _MODELS.items()}

TONE = "test tone (highest audio at full deviation)"
DEVIATION = "test tone deviation (peak)"


def shape_entries(shape: shapes.Shape, prefix: str = "", centre: float | None = None) -> list[tuple]:
    """(name, value, unit) of each entry that describes `shape`; with `centre`, its centre and width
    too (an IF path's centre and width are its published passband edges already)."""
    out: list[tuple] = []
    if centre is not None:
        out += [(f"{prefix}centre", centre, "Hz"), (f"{prefix}width", shape.width, "Hz")]
    out += [
        (f"{prefix}response model", _MODELS[shape.kind], ""),
        (f"{prefix}width quoted at", shape.at_db, "dB"),
    ]
    if shape.kind == "butterworth":
        out.append((f"{prefix}response order", shape.order, ""))
    if shape.ultimate_db != shapes.ULTIMATE_DB:
        out.append((f"{prefix}ultimate attenuation", shape.ultimate_db, "dB"))
    return out


def shape_from(lookup: Callable[[str], float | str | None], prefix: str = "",
               width: float | None = None) -> shapes.Shape | None:
    """The shape published under `prefix`, `lookup(name)` giving an entry's value (None when absent)."""
    model = lookup(f"{prefix}response model")
    at_db = lookup(f"{prefix}width quoted at")
    if width is None:
        found = lookup(f"{prefix}width")
        width = float(found) if isinstance(found, (int, float)) else None
    if not isinstance(model, str) or model not in _KINDS or not isinstance(at_db, (int, float)) or not width:
        return None
    kind = _KINDS[model]
    order = lookup(f"{prefix}response order")
    ultimate = lookup(f"{prefix}ultimate attenuation")
    return shapes.Shape(
        width,
        float(at_db),
        kind,
        float(order) if isinstance(order, (int, float)) else 1.0,
        float(ultimate) if isinstance(ultimate, (int, float)) else shapes.ULTIMATE_DB,
    )


def ahead_prefix(index: int) -> str:
    """Entry names of the index-th filter (from 0) that makes the passband ahead of a mixer."""
    return f"passband ahead, filter {index + 1}: "


def tone_entries(deviation: float, tone: float) -> list[tuple]:
    return [(TONE, tone, "Hz"), (DEVIATION, deviation, "Hz")]
