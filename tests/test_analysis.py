"""Per-dive analysis: planned profile, tissue carry-over, margin, contingencies, figures.

Most checks here are project logic (wiring and internal consistency).  Checks
against outside values name their source beside the check.
"""

from __future__ import annotations

import math
import tomllib
from pathlib import Path

import numpy as np
import pytest

from supervisor import analysis as an
from supervisor import constants as C
from supervisor.engine import buhlmann as bm
from supervisor.engine.kinetics import inspired_pressure, rate_constant
from supervisor.engine.schedule import SURFACE_INTERVAL, evaluate_profile, plan_schedule
from supervisor.errors import InputError
from supervisor.plan import plan_from_dict
from supervisor.profile import Profile, Segment
from supervisor.rules.base import CheckContext
from supervisor.units import altitude_pressure

DATA = Path(__file__).resolve().parent / "data" / "plans_engine"


def _data() -> dict:
    return tomllib.loads((DATA / "base.toml").read_text(encoding="utf-8"))


def _plan(data: dict | None = None, **dive):
    d = data or _data()
    d["dives"][0].update(dive)
    return plan_from_dict(d)


def _second_dive(data: dict, **kw) -> dict:
    extra = dict(data["dives"][0])
    extra.update(id="D2", max_depth=40, bottom_time_min=30, descent_rate=40)
    extra.update(kw)
    data["dives"].append(extra)
    return data


# --------------------------------------------------------------------------- profile


def test_planned_profile_no_stop_segments():
    plan = _plan()
    prof = an.planned_profile(plan, plan.dives[0])
    labels = [s.label for s in prof.segments]
    assert labels == ["descent", "bottom", "ascent"]
    desc, bottom, up = prof.segments
    assert desc.minutes == pytest.approx(60 / 60)  # 60 fsw at 60 fsw/min
    assert desc.minutes + bottom.minutes == pytest.approx(40)  # bottom time from leaving surface
    assert up.minutes == pytest.approx(60 / 30)
    assert prof.p_surface_bar == pytest.approx(C.P_ATM_BAR)


def test_planned_profile_stop_gas_switch_on_arrival():
    plan = _plan(max_depth=100, bottom_time_min=30, decompression="in-water-oxygen",
                 stops=[{"depth": 30, "minutes": 2}, {"depth": 20, "minutes": 8, "gas": "oxygen"}])
    prof = an.planned_profile(plan, plan.dives[0])
    seg = [(s.label, s.start_depth, s.end_depth, s.gas.name) for s in prof.segments]
    assert seg[2] == ("travel", 100, 30, "air")
    assert seg[3] == ("stop", 30, 30, "air")
    assert seg[4] == ("travel", 30, 20, "air")  # travel on the gas breathed before the stop
    assert seg[5] == ("stop", 20, 20, "oxygen")
    assert seg[6] == ("ascent", 20, 0, "oxygen")


def test_planned_profile_surface_decompression_labels():
    plan = _plan(max_depth=100, bottom_time_min=40, decompression="surface-oxygen",
                 surface_transfer_min=2,
                 stops=[{"depth": 40, "minutes": 2},
                        {"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    prof = an.planned_profile(plan, plan.dives[0])
    si = [s for s in prof.segments if s.label.startswith(SURFACE_INTERVAL)]
    assert [s.place for s in si] == ["water", "surface", "chamber"]
    assert si[1].minutes == pytest.approx(2)
    assert si[2].minutes == pytest.approx(50 / 100)  # compression at 100 fsw/min (plan constant)
    assert prof.segments[-1].place == "chamber" and prof.segments[-1].end_depth == 0


def test_planned_profile_deck_time_assumed_when_missing():
    notes: list[str] = []
    plan = _plan(max_depth=100, bottom_time_min=40, decompression="surface-oxygen",
                 stops=[{"depth": 40, "minutes": 2},
                        {"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    prof = an.planned_profile(plan, plan.dives[0], notes)
    si = sum(s.minutes for s in prof.segments if s.label.startswith(SURFACE_INTERVAL))
    assert si == pytest.approx(an.SURD_INTERVAL_MIN)
    assert notes and "not stated" in notes[0]


def _too_short(plan):
    """The plan with its dive's bottom time below the descent (a search variant; a
    plan file like it does not validate)."""
    dive = plan.dives[0].model_copy(update={"max_depth": 120, "bottom_time_min": 1})
    return plan.model_copy(update={"dives": [dive]})


def test_planned_profile_rejects_bottom_time_shorter_than_descent():
    plan = _too_short(_plan())
    with pytest.raises(InputError, match="shorter than the descent"):
        an.planned_profile(plan, plan.dives[0])


def test_bad_dive_becomes_errors_not_a_traceback():
    plan = _too_short(_plan())
    a = an.analyse_plan(plan).dives["D1"]
    assert "profile" in a.errors and a.evaluation is None and a.supply is None
    j = a.to_json()
    assert j["model_margin"]["ceiling_broken"] is None
    assert j["chart"] == {"t_min": [], "depth": [], "ceiling_depth": []}


# --------------------------------------------------------------------------- request


def test_schedule_request_follows_policy_and_stops():
    plan = _plan(max_depth=100, bottom_time_min=30, decompression="in-water-oxygen",
                 stops=[{"depth": 30, "minutes": 2}, {"depth": 20, "minutes": 8, "gas": "oxygen"}])
    req = an.schedule_request(plan, plan.dives[0])
    assert (req.gf_low, req.gf_high, req.model) == (0.30, 0.85, "zhl16c")
    assert req.deco_gases == (("oxygen", 20.0),)
    assert req.o2_air_break == an.O2_AIR_BREAK
    assert req.surface_decompression is None


def test_schedule_request_default_oxygen_depth_msw():
    d = _data()
    d["unit"] = "msw"
    d["chamber"]["depth_capability"] = 50
    d["dives"][0].update(max_depth=30, bottom_time_min=30, descent_rate=18, ascent_rate=9,
                         decompression="in-water-oxygen", stops=[{"depth": 6, "minutes": 5}])
    plan = plan_from_dict(d)
    req = an.schedule_request(plan, plan.dives[0])
    # 30 fsw = 9.09 msw, rounded down to the 3 msw stop step
    assert req.deco_gases == (("oxygen", 9.0),)


def _surd_plan(**dive):
    kw = dict(max_depth=100, bottom_time_min=40, descent_rate=60, decompression="surface-oxygen",
              stops=[{"depth": 40, "minutes": 2},
                     {"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    kw.update(dive)
    return _plan(**kw)


def _deck_min(segments) -> float:
    return sum(s.minutes for s in segments if s.place == "surface")


@pytest.mark.parametrize("deck", [0, 2, None])
def test_surface_decompression_request_keeps_the_planned_times(deck):
    """The engine compresses the chamber at the plan's compression rate (100 fsw/min), not
    the dive's descent rate: the interval and the deck time are exactly the plan's."""
    plan = _surd_plan(surface_transfer_min=deck)
    req = an.schedule_request(plan, plan.dives[0])
    up, planned_deck, down, _ = plan.surface_decompression_times(plan.dives[0])
    sd = req.surface_decompression
    assert sd.compression_rate == pytest.approx(plan.chamber_compression_rate)
    assert sd.surface_interval_min == pytest.approx(up + planned_deck + down, abs=1e-6)
    res = plan_schedule(req)  # a deck time of 0 min is a working schedule
    assert _deck_min(res.profile.segments) == pytest.approx(planned_deck, abs=1e-6)


def test_surface_decompression_request_independent_of_descent_rate():
    plan = _surd_plan(descent_rate=150, bottom_time_min=30, surface_transfer_min=0)
    req = an.schedule_request(plan, plan.dives[0])
    up, deck, down, _ = plan.surface_decompression_times(plan.dives[0])
    assert req.surface_decompression.surface_interval_min == pytest.approx(up + deck + down,
                                                                           abs=1e-6)
    res = plan_schedule(req)
    assert _deck_min(res.profile.segments) == pytest.approx(0.0, abs=1e-6)


def test_surface_transfer_zero_analyses_without_errors():
    a = an.analyse_plan(_surd_plan(surface_transfer_min=0)).dives["D1"]
    assert a.model_schedule is not None and "model_schedule" not in a.errors
    assert all(c is not None and c.error is None for c in a.contingencies.values())


def test_plan_copying_the_model_schedule_is_covered():
    plan = _plan(bottom_time_min=60)
    req = an.schedule_request(plan, plan.dives[0])
    res = plan_schedule(req)
    stops = [{"depth": s.depth, "minutes": s.minutes} for s in res.stops]
    assert stops  # 60 fsw / 60 min is beyond the model's no-stop limit
    plan = _plan(bottom_time_min=60, decompression="in-water", stops=stops)
    a = an.analyse_plan(plan).dives["D1"]
    assert not a.evaluation.ceiling_broken
    assert a.margin.minutes is not None and a.margin.minutes >= 0


# --------------------------------------------------------------------------- margin


@pytest.mark.parametrize(
    ("limit", "bt", "expect"),
    [(47.0, 40.0, 7), (40.0, 40.0, 0), (33.0, 40.0, -7), (500.0, 40.0, an.MARGIN_CAP_MIN)],
)
def test_margin_search_against_a_threshold(limit, bt, expect):
    calls = []

    def covered(t):
        calls.append(t)
        return t <= limit + 1e-9

    m = an.margin_minutes(covered, bt, 1.0, covered(bt))
    assert m.minutes == expect
    assert m.capped == (expect == an.MARGIN_CAP_MIN)
    assert len(calls) < 25  # doubling then bisection, not a scan


def test_margin_uncoverable():
    m = an.margin_minutes(lambda t: False, 40.0, 1.0, False)
    assert m.uncoverable and m.minutes is None


def test_margin_of_no_stop_dive_is_the_model_no_stop_limit():
    plan = _plan()
    a = an.analyse_plan(plan).dives["D1"]
    ndl = a.model_schedule.no_stop_limit_min
    assert a.margin.minutes == ndl - 40


# --------------------------------------------------------------------------- repetitive


def test_tissues_carried_across_the_surface_interval():
    """Carrying tensions across the interval equals one profile holding both dives."""
    data = _second_dive(_data(), surface_interval_min=90, previous_dive="D1")
    plan = plan_from_dict(data)
    pa = an.analyse_plan(plan)
    a1, a2 = pa.dives["D1"], pa.dives["D2"]
    assert a2.previous == "D1" and a2.repetitive
    assert a2.start_min == pytest.approx(a1.end_min + 90)
    both = Profile(
        [*a1.profile.segments, Segment(0, 0, 90, a1.profile.segments[0].gas, "surface", "si"),
         *a2.profile.segments],
        "fsw",
    )
    ev = evaluate_profile(both, first_stop_depth=0.0)
    np.testing.assert_allclose(a2.evaluation.final_p_n2, ev.final_p_n2, rtol=1e-12)
    fresh = an.analyse_plan(_plan()).dives["D1"]
    assert a2.start_loading_percent > fresh.start_loading_percent


def test_missing_interval_assumes_none():
    data = _second_dive(_data())
    pa = an.analyse_plan(plan_from_dict(data))
    a2 = pa.dives["D2"]
    assert a2.interval_assumed and a2.surface_interval_min == 0
    assert a2.start_min == pytest.approx(pa.dives["D1"].end_min)


def test_longer_interval_less_loading():
    loads = []
    for si in (30, 240):
        data = _second_dive(_data(), surface_interval_min=si, previous_dive="D1")
        loads.append(an.analyse_plan(plan_from_dict(data)).dives["D2"].start_loading_percent)
    assert loads[0] > loads[1]


def test_daily_exposure_spans_the_divers_dives():
    data = _second_dive(_data(), surface_interval_min=60, previous_dive="D1")
    pa = an.analyse_plan(plan_from_dict(data))
    day = pa.divers["Dana Diver"]
    assert day.dive_ids == ["D1", "D2"]
    total = pa.dives["D1"].exposure.otu + pa.dives["D2"].exposure.otu
    assert day.daily.max_otu_24h == pytest.approx(total, rel=1e-9)


# --------------------------------------------------------------------------- altitude


def test_time_to_altitude_vs_haldane_closed_form():
    """One loaded compartment off-gassing at the surface: t = ln((P0-Pa)/(P*-Pa)) / k.

    P* is the tension whose GF-high ceiling equals the target pressure, from the
    Bühlmann/Baker ceiling P_tol = (P - GF a) / (GF/b + 1 - GF) (Baker 1998) solved
    for P; the function works on a whole-minute grid, so it must give ceil(t).
    """
    c = bm.load_coefficients("zhl16c")
    ps, target, gf = C.P_ATM_BAR, float(altitude_pressure(an.CABIN_ALTITUDE_M)), 0.85
    pa = float(inspired_pressure(ps, 0.79))
    p_n2 = np.full(c.n, pa)
    i = 8
    p_n2[i] = 2.2
    p_star = target * (gf / c.n2_b[i] + 1 - gf) + gf * c.n2_a[i]
    t = math.log((2.2 - pa) / (p_star - pa)) / float(rate_constant(c.n2_half[i]))
    got = an.time_to_altitude(p_n2, np.zeros(c.n), "zhl16c", gf, ps, target)
    assert got == math.ceil(t)


def test_time_to_altitude_limits():
    c = bm.load_coefficients("zhl16c")
    sat = np.full(c.n, float(inspired_pressure(C.P_ATM_BAR, 0.79)))
    z = np.zeros(c.n)
    assert an.time_to_altitude(sat, z, "zhl16c", 0.85, C.P_ATM_BAR, 0.7527) == 0
    # saturated tissues never tolerate 0.2 bar: no answer within the search
    assert an.time_to_altitude(sat, z, "zhl16c", 0.85, C.P_ATM_BAR, 0.2, max_min=60) is None


def test_altitude_site_uses_surface_pressure_and_sled():
    d = _data()
    d["site"]["altitude_m"] = 1524  # 5,000 ft
    d["policy"]["reference_table"] = str(DATA / "fictional-decompression.toml")
    d["dives"][0].update(max_depth=50, bottom_time_min=40, decompression="in-water",
                         stops=[{"depth": 10, "minutes": 5}])
    plan = plan_from_dict(d)
    a = an.analyse_plan(plan).dives["D1"]
    # U.S. Standard Atmosphere: 1524 m -> 843.1 hPa (gas-and-pressure notes, VERIFIED formula)
    assert a.profile.p_surface_bar == pytest.approx(0.8431, abs=2e-4)
    # Navy altitude correction D * P_sea / P_alt (Rev 4 Change A 9-12, OLDER-EDITION)
    assert a.table_depth == pytest.approx(50 * C.P_ATM_BAR / plan.p_surface_bar)
    # 60.1 fsw enters the table at the next deeper depth, 70 fsw; the same cell (50 fsw at
    # 5,000 ft -> 70) is in a dive-shop copy of a Navy SLED table (SECONDARY)
    assert a.reference.depth == 70


# --------------------------------------------------------------------------- figures


@pytest.mark.parametrize(("unit", "depth", "rate"), [("fsw", 60, 60), ("msw", 18, 18)])
def test_po2_by_phase_dalton(unit, depth, rate):
    d = _data()
    d["unit"] = unit
    d["chamber"]["depth_capability"] = 50 if unit == "msw" else 165
    d["dives"][0].update(max_depth=depth, descent_rate=rate, ascent_rate=rate / 2)
    a = an.analyse_plan(plan_from_dict(d)).dives["D1"]
    per = C.BAR_PER_FSW if unit == "fsw" else C.BAR_PER_MSW
    # Dalton's law on the dry gas: PO2 = FO2 * P_amb
    assert a.po2_max["bottom"] == pytest.approx(0.21 * (C.P_ATM_BAR + depth * per))
    assert a.po2_min["bottom"] == pytest.approx(0.21 * C.P_ATM_BAR)
    assert a.po2_max["chamber"] is None


def test_supply_need_matches_square_dive_arithmetic():
    from supervisor import supply as sp

    plan = _plan()
    a = an.analyse_plan(plan).dives["D1"]
    ref = sp.dive_gas_need(60, 40, an.RMV_LPM, "fsw", 60, 30)
    assert a.supply.diver_need_l == pytest.approx(ref.total)
    assert a.supply.people == 2 and a.supply.need_l == pytest.approx(2 * ref.total)
    assert a.supply.peak_flow_lpm == pytest.approx(2 * an.RMV_LPM * (1 + 60 / 33))


def test_supply_bailout_wiring():
    from supervisor import supply as sp

    a = an.analyse_plan(_plan()).dives["D1"]
    want = sp.emergency_gas_requirement(60, an.EGS_BOTTOM_MIN, 7 / an.L_PER_FT3, 30, 0)
    assert a.supply.egs.required_psig == pytest.approx(want.required_psig)
    assert a.supply.bailout_psig == pytest.approx(200 / C.BAR_PER_PSI)


def test_contingencies_without_table():
    plan = _plan(max_depth=100, bottom_time_min=30, decompression="in-water-oxygen",
                 stops=[{"depth": 30, "minutes": 2}, {"depth": 20, "minutes": 12, "gas": "oxygen"},
                        {"depth": 10, "minutes": 10, "gas": "oxygen"}])
    a = an.analyse_plan(plan).dives["D1"]
    c = a.contingencies
    assert c["overrun"].bottom_time_min == 30 + an.OVERRUN_INCREMENT_MIN
    assert c["deeper"].depth == 110  # one 10 fsw policy stop step deeper
    assert c["oxygen_failure"].schedule.request.deco_gases == ()
    assert c["overrun"].schedule.total_stop_min >= a.model_schedule.total_stop_min
    assert c["oxygen_failure"].schedule.total_stop_min > a.model_schedule.total_stop_min


def test_contingencies_from_table_steps():
    d = _data()
    d["policy"]["reference_table"] = str(DATA / "fictional-decompression.toml")
    d["dives"][0].update(bottom_time_min=50, decompression="in-water",
                         stops=[{"depth": 10, "minutes": 5}])
    a = an.analyse_plan(plan_from_dict(d)).dives["D1"]
    assert a.contingencies["overrun"].bottom_time_min == 60  # next longer row at 60 fsw
    assert a.contingencies["deeper"].depth == 70  # next deeper row
    assert a.contingencies["oxygen_failure"] is None
    assert a.contingencies["overrun"].reference.row == 2


def test_to_json_sections_and_provider():
    plan = _plan()
    ctx = CheckContext(plan)
    assert an.provide(ctx) == []
    entry = ctx.dive_data["D1"]
    for key in ("reference_schedule", "model_schedule", "model_margin", "oxygen", "gas_supply",
                "contingency", "chart", "compartments"):
        assert key in entry, key
    assert len(entry["compartments"]["labels"]) == 16
    assert len(entry["chart"]["t_min"]) == len(entry["chart"]["ceiling_depth"]) > 2
    assert {r["name"] for r in ctx.shared["references"]} >= {"noaa-cns-limits"}
    assert an.for_context(ctx) is ctx.shared["analysis"]


# --------------------------------------------------------------------------- end to end


def test_demo_job_end_to_end():
    """The check JSON of the bundled demo job has every engine-backed section filled."""
    from supervisor.check import ENGINE_SECTIONS, run_check

    demo = Path(__file__).resolve().parents[1] / "examples" / "demo-job.toml"
    r = run_check(demo)
    assert r["verdict"] != "conforms"  # model coefficients FROM MEMORY: at best needs review
    fams = {"tables", "model-margin", "oxygen", "gas", "gas-supply", "repetitive-altitude",
            "contingency"}
    mine = [f for f in r["findings"] if f["family"] in fams]
    assert {f["family"] for f in mine} == fams
    assert all(f["citation"] for f in mine)
    assert not any(f["rule"].endswith("-not-checked") for f in r["findings"])
    for dive in r["dives"]:
        for key in ENGINE_SECTIONS:
            assert dive[key] is not None, (dive["id"], key)
        assert dive["model_schedule"]["error"] is None
        assert isinstance(dive["model_margin"]["margin_min"], int)
        assert dive["model_margin"]["ceiling_broken"] is False
        chart = dive["chart"]
        assert len(chart["t_min"]) == len(chart["depth"]) == len(chart["ceiling_depth"]) > 2
        assert max(chart["depth"]) == dive["max_depth"]
        assert len(dive["compartments"]["labels"]) == 16
        assert dive["oxygen"]["po2_by_phase"]["bottom"] > 0
        assert dive["gas_supply"]["need_l"] > 0
        assert dive["contingency"]["overrun"]["bottom_time_min"] > dive["bottom_time_min"]
        assert dive["contingency"]["deeper"]["depth"] > dive["max_depth"]
    by_id = {d["id"]: d for d in r["dives"]}
    assert by_id["D2"]["contingency"]["oxygen_failure"]["stops"]
    assert by_id["D3"]["repetitive"]["previous_dive"] == "D1"
    assert by_id["D1"]["contingency"]["oxygen_failure"] is None
    names = {ref["name"] for ref in r["references"]}
    assert {"zhl16c", "noaa-cns-limits", "pulmonary-daily-limits"} <= names


# --------------------------------------------------------------------------- chamber gas


def test_chamber_gas_of_a_surface_decompression_dive():
    d = _data()
    d["chamber"].update(lock_volumes_l=[4000, 2000], ventilation_lpm=100, treatment_depth=60,
                        treatment_min=120,
                        air_supply={"water_volume_l": 1000, "pressure_bar": 200})
    plan = _plan(d, max_depth=100, bottom_time_min=40, decompression="surface-oxygen",
                 surface_transfer_min=2,
                 stops=[{"depth": 40, "minutes": 2},
                        {"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    g = an.analyse_plan(plan).dives["D1"].supply.chamber
    # Boyle's law, 33 fsw = 1 atm: the inner lock to 50 fsw; ventilation at the mean
    # pressure of each chamber segment: compression 0.5 min (0 -> 50 fsw at 100 fsw/min),
    # 30 min at 50 fsw, 50/30 min back to the surface
    assert g.parts["surface decompression: pressurising"] == pytest.approx(4000 * 50 / 33)
    vent = 100 * (0.5 * (1 + 25 / 33) + 30 * (1 + 50 / 33) + 50 / 30 * (1 + 25 / 33))
    assert g.parts["surface decompression: ventilation"] == pytest.approx(vent)
    assert g.parts["treatment: pressurising"] == pytest.approx(6000 * 60 / 33)
    assert g.parts["treatment: ventilation"] == pytest.approx(100 * 120 * (1 + 60 / 33))
    assert g.need_l == pytest.approx(sum(g.parts.values()))
    assert g.status is None and g.p_min_bar == pytest.approx(60 * C.BAR_PER_FSW)
    j = an.analyse_plan(plan).dives["D1"].to_json()["chamber_gas"]
    assert j["need_l"] == round(g.need_l) and j["missing"] == []


def test_chamber_gas_missing_fields_listed():
    plan = _plan(bottom_time_min=50, decompression="in-water",
                 stops=[{"depth": 10, "minutes": 10}])
    g = an.analyse_plan(plan).dives["D1"].supply.chamber
    assert g.need_l is None
    assert g.missing == ["chamber.air_supply (water_volume_l, pressure_bar)",
                         "chamber.lock_volumes_l"]


def test_surface_interval_peak_is_reported_for_surface_decompression():
    """The surface interval lies outside the ceiling check; its peak supersaturation is
    reported in model_margin (above 100 % of the M-value gradient is normal there)."""
    a = an.analyse_plan(_surd_plan()).dives["D1"]
    mm = a.to_json()["model_margin"]
    assert mm["surface_interval_max_gf_percent"] > 100
