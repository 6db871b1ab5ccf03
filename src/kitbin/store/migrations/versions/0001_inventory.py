"""Inventory tables: kit, bin, bin_property, capture, reading, stock_move.

Revision ID: 0001
Revises:
Create Date: 2026-12-01
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0001"
down_revision = None
branch_labels = None
depends_on = None

# The kinds as of this revision; a later revision that adds a kind rebuilds the CHECK.
_KINDS = "'inductor', 'resistor', 'capacitor', 'diode', 'controller', 'other'"


def _stamp(name: str) -> sa.Column:
    return sa.Column(name, sa.DateTime(timezone=True), nullable=False)


def upgrade() -> None:
    op.create_table(
        "kit",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(200), nullable=False),
        sa.Column("source", sa.String(200), nullable=True),
        sa.Column("bought_on", sa.Date(), nullable=True),
        sa.Column("notes", sa.Text(), nullable=True),
        _stamp("created_at"),
        sa.PrimaryKeyConstraint("id", name="pk_kit"),
        sa.UniqueConstraint("name", name="uq_kit_name"),
    )
    op.create_table(
        "bin",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("label", sa.String(64), nullable=False),
        sa.Column("kind", sa.String(20), nullable=False),
        sa.Column("kit_id", sa.Integer(), nullable=True),
        sa.Column("nominal", sa.Float(), nullable=True),
        sa.Column("tol_minus", sa.Float(), nullable=True),
        sa.Column("tol_plus", sa.Float(), nullable=True),
        sa.Column("marking", sa.String(200), nullable=True),
        sa.Column("package", sa.String(100), nullable=True),
        sa.Column("location", sa.String(100), nullable=True),
        sa.Column("qty", sa.Integer(), nullable=False),
        sa.Column("qty_reserved", sa.Integer(), nullable=False),
        sa.Column("notes", sa.Text(), nullable=True),
        _stamp("created_at"),
        _stamp("updated_at"),
        sa.CheckConstraint(f"kind IN ({_KINDS})", name="ck_bin_kind"),
        sa.CheckConstraint("qty >= 0", name="ck_bin_qty_not_negative"),
        sa.CheckConstraint(
            "qty_reserved >= 0 AND qty_reserved <= qty", name="ck_bin_reserved_within_qty"
        ),
        sa.CheckConstraint("tol_minus IS NULL OR tol_minus >= 0", name="ck_bin_tol_minus"),
        sa.CheckConstraint("tol_plus IS NULL OR tol_plus >= 0", name="ck_bin_tol_plus"),
        sa.ForeignKeyConstraint(
            ["kit_id"], ["kit.id"], name="fk_bin_kit_id_kit", ondelete="SET NULL"
        ),
        sa.PrimaryKeyConstraint("id", name="pk_bin"),
        sa.UniqueConstraint("label", name="uq_bin_label"),
    )
    op.create_index("ix_bin_kit_id", "bin", ["kit_id"])
    op.create_table(
        "bin_property",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("bin_id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(40), nullable=False),
        sa.Column("value", sa.Float(), nullable=False),
        sa.Column("source", sa.String(60), nullable=False),
        sa.ForeignKeyConstraint(
            ["bin_id"], ["bin.id"], name="fk_bin_property_bin_id_bin", ondelete="CASCADE"
        ),
        sa.PrimaryKeyConstraint("id", name="pk_bin_property"),
        sa.UniqueConstraint("bin_id", "name", name="uq_bin_property_bin_id_name"),
    )
    op.create_index("ix_bin_property_bin_id", "bin_property", ["bin_id"])
    op.create_table(
        "capture",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("bin_id", sa.Integer(), nullable=False),
        sa.Column("kind", sa.String(20), nullable=False),
        sa.Column("file_name", sa.String(300), nullable=True),
        sa.Column("sha256", sa.String(64), nullable=False),
        sa.Column("content", sa.LargeBinary(), nullable=False),
        sa.Column("params", sa.JSON(), nullable=False),
        sa.Column("results", sa.JSON(), nullable=False),
        sa.Column("curve", sa.JSON(), nullable=True),
        _stamp("created_at"),
        sa.ForeignKeyConstraint(
            ["bin_id"], ["bin.id"], name="fk_capture_bin_id_bin", ondelete="CASCADE"
        ),
        sa.PrimaryKeyConstraint("id", name="pk_capture"),
    )
    op.create_index("ix_capture_bin_id", "capture", ["bin_id"])
    op.create_index("ix_capture_sha256", "capture", ["sha256"])
    op.create_table(
        "reading",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("bin_id", sa.Integer(), nullable=False),
        sa.Column("specimen", sa.Integer(), nullable=True),
        sa.Column("quantity", sa.String(40), nullable=False),
        sa.Column("value", sa.Float(), nullable=False),
        sa.Column("bound", sa.String(2), nullable=False),
        sa.Column("conditions", sa.JSON(), nullable=False),
        sa.Column("method", sa.String(60), nullable=True),
        sa.Column("instrument", sa.String(120), nullable=True),
        _stamp("taken_at"),
        sa.Column("capture_id", sa.Integer(), nullable=True),
        sa.Column("note", sa.Text(), nullable=True),
        sa.CheckConstraint("bound IN ('=', '>=')", name="ck_reading_bound"),
        sa.ForeignKeyConstraint(
            ["bin_id"], ["bin.id"], name="fk_reading_bin_id_bin", ondelete="CASCADE"
        ),
        sa.ForeignKeyConstraint(
            ["capture_id"],
            ["capture.id"],
            name="fk_reading_capture_id_capture",
            ondelete="SET NULL",
        ),
        sa.PrimaryKeyConstraint("id", name="pk_reading"),
    )
    op.create_index("ix_reading_bin_id", "reading", ["bin_id"])
    op.create_index("ix_reading_capture_id", "reading", ["capture_id"])
    op.create_index("ix_reading_bin_id_quantity", "reading", ["bin_id", "quantity"])
    # pick_list_id gets its foreign key in 0002, when pick_list exists.
    op.create_table(
        "stock_move",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("bin_id", sa.Integer(), nullable=False),
        sa.Column("delta", sa.Integer(), nullable=False),
        sa.Column("reason", sa.Text(), nullable=False),
        sa.Column("pick_list_id", sa.Integer(), nullable=True),
        sa.Column("qty_after", sa.Integer(), nullable=False),
        sa.Column("at", sa.DateTime(timezone=True), nullable=False),
        sa.ForeignKeyConstraint(
            ["bin_id"], ["bin.id"], name="fk_stock_move_bin_id_bin", ondelete="CASCADE"
        ),
        sa.PrimaryKeyConstraint("id", name="pk_stock_move"),
    )
    op.create_index("ix_stock_move_bin_id", "stock_move", ["bin_id"])
    op.create_index("ix_stock_move_pick_list_id", "stock_move", ["pick_list_id"])


def downgrade() -> None:
    for table in ("stock_move", "reading", "capture", "bin_property", "bin", "kit"):
        op.drop_table(table)
