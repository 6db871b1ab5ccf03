"""A large import killed part-way leaves all of it or none of it, and an intact file.

The real ``kitbin import`` runs in a subprocess on 100,000 readings and is killed
with SIGKILL (no clean-up code runs) at seeded random moments: some while the file
is still being read and checked, others while rows are being written (after the
SQLite write-ahead log has started to grow), up to the commit and past it. After
every kill the database must pass ``PRAGMA integrity_check`` and hold either none of the new
readings or all of them. A last, unkilled run must then import everything.
"""

from __future__ import annotations

import os
import random
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

ROWS = 100_000
BINS = 50
SEED = 7331


def _write_files(tmp_path: Path) -> tuple[Path, Path, float]:
    rng = random.Random(SEED)
    bins = tmp_path / "bins.csv"
    bins.write_text(
        "label,kind,nominal,qty\n" + "".join(f"L-{i:02d},inductor,10uH,5\n" for i in range(BINS))
    )
    readings = tmp_path / "readings.csv"
    total = 0.0
    with readings.open("w") as f:
        f.write("label,quantity,value,specimen,conditions\n")
        for i in range(ROWS):
            value = round(rng.uniform(1.0, 100.0), 4)
            total += value
            f.write(f"L-{i % BINS:02d},inductance,{value}uH,{i % 7 + 1},freq=100kHz\n")
    return bins, readings, total * 1e-6


def _kitbin(db: Path | str, *args: str) -> subprocess.Popen:
    env = {**os.environ, "PYTHONWARNINGS": "error"}
    return subprocess.Popen(
        [sys.executable, "-m", "kitbin", "--db", str(db), *args],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env=env,
    )


def _state(db: Path) -> tuple[str, int]:
    con = sqlite3.connect(db)
    try:
        check = con.execute("PRAGMA integrity_check").fetchone()[0]
        fk = con.execute("PRAGMA foreign_key_check").fetchall()
        assert fk == []
        n = con.execute("SELECT count(*) FROM reading").fetchone()[0]
    finally:
        con.close()
    return check, n


def _kill_after(proc: subprocess.Popen, db: Path, delay: float, after_wal: bool) -> str:
    """SIGKILL ``proc`` ``delay`` s after it starts (or after the WAL starts to grow)."""
    wal = db.with_name(db.name + "-wal")
    base = wal.stat().st_size if wal.exists() else 0
    start = time.monotonic()
    if after_wal:
        while proc.poll() is None and (wal.stat().st_size if wal.exists() else 0) <= base:
            if time.monotonic() - start > 60:
                break
            time.sleep(0.005)
        start = time.monotonic()
    while proc.poll() is None and time.monotonic() - start < delay:
        time.sleep(0.005)
    if proc.poll() is None:
        proc.send_signal(signal.SIGKILL)
        proc.communicate()
        return "killed"
    proc.communicate()
    return "finished"


@pytest.mark.slow
def test_killed_import_is_all_or_nothing(tmp_path: Path) -> None:
    bins, readings, value_sum = _write_files(tmp_path)
    db = tmp_path / "inv.sqlite"
    done = _kitbin(db, "import", str(bins))
    _out, err = done.communicate()
    assert done.returncode == 0, err
    rng = random.Random(SEED)
    # (delay in s, measured from the start or from the first write to the WAL)
    kills = [
        (rng.uniform(0.2, 1.0), False),
        (rng.uniform(0.0, 0.3), True),
        (rng.uniform(0.3, 1.5), True),
    ]
    expected = 0
    outcomes = []
    for delay, after_wal in kills:
        proc = _kitbin(db, "import", str(readings))
        outcomes.append(_kill_after(proc, db, delay, after_wal))
        print(f"kill after {delay:.3f} s{' of writing' if after_wal else ''}: {outcomes[-1]}")
        check, n = _state(db)
        assert check == "ok"
        assert n in (expected, expected + ROWS), (delay, after_wal, n)
        print(f"  integrity {check}, readings {n}")
        expected = n
    assert "killed" in outcomes
    final = _kitbin(db, "import", str(readings))
    _out, err = final.communicate()
    assert final.returncode == 0, err
    check, n = _state(db)
    assert check == "ok" and n == expected + ROWS
    con = sqlite3.connect(db)
    try:
        got = con.execute("SELECT sum(value), count(DISTINCT bin_id) FROM reading").fetchone()
    finally:
        con.close()
    assert got[1] == BINS
    assert got[0] == pytest.approx(value_sum * (n // ROWS), rel=1e-9)


@pytest.mark.slow
def test_killed_import_on_postgresql_is_all_or_nothing(databases, tmp_path: Path) -> None:
    if not os.environ.get("KITBIN_TEST_PG"):
        pytest.skip("needs a PostgreSQL server: set KITBIN_TEST_PG (.ci/run starts one)")
    from sqlalchemy import create_engine, text

    bins, readings, _ = _write_files(tmp_path)
    url = databases.new("postgresql")
    done = _kitbin(url, "import", str(bins))
    _out, err = done.communicate()
    assert done.returncode == 0, err
    engine = create_engine(url)

    def count() -> int:
        with engine.connect() as conn:
            return conn.execute(text("SELECT count(*) FROM reading")).scalar_one()

    def writing(proc: subprocess.Popen) -> None:
        """Wait until the import's transaction has started inserting readings."""
        query = text(
            "SELECT count(*) FROM pg_stat_activity WHERE datname = current_database() "
            "AND query ILIKE 'INSERT INTO reading%' AND pid <> pg_backend_pid()"
        )
        start = time.monotonic()
        with engine.connect() as conn:
            while proc.poll() is None and time.monotonic() - start < 60:
                if conn.execute(query).scalar_one():
                    print(f"postgresql: inserts seen {time.monotonic() - start:.2f} s in")
                    return
                conn.rollback()
                time.sleep(0.005)

    rng = random.Random(SEED + 1)
    try:
        expected = 0
        for delay, wait_for_writes in (
            (rng.uniform(0.5, 1.5), False),
            (rng.uniform(0.05, 0.3), True),
        ):
            proc = _kitbin(url, "import", str(readings))
            if wait_for_writes:
                writing(proc)
            outcome = _kill_after(proc, tmp_path / "none", delay, after_wal=False)
            n = count()
            where = " of writing" if wait_for_writes else ""
            print(f"postgresql: kill after {delay:.2f} s{where}: {outcome}, readings {n}")
            assert n in (expected, expected + ROWS)
            expected = n
        final = _kitbin(url, "import", str(readings))
        _out, err = final.communicate()
        assert final.returncode == 0, err
        assert count() == expected + ROWS
    finally:
        engine.dispose()
