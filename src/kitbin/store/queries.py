"""Read queries the services use, so that no layer above the store imports SQLAlchemy.

Every function takes an open session (inside ``store.transaction()``) and uses bound
parameters only.
"""

from __future__ import annotations

from collections.abc import Sequence

from sqlalchemy import func, or_, select
from sqlalchemy.orm import Session, selectinload

from kitbin.store.models import Bin, Capture, Kit, Reading, StockMove


def bin_by_label(session: Session, label: str) -> Bin | None:
    """The bin with exactly this label, else the one matching it case-insensitively."""
    text = label.strip()
    found = session.scalars(select(Bin).where(Bin.label == text)).first()
    if found is None:
        found = session.scalars(select(Bin).where(func.lower(Bin.label) == text.lower())).first()
    return found


def bin_ids_by_label(session: Session) -> dict[str, int]:
    """Label -> id of every bin."""
    return dict(session.execute(select(Bin.label, Bin.id)).all())


def label_taken(session: Session, label: str) -> bool:
    """True when a bin has exactly this label."""
    return session.scalars(select(Bin.id).where(Bin.label == label)).first() is not None


def kit_by_name(session: Session, name: str) -> Kit | None:
    """The kit with this name, or None."""
    return session.scalars(select(Kit).where(Kit.name == name.strip())).first()


def kits(session: Session) -> Sequence[Kit]:
    """Every kit by name."""
    return session.scalars(select(Kit).order_by(Kit.name)).all()


def kit_bin_counts(session: Session) -> dict[int, int]:
    """Kit id -> number of bins in it."""
    rows = session.execute(
        select(Bin.kit_id, func.count(Bin.id)).where(Bin.kit_id.is_not(None)).group_by(Bin.kit_id)
    )
    return {int(k): int(n) for k, n in rows}


def reading_counts(session: Session) -> dict[int, int]:
    """Bin id -> number of readings."""
    rows = session.execute(select(Reading.bin_id, func.count(Reading.id)).group_by(Reading.bin_id))
    return {int(b): int(n) for b, n in rows}


def bins(
    session: Session,
    *,
    kind: str | None = None,
    kit_id: int | None = None,
    search: str | None = None,
    with_readings: bool = False,
) -> Sequence[Bin]:
    """Bins by label, with kit and properties loaded (and readings if asked).

    ``search`` matches label, marking, package, location and notes, case-insensitive.
    """
    options = [selectinload(Bin.kit), selectinload(Bin.properties)]
    if with_readings:
        options.append(selectinload(Bin.readings))
    query = select(Bin).options(*options)
    if kind:
        query = query.where(Bin.kind == kind)
    if kit_id is not None:
        query = query.where(Bin.kit_id == kit_id)
    if search:
        # autoescape: a "%" or "_" typed by the user is matched literally, not as a wildcard.
        needle = search.strip().lower()
        columns = (Bin.label, Bin.marking, Bin.package, Bin.location, Bin.notes)
        query = query.where(
            or_(
                *(
                    func.lower(func.coalesce(c, "")).contains(needle, autoescape=True)
                    for c in columns
                )
            )
        )
    return session.scalars(query.order_by(Bin.label)).all()


def readings(session: Session) -> Sequence[tuple[str, Reading]]:
    """Every reading with its bin's label, by label then id."""
    rows = session.execute(
        select(Bin.label, Reading)
        .join(Reading, Reading.bin_id == Bin.id)
        .order_by(Bin.label, Reading.id)
    )
    return list(rows)


def counts(session: Session) -> dict[str, int]:
    """Rows per inventory table (for checks that nothing changed, and the demo tour)."""
    out = {}
    for name, model in (
        ("kit", Kit),
        ("bin", Bin),
        ("reading", Reading),
        ("capture", Capture),
        ("stock_move", StockMove),
    ):
        out[name] = int(session.scalar(select(func.count()).select_from(model)) or 0)
    out["parts"] = int(session.scalar(select(func.coalesce(func.sum(Bin.qty), 0))) or 0)
    return out
