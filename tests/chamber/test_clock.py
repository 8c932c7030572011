"""Clock times in and out."""

from __future__ import annotations

import datetime as dt

import pytest

from supervisor.chamber.clock import clock_label, hours_minutes, parse_clock, split_clock
from supervisor.errors import InputError


def test_parse():
    assert parse_clock("00:00") == 0 and parse_clock("23:59") == 1439
    assert parse_clock("7:05") == 425
    assert parse_clock("07:05:30", seconds=True) == pytest.approx(425.5)
    assert parse_clock(dt.time(21, 40)) == 1300


@pytest.mark.parametrize("bad", ["24:00", "25:00", "12:60", "12", "12:5", "x", None, 1200])
def test_bad(bad):
    with pytest.raises(InputError) as e:
        parse_clock(bad, "--start")
    assert e.value.field == "--start" and "HH:MM" in e.value.message


def test_split_and_label():
    assert split_clock(1439.0 + 3) == ("00:02", 1)
    assert split_clock(60.25) == ("01:00:15", 0)
    assert split_clock(2 * 1440 + 61) == ("01:01", 2)
    assert clock_label(1500) == "01:00 (+1 d)" and clock_label(60) == "01:00"


def test_hours_minutes():
    assert hours_minutes(285) == "4 h 45 min" and hours_minutes(45) == "45 min"
    assert hours_minutes(102.25) == "1 h 42.25 min"
