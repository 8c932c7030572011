"""OSHA 29 CFR 1910 Subpart T rules: a passing and a failing plan for every rule.

Source of every limit: 29 CFR 1910 Subpart T, paragraph named in each test and
in the finding's citation; the status (VERIFIED rows fail, others warn) is the
status of the project's regulation notes for that row.
"""

from __future__ import annotations

import _contract as _c
import pytest
from _contract import Case

from supervisor.findings import Finding
from supervisor.rules.regulatory import FAMILY

SCUBA_60 = {"mode": "scuba", "max_depth": 60, "bottom_time_min": 30, "descent_rate": 60}


def _bad(findings: list[Finding]) -> list[Finding]:
    return [f for f in findings if f.severity in ("fail", "warn")]


def _one_bad(findings: list[Finding]) -> Finding:
    got = _bad(findings)
    assert len(got) == 1, [f.message for f in got]
    return got[0]


def _all_pass(findings: list[Finding]) -> None:
    assert findings, "the rule gave no finding"
    assert not _bad(findings), [f.message for f in _bad(findings)]


def _scuba(base, unit="fsw", **kw):
    d = base(unit)
    d["dives"][0].update(SCUBA_60 if unit == "fsw" else dict(SCUBA_60, max_depth=18,
                                                              descent_rate=18))
    d["dives"][0].update(kw)
    return d


def _deep_ssa(base, **kw):
    """Surface-supplied air to 110 fsw with everything 1910.425(c) asks for."""
    d = base()
    d["dives"][0].update(max_depth=110, bottom_time_min=20, stage=True, standby_hose=True)
    d["dives"][0].update(kw)
    return d


def _heliox(base, **kw):
    d = base()
    d["dives"][0].update(mode="surface-supplied-heliox", gas="16/84", max_depth=150,
                         bottom_time_min=20, stage=True, standby_hose=True)
    d["dives"][0].update(kw)
    return d


# ---------------------------------------------------------------------------
# 1910.424 SCUBA


@pytest.mark.parametrize(("unit", "depth", "limit"), [("fsw", 140, 130.0), ("msw", 42, 39.9)])
def test_osha_424_b1_scuba_deeper_than_130_fsw_fails(base, run, unit, depth, limit):
    """29 CFR 1910.424(b)(1): no SCUBA deeper than 130 fsw (VERIFIED); 130 fsw = 39.9 msw."""
    f = _one_bad(run(_scuba(base, unit, max_depth=depth), FAMILY, "osha-424-b1"))
    assert (f.rule, f.severity, f.measured, f.limit, f.unit) == (
        "osha-424-b1", "fail", depth, limit, unit)
    assert f.citation == "29 CFR 1910.424(b)(1)"
    assert f.source_status == "VERIFIED"


@pytest.mark.parametrize(("unit", "depth"), [("fsw", 130), ("msw", 39.9)])
def test_osha_424_b1_scuba_at_130_fsw_passes(base, run, unit, depth):
    """29 CFR 1910.424(b)(1): 130 fsw itself is allowed ("deeper than" means > 130)."""
    _all_pass(run(_scuba(base, unit, max_depth=depth), FAMILY, "osha-424-b1"))


def test_osha_424_b2_scuba_deep_without_ready_chamber_fails(base, run):
    """29 CFR 1910.424(b)(2): SCUBA deeper than 100 fsw needs a ready chamber."""
    d = _scuba(base, max_depth=110)
    d["chamber"]["ready"] = False
    f = _one_bad(run(d, FAMILY, "osha-424-b2"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("osha-424-b2", "fail", 110, 100.0)
    assert f.citation == "29 CFR 1910.424(b)(2)"


def test_osha_424_b2_scuba_decompression_without_chamber_fails(base, run):
    """29 CFR 1910.424(b)(2): SCUBA outside the NDL needs a ready chamber."""
    d = _scuba(base, decompression="in-water", stops=[{"depth": 10, "minutes": 5}])
    d["chamber"].update(ready=False, on_site=False)
    assert _one_bad(run(d, FAMILY, "osha-424-b2")).severity == "fail"


def test_osha_424_b2_ready_chamber_off_site_needs_review(base, run):
    """29 CFR 1910.424(b)(2) does not say where the chamber is: flag it, do not decide."""
    d = _scuba(base, max_depth=110)
    d["chamber"]["on_site"] = False
    f = _one_bad(run(d, FAMILY, "osha-424-b2"))
    assert f.severity == "warn" and not f.verified


def test_osha_424_b2_passes_with_chamber(base, run):
    """29 CFR 1910.424(b)(2)."""
    _all_pass(run(_scuba(base, max_depth=110), FAMILY, "osha-424-b2"))


def test_osha_424_b3_current_over_1_kt_needs_line(base, run):
    """29 CFR 1910.424(b)(3)-(4): line-tended in current over 1 knot."""
    d = _scuba(base, line_tended=False, buddy="Stan Standby", standby_diver=None)
    d["site"]["current_kt"] = 1.5
    f = _one_bad(run(d, FAMILY, "osha-424-b3"))
    assert (f.rule, f.severity, f.measured, f.limit, f.unit) == (
        "osha-424-b3", "fail", 1.5, 1.0, "kt")
    assert f.citation == "29 CFR 1910.424(b)(3)-(4)"
    d["dives"][0]["line_tended"] = True
    _all_pass(run(d, FAMILY, "osha-424-b3"))


def test_osha_424_b3_confined_space_needs_line(base, run):
    """29 CFR 1910.424(b)(4): enclosed or confining spaces."""
    d = _scuba(base, line_tended=False, buddy="Stan Standby")
    d["site"]["confined_space"] = True
    assert _one_bad(run(d, FAMILY, "osha-424-b3")).severity == "fail"


def test_osha_424_c1_no_standby_diver_fails(base, run):
    """29 CFR 1910.424(c)(1): a standby diver while a diver is in the water."""
    d = _scuba(base, standby_diver=None)
    d["team"][2]["role"] = "diver"
    f = _one_bad(run(d, FAMILY, "osha-424-c1"))
    assert (f.rule, f.severity, f.measured) == ("osha-424-c1", "fail", "none")
    assert f.citation == "29 CFR 1910.424(c)(1)-(2)"
    _all_pass(run(_scuba(base), FAMILY, "osha-424-c1"))


def test_osha_424_c1_neither_line_nor_buddy_fails(base, run):
    """29 CFR 1910.424(c)(2): line-tended or an in-water buddy in visual contact."""
    f = _one_bad(run(_scuba(base, line_tended=False), FAMILY, "osha-424-c1"))
    assert f.measured == "none" and f.limit == "line or buddy"
    _all_pass(run(_scuba(base, line_tended=False, buddy="Stan Standby"), FAMILY, "osha-424-c1"))


def test_osha_424_c3_confined_space_entry_diver(base, run):
    """29 CFR 1910.424(c)(3): a diver stationed at the underwater entry point."""
    d = _scuba(base)
    d["site"]["confined_space"] = True
    f = _one_bad(run(d, FAMILY, "osha-424-c3"))
    assert (f.rule, f.severity, f.citation) == ("osha-424-c3", "fail", "29 CFR 1910.424(c)(3)")
    d["dives"][0]["entry_diver"] = "Stan Standby"
    _all_pass(run(d, FAMILY, "osha-424-c3"))


def test_osha_424_c4_scuba_reserve(base, run):
    """29 CFR 1910.424(c)(4)-(5): each diver has a reserve (J-valve or independent cylinder)."""
    d = _scuba(base)
    d["gas_supply"]["bailout"] = d["gas_supply"]["bailout"][1:]
    f = _one_bad(run(d, FAMILY, "osha-424-c4"))
    assert (f.rule, f.severity, f.citation) == ("osha-424-c4", "fail", "29 CFR 1910.424(c)(4)-(5)")
    _all_pass(run(_scuba(base), FAMILY, "osha-424-c4"))


# ---------------------------------------------------------------------------
# 1910.425 surface-supplied air


@pytest.mark.parametrize(("depth", "bt", "limit"), [(200, 40, 190.0), (230, 20, 220.0)])
def test_osha_425_b1_depth_limit_warns(base, run, depth, bt, limit):
    """29 CFR 1910.425(b)(1): 190 fsw, 220 fsw with BT <= 30 min (row FROM MEMORY: warns)."""
    d = base()
    d["dives"][0].update(max_depth=depth, bottom_time_min=bt)
    f = _one_bad(run(d, FAMILY, "osha-425-b1"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("osha-425-b1", "warn", depth, limit)
    assert f.citation == "29 CFR 1910.425(b)(1)" and f.source_status == "FROM MEMORY"


@pytest.mark.parametrize(("depth", "bt"), [(190, 40), (220, 30), (60, 40)])
def test_osha_425_b1_within_limit_passes(base, run, depth, bt):
    """29 CFR 1910.425(b)(1): 190 fsw inclusive; 220 fsw with 30 min."""
    d = base()
    d["dives"][0].update(max_depth=depth, bottom_time_min=bt)
    _all_pass(run(d, FAMILY, "osha-425-b1"))


def test_osha_425_b2_chamber_for_deep_air(base, run):
    """29 CFR 1910.425(b)(2): chamber ready at the site deeper than 100 fsw (FROM MEMORY)."""
    d = _deep_ssa(base)
    d["chamber"]["on_site"] = False
    f = _one_bad(run(d, FAMILY, "osha-425-b2"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("osha-425-b2", "warn", 110, 100.0)
    assert f.citation == "29 CFR 1910.425(b)(2)"
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-425-b2"))


def test_osha_425_b3_bell_over_120_min_in_water(base, run):
    """29 CFR 1910.425(b)(3): a bell when in-water decompression exceeds 120 min."""
    stops = [{"depth": 20, "minutes": 70}, {"depth": 10, "minutes": 60}]
    d = _deep_ssa(base, decompression="in-water", stops=stops)
    f = _one_bad(run(d, FAMILY, "osha-425-b3"))
    assert (f.rule, f.severity, f.measured, f.limit, f.unit) == (
        "osha-425-b3", "warn", 130.0, 120.0, "min")
    assert f.citation == "29 CFR 1910.425(b)(3)"
    d["dives"][0]["bell"] = "open"
    _all_pass(run(d, FAMILY, "osha-425-b3"))


def test_osha_425_c1_tended(base, run):
    """29 CFR 1910.425(c)(1): each surface-supplied air diver continuously tended (SECONDARY)."""
    d = base()
    d["dives"][0]["tender"] = None
    d["team"][3]["role"] = "chamber-operator"
    f = _one_bad(run(d, FAMILY, "osha-425-c1"))
    assert (f.rule, f.severity, f.citation) == ("osha-425-c1", "warn", "29 CFR 1910.425(c)(1)")
    _all_pass(run(base(), FAMILY, "osha-425-c1"))


def test_osha_425_c3_deep_air_needs_tender_standby_reserve(base, run):
    """29 CFR 1910.425(c)(3): separate tender, standby diver, diver-carried reserve."""
    d = _deep_ssa(base, tender=None)
    d["gas_supply"]["bailout"] = []
    got = _bad(run(d, FAMILY, "osha-425-c3"))
    assert [f.severity for f in got] == ["fail", "fail"]
    assert {f.rule for f in got} == {"osha-425-c3"}
    assert got[0].citation == "29 CFR 1910.425(c)(3)"
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-425-c3"))


def test_osha_425_c3_heavy_gear_needs_no_reserve(base, run):
    """29 CFR 1910.425(c)(3): the reserve is not required with heavy gear."""
    d = _deep_ssa(base, heavy_gear=True)
    d["gas_supply"]["bailout"] = []
    _all_pass(run(d, FAMILY, "osha-425-c3"))


def test_osha_425_c4_dive_location_reserve(base, run):
    """29 CFR 1910.425(c)(4): a dive-location reserve deeper than 100 fsw."""
    d = _deep_ssa(base)
    d["gas_supply"]["secondary"] = None
    del d["gas_supply"]["secondary"]
    f = _one_bad(run(d, FAMILY, "osha-425-c4"))
    assert (f.rule, f.severity, f.citation) == ("osha-425-c4", "fail", "29 CFR 1910.425(c)(4)")
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-425-c4"))


def test_osha_425_c5_standby_hose_and_stage(base, run):
    """29 CFR 1910.425(c)(5): extra hose for the standby diver and an in-water stage."""
    f = _one_bad(run(_deep_ssa(base, stage=False), FAMILY, "osha-425-c5"))
    assert (f.rule, f.severity, f.citation) == ("osha-425-c5", "fail", "29 CFR 1910.425(c)(5)")
    assert "stage" in f.message
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-425-c5"))


def test_osha_425_c6_no_direct_ascent_needs_reserve(base, run):
    """29 CFR 1910.425(c)(6): reserve where the layout prevents direct ascent."""
    d = base()
    d["dives"][0]["direct_ascent_possible"] = False
    d["gas_supply"]["bailout"] = []
    f = _one_bad(run(d, FAMILY, "osha-425-c6"))
    assert (f.rule, f.severity, f.citation) == ("osha-425-c6", "fail", "29 CFR 1910.425(c)(6)")
    d = base()
    d["dives"][0]["direct_ascent_possible"] = False
    _all_pass(run(d, FAMILY, "osha-425-c6"))


# ---------------------------------------------------------------------------
# 1910.426 mixed gas


def test_osha_426_b_mixed_gas_needs_chamber_at_site(base, run):
    """29 CFR 1910.426(b): mixed gas only with a chamber ready at the site."""
    d = _heliox(base)
    d["chamber"]["on_site"] = False
    f = _one_bad(run(d, FAMILY, "osha-426-b"))
    assert (f.rule, f.severity, f.citation) == ("osha-426-b", "fail", "29 CFR 1910.426(b)")
    _all_pass(run(_heliox(base), FAMILY, "osha-426-b"))


def test_osha_426_b_nitrox_counts_as_mixed_gas_only_from_memory(base, run):
    """29 CFR 1910.426(b) on nitrox: the mixed-gas definition is held from memory, so warn."""
    d = base()
    d["dives"][0].update(mode="surface-supplied-nitrox", gas="nitrox32")
    d["chamber"]["on_site"] = False
    f = _one_bad(run(d, FAMILY, "osha-426-b"))
    assert (f.severity, f.source_status) == ("warn", "FROM MEMORY")


def test_osha_426_b_bell_deeper_than_220(base, run):
    """29 CFR 1910.426(b): a bell deeper than 220 fsw; a closed bell deeper than 300 fsw."""
    f = _one_bad(run(_heliox(base, max_depth=250), FAMILY, "osha-426-b"))
    assert (f.measured, f.limit, f.severity) == (250, 220.0, "fail")
    got = _bad(run(_heliox(base, max_depth=310, bell="open"), FAMILY, "osha-426-b"))
    assert [(f.measured, f.limit) for f in got] == [(310, 300.0)]
    _all_pass(run(_heliox(base, max_depth=310, bell="closed"), FAMILY, "osha-426-b"))


def test_osha_426_c1_mixed_gas_team(base, run):
    """29 CFR 1910.426(c)(1)-(3): a separate tender per diver."""
    f = _one_bad(run(_heliox(base, tender=None), FAMILY, "osha-426-c1"))
    assert (f.rule, f.severity, f.citation) == ("osha-426-c1", "fail", "29 CFR 1910.426(c)(1)-(3)")
    _all_pass(run(_heliox(base), FAMILY, "osha-426-c1"))


def test_osha_426_c4_mixed_gas_reserve(base, run):
    """29 CFR 1910.426(c)(4)-(5): a dive-location reserve."""
    d = _heliox(base)
    del d["gas_supply"]["secondary"]
    f = _one_bad(run(d, FAMILY, "osha-426-c4"))
    assert (f.rule, f.severity, f.citation) == ("osha-426-c4", "fail", "29 CFR 1910.426(c)(4)-(5)")
    _all_pass(run(_heliox(base), FAMILY, "osha-426-c4"))


def test_osha_426_c6_heavy_gear_stage(base, run):
    """29 CFR 1910.426(c)(6): heavy gear needs a standby hose and an in-water stage."""
    f = _one_bad(run(_heliox(base, heavy_gear=True, stage=False), FAMILY, "osha-426-c6"))
    assert (f.rule, f.severity, f.citation) == ("osha-426-c6", "fail", "29 CFR 1910.426(c)(6)-(7)")
    _all_pass(run(_heliox(base, heavy_gear=True), FAMILY, "osha-426-c6"))


def test_osha_426_c8_mixed_gas_diver_reserve(base, run):
    """29 CFR 1910.426(c)(9): diver-carried reserve deeper than 100 fsw."""
    d = _heliox(base)
    d["gas_supply"]["bailout"] = []
    f = _one_bad(run(d, FAMILY, "osha-426-c8"))
    assert (f.rule, f.severity, f.citation) == ("osha-426-c8", "fail", "29 CFR 1910.426(c)(8)-(9)")
    _all_pass(run(_heliox(base), FAMILY, "osha-426-c8"))


# ---------------------------------------------------------------------------
# 1910.423 chamber


@pytest.mark.parametrize(("unit", "depth", "cap", "limit"),
                         [("fsw", 110, 100, 165.0), ("msw", 34, 50, 50.7)])
def test_osha_423_c1_chamber_capability(base, run, unit, depth, cap, limit):
    """29 CFR 1910.423(c)(1): a 165 fsw (6 ATA) chamber for air deeper than 100 fsw.

    A 50 msw chamber reaches 162.9 fsw, short of 165 fsw (6 ATA = 50.7 msw).
    """
    d = base(unit)
    d["dives"][0].update(max_depth=depth, bottom_time_min=20, stage=True, standby_hose=True)
    d["chamber"]["depth_capability"] = cap
    f = _one_bad(run(d, FAMILY, "osha-423-c1"))
    assert (f.rule, f.severity, f.measured, f.limit, f.unit) == (
        "osha-423-c1", "fail", cap, limit, unit)
    assert f.citation == "29 CFR 1910.423(c)(1)"


def test_osha_423_c1_no_chamber_for_decompression_dive(base, run):
    """29 CFR 1910.423(c)(1): any dive outside the NDL shallower than 300 fsw."""
    d = base()
    d["dives"][0].update(decompression="in-water", stops=[{"depth": 10, "minutes": 5}])
    d["chamber"]["on_site"] = False
    assert _one_bad(run(d, FAMILY, "osha-423-c1")).severity == "fail"
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-423-c1"))


def test_osha_423_c1_capability_not_stated_needs_review(base, run):
    """29 CFR 1910.423(c)(1): an unstated capability cannot pass."""
    d = _deep_ssa(base)
    del d["chamber"]["depth_capability"]
    f = _one_bad(run(d, FAMILY, "osha-423-c1"))
    assert f.severity == "warn" and not f.verified


def test_osha_423_c2_chamber_reaches_dive_depth_beyond_300(base, run):
    """29 CFR 1910.423(c)(2): deeper than 300 fsw, the chamber reaches the dive's depth
    (SECONDARY: warns)."""
    d = _heliox(base, max_depth=310, bell="closed")
    d["chamber"]["depth_capability"] = 225
    f = _one_bad(run(d, FAMILY, "osha-423-c2"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("osha-423-c2", "warn", 225, 310)
    assert f.citation == "29 CFR 1910.423(c)(2)"
    d["chamber"]["depth_capability"] = 330
    _all_pass(run(d, FAMILY, "osha-423-c2"))


def test_osha_423_c3_dual_lock_within_5_minutes(base, run):
    """29 CFR 1910.423(c)(3): dual-lock, multiplace, within 5 min (SECONDARY)."""
    d = _deep_ssa(base)
    d["chamber"].update(locks=1, travel_time_min=12)
    got = _bad(run(d, FAMILY, "osha-423-c3"))
    assert [(f.measured, f.limit, f.unit) for f in got] == [(1.0, 2.0, "locks"),
                                                             (12, 5.0, "min")]
    assert {(f.severity, f.citation) for f in got} == {("warn", "29 CFR 1910.423(c)(3)")}
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-423-c3"))


def test_osha_423_c4_bibs_masks(base, run):
    """29 CFR 1910.423(c)(4): a BIBS mask per occupant."""
    d = _deep_ssa(base)
    d["chamber"]["equipment"]["bibs_masks"] = 1
    f = _one_bad(run(d, FAMILY, "osha-423-c4"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("osha-423-c4", "warn", 1.0, 2.0)
    assert f.citation == "29 CFR 1910.423(c)(4)"
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-423-c4"))


def test_osha_423_c5_chamber_operator(base, run):
    """29 CFR 1910.423(c)(5)-(6): a member able to run the chamber (FROM MEMORY)."""
    d = _deep_ssa(base)
    d["chamber"]["operator_available"] = False
    f = _one_bad(run(d, FAMILY, "osha-423-c5"))
    assert (f.rule, f.severity, f.citation) == ("osha-423-c5", "warn", "29 CFR 1910.423(c)(5)-(6)")
    _all_pass(run(_deep_ssa(base), FAMILY, "osha-423-c5"))


# ---------------------------------------------------------------------------
# 1910.410 team


def test_osha_410_a3_cpr_for_all(base, run):
    """29 CFR 1910.410(a)(3): all members hold CPR and first-aid training."""
    d = base()
    d["team"][3]["first_aid_cpr"] = False
    f = _one_bad(run(d, FAMILY, "osha-410-a3"))
    assert (f.rule, f.severity, f.measured, f.citation) == (
        "osha-410-a3", "fail", "Tess Tender", "29 CFR 1910.410(a)(3)")
    _all_pass(run(base(), FAMILY, "osha-410-a3"))


def test_osha_410_a4_physics_physiology(base, run):
    """29 CFR 1910.410(a)(4): those exposed to or controlling pressure are trained."""
    d = base()
    d["team"][1]["physics_physiology"] = False
    f = _one_bad(run(d, FAMILY, "osha-410-a4"))
    assert (f.rule, f.severity, f.measured, f.citation) == (
        "osha-410-a4", "fail", "Dana Diver", "29 CFR 1910.410(a)(4)")
    d = base()
    d["team"][3]["physics_physiology"] = False  # a tender does not control pressure
    _all_pass(run(d, FAMILY, "osha-410-a4"))


@pytest.mark.parametrize("change", ["not-in-team", "no-role"])
def test_osha_410_c1_person_in_charge(base, run, change):
    """29 CFR 1910.410(c)(1): a designated person in charge at the dive location."""
    d = base()
    if change == "not-in-team":
        d["job"]["supervisor"] = "Someone Else"
    else:
        d["team"][0]["role"] = "tender"
    f = _one_bad(run(d, FAMILY, "osha-410-c1"))
    assert (f.rule, f.severity, f.citation) == ("osha-410-c1", "fail", "29 CFR 1910.410(c)(1)")
    assert f.measured == d["job"]["supervisor"]
    _all_pass(run(base(), FAMILY, "osha-410-c1"))


# ---------------------------------------------------------------------------
# 1910.420-.422 site


@pytest.mark.parametrize(
    ("key", "field", "citation", "severity"),
    [
        ("osha-420-a", "safe_practices_manual", "29 CFR 1910.420(a)", "fail"),
        ("osha-421-c", "resuscitator", "29 CFR 1910.421(c)", "warn"),
        ("osha-421-c", "first_aid_kit", "29 CFR 1910.421(c)", "warn"),
        ("osha-422-c1", "diver_voice_comms", "29 CFR 1910.422(c)(1)", "fail"),
        ("osha-422-c2", "emergency_comms", "29 CFR 1910.422(c)(2)", "fail"),
        ("osha-422-d", "tables_on_site", "29 CFR 1910.422(d)", "fail"),
    ],
)
def test_site_items(base, run, key, field, citation, severity):
    """Items kept at the site, each under its paragraph; SECONDARY rows warn."""
    d = base()
    d["site"][field] = False
    f = _one_bad(run(d, FAMILY, key))
    assert (f.rule, f.severity, f.citation) == (key, severity, citation)
    d["site"].pop(field)
    f = _one_bad(run(d, FAMILY, key))
    assert f.severity == "warn" and not f.verified and "does not state" in f.message
    _all_pass(run(base(), FAMILY, key))


def test_osha_421_b_emergency_call_list(base, run):
    """29 CFR 1910.421(b): chamber (if none on site), hospital, physician, transport, RCC."""
    d = base()
    d["site"]["emergency_contacts"]["hospital"] = ""
    f = _one_bad(run(d, FAMILY, "osha-421-b"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("osha-421-b", "warn", 3, 4)
    assert f.citation == "29 CFR 1910.421(b)"
    d = base()
    d["chamber"]["on_site"] = False
    del d["site"]["emergency_contacts"]["chamber"]
    f = _one_bad(run(d, FAMILY, "osha-421-b"))
    assert (f.measured, f.limit) == (4, 5) and "chamber" in f.message
    _all_pass(run(base(), FAMILY, "osha-421-b"))


def test_osha_421_h_code_flag_a(base, run):
    """29 CFR 1910.421(h): rigid code flag A, lit at night, off a non-vessel surface."""
    d = base()
    d["site"].update(from_vessel=False, marine_traffic=True, code_flag_a=False)
    f = _one_bad(run(d, FAMILY, "osha-421-h"))
    assert (f.rule, f.severity, f.citation) == ("osha-421-h", "fail", "29 CFR 1910.421(h)")
    d["site"].update(code_flag_a=True, night=True, code_flag_a_lit=False)
    assert "night" in _one_bad(run(d, FAMILY, "osha-421-h")).message
    d["site"]["code_flag_a_lit"] = True
    _all_pass(run(d, FAMILY, "osha-421-h"))


def test_osha_421_h_not_needed_from_a_vessel(base, run):
    """29 CFR 1910.421(h) applies to surfaces other than a vessel."""
    assert run(base(), FAMILY, "osha-421-h") == []


def test_jurisdiction_none_needs_review(base, run):
    """No rule set chosen: nothing regulatory could be checked."""
    d = base()
    d["job"]["jurisdiction"] = "none"
    f = _one_bad(run(d, FAMILY, "jurisdiction-none"))
    assert (f.rule, f.severity, f.verified) == ("jurisdiction-none", "warn", False)


def test_every_osha_rule_passes_the_base_plan(base):
    """The base plan is a passing plan for every OSHA rule that applies to it."""
    from supervisor.plan import plan_from_dict
    from supervisor.rules.base import CheckContext

    ctx = CheckContext(plan_from_dict(base()))
    for rule in FAMILY.rules:
        if rule.applies(ctx):
            assert not _bad(rule.run(ctx)), rule.id


def test_rule_ids_match_the_notes_format():
    """Rule ids are the rows' own ids (osha-<section>-<paragraph>) and carry a status."""
    for rule in FAMILY.rules:
        if rule.id.startswith("osha-"):
            assert rule.citation.startswith("29 CFR 1910.")
            assert rule.source_status in {"VERIFIED", "SECONDARY", "FROM MEMORY"}


def test_engine_stops_override_a_declared_no_stop_dive(base):
    """29 CFR 1910.423(c)(1): a dive the model says needs stops is outside the NDL even if the
    plan declares none, so a chamber at the site is required."""
    from supervisor.plan import plan_from_dict
    from supervisor.rules.base import CheckContext

    d = base()
    d["chamber"]["on_site"] = False
    plan = plan_from_dict(d)
    clean = CheckContext(plan)
    assert FAMILY.get("osha-423-c1").run(clean) == []
    ctx = CheckContext(plan, dive_data={"D1": {"model_schedule": {
        "stops": [{"depth": 10, "minutes": 2, "gas": "air", "place": "water"}]}}})
    [f] = FAMILY.get("osha-423-c1").run(ctx)
    assert (f.rule, f.severity) == ("osha-423-c1", "fail")
    assert "outside the no-decompression limits" in f.message


# ---------------------------------------------------------------------------
# a pass is verified only on a confirmed source (project logic)


def _ctx(d):
    from supervisor.plan import plan_from_dict
    from supervisor.rules.base import CheckContext

    return CheckContext(plan_from_dict(d))


def test_a_pass_on_a_from_memory_row_never_conforms(base):
    """29 CFR 1910.425(b)(1) is held FROM MEMORY: its pass is unverified, so needs review."""
    from supervisor.findings import verdict

    [f] = FAMILY.get("osha-425-b1").run(_ctx(base()))
    assert (f.rule, f.severity, f.source_status, f.verified) == (
        "osha-425-b1", "pass", "FROM MEMORY", False)
    assert verdict([f]) == "needs-review"


def test_a_pass_on_a_verified_row_is_verified(base):
    """29 CFR 1910.424(b)(1) is VERIFIED: its pass is verified and alone conforms."""
    from supervisor.findings import verdict

    [f] = FAMILY.get("osha-424-b1").run(_ctx(_scuba(base)))
    assert (f.rule, f.severity, f.source_status, f.verified) == (
        "osha-424-b1", "pass", "VERIFIED", True)
    assert verdict([f]) == "conforms"


def test_stated_items_on_a_secondary_row_are_unverified_passes(base):
    """29 CFR 1910.421(c) is SECONDARY: every stated item passes unverified."""
    got = FAMILY.get("osha-421-c").run(_ctx(base()))
    assert [(f.severity, f.verified) for f in got] == [("pass", False)] * 3


def test_a_status_override_decides_the_pass(base):
    """29 CFR 1910.426(b): VERIFIED for heliox; nitrox as mixed gas only FROM MEMORY."""
    [f] = FAMILY.get("osha-426-b").run(_ctx(_heliox(base)))
    assert (f.severity, f.source_status, f.verified) == ("pass", "VERIFIED", True)
    d = base()
    d["dives"][0].update(mode="surface-supplied-nitrox", gas="nitrox32")
    [f] = FAMILY.get("osha-426-b").run(_ctx(d))
    assert (f.severity, f.source_status, f.verified) == ("pass", "FROM MEMORY", False)


def test_an_unconfirmed_pass_cannot_be_forced_verified():
    """Rule.ok(verified=True) on a SECONDARY rule is still unverified; policy passes verify."""
    from supervisor.rules.base import Family

    fam = Family("t", "t")
    for key, kind, status in (("sec", "reference", "SECONDARY"), ("pol", "policy", None),
                              ("plan", "plan", None), ("ver", "regulatory", "VERIFIED"),
                              ("none", "reference", None)):
        fam.rule(key, title=key, citation="c", kind=kind, source_status=status)(
            lambda ctx, r: [])
    got = {r.id: r.ok("x", verified=True).verified for r in fam.rules}
    assert got == {"sec": False, "pol": True, "plan": True, "ver": True, "none": False}
    assert fam.get("ver").ok("x", verified=False).verified is False
    assert fam.get("ver").ok("x", status="DERIVED").verified is False
    assert fam.get("sec").ok("x", kind="plan").verified is True


def test_base_plan_needs_review_while_rules_rest_on_unconfirmed_rows(base):
    """Every OSHA rule passes the base plan, yet SECONDARY and FROM MEMORY rows keep the
    verdict at needs review (29 CFR 1910.421(b), (c), .425(b)(1), (c)(1) are unconfirmed)."""
    from supervisor.check import run_families
    from supervisor.findings import verdict

    found, _ = run_families(_ctx(base()), [FAMILY])
    assert not _bad(found)
    loose = {f.rule for f in found if not f.verified}
    assert loose == {"osha-421-b", "osha-421-c", "osha-425-b1", "osha-425-c1"}
    assert verdict(found) == "needs-review"


# ---------------------------------------------------------------------------
# the findings contract: a passing and a failing plan for every OSHA rule
# (the source of each limit is the paragraph in the case's citation)


def _b(**dive):
    return _c.dive(_c.base(), **dive)


def _site(**site):
    d = _c.base()
    d["site"].update(site)
    return d


def _chamber(d, **ch):
    d["chamber"].update(ch)
    return d


def _no_bailout(d):
    d["gas_supply"]["bailout"] = []
    return d


def _no_secondary(d):
    del d["gas_supply"]["secondary"]
    return d


def _no_standby(d):
    d["dives"][0]["standby_diver"] = None
    d["team"][2]["role"] = "diver"
    return d


def _deep(**kw):
    return _deep_ssa(_c.base, **kw)


def _hx(**kw):
    return _heliox(_c.base, **kw)


def _sc(**kw):
    return _scuba(_c.base, **kw)


def _cfr(par):
    return f"29 CFR 1910.{par}"


CASES: dict[str, Case] = {
    "jurisdiction-none": Case(
        failing=lambda _: _c.base() | {"job": _c.base()["job"] | {"jurisdiction": "none"}},
        measured="none", citation="plan job.jurisdiction", severity="warn",
        no_pass="with no rule set chosen nothing regulatory was checked; the rule only warns"),
    "osha-424-b1": Case(
        passing=lambda _: _sc(), failing=lambda _: _sc(max_depth=140),
        measured=140, limit=130.0, citation=_cfr("424(b)(1)")),
    "osha-424-b2": Case(
        passing=lambda _: _sc(max_depth=110),
        failing=lambda _: _chamber(_sc(max_depth=110), ready=False),
        measured=110, limit=100.0, citation=_cfr("424(b)(2)")),
    "osha-424-b3": Case(
        passing=lambda _: _site_current(_sc(), 1.5),
        failing=lambda _: _site_current(_sc(line_tended=False, buddy="Stan Standby"), 1.5),
        measured=1.5, limit=1.0, citation=_cfr("424(b)(3)-(4)")),
    "osha-424-c1": Case(
        passing=lambda _: _sc(), failing=lambda _: _no_standby(_sc()),
        measured="none", limit="1 standby diver", citation=_cfr("424(c)(1)-(2)")),
    "osha-424-c3": Case(
        passing=lambda _: _confined(_sc(entry_diver="Stan Standby")),
        failing=lambda _: _confined(_sc()),
        measured="none", limit="a diver at the entry point (dive.entry_diver)",
        citation=_cfr("424(c)(3)")),
    "osha-424-c4": Case(
        passing=lambda _: _sc(), failing=lambda _: _no_bailout(_sc()),
        measured="none", limit="a diver-carried reserve (gas_supply.bailout)",
        citation=_cfr("424(c)(4)-(5)")),
    "osha-425-b1": Case(
        passing=lambda _: _b(), failing=lambda _: _b(max_depth=200),
        measured=200, limit=190.0, citation=_cfr("425(b)(1)"), severity="warn"),
    "osha-425-b2": Case(
        passing=lambda _: _deep(), failing=lambda _: _chamber(_deep(), on_site=False),
        measured=110, limit=100.0, citation=_cfr("425(b)(2)"), severity="warn"),
    "osha-425-b3": Case(
        passing=lambda _: _deep(decompression="in-water", bell="open", stops=_LONG_DECO),
        failing=lambda _: _deep(decompression="in-water", stops=_LONG_DECO),
        measured=130.0, limit=120.0, citation=_cfr("425(b)(3)"), severity="warn"),
    "osha-425-c1": Case(
        passing=lambda _: _b(), failing=lambda _: _no_tender(_b(tender=None)),
        measured="none", limit="a tender other than the diver", citation=_cfr("425(c)(1)"),
        severity="warn"),
    "osha-425-c2": Case(
        passing=lambda _: _confined(_b(entry_diver="Stan Standby")),
        failing=lambda _: _confined(_b()),
        measured="none", limit="a diver at the entry point (dive.entry_diver)",
        citation=_cfr("425(c)(2)"), severity="warn"),
    "osha-425-c3": Case(
        passing=lambda _: _deep(), failing=lambda _: _deep(tender=None),
        measured="none", limit="a separate tender (dive.tender)", citation=_cfr("425(c)(3)")),
    "osha-425-c4": Case(
        passing=lambda _: _deep(), failing=lambda _: _no_secondary(_deep()),
        measured="none", limit="a dive-location reserve (gas_supply.secondary)",
        citation=_cfr("425(c)(4)")),
    "osha-425-c5": Case(
        passing=lambda _: _deep(), failing=lambda _: _deep(stage=False),
        measured="no", limit="yes", citation=_cfr("425(c)(5)")),
    "osha-425-c6": Case(
        passing=lambda _: _b(direct_ascent_possible=False),
        failing=lambda _: _no_bailout(_b(direct_ascent_possible=False)),
        measured="none", limit="a diver-carried reserve (gas_supply.bailout)",
        citation=_cfr("425(c)(6)")),
    "osha-426-b": Case(
        passing=lambda _: _hx(), failing=lambda _: _chamber(_hx(), on_site=False),
        measured="not at the site", limit="a chamber ready at the site",
        citation=_cfr("426(b)")),
    "osha-426-c1": Case(
        passing=lambda _: _hx(), failing=lambda _: _hx(tender=None),
        measured="none", limit="a separate tender (dive.tender)", citation=_cfr("426(c)(1)-(3)")),
    "osha-426-c4": Case(
        passing=lambda _: _hx(), failing=lambda _: _no_secondary(_hx()),
        measured="none", limit="a dive-location reserve (gas_supply.secondary)",
        citation=_cfr("426(c)(4)-(5)")),
    "osha-426-c6": Case(
        passing=lambda _: _hx(heavy_gear=True), failing=lambda _: _hx(heavy_gear=True, stage=False),
        measured="no", limit="yes", citation=_cfr("426(c)(6)-(7)")),
    "osha-426-c8": Case(
        passing=lambda _: _hx(), failing=lambda _: _no_bailout(_hx()),
        measured="none", limit="a diver-carried reserve (gas_supply.bailout)",
        citation=_cfr("426(c)(8)-(9)")),
    "osha-423-c1": Case(
        passing=lambda _: _deep(), failing=lambda _: _chamber(_deep(), on_site=False),
        measured="none", limit=165.0, citation=_cfr("423(c)(1)")),
    "osha-423-c2": Case(
        passing=lambda _: _chamber(_hx(max_depth=310, bell="closed"), depth_capability=330),
        failing=lambda _: _chamber(_hx(max_depth=310, bell="closed"), depth_capability=225),
        measured=225, limit=310, citation=_cfr("423(c)(2)"), severity="warn"),
    "osha-423-c3": Case(
        passing=lambda _: _deep(), failing=lambda _: _chamber(_deep(), multiplace=False),
        measured="no", limit="yes", citation=_cfr("423(c)(3)"), severity="warn"),
    "osha-423-c4": Case(
        passing=lambda _: _deep(), failing=lambda _: _equipment(_deep(), voice_comms=False),
        measured="no", limit="yes", citation=_cfr("423(c)(4)"), severity="warn"),
    "osha-423-c5": Case(
        passing=lambda _: _deep(), failing=lambda _: _chamber(_deep(), operator_available=None),
        measured="not stated", limit="yes", citation=_cfr("423(c)(5)-(6)"), severity="warn"),
    "osha-410-a3": Case(
        passing=lambda _: _c.base(), failing=lambda _: _member(_c.base(), 3, first_aid_cpr=False),
        measured="Tess Tender", limit="all members", citation=_cfr("410(a)(3)")),
    "osha-410-a4": Case(
        passing=lambda _: _c.base(),
        failing=lambda _: _member(_c.base(), 1, physics_physiology=False),
        measured="Dana Diver", limit="trained", citation=_cfr("410(a)(4)")),
    "osha-410-c1": Case(
        passing=lambda _: _c.base(), failing=lambda _: _member(_c.base(), 0, role="tender"),
        measured="Sam Supervisor", limit="a team member with the supervisor role",
        citation=_cfr("410(c)(1)")),
    "osha-420-a": Case(
        passing=lambda _: _c.base(), failing=lambda _: _site(safe_practices_manual=False),
        measured="no", limit="yes", citation=_cfr("420(a)")),
    "osha-421-b": Case(
        passing=lambda _: _c.base(), failing=lambda _: _contacts(_c.base(), physician=""),
        measured=3, limit=4, citation=_cfr("421(b)"), severity="warn"),
    "osha-421-c": Case(
        passing=lambda _: _c.base(), failing=lambda _: _site(first_aid_handbook=False),
        measured="no", limit="yes", citation=_cfr("421(c)"), severity="warn"),
    "osha-421-h": Case(
        passing=lambda _: _site(from_vessel=False, code_flag_a=True),
        failing=lambda _: _site(from_vessel=False, code_flag_a=False),
        measured="no", limit="yes", citation=_cfr("421(h)")),
    "osha-422-c1": Case(
        passing=lambda _: _c.base(), failing=lambda _: _site(diver_voice_comms=False),
        measured="no", limit="yes", citation=_cfr("422(c)(1)")),
    "osha-422-c2": Case(
        passing=lambda _: _c.base(), failing=lambda _: _unstated(_c.base(), "emergency_comms"),
        measured="not stated", limit="yes", citation=_cfr("422(c)(2)"), severity="warn"),
    "osha-422-d": Case(
        passing=lambda _: _c.base(), failing=lambda _: _site(tables_on_site=False),
        measured="no", limit="yes", citation=_cfr("422(d)")),
}

_LONG_DECO = [{"depth": 20, "minutes": 70}, {"depth": 10, "minutes": 60}]


def _site_current(d, kt):
    d["site"]["current_kt"] = kt
    return d


def _confined(d):
    d["site"]["confined_space"] = True
    return d


def _no_tender(d):
    d["team"][3]["role"] = "chamber-operator"
    return d


def _equipment(d, **eq):
    d["chamber"]["equipment"].update(eq)
    return d


def _member(d, i, **kw):
    d["team"][i].update(kw)
    return d


def _contacts(d, **kw):
    d["site"]["emergency_contacts"].update(kw)
    return d


def _unstated(d, field):
    del d["site"][field]
    return d


@pytest.mark.parametrize("key", sorted(CASES))
def test_contract(key, tmp_path):
    """Each OSHA rule passes its passing plan and reports id, measured, limit and citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)


#: The rule families whose findings this project's contract tests cover here (the gas and
#: gas-supply families are tested on their own).
CONTRACT_FAMILIES = {"regulatory", "regulatory-uscg", "procedure", "team", "tables",
                     "model-margin", "oxygen", "repetitive-altitude", "contingency"}


@pytest.mark.parametrize("name", ["demo-job.toml", "demo-job-msw.toml",
                                  "nonconforming-job.toml"])
def test_every_warning_on_the_example_jobs_meets_the_contract(name):
    """Across the bundled fictional jobs, every fail and warning of these families names its
    rule, measured value, limit or reason, and citation."""
    from pathlib import Path

    from supervisor.check import run_check

    path = Path(__file__).resolve().parents[2] / "examples" / name
    r = run_check(path)
    seen = {f["family"] for f in r["findings"]}
    assert CONTRACT_FAMILIES & seen
    for js in r["findings"]:
        if js["family"] in CONTRACT_FAMILIES and js["severity"] in _c.BAD:
            _c.reported(Finding(**{k: js[k] for k in Finding.__dataclass_fields__
                                   if k in js and k != "extra"}))


def test_osha_425_c2_confined_air_dive_needs_an_entry_diver(base, run):
    """29 CFR 1910.425(c)(2) (FROM MEMORY row): a diver at the entry point; only warns."""
    d = _confined(base())
    f = _one_bad(run(d, FAMILY, "osha-425-c2"))
    assert (f.severity, f.citation, f.source_status) == ("warn", "29 CFR 1910.425(c)(2)",
                                                         "FROM MEMORY")
    assert run(base(), FAMILY, "osha-425-c2") == []  # not a confined space: nothing to say


def test_osha_426_c9_no_space_for_a_reserve(base, run):
    """29 CFR 1910.426(c)(9) (full text, VERIFIED): the diver-carried reserve is not required
    where physical space does not permit one."""
    d = _heliox(base)
    d["gas_supply"]["bailout"] = []
    f = _one_bad(run(d, FAMILY, "osha-426-c8"))
    assert f.severity == "fail" and "no_space_for_reserve" in f.message
    d["dives"][0]["no_space_for_reserve"] = True
    got = run(d, FAMILY, "osha-426-c8")
    _all_pass(got)
    assert "physical space does not permit" in got[0].message


def test_osha_425_c6_no_space_for_a_reserve(base, run):
    """29 CFR 1910.425(c)(6) (directive text, VERIFIED): no direct ascent needs a reserve,
    except with heavy gear or where space does not permit."""
    d = _c.dive(base(), direct_ascent_possible=False)
    d["gas_supply"]["bailout"] = []
    assert _one_bad(run(d, FAMILY, "osha-425-c6")).severity == "fail"
    d["dives"][0]["no_space_for_reserve"] = True
    _all_pass(run(d, FAMILY, "osha-425-c6"))
