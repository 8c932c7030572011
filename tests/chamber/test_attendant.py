"""The inside attendant: each case of the oxygen rule, the recent dive, the model, policy.

Rule cases: U.S. Navy Diving Manual, Revision 4 Change A (2001), §21-5.6.8.1.2-.5
(p. 21-26), OLDER-EDITION; placing a case's minutes on the patient's last oxygen
minutes at that depth is this project's reading (regression values, own computation).
"""

from __future__ import annotations

import pytest

from supervisor.chamber.attendant import (
    RecentDive,
    attendant_oxygen,
    evaluate_attendant,
    parse_recent_dive,
)
from supervisor.chamber.catalogue import load_treatment
from supervisor.chamber.timeline import build_timeline
from supervisor.errors import InputError
from tests.chamber._navy import navy


def _ox(number, ext=None, recent=False):
    tl = build_timeline(load_treatment(number), "08:00", ext or {})
    return tl, attendant_oxygen(tl, recent)


def _last_hold_end(tl, depth):
    return max(x.end_min for x in tl.lines if not x.travel and x.to_depth == depth)


# (table, extensions, recent, oxygen minutes at depth before leaving it, with the ascent)
CASES = [
    ("5", {}, False, 0, True),                 # whole 30 -> 0 ascent
    ("5", {}, True, 20, True),                 # + 20 min at 30 fsw after an exposure in 12 h
    ("6", {}, False, 30, True),                # unextended: last 30 min at 30 fsw + ascent
    ("6", {"air": 1}, False, 30, True),        # one extension: the same
    ("6", {"oxygen": 1, "air": 1}, False, 60, True),  # more than one: the last 60-min period
    ("6", {}, True, 90, True),                 # recent exposure: one more 60-min period
    ("6A", {}, False, 60, True),               # last 60 min at 30 fsw + ascent
    ("6A", {"oxygen": 2}, False, 90, True),    # more than one extension: 90 min
    ("6A", {}, True, 120, True),               # + 60 min after a recent exposure
    ("9", {}, False, 15, True),                # last 15 min at 45 fsw + ascent
]


@pytest.mark.parametrize(("number", "ext", "recent", "at_depth", "ascent"), CASES,
                         ids=[f"tt{c[0]}-{sum(c[1].values())}ext-{'recent' if c[2] else 'no'}"
                              for c in CASES])
def test_each_case_of_the_oxygen_rule(number, ext, recent, at_depth, ascent):
    tl, ox = _ox(number, ext, recent)
    depth = 45 if number == "9" else 30
    leave = _last_hold_end(tl, depth)
    ascent_min = tl.elapsed_min - leave
    assert ox.minutes == pytest.approx(at_depth + (ascent_min if ascent else 0))
    assert ox.intervals[-1].end_min == pytest.approx(tl.elapsed_min)
    assert ox.shortfall_min == 0
    assert ox.recent == recent
    # the attendant is never on oxygen during the patient's air breaks
    for iv in ox.intervals:
        for x in tl.lines:
            if x.role == "air-break":
                assert iv.end_min <= x.start_min + 1e-9 or iv.start_min >= x.end_min - 1e-9


def test_table6_recent_exposure_takes_the_air_break_with_the_patient():
    tl, ox = _ox("6", recent=True)
    # 90 oxygen minutes at 30 fsw: the last 30 of the first 60-min period, the air break off,
    # then the last 60-min period and the ascent
    assert [round(i.minutes, 6) for i in ox.intervals] == [30, 90]


def test_oxygen_the_depth_cannot_hold_is_a_shortfall():
    # Table 6A with two extensions at 60 fsw and a recent exposure: 90 + 60 = 150 min asked
    # at 30 fsw, where the patient breathes 120
    tl, ox = _ox("6A", {"oxygen": 2}, recent=True)
    assert ox.shortfall_min == pytest.approx(30)
    r = evaluate_attendant(tl, RecentDive(60, 30, 120))
    assert any("30 min more attendant oxygen" in w for w in r.warnings)


def test_attendant_oxygen_dose_unmodified_table6_vs_derived_figure():
    # tender oxygen on an unmodified Table 6: 30 min at 30 fsw and the 30-min ascent,
    # about 122 OTU (DERIVED, data file)
    tl = build_timeline(load_treatment("6"), "08:00")
    r = evaluate_attendant(tl)
    assert r.otu_oxygen == pytest.approx(navy()["6"]["attendant_oxygen_otu"], abs=1.0)
    assert r.otu > r.otu_oxygen


def test_model_margin_and_policy():
    tl = build_timeline(load_treatment("6"), "08:00")
    r = evaluate_attendant(tl)
    assert not r.evaluation.ceiling_broken and r.warnings == []
    assert r.evaluation.coefficient_status == "FROM MEMORY"
    # a recent deep dive loads the attendant more (regression: own computation)
    r2 = evaluate_attendant(tl, RecentDive(130, 30, 60))
    assert r2.recent_dive_stop_min and r2.recent_dive_stop_min > 0
    assert r2.evaluation.max_gf > r.evaluation.max_gf or \
        r2.evaluation.surfacing_gf != r.evaluation.surfacing_gf
    assert any("model's own schedule" in n for n in r2.notes)


def test_out_of_policy_warns():
    tl = build_timeline(load_treatment("6"), "08:00")
    # a policy GF high below the attendant's surfacing supersaturation is out of policy
    r = evaluate_attendant(tl, gf_low=0.01, gf_high=0.01)
    assert r.out_of_policy and any("GF high" in w or "ceiling" in w for w in r.warnings)
    # a policy chamber PO2 limit below 1.91 atm (oxygen at 30 fsw) is out of policy
    r = evaluate_attendant(tl, po2_limit_bar=1.5)
    assert any("PO2" in w for w in r.warnings)


def test_dive_outside_12h_but_within_18h_is_flagged_not_planned():
    tl = build_timeline(load_treatment("6"), "08:00")
    r = evaluate_attendant(tl, RecentDive(60, 30, 14 * 60))
    assert not r.oxygen.recent
    assert any("18 h" in w for w in r.warnings)
    r = evaluate_attendant(tl, RecentDive(60, 30, 20 * 60))
    assert not any("18 h" in w for w in r.warnings)


def test_chamber_air_only_and_no_rule():
    tl = build_timeline(load_treatment("6"), "08:00")
    ox = attendant_oxygen(tl, False)
    assert not ox.chamber_air_only
    t7 = load_treatment("7", plannable_only=False)
    assert t7.model.conventions.attendant_oxygen[0].oxygen_min == 0  # Table 7: air only


@pytest.mark.parametrize(("spec", "want"), [
    ("depth=100,bottom=25,since=3:00", RecentDive(100, 25, 180)),
    ("depth=100fsw,bottom=25min,since=90min", RecentDive(100, 25, 90)),
    ("depth=18msw,bottom=40,since=2h,gas=32/0", RecentDive(18 * 0.1 / (1.01325 / 33), 40, 120,
                                                           "32/0")),
    (" since=0:30 , depth=40 , bottom=10 ", RecentDive(40, 10, 30)),
])
def test_parse_recent_dive(spec, want):
    got = parse_recent_dive(spec)
    assert got.depth_fsw == pytest.approx(want.depth_fsw)
    assert (got.bottom_min, got.since_min, got.gas) == (want.bottom_min, want.since_min,
                                                        want.gas)


@pytest.mark.parametrize("spec", ["depth=100", "100/25/3:00", "depth=x,bottom=2,since=1:00",
                                  "depth=100,bottom=25,since=3:75", "depth=-5,bottom=2,since=1h",
                                  "depth=100,bottom=0,since=1h",
                                  "depth=1,depth=2,bottom=1,since=1h",
                                  "depth=100,bottom=25,since=3:00,gas=oxygn",
                                  "depth=100,bottom=25,since=3:00,colour=red"])
def test_bad_recent_dive_names_the_option(spec):
    with pytest.raises(InputError) as e:
        parse_recent_dive(spec)
    assert e.value.field == "--attendant-recent-dive"
