"""The record store: append records to the chain, read them back, walk the chain.

Writers are serialised by updating the one row of ``chain_lock`` first in each
transaction (a row lock on PostgreSQL, the write lock on SQLite); the head of
the chain is read after that, so two writers can never link to the same
record.  A batch is one transaction: it is stored whole or not at all, also
when the writing process is killed in the middle.

There is no method that changes or deletes a record.  A correction is a new
record of the same kind whose ``corrects`` names the record it replaces; the
only removal is :meth:`RecordStore.purge`, which removes bodies under a
tombstone record (see :mod:`supervisor.records.retention`).
"""

from __future__ import annotations

import datetime as dt
import functools
import json
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass, field
from typing import Any, TypeVar

from sqlalchemy import Connection, and_, func, insert, select, update
from sqlalchemy.exc import DBAPIError, IntegrityError, OperationalError

from supervisor.errors import InputError, SupervisorError
from supervisor.records import schema as S
from supervisor.records.chain import (
    GENESIS,
    ChainReport,
    canonical_json,
    header_text,
    record_hash,
    sha256_hex,
    walk,
)
from supervisor.records.database import Location, make_engine, resolve
from supervisor.records.migrate import check_revision, upgrade

#: Record kinds the store holds (see :mod:`supervisor.records.kinds`).
KINDS: tuple[str, ...] = ("job", "plan", "checklist", "dive", "audit", "dcs", "treatment",
                          "signature", "tombstone")
_PAGE = 500


class StoreError(SupervisorError, RuntimeError):
    """The store cannot be opened or written (not bad input: the database itself)."""


@dataclass(frozen=True)
class NewRecord:
    """A record to append.

    Parameters
    ----------
    kind : str
        One of :data:`KINDS`.
    body : dict
        JSON-ready content.
    occurred_at : str, optional
        When the event happened (ISO 8601 date or date-time), for retention.
    job, diver : str, optional
        Job reference and diver name, for look-ups.
    refers_to : int, optional
        The record this one belongs to (the dive of an audit, the case of a
        treatment, the record a signature signs).
    corrects : int, optional
        The record this one corrects (same kind).

    Notes
    -----
    The ``findings`` list of an audit record's body is also written to the
    ``findings`` table, one row per finding.
    """

    kind: str
    body: dict[str, Any]
    occurred_at: str | None = None
    job: str | None = None
    diver: str | None = None
    refers_to: int | None = None
    corrects: int | None = None


@dataclass(frozen=True)
class StoredRecord:
    """A record as stored: its columns and its body (``None`` once purged)."""

    seq: int
    kind: str
    created_at: str
    occurred_at: str | None
    job: str | None
    diver: str | None
    refers_to: int | None
    corrects: int | None
    content_sha256: str
    prev_hash: str
    record_hash: str
    body: dict[str, Any] | None = field(default=None, compare=False)

    def columns(self) -> dict[str, Any]:
        """Every column of the record row (the header and ``record_hash``)."""
        return {c: getattr(self, c) for c in (*S.HASHED_COLUMNS, "record_hash")}

    def header_text(self) -> str:
        """Canonical JSON of the header: the text the record hash (and a signature) covers."""
        return header_text(self.columns())


def now_utc() -> str:
    """The current time as stored in ``created_at`` (ISO 8601, UTC, microseconds)."""
    return dt.datetime.now(dt.UTC).isoformat(timespec="microseconds")


#: Keys of a finding kept in the ``findings`` table (the check's findings form).
FINDING_KEYS: tuple[str, ...] = ("rule", "severity", "message", "measured", "limit", "unit",
                                 "citation", "dive", "source_status", "verified", "family")


def normalise_finding(f: dict[str, Any], position: int = 0) -> dict[str, Any]:
    """A finding reduced to :data:`FINDING_KEYS`, as the findings table gives it back.

    Raises
    ------
    InputError
        If it lacks a rule id, a severity or a message.
    """
    if not isinstance(f, dict):
        raise InputError("findings", f"finding {position + 1} is not an object; expected the "
                                     "check's findings form")
    for key in ("rule", "severity", "message"):
        if not isinstance(f.get(key), str) or not f.get(key):
            raise InputError("findings", f"finding {position + 1} has no {key!r}; expected "
                                         "the check's findings form")
    if f["severity"] not in ("fail", "warn", "info", "pass"):
        raise InputError("findings", f"finding {position + 1}: severity {f['severity']!r}; "
                                     "expected fail, warn, info or pass")

    def same(v: Any) -> Any:
        return None if v is None else json.loads(canonical_json(v))

    def text(v: Any) -> str | None:
        return None if v is None else str(v)

    return {
        "rule": f["rule"], "severity": f["severity"], "message": f["message"],
        "measured": same(f.get("measured")), "limit": same(f.get("limit")),
        "unit": text(f.get("unit")), "citation": str(f.get("citation") or ""),
        "dive": text(f.get("dive")), "source_status": text(f.get("source_status")),
        "verified": bool(f.get("verified", True)), "family": str(f.get("family") or ""),
    }


def _finding_row(seq: int, position: int, f: dict[str, Any]) -> dict[str, Any]:
    n = normalise_finding(f, position)

    def value(v: Any) -> str | None:
        return None if v is None else canonical_json(v)

    row = {k: n[k] for k in FINDING_KEYS if k not in ("measured", "limit")}
    row.update(seq=seq, position=position, measured=value(n["measured"]),
               limit_value=value(n["limit"]))
    return row


def finding_from_row(row: Any) -> dict[str, Any]:
    """A findings row back in the check's findings form."""
    def value(v: str | None) -> Any:
        return None if v is None else json.loads(v)

    return {
        "rule": row.rule, "severity": row.severity, "message": row.message,
        "measured": value(row.measured), "limit": value(row.limit_value), "unit": row.unit,
        "citation": row.citation, "dive": row.dive, "source_status": row.source_status,
        "verified": bool(row.verified), "family": row.family,
    }


def _stored(row: Any, body: str | None) -> StoredRecord:
    return StoredRecord(
        seq=row.seq, kind=row.kind, created_at=row.created_at, occurred_at=row.occurred_at,
        job=row.job, diver=row.diver, refers_to=row.refers_to, corrects=row.corrects,
        content_sha256=row.content_sha256, prev_hash=row.prev_hash,
        record_hash=row.record_hash, body=None if body is None else json.loads(body),
    )


Item = NewRecord | Callable[[list[StoredRecord]], NewRecord]
F = TypeVar("F", bound=Callable[..., Any])


def _database_errors(func: F) -> F:
    """Report a database failure as one :class:`StoreError` (no driver traceback)."""

    @functools.wraps(func)
    def wrapper(self: RecordStore, *args: Any, **kwargs: Any) -> Any:
        try:
            return func(self, *args, **kwargs)
        except DBAPIError as exc:
            raise StoreError(f"the record store {self.location.display()} failed: "
                             f"{' '.join(str(exc.orig).split())}") from None

    return wrapper  # type: ignore[return-value]


class RecordStore:
    """An open record store.

    Parameters
    ----------
    location : Location
        Where it is (:func:`supervisor.records.database.resolve`).
    create : bool
        Create (or upgrade) the schema when needed.  Without it, a missing
        SQLite file or an empty database is refused, so reading never makes a
        store by accident.
    """

    def __init__(self, location: Location, *, create: bool = False) -> None:
        self.location = location
        where = location.display()
        if location.path is not None:
            if location.path.is_dir():
                raise InputError("--db", f"{where} is a folder; expected a database file")
            if not location.path.exists():
                if not create:
                    raise InputError("--db", f"no record store at {where}; add a record first "
                                             "(supervisor records add ...) or give --db")
                if not location.path.parent.is_dir():
                    location.path.parent.mkdir(parents=True, exist_ok=True)
        self.engine = make_engine(location)
        try:
            if create:
                upgrade(self.engine, where)
            else:
                with self.engine.connect() as conn:
                    if check_revision(conn, where) is None:
                        raise InputError("--db", f"{where} holds no record store")
        except DBAPIError as exc:
            self.engine.dispose()
            raise StoreError(f"cannot open the record store {where}: "
                             f"{' '.join(str(exc.orig).split())}") from None
        except BaseException:
            self.engine.dispose()
            raise

    @classmethod
    def open(cls, db: str | None = None, *, create: bool = False) -> RecordStore:
        """Open the store named by ``--db``, ``SUPERVISOR_DB`` or the default."""
        return cls(resolve(db), create=create)

    def close(self) -> None:
        """Release the database connections."""
        self.engine.dispose()

    def __enter__(self) -> RecordStore:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    # -- writing -------------------------------------------------------------

    def _head(self, conn: Connection) -> tuple[int, str]:
        row = conn.execute(
            select(S.records.c.seq, S.records.c.record_hash)
            .order_by(S.records.c.seq.desc()).limit(1)
        ).first()
        return (0, GENESIS) if row is None else (row.seq, row.record_hash)

    def _insert(self, conn: Connection, rec: NewRecord, seq: int, prev: str) -> StoredRecord:
        if rec.kind not in KINDS:
            raise InputError("kind", f"got {rec.kind!r}; expected one of {', '.join(KINDS)}")
        body = canonical_json(rec.body)
        for name, target in (("refers_to", rec.refers_to), ("corrects", rec.corrects)):
            if target is not None and not 1 <= target < seq:
                raise InputError(name, f"record {target} does not exist")
        if rec.corrects is not None:
            old = conn.execute(select(S.records.c.kind)
                               .where(S.records.c.seq == rec.corrects)).scalar_one()
            if old != rec.kind or rec.kind in ("signature", "tombstone"):
                raise InputError("corrects", f"record {rec.corrects} is a {old} record; a "
                                             f"correction has the kind of what it corrects")
        row = {
            "seq": seq, "kind": rec.kind, "created_at": now_utc(),
            "occurred_at": rec.occurred_at, "job": rec.job, "diver": rec.diver,
            "refers_to": rec.refers_to, "corrects": rec.corrects,
            "content_sha256": sha256_hex(body), "prev_hash": prev,
        }
        row["record_hash"] = record_hash(row)
        conn.execute(insert(S.records).values(**row))
        conn.execute(insert(S.record_bodies).values(seq=seq, body=body))
        held = rec.body.get("findings") if rec.kind == "audit" else None
        if held:
            conn.execute(insert(S.findings),
                         [_finding_row(seq, i, f) for i, f in enumerate(held)])
        return StoredRecord(**row, body=json.loads(body))

    def append_batch(self, items: Iterable[Item],
                     _after_each: Callable[[StoredRecord], None] | None = None
                     ) -> list[StoredRecord]:
        """Append records in one transaction: all of them, or none.

        Parameters
        ----------
        items : iterable of NewRecord or callable
            The records, in order.  A callable receives the records already
            appended by this batch and returns the next one (so a plan can
            refer to the job record written just before it).
        _after_each : callable, optional
            Test hook, called after each insert inside the transaction.

        Returns
        -------
        list of StoredRecord
        """
        try:
            with self.engine.begin() as conn:
                conn.execute(update(S.chain_lock).where(S.chain_lock.c.id == 1)
                             .values(writes=S.chain_lock.c.writes + 1))
                seq, prev = self._head(conn)
                done: list[StoredRecord] = []
                for item in items:
                    rec = item(done) if callable(item) else item
                    seq += 1
                    stored = self._insert(conn, rec, seq, prev)
                    prev = stored.record_hash
                    done.append(stored)
                    if _after_each is not None:
                        _after_each(stored)
                return done
        except IntegrityError as exc:
            raise StoreError(f"the record store refused the write: "
                             f"{' '.join(str(exc.orig).split())}") from None
        except OperationalError as exc:
            raise StoreError(f"cannot write to the record store {self.location.display()}: "
                             f"{' '.join(str(exc.orig).split())}") from None

    def append(self, rec: NewRecord) -> StoredRecord:
        """Append one record; see :meth:`append_batch`."""
        return self.append_batch([rec])[0]

    @_database_errors
    def purge(self, tombstone: NewRecord, seqs: Sequence[int]) -> StoredRecord:
        """Chain a tombstone, then remove the bodies (and findings) it names, in one transaction.

        Parameters
        ----------
        tombstone : NewRecord
            A ``tombstone`` record whose body lists the removed records.
        seqs : sequence of int
            The records whose bodies are removed.

        Returns
        -------
        StoredRecord
            The tombstone.
        """
        if tombstone.kind != "tombstone":
            raise InputError("purge", "a purge is announced by a tombstone record")
        with self.engine.begin() as conn:
            conn.execute(update(S.chain_lock).where(S.chain_lock.c.id == 1)
                         .values(writes=S.chain_lock.c.writes + 1))
            seq, prev = self._head(conn)
            stone = self._insert(conn, tombstone, seq + 1, prev)
            if seqs:
                conn.execute(insert(S.purges),
                             [{"seq": s, "tombstone": stone.seq} for s in seqs])
                for s in seqs:
                    conn.execute(S.findings.delete().where(S.findings.c.seq == s))
                    conn.execute(S.record_bodies.delete().where(S.record_bodies.c.seq == s))
        return stone

    # -- reading -------------------------------------------------------------

    def _select(self) -> Any:
        return (select(S.records, S.record_bodies.c.body)
                .select_from(S.records.outerjoin(S.record_bodies,
                                                 S.records.c.seq == S.record_bodies.c.seq)))

    @_database_errors
    def get(self, seq: int) -> StoredRecord:
        """One record by sequence number.

        Raises
        ------
        InputError
            If there is no such record.
        """
        with self.engine.connect() as conn:
            row = conn.execute(self._select().where(S.records.c.seq == seq)).first()
        if row is None:
            raise InputError("SEQ", f"no record {seq} in {self.location.display()}")
        return _stored(row, row.body)

    @_database_errors
    def records(self, *, kind: str | None = None, diver: str | None = None,
                job: str | None = None, refers_to: int | None = None) -> list[StoredRecord]:
        """Records in chain order, optionally only of one kind, diver, job or parent."""
        q = self._select()
        conds = []
        if kind is not None:
            conds.append(S.records.c.kind == kind)
        if diver is not None:
            conds.append(S.records.c.diver == diver)
        if job is not None:
            conds.append(S.records.c.job == job)
        if refers_to is not None:
            conds.append(S.records.c.refers_to == refers_to)
        if conds:
            q = q.where(and_(*conds))
        with self.engine.connect() as conn:
            rows = conn.execute(q.order_by(S.records.c.seq)).all()
        return [_stored(r, r.body) for r in rows]

    @_database_errors
    def count(self) -> int:
        """Number of records in the chain."""
        with self.engine.connect() as conn:
            return int(conn.execute(select(func.count()).select_from(S.records)).scalar_one())

    @_database_errors
    def findings(self, seq: int) -> list[dict[str, Any]]:
        """The findings rows of an audit record, in the check's findings form."""
        with self.engine.connect() as conn:
            rows = conn.execute(select(S.findings).where(S.findings.c.seq == seq)
                                .order_by(S.findings.c.position)).all()
        return [finding_from_row(r) for r in rows]

    @_database_errors
    def corrected_by(self) -> dict[int, int]:
        """For each corrected record, the newest record that corrects it."""
        with self.engine.connect() as conn:
            rows = conn.execute(select(S.records.c.seq, S.records.c.corrects)
                                .where(S.records.c.corrects.is_not(None))
                                .order_by(S.records.c.seq)).all()
        return {r.corrects: r.seq for r in rows}

    def iter_chain(self, conn: Connection) -> Iterator[tuple[dict[str, Any], str | None]]:
        """Rows and bodies in chain order, a page at a time, on one connection."""
        last = 0
        while True:
            rows = conn.execute(self._select().where(S.records.c.seq > last)
                                .order_by(S.records.c.seq).limit(_PAGE)).all()
            if not rows:
                return
            for r in rows:
                cols = {c: getattr(r, c) for c in (*S.HASHED_COLUMNS, "record_hash")}
                yield cols, r.body
            last = rows[-1].seq

    def _removed(self, conn: Connection) -> dict[int, str]:
        out: dict[int, str] = {}
        rows = conn.execute(
            select(S.record_bodies.c.body).select_from(
                S.records.join(S.record_bodies, S.records.c.seq == S.record_bodies.c.seq))
            .where(S.records.c.kind == "tombstone")).all()
        for (body,) in rows:
            try:
                for item in json.loads(body).get("removed", []):
                    out[int(item["seq"])] = str(item["content_sha256"])
            except (ValueError, KeyError, TypeError, AttributeError):
                continue  # a damaged tombstone fails at its own place in the walk
        return out

    @_database_errors
    def verify(self) -> ChainReport:
        """Walk the whole chain (hashes, links, bodies, findings rows) in one snapshot."""
        with self.engine.begin() as conn:
            removed = self._removed(conn)
            rows_by_seq: dict[int, list[dict[str, Any]]] = {}
            for r in conn.execute(select(S.findings).order_by(S.findings.c.seq,
                                                              S.findings.c.position)):
                rows_by_seq.setdefault(r.seq, []).append(finding_from_row(r))

            def findings_ok(row: dict[str, Any], body: str) -> str | None:
                held = json.loads(body).get("findings") if row["kind"] == "audit" else None
                table = rows_by_seq.pop(row["seq"], [])
                if row["kind"] != "audit":
                    return "findings rows are attached to a record that is not an audit" \
                        if table else None
                try:
                    want = [normalise_finding(f, i) for i, f in enumerate(held or [])]
                except InputError:
                    return "the findings in its content are not in the findings form"
                if canonical_json(table) != canonical_json(want):
                    return "its findings rows do not match the findings in its content"
                return None

            report = walk(self.iter_chain(conn), removed, findings_ok)
            if report.intact and rows_by_seq:
                first = min(rows_by_seq)
                report.first_bad = first
                report.problem = "findings rows belong to no record of the chain"
        return report
