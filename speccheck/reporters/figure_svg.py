"""Drawing helpers for the report's pictures: the palette, and matplotlib figures turned into
inline SVG that is deterministic (fixed hash salt per picture, no date) and safe to put several
of on one page (every id carries the picture's key). matplotlib is imported inside `svg_of` only.
"""

from __future__ import annotations

import io
import re
from dataclasses import dataclass

from speccheck import units

# Okabe-Ito palette: distinct for the common colour-vision deficiencies.
BLUE, ORANGE, GREEN, VERMILION, PURPLE, SKY, YELLOW, BLACK = (
    "#0072B2",
    "#E69F00",
    "#009E73",
    "#D55E00",
    "#CC79A7",
    "#56B4E9",
    "#F0E442",
    "#000000",
)
GREY = "#777777"


def tint(colour: str, share: float = 0.75) -> str:
    """The colour mixed with white: a light fill on which the same colour's hatching still shows."""
    r, g, b = (int(colour[i : i + 2], 16) for i in (1, 3, 5))
    return "#" + "".join(f"{round(c + (255 - c) * share):02x}" for c in (r, g, b))


@dataclass
class Figure:
    key: str  # unique within a page: used for SVG ids
    title: str
    svg: str
    alt: str  # what the picture shows, in words


def hz(value: float) -> str:
    return units.fmt(value, "Hz")


def svg_of(draw, key: str, size: tuple) -> str:
    """Run `draw(fig)` on a new matplotlib figure and return its SVG, deterministic and id-safe."""
    import matplotlib
    from matplotlib.figure import Figure as MplFigure

    style = {
        "svg.hashsalt": f"speccheck-{key}",
        "svg.fonttype": "none",
        "font.size": 9,
        "font.family": "sans-serif",
        "axes.spines.top": False,
        "axes.spines.right": False,
        "hatch.linewidth": 0.8,
        "axes.titlesize": 10,
        "axes.titleweight": "bold",
    }
    with matplotlib.rc_context(style):  # type: ignore[arg-type]
        fig = MplFigure(figsize=size, layout="constrained")
        draw(fig)
        buf = io.StringIO()
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "speccheck"})
    return inline_svg(buf.getvalue(), key)


def inline_svg(svg: str, key: str) -> str:
    """The SVG as an element for an HTML page: no XML prolog, sized by its viewBox, ids made unique."""
    svg = svg[svg.index("<svg") :]
    svg = re.sub(r'<svg([^>]*?)\swidth="[^"]*"\s+height="[^"]*"', r"<svg\1", svg, count=1)
    # Every id (and every reference to one) gets the picture's key, so pictures on one page never clash.
    ids = set(re.findall(r'\sid="([^"]+)"', svg))
    for old in sorted(ids, key=len, reverse=True):
        svg = (
            svg.replace(f'id="{old}"', f'id="{key}-{old}"')
            .replace(f"#{old})", f"#{key}-{old})")
            .replace(f'"#{old}"', f'"#{key}-{old}"')
        )
    return svg.strip()


def _mhz(f: float) -> float:
    return f / 1e6


def _khz(f: float) -> float:
    return f / 1e3
