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
                        v_negative: float | None = None, saturation: float = 0.0,
                        rated_output: float | None = None) -> dict[str, float]:
    """Full (clipping-limited) sine output: peak load voltage, output power, supply current
    drawn from each rail (average and RMS), input power.

    The output cannot swing rail to rail: its devices keep `saturation` volts in all (high
    side plus low side) at clipping, so a single-ended stage on V_s reaches a peak of
    (V_s − V_sat)/2 and P = (V_s − V_sat)²/(8·R_L) (the textbook clipping limit with the
    saturation voltage, Boylestad & Nashelsky §12); a bridge, whose two outputs each lose
    V_sat, puts V_s − V_sat across the load. A stated rated output (the datasheet's power at
    this supply and load) caps it. A half-wave of peak I_p averages I_p/π and has an RMS of
    I_p/2; the bridge draws a full-wave, 2·I_p/π average and I_p/√2 RMS (Boylestad &
    Nashelsky §12: P_i = V_CC·(2/π)·I_p; RMS of rectified sines: circuit theory)."""
    sat = max(0.0, saturation)
    if topology == "bridge":
        v_peak = max(0.0, abs(v_supply) - sat)
    else:
        vp, vn = split_rails(topology, v_supply, v_negative)
        v_peak = max(0.0, min(vp, vn) - sat / 2)
    if rated_output is not None and rated_output > 0:
        v_peak = min(v_peak, math.sqrt(2 * r_load * rated_output))
    i_peak = v_peak / r_load
    if topology == "bridge":
        i_pos, i_neg = 2 * i_peak / math.pi, 0.0
        rms_pos, rms_neg = i_peak / math.sqrt(2), 0.0
        p_in = abs(v_supply) * i_pos
    else:
        i_half = i_peak / math.pi
        if topology == "split-supply":
            i_pos, i_neg = i_half, i_half
            rms_pos, rms_neg = i_peak / 2, i_peak / 2
            p_in = (vp + vn) * i_half
        else:  # single-ended: only the upper device draws from the one supply
            i_pos, i_neg = i_half, 0.0
            rms_pos, rms_neg = i_peak / 2, 0.0
            p_in = abs(v_supply) * i_half
    p_out = v_peak ** 2 / (2 * r_load)
    return {"v_peak": v_peak, "i_peak": i_peak, "i_pos": i_pos, "i_neg": i_neg, "rms_pos": rms_pos,
            "rms_neg": rms_neg, "p_in": p_in, "p_out": p_out}


def rms_with_dc(dc: float, average: float, rms: float) -> float:
    """RMS of a steady current `dc` plus a periodic one of this average and RMS:
    √(dc² + 2·dc·average + rms²) (the mean of (dc + i)², expanded)."""
    return math.sqrt(max(0.0, dc * dc + 2 * dc * average + rms * rms))
