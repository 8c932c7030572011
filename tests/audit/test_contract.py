"""Every audit rule answers in the findings form, and has a passing and a failing case.

The cases are invented executed dives of the demo job (tests/audit/_logs.py);
each is named with the rule it exercises.  A registered rule without both a pass
and a fail or warning among the cases fails this test, so a new rule needs cases.
"""

from __future__ import annotations

import numpy as np
import pytest

from supervisor.audit.context import FAMILY
from supervisor.audit.run import audit_many
from supervisor.gas import parse_gas
from tests.audit._logs import d1, d2_full, executed, item

BAD = ("fail", "warn")


def _rich(demo):
    ex = executed(demo, "D1", d1())
    ex.fo2 = np.full(ex.fo2.size, parse_gas("nitrox80").fo2)
    return ex


def _o2_deco(demo):
    ex = d2_full(demo)
    ex.fo2 = np.where((ex.t[:-1] > ex.events["left_bottom"]) & (ex.place == "water"), 1.0,
                      ex.fo2)
    return ex


def _o2_chamber_deep(demo):
    ex = d2_full(demo)
    ex.depth = np.where(np.concatenate([ex.place == "chamber", [False]]),
                        np.minimum(ex.depth * 1.3, 70.0), ex.depth)
    return ex


def _long_o2(demo):
    ex = executed(demo, "D1", d1())
    ex.fo2 = np.ones(ex.fo2.size)
    ex.depth = np.where(ex.depth > 0, 18.0, ex.depth)
    ex.t = ex.t * 12.0
    return ex


def _direct(demo):
    return executed(demo, "D1", [(0.0, 0.0), (110 / 60, 110.0), (40.0, 110.0),
                                 (40.0 + 110 / 30, 0.0), (50.0, 0.0)])


def _no_samples_in_water(demo):
    # a log that never leaves the surface
    return executed(demo, "D1", [(0.0, 0.0), (0.2, 0.0)])


@pytest.fixture(scope="module")
def findings(demo):
    cases = {
        "good D1": item(demo, "D1", executed(demo, "D1", d1())),
        "good D2": item(demo, "D2", d2_full(demo, bottom_time_min=40.0)),
        "fast ascent": item(demo, "D1", executed(demo, "D1", d1(ascent=80.0))),
        "fast descent": item(demo, "D1", executed(demo, "D1", d1(descent=120.0))),
        "short stop": item(demo, "D2", d2_full(demo, stop40=1.0)),
        "late chamber": item(demo, "D2", d2_full(demo, deck=8.0)),
        "rich bottom gas": item(demo, "D1", _rich(demo)),
        "oxygen in the water": item(demo, "D2", _o2_deco(demo)),
        "oxygen too deep in the chamber": item(demo, "D2", _o2_chamber_deep(demo)),
        "long oxygen": item(demo, "D1", _long_o2(demo)),
        "direct ascent": item(demo, "D1", _direct(demo)),
        "deeper": item(demo, "D1", executed(demo, "D1", d1(depth=80.0))),
        "longer": item(demo, "D1", executed(demo, "D1", d1(bt=47.0))),
        "gap": item(demo, "D1", executed(demo, "D1", d1()),
                    issues=[{"kind": "gap", "line": 9, "message": "no samples for 40 s"}]),
        "other diver": item(demo, "D1", executed(demo, "D1", d1()), diver="Someone Else"),
        "empty": item(demo, "D1", _no_samples_in_water(demo)),
    }
    results = audit_many(demo, list(cases.values()))
    return [f for r in results for f in r.findings]


def test_every_rule_has_a_pass_and_a_fail_or_warning(findings):
    for rule in FAMILY.rules:
        got = {f.severity for f in findings if f.rule == rule.id}
        assert "pass" in got, f"{rule.id}: no passing case"
        assert got & set(BAD), f"{rule.id}: no failing case"


def test_findings_carry_rule_measured_limit_and_citation(findings):
    for f in findings:
        assert f.rule.startswith("audit-") and f.family == "audit" and f.citation
        assert f.dive in ("D1", "D2")
        if f.severity in BAD:
            assert f.measured is not None, f
            assert f.limit is not None or "needs review" in f.message, f
        if f.severity == "fail":
            assert f.verified


def test_no_rule_could_not_run(findings):
    assert not [f for f in findings if "could not run" in f.message]
