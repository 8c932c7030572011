"""The plan file: loading, validation messages, JSON Schema and the proposed profile.

Project logic only; the one outside figure (33 fsw = 1 atm, 10 msw = 1 bar) is the
unit convention of supervisor.units.
"""

from __future__ import annotations

import copy
import json
import tomllib
from pathlib import Path
from typing import Any

import pytest

from supervisor.plan import (
    Plan,
    PlanValidationError,
    load_plan,
    plan_from_dict,
    plan_json_schema,
    proposed_profile,
)

PLANS = Path(__file__).resolve().parent / "data" / "plans"


def base(unit: str = "fsw") -> dict[str, Any]:
    """A fresh copy of the passing test plan."""
    return tomllib.loads((PLANS / f"base-{unit}.toml").read_text(encoding="utf-8"))


def problems(data: Any) -> list[tuple[str, str]]:
    with pytest.raises(PlanValidationError) as info:
        plan_from_dict(data)
    return info.value.problems


def fields(data: Any) -> list[str]:
    return [f for f, _ in problems(data)]


# ---------------------------------------------------------------------------
# loading


@pytest.mark.parametrize("unit", ["fsw", "msw"])
def test_base_plans_load(unit):
    p = load_plan(PLANS / f"base-{unit}.toml")
    assert isinstance(p, Plan)
    assert p.unit == unit
    assert p.dives[0].diver == "Dana Diver"
    assert p.member("Stan Standby").has("standby-diver")


def test_policy_defaults_follow_the_unit():
    f = plan_from_dict(base("fsw")).resolved_policy
    m = plan_from_dict(base("msw")).resolved_policy
    assert (f.stop_step, f.last_stop, f.ascent_rate, f.descent_rate_max) == (10, 10, 30, 75)
    assert (m.stop_step, m.last_stop, m.ascent_rate, m.descent_rate_max) == (3, 3, 9, 23)


def test_last_stop_defaults_to_stated_stop_step():
    d = base()
    d["policy"]["stop_step"] = 20
    assert plan_from_dict(d).resolved_policy.last_stop == 20


def test_depth_conversion_round_trip():
    p = plan_from_dict(base("msw"))
    # 10 msw = 1 bar, 33 fsw = 1.01325 bar: 10 msw = 32.5684 fsw
    assert p.to_fsw(10.0) == pytest.approx(10 * 33 / 10.1325, rel=1e-12)
    assert p.from_fsw(p.to_fsw(17.3)) == pytest.approx(17.3)


def test_role_may_be_a_list():
    p = plan_from_dict(base())
    assert p.member("Stan Standby").role == ["standby-diver", "diver"]
    assert [m.name for m in p.members_with("diver")] == ["Dana Diver", "Stan Standby"]


def test_date_may_be_text():
    d = base()
    d["job"]["date"] = "2026-06-01"
    assert plan_from_dict(d).job.date.isoformat() == "2026-06-01"


# ---------------------------------------------------------------------------
# one line per problem, with the field path


def test_negative_stop_depth_message_matches_the_documented_form():
    d = base()
    d["dives"].append(copy.deepcopy(d["dives"][0]))
    d["dives"][1]["id"] = "D2"
    d["dives"][1]["stops"] = [{"depth": -10, "minutes": 3}]
    assert problems(d) == [("dives[1].stops[0].depth", "got -10; expected a depth >= 0 fsw")]


def test_msw_messages_name_msw():
    d = base("msw")
    d["dives"][0]["stops"] = [{"depth": -3, "minutes": 3}]
    assert problems(d) == [("dives[0].stops[0].depth", "got -3; expected a depth >= 0 msw")]


def test_missing_field():
    d = base()
    del d["dives"][0]["max_depth"]
    [(path, msg)] = problems(d)
    assert path == "dives[0].max_depth"
    assert msg.startswith("missing; expected a number [fsw]")


def test_missing_section():
    d = base()
    del d["chamber"]
    assert problems(d) == [("chamber", "missing; expected a table (Recompression chamber)")]


def test_wrong_type_number():
    d = base()
    d["dives"][0]["bottom_time_min"] = "forty"
    assert problems(d) == [("dives[0].bottom_time_min", "got 'forty'; expected a number [min]")]


def test_wrong_type_bool():
    d = base()
    d["site"]["night"] = "no"
    assert problems(d) == [("site.night", "got 'no'; expected true or false")]


def test_wrong_type_integer():
    d = base()
    d["chamber"]["locks"] = 2.0
    assert problems(d) == [("chamber.locks", "got 2.0; expected a whole number [count]")]


def test_unknown_field_is_a_typo():
    d = base()
    d["site"]["curent_kt"] = 2
    [(path, msg)] = problems(d)
    assert path == "site.curent_kt"
    assert msg.startswith("unknown field; check the spelling")
    assert "current_kt" in msg


def test_unknown_choice():
    d = base()
    d["dives"][0]["mode"] = "hookah"
    [(path, msg)] = problems(d)
    assert path == "dives[0].mode"
    assert msg.startswith("got 'hookah'; expected ")
    assert "'scuba'" in msg


def test_impossible_values():
    d = base()
    d["dives"][0]["bottom_time_min"] = 0
    d["site"]["current_kt"] = -1
    d["policy"]["gf_high"] = 120
    d["chamber"]["travel_time_min"] = -2
    got = dict(problems(d))
    assert got["dives[0].bottom_time_min"] == "got 0; expected > 0 [min]"
    assert got["site.current_kt"] == "got -1; expected >= 0 [kt]"
    assert got["policy.gf_high"] == "got 120; expected <= 100 [%]"
    assert got["chamber.travel_time_min"] == "got -2; expected >= 0 [min]"


def test_not_finite():
    d = base()
    d["site"]["altitude_m"] = float("nan")
    assert problems(d) == [("site.altitude_m", "got nan; expected a finite number [m]")]


def test_depth_beyond_any_plan():
    d = base()
    d["dives"][0]["max_depth"] = 5000
    assert problems(d) == [("dives[0].max_depth",
                            "got 5000; expected a depth from 0 to 2000 fsw")]


def test_zero_max_depth():
    d = base()
    d["dives"][0]["max_depth"] = 0
    assert problems(d) == [("dives[0].max_depth", "got 0; expected a depth > 0 fsw")]


def test_unknown_gas():
    d = base()
    d["dives"][0]["gas"] = "trimix"
    [(path, msg)] = problems(d)
    assert path == "dives[0].gas"
    assert msg.startswith("unknown gas 'trimix'; expected air, oxygen")


def test_fractions_over_100_percent():
    d = base()
    d["dives"][0]["stops"] = [{"depth": 20, "minutes": 5, "gas": "60/50"}]
    [(path, msg)] = problems(d)
    assert path == "dives[0].stops[0].gas"
    assert "over 100 %" in msg


def test_gas_does_not_match_mode():
    d = base()
    d["dives"][0]["gas"] = "nitrox32"
    assert problems(d) == [
        ("dives[0].gas", "got 'nitrox32'; expected air for mode surface-supplied-air")
    ]


def test_heliox_mode_needs_helium():
    d = base()
    d["dives"][0]["mode"] = "surface-supplied-heliox"
    assert fields(d) == ["dives[0].gas"]


def test_stops_out_of_order():
    d = base()
    d["dives"][0]["stops"] = [{"depth": 10, "minutes": 3}, {"depth": 20, "minutes": 3}]
    assert problems(d) == [
        ("dives[0].stops[1].depth", "got 20 after a water stop at 10 fsw; expected stops "
         "deepest first"),
    ]


def test_water_stop_after_chamber_stop():
    d = base()
    d["dives"][0]["stops"] = [
        {"depth": 40, "minutes": 15, "gas": "oxygen", "place": "chamber"},
        {"depth": 20, "minutes": 3},
    ]
    assert fields(d) == ["dives[0].stops[1].place"]


def test_chamber_stops_may_be_deeper_than_the_last_water_stop():
    d = base()
    d["dives"][0]["stops"] = [
        {"depth": 40, "minutes": 2},
        {"depth": 50, "minutes": 15, "gas": "oxygen", "place": "chamber"},
        {"depth": 40, "minutes": 15, "gas": "oxygen", "place": "chamber"},
    ]
    assert plan_from_dict(d).dives[0].chamber_stops[0].depth == 50


def test_water_stop_not_shallower_than_bottom():
    d = base()
    d["dives"][0]["stops"] = [{"depth": 60, "minutes": 3}]
    assert fields(d) == ["dives[0].stops[0].depth"]


def test_several_problems_one_line_each():
    d = base()
    d["dives"][0]["gas"] = "trimix"
    d["site"]["night"] = 3
    d["policy"]["gf_low"] = -5
    assert fields(d) == ["site.night", "policy.gf_low", "dives[0].gas"]


def test_cross_references():
    d = base()
    d["dives"][0]["standby_diver"] = "Nobody"
    d["dives"].append(copy.deepcopy(d["dives"][0]))
    d["dives"][1]["standby_diver"] = "Stan Standby"
    d["dives"][1]["previous_dive"] = "D9"
    d["dives"][1]["surface_interval_min"] = 60
    d["gas_supply"]["bailout"][0]["diver"] = "Ghost"
    got = dict(problems(d))
    assert got["dives[0].standby_diver"] == "got 'Nobody'; expected the name of a team member"
    assert got["dives[1].id"] == "got 'D1' twice; expected unique ids"
    assert got["dives[1].previous_dive"] == "got 'D9'; expected the id of an earlier dive"
    assert got["gas_supply.bailout[0].diver"].startswith("got 'Ghost'")


def test_diver_cannot_stand_by_for_themself():
    d = base()
    d["dives"][0]["standby_diver"] = "Dana Diver"
    assert fields(d) == ["dives[0].standby_diver"]


def test_previous_dive_needs_surface_interval():
    d = base()
    d["dives"].append(copy.deepcopy(d["dives"][0]))
    d["dives"][1]["id"] = "D2"
    d["dives"][1]["previous_dive"] = "D1"
    assert fields(d) == ["dives[1].surface_interval_min"]


def test_policy_order_checks():
    d = base()
    d["policy"].update(gf_low=90, gf_high=80, density_warn_g_per_l=7, density_fail_g_per_l=6)
    assert fields(d) == ["policy.gf_low", "policy.density_warn_g_per_l"]


def test_bottom_time_shorter_than_the_descent():
    d = base()
    del d["dives"][0]["descent_rate"]  # the policy's fastest descent: 75 fsw/min by default
    d["dives"][0].update(max_depth=110, bottom_time_min=0.5)
    # 110 fsw at 75 fsw/min = 1.4667 min, stated rounded up
    assert problems(d) == [(
        "dives[0].bottom_time_min",
        "got 0.5 min; expected at least the descent time 1.47 min (110 fsw at 75 fsw/min): "
        "the bottom time counts from leaving the surface",
    )]


def test_bottom_time_equal_to_the_descent_is_accepted():
    d = base()
    d["dives"][0].update(max_depth=60, descent_rate=60, bottom_time_min=1)
    assert plan_from_dict(d).dives[0].bottom_time_min == 1


def test_bottom_time_check_uses_the_msw_descent():
    d = base("msw")
    d["dives"][0].update(max_depth=36, descent_rate=18, bottom_time_min=1.5)
    [(path, msg)] = problems(d)
    assert path == "dives[0].bottom_time_min"
    assert "2.00 min (36 msw at 18 msw/min)" in msg


def test_reference_table_bundled_name_or_file(tmp_path):
    from supervisor.plan import bundled_reference_tables

    tables = bundled_reference_tables()
    assert tables["zhl16c-gf30-85-air-fsw"] == "decompression"
    assert tables["usn-rev7-air-ndl"] == "no-stop"
    d = base()
    d["policy"]["reference_table"] = "usn-rev7-air-ndl"
    assert plan_from_dict(d).policy.reference_table == "usn-rev7-air-ndl"
    f = tmp_path / "own-table.toml"
    f.write_text("schema = 'supervisor-table/1'\n", encoding="utf-8")
    d["policy"]["reference_table"] = str(f)
    assert plan_from_dict(d).policy.reference_table == str(f)  # its content is checked by check


def test_unknown_reference_table_names_the_bundled_tables():
    d = base()
    d["policy"]["reference_table"] = "usn-rev7-air-decompression"
    [(path, msg)] = problems(d)
    assert path == "policy.reference_table"
    assert msg == (
        "got 'usn-rev7-air-decompression': no bundled table of that name; expected a bundled "
        "table name (usn-rev7-air-ndl, zhl16c-gf30-85-air-fsw, zhl16c-gf30-85-air-msw) or the "
        "path of a table file (.toml), relative to the plan's folder"
    )


def test_reference_table_of_the_wrong_kind_or_missing_file(tmp_path):
    d = base()
    d["policy"]["reference_table"] = "noaa-cns-limits"
    [(path, msg)] = problems(d)
    assert path == "policy.reference_table"
    assert msg.startswith("got 'noaa-cns-limits', a bundled limits table; expected a no-stop or "
                          "decompression table: usn-rev7-air-ndl, ")
    d["policy"]["reference_table"] = str(tmp_path / "missing.toml")
    [(path, msg)] = problems(d)
    assert path == "policy.reference_table" and ": no such file; expected a bundled" in msg


def test_compressor_needs_delivery():
    d = base()
    d["gas_supply"]["secondary"]["kind"] = "compressor"
    assert fields(d) == ["gas_supply.secondary.delivery_lpm"]


def test_delivery_pressure_only_on_a_compressor():
    d = base()
    d["gas_supply"]["secondary"]["delivery_pressure_bar"] = 12  # an hp-bank
    [(path, msg)] = problems(d)
    assert path == "gas_supply.secondary.delivery_pressure_bar"
    assert msg.startswith("got 12 on a hp-bank source; expected it only on a compressor")


def test_compressor_pressure_bar_is_its_delivery_pressure():
    d = base()
    d["gas_supply"]["secondary"] = {"kind": "compressor", "delivery_lpm": 500, "pressure_bar": 12}
    assert plan_from_dict(d).gas_supply.secondary.supply_pressure_bar == 12
    d["gas_supply"]["secondary"]["delivery_pressure_bar"] = 13
    [(path, msg)] = problems(d)
    assert path == "gas_supply.secondary.pressure_bar" and "give one of the two" in msg
    d["gas_supply"]["secondary"]["pressure_bar"] = 13  # the same figure twice is accepted
    assert plan_from_dict(d).gas_supply.secondary.supply_pressure_bar == 13


def test_chamber_sizing_fields():
    d = base()
    d["chamber"].update(locks=2, lock_volumes_l=[4000, 2000], treatment_depth=60,
                        treatment_min=285, treatment_occupants=2, bibs_overboard_dump=True,
                        ventilation_lpm=300, treatment_gas_l=150000,
                        air_supply={"water_volume_l": 800, "pressure_bar": 300})
    c = plan_from_dict(d).chamber
    assert c.lock_volumes_l == [4000, 2000] and c.air_supply.gas == "air"


def test_chamber_sizing_field_problems():
    d = base()
    d["chamber"].update(locks=2, depth_capability=165, lock_volumes_l=[4000],
                        treatment_depth=200, treatment_min=30,
                        air_supply={"water_volume_l": 800})
    got = dict(problems(d))
    assert got["chamber.treatment_min"] == "got 30; expected >= 60 [min]"
    assert got["chamber.air_supply.pressure_bar"].startswith("missing; expected a number")
    d["chamber"].update(treatment_min=120, air_supply={"water_volume_l": 800, "pressure_bar": 200})
    assert dict(problems(d)) == {
        "chamber.lock_volumes_l": "got 1 volume(s); expected one per lock (locks = 2)",
        "chamber.treatment_depth": "got 200; expected a depth <= the chamber's "
                                   "depth_capability (165 fsw)",
    }
    d["chamber"].update(lock_volumes_l=[4000, -1], treatment_depth=60)
    assert fields(d) == ["chamber.lock_volumes_l[1]"]


def test_duplicate_team_name():
    d = base()
    d["team"].append(copy.deepcopy(d["team"][0]))
    assert fields(d) == ["team[5].name"]


@pytest.mark.parametrize(
    ("schema", "expected"),
    [(None, 'missing; expected "supervisor-plan/1" on the first line'),
     ("supervisor-plan/2", 'got \'supervisor-plan/2\'; expected "supervisor-plan/1"')],
)
def test_schema_line(schema, expected):
    d = base()
    if schema is None:
        del d["schema"]
    else:
        d["schema"] = schema
    assert problems(d) == [("schema", expected)]


def test_not_toml(tmp_path):
    p = tmp_path / "bad.toml"
    p.write_text('schema = "supervisor-plan/1"\nunit = \n', encoding="utf-8")
    with pytest.raises(PlanValidationError) as info:
        load_plan(p)
    [(path, msg)] = info.value.problems
    assert path == "plan"
    assert "not valid TOML" in msg


def test_not_utf8(tmp_path):
    p = tmp_path / "bad.toml"
    p.write_bytes(b"schema = \"\xff\"\n")
    with pytest.raises(PlanValidationError, match="not UTF-8"):
        load_plan(p)


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(PlanValidationError, match="no such file"):
        load_plan(tmp_path / "none.toml")
    with pytest.raises(PlanValidationError, match="is a folder"):
        load_plan(tmp_path)


def test_error_lines_format():
    exc = PlanValidationError([("a.b", "got 1; expected 2"), ("c", "missing")])
    assert exc.lines() == ["error: a.b: got 1; expected 2", "error: c: missing"]
    assert isinstance(exc, ValueError)


# ---------------------------------------------------------------------------
# JSON Schema


def test_json_schema_forbids_extra_fields_and_lists_sections():
    s = plan_json_schema()
    json.dumps(s)
    assert s["title"] == "supervisor-plan/1"
    assert s["additionalProperties"] is False
    for key in ("schema", "unit", "job", "site", "chamber", "team", "gas_supply", "dives"):
        assert key in s["properties"]
        assert key in s["required"]
    dive = s["$defs"]["Dive"]
    assert dive["additionalProperties"] is False
    assert dive["properties"]["mode"]["enum"] == [
        "scuba", "surface-supplied-air", "surface-supplied-nitrox", "surface-supplied-heliox",
    ]


# ---------------------------------------------------------------------------
# proposed profile


def test_profile_of_a_no_stop_dive():
    p = plan_from_dict(base())
    prof = proposed_profile(p, p.dives[0])
    # 60 fsw at 60 fsw/min = 1 min descent, bottom time 40 min from leaving the surface,
    # 60 fsw at 30 fsw/min = 2 min ascent
    assert [s.label for s in prof.segments] == ["descent", "bottom", "ascent"]
    assert prof.duration_min == pytest.approx(42.0)
    assert prof.max_depth == 60


def test_profile_of_a_surface_decompression_dive():
    d = base()
    d["dives"][0].update(
        max_depth=100, bottom_time_min=40, decompression="surface-oxygen",
        surface_transfer_min=3.5,
        stops=[{"depth": 40, "minutes": 2},
               {"depth": 50, "minutes": 15, "gas": "oxygen", "place": "chamber"},
               {"depth": 40, "minutes": 15, "gas": "oxygen", "place": "chamber"}],
    )
    p = plan_from_dict(d)
    prof = proposed_profile(p, p.dives[0])
    places = [s.place for s in prof.segments]
    assert places.count("chamber") == 5  # compression, stop, travel, stop, ascent
    assert "surface" in places
    # descent 100/60, bottom to 40 min, ascent 60/30 = 2, stop 2, surfacing 40/30,
    # deck 3.5, compression 50/100, stop 15, travel 10/30, stop 15, ascent 40/30
    expected = 40 + 2 + 2 + 40 / 30 + 3.5 + 0.5 + 15 + 10 / 30 + 15 + 40 / 30
    assert prof.duration_min == pytest.approx(expected)
    assert prof.segments[-1].gas.name == "air"


def _surd(**dive):
    d = base()
    d["dives"][0].update(
        max_depth=100, bottom_time_min=40, descent_rate=60, decompression="surface-oxygen",
        stops=[{"depth": 40, "minutes": 2},
               {"depth": 50, "minutes": 15, "gas": "oxygen", "place": "chamber"}],
    )
    d["dives"][0].update(dive)
    return plan_from_dict(d)


def test_surface_decompression_times():
    p = _surd(surface_transfer_min=0)
    # ascent 40 fsw at 30 fsw/min, no time on deck, compression 50 fsw at 100 fsw/min
    assert p.chamber_compression_rate == 100
    assert p.surface_decompression_times(p.dives[0]) == pytest.approx((40 / 30, 0, 0.5, True))
    prof = proposed_profile(p, p.dives[0])
    assert "surface" not in [s.place for s in prof.segments]  # no deck segment of 0 min
    assert prof.duration_min == pytest.approx(40 + 2 + 2 + 40 / 30 + 0.5 + 15 + 50 / 30)


def test_surface_decompression_deck_time_assumed_when_not_stated():
    p = _surd()
    up, deck, down, stated = p.surface_decompression_times(p.dives[0])
    assert not stated and up + deck + down == pytest.approx(5.0)  # the plan's 5-min interval
    notes: list[str] = []
    proposed_profile(p, p.dives[0], notes)
    assert notes and "time on deck not stated" in notes[0]


def test_chamber_compression_rate_in_msw():
    p = plan_from_dict(base("msw"))
    # 100 fsw in msw: 100 x (1.01325 / 33) bar / 0.1 bar per msw
    assert p.chamber_compression_rate == pytest.approx(100 * 1.01325 / 33 / 0.1)
