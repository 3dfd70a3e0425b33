"""The batch tables (as the SQLite store's), with the server that runs each batch.

Revision ID: 0002
Revises: 0001
Create Date: 2026-12-04
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
        "batches",
        sa.Column("key", sa.Text, primary_key=True),
        sa.Column("id", sa.Text, nullable=False),
        sa.Column("owner", sa.Text, nullable=False),
        sa.Column("name", sa.Text),
        sa.Column("created_at", sa.Float(precision=53), nullable=False),
        sa.Column("updated_at", sa.Float(precision=53), nullable=False),
        sa.Column("cancelled", sa.Integer, nullable=False, server_default="0"),
        sa.Column("spec", sa.Text, nullable=False),
        sa.Column("server", sa.Text),
    )
    op.create_index("batches_by_owner", "batches", ["owner", sa.text("created_at DESC")])
    op.create_table(
        "batch_items",
        sa.Column("batch_key", sa.Text, sa.ForeignKey("batches.key", ondelete="CASCADE"),
                  nullable=False),
        sa.Column("position", sa.Integer, nullable=False),
        sa.Column("item_id", sa.Text, nullable=False),
        sa.Column("status", sa.Text, nullable=False),
        sa.Column("template", sa.Text),
        sa.Column("parameters", sa.Text),
        sa.Column("length", sa.Float(precision=53)),
        sa.Column("request", sa.Text),
        sa.Column("evaluation_id", sa.Text),
        sa.Column("psi", sa.Float(precision=53)),
        sa.Column("psi_l", sa.Float(precision=53)),
        sa.Column("f_rsi", sa.Float(precision=53)),
        sa.Column("min_temperature", sa.Float(precision=53)),
        sa.Column("l2d", sa.Float(precision=53)),
        sa.Column("verdict", sa.Text),
        sa.Column("error", sa.Text),
        sa.Column("updated_at", sa.Float(precision=53), nullable=False),
        sa.PrimaryKeyConstraint("batch_key", "position"),
    )
    op.create_index("batch_items_by_status", "batch_items", ["status", "batch_key"])


def downgrade() -> None:
    op.drop_table("batch_items")
    op.drop_table("batches")
