"""Every earlier schema revision upgrades to head with every row kept, on both backends.

For each revision before head, a fresh database is built at exactly that revision
(``alembic.command.upgrade(cfg, rev)``), every table that exists there is filled
with rows written in plain SQL (so the test does not depend on today's models),
and the database is upgraded to head by ``kitbin init``. Each row must come back
unchanged, column by column, and the ORM must read it. A new revision that adds a
table must add sample rows for it here (the test says so when they are missing).

The no-drift check between models and revisions is in ``test_schema_revisions.py``.
"""

from __future__ import annotations

import datetime as dt
import json
from typing import Any

import pytest
from alembic import command
from sqlalchemy import inspect, text

from kitbin.store import engine as store_engine
from kitbin.store import head_revision, init_database, open_store, queries

T0 = "2026-01-02 03:04:05"
T1 = "2026-02-03 04:05:06"

#: Sample rows per table, in an order that satisfies foreign keys. Columns are the
#: ones every revision so far has; JSON columns hold text, as plain SQL writes them.
ROWS: dict[str, list[dict[str, Any]]] = {
    "kit": [
        {"id": 1, "name": "Drum kit (invented)", "source": "stall", "bought_on": "2026-03-14",
         "notes": "it's a \"kit\"; 50% off", "created_at": T0},
        {"id": 2, "name": "Resistor book", "source": None, "bought_on": None, "notes": None,
         "created_at": T1},
    ],
    "bin": [
        {"id": 1, "label": "L-07", "kind": "inductor", "kit_id": 1, "nominal": 4.7e-06,
         "tol_minus": 0.2, "tol_plus": 0.3, "marking": "4R7", "package": "6x8 drum",
         "location": "A1", "qty": 12, "qty_reserved": 2, "notes": "ünïcode µH Ω",
         "created_at": T0, "updated_at": T1},
        {"id": 2, "label": "R-01", "kind": "resistor", "kit_id": 2, "nominal": 4700.0,
         "tol_minus": 0.05, "tol_plus": 0.05, "marking": "yellow violet red gold",
         "package": None, "location": None, "qty": 0, "qty_reserved": 0, "notes": None,
         "created_at": T0, "updated_at": T0},
        {"id": 3, "label": "U-01", "kind": "controller", "kit_id": None, "nominal": None,
         "tol_minus": None, "tol_plus": None, "marking": None, "package": "SOT-23-6",
         "location": "B2", "qty": 3, "qty_reserved": 0, "notes": None,
         "created_at": T1, "updated_at": T1},
    ],
    "bin_property": [
        {"id": 1, "bin_id": 3, "name": "vref", "value": 0.6, "source": "marked"},
        {"id": 2, "bin_id": 1, "name": "isat_20", "value": 2.1, "source": "user"},
    ],
    "capture": [
        {"id": 1, "bin_id": 1, "kind": "ramp", "file_name": "pulse.csv", "sha256": "ab" * 32,
         "content": b"x\x9c\x00\xff binary", "params": '{"sense": 0.1}',
         "results": '{"l0": 4.6e-06}', "curve": '{"i": [0.0, 1.0], "l": [4.6e-06, 4.5e-06]}',
         "created_at": T0},
    ],
    "reading": [
        {"id": 1, "bin_id": 1, "specimen": 1, "quantity": "inductance", "value": 4.61e-06,
         "bound": "=", "conditions": '{"freq": 100000.0}', "method": "ramp",
         "instrument": None, "taken_at": T0, "capture_id": 1, "note": None},
        {"id": 2, "bin_id": 1, "specimen": None, "quantity": "isat_20", "value": 2.5,
         "bound": ">=", "conditions": "{}", "method": None, "instrument": "bench meter",
         "taken_at": T1, "capture_id": None, "note": "not reached"},
        {"id": 3, "bin_id": 2, "specimen": 2, "quantity": "resistance", "value": 4.68e3,
         "bound": "=", "conditions": '{"temp": 25.0}', "method": "4-wire", "instrument": None,
         "taken_at": T1, "capture_id": None, "note": None},
    ],
    "stock_move": [
        {"id": 1, "bin_id": 1, "delta": 12, "reason": "starting count", "pick_list_id": None,
         "qty_after": 12, "at": T0},
        {"id": 2, "bin_id": 3, "delta": 3, "reason": "imported", "pick_list_id": None,
         "qty_after": 3, "at": T1},
    ],
    "plan": [
        {"id": 1, "name": "5 V buck", "topology": "buck",
         "spec": '{"vin": [9.0, 14.0], "vout": 5.0}', "notes": None,
         "created_at": T0, "updated_at": T1},
    ],
    "pick_list": [
        {"id": 1, "plan_id": 1, "boards": 2, "state": "reserved", "created_at": T0,
         "updated_at": T1, "snapshot": '{"roles": ["inductor"]}'},
    ],
    "pick_line": [
        {"id": 1, "pick_list_id": 1, "role": "inductor", "bin_id": 1, "qty_per_board": 1,
         "qty_total": 2},
        {"id": 2, "pick_list_id": 1, "role": "controller", "bin_id": None, "qty_per_board": 1,
         "qty_total": 2},
    ],
}  # fmt: skip


def _revisions_before_head() -> list[str]:
    script = store_engine._script()
    ordered = [r.revision for r in script.walk_revisions("base", "heads")][::-1]
    assert ordered[-1] == head_revision()
    return ordered[:-1]


def _build_at(url: str, revision: str) -> list[str]:
    """A database at ``revision``, every table filled; returns the tables filled."""
    if url.startswith("sqlite"):
        store_engine._create_sqlite_file(store_engine.sqlite_path(url))
    eng = store_engine.make_engine(url, foreign_keys=False)
    try:
        with eng.begin() as conn:
            command.upgrade(store_engine._alembic_config(conn), revision)
        tables = sorted(set(inspect(eng).get_table_names()) - {"alembic_version"})
        missing = [t for t in tables if t not in ROWS]
        assert not missing, f"add sample rows for {missing} to ROWS in this test"
        with eng.begin() as conn:
            for table in (t for t in ROWS if t in tables):
                for row in ROWS[table]:
                    columns = ", ".join(row)
                    values = ", ".join(f":{c}" for c in row)
                    # Table and column names come from ROWS above, never from input.
                    conn.execute(text(f"INSERT INTO {table} ({columns}) VALUES ({values})"), row)
                if conn.dialect.name == "postgresql":
                    # Explicit ids leave the serial sequence behind; move it past them.
                    conn.execute(
                        text(
                            f"SELECT setval(pg_get_serial_sequence(:t, 'id'), max(id)) FROM {table}"
                        ),
                        {"t": table},
                    )
    finally:
        eng.dispose()
    return [t for t in ROWS if t in tables]


def _normal(value: Any, like: Any) -> Any:
    """A stored value in the shape of the value written, for comparison."""
    if value is None:
        return None
    if isinstance(value, dt.datetime):
        if value.tzinfo is not None:
            value = value.astimezone(dt.UTC).replace(tzinfo=None)
        return value.strftime("%Y-%m-%d %H:%M:%S")
    if isinstance(value, dt.date):
        return value.isoformat()
    if isinstance(value, memoryview):
        return bytes(value)
    if isinstance(like, str) and like[:1] in "{[" and not isinstance(value, str):
        return json.dumps(value, sort_keys=True)
    if isinstance(value, str) and isinstance(like, str) and like[:1] in "{[":
        return json.dumps(json.loads(value), sort_keys=True)
    if isinstance(like, str) and isinstance(value, str) and like[:4].isdigit() and " " in like:
        return value[:19]  # SQLite keeps timestamps as text, with microseconds
    return value


@pytest.mark.parametrize("revision", _revisions_before_head())
def test_every_row_survives_the_upgrade_to_head(db_url: str, revision: str) -> None:
    filled = _build_at(db_url, revision)
    assert init_database(db_url) == head_revision()
    eng = store_engine.make_engine(db_url)
    try:
        with eng.connect() as conn:
            for table in filled:
                written = ROWS[table]
                columns = list(written[0])
                got = conn.execute(text(f"SELECT {', '.join(columns)} FROM {table} ORDER BY id"))
                got_rows = [dict(zip(columns, r, strict=True)) for r in got]
                assert len(got_rows) == len(written), table
                for want, have in zip(written, got_rows, strict=True):
                    for c in columns:
                        expected = want[c]
                        if isinstance(expected, str) and expected[:1] in "{[":
                            expected = json.dumps(json.loads(expected), sort_keys=True)
                        assert _normal(have[c], want[c]) == expected, (table, c)
    finally:
        eng.dispose()
    # The upgraded inventory works through the ORM and accepts new rows.
    store = open_store(db_url, create=False)
    try:
        with store.transaction() as s:
            counts = queries.counts(s)
            assert counts["bin"] == len(ROWS["bin"]) and counts["reading"] == len(ROWS["reading"])
            b = queries.bin_by_label(s, "L-07")
            assert b is not None and b.qty == 12 and b.kit.name == "Drum kit (invented)"
            assert b.readings[0].conditions == {"freq": 100000.0}
            assert b.readings[0].taken_at == dt.datetime(2026, 1, 2, 3, 4, 5, tzinfo=dt.UTC)
        from kitbin.services import inventory

        inventory.add_bin(store, "L-08", "inductor", nominal="10uH", qty=1)
        assert inventory.adjust_stock(store, "L-07", -1, "after upgrade")["qty"] == 11
    finally:
        store.close()


def test_every_revision_is_exercised() -> None:
    # The chain is linear and every revision before head gets the test above.
    script = store_engine._script()
    assert len(script.get_heads()) == 1
    assert set(_revisions_before_head()) | {head_revision()} == {
        r.revision for r in script.walk_revisions()
    }


def test_an_upgrade_blocked_by_another_user_changes_nothing(
    db_url: str, backend: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    from sqlalchemy import create_engine

    from kitbin.errors import StoreError

    revision = _revisions_before_head()[-1]
    _build_at(db_url, revision)
    monkeypatch.setattr(store_engine, "LOCK_TIMEOUT_MS", 300)
    monkeypatch.setattr(
        store_engine,
        "SQLITE_PRAGMAS",
        ("journal_mode=WAL", "busy_timeout=300", "synchronous=NORMAL"),
    )
    holder = create_engine(db_url)
    try:
        with holder.connect() as conn:
            if backend == "sqlite":
                conn.exec_driver_sql("BEGIN IMMEDIATE")
            # Someone is in the middle of logging a stock move and a reading (between
            # them, tables that every revision so far alters or indexes).
            conn.execute(text("UPDATE stock_move SET reason = reason WHERE id = 1"))
            conn.execute(text("UPDATE reading SET note = note WHERE id = 1"))
            with pytest.raises(StoreError, match="cannot create or upgrade") as refused:
                init_database(db_url)
            assert ("locked" if backend == "sqlite" else "lock timeout") in str(refused.value)
            conn.rollback()
    finally:
        holder.dispose()
    eng = store_engine.make_engine(db_url)
    try:
        with eng.connect() as conn:
            assert store_engine.current_revision(conn) == revision
    finally:
        eng.dispose()
    assert init_database(db_url) == head_revision()
