"""Schema revisions: head matches the models, upgrades keep data, old databases are refused."""

from __future__ import annotations

import os
import sqlite3
import stat
from pathlib import Path

import pytest
from alembic import command
from alembic.autogenerate import compare_metadata
from alembic.migration import MigrationContext

from kitbin.errors import StoreError
from kitbin.store import engine as store_engine
from kitbin.store import head_revision, init_database, open_store, queries
from kitbin.store.models import Base, Bin


def _upgrade_to(url: str, revision: str) -> None:
    eng = store_engine.make_engine(url, foreign_keys=False)
    try:
        with eng.begin() as conn:
            command.upgrade(store_engine._alembic_config(conn), revision)
    finally:
        eng.dispose()


def test_head_is_the_newest_revision() -> None:
    assert head_revision() == "0003"
    # The quick text scan used on every command agrees with Alembic's own view.
    assert store_engine._revisions() == {
        rev.revision: rev.down_revision for rev in store_engine._script().walk_revisions()
    }
    assert head_revision() == store_engine._script().get_current_head()


def test_opening_a_current_database_does_not_import_alembic(tmp_path: Path) -> None:
    import subprocess
    import sys

    path = tmp_path / "inv.sqlite"
    init_database(str(path))
    code = (
        "import sys; from kitbin.store import open_store; "
        f"open_store({str(path)!r}).close(); print('alembic' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_a_fresh_database_at_head_matches_the_models(db_url: str) -> None:
    store = open_store(db_url)
    try:
        with store.engine.connect() as conn:
            context = MigrationContext.configure(conn, opts={"compare_type": True})
            assert compare_metadata(context, Base.metadata) == []
    finally:
        store.close()


def _at_revision(db_url: str, revision: str, *statements: str) -> None:
    """Build the database at ``revision`` and run plain SQL on it (one transaction)."""
    _upgrade_to(db_url, revision)
    eng = store_engine.make_engine(db_url)
    try:
        with eng.begin() as conn:
            for sql in statements:
                conn.exec_driver_sql(sql)
    finally:
        eng.dispose()


def test_upgrade_from_0001_keeps_rows_and_adds_pick_tables(db_url: str) -> None:
    _at_revision(
        db_url,
        "0001",
        "INSERT INTO bin (label, kind, qty, qty_reserved, created_at, updated_at) "
        "VALUES ('L-01', 'inductor', 4, 0, '2026-01-01 00:00:00', '2026-01-01 00:00:00')",
    )
    with pytest.raises(StoreError, match="kitbin init"):
        open_store(db_url)
    assert init_database(db_url) == "0003"
    store = open_store(db_url)
    try:
        with store.transaction() as s:
            b = queries.bin_by_label(s, "L-01")
            assert b is not None and b.qty == 4
    finally:
        store.close()


def test_upgrade_from_0002_swaps_the_readings_index(db_url: str) -> None:
    # every row surviving each upgrade is test_migrations_history.py's job
    from sqlalchemy import inspect

    _at_revision(db_url, "0002")
    assert init_database(db_url) == "0003"
    eng = store_engine.make_engine(db_url)
    try:
        with eng.connect() as conn:
            found = inspect(conn).get_indexes("reading")
        indexes = {ix["name"]: ix["column_names"] for ix in found}
    finally:
        eng.dispose()
    assert indexes["ix_reading_evidence"] == ["bin_id", "quantity", "bound", "value"]
    assert "ix_reading_bin_id_quantity" not in indexes


def test_downgrade_to_base_and_back(db_url: str) -> None:
    init_database(db_url)
    eng = store_engine.make_engine(db_url, foreign_keys=False)
    try:
        with eng.begin() as conn:
            command.downgrade(store_engine._alembic_config(conn), "base")
    finally:
        eng.dispose()
    assert init_database(db_url) == "0003"


def test_init_twice_is_harmless(tmp_path: Path) -> None:
    path = tmp_path / "inv.sqlite"
    assert init_database(str(path)) == "0003"
    assert init_database(str(path)) == "0003"


def test_new_sqlite_file_is_private_to_its_owner(tmp_path: Path) -> None:
    path = tmp_path / "sub" / "inv.sqlite"
    open_store(str(path)).close()
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o600


def test_newer_revision_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "inv.sqlite"
    init_database(str(path))
    con = sqlite3.connect(path)
    con.execute("UPDATE alembic_version SET version_num = '9999'")
    con.commit()
    con.close()
    with pytest.raises(StoreError, match="newer"):
        open_store(str(path))
    with pytest.raises(StoreError, match="newer"):
        init_database(str(path))


def test_a_foreign_database_is_left_alone(tmp_path: Path) -> None:
    path = tmp_path / "other.sqlite"
    con = sqlite3.connect(path)
    con.execute("CREATE TABLE notes (x TEXT)")
    con.commit()
    con.close()
    with pytest.raises(StoreError, match="not a kitbin inventory"):
        open_store(str(path))
    with pytest.raises(StoreError, match="not a kitbin inventory"):
        init_database(str(path))
    con = sqlite3.connect(path)
    assert [r[0] for r in con.execute("SELECT name FROM sqlite_master")] == ["notes"]
    con.close()


def test_sqlite_runs_with_wal_foreign_keys_and_busy_timeout(tmp_path: Path) -> None:
    store = open_store(str(tmp_path / "inv.sqlite"))
    try:
        with store.engine.connect() as conn:
            pragma = {
                p: conn.exec_driver_sql(f"PRAGMA {p}").scalar()
                for p in ("journal_mode", "foreign_keys", "busy_timeout", "synchronous")
            }
        assert pragma == {
            "journal_mode": "wal",
            "foreign_keys": 1,
            "busy_timeout": 10000,
            "synchronous": 1,
        }
    finally:
        store.close()


def test_foreign_keys_are_enforced(store) -> None:
    from kitbin.store.models import Reading

    with pytest.raises(StoreError), store.transaction() as s:
        s.add(Reading(bin_id=12345, quantity="dcr", value=0.1))
    with store.transaction() as s:
        assert s.query(Bin).count() == 0
