"""Saturation-aware stepping of the inductor current through a measured L(i) curve.

With an incremental inductance L(i), V_L = dλ/dt where the flux linkage is
λ(i) = ∫₀ⁱ L(i') di'. Working in λ makes every on and off interval exact for a
constant inductor voltage: λ moves by V·t, and the current is read back from the
λ(i) table. L(i) is taken linear between the measured points, so λ(i) is
piecewise quadratic and is inverted exactly per segment; the curve is mirrored
for negative currents (a core saturates alike in both directions).

The inductor voltages on and off are those of the closed-form operating point
(:func:`kitbin.stage.operating.solve`: drops at the average current). Two uses:

* :func:`step_periods` with no target steps a fixed on/off pattern period after
  period (e.g. a volt-second imbalance) and flags runaway: the peak grows period
  after period, or leaves the measured range of the curve.
* With a target current it also plays the output loop: each period the current
  level (CCM) or the on-time (DCM) is corrected by a Newton step so the current
  delivered to the output matches the load — the regulated steady state, whose
  real peak and ripple are reported. With a constant L this reproduces the closed
  form (tested to 0.1 %).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from kitbin.errors import SpecError
from kitbin.stage.operating import solve
from kitbin.stage.spec import Spec


@dataclass(frozen=True, eq=False)
class LCurve:
    """A measured incremental-inductance curve.

    Parameters
    ----------
    current
        Bias currents (A), strictly increasing, zero or more.
    inductance
        Incremental inductance at each current (H), positive.
    """

    current: np.ndarray
    inductance: np.ndarray
    _i: np.ndarray = field(init=False, repr=False)
    _l: np.ndarray = field(init=False, repr=False)
    _lam: np.ndarray = field(init=False, repr=False)

    def __post_init__(self) -> None:
        i = np.asarray(self.current, dtype=float)
        lv = np.asarray(self.inductance, dtype=float)
        if i.ndim != 1 or i.shape != lv.shape or i.size < 2:
            raise SpecError("L(i) curve: expected two equal-length arrays of at least 2 points")
        if not (np.all(np.isfinite(i)) and np.all(np.isfinite(lv))):
            raise SpecError("L(i) curve: expected finite numbers")
        if i[0] < 0 or np.any(np.diff(i) <= 0):
            raise SpecError("L(i) curve: currents must start at 0 A or above and increase")
        if np.any(lv <= 0):
            raise SpecError("L(i) curve: inductances must be positive")
        if i[0] > 0:
            i = np.concatenate(([0.0], i))
            lv = np.concatenate(([lv[0]], lv))
        ii = np.concatenate((-i[:0:-1], i))
        ll = np.concatenate((lv[:0:-1], lv))
        lam = np.concatenate(([0.0], np.cumsum(np.diff(ii) * (ll[1:] + ll[:-1]) / 2)))
        lam -= np.interp(0.0, ii, lam)  # λ(0) = 0 (0 is a grid point: exact)
        object.__setattr__(self, "current", i)
        object.__setattr__(self, "inductance", lv)
        object.__setattr__(self, "_i", ii)
        object.__setattr__(self, "_l", ll)
        object.__setattr__(self, "_lam", lam)

    @property
    def i_max(self) -> float:
        """Highest measured current (A)."""
        return float(self._i[-1])

    @property
    def lam_max(self) -> float:
        """Flux linkage at the highest measured current (V·s)."""
        return float(self._lam[-1])

    def l_at(self, i: Any) -> Any:
        """Incremental inductance (H) at current(s) ``i`` (A), linear between points."""
        return np.interp(np.abs(i), self.current, self.inductance)

    def flux(self, i: Any) -> Any:
        """Flux linkage λ(i) (V·s), exact for L linear between points."""
        i = np.asarray(i, dtype=float)
        k = np.clip(np.searchsorted(self._i, i, side="right") - 1, 0, self._i.size - 2)
        i0, l0 = self._i[k], self._l[k]
        m = (self._l[k + 1] - l0) / (self._i[k + 1] - i0)
        u = i - i0
        return self._lam[k] + l0 * u + m * u * u / 2

    def current_at(self, lam: Any) -> Any:
        """Current (A) at flux linkage(s) ``lam`` (V·s): the exact inverse of :meth:`flux`.

        Beyond the curve the end inductance is held.
        """
        lam = np.asarray(lam, dtype=float)
        k = np.clip(np.searchsorted(self._lam, lam, side="right") - 1, 0, self._lam.size - 2)
        i0, l0 = self._i[k], self._l[k]
        m = (self._l[k + 1] - l0) / (self._i[k + 1] - i0)
        dl = lam - self._lam[k]
        below = lam < self._lam[0]
        above = lam > self._lam[-1]
        m = np.where(below | above, 0.0, m)
        l_base = np.where(above, self._l[-1], np.where(below, self._l[0], l0))
        base_i = np.where(above, self._i[-1], np.where(below, self._i[0], i0))
        dl = np.where(above, lam - self._lam[-1], np.where(below, lam - self._lam[0], dl))
        disc = np.maximum(l_base * l_base + 2 * m * dl, 0.0)
        return base_i + 2 * dl / (l_base + np.sqrt(disc))


def as_curve(obj: object) -> LCurve:
    """An :class:`LCurve` from itself or from a pair ``(currents_A, inductances_H)``."""
    if isinstance(obj, LCurve):
        return obj
    try:
        current, inductance = obj  # type: ignore[misc]
    except (TypeError, ValueError):
        raise SpecError("L(i) curve: expected (currents, inductances)") from None
    return LCurve(np.asarray(current, dtype=float), np.asarray(inductance, dtype=float))


@dataclass(frozen=True)
class StepResult:
    """Outcome of stepping: the last period's waveform and the per-period peaks (A, s)."""

    i_peak: float
    i_valley: float
    ripple_pp: float
    i_avg: float
    i_rms: float
    delivered: float
    on_time: float
    mode: str
    periods: int
    converged: bool
    runaway: bool
    note: str
    peaks: np.ndarray
    times: np.ndarray
    currents: np.ndarray


def _simpson(y: np.ndarray, h: float) -> float:
    """Simpson integral of an odd number of equally spaced samples."""
    return float(h / 3 * (y[0] + y[-1] + 4 * y[1:-1:2].sum() + 2 * y[2:-1:2].sum()))


def step_periods(
    curve: LCurve,
    v_on: float,
    v_off: float,
    t_on: float,
    period: float,
    i_start: float = 0.0,
    *,
    diode: bool = True,
    target: float | None = None,
    deliver: str = "all",
    max_periods: int = 2000,
    tol: float = 1e-10,
    samples: int = 129,
) -> StepResult:
    """Step the inductor current through on- and off-intervals, period after period.

    Parameters
    ----------
    curve
        The L(i) curve.
    v_on, v_off
        Magnitudes of the inductor voltage while on and while off (V).
    t_on, period
        On-time and switching period (s).
    i_start
        Current at the start of the first period (A).
    diode
        True: the current cannot go below zero (diode rectifier, DCM possible).
    target
        Current to deliver (A): the mean inductor current (``deliver="all"``, buck)
        or the mean rectifier current (``deliver="off"``, boost and inverting). None
        steps the fixed pattern without correction.
    max_periods
        Periods to step at most.
    tol
        Relative change of peak (and delivery error) that counts as steady.
    samples
        Samples per interval (odd) for the mean and RMS (Simpson).

    Returns
    -------
    StepResult
    """
    if samples % 2 == 0:
        samples += 1
    lam0 = float(curve.flux(i_start))
    peaks: list[float] = []
    converged = runaway = False
    note = ""
    t_off = period - t_on
    dcm = diode and i_start <= 0
    grow = 0
    res: tuple[Any, ...] = ()
    for n in range(max_periods):
        lam1 = lam0 + v_on * t_on
        if lam1 > curve.lam_max:
            runaway = True
            note = (
                f"peak current leaves the measured curve (above {curve.i_max:.4g} A) in "
                f"period {n + 1}"
            )
            peaks.append(float(curve.current_at(lam1)))
            break
        lam_end = lam1 - v_off * t_off
        t_z = t_off
        if diode and lam_end < 0:
            t_z = lam1 / v_off if v_off > 0 else t_off
            lam_end = 0.0
        tau_on = np.linspace(0.0, t_on, samples)
        tau_off = np.linspace(0.0, t_z, samples)
        i_on = curve.current_at(lam0 + v_on * tau_on)
        i_off = curve.current_at(lam1 - v_off * tau_off)
        q_on = _simpson(i_on, t_on / (samples - 1)) if t_on > 0 else 0.0
        q_off = _simpson(i_off, t_z / (samples - 1)) if t_z > 0 else 0.0
        s_on = _simpson(i_on**2, t_on / (samples - 1)) if t_on > 0 else 0.0
        s_off = _simpson(i_off**2, t_z / (samples - 1)) if t_z > 0 else 0.0
        delivered = (q_on + q_off) / period if deliver == "all" else q_off / period
        peak = float(i_on[-1])
        peaks.append(peak)
        res = (i_on, i_off, tau_on, tau_off, q_on + q_off, s_on + s_off, delivered, lam_end)
        if target is None:
            if n > 0 and abs(peak - peaks[-2]) <= tol * max(abs(peak), 1e-30):
                converged = True
                break
            grow = grow + 1 if n > 0 and peak > peaks[-2] else 0
            lam0 = lam_end
            continue
        err = delivered - target
        if abs(err) <= tol * max(target, 1e-30) and (
            n > 0 and abs(peak - peaks[-2]) <= 1e3 * tol * max(abs(peak), 1e-30)
        ):
            converged = True
            break
        dcm = diode and lam_end <= 0 and t_z < t_off
        if dcm:
            # DCM: the loop trims the on-time; delivery ∝ t_on² for a constant L
            t_on = t_on * math.sqrt(target / delivered) if delivered > 0 else t_on * 2
            t_on = min(t_on, period * (1 - 1e-9))
            t_off = period - t_on
            lam0 = 0.0
        else:
            w_on = 1.0 if deliver == "all" else 0.0
            sens = (
                w_on * _simpson(1 / curve.l_at(i_on), t_on / (samples - 1))
                + _simpson(1 / curve.l_at(i_off), t_z / (samples - 1))
            ) / period
            lam0 = lam_end - err / sens
            if diode and lam0 < 0:
                lam0 = 0.0
    else:
        if target is None and grow >= 10:
            runaway = True
            note = "peak current keeps growing period after period"
    peaks_arr = np.asarray(peaks)
    if not res:
        return StepResult(
            peaks_arr[-1], 0.0, peaks_arr[-1], math.nan, math.nan, math.nan, t_on, "CCM",
            len(peaks), False, True, note, peaks_arr, np.empty(0), np.empty(0),
        )  # fmt: skip
    i_on, i_off, tau_on, tau_off, q, s2, delivered, _ = res
    times = np.concatenate((tau_on, t_on + tau_off))
    currents = np.concatenate((i_on, i_off))
    mode = "DCM" if (diode and tau_off[-1] < t_off * (1 - 1e-12)) else "CCM"
    if mode == "DCM":
        times = np.append(times, period)
        currents = np.append(currents, 0.0)
    valley = float(min(i_on[0], i_off.min())) if mode == "CCM" else 0.0
    peak = float(i_on[-1])
    return StepResult(
        i_peak=peak,
        i_valley=valley,
        ripple_pp=peak - valley,
        i_avg=q / period,
        i_rms=math.sqrt(max(s2 / period, 0.0)),
        delivered=delivered,
        on_time=t_on,
        mode=mode,
        periods=len(peaks),
        converged=converged,
        runaway=runaway,
        note=note,
        peaks=peaks_arr,
        times=times,
        currents=currents,
    )


def step_corner(
    spec: Spec,
    vin: float,
    iout: float,
    curve: LCurve | Sequence[Any],
    dcr: float = 0.0,
    max_periods: int = 400,
) -> StepResult:
    """Regulated steady state of one corner with a measured L(i) curve.

    The inductor voltages and the starting point come from the closed form at the
    curve's inductance at the average current; the stepping then finds the level
    (CCM) or on-time (DCM) that delivers the load current through the real curve.

    Parameters
    ----------
    spec
        The specification.
    vin, iout
        Input voltage (V) and load (A).
    curve
        An :class:`LCurve` or ``(currents_A, inductances_H)``.
    dcr
        Inductor DC resistance (Ω).
    """
    curve = as_curve(curve)
    first = solve(spec, vin, iout, float(curve.l_at(0.0)), dcr)
    l_avg = float(curve.l_at(first.il_avg))
    s = solve(spec, vin, iout, l_avg, dcr)
    start = s.i_valley if s.mode == "CCM" else 0.0
    return step_periods(
        curve,
        s.v_on,
        s.v_off,
        s.duty / spec.fsw,
        1.0 / spec.fsw,
        start,
        diode=not spec.synchronous,
        target=iout,
        deliver="all" if spec.topology == "buck" else "off",
        max_periods=max_periods,
    )
