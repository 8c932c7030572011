"""Sanity of the benchmarks' baselines and job: they compute what the engine computes.

No timing here (benchmarks live in bench/).  Each baseline of bench/bench_engine.py
and bench/bench_tables.py must give the engine's answer, so a speed ratio compares
equal work.  Expected values are the engine's own results (regression value, own
computation), except the extended-precision recurrence, which is the exact Schreiner
solution evaluated in ``np.longdouble``.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

import bench_engine as be  # noqa: E402
import bench_tables as bt  # noqa: E402
from weekjob import write_plan  # noqa: E402

from supervisor.engine.schedule import (  # noqa: E402
    ScheduleRequest,
    evaluate_profiles,
    plan_schedules,
)
from supervisor.plan import parse_plan_bytes, read_plan_bytes  # noqa: E402
from supervisor.references import load_table  # noqa: E402
from supervisor.references.screen import schedule_profile  # noqa: E402

#: Tolerance between two float64 evaluations of the same exact solution [bar].
FLOAT_TOL_BAR = 1e-10


@pytest.fixture(scope="module", params=["one profile", "batch"])
def work(request):
    rng = np.random.default_rng(1)
    if request.param == "one profile":
        return be.profile(150, 1 / 60, rng)
    return be.batch(3, 40, 10 / 60, rng)


def test_python_loop_gives_the_engine_tensions(work):
    for got, want in zip(be.python_loop(work), be.engine(work), strict=True):
        assert got.shape == want.shape
        np.testing.assert_allclose(got, want, rtol=0, atol=FLOAT_TOL_BAR)


def test_engine_matches_the_extended_precision_recurrence(work):
    ref = be.reference(work)
    for got, want in zip(be.engine(work), ref, strict=True):
        assert float(np.max(np.abs(got[..., -1, :] - want))) < FLOAT_TOL_BAR


def test_whole_profile_solve_ivp_gives_the_engine_tensions(work):
    # an adaptive integrator through a kink every segment: 1e-6 bar at these tolerances
    for got, want in zip(be.ivp(work, rtol=1e-9, atol=1e-10), be.engine(work), strict=True):
        np.testing.assert_allclose(got, want[..., -1, :], rtol=0, atol=1e-6)


def test_bounds_do_the_engine_output_work(work):
    """The memory bound writes arrays of the engine's output shape; the compute bound
    holds one exponent per compartment, segment and gas."""
    n2, he = be.engine(work)
    a, b = be.memory_bound(work)
    assert a.shape == n2.shape and b.shape == he.shape
    assert be.compute_setup(work).size == n2.size + he.size


def test_table_loop_baselines_give_the_batch_answers():
    reqs = [ScheduleRequest(depth=d, bottom_time_min=t) for d, t in ((60, 60), (120, 25))]
    for one, many in zip(bt._one_schedule_at_a_time(reqs), plan_schedules(reqs), strict=True):
        assert [s.to_dict() for s in one.stops] == [s.to_dict() for s in many.stops]
        np.testing.assert_allclose(one.final_p_n2, many.final_p_n2, rtol=1e-12)
    table = load_table("zhl16c-gf30-85-air-fsw")
    profs = [schedule_profile(table, r, "air", 75.0) for r in table.rows[40:46]]
    for one, many in zip(bt._one_profile_at_a_time(profs), evaluate_profiles(profs),
                         strict=True):
        assert one.surfacing_gf == pytest.approx(many.surfacing_gf, rel=1e-12)
        assert one.ceiling_broken == many.ceiling_broken


def test_bench_job_is_a_valid_multi_day_job(tmp_path):
    """The invented job: 6 divers, one surface decompression a day, repetitive dives."""
    path = write_plan(50, tmp_path / "week.toml")
    plan = parse_plan_bytes(read_plan_bytes(path), str(path))
    assert len(plan.dives) == 50
    assert len({d.diver for d in plan.dives}) == 6
    surd = [d for d in plan.dives if d.decompression == "surface-oxygen"]
    assert len(surd) == -(-50 // 7)  # one a day over 8 days (the last one short)
    assert any(d.previous_dive is not None for d in plan.dives)
    assert any(d.decompression == "in-water" for d in plan.dives)


def test_bench_audit_logs_are_audited_as_the_library_audits_them():
    # the benchmark's invented logs: the one-in-three fast ascents (60 fsw/min) fail
    import bench_audit as ba

    from supervisor.audit import prepare

    pa = prepare(ba.PLAN, analyse=False)
    work = ba.logs(6, 1.0, seed=3)
    out = ba.audit(pa, work)
    assert all(o["schema"] == "supervisor.audit/1" and o["dive"] == "D1" for o in out)
    fast = [o["executed"]["rates"]["ascent"]["max_rate"] > 45 for o in out]
    assert [o["verdict"] == "does-not-conform" for o in out] == fast
