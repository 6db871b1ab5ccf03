"""Physical models that synthesise bench captures: saturating inductors, heating parts.

Used to generate the demo workshop's captures and the test captures with known
answers. The inductor is an incremental inductance L(i) driven by
``V_L = V − i·R_loop``; the current follows from integrating
``dt = L(i)/V_L(i)·di`` (exact for any L(i), no time-stepping error). The
scope is modelled by white noise and an n-bit quantiser over a full-scale range.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class InductorModel:
    """An incremental inductance curve L(i).

    Attributes
    ----------
    l0_H
        Inductance at zero bias (H).
    knee_A
        Current scale of saturation (A).
    shape
        ``"smooth"``: L = L0/(1 + (i/knee)^p), a gradual fall (powder-like core);
        ``"hard"``: a logistic step from L0 to ``l_sat_frac·L0`` of width
        ``width_frac·knee`` (ferrite-like sharp knee).
    p
        Exponent of the smooth shape.
    l_sat_frac, width_frac
        Saturated fraction and knee width of the hard shape.
    """

    l0_H: float
    knee_A: float
    shape: str = "smooth"
    p: float = 4.0
    l_sat_frac: float = 0.15
    width_frac: float = 0.03

    def inductance(self, i: np.ndarray | float) -> np.ndarray:
        """L(i) in H for currents in A."""
        x = np.abs(np.asarray(i, dtype=float))
        if self.shape == "smooth":
            return self.l0_H / (1.0 + (x / self.knee_A) ** self.p)
        w = self.width_frac * self.knee_A
        l_sat = self.l_sat_frac * self.l0_H
        u = np.clip((x - self.knee_A) / w, -700, 700)
        return l_sat + (self.l0_H - l_sat) / (1.0 + np.exp(u))

    def isat(self, drop: float) -> float:
        """Current (A) where L(i) = (1 − drop)·L(0), in closed form."""
        if self.shape == "smooth":
            return self.knee_A * (drop / (1.0 - drop)) ** (1.0 / self.p)
        l0 = float(self.inductance(0.0))
        l_sat = self.l_sat_frac * self.l0_H
        target = (1.0 - drop) * l0
        ratio = (self.l0_H - l_sat) / (target - l_sat) - 1.0
        return self.knee_A + self.width_frac * self.knee_A * math.log(ratio)


def ramp_table(
    model: InductorModel,
    v: float,
    r_loop: float,
    i_end: float,
    i_start: float = 0.0,
    n: int = 20001,
) -> tuple[np.ndarray, np.ndarray]:
    """Time (s, from the start of the ramp) at which the current reaches each of a grid of currents.

    ``t(i) = ∫ L(j) / (v − j·r_loop) dj`` by the trapezoid rule on a fine grid.
    """
    grid = np.linspace(i_start, i_end, n)
    vl = v - grid * r_loop
    if np.any(vl <= 0):
        raise ValueError("the supply cannot drive that current through r_loop")
    rate = model.inductance(grid) / vl
    t = np.concatenate(([0.0], np.cumsum(0.5 * (rate[1:] + rate[:-1]) * np.diff(grid))))
    return t, grid


def scope(
    signal: np.ndarray,
    rng: np.random.Generator,
    *,
    noise: float,
    bits: int | None,
    full_scale: tuple[float, float],
) -> np.ndarray:
    """Add white noise (rms ``noise``) and quantise to ``bits`` over ``full_scale``."""
    out = signal + rng.normal(0.0, noise, signal.shape) if noise > 0 else signal.copy()
    if bits:
        lo, hi = full_scale
        lsb = (hi - lo) / (2**bits - 1)
        out = lo + np.clip(np.round((out - lo) / lsb), 0, 2**bits - 1) * lsb
    return out


def switching_current(
    model: InductorModel,
    *,
    v: float,
    r_loop: float,
    t_on: float,
    period: float,
    periods: int,
    dt: float,
    v_off: float,
    t_lead: float = 0.0,
) -> tuple[np.ndarray, np.ndarray]:
    """Current through a low-side-switched inductor driven on for ``t_on`` every ``period``.

    Each on-time ramps from zero (the part is given time to reset, as in a
    low-duty pulse tester); at turn-off the current falls through the freewheel
    path at ``v_off`` (V) until it is zero. Returns (time s, current A).
    """
    n = round((t_lead + periods * period) / dt)
    t = np.arange(n) * dt
    i = np.zeros(n)
    t_tab, i_tab = _table_to_time(model, v, r_loop, t_on)
    i_peak = float(np.interp(t_on, t_tab, i_tab))
    fall_t, fall_i = ramp_table(model, v_off, 0.0, i_peak)  # time to lose each amp
    t_fall_total = float(fall_t[-1])
    for k in range(periods):
        t0 = t_lead + k * period
        local = t - t0
        on = (local >= 0) & (local < t_on)
        i[on] = np.interp(local[on], t_tab, i_tab)
        off = (local >= t_on) & (local < t_on + t_fall_total)
        # falling: time since turn-off maps to current lost
        lost = np.interp(local[off] - t_on, fall_t, fall_i)
        i[off] = np.maximum(i_peak - lost, 0.0)
    return t, i


def pulse_current(
    model: InductorModel,
    *,
    v: float,
    r_loop: float,
    t_on: float,
    dt: float,
    t_lead: float,
    t_tail: float,
    v_off: float,
) -> tuple[np.ndarray, np.ndarray]:
    """One long pulse: lead-in at zero, ramp for ``t_on``, freewheel fall, tail."""
    period = t_on + t_tail
    return switching_current(
        model,
        v=v,
        r_loop=r_loop,
        t_on=t_on,
        period=period,
        periods=1,
        dt=dt,
        v_off=v_off,
        t_lead=t_lead,
    )


def _table_to_time(
    model: InductorModel, v: float, r_loop: float, t_on: float
) -> tuple[np.ndarray, np.ndarray]:
    """A t(i) table covering at least ``t_on``; grows the current range until it does."""
    i_end = v / max(r_loop, 1e-9) * 0.999 if r_loop > 0 else 10.0 * model.knee_A
    guess = min(i_end, 2.0 * model.knee_A)
    while True:
        t_tab, i_tab = ramp_table(model, v, r_loop, guess)
        if t_tab[-1] >= t_on or guess >= i_end:
            return t_tab, i_tab
        guess = min(i_end, guess * 1.5)


def heating_curve(
    t: np.ndarray, *, t_amb: float, rise_ss: float, tau: float, t0: float = 0.0
) -> np.ndarray:
    """First-order heating from ambient: T = T_amb + ΔT_ss·(1 − e^(−(t−t0)/τ)), T_amb before t0."""
    x = np.clip((t - t0) / tau, 0.0, None)
    return t_amb + rise_ss * (1.0 - np.exp(-x))


def on_time_for(model: InductorModel, v: float, r_loop: float, i_peak: float) -> float:
    """On-time (s) that ramps the current from zero to ``i_peak`` (A)."""
    t_tab, _ = ramp_table(model, v, r_loop, i_peak)
    return float(t_tab[-1])
