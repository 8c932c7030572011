"""Exports of the record store: JSON (complete, re-verifiable) and CSV (one row per record).

**JSON** (``supervisor.records-export/1``)::

    {"schema": "supervisor.records-export/1", "tool_version": ..., "generated_at": ...,
     "hash_definition": "...", "head": {"seq": n, "record_hash": hex} | null,
     "complete": true | false,          # false when filtered (kind, diver, job, seqs)
     "records": [{"seq", "kind", "created_at", "occurred_at", "job", "diver",
                  "refers_to", "corrects", "content_sha256", "prev_hash",
                  "record_hash", "body": {...} | null, "findings": [...]}]}

Each record carries its header, so anyone can recompute ``content_sha256`` and
``record_hash`` (:mod:`supervisor.records.chain`) and, for a complete export,
the links.  Records go to OSHA, NIOSH and employees on request (29 CFR
1910.440(b)(1)-(2)); this is the form to hand over.

**CSV**: the header columns, ``summary`` (one line as in ``records list``) and
``body`` (the canonical JSON of the content), quoted as needed (RFC 4180).
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import json
from collections.abc import Sequence
from typing import Any

from supervisor import __version__
from supervisor.records.chain import canonical_json
from supervisor.records.kinds import summary
from supervisor.records.schema import HASHED_COLUMNS
from supervisor.records.store import RecordStore, StoredRecord

EXPORT_SCHEMA = "supervisor.records-export/1"
HASH_DEFINITION = (
    "content_sha256 = SHA-256 of the canonical JSON of body; record_hash = SHA-256 of the "
    "canonical JSON of the object of the columns " + ", ".join(HASHED_COLUMNS) + "; "
    "canonical JSON = UTF-8, keys sorted, separators ',' and ':', non-ASCII as is; "
    "prev_hash of the first record = 64 zeros"
)
CSV_COLUMNS = (*HASHED_COLUMNS, "record_hash", "summary", "body")


def record_json(store: RecordStore, r: StoredRecord) -> dict[str, Any]:
    """One record as exported."""
    out = r.columns()
    out["body"] = r.body
    if r.kind == "audit":
        out["findings"] = store.findings(r.seq)
    return out


def export_json(store: RecordStore, records: Sequence[StoredRecord], *, complete: bool) -> str:
    """The JSON export of ``records`` (text, two-space indent, final newline)."""
    last = records[-1] if records else None
    doc = {
        "schema": EXPORT_SCHEMA, "tool_version": __version__,
        "generated_at": dt.datetime.now(dt.UTC).isoformat(timespec="seconds"),
        "store": store.location.display(), "hash_definition": HASH_DEFINITION,
        "complete": complete,
        "head": {"seq": last.seq, "record_hash": last.record_hash} if last else None,
        "records": [record_json(store, r) for r in records],
    }
    return json.dumps(doc, indent=2, ensure_ascii=False, sort_keys=True) + "\n"


def export_csv(records: Sequence[StoredRecord]) -> str:
    """The CSV export of ``records``."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n")
    w.writerow(CSV_COLUMNS)
    for r in records:
        cols = r.columns()
        w.writerow([*("" if cols[c] is None else cols[c] for c in (*HASHED_COLUMNS,
                                                                   "record_hash")),
                    summary(r), "" if r.body is None else canonical_json(r.body)])
    return buf.getvalue()
