"""The evaluations table (as the SQLite store's), with the live state and the owning server.

Revision ID: 0001
Revises:
Create Date: 2026-12-04
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0001"
down_revision = None
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.create_table(
        "evaluations",
        sa.Column("seq", sa.BigInteger, sa.Identity(), nullable=False),
        sa.Column("key", sa.Text, primary_key=True),
        sa.Column("id", sa.Text, nullable=False),
        sa.Column("owner", sa.Text, nullable=False),
        sa.Column("status", sa.Text, nullable=False),
        sa.Column("name", sa.Text),
        sa.Column("created_at", sa.Float(precision=53), nullable=False),
        sa.Column("updated_at", sa.Float(precision=53), nullable=False),
        sa.Column("request", sa.Text, nullable=False),
        sa.Column("summary", sa.Text),
        sa.Column("result", sa.Text),
        sa.Column("field", sa.LargeBinary),
        sa.Column("error", sa.Text),
        sa.Column("stage", sa.Text),
        sa.Column("progress", sa.Float(precision=53), nullable=False, server_default="0"),
        sa.Column("server", sa.Text),
    )
    op.execute("CREATE INDEX evaluations_by_owner ON evaluations "
               "(owner, created_at DESC, seq DESC)")
    op.execute("CREATE INDEX evaluations_unfinished ON evaluations (server) "
               "WHERE status IN ('queued', 'running')")


def downgrade() -> None:
    op.drop_table("evaluations")
