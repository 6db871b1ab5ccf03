"""Set-based reads for the matcher, and the pick-list queries.

The matcher judges every stocked bin of a role's kinds, so it loads bins, readings,
properties and L(i) curves with one query each (only the kinds and quantities it
needs), never one query per bin. Each function returns plain tuples grouped by
column, ready for numpy. Bound parameters only.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from typing import Any

from sqlalchemy import func, select, update
from sqlalchemy.orm import Session, selectinload

from kitbin.store.models import Bin, BinProperty, Capture, Kit, PickList, Plan, Reading, utcnow


def _columns(rows: Sequence[Sequence[Any]], width: int) -> list[tuple[Any, ...]]:
    if not rows:
        return [() for _ in range(width)]
    return list(zip(*rows, strict=True))


def candidate_bins(session: Session, kinds: Iterable[str]) -> list[tuple[Any, ...]]:
    """Columns (id, label, kind, nominal, tol_minus, tol_plus, qty, qty_reserved), by id."""
    stmt = (
        select(
            Bin.id,
            Bin.label,
            Bin.kind,
            Bin.nominal,
            Bin.tol_minus,
            Bin.tol_plus,
            Bin.qty,
            Bin.qty_reserved,
        )
        .where(Bin.kind.in_(list(kinds)))
        .order_by(Bin.id)
    )
    return _columns(session.execute(stmt).all(), 8)


def reading_rows(
    session: Session, kinds: Iterable[str], quantities: Iterable[str]
) -> list[tuple[Any, ...]]:
    """Columns (bin_id, quantity, value, bound) of readings on bins of these kinds."""
    stmt = (
        select(Reading.bin_id, Reading.quantity, Reading.value, Reading.bound)
        .join(Bin, Bin.id == Reading.bin_id)
        .where(Bin.kind.in_(list(kinds)), Reading.quantity.in_(list(quantities)))
    )
    return _columns(session.execute(stmt).all(), 4)


def property_rows(
    session: Session, kinds: Iterable[str], names: Iterable[str]
) -> list[tuple[Any, ...]]:
    """Columns (bin_id, name, value, source) of properties on bins of these kinds."""
    stmt = (
        select(BinProperty.bin_id, BinProperty.name, BinProperty.value, BinProperty.source)
        .join(Bin, Bin.id == BinProperty.bin_id)
        .where(Bin.kind.in_(list(kinds)), BinProperty.name.in_(list(names)))
        .order_by(BinProperty.id)
    )
    return _columns(session.execute(stmt).all(), 4)


def curve_rows(session: Session, kinds: Iterable[str]) -> list[tuple[int, dict[str, Any]]]:
    """(bin_id, curve) of every capture with a stored curve on bins of these kinds,
    oldest first (a later capture of the same bin replaces an earlier one)."""
    stmt = (
        select(Capture.bin_id, Capture.curve)
        .join(Bin, Bin.id == Capture.bin_id)
        .where(Bin.kind.in_(list(kinds)), Capture.curve.is_not(None))
        .order_by(Capture.id)
    )
    return [(int(b), c) for b, c in session.execute(stmt).all() if c]


_DETAIL_KEYS = (
    "id",
    "label",
    "kind",
    "nominal",
    "tol_minus",
    "tol_plus",
    "marking",
    "package",
    "location",
    "kit",
    "qty",
    "qty_reserved",
)


def bin_details(session: Session, ids: Iterable[int]) -> dict[int, dict[str, Any]]:
    """Display fields of a few bins by id (keys of ``_DETAIL_KEYS``; ``kit`` is its name)."""
    id_list = sorted({int(i) for i in ids})
    if not id_list:
        return {}
    stmt = (
        select(
            Bin.id,
            Bin.label,
            Bin.kind,
            Bin.nominal,
            Bin.tol_minus,
            Bin.tol_plus,
            Bin.marking,
            Bin.package,
            Bin.location,
            Kit.name,
            Bin.qty,
            Bin.qty_reserved,
        )
        .outerjoin(Kit, Kit.id == Bin.kit_id)
        .where(Bin.id.in_(id_list))
    )
    return {int(r[0]): dict(zip(_DETAIL_KEYS, r, strict=True)) for r in session.execute(stmt)}


def bin_id_for_label(session: Session, label: str) -> int | None:
    """The id of the bin with this label (exact, then case-insensitive), or None."""
    text = label.strip()
    found = session.scalars(select(Bin.id).where(Bin.label == text)).first()
    if found is None:
        found = session.scalars(select(Bin.id).where(func.lower(Bin.label) == text.lower())).first()
    return found


def plan_by_name(session: Session, name: str) -> Plan | None:
    """The saved plan with this name, or None."""
    return session.scalars(select(Plan).where(Plan.name == name.strip())).first()


def pick_lists(session: Session, states: Iterable[str] | None = None) -> Sequence[PickList]:
    """Pick lists, newest first, with their plan and lines loaded."""
    stmt = (
        select(PickList)
        .options(selectinload(PickList.plan), selectinload(PickList.lines))
        .order_by(PickList.id.desc())
    )
    if states is not None:
        stmt = stmt.where(PickList.state.in_(list(states)))
    return session.scalars(stmt).all()


def pick_list(session: Session, pick_id: int) -> PickList | None:
    """One pick list with its lines and plan (``FOR UPDATE`` on PostgreSQL; an SQLite
    transaction here already holds the write lock, it begins IMMEDIATE)."""
    stmt = (
        select(PickList)
        .options(selectinload(PickList.lines), selectinload(PickList.plan))
        .where(PickList.id == pick_id)
        .with_for_update()
    )
    return session.scalars(stmt).first()


def set_pick_state(session: Session, pick_id: int, old: str, new: str) -> bool:
    """Move a pick list from state ``old`` to ``new`` by one conditional UPDATE.

    Returns False when the list is no longer in ``old`` (another bench got there
    first), so each state change, and the stock moves that go with it, happen once.
    """
    result = session.execute(
        update(PickList)
        .where(PickList.id == pick_id, PickList.state == old)
        .values(state=new, updated_at=utcnow())
    )
    return result.rowcount == 1


__all__ = [
    "bin_details",
    "bin_id_for_label",
    "candidate_bins",
    "curve_rows",
    "pick_list",
    "pick_lists",
    "plan_by_name",
    "property_rows",
    "reading_rows",
    "set_pick_state",
]
