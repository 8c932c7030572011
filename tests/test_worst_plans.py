"""Bounded work on any input (issue 12): the worst plan shapes finish, answering or exit 2.

The shapes (``tests/_worst_plans.py``, fixed seed) made the check run for minutes or use
gigabytes before the plan ranges and the work bounds: many back-to-back decompression
dives for one diver, 140 msw dives repeated, the slowest rates, the longest stops,
repeated surface decompression, a fine stop grid, and an ascent of 0.0001 msw/min.
Here each runs at a few dives through the real command (``bench/bench_worst.py``
times the full size); a watchdog turns a hang into a failure, no timing is asserted.
"""

from __future__ import annotations

import json
import signal

import pytest
import tomli_w

from supervisor import analysis
from supervisor.check import run_check
from supervisor.cli import main
from supervisor.engine.schedule import (
    BeyondRangeError,
    ScheduleRequest,
    WorkLimitError,
    plan_schedule,
    work_budget,
)
from supervisor.plan import plan_from_dict
from tests._worst_plans import SHAPES, worst_plan

#: A hang, not a slow machine: far above what any shape takes at this size.
WATCHDOG_S = 240


@pytest.fixture
def watchdog():
    def boom(signum, frame):  # pragma: no cover - only on a hang
        raise TimeoutError(f"no answer within {WATCHDOG_S} s")

    old = signal.signal(signal.SIGALRM, boom)
    signal.alarm(WATCHDOG_S)
    yield
    signal.alarm(0)
    signal.signal(signal.SIGALRM, old)


@pytest.mark.slow
@pytest.mark.parametrize("shape", SHAPES)
def test_worst_shape_finishes(tmp_path, capsys, watchdog, shape):
    p = tmp_path / f"{shape}.toml"
    p.write_text(tomli_w.dumps(worst_plan(shape, n_dives=6)), "utf-8")
    with pytest.raises(SystemExit) as exc:
        main(["check", str(p), "--json"])
    out = capsys.readouterr()
    assert exc.value.code in (0, 1, 2), out.err
    if exc.value.code == 2:
        lines = out.err.splitlines()
        assert out.out == "" and lines and all(x.startswith("error: ") for x in lines)
    else:
        assert json.loads(out.out)["verdict"] in ("needs-review", "does-not-conform")


def test_slower_than_allowed_is_refused(capsys):
    """Reproducer: an ascent of 0.0001 msw/min used 2.8 GB before it was stopped at 120 s."""
    with pytest.raises(Exception) as err:
        plan_from_dict(worst_plan("slower-than-allowed", n_dives=1))
    assert "expected a rate from 0.3 to 92.1 msw/min" in str(err.value)


def test_work_budget_makes_later_schedules_not_computed(monkeypatch, watchdog):
    """Past the check's budget a dive's schedules are not computed: needs review, never
    conforms, and the reason names the limit."""
    # batched schedules are charged once per batch (the deepest request's levels), so the
    # four dives fit in 150 levels; 60 computes the first dive and runs out after it
    monkeypatch.setattr(analysis, "CHECK_WORK_LEVELS", 60)
    result = run_check(plan_from_dict(worst_plan("deep-repeated", n_dives=4)))
    assert result["verdict"] != "conforms"
    msgs = [f["message"] for f in result["findings"] if f["severity"] in ("warn", "fail")]
    assert any("beyond the check's work limit: not computed" in m for m in msgs)
    first = result["dives"][0]["model_schedule"]
    assert first is not None and first.get("stops")  # the first dive was still computed


def test_budget_is_deterministic():
    req = ScheduleRequest(depth=100, bottom_time_min=30)
    with work_budget(20) as b:
        plan_schedule(req)  # 100 fsw, 10 fsw steps to 10 fsw: 10 levels
        assert b.levels == 10
        plan_schedule(req)
        assert b.levels == 0
        with pytest.raises(WorkLimitError, match="work limit: not computed"):
            plan_schedule(req)
    plan_schedule(req)  # outside the block: no budget


def test_obligation_beyond_the_planner_is_beyond_range():
    with pytest.raises(BeyondRangeError, match="beyond the model's range: not computed"):
        plan_schedule(ScheduleRequest(depth=300, bottom_time_min=600))
