"""Capture analysis speed: a 2,000,000-sample two-column ramp capture.

Target (issue): reading and analysing the capture (``read_capture`` +
``analyse_ramp``, from the file's path to Isat) takes at most 1.5 times what
pandas alone takes to read the same file with ``pandas.read_csv``. Both are
measured side by side in this run, interleaved, after a warm-up, so the imports
of pandas and numpy are not counted on either side. ``ratio_to_pandas`` is the
best kitbin time over the best pandas time; ``median_paired_ratio`` the median of
the ratios of each interleaved pair (a check on a loaded machine).

The capture is invented: 500 periods of low-duty switching of a hard-knee
10 µH model (synthetic.py) with noise and 8-bit quantisation, 5 ns sampling.

    python benchmarks/bench_capture.py
"""

from __future__ import annotations

import json
import math
import tempfile
import time
from pathlib import Path

import numpy as np

SAMPLES = 2_000_000
TARGET_RATIO = 1.5


def make_capture(path: Path, samples: int = SAMPLES, seed: int = 1) -> dict:
    """Write the benchmark capture (time, sense voltage) as CSV; returns its model."""
    import pandas as pd

    from kitbin.measure.synthetic import InductorModel, on_time_for, scope, switching_current

    model = InductorModel(10e-6, 3.0, shape="hard", l_sat_frac=0.2, width_frac=0.05)
    dt, period = 5e-9, 20e-6
    t_on = on_time_for(model, 12.0, 0.15, 4.0)
    _, one = switching_current(
        model, v=12.0, r_loop=0.15, t_on=t_on, period=period, periods=1, dt=dt, v_off=12.0
    )
    reps = math.ceil(samples / one.size)
    current = np.tile(one, reps)[:samples]
    rng = np.random.default_rng(seed)
    sense = scope(current * 0.1, rng, noise=0.0015, bits=8, full_scale=(-0.02, 0.45))
    frame = pd.DataFrame({"Time (s)": np.arange(samples) * dt, "CH1 (V)": sense})
    frame.to_csv(path, index=False, float_format="%.7g")
    return {"l0_H": model.l0_H, "isat_A": {p: model.isat(p / 100) for p in (10, 20, 30)}}


def _best(fn, repeat: int) -> tuple[float, object]:
    best, out = math.inf, None
    for _ in range(repeat):
        start = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - start)
    return best, out


def run(repeat: int = 9) -> dict:
    """Time pandas alone against kitbin's read + analysis; returns seconds and the ratio."""
    import pandas as pd

    from kitbin.measure.ramp import analyse_ramp
    from kitbin.measure.reader import read_capture

    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "capture.csv"
        model = make_capture(path)
        size_mb = path.stat().st_size / 1e6

        def pandas_only():
            return pd.read_csv(path)

        def kitbin_read():
            return read_capture(path)

        def kitbin_full():
            cap = read_capture(path)
            _, sense = cap.channel()
            return analyse_ramp(cap.time, sense, r_sense=0.1, v_l=12.0, r_loop=0.15)

        pandas_only()  # warm the page cache and the parser
        kitbin_full()
        # interleave the two sides so load changes hit both alike
        pandas_times, full_times, read_times, paired = [], [], [], []
        result = None
        for _ in range(repeat):
            tp = _best(pandas_only, 1)[0]
            tf, result = _best(kitbin_full, 1)
            pandas_times.append(tp)
            full_times.append(tf)
            paired.append(tf / tp)
            read_times.append(_best(kitbin_read, 1)[0])
        t_pandas, t_full, t_read = min(pandas_times), min(full_times), min(read_times)
    ratio = t_full / t_pandas
    return {
        "samples": SAMPLES,
        "file_MB": round(size_mb, 1),
        "pandas_read_csv_s": round(t_pandas, 4),
        "kitbin_read_s": round(t_read, 4),
        "kitbin_read_and_analyse_s": round(t_full, 4),
        "analysis_only_s": round(t_full - t_read, 4),
        "ratio_to_pandas": round(ratio, 3),
        "median_paired_ratio": round(float(np.median(paired)), 3),
        "target_ratio": TARGET_RATIO,
        "within_target": ratio <= TARGET_RATIO,
        "ramps_found": result.quality.ramps,
        "l0_error_pct": round(100 * (result.l0_H / model["l0_H"] - 1), 2),
        "isat20_error_pct": round(100 * (result.isat_A[20] / model["isat_A"][20] - 1), 2),
    }


if __name__ == "__main__":
    print(json.dumps(run(), indent=2))
