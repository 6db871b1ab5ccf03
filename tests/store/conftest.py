"""Database backends for the store tests: SQLite always, PostgreSQL when a server is named.

Fixtures
--------
backend
    ``"sqlite"`` or ``"postgresql"``; every test asking for it (or for ``db_url``)
    runs once per backend. The PostgreSQL run skips, saying why, unless
    ``KITBIN_TEST_PG`` names a server (``.ci/run`` starts one and sets it).
db_url
    A URL of a fresh, empty database on that backend: a new SQLite file under
    ``tmp_path``, or a uniquely named PostgreSQL database created through the
    server URL and dropped after the test.
store
    :func:`kitbin.store.open_store` on ``db_url`` (schema at head), closed afterwards.

``new_database(backend, tmp_path)`` is the same as ``db_url`` for tests that need
several databases (a backup and its restore, a source and a target).
"""

from __future__ import annotations

import os
import uuid
from collections.abc import Iterator
from pathlib import Path

import pytest

PG_ENV = "KITBIN_TEST_PG"
BACKENDS = ("sqlite", "postgresql")
_PG_SKIP = (
    f"PostgreSQL tests need a server: set {PG_ENV}=postgresql+psycopg://USER@HOST:PORT/DB "
    "(.ci/run starts a throwaway one)"
)


def pg_server_url() -> str | None:
    """The PostgreSQL server URL from ``KITBIN_TEST_PG``, or None."""
    return os.environ.get(PG_ENV, "").strip() or None


def _admin_engine():
    from sqlalchemy import create_engine

    from kitbin.store import resolve_url

    server = pg_server_url()
    assert server is not None
    return create_engine(resolve_url(server), isolation_level="AUTOCOMMIT")


class _Databases:
    """Creates throwaway databases and drops them when the test ends."""

    def __init__(self, tmp_path: Path) -> None:
        self.tmp_path = tmp_path
        self.pg_names: list[str] = []

    def new(self, backend: str) -> str:
        if backend == "sqlite":
            return "sqlite:///" + str(self.tmp_path / f"kitbin-{uuid.uuid4().hex[:8]}.sqlite")
        from sqlalchemy import text
        from sqlalchemy.engine import make_url

        from kitbin.store import resolve_url

        name = f"kitbin_t_{uuid.uuid4().hex[:12]}"
        engine = _admin_engine()
        try:
            with engine.connect() as conn:
                # The name is made here from hex digits only; identifiers cannot be bound.
                conn.execute(text(f'CREATE DATABASE "{name}"'))
        finally:
            engine.dispose()
        self.pg_names.append(name)
        url = make_url(resolve_url(pg_server_url())).set(database=name)
        return url.render_as_string(hide_password=False)

    def drop_all(self) -> None:
        if not self.pg_names:
            return
        from sqlalchemy import text

        engine = _admin_engine()
        try:
            with engine.connect() as conn:
                for name in self.pg_names:
                    conn.execute(text(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)'))
        finally:
            engine.dispose()


@pytest.fixture(params=BACKENDS)
def backend(request: pytest.FixtureRequest) -> str:
    """The backend of this run: ``sqlite``, or ``postgresql`` when a server is named."""
    if request.param == "postgresql" and pg_server_url() is None:
        pytest.skip(_PG_SKIP)
    return request.param


@pytest.fixture
def databases(tmp_path: Path) -> Iterator[_Databases]:
    """A factory of fresh databases: ``databases.new(backend)`` returns a URL."""
    factory = _Databases(tmp_path)
    yield factory
    factory.drop_all()


@pytest.fixture(scope="module", params=BACKENDS)
def module_backend(request: pytest.FixtureRequest) -> str:
    """Like ``backend``, for module-scoped fixtures (one costly set-up per backend)."""
    if request.param == "postgresql" and pg_server_url() is None:
        pytest.skip(_PG_SKIP)
    return request.param


@pytest.fixture(scope="module")
def module_databases(tmp_path_factory: pytest.TempPathFactory) -> Iterator[_Databases]:
    """Like ``databases``, kept for a whole test module."""
    factory = _Databases(tmp_path_factory.mktemp("dbs"))
    yield factory
    factory.drop_all()


@pytest.fixture
def db_url(backend: str, databases: _Databases) -> str:
    """A URL of a fresh, empty database on this run's backend."""
    return databases.new(backend)


@pytest.fixture
def store(db_url: str):
    """An open :class:`kitbin.store.Store` on a fresh database, schema at head."""
    from kitbin.store import open_store

    opened = open_store(db_url)
    yield opened
    opened.close()
