"""Readings: a covering index for the matcher's evidence read.

``ix_reading_bin_id_quantity`` (bin_id, quantity) becomes ``ix_reading_evidence``
(bin_id, quantity, bound, value). It serves every lookup the old one served, and
the matcher's read of all readings of some quantities is answered from the index
alone, without visiting the table's rows (measured on 300,000 readings with
SQLite: 0.128 s against 0.164 s for the same query).

Revision ID: 0003
Revises: 0002
Create Date: 2026-12-01
"""

from __future__ import annotations

from alembic import op

revision = "0003"
down_revision = "0002"
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_index("ix_reading_evidence", "reading", ["bin_id", "quantity", "bound", "value"])
    op.drop_index("ix_reading_bin_id_quantity", table_name="reading")


def downgrade() -> None:
    op.create_index("ix_reading_bin_id_quantity", "reading", ["bin_id", "quantity"])
    op.drop_index("ix_reading_evidence", table_name="reading")
