"""Alembic environment: runs revisions on the connection kitbin hands over.

:func:`kitbin.store.engine.init_database` passes an open connection in
``config.attributes["connection"]``. A developer can also run alembic by hand with
``-x url=sqlite:///path`` or ``sqlalchemy.url`` set. SQLite ALTERs go through batch
mode (table rebuilds).
"""

from __future__ import annotations

from alembic import context

from kitbin.store.models import Base

config = context.config
target_metadata = Base.metadata


def _configure(connection) -> None:
    context.configure(
        connection=connection,
        target_metadata=target_metadata,
        render_as_batch=connection.dialect.name == "sqlite",
        compare_type=True,
    )
    with context.begin_transaction():
        context.run_migrations()


def _url() -> str:
    from kitbin.store.locate import resolve_url

    return resolve_url(
        context.get_x_argument(as_dictionary=True).get("url")
        or config.get_main_option("sqlalchemy.url")
    )


def run_offline() -> None:
    """Emit SQL text instead of running it."""
    context.configure(url=_url(), target_metadata=target_metadata, literal_binds=True)
    with context.begin_transaction():
        context.run_migrations()


def run_online() -> None:
    """Run the revisions on the given connection, or on a new engine."""
    connection = config.attributes.get("connection")
    if connection is not None:
        _configure(connection)
        return
    from kitbin.store.engine import make_engine

    engine = make_engine(_url(), foreign_keys=False)
    try:
        with engine.begin() as conn:
            _configure(conn)
    finally:
        engine.dispose()


if context.is_offline_mode():
    run_offline()
else:
    run_online()
