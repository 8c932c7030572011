"""The schedule the actual exposure requires (supervisor.audit.required).

The table is the demo policy's computed zhl16c-gf30-85-air-fsw (source status
COMPUTED, rows unverified: a short stop against it warns); the model schedule is
the project's engine (its own answer is the expected value).  Table entry at the
next deeper depth and next longer time: U.S. Navy Diving Manual Rev 4 Change A
ch. 9 (OLDER-EDITION).
"""

from __future__ import annotations

from supervisor.audit.required import actual
from supervisor.audit.run import audit_one
from tests.audit._logs import d1, d2_full, executed, item


def _f(result, rule):
    return [f for f in result.findings if f.rule == rule][0]


def test_within_the_approved_dive_the_approved_stops_govern(demo):
    # the supervisor's bottom time (a recorder's derived one counts part of the ascent)
    r = audit_one(demo, item(demo, "D2", d2_full(demo, bottom_time_min=40.0)))
    f = _f(r, "audit-exposure")
    assert f.severity == "pass" and f.measured == "110 fsw / 40 min"
    assert _f(r, "audit-required-table").severity == "info"
    assert _f(r, "audit-required-model").severity == "info"
    req = r.ctx.required.to_json()
    assert req["governs"] == "approved" and req["table"]["depth"] == 110.0


def test_bottom_time_rounds_up_and_depth_to_a_tenth(demo):
    ex = executed(demo, "D1", d1(bt=45.2, depth=50.04))
    ex.bottom_time_min = 45.2
    from supervisor.audit.context import AuditContext

    q = actual(AuditContext(demo, demo.plan.dive("D1"), ex))
    assert q.bottom_time == 46.0 and q.depth == 50.1 and q.longer and q.deeper


def test_a_deeper_no_stop_dive_that_needed_stops(demo):
    # D1 approved 50 fsw / 45 min; dived 80 fsw / 45 min straight up: needs stops
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1(depth=80.0))))
    f = _f(r, "audit-exposure")
    assert f.severity == "warn" and f.measured.startswith("80 fsw") and "deeper" in f.message
    t = _f(r, "audit-required-table")
    assert t.severity == "warn" and t.source_status == "COMPUTED"
    assert "omitted decompression" in t.message and t.extra["action"]
    m = _f(r, "audit-required-model")
    assert m.severity == "warn" and not m.verified
    assert r.ctx.required.to_json()["governs"] == "required"


def test_a_longer_dive_whose_schedule_still_needs_no_stops_passes(demo):
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1(bt=47.0))))
    assert _f(r, "audit-exposure").severity == "warn"
    assert _f(r, "audit-required-model").severity == "pass"
    assert _f(r, "audit-required-table").severity == "pass"


def test_beyond_the_table_fails(demo):
    # 200 fsw is deeper than the deepest row (190 fsw) of the table the policy names
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1(depth=200.0, bt=10.0,
                                                                     descent=75.0))))
    t = _f(r, "audit-required-table")
    assert t.severity == "fail" and t.limit == "zhl16c-gf30-85-air-fsw"
