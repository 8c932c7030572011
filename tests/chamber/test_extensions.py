"""Extension arithmetic: each allowed extension, one past the limit, bad counts.

Extensions (U.S. Navy Diving Manual; existence OLDER-EDITION, Revision 4 Change A
§21-5.6.8.1.3 and the Table 5 figure notes; period lengths and limits FROM MEMORY):
Table 5 up to two 20-min oxygen periods at 30 fsw; Tables 6 and 6A up to two 25-min
periods at 60 fsw (20 oxygen + 5 air) and up to two 75-min periods at 30 fsw
(15 air + 60 oxygen).
"""

from __future__ import annotations

import pytest

from supervisor.chamber.catalogue import load_treatment
from supervisor.chamber.extensions import (
    check_request,
    describe,
    extended_minutes,
    full_request,
)
from supervisor.chamber.timeline import build_timeline
from supervisor.errors import InputError

# (table, option, count, minutes added, oxygen minutes added)
CASES = [
    ("5", "oxygen", 1, 20, 20), ("5", "oxygen", 2, 40, 40),
    ("6", "oxygen", 1, 25, 20), ("6", "oxygen", 2, 50, 40),
    ("6", "air", 1, 75, 60), ("6", "air", 2, 150, 120),
    ("6A", "oxygen", 1, 25, 20), ("6A", "oxygen", 2, 50, 40),
    ("6A", "air", 1, 75, 60), ("6A", "air", 2, 150, 120),
]


@pytest.mark.parametrize(("number", "option", "n", "added", "o2"), CASES,
                         ids=[f"tt{c[0]}-{c[1]}-{c[2]}" for c in CASES])
def test_each_allowed_extension_adds_its_periods(number, option, n, added, o2):
    table = load_treatment(number)
    base = build_timeline(table, "06:00")
    tl = build_timeline(table, "06:00", {option: n})
    assert tl.total_min - base.total_min == pytest.approx(added)
    assert tl.oxygen_min - base.oxygen_min == pytest.approx(o2)
    assert extended_minutes(table, tl.extensions) == pytest.approx(added)
    assert sum(1 for x in tl.lines if x.extension) == n * (1 if number == "5" else 2)


def test_table5_extension_has_no_air_break_before_the_ascent():
    # "no air break needed between them or before ascent" (Table 5 notes, OLDER-EDITION)
    tl = build_timeline(load_treatment("5"), "06:00", {"oxygen": 2})
    tail = [(x.role, x.to_depth, x.minutes) for x in tl.lines[-3:]]
    assert tail == [("oxygen", 30, 20), ("oxygen", 30, 20), ("oxygen", 0, 30)]


@pytest.mark.parametrize(("number", "option", "limit"),
                         [("5", "oxygen", 2), ("6", "oxygen", 2), ("6", "air", 2),
                          ("6A", "air", 2)])
def test_one_past_the_limit_is_refused_naming_the_option(number, option, limit):
    with pytest.raises(InputError) as e:
        check_request(load_treatment(number), {option: limit + 1})
    assert e.value.field == f"--extend-{option}"
    assert f"at most {limit}" in e.value.message and "diving medical officer" in e.value.message


@pytest.mark.parametrize(("number", "option"), [("5", "air"), ("9", "oxygen"), ("9", "air")])
def test_extension_the_table_does_not_allow(number, option):
    with pytest.raises(InputError) as e:
        check_request(load_treatment(number), {option: 1})
    assert e.value.field == f"--extend-{option}"
    assert f"allows no --extend-{option}" in e.value.message


@pytest.mark.parametrize("n", [-1, 1.5, True, "2"])
def test_count_must_be_a_whole_number(n):
    with pytest.raises(InputError) as e:
        check_request(load_treatment("6"), {"oxygen": n})
    assert e.value.field == "--extend-oxygen" and ">= 0" in e.value.message


def test_beyond_limit_only_for_a_log():
    req = check_request(load_treatment("6"), {"oxygen": 3}, beyond_limit=True)
    assert req.counts == {"oxygen": 3, "air": 0}
    tl = build_timeline(load_treatment("6"), "06:00", req, beyond_limit=True)
    assert "diving medical officer" in tl.lines[12].note  # the third oxygen extension


def test_full_request_and_description():
    t = load_treatment("6")
    assert full_request(t).counts == {"oxygen": 2, "air": 2}
    assert "--extend-oxygen up to 2" in describe(t) and "--extend-air up to 2" in describe(t)
    assert describe(load_treatment("9")) == "no extension"
