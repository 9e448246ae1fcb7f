"""Heat: junction temperature, the heat sink a part needs, a linear regulator's dissipation.

The series thermal-resistance model T_j = T_a + P (theta_JC + theta_CS + theta_SA) of every
heat-sink selection guide (e.g. the thermal chapter of the ARRL Handbook). SI: W, degC, degC/W.
"""

from __future__ import annotations


def junction_temperature(t_ambient: float, power: float, theta: float) -> float:
    """T_j = T_a + P·θ (series thermal-resistance model)."""
    return t_ambient + power * theta


def heat_sink_needed(
    power: float, tj_max: float, t_ambient: float, theta_jc: float, theta_cs: float
) -> float:
    """Largest sink-to-ambient resistance that holds T_j at tj_max:
    θ_SA = (T_j,max − T_a)/P − θ_JC − θ_CS (handbook heat-sink selection)."""
    return (tj_max - t_ambient) / power - theta_jc - theta_cs


def regulator_dissipation(v_in: float, v_out: float, i_out: float, i_q: float = 0.0) -> float:
    """Linear regulator: (V_in − V_out)·I_out plus V_in·I_q for its own ground current."""
    return (v_in - v_out) * i_out + v_in * i_q
