"""Run every performance figure of kitbin in one go and print them as JSON.

Each figure is a ratio (or a wall time) measured side by side in this one run, so a
noisy machine slows both sides alike. Targets are in docs/performance.md.

    python benchmarks/run.py            # all figures
    python benchmarks/run.py startup    # only the named ones
"""

from __future__ import annotations

import importlib
import json
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

#: figure name -> benchmark module (each exposes ``run() -> dict``).
FIGURES = {
    "capture_analysis": "bench_capture",
    "match_100k_bins": "bench_match",
    "divider_search": "bench_divider",
    "tui_shelf": "bench_tui",
    "import_100k_readings": "bench_import",
    "startup": "bench_startup",
    "stage_stepping": "bench_stage",
}


def main(names: list[str]) -> int:
    chosen = names or list(FIGURES)
    unknown = [n for n in chosen if n not in FIGURES]
    if unknown:
        print(f"run.py: unknown figure(s): {', '.join(unknown)}; known: {', '.join(FIGURES)}")
        return 2
    results: dict[str, dict] = {}
    for name in chosen:
        start = time.perf_counter()
        try:
            module = importlib.import_module(FIGURES[name])
            figure = module.run()
        except ModuleNotFoundError as error:
            figure = {"error": f"benchmark module missing: {error.name}"}
        except Exception as error:  # one broken figure must not hide the others
            figure = {"error": f"{type(error).__name__}: {error}"}
        figure["bench_wall_s"] = round(time.perf_counter() - start, 2)
        results[name] = figure
        print(f"{name}: done in {figure['bench_wall_s']} s", file=sys.stderr)
    print(json.dumps(results, indent=2))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
