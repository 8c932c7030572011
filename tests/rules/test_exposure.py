"""Repetitive-dive, altitude and flying rules: a passing and a failing plan for every rule.

The wait before altitude: 12 h after a single no-stop dive, 18 h after repetitive
dives, 24 h after a decompression dive is common guidance recalled from memory (no
outside source confirmed; tables/limits/altitude-after-diving.toml, FROM MEMORY).

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
from supervisor.rules.exposure import FAMILY, NAVY_CH9
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


def _travel(d, when, altitude=8000, diver="Dana Diver", start="2026-05-14T08:00"):
    d["dives"][0]["start"] = start
    d["altitude_travel"] = [{"diver": diver, "altitude": altitude, "departure": when}]
    return d


def test_flying_without_travel_is_information_at_the_minimum():
    """No travel planned: one information finding stating the 12 h minimum, no warning.

    Expected value: 12 h after a single no-stop dive, common guidance (from memory).
    """
    got = run(data(), FAMILY, "exposure-flying")
    f = only(got, "info")
    assert not [x for x in got if x.severity in ("warn", "fail")]
    assert (f.limit, f.unit, f.source_status) == (12.0, "h", "FROM MEMORY")
    assert "at least 12 h 00 min on the surface after D1" in f.message
    assert "no travel to altitude is planned" in f.message and "Navy table" in f.message
    assert "0 h 0" not in f.message


def test_flying_never_prints_a_model_wait_shorter_than_the_minimum():
    """Reproducer: the model alone printed "0 h 00 min ... before ascending to 8,000 ft"."""
    ctx = context(data())
    assert _flying(ctx) < 12 * 60  # the model's own figure is short here
    for f in FAMILY.get("exposure-flying").run(ctx):
        assert "0 h 00 min" not in f.message and "model gives" not in f.message


def test_flying_after_a_decompression_dive_needs_24_h():
    """Expected value: 24 h after a decompression dive, common guidance (from memory)."""
    d = data(bottom_time_min=70, decompression="in-water",
             stops=[{"depth": 20, "minutes": 5}, {"depth": 10, "minutes": 30}])
    f = only(run(d, FAMILY, "exposure-flying"), "info")
    assert f.limit == 24.0 and "after a decompression dive" in f.message


def test_flying_travel_before_the_minimum_fails():
    """A departure 10 h after surfacing from a single no-stop dive: before 12 h, fails."""
    d = _travel(data(), "2026-05-14T19:00")
    got = run(d, FAMILY, "exposure-flying")
    f = only(got, "fail")
    assert f.unit == "h" and f.limit == 12.0 and 9 < f.measured < 10.5
    assert "before the minimum wait of 12 h ends" in f.message
    assert "8,000 ft departing 2026-05-14 19:00" in f.message
    assert f.citation.endswith("a default guarding against immediate harm") and f.verified
    _c.reported(f)


def test_flying_travel_after_the_minimum_passes_unverified():
    got = run(_travel(data(), "2026-05-15T09:00"), FAMILY, "exposure-flying")
    f = only(got, "pass")
    assert "after the minimum wait" in f.message and not f.verified  # FROM MEMORY minimum
    assert f.measured > 12


def test_flying_travel_without_dive_times_needs_review():
    d = _travel(data(), "2026-05-15T09:00")
    del d["dives"][0]["start"]
    f = only(run(d, FAMILY, "exposure-flying"), "warn")
    assert f.measured == "not stated" and "dives[].start" in f.message and not f.verified


def test_flying_travel_no_higher_than_the_site_passes():
    d = _travel(_alt(1000), "2026-05-14T10:00", altitude=2000)  # 2,000 ft is below the site
    f = only(run(d, FAMILY, "exposure-flying"), "pass")
    assert "no higher than the site" in f.message


def test_flying_policy_sets_a_longer_minimum():
    d = _travel(data(), "2026-05-15T09:00")
    d["policy"]["altitude_wait_single_h"] = 36
    f = only(run(d, FAMILY, "exposure-flying"), "fail")
    assert f.limit == 36.0 and f.source_status is None
    assert f.citation.startswith("contractor policy (policy.altitude_wait_single_h)")


def test_flying_policy_shorter_than_the_guidance_is_not_used():
    d = _travel(data(), "2026-05-14T19:00")
    d["policy"]["altitude_wait_single_h"] = 2
    got = run(d, FAMILY, "exposure-flying")
    assert only(got, "fail").limit == 12.0
    assert "shorter than the common minimum of 12 h" in only(got, "warn").message


def test_flying_traveller_with_a_diving_role_but_no_dive_needs_review():
    got = run(_travel(data(), "2026-05-14T19:00", diver="Stan Standby"), FAMILY,
              "exposure-flying")
    warn = only(got, "warn")
    assert "Stan Standby" in warn.message and "they hold a diving role" in warn.message
    got = run(_travel(data(), "2026-05-14T19:00", diver="Tess Tender"), FAMILY,
              "exposure-flying")
    assert any("does not dive in this plan" in f.message for f in got if f.severity == "info")


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


_SINGLE = ("common guidance on flying after diving (from memory; thought to follow the DAN "
           "Flying After Recreational Diving Workshop, 2002)")


def _on_surface_h(ctx):
    from supervisor.analysis import altitude as alt

    w = alt.for_context(ctx)[0]
    return round((ctx.plan.altitude_travel[0].departure - w.surfaced_at).total_seconds() / 3600, 2)


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
        passing=lambda _: _travel(data(), "2026-05-15T09:00"),
        failing=lambda _: _travel(data(), "2026-05-14T12:00"), measured=_on_surface_h,
        limit=12.0, severity="fail",
        citation=f"{_SINGLE}; a default guarding against immediate harm"),
}


@pytest.mark.parametrize("key", sorted(CASES))
def test_contract(key, tmp_path):
    """Each exposure rule passes its passing plan and reports id, measured, limit, citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)
