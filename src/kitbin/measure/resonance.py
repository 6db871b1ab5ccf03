"""Inductance and capacitance by LC resonance, and the inductor's stray capacitance.

REFERENCES §4 (circuit theory, e.g. Horowitz & Hill, *The Art of Electronics*,
3rd ed., ch. 1, from memory): ``f0 = 1/(2π√(L·C))``. The inductor's own
capacitance Cp and the fixture's capacitance add to the test capacitor:
``1/f0² = 4π²·L·(C + Cp)``. With two or more test capacitors, a straight line of
1/f² against C gives slope 4π²L and intercept/slope = Cp (the two-capacitor
correction is common practice, no source).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from kitbin.errors import CaptureError

_TWO_PI_SQ = (2.0 * math.pi) ** 2


@dataclass(frozen=True)
class StrayFit:
    """The line 1/f² = 4π²L·(C + Cp) through several resonance points.

    Attributes
    ----------
    l_H
        Inductance (H), from the slope.
    cp_F
        Capacitance in parallel with the test capacitor (F): the inductor's
        self-capacitance plus the fixture's, from intercept/slope.
    points
        Resonance points used.
    max_residual
        Largest relative misfit of 1/f² (0 with two points).
    """

    l_H: float
    cp_F: float
    points: int
    max_residual: float


def _positive(value: float, what: str) -> float:
    if not (value > 0 and math.isfinite(value)):
        raise CaptureError(f"{what} must be a positive number, got {value!r}")
    return float(value)


def inductance_from_resonance(f0: float, c: float, c_stray: float = 0.0) -> float:
    """L (H) = 1/((2π·f0)²·(C + C_stray)) for f0 in Hz and capacitances in F."""
    f0 = _positive(f0, "resonance frequency")
    total = _positive(c + c_stray, "total capacitance")
    return 1.0 / (_TWO_PI_SQ * f0**2 * total)


def capacitance_from_resonance(f0: float, l: float, c_stray: float = 0.0) -> float:  # noqa: E741
    """C (F) = 1/((2π·f0)²·L) − C_stray, for f0 in Hz and L in H."""
    f0 = _positive(f0, "resonance frequency")
    l = _positive(l, "inductance")  # noqa: E741
    return 1.0 / (_TWO_PI_SQ * f0**2 * l) - c_stray


def undamped_frequency(f_ring: float, q: float) -> float:
    """f0 (Hz) from a damped ring frequency: f_d = f0·√(1 − 1/(4Q²))."""
    f_ring = _positive(f_ring, "ring frequency")
    q = _positive(q, "Q")
    if q <= 0.5:
        raise CaptureError(f"a circuit with Q = {q:g} does not ring (needs Q > 0.5)")
    return f_ring / math.sqrt(1.0 - 1.0 / (4.0 * q * q))


def inductance_from_time_constant(tau: float, r_total: float) -> float:
    """L (H) = τ·R_total, R_total including generator, sense and DCR (REFERENCES §4, M3)."""
    return _positive(tau, "time constant") * _positive(r_total, "total resistance")


def fit_stray(capacitances: Sequence[float], frequencies: Sequence[float]) -> StrayFit:
    """Inductance and parallel capacitance from two or more (C, f0) points.

    Parameters
    ----------
    capacitances
        Test capacitors (F).
    frequencies
        Resonance frequency with each (Hz).

    Raises
    ------
    CaptureError
        With fewer than two distinct capacitors, or a line that gives L ≤ 0.
    """
    c = np.asarray(capacitances, dtype=float)
    f = np.asarray(frequencies, dtype=float)
    if c.shape != f.shape or c.size < 2 or np.unique(c).size < 2:
        raise CaptureError("the stray-capacitance fit needs two or more different capacitors")
    if np.any(~(c > 0)) or np.any(~(f > 0)):
        raise CaptureError("capacitances and frequencies must be positive")
    y = 1.0 / f**2
    slope, intercept = np.polyfit(c, y, 1)
    if not slope > 0:
        raise CaptureError("1/f² does not grow with C: check the capacitor values and frequencies")
    fitted = slope * c + intercept
    return StrayFit(
        l_H=float(slope / _TWO_PI_SQ),
        cp_F=float(intercept / slope),
        points=int(c.size),
        max_residual=float(np.max(np.abs(fitted - y) / y)),
    )
