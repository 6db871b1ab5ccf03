"""Engines, the schema check and the one unit of work: :class:`Store`.

SQLite runs with WAL, a 10 s busy timeout, foreign keys on, ``synchronous=NORMAL``
and ``BEGIN IMMEDIATE`` for every transaction: Python 3.11's sqlite3 sends no
BEGIN before a SELECT, so without it a read-then-write upgrades a read lock and
fails with "database is locked" under concurrency (measured: 1031 escaped errors
in 1600 attempts; none with BEGIN IMMEDIATE). PostgreSQL goes through psycopg 3.

Typical use::

    from kitbin.store import open_store
    store = open_store(url)                 # creates a new SQLite file at head
    with store.transaction() as session:    # commit on success, rollback on error
        session.add(...)
"""

from __future__ import annotations

import contextlib
import functools
import os
import re
from collections.abc import Iterator
from pathlib import Path
from typing import TYPE_CHECKING

from sqlalchemy import create_engine, event, inspect, text
from sqlalchemy.exc import SQLAlchemyError
from sqlalchemy.orm import Session, sessionmaker

from kitbin.errors import KitbinError, StoreError
from kitbin.store.locate import mask_url, password_of, resolve_url, sqlite_path

if TYPE_CHECKING:
    from sqlalchemy.engine import Connection, Engine

#: How long a write waits for another writer's lock before giving up (both backends).
LOCK_TIMEOUT_MS = 10000
SQLITE_PRAGMAS = ("journal_mode=WAL", f"busy_timeout={LOCK_TIMEOUT_MS}", "synchronous=NORMAL")
MIGRATIONS_DIR = Path(__file__).parent / "migrations"
#: Tables every kitbin schema has; a database holding other tables but no
#: revision is not ours and is left alone.
_VERSION_TABLE = "alembic_version"


def driver_message(error: BaseException, url: str = "") -> str:
    """The first line of a driver error, with any password from ``url`` scrubbed."""
    orig = getattr(error, "orig", None) or error
    line = (str(orig).strip().splitlines() or [type(orig).__name__])[0]
    secret = password_of(url) if url else ""
    if secret:
        from urllib.parse import unquote

        # The driver sees the password %-decoded; scrub both spellings.
        for spelling in sorted({secret, unquote(secret)}, key=len, reverse=True):
            line = line.replace(spelling, "***")
    return line


def is_busy(error: BaseException) -> bool:
    """True for a lock that was not granted in time (SQLite busy, PostgreSQL lock timeout,
    deadlock or serialisation failure): the work was rolled back and may be tried again."""
    orig = getattr(error, "orig", None) or error
    if type(orig).__name__ in ("LockNotAvailable", "DeadlockDetected", "SerializationFailure"):
        return True
    return "database is locked" in str(orig) or "database is busy" in str(orig)


def busy_error(error: BaseException, url: str) -> StoreError:
    """The one line shown when a lock was not granted in time."""
    return StoreError(
        f"the database is busy: another user held a lock for over {LOCK_TIMEOUT_MS / 1000:g} s "
        f"({driver_message(error, url)}); nothing was changed",
        "try again",
    )


def make_engine(url: str, *, foreign_keys: bool = True) -> Engine:
    """An engine for a resolved URL, with kitbin's SQLite settings.

    Parameters
    ----------
    url
        A SQLAlchemy URL (see :func:`kitbin.store.locate.resolve_url`).
    foreign_keys
        SQLite only: enforce foreign keys. Migrations turn this off, because a
        batch table rebuild drops and recreates tables that others refer to.
    """
    netloc = url.split("://", 1)[-1].split("/", 1)[0]
    if not url.startswith("sqlite") and netloc.count("@") > 1:
        # The driver would take part of the password for the host name and echo it.
        raise StoreError(
            f"cannot use database {mask_url(url)}: more than one '@' before the host",
            "write an '@' inside a user name or password as %40",
        )
    try:
        if url.startswith("sqlite"):
            return _sqlite_engine(url, foreign_keys=foreign_keys)
        if url.startswith("postgresql"):
            connect_args: dict = {"connect_timeout": 10}
            if "options=" not in url:
                # Wait at most as long as SQLite's busy timeout for a row lock.
                connect_args["options"] = f"-c lock_timeout={LOCK_TIMEOUT_MS}"
            return create_engine(url, pool_pre_ping=True, connect_args=connect_args)
        return create_engine(url)
    except (SQLAlchemyError, ImportError, ValueError) as e:
        raise StoreError(
            f"cannot use database {mask_url(url)}: {driver_message(e, url)}",
            "give --db a file path, sqlite:///FILE or postgresql://USER@HOST/DB",
        ) from e


def _sqlite_engine(url: str, *, foreign_keys: bool) -> Engine:
    kwargs: dict = {}
    if sqlite_path(url) is None:  # in memory: one shared connection
        from sqlalchemy.pool import StaticPool

        kwargs = {"poolclass": StaticPool, "connect_args": {"check_same_thread": False}}
    engine = create_engine(url, **kwargs)
    pragmas = (*SQLITE_PRAGMAS, f"foreign_keys={'ON' if foreign_keys else 'OFF'}")

    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_conn, _record) -> None:
        dbapi_conn.isolation_level = None  # BEGIN is ours (see _on_begin)
        cur = dbapi_conn.cursor()
        for pragma in pragmas:
            cur.execute(f"PRAGMA {pragma}")
        cur.close()

    @event.listens_for(engine, "begin")
    def _on_begin(conn) -> None:
        conn.exec_driver_sql("BEGIN IMMEDIATE")

    return engine


def _create_sqlite_file(path: Path) -> bool:
    """Create an empty SQLite file readable by its owner only; True if it was new."""
    if path.exists() and path.stat().st_size > 0:
        return False
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        fd = os.open(path, os.O_CREAT | os.O_WRONLY, 0o600)
        os.close(fd)
        os.chmod(path, 0o600)
    except OSError as e:
        raise StoreError(f"cannot create database file {path}: {e.strerror}") from e
    return True


@functools.lru_cache(maxsize=1)
def _script():  # -> alembic.script.ScriptDirectory
    from alembic.script import ScriptDirectory

    return ScriptDirectory(str(MIGRATIONS_DIR))


_REVISION = re.compile(r"^revision\s*=\s*[\"']([^\"']+)[\"']", re.M)
_DOWN = re.compile(r"^down_revision\s*=\s*(?:None|[\"']([^\"']+)[\"'])", re.M)


@functools.lru_cache(maxsize=1)
def _revisions() -> dict[str, str | None]:
    """Revision -> the one before it, read from the revision files as text.

    Checking a database's revision on every command this way avoids importing
    Alembic (~100 ms measured here); the migrations themselves still run through
    Alembic. A file this cannot read makes the caller fall back to Alembic.
    """
    found: dict[str, str | None] = {}
    for file in sorted((MIGRATIONS_DIR / "versions").glob("*.py")):
        if file.name.startswith("_"):
            continue
        text = file.read_text(encoding="utf-8")
        rev, down = _REVISION.search(text), _DOWN.search(text)
        if rev is None or down is None:
            return {}
        found[rev.group(1)] = down.group(1)
    return found


def head_revision() -> str:
    """The newest schema revision this kitbin knows."""
    chain = _revisions()
    heads = set(chain) - {d for d in chain.values() if d}
    if len(heads) == 1:
        return heads.pop()
    head = _script().get_current_head()
    assert head is not None
    return head


def _alembic_config(connection: Connection):  # -> alembic.config.Config
    from alembic.config import Config

    cfg = Config()
    cfg.set_main_option("script_location", str(MIGRATIONS_DIR).replace("%", "%%"))
    cfg.attributes["connection"] = connection
    return cfg


def current_revision(connection: Connection) -> str | None:
    """The schema revision stored in a database, or None when it has none.

    Raises
    ------
    StoreError
        When the database holds tables but no kitbin revision.
    """
    tables = set(inspect(connection).get_table_names())
    if _VERSION_TABLE not in tables:
        if tables:
            raise StoreError(
                "this database has tables but no kitbin schema revision; "
                "it is not a kitbin inventory",
                "give --db another file or an empty database",
            )
        return None
    row = connection.execute(text("SELECT version_num FROM alembic_version")).first()
    return row[0] if row else None


def _is_known(revision: str) -> bool:
    if revision in _revisions():
        return True
    from alembic.util import CommandError

    try:
        return _script().get_revision(revision) is not None
    except CommandError:
        return False


def init_database(url: str | None = None) -> str:
    """Create a database, or upgrade it to the newest schema revision.

    Parameters
    ----------
    url
        ``--db`` text (URL or SQLite path); None means ``KITBIN_DB`` or the default.

    Returns
    -------
    str
        The revision the database is now at.
    """
    resolved = resolve_url(url)
    path = sqlite_path(resolved)
    if path is not None:
        _create_sqlite_file(path)
    engine = make_engine(resolved, foreign_keys=False)
    try:
        _upgrade(engine, resolved)
    finally:
        engine.dispose()
    return head_revision()


def _upgrade(engine: Engine, url: str) -> None:
    from alembic import command

    try:
        with engine.begin() as conn:
            revision = current_revision(conn)
            if revision is not None and not _is_known(revision):
                raise _newer_error(revision)
            command.upgrade(_alembic_config(conn), "head")
            if conn.dialect.name == "sqlite":
                broken = conn.exec_driver_sql("PRAGMA foreign_key_check").fetchall()
                if broken:
                    raise StoreError(
                        f"the upgrade left {len(broken)} broken references; nothing was changed"
                    )
    except KitbinError:
        raise
    except SQLAlchemyError as e:
        raise StoreError(
            f"cannot create or upgrade database {mask_url(url)}: {driver_message(e, url)}"
        ) from e


def _newer_error(revision: str) -> StoreError:
    return StoreError(
        f"the database is at schema revision {revision}, newer than this kitbin "
        f"knows ({head_revision()})",
        "upgrade kitbin",
    )


class Store:
    """An open database: its engine and one way to run a unit of work.

    Use :func:`open_store` to get one; it checks the schema first.
    """

    def __init__(self, url: str, engine: Engine) -> None:
        self.url = url
        self.engine = engine
        self._sessions = sessionmaker(engine, expire_on_commit=False)

    @property
    def masked_url(self) -> str:
        """The URL with any password hidden, safe to print."""
        return mask_url(self.url)

    @property
    def dialect(self) -> str:
        """``"sqlite"`` or ``"postgresql"``."""
        return self.engine.dialect.name

    @contextlib.contextmanager
    def transaction(self) -> Iterator[Session]:
        """One unit of work: commit when the block ends, roll back on any error.

        Driver errors become :class:`kitbin.errors.StoreError`; kitbin errors
        raised inside the block pass through unchanged (after the rollback).
        Objects stay usable after the commit (``expire_on_commit=False``).
        """
        session = self._sessions()
        try:
            with session.begin():
                yield session
        except KitbinError:
            raise
        except OverflowError as e:  # sqlite3 refuses Python ints beyond 64 bits
            raise StoreError(
                "a whole number is too large to store (largest 9223372036854775807); "
                "nothing was changed"
            ) from e
        except SQLAlchemyError as e:
            if is_busy(e):
                raise busy_error(e, self.url) from e
            raise StoreError(f"database error: {driver_message(e, self.url)}") from e
        finally:
            session.close()

    def close(self) -> None:
        """Release the engine's connections."""
        self.engine.dispose()

    def __enter__(self) -> Store:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()


def open_store(url: str | None = None, *, create: bool = True) -> Store:
    """Open the inventory, checking that its schema is current.

    Parameters
    ----------
    url
        ``--db`` text (URL or SQLite path); None means ``KITBIN_DB`` or the default.
    create
        Create the schema at the newest revision when the database is new (a
        missing or empty SQLite file, or an empty PostgreSQL database).

    Raises
    ------
    StoreError
        When the database is at an older revision (the fix is ``kitbin init``),
        at a newer one, not a kitbin database, or cannot be opened.
    """
    resolved = resolve_url(url)
    path = sqlite_path(resolved)
    if path is not None and create:
        _create_sqlite_file(path)
    elif path is not None and not path.exists():
        raise StoreError(f"no database at {path}", "run `kitbin init` to create one")
    engine = make_engine(resolved)
    try:
        with engine.connect() as conn:
            revision = current_revision(conn)
            conn.rollback()
    except KitbinError:
        engine.dispose()
        raise
    except SQLAlchemyError as e:
        engine.dispose()
        if is_busy(e):
            raise busy_error(e, resolved) from e
        raise StoreError(
            f"cannot open database {mask_url(resolved)}: {driver_message(e, resolved)}"
        ) from e
    head = head_revision()
    if revision is None:
        if not create:
            engine.dispose()
            raise StoreError(
                f"the database {mask_url(resolved)} is empty", "run `kitbin init` to create it"
            )
        if resolved.startswith("sqlite") and path is None:
            _upgrade(engine, resolved)  # in memory: a second engine would see another database
        else:
            engine.dispose()
            init_database(resolved)
            engine = make_engine(resolved)
    elif revision != head:
        engine.dispose()
        if not _is_known(revision):
            raise _newer_error(revision)
        raise StoreError(
            f"the database is at schema revision {revision}, older than this kitbin "
            f"({head}); run `kitbin init` to upgrade it"
        )
    return Store(resolved, engine)


def has_data(url: str | None = None) -> bool:
    """True when the database exists and holds any table (kitbin's or not)."""
    resolved = resolve_url(url)
    path = sqlite_path(resolved)
    if path is not None and (not path.exists() or path.stat().st_size == 0):
        return False
    engine = make_engine(resolved)
    try:
        with engine.connect() as conn:
            return bool(inspect(conn).get_table_names())
    except SQLAlchemyError as e:
        raise StoreError(
            f"cannot open database {mask_url(resolved)}: {driver_message(e, resolved)}"
        ) from e
    finally:
        engine.dispose()


def reset_database(url: str | None = None) -> None:
    """Remove everything: delete a SQLite file, or drop every table of another database.

    Only for the demo's own file or a database the user named with ``--force``.
    """
    resolved = resolve_url(url)
    path = sqlite_path(resolved)
    if path is not None:
        for suffix in ("", "-wal", "-shm", "-journal"):
            candidate = path.with_name(path.name + suffix)
            try:
                candidate.unlink(missing_ok=True)
            except OSError as e:
                raise StoreError(f"cannot remove {candidate}: {e.strerror}") from e
        return
    from sqlalchemy import MetaData

    engine = make_engine(resolved)
    try:
        with engine.begin() as conn:
            meta = MetaData()
            meta.reflect(conn)
            meta.drop_all(conn)
    except SQLAlchemyError as e:
        raise StoreError(
            f"cannot reset database {mask_url(resolved)}: {driver_message(e, resolved)}"
        ) from e
    finally:
        engine.dispose()
