"""Response curves and Bessel spectra for the pictures: the IF paths and the passband ahead drawn as
the attenuation the rules modelled (the shapes freqplan publishes on the sheet, speccheck.responses),
each signal as the Bessel lines of the tone the rules test with, at the worst-case IF offset.

Levels are in dB relative to the unmodulated carrier (a line's power J_n(β)², 0 dB for all of it)
and, for a filter, its response (minus its attenuation), on one axis: a line that stands above the
curve is cut by the difference."""

from __future__ import annotations

import math

from speccheck.formulas import fmspectrum, shapes
from speccheck.reporters.figure_data import Conversion, PathBand, SignalBand
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
    hz,
    svg_of,
)

FLOOR_DB = -70.0  # the bottom of a spectrum axis: lines and skirts below it are not drawn


def lines_of(tone: tuple) -> list[tuple[int, float]]:
    """(n, level in dB relative to the carrier) of each Bessel line of the test tone above FLOOR_DB."""
    dev, f_mod = tone
    return [(n, 10 * math.log10(p)) for n, p in fmspectrum.sideband_powers(dev / f_mod) if p > 0
            and 10 * math.log10(p) > FLOOR_DB]


def worst_end(c: Conversion, sig: SignalBand, path: PathBand) -> tuple[float, float]:
    """(IF of the carrier, share passed) at the end of the worst-case IF where the path passes the
    least of the signal: the same tone and shape the rule used, so the same end it judged."""
    assert sig.tone is not None  # drawn as lines only when the rules published its tone
    dev, f_mod = sig.tone
    def about_centre(x: float) -> float:
        return path.attenuation(path.centre + x)

    ends = []
    for f in (c.if_low, c.if_high):
        share = fmspectrum.passed_share(dev, f_mod, about_centre, f - path.centre)
        ends.append((share, f))
    share, f = min(ends)
    return f, share


def ahead_attenuation(responses: list, f: float) -> float:
    """dB of the filters ahead of the mixer in cascade at input frequency f (as the rule sums them)."""
    return shapes.cascade_attenuation(responses, f)


def curve(ax, xs_hz: list, attenuation, scale, **style) -> None:
    """A response as -attenuation in dB over xs_hz, plotted against scale(x)."""
    ax.plot([scale(f) for f in xs_hz], [max(-attenuation(f), FLOOR_DB - 5) for f in xs_hz], **style)


def grid(low: float, high: float, n: int = 500) -> list[float]:
    return [low + (high - low) * i / (n - 1) for i in range(n)]


def _span(c: Conversion, sig: SignalBand, serving: PathBand | None) -> tuple[float, float]:
    half = (sig.tone[0] + sig.tone[1]) * 1.6 if sig.tone else sig.width
    low, high = c.if_low - half, c.if_high + half
    if serving is not None and serving.shape is not None:
        reach = serving.shape.width_at(-FLOOR_DB) / 2
        low, high = min(low, serving.centre - reach), max(high, serving.centre + reach)
    elif serving is not None:
        pad = (serving.high - serving.low) * 0.3
        low, high = min(low, serving.low - pad), max(high, serving.high + pad)
    return low, high


def _signal_panel(ax, c: Conversion, sig: SignalBand) -> None:
    served = [p for p in c.paths if sig.path is None or sig.path == p.name]
    serving = served[0] if served else None
    low, high = _span(c, sig, serving)
    xs = grid(low, high)
    styles = ["--", ":", "-."]
    others = [p for p in c.paths if p is not serving]
    for i, p in enumerate(others):
        curve(ax, xs, p.attenuation, _khz, color=GREY, linestyle=styles[i % 3], linewidth=1.2,
              label=f"{p.name} (not in circuit for it)")
    if sig.responses_ahead:
        curve(ax, xs, lambda f: ahead_attenuation(sig.responses_ahead, c.input_of(f)), _khz, color=SKY,
              linestyle="-.", linewidth=2, label="passband ahead of the mixer, seen at the IF")
    if serving is not None:
        curve(ax, xs, serving.attenuation, _khz, color=GREEN, linewidth=2.6,
              label=f"{serving.name}" + (" (carries it)" if sig.path else ""))
    ax.axvspan(_khz(c.if_low), _khz(c.if_high), facecolor="#dddddd", edgecolor="none",
               label=f"worst-case IF {hz(c.if_low)} to {hz(c.if_high)}")
    if sig.tone and serving is not None:
        carrier, _ = worst_end(c, sig, serving)
        shown = lines_of(sig.tone)
        xs_l = [_khz(carrier + n * sig.tone[1]) for n, _ in shown]
        ax.vlines(xs_l, FLOOR_DB, [db for _, db in shown], color=VERMILION, linewidth=1.6,
                  label=f"its Bessel lines at the worst-case IF {hz(carrier)}")
        ax.plot(xs_l, [db for _, db in shown], linestyle="none", marker="o", markersize=3.5, color=VERMILION)
        after = [db - serving.attenuation(carrier + n * sig.tone[1]) for n, db in shown]
        ax.plot(xs_l, [max(a, FLOOR_DB) for a in after], linestyle="none", marker="x", markersize=5,
                color=BLACK, label="each line after the path")
    elif serving is not None:  # not FM: its necessary band at both worst-case ends
        ends = ((c.if_low, BLUE, -4, "-", "lowest"), (c.if_high, ORANGE, -10, "--", "highest"))
        for f, colour, y, style, end in ends:
            ax.plot([_khz(f - sig.width / 2), _khz(f + sig.width / 2)], [y, y], color=colour, linewidth=4,
                    linestyle=style, solid_capstyle="butt",
                    label=f"its necessary band at the {end} worst-case IF")
    ax.set_xlim(_khz(low), _khz(high))
    ax.set_ylim(FLOOR_DB, 6)
    ax.set_yticks([0, -20, -40, -60])
    ax.set_ylabel("dB")
    ax.grid(axis="y", color="#e4e4e4", linewidth=0.6)
    ax.set_title(_panel_title(sig, serving), loc="left")
    ax.legend(loc="center left", bbox_to_anchor=(1.01, 0.5), fontsize=7, frameon=False)


def _panel_title(sig: SignalBand, serving: PathBand | None) -> str:
    head = sig.name + (f" ({sig.position})" if sig.position else "")
    said = []
    if sig.tone:
        said.append(f"{hz(sig.tone[1])} tone at ±{hz(sig.tone[0])}")
    if sig.share is not None and serving is not None:
        said.append(f"the {serving.name} passes {_share(sig.share)} at the worst-case IF")
    return head + ("\n" + ", ".join(said) if said else "")


def _share(percent: float) -> str:
    return f"{percent:.1f} % ({-fmspectrum.loss_db(percent / 100):.2f} dB)"


def paths_against_signals(c: Conversion, key: str) -> Figure | None:
    """Each signal's Bessel lines at the worst-case IF against the IF paths' modelled responses; the
    path that carries it bold, the passband ahead translated to the IF, one panel per signal."""
    if not c.paths or not c.signals:
        return None

    def draw(fig):
        axes = fig.subplots(len(c.signals), 1, squeeze=False)[:, 0]
        for ax, sig in zip(axes, c.signals, strict=True):
            _signal_panel(ax, c, sig)
        axes[-1].set_xlabel("frequency at the IF (kHz); level in dB relative to the unmodulated carrier")

    svg = svg_of(draw, key, (8.4, 0.6 + 2.9 * len(c.signals)))
    return Figure(key, "IF paths against the signals", svg, paths_alt(c))


def paths_alt(c: Conversion) -> str:
    words = []
    for sig in c.signals:
        served = [p for p in c.paths if sig.path is None or sig.path == p.name]
        who = sig.name + (f" ({sig.position})" if sig.position else "")
        part = who
        if sig.tone:
            part += (
                f", drawn as the Bessel lines of a {hz(sig.tone[1])} tone at ±{hz(sig.tone[0])} "
                "deviation at the worst-case IF"
            )
        else:
            part += f", {hz(sig.width)} wide"
        for p in served:
            shape = p.shape.what or _model(p) if p.shape is not None else "flat top"
            part += f"; the {p.name} ({hz(p.low)} to {hz(p.high)}, {shape})"
            if sig.share is not None:
                part += f" passes {_share(sig.share)} of its power at the worst-case IF"
                if sig.share_centre is not None:
                    part += f" and {_share(sig.share_centre)} on its centre"
            else:
                low, high = c.if_low - sig.width / 2, c.if_high + sig.width / 2
                inside = p.low <= low and high <= p.high
                part += f" {'holds' if inside else 'does not hold'} it from {hz(low)} to {hz(high)}"
        if sig.share_upstream is not None:
            part += f"; the upstream bandwidth passes {_share(sig.share_upstream)}"
        if sig.image_rejection is not None:
            part += f"; the passband ahead rejects the image by {sig.image_rejection:.1f} dB"
        words.append(part)
    return "; ".join(words) + "."


def _model(p: PathBand) -> str:
    s = p.shape
    if s is None:
        return "flat top"
    if s.kind == "butterworth":
        return f"equivalent Butterworth of order {s.order:.2g}, quoted at {s.at_db:g} dB"
    return f"{s.kind}, quoted at {s.at_db:g} dB"


def ahead_groups(c: Conversion) -> list[tuple[str, list, float | None]]:
    """(signals, responses, image rejection) of the passband ahead: one for all, or (format v2) one
    per signal where the switch positions or upstream settings change it."""
    groups: list[tuple[str, list, float | None]] = []
    for sig in c.signals:
        if not sig.responses_ahead:
            continue
        for i, (who, resp, rej) in enumerate(groups):
            if resp == sig.responses_ahead:
                groups[i] = (f"{who} and {sig.name}", resp, rej)
                break
        else:
            groups.append((sig.name, sig.responses_ahead, sig.image_rejection))
    if len(groups) > 1:
        return groups
    if groups:
        return [("", groups[0][1], groups[0][2])]
    return [("", c.responses_ahead, c.image_rejection)] if c.responses_ahead else []


def input_panel(ax, c: Conversion, marks) -> None:
    """Around the input: the passband ahead as its response in dB (one curve per signal where the
    positions change it), the input, the LO, the image with the rejection the rule found."""
    groups = ahead_groups(c)
    near = sorted((m for m in marks if m[0] != "IF"), key=lambda m: m[1])
    fs = [m[1] for m in near] + [f for _, r, _ in groups for centre, s in r
                                 for f in (centre - s.width, centre + s.width)]
    low, high = min(fs), max(fs)
    pad = (high - low) * 0.08 or c.f_in * 0.01
    low, high = low - pad, high + pad
    xs = grid(low, high, 800)
    dashes = ["-", "--", ":", "-."]
    for i, (who, resp, _) in enumerate(groups):
        curve(ax, xs, lambda f, resp=resp: ahead_attenuation(resp, f), lambda f: f / 1e6,
              color=[BLUE, PURPLE, GREEN, ORANGE][i % 4], linestyle=dashes[i % 4], linewidth=2,
              label="passband ahead" + (f" for {who}" if who else ""))
    for i, (name, f, colour, style) in enumerate(near):  # labels staggered: the marks may be close
        ax.axvline(f / 1e6, color=colour, linestyle=style, linewidth=1.4)
        ax.annotate(f"{name} {hz(f)}", (f / 1e6, 0.98 - 0.09 * i), xycoords=("data", "axes fraction"),
                    xytext=(3, 0), textcoords="offset points", fontsize=8, va="top",
                    bbox={"boxstyle": "round,pad=0.1", "facecolor": "white", "edgecolor": "none"})
    for i, (who, _, rejection) in enumerate(groups):
        if rejection is None or c.image is None:
            continue
        y = max(-rejection, FLOOR_DB + 2)
        ax.plot([c.image / 1e6], [y], marker="v", color=VERMILION, markersize=8, linestyle="none")
        ax.annotate(f"image {rejection:.1f} dB down" + (f" for {who}" if who else ""), (c.image / 1e6, y),
                    xytext=(8, 22 + 14 * i), textcoords="offset points", fontsize=8, color=BLACK,
                    arrowprops={"arrowstyle": "-", "color": VERMILION, "linewidth": 0.8},
                    bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": VERMILION})
    shown = [f for _, f in c.spurs if low <= f <= high]
    if shown:
        ax.plot([f / 1e6 for f in shown], [FLOOR_DB + 3] * len(shown), linestyle="none", marker="|",
                markersize=12, color=PURPLE, label=f"spurs and birdies ({len(shown)})")
    ax.set_xlim(low / 1e6, high / 1e6)
    ax.set_ylim(FLOOR_DB, 8)
    ax.set_yticks([0, -20, -40, -60])
    ax.set_ylabel("dB")
    ax.set_xlabel("frequency (MHz)")
    ax.set_title("Around the input")
    if groups or shown:
        ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.22), fontsize=7, frameon=False, ncol=2)


def if_panel(ax, c: Conversion) -> None:
    """At the IF: every path's modelled response in dB and the worst-case IF range."""
    widest = max((s.width for s in c.signals), default=0.0)
    span = [c.if_low - widest, c.if_high + widest]
    for p in c.paths:
        reach = p.shape.width_at(40.0) / 2 if p.shape is not None else (p.high - p.low) * 0.7
        span += [p.centre - reach, p.centre + reach]
    low, high = min(span), max(span)
    xs = grid(low, high)
    styles = [(GREEN, "-"), (PURPLE, "--"), (BLUE, ":"), (ORANGE, "-.")]
    for i, p in enumerate(sorted(c.paths, key=lambda p: p.low - p.high)):
        colour, dashes = styles[i % len(styles)]
        curve(ax, xs, p.attenuation, _khz, color=colour, linestyle=dashes, linewidth=2, label=p.name)
    ax.axvspan(_khz(c.if_low), _khz(c.if_high), facecolor="#cccccc", edgecolor="none", label="worst-case IF")
    ax.axvline(_khz(c.f_if), color=BLACK, linestyle="-.", linewidth=1)
    ax.set_xlim(_khz(low), _khz(high))
    ax.set_ylim(FLOOR_DB, 8)
    ax.set_yticks([0, -20, -40, -60])
    ax.set_ylabel("dB")
    ax.set_xlabel("frequency (kHz)")
    ax.set_title("At the IF: the paths' responses")
    ax.legend(loc="lower center", fontsize=7, frameon=True, framealpha=0.9)
