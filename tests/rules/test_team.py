"""Team and equipment rules: a passing and a failing plan for every rule.

Plan-consistency rules fail; the crew reading (a standby diver and a tender per
dive, a chamber operator when a chamber is needed) is DERIVED from 29 CFR 1910
Subpart T and the OSHA directive CPL 02-00-151 as summarised in the project's
notes, so a gap warns.
"""

from __future__ import annotations

from supervisor.findings import Finding
from supervisor.rules.team import FAMILY, TEAM_SIZE


def _bad(findings: list[Finding]) -> list[Finding]:
    return [f for f in findings if f.severity in ("fail", "warn")]


def _one_bad(findings: list[Finding]) -> Finding:
    got = _bad(findings)
    assert len(got) == 1, [f.message for f in got]
    return got[0]


def _all_pass(findings: list[Finding]) -> None:
    assert findings, "the rule gave no finding"
    assert not _bad(findings), [f.message for f in _bad(findings)]


def test_supervisor_present(base, run):
    """Plan consistency: a member holds the supervisor role and is the job's supervisor."""
    d = base()
    d["team"][0]["role"] = "tender"
    f = _one_bad(run(d, FAMILY, "team-supervisor"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("team-supervisor", "fail", 0, 1)
    d = base()
    d["job"]["supervisor"] = "Tess Tender"
    f = _one_bad(run(d, FAMILY, "team-supervisor"))
    assert (f.measured, f.limit) == ("Tess Tender", "Sam Supervisor")
    _all_pass(run(base(), FAMILY, "team-supervisor"))


def test_diver_holds_a_diving_role(base, run):
    """Plan consistency: the dive's diver is a diver."""
    d = base()
    d["dives"][0]["diver"] = "Tess Tender"
    d["dives"][0]["tender"] = "Cal Chamber"
    f = _one_bad(run(d, FAMILY, "team-diver"))
    assert (f.rule, f.severity, f.measured, f.limit, f.dive) == (
        "team-diver", "fail", "tender", "diver", "D1")
    _all_pass(run(base(), FAMILY, "team-diver"))


def test_roles_distinct(base, run):
    """Plan consistency: nobody tends their own dive."""
    d = base()
    d["dives"][0]["tender"] = "Dana Diver"
    f = _one_bad(run(d, FAMILY, "team-roles-distinct"))
    assert (f.rule, f.severity) == ("team-roles-distinct", "fail")
    assert "also the diver" in f.message
    _all_pass(run(base(), FAMILY, "team-roles-distinct"))


def test_supervisor_diving_warns(base, run):
    """Common practice, no source: the supervisor stays at the surface."""
    d = base()
    d["team"][0]["role"] = ["supervisor", "diver"]
    d["dives"][0]["diver"] = "Sam Supervisor"
    f = _one_bad(run(d, FAMILY, "team-roles-distinct"))
    assert (f.rule, f.severity, f.citation) == (
        "team-supervisor-diving", "warn", "common practice, no source")


def test_standby_missing_warns(base, run):
    """DERIVED crew reading: a standby diver for every dive."""
    d = base()
    d["dives"][0]["standby_diver"] = None
    d["team"][2]["role"] = "diver"
    f = _one_bad(run(d, FAMILY, "team-standby"))
    assert (f.rule, f.severity, f.measured, f.limit, f.source_status) == (
        "team-standby", "warn", 0, 1, "DERIVED")
    assert f.citation == TEAM_SIZE
    _all_pass(run(base(), FAMILY, "team-standby"))


def test_standby_without_diving_role_fails(base, run):
    """Plan consistency: the named standby diver must be able to dive."""
    d = base()
    d["dives"][0]["standby_diver"] = "Cal Chamber"
    f = _one_bad(run(d, FAMILY, "team-standby"))
    assert (f.rule, f.severity, f.measured) == ("team-standby-role", "fail", "Cal Chamber")


def test_tender_missing_warns(base, run):
    """DERIVED crew reading: a tender for every surface-supplied diver."""
    d = base()
    d["dives"][0]["tender"] = None
    d["team"][3]["role"] = "diver"
    f = _one_bad(run(d, FAMILY, "team-tender"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("team-tender", "warn", 0, 1)
    _all_pass(run(base(), FAMILY, "team-tender"))


def test_tender_not_needed_for_free_scuba(base, run):
    """A SCUBA diver who is not line-tended has a buddy instead of a tender."""
    d = base()
    d["dives"][0].update(mode="scuba", line_tended=False, buddy="Stan Standby", tender=None)
    assert run(d, FAMILY, "team-tender") == []


def test_chamber_operator_for_surface_decompression(base, run):
    """Plan consistency: surface decompression needs someone to run the chamber."""
    d = base()
    d["dives"][0].update(
        max_depth=100, bottom_time_min=40, decompression="surface-oxygen",
        stops=[{"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    d["team"][4]["role"] = "tender"
    f = _one_bad(run(d, FAMILY, "team-chamber-operator"))
    assert (f.rule, f.severity, f.measured, f.limit) == ("team-chamber-operator", "fail", 0, 1)
    d["team"][4]["role"] = "chamber-operator"
    _all_pass(run(d, FAMILY, "team-chamber-operator"))


def test_chamber_operator_for_deep_dive_warns(base, run):
    """DERIVED: a chamber operator when a dive deeper than 100 fsw needs a chamber."""
    d = base()
    d["dives"][0].update(max_depth=110, bottom_time_min=20)
    d["team"][4]["role"] = "tender"
    f = _one_bad(run(d, FAMILY, "team-chamber-operator"))
    assert (f.severity, f.source_status) == ("warn", "DERIVED")
    assert run(base(), FAMILY, "team-chamber-operator") == []


def test_chamber_operator_busy_on_the_dive(base, run):
    """Plan consistency: the only chamber operator cannot also tend the dive."""
    d = base()
    d["dives"][0].update(
        max_depth=100, bottom_time_min=40, decompression="surface-oxygen", tender="Cal Chamber",
        stops=[{"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    f = _one_bad(run(d, FAMILY, "team-chamber-operator"))
    assert (f.rule, f.severity) == ("team-chamber-operator-busy", "fail")


def test_msw_depth_trigger(base, run):
    """31 msw is 100.9 fsw: deeper than 100 fsw, so a chamber operator is wanted."""
    d = base("msw")
    d["dives"][0].update(max_depth=31, bottom_time_min=20, descent_rate=15)
    d["team"][4]["role"] = "tender"
    assert _one_bad(run(d, FAMILY, "team-chamber-operator")).severity == "warn"
    d["dives"][0]["max_depth"] = 30  # 97.7 fsw
    assert run(d, FAMILY, "team-chamber-operator") == []
