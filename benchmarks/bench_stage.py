"""Saturation-aware stepping: exact flux-linkage intervals against plain time stepping.

Side by side in one run, on the same soft-saturating L(i) curve and the same corner
(buck 12 V -> 5 V, 2 A, 500 kHz): ``kitbin.stage.stepping.step_corner`` (each on/off
interval exact in λ, numpy per interval) and a forward-Euler integration of
di/dt = V/L(i) with 2,000 steps per period started from the same point and run for
the same number of periods. Printed: both wall times, their ratio, and the
difference of the peak current (the Euler peak error shrinks with the step).
Also the per-candidate cost of ``inductor_duty`` (closed form) that the matcher pays.

    python benchmarks/bench_stage.py
"""

from __future__ import annotations

import json
import time

import numpy as np


def _euler(curve_i, curve_l, v_on, v_off, t_on, period, i0, periods, steps):
    """Forward Euler of di/dt = V/L(i) (no output loop: the fixed pattern only)."""
    i = i0
    dt = period / steps
    peak = i0
    for _ in range(periods):
        t = 0.0
        for _ in range(steps):
            v = v_on if t < t_on else -v_off
            i += v / np.interp(abs(i), curve_i, curve_l) * dt
            t += dt
            peak = max(peak, i)
    return peak


def run() -> dict:
    from kitbin.stage import Spec, inductor_duty, solve
    from kitbin.stage.stepping import LCurve, step_corner

    spec = Spec("buck", 12, 12, 5, 2, 500e3, vf=0.0)
    cur = np.linspace(0, 8, 81)
    ind = 10e-6 / (1 + (cur / 2.6) ** 6)
    curve = LCurve(cur, ind)

    start = time.perf_counter()
    for _ in range(20):
        res = step_corner(spec, 12, 2, curve)
    t_lambda = (time.perf_counter() - start) / 20

    s = solve(spec, 12, 2, float(curve.l_at(2.0)))
    start = time.perf_counter()
    peak_euler = _euler(
        cur, ind, s.v_on, s.v_off, s.duty * 2e-6, 2e-6, res.i_valley, res.periods, 2000
    )
    t_euler = time.perf_counter() - start

    ranged = Spec("buck", 11, 15, 5.1, 2.4, 500e3)
    start = time.perf_counter()
    for _ in range(200):
        inductor_duty(ranged, 10e-6, 0.03)
    t_duty = (time.perf_counter() - start) / 200
    return {
        "stepping_lambda_s": round(t_lambda, 6),
        "stepping_lambda_periods": int(res.periods),
        "euler_same_periods_2000_steps_s": round(t_euler, 6),
        "euler_over_lambda": round(t_euler / t_lambda, 1),
        "peak_lambda_A": round(res.i_peak, 6),
        "peak_euler_A": round(float(peak_euler), 6),
        "inductor_duty_per_candidate_s": round(t_duty, 6),
    }


if __name__ == "__main__":
    print(json.dumps(run(), indent=2))
