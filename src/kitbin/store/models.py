"""The inventory schema as SQLAlchemy 2 typed ORM classes.

Every value is an SI float (H, ohm, F, A, V, Hz, s; K for rises, degC for
temperatures). Tolerances are fractions (0.1 for 10 %). Times are stored in UTC.
The Alembic revisions in ``store/migrations/versions`` build exactly this schema;
``tests/store/test_migrations.py`` checks that the two never drift apart.
"""

from __future__ import annotations

import datetime as dt
from typing import Any

from sqlalchemy import (
    JSON,
    CheckConstraint,
    Date,
    DateTime,
    Float,
    ForeignKey,
    Index,
    Integer,
    LargeBinary,
    MetaData,
    String,
    Text,
    TypeDecorator,
    UniqueConstraint,
)
from sqlalchemy.orm import DeclarativeBase, Mapped, deferred, mapped_column, relationship

from kitbin.quantities import PART_KINDS

#: Constraint names are fixed so that migrations (and SQLite batch rebuilds) can
#: refer to them on every database.
NAMING_CONVENTION = {
    "ix": "ix_%(column_0_label)s",
    "uq": "uq_%(table_name)s_%(column_0_name)s",
    "ck": "ck_%(table_name)s_%(constraint_name)s",
    "fk": "fk_%(table_name)s_%(column_0_name)s_%(referred_table_name)s",
    "pk": "pk_%(table_name)s",
}

READING_BOUNDS = ("=", ">=")
PICK_STATES = ("draft", "reserved", "picked", "cancelled")


def utcnow() -> dt.datetime:
    """The current time in UTC, as stored in every ``*_at`` column."""
    return dt.datetime.now(dt.UTC)


class UTCDateTime(TypeDecorator):
    """A timestamp stored in UTC and always returned timezone-aware.

    SQLite keeps no zone, so values come back naive; they are UTC by construction.
    """

    impl = DateTime(timezone=True)
    cache_ok = True

    def process_bind_param(self, value, dialect):
        if value is None:
            return None
        if value.tzinfo is None:
            value = value.replace(tzinfo=dt.UTC)
        return value.astimezone(dt.UTC)

    def process_result_value(self, value, dialect):
        if value is not None and value.tzinfo is None:
            value = value.replace(tzinfo=dt.UTC)
        return value


def _in_list(column: str, values: tuple[str, ...]) -> str:
    """SQL text ``column IN ('a', 'b')`` for a CHECK over a fixed, trusted list."""
    quoted = ", ".join("'" + v.replace("'", "''") + "'" for v in values)
    return f"{column} IN ({quoted})"


class Base(DeclarativeBase):
    """Declarative base carrying the naming convention."""

    metadata = MetaData(naming_convention=NAMING_CONVENTION)


class Kit(Base):
    """An assortment as bought."""

    __tablename__ = "kit"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    name: Mapped[str] = mapped_column(String(200), unique=True)
    source: Mapped[str | None] = mapped_column(String(200))
    bought_on: Mapped[dt.date | None] = mapped_column(Date)
    notes: Mapped[str | None] = mapped_column(Text)
    created_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow)

    bins: Mapped[list[Bin]] = relationship(back_populates="kit", order_by="Bin.label")


class Bin(Base):
    """One compartment: one kind of part of one nominal value, with its stock."""

    __tablename__ = "bin"
    __table_args__ = (
        CheckConstraint(_in_list("kind", PART_KINDS), name="kind"),
        CheckConstraint("qty >= 0", name="qty_not_negative"),
        CheckConstraint("qty_reserved >= 0 AND qty_reserved <= qty", name="reserved_within_qty"),
        CheckConstraint("tol_minus IS NULL OR tol_minus >= 0", name="tol_minus"),
        CheckConstraint("tol_plus IS NULL OR tol_plus >= 0", name="tol_plus"),
    )

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    label: Mapped[str] = mapped_column(String(64), unique=True)
    kind: Mapped[str] = mapped_column(String(20))
    kit_id: Mapped[int | None] = mapped_column(
        ForeignKey("kit.id", ondelete="SET NULL"), index=True
    )
    #: Nominal value in SI (H, ohm, F); None for parts without one (diodes, ICs).
    nominal: Mapped[float | None] = mapped_column(Float)
    #: Tolerance below and above nominal, as fractions (0.1 = 10 %).
    tol_minus: Mapped[float | None] = mapped_column(Float)
    tol_plus: Mapped[float | None] = mapped_column(Float)
    #: The marking as printed or seen (colour bands, numeric code).
    marking: Mapped[str | None] = mapped_column(String(200))
    #: Body size or package text, e.g. "CD54 drum" or "0805".
    package: Mapped[str | None] = mapped_column(String(100))
    location: Mapped[str | None] = mapped_column(String(100))
    qty: Mapped[int] = mapped_column(Integer, default=0)
    qty_reserved: Mapped[int] = mapped_column(Integer, default=0)
    notes: Mapped[str | None] = mapped_column(Text)
    created_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow)
    updated_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow, onupdate=utcnow)

    kit: Mapped[Kit | None] = relationship(back_populates="bins")
    properties: Mapped[list[BinProperty]] = relationship(
        back_populates="bin", cascade="all, delete-orphan", order_by="BinProperty.name"
    )
    readings: Mapped[list[Reading]] = relationship(
        back_populates="bin", cascade="all, delete-orphan", order_by="Reading.id"
    )
    captures: Mapped[list[Capture]] = relationship(
        back_populates="bin", cascade="all, delete-orphan", order_by="Capture.id"
    )
    moves: Mapped[list[StockMove]] = relationship(
        back_populates="bin", cascade="all, delete-orphan", order_by="StockMove.id"
    )


class BinProperty(Base):
    """An extra named quantity of a bin (a rating, a controller parameter)."""

    __tablename__ = "bin_property"
    __table_args__ = (UniqueConstraint("bin_id", "name", name="uq_bin_property_bin_id_name"),)

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    bin_id: Mapped[int] = mapped_column(ForeignKey("bin.id", ondelete="CASCADE"), index=True)
    #: A name from :data:`kitbin.quantities.QUANTITIES`.
    name: Mapped[str] = mapped_column(String(40))
    #: SI value.
    value: Mapped[float] = mapped_column(Float)
    #: Where the value comes from: "marked", "user", "datasheet-free estimate", ...
    source: Mapped[str] = mapped_column(String(60), default="user")

    bin: Mapped[Bin] = relationship(back_populates="properties")


class Capture(Base):
    """A raw bench recording attached to a bin, with its analysis."""

    __tablename__ = "capture"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    bin_id: Mapped[int] = mapped_column(ForeignKey("bin.id", ondelete="CASCADE"), index=True)
    #: "ramp", "heat", "ring" or another short word.
    kind: Mapped[str] = mapped_column(String(20))
    file_name: Mapped[str | None] = mapped_column(String(300))
    sha256: Mapped[str] = mapped_column(String(64), index=True)
    #: The original file, zlib-compressed. Deferred: listing captures never loads it.
    content: Mapped[bytes] = deferred(mapped_column(LargeBinary, nullable=False))
    params: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    results: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    #: Curves as lists, e.g. {"i": [...], "l": [...]} in A and H.
    curve: Mapped[dict[str, Any] | None] = mapped_column(JSON)
    created_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow)

    bin: Mapped[Bin] = relationship(back_populates="captures")
    readings: Mapped[list[Reading]] = relationship(back_populates="capture")


class Reading(Base):
    """One measured value on a bin's part."""

    __tablename__ = "reading"
    __table_args__ = (
        CheckConstraint(_in_list("bound", READING_BOUNDS), name="bound"),
        # covers the matcher's read of every reading of some quantities (revision 0003)
        Index("ix_reading_evidence", "bin_id", "quantity", "bound", "value"),
    )

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    bin_id: Mapped[int] = mapped_column(ForeignKey("bin.id", ondelete="CASCADE"), index=True)
    #: Numbered specimen within the bin, or None when not tracked.
    specimen: Mapped[int | None] = mapped_column(Integer)
    #: A name from :data:`kitbin.quantities.QUANTITIES`.
    quantity: Mapped[str] = mapped_column(String(40))
    #: SI value.
    value: Mapped[float] = mapped_column(Float)
    #: "=" for a measured value, ">=" for "not reached up to" (e.g. Isat beyond the ramp).
    bound: Mapped[str] = mapped_column(String(2), default="=")
    #: Test conditions in SI, e.g. {"freq": 100000.0, "temp": 25.0, "bias": 0.5}.
    conditions: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    method: Mapped[str | None] = mapped_column(String(60))
    instrument: Mapped[str | None] = mapped_column(String(120))
    taken_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow)
    capture_id: Mapped[int | None] = mapped_column(
        ForeignKey("capture.id", ondelete="SET NULL"), index=True
    )
    note: Mapped[str | None] = mapped_column(Text)

    bin: Mapped[Bin] = relationship(back_populates="readings")
    capture: Mapped[Capture | None] = relationship(back_populates="readings")


class StockMove(Base):
    """One change of a bin's quantity (see :mod:`kitbin.store.stock`)."""

    __tablename__ = "stock_move"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    bin_id: Mapped[int] = mapped_column(ForeignKey("bin.id", ondelete="CASCADE"), index=True)
    delta: Mapped[int] = mapped_column(Integer)
    reason: Mapped[str] = mapped_column(Text)
    pick_list_id: Mapped[int | None] = mapped_column(
        ForeignKey("pick_list.id", ondelete="SET NULL"), index=True
    )
    #: The bin's quantity right after this move.
    qty_after: Mapped[int] = mapped_column(Integer)
    at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow)

    bin: Mapped[Bin] = relationship(back_populates="moves")


class Plan(Base):
    """A saved converter design."""

    __tablename__ = "plan"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    name: Mapped[str] = mapped_column(String(200), unique=True)
    topology: Mapped[str] = mapped_column(String(20))
    spec: Mapped[dict[str, Any]] = mapped_column(JSON, default=dict)
    notes: Mapped[str | None] = mapped_column(Text)
    created_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow)
    updated_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow, onupdate=utcnow)

    pick_lists: Mapped[list[PickList]] = relationship(
        back_populates="plan", cascade="all, delete-orphan", order_by="PickList.id"
    )


class PickList(Base):
    """A plan times a number of boards, with its state."""

    __tablename__ = "pick_list"
    __table_args__ = (
        CheckConstraint(_in_list("state", PICK_STATES), name="state"),
        CheckConstraint("boards >= 1", name="boards_positive"),
    )

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    plan_id: Mapped[int] = mapped_column(ForeignKey("plan.id", ondelete="CASCADE"), index=True)
    boards: Mapped[int] = mapped_column(Integer, default=1)
    state: Mapped[str] = mapped_column(String(20), default="draft")
    created_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow)
    updated_at: Mapped[dt.datetime] = mapped_column(UTCDateTime, default=utcnow, onupdate=utcnow)
    #: What the pick list was computed from (plan spec, verdicts), frozen as JSON.
    snapshot: Mapped[dict[str, Any] | None] = mapped_column(JSON)

    plan: Mapped[Plan] = relationship(back_populates="pick_lists")
    lines: Mapped[list[PickLine]] = relationship(
        back_populates="pick_list", cascade="all, delete-orphan", order_by="PickLine.id"
    )


class PickLine(Base):
    """One role of a pick list: the chosen bin and how many parts to take."""

    __tablename__ = "pick_line"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    pick_list_id: Mapped[int] = mapped_column(
        ForeignKey("pick_list.id", ondelete="CASCADE"), index=True
    )
    role: Mapped[str] = mapped_column(String(40))
    #: The chosen bin; None when nothing in stock fits (a shortfall).
    bin_id: Mapped[int | None] = mapped_column(
        ForeignKey("bin.id", ondelete="RESTRICT"), index=True
    )
    qty_per_board: Mapped[int] = mapped_column(Integer, default=1)
    qty_total: Mapped[int] = mapped_column(Integer, default=1)

    pick_list: Mapped[PickList] = relationship(back_populates="lines")
    bin: Mapped[Bin | None] = relationship()


__all__ = [
    "PICK_STATES",
    "READING_BOUNDS",
    "Base",
    "Bin",
    "BinProperty",
    "Capture",
    "Kit",
    "PickLine",
    "PickList",
    "Plan",
    "Reading",
    "StockMove",
    "utcnow",
]
