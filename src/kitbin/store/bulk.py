"""Bulk writes for imports: many rows in one executemany, inside the caller's transaction."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from sqlalchemy import insert
from sqlalchemy.orm import Session

from kitbin.store.models import Reading, StockMove


def insert_readings(session: Session, rows: Sequence[dict[str, Any]]) -> int:
    """Insert readings given as column dicts (bin_id, quantity, value, bound, ...)."""
    if rows:
        session.execute(insert(Reading), list(rows))
    return len(rows)


def insert_moves(session: Session, rows: Sequence[dict[str, Any]]) -> int:
    """Insert stock-move log rows for bins created with their quantity already set.

    Only for new bins (an import): an existing bin's quantity changes through
    :func:`kitbin.store.stock.move_stock` alone.
    """
    if rows:
        session.execute(insert(StockMove), list(rows))
    return len(rows)
