"""Gaps in the log and the diver (supervisor.audit.logfacts); the demo plan's D1."""

from __future__ import annotations

from supervisor.audit.run import audit_one
from tests.audit._logs import d1, executed, item


def _f(result, rule):
    return [f for f in result.findings if f.rule == rule]


def test_a_gap_needs_review(demo):
    gap = {"kind": "gap", "line": 40, "message": "no samples for 35 s after line 39"}
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1()), issues=[gap]))
    f = _f(r, "audit-log")
    assert [x.severity for x in f] == ["warn"] and "line 40" in f[0].message


def test_no_gap_passes_and_handled_samples_are_information(demo):
    spike = {"kind": "spike", "line": 12, "message": "replaced"}
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1()), issues=[spike]))
    assert sorted(x.severity for x in _f(r, "audit-log")) == ["info", "pass"]


def test_the_diver_named_by_the_log(demo):
    ok = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1())))
    assert _f(ok, "audit-diver")[0].severity == "pass"
    other = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1()), diver="Someone Else"))
    assert _f(other, "audit-diver")[0].severity == "warn"
