"""Repetitive-dive, altitude and flying rules: a passing and a failing plan for every rule.

Outside values: the 12-h repetitive window (U.S. Navy Diving Manual Rev 4 Change A
ch. 9, OLDER-EDITION); no altitude correction up to 300 ft and the procedure's
10,000 ft ceiling (same chapter, OLDER-EDITION); the 8,000 ft commercial cabin
(NOAA Diving Center Topside 2(9), 1999, OLDER-EDITION); the ICAO standard
atmosphere for the site pressure.
"""

from __future__ import annotations

import _contract as _c
import pytest
from _contract import Case
from _engine_plans import context, data, only, run, second_dive

from supervisor import analysis as an
from supervisor.rules.exposure import FAMILY, NAVY_CH9, TOPSIDE
from supervisor.units import altitude_pressure


def _two(**kw):
    return second_dive(data(), **kw)


def test_repetitive_dive_is_reported():
    f = only(run(_two(surface_interval_min=120, previous_dive="D1"), FAMILY,
                  "exposure-repetitive"), "info")
    assert f.dive == "D2" and (f.measured, f.limit) == (120, 720)  # 12 h window
    assert "within 12 h" in f.message and f.citation.startswith(NAVY_CH9)


def test_beyond_window_still_carried():
    f = only(run(_two(surface_interval_min=800, previous_dive="D1"), FAMILY,
                  "exposure-repetitive"), "info")
    assert "beyond the 12-h repetitive window" in f.message


def test_missing_interval_needs_review():
    f = only(run(_two(), FAMILY, "exposure-repetitive"), "warn")
    assert f.rule == "exposure-repetitive" and f.measured == 0 and not f.verified


def test_interval_without_an_earlier_dive_needs_review():
    f = only(run(data(surface_interval_min=60), FAMILY, "exposure-repetitive"), "warn")
    assert "no earlier dive" in f.message


def test_first_dive_alone_gives_no_repetitive_finding():
    assert run(data(), FAMILY, "exposure-repetitive") == []


def test_window_counts():
    f = only(run(_two(surface_interval_min=120, previous_dive="D1"), FAMILY,
                  "exposure-window"), "info")
    assert "2 dive(s), 70 min bottom time in the last 12 h" in f.message
    f = only(run(_two(surface_interval_min=800, previous_dive="D1"), FAMILY,
                  "exposure-window"), "info")
    assert "1 dive(s), 30 min bottom time in the last 12 h" in f.message
    assert "2 dive(s), 70 min bottom time in the last 24 h" in f.message


def _alt(m):
    d = data()
    d["site"]["altitude_m"] = m
    return d


def test_altitude_sea_level_passes():
    f = only(run(data(), FAMILY, "exposure-altitude"), "pass")
    assert f.measured == 0 and f.limit == pytest.approx(91.4, abs=0.1)  # 300 ft


def test_altitude_site_needs_review():
    got = run(_alt(1524), FAMILY, "exposure-altitude")
    note = only(got, "info")
    # 60 fsw at 5,000 ft -> 72.1 fsw (Navy worked example, Rev 4 Change A p. 266, OLDER-EDITION)
    assert "60 fsw -> 72.1 fsw" in note.message
    warn = only(got, "warn")
    assert warn.rule == "exposure-altitude" and warn.measured == 1524
    assert "settled at the site's pressure" in warn.message


def test_altitude_above_navy_procedure():
    got = [f for f in run(_alt(3500), FAMILY, "exposure-altitude") if f.severity == "warn"]
    top = [f for f in got if "above 10,000 ft" in f.message]
    assert len(top) == 1 and top[0].limit == pytest.approx(3048.0)


def test_flying_model_figure_needs_review():
    ctx = context(data())
    f = only(FAMILY.get("exposure-flying").run(ctx), "warn")
    day = an.for_context(ctx).divers["Dana Diver"]
    assert f.rule == "exposure-flying"
    assert f.measured == day.time_to_altitude_min[an.CABIN_ALTITUDE_M]
    assert "not a flying rule" in f.message and f.citation == TOPSIDE


def test_flying_after_a_heavier_day_takes_longer():
    light = only(run(data(), FAMILY, "exposure-flying"), "warn").measured
    heavy = only(run(data(bottom_time_min=70, decompression="in-water",
                          stops=[{"depth": 20, "minutes": 5}, {"depth": 10, "minutes": 30}]),
                     FAMILY, "exposure-flying"), "warn").measured
    assert heavy > light


def test_flying_from_a_site_above_the_cabin_is_information():
    d = _alt(2500)
    f = only(run(d, FAMILY, "exposure-flying"), "info")
    assert "at or above 8,000 ft" in f.message
    assert float(altitude_pressure(2500)) < float(altitude_pressure(an.CABIN_ALTITUDE_M))


def test_window_with_an_assumed_interval_needs_review():
    """No surface interval stated: none assumed, so the counts need review."""
    f = only(run(_two(), FAMILY, "exposure-window"), "warn")
    assert (f.rule, f.measured, f.unit, f.verified) == ("exposure-window", 2.0, "dives", False)
    assert "no surface interval is stated before D2" in f.message
    _c.reported(f)


def test_altitude_pass_is_unverified():
    """The 300 ft threshold is OLDER-EDITION: the pass keeps the verdict at needs review."""
    f = only(run(data(), FAMILY, "exposure-altitude"), "pass")
    assert (f.source_status, f.verified) == ("OLDER-EDITION", False)


# ---------------------------------------------------------------------------
# the findings contract: a passing and a failing plan for every rule


def _flying(ctx):
    return an.for_context(ctx).divers["Dana Diver"].time_to_altitude_min[an.CABIN_ALTITUDE_M]


CASES: dict[str, Case] = {
    "exposure-repetitive": Case(
        passing=lambda _: _two(surface_interval_min=120, previous_dive="D1"),
        failing=lambda _: _two(), measured=0.0, limit=720, severity="warn",
        citation=f"{NAVY_CH9} (repetitive dive within 12 h)"),
    "exposure-window": Case(
        passing=lambda _: _two(surface_interval_min=120, previous_dive="D1"),
        failing=lambda _: _two(), measured=2.0, severity="warn",
        citation=f"{NAVY_CH9} (12-h repetitive window; 24 h before ascent to altitude)"),
    "exposure-altitude": Case(
        passing=lambda _: data(), failing=lambda _: _alt(1524), measured=1524.0,
        severity="warn", citation=f"{NAVY_CH9} 9-12 (diving at altitude)"),
    "exposure-flying": Case(
        passing=lambda _: _alt(2500), failing=lambda _: data(), measured=_flying,
        severity="warn", citation=TOPSIDE),
}


@pytest.mark.parametrize("key", sorted(CASES))
def test_contract(key, tmp_path):
    """Each exposure rule passes its passing plan and reports id, measured, limit, citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)
