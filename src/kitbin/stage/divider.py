"""Feedback divider: output voltage and its error from a reference and two resistors.

Vout = Vref·(1 + Rtop/Rbot) + I_FB·Rtop (REFERENCES section 7; the form of regulator
data sheets' "setting the output voltage" sections, seen). Worst-case corners and
the linear and RSS error estimates are standard worst-case circuit analysis
(common practice, no source).
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class DividerOutput:
    """Output voltage of a divider (V) and its relative errors (fractions).

    ``err_plus``/``err_minus`` are the worst-case corners against ``nominal``;
    ``linear`` is e + (1 − Vref/Vo)(t_top + t_bot); ``rss`` the root-sum-square
    (not a bound).
    """

    nominal: float
    v_max: float
    v_min: float
    err_plus: float
    err_minus: float
    linear: float
    rss: float


def divider_output(
    vref: float,
    rtop: float,
    rbot: float,
    tol_r: float = 0.0,
    tol_ref: float = 0.0,
    ifb: float = 0.0,
    tol_rbot: float | None = None,
) -> DividerOutput:
    """Output voltage of a feedback divider with worst-case corners.

    Parameters
    ----------
    vref
        Reference voltage (V).
    rtop, rbot
        Upper and lower resistor (Ω).
    tol_r
        Relative tolerance of the upper resistor (and of the lower one unless
        ``tol_rbot`` is given).
    tol_ref
        Relative tolerance of the reference.
    ifb
        Feedback-pin current out of the divider node (A).
    """
    t_top = tol_r
    t_bot = tol_r if tol_rbot is None else tol_rbot
    nominal = vref * (1 + rtop / rbot) + ifb * rtop
    v_max = vref * (1 + tol_ref) * (1 + rtop * (1 + t_top) / (rbot * (1 - t_bot))) + ifb * rtop * (
        1 + t_top
    )
    v_min = vref * (1 - tol_ref) * (1 + rtop * (1 - t_top) / (rbot * (1 + t_bot))) + ifb * rtop * (
        1 - t_top
    )
    s = 1 - vref / nominal
    linear = tol_ref + s * (t_top + t_bot)
    rss = math.sqrt(tol_ref**2 + s**2 * (t_top**2 + t_bot**2))
    return DividerOutput(
        nominal=nominal,
        v_max=v_max,
        v_min=v_min,
        err_plus=v_max / nominal - 1,
        err_minus=v_min / nominal - 1,
        linear=linear,
        rss=rss,
    )
