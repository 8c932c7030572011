"""Descent and ascent rates over the sliding window (supervisor.audit.rates).

Expected values are the invented profiles' own slopes (the project's arithmetic:
a straight line of known slope) and the demo policy's limits (ascent_rate_max
40 fsw/min by the fsw default, descent_rate_max 75 fsw/min stated).
"""

from __future__ import annotations

import numpy as np

from supervisor.audit.rates import RATE_WINDOW_MIN, check_rate, window_changes
from supervisor.audit.run import audit_one
from tests.audit._logs import d1, executed, item


def _find(result, rule):
    return [f for f in result.findings if f.rule == rule]


def test_window_changes_are_exact_on_straight_lines():
    # 0 -> 30 fsw in 1 min, level, back up in 2 min: slopes 30 and -15 fsw/min
    t = np.array([0.0, 1.0, 5.0, 7.0])
    d = np.array([0.0, 30.0, 30.0, 0.0])
    s, e, change = window_changes(t, d, np.zeros(3, dtype=bool), 0.5)
    assert np.isclose(change.max() / 0.5, 30.0) and np.isclose(change.min() / 0.5, -15.0)
    assert np.all(np.isclose(e - s, 0.5))


def test_windows_never_cover_the_chamber():
    t = np.array([0.0, 1.0, 2.0, 2.2])
    d = np.array([0.0, 20.0, 0.0, 60.0])  # the last segment is the chamber's compression
    excluded = np.array([False, False, True])
    _s, e, change = window_changes(t, d, excluded, 0.5)
    assert e.max() <= 2.0 + 1e-12 and change.max() / 0.5 <= 20.0 + 1e-9


def test_ascent_at_30_passes(demo):
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1())))
    f = _find(r, "audit-ascent-rate")[0]
    assert f.severity == "pass" and abs(f.measured - 30.0) < 0.1 and f.limit == 40.0


def test_fast_ascent_fails_with_the_procedure(demo):
    # 80 fsw/min from 50 fsw: 37.5 s, over one 30-s window (40 fsw > 40 x 0.5 + 1)
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1(ascent=80.0))))
    f = _find(r, "audit-ascent-rate")[0]
    assert f.severity == "fail" and abs(f.measured - 80.0) < 0.5
    assert f.unit == "fsw/min" and f.citation == "contractor policy (policy.ascent_rate_max)"
    assert "30-s window" in f.message
    assert f.extra["action"]["source_status"] == "OLDER-EDITION"
    assert r.verdict == "does-not-conform"


def test_recorder_noise_is_not_a_violation(demo):
    ex = executed(demo, "D1", d1())
    rng = np.random.default_rng(7)
    ex.depth = np.clip(ex.depth + rng.normal(0.0, 0.15, ex.depth.size), 0.0, None)
    rc = check_rate(ex, "ascent", 40.0)
    assert rc.episodes == 0 and rc.max_rate < 40.0


def test_a_short_burst_inside_one_window_is_averaged(demo):
    # 60 fsw/min for 15 s then level: 15 fsw over the window, under 40 x 0.5 + 1 fsw
    knots = [(0.0, 0.0), (1.0, 50.0), (40.0, 50.0), (40.25, 35.0), (45.0, 35.0), (46.2, 0.0)]
    rc = check_rate(executed(demo, "D1", knots), "ascent", 40.0)
    assert rc.episodes == 0 and rc.window_min == RATE_WINDOW_MIN


def test_fast_descent_fails_against_the_stated_limit(demo):
    # 50 fsw at 120 fsw/min takes 25 s: the whole descent falls in one 30-s window,
    # whose rate is 50 fsw / 0.5 min = 100 fsw/min
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1(descent=120.0))))
    f = _find(r, "audit-descent-rate")[0]
    assert f.severity == "fail" and abs(f.measured - 100.0) < 0.5 and f.limit == 75.0


def test_descent_within_the_limit_passes(demo):
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1(descent=50.0))))
    f = _find(r, "audit-descent-rate")[0]
    assert f.severity == "pass" and abs(f.measured - 50.0) < 0.5


def test_over_the_limit_within_the_slack_needs_review(demo):
    # 41 fsw/min: 20.5 fsw over 30 s, inside 40 x 0.5 + 1 fsw, but above the limit
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1(ascent=41.0))))
    f = _find(r, "audit-ascent-rate")[0]
    assert f.severity == "warn" and not f.verified and f.measured > 40.0
