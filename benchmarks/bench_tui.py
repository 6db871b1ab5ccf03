"""The shelf with 10,000 bins: time until it is ready, and from a filter keystroke to
the updated grid.

A temporary SQLite file gets 10,000 bins (inductors, resistors, capacitors and
diodes, invented) with about 15,000 readings and 7,500 properties in one bulk
insert each. The app then runs headless (Textual's ``run_test``, 120×40):

- ``shelf_ready_s``: from starting the app to the grid showing every bin (open the
  database, read and shape every row in the worker, first draw). Target 2 s.
- ``keystroke_ms``: median over several keystrokes typed into the filter, from the
  key press to the grid drawn with the new view (Pilot waits until the app is
  idle, so the repaint is included). Target 150 ms.
- ``caret_key_ms``: median of keys that only move the caret in the filter box (no
  filtering), measured the same way in the same run: the harness and redraw floor.
- ``filter_pass_ms``: median of the in-memory filter alone (parse, filter, order) on
  the same texts, to show where the keystroke time goes.

    python benchmarks/bench_tui.py
"""

from __future__ import annotations

import asyncio
import random
import statistics
import tempfile
import time
from pathlib import Path

N_BINS = 10_000
TYPED = "ind >=2A 10u"


def build(path: Path, n: int = N_BINS, seed: int = 20261201) -> str:
    """Bulk-insert ``n`` invented bins with readings and properties; the SQLite URL."""
    from sqlalchemy import insert

    from kitbin.store import open_store
    from kitbin.store.models import Bin, BinProperty, Reading

    url = f"sqlite:///{path}"
    rng = random.Random(seed)
    kinds = ("inductor", "resistor", "capacitor", "diode")
    nominals = {
        "inductor": (4.7e-6, 10e-6, 22e-6, 47e-6),
        "resistor": (100.0, 1e3, 4.7e3, 10e3),
        "capacitor": (100e-9, 1e-6, 10e-6),
        "diode": (None,),
    }
    bins, readings, props = [], [], []
    for k in range(n):
        kind = kinds[k % 4]
        nominal = rng.choice(nominals[kind])
        bins.append(
            {
                "id": k + 1,
                "label": f"B-{k:05d}",
                "kind": kind,
                "nominal": nominal,
                "tol_minus": 0.2 if nominal else None,
                "tol_plus": 0.2 if nominal else None,
                "location": f"drawer {k // 100}",
                "qty": rng.randint(0, 50),
                "qty_reserved": 0,
            }
        )
        bid = k + 1
        if kind == "inductor":
            for q, v in (
                ("inductance", nominal * rng.uniform(0.9, 1.1)),
                ("dcr", rng.uniform(0.01, 0.2)),
                ("isat_20", rng.uniform(0.5, 4.0)),
            ):
                readings.append(
                    {"bin_id": bid, "quantity": q, "value": v, "bound": "=", "conditions": {}}
                )
        elif kind == "resistor":
            readings.append(
                {
                    "bin_id": bid,
                    "quantity": "resistance",
                    "value": nominal * rng.uniform(0.99, 1.01),
                    "bound": "=",
                    "conditions": {},
                }
            )
        elif kind == "capacitor":
            props.append(
                {"bin_id": bid, "name": "rated_voltage", "value": 25.0, "source": "marked"}
            )
        else:
            props.append({"bin_id": bid, "name": "vrrm", "value": 40.0, "source": "marked"})
            props.append({"bin_id": bid, "name": "if_avg", "value": 1.0, "source": "marked"})
    with open_store(url) as store, store.transaction() as session:
        session.execute(insert(Bin), bins)
        session.execute(insert(Reading), readings)
        session.execute(insert(BinProperty), props)
    return url


async def _measure(url: str) -> dict:
    from kitbin.tui.app import make_app
    from kitbin.tui.widgets.shelf.grid import ShelfGrid

    start = time.perf_counter()
    app = make_app(url)
    async with app.run_test(size=(120, 40)) as pilot:
        while not app.shelf.rows:
            await asyncio.sleep(0.02)  # polling pilot.pause() here would slow the worker
        await pilot.pause()
        ready = time.perf_counter() - start
        grid = app.shelf.query_one(ShelfGrid)
        assert len(grid.shown) == N_BINS
        load = app.shelf.load_seconds
        await pilot.press("slash")
        times = []
        for ch in TYPED:
            t = time.perf_counter()
            await pilot.press("space" if ch == " " else ch)
            await pilot.pause()
            times.append(time.perf_counter() - t)
        shown = len(grid.shown)
        baseline = []
        for key in ("left", "right") * 4:  # keys that move the caret but filter nothing
            t = time.perf_counter()
            await pilot.press(key)
            await pilot.pause()
            baseline.append(time.perf_counter() - t)
        for _ in range(4):  # and back again
            t = time.perf_counter()
            await pilot.press("backspace")
            await pilot.pause()
            times.append(time.perf_counter() - t)
        rows = app.shelf.rows
        order = app.shelf.order
    return {
        "ready": ready,
        "load": load,
        "keys": times,
        "baseline": baseline,
        "shown_after_typing": shown,
        "rows": rows,
        "order": order,
    }


def _filter_pass_ms(rows, order) -> float:
    from kitbin.tui.widgets.shelf.rows import apply_filter, parse_filter, view

    times = []
    for k in range(1, len(TYPED) + 1):
        t = time.perf_counter()
        view(order, apply_filter(rows, parse_filter(TYPED[:k])))
        times.append(time.perf_counter() - t)
    return statistics.median(times) * 1e3


def run() -> dict:
    """Build the 10,000-bin shelf, measure it; figures in seconds and milliseconds."""
    with tempfile.TemporaryDirectory() as tmp:
        url = build(Path(tmp) / "shelf.sqlite")
        m = asyncio.run(_measure(url))
        filter_ms = _filter_pass_ms(m["rows"], m["order"])
    keys_ms = [t * 1e3 for t in m["keys"]]
    return {
        "bins": N_BINS,
        "shelf_ready_s": round(m["ready"], 3),
        "shelf_load_worker_s": round(m["load"], 3),
        "target_ready_s": 2.0,
        "keystroke_ms_median": round(statistics.median(keys_ms), 1),
        "keystroke_ms_max": round(max(keys_ms), 1),
        "keystrokes": len(keys_ms),
        "caret_key_ms_median": round(statistics.median(m["baseline"]) * 1e3, 1),
        "keystroke_over_caret_key": round(
            statistics.median(keys_ms) / (statistics.median(m["baseline"]) * 1e3), 2
        ),
        "target_keystroke_ms": 150.0,
        "filter_pass_ms_median": round(filter_ms, 2),
        "bins_shown_for": {TYPED: m["shown_after_typing"]},
    }


if __name__ == "__main__":
    import json

    print(json.dumps(run(), indent=2))
