"""Winding temperature rise with the copper temperature coefficient.

Sources: lumped-capacitance energy balance (Incropera et al., *Fundamentals of Heat
and Mass Transfer*, 7th ed., ch. 5, §5.1–5.3, section numbers from memory); copper
α20 = 0.00393 /K from IEC 60028:1925 *International standard of resistance for
copper* (REFERENCES section 5). The self-consistent rise with
P = I²·R20·(1 + α(T − 20)) is derived in REFERENCES section 5:
k = I²·R20·R_th, ΔT = k(1 + α(Tamb − 20)) / (1 − α·k), τ_eff = τ/(1 − α·k), and
thermal runaway (no steady state) when α·k ≥ 1.
"""

from __future__ import annotations

import math

#: Temperature coefficient of annealed copper at 20 °C (1/K), IEC 60028.
ALPHA_CU_20 = 0.00393


def r_at(r_ref: float, t_ref: float, t: float, alpha20: float = ALPHA_CU_20) -> float:
    """Copper resistance at temperature ``t`` (°C) from ``r_ref`` (Ω) at ``t_ref`` (°C).

    R(T) = R20·(1 + α20(T − 20)) (IEC 60028).
    """
    r20 = r_ref / (1 + alpha20 * (t_ref - 20.0))
    return r20 * (1 + alpha20 * (t - 20.0))


def winding_temperature(r_cold: float, t_cold: float, r_hot: float, k: float = 234.5) -> float:
    """Winding temperature (°C) from its resistance rise: T2 = (R2/R1)(k + T1) − k.

    k = 234.5 °C, the inferred zero-resistance temperature of annealed copper
    (REFERENCES section 5; 1/α20 − 20 = 234.45 with IEC 60028's α20).
    """
    return r_hot / r_cold * (k + t_cold) - k


def predicted_rise(
    i_rms: float, dcr_20C: float, r_th: float, t_amb: float, alpha20: float = ALPHA_CU_20
) -> float:
    """Steady copper-loss temperature rise (K), self-consistent with the tempco.

    Parameters
    ----------
    i_rms
        RMS winding current (A).
    dcr_20C
        DC resistance at 20 °C (Ω); convert with :func:`r_at` first if measured warm.
    r_th
        Thermal resistance to ambient (K/W).
    t_amb
        Ambient temperature (°C).

    Returns
    -------
    float
        ΔT_ss = k(1 + α(Tamb − 20))/(1 − α·k), k = I²·R20·R_th; ``math.inf`` when
        α·k ≥ 1 (thermal runaway: no steady state).
    """
    k = i_rms**2 * dcr_20C * r_th
    if alpha20 * k >= 1:
        return math.inf
    return k * (1 + alpha20 * (t_amb - 20.0)) / (1 - alpha20 * k)


def r_th_from_rise(
    rise: float, i_test: float, dcr_20C: float, t_amb: float, alpha20: float = ALPHA_CU_20
) -> float:
    """Thermal resistance (K/W) that gives a measured steady ``rise`` (K) at ``i_test`` (A).

    The inverse of :func:`predicted_rise`: k = ΔT/(1 + α(Tamb − 20) + α·ΔT),
    R_th = k/(I²·R20); equal to ΔT/P with P at the hot resistance.
    """
    k = rise / (1 + alpha20 * (t_amb - 20.0) + alpha20 * rise)
    return k / (i_test**2 * dcr_20C)


def runaway_current(dcr_20C: float, r_th: float, alpha20: float = ALPHA_CU_20) -> float:
    """Current (A) at which α·I²·R20·R_th = 1: no steady temperature above it."""
    return 1 / math.sqrt(alpha20 * dcr_20C * r_th)


def tau_effective(
    tau: float, i_rms: float, dcr_20C: float, r_th: float, alpha20: float = ALPHA_CU_20
) -> float:
    """Thermal time constant with the tempco (s): τ/(1 − α·k); ``inf`` at runaway."""
    k = i_rms**2 * dcr_20C * r_th
    return math.inf if alpha20 * k >= 1 else tau / (1 - alpha20 * k)


def time_to_limit(tau: float, t_start: float, t_steady: float, t_limit: float) -> float:
    """Time (s) for a first-order heating from ``t_start`` towards ``t_steady`` to reach
    ``t_limit`` (all °C): τ·ln((T_ss − T0)/(T_ss − T_lim)); ``inf`` when never reached.
    """
    if t_limit <= t_start:
        return 0.0
    if t_steady <= t_limit:
        return math.inf
    return tau * math.log((t_steady - t_start) / (t_steady - t_limit))
