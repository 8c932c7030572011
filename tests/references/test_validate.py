"""Validator rules: each rule has a good file (the fictional fixture) and a bad copy.

The good files are the fictional test tables in tests/data (see tables_README.md).
Each bad file breaks one rule; the test checks that the issue names the row and
column and that the good file has no issue at all.
"""

from __future__ import annotations

import tomllib

import pytest

from supervisor.references import validate_file
from supervisor.references.issues import errors
from supervisor.references.loader import bundled_paths
from tests.references._helpers import fixture_doc, fixture_path, write_doc


def _set(doc, path, value):
    node = doc
    for key in path[:-1]:
        node = node[key]
    if value is _DELETE:
        del node[path[-1]]
    else:
        node[path[-1]] = value


_DELETE = object()

# (kind, id, path in the document, new value, expected row, column, words in the message)
CASES = [
    # ---- no-stop
    ("no_stop", "deeper-longer-limit", ("rows", 4, "no_stop_limit"), 80, 5, "no_stop_limit",
     "deeper depth never has a longer no-stop limit"),
    ("no_stop", "deeper-unlimited", ("rows", 2, "no_stop_limit"), "unlimited", 3, "no_stop_limit",
     "deeper depth never"),
    ("no_stop", "group-earlier-in-row", ("rows", 1, "repetitive_groups", "C"), 40, 2,
     "repetitive_groups.C", "never gives an earlier group"),
    ("no_stop", "group-beyond-limit", ("rows", 4, "repetitive_groups", "D"), 50, 5,
     "repetitive_groups.D", "beyond the no-stop limit"),
    ("no_stop", "group-later-deeper", ("rows", 2, "repetitive_groups", "A"), 25, 3,
     "repetitive_groups.A", "never reaches a group later"),
    ("no_stop", "unknown-group", ("rows", 0, "repetitive_groups", "Q"), 5, 1,
     "repetitive_groups.Q", "expected one of A, B, C, D"),
    ("no_stop", "depth-repeats", ("rows", 2, "depth"), 30, 3, "depth", "increasing depth"),
    ("no_stop", "depth-not-number", ("rows", 1, "depth"), "thirty", 2, "depth", "'thirty'"),
    ("no_stop", "negative-limit", ("rows", 1, "no_stop_limit"), -5, 2, "no_stop_limit",
     "\"unlimited\""),
    ("no_stop", "unknown-unit", ("conventions", "depth_unit"), "feet", None,
     "conventions.depth_unit", "'fsw'"),
    ("no_stop", "unknown-rounding", ("conventions", "depth_rounding"), "nearest", None,
     "conventions.depth_rounding", "next-deeper"),
    ("no_stop", "typo-column", ("rows", 0, "no_stop_limt"), 5, 1, "no_stop_limt", "unknown key"),
    ("no_stop", "no-source-status", ("provenance", "source_status"), _DELETE, None,
     "provenance.source_status", "missing"),
    ("no_stop", "bad-transcribed-date", ("provenance", "transcribed_on"), "1 Dec 2026", None,
     "provenance", "YYYY-MM-DD"),
    ("no_stop", "no-provenance", ("provenance",), _DELETE, None, "provenance",
     "no [provenance] table"),
    ("no_stop", "wrong-schema", ("schema",), "other/2", None, "schema", "supervisor-table/1"),
    # ---- decompression
    ("decompression", "longer-time-less-deco", ("rows", 1, "air", "stops", 1, "minutes"), 1, 2,
     "air.stops", "longer bottom time never needs less decompression"),
    ("decompression", "longer-time-earlier-group", ("rows", 2, "repetitive_group"), "G", 3,
     "repetitive_group", "never gives an earlier group"),
    ("decompression", "total-does-not-add-up", ("rows", 0, "air", "total_ascent"), 12, 1,
     "air.total_ascent", "add up to 7.0 min"),
    ("decompression", "surd-total", ("rows", 2, "surd_o2", "total_ascent"), 60, 3,
     "surd_o2.total_ascent", "surface interval"),
    ("decompression", "o2-total-breaks", ("rows", 2, "air_o2", "total_ascent"), 50, 3,
     "air_o2.total_ascent", "5 air breaks"),
    ("decompression", "deeper-less-deco", ("rows", 4, "air", "stops"),
     [{"depth": 20, "minutes": 2, "gas": "air", "place": "water"}], 5, "air.stops",
     "deeper depth never needs less decompression"),
    ("decompression", "stop-order", ("rows", 1, "air", "stops"),
     [{"depth": 10, "minutes": 12, "gas": "air", "place": "water"},
      {"depth": 20, "minutes": 3, "gas": "air", "place": "water"}], 2, "air.stops[2].depth",
     "deepest first"),
    ("decompression", "off-grid-stop", ("rows", 0, "air", "stops", 0, "depth"), 15, 1,
     "air.stops[1].depth", "off the stop grid"),
    ("decompression", "first-stop-time", ("rows", 2, "time_to_first_stop"), 5, 3,
     "time_to_first_stop", "takes 1.3 min"),
    ("decompression", "bad-gas", ("rows", 1, "air_o2", "stops", 1, "gas"), "oxygn", 2,
     "air_o2.stops[2].gas", "unknown gas"),
    ("decompression", "half-periods", ("rows", 2, "surd_o2", "chamber_o2_periods"), 1.3, 3,
     "surd_o2.chamber_o2_periods", "half periods"),
    ("decompression", "time-order", ("rows", 1, "bottom_time"), 30, 2, "bottom_time",
     "increasing bottom time"),
    # ---- treatment
    ("treatment", "not-continuous", ("rows", 2),
     {"step": 3, "from_depth": 50, "to_depth": 50, "minutes": 5, "gas": "air",
      "elapsed_min": 28}, 3, "from_depth", "step before ends at 60"),
    ("treatment", "elapsed", ("rows", 3, "elapsed_min"), 60, 4, "elapsed_min", "add up to 48"),
    ("treatment", "travel-rate", ("rows", 4, "travel_rate"), 3, 5, "minutes", "takes 10.0 min"),
    ("treatment", "numbering", ("rows", 1, "step"), 3, 2, "step", "expected 2"),
    ("treatment", "travel-without-rate", ("rows", 0, "travel_rate"), _DELETE, 1, "",
     "needs travel_rate"),
    # ---- limits
    ("limits", "key-order", ("rows", 2, "po2_atm"), 0.8, 3, "po2_atm", "strictly increase"),
    ("limits", "declared-decreasing", ("rows", 3, "limit_min"), 300, 4, "limit_min",
     "declared decreasing"),
    ("limits", "missing-column", ("rows", 1, "limit_min"), _DELETE, 2, "limit_min",
     "same columns"),
    ("limits", "not-finite", ("rows", 1, "limit_min"), float("inf"), 2, "", "finite"),
]


@pytest.mark.parametrize("kind", ["no_stop", "decompression", "treatment", "limits"])
def test_good_file_has_no_issue(kind):
    assert validate_file(fixture_path(kind)) == []


@pytest.mark.parametrize(("kind", "case", "path", "value", "row", "column", "words"), CASES,
                         ids=[c[1] for c in CASES])
def test_bad_file_names_row_and_column(tmp_path, kind, case, path, value, row, column, words):
    doc = fixture_doc(kind)
    _set(doc, path, value)
    if value == float("inf"):
        # TOML writers refuse inf, so write the text form directly.
        text = fixture_path(kind).read_text("utf-8")
        text = text.replace("limit_min = 400", "limit_min = inf", 1)
        p = tmp_path / f"{doc['name']}.toml"
        p.write_text(text, "utf-8")
    else:
        p = write_doc(tmp_path, doc)
    errs = errors(validate_file(p))
    assert errs, f"{case}: expected an error"
    hit = [e for e in errs if e.row == row and column in (e.column or "")
           and words in e.message]
    assert hit, f"{case}: no error at row {row} column {column!r} with {words!r}: " + \
        "; ".join(e.line(p.name) for e in errs)


def test_model_coefficients_rules(tmp_path):
    """Half-times increase, 0 < b < 1 and value statuses are known tags."""
    src = next(p for p in bundled_paths() if p.stem == "zhl16c")
    doc = tomllib.loads(src.read_text("utf-8"))
    assert not errors(validate_file(src))
    doc["rows"][3]["n2_half_min"] = 1.0
    doc["rows"][5]["n2_b"] = 1.2
    doc["rows"][6]["value_status"]["n2_b"] = "GUESS"
    p = write_doc(tmp_path, doc)
    found = {(e.row, e.column) for e in errors(validate_file(p))}
    assert (4, "n2_half_min") in found
    assert (6, "n2_b") in found
    assert (7, "value_status.n2_b") in found


def test_repetitive_group_gap_is_a_warning(tmp_path):
    doc = fixture_doc("no_stop")
    del doc["rows"][4]["repetitive_groups"]["D"]  # 30..40 min at 60 fsw now has no group
    p = write_doc(tmp_path, doc)
    issues = validate_file(p)
    assert not errors(issues)
    assert any(i.severity == "warning" and i.row == 5 and "have no group" in i.message
               for i in issues)


def test_name_must_equal_file_stem(tmp_path):
    doc = fixture_doc("no_stop")
    p = write_doc(tmp_path, doc, name="tables_fictional_no_stop")
    p2 = p.with_name("other-name.toml")
    p.rename(p2)
    errs = errors(validate_file(p2))
    assert any(e.column == "name" and "other-name" in e.message for e in errs)


def _bundled_doc(stem):
    src = next(p for p in bundled_paths() if p.stem == stem)
    return tomllib.loads(src.read_text("utf-8"))


@pytest.mark.parametrize(("edit", "column", "words"), [
    (lambda d: d["conventions"]["extensions"][0].update(after_step=40),
     "conventions.extensions[1].after_step", "has 12 steps"),
    (lambda d: d["conventions"]["extensions"][0].update(depth=30.0),
     "conventions.extensions[1].depth", "step 6 ends at 60"),
    (lambda d: d["conventions"]["attendant_oxygen"].pop(1),
     "conventions.attendant_oxygen", "no case applies"),
    (lambda d: d["conventions"]["attendant_oxygen"][0].update(depth=40.0),
     "conventions.attendant_oxygen[1].depth", "no step of the table is at 40"),
    (lambda d: d["conventions"].update(plannable=False, missing=[]),
     "conventions", "needs missing"),
    (lambda d: [d["conventions"].pop(k) for k in ("compression_rate", "compression_status")],
     "conventions.compression_rate", "give compression_rate"),
    (lambda d: d["rows"][-1].update(to_depth=10),
     "to_depth", "ends at the surface"),
    (lambda d: d["conventions"]["extensions"][1].update(option="oxygen"),
     "conventions", "one entry per option"),
])
def test_treatment_planning_rules(tmp_path, edit, column, words):
    """Extensions, attendant cases and plannability of a treatment table (a bundled copy)."""
    doc = _bundled_doc("usn-tt6")
    assert not errors(validate_file(next(p for p in bundled_paths() if p.stem == "usn-tt6")))
    edit(doc)
    if doc["rows"][-1]["to_depth"] == 10:
        doc["rows"][-1]["travel_rate"] = 20 / 30
    p = write_doc(tmp_path, doc)
    errs = errors(validate_file(p))
    assert any(column in (e.column or "") and words in e.message for e in errs), \
        "; ".join(e.line(p.name) for e in errs)


def test_attendant_oxygen_beyond_the_table_is_a_warning(tmp_path):
    doc = _bundled_doc("usn-tt6")
    doc["conventions"]["attendant_oxygen"][0]["oxygen_min"] = 150.0
    issues = validate_file(write_doc(tmp_path, doc))
    assert not errors(issues)
    assert any(i.severity == "warning" and "more than the patient's 120" in i.message
               for i in issues)


def test_table_that_cannot_be_planned_may_list_stops_without_travel():
    src = next(p for p in bundled_paths() if p.stem == "usn-tt4")
    assert validate_file(src) == []
    doc = tomllib.loads(src.read_text("utf-8"))
    assert doc["conventions"]["plannable"] is False and doc["conventions"]["missing"]


# ---- issue 13: wrong types are refused, and no sanity rule is skipped because of one

# (kind, id, path, wrong value, row, column, words): each reproducer validated before
TYPE_CASES = [
    ("limits", "boolean-po2", ("rows", 1, "po2_atm"), True, 2, "po2_atm", "true (a boolean)"),
    ("limits", "string-po2", ("rows", 1, "po2_atm"), "0.7", 2, "po2_atm", "'0.7'"),
    ("no_stop", "string-depth", ("rows", 1, "depth"), "70", 2, "depth", "'70'"),
    ("no_stop", "boolean-depth", ("rows", 1, "depth"), True, 2, "depth", "a boolean"),
    ("decompression", "boolean-stop-time", ("rows", 0, "air", "stops", 0, "minutes"), True, 1,
     "air.stops[1].minutes", "a boolean"),
    ("decompression", "string-bottom-time", ("rows", 0, "bottom_time"), "10", 1, "bottom_time",
     "'10'"),
    ("treatment", "boolean-minutes", ("rows", 0, "minutes"), False, 1, "minutes", "a boolean"),
    ("treatment", "float-step", ("rows", 0, "step"), 1.5, 1, "step", "whole number"),
]


@pytest.mark.parametrize(("kind", "case", "path", "value", "row", "column", "words"), TYPE_CASES,
                         ids=[c[1] for c in TYPE_CASES])
def test_wrong_type_is_an_error(tmp_path, kind, case, path, value, row, column, words):
    doc = fixture_doc(kind)
    _set(doc, path, value)
    errs = errors(validate_file(write_doc(tmp_path, doc)))
    assert any(e.row == row and column in (e.column or "") and words in e.message
               for e in errs), "; ".join(e.line(case) for e in errs)


def test_wrong_type_does_not_hide_the_key_order(tmp_path):
    """Reproducer: a boolean PO2 in one row switched the key-order check off ("valid")."""
    doc = fixture_doc("limits")
    doc["rows"][1]["po2_atm"] = True
    doc["rows"][3]["po2_atm"] = doc["rows"][2]["po2_atm"]  # a repeat: must still be found
    errs = errors(validate_file(write_doc(tmp_path, doc)))
    assert any(e.row == 2 and e.column == "po2_atm" for e in errs)
    assert any(e.row == 4 and "strictly increase" in e.message for e in errs)


def test_sanity_rules_run_on_the_rows_that_pass_the_schema(tmp_path):
    """A row failing the schema does not stop the order rules on the others (file numbering)."""
    doc = fixture_doc("no_stop")
    doc["rows"][0]["depth"] = "10"
    doc["rows"][3]["depth"] = doc["rows"][2]["depth"]
    errs = errors(validate_file(write_doc(tmp_path, doc)))
    assert any(e.row == 1 and e.column == "depth" for e in errs)
    assert any(e.row == 4 and "increasing depth" in e.message for e in errs)


def test_mixed_column_types_in_a_limits_table(tmp_path):
    doc = fixture_doc("limits")
    doc["rows"][2]["limit_min"] = "long"
    errs = errors(validate_file(write_doc(tmp_path, doc)))
    assert any(e.row == 3 and e.column == "limit_min" and "other rows hold a number" in e.message
               for e in errs)


@pytest.mark.parametrize("value", [{"v": "6"}, [1, 2], True, 1.5])
def test_compartment_of_the_wrong_type(tmp_path, value):
    """Reproducer: ``compartment = {v = "6"}`` ended in TypeError (unhashable type: 'dict')."""
    src = next(p for p in bundled_paths() if p.stem == "zhl16c")
    doc = tomllib.loads(src.read_text("utf-8"))
    doc["rows"][0]["compartment"] = value
    errs = errors(validate_file(write_doc(tmp_path, doc)))
    assert [e.column for e in errs] == ["compartment"]
    assert "compartment label" in errs[0].message


def test_long_value_is_quoted_short(tmp_path):
    doc = fixture_doc("no_stop")
    doc["rows"][1]["depth"] = "x" * 200_000
    errs = errors(validate_file(write_doc(tmp_path, doc)))
    assert errs and all(len(e.message) < 300 for e in errs)
    assert any("200000 characters" in e.message for e in errs)
