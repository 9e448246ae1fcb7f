"""The frequency plan, the IF paths against the signals, and the detector tank, as pictures."""

from __future__ import annotations

from speccheck.formulas.resonators import tank_amplitude, tank_phase
from speccheck.reporters.figure_data import Conversion, Tank
from speccheck.reporters.figure_svg import (
    BLACK,
    BLUE,
    GREEN,
    GREY,
    ORANGE,
    PURPLE,
    SKY,
    VERMILION,
    Figure,
    _khz,
    _mhz,
    hz,
    svg_of,
    tint,
)


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

    svg = svg_of(draw, key, (8.4, 5.6))
    return Figure(key, f"Frequency plan: {c.owner}", svg, _plan_alt(c))


def _plan_axes(fig):
    axes = fig.subplot_mosaic([["all", "all"], ["if", "in"]], height_ratios=[1, 1.3])
    return axes["all"], (axes["if"], axes["in"])


def _label_rows(items, span: float) -> list[int]:
    """Stagger labels of nearby marks over a few heights so they do not overlap."""
    rows: list[int] = []
    last: list[float] = []
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


def aheads(c: Conversion) -> list[tuple[str, float, float]]:
    """The passband ahead of the mixer: one, or (format v2) one per signal where they differ."""
    per_signal: list[tuple[str, float, float]] = []
    for sig in c.signals:
        if sig.ahead and all((low, high) != sig.ahead for _, low, high in per_signal):
            per_signal.append((sig.name, sig.ahead[0], sig.ahead[1]))
    if len(per_signal) > 1:
        return per_signal
    return [("", c.ahead[0], c.ahead[1])] if c.ahead else []


_PATH_STYLES = [(GREEN, "-"), (PURPLE, "--"), (BLUE, ":"), (ORANGE, "-.")]
_AHEAD_HATCH = ["//", "\\\\", "..", "xx"]


def _draw_aheads(ax, c: Conversion, legend: bool):
    for i, (who, low, high) in enumerate(sorted(aheads(c), key=lambda a: a[1] - a[2])):  # widest first
        ax.axvspan(
            _mhz(low),
            _mhz(high),
            facecolor=tint(SKY, 0.8 if i else 0.7),
            hatch=_AHEAD_HATCH[i % len(_AHEAD_HATCH)],
            edgecolor=SKY,
            linewidth=0.6,
            alpha=0.9,
            label=(f"passband ahead of the mixer{f' for {who}' if who else ''}" if legend else None),
        )


def _plan_overview(ax, c: Conversion, marks):
    top = max(f for _, f, *_ in marks) * 1.12
    _draw_aheads(ax, c, legend=True)
    for _, _, high in aheads(c):
        top = max(top, high * 1.05)
    for p in c.paths:
        ax.axvspan(_mhz(p.low), _mhz(p.high), facecolor=GREEN, alpha=0.5, edgecolor=GREEN)
    ordered = sorted(marks, key=lambda m: m[1])
    rows = _label_rows(ordered, top * 0.16)
    for (name, f, colour, style), row in zip(ordered, rows, strict=True):
        ax.axvline(_mhz(f), color=colour, linestyle=style, linewidth=1.8)
        ax.annotate(
            f"{name} {hz(f)}",
            (_mhz(f), 0.92 - 0.2 * row),
            xycoords=("data", "axes fraction"),
            xytext=(3, 0),
            textcoords="offset points",
            fontsize=8.5,
            color=BLACK,
            va="top",
            bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.8},
        )
    if c.spurs:
        ax.plot(
            [_mhz(f) for _, f in c.spurs],
            [0.04] * len(c.spurs),
            linestyle="none",
            marker="|",
            markersize=10,
            color=PURPLE,
            transform=ax.get_xaxis_transform(),
            label="spurs and birdies",
        )
    ax.set_xlim(0, _mhz(top))
    ax.set_ylim(0, 1)
    ax.set_yticks([])
    ax.set_xlabel("frequency (MHz)")
    ax.set_title("The whole plan on one axis")
    if aheads(c) or c.spurs:
        ax.legend(loc="upper center", fontsize=7.5, frameon=False)


def _plan_input(ax, c: Conversion, marks):
    near = [m for m in marks if m[0] != "IF"]
    fs = [f for _, f, *_ in near] + [f for _, low, high in aheads(c) for f in (low, high)]
    low, high = min(fs), max(fs)
    pad = (high - low) * 0.08 or c.f_in * 0.01
    low, high = low - pad, high + pad
    _draw_aheads(ax, c, legend=False)
    ordered = sorted(near, key=lambda m: m[1])
    rows = _label_rows(ordered, (high - low) * 0.25)
    for (name, f, colour, style), row in zip(ordered, rows, strict=True):
        ax.axvline(_mhz(f), color=colour, linestyle=style, linewidth=1.8)
        ax.annotate(
            name,
            (_mhz(f), 0.95 - 0.12 * row),
            xycoords=("data", "axes fraction"),
            xytext=(3, 0),
            textcoords="offset points",
            fontsize=8.5,
            va="top",
        )
    shown = [(n, f) for n, f in c.spurs if low <= f <= high]
    if shown:
        ax.plot(
            [_mhz(f) for _, f in shown],
            [0.05] * len(shown),
            linestyle="none",
            marker="|",
            markersize=12,
            color=PURPLE,
            transform=ax.get_xaxis_transform(),
        )
        ax.annotate(
            f"{len(shown)} spur{'s' if len(shown) > 1 else ''} and birdie{'s' if len(shown) > 1 else ''}",
            (0.02, 0.14),
            xycoords="axes fraction",
            fontsize=7.5,
            color=BLACK,
            bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": PURPLE},
        )
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
    # the widest path first, so that a narrower one drawn over it stays visible; each its own line style
    for i, p in enumerate(sorted(c.paths, key=lambda p: p.low - p.high)):
        colour, dashes = _PATH_STYLES[i % len(_PATH_STYLES)]
        ax.fill_between(
            [_khz(p.low), _khz(p.low), _khz(p.high), _khz(p.high)],
            [0, 0.8 - 0.04 * i, 0.8 - 0.04 * i, 0],
            step=None,
            facecolor=tint(colour, 0.9) if i == 0 else "none",
            edgecolor=colour,
            linestyle=dashes,
            linewidth=2,
            label=f"{p.name} passband",
        )
    levels = [0.62, 0.42, 0.22, 0.12]
    styles = [(BLUE, "///"), (VERMILION, "\\\\\\"), (PURPLE, "xx"), (ORANGE, "++")]
    for i, sig in enumerate(c.signals):
        colour, hatch = styles[i % len(styles)]
        y = levels[i % len(levels)]
        for j, centre in enumerate((c.if_low, c.if_high)):
            ax.add_patch(
                _rect(
                    _khz(centre - sig.width / 2),
                    y - 0.08 + 0.09 * j,
                    _khz(sig.width),
                    0.08,
                    colour,
                    hatch,
                    sig.name + " at the worst-case IF" if j == 0 else None,
                )
            )
    ax.axvline(_khz(c.f_if), color=GREEN, linestyle="-.", linewidth=1.2)
    ax.set_xlim(_khz(low), _khz(high))
    ax.set_ylim(0, 1)
    ax.set_yticks([])
    ax.set_xlabel("frequency (kHz)")
    ax.set_title("At the IF: filter and signal")
    ax.legend(loc="upper right", fontsize=7, frameon=False, ncol=1)


def _rect(x, y, w, h, colour, hatch, label):
    from matplotlib.patches import Rectangle

    return Rectangle(
        (x, y), w, h, facecolor=tint(colour), edgecolor=colour, hatch=hatch, linewidth=1, label=label
    )


def _plan_alt(c: Conversion) -> str:
    words = [
        (
            f"Frequency plan of {c.owner}: the input at {hz(c.f_in)}, the LO at {hz(c.lo)}, the IF at "
            f"{hz(c.f_if)} (worst case {hz(c.if_low)} to {hz(c.if_high)})"
        )
    ]
    if c.image is not None:
        words.append(f"the image at {hz(c.image)}")
    for who, low, high in aheads(c):
        words.append(
            f"the passband ahead of the mixer{f' for {who}' if who else ''} from {hz(low)} to {hz(high)}"
        )
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
        ax.plot(
            [_khz(f) for f in freqs],
            [tank_amplitude(f, t.f0, t.q) for f in freqs],
            color=BLUE,
            linewidth=2,
            label="tank response (relative amplitude)",
        )
        ax.plot(
            [_khz(f) for f in freqs],
            [0.5 - tank_phase(f, t.f0, t.q) / 3.1416 for f in freqs],
            color=ORANGE,
            linestyle="--",
            linewidth=2,
            label="detector output (follows the tank's phase)",
        )
        ax.axvspan(
            _khz(t.f0 - half),
            _khz(t.f0 + half),
            facecolor=tint(GREEN, 0.85),
            hatch="..",
            edgecolor=tint(GREEN, 0.4),
            linewidth=0.5,
            label=f"linear range f0/Q = {hz(2 * half)}",
        )
        if t.f_if is not None and swing:
            ax.annotate(
                "",
                (_khz(centre + swing), 0.08),
                (_khz(centre - swing), 0.08),
                arrowprops={"arrowstyle": "<|-|>", "color": VERMILION, "linewidth": 2.2},
            )
            ax.text(_khz(centre), 0.12, f"signal swing {hz(2 * swing)}", ha="center", fontsize=8, color=BLACK)
        if t.f_if is not None:
            ax.axvline(
                _khz(t.f_if), color=VERMILION, linestyle=":", linewidth=1.5, label=f"final IF {hz(t.f_if)}"
            )
        if t.tune_low is not None and t.tune_high is not None:
            ax.plot(
                [_khz(t.tune_low), _khz(t.tune_high)],
                [-0.05, -0.05],
                color=PURPLE,
                linewidth=4,
                solid_capstyle="butt",
                label="tuning range of the adjustable part",
            )
        ax.set_ylim(-0.1, 1.12)
        ax.set_xlim(_khz(lo), _khz(hi))
        ax.set_xlabel("frequency (kHz)")
        ax.set_yticks([0, 0.5, 1])
        ax.set_title(
            f"Detector tank: resonance {hz(t.f0)}, loaded Q {t.q:.3g}"
            + (f"\nfor {t.label}" if t.label else "")
        )
        ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.2), fontsize=7.5, frameon=False, ncol=3)

    svg = svg_of(draw, key, (7.6, 4.0))
    fits = "inside" if t.need is None or 2 * half >= t.need else "wider than"
    alt = (
        f"Response of the detector tank in {t.owner}{f' for {t.label}' if t.label else ''}: "
        f"resonance {hz(t.f0)}, loaded Q {t.q:.3g}, so a linear range of {hz(2 * half)} around the resonance"
    )
    if t.f_if is not None:
        alt += f"; the final IF at {hz(t.f_if)}"
    if t.need:
        alt += f"; the signal swings {hz(t.need)} (twice the deviation plus drift), {fits} the linear range"
    if t.tune_low is not None and t.tune_high is not None:
        alt += f"; the adjustable part tunes the resonance from {hz(t.tune_low)} to {hz(t.tune_high)}"
    return Figure(key, f"Detector tank: {t.owner}" + (f", {t.label}" if t.label else ""), svg, alt + ".")


def paths_against_signals(c: Conversion, key: str) -> Figure | None:
    """Each signal's band at the worst-case IF against every IF path; the path that serves it drawn bold."""
    if not c.paths or not c.signals:
        return None

    def draw(fig):
        axes = fig.subplots(len(c.signals), 1, squeeze=False)[:, 0]
        for ax, sig in zip(axes, c.signals, strict=True):
            span = [c.if_low - sig.width / 2, c.if_high + sig.width / 2]
            for p in c.paths:
                span += [p.low, p.high]
            pad = (max(span) - min(span)) * 0.1
            styles = ["-", "--", ":", "-."]
            for i, p in enumerate(c.paths):
                serving = sig.path is None or sig.path == p.name
                ax.plot(
                    _khz_list([p.low, p.low, p.high, p.high]),
                    [0, 1, 1, 0],
                    color=GREEN if serving else GREY,
                    linestyle=styles[i % len(styles)],
                    linewidth=2.2 if serving else 1.2,
                    label=f"{p.name}" + (" (serves it)" if serving and sig.path else ""),
                )
            ax.add_patch(
                _rect(
                    _khz(c.if_low - sig.width / 2),
                    0.15,
                    _khz(sig.width),
                    0.3,
                    BLUE,
                    "///",
                    "signal at the lowest worst-case IF",
                )
            )
            ax.add_patch(
                _rect(
                    _khz(c.if_high - sig.width / 2),
                    0.5,
                    _khz(sig.width),
                    0.3,
                    VERMILION,
                    "\\\\\\",
                    "signal at the highest worst-case IF",
                )
            )
            ax.set_xlim(_khz(min(span) - pad), _khz(max(span) + pad))
            ax.set_ylim(0, 1.25)
            ax.set_yticks([])
            ax.set_title(f"{sig.name}: {hz(sig.width)} wide", loc="left")
            ax.legend(loc="upper right", fontsize=7, frameon=False, ncol=2)
        axes[-1].set_xlabel("frequency (kHz)")

    svg = svg_of(draw, key, (7.6, 1.9 + 1.6 * len(c.signals)))
    words = []
    for sig in c.signals:
        served = [p for p in c.paths if sig.path is None or sig.path == p.name]
        for p in served:
            low, high = c.if_low - sig.width / 2, c.if_high + sig.width / 2
            inside = p.low <= low and high <= p.high
            words.append(
                f"{sig.name} ({hz(sig.width)}) spans {hz(low)} to {hz(high)} at the worst-case IF, "
                f"{'inside' if inside else 'outside'} the {p.name} ({hz(p.low)} to {hz(p.high)})"
            )
    return Figure(key, "IF paths against the signals", svg, "; ".join(words) + ".")


def _khz_list(fs):
    return [_khz(f) for f in fs]


# Key values shown in each block of the chain picture, by stage kind: (section, name) in order of preference.
