"""Exports: the JSON export can be re-verified with hashlib alone; the CSV parses (RFC 4180)."""

from __future__ import annotations

import csv
import hashlib
import io
import json

from supervisor.records.export import EXPORT_SCHEMA, export_csv, export_json
from supervisor.records.schema import HASHED_COLUMNS
from supervisor.records.store import NewRecord, RecordStore


def _fill(store: RecordStore) -> None:
    store.append(NewRecord("job", {"title": "Pier 9, \"north\" side (fictional)"}, job="j"))
    store.append(NewRecord("dive", {"dive": "D1", "max_depth": 60.5}, job="j",
                           diver="Ada Fenwick", refers_to=1))
    store.append(NewRecord("audit", {"findings": [{"rule": "r", "severity": "pass",
                                                  "message": "m", "citation": "c"}]},
                           refers_to=2))


def _canon(v: object) -> bytes:
    return json.dumps(v, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode()


def test_json_export_verifies_with_hashlib_alone(store: RecordStore) -> None:
    _fill(store)
    doc = json.loads(export_json(store, store.records(), complete=True))
    assert doc["schema"] == EXPORT_SCHEMA and doc["complete"] is True
    prev = "0" * 64
    for r in doc["records"]:
        assert hashlib.sha256(_canon(r["body"])).hexdigest() == r["content_sha256"]
        header = {k: r[k] for k in HASHED_COLUMNS}
        assert hashlib.sha256(_canon(header)).hexdigest() == r["record_hash"]
        assert r["prev_hash"] == prev
        prev = r["record_hash"]
    assert doc["head"]["record_hash"] == prev
    assert doc["records"][2]["findings"][0]["rule"] == "r"


def test_csv_export_has_one_row_per_record(store: RecordStore) -> None:
    _fill(store)
    rows = list(csv.DictReader(io.StringIO(export_csv(store.records()))))
    assert [r["kind"] for r in rows] == ["job", "dive", "audit"]
    assert json.loads(rows[0]["body"])["title"] == 'Pier 9, "north" side (fictional)'
    assert rows[1]["diver"] == "Ada Fenwick" and rows[1]["refers_to"] == "1"
    assert hashlib.sha256(rows[1]["body"].encode()).hexdigest() == rows[1]["content_sha256"]
