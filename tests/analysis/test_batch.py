"""Batched engine work of the analysis: the same answers as one dive at a time.

Every expected value here is the project's own computation (regression value, own
computation): the batched path is compared with the one-dive path, which the
rest of the suite checks against outside sources.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

from supervisor import analysis as an
from supervisor.analysis import batch
from supervisor.analysis.figures import margin_minutes, margin_minutes_many
from supervisor.engine.schedule import ScheduleRequest
from supervisor.errors import InputError
from supervisor.plan import parse_plan_bytes, read_plan_bytes

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "bench"))

from weekjob import write_plan  # noqa: E402


def _week(tmp_path: Path, n: int):
    p = write_plan(n, tmp_path / "week.toml")
    return parse_plan_bytes(read_plan_bytes(p), str(p))


def test_robust_isolates_the_failing_items():
    def compute(xs):
        if any(x < 0 for x in xs):
            raise ValueError(f"negative in a batch of {len(xs)}")
        return [2 * x for x in xs]

    got = batch.robust(compute, [1, 2, -3, 4, 5])
    assert [r for r, _ in got] == [2, 4, None, 8, 10]
    # the failing item carries the error of its own computation, not the batch's
    assert got[2][1] == "ValueError: negative in a batch of 1"
    assert all(e is None for i, (_, e) in enumerate(got) if i != 2)


def test_schedules_batch_equals_one_at_a_time():
    reqs = [ScheduleRequest(depth=d, bottom_time_min=t) for d, t in
            ((60, 50), (100, 25), (40, 300), (130, 20))]
    reqs.append(ScheduleRequest(depth=100, bottom_time_min=0.5))  # shorter than the descent
    got = batch.schedules(reqs)
    with pytest.raises(InputError) as exc:
        reqs[-1].validate()
    assert got[-1][0] is None and str(exc.value) in got[-1][1]
    for r, (res, err) in zip(reqs[:-1], got[:-1], strict=True):
        one = batch.schedules([r])[0][0]
        assert err is None
        assert [s.to_dict() for s in res.stops] == [s.to_dict() for s in one.stops]
        assert res.final_p_n2 == pytest.approx(one.final_p_n2, rel=1e-12)


@pytest.mark.parametrize("limits", [(47.0, 33.0, 500.0, 40.0), (41.0, 39.0, 10.0, 45.0)])
def test_margin_search_in_step_equals_one_search_each(limits):
    bts = [40.0, 40.0, 40.0, 40.0]
    cases = [(bt, 1.0, bt <= lim) for bt, lim in zip(bts, limits, strict=True)]
    one = [margin_minutes(lambda t, lim=lim: t <= lim + 1e-9, bt, 1.0, ok)
           for (bt, _, ok), lim in zip(cases, limits, strict=True)]
    rounds = []

    def covered(queries):
        rounds.append(len(queries))
        return [t <= limits[i] + 1e-9 for i, t in queries]

    many = margin_minutes_many(covered, cases)
    assert many == one
    assert max(rounds) <= len(cases)  # one query per unfinished dive and round


def test_plan_analysis_equals_dive_by_dive(tmp_path):
    """Margins and contingencies batched across a multi-day job equal analyse_dive's."""
    plan = _week(tmp_path, 12)
    pa = an.analyse_plan(plan)
    for d in plan.dives:
        a = pa.dives[d.id]
        one = an.analyse_dive(plan, d, a.p_n2_0, a.p_he_0, a.table)
        assert a.margin == one.margin, d.id
        assert a.to_json()["contingency"] == one.to_json()["contingency"], d.id
        assert a.to_json()["model_schedule"] == one.to_json()["model_schedule"], d.id
        assert a.evaluation.ceiling_broken == one.evaluation.ceiling_broken
        assert a.evaluation.final_p_n2 == pytest.approx(one.evaluation.final_p_n2, rel=1e-12)
