"""The hash chain of the record store: canonical JSON, record hashes, the verification walk.

**Canonical JSON** (:func:`canonical_json`): UTF-8, keys sorted, no spaces
(separators ``,`` and ``:``), non-ASCII characters written as themselves, no
NaN or infinity; numbers as Python writes them.  The same content always gives
the same bytes.

**Content hash**: ``content_sha256 = SHA-256(canonical JSON of the body)``.

**Record hash**: ``record_hash = SHA-256(canonical JSON of the header)``, where
the header holds every column of the record except the hash itself: ``seq``,
``kind``, ``created_at``, ``occurred_at``, ``job``, ``diver``, ``refers_to``,
``corrects``, ``content_sha256`` and ``prev_hash``.  ``prev_hash`` is the record
hash of the record before (64 zeros for the first), so changing any record
changes every hash after it.  Anyone can re-check an export with these three
definitions and a SHA-256 tool.

A body removed under the retention rules leaves its header (and so its hashes)
in place; the tombstone record that announced the removal lists the content
hashes it removed, so the chain still verifies end to end.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any

from supervisor.records.schema import HASHED_COLUMNS

#: ``prev_hash`` of the first record.
GENESIS = "0" * 64


def canonical_json(value: Any) -> str:
    """Return the canonical JSON text of a JSON-ready value (see the module notes).

    Raises
    ------
    ValueError
        If the value holds NaN or infinity, or something JSON cannot hold.
    """
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False)


def sha256_hex(text: str) -> str:
    """SHA-256 of a text's UTF-8 bytes, as lower-case hex."""
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def header_of(row: Mapping[str, Any]) -> dict[str, Any]:
    """The hashed header of a record row (every column but ``record_hash``)."""
    return {name: row[name] for name in HASHED_COLUMNS}


def header_text(row: Mapping[str, Any]) -> str:
    """The canonical JSON of a record's header: the text its record hash is taken over."""
    return canonical_json(header_of(row))


def record_hash(row: Mapping[str, Any]) -> str:
    """The record hash of a row (its header's canonical JSON, SHA-256)."""
    return sha256_hex(header_text(row))


@dataclass
class ChainReport:
    """The outcome of walking the chain.

    Attributes
    ----------
    count : int
        Records walked.
    head_seq, head_hash : int or None, str
        The last record walked and its hash (write them down to detect a cut
        tail later: a chain cut after a record still verifies up to it).
    first_bad : int or None
        Sequence number of the first record that does not match, or ``None``.
    problem : str
        What did not match.
    purged : int
        Records whose body was removed under a tombstone.
    """

    count: int = 0
    head_seq: int | None = None
    head_hash: str = GENESIS
    first_bad: int | None = None
    problem: str = ""
    purged: int = 0
    notes: list[str] = field(default_factory=list)

    @property
    def intact(self) -> bool:
        """True when every record matched."""
        return self.first_bad is None


class ChainBreak(Exception):
    """Raised inside the walk: the message says what did not match."""


def _check_body(row: Mapping[str, Any], body: str | None, removed: Mapping[int, str]) -> bool:
    """Check a body against its content hash; return True when it was purged."""
    seq = row["seq"]
    if body is None:
        if seq not in removed:
            raise ChainBreak("its content is missing and no tombstone record removed it")
        if removed[seq] != row["content_sha256"]:
            raise ChainBreak("its tombstone names another content hash")
        return True
    try:
        parsed = json.loads(body)
        canonical = canonical_json(parsed)
    except ValueError:
        raise ChainBreak("its content is not valid JSON") from None
    if canonical != body:
        raise ChainBreak("its content is not in canonical form (it was rewritten)")
    if sha256_hex(body) != row["content_sha256"]:
        raise ChainBreak("its content does not match its content hash (content changed)")
    return False


def walk(
    rows: Iterable[tuple[Mapping[str, Any], str | None]],
    removed: Mapping[int, str],
    findings_ok: Any = None,
) -> ChainReport:
    """Walk records in sequence order and report the first that does not match.

    Parameters
    ----------
    rows : iterable of (row, body)
        Each record's columns (a mapping with every column of ``records``) and
        its body text, or ``None`` when it was purged; in ascending ``seq``.
    removed : mapping of int to str
        Content hash of each purged record, as its tombstone lists it.
    findings_ok : callable, optional
        ``findings_ok(row, body) -> str | None``: a problem with the record's
        findings rows, or ``None``.

    Returns
    -------
    ChainReport
    """
    report = ChainReport()
    prev_hash, expect = GENESIS, 1
    for row, body in rows:
        seq = row["seq"]
        try:
            if seq != expect:
                raise ChainBreak(f"expected record {expect} next, found {seq} (records are "
                                 "missing)")
            if row["prev_hash"] != prev_hash:
                raise ChainBreak("its link to the previous record does not match (a record "
                                 "before it was changed, removed or inserted)")
            if record_hash(row) != row["record_hash"]:
                raise ChainBreak("its header does not match its record hash (a column was "
                                 "changed)")
            if _check_body(row, body, removed):
                report.purged += 1
            elif findings_ok is not None:
                problem = findings_ok(row, body)
                if problem:
                    raise ChainBreak(problem)
        except ChainBreak as exc:
            report.first_bad = seq
            report.problem = str(exc)
            return report
        report.count += 1
        report.head_seq, report.head_hash = seq, row["record_hash"]
        prev_hash, expect = row["record_hash"], seq + 1
    return report
