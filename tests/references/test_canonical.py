"""Row hashes, the canonical TOML writer and atomic writes."""

from __future__ import annotations

import hashlib
import os
import tomllib

import pytest

from supervisor.errors import TableError
from supervisor.references.canonical import (
    atomic_write_text,
    canonical_json,
    context_hash,
    dumps_table,
    row_hash,
)
from tests.references._helpers import fixture_doc


def test_row_hash_is_sha256_of_sorted_compact_json():
    """The documented form: keys sorted, no spaces, UTF-8 (recomputed here with hashlib)."""
    row = {"no_stop_limit": 63, "depth": 60, "note": "Zürich"}
    expected = hashlib.sha256('{"depth":60,"no_stop_limit":63,"note":"Zürich"}'
                              .encode()).hexdigest()
    assert row_hash(row) == expected


def test_row_hash_ignores_verification_columns_and_key_order():
    a = {"depth": 60, "no_stop_limit": 63, "verification": "unverified", "row_hash": ""}
    b = {"no_stop_limit": 63, "depth": 60, "verification": "verified", "verified_by": "X",
         "row_hash": "abc"}
    assert row_hash(a) == row_hash(b)


def test_row_hash_integral_float_equals_int_but_data_change_differs():
    assert row_hash({"depth": 60.0}) == row_hash({"depth": 60})
    assert row_hash({"depth": 60}) != row_hash({"depth": 61})
    assert row_hash({"depth": 60, "source_status": "FROM MEMORY"}) != \
        row_hash({"depth": 60, "source_status": "VERIFIED"})
    nested_a = {"air": {"stops": [{"depth": 10, "minutes": 5}]}}
    nested_b = {"air": {"stops": [{"depth": 10, "minutes": 6}]}}
    assert row_hash(nested_a) != row_hash(nested_b)


def test_canonical_json_refuses_non_finite():
    with pytest.raises(TableError):
        canonical_json({"x": float("nan")})


def test_context_hash_covers_conventions_and_source():
    doc = fixture_doc("no_stop")
    h = context_hash(doc)
    doc["conventions"]["depth_unit"] = "msw"
    assert context_hash(doc) != h
    doc = fixture_doc("no_stop")
    doc["provenance"]["edition"] = "test edition 2"
    assert context_hash(doc) != h
    doc = fixture_doc("no_stop")
    doc["provenance"]["notes"] = "notes do not identify the source"
    assert context_hash(doc) == h


@pytest.mark.parametrize("kind", ["no_stop", "decompression", "treatment", "limits"])
def test_dumps_table_round_trips(kind):
    doc = fixture_doc(kind)
    text = dumps_table(doc)
    assert tomllib.loads(text) == doc
    assert dumps_table(tomllib.loads(text)) == text  # stable


def test_dumps_table_escapes_strings():
    doc = fixture_doc("no_stop")
    doc["provenance"]["notes"] = 'quote " backslash \\ newline \n tab \t bell \x07'
    assert tomllib.loads(dumps_table(doc)) == doc


def test_atomic_write_replaces_and_keeps_mode(tmp_path):
    p = tmp_path / "t.toml"
    p.write_text("old", "utf-8")
    os.chmod(p, 0o640)
    atomic_write_text(p, "new")
    assert p.read_text("utf-8") == "new"
    assert (p.stat().st_mode & 0o777) == 0o640
    assert [x.name for x in tmp_path.iterdir()] == ["t.toml"]


def test_atomic_write_failure_leaves_old_bytes(tmp_path, monkeypatch):
    p = tmp_path / "t.toml"
    p.write_bytes(b"old bytes")

    def boom(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OSError):
        atomic_write_text(p, "new")
    assert p.read_bytes() == b"old bytes"
    assert [x.name for x in tmp_path.iterdir()] == ["t.toml"]
