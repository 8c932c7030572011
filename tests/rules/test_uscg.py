"""USCG 46 CFR 197 Subpart B rules: a passing and a failing plan for every rule.

Source of every limit: 46 CFR 197, section named in each test and in the
finding's citation (rows VERIFIED in the project's regulation notes).
"""

from __future__ import annotations

import _contract as _c
import pytest
from _contract import Case

from supervisor.findings import Finding
from supervisor.rules import regulatory
from supervisor.rules.uscg import FAMILY


def _bad(findings: list[Finding]) -> list[Finding]:
    return [f for f in findings if f.severity in ("fail", "warn")]


def _all_pass(findings: list[Finding]) -> None:
    assert findings, "the rule gave no finding"
    assert not _bad(findings), [f.message for f in _bad(findings)]


@pytest.fixture
def uscg(base):
    def make(unit: str = "fsw", **dive):
        d = base(unit)
        d["job"]["jurisdiction"] = "uscg-46-197-b"
        d["dives"][0].update(dive)
        return d

    return make


def test_uscg_210_supervisor_designated(uscg, run):
    """46 CFR 197.210: a diving supervisor designated for the operation."""
    d = uscg()
    d["job"]["supervisor"] = "Tess Tender"
    [f] = _bad(run(d, FAMILY, "uscg-210"))
    assert (f.rule, f.severity, f.measured, f.citation) == (
        "uscg-210", "fail", "Tess Tender", "46 CFR 197.210")
    _all_pass(run(uscg(), FAMILY, "uscg-210"))


def test_uscg_430_scuba_outside_ndl_barred(uscg, run):
    """46 CFR 197.430: SCUBA outside the no-decompression limits is not allowed at all."""
    d = uscg(mode="scuba", decompression="in-water", stops=[{"depth": 10, "minutes": 5}])
    [f] = _bad(run(d, FAMILY, "uscg-430"))
    assert (f.rule, f.severity, f.measured, f.citation) == (
        "uscg-430", "fail", "in-water", "46 CFR 197.430")


@pytest.mark.parametrize(("unit", "depth", "limit"), [("fsw", 135, 130.0), ("msw", 41, 39.9)])
def test_uscg_430_scuba_depth(uscg, run, unit, depth, limit):
    """46 CFR 197.430: SCUBA no deeper than 130 fsw."""
    d = uscg(unit, mode="scuba", max_depth=depth, descent_rate=depth / 2)
    [f] = _bad(run(d, FAMILY, "uscg-430"))
    assert (f.measured, f.limit, f.unit, f.severity) == (depth, limit, unit, "fail")
    _all_pass(run(uscg(mode="scuba"), FAMILY, "uscg-430"))


def test_uscg_430_line_in_current(uscg, run):
    """46 CFR 197.430: line-tended in currents over 1 knot."""
    d = uscg(mode="scuba", line_tended=False, buddy="Stan Standby", standby_diver=None)
    d["site"]["current_kt"] = 1.2
    [f] = _bad(run(d, FAMILY, "uscg-430"))
    assert (f.measured, f.limit, f.unit) == (1.2, 1.0, "kt")


@pytest.mark.parametrize(("depth", "bt"), [(190, 40), (225, 20)])
def test_uscg_432_air_depth_limit_is_strict(uscg, run, depth, bt):
    """46 CFR 197.432: air shallower than 190 fsw ("less than"), 220 fsw with BT <= 30 min."""
    d = uscg(max_depth=depth, bottom_time_min=bt, stage=True)
    got = [f for f in _bad(run(d, FAMILY, "uscg-432")) if f.measured == depth]
    assert len(got) == 1
    assert (got[0].rule, got[0].severity, got[0].citation) == ("uscg-432", "fail",
                                                               "46 CFR 197.432")


def test_osha_and_uscg_differ_at_190_fsw(uscg, run):
    """190 fsw with 40 min: within 29 CFR 1910.425(b)(1) (inclusive), not 46 CFR 197.432."""
    d = uscg(max_depth=190, bottom_time_min=40, stage=True)
    osha = dict(d, job=dict(d["job"], jurisdiction="osha-1910-t"))
    assert not _bad(run(osha, regulatory.FAMILY, "osha-425-b1"))
    assert any(f.measured == 190 for f in _bad(run(d, FAMILY, "uscg-432")))


def test_uscg_432_deeper_than_130_needs_extras(uscg, run):
    """46 CFR 197.432: deeper than 130 fsw: secondary supply, chamber, stage or bell, tender,
    standby, reserve."""
    d = uscg(max_depth=140, bottom_time_min=20, tender=None)
    del d["gas_supply"]["secondary"]
    got = _bad(run(d, FAMILY, "uscg-432"))
    msgs = " | ".join(f.message for f in got)
    assert "secondary" in msgs and "stage" in msgs and "tender" in msgs
    assert all(f.severity == "fail" for f in got)
    _all_pass(run(uscg(max_depth=140, bottom_time_min=20, stage=True), FAMILY, "uscg-432"))


def test_uscg_432_not_triggered_at_130(uscg, run):
    """46 CFR 197.432: the extra-equipment trigger is deeper than 130 fsw (OSHA: 100)."""
    _all_pass(run(uscg(max_depth=120, bottom_time_min=20), FAMILY, "uscg-432"))


def test_uscg_434_mixed_gas(uscg, run):
    """46 CFR 197.434: chamber or closed bell ready; stage unless a bell; secondary gas."""
    d = uscg(mode="surface-supplied-heliox", gas="16/84", max_depth=150, bottom_time_min=20)
    d["chamber"]["on_site"] = False
    got = _bad(run(d, FAMILY, "uscg-434"))
    assert {f.rule for f in got} == {"uscg-434"}
    assert len(got) == 2  # no chamber / closed bell; no stage or bell
    d = uscg(mode="surface-supplied-heliox", gas="16/84", max_depth=150, bottom_time_min=20,
             stage=True)
    _all_pass(run(d, FAMILY, "uscg-434"))


def test_uscg_346e_reserve(uscg, run):
    """46 CFR 197.346(e)-(g): a diver-carried reserve outside the NDL."""
    d = uscg(decompression="in-water", stops=[{"depth": 10, "minutes": 5}])
    d["gas_supply"]["bailout"] = []
    [f] = _bad(run(d, FAMILY, "uscg-346e"))
    assert (f.rule, f.severity, f.citation) == ("uscg-346e", "fail", "46 CFR 197.346(e)-(g)")
    _all_pass(run(uscg(decompression="in-water", stops=[{"depth": 10, "minutes": 5}]),
                  FAMILY, "uscg-346e"))


def test_uscg_332_chamber_6_ata(uscg, run):
    """46 CFR 197.332: the chamber reaches 6 ATA (165 fsw) for dives to 300 fsw."""
    d = uscg(max_depth=140, bottom_time_min=20, stage=True)
    d["chamber"]["depth_capability"] = 150
    [f] = _bad(run(d, FAMILY, "uscg-332"))
    assert (f.rule, f.severity, f.measured, f.limit, f.citation) == (
        "uscg-332", "fail", 150, 165.0, "46 CFR 197.332")
    _all_pass(run(uscg(max_depth=140, bottom_time_min=20), FAMILY, "uscg-332"))


def test_uscg_314_first_aid_and_treatment(uscg, run):
    """46 CFR 197.314: first aid; deeper than 130 fsw also treatment tables and gas."""
    d = uscg(max_depth=140, bottom_time_min=20)
    d["chamber"]["equipment"]["treatment_gas"] = False
    [f] = _bad(run(d, FAMILY, "uscg-314"))
    assert (f.rule, f.severity, f.citation) == ("uscg-314", "fail", "46 CFR 197.314")
    _all_pass(run(uscg(max_depth=140, bottom_time_min=20), FAMILY, "uscg-314"))


def test_uscg_410_non_diving_chamber_operator(uscg, run):
    """46 CFR 197.410: a non-diving member trained to operate the chamber deeper than 130."""
    d = uscg(max_depth=140, bottom_time_min=20)
    d["team"][4]["role"] = "tender"
    [f] = _bad(run(d, FAMILY, "uscg-410"))
    assert (f.rule, f.severity, f.citation) == ("uscg-410", "fail", "46 CFR 197.410")
    _all_pass(run(uscg(max_depth=140, bottom_time_min=20), FAMILY, "uscg-410"))


def test_uscg_rules_do_not_run_under_osha(base):
    """The USCG rules apply only to the uscg-46-197-b jurisdiction."""
    from supervisor.plan import plan_from_dict
    from supervisor.rules.base import CheckContext

    ctx = CheckContext(plan_from_dict(base()))
    assert not any(r.applies(ctx) for r in FAMILY.rules)


# ---------------------------------------------------------------------------
# the findings contract: a passing and a failing plan for every USCG rule
# (the source of each limit is the section in the case's citation)


def _u(**dive):
    d = _c.dive(_c.base(), **dive)
    d["job"]["jurisdiction"] = "uscg-46-197-b"
    return d


def _set(d, section, **kw):
    d[section].update(kw)
    return d


def _hx(**kw):
    return _u(mode="surface-supplied-heliox", gas="16/84", max_depth=150, bottom_time_min=20,
              stage=True, **kw)


_DECO = dict(decompression="in-water", stops=[{"depth": 10, "minutes": 5}])
_DEEP = dict(max_depth=140, bottom_time_min=20, stage=True)


def _no_bailout(d):
    d["gas_supply"]["bailout"] = []
    return d


def _no_secondary(d):
    del d["gas_supply"]["secondary"]
    return d


CASES: dict[str, Case] = {
    "uscg-210": Case(
        passing=lambda _: _u(), failing=lambda _: _set(_u(), "job", supervisor="Tess Tender"),
        measured="Tess Tender", limit="a team member with the supervisor role",
        citation="46 CFR 197.210"),
    "uscg-430": Case(
        passing=lambda _: _u(mode="scuba"), failing=lambda _: _u(mode="scuba", **_DECO),
        measured="in-water", limit="none", citation="46 CFR 197.430"),
    "uscg-432": Case(
        passing=lambda _: _u(**_DEEP), failing=lambda _: _u(**dict(_DEEP, stage=False)),
        measured="none", limit="a stage or a bell", citation="46 CFR 197.432"),
    "uscg-432-c": Case(
        passing=lambda _: _u(), failing=lambda _: _untended(_u(tender=None)),
        measured="none", limit="a tender other than the diver", citation="46 CFR 197.432(c)"),
    "uscg-432-d": Case(
        passing=lambda _: _set(_u(entry_diver="Stan Standby"), "site", confined_space=True),
        failing=lambda _: _set(_u(), "site", confined_space=True),
        measured="none", limit="a diver at the entry point (dive.entry_diver)",
        citation="46 CFR 197.432(d)"),
    "uscg-346c": Case(
        passing=lambda _: _u(heavy_gear=True, standby_hose=True),
        failing=lambda _: _u(heavy_gear=True, standby_hose=False),
        measured="no", limit="yes", citation="46 CFR 197.346(c)"),
    "uscg-434": Case(
        passing=lambda _: _hx(), failing=lambda _: _no_secondary(_hx()),
        measured="none", limit="a dive-location reserve (gas_supply.secondary)",
        citation="46 CFR 197.434"),
    "uscg-346e": Case(
        passing=lambda _: _u(**_DECO), failing=lambda _: _no_bailout(_u(**_DECO)),
        measured="no", limit="yes", citation="46 CFR 197.346(e)-(g)"),
    "uscg-332": Case(
        passing=lambda _: _u(**_DEEP),
        failing=lambda _: _set(_u(**_DEEP), "chamber", depth_capability=150),
        measured=150, limit=165.0, citation="46 CFR 197.332"),
    "uscg-314": Case(
        passing=lambda _: _u(**_DEEP), failing=lambda _: _set(_u(**_DEEP), "site",
                                                              resuscitator=False),
        measured="no", limit="yes", citation="46 CFR 197.314"),
    "uscg-410": Case(
        passing=lambda _: _u(**_DEEP),
        failing=lambda _: _no_operator(_u(**_DEEP)),
        measured="none", limit="a chamber operator who is not diving",
        citation="46 CFR 197.410"),
}


def _untended(d):
    d["team"][3]["role"] = "chamber-operator"  # no tender left on the team
    return d


def _no_operator(d):
    d["team"][4]["role"] = "tender"
    return d


@pytest.mark.parametrize("key", sorted(CASES))
def test_contract(key, tmp_path):
    """Each USCG rule passes its passing plan and reports id, measured, limit and citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)


def test_uscg_432_c_shallow_air_dive_is_tended_too(uscg, run):
    """46 CFR 197.432(c): every surface-supplied air diver is continuously tended (any depth)."""
    d = uscg(max_depth=30, tender=None)
    d["team"][3]["role"] = "chamber-operator"
    [f] = _bad(run(d, FAMILY, "uscg-432-c"))
    assert (f.severity, f.citation, f.source_status) == ("fail", "46 CFR 197.432(c)", "VERIFIED")


def test_uscg_432_d_confined_space_entry_diver(uscg, run):
    """46 CFR 197.432(d): in a confined space a diver at the entry point tends the line."""
    d = uscg()
    d["site"]["confined_space"] = True
    [f] = _bad(run(d, FAMILY, "uscg-432-d"))
    assert (f.severity, f.measured) == ("fail", "none")
    d["dives"][0]["entry_diver"] = "Stan Standby"
    _all_pass(run(d, FAMILY, "uscg-432-d"))


_LONG = dict(max_depth=140, bottom_time_min=20, stage=True, decompression="in-water",
             stops=[{"depth": 20, "minutes": 60}, {"depth": 10, "minutes": 70}])


def _bell_findings(findings):
    return [f for f in findings if "bell" in f.message and "stage" not in f.message]


@pytest.mark.parametrize(("kw", "site", "words"), [
    ({"heavy_gear": True}, {}, "a heavyweight outfit"),
    ({}, {"confined_space": True}, "a physically confining space"),
])
def test_uscg_432_e4_bell_exceptions(uscg, run, kw, site, words):
    """46 CFR 197.432(e)(4): over 120 min in-water decompression needs a bell, except with a
    heavyweight outfit or in a physically confining space (regulation text, VERIFIED)."""
    d = uscg(**_LONG, **kw)
    d["site"].update(site)
    [f] = _bell_findings(run(d, FAMILY, "uscg-432"))
    assert (f.severity, f.citation) == ("pass", "46 CFR 197.432(e)(4)") and words in f.message
    [f] = _bell_findings(run(uscg(**_LONG), FAMILY, "uscg-432"))
    assert (f.severity, f.citation, f.measured, f.limit) == ("fail", "46 CFR 197.432(e)(4)",
                                                             130.0, 120.0)


def test_uscg_434_c_d_bell_exceptions(uscg, run):
    """46 CFR 197.434(c): bell deeper than 220 fsw, except heavyweight or confining space;
    (d): closed bell deeper than 300 fsw, except a confining space."""
    heavy = uscg(mode="surface-supplied-heliox", gas="16/84", max_depth=250, bottom_time_min=10,
                 stage=True, heavy_gear=True)
    got = run(heavy, FAMILY, "uscg-434")
    assert not _bad(got)
    assert any(f.citation == "46 CFR 197.434(c)" and f.severity == "pass" for f in got)
    deep = uscg(mode="surface-supplied-heliox", gas="10/90", max_depth=310, bottom_time_min=10,
                stage=True, bell="open")
    [f] = _bad(run(deep, FAMILY, "uscg-434"))
    assert (f.citation, f.severity) == ("46 CFR 197.434(d)", "fail")
    deep["site"]["confined_space"] = True
    got = run(deep, FAMILY, "uscg-434")
    assert not _bad(got) and any(f.citation == "46 CFR 197.434(d)" for f in got)


def test_uscg_434_e_separate_tender(uscg, run):
    """46 CFR 197.434(e): a separate tender for each mixed-gas diver."""
    d = uscg(mode="surface-supplied-heliox", gas="16/84", max_depth=150, bottom_time_min=20,
             stage=True, tender=None)
    [f] = _bad(run(d, FAMILY, "uscg-434"))
    assert (f.citation, f.severity, f.measured) == ("46 CFR 197.434(e)", "fail", "none")


def test_uscg_346_c_standby_hose_at_any_depth(uscg, run):
    """46 CFR 197.346(c): every surface-supplied heavyweight operation has an extra hose for the
    standby diver, at any depth (regulation text, VERIFIED); a 30 fsw dive was not checked."""
    [f] = _bad(run(uscg(max_depth=30, heavy_gear=True), FAMILY, "uscg-346c"))
    assert (f.severity, f.citation, f.source_status) == ("fail", "46 CFR 197.346(c)", "VERIFIED")
    assert run(uscg(max_depth=30), FAMILY, "uscg-346c") == []  # no heavyweight outfit
    got = run(uscg(max_depth=140, bottom_time_min=20, heavy_gear=True), FAMILY, "uscg-346e")
    assert not any("hose" in f.message for f in got)  # one finding for one fact
