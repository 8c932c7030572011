"""Engine work of many dives in few vectorised calls: schedules, evaluations, margin searches.

The analysis asks the engine the same questions for every dive of a plan (the
model schedule, the planned profile through the model, a margin search of about a
dozen bottom times, three contingency schedules).  Asked one dive at a time, the
per-call overhead of the engine dominates and grows with the job; here the
questions of all dives are put to :func:`supervisor.engine.schedule.plan_schedules`
and :func:`supervisor.engine.schedule.evaluate_profiles` together.  A batch that
fails is split until the failing requests stand alone, so every dive gets the
answer or the error its own computation gives: batching changes how the figures
are computed, never what they are.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor.analysis.assumptions import COMPUTE_ERRORS
from supervisor.analysis.figures import _anchor, margin_minutes_many, planned_profile
from supervisor.analysis.results import DiveAnalysis, _err
from supervisor.engine.schedule import (
    ProfileEvaluation,
    ScheduleRequest,
    ScheduleResult,
    evaluate_profiles,
    plan_schedules,
)
from supervisor.plan import Dive, Plan

#: One profile to evaluate: (profile, p_n2_0, p_he_0, GF-line anchor).
EvalItem = tuple[Any, NDArray[np.float64] | None, NDArray[np.float64] | None, float | None]


def variant(dive: Dive, **update: Any) -> Dive:
    """A copy of a dive with some fields changed (bottom time, depth, mode)."""
    return dive.model_copy(update=update)


def robust(
    compute: Callable[[list[Any]], list[Any]], items: list[Any]
) -> list[tuple[Any, str | None]]:
    """``compute(items)`` in one batch; a failing batch is split until the failures stand alone.

    Returns
    -------
    list of (result or None, str or None)
        Per item its result, or None and the error its own computation raised.
    """
    if not items:
        return []
    try:
        return [(r, None) for r in compute(items)]
    except COMPUTE_ERRORS as exc:
        if len(items) == 1:
            return [(None, _err(exc))]
        h = len(items) // 2
        return robust(compute, items[:h]) + robust(compute, items[h:])


def schedules(
    reqs: list[ScheduleRequest], details: bool = True
) -> list[tuple[ScheduleResult | None, str | None]]:
    """Schedules of many requests in batches (:func:`robust` over :func:`plan_schedules`).

    ``details`` is that of :func:`supervisor.engine.schedule.plan_schedules`.
    """
    return robust(lambda rs: plan_schedules(rs, details=details), reqs)


def evaluations(
    plan: Plan, items: list[EvalItem]
) -> list[tuple[ProfileEvaluation | None, str | None]]:
    """Evaluations of many profiles under the plan's model and gradient factors.

    Parameters
    ----------
    plan : Plan
        Gives the model and gradient factors (``policy``).
    items : list of (Profile, ndarray or None, ndarray or None, float or None)
        Profile, starting N2 and He tensions [bar] and GF-line anchor [plan unit].

    Returns
    -------
    list of (ProfileEvaluation or None, str or None)
        The evaluation, or None and the error of the profile's own evaluation
        (see :func:`robust`).
    """
    pol = plan.resolved_policy

    def run(xs: list[EvalItem]) -> list[ProfileEvaluation]:
        return evaluate_profiles(
            [x[0] for x in xs], pol.model, pol.gf_low / 100.0, pol.gf_high / 100.0,
            [x[1] for x in xs], [x[2] for x in xs], [x[3] for x in xs],
        )

    return robust(run, items)


def covered_many(
    plan: Plan, analyses: list[DiveAnalysis]
) -> Callable[[list[tuple[int, float]]], list[bool]]:
    """Whether the proposed stops cover bottom times, for many dives in one batch.

    The returned function takes ``[(index into analyses, bottom time [min]), ...]``.
    A bottom time is covered when its planned profile stays below the ceiling, the
    gradient-factor line anchored at the first stop of the model's own schedule for
    that bottom time, and, for a dive with no stops proposed, when the model needs
    none either.  A figure that cannot be computed counts as not covered.
    """

    def covered(queries: list[tuple[int, float]]) -> list[bool]:
        out = [False] * len(queries)
        todo: list[tuple[int, Any, ScheduleRequest]] = []
        for q, (i, bt) in enumerate(queries):
            a = analyses[i]
            try:
                prof = planned_profile(plan, variant(a.dive, bottom_time_min=bt))
            except COMPUTE_ERRORS:
                continue
            todo.append((q, prof, replace(a.request, bottom_time_min=bt)))  # type: ignore[type-var]
        scheds = schedules([r for _, _, r in todo], details=False)  # stops only
        ready = [(q, prof, res) for (q, prof, _), (res, _) in zip(todo, scheds, strict=True)
                 if res is not None]
        evs = evaluations(plan, [
            (prof, analyses[queries[q][0]].p_n2_0, analyses[queries[q][0]].p_he_0, _anchor(res))
            for q, prof, res in ready
        ])
        for (q, _, res), (ev, _) in zip(ready, evs, strict=True):
            if ev is None:
                continue
            if not analyses[queries[q][0]].dive.stops and res.stops:
                continue  # no stops proposed: covered only within the model's no-stop limit
            out[q] = not ev.ceiling_broken
        return out

    return covered


def margins(plan: Plan, analyses: list[DiveAnalysis]) -> None:
    """Fill the margin of every dive whose evaluation and request exist, searched in step."""
    todo = [a for a in analyses if a.evaluation is not None and a.request is not None]
    cases = [
        (a.dive.bottom_time_min, a.dive.max_depth / plan.descent_rate(a.dive),
         not a.evaluation.ceiling_broken)  # type: ignore[union-attr]
        for a in todo
    ]
    for a, m in zip(todo, margin_minutes_many(covered_many(plan, todo), cases), strict=True):
        a.margin = m
