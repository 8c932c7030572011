"""Loading: provenance refused when missing, bundled files, verification voided by edits."""

from __future__ import annotations

import tomllib

import pytest

from supervisor.errors import TableError
from supervisor.references import (
    InvalidTableError,
    UnreadableTableError,
    bundled_paths,
    load_table,
    row_hash,
)
from supervisor.references.canonical import context_hash
from supervisor.references.issues import errors
from supervisor.references.loader import inspect_document
from tests.references._helpers import fixture_doc, fixture_path, write_doc


def _verified(doc, rows, by="second checker"):
    """Mark ``rows`` (0-based) verified with correct hashes, as `tables verify` would."""
    for i in rows:
        r = doc["rows"][i]
        r.update(verification="verified", verified_by=by, verified_on="2026-12-01",
                 verification_method="read against the fictional source")
        r["row_hash"] = row_hash(r)
    doc["verification"] = {"context_hash": context_hash(doc)}
    return doc


@pytest.mark.parametrize("path", bundled_paths(), ids=lambda p: p.stem)
def test_every_bundled_table_loads(path):
    t = load_table(path)
    assert t.name == path.stem
    assert len(t.row_states) == len(t.rows) > 0


def test_bundled_kinds_present():
    kinds = {load_table(p).kind for p in bundled_paths()}
    assert "no-stop" in kinds


def test_load_by_name_and_unknown_name():
    assert load_table("usn-rev7-air-ndl").kind == "no-stop"
    with pytest.raises(TableError, match="no bundled table named 'no-such-table'"):
        load_table("no-such-table")


def test_file_without_provenance_is_refused(tmp_path):
    doc = fixture_doc("no_stop")
    del doc["provenance"]
    p = write_doc(tmp_path, doc)
    with pytest.raises(TableError, match=r"no \[provenance\] table"):
        load_table(p)
    with pytest.raises(TableError, match=r"no \[provenance\] table"):
        load_table(p, strict=False)  # screening does not skip provenance either


def test_unreadable_files(tmp_path):
    with pytest.raises(UnreadableTableError, match="cannot read"):
        load_table(tmp_path / "missing.toml")
    bad = tmp_path / "bad.toml"
    bad.write_text("schema = [unclosed", "utf-8")
    with pytest.raises(UnreadableTableError, match="not valid TOML"):
        load_table(bad)
    latin = tmp_path / "latin.toml"
    latin.write_bytes(b"title = \"Z\xfcrich\"")
    with pytest.raises(UnreadableTableError, match="not UTF-8"):
        load_table(latin)


def test_strict_load_refuses_sanity_errors_but_screening_load_accepts(tmp_path):
    doc = fixture_doc("no_stop")
    doc["rows"][4]["no_stop_limit"] = 80
    p = write_doc(tmp_path, doc)
    with pytest.raises(InvalidTableError) as info:
        load_table(p)
    assert "row 5" in str(info.value) and "no_stop_limit" in str(info.value)
    assert load_table(p, strict=False).rows[4].no_stop_limit == 80


def test_unverified_by_default():
    t = load_table(fixture_path("no_stop"))
    assert t.n_verified == 0
    assert all(not s.verified and not s.trusted for s in t.row_states)


def test_verified_rows_hold_when_unchanged(tmp_path):
    p = write_doc(tmp_path, _verified(fixture_doc("no_stop"), [0, 3]))
    t = load_table(p)
    assert [s.verified for s in t.row_states] == [True, False, False, True, False]
    assert t.row_states[0].trusted  # VERIFIED source and verified row
    assert t.issues == []


def test_edit_after_verification_voids_that_row(tmp_path):
    doc = _verified(fixture_doc("no_stop"), [0, 3])
    doc["rows"][3]["repetitive_groups"]["A"] = 9  # still passes every sanity rule
    p = write_doc(tmp_path, doc)
    t = load_table(p)
    assert [s.verified for s in t.row_states] == [True, False, False, False, False]
    assert t.row_states[3].reason == "changed since verification"
    (w,) = t.issues
    assert w.severity == "warning" and w.row == 4 and w.column == "row_hash"
    assert "changed since verification by second checker on 2026-12-01" in w.message


def test_convention_change_voids_every_row(tmp_path):
    doc = _verified(fixture_doc("no_stop"), [0, 1, 2])
    doc["conventions"]["ascent_rate"] = 60.0
    p = write_doc(tmp_path, doc)
    t = load_table(p)
    assert t.n_verified == 0
    assert any(i.column == "verification.context_hash" for i in t.issues)


def test_verified_without_record_is_an_error(tmp_path):
    doc = fixture_doc("no_stop")
    doc["rows"][1]["verification"] = "verified"  # flag flipped by hand, no hash, no checker
    _, issues = inspect_document(doc)
    (e,) = errors(issues)
    assert e.row == 2 and "verified_by is empty" in e.message and "row_hash is empty" in e.message


def test_transcriber_cannot_be_checker(tmp_path):
    doc = _verified(fixture_doc("no_stop"), [0], by="Test Author")
    _, issues = inspect_document(doc)
    assert any("second person" in e.message for e in errors(issues))


def test_row_source_status_override():
    doc = fixture_doc("no_stop")
    doc["rows"][2]["source_status"] = "SECONDARY"
    table, _ = inspect_document(doc)
    assert [s.source_status for s in table.row_states][1:4] == ["VERIFIED", "SECONDARY",
                                                                 "VERIFIED"]
    assert table.least_status == "SECONDARY"


def test_fixture_file_is_plain_toml():
    assert tomllib.loads(fixture_path("decompression").read_text("utf-8"))["kind"] == \
        "decompression"
