"""Canonical JSON, record hashes and the chain walk, without a database.

The hash definitions are checked against ``hashlib`` and ``json`` from the
Python standard library (a general-purpose reference); the walk's answers are
the project's own contract.
"""

from __future__ import annotations

import hashlib
import json

import pytest

from supervisor.records.chain import GENESIS, canonical_json, header_text, record_hash, walk
from supervisor.records.schema import HASHED_COLUMNS


def test_canonical_json_is_sorted_compact_utf8() -> None:
    assert canonical_json({"b": 1, "a": [1.5, "Ærø"]}) == '{"a":[1.5,"Ærø"],"b":1}'
    assert canonical_json({"a": 1, "b": 2}) == canonical_json({"b": 2, "a": 1})
    with pytest.raises(ValueError):
        canonical_json({"x": float("nan")})


def _row(seq: int, prev: str, body: str) -> tuple[dict, str]:
    row = {"seq": seq, "kind": "job", "created_at": "2031-05-14T06:00:00+00:00",
           "occurred_at": None, "job": "j", "diver": None, "refers_to": None,
           "corrects": None, "content_sha256": hashlib.sha256(body.encode()).hexdigest(),
           "prev_hash": prev}
    row["record_hash"] = record_hash(row)
    return row, body


def _chain(n: int) -> list[tuple[dict, str]]:
    out, prev = [], GENESIS
    for i in range(1, n + 1):
        row, body = _row(i, prev, canonical_json({"i": i}))
        out.append((row, body))
        prev = row["record_hash"]
    return out


def test_record_hash_is_sha256_of_the_header_json() -> None:
    row, _ = _row(1, GENESIS, "{}")
    header = {k: row[k] for k in HASHED_COLUMNS}
    expected = hashlib.sha256(json.dumps(header, sort_keys=True, separators=(",", ":"),
                                         ensure_ascii=False).encode()).hexdigest()
    assert row["record_hash"] == expected
    assert header_text(row) == json.dumps(header, sort_keys=True, separators=(",", ":"),
                                          ensure_ascii=False)


def test_intact_chain() -> None:
    report = walk(_chain(4), {})
    assert report.intact and report.count == 4 and report.head_seq == 4


@pytest.mark.parametrize(("change", "bad", "words"), [
    (lambda c: c[2][0].update(diver="x"), 3, "header"),
    (lambda c: c.__setitem__(1, (c[1][0], '{"i":99}')), 2, "content hash"),
    (lambda c: c.__setitem__(1, (c[1][0], '{ "i": 2 }')), 2, "canonical"),
    (lambda c: c.pop(1), 3, "expected record 2"),
    (lambda c: c[3][0].update(prev_hash=GENESIS), 4, "link"),
    (lambda c: c.__setitem__(0, (c[0][0], None)), 1, "no tombstone"),
])
def test_first_changed_record_is_named(change, bad: int, words: str) -> None:
    chain = _chain(5)
    change(chain)
    report = walk(chain, {})
    assert report.first_bad == bad
    assert words in report.problem
    assert report.head_seq == (None if bad == 1 else report.count)


def test_purged_body_verifies_against_its_tombstone() -> None:
    chain = _chain(3)
    row, _ = chain[1]
    chain[1] = (row, None)
    assert walk(chain, {2: row["content_sha256"]}).intact
    assert walk(chain, {2: "0" * 64}).first_bad == 2
