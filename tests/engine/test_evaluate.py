"""Tests of supervisor.engine.evaluate (any profile through ZH-L16 with gradient factors)."""

from __future__ import annotations

import numpy as np
import pytest

from supervisor.engine.buhlmann import load_coefficients
from supervisor.engine.evaluate import (
    ProfileArrays,
    evaluate_profile,
    evaluate_profiles,
    infer_first_stop,
)
from supervisor.engine.kinetics import final_tensions
from supervisor.engine.schedule import ScheduleRequest, plan_schedule
from supervisor.errors import InputError
from supervisor.profile import Profile


def _schedule(**kw):
    return plan_schedule(ScheduleRequest(depth=130, bottom_time_min=40, **kw))


def test_computed_schedule_is_within_its_ceiling_and_limits():
    r = _schedule()
    ev = evaluate_profile(r.profile, "zhl16c", 0.3, 0.85, first_stop_depth=r.first_stop_depth)
    assert not ev.ceiling_broken and ev.worst_excess_bar <= 0
    assert np.all(ev.loading_percent_of_limit <= 100.0 + 1e-9)
    assert ev.controlling_compartment == r.controlling_compartment
    assert ev.t_min.shape == ev.depth.shape == ev.ceiling_depth.shape
    assert ev.t_min[-1] == pytest.approx(r.profile.duration_min)
    assert np.all(ev.ceiling_depth >= 0)


def test_shortened_stops_break_the_ceiling():
    r = _schedule()
    prof = Profile(unit="fsw")
    for s in r.profile.segments:
        m = s.minutes * (0.3 if s.label == "stop" else 1.0)
        prof.add(s.end_depth, m, s.gas, s.place, s.label)
    ev = evaluate_profile(prof, "zhl16c", 0.3, 0.85, first_stop_depth=r.first_stop_depth)
    assert ev.ceiling_broken and ev.worst_excess_bar > 0 and ev.first_break_min is not None


def test_final_tensions_equal_the_kinetics():
    prof = Profile(unit="msw").add(30, 1.5).add(30, 20).add(0, 3.5)
    ev = evaluate_profile(prof)
    a = prof.arrays()
    half = load_coefficients("zhl16c").n2_half
    ref = final_tensions(a.minutes, a.p_start, a.p_end, a.fn2, half, 0.7509345)
    np.testing.assert_allclose(ev.final_p_n2, ref, atol=1e-6)


def test_infer_first_stop():
    prof = Profile(unit="fsw").add(100, 1.4).add(100, 20).add(30, 2.3).add(30, 3)
    prof.add(20, 0.3).add(20, 5).add(0, 0.7)
    assert infer_first_stop(prof) == 30
    assert infer_first_stop(Profile(unit="fsw").add(60, 1).add(60, 10).add(0, 2)) is None


def test_empty_profile_and_unknown_model():
    with pytest.raises(InputError):
        evaluate_profile(Profile(unit="fsw"))
    with pytest.raises(InputError, match="model"):
        evaluate_profile(Profile(unit="fsw").add(10, 1), model="zhl99")


def test_profile_arrays_give_the_same_evaluation_as_the_profile():
    # the array form (an executed log's input) is the same computation, value for value
    r = _schedule()
    arrays = ProfileArrays.from_profile(r.profile)
    a, b = evaluate_profiles([r.profile, arrays], "zhl16c", 0.3, 0.85)
    assert a.surfacing_gf == b.surfacing_gf and a.worst_excess_bar == b.worst_excess_bar
    np.testing.assert_array_equal(a.ceiling_depth, b.ceiling_depth)
    np.testing.assert_array_equal(a.final_p_n2, b.final_p_n2)
    assert infer_first_stop(arrays) == infer_first_stop(r.profile) == a.first_stop_depth
