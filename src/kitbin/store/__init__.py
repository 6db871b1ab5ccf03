"""Storage: SQLAlchemy models, engines, the schema check, stock moves.

The only package that imports SQLAlchemy. Open the inventory with
:func:`open_store` and run work in ``with store.transaction() as session:``.
"""

from __future__ import annotations

from kitbin.store.engine import Store, head_revision, init_database, make_engine, open_store
from kitbin.store.locate import default_url, demo_url, mask_url, resolve_url

__all__ = [
    "Store",
    "default_url",
    "demo_url",
    "head_revision",
    "init_database",
    "make_engine",
    "mask_url",
    "open_store",
    "resolve_url",
]
