"""The tables of the record store (SQLAlchemy Core), as the migrations leave them.

``records``
    One row per record, in chain order.  Every column except ``record_hash``
    enters the record hash (see :mod:`supervisor.records.chain`), so none of
    them can change without ``supervisor records verify`` naming the row.
``record_bodies``
    The content of each record as canonical JSON; its SHA-256 is the
    ``content_sha256`` of the record.  A body is removed only by a purge under
    the retention rules, after a tombstone record naming it was chained.
``findings``
    The findings of an audit record, one row each, in the check's findings
    form (rule id, severity, measured value, limit, citation, source status):
    a queryable copy of the list held in the audit record's body, compared
    with it by ``records verify``.
``purges``
    Which record bodies were removed and by which tombstone record.
``chain_lock``
    One row that every writer updates first, so appends are serialised on
    SQLite and PostgreSQL alike.  It holds nothing that verification trusts.

Append-only: triggers installed by the migration refuse UPDATE and DELETE on
``records``, ``findings`` and ``purges``, UPDATE on ``record_bodies``, and
DELETE of a body or finding that no purge names.
"""

from __future__ import annotations

from sqlalchemy import (
    BigInteger,
    Boolean,
    Column,
    ForeignKey,
    Index,
    Integer,
    MetaData,
    String,
    Table,
    Text,
)

metadata = MetaData()

HASH_LEN = 64

records = Table(
    "records",
    metadata,
    Column("seq", Integer, primary_key=True, autoincrement=False),
    Column("kind", String(32), nullable=False),
    Column("created_at", String(40), nullable=False),
    Column("occurred_at", String(40)),
    Column("job", String(200)),
    Column("diver", String(200)),
    Column("refers_to", Integer, ForeignKey("records.seq")),
    Column("corrects", Integer, ForeignKey("records.seq")),
    Column("content_sha256", String(HASH_LEN), nullable=False),
    Column("prev_hash", String(HASH_LEN), nullable=False, unique=True),
    Column("record_hash", String(HASH_LEN), nullable=False, unique=True),
    Index("ix_records_kind", "kind"),
    Index("ix_records_diver", "diver"),
    Index("ix_records_job", "job"),
    Index("ix_records_occurred_at", "occurred_at"),
)

record_bodies = Table(
    "record_bodies",
    metadata,
    Column("seq", Integer, ForeignKey("records.seq"), primary_key=True, autoincrement=False),
    Column("body", Text, nullable=False),
)

findings = Table(
    "findings",
    metadata,
    Column("seq", Integer, ForeignKey("records.seq"), primary_key=True, autoincrement=False),
    Column("position", Integer, primary_key=True, autoincrement=False),
    Column("rule", String(80), nullable=False),
    Column("severity", String(8), nullable=False),
    Column("message", Text, nullable=False),
    Column("measured", Text),
    Column("limit_value", Text),
    Column("unit", String(40)),
    Column("citation", Text, nullable=False),
    Column("dive", String(200)),
    Column("source_status", String(40)),
    Column("verified", Boolean, nullable=False),
    Column("family", String(80), nullable=False),
    Index("ix_findings_rule", "rule"),
)

purges = Table(
    "purges",
    metadata,
    Column("seq", Integer, ForeignKey("records.seq"), primary_key=True, autoincrement=False),
    Column("tombstone", Integer, ForeignKey("records.seq"), nullable=False),
)

chain_lock = Table(
    "chain_lock",
    metadata,
    Column("id", Integer, primary_key=True, autoincrement=False),
    Column("writes", BigInteger, nullable=False),
)

#: Columns of ``records`` that enter the record hash, in the order shown to users.
HASHED_COLUMNS: tuple[str, ...] = (
    "seq", "kind", "created_at", "occurred_at", "job", "diver", "refers_to", "corrects",
    "content_sha256", "prev_hash",
)
