"""Procedure rules: a passing and a failing plan for every rule.

Policy limits are the plan's own (they fail).  Navy convention values and their
status: descent 75 fsw/min (U.S. Navy Diving Manual ch. 9, from memory); ascent
20-40 fsw/min (Rev 4 Change A ch. 14, OLDER-EDITION); surface-decompression
interval 5 min, 30-min oxygen periods, 5-min air breaks, exceptional exposure
(Rev 7 ch. 9 as quoted, SECONDARY); next longer schedule for cold or strenuous
work and the 10-min short surface interval (U.S. Navy Diving Manual, pre-2008 air
tables, OLDER-EDITION).
"""

from __future__ import annotations

import pytest

from supervisor.findings import Finding
from supervisor.rules.procedure import FAMILY

O2 = "oxygen"


def _bad(findings: list[Finding]) -> list[Finding]:
    return [f for f in findings if f.severity in ("fail", "warn")]


def _one_bad(findings: list[Finding]) -> Finding:
    got = _bad(findings)
    assert len(got) == 1, [f.message for f in got]
    return got[0]


def _all_pass(findings: list[Finding]) -> None:
    assert findings, "the rule gave no finding"
    assert not _bad(findings), [f.message for f in _bad(findings)]


def _surd(base, transfer=3.0, **kw):
    """100 fsw / 40 min with a 40 fsw water stop and surface decompression on oxygen."""
    d = base()
    d["dives"][0].update(
        max_depth=100, bottom_time_min=40, decompression="surface-oxygen",
        surface_transfer_min=transfer,
        stops=[{"depth": 40, "minutes": 2},
               {"depth": 50, "minutes": 15, "gas": O2, "place": "chamber"},
               {"depth": 40, "minutes": 15, "gas": O2, "place": "chamber"},
               {"depth": 40, "minutes": 5, "gas": "air", "place": "chamber"},
               {"depth": 40, "minutes": 30, "gas": O2, "place": "chamber"}],
    )
    d["dives"][0].update(kw)
    return d


# ---------------------------------------------------------------------------
# rates


def test_descent_rate_policy(base, run):
    """Policy: descent no faster than policy.descent_rate_max."""
    d = base()
    d["policy"]["descent_rate_max"] = 50
    f = _one_bad(run(d, FAMILY, "proc-descent-rate"))
    assert (f.rule, f.severity, f.measured, f.limit, f.unit) == (
        "proc-descent-rate", "fail", 60, 50, "fsw/min")
    assert f.citation == "contractor policy (policy.descent_rate_max)"
    _all_pass(run(base(), FAMILY, "proc-descent-rate"))


def test_descent_rate_table_convention_warns(base, run):
    """U.S. Navy Diving Manual ch. 9: descent no faster than 75 fsw/min (from memory)."""
    d = base()
    d["policy"]["descent_rate_max"] = 100
    d["dives"][0]["descent_rate"] = 90
    f = _one_bad(run(d, FAMILY, "proc-descent-rate"))
    assert (f.rule, f.severity, f.measured, f.limit, f.source_status) == (
        "proc-descent-rate-table", "warn", 90, 75.0, "FROM MEMORY")
    assert f.citation.startswith("U.S. Navy Diving Manual")


@pytest.mark.parametrize(("rate", "limit"), [(50, 40.0), (15, 20.0)])
def test_ascent_rate_policy(base, run, rate, limit):
    """Policy: ascent between policy.ascent_rate_min and _max (20-40 fsw/min default)."""
    d = base()
    d["dives"][0]["ascent_rate"] = rate
    got = _bad(run(d, FAMILY, "proc-ascent-rate"))
    pol = [f for f in got if f.rule == "proc-ascent-rate"]
    assert [(f.severity, f.measured, f.limit) for f in pol] == [("fail", rate, limit)]
    table = [f for f in got if f.rule == "proc-ascent-rate-table"]
    assert [(f.severity, f.source_status) for f in table] == [("warn", "OLDER-EDITION")]
    _all_pass(run(base(), FAMILY, "proc-ascent-rate"))


def test_ascent_rate_in_msw(base, run):
    """msw plan: 9 msw/min (29.3 fsw/min) passes; 14 msw/min (45.6 fsw/min) fails policy."""
    _all_pass(run(base("msw"), FAMILY, "proc-ascent-rate"))
    d = base("msw")
    d["dives"][0]["ascent_rate"] = 14
    got = _bad(run(d, FAMILY, "proc-ascent-rate"))
    assert [(f.rule, f.limit) for f in got] == [("proc-ascent-rate", 12.0),
                                                ("proc-ascent-rate-table", "6.1-12.3")]


# ---------------------------------------------------------------------------
# stops


@pytest.mark.parametrize(("unit", "stops", "bad_depth", "step"),
                         [("fsw", [25, 10], 25, 10.0), ("msw", [7, 3], 7, 3.0)])
def test_stop_step(base, run, unit, stops, bad_depth, step):
    """Policy: stops at whole multiples of the stop step (10 fsw / 3 msw by default)."""
    d = base(unit)
    d["dives"][0].update(decompression="in-water",
                         stops=[{"depth": x, "minutes": 3} for x in stops])
    f = _one_bad(run(d, FAMILY, "proc-stop-step"))
    assert (f.rule, f.severity, f.measured, f.limit, f.unit) == (
        "proc-stop-step", "fail", bad_depth, step, unit)
    d["dives"][0]["stops"] = [{"depth": x * step, "minutes": 3} for x in (2, 1)]
    _all_pass(run(d, FAMILY, "proc-stop-step"))


def test_last_stop(base, run):
    """Policy: no water stop shallower than policy.last_stop."""
    d = base()
    d["policy"]["last_stop"] = 20
    d["dives"][0].update(decompression="in-water",
                         stops=[{"depth": 20, "minutes": 3}, {"depth": 10, "minutes": 5}])
    f = _one_bad(run(d, FAMILY, "proc-last-stop"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("proc-last-stop", "fail", 10, 20)
    d["dives"][0]["stops"] = [{"depth": 20, "minutes": 8}]
    _all_pass(run(d, FAMILY, "proc-last-stop"))


def test_time_to_first_stop_is_information(base, run):
    """Travel 100 -> 40 fsw at 30 fsw/min takes 2 min (arithmetic)."""
    d = base()
    d["dives"][0].update(max_depth=100, bottom_time_min=30, decompression="in-water",
                         stops=[{"depth": 40, "minutes": 2}, {"depth": 20, "minutes": 5}])
    [f] = run(d, FAMILY, "proc-time-to-first-stop")
    assert (f.rule, f.severity, f.measured, f.unit) == (
        "proc-time-to-first-stop", "info", 2.0, "min")


@pytest.mark.parametrize(
    ("decompression", "stops", "expect"),
    [
        ("none", [{"depth": 40, "minutes": 15, "gas": O2, "place": "chamber"}], "chamber stops"),
        ("in-water", [], "no water stops"),
        ("in-water-oxygen", [{"depth": 20, "minutes": 10}], "on oxygen"),
        ("surface-oxygen", [{"depth": 40, "minutes": 2}], "no chamber stops"),
        ("surface-oxygen", [{"depth": 40, "minutes": 15, "place": "chamber"}], "on oxygen"),
    ],
)
def test_declared_decompression_must_match_stops(base, run, decompression, stops, expect):
    """Plan consistency: the stops carry out the declared decompression."""
    d = base()
    d["dives"][0].update(decompression=decompression, stops=stops)
    f = _one_bad(run(d, FAMILY, "proc-decompression-declared"))
    assert (f.rule, f.severity, f.measured) == ("proc-decompression-declared", "fail",
                                                decompression)
    assert expect in f.message


def test_declared_decompression_passes(base, run):
    """Plan consistency: matching declarations pass; a safety stop on a no-stop dive is info."""
    _all_pass(run(_surd(base), FAMILY, "proc-decompression-declared"))
    d = base()
    d["dives"][0]["stops"] = [{"depth": 10, "minutes": 3}]
    [f] = run(d, FAMILY, "proc-decompression-declared")
    assert f.severity == "info"


# ---------------------------------------------------------------------------
# surface decompression and oxygen


def test_surd_needs_ready_chamber(base, run):
    """Plan consistency: surface decompression is finished in a chamber at the site."""
    d = _surd(base)
    d["chamber"]["ready"] = False
    f = _one_bad(run(d, FAMILY, "proc-surd-chamber"))
    assert (f.rule, f.severity) == ("proc-surd-chamber", "fail")
    _all_pass(run(_surd(base), FAMILY, "proc-surd-chamber"))


def test_surd_interval_over_5_min_warns(base, run):
    """U.S. Navy Diving Manual Rev 7 ch. 9 (SECONDARY): leaving the 40 fsw stop to 50 fsw in
    the chamber within 5 min.  40/30 + 4 + 50/100 = 5.83 min (arithmetic)."""
    f = _one_bad(run(_surd(base, transfer=4.0), FAMILY, "proc-surd-interval"))
    assert (f.rule, f.severity, f.limit, f.source_status) == (
        "proc-surd-interval", "warn", 5.0, "SECONDARY")
    assert f.measured == pytest.approx(40 / 30 + 4 + 0.5, abs=0.01)
    assert "surface decompression" in f.citation


def test_surd_interval_within_5_min_passes(base, run):
    """40/30 + 3 + 50/100 = 4.83 min."""
    [f] = run(_surd(base, transfer=3.0), FAMILY, "proc-surd-interval")
    assert f.severity == "pass"
    assert f.measured == pytest.approx(4.83, abs=0.01)


def test_surd_interval_not_stated_needs_review(base, run):
    """Without the deck time the interval cannot be checked."""
    d = _surd(base)
    del d["dives"][0]["surface_transfer_min"]
    f = _one_bad(run(d, FAMILY, "proc-surd-interval"))
    assert f.severity == "warn" and not f.verified


def test_chamber_periods(base, run):
    """Rev 7 ch. 9 (SECONDARY): 30-min oxygen periods with 5-min air breaks in the chamber."""
    _all_pass(run(_surd(base), FAMILY, "proc-o2-chamber-periods"))
    d = _surd(base)
    d["dives"][0]["stops"][3]["minutes"] = 2  # air break too short
    f = _one_bad(run(d, FAMILY, "proc-o2-chamber-periods"))
    assert (f.rule, f.severity, f.measured, f.limit) == (
        "proc-o2-chamber-periods", "warn", 2, 5.0)
    d = _surd(base)
    d["dives"][0]["stops"][2]["minutes"] = 25  # 15 + 25 = 40 min without a break
    f = _one_bad(run(d, FAMILY, "proc-o2-chamber-periods"))
    assert (f.measured, f.limit) == (40, 30.0)


def test_in_water_air_breaks(base, run):
    """Rev 7 ch. 9 (SECONDARY): 5-min air break after 30 min on oxygen in the water; the last
    run may reach 35 min (Rev 4 Change A, OLDER-EDITION)."""
    d = base()
    d["dives"][0].update(max_depth=100, bottom_time_min=40, decompression="in-water-oxygen",
                         stops=[{"depth": 30, "minutes": 20, "gas": O2},
                                {"depth": 20, "minutes": 20, "gas": O2},
                                {"depth": 20, "minutes": 5, "gas": "air"},
                                {"depth": 20, "minutes": 10, "gas": O2}])
    f = _one_bad(run(d, FAMILY, "proc-o2-air-breaks"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("proc-o2-air-breaks", "warn", 40, 30.0)
    d["dives"][0]["stops"] = [{"depth": 30, "minutes": 10, "gas": O2},
                              {"depth": 20, "minutes": 24, "gas": O2}]
    _all_pass(run(d, FAMILY, "proc-o2-air-breaks"))


@pytest.mark.parametrize(
    ("change", "measured", "limit", "unit"),
    [
        ({"max_depth": 200, "bottom_time_min": 10}, 200, 190.0, "fsw"),
        ({"decompression": "in-water", "stops": [{"depth": 20, "minutes": 95}]}, 95.0, 90.0,
         "min"),
    ],
)
def test_exceptional_exposure(base, run, change, measured, limit, unit):
    """Rev 7 ch. 9 (SECONDARY): deeper than 190 fsw or over 90 min in-water decompression."""
    d = base()
    d["dives"][0].update(change)
    f = _one_bad(run(d, FAMILY, "proc-exceptional-exposure"))
    assert (f.rule, f.severity, f.measured, f.limit, f.unit) == (
        "proc-exceptional-exposure", "warn", measured, limit, unit)
    assert run(base(), FAMILY, "proc-exceptional-exposure") == []


def test_exceptional_exposure_surd_periods(base, run):
    """Rev 7 ch. 9 (SECONDARY): surface decompression needing more than 4 periods.

    Chamber oxygen 15 + 15 + 30 + 30 + 30 + 30 = 150 min = 5 periods of 30 min.
    """
    d = _surd(base)
    brk = {"depth": 30, "minutes": 5, "gas": "air", "place": "chamber"}
    per = {"depth": 30, "minutes": 30, "gas": O2, "place": "chamber"}
    d["dives"][0]["stops"] += [brk, per, brk, per, brk, per]
    f = _one_bad(run(d, FAMILY, "proc-exceptional-exposure"))
    assert (f.rule, f.measured, f.limit, f.unit) == (
        "proc-exceptional-exposure", 5.0, 4.0, "periods")
    assert run(_surd(base), FAMILY, "proc-exceptional-exposure") == []


def test_cold_or_strenuous_flags_next_longer_schedule(base, run):
    """U.S. Navy Diving Manual, pre-2008 air tables (OLDER-EDITION): next longer schedule."""
    d = base()
    d["dives"][0]["cold"] = True
    f = _one_bad(run(d, FAMILY, "proc-cold-strenuous"))
    assert (f.rule, f.severity, f.measured, f.source_status) == (
        "proc-cold-strenuous", "warn", 40, "OLDER-EDITION")
    assert "next longer" in f.message
    assert run(base(), FAMILY, "proc-cold-strenuous") == []


def test_short_surface_interval(base, run):
    """U.S. Navy Diving Manual, pre-2008 air tables (OLDER-EDITION): SI under 10 min."""
    d = base()
    d["dives"].append(dict(d["dives"][0], id="D2", previous_dive="D1", surface_interval_min=8))
    f = _one_bad(run(d, FAMILY, "proc-short-surface-interval"))
    assert (f.rule, f.severity, f.measured, f.limit, f.dive) == (
        "proc-short-surface-interval", "warn", 8, 10.0, "D2")
    d["dives"][1]["surface_interval_min"] = 90
    _all_pass(run(d, FAMILY, "proc-short-surface-interval"))
