"""Look-up: next deeper depth, next longer time, outside-table, status carried through.

Checks use the fictional test tables (tests/data/tables_README.md); the rounding
rule itself (exact or next greater depth, exact or next longer bottom time) is
the U.S. Navy Diving Manual rule for entering its tables (Revision 4 Change A,
ch. 9, no-decompression table use; stated the same for later revisions from memory).
"""

from __future__ import annotations

import math

import pytest

from supervisor.errors import InputError, TableError
from supervisor.references import load_table, lookup_no_stop, lookup_schedule, row_hash
from supervisor.references.canonical import context_hash
from supervisor.references.loader import inspect_document
from tests.references._helpers import fixture_doc, fixture_path


@pytest.fixture(scope="module")
def no_stop():
    return load_table(fixture_path("no_stop"))


@pytest.fixture(scope="module")
def deco():
    return load_table(fixture_path("decompression"))


@pytest.mark.parametrize(("depth", "bt", "entered", "group", "group_time"), [
    (45, 15, 50, "B", 20),      # between rows: next deeper depth, next longer group time
    (50, 20, 50, "B", 20),      # exact depth and exact group time
    (50, 20.5, 50, "C", 40),    # half a minute longer goes to the next group
    (0, 1, 20, "A", 30),        # shallower than the first row enters the first row
    (60, 40, 60, "D", 40),      # exactly the no-stop limit
])
def test_no_stop_rounding(no_stop, depth, bt, entered, group, group_time):
    r = lookup_no_stop(no_stop, depth, bt)
    assert not r.outside_table
    assert r.depth == entered
    assert r.repetitive_group == group and r.bottom_time == group_time
    assert r.within_no_stop_limit


def test_no_stop_beyond_limit_is_a_decompression_dive(no_stop):
    r = lookup_no_stop(no_stop, 55, 41)
    assert r.depth == 60 and r.no_stop_limit == 40
    assert r.within_no_stop_limit is False and r.repetitive_group is None
    assert "decompression dive" in r.reason


def test_no_stop_unlimited(no_stop):
    r = lookup_no_stop(no_stop, 12, 10_000)
    assert math.isinf(r.no_stop_limit) and r.within_no_stop_limit
    assert r.to_dict()["no_stop_limit_min"] == "unlimited"
    assert r.repetitive_group is None and "no repetitive group" in r.reason


def test_no_stop_outside_table(no_stop):
    r = lookup_no_stop(no_stop, 60.5, 5)
    assert r.outside_table and r.row is None and r.no_stop_limit is None
    assert "deeper than the deepest row" in r.reason
    assert r.needs_review


def test_status_carried_and_review_needed_when_unverified(no_stop):
    r = lookup_no_stop(no_stop, 30, 10)
    assert r.verification == "unverified" and r.source_status == "VERIFIED"
    assert r.needs_review


def test_verified_row_from_verified_source_needs_no_review():
    doc = fixture_doc("no_stop")
    row = doc["rows"][2]
    row.update(verification="verified", verified_by="second checker", verified_on="2026-12-01",
               verification_method="read aloud")
    row["row_hash"] = row_hash(row)
    doc["verification"] = {"context_hash": context_hash(doc)}
    table, _ = inspect_document(doc)
    r = lookup_no_stop(table, 40, 30)
    assert r.verification == "verified" and not r.needs_review
    assert lookup_no_stop(table, 50, 30).needs_review  # the next row is not verified


def test_bundled_ndl_lookup_has_no_groups_and_needs_review():
    t = load_table("usn-rev7-air-ndl")
    r = lookup_no_stop(t, 52, 60)
    assert r.depth == 55 and r.no_stop_limit == 74  # the from-memory row, air-decompression list
    assert r.repetitive_group is None and r.source_status == "FROM MEMORY" and r.needs_review
    assert lookup_no_stop(t, 191, 1).outside_table


@pytest.mark.parametrize(("depth", "bt", "entered", "time", "row"), [
    (55, 35, 60, 40, 1),
    (60, 40, 60, 40, 1),
    (60, 41, 60, 60, 2),
    (61, 10, 80, 30, 4),
])
def test_schedule_rounding(deco, depth, bt, entered, time, row):
    r = lookup_schedule(deco, depth, bt)
    assert not r.outside_table
    assert (r.depth, r.bottom_time, r.row) == (entered, time, row)
    assert r.schedule is not None and r.schedule.stops


def test_schedule_exceptional_exposure_marked(deco):
    r = lookup_schedule(deco, 75, 45)
    assert r.row == 5 and r.exceptional_exposure and r.repetitive_group is None
    assert "exceptional exposure" in r.reason
    assert r.to_dict()["exceptional_exposure"] is True


@pytest.mark.parametrize(("depth", "bt", "words"), [
    (81, 10, "deeper than the deepest depth"),
    (60, 81, "longer than the longest bottom time at 60 fsw"),
])
def test_schedule_outside_table(deco, depth, bt, words):
    r = lookup_schedule(deco, depth, bt)
    assert r.outside_table and r.schedule is None and words in r.reason
    assert r.needs_review


def test_schedule_mode_missing_is_outside(deco):
    r = lookup_schedule(deco, 60, 40, mode="surd_o2")
    assert r.outside_table and "no surface decompression on oxygen schedule" in r.reason
    r = lookup_schedule(deco, 60, 80, mode="surd_o2")
    assert not r.outside_table and r.schedule.chamber_o2_periods == 1.5


@pytest.mark.parametrize("name", ["zhl16c-gf30-85-air-fsw", "zhl16c-gf30-85-air-msw"])
def test_computed_tables_give_every_mode(name):
    t = load_table(name)
    unit = t.model.conventions.depth_unit
    depth, bt = (105, 38) if unit == "fsw" else (32, 38)   # entered at 110 fsw / 33 msw, 40 min
    looks = {m: lookup_schedule(t, depth, bt, mode=m) for m in ("air", "air_o2", "surd_o2")}
    for mode, r in looks.items():
        assert not r.outside_table and r.mode == mode, r.reason
        assert r.bottom_time == 40 and r.depth == (110 if unit == "fsw" else 33)
        # computed rows are unverified model output: never more than "needs review"
        assert r.source_status == "COMPUTED" and r.verification == "unverified"
        assert r.needs_review
    air_o2 = looks["air_o2"].schedule.stops
    assert {s.gas for s in air_o2} == {"air", "oxygen"}
    assert all(s.place == "water" for s in air_o2)
    surd = looks["surd_o2"]
    assert {s.place for s in surd.schedule.stops} == {"water", "chamber"}
    assert all(s.gas == "oxygen" for s in surd.schedule.stops if s.place == "chamber")
    assert surd.schedule.chamber_o2_periods >= 0.5
    assert surd.to_dict()["chamber_o2_periods"] == surd.schedule.chamber_o2_periods
    # the trade's chamber pattern: the first half-period at the first chamber depth
    chamber = [s for s in surd.schedule.stops if s.place == "chamber"]
    assert (chamber[0].depth, chamber[0].minutes) == ((50, 15) if unit == "fsw" else (15, 15))
    assert surd.to_dict()["total_ascent_min"] == surd.schedule.total_ascent is not None
    # every stop of the look-up carries its breathing periods
    for s in surd.to_dict()["stops"]:
        assert sum(p["minutes"] for p in s["periods"] if p["gas"] == s["gas"]) == s["minutes"]


def test_lookup_stops_show_their_air_breaks(deco):
    """Table stops whose minutes leave the air breaks out get them back as periods."""
    from supervisor.references.lookup import schedule_periods
    from supervisor.references.schema import Schedule, Stop

    class Conv:  # a table's conventions: 30 min oxygen, 5 min air, breaks not stop time
        o2_period_min, air_break_min, air_breaks_in_stop_time = 30.0, 5.0, False
        chamber_o2_period_min, chamber_air_break_min = 30.0, 5.0

    sched = Schedule(stops=[Stop(depth=30, minutes=20, gas="oxygen"),
                            Stop(depth=20, minutes=35, gas="oxygen"),
                            Stop(depth=50, minutes=15, gas="oxygen", place="chamber"),
                            Stop(depth=40, minutes=45, gas="oxygen", place="chamber")])
    assert schedule_periods(Conv, sched) == (
        (("oxygen", 20.0),),
        (("oxygen", 10.0), ("air", 5.0), ("oxygen", 25.0)),  # a break after 30 min of oxygen
        (("oxygen", 15.0),),
        (("oxygen", 15.0), ("air", 5.0), ("oxygen", 30.0)),
    )
    Conv.air_breaks_in_stop_time = True  # breaks inside the stop minutes: the cycle runs on
    assert schedule_periods(Conv, sched)[1] == (("oxygen", 10.0), ("air", 5.0), ("oxygen", 20.0))


def test_computed_table_has_no_surface_decompression_shallower_than_the_chamber():
    t = load_table("zhl16c-gf30-85-air-fsw")
    r = lookup_schedule(t, 40, 120, mode="surd_o2")
    assert r.outside_table and r.row is not None
    assert "no surface decompression on oxygen schedule" in r.reason
    assert "in-water air/oxygen" in r.reason
    assert not lookup_schedule(t, 40, 120, mode="air_o2").outside_table


def test_schedule_not_permitted_needs_review(tmp_path):
    doc = fixture_doc("decompression")
    doc["rows"][2]["air"]["permitted"] = False
    table, _ = inspect_document(doc)
    r = lookup_schedule(table, 60, 80)
    assert not r.permitted and r.needs_review and "not to be used" in r.reason


def test_lookup_bad_inputs(no_stop, deco):
    with pytest.raises(InputError, match="depth"):
        lookup_no_stop(no_stop, -1, 10)
    with pytest.raises(InputError, match="bottom_time"):
        lookup_schedule(deco, 60, float("nan"))
    with pytest.raises(InputError, match="mode"):
        lookup_schedule(deco, 60, 40, mode="heliox")
    with pytest.raises(TableError, match="needs a no-stop table"):
        lookup_no_stop(deco, 60, 40)
    with pytest.raises(TableError, match="needs a decompression table"):
        lookup_schedule(no_stop, 60, 40)
