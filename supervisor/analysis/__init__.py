"""Per-dive analysis for ``supervisor check``: the engine results the rules compare.

For every dive of a plan this module

* builds the planned profile (descent, bottom, the proposed stops with their gas
  and place, and for surface decompression the ascent, the time on deck, the
  compression and the chamber stops), labelled the way the engine expects;
* carries each diver's tissue tensions across the surface intervals between the
  diver's dives, and runs the profile through the policy's model and gradient
  factors (:func:`supervisor.engine.schedule.evaluate_profile`);
* computes the model's own schedule for the same dive
  (:func:`supervisor.engine.schedule.plan_schedule`) and three contingencies;
* finds the margin of the proposed stops in minutes of bottom time;
* computes oxygen figures (:mod:`supervisor.engine.oxygen`), gas-supply figures
  (:mod:`supervisor.supply`), the chamber's own gas
  (:mod:`supervisor.analysis.chamber`) and the reference-table look-up;

and for every diver the oxygen exposure across the day and the time before an
ascent to altitude (flying or driving over a pass).

Nothing here decides anything: the rule families in :mod:`supervisor.rules`
compare these figures with the policy and the references.  Every figure is
planning information for the supervisor, whose decision it stays; the
contractor's manual, local codes and a diving medical officer govern.

Definitions
-----------
margin_min
    The largest whole number of minutes that may be added to the planned bottom
    time while the proposed stops (same depths, minutes, gases and places) still
    keep the diver below the model ceiling everywhere (and, for a dive with no
    stops, within the model's no-stop limit).  Negative: the proposed
    stops break the ceiling, and only a bottom time that many minutes shorter
    would be covered.  The gradient-factor line is anchored, for each bottom
    time tried, at the first stop of the model's own schedule for that bottom
    time, so a plan that copies the model's schedule has a margin >= 0.
    Searched up to :data:`MARGIN_CAP_MIN`; beyond that the margin is reported as
    "at least" the cap.
time to altitude
    Minutes on the surface, breathing air at the site, until no compartment's
    ceiling with GF high is below the ambient pressure at the target altitude
    (a commercial cabin at 8,000 ft by default).

The planning figures assumed (breathing rate, cabin altitude, windows, Navy
surface-decompression conventions ...) are listed with their sources in
:mod:`supervisor.analysis.assumptions`.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 8 (air supply,
       EGS) and ch. 9 (repetitive dives, altitude, flying after diving).
.. [2] U.S. Navy Diving Manual, Revision 7 Change A (2018), ch. 9, as quoted by
       secondary sources (surface decompression on oxygen, in-water oxygen).
.. [3] 46 CFR 197.340, breathing gas supply (primary, secondary, diver-carried
       reserve; chamber for the dive plus one hour).
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor import constants as C
from supervisor.analysis.assumptions import (
    ALTITUDE_SEARCH_MAX_MIN,
    CABIN_ALTITUDE_M,
    COMPUTE_ERRORS,
    DAY_WINDOW_MIN,
    EGS_BOTTOM_MIN,
    L_PER_FT3,
    MARGIN_CAP_MIN,
    O2_AIR_BREAK,
    O2_SWITCH_DEPTH_FSW,
    OVERRUN_INCREMENT_MIN,
    REPETITIVE_WINDOW_MIN,
    RMV_LPM,
    RMV_SOURCE,
    STOP_MATCH_FRACTION,
    SURD_CHAMBER_DEPTH_FSW,
    SURD_INTERVAL_MIN,
)
from supervisor.analysis.batch import evaluations, margins, schedules, variant
from supervisor.analysis.chamber import CHAMBER_SOURCES, ChamberGas, chamber_gas
from supervisor.analysis.figures import (
    _anchor,
    _lookup,
    _step,
    from_table_depth,
    margin_minutes,
    margin_minutes_many,
    planned_profile,
    po2_by_phase,
    schedule_request,
    supply_figures,
    surface_interval_profile,
    time_to_altitude,
    to_table_depth,
)
from supervisor.analysis.results import (
    CHAMBER_OXYGEN_RULE,
    Contingency,
    DiveAnalysis,
    DiverDay,
    Margin,
    PlanAnalysis,
    Supply,
    _err,
    bar_per_unit,
    chamber_oxygen_json,
)
from supervisor.engine import buhlmann as bm
from supervisor.engine import oxygen as ox
from supervisor.engine.schedule import ScheduleRequest, work_budget
from supervisor.gas import AIR, parse_gas
from supervisor.plan import Dive, Plan
from supervisor.units import altitude_pressure

__all__ = [
    "ALTITUDE_SEARCH_MAX_MIN",
    "CABIN_ALTITUDE_M",
    "CHAMBER_OXYGEN_RULE",
    "CHAMBER_SOURCES",
    "COMPUTE_ERRORS",
    "ChamberGas",
    "Contingency",
    "DAY_WINDOW_MIN",
    "DiveAnalysis",
    "DiverDay",
    "EGS_BOTTOM_MIN",
    "L_PER_FT3",
    "MARGIN_CAP_MIN",
    "Margin",
    "O2_AIR_BREAK",
    "O2_SWITCH_DEPTH_FSW",
    "OVERRUN_INCREMENT_MIN",
    "PlanAnalysis",
    "REPETITIVE_WINDOW_MIN",
    "RMV_LPM",
    "RMV_SOURCE",
    "STOP_MATCH_FRACTION",
    "SURD_CHAMBER_DEPTH_FSW",
    "SURD_INTERVAL_MIN",
    "Supply",
    "analyse_dive",
    "analyse_plan",
    "bar_per_unit",
    "chamber_gas",
    "chamber_oxygen_json",
    "for_context",
    "from_table_depth",
    "finish_dives",
    "margin_minutes",
    "margin_minutes_many",
    "planned_profile",
    "po2_by_phase",
    "provide",
    "schedule_request",
    "supply_figures",
    "time_to_altitude",
    "to_table_depth",
]


_Case = tuple[str, ScheduleRequest, float, float, str, Dive]


def _contingency_cases(plan: Plan, a: DiveAnalysis) -> list[_Case]:
    """Overrun, deeper and oxygen-failure cases of a dive (module docstring)."""
    dive, req, ref, table = a.dive, a.request, a.reference, a.table
    if req is None:
        return []
    unit = plan.unit
    dec = table if table is not None and table.kind == "decompression" else None
    t_unit = dec.model.conventions.depth_unit if dec is not None else unit
    at_row = dec is not None and ref is not None and ref.depth is not None

    bt2 = None
    if at_row and ref.bottom_time is not None:
        longer = sorted(
            r.bottom_time for r in dec.rows
            if r.depth == ref.depth and r.bottom_time > ref.bottom_time + 1e-9
        )
        if longer:
            bt2 = float(longer[0])
            basis_t = (f"next longer bottom time of {dec.name} at {ref.depth:g} {t_unit}: "
                       f"{bt2:g} min")
    if bt2 is None:
        bt2 = float(dive.bottom_time_min + OVERRUN_INCREMENT_MIN)
        basis_t = (f"planned bottom time + {OVERRUN_INCREMENT_MIN:g} min (common practice, "
                   "no source)")

    d2 = None
    if at_row:
        deeper = sorted({r.depth for r in dec.rows if r.depth > ref.depth + 1e-9})
        if deeper:
            d2 = from_table_depth(plan, float(deeper[0]), t_unit)
            basis_d = f"next deeper depth of {dec.name}: {deeper[0]:g} {t_unit}"
            if plan.p_surface_bar < C.P_ATM_BAR:
                basis_d += f" sea-level equivalent, {d2:.1f} {unit} at the site"
    if d2 is None:
        step = _step(plan)
        d2 = float(dive.max_depth + step)
        basis_d = f"planned depth + one stop step ({step:g} {unit}, the policy's stop step)"

    cases: list[_Case] = [
        ("overrun", replace(req, bottom_time_min=bt2), dive.max_depth, bt2, basis_t,
         variant(dive, bottom_time_min=bt2)),
        ("deeper", replace(req, depth=d2), d2, dive.bottom_time_min, basis_d,
         variant(dive, max_depth=d2)),
    ]
    uses_o2 = req.surface_decompression is not None or any(
        parse_gas(g).fo2 > 0.5 for g, _ in req.deco_gases
    )
    if uses_o2:
        cases.append((
            "oxygen_failure",
            replace(req, deco_gases=(), surface_decompression=None, o2_air_break=None),
            dive.max_depth,
            dive.bottom_time_min,
            f"the same dive decompressed in the water on {dive.gas_mix.name} (oxygen lost)",
            variant(dive, decompression="in-water"),
        ))
    return cases


def _contingencies(plan: Plan, analyses: list[DiveAnalysis]) -> None:
    """Fill every dive's contingencies; their schedules computed in one batch."""
    cases = [(a, c) for a in analyses for c in _contingency_cases(plan, a)]
    scheds = schedules([c[1] for _, c in cases])
    for a in analyses:
        if a.profile is not None:
            a.contingencies = dict.fromkeys(("overrun", "deeper", "oxygen_failure"))
    for (a, (kind, _, depth, bt, basis, d_var)), (res, error) in zip(cases, scheds, strict=True):
        look = None
        if a.table is not None:
            try:
                look = _lookup(plan, a.table, d_var, depth, bt)
            except COMPUTE_ERRORS as exc:
                error = error or _err(exc)
        a.contingencies[kind] = Contingency(kind, depth, bt, basis, res, look, error)


def finish_dives(plan: Plan, analyses: list[DiveAnalysis]) -> None:
    """Margins and contingencies of many analysed dives, batched across the dives.

    They depend on nothing but each dive's own figures (its starting tensions
    included), so a plan's dives are finished together once every dive is analysed.
    """
    margins(plan, analyses)
    _contingencies(plan, analyses)


def analyse_dive(
    plan: Plan,
    dive: Dive,
    p_n2_0: NDArray[np.float64] | None = None,
    p_he_0: NDArray[np.float64] | None = None,
    table: Any = None,
) -> DiveAnalysis:
    """Analyse one dive from given starting tensions (see the module docstring).

    Parameters
    ----------
    plan : Plan
        The plan.
    dive : Dive
        One of its dives.
    p_n2_0, p_he_0 : ndarray, optional
        Tensions at leaving the surface [bar]; saturated with air at the site by default.
    table : Table, optional
        The policy's reference table.

    Returns
    -------
    DiveAnalysis
        Sections that could not be computed are None, with the reason in ``errors``.
    """
    a = _start(plan, dive, table)
    _engine([(a, p_n2_0, p_he_0)], plan)
    _rest(plan, a)
    finish_dives(plan, [a])
    return a


def _start(plan: Plan, dive: Dive, table: Any) -> DiveAnalysis:
    """A dive's analysis with its planned profile (or the reason there is none)."""
    a = DiveAnalysis(dive=dive, table=table)
    try:
        a.profile = planned_profile(plan, dive, a.notes)
    except COMPUTE_ERRORS as exc:
        a.errors["profile"] = _err(exc)
        for key in ("model_schedule", "evaluation", "oxygen", "supply"):
            a.errors[key] = "no profile: " + a.errors["profile"]
    return a


def _engine(
    items: list[tuple[DiveAnalysis, NDArray[np.float64] | None, NDArray[np.float64] | None]],
    plan: Plan,
) -> None:
    """Model schedules and evaluations of dives whose starting tensions are known (one batch)."""
    todo = []
    for a, p_n2_0, p_he_0 in items:
        a.p_n2_0, a.p_he_0 = p_n2_0, p_he_0
        if a.profile is None:
            continue
        todo.append(a)
        try:
            a.request = schedule_request(plan, a.dive, p_n2_0, p_he_0, a.notes)
        except COMPUTE_ERRORS as exc:
            a.errors["model_schedule"] = _err(exc)
    asked = [a for a in todo if a.request is not None]
    for a, (res, error) in zip(asked, schedules([a.request for a in asked]), strict=True):
        a.model_schedule = res
        if error is not None:
            a.errors["model_schedule"] = error
    evs = evaluations(plan, [(a.profile, a.p_n2_0, a.p_he_0, _anchor(a.model_schedule))
                             for a in todo])
    for a, (ev, error) in zip(todo, evs, strict=True):
        a.evaluation = ev
        if error is not None:
            a.errors["evaluation"] = error


def _rest(plan: Plan, a: DiveAnalysis) -> None:
    """Oxygen, reference look-up and gas supply of a dive with a profile."""
    if a.profile is None:
        return
    dive, table = a.dive, a.table
    try:
        a.exposure = ox.profile_exposure(a.profile)
        a.po2_max, a.po2_min = po2_by_phase(a.profile)
    except COMPUTE_ERRORS as exc:
        a.errors["oxygen"] = _err(exc)
    if table is not None:
        try:
            unit = table.model.conventions.depth_unit
            a.table_depth = to_table_depth(plan, dive.max_depth, unit)
            a.reference = _lookup(plan, table, dive, dive.max_depth, dive.bottom_time_min)
        except COMPUTE_ERRORS as exc:
            a.errors["reference"] = _err(exc)
    try:
        a.supply = supply_figures(plan, dive, a.profile)
    except COMPUTE_ERRORS as exc:
        a.errors["supply"] = _err(exc)


def _carry(
    plan: Plan,
    group: list[DiveAnalysis],
    dives: dict[str, DiveAnalysis],
    pending: dict[str, tuple[list[str], dict[str, str]]],
) -> None:
    """Starting tensions of a group of dives (none follows another), then their engine runs.

    A dive after another of its diver starts from that dive's final tensions
    off-gassed over the surface interval; a first dive starts saturated with air.
    The start loading is the highest compartment loading at leaving the surface.
    """
    tissues: dict[str, tuple[Any, Any]] = {}
    after = [a for a in group if a.previous is not None]
    known = [a for a in after if dives[a.previous].evaluation is not None]  # type: ignore[index]
    for a in after:
        if dives[a.previous].evaluation is None:  # type: ignore[index]
            pending[a.id][1]["tissues"] = (
                f"the tissue state after {a.previous} is unknown (its profile could not be "
                "evaluated): this dive was computed from saturation at the surface"
            )
    items = []
    for a in known:
        ev = dives[a.previous].evaluation  # type: ignore[index]
        items.append((surface_interval_profile(plan, a.surface_interval_min),
                      ev.final_p_n2, ev.final_p_he, 0.0))
    for a, (sie, error) in zip(known, evaluations(plan, items), strict=True):
        try:
            if sie is None:
                raise _BatchError(error)
            loading = float(np.max(sie.loading_percent_of_limit))
        except (*COMPUTE_ERRORS, _BatchError) as exc:
            msg = str(exc) if isinstance(exc, _BatchError) else _err(exc)
            pending[a.id][1]["tissues"] = f"surface interval after {a.previous}: {msg}"
            continue
        tissues[a.id] = (sie.final_p_n2, sie.final_p_he)
        a.start_loading_percent = loading
    first = [a for a in group if a.previous is None]
    sat = _saturated(plan)
    items = [(surface_interval_profile(plan, 0.0), sat, np.zeros_like(sat), 0.0) for _ in first]
    for a, (ev, _) in zip(first, evaluations(plan, items), strict=True):
        try:
            a.start_loading_percent = None if ev is None else float(
                np.max(ev.loading_percent_of_limit))
        except COMPUTE_ERRORS:
            a.start_loading_percent = None
    _engine([(a, *tissues.get(a.id, (None, None))) for a in group], plan)


class _BatchError(Exception):
    """An evaluation that failed in a batch; its message is the error's text."""


def _load_reference(plan: Plan) -> tuple[Any, str | None]:
    name = plan.reference_table_source()  # a relative path: from the plan file's folder
    if not name:
        return None, None
    from supervisor.references import load_table

    try:
        return load_table(name), None
    except (*COMPUTE_ERRORS, OSError) as exc:
        return None, _err(exc)


def analyse_plan(plan: Plan, altitudes_m: tuple[float, ...] = (CABIN_ALTITUDE_M,)) -> PlanAnalysis:
    """Analyse every dive of a plan, carrying each diver's tissues across surface intervals.

    A diver's dives are taken in plan order.  A dive after another of the same
    diver starts from the tensions at the end of that dive, off-gassed on the
    surface for ``surface_interval_min`` (0, the most loaded case, when the plan
    gives none; flagged).  With ``previous_dive`` naming another diver's dive, the
    interval counts from the end of that dive but never starts before the diver's
    own previous dive ends.  The first dive of a diver starts saturated with air
    at the site: the plan is taken to hold every dive of the previous 24 hours.

    Parameters
    ----------
    plan : Plan
        The validated plan.
    altitudes_m : tuple of float
        Altitudes for the time-to-altitude figure [m]; a commercial cabin
        (8,000 ft) by default.

    Returns
    -------
    PlanAnalysis
    """
    table, table_error = _load_reference(plan)
    pol = plan.resolved_policy
    dives: dict[str, DiveAnalysis] = {}
    last: dict[str, DiveAnalysis] = {}
    pending: dict[str, tuple[list[str], dict[str, str]]] = {}
    levels: list[list[DiveAnalysis]] = []
    level_of: dict[str, int] = {}
    for d in plan.dives:  # time line, in plan order
        prev = last.get(d.diver)
        start, si, assumed = 0.0, None, False
        notes: list[str] = []
        if prev is not None:
            si = d.surface_interval_min
            if si is None:
                si, assumed = 0.0, True
                notes.append(
                    f"no surface interval after {prev.id}: none assumed (the most loaded case)"
                )
            start = prev.end_min + si
            if d.previous_dive is not None and d.previous_dive != prev.id:
                other = dives[d.previous_dive]
                start = max(prev.end_min, other.end_min + si)
                si = start - prev.end_min
                notes.append(
                    f"previous_dive {d.previous_dive} is not this diver's last dive ({prev.id}): "
                    f"the interval counts from the end of {d.previous_dive}, the tissues from "
                    f"{prev.id} ({si:.0f} min on the surface)"
                )
        elif d.surface_interval_min is not None:
            notes.append(
                "a surface interval is given but the plan holds no earlier dive of this diver: "
                "tissues taken as saturated at the surface; add the earlier dive to the plan"
            )
        a = _start(plan, d, table)
        a.previous = prev.id if prev is not None else None
        a.surface_interval_min = si
        a.interval_assumed = assumed
        a.start_min = start
        dur = a.profile.duration_min if a.profile is not None else d.bottom_time_min
        a.end_min = start + dur
        pending[d.id] = (notes, {})
        level = 0 if prev is None else level_of[prev.id] + 1
        level_of[d.id] = level
        if level == len(levels):
            levels.append([])
        levels[level].append(a)
        dives[d.id] = a
        last[d.diver] = a
    for group in levels:  # the k-th dive of every diver, together: tissues carried from k-1
        _carry(plan, group, dives, pending)
    for a in dives.values():
        _rest(plan, a)
        notes, errors = pending[a.id]
        a.notes[:0] = notes
        a.errors.update(errors)
        if table_error:
            a.errors["reference"] = table_error
    finish_dives(plan, list(dives.values()))
    divers: dict[str, DiverDay] = {}
    for a in dives.values():
        divers.setdefault(a.dive.diver, DiverDay(a.dive.diver)).dive_ids.append(a.id)
    for day in divers.values():
        mine = [dives[i] for i in day.dive_ids]
        exps = [(x.start_min, x.exposure) for x in mine if x.exposure is not None]
        if len(exps) < len(mine):
            day.errors["daily"] = "a dive's oxygen exposure could not be computed"
        if exps:
            try:
                day.daily = ox.daily_exposure(exps)
            except COMPUTE_ERRORS as exc:
                day.errors["daily"] = _err(exc)
        ev = mine[-1].evaluation
        for alt in altitudes_m:
            if ev is None:
                day.time_to_altitude_min[alt] = None
                day.errors["altitude"] = f"the last dive ({mine[-1].id}) could not be evaluated"
                continue
            try:
                day.time_to_altitude_min[alt] = time_to_altitude(
                    ev.final_p_n2, ev.final_p_he, pol.model, pol.gf_high / 100.0,
                    plan.p_surface_bar, float(altitude_pressure(alt)),
                )
            except COMPUTE_ERRORS as exc:
                day.time_to_altitude_min[alt] = None
                day.errors["altitude"] = _err(exc)
    return PlanAnalysis(dives, divers, plan.p_surface_bar, table, table_error)


#: Stop levels of model schedules one check computes (margin search, contingencies and
#: the model schedule of every dive); beyond them a dive's schedules are "not computed"
#: (needs review).  A dive of a realistic job uses about 100 when its schedules are
#: computed one at a time (fewer when batched: a batch costs its deepest dive's levels
#: once), so a week-long job of 50 dives fits; the budget bounds the worst valid plan
#: under 30 s (``bench/bench_worst.py``).  Own choice, no source.
CHECK_WORK_LEVELS = 8_000


def _saturated(plan: Plan) -> NDArray[np.float64]:
    from supervisor.engine.kinetics import saturated_tensions

    c = bm.load_coefficients(plan.resolved_policy.model)
    return saturated_tensions(plan.p_surface_bar, AIR.fn2, c.n)


def for_context(ctx: Any) -> PlanAnalysis:
    """The plan's analysis, computed once per check context and cached in it.

    Parameters
    ----------
    ctx : CheckContext
        The rules' context; the analysis is kept in ``ctx.shared["analysis"]``.

    Returns
    -------
    PlanAnalysis
    """
    pa = ctx.shared.get("analysis")
    if pa is None:
        # bounded work on any valid plan: past the budget, schedules are "not computed"
        with work_budget(CHECK_WORK_LEVELS):
            pa = analyse_plan(ctx.plan)
        ctx.shared["analysis"] = pa
    return pa


def _table_reference(table: Any) -> dict[str, Any]:
    n = len(table.row_states)
    v = table.n_verified
    return {
        "name": table.name,
        "title": table.model.title,
        "edition": table.model.provenance.edition,
        "source_status": table.least_status,
        "verification": "verified" if n and v == n else f"{v} of {n} rows verified",
    }


def _limits_reference(info: ox.TableInfo) -> dict[str, Any]:
    return {
        "name": info.name,
        "title": info.source_document,
        "edition": info.edition,
        "source_status": info.source_status,
        "verification": "verified" if info.verified else "unverified",
    }


def provide(ctx: Any) -> list[Any]:
    """Provider for the check orchestrator: fill each dive's engine-backed JSON sections.

    After it runs, ``ctx.dive_data[dive_id]`` holds the dive object's
    ``reference_schedule``, ``model_schedule``, ``model_margin``, ``oxygen``,
    ``gas_supply``, ``contingency``, ``chart`` and ``compartments`` (plus
    ``chamber_gas``, the chamber's own gas of :mod:`supervisor.analysis.chamber`,
    ``repetitive``, ``analysis_notes`` and ``analysis_errors``), and
    ``ctx.shared["references"]`` lists the reference and limit tables used.

    Returns
    -------
    list
        No findings: the rule families report on these figures.
    """
    pa = for_context(ctx)
    for i, a in pa.dives.items():
        ctx.dive_data.setdefault(i, {}).update(a.to_json())
    refs = ctx.shared.setdefault("references", [])
    seen = {r.get("name") for r in refs}
    extra = []
    if pa.table is not None:
        extra.append(_table_reference(pa.table))
    day = next((d.daily for d in pa.divers.values() if d.daily is not None), None)
    if day is not None:
        extra += [_limits_reference(day.cns_limits), _limits_reference(day.pulmonary_limits)]
    for ref in extra:
        if ref["name"] not in seen:
            refs.append(ref)
            seen.add(ref["name"])
    return []
