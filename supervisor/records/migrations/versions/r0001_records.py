"""The first schema of the record store: chained records, bodies, findings, purges.

Creates the tables of :mod:`supervisor.records.schema` as they stood at this
revision, the one row of ``chain_lock``, and the triggers that keep the store
append-only on SQLite and PostgreSQL (the only statements written for one
database: trigger syntax differs between them).

Revision ID: r0001
Revises:
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "r0001"
down_revision = None
branch_labels = None
depends_on = None

_APPEND_ONLY = "records are append-only: write a correction instead of changing a record"
_PURGE_ONLY = ("a record body is removed only by a purge under the retention rules, after "
               "its tombstone record")


def _tables() -> None:
    op.create_table(
        "records",
        sa.Column("seq", sa.Integer, primary_key=True, autoincrement=False),
        sa.Column("kind", sa.String(32), nullable=False),
        sa.Column("created_at", sa.String(40), nullable=False),
        sa.Column("occurred_at", sa.String(40)),
        sa.Column("job", sa.String(200)),
        sa.Column("diver", sa.String(200)),
        sa.Column("refers_to", sa.Integer, sa.ForeignKey("records.seq")),
        sa.Column("corrects", sa.Integer, sa.ForeignKey("records.seq")),
        sa.Column("content_sha256", sa.String(64), nullable=False),
        sa.Column("prev_hash", sa.String(64), nullable=False, unique=True),
        sa.Column("record_hash", sa.String(64), nullable=False, unique=True),
    )
    for col in ("kind", "diver", "job", "occurred_at"):
        op.create_index(f"ix_records_{col}", "records", [col])
    op.create_table(
        "record_bodies",
        sa.Column("seq", sa.Integer, sa.ForeignKey("records.seq"), primary_key=True,
                  autoincrement=False),
        sa.Column("body", sa.Text, nullable=False),
    )
    op.create_table(
        "findings",
        sa.Column("seq", sa.Integer, sa.ForeignKey("records.seq"), primary_key=True,
                  autoincrement=False),
        sa.Column("position", sa.Integer, primary_key=True, autoincrement=False),
        sa.Column("rule", sa.String(80), nullable=False),
        sa.Column("severity", sa.String(8), nullable=False),
        sa.Column("message", sa.Text, nullable=False),
        sa.Column("measured", sa.Text),
        sa.Column("limit_value", sa.Text),
        sa.Column("unit", sa.String(40)),
        sa.Column("citation", sa.Text, nullable=False),
        sa.Column("dive", sa.String(200)),
        sa.Column("source_status", sa.String(40)),
        sa.Column("verified", sa.Boolean, nullable=False),
        sa.Column("family", sa.String(80), nullable=False),
    )
    op.create_index("ix_findings_rule", "findings", ["rule"])
    op.create_table(
        "purges",
        sa.Column("seq", sa.Integer, sa.ForeignKey("records.seq"), primary_key=True,
                  autoincrement=False),
        sa.Column("tombstone", sa.Integer, sa.ForeignKey("records.seq"), nullable=False),
    )
    lock = op.create_table(
        "chain_lock",
        sa.Column("id", sa.Integer, primary_key=True, autoincrement=False),
        sa.Column("writes", sa.BigInteger, nullable=False),
    )
    op.bulk_insert(lock, [{"id": 1, "writes": 0}])


def _sqlite_triggers() -> None:
    for table in ("records", "findings", "purges", "record_bodies"):
        op.execute(f"CREATE TRIGGER {table}_no_update BEFORE UPDATE ON {table} "
                   f"BEGIN SELECT RAISE(ABORT, '{_APPEND_ONLY}'); END")
    for table in ("records", "purges"):
        op.execute(f"CREATE TRIGGER {table}_no_delete BEFORE DELETE ON {table} "
                   f"BEGIN SELECT RAISE(ABORT, '{_APPEND_ONLY}'); END")
    for table in ("record_bodies", "findings"):
        op.execute(f"CREATE TRIGGER {table}_purge_only BEFORE DELETE ON {table} "
                   f"WHEN NOT EXISTS (SELECT 1 FROM purges WHERE purges.seq = OLD.seq) "
                   f"BEGIN SELECT RAISE(ABORT, '{_PURGE_ONLY}'); END")


def _postgresql_triggers() -> None:
    op.execute(f"""
        CREATE FUNCTION supervisor_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
        BEGIN
            RAISE EXCEPTION '{_APPEND_ONLY} (table %%)', TG_TABLE_NAME;
        END $$""".replace("%%", "%"))
    op.execute(f"""
        CREATE FUNCTION supervisor_purge_only() RETURNS trigger LANGUAGE plpgsql AS $$
        BEGIN
            IF EXISTS (SELECT 1 FROM purges WHERE purges.seq = OLD.seq) THEN
                RETURN OLD;
            END IF;
            RAISE EXCEPTION '{_PURGE_ONLY} (table %%)', TG_TABLE_NAME;
        END $$""".replace("%%", "%"))
    for table in ("records", "findings", "purges", "record_bodies"):
        op.execute(f"CREATE TRIGGER {table}_no_truncate BEFORE TRUNCATE ON {table} "
                   "FOR EACH STATEMENT EXECUTE FUNCTION supervisor_append_only()")
    for table in ("records", "purges"):
        op.execute(f"CREATE TRIGGER {table}_append_only BEFORE UPDATE OR DELETE ON {table} "
                   "FOR EACH ROW EXECUTE FUNCTION supervisor_append_only()")
    for table in ("record_bodies", "findings"):
        op.execute(f"CREATE TRIGGER {table}_no_update BEFORE UPDATE ON {table} "
                   "FOR EACH ROW EXECUTE FUNCTION supervisor_append_only()")
        op.execute(f"CREATE TRIGGER {table}_purge_only BEFORE DELETE ON {table} "
                   "FOR EACH ROW EXECUTE FUNCTION supervisor_purge_only()")


def upgrade() -> None:
    """Create the tables and the append-only triggers."""
    _tables()
    dialect = op.get_context().dialect.name
    if dialect == "sqlite":
        _sqlite_triggers()
    elif dialect == "postgresql":
        _postgresql_triggers()
    else:  # pragma: no cover - database.resolve accepts only these two
        raise RuntimeError(f"no append-only triggers for {dialect}")


def downgrade() -> None:
    """Not provided: a record store is never migrated backwards (records would be lost)."""
    raise RuntimeError("the record store is never downgraded")
