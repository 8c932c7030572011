"""Table-conformance rules: a passing and a failing plan for every rule.

The decompression table is fictional test data (tests/data/plans_engine); the
bundled no-stop table is the U.S. Navy Rev 7 Table 9-7 held FROM MEMORY, whose
60 fsw limit the file records as 63 min (air-decompression notes §3.2, FROM
MEMORY): rules resting on it can only warn.
"""

from __future__ import annotations

import _contract as _c
import pytest
from _contract import Case
from _engine_plans import TABLE, data, only, run, second_dive, trusted_table

from supervisor.rules.tables import FAMILY, NAVY_TABLE_USE

NDL = "usn-rev7-air-ndl"


def _with(table, **dive):
    d = data(**dive)
    d["policy"]["reference_table"] = str(table)
    return d


ROW_60_50 = dict(bottom_time_min=50, decompression="in-water", stops=[{"depth": 10, "minutes": 5}])


def test_no_table_needs_review():
    f = only(run(data(), FAMILY, "table-conformance"), "warn")
    assert "names no reference table" in f.message and not f.verified


def test_conforms_to_an_unverified_row_needs_review():
    """Issue 8 §3: the dive's finding is unverified information pointing to the one job-level
    references-unverified warning, not a warning repeated for every dive."""
    f = only(run(_with(TABLE, **ROW_60_50), FAMILY, "table-conformance"), "info")
    assert not f.verified and "unverified" in f.message
    assert "references-unverified" in f.message


def test_conforms_to_a_trusted_row_passes(tmp_path):
    f = only(run(_with(trusted_table(tmp_path), **ROW_60_50), FAMILY, "table-conformance"),
             "pass")
    assert "row 1: verified, VERIFIED" in f.message


def test_short_stop_on_an_unverified_row_warns():
    d = _with(TABLE, bottom_time_min=50, decompression="in-water",
              stops=[{"depth": 10, "minutes": 3}])
    f = only(run(d, FAMILY, "table-conformance"), "warn")
    assert f.rule == "table-conformance"
    # the fictional row: 10 fsw 5 min; issue 8: the figures carry the stop, never "3 / 5 min"
    assert (f.measured, f.limit) == ("10 fsw water air: 3 min", "10 fsw water air: 5 min")
    assert f.citation == NAVY_TABLE_USE and not f.verified


def test_short_stop_on_a_trusted_row_fails(tmp_path):
    d = _with(trusted_table(tmp_path), bottom_time_min=55, decompression="in-water",
              stops=[{"depth": 10, "minutes": 12}])
    f = only(run(d, FAMILY, "table-conformance"), "fail")
    # 55 min enters the 60 min row: 20 fsw 2 min is missing
    assert f.rule == "table-conformance"
    assert (f.measured, f.limit) == ("20 fsw water air: none", "20 fsw water air: 2 min")
    assert "missing" in f.message and f.citation == NAVY_TABLE_USE


def test_wrong_gas_at_a_stop_does_not_conform(tmp_path):
    d = _with(trusted_table(tmp_path), bottom_time_min=50, decompression="in-water-oxygen",
              stops=[{"depth": 10, "minutes": 3}])
    f = only(run(d, FAMILY, "table-conformance"), "fail")
    assert "on oxygen: missing" in f.message


def test_no_stop_table_within_limit_needs_review():
    f = only(run(_with(NDL), FAMILY, "table-conformance"), "info")
    assert "FROM MEMORY" in f.message and not f.verified


def test_no_stop_table_beyond_limit_without_stops_warns():
    f = only(run(_with(NDL, bottom_time_min=70), FAMILY, "table-conformance"), "warn")
    assert f.rule == "table-conformance"
    assert (f.measured, f.limit) == (70, 63)  # FROM MEMORY row: 60 fsw, 63 min
    assert f.source_status == "FROM MEMORY" and f.citation == NAVY_TABLE_USE


def test_decompression_dive_against_no_stop_table_needs_review():
    d = _with(NDL, bottom_time_min=70, decompression="in-water",
              stops=[{"depth": 10, "minutes": 20}])
    f = only(run(d, FAMILY, "table-conformance"), "warn")
    assert "reference schedule not available" in f.message


def test_mode_missing_in_row_needs_review():
    d = _with(TABLE, max_depth=70, bottom_time_min=40, decompression="in-water-oxygen",
              stops=[{"depth": 10, "minutes": 7, "gas": "oxygen"}])
    f = only(run(d, FAMILY, "table-conformance"), "warn")
    assert "reference schedule not available" in f.message
    assert run(d, FAMILY, "table-outside") == []


def test_other_gas_not_applicable():
    d = _with(TABLE, mode="surface-supplied-nitrox", gas="32/0")
    f = only(run(d, FAMILY, "table-conformance"), "warn")
    assert "is for air" in f.message


def test_repetitive_dive_needs_review():
    d = second_dive(_with(TABLE, **ROW_60_50), max_depth=60, bottom_time_min=50,
                    descent_rate=60, decompression="in-water",
                    stops=[{"depth": 10, "minutes": 5}], surface_interval_min=120,
                    previous_dive="D1")
    got = [f for f in run(d, FAMILY, "table-conformance") if f.dive == "D2"]
    assert any("residual nitrogen time" in f.message for f in got)


def test_inside_passes():
    f = only(run(_with(TABLE, **ROW_60_50), FAMILY, "table-outside"), "pass")
    assert f.limit == 60


def test_outside_by_depth_fails():
    d = _with(TABLE, max_depth=100, bottom_time_min=20, decompression="in-water",
              stops=[{"depth": 10, "minutes": 10}])
    f = only(run(d, FAMILY, "table-outside"), "fail")
    assert f.rule == "table-outside"
    assert (f.measured, f.limit, f.unit) == (100.0, 70.0, "fsw")
    assert f.citation == "contractor policy (policy.reference_table)"


def test_outside_by_time_fails():
    d = _with(TABLE, bottom_time_min=90, decompression="in-water",
              stops=[{"depth": 10, "minutes": 40}])
    f = only(run(d, FAMILY, "table-outside"), "fail")
    assert (f.measured, f.limit, f.unit) == (90, 60.0, "min")


def test_unloadable_table_needs_review(tmp_path):
    bad = tmp_path / "broken.toml"
    bad.write_text('schema = "supervisor-table/1"\n', encoding="utf-8")
    f = only(run(_with(bad), FAMILY, "table-conformance"), "warn")
    assert "needs review" in f.message


# ---------------------------------------------------------------------------
# the findings contract: a passing and a failing plan for every rule (the fictional
# table's rows: 60 fsw / 50 min: 10 fsw 5 min; 60 fsw / 60 min: 20 fsw 2 min, 10 fsw 12 min)

CASES: dict[str, Case] = {
    "table-conformance": Case(
        passing=lambda tmp: _with(trusted_table(tmp), **ROW_60_50),
        failing=lambda tmp: _with(trusted_table(tmp), bottom_time_min=55,
                                  decompression="in-water", stops=[{"depth": 10, "minutes": 12}]),
        measured="20 fsw water air: none", limit="20 fsw water air: 2 min",
        citation=NAVY_TABLE_USE),
    "table-outside": Case(
        passing=lambda _: _with(TABLE, **ROW_60_50),
        failing=lambda _: _with(TABLE, max_depth=100, bottom_time_min=20,
                                decompression="in-water", stops=[{"depth": 10, "minutes": 10}]),
        measured=100.0, limit=70.0, citation="contractor policy (policy.reference_table)"),
}


@pytest.mark.parametrize("key", sorted(CASES))
def test_contract(key, tmp_path):
    """Each table rule passes its passing plan and reports id, measured, limit and citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)


@pytest.mark.parametrize("plan", [
    lambda: data(),
    lambda: _with(TABLE, mode="surface-supplied-nitrox", gas="32/0"),
    lambda: _with(TABLE, max_depth=70, bottom_time_min=40, decompression="in-water-oxygen",
                  stops=[{"depth": 10, "minutes": 7, "gas": "oxygen"}]),
    lambda: _with(NDL, bottom_time_min=70, decompression="in-water",
                  stops=[{"depth": 10, "minutes": 20}]),
    lambda: second_dive(_with(TABLE, **ROW_60_50), max_depth=60, bottom_time_min=50,
                        descent_rate=60, decompression="in-water",
                        stops=[{"depth": 10, "minutes": 5}], surface_interval_min=120,
                        previous_dive="D1"),
], ids=["no-table", "other-gas", "no-mode", "no-stop-table", "repetitive"])
def test_every_review_reports_measured_and_reason(plan):
    """The reviews of table-conformance name a measured value and their reason."""
    got = [f for f in run(plan(), FAMILY, "table-conformance") if f.severity in _c.BAD]
    assert got
    for f in got:
        _c.reported(f)


def test_another_oxygen_pattern_is_said_once_and_left_to_the_model() -> None:
    """Issue 8 §2: chamber oxygen at 30 fsw against the table's 50 fsw half-period is one plain
    sentence, not a list of missing stops (cover is judged by the model)."""
    import tomllib
    from pathlib import Path

    from supervisor.check import check_plan
    from supervisor.plan import plan_from_dict

    root = Path(__file__).resolve().parents[2]
    d = tomllib.loads((root / "examples" / "demo-job.toml").read_text(encoding="utf-8"))
    d2 = next(x for x in d["dives"] if x["id"] == "D2")
    d2["stops"] = [s for s in d2["stops"] if s["place"] == "water"] + [
        {"depth": 30, "minutes": 30, "gas": "oxygen", "place": "chamber"}]
    out = check_plan(plan_from_dict(d))
    got = [f for f in out["findings"] if f["rule"] == "table-conformance" and f["dive"] == "D2"
           and f["severity"] in ("warn", "fail")]
    pattern = [f for f in got if "oxygen pattern differs" in f["message"]]
    assert len(pattern) == 1 and pattern[0]["severity"] == "warn"
    assert "chamber oxygen at 30 fsw in the plan, 50 fsw in the table" in pattern[0]["message"]
    assert not any("missing" in f["message"] for f in got)
