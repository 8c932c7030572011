"""Tests of supervisor.engine.schedule (stops, no-stop limits, profile evaluation).

Outside references are named beside each check.  Values marked "regression" were
computed for these checks from the stated conventions and are not published figures.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from supervisor.engine.schedule import (
    ScheduleRequest,
    SurfaceDecompression,
    evaluate_profile,
    plan_schedule,
    plan_schedules,
)
from supervisor.errors import InputError, ScheduleError
from supervisor.profile import Profile

FSW = {"unit": "fsw", "descent_rate": 75, "ascent_rate": 30, "stop_step": 10, "last_stop": 10}
MSW = {"unit": "msw", "descent_rate": 23, "ascent_rate": 9, "stop_step": 3, "last_stop": 3}


@pytest.mark.parametrize(
    ("depth_m", "ndl_gf100", "ndl_gf85"),
    [(12, 182, 125), (15, 90, 69), (18, 59, 43), (21, 40, 28), (24, 28, 20), (30, 16, 12),
     (36, 11, 8), (42, 8, 6)],
)
def test_no_stop_limit_regression_baseline(depth_m, ndl_gf100, ndl_gf85):
    """ZH-L16C air no-stop limits with instantaneous descent, P = 1.01325 + d/10 bar
    (regression baseline computed for this check, not published values)."""
    kw = {"unit": "msw", "stop_step": 3, "last_stop": 3, "descent_rate": 1e6}
    a = plan_schedule(ScheduleRequest(depth=depth_m, bottom_time_min=5, gf_low=1, gf_high=1,
                                      **{k: v for k, v in kw.items()}))
    b = plan_schedule(ScheduleRequest(depth=depth_m, bottom_time_min=5, gf_low=0.3,
                                      gf_high=0.85, **kw))
    assert a.no_stop_limit_min == ndl_gf100
    assert b.no_stop_limit_min == ndl_gf85


def test_within_no_stop_limit_has_no_stops_and_one_more_minute_has():
    ndl = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=10, **FSW)).no_stop_limit_min
    assert ndl is not None and ndl > 2
    inside = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=ndl, **FSW))
    over = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=ndl + 1, **FSW))
    assert inside.stops == [] and inside.total_stop_min == 0
    assert over.stops and over.total_stop_min >= 1


def test_shallow_air_is_unlimited():
    """Air at 10 fsw: the saturated GF-high ceiling is at the surface (no-stop limit null)."""
    r = plan_schedule(ScheduleRequest(depth=10, bottom_time_min=600, **FSW))
    assert r.no_stop_limit_min is None and r.stops == []


@pytest.mark.parametrize("depth", range(60, 200, 10))
def test_last_stop_is_the_longest_in_air_schedules(depth):
    """Common practice, no source: the pressure ratio from 10 fsw to the surface is the
    largest of the ascent, so in plain air schedules from 60 to 190 fsw the last stop is
    the longest."""
    ndl = plan_schedule(ScheduleRequest(depth=depth, bottom_time_min=10, **FSW)).no_stop_limit_min
    reqs = [ScheduleRequest(depth=depth, bottom_time_min=ndl + x, **FSW) for x in (5, 20, 60)]
    for r in plan_schedules(reqs):
        minutes = [s.minutes for s in r.stops]
        assert r.stops[-1].depth == 10
        assert r.stops[-1].minutes == max(minutes)


def test_stops_follow_conventions():
    r = plan_schedule(ScheduleRequest(depth=130, bottom_time_min=40, **FSW))
    depths = [s.depth for s in r.stops]
    assert depths == sorted(depths, reverse=True)
    assert all(d % 10 == 0 and d >= 10 for d in depths)
    assert all(isinstance(s.minutes, int) and s.minutes > 0 for s in r.stops)
    assert r.first_stop_depth >= depths[0]
    travel = 130 / 30
    assert r.total_ascent_min == pytest.approx(r.total_stop_min + travel)


def test_first_stop_is_where_next_stop_would_break_gf_low():
    """The profile of the computed schedule never breaks the GF ceiling, and the first stop
    is deeper with a lower GF low (Doolette 2019: GF low < 100 % forces deeper first stops)."""
    lo = plan_schedule(ScheduleRequest(depth=150, bottom_time_min=30, gf_low=0.2, **FSW))
    hi = plan_schedule(ScheduleRequest(depth=150, bottom_time_min=30, gf_low=0.8, gf_high=0.85,
                                       **FSW))
    assert lo.first_stop_depth > hi.first_stop_depth
    for r in (lo, hi):
        ev = evaluate_profile(r.profile, "zhl16c", r.request.gf_low, r.request.gf_high,
                              first_stop_depth=r.first_stop_depth)
        assert not ev.ceiling_broken
        assert ev.surfacing_gf == pytest.approx(r.surfacing_gf, abs=1e-9)
        assert ev.surfacing_gf <= r.request.gf_high + 1e-9


def test_oxygen_deco_shortens_decompression():
    air = plan_schedule(ScheduleRequest(depth=150, bottom_time_min=40, **FSW))
    o2 = plan_schedule(ScheduleRequest(depth=150, bottom_time_min=40,
                                       deco_gases=(("oxygen", 20),), **FSW))
    assert o2.total_stop_min < air.total_stop_min
    assert {s.gas for s in o2.stops if s.depth <= 20} == {"oxygen"}
    assert {s.gas for s in o2.stops if s.depth > 20} == {"air"}


def test_air_breaks_do_not_shorten_oxygen_stops():
    plain = plan_schedule(ScheduleRequest(depth=170, bottom_time_min=60,
                                          deco_gases=(("oxygen", 30),), **FSW))
    breaks = plan_schedule(ScheduleRequest(depth=170, bottom_time_min=60,
                                           deco_gases=(("oxygen", 30),), o2_air_break=(30, 5),
                                           **FSW))
    assert breaks.total_stop_min >= plain.total_stop_min


def test_surface_decompression_in_chamber():
    sd = SurfaceDecompression(leave_water_depth=40, surface_interval_min=5, chamber_depth=50)
    r = plan_schedule(ScheduleRequest(depth=150, bottom_time_min=40, surface_decompression=sd,
                                      **FSW))
    water = [s for s in r.stops if s.place == "water"]
    chamber = [s for s in r.stops if s.place == "chamber"]
    assert water and chamber
    assert min(s.depth for s in water) >= 40
    assert {s.gas for s in chamber} == {"oxygen"}
    assert r.surface_interval_max_gf is not None and r.surface_interval_max_gf > 1.0
    ev = evaluate_profile(r.profile, "zhl16c", 0.3, 0.85, first_stop_depth=r.first_stop_depth)
    assert not ev.ceiling_broken
    assert ev.surface_interval_max_gf == pytest.approx(r.surface_interval_max_gf, rel=0.05)


def test_cannot_clear_names_the_cause():
    """A 20 fsw last stop on air with GF high 70 %: compartment 16 saturates at 20 fsw above
    what the surface allows, so the stop can never clear."""
    with pytest.raises(ScheduleError, match="never clear.*compartment 16"):
        plan_schedule(ScheduleRequest(depth=100, bottom_time_min=60, gf_low=0.3, gf_high=0.7,
                                      **{**FSW, "last_stop": 20}))


def test_batch_equals_single():
    reqs = [ScheduleRequest(depth=d, bottom_time_min=t, **FSW) for d, t in
            [(60, 80), (100, 30), (190, 20), (40, 10)]]
    batch = plan_schedules(reqs)
    for r, b in zip(reqs, batch, strict=True):
        one = plan_schedule(r)
        assert one.stops == b.stops and one.no_stop_limit_min == b.no_stop_limit_min
        np.testing.assert_allclose(one.final_p_n2, b.final_p_n2, atol=1e-12)


@pytest.mark.parametrize("units", [FSW, MSW], ids=["fsw", "msw"])
def test_fsw_and_msw_agree_in_pressure(units):
    """The same dive in fsw and msw (30 m ~ 98.4 fsw) gives similar decompression."""
    depth = 30 if units["unit"] == "msw" else 30 * 3.2808
    r = plan_schedule(ScheduleRequest(depth=depth, bottom_time_min=30, **units))
    assert 10 <= r.total_stop_min <= 30
    assert r.to_json()["unit"] == units["unit"]


def test_repetitive_start_tensions_lengthen_decompression():
    first = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=25, **FSW))
    # 60 min surface interval on air
    prof = Profile(unit="fsw").add(0, 60, "air")
    ev = evaluate_profile(prof, p_n2_0=first.final_p_n2, p_he_0=first.final_p_he)
    second = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=25,
                                           p_n2_0=tuple(ev.final_p_n2),
                                           p_he_0=tuple(ev.final_p_he), **FSW))
    assert second.total_stop_min > first.total_stop_min


def test_heliox_uses_helium_coefficients_status():
    r = plan_schedule(ScheduleRequest(depth=200, bottom_time_min=20, gas="16/84",
                                      deco_gases=(("oxygen", 30),), **FSW))
    assert r.coefficient_status == "FROM MEMORY"
    assert r.stops and r.final_p_he.max() > 0


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        ({"depth": -10}, "--depth"),
        ({"depth": 0}, "--depth"),
        ({"bottom_time_min": 1}, "--bottom-time"),
        ({"gf_low": 0.9, "gf_high": 0.4}, "--gf"),
        ({"gf_low": 0.0}, "--gf"),
        ({"gf_high": 1.2}, "--gf"),
        ({"gas": "80/40"}, "--gas"),
        ({"model": "zhl99"}, "--model"),
        ({"last_stop": 15}, "--last-stop"),
        ({"ascent_rate": 0}, "--ascent-rate"),
        ({"deco_gases": (("nonsense", 20),)}, "--deco-gas"),
    ],
)
def test_bad_input_names_the_option(kwargs, field):
    base = {"depth": 100, "bottom_time_min": 30, **FSW}
    base.update(kwargs)
    with pytest.raises(InputError) as exc:
        plan_schedule(ScheduleRequest(**base))
    assert exc.value.field == field


def test_json_contract_keys():
    js = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=30,
                                       deco_gases=(("oxygen", 20),), **FSW)).to_json()
    for key in ("schema", "unit", "no_stop_limit_min", "stops", "total_stop_min",
                "total_ascent_min", "oxygen", "conventions"):
        assert key in js
    assert js["schema"] == "supervisor.schedule/1"
    assert set(js["oxygen"]) >= {"cns_percent", "otu"}
    assert all(set(s) >= {"depth", "minutes", "gas"} for s in js["stops"])


def test_first_stop_lasts_at_least_a_minute():
    """The first stop reported equals the stop list's first depth (it is a stop)."""
    for depth, bt in [(100, 30), (130, 25), (60, 80), (190, 30)]:
        r = plan_schedule(ScheduleRequest(depth=depth, bottom_time_min=bt, **FSW))
        assert r.stops[0].depth == r.first_stop_depth and r.stops[0].minutes >= 1


@pytest.mark.parametrize(
    ("gas", "deco", "needle"),
    [("5/95", (), "hypoxic"), ("air", (("oxygen", 200),), "hyperoxic"),
     ("oxygen", (), "hyperoxic")],
)
def test_unsafe_gases_are_flagged(gas, deco, needle):
    """PO2 below 0.16 atm (Navy hypoxia threshold, U.S. Navy Diving Manual Rev 4/5 ch. 15,
    older edition) or above 1.6 atm in the water (top of the NOAA CNS table) is flagged."""
    r = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=20, gas=gas, deco_gases=deco,
                                      **FSW))
    assert any(needle in w for w in r.warnings)
    assert r.to_json()["warnings"] == r.warnings


def test_plain_air_schedule_has_no_warnings():
    assert plan_schedule(ScheduleRequest(depth=100, bottom_time_min=30, **FSW)).warnings == []


@pytest.mark.parametrize(
    ("sd", "field"),
    [
        (SurfaceDecompression(float("nan"), 5, 50), "--surface-decompression"),
        (SurfaceDecompression(40, float("inf"), 50), "--surface-interval"),
        (SurfaceDecompression(40, float("nan"), 50), "--surface-interval"),
        (SurfaceDecompression(40, 1, 50), "--surface-interval"),
        (SurfaceDecompression(40, 5, 0), "--chamber-depth"),
    ],
)
def test_surface_decompression_options_are_validated(sd, field):
    with pytest.raises(InputError) as exc:
        plan_schedule(ScheduleRequest(depth=150, bottom_time_min=40, surface_decompression=sd,
                                      **FSW))
    assert exc.value.field == field


@pytest.mark.parametrize(("kw", "field"), [({"depth": 5000}, "--depth"),
                                           ({"bottom_time_min": 1e8}, "--bottom-time")])
def test_upper_limits(kw, field):
    base = {"depth": 100, "bottom_time_min": 30, **FSW}
    base.update(kw)
    with pytest.raises(InputError) as exc:
        plan_schedule(ScheduleRequest(**base))
    assert exc.value.field == field and "<=" in exc.value.message


def test_chamber_compression_rate():
    """The chamber is compressed at its own rate when given (default: the descent rate)."""
    base = {"depth": 150, "bottom_time_min": 40, **FSW}
    slow = plan_schedule(ScheduleRequest(**base, surface_decompression=SurfaceDecompression(
        40, 5, 50, compression_rate=25.0)))
    comp = [s for s in slow.profile.segments if s.label.endswith("compression")]
    assert comp and comp[0].minutes == pytest.approx(50 / 25.0)
    with pytest.raises(InputError) as exc:
        plan_schedule(ScheduleRequest(**base, surface_decompression=SurfaceDecompression(
            40, 5, 50, compression_rate=0.0)))
    assert exc.value.field == "--chamber-compression-rate"


# ------------------------------------------------------------------- air breaks (issue 8)


def _o2_dive(bt: float) -> ScheduleRequest:
    return ScheduleRequest(depth=130, bottom_time_min=bt, deco_gases=(("oxygen", 30),),
                           o2_air_break=(30, 5), **FSW)


def test_oxygen_stops_are_their_periods_and_the_profile_breathes_the_breaks():
    """A long oxygen stop is its periods (oxygen, air, oxygen), in the JSON and the profile."""
    r = plan_schedule(_o2_dive(150))
    long = [s for s in r.stops if s.gas == "oxygen" and s.minutes > 30]
    assert long, [s.text("fsw") for s in r.stops]
    for s in r.stops:
        assert sum(m for _, m in s.breathing) == pytest.approx(s.minutes)
        js = s.to_dict()
        assert [(p["gas"], p["minutes"]) for p in js["periods"]] == list(s.breathing)
    for s in long:
        gases = [g for g, _ in s.breathing]
        assert "air" in gases and gases[0] in ("oxygen", "air")  # never one oxygen line
        assert all(m <= 30 + 1e-9 for g, m in s.breathing if g == "oxygen")
        assert all(m <= 5 + 1e-9 for g, m in s.breathing if g == "air")
    # the profile's stop segments are the periods: air segments at the oxygen stop depths
    air_at_o2 = sum(sg.minutes for sg in r.profile.segments
                    if sg.label == "stop" and sg.gas.name == "air" and sg.start_depth <= 30)
    assert air_at_o2 == pytest.approx(sum(m for s in r.stops for g, m in s.breathing
                                          if g == "air" and s.gas == "oxygen"))
    assert air_at_o2 >= 5


def test_the_profile_gives_back_the_schedule_tensions():
    """The engine's tissues and the recorded profile breathe the same air breaks."""
    for req in (_o2_dive(150), ScheduleRequest(
            depth=130, bottom_time_min=90, **FSW,
            surface_decompression=SurfaceDecompression(40, 5, 50, second_depth=40))):
        r = plan_schedule(req)
        ev = evaluate_profile(r.profile, "zhl16c", 0.3, 0.85, first_stop_depth=r.first_stop_depth)
        assert ev.final_p_n2 == pytest.approx(r.final_p_n2, rel=1e-9, abs=1e-9)
        assert ev.surfacing_gf == pytest.approx(r.surfacing_gf, abs=1e-9)


def test_air_breaks_lower_the_oxygen_dose():
    """Oxygen counted on the profile leaves the air breaks out (OTU below continuous oxygen)."""
    from supervisor.engine import oxygen
    from supervisor.gas import AIR, OXYGEN
    from supervisor.profile import Profile

    r = plan_schedule(_o2_dive(150))
    solid = Profile([replace(sg, gas=OXYGEN) if sg.label == "stop" and sg.start_depth <= 30
                     and sg.gas == AIR else sg for sg in r.profile.segments], "fsw")
    assert r.oxygen.otu < oxygen.profile_exposure(solid).otu


# ------------------------------------------------------ surface decompression pattern (issue 8)


def _surd(bt: float, depth: float = 130, **kw) -> ScheduleRequest:
    sd = SurfaceDecompression(40, kw.pop("interval", 5), 50, second_depth=kw.pop("second", 40),
                              **kw)
    return ScheduleRequest(depth=depth, bottom_time_min=bt, surface_decompression=sd, **FSW)


def test_surface_decompression_follows_the_chamber_pattern():
    """Half a period at 50 fsw, the rest at 40 fsw, 5-min air breaks after full periods."""
    for bt in (20, 40, 60, 90, 120):
        r = plan_schedule(_surd(bt))
        chamber = [s for s in r.stops if s.place == "chamber"]
        n = int(2 * r.chamber_o2_periods)
        assert n >= 1
        assert (chamber[0].depth, chamber[0].minutes, chamber[0].breathing) == \
            (50, 15, [("oxygen", 15.0)])
        assert len(chamber) == (1 if n == 1 else 2)
        if n > 1:
            later = chamber[1]
            assert later.depth == 40
            o2 = sum(m for g, m in later.breathing if g == "oxygen")
            air = [m for g, m in later.breathing if g == "air"]
            assert o2 == 15 * (n - 1)
            assert air == [5.0] * ((n - 1) // 2)  # one break after every full period
            assert later.minutes == o2 + sum(air)
        js = r.to_json()
        assert js["chamber_o2_periods"] == n / 2
        assert js["surface_decompression"]["chamber_depths"] == [50, 40]


def test_surface_decompression_periods_are_the_least_that_clear():
    """One half-period fewer leaves the model's GF-high ceiling below the surface."""
    from supervisor.engine import buhlmann as bm
    from supervisor.engine.evaluate import evaluate_profile as ev_profile
    from supervisor.periods import chamber_pattern
    from supervisor.profile import Profile

    r = plan_schedule(_surd(90))
    n = int(2 * r.chamber_o2_periods)
    assert n >= 2
    segs = list(r.profile.segments)
    chamber_start = next(i for i, sg in enumerate(segs)
                         if sg.place == "chamber" and sg.label == "stop")
    for k, clears in ((n, True), (n - 1, False)):
        prof = Profile(segs[:chamber_start], "fsw")
        for j, (depth, periods) in enumerate(chamber_pattern(k, 50, 40, 30, 5)):
            if j:
                prof.add(depth, 10 / 30, "oxygen", "chamber", "travel")
            for g, m in periods:
                prof.add(depth, m, g, "chamber", "stop")
        ev = ev_profile(prof, "zhl16c", 0.3, 0.85)
        ceil = bm.ceiling(ev.final_p_n2, ev.final_p_he, bm.load_coefficients("zhl16c"), 0.85)
        assert bool((ceil <= prof.p_surface_bar + 1e-9).all()) is clears, k


def test_longer_dives_need_no_fewer_chamber_periods():
    periods = [plan_schedule(_surd(bt)).chamber_o2_periods for bt in (30, 60, 90, 120, 150)]
    assert periods == sorted(periods) and periods[-1] > periods[0]


def test_second_chamber_depth_is_validated():
    with pytest.raises(InputError) as exc:
        plan_schedule(_surd(60, second=60))
    assert exc.value.field == "--chamber-second-depth"
    one = plan_schedule(_surd(90, second=None))  # every period at the first depth
    assert {s.depth for s in one.stops if s.place == "chamber"} == {50}
