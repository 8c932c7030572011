"""Breathing periods of a stop: oxygen periods and air breaks, never one continuous line.

Expected values are this project's own arithmetic of the conventions stated in
:mod:`supervisor.periods` (30 min oxygen, 5 min air; the chamber's first half-period
at 50 fsw, the rest at 40 fsw: the pattern of the U.S. Navy Diving Manual Rev 7
ch. 9 as quoted by secondary sources), not an outside table.
"""

from __future__ import annotations

from supervisor.periods import (
    breaks_between,
    chamber_pattern,
    cycle_across,
    cycle_periods,
    merge_stops,
    periods_json,
    periods_text,
    stop_text,
)


def test_cycle_periods_count_the_breaks_in_the_stop() -> None:
    assert cycle_periods("oxygen", 58, 30, 5) == ([("oxygen", 30.0), ("air", 5.0),
                                                   ("oxygen", 23.0)], 23.0)
    # arriving 28 min into the cycle: 2 min oxygen, then the break
    assert cycle_periods("oxygen", 10, 30, 5, start=28)[0] == [
        ("oxygen", 2.0), ("air", 5.0), ("oxygen", 3.0)]
    # a stop may end inside a break; the cycle position says where
    assert cycle_periods("oxygen", 32, 30, 5) == ([("oxygen", 30.0), ("air", 2.0)], 32.0)
    # air stops have no breaks
    assert cycle_periods("air", 40, 30, 5) == ([("air", 40.0)], 0.0)


def test_cycle_runs_on_across_oxygen_stops_and_restarts_after_air() -> None:
    got = cycle_across([("oxygen", 20), ("oxygen", 20), ("air", 3), ("oxygen", 31)], 30, 5)
    assert got == [[("oxygen", 20.0)], [("oxygen", 10.0), ("air", 5.0), ("oxygen", 5.0)],
                   [("air", 3.0)], [("oxygen", 30.0), ("air", 1.0)]]


def test_breaks_between_oxygen_minutes_that_leave_them_out() -> None:
    got = breaks_between([("oxygen", 15), ("oxygen", 45)], 30, 5)
    assert got == [[("oxygen", 15.0)], [("oxygen", 15.0), ("air", 5.0), ("oxygen", 30.0)]]
    # no break at the end of the oxygen time, none without a convention
    assert breaks_between([("oxygen", 30)], 30, 5) == [[("oxygen", 30.0)]]
    assert breaks_between([("oxygen", 60)], None, None) == [[("oxygen", 60.0)]]


def test_chamber_pattern_in_half_periods() -> None:
    assert chamber_pattern(1, 50, 40, 30, 5) == [(50, [("oxygen", 15.0)])]
    assert chamber_pattern(2, 50, 40, 30, 5) == [(50, [("oxygen", 15.0)]),
                                                 (40, [("oxygen", 15.0)])]
    # 2.5 periods: 15 at 50; at 40 the rest of period 1, a break, period 2, a break, a half
    assert chamber_pattern(5, 50, 40, 30, 5) == [
        (50, [("oxygen", 15.0)]),
        (40, [("oxygen", 15.0), ("air", 5.0), ("oxygen", 30.0), ("air", 5.0),
              ("oxygen", 15.0)])]
    # one chamber depth: every period at one stop
    assert chamber_pattern(3, 40, 40, 30, 5) == [
        (40, [("oxygen", 30.0), ("air", 5.0), ("oxygen", 15.0)])]
    assert chamber_pattern(0, 50, 40, 30, 5) == []


def test_plan_stops_merge_into_one_stop_with_its_periods() -> None:
    stops = [(40, 3, "air", "water"), (50, 15, "oxygen", "chamber"),
             (40, 15, "oxygen", "chamber"), (40, 5, "air", "chamber"),
             (40, 30, "oxygen", "chamber")]
    got = merge_stops(stops)
    assert [(s["depth"], s["minutes"], s["gas"], s["place"]) for s in got] == [
        (40, 3.0, "air", "water"), (50, 15.0, "oxygen", "chamber"),
        (40, 50.0, "oxygen", "chamber")]
    assert got[2]["periods"] == [{"gas": "oxygen", "minutes": 15}, {"gas": "air", "minutes": 5},
                                 {"gas": "oxygen", "minutes": 30}]
    assert all(len(s["periods"]) == 1 for s in got[:2])


def test_texts_show_the_periods_of_a_stop_with_breaks() -> None:
    assert periods_text([("oxygen", 30), ("air", 5), ("oxygen", 23)]) == \
        "O2 30, air 5, O2 23 min"
    assert stop_text(20, 58, "oxygen", "water", "fsw",
                     [("oxygen", 30), ("air", 5), ("oxygen", 23)]) == \
        "20 fsw 58 min oxygen (O2 30, air 5, O2 23 min)"
    assert stop_text(40, 3, "air", "water", "fsw", [("air", 3)]) == "40 fsw 3 min air"
    assert stop_text(50, 15, "oxygen", "chamber", "fsw") == "50 fsw 15 min oxygen (chamber)"
    assert periods_json([("oxygen", 12.5)]) == [{"gas": "oxygen", "minutes": 12.5}]


def test_pattern_difference_is_said_once_and_plainly() -> None:
    from supervisor.periods import pattern_difference

    plan = [(40, "air", "water"), (50, "oxygen", "chamber"), (40, "oxygen", "chamber"),
            (40, "air", "chamber")]
    old = [(40, "air", "water"), (20, "oxygen", "chamber"), (10, "oxygen", "chamber")]
    text = pattern_difference(plan, old, "fsw")
    assert text == ("the plan's oxygen pattern differs from the table's (chamber oxygen at "
                    "50/40 fsw in the plan, 20/10 fsw in the table): the stops are not compared "
                    "one by one; cover is judged by the model")
    same = [(40, "air", "water"), (50, "oxygen", "chamber"), (40, "oxygen", "chamber")]
    assert pattern_difference(plan, same, "fsw") is None
