"""CSV import: 100,000 readings through kitbin against pandas plus one Core bulk insert.

Both sides start from the same file and a fresh SQLite inventory holding the same
50 bins, and end with the same rows in the ``reading`` table:

* kitbin: :func:`kitbin.services.importexport.import_csv` (what ``kitbin import``
  runs: read, check every row, then write all of them in one transaction);
* baseline: ``pandas.read_csv`` of the file, labels mapped to bin ids, and one
  SQLAlchemy Core ``insert`` of all rows (no checks at all).

They run interleaved, best of ``repeats`` each, so machine noise hits both alike.
Target: ratio <= 2. A second figure imports values written with units (``9.6uH``)
to show what unit parsing costs.
"""

from __future__ import annotations

import datetime as dt
import random
import tempfile
import time
from pathlib import Path

ROWS = 100_000
BINS = 50


def _write(folder: Path, rows: int, units: bool) -> Path:
    rng = random.Random(1)
    path = folder / ("readings-units.csv" if units else "readings.csv")
    with path.open("w") as f:
        f.write("label,quantity,value,specimen\n")
        for i in range(rows):
            v = rng.uniform(1.0, 100.0)
            value = f"{v:.4f}uH" if units else repr(v * 1e-6)
            f.write(f"L-{i % BINS:02d},inductance,{value},{i % 7 + 1}\n")
    return path


def _fresh_db(folder: Path, name: str) -> str:
    from kitbin.services import inventory
    from kitbin.store import open_store

    path = folder / f"{name}.sqlite"
    for suffix in ("", "-wal", "-shm"):
        Path(str(path) + suffix).unlink(missing_ok=True)
    store = open_store(str(path))
    for i in range(BINS):
        inventory.add_bin(store, f"L-{i:02d}", "inductor", nominal="10uH")
    store.close()
    return str(path)


def _kitbin(folder: Path, csv: Path) -> tuple[float, int]:
    from kitbin.services import importexport
    from kitbin.store import open_store

    url = _fresh_db(folder, "kitbin")
    store = open_store(url)
    start = time.perf_counter()
    summary = importexport.import_csv(store, str(csv), what="readings")
    elapsed = time.perf_counter() - start
    store.close()
    return elapsed, summary["rows"]


def _baseline(folder: Path, csv: Path) -> tuple[float, int]:
    import pandas as pd
    from sqlalchemy import MetaData, Table, create_engine, insert, select

    url = _fresh_db(folder, "baseline")
    engine = create_engine("sqlite:///" + url)
    reading = Table("reading", MetaData(), autoload_with=engine)
    bin_table = Table("bin", MetaData(), autoload_with=engine)
    with engine.connect() as conn:
        ids = dict(conn.execute(select(bin_table.c.label, bin_table.c.id)).all())
    start = time.perf_counter()
    frame = pd.read_csv(csv)
    now = dt.datetime.now(dt.UTC)
    frame["bin_id"] = frame["label"].map(ids)
    frame = frame.drop(columns="label")
    frame["bound"] = "="
    frame["conditions"] = [{}] * len(frame)
    frame["taken_at"] = now
    records = frame.to_dict("records")
    with engine.begin() as conn:
        conn.execute(insert(reading), records)
    elapsed = time.perf_counter() - start
    engine.dispose()
    return elapsed, len(records)


def run(rows: int = ROWS, repeats: int = 3) -> dict:
    """Time both imports; returns best wall times in seconds and their ratio."""
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        plain = _write(folder, rows, units=False)
        with_units = _write(folder, rows, units=True)
        ours, theirs = [], []
        for _ in range(repeats):
            t, n = _kitbin(folder, plain)
            assert n == rows
            ours.append(t)
            t, n = _baseline(folder, plain)
            assert n == rows
            theirs.append(t)
        units_s = min(_kitbin(folder, with_units)[0] for _ in range(max(1, repeats - 1)))
    k, b = min(ours), min(theirs)
    return {
        "rows": rows,
        "kitbin_import_s": round(k, 3),
        "pandas_plus_core_insert_s": round(b, 3),
        "ratio": round(k / b, 3),
        "target_ratio_max": 2.0,
        "kitbin_import_with_units_s": round(units_s, 3),
        "kitbin_rows_per_s": round(rows / k),
    }


if __name__ == "__main__":
    import json

    print(json.dumps(run(), indent=2))
