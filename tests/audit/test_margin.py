"""Model margin of the executed profile (supervisor.audit.margin).

The model is the demo policy's ZH-L16C with GF 30/85 (Bühlmann 2002; Baker 1998),
computed by the project's engine: the expected outcomes are the engine's own (a
dive done as approved stays below its ceiling; a direct ascent from 110 fsw
after 40 min, no stops, cannot).
"""

from __future__ import annotations

from supervisor.audit.run import audit_one
from tests.audit._logs import d1, d2_full, executed, item


def _f(result, rule):
    return [f for f in result.findings if f.rule == rule]


def test_the_approved_dive_as_executed_stays_below_the_ceiling(demo):
    r = audit_one(demo, item(demo, "D2", d2_full(demo)))
    ceiling = _f(r, "audit-model-ceiling")[0]
    assert ceiling.severity == "pass" and ceiling.measured <= 0 and ceiling.unit == "fsw"
    assert _f(r, "audit-surfacing-gf")[0].severity == "pass"
    si = _f(r, "audit-surface-interval-gf")
    assert si and si[0].severity == "info"


def test_direct_ascent_from_110_fsw_breaks_the_ceiling_and_surfaces_above_gf_high(demo):
    knots = [(0.0, 0.0), (110 / 60, 110.0), (40.0, 110.0), (40.0 + 110 / 30, 0.0),
             (50.0, 0.0)]
    ex = executed(demo, "D1", knots)  # as the D1 slot: no chamber expected
    r = audit_one(demo, item(demo, "D1", ex))
    ceiling = _f(r, "audit-model-ceiling")[0]
    assert ceiling.severity == "fail" and ceiling.measured > 0
    assert "ZH-L16C GF 30/85" in ceiling.message
    gf = _f(r, "audit-surfacing-gf")[0]
    assert gf.severity == "fail" and gf.measured > 85.0 and gf.limit == 85.0


def test_repetitive_dive_starts_from_the_planned_tissues(demo):
    r = audit_one(demo, item(demo, "D3", executed(demo, "D3", d1(bt=30.0, depth=40.0))))
    assert "tissues carried from the planned D1" in _f(r, "audit-model-ceiling")[0].message


def test_repetitive_dive_pass_rests_on_the_planned_previous_dive(demo):
    r = audit_one(demo, item(demo, "D3", executed(demo, "D3", d1(bt=30.0, depth=40.0))))
    f = _f(r, "audit-model-ceiling")[0]
    assert f.severity == "pass" and not f.verified and "not from its executed" in f.message


def test_repetitive_dive_without_the_plans_analysis_needs_review():
    from supervisor.audit import prepare
    from tests.audit._logs import DEMO

    bare = prepare(DEMO, analyse=False)
    r = audit_one(bare, item(bare, "D3", executed(bare, "D3", d1(bt=30.0, depth=40.0))))
    for rule in ("audit-model-ceiling", "audit-surfacing-gf", "audit-required-model"):
        f = _f(r, rule)[0]
        assert f.severity == "warn" and "unknown tissues" in f.message, rule
