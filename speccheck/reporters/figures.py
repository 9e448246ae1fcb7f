"""Pictures for the HTML report, drawn from the design sheet (the values the rules computed).

Nothing here is hand-made: every line and band comes from a sheet entry, so a picture can only
show what the check found. matplotlib is imported inside `_svg` alone, when a report asks for
pictures, so a plain check never loads it.

Each picture is a `Figure`: SVG text (deterministic: fixed hash salt per picture, no date) and
a text alternative that says in words what it shows. Colours come from a palette that colour-blind
readers can tell apart (Okabe and Ito), and every colour is paired with a line style or a
hatching, so the pictures read in grey and on paper too.

Reading the sheet: `Sheet` looks entries up by section, owner and name. The names are those the
rules publish; tests/test_html.py checks each picture appears for the examples, so a renamed
entry shows up there.
"""

from __future__ import annotations

import io
import re
from dataclasses import dataclass, field

from speccheck import units
from speccheck.formulas.resonators import tank_amplitude, tank_phase

# Okabe-Ito palette: distinct for the common colour-vision deficiencies.
BLUE, ORANGE, GREEN, VERMILION, PURPLE, SKY, YELLOW, BLACK = (
    "#0072B2", "#E69F00", "#009E73", "#D55E00", "#CC79A7", "#56B4E9", "#F0E442", "#000000")
GREY = "#777777"


def tint(colour: str, share: float = 0.75) -> str:
    """The colour mixed with white: a light fill on which the same colour's hatching still shows."""
    r, g, b = (int(colour[i:i + 2], 16) for i in (1, 3, 5))
    return "#" + "".join(f"{round(c + (255 - c) * share):02x}" for c in (r, g, b))


@dataclass
class Figure:
    key: str  # unique within a page: used for SVG ids
    title: str
    svg: str
    alt: str  # what the picture shows, in words


def hz(value: float) -> str:
    return units.fmt(value, "Hz")


# ---- reading the sheet -------------------------------------------------------------------

class Sheet:
    """The design sheet of one file, looked up by (section, owner, name)."""

    def __init__(self, entries):
        self.entries = list(entries)
        self._at = {(e.section, e.owner, e.value.name): e.value.value for e in self.entries}

    def num(self, section: str, owner: str, name: str) -> float | None:
        value = self._at.get((section, owner, name))
        return float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) else None

    def text(self, section: str, owner: str, name: str) -> str | None:
        value = self._at.get((section, owner, name))
        return value if isinstance(value, str) else None

    def owners(self, section: str) -> list[str]:
        seen: list[str] = []
        for e in self.entries:
            if e.section == section and e.owner not in seen:
                seen.append(e.owner)
        return seen

    def of(self, section: str, owner: str) -> list:
        return [e for e in self.entries if e.section == section and e.owner == owner]


@dataclass
class SignalBand:
    name: str
    width: float  # necessary bandwidth, Hz
    path: str | None = None  # the IF path that serves it, when the sheet says


@dataclass
class PathBand:
    name: str  # e.g. "narrow path"
    low: float
    high: float
    # Room for a response shape (frequency, dB) when the rules publish one; a flat top until then.
    shape: list = field(default_factory=list)


@dataclass
class Conversion:
    owner: str
    f_in: float
    lo: float
    f_if: float
    if_low: float
    if_high: float
    image: float | None
    ahead: tuple | None  # (low, high) of the passband ahead of the mixer
    spurs: list  # (name, frequency)
    paths: list  # PathBand after this conversion
    signals: list  # SignalBand


def signals(sheet: Sheet) -> list[SignalBand]:
    out = []
    for name in sheet.owners("signals"):
        width = sheet.num("signals", name, "necessary bandwidth (ITU-R SM.1138)")
        if width:
            out.append(SignalBand(name, width))
    for path in sheet.owners("if-filter"):
        for e in sheet.of("if-filter", path):
            m = re.fullmatch(r"margin for (.+) \(worst case\)", e.value.name)
            for sig in out:
                if m and m.group(1) == sig.name and sig.path is None:
                    sig.path = path
    return out


def paths(sheet: Sheet) -> list[PathBand]:
    out = []
    for owner in sheet.owners("if-filter"):
        low = sheet.num("if-filter", owner, "passband low edge")
        high = sheet.num("if-filter", owner, "passband high edge")
        if low is not None and high is not None and high > low:
            out.append(PathBand(owner, low, high))
    return out


def conversions(sheet: Sheet) -> list[Conversion]:
    out = []
    all_paths, all_signals = paths(sheet), signals(sheet)
    for owner in sheet.owners("conversion"):
        got = {n: sheet.num("conversion", owner, n) for n in (
            "input frequency", "LO frequency", "IF (nominal)", "IF lowest (worst case)", "IF highest (worst case)",
            "image frequency", "passband ahead low edge", "passband ahead high edge")}
        f_in, lo, f_if = got["input frequency"], got["LO frequency"], got["IF (nominal)"]
        if f_in is None or lo is None or f_if is None:
            continue
        low, high = got["passband ahead low edge"], got["passband ahead high edge"]
        spurs = [(e.value.name, float(e.value.value)) for e in sheet.of("spurs", owner)
                 if isinstance(e.value.value, (int, float)) and e.value.unit == "Hz"]
        near = [p for p in all_paths if p.low - 3 * (p.high - p.low) <= f_if <= p.high + 3 * (p.high - p.low)]
        out.append(Conversion(owner, f_in, lo, f_if, got["IF lowest (worst case)"] or f_if,
                              got["IF highest (worst case)"] or f_if, got["image frequency"],
                              (low, high) if low is not None and high is not None else None, spurs, near,
                              all_signals))
    return out


@dataclass
class Tank:
    owner: str
    f0: float
    q: float
    f_if: float | None
    need: float | None  # the signal's swing: 2 x deviation plus drift, Hz
    tune_low: float | None
    tune_high: float | None
    linear: float | None = None  # the linear range as the rule computed it (f0/Q)

    @property
    def half(self) -> float:
        return (self.linear or self.f0 / self.q) / 2


def tanks(sheet: Sheet) -> list[Tank]:
    out = []
    for owner in sheet.owners("discriminator"):
        f0 = sheet.num("discriminator", owner, "tank resonance f0")
        q = sheet.num("discriminator", owner, "loaded Q")
        if f0 and q:
            out.append(Tank(owner, f0, q, sheet.num("discriminator", owner, "final IF"),
                            sheet.num("discriminator", owner, "needed range (2·deviation + drift)"),
                            sheet.num("discriminator", owner, "tuning range low"),
                            sheet.num("discriminator", owner, "tuning range high"),
                            sheet.num("discriminator", owner, "linear range (f0/Q)")))
    return out


# ---- drawing --------------------------------------------------------------------------------

def _svg(draw, key: str, size: tuple) -> str:
    """Run `draw(fig)` on a new matplotlib figure and return its SVG, deterministic and id-safe."""
    import matplotlib
    from matplotlib.figure import Figure as MplFigure

    style = {"svg.hashsalt": f"speccheck-{key}", "svg.fonttype": "none", "font.size": 9,
             "font.family": "sans-serif", "axes.spines.top": False, "axes.spines.right": False,
             "hatch.linewidth": 0.8, "axes.titlesize": 10, "axes.titleweight": "bold"}
    with matplotlib.rc_context(style):
        fig = MplFigure(figsize=size, layout="constrained")
        draw(fig)
        buf = io.StringIO()
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "speccheck"})
    return _inline(buf.getvalue(), key)


def _inline(svg: str, key: str) -> str:
    """The SVG as an element for an HTML page: no XML prolog, sized by its viewBox, ids made unique."""
    svg = svg[svg.index("<svg"):]
    svg = re.sub(r'<svg([^>]*?)\swidth="[^"]*"\s+height="[^"]*"', r"<svg\1", svg, count=1)
    # Every id (and every reference to one) gets the picture's key, so pictures on one page never clash.
    ids = set(re.findall(r'\sid="([^"]+)"', svg))
    for old in sorted(ids, key=len, reverse=True):
        svg = svg.replace(f'id="{old}"', f'id="{key}-{old}"').replace(f"#{old})", f"#{key}-{old})") \
                 .replace(f'"#{old}"', f'"#{key}-{old}"')
    return svg.strip()


def _mhz(f: float) -> float:
    return f / 1e6


def _khz(f: float) -> float:
    return f / 1e3


def frequency_plan(c: Conversion, key: str) -> Figure:
    """The whole plan on one axis, with the input region and the IF region magnified below."""
    marks = [("input", c.f_in, BLUE, "-"), ("LO", c.lo, ORANGE, "--"), ("IF", c.f_if, GREEN, "-.")]
    if c.image is not None:
        marks.append(("image", c.image, VERMILION, ":"))

    def draw(fig):
        top, (left, right) = _plan_axes(fig)
        _plan_overview(top, c, marks)
        _plan_input(right, c, marks)
        _plan_if(left, c)

    svg = _svg(draw, key, (8.4, 5.6))
    return Figure(key, f"Frequency plan: {c.owner}", svg, _plan_alt(c))


def _plan_axes(fig):
    axes = fig.subplot_mosaic([["all", "all"], ["if", "in"]], height_ratios=[1, 1.3])
    return axes["all"], (axes["if"], axes["in"])


def _label_rows(items, span: float) -> list[int]:
    """Stagger labels of nearby marks over a few heights so they do not overlap."""
    rows, last = [], []
    for _, f, *_ in items:
        row = 0
        while row < len(last) and abs(f - last[row]) < span:
            row += 1
        if row == len(last):
            last.append(f)
        else:
            last[row] = f
        rows.append(row)
    return rows


def _plan_overview(ax, c: Conversion, marks):
    top = max(f for _, f, *_ in marks) * 1.12
    if c.ahead:
        ax.axvspan(_mhz(c.ahead[0]), _mhz(c.ahead[1]), facecolor=tint(SKY), hatch="//", edgecolor=SKY,
                   linewidth=0.6, label="passband ahead of the mixer")
        top = max(top, c.ahead[1] * 1.05)
    for p in c.paths:
        ax.axvspan(_mhz(p.low), _mhz(p.high), facecolor=GREEN, alpha=0.5, edgecolor=GREEN)
    ordered = sorted(marks, key=lambda m: m[1])
    rows = _label_rows(ordered, top * 0.16)
    for (name, f, colour, style), row in zip(ordered, rows):
        ax.axvline(_mhz(f), color=colour, linestyle=style, linewidth=1.8)
        ax.annotate(f"{name} {hz(f)}", (_mhz(f), 0.92 - 0.2 * row), xycoords=("data", "axes fraction"),
                    xytext=(3, 0), textcoords="offset points", fontsize=8.5, color=BLACK, va="top",
                    bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.8})
    if c.spurs:
        ax.plot([_mhz(f) for _, f in c.spurs], [0.04] * len(c.spurs), linestyle="none", marker="|",
                markersize=10, color=PURPLE, transform=ax.get_xaxis_transform(), label="spurs and birdies")
    ax.set_xlim(0, _mhz(top))
    ax.set_ylim(0, 1)
    ax.set_yticks([])
    ax.set_xlabel("frequency (MHz)")
    ax.set_title("The whole plan on one axis")
    if c.ahead or c.spurs:
        ax.legend(loc="upper center", fontsize=7.5, frameon=False)


def _plan_input(ax, c: Conversion, marks):
    near = [m for m in marks if m[0] != "IF"]
    fs = [f for _, f, *_ in near] + ([c.ahead[0], c.ahead[1]] if c.ahead else [])
    low, high = min(fs), max(fs)
    pad = (high - low) * 0.08 or c.f_in * 0.01
    low, high = low - pad, high + pad
    if c.ahead:
        ax.axvspan(_mhz(c.ahead[0]), _mhz(c.ahead[1]), facecolor=tint(SKY), hatch="//", edgecolor=SKY,
                   linewidth=0.6)
    ordered = sorted(near, key=lambda m: m[1])
    rows = _label_rows(ordered, (high - low) * 0.25)
    for (name, f, colour, style), row in zip(ordered, rows):
        ax.axvline(_mhz(f), color=colour, linestyle=style, linewidth=1.8)
        ax.annotate(name, (_mhz(f), 0.95 - 0.12 * row), xycoords=("data", "axes fraction"), xytext=(3, 0),
                    textcoords="offset points", fontsize=8.5, va="top")
    shown = [(n, f) for n, f in c.spurs if low <= f <= high]
    if shown:
        ax.plot([_mhz(f) for _, f in shown], [0.05] * len(shown), linestyle="none", marker="|", markersize=12,
                color=PURPLE, transform=ax.get_xaxis_transform())
        ax.annotate(f"{len(shown)} spur{'s' if len(shown) > 1 else ''} and birdie{'s' if len(shown) > 1 else ''}",
                    (0.02, 0.14), xycoords="axes fraction", fontsize=7.5, color=BLACK,
                    bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": PURPLE})
    ax.set_xlim(_mhz(low), _mhz(high))
    ax.set_ylim(0, 1)
    ax.set_yticks([])
    ax.set_xlabel("frequency (MHz)")
    ax.set_title("Around the input")


def _plan_if(ax, c: Conversion):
    span = [c.if_low, c.if_high]
    for p in c.paths:
        span += [p.low, p.high]
    widest = max((s.width for s in c.signals), default=0.0)
    low, high = min(span) - widest * 0.6, max(span) + widest * 0.6
    pad = (high - low) * 0.08
    low, high = low - pad, high + pad
    for p in c.paths:
        ax.fill_between([_khz(p.low), _khz(p.low), _khz(p.high), _khz(p.high)], [0, 0.8, 0.8, 0], step=None,
                        facecolor=tint(GREEN, 0.9), edgecolor=GREEN, linewidth=2, label=f"{p.name} passband")
    levels = [0.62, 0.42, 0.22, 0.12]
    styles = [(BLUE, "///"), (VERMILION, "\\\\\\"), (PURPLE, "xx"), (ORANGE, "++")]
    for i, sig in enumerate(c.signals):
        colour, hatch = styles[i % len(styles)]
        y = levels[i % len(levels)]
        for j, centre in enumerate((c.if_low, c.if_high)):
            ax.add_patch(_rect(_khz(centre - sig.width / 2), y - 0.08 + 0.09 * j, _khz(sig.width), 0.08, colour,
                               hatch, sig.name + " at the worst-case IF" if j == 0 else None))
    ax.axvline(_khz(c.f_if), color=GREEN, linestyle="-.", linewidth=1.2)
    ax.set_xlim(_khz(low), _khz(high))
    ax.set_ylim(0, 1)
    ax.set_yticks([])
    ax.set_xlabel("frequency (kHz)")
    ax.set_title("At the IF: filter and signal")
    ax.legend(loc="upper right", fontsize=7, frameon=False, ncol=1)


def _rect(x, y, w, h, colour, hatch, label):
    from matplotlib.patches import Rectangle

    return Rectangle((x, y), w, h, facecolor=tint(colour), edgecolor=colour, hatch=hatch, linewidth=1,
                     label=label)


def _plan_alt(c: Conversion) -> str:
    words = [(f"Frequency plan of {c.owner}: the input at {hz(c.f_in)}, the LO at {hz(c.lo)}, the IF at "
              f"{hz(c.f_if)} (worst case {hz(c.if_low)} to {hz(c.if_high)})")]
    if c.image is not None:
        words.append(f"the image at {hz(c.image)}")
    if c.ahead:
        words.append(f"the passband ahead of the mixer from {hz(c.ahead[0])} to {hz(c.ahead[1])}")
    for p in c.paths:
        words.append(f"the {p.name} from {hz(p.low)} to {hz(p.high)}")
    for s in c.signals:
        words.append(f"{s.name} {hz(s.width)} wide, drawn at the lowest and the highest worst-case IF")
    if c.spurs:
        words.append(f"{len(c.spurs)} spurious responses and birdies marked near the input")
    return "; ".join(words) + "."


def tank_response(t: Tank, key: str) -> Figure:
    half = t.half
    swing = (t.need or 0) / 2
    centre = t.f_if if t.f_if is not None else t.f0
    lo = min(t.f0 - 3 * half, centre - 1.4 * swing)
    hi = max(t.f0 + 3 * half, centre + 1.4 * swing)
    if t.tune_low is not None and t.tune_high is not None:
        lo, hi = min(lo, t.tune_low - half * 0.3), max(hi, t.tune_high + half * 0.3)
    lo = max(lo, t.f0 * 0.05)
    n = 400
    freqs = [lo + (hi - lo) * i / (n - 1) for i in range(n)]

    def draw(fig):
        ax = fig.add_subplot()
        ax.plot([_khz(f) for f in freqs], [tank_amplitude(f, t.f0, t.q) for f in freqs], color=BLUE,
                linewidth=2, label="tank response (relative amplitude)")
        ax.plot([_khz(f) for f in freqs], [0.5 - tank_phase(f, t.f0, t.q) / 3.1416 for f in freqs], color=ORANGE,
                linestyle="--", linewidth=2, label="detector output (follows the tank's phase)")
        ax.axvspan(_khz(t.f0 - half), _khz(t.f0 + half), facecolor=tint(GREEN, 0.85), hatch="..",
                   edgecolor=tint(GREEN, 0.4), linewidth=0.5, label=f"linear range f0/Q = {hz(2 * half)}")
        if t.f_if is not None and swing:
            ax.annotate("", (_khz(centre + swing), 0.08), (_khz(centre - swing), 0.08),
                        arrowprops={"arrowstyle": "<|-|>", "color": VERMILION, "linewidth": 2.2})
            ax.text(_khz(centre), 0.12, f"signal swing {hz(2 * swing)}", ha="center", fontsize=8, color=BLACK)
        if t.f_if is not None:
            ax.axvline(_khz(t.f_if), color=VERMILION, linestyle=":", linewidth=1.5, label=f"final IF {hz(t.f_if)}")
        if t.tune_low is not None and t.tune_high is not None:
            ax.plot([_khz(t.tune_low), _khz(t.tune_high)], [-0.05, -0.05], color=PURPLE, linewidth=4,
                    solid_capstyle="butt", label="tuning range of the adjustable part")
        ax.set_ylim(-0.1, 1.12)
        ax.set_xlim(_khz(lo), _khz(hi))
        ax.set_xlabel("frequency (kHz)")
        ax.set_yticks([0, 0.5, 1])
        ax.set_title(f"Detector tank: resonance {hz(t.f0)}, loaded Q {t.q:.3g}")
        ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.2), fontsize=7.5, frameon=False, ncol=3)

    svg = _svg(draw, key, (7.6, 4.0))
    fits = "inside" if t.need is None or 2 * half >= t.need else "wider than"
    alt = (f"Response of the detector tank in {t.owner}: resonance {hz(t.f0)}, loaded Q {t.q:.3g}, so a linear "
           f"range of {hz(2 * half)} around the resonance")
    if t.f_if is not None:
        alt += f"; the final IF at {hz(t.f_if)}"
    if t.need:
        alt += f"; the signal swings {hz(t.need)} (twice the deviation plus drift), {fits} the linear range"
    if t.tune_low is not None and t.tune_high is not None:
        alt += f"; the adjustable part tunes the resonance from {hz(t.tune_low)} to {hz(t.tune_high)}"
    return Figure(key, f"Detector tank: {t.owner}", svg, alt + ".")


def paths_against_signals(c: Conversion, key: str) -> Figure | None:
    """Each signal's band at the worst-case IF against every IF path; the path that serves it drawn bold."""
    if not c.paths or not c.signals:
        return None

    def draw(fig):
        axes = fig.subplots(len(c.signals), 1, squeeze=False)[:, 0]
        for ax, sig in zip(axes, c.signals):
            span = [c.if_low - sig.width / 2, c.if_high + sig.width / 2]
            for p in c.paths:
                span += [p.low, p.high]
            pad = (max(span) - min(span)) * 0.1
            styles = ["-", "--", ":", "-."]
            for i, p in enumerate(c.paths):
                serving = sig.path is None or sig.path == p.name
                ax.plot(_khz_list([p.low, p.low, p.high, p.high]), [0, 1, 1, 0], color=GREEN if serving else GREY,
                        linestyle=styles[i % len(styles)], linewidth=2.2 if serving else 1.2,
                        label=f"{p.name}" + (" (serves it)" if serving and sig.path else ""))
            ax.add_patch(_rect(_khz(c.if_low - sig.width / 2), 0.15, _khz(sig.width), 0.3, BLUE, "///",
                               "signal at the lowest worst-case IF"))
            ax.add_patch(_rect(_khz(c.if_high - sig.width / 2), 0.5, _khz(sig.width), 0.3, VERMILION, "\\\\\\",
                               "signal at the highest worst-case IF"))
            ax.set_xlim(_khz(min(span) - pad), _khz(max(span) + pad))
            ax.set_ylim(0, 1.25)
            ax.set_yticks([])
            ax.set_title(f"{sig.name}: {hz(sig.width)} wide", loc="left")
            ax.legend(loc="upper right", fontsize=7, frameon=False, ncol=2)
        axes[-1].set_xlabel("frequency (kHz)")

    svg = _svg(draw, key, (7.6, 1.9 + 1.6 * len(c.signals)))
    words = []
    for sig in c.signals:
        served = [p for p in c.paths if sig.path is None or sig.path == p.name]
        for p in served:
            low, high = c.if_low - sig.width / 2, c.if_high + sig.width / 2
            inside = p.low <= low and high <= p.high
            words.append(f"{sig.name} ({hz(sig.width)}) spans {hz(low)} to {hz(high)} at the worst-case IF, "
                         f"{'inside' if inside else 'outside'} the {p.name} ({hz(p.low)} to {hz(p.high)})")
    return Figure(key, "IF paths against the signals", svg, "; ".join(words) + ".")


def _khz_list(fs):
    return [_khz(f) for f in fs]


# Key values shown in each block of the chain picture, by stage kind: (section, name) in order of preference.
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
            for e in sheet.of(section, label):
                if e.value.name == name:
                    lines.append(f"{_short(name)} {e.value.text}")
        if kind == "if-filter":
            for p in paths(sheet):
                lines.append(f"{p.name.replace(' path', '')} {hz(p.low)}–{hz(p.high)}")
        blocks.append((label, lines[:3], worst.get(label)))
    per_row = len(blocks) if len(blocks) <= 6 else (len(blocks) + 1) // 2
    rows = (len(blocks) + per_row - 1) // per_row

    def draw(fig):
        from matplotlib.patches import FancyBboxPatch, Rectangle

        ax = fig.add_subplot()
        ax.set_axis_off()
        ax.set_xlim(0, per_row)
        ax.set_ylim(0, rows)
        for i, (label, lines, level) in enumerate(blocks):
            col, row = i % per_row, i // per_row
            x, y = col + 0.08, rows - row - 0.85
            style = {"error": {"linewidth": 3, "linestyle": "-", "edgecolor": VERMILION},
                     "warning": {"linewidth": 2, "linestyle": "--", "edgecolor": ORANGE}}.get(
                level, {"linewidth": 1.2, "linestyle": "-", "edgecolor": BLUE})
            ax.add_patch(FancyBboxPatch((x, y), 0.8, 0.7, boxstyle="round,pad=0.02", facecolor="white", **style))
            if level:  # a hatched strip along the bottom: reads without colour
                ax.add_patch(Rectangle((x, y), 0.8, 0.16, facecolor=tint(style["edgecolor"], 0.85),
                                       edgecolor=style["edgecolor"], linewidth=0,
                                       hatch="xxx" if level == "error" else "//"))
            ax.text(x + 0.4, y + 0.56, label, ha="center", va="center", fontsize=9, weight="bold",
                    bbox={"facecolor": "white", "edgecolor": "none", "pad": 1})
            for j, line in enumerate(lines):
                ax.text(x + 0.4, y + 0.38 - 0.14 * j, line, ha="center", va="center", fontsize=7.2,
                        bbox={"facecolor": "white", "edgecolor": "none", "pad": 0.5})
            if level:
                ax.text(x + 0.4, y + 0.08, "has an error" if level == "error" else "has a warning", ha="center",
                        va="center", fontsize=7.5, weight="bold",
                        bbox={"facecolor": "white", "edgecolor": "none", "pad": 0.8})
            if i + 1 < len(blocks) and col + 1 < per_row:
                ax.annotate("", (x + 0.92, y + 0.35), (x + 0.8, y + 0.35),
                            arrowprops={"arrowstyle": "-|>", "color": BLACK})

    svg = _svg(draw, key, (8.4, 1.5 * rows + 0.2))
    said = []
    for label, lines, level in blocks:
        part = label + (f" ({', '.join(lines)})" if lines else "")
        if level:
            part += f", with {'an error' if level == 'error' else 'a warning'}"
        said.append(part)
    return Figure(key, "The signal chain", svg, "The signal chain in order: " + "; then ".join(said) + ".")


def _short(name: str) -> str:
    return {"tank resonance f0": "f0", "IF (nominal)": "IF", "LO frequency": "LO", "return loss": "return loss",
            "low-pass corner": "corner", "de-emphasis corner": "corner"}.get(name, name)


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
