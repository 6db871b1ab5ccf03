"""Worst full-load currents for many candidate inductors at once.

:func:`kitbin.stage.demands.inductor_duty` gives, for one candidate (its own L and
DCR), the worst ripple, peak, RMS and average inductor current over the input range
and the Isat it therefore needs. It scans 65 input voltages with a scalar solver,
about 0.3 ms per candidate: fine for a few hundred bins, 8 s for 25,000. This module
computes the same numbers for arrays of candidates with numpy, by the same
equations (REFERENCES 1.1–1.3: CCM duty with drops from volt-second balance, the
exact quadratic in 1 − D for boost and inverting stages, DCM with drops at Ipk/2 by
fixed-point iteration). ``tests/unit/match/test_inductor_vec.py`` checks it against
``inductor_duty`` to 1e-9 on every topology, CCM and DCM.

Candidates with a measured L(i) curve still go through ``inductor_duty`` (its
saturation-aware stepping is per curve).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from kitbin.stage.demands import plan_current_limit
from kitbin.stage.operating import full_load_inputs
from kitbin.stage.spec import Spec
from kitbin.stage.thermal import ALPHA_CU_20


@dataclass(frozen=True)
class InductorArrays:
    """Worst full-load values per candidate (arrays of equal length).

    Currents A, inductance H; ``feasible`` is False where the output cannot be
    reached with that DCR (the scalar solver raises there); values are nan then.
    """

    ripple_pp: np.ndarray
    ripple_ratio: np.ndarray
    i_peak: np.ndarray
    vin_peak: np.ndarray
    i_rms: np.ndarray
    i_avg: np.ndarray
    dcm: np.ndarray
    isat_required: np.ndarray
    feasible: np.ndarray
    current_limit: float | None


def _ccm(spec: Spec, vin: float, io: float, dcr: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """CCM duty and average inductor current with drops (nan where unreachable)."""
    vo, vd, rsw, rr = spec.vout, spec.v_rect, spec.rsw, spec.r_rect_eff
    with np.errstate(invalid="ignore", divide="ignore"):
        if spec.topology == "buck":
            den = vin + vd - io * (rsw - rr)
            d = (vo + vd + io * (dcr + rr)) / den if den > 0 else np.full(dcr.shape, np.inf)
            il = np.full(dcr.shape, float(io))
        else:
            a = vo + vd + (vin if spec.topology == "invert" else 0.0)
            b = vin + io * (rsw - rr)
            c = io * (dcr + rsw)
            disc = b * b - 4 * a * c
            x = (b + np.sqrt(np.where(disc >= 0, disc, np.nan))) / (2 * a)
            if b <= 0:
                x = np.full(dcr.shape, np.nan)
            d = 1.0 - x
            il = io / x
    bad = ~((d >= 0) & (d < 1))
    d = np.where(bad, np.nan, d)
    il = np.where(bad, np.nan, il)
    return d, il


def _on_off(
    spec: Spec, vin: float, i_on: np.ndarray, i_off: np.ndarray, dcr: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    vo, vd = spec.vout, spec.v_rect
    v_on = vin - i_on * (spec.rsw + dcr)
    v_off = vo + vd + i_off * (dcr + spec.r_rect_eff)
    if spec.topology == "buck":
        v_on = v_on - vo
    elif spec.topology == "boost":
        v_off = v_off - vin
    return v_on, v_off


def _dcm(
    spec: Spec, vin: float, io: float, ind: np.ndarray, dcr: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """DCM duty, d2, peak and average current, drops at Ipk/2 (fixed point)."""
    ts = 1.0 / spec.fsw
    n = ind.size
    ipk = np.zeros(n)
    d = np.zeros(n)
    d2 = np.zeros(n)
    ok = np.ones(n, dtype=bool)
    active = np.ones(n, dtype=bool)
    if io <= 0:
        return d, d2, ipk, np.zeros(n)
    for _ in range(100):
        if not active.any():
            break
        idx = np.flatnonzero(active)
        v_on, v_off = _on_off(spec, vin, ipk[idx] / 2, ipk[idx] / 2, dcr[idx])
        bad = (v_on <= 0) | (v_off <= 0)
        ok[idx[bad]] = False
        with np.errstate(invalid="ignore", divide="ignore"):
            if spec.topology == "buck":
                dd = np.sqrt(2 * ind[idx] * io * spec.fsw / (v_on * (1 + v_on / v_off)))
            else:
                dd = np.sqrt(2 * ind[idx] * spec.fsw * io * v_off) / v_on
            new = v_on * dd * ts / ind[idx]
            d[idx] = dd
            d2[idx] = dd * v_on / v_off
        done = np.abs(new - ipk[idx]) <= 1e-14 * np.maximum(new, 1e-30)
        ipk[idx] = new
        active[idx[done | bad]] = False
    il = ipk * (d + d2) / 2
    nan = ~ok
    for arr in (d, d2, ipk, il):
        arr[nan] = np.nan
    return d, d2, ipk, il


def worst_full_load(spec: Spec, ind: np.ndarray, dcr: np.ndarray) -> InductorArrays:
    """Worst full-load ripple, peak, RMS, average current and the Isat needed.

    Parameters
    ----------
    spec
        The plan's specification.
    ind
        Candidate inductances, H (e.g. the low end of each evidence interval).
    dcr
        Their DC resistances, Ω (e.g. the high end; 0 where unknown).

    Returns
    -------
    InductorArrays
        Same definitions as :class:`kitbin.stage.demands.InductorOperating`.
    """
    ind = np.asarray(ind, dtype=float)
    dcr = np.asarray(dcr, dtype=float)
    n = ind.size
    ts = 1.0 / spec.fsw
    io = spec.iout_max
    best = {k: np.full(n, -np.inf) for k in ("ripple", "ratio", "peak", "rms", "avg")}
    vin_peak = np.full(n, np.nan)
    dcm_at_peak = np.zeros(n, dtype=bool)
    feasible = np.ones(n, dtype=bool)
    for vin in full_load_inputs(spec):
        d, il = _ccm(spec, vin, io, dcr)
        v_on, _ = _on_off(spec, vin, il, il, dcr)
        ripple = v_on * d * ts / ind
        peak = il + ripple / 2
        with np.errstate(invalid="ignore"):
            rms = np.sqrt(il**2 + ripple**2 / 12)
        unreachable = np.isnan(d)
        dcm = np.zeros(n, dtype=bool)
        if not spec.synchronous:
            dcm = ~unreachable & (il < ripple / 2)
            if dcm.any():
                k = np.flatnonzero(dcm)
                dd, d2, ipk, ila = _dcm(spec, vin, io, ind[k], dcr[k])
                ripple[k] = ipk
                peak[k] = ipk
                il[k] = ila
                with np.errstate(invalid="ignore"):
                    rms[k] = ipk * np.sqrt((dd + d2) / 3)
                unreachable[k] |= np.isnan(ipk)
        feasible &= ~unreachable
        with np.errstate(invalid="ignore", divide="ignore"):
            ratio = ripple / il
        for key, value in (
            ("ripple", ripple),
            ("ratio", ratio),
            ("rms", rms),
            ("avg", il),
        ):
            better = value > best[key]
            best[key] = np.where(better, value, best[key])
        better = peak > best["peak"]
        best["peak"] = np.where(better, peak, best["peak"])
        vin_peak = np.where(better, vin, vin_peak)
        dcm_at_peak = np.where(better, dcm, dcm_at_peak)
    for key in best:
        best[key] = np.where(feasible, best[key], np.nan)
    required = spec.isat_margin * best["peak"]
    limit = plan_current_limit(spec)
    if spec.survive_short and limit is not None:
        required = np.maximum(required, limit)
    return InductorArrays(
        ripple_pp=best["ripple"],
        ripple_ratio=best["ratio"],
        i_peak=best["peak"],
        vin_peak=vin_peak,
        i_rms=best["rms"],
        i_avg=best["avg"],
        dcm=dcm_at_peak,
        isat_required=required,
        feasible=feasible,
        current_limit=limit,
    )


def predicted_rise(
    i_rms: np.ndarray, dcr_20c: np.ndarray, r_th: np.ndarray, t_amb: float
) -> np.ndarray:
    """Steady copper-loss rise, K, for arrays (same formula as
    :func:`kitbin.stage.thermal.predicted_rise`; ``inf`` at thermal runaway)."""
    k = np.asarray(i_rms) ** 2 * np.asarray(dcr_20c) * np.asarray(r_th)
    with np.errstate(invalid="ignore", divide="ignore"):
        rise = k * (1 + ALPHA_CU_20 * (t_amb - 20.0)) / (1 - ALPHA_CU_20 * k)
    return np.where(ALPHA_CU_20 * k >= 1, np.inf, rise)
