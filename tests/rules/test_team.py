"""Team and equipment rules: a passing and a failing plan for every rule.

Plan-consistency rules fail; the crew reading (a standby diver and a tender per
dive, a chamber operator when a chamber is needed) is DERIVED from 29 CFR 1910
Subpart T and the OSHA directive CPL 02-00-151 as summarised in the project's
notes, so a gap warns.
"""

from __future__ import annotations

import _contract as _c
import pytest
from _contract import Case

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


def test_a_derived_crew_pass_is_unverified(base, run):
    """The crew reading is DERIVED: its passes keep the verdict at needs review; the plan's
    consistency (a plan rule) passes verified."""
    [f] = run(base(), FAMILY, "team-standby")
    assert (f.severity, f.source_status, f.verified) == ("pass", "DERIVED", False)
    [f] = run(base(), FAMILY, "team-supervisor")
    assert (f.severity, f.source_status, f.verified) == ("pass", None, True)


# ---------------------------------------------------------------------------
# the findings contract: a passing and a failing plan for every team rule


def _member(d, i, **kw):
    d["team"][i].update(kw)
    return d


def _surd(**kw):
    return _c.dive(_c.base(), max_depth=100, bottom_time_min=40, decompression="surface-oxygen",
                   stops=[{"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}],
                   **kw)


PLAN = "plan consistency"
CASES: dict[str, Case] = {
    "team-supervisor": Case(
        passing=lambda _: _c.base(), failing=lambda _: _member(_c.base(), 0, role="tender"),
        measured=0, limit=1, citation=f"{PLAN} (job.supervisor and team[].role)"),
    "team-diver": Case(
        passing=lambda _: _c.base(),
        failing=lambda _: _c.dive(_c.base(), diver="Tess Tender", tender="Cal Chamber"),
        measured="tender", limit="diver", citation=f"{PLAN} (dives[].diver and team[].role)"),
    "team-roles-distinct": Case(
        passing=lambda _: _c.base(), failing=lambda _: _c.dive(_c.base(), tender="Dana Diver"),
        measured="Dana Diver", limit="a tender who is neither the diver nor the standby diver",
        citation=f"{PLAN} (dives[].diver, standby_diver, tender)"),
    "team-standby": Case(
        passing=lambda _: _c.base(),
        failing=lambda _: _member(_c.dive(_c.base(), standby_diver=None), 2, role="diver"),
        measured=0, limit=1, citation=TEAM_SIZE, severity="warn"),
    "team-tender": Case(
        passing=lambda _: _c.base(),
        failing=lambda _: _member(_c.dive(_c.base(), tender=None), 3, role="diver"),
        measured=0, limit=1, citation=TEAM_SIZE, severity="warn"),
    "team-chamber-operator": Case(
        passing=lambda _: _c.dive(_c.base(), max_depth=110, bottom_time_min=20),
        failing=lambda _: _member(_c.dive(_c.base(), max_depth=110, bottom_time_min=20), 4,
                                  role="tender"),
        measured=0, limit=1, citation=TEAM_SIZE, severity="warn"),
}

#: Findings a team rule gives under another id: (rule key, plan, id, severity, measured,
#: limit, citation).
OTHER_IDS = [
    ("team-roles-distinct",
     lambda: _member(_c.dive(_c.base(), diver="Sam Supervisor"), 0, role=["supervisor", "diver"]),
     "team-supervisor-diving", "warn", "Sam Supervisor", "a supervisor who is not diving",
     "common practice, no source"),
    ("team-standby", lambda: _c.dive(_c.base(), standby_diver="Cal Chamber"),
     "team-standby-role", "fail", "Cal Chamber", "a member with a diving role",
     f"{PLAN} (dives[].standby_diver)"),
    ("team-chamber-operator", lambda: _surd(tender="Cal Chamber"),
     "team-chamber-operator-busy", "fail", "Cal Chamber",
     "a chamber operator who is not diver, standby or tender on the dive",
     f"{PLAN} (surface decompression)"),
    ("team-chamber-operator", lambda: _member(_surd(), 4, role="tender"),
     "team-chamber-operator", "fail", 0, 1, f"{PLAN} (surface decompression)"),
]


@pytest.mark.parametrize("key", sorted(CASES))
def test_contract(key, tmp_path):
    """Each team rule passes its passing plan and reports id, measured, limit and citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


@pytest.mark.parametrize(("key", "plan", "rule", "severity", "measured", "limit", "citation"),
                         OTHER_IDS, ids=[x[2] for x in OTHER_IDS])
def test_contract_other_ids(key, plan, rule, severity, measured, limit, citation):
    got = [f for f in _c.run_rule(FAMILY, key, plan()) if f.severity in _c.BAD]
    for f in got:
        _c.reported(f)
    f = next(f for f in got if f.rule == rule)
    assert (f.severity, f.measured, f.limit, f.citation) == (severity, measured, limit, citation)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)
