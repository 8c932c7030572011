"""Alembic environment: migrations run on the connection the tool hands over.

:func:`supervisor.records.migrate.upgrade` puts an open SQLAlchemy connection in
``config.attributes["connection"]``; there is no ``alembic.ini`` and no URL here,
and the scripts are never run from the ``alembic`` command line in normal use.
"""

from __future__ import annotations

from alembic import context

connection = context.config.attributes.get("connection")
if connection is None:  # pragma: no cover - only reached from the alembic command line
    raise RuntimeError("run the record-store migrations through supervisor.records.migrate")

context.configure(connection=connection, target_metadata=None,
                  render_as_batch=connection.dialect.name == "sqlite")
with context.begin_transaction():
    context.run_migrations()
