"""Resistor dividers: the voltage at a node fed through resistors, a potentiometer's wiper as a
source, and the two thresholds a hysteresis (positive feedback) resistor gives a comparator input.

A node fed from sources V_i through resistors R_i (a resistor to ground is a source of 0 V) sits
at V = sum(V_i / R_i) / sum(1 / R_i): superposition of the sources, each seen through the others
in parallel (Millman's theorem; nodal analysis, Kirchhoff's current law at the node: any circuits
text, e.g. Hayt, Kemmerly & Durbin, Engineering Circuit Analysis, ch. 4-5). A source with no
resistance pins the node to its own voltage.

A potentiometer whose track of resistance R runs from V_a to V_b, with its wiper at a fraction x
of the track from the V_a end, is a Thevenin source of V_a + x (V_b - V_a) behind x (1 - x) R
(Thevenin's theorem: the two parts of the track in parallel; Horowitz & Hill, The Art of
Electronics, 3rd ed., ch. 1).

With a resistor R_f from the node back to an output that switches between V_low and V_high, the
node takes two values: the threshold moves, when the output switches, by
    dV = (V_high - V_low) * R_p / (R_p + R_f),  R_p = the node's other resistances in parallel
(the comparator with positive feedback, a Schmitt trigger: Horowitz & Hill, ch. 4, hysteresis by
positive feedback). SI: V, ohm.
"""

from __future__ import annotations

from collections.abc import Sequence


def node_voltage(sources: Sequence[tuple[float, float]]) -> float:
    """V = sum(V_i / R_i) / sum(1 / R_i) for sources (V_i, R_i) tied to one node; a source with
    R_i = 0 pins the node to V_i. Raises ValueError with no source."""
    if not sources:
        raise ValueError("a node needs at least one source")
    for volts, ohms in sources:
        if ohms == 0:
            return volts
    conductance = sum(1.0 / ohms for _, ohms in sources)
    return sum(volts / ohms for volts, ohms in sources) / conductance


def wiper_source(v_a: float, v_b: float, track: float, fraction: float) -> tuple[float, float]:
    """(Thevenin voltage, Thevenin resistance) of a pot's wiper at `fraction` (0..1) of its track
    from the V_a end: V_a + x (V_b - V_a) behind x (1 - x) R."""
    x = min(1.0, max(0.0, fraction))
    return v_a + x * (v_b - v_a), x * (1.0 - x) * track


def feedback_thresholds(v_drive: float, r_drive: float, r_shunt: float | None, r_feedback: float,
                        v_out_low: float, v_out_high: float) -> tuple[float, float]:
    """The node's voltage with the output low and with it high: the drive (V, R) into the node, an
    optional shunt R to ground, and the feedback resistor R_f to the output (node_voltage)."""
    fixed = [(v_drive, r_drive)] + ([(0.0, r_shunt)] if r_shunt else [])
    return (node_voltage([*fixed, (v_out_low, r_feedback)]),
            node_voltage([*fixed, (v_out_high, r_feedback)]))


def feedback_width(r_drive: float, r_shunt: float | None, r_feedback: float, swing: float) -> float:
    """How far the node moves when the output swings by `swing`: swing * R_p / (R_p + R_f), with
    R_p = R_drive || R_shunt (0 when the drive has no resistance: the node is pinned)."""
    if r_drive == 0:
        return 0.0
    r_p = r_drive if not r_shunt else r_drive * r_shunt / (r_drive + r_shunt)
    return swing * r_p / (r_p + r_feedback)


def wiper_fraction_for(target: float, v_a: float, v_b: float, track: float, r_series: float,
                       r_shunt: float | None, r_feedback: float, v_out: float) -> float | None:
    """The wiper fraction x (from the V_a end) that puts the node at `target` with the output at
    v_out: the root of node(x) - target on [0, 1] by bisection (node(x) from wiper_source and
    feedback_thresholds); None when the track's ends do not bracket the target."""

    def node(x: float) -> float:
        v_w, r_w = wiper_source(v_a, v_b, track, x)
        return feedback_thresholds(v_w, r_w + r_series, r_shunt, r_feedback, v_out, v_out)[0] - target

    lo, hi = 0.0, 1.0
    f_lo, f_hi = node(lo), node(hi)
    if f_lo == 0:
        return lo
    if f_lo * f_hi > 0:
        return None
    for _ in range(60):
        mid = (lo + hi) / 2
        f_mid = node(mid)
        if (f_mid < 0) == (f_lo < 0):
            lo, f_lo = mid, f_mid
        else:
            hi = mid
    return (lo + hi) / 2


def network_voltages(resistors: Sequence[tuple[str, str, float]],
                     fixed: dict[str, float]) -> dict[str, float]:
    """The DC voltage of every node of a resistor network that is not held by a source: nodal
    analysis with the held nodes as known voltages (Kirchhoff's current law at each free node,
    sum_j (v_i - v_j) / R_ij = 0; Hayt, Kemmerly & Durbin, ch. 4), solved by Gaussian elimination
    with partial pivoting. `resistors` are (node a, node b, ohms > 0); every free node must reach a
    held one through resistors, else ValueError (the network floats)."""
    free = sorted({n for a, b, _ in resistors for n in (a, b) if n not in fixed})
    index = {n: i for i, n in enumerate(free)}
    size = len(free)
    g = [[0.0] * (size + 1) for _ in range(size)]  # G | i, the last column the injected currents
    for a, b, ohms in resistors:
        if ohms <= 0:
            raise ValueError("a resistor of the network has no positive resistance")
        for here, there in ((a, b), (b, a)):
            i = index.get(here)
            if i is None:
                continue
            g[i][i] += 1.0 / ohms
            j = index.get(there)
            if j is None:
                g[i][size] += fixed[there] / ohms
            else:
                g[i][j] -= 1.0 / ohms
    for col in range(size):
        pivot = max(range(col, size), key=lambda r: abs(g[r][col]))
        if abs(g[pivot][col]) < 1e-15:
            raise ValueError("a node of the network reaches no held voltage: it floats")
        g[col], g[pivot] = g[pivot], g[col]
        for row in range(size):
            if row != col and g[row][col]:
                factor = g[row][col] / g[col][col]
                g[row] = [x - factor * y for x, y in zip(g[row], g[col], strict=True)]
    return {n: g[i][size] / g[i][i] for n, i in index.items()}
