"""Whole-database copies for backups: read every table in one snapshot, load into an empty one.

:mod:`kitbin.services.backup` owns the backup file formats; this module only moves
rows. Tables are read and written in foreign-key order, by primary key, in
batches; reads happen inside one transaction (``REPEATABLE READ`` on PostgreSQL,
``BEGIN IMMEDIATE`` on SQLite), so a backup taken while others work is a consistent
snapshot. A load runs in one transaction too: the schema at the backup's revision,
every row, the upgrade to head and (PostgreSQL) the id sequences, or nothing.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import os
import sqlite3
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from sqlalchemy import (
    JSON,
    Date,
    DateTime,
    LargeBinary,
    MetaData,
    Table,
    create_engine,
    func,
    inspect,
    select,
    text,
)
from sqlalchemy.engine import Connection
from sqlalchemy.exc import SQLAlchemyError

from kitbin.errors import KitbinError, StoreError
from kitbin.store.engine import (
    Store,
    _alembic_config,
    _create_sqlite_file,
    _is_known,
    current_revision,
    driver_message,
    head_revision,
    make_engine,
)
from kitbin.store.locate import mask_url, resolve_url, sqlite_path

BATCH = 2000
#: How each column travels through a text backup (see :func:`column_kind`).
KINDS = ("value", "datetime", "date", "bytes", "json")


@dataclass(frozen=True)
class TableSpec:
    """One table of a dump: its name, its columns and how each column is encoded."""

    name: str
    columns: tuple[str, ...]
    kinds: tuple[str, ...]


def column_kind(column_type: Any) -> str:
    """``datetime``, ``date``, ``bytes``, ``json`` or ``value`` for a column type."""
    if isinstance(column_type, DateTime):
        return "datetime"
    if isinstance(column_type, Date):
        return "date"
    if isinstance(column_type, LargeBinary):
        return "bytes"
    if isinstance(column_type, JSON):
        return "json"
    impl = getattr(column_type, "impl", None)  # a TypeDecorator
    return column_kind(impl) if impl is not None else "value"


def _tables(conn: Connection) -> list[Table]:
    """The database's tables (reflected) in foreign-key order, without alembic_version."""
    meta = MetaData()
    meta.reflect(conn)
    return [t for t in meta.sorted_tables if t.name != "alembic_version"]


def _spec(table: Table) -> TableSpec:
    return TableSpec(
        table.name,
        tuple(c.name for c in table.columns),
        tuple(column_kind(c.type) for c in table.columns),
    )


def _rows(conn: Connection, table: Table) -> Iterator[tuple]:
    order = list(table.primary_key.columns) or list(table.columns)
    result = conn.execution_options(stream_results=True, yield_per=BATCH).execute(
        select(table).order_by(*order)
    )
    for row in result:
        yield tuple(row)


@contextlib.contextmanager
def snapshot(store: Store) -> Iterator[tuple[str, list[tuple[TableSpec, Iterator[tuple]]]]]:
    """Read every table in one consistent transaction.

    Yields
    ------
    (revision, [(TableSpec, rows), ...])
        ``rows`` iterates tuples in column order; consume the tables in order,
        inside the ``with`` block.
    """
    try:
        with store.engine.connect() as conn:
            if store.dialect == "postgresql":
                conn = conn.execution_options(isolation_level="REPEATABLE READ")
            with conn.begin():
                revision = current_revision(conn)
                tables = _tables(conn)
                yield revision or "", [(_spec(t), _rows(conn, t)) for t in tables]
    except KitbinError:
        raise
    except SQLAlchemyError as e:
        raise StoreError(f"cannot read the database: {driver_message(e, store.url)}") from e


def sqlite_backup(store: Store, target: Path) -> None:
    """Copy a SQLite inventory to ``target`` with SQLite's online backup API.

    The copy is consistent even while others write, and is left in rollback-journal
    mode so that it is one self-contained file.
    """
    if store.dialect != "sqlite":
        raise StoreError("the SQLite backup format needs a SQLite inventory")
    raw = store.engine.raw_connection()
    try:
        source = raw.driver_connection
        dest = sqlite3.connect(target)
        try:
            source.backup(dest)
            dest.execute("PRAGMA journal_mode=DELETE")
            check = dest.execute("PRAGMA integrity_check").fetchone()[0]
        finally:
            dest.close()
    except sqlite3.Error as e:
        raise StoreError(f"cannot back up the database: {e}") from e
    finally:
        raw.close()
    if check != "ok":
        raise StoreError(f"the backup copy failed its integrity check: {check}")


@contextlib.contextmanager
def read_sqlite_file(path: Path) -> Iterator[tuple[str, list[tuple[TableSpec, Iterator[tuple]]]]]:
    """Like :func:`snapshot`, for a SQLite backup file opened read-only."""
    uri = "file:" + str(path.resolve()) + "?mode=ro"
    engine = create_engine("sqlite://", creator=lambda: sqlite3.connect(uri, uri=True))
    try:
        with engine.connect() as conn, conn.begin():
            tables = set(inspect(conn).get_table_names())
            if "alembic_version" not in tables:
                raise StoreError(f"{path} is a SQLite file but not a kitbin inventory")
            revision = conn.execute(text("SELECT version_num FROM alembic_version")).scalar()
            specs = _tables(conn)
            yield revision or "", [(_spec(t), _rows(conn, t)) for t in specs]
    except KitbinError:
        raise
    except SQLAlchemyError as e:
        raise StoreError(f"cannot read {path}: {driver_message(e)}") from e
    finally:
        engine.dispose()


def _as_utc(value: Any) -> Any:
    if isinstance(value, dt.datetime):
        if value.tzinfo is None:
            return value.replace(tzinfo=dt.UTC)
        return value.astimezone(dt.UTC)
    return value


def load(
    url: str | None, revision: str, tables: Iterable[tuple[TableSpec, Iterable[tuple]]]
) -> dict[str, int]:
    """Fill an empty database from a dump taken at ``revision``, then upgrade it to head.

    Parameters
    ----------
    url
        ``--db`` text of the target; it must hold no tables at all.
    revision
        The schema revision the rows were read at.
    tables
        ``(TableSpec, rows)`` in foreign-key order; rows are tuples in the spec's
        column order, with Python values (datetime, date, bytes, dict ...).

    Returns
    -------
    dict
        Rows loaded per table.

    Raises
    ------
    StoreError
        When the target is not empty, the revision is unknown (newer than this
        kitbin), a table or column of the dump does not exist at that revision, or
        the database refuses a row. Nothing is kept in that case.
    """
    from alembic import command

    resolved = resolve_url(url)
    if not _is_known(revision):
        raise StoreError(
            f"the backup is at schema revision {revision}, which this kitbin does not know "
            f"(newest: {head_revision()})",
            "restore it with a newer kitbin",
        )
    path = sqlite_path(resolved)
    created = False
    if path is not None:
        if path.exists() and path.stat().st_size > 0:
            _refuse_non_empty(resolved)
        created = _create_sqlite_file(path)
    engine = make_engine(resolved, foreign_keys=False)
    counts: dict[str, int] = {}
    try:
        with engine.begin() as conn:
            if inspect(conn).get_table_names():
                raise _not_empty(resolved)
            command.upgrade(_alembic_config(conn), revision)
            target = {t.name: t for t in _tables(conn)}
            for spec, rows in tables:
                table = target.get(spec.name)
                if table is None:
                    raise StoreError(f"the backup has a table '{spec.name}' unknown at {revision}")
                unknown = [c for c in spec.columns if c not in table.columns]
                if unknown:
                    raise StoreError(
                        f"the backup's table '{spec.name}' has columns {unknown} "
                        f"unknown at revision {revision}"
                    )
                counts[spec.name] = _insert(conn, table, spec, rows)
            if conn.dialect.name == "postgresql":
                _advance_sequences(conn, list(target.values()))
            command.upgrade(_alembic_config(conn), "head")
            if conn.dialect.name == "sqlite":
                broken = conn.exec_driver_sql("PRAGMA foreign_key_check").fetchall()
                if broken:
                    raise StoreError(f"the backup has {len(broken)} broken references")
    except BaseException as e:
        engine.dispose()
        if created and path is not None:
            for suffix in ("", "-wal", "-shm", "-journal"):
                Path(str(path) + suffix).unlink(missing_ok=True)
        if isinstance(e, SQLAlchemyError):
            raise StoreError(
                f"cannot restore into {mask_url(resolved)}: {driver_message(e, resolved)}; "
                "nothing was kept"
            ) from e
        raise
    engine.dispose()
    if path is not None:
        os.chmod(path, 0o600)
    return counts


def _insert(conn: Connection, table: Table, spec: TableSpec, rows: Iterable[tuple]) -> int:
    statement = table.insert()
    batch: list[dict[str, Any]] = []
    n = 0
    for row in rows:
        batch.append({c: _as_utc(v) for c, v in zip(spec.columns, row, strict=True)})
        if len(batch) >= BATCH:
            conn.execute(statement, batch)
            n += len(batch)
            batch = []
    if batch:
        conn.execute(statement, batch)
        n += len(batch)
    return n


def _advance_sequences(conn: Connection, tables: list[Table]) -> None:
    """Move each serial id sequence past the ids loaded (PostgreSQL)."""
    for table in tables:
        if "id" not in table.columns:
            continue
        sequence = func.pg_get_serial_sequence(table.name, "id")
        conn.execute(
            select(func.setval(sequence, func.coalesce(func.max(table.c.id), 0) + 1, False))
        )


def _not_empty(url: str) -> StoreError:
    return StoreError(
        f"the database {mask_url(url)} is not empty; a restore goes into an empty database only",
        "give --db a new file or an empty PostgreSQL database",
    )


def _refuse_non_empty(url: str) -> None:
    engine = make_engine(url)
    try:
        with engine.connect() as conn:
            if inspect(conn).get_table_names():
                raise _not_empty(url)
    except SQLAlchemyError as e:
        raise StoreError(f"cannot open {mask_url(url)}: {driver_message(e, url)}") from e
    finally:
        engine.dispose()


__all__ = ["KINDS", "TableSpec", "column_kind", "load", "read_sqlite_file", "snapshot"]
