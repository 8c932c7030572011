"""Treatment timelines: each table's steps and totals against the manual, clock times.

Expected values: ``tests/data/treatment_navy_tables.toml`` (U.S. Navy Diving Manual,
Revision 7 Change A ch. 17 figures; step times FROM MEMORY, totals DERIVED from them,
Table 5 and 6 printed totals recalled FROM MEMORY).  Each figure is named in the
test's parametrisation id and in the data file.
"""

from __future__ import annotations

import pytest

from supervisor.chamber.catalogue import load_treatment
from supervisor.chamber.timeline import build_timeline, oxygen_periods
from supervisor.errors import InputError
from tests.chamber._navy import navy

PLANNABLE = ["5", "6", "6A", "9"]


@pytest.mark.parametrize("number", PLANNABLE)
def test_steps_and_total_vs_navy_figure(number):
    """Step sequence and table time against the U.S. Navy figure (see the data file)."""
    ref = navy()[number]
    tl = build_timeline(load_treatment(number), "08:00")
    lines = [x for x in tl.lines if x.role != "compression"]
    got = [[x.from_depth, x.to_depth, x.minutes, x.gas] for x in lines]
    assert got == [[float(a), float(b), float(m), g] for a, b, m, g in ref["steps"]], ref["figure"]
    # the table time excludes a compression that is outside the table's clock
    assert tl.total_min == pytest.approx(ref["total_min"], abs=1e-9)
    if "oxygen_min" in ref:
        assert tl.oxygen_min == pytest.approx(ref["oxygen_min"])


def test_table5_135_min_table6_285_min_table6a_350_min():
    # the totals of the issue, as literal figures: Table 5 2 h 15 min and Table 6 4 h 45 min
    # (printed totals recalled FROM MEMORY; sums of the steps DERIVED), Table 6A 5 h 50 min
    # (DERIVED), U.S. Navy Diving Manual Revision 7 Change A ch. 17
    assert build_timeline(load_treatment("5"), "08:00").total_min == 135
    assert build_timeline(load_treatment("6"), "08:00").total_min == 285
    assert build_timeline(load_treatment("6A"), "08:00").total_min == 350


def test_table6_every_extension_485_min():
    # 285 + 2 x 25 min at 60 fsw + 2 x 75 min at 30 fsw = 485 min, 8 h 05 min (DERIVED from
    # the extension periods recalled FROM MEMORY; extensions exist per Revision 4 Change A
    # §21-5.6.8.1.3, OLDER-EDITION)
    tl = build_timeline(load_treatment("6"), "08:00", {"oxygen": 2, "air": 2})
    assert tl.total_min == navy()["6"]["extended_total_min"] == 485
    assert tl.oxygen_min == navy()["6"]["extended_oxygen_min"]


def test_compression_outside_table_time_for_tables_5_6_9():
    # oxygen time starts on arrival at 60 fsw (Revision 4/5 notes, OLDER-EDITION); descent at
    # 20 fsw/min is FROM MEMORY: 3 min to 60 fsw, 2.25 min to 45 fsw
    for number, minutes in (("5", 3.0), ("6", 3.0), ("9", 2.25)):
        tl = build_timeline(load_treatment(number), "08:00")
        first = tl.lines[0]
        assert first.role == "compression" and first.table_min is None
        assert first.minutes == pytest.approx(minutes)
        assert tl.elapsed_min == pytest.approx(tl.total_min + minutes)


def test_table6a_compression_in_first_step():
    # "time at 165 ft includes compression" (FROM MEMORY for 6A): no separate line
    tl = build_timeline(load_treatment("6A"), "08:00")
    assert tl.lines[0].role == "air" and tl.lines[0].from_depth == 165
    assert "includes the compression" in tl.lines[0].note
    assert tl.elapsed_min == tl.total_min == 350


def test_roles_oxygen_and_air_breaks_are_separate_lines():
    tl = build_timeline(load_treatment("6"), "08:00")
    roles = [x.role for x in tl.lines]
    assert roles[:4] == ["compression", "oxygen", "air-break", "oxygen"]
    assert all(x.gas == "oxygen" for x in tl.lines if x.role == "oxygen")
    assert all(x.gas == "air" for x in tl.lines if x.role == "air-break")
    # Table 6A's deep part is on air before any oxygen: "air", not an air break
    tl6a = build_timeline(load_treatment("6A"), "08:00")
    assert [x.role for x in tl6a.lines[:3]] == ["air", "air", "oxygen"]


def test_running_totals():
    tl = build_timeline(load_treatment("5"), "08:00")
    ends = [x.table_min for x in tl.lines[1:]]
    assert ends == [20, 25, 45, 75, 80, 100, 105, 135]  # running sums of the Table 5 steps
    assert [x.oxygen_min for x in tl.lines[1:]] == [20, 20, 40, 70, 70, 90, 90, 120]


def test_clock_times_across_midnight():
    tl = build_timeline(load_treatment("6"), "22:30")
    j = tl.to_json()
    assert (j[0]["start"], j[0]["start_day"]) == ("22:30", 0)
    assert (j[0]["end"], j[0]["end_day"]) == ("22:33", 0)
    # the fourth line starts 28 min into the treatment: 22:58; the eighth (60 -> 30 fsw)
    # starts at 3 + 75 = 78 min, i.e. 23:48; the ninth at 108 min, 00:18 the next day
    assert (j[7]["start"], j[7]["start_day"]) == ("23:48", 0)
    assert (j[8]["start"], j[8]["start_day"]) == ("00:18", 1)
    assert (j[-1]["end"], j[-1]["end_day"]) == ("03:18", 1)  # 22:30 + 288 min
    assert tl.clock(tl.elapsed_min) == "03:18 (+1 d)"


def test_start_at_midnight_and_end_of_day():
    tl = build_timeline(load_treatment("9"), "00:00")
    assert tl.to_json()[-1]["end"] == "01:44:30"  # 2.25 + 102.25 min: seconds shown
    tl = build_timeline(load_treatment("5"), "23:59")
    assert tl.to_json()[1]["start"] == "00:02" and tl.to_json()[1]["start_day"] == 1


@pytest.mark.parametrize("start", ["25:00", "24:00", "9", "09:60", "ab:cd", "", "9:00:00", "-1:00"])
def test_bad_start_names_the_option(start):
    with pytest.raises(InputError) as e:
        build_timeline(load_treatment("6"), start)
    assert e.value.field == "--start" and "HH:MM" in e.value.message


def test_extension_lines_are_marked_and_inserted_after_their_step():
    tl = build_timeline(load_treatment("6"), "08:00", {"oxygen": 1, "air": 1})
    ext = [(x.line, x.extension, x.role, x.to_depth, x.minutes) for x in tl.lines if x.extension]
    # Table 6: after step 6 (the last air break at 60 fsw) and after step 11 (the last oxygen
    # period at 30 fsw); lines are shifted by the compression line
    assert ext == [(8, "oxygen 1", "oxygen", 60, 20), (9, "oxygen 1", "air-break", 60, 5),
                   (15, "air 1", "air-break", 30, 15), (16, "air 1", "oxygen", 30, 60)]
    assert tl.lines[9].table_step == 7 and tl.lines[9].travel


def test_oxygen_periods_merge_consecutive_oxygen_lines():
    tl = build_timeline(load_treatment("6"), "08:00")
    periods = [sum(x.minutes for x in run) for run in oxygen_periods(tl)]
    # 3 x 20 at 60 fsw, 30 on the 60 -> 30 ascent, 60 at 30 fsw, 60 + 30 (last period and ascent)
    assert periods == [20, 20, 20, 30, 60, 90]


def test_status_is_least_certain_and_unverified():
    tl = build_timeline(load_treatment("6"), "08:00")
    assert tl.status == "FROM MEMORY" and not tl.all_verified
