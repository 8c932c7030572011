"""Recording a second person's check: row selection, hashes, refusals, atomic edits."""

from __future__ import annotations

import tomllib

import pytest

from supervisor.errors import InputError
from supervisor.references import (
    InvalidTableError,
    load_table,
    parse_row_spec,
    row_hash,
    verify_rows,
)
from supervisor.references.canonical import dumps_table, toml_value
from tests.references._helpers import fixture_doc, fixture_path, write_doc


@pytest.fixture(scope="module")
def deco():
    return load_table(fixture_path("decompression"))


@pytest.mark.parametrize(("spec", "rows"), [
    ("all", [0, 1, 2, 3, 4]),
    ("1-2,5", [0, 1, 4]),
    ("3, 1", [0, 2]),
    ("@60", [0, 1, 2]),
    ("@80/30", [3]),
    ("@60/60,4-5", [1, 3, 4]),
])
def test_parse_row_spec(deco, spec, rows):
    assert parse_row_spec(spec, deco) == rows


@pytest.mark.parametrize(("spec", "words"), [
    ("6", "row 6 does not exist"),
    ("0", "row 0 does not exist"),
    ("3-2", "runs backwards"),
    ("@70", "no row at 70"),
    ("first", "cannot read 'first'"),
    ("1,,2", "empty item"),
    ("", "empty selection"),
])
def test_parse_row_spec_errors(deco, spec, words):
    with pytest.raises(InputError, match=words) as info:
        parse_row_spec(spec, deco)
    assert info.value.field == "--rows"


def test_depth_time_key_refused_for_no_stop():
    t = load_table(fixture_path("no_stop"))
    assert parse_row_spec("@40", t) == [2]
    with pytest.raises(InputError, match="one row per depth"):
        parse_row_spec("@40/10", t)


def test_verify_records_hash_date_and_log(copy_fixture):
    p = copy_fixture("decompression")
    out = verify_rows(p, "@60", "Second Checker", "read aloud against the source", "2026-12-01")
    assert out.rows == [1, 2, 3] and out.voided == [] and not out.canonical_rewrite
    doc = tomllib.loads(p.read_text("utf-8"))
    for i in (0, 1, 2):
        r = doc["rows"][i]
        assert r["verification"] == "verified" and r["verified_by"] == "Second Checker"
        assert r["verified_on"] == "2026-12-01" and r["row_hash"] == row_hash(r)
    assert doc["rows"][3]["verification"] == "unverified"
    assert doc["verification"]["log"] == [{"by": "Second Checker", "on": "2026-12-01",
                                           "method": "read aloud against the source",
                                           "rows": "1-3", "row_count": 3}]
    t = load_table(p)
    assert [s.verified for s in t.row_states] == [True, True, True, False, False]


def test_verify_keeps_comments_and_other_lines(copy_fixture):
    p = copy_fixture("no_stop")
    text = "# kept comment\n" + p.read_text("utf-8").replace(
        "[[rows]]\n", "[[rows]]  # per-row comment\n", 1)
    p.write_text(text, "utf-8")
    verify_rows(p, "1", "Second Checker", "read aloud", "2026-12-01")
    new = p.read_text("utf-8")
    assert new.startswith("# kept comment\n") and "[[rows]]  # per-row comment\n" in new
    changed = [line for line in new.splitlines() if line not in text.splitlines()]
    assert all(line.split(" =")[0] in ("verification", "verified_by", "verified_on",
                                       "verification_method", "row_hash", "context_hash", "by",
                                       "on", "method", "rows", "row_count")
               or line.startswith("[") for line in changed if line)


def test_verify_second_check_appends_log(copy_fixture):
    p = copy_fixture("no_stop")
    verify_rows(p, "1", "Second Checker", "read aloud", "2026-12-01")
    verify_rows(p, "2-3", "Third Checker", "compared against a scan", "2026-12-01")
    doc = tomllib.loads(p.read_text("utf-8"))
    assert [e["by"] for e in doc["verification"]["log"]] == ["Second Checker", "Third Checker"]
    assert load_table(p).n_verified == 3


def test_reverify_after_convention_change_voids_other_rows(copy_fixture):
    p = copy_fixture("no_stop")
    verify_rows(p, "all", "Second Checker", "read aloud", "2026-12-01")
    p.write_text(p.read_text("utf-8").replace("ascent_rate = 30.0", "ascent_rate = 60.0"),
                 "utf-8")
    assert load_table(p).n_verified == 0
    out = verify_rows(p, "1", "Second Checker", "checked the new ascent rate", "2026-12-01")
    assert out.voided == [2, 3, 4, 5]
    t = load_table(p)
    assert [s.verified for s in t.row_states] == [True, False, False, False, False]


@pytest.mark.parametrize(("kwargs", "field"), [
    ({"by": "Test Author"}, "--by"),            # the transcriber
    ({"by": "  "}, "--by"),
    ({"method": ""}, "--method"),
    ({"on": "2026-13-01"}, "--on"),
    ({"on": "2026-11-30"}, "--on"),             # before the transcription (2026-12-01)
    ({"spec": "9"}, "--rows"),
])
def test_verify_refusals_leave_file_byte_identical(copy_fixture, kwargs, field):
    p = copy_fixture("no_stop")
    before = p.read_bytes()
    args = {"spec": "all", "by": "Second Checker", "method": "read aloud", "on": "2026-12-01"}
    args.update(kwargs)
    with pytest.raises(InputError) as info:
        verify_rows(p, args["spec"], args["by"], args["method"], args["on"])
    assert info.value.field == field
    assert p.read_bytes() == before


def test_verify_refuses_invalid_table(tmp_path):
    doc = fixture_doc("no_stop")
    doc["rows"][4]["no_stop_limit"] = 80
    p = write_doc(tmp_path, doc)
    before = p.read_bytes()
    with pytest.raises(InvalidTableError):
        verify_rows(p, "all", "Second Checker", "read aloud", "2026-12-01")
    assert p.read_bytes() == before


def test_verify_falls_back_to_canonical_layout(tmp_path):
    """Rows written as one inline array cannot be edited line by line: rewritten canonically."""
    doc = fixture_doc("no_stop")
    rows = doc.pop("rows")
    head, _, rest = dumps_table(doc).partition("\n[provenance]")
    p = tmp_path / "tables_fictional_no_stop.toml"
    p.write_text(head + "\nrows = " + toml_value(rows) + "\n\n[provenance]" + rest, "utf-8")
    assert load_table(p).n_verified == 0
    out = verify_rows(p, "2", "Second Checker", "read aloud", "2026-12-01")
    assert out.canonical_rewrite
    after = tomllib.loads(p.read_text("utf-8"))
    assert after["rows"][1]["verification"] == "verified"
    assert [r["depth"] for r in after["rows"]] == [r["depth"] for r in rows]
    assert p.read_text("utf-8").count("[[rows]]") == 5
    assert [s.verified for s in load_table(p).row_states] == [False, True, False, False, False]


def test_verify_refuses_a_date_in_the_future(copy_fixture):
    import datetime as dt

    p = copy_fixture("no_stop")
    before = p.read_bytes()
    tomorrow = (dt.date.today() + dt.timedelta(days=1)).isoformat()
    with pytest.raises(InputError) as info:
        verify_rows(p, "all", "Second Checker", "read aloud", tomorrow)
    assert info.value.field == "--on"
    assert p.read_bytes() == before
