"""Plans and pick lists: plan, pick_list, pick_line; stock_move refers to pick_list.

Revision ID: 0002
Revises: 0001
Create Date: 2026-12-01
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0002"
down_revision = "0001"
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_table(
        "plan",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(200), nullable=False),
        sa.Column("topology", sa.String(20), nullable=False),
        sa.Column("spec", sa.JSON(), nullable=False),
        sa.Column("notes", sa.Text(), nullable=True),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("updated_at", sa.DateTime(timezone=True), nullable=False),
        sa.PrimaryKeyConstraint("id", name="pk_plan"),
        sa.UniqueConstraint("name", name="uq_plan_name"),
    )
    op.create_table(
        "pick_list",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("plan_id", sa.Integer(), nullable=False),
        sa.Column("boards", sa.Integer(), nullable=False),
        sa.Column("state", sa.String(20), nullable=False),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("updated_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("snapshot", sa.JSON(), nullable=True),
        sa.CheckConstraint(
            "state IN ('draft', 'reserved', 'picked', 'cancelled')", name="ck_pick_list_state"
        ),
        sa.CheckConstraint("boards >= 1", name="ck_pick_list_boards_positive"),
        sa.ForeignKeyConstraint(
            ["plan_id"], ["plan.id"], name="fk_pick_list_plan_id_plan", ondelete="CASCADE"
        ),
        sa.PrimaryKeyConstraint("id", name="pk_pick_list"),
    )
    op.create_index("ix_pick_list_plan_id", "pick_list", ["plan_id"])
    op.create_table(
        "pick_line",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("pick_list_id", sa.Integer(), nullable=False),
        sa.Column("role", sa.String(40), nullable=False),
        sa.Column("bin_id", sa.Integer(), nullable=True),
        sa.Column("qty_per_board", sa.Integer(), nullable=False),
        sa.Column("qty_total", sa.Integer(), nullable=False),
        sa.ForeignKeyConstraint(
            ["pick_list_id"],
            ["pick_list.id"],
            name="fk_pick_line_pick_list_id_pick_list",
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["bin_id"], ["bin.id"], name="fk_pick_line_bin_id_bin", ondelete="RESTRICT"
        ),
        sa.PrimaryKeyConstraint("id", name="pk_pick_line"),
    )
    op.create_index("ix_pick_line_pick_list_id", "pick_line", ["pick_list_id"])
    op.create_index("ix_pick_line_bin_id", "pick_line", ["bin_id"])
    with op.batch_alter_table("stock_move") as batch:
        batch.create_foreign_key(
            "fk_stock_move_pick_list_id_pick_list",
            "pick_list",
            ["pick_list_id"],
            ["id"],
            ondelete="SET NULL",
        )


def downgrade() -> None:
    with op.batch_alter_table("stock_move") as batch:
        batch.drop_constraint("fk_stock_move_pick_list_id_pick_list", type_="foreignkey")
    op.drop_table("pick_line")
    op.drop_table("pick_list")
    op.drop_table("plan")
