"""The surface interval of surface decompression (supervisor.audit.surd).

Limit: 5 min, the U.S. Navy Diving Manual Rev 7 ch. 9 surface-decompression
interval (SECONDARY), taken while the plan states no limit of its own; the
interval expected is the invented profile's own arithmetic (40 fsw at 30 fsw/min,
the deck time, compression to 50 fsw in 0.5 min).
"""

from __future__ import annotations

from supervisor.audit.run import audit_one
from tests.audit._logs import d1, d2_full, executed, item


def _si(result):
    return [f for f in result.findings if f.rule == "audit-surd-interval"]


def test_interval_within_5_min_passes_but_needs_review_on_the_default(demo):
    r = audit_one(demo, item(demo, "D2", d2_full(demo, deck=1.5)))
    f = _si(r)[0]
    # leaving 40 fsw (its band edge, 39 fsw) to reaching 49 fsw in the chamber
    assert f.severity == "pass" and 3.0 < f.measured < 3.5 and f.limit == 5.0
    assert f.source_status == "SECONDARY" and not f.verified


def test_late_chamber_fails_and_states_the_procedure(demo):
    r = audit_one(demo, item(demo, "D2", d2_full(demo, deck=7.0)))
    f = _si(r)[0]
    assert f.severity == "fail" and f.measured > 7.0 and f.unit == "min"
    assert "over 7 min" in f.message
    act = f.extra["action"]
    assert act["source_status"] == "FROM MEMORY"
    assert "Treatment Table 5" in act["text"] and "Table 6" in act["text"]


def test_no_interval_for_a_dive_without_surface_decompression(demo):
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1())))
    assert _si(r) == []
