"""Alembic's environment for Coldseam's PostgreSQL store: run on the connection the store
hands over (``config.attributes["connection"]``), inside its transaction and lock."""

from __future__ import annotations

from alembic import context
from sqlalchemy import create_engine

config = context.config
connection = config.attributes.get("connection")
if connection is None:  # `alembic` run by hand with -x url=postgresql+psycopg://...
    engine = create_engine(context.get_x_argument(as_dictionary=True)["url"])
    with engine.begin() as connection:
        context.configure(connection=connection, target_metadata=None)
        with context.begin_transaction():
            context.run_migrations()
else:
    context.configure(connection=connection, target_metadata=None)
    with context.begin_transaction():
        context.run_migrations()
