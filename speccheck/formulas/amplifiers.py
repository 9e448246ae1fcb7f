"""Class-B/AB output stages: worst-case dissipation and the ideal full sine output.

Textbook class-B derivation (Boylestad & Nashelsky, Electronic Devices and Circuit Theory,
ch. 12, Example 12.8; Sedra & Smith from memory). SI: V, ohm, A, W.
"""

from __future__ import annotations

import math


def split_rails(topology: str, v_supply: float, v_negative: float | None = None) -> tuple[float, float]:
    """The two half-supplies the output stage swings between, as magnitudes (V+, V-).

    A single-ended capacitor-coupled stage on one supply V_s behaves as a split supply of
    ±V_s/2 (its output idles at half the supply); a split supply is ±V_CC as given."""
    if topology == "split-supply":
        return abs(v_supply), abs(v_negative if v_negative is not None else v_supply)
    return abs(v_supply) / 2, abs(v_supply) / 2


def class_b_dissipation(topology: str, v_supply: float, r_load: float,
                        v_negative: float | None = None) -> tuple[float, float]:
    """Worst-case output-stage dissipation of a class-B/AB stage: (package total, per output device).

    Each device of a push-pull pair on ±V_CC into R_L dissipates at most V_CC²/(π²·R_L), at an
    output amplitude of 2·V_CC/π (textbook class-B derivation, e.g. Sedra & Smith, from memory;
    Boylestad & Nashelsky Example 12.8). Single-ended on V_s: V_CC = V_s/2, total V_s²/(2π²·R_L).
    Bridge-tied load: two such stages in antiphase, each seeing R_L/2, total 2·V_s²/(π²·R_L),
    four times the single-ended figure.
    """
    if topology == "bridge":
        per_device = (v_supply / 2) ** 2 / (math.pi ** 2 * (r_load / 2))
        return 4 * per_device, per_device
    vp, vn = split_rails(topology, v_supply, v_negative)
    upper, lower = vp ** 2 / (math.pi ** 2 * r_load), vn ** 2 / (math.pi ** 2 * r_load)
    return upper + lower, max(upper, lower)


def class_b_full_output(topology: str, v_supply: float, r_load: float,
                        v_negative: float | None = None) -> dict[str, float]:
    """Ideal full (clipping-limited) sine output: peak load voltage, output power, supply
    current drawn from each rail, input power. A half-wave of peak I_p averages I_p/π; the
    bridge draws a full-wave, 2·I_p/π (Boylestad & Nashelsky §12: P_i = V_CC·(2/π)·I_p)."""
    if topology == "bridge":
        v_peak = abs(v_supply)
        i_peak = v_peak / r_load
        i_pos, i_neg = 2 * i_peak / math.pi, 0.0
        p_in = abs(v_supply) * i_pos
    else:
        vp, vn = split_rails(topology, v_supply, v_negative)
        v_peak = min(vp, vn)
        i_peak = v_peak / r_load
        i_half = i_peak / math.pi
        if topology == "split-supply":
            i_pos, i_neg = i_half, i_half
            p_in = (vp + vn) * i_half
        else:  # single-ended: only the upper device draws from the one supply
            i_pos, i_neg = i_half, 0.0
            p_in = abs(v_supply) * i_half
    p_out = v_peak ** 2 / (2 * r_load)
    return {"v_peak": v_peak, "i_peak": i_peak, "i_pos": i_pos, "i_neg": i_neg, "p_in": p_in, "p_out": p_out}
