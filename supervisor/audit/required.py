"""The schedule the dive now requires: the actual exposure against the approved one.

The actual exposure is the executed maximum depth and bottom time.  The bottom
time is rounded up to the next whole minute and the table is entered at the
depth equal to or next deeper and the bottom time equal to or next longer, as
the trade enters a printed table (U.S. Navy Diving Manual, Rev 4 Change A
ch. 9, OLDER-EDITION; :mod:`supervisor.references.lookup`).  Two schedules are
found for it:

* the policy's reference table (``policy.reference_table``), at the
  sea-level-equivalent depth at altitude, in the dive's decompression mode;
* the model's own schedule (:mod:`supervisor.engine.schedule`), with the same
  model, gradient factors, rates, stop step and decompression gases as the
  check's (:func:`supervisor.analysis.schedule_request`), from the tissues the
  plan gives the dive.

When the dive stayed within its approved depth and bottom time, the approved
stops govern (the check compared them with the table and the model before the
dive) and these schedules are information.  When it went deeper or longer, the
approved schedule no longer covers it: the executed stops are compared with the
required ones, a table row short fails only when the row is verified and from a
VERIFIED source (else warns), a model schedule short needs review (the executed
profile's model ceiling, :mod:`supervisor.audit.margin`, is the model's test).
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import Any

from supervisor.audit.context import (
    FAMILY,
    OMITTED_DECOMPRESSION,
    AuditContext,
    PlanAudit,
    with_action,
)
from supervisor.audit.stops import Spec, StopTime, measure
from supervisor.findings import Finding
from supervisor.rules.base import Rule

TABLE_USE = "U.S. Navy Diving Manual, Rev 4 Change A, ch. 9 (table selection)"


@dataclass
class Required:
    """The actual exposure and the schedules it requires.

    Attributes
    ----------
    planned_depth, planned_bottom_time : float
        The approved dive [unit], [min].
    depth : float
        Executed maximum depth [unit], to 0.1.
    bottom_time : float or None
        Executed bottom time rounded up to the whole minute [min]; None if unknown.
    table : LookupResult or None
        The reference table's schedule; ``table_error`` says why there is none.
    model : ScheduleResult or None
        The model's schedule; ``model_error`` says why there is none.
    request : ScheduleRequest or None
        The model request.
    """

    planned_depth: float
    planned_bottom_time: float
    depth: float
    bottom_time: float | None
    table: Any = None
    table_error: str | None = None
    model: Any = None
    model_error: str | None = None
    request: Any = None

    @property
    def deeper(self) -> bool:
        """Deeper than approved."""
        return self.depth > self.planned_depth + 1e-9

    @property
    def longer(self) -> bool:
        """Longer than approved (whole minutes)."""
        return self.bottom_time is not None and self.bottom_time > self.planned_bottom_time + 1e-9

    @property
    def beyond(self) -> bool:
        """Deeper or longer than approved (or the bottom time unknown)."""
        return self.deeper or self.longer or self.bottom_time is None

    def to_json(self) -> dict[str, Any]:
        """JSON-ready form (``required_schedule`` of the audit)."""
        model = None
        if self.model is not None:
            m = self.model
            model = {"stops": [s.to_dict() for s in m.stops], "total_stop_min": m.total_stop_min,
                     "total_ascent_min": m.total_ascent_min,
                     "no_stop_limit_min": m.no_stop_limit_min,
                     "first_stop_depth": m.first_stop_depth,
                     "coefficient_status": m.coefficient_status}
        return {
            "approved": {"depth": self.planned_depth, "bottom_time_min": self.planned_bottom_time},
            "actual": {"depth": self.depth, "bottom_time_min": self.bottom_time,
                       "bottom_time_rounding": "up to the next whole minute"},
            "deeper_than_approved": self.deeper, "longer_than_approved": self.longer,
            "governs": "required" if self.beyond else "approved",
            "table": None if self.table is None else self.table.to_dict(),
            "table_error": self.table_error,
            "model": model, "model_error": self.model_error,
        }


def actual(ctx: AuditContext) -> Required:
    """The actual exposure of an executed dive (schedules not yet filled)."""
    bt = ctx.ex.bottom_time_min
    return Required(
        planned_depth=float(ctx.dive.max_depth),
        planned_bottom_time=float(ctx.dive.bottom_time_min),
        depth=math.ceil(ctx.ex.max_depth * 10.0 - 1e-6) / 10.0,
        bottom_time=None if bt is None else float(math.ceil(bt - 1e-6)),
    )


def fill(pa: PlanAudit, ctxs: Sequence[AuditContext]) -> None:
    """The required schedules of many executed dives; model schedules in one batch."""
    from supervisor.analysis import COMPUTE_ERRORS, _lookup, schedule_request
    from supervisor.analysis.batch import schedules, variant

    asked: list[tuple[Required, Any]] = []
    for ctx in ctxs:
        req = actual(ctx)
        ctx.required = req
        if req.bottom_time is None:
            req.table_error = req.model_error = "the bottom time is not known from the log"
            continue
        dive = variant(ctx.dive, max_depth=req.depth, bottom_time_min=req.bottom_time)
        if pa.table is not None:
            try:
                req.table = _lookup(pa.plan, pa.table, dive, req.depth, req.bottom_time)
            except COMPUTE_ERRORS as exc:
                req.table_error = f"{type(exc).__name__}: {exc}"
        else:
            req.table_error = pa.table_error or "the policy names no reference table"
        a = ctx.analysis()
        try:
            req.request = schedule_request(pa.plan, dive, None if a is None else a.p_n2_0,
                                           None if a is None else a.p_he_0)
            asked.append((req, req.request))
        except COMPUTE_ERRORS as exc:
            req.model_error = f"{type(exc).__name__}: {exc}"
    # one batch for every distinct request (many logs of one dive share them)
    keys: dict[Any, int] = {}
    todo = []
    for _req, r in asked:
        keys.setdefault(r, len(todo))
        if keys[r] == len(todo):
            todo.append(r)
    results = schedules(todo, details=False)  # stops only: no profile or oxygen needed
    for req, r in asked:
        res, err = results[keys[r]]
        req.model, req.model_error = res, err


def _table_specs(ctx: AuditContext, look: Any) -> list[Spec]:
    from supervisor.analysis import from_table_depth
    from supervisor.gas import parse_gas

    unit = ctx.pa.table.model.conventions.depth_unit
    return [(from_table_depth(ctx.pa.plan, float(s.depth), unit), s.place, parse_gas(s.gas).name,
             float(s.minutes)) for s in look.schedule.stops]


def _short(times: list[StopTime], unit: str) -> str:
    return "; ".join(f"{s.where(unit)}: {'missed' if s.missed else f'{s.measured_min:.1f} min'} "
                     f"of {s.required_min:g}" for s in times if s.short)


def _stops_text(stops: Sequence[Any], unit: str) -> str:
    return ", ".join(f"{float(s.depth):g} {unit} {s.place} {float(s.minutes):g} min {s.gas}"
                     for s in stops) or "no stops"


@FAMILY.rule(
    "audit-exposure",
    title="Maximum depth and bottom time within the approved dive",
    citation="the approved plan (dives[].max_depth, dives[].bottom_time_min)",
    kind="plan",
)
def exposure(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The actual exposure against the approved one; beyond it the required schedule governs."""
    q = ctx.required
    u = ctx.unit
    bt = "unknown" if q.bottom_time is None else f"{q.bottom_time:g} min"
    measured = f"{q.depth:g} {u} / {bt}"
    limit = f"{q.planned_depth:g} {u} / {q.planned_bottom_time:g} min"
    basis = ctx.ex.bottom_time_basis
    if not q.beyond:
        yield r.ok(f"the dive stayed within its approved depth and bottom time (bottom time "
                   f"{basis})", measured=measured, limit=limit, dive=ctx.dive.id)
        return
    what = " and ".join(w for w, b in (("deeper", q.deeper), ("longer", q.longer)) if b)
    if q.bottom_time is None:
        what = "of unknown bottom time"
    yield r.finding("warn", f"the dive went {what} than approved: the approved schedule no "
                    "longer covers it; the schedule the actual exposure requires governs "
                    f"(required_schedule; bottom time {basis})", measured=measured,
                    limit=limit, dive=ctx.dive.id)


@FAMILY.rule(
    "audit-required-table",
    title="Executed stops against the reference table's schedule for the actual exposure",
    citation=f"contractor policy (policy.reference_table); {TABLE_USE}",
    kind="reference",
)
def table(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The table schedule the actual exposure requires, and the executed stops against it."""
    q = ctx.required
    if not ctx.policy.reference_table:
        return
    kw: dict[str, Any] = dict(dive=ctx.dive.id)
    look = q.table
    if look is None:
        yield r.review(f"needs review: no table schedule for the actual exposure "
                       f"({q.table_error})", measured="not looked up", **kw)
        return
    u = ctx.unit
    where = f"{look.table} {look.depth_requested:g}/{look.bottom_time_requested:g}"
    if look.outside_table and look.row is None:
        yield r.breach(f"the actual exposure is beyond {look.table}, the table the policy names "
                       f"({look.reason}): there is no schedule to decompress on",
                       measured=f"{q.depth:g} {u} / {q.bottom_time:g} min", limit=look.table,
                       kind="policy", **kw)
        return
    trusted = not look.needs_review
    status = look.source_status or None
    row = f"row {look.row} ({look.verification}, {look.source_status})"
    if look.schedule is None:
        yield r.review(f"needs review: {where}: {look.reason or 'no schedule in this mode'}",
                       measured="no schedule", limit=look.table, status=status, **kw)
        return
    stops = _stops_text(look.schedule.stops, look.unit)
    if not q.beyond:
        yield r.note(f"the table schedule for the actual exposure: {look.depth:g} "
                     f"{look.unit} / {look.bottom_time:g} min, {row}: {stops}; the approved "
                     "stops govern", measured=f"{q.depth:g} {u} / {q.bottom_time:g} min",
                     limit=f"{look.depth:g} {look.unit} / {look.bottom_time:g} min",
                     status=status, **kw)
        return
    times = measure(ctx.ex, _table_specs(ctx, look), ctx.step, ctx.travel_rate)
    short = [s for s in times if s.short]
    limit = f"{look.depth:g} {look.unit} / {look.bottom_time:g} min: {stops}"
    if short:
        text = (f"omitted decompression against the table schedule the actual exposure "
                f"requires ({look.depth:g} {look.unit} / {look.bottom_time:g} min, {row}): "
                f"{_short(times, u)}")
        if trusted:
            f = r.breach(text, measured=_short(times, u), limit=limit, status=status, **kw)
        else:  # a row not verified, or not from a VERIFIED source, can only warn
            f = r.finding("warn", text, measured=_short(times, u), limit=limit, status=status,
                          verified=False, **kw)
        yield with_action(f, OMITTED_DECOMPRESSION)
    else:
        yield r.ok(f"every stop of the table schedule for the actual exposure was taken "
                   f"({look.depth:g} {look.unit} / {look.bottom_time:g} min, {row})",
                   measured=f"{len(times)} of {len(times)} stops taken", limit=limit,
                   status=status, verified=trusted, **kw)


@FAMILY.rule(
    "audit-required-model",
    title="Executed stops against the model's schedule for the actual exposure",
    citation="contractor policy (policy.model, policy.gf_low, policy.gf_high); schedule "
             "conventions of supervisor.engine.schedule",
    kind="policy",
)
def model(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The model's schedule for the actual exposure; short executed stops need review."""
    q = ctx.required
    kw: dict[str, Any] = dict(dive=ctx.dive.id, unit="min")
    res = q.model
    tissues = ctx.tissues_unknown()
    if tissues is not None:
        yield r.review(f"needs review: the model schedule for the actual exposure rests on "
                       f"unknown tissues ({tissues})", measured="not computed", **kw)
        return
    if res is None:
        yield r.review(f"needs review: the model schedule for the actual exposure could not be "
                       f"computed ({q.model_error})", measured="not computed", **kw)
        return
    u = ctx.unit
    stops = _stops_text(res.stops, u)
    status = f"coefficients {res.coefficient_status}"
    if not q.beyond:
        yield r.note(f"the model's schedule for the actual exposure: {stops} ({status}); the "
                     "approved stops govern", measured=float(res.total_stop_min),
                     limit=None, **kw)
        return
    specs = [(float(s.depth), s.place, s.gas, float(s.minutes)) for s in res.stops]
    times = measure(ctx.ex, specs, ctx.step, ctx.travel_rate)
    if any(s.short for s in times):
        yield r.review(f"needs review: the executed stops fall short of the model's schedule "
                       f"for the actual exposure ({stops}; {status}): {_short(times, u)}",
                       measured=round(sum(s.measured_min for s in times), 1),
                       limit=float(res.total_stop_min), **kw)
    else:
        yield r.ok(f"every stop of the model's schedule for the actual exposure was taken "
                   f"({stops}; {status})", measured=round(sum(s.measured_min for s in times), 1),
                   limit=float(res.total_stop_min), **kw)
