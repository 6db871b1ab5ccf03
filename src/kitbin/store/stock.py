"""Stock moves and reservations, each one conditional UPDATE.

A quantity never changes by read-modify-write: two benches picking at once would
lose a move (measured: 8 processes x 200 takes from a stock of 1000 ended at 492
instead of 0 with ORM read-modify-write; exact with one conditional UPDATE). Each
function here runs one ``UPDATE ... WHERE <the move is allowed>`` and looks at the
row count; the move log row goes in the same transaction, so a bin's quantity and
its log never disagree.

Invariants kept by the WHERE clauses (and by CHECK constraints as a backstop):
``qty >= 0`` and ``0 <= qty_reserved <= qty``.
"""

from __future__ import annotations

from dataclasses import dataclass

from sqlalchemy import select, update
from sqlalchemy.orm import Session

from kitbin.errors import NotFoundError, StockError
from kitbin.store.models import Bin, StockMove, utcnow


@dataclass(frozen=True)
class MoveResult:
    """What a stock move did: the bin's quantities right after it."""

    bin_id: int
    label: str
    delta: int
    qty: int
    qty_reserved: int
    move_id: int | None = None


def _state(session: Session, bin_id: int) -> tuple[str, int, int]:
    row = session.execute(
        select(Bin.label, Bin.qty, Bin.qty_reserved).where(Bin.id == bin_id)
    ).first()
    if row is None:
        raise NotFoundError(f"no bin with id {bin_id}")
    return row[0], int(row[1]), int(row[2])


def move_stock(
    session: Session,
    bin_id: int,
    delta: int,
    reason: str,
    pick_list_id: int | None = None,
) -> MoveResult:
    """Change a bin's quantity by ``delta`` and log the move, atomically.

    The quantity can go neither below zero nor below what is reserved.

    Parameters
    ----------
    session
        An open session inside ``store.transaction()``.
    bin_id
        The bin's id.
    delta
        Parts added (positive) or taken (negative); zero is refused.
    reason
        Why, in words ("counted", "used on board 3").
    pick_list_id
        The pick list the move belongs to, if any.

    Raises
    ------
    StockError
        When the move would take more than is free, e.g. "L-07 has 3 on hand
        (1 reserved); cannot take 5". Nothing is changed.
    NotFoundError
        When there is no such bin.
    """
    delta = int(delta)
    if delta == 0:
        raise StockError("a stock move of 0 changes nothing", "give a positive or negative count")
    if not reason or not reason.strip():
        raise StockError("a stock move needs a reason", "say why with --why")
    result = session.execute(
        update(Bin)
        .where(Bin.id == bin_id, Bin.qty + delta >= Bin.qty_reserved, Bin.qty + delta >= 0)
        .values(qty=Bin.qty + delta, updated_at=utcnow())
        .returning(Bin.label, Bin.qty, Bin.qty_reserved)
    ).first()
    if result is None:
        label, qty, reserved = _state(session, bin_id)
        held = f" ({reserved} reserved)" if reserved else ""
        raise StockError(f"{label} has {qty} on hand{held}; cannot take {-delta}")
    label, qty, reserved = result[0], int(result[1]), int(result[2])
    move = StockMove(
        bin_id=bin_id,
        delta=delta,
        reason=reason.strip(),
        pick_list_id=pick_list_id,
        qty_after=qty,
        at=utcnow(),
    )
    session.add(move)
    session.flush()
    _expire(session, bin_id)
    return MoveResult(bin_id, label, delta, qty, reserved, move.id)


def reserve(session: Session, bin_id: int, n: int) -> MoveResult:
    """Set ``n`` parts aside (for a pick list) without taking them.

    Raises
    ------
    StockError
        When fewer than ``n`` parts are free (on hand minus reserved).
    """
    n = _positive(n, "reserve")
    result = session.execute(
        update(Bin)
        .where(Bin.id == bin_id, Bin.qty_reserved + n <= Bin.qty)
        .values(qty_reserved=Bin.qty_reserved + n, updated_at=utcnow())
        .returning(Bin.label, Bin.qty, Bin.qty_reserved)
    ).first()
    if result is None:
        label, qty, reserved = _state(session, bin_id)
        raise StockError(
            f"{label} has {qty - reserved} free ({qty} on hand, {reserved} reserved); "
            f"cannot reserve {n}"
        )
    _expire(session, bin_id)
    return MoveResult(bin_id, result[0], 0, int(result[1]), int(result[2]))


def release(session: Session, bin_id: int, n: int) -> MoveResult:
    """Give back ``n`` reserved parts (a cancelled pick list).

    Raises
    ------
    StockError
        When fewer than ``n`` parts are reserved.
    """
    n = _positive(n, "release")
    result = session.execute(
        update(Bin)
        .where(Bin.id == bin_id, Bin.qty_reserved >= n)
        .values(qty_reserved=Bin.qty_reserved - n, updated_at=utcnow())
        .returning(Bin.label, Bin.qty, Bin.qty_reserved)
    ).first()
    if result is None:
        label, _qty, reserved = _state(session, bin_id)
        raise StockError(f"{label} has {reserved} reserved; cannot release {n}")
    _expire(session, bin_id)
    return MoveResult(bin_id, result[0], 0, int(result[1]), int(result[2]))


def consume_reserved(
    session: Session, bin_id: int, n: int, reason: str, pick_list_id: int | None = None
) -> MoveResult:
    """Take ``n`` reserved parts out of the bin (a picked pick list), and log it.

    Quantity and reservation both drop by ``n`` in one UPDATE.

    Raises
    ------
    StockError
        When fewer than ``n`` parts are reserved.
    """
    n = _positive(n, "take")
    if not reason or not reason.strip():
        raise StockError("a stock move needs a reason")
    result = session.execute(
        update(Bin)
        .where(Bin.id == bin_id, Bin.qty_reserved >= n, Bin.qty >= n)
        .values(qty=Bin.qty - n, qty_reserved=Bin.qty_reserved - n, updated_at=utcnow())
        .returning(Bin.label, Bin.qty, Bin.qty_reserved)
    ).first()
    if result is None:
        label, _qty, reserved = _state(session, bin_id)
        raise StockError(f"{label} has {reserved} reserved; cannot take {n} reserved")
    qty = int(result[1])
    move = StockMove(
        bin_id=bin_id,
        delta=-n,
        reason=reason.strip(),
        pick_list_id=pick_list_id,
        qty_after=qty,
        at=utcnow(),
    )
    session.add(move)
    session.flush()
    _expire(session, bin_id)
    return MoveResult(bin_id, result[0], -n, qty, int(result[2]), move.id)


def _positive(n: int, verb: str) -> int:
    n = int(n)
    if n <= 0:
        raise StockError(f"cannot {verb} {n} parts; give a count of 1 or more")
    return n


def _expire(session: Session, bin_id: int) -> None:
    """Make a loaded Bin object re-read its quantities after a Core UPDATE."""
    obj = session.identity_map.get(session.identity_key(Bin, bin_id))
    if obj is not None:
        session.expire(obj, ["qty", "qty_reserved", "updated_at"])


__all__ = ["MoveResult", "consume_reserved", "move_stock", "release", "reserve"]
