"""The frequency plan, the IF paths against the signals, and the detector tank, as pictures."""

from __future__ import annotations

from speccheck.formulas.resonators import tank_amplitude, tank_phase
from speccheck.reporters.figure_data import Conversion, Tank
from speccheck.reporters.figure_spectra import ahead_groups, if_panel, input_panel
from speccheck.reporters.figure_svg import (
    BLACK,
    BLUE,
    GREEN,
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
        input_panel(right, c, marks)
        if_panel(left, c)

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
    for who, _, rejection in ahead_groups(c):
        if rejection is not None:
            words.append(
                f"the image rejected by {rejection:.1f} dB ahead of the mixer{f' for {who}' if who else ''}"
            )
    for p in c.paths:
        if p.shape is not None:
            words.append(f"the {p.name} drawn as its modelled response in dB")
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


# Key values shown in each block of the chain picture, by stage kind: (section, name) in order of preference.
