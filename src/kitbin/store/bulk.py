"""Bulk writes for imports: many rows in one executemany, inside the caller's transaction."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from sqlalchemy import insert
from sqlalchemy.orm import Session

from kitbin.store.models import Reading, StockMove


def insert_readings(session: Session, rows: Sequence[dict[str, Any]]) -> int:
    """Insert readings given as column dicts (bin_id, quantity, value, bound, ...)."""
    # A Core insert on the table: the ORM bulk path costs about twice as much per row
    # (measured: 100,000 readings, 4.5 s against 2.1 s in a profile).
    if rows:
        session.execute(insert(Reading.__table__), list(rows))
    return len(rows)


def insert_moves(session: Session, rows: Sequence[dict[str, Any]]) -> int:
    """Insert stock-move log rows for bins created with their quantity already set.

    Only for new bins (an import): an existing bin's quantity changes through
    :func:`kitbin.store.stock.move_stock` alone.
    """
    if rows:
        session.execute(insert(StockMove.__table__), list(rows))
    return len(rows)
