"""Pictures for the HTML report, drawn from the design sheet (the values the rules computed).

Nothing here is hand-made: every line and band comes from a sheet entry, so a picture can only
show what the check found. matplotlib is imported inside `figure_svg.svg_of` alone, when a report asks for
pictures, so a plain check never loads it.

Each picture is a `Figure`: SVG text (deterministic: fixed hash salt per picture, no date) and
a text alternative that says in words what it shows. Colours come from a palette that colour-blind
readers can tell apart (Okabe and Ito), and every colour is paired with a line style or a
hatching, so the pictures read in grey and on paper too.

Modules: figure_data.py reads the sheet (by section, owner and name, as the rules publish them;
tests/test_html.py checks each picture appears for the examples, so a renamed entry shows up
there); figure_plots.py draws the frequency plan and the tank, figure_spectra.py the response curves
(the shapes the rules published, speccheck/responses.py) and the signals' Bessel lines; figure_svg.py holds
the palette and turns a matplotlib figure into inline SVG; this module draws the chain and
picks the pictures for one file.
"""

from __future__ import annotations

from speccheck.reporters.figure_data import (
    Conversion,
    PathBand,
    Sheet,
    SignalBand,
    Tank,
    conversions,
    paths,
    signals,
    tanks,
)
from speccheck.reporters.figure_plots import frequency_plan, tank_response
from speccheck.reporters.figure_spectra import paths_against_signals
from speccheck.reporters.figure_svg import (
    BLACK,
    BLUE,
    ORANGE,
    VERMILION,
    Figure,
    hz,
    svg_of,
    tint,
)

__all__ = [
    "Conversion",
    "Figure",
    "PathBand",
    "Sheet",
    "SignalBand",
    "Tank",
    "chain_blocks",
    "conversions",
    "figures",
    "frequency_plan",
    "hz",
    "paths",
    "paths_against_signals",
    "signals",
    "tank_response",
    "tanks",
]


_KEY_VALUES = {
    "input-match": [("input-match", "return loss"), ("input-match", "VSWR")],
    "conversion": [("conversion", "LO frequency"), ("conversion", "IF (nominal)")],
    "discriminator": [("discriminator", "tank resonance f0"), ("discriminator", "loaded Q")],
    "audio-filter": [("audio", "low-pass corner")],
    "de-emphasis": [("audio", "de-emphasis corner")],
}


def chain_blocks(chain: list, sheet: Sheet, worst: dict, key: str) -> Figure | None:
    """The signal chain as blocks in signal order, each with its key values; a block with an error
    is drawn bold and cross-hatched, one with a warning dashed."""
    if not chain:
        return None
    blocks = []
    for label, kind in chain:
        lines = []
        for section, name in _KEY_VALUES.get(kind, []):
            shown = list(
                dict.fromkeys(e.value.text for e in sheet.of(section, label) if e.value.name == name)
            )
            if shown:  # one value per switch position where they differ (format v2)
                lines.append(f"{_short(name)} {' / '.join(shown)}")
        if kind == "if-filter":
            for p in paths(sheet):
                lines.append(f"{p.name.replace(' path', '')} {_span(p.low, p.high)}")
        heading = label if label != kind else stage_words(kind)
        blocks.append((heading, lines[:3], worst.get(label)))
    per_row = len(blocks) if len(blocks) <= 6 else (len(blocks) + 1) // 2
    rows = (len(blocks) + per_row - 1) // per_row
    box_pt = 0.8 * CHAIN_WIDTH_IN / per_row * 72  # a block's width in points, for fitting its text

    def draw(fig):
        from matplotlib.patches import FancyBboxPatch, Rectangle

        ax = fig.add_subplot()
        ax.set_axis_off()
        ax.set_xlim(0, per_row)
        ax.set_ylim(0, rows)
        for i, (label, lines, level) in enumerate(blocks):
            col, row = i % per_row, i // per_row
            x, y = col + 0.08, rows - row - 0.85
            width, dashes, edge = {"error": (3.0, "-", VERMILION), "warning": (2.0, "--", ORANGE)}.get(
                level or "", (1.2, "-", BLUE)
            )
            ax.add_patch(
                FancyBboxPatch(
                    (x, y),
                    0.8,
                    0.7,
                    boxstyle="round,pad=0.02",
                    facecolor="white",
                    linewidth=width,
                    linestyle=dashes,
                    edgecolor=edge,
                )
            )
            if level:  # a hatched strip along the bottom: reads without colour
                ax.add_patch(
                    Rectangle(
                        (x, y),
                        0.8,
                        0.16,
                        facecolor=tint(edge, 0.85),
                        edgecolor=edge,
                        linewidth=0,
                        hatch="xxx" if level == "error" else "//",
                    )
                )
            ax.text(
                x + 0.4,
                y + 0.56,
                label,
                ha="center",
                va="center",
                fontsize=_fitted(label, 9, box_pt, bold=True),
                weight="bold",
                bbox={"facecolor": "white", "edgecolor": "none", "pad": 1},
            )
            for j, line in enumerate(lines):
                ax.text(
                    x + 0.4,
                    y + 0.38 - 0.14 * j,
                    line,
                    ha="center",
                    va="center",
                    fontsize=_fitted(line, 7.2, box_pt),
                    bbox={"facecolor": "white", "edgecolor": "none", "pad": 0.5},
                )
            if level:
                ax.text(
                    x + 0.4,
                    y + 0.08,
                    "has an error" if level == "error" else "has a warning",
                    ha="center",
                    va="center",
                    fontsize=7.5,
                    weight="bold",
                    bbox={"facecolor": "white", "edgecolor": "none", "pad": 0.8},
                )
            if i + 1 < len(blocks) and col + 1 < per_row:
                ax.annotate(
                    "",
                    (x + 0.92, y + 0.35),
                    (x + 0.8, y + 0.35),
                    arrowprops={"arrowstyle": "-|>", "color": BLACK},
                )

    svg = svg_of(draw, key, (CHAIN_WIDTH_IN, 1.5 * rows + 0.2))
    said = []
    for label, lines, level in blocks:
        part = label + (f" ({', '.join(lines)})" if lines else "")
        if level:
            part += f", with {'an error' if level == 'error' else 'a warning'}"
        said.append(part)
    return Figure(key, "The signal chain", svg, "The signal chain in order: " + "; then ".join(said) + ".")


CHAIN_WIDTH_IN = 8.4  # the chain picture's width in inches


def _span(low: float, high: float) -> str:
    """A passband as '445–465 kHz': the unit once when both ends share it ('995 kHz–1.005 MHz' not)."""
    a, b = hz(low), hz(high)
    number, _, unit = a.rpartition(" ")
    return f"{number}–{b}" if number and b.endswith(" " + unit) else f"{a}–{b}"


def _fitted(text: str, size: float, width_pt: float, bold: bool = False) -> float:
    """The font size (at most `size`, at least 5.5 pt) at which `text` fits `width_pt` across: a
    sans-serif character is about 0.6 em wide on average, bold about 0.68 (common practice)."""
    em = 0.68 if bold else 0.6
    needed = len(text) * em * size
    return max(5.5, min(size, size * 0.92 * width_pt / needed)) if needed else size


def stage_words(kind: str) -> str:
    """A stage kind as a heading: 'if-filter' -> 'IF filter', 'audio-amp' -> 'audio amp';
    'de-emphasis' keeps its hyphen (one word)."""
    if kind == "de-emphasis":
        return kind
    return " ".join(w.upper() if w in ("if", "rf", "lo") else w for w in kind.split("-"))


def _short(name: str) -> str:
    return {
        "tank resonance f0": "f0",
        "IF (nominal)": "IF",
        "LO frequency": "LO",
        "return loss": "return loss",
        "low-pass corner": "corner",
        "de-emphasis corner": "corner",
    }.get(name, name)


def figures(result) -> list[Figure]:
    """Every picture the sheet of one file supports, in reading order: chain, plan, paths, tank."""
    sheet = Sheet(result.sheet)
    worst: dict = {}
    from speccheck.findings import RANK

    for f in result.findings:
        if f.waived or f.level == "note" or not f.stage:
            continue
        if f.stage not in worst or RANK[f.level] > RANK[worst[f.stage]]:
            worst[f.stage] = f.level
    out = []
    block = chain_blocks(getattr(result, "chain", []) or [], sheet, worst, "chain")
    if block:
        out.append(block)
    for i, c in enumerate(conversions(sheet)):
        out.append(frequency_plan(c, f"plan{i}"))
        pic = paths_against_signals(c, f"paths{i}")
        if pic:
            out.append(pic)
    for i, t in enumerate(tanks(sheet)):
        out.append(tank_response(t, f"tank{i}"))
    return out
