"""Contingency rules: schedules at hand, and the ones that need review (project logic).

The overrun increment of 10 min without a decompression table is common practice,
no source; with a table the next longer time and next deeper depth are the
table's own steps (U.S. Navy Diving Manual Rev 4 Change A ch. 9, OLDER-EDITION).
"""

from __future__ import annotations

from _engine_plans import TABLE, data, only, run

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
    f = only(run(data(max_depth=120, bottom_time_min=1), FAMILY, "contingency-schedules"),
             "warn")
    assert "needs review" in f.message and not f.verified
