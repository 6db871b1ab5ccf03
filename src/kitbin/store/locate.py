"""Where the database is: ``--db``, else ``KITBIN_DB``, else the user data directory.

Nothing here imports SQLAlchemy, so the CLI can resolve and show a URL cheaply.
"""

from __future__ import annotations

import os
import re
from pathlib import Path

ENV_VAR = "KITBIN_DB"
DEFAULT_FILE = "kitbin.sqlite"
DEMO_FILE = "demo.sqlite"

_SCHEME = re.compile(r"^[A-Za-z][A-Za-z0-9+.\-]*://")
# user:password@ in a URL; the password part is what must never be shown. It runs to
# the last "@", so an unescaped "@" inside a password is hidden too.
_PASSWORD = re.compile(r"^([A-Za-z][A-Za-z0-9+.\-]*://[^:/@]*):(.*)@(?=[^@]*$)")


def data_dir() -> Path:
    """The user's kitbin data directory (platformdirs ``user_data_dir("kitbin")``)."""
    import platformdirs

    return Path(platformdirs.user_data_dir("kitbin", appauthor=False))


def default_url() -> str:
    """The SQLite URL of the default inventory in the user data directory."""
    return sqlite_url(data_dir() / DEFAULT_FILE)


def demo_url() -> str:
    """The SQLite URL of the demo workshop database (never the user's inventory)."""
    return sqlite_url(data_dir() / DEMO_FILE)


def sqlite_url(path: str | os.PathLike[str]) -> str:
    """``sqlite:///`` URL of a file path (made absolute, ``~`` expanded)."""
    return "sqlite:///" + str(Path(path).expanduser().resolve())


def resolve_url(db: str | None = None) -> str:
    """The database URL to use.

    Parameters
    ----------
    db
        A URL (``sqlite:///...``, ``postgresql://...``) or a plain file path meaning
        SQLite. None means ``$KITBIN_DB``, else the default file.

    Returns
    -------
    str
        A SQLAlchemy URL. ``postgresql://`` and ``postgres://`` are given the
        psycopg 3 driver (``postgresql+psycopg://``), the one installed.
    """
    text = (db or "").strip() or os.environ.get(ENV_VAR, "").strip()
    if not text:
        return default_url()
    if not _SCHEME.match(text):
        return sqlite_url(text)
    for prefix in ("postgresql://", "postgres://"):
        if text.startswith(prefix):
            return "postgresql+psycopg://" + text[len(prefix) :]
    return text


def mask_url(url: str) -> str:
    """The URL with any password replaced by ``***``, for messages and logs."""
    return _PASSWORD.sub(r"\1:***@", url)


def password_of(url: str) -> str:
    """The password in a URL, or "" (used to scrub it from driver messages)."""
    m = _PASSWORD.match(url)
    return m.group(2) if m else ""


def sqlite_path(url: str) -> Path | None:
    """The file of a SQLite URL, or None for another database or an in-memory one."""
    if not url.startswith("sqlite"):
        return None
    rest = url.split("://", 1)[1] if "://" in url else ""
    # sqlite:///relative or sqlite:////absolute; strip the query string.
    path = rest[1:] if rest.startswith("/") else rest
    path = path.split("?", 1)[0]
    if not path or path == ":memory:" or path.startswith("file::memory:"):
        return None
    return Path(path)
