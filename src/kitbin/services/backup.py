"""Backups of the whole inventory, and restoring one into an empty database.

Two formats, told apart by their first bytes:

``sqlite``
    A SQLite database file made with SQLite's online backup API: a consistent copy
    even while others write, openable with ``--db FILE`` as it is. The default for a
    SQLite inventory.
``jsonl``
    A portable text dump, one JSON document per line: a header (format, version,
    schema revision, source dialect, time), then for each table in foreign-key
    order one line naming the table, its columns and how each is encoded, followed
    by one JSON array per row, and a last line with the row count of every table
    (a file without it is incomplete and is refused). Timestamps are ISO 8601 in
    UTC, binary content is base64, JSON columns are embedded as JSON. The default
    for PostgreSQL, and the way to move an inventory between SQLite and PostgreSQL.

A backup file is written under a temporary name in the target's folder and renamed
when complete, readable by its owner only (0600). A restore goes into an empty
database only, in one transaction: the schema at the backup's revision, every row,
the upgrade to this kitbin's newest revision -- or, on any error, nothing.
"""

from __future__ import annotations

import base64
import datetime as dt
import json
import os
import tempfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any, TextIO

from kitbin.errors import NotFoundError, StoreError
from kitbin.store import Store
from kitbin.store import dump as store_dump

FORMATS = ("sqlite", "jsonl")
MAGIC = "kitbin-backup"
VERSION = 1
_SQLITE_HEADER = b"SQLite format 3\x00"


class BackupError(StoreError):
    """A backup file that cannot be written, read or restored."""


# -- encoding of values --------------------------------------------------------------


def _encode(value: Any, kind: str) -> Any:
    if value is None:
        return None
    if kind == "datetime":
        if value.tzinfo is None:  # SQLite keeps no zone; kitbin stores UTC
            value = value.replace(tzinfo=dt.UTC)
        return value.astimezone(dt.UTC).isoformat()
    if kind == "date":
        return value.isoformat()
    if kind == "bytes":
        return base64.b64encode(bytes(value)).decode("ascii")
    return value


def _decode(value: Any, kind: str) -> Any:
    if value is None:
        return None
    if kind == "datetime":
        return dt.datetime.fromisoformat(value)
    if kind == "date":
        return dt.date.fromisoformat(value)
    if kind == "bytes":
        return base64.b64decode(value, validate=True)
    return value


# -- backup ----------------------------------------------------------------------------


def backup(store: Store, file: str, *, fmt: str | None = None, force: bool = False) -> dict:
    """Write a backup of the whole inventory to ``file``.

    Parameters
    ----------
    fmt
        ``"sqlite"`` or ``"jsonl"``; None means ``sqlite`` for a SQLite inventory
        and ``jsonl`` otherwise.
    force
        Replace an existing file.

    Returns
    -------
    dict
        ``file``, ``format``, ``revision``, ``bytes`` and ``rows`` per table.

    Raises
    ------
    BackupError
        For an unknown format, a file that exists (without ``force``), or a folder
        that cannot be written. A failed backup leaves no file behind.
    """
    fmt = (fmt or ("sqlite" if store.dialect == "sqlite" else "jsonl")).strip().lower()
    if fmt not in FORMATS:
        raise BackupError(f"--format {fmt}: expected sqlite or jsonl")
    if fmt == "sqlite" and store.dialect != "sqlite":
        raise BackupError("a sqlite-format backup needs a SQLite inventory", "use --format jsonl")
    target = Path(file).expanduser()
    if target.exists() and not force:
        raise BackupError(f"{file} exists", "choose another name, or pass --force to replace it")
    if not target.parent.is_dir():
        raise BackupError(f"cannot write {file}: no folder {target.parent}")
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=".kitbin-backup-", dir=target.parent)
    except OSError as e:
        raise BackupError(f"cannot write {file}: {e.strerror}") from e
    tmp = Path(tmp_name)
    try:
        if fmt == "sqlite":
            os.close(fd)
            tmp.unlink()  # sqlite3 creates the file itself; keep it private
            old = os.umask(0o077)
            try:
                store_dump.sqlite_backup(store, tmp)
            finally:
                os.umask(old)
            rows, revision = _sqlite_counts(tmp)
        else:
            with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as out:
                rows, revision = _write_jsonl(store, out)
                out.flush()
                os.fsync(out.fileno())
        os.chmod(tmp, 0o600)
        os.replace(tmp, target)
    except BaseException as e:
        tmp.unlink(missing_ok=True)
        if isinstance(e, OSError):
            raise BackupError(f"cannot write {file}: {e.strerror}") from e
        raise
    return {
        "file": str(target),
        "format": fmt,
        "revision": revision,
        "bytes": target.stat().st_size,
        "rows": rows,
    }


def _write_jsonl(store: Store, out: TextIO) -> tuple[dict[str, int], str]:
    rows: dict[str, int] = {}
    with store_dump.snapshot(store) as (revision, tables):
        header = {
            "format": MAGIC,
            "version": VERSION,
            "revision": revision,
            "source": store.dialect,
            "created_at": dt.datetime.now(dt.UTC).isoformat(),
        }
        out.write(json.dumps(header) + "\n")
        for spec, table_rows in tables:
            out.write(
                json.dumps({"table": spec.name, "columns": spec.columns, "kinds": spec.kinds})
                + "\n"
            )
            n = 0
            for row in table_rows:
                values = [_encode(v, k) for v, k in zip(row, spec.kinds, strict=True)]
                out.write(json.dumps(values, ensure_ascii=False) + "\n")
                n += 1
            rows[spec.name] = n
        out.write(json.dumps({"end": True, "rows": rows}) + "\n")
    return rows, revision


def _sqlite_counts(path: Path) -> tuple[dict[str, int], str]:
    rows: dict[str, int] = {}
    with store_dump.read_sqlite_file(path) as (revision, tables):
        for spec, table_rows in tables:
            rows[spec.name] = sum(1 for _ in table_rows)
    return rows, revision


# -- restore ---------------------------------------------------------------------------


def detect_format(file: str) -> str:
    """``sqlite`` or ``jsonl`` from a backup file's first bytes.

    Raises
    ------
    NotFoundError
        When there is no such file.
    BackupError
        When it is neither.
    """
    path = Path(file).expanduser()
    if not path.is_file():
        raise NotFoundError(f"no backup file '{file}'")
    with path.open("rb") as f:
        start = f.read(256)
    if start.startswith(_SQLITE_HEADER):
        return "sqlite"
    if start.lstrip().startswith(b"{") and MAGIC.encode() in start:
        return "jsonl"
    raise BackupError(f"{file} is not a kitbin backup (neither a SQLite file nor a kitbin dump)")


def restore(file: str, db: str | None) -> dict:
    """Restore a backup into an empty database (``db`` as given to ``--db``).

    Returns
    -------
    dict
        ``file``, ``format``, ``revision`` (of the backup), ``rows`` per table.

    Raises
    ------
    BackupError, StoreError
        For a file that is not a complete kitbin backup, a target that is not
        empty, or rows the database refuses. The target is left empty.
    """
    fmt = detect_format(file)
    path = Path(file).expanduser()
    if fmt == "sqlite":
        with store_dump.read_sqlite_file(path) as (revision, tables):
            counts = store_dump.load(db, revision, tables)
    else:
        with path.open("r", encoding="utf-8") as f:
            revision, tables, ends = _read_jsonl(f, file)
            counts = store_dump.load(db, revision, tables)
            expected = ends()
        if expected != counts:
            raise BackupError(f"{file}: the row counts differ from its last line")
    return {"file": file, "format": fmt, "revision": revision, "rows": counts}


def _read_jsonl(f: TextIO, file: str):
    """Parse a dump lazily: (revision, iterator of (spec, rows), end-check callable)."""
    lines = _numbered(f, file)
    try:
        _, header = next(lines)
    except StopIteration:
        raise BackupError(f"{file} is empty") from None
    if not isinstance(header, dict) or header.get("format") != MAGIC:
        raise BackupError(f"{file}: line 1 is not a kitbin backup header")
    if header.get("version") != VERSION:
        raise BackupError(f"{file}: backup format version {header.get('version')} is not {VERSION}")
    revision = str(header.get("revision") or "")
    state: dict[str, Any] = {"end": None, "pending": None}

    def tables() -> Iterator[tuple[store_dump.TableSpec, Iterator[tuple]]]:
        while True:
            if state["pending"] is not None:
                line_no, item = state["pending"]
                state["pending"] = None
            else:
                try:
                    line_no, item = next(lines)
                except StopIteration:
                    raise BackupError(f"{file} ends early: it is incomplete") from None
            if isinstance(item, dict) and item.get("end") is True:
                state["end"] = item.get("rows")
                return
            if not (isinstance(item, dict) and "table" in item):
                raise BackupError(f"{file}: line {line_no}: expected a table line")
            spec = _spec(item, file, line_no)
            yield spec, rows(spec)

    def rows(spec: store_dump.TableSpec) -> Iterator[tuple]:
        for line_no, item in lines:
            if isinstance(item, dict):
                state["pending"] = (line_no, item)
                return
            if not isinstance(item, list) or len(item) != len(spec.columns):
                raise BackupError(
                    f"{file}: line {line_no}: expected {len(spec.columns)} values "
                    f"for table {spec.name}"
                )
            try:
                yield tuple(_decode(v, k) for v, k in zip(item, spec.kinds, strict=True))
            except (ValueError, TypeError) as e:
                raise BackupError(f"{file}: line {line_no}: bad value ({e})") from None
        raise BackupError(f"{file} ends early: it is incomplete")

    def ends() -> dict[str, int] | None:
        return state["end"]

    return revision, tables(), ends


def _spec(item: dict, file: str, line_no: int) -> store_dump.TableSpec:
    columns, kinds = item.get("columns"), item.get("kinds")
    if (
        not isinstance(item.get("table"), str)
        or not isinstance(columns, list)
        or not isinstance(kinds, list)
        or len(columns) != len(kinds)
        or not all(isinstance(c, str) for c in columns)
        or not all(k in store_dump.KINDS for k in kinds)
    ):
        raise BackupError(f"{file}: line {line_no}: a table line needs columns and kinds")
    return store_dump.TableSpec(item["table"], tuple(columns), tuple(kinds))


def _numbered(f: TextIO, file: str) -> Iterator[tuple[int, Any]]:
    line_no = 0
    while True:
        try:
            line = f.readline()
        except UnicodeDecodeError:
            raise BackupError(f"{file}: line {line_no + 1} is not UTF-8 text") from None
        if not line:
            return
        line_no += 1
        if not line.strip():
            continue
        try:
            yield line_no, json.loads(line)
        except json.JSONDecodeError:
            raise BackupError(f"{file}: line {line_no} is not JSON") from None


__all__ = ["FORMATS", "BackupError", "backup", "detect_format", "restore"]
