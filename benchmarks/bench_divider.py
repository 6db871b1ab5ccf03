"""Divider search speed: 1,000 distinct stocked values, legs of one or two resistors.

Target (issue): the best Rtop/Rbottom over single, series and parallel legs of
1,000 distinct stocked values in at most 0.5 s. Printed side by side: the same
search over single resistors only, and an itertools brute force over a subset it
can enumerate, to show the vectorised search agrees and how much faster it is.

    python benchmarks/bench_divider.py
"""

from __future__ import annotations

import itertools
import json
import math
import time

import numpy as np

TARGET_S = 0.5


def _stock(n: int, seed: int = 1):
    from kitbin.match.divider import StockResistor

    rng = np.random.default_rng(seed)
    values = np.unique(np.round(10 ** rng.uniform(1.0, 6.5, 3 * n), 1))
    values = rng.permutation(values)[:n]
    return [
        StockResistor(f"R-{i:04d}", float(v), float(v) * 0.99, float(v) * 1.01, available=5)
        for i, v in enumerate(values)
    ]


def _best_time(fn, repeat: int = 3) -> tuple[float, object]:
    best = math.inf
    out = None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t)
    return best, out


def _brute(stock, vref, target):
    best = math.inf
    vals = [s.value for s in stock]
    for rt, rb in itertools.product(vals, vals):
        if 1e3 <= rb <= 100e3:
            best = min(best, abs(vref * (1 + rt / rb) - target))
    return best


def run() -> dict:
    """Time the search; returns seconds, the target and ratios."""
    from kitbin.match.divider import best_divider

    stock = _stock(1000)
    all_legs = ("single", "series", "parallel")
    t_full, res = _best_time(lambda: best_divider(stock, 0.8, 3.3, ifb=50e-9, connections=all_legs))
    t_single, res1 = _best_time(lambda: best_divider(stock, 0.8, 3.3, ifb=0.0))
    small = stock[:300]
    t_brute, ref = _best_time(lambda: _brute(small, 0.8, 3.3), repeat=1)
    t_vec_small, got = _best_time(lambda: best_divider(small, 0.8, 3.3))
    return {
        "stocked_values": len(stock),
        "pairs_searched": res.searched,
        "series_parallel_s": round(t_full, 4),
        "single_only_s": round(t_single, 5),
        "target_s": TARGET_S,
        "within_target": t_full <= TARGET_S,
        "best_error_pct": res.error_pct,
        "single_error_pct": res1.error_pct,
        "brute_force_300_singles_s": round(t_brute, 4),
        "vectorised_300_singles_s": round(t_vec_small, 5),
        "speedup_vs_brute_force": round(t_brute / t_vec_small, 1),
        "agrees_with_brute_force": math.isclose(
            abs(got.vout - 3.3), ref, rel_tol=1e-9, abs_tol=1e-12
        ),
    }


if __name__ == "__main__":
    print(json.dumps(run(), indent=2))
