"""Contingency rules: schedules at hand, and the ones that need review (project logic).

The overrun increment of 10 min without a decompression table is common practice,
no source; with a table the next longer time and next deeper depth are the
table's own steps (U.S. Navy Diving Manual Rev 4 Change A ch. 9, OLDER-EDITION).
"""

from __future__ import annotations

from dataclasses import replace

import _contract as _c
import pytest
from _contract import Case
from _engine_plans import TABLE, context, data, only, run, uncomputed

from supervisor import analysis as an
from supervisor.rules.contingency import FAMILY

O2_DIVE = dict(max_depth=100, bottom_time_min=30, decompression="in-water-oxygen",
               stops=[{"depth": 30, "minutes": 2}, {"depth": 20, "minutes": 12, "gas": "oxygen"},
                      {"depth": 10, "minutes": 10, "gas": "oxygen"}])


def test_schedules_listed_without_table():
    got = run(data(**O2_DIVE), FAMILY, "contingency-schedules")
    assert [f.severity for f in got] == ["info", "info", "info"]
    over, deeper, o2 = got
    assert "40 min" in over.message and "110 fsw" in deeper.message
    assert "oxygen failure" in o2.message and o2.measured > 0


def test_air_dive_has_no_oxygen_failure_case():
    got = run(data(), FAMILY, "contingency-schedules")
    assert len(got) == 2 and not any("oxygen failure" in f.message for f in got)


def test_contingency_outside_the_table_needs_review():
    d = data(max_depth=70, bottom_time_min=40, decompression="in-water",
             stops=[{"depth": 10, "minutes": 7}])
    d["policy"]["reference_table"] = str(TABLE)
    got = run(d, FAMILY, "contingency-schedules")
    deeper = only(got, "warn")
    assert deeper.rule == "contingency-schedules"
    assert "outside the reference table" in deeper.message  # no row deeper than 70 fsw
    assert "OLDER-EDITION" == deeper.source_status


def test_uncomputable_dive_needs_review():
    """A dive whose model request could not be built has no contingency: review."""
    ctx = uncomputed(data(), "request", "model_schedule")
    f = only(FAMILY.get("contingency-schedules").run(ctx), "warn")
    assert "needs review" in f.message and "forced by the test" in f.message
    assert f.measured == "not computed" and not f.verified
    _c.reported(f)


def test_uncomputable_contingency_schedule_needs_review():
    """A contingency whose schedule the engine could not compute: review, with the error."""
    ctx = context(data(**O2_DIVE))
    a = an.for_context(ctx).dives["D1"]
    over = a.contingencies["overrun"]
    a.contingencies["overrun"] = replace(over, schedule=None, error="forced by the test")
    got = FAMILY.get("contingency-schedules").run(ctx)
    f = only(got, "warn")
    assert f.message.startswith("needs review: bottom-time overrun") and "forced" in f.message
    assert f.measured == "not computed"
    _c.reported(f)


# ---------------------------------------------------------------------------
# the findings contract: a passing and a failing plan


def _outside():
    d = data(max_depth=70, bottom_time_min=40, decompression="in-water",
             stops=[{"depth": 10, "minutes": 7}])
    d["policy"]["reference_table"] = str(TABLE)
    return d


def _deeper_stops(ctx):
    return float(an.for_context(ctx).dives["D1"].contingencies["deeper"].schedule.total_stop_min)


CASES: dict[str, Case] = {
    "contingency-schedules": Case(
        passing=lambda _: data(**O2_DIVE), failing=lambda _: _outside(),
        measured=_deeper_stops, severity="warn",
        citation="U.S. Navy Diving Manual, Rev 4 Change A, ch. 9 (next longer schedule; loss of "
        "oxygen); contractor policy (policy.model)"),
}


@pytest.mark.parametrize("key", sorted(CASES))
def test_contract(key, tmp_path):
    """The contingency rule passes its passing plan and reports id, measured and citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)
