"""Stops against the approved stops (supervisor.audit.stops).

Expected minutes are the invented profiles' own (a stop held for N minutes, the
travel at 30 fsw/min through the stop band added: the project's arithmetic);
the approved stops are the demo plan's D2 (50 and 40 fsw for 3 min).
"""

from __future__ import annotations

import numpy as np

from supervisor.audit.run import audit_one
from supervisor.audit.stops import band, measure, time_in_bands
from tests.audit._logs import d1, d2_full, d2_water, executed, item


def _stops(result):
    return [f for f in result.findings if f.rule == "audit-stops"]


def test_time_in_bands_is_exact_for_straight_lines():
    t = np.array([0.0, 2.0, 5.0, 6.0])
    d = np.array([60.0, 40.0, 40.0, 0.0])
    # band 39-45: 0.5 min of the 60->40 descent-free travel, 3 min level, 0.025 min rising
    got = time_in_bands(t, d, np.ones(3, dtype=bool), np.array([39.0]), np.array([45.0]))
    assert np.isclose(got[0], 0.5 + 3.0 + 0.025)


def test_band_is_one_fsw_shallower_and_half_a_step_deeper():
    assert band(40.0, "fsw", 10.0) == (39.0, 45.0)
    lo, hi = band(12.0, "msw", 3.0)
    assert np.isclose(lo, 12.0 - 0.3066, atol=1e-3) and hi == 13.5


def test_every_approved_stop_taken_passes(demo):
    r = audit_one(demo, item(demo, "D2", d2_full(demo)))
    f = _stops(r)
    assert len(f) == 1 and f[0].severity == "pass"
    # the chamber part of a recorder log is inferred: the pass is not verified
    assert not f[0].verified


def test_a_cut_short_water_stop_fails_as_omitted_decompression(demo):
    r = audit_one(demo, item(demo, "D2", d2_full(demo, stop40=2.0)))
    f = [x for x in _stops(r) if x.severity == "fail"]
    assert len(f) == 1
    assert f[0].measured.startswith("40 fsw water stop on air: 2.")
    assert f[0].limit == "40 fsw water stop on air: 3 min"
    assert f[0].extra["action"]["procedure"] == "omitted decompression"
    assert "U.S. Navy Diving Manual, Rev 7, ch. 9" in f[0].extra["action"]["citation"]
    assert r.verdict == "does-not-conform"


def test_a_missed_stop_fails(demo):
    r = audit_one(demo, item(demo, "D2", d2_full(demo, stop40=0.0)))
    f = [x for x in _stops(r) if x.severity == "fail"]
    # travel through the 39-45 band at 30 fsw/min is counted (about 0.2 min), not missed
    assert len(f) == 1 and "40 fsw water stop" in f[0].measured


def test_a_dive_without_stops_has_none_to_miss(demo):
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1())))
    assert _stops(r)[0].severity == "pass"


def test_missing_chamber_part_of_a_recorder_log_needs_review(demo):
    # the recorder log ends on the surface: the chamber stops are not in it
    ex = executed(demo, "D2", d2_water() + [(60.0, 0.0)])
    r = audit_one(demo, item(demo, "D2", ex))
    f = [x for x in _stops(r) if x.severity == "warn"]
    assert len(f) == 2 and all(not x.verified for x in f)
    assert all("chamber" in x.measured and "missed" in x.measured for x in f)


def test_measure_counts_only_after_leaving_the_bottom(demo):
    ex = executed(demo, "D2", d2_water())
    got = measure(ex, [(110.0, "water", "air", 10.0)], 10.0, 30.0)
    assert got[0].measured_min < 0.5  # the bottom itself is not a stop


def test_travel_through_the_band_does_not_hide_a_short_stop(demo):
    # 15 s short at 40 fsw; crossing the 39-45 fsw band at 30 fsw/min takes 12 s, which a
    # recorder's band time includes and the audit takes off again
    r = audit_one(demo, item(demo, "D2", d2_full(demo, stop40=2.75)))
    f = [x for x in _stops(r) if x.severity == "fail"]
    # 2.75 min measured (float rounding decides 2.7 or 2.8 in the one-decimal text)
    assert len(f) == 1 and f[0].measured in ("40 fsw water stop on air: 2.7 min",
                                             "40 fsw water stop on air: 2.8 min")


def test_timed_log_counts_only_the_logged_stop(demo):
    from supervisor.audit.run import item_from_log
    from supervisor.records.importers import read_log
    from tests.audit._logs import ROOT

    it = item_from_log(demo, read_log(ROOT / "examples" / "logs" / "demo-d2-log.toml"))
    got = {(s.depth, s.place): s.measured_min
           for s in measure(it.ex, [(60.0, "water", "air", 1.0), (40.0, "water", "air", 3.0)],
                            10.0, 30.0)}
    # the file's own clock times: 10:11:40-10:12:40 and 10:13:20-10:15:20
    assert np.isclose(got[(60.0, "water")], 1.0) and np.isclose(got[(40.0, "water")], 2.0)
