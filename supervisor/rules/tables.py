"""Table conformance: the proposed stops against the reference table the policy names.

The table is entered the way the trade enters a printed table: at the depth equal
to or next deeper than the dive's sea-level-equivalent depth (the altitude
correction of the Navy procedure) and at the bottom time equal to or next longer
(:mod:`supervisor.references.lookup`).  Every stop of the reference schedule must
be in the plan, at the same place, on the same gas, within a tenth of the policy's
stop step of the table depth (converted back to the site at altitude), and at
least as long.  Stop minutes are compared minute for minute; where a table counts
the travel from the previous stop in the stop time, this is conservative by that
travel.  For surface decompression the chamber oxygen time must reach the table's
oxygen periods.

Severity: a dive beyond the table the contractor chose to dive by fails (the
policy names the table; there is no schedule to follow).  A dive that misses a
required stop fails only on a verified row from a VERIFIED source and warns
otherwise.  A dive that conforms to a row that is not verified, or from a source
that is not VERIFIED, needs review.  Until the references hold decompression
schedules, a decompression dive against a no-stop table needs review.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 9: table
       selection (exact or next greater depth, exact or next longer time),
       diving at altitude (OLDER-EDITION).
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field
from typing import Any

from supervisor import analysis as an
from supervisor.findings import CONFIRMED_STATUSES, Finding
from supervisor.gas import parse_gas
from supervisor.periods import is_oxygen_rich, pattern_difference
from supervisor.plan import Dive
from supervisor.rules.base import CheckContext, Family, Rule

FAMILY = Family("tables", "Reference table conformance")

NAVY_TABLE_USE = "U.S. Navy Diving Manual, Rev 4 Change A, ch. 9 (table selection, altitude)"


@dataclass(frozen=True)
class StopCheck:
    """One required stop of the reference schedule against the plan.

    Attributes
    ----------
    depth : float
        Required stop depth at the site [plan unit].
    place, gas : str
        Where and on what the table takes it.
    required_min : float
        Required minutes [min].
    proposed_min : float or None
        Minutes of the matching proposed stop; None when the plan has none.
    """

    depth: float
    place: str
    gas: str
    required_min: float
    proposed_min: float | None

    @property
    def ok(self) -> bool:
        """Present and at least as long."""
        return self.proposed_min is not None and self.proposed_min + 1e-9 >= self.required_min


@dataclass
class TableCheck:
    """The comparison of one dive with the reference table.

    Attributes
    ----------
    state : str
        ``conforms``; ``short`` (a stop missing or too short); ``outside`` (deeper
        or longer than the table); ``beyond-no-stop`` (a no-stop table, the bottom
        time beyond its limit and no decompression planned); ``no-schedule`` (a
        decompression dive against a no-stop table, or a row without a schedule in
        the dive's mode); ``not-permitted``; ``not-applicable`` (another gas);
        ``no-table`` or ``error``.
    trusted : bool
        True when the row is inside the table, verified, from a VERIFIED source,
        and the dive conforms: only then may the table alone support a pass.
    look : LookupResult or None
        The look-up.
    stops : list of StopCheck
        Per required stop.
    reason : str
        Why the check could not be made, for ``no-table``/``error``/``not-applicable``.
    """

    state: str
    trusted: bool = False
    look: Any = None
    stops: list[StopCheck] = field(default_factory=list)
    reason: str = ""


def _match(ctx: CheckContext, dive: Dive, depth: float, place: str) -> list[Any]:
    tol = an.STOP_MATCH_FRACTION * float(ctx.policy.stop_step)
    return [s for s in dive.stops if s.place == place and abs(s.depth - depth) <= tol + 1e-9]


def stop_checks(ctx: CheckContext, dive: Dive, look: Any, table: Any) -> list[StopCheck]:
    """Each required stop of a schedule look-up against the dive's proposed stops.

    Parameters
    ----------
    ctx : CheckContext
        The rules' context.
    dive : Dive
        The dive.
    look : LookupResult
        A schedule look-up (``look.schedule`` not None) in ``table``.
    table : Table
        The decompression table looked up.

    Returns
    -------
    list of StopCheck
        One per stop of the schedule (at the site's depth, same place, same gas), and
        for surface decompression one for the chamber oxygen time of its periods.
    """
    t_unit = table.model.conventions.depth_unit
    checks: list[StopCheck] = []
    for s in look.schedule.stops:
        depth = an.from_table_depth(ctx.plan, float(s.depth), t_unit)
        gas = parse_gas(s.gas)
        found = [x for x in _match(ctx, dive, depth, s.place) if dive.stop_gas(x) == gas]
        mins = sum(x.minutes for x in found) if found else None
        checks.append(StopCheck(depth, s.place, gas.name, float(s.minutes), mins))
    periods = look.schedule.chamber_o2_periods
    conv = table.model.conventions
    if periods:
        per = float(getattr(conv, "chamber_o2_period_min", None) or an.O2_AIR_BREAK[0])
        o2 = [x for x in dive.chamber_stops if dive.stop_gas(x).fo2 >= 0.99]
        got = sum(x.minutes for x in o2) if o2 else None
        checks.append(StopCheck(0.0, "chamber", "oxygen", float(periods) * per, got))
    return checks


def shortfall(ctx: CheckContext, checks: list[StopCheck]) -> str:
    """The stops of ``checks`` that are missing or too short, as one phrase."""
    return "; ".join(
        f"{c.place} {'oxygen time' if c.depth == 0 else f'stop {c.depth:g} {ctx.unit}'} "
        f"on {c.gas}: "
        + (f"{c.proposed_min:g} of {c.required_min:g} min" if c.proposed_min is not None
           else f"missing ({c.required_min:g} min required)")
        for c in checks if not c.ok
    )


def _pattern(ctx: CheckContext, dive: Dive, look: Any, table: Any) -> str | None:
    """The sentence saying the plan's oxygen pattern differs from the row's, or ``None``."""
    t_unit = table.model.conventions.depth_unit
    mine = [(round(float(s.depth), 1), dive.stop_gas(s).name, s.place) for s in dive.stops]
    theirs = [(round(an.from_table_depth(ctx.plan, float(s.depth), t_unit), 1),
               parse_gas(s.gas).name, s.place) for s in look.schedule.stops]
    # a plan breathing no oxygen where the table does has the wrong gas, not another pattern
    o2 = {place for _, gas, place in theirs if is_oxygen_rich(gas)}
    if not o2 or not o2 <= {place for _, gas, place in mine if is_oxygen_rich(gas)}:
        return None
    return pattern_difference(mine, theirs, ctx.unit)


def _stop_figures(ctx: CheckContext, c: StopCheck) -> tuple[str, str]:
    """Measured and limit of a short stop with their context (never a bare "0 min / 1 min")."""
    where = (f"{c.place} O2 time" if c.depth == 0 else
             f"{c.depth:g} {ctx.unit} {c.place} {c.gas}")
    have = "none" if c.proposed_min is None else f"{c.proposed_min:g} min"
    return f"{where}: {have}", f"{where}: {c.required_min:g} min"


def table_check(ctx: CheckContext, a: an.DiveAnalysis) -> TableCheck:
    """Compare one dive's proposed stops with the reference table (module docstring).

    Parameters
    ----------
    ctx : CheckContext
        The rules' context.
    a : DiveAnalysis
        The dive's analysis (holds the look-up).

    Returns
    -------
    TableCheck
    """
    pa = an.for_context(ctx)
    dive = a.dive
    if not ctx.policy.reference_table:
        return TableCheck("no-table", reason="the policy names no reference table")
    if pa.table is None or a.table is None:
        return TableCheck("error", reason=pa.table_error or "the reference table was not loaded")
    table = a.table
    t_gas = parse_gas(table.model.conventions.gas)
    if t_gas != dive.gas_mix:
        return TableCheck(
            "not-applicable",
            reason=f"{table.name} is for {t_gas.name}; the dive breathes {dive.gas_mix.name}",
        )
    look = a.reference
    if look is None:
        return TableCheck("error", reason=a.errors.get("reference", "no look-up"))
    if look.outside_table:
        if look.row is not None:  # the row exists but has no schedule in this mode
            return TableCheck("no-schedule", look=look)
        return TableCheck("outside", look=look)
    if table.kind == "no-stop":
        if look.within_no_stop_limit:
            return TableCheck("conforms", trusted=not look.needs_review, look=look)
        if dive.declared_outside_ndl or dive.stops:
            return TableCheck("no-schedule", look=look)
        return TableCheck("beyond-no-stop", look=look)
    if not look.permitted:
        return TableCheck("not-permitted", look=look)
    checks = stop_checks(ctx, dive, look, table)
    ok = all(c.ok for c in checks)
    return TableCheck(
        "conforms" if ok else "short", trusted=ok and not look.needs_review, look=look,
        stops=checks,
    )


def _where(ctx: CheckContext, a: an.DiveAnalysis, look: Any) -> str:
    unit = look.unit
    alt = ""
    if ctx.plan.p_surface_bar < 1.01325 - 1e-9 and a.table_depth is not None:
        alt = (f" (sea-level-equivalent depth {a.table_depth:.1f} {unit} for the site at "
               f"{ctx.plan.site.altitude_m:g} m)")
    bt = f"/{look.bottom_time:g} min" if look.bottom_time is not None else ""
    return f"{look.table} at {look.depth:g} {unit}{bt}{alt}"


def _breach(r: Rule, look: Any, message: str, **kw: Any) -> Finding:
    """A missed requirement of a row: fails on a verified row from a VERIFIED source, else warns."""
    if look.verification == "verified" and look.source_status in CONFIRMED_STATUSES:
        return r.breach(message, status=look.source_status, **kw)
    return r.finding("warn", message, status=look.source_status or None, verified=False, **kw)


def _row_state(look: Any) -> str:
    return f"row {look.row}: {look.verification}, {look.source_status}"


@FAMILY.rule(
    "table-conformance",
    title="Proposed stops cover the reference schedule",
    citation=NAVY_TABLE_USE,
    kind="reference",
)
def conformance(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Every stop of the reference schedule present and at least as long."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        tc = table_check(ctx, a)
        look = tc.look
        if tc.state in ("no-table", "error", "not-applicable"):
            measured, limit = {
                "no-table": ("none", None),
                "error": ("not loaded", None),
                "not-applicable": (d.gas_mix.name, a.table.model.conventions.gas
                                   if a.table is not None else None),
            }[tc.state]
            yield r.review(
                f"needs review: {tc.reason}; the proposed stops were checked against the model "
                "only, which cannot stand in for a verified table",
                dive=d.id, status=None, measured=measured, limit=limit,
            )
            continue
        if tc.state == "outside":
            continue  # table-outside reports it
        status = look.source_status or None
        where = _where(ctx, a, look)
        if tc.state == "no-schedule" and look.outside_table:
            yield r.review(
                f"needs review: reference schedule not available: {look.reason} in {look.table}",
                dive=d.id, status=status, measured="no schedule",
            )
        elif tc.state == "no-schedule":
            yield r.review(
                f"needs review: reference schedule not available: {look.table} gives no-stop "
                f"limits only and the bottom time {d.bottom_time_min:g} min is beyond its limit "
                f"of {look.no_stop_limit:g} min at {look.depth:g} {look.unit}",
                measured=d.bottom_time_min, limit=look.no_stop_limit, unit="min", dive=d.id,
                status=status,
            )
        elif tc.state == "beyond-no-stop":
            yield _breach(
                r, look,
                f"bottom time {d.bottom_time_min:g} min is beyond the no-stop limit of "
                f"{look.no_stop_limit:g} min ({where}; {_row_state(look)}) and the plan has no "
                "decompression",
                measured=d.bottom_time_min, limit=look.no_stop_limit, unit="min", dive=d.id,
            )
        elif tc.state == "not-permitted":
            yield _breach(
                r, look, f"the source marks the {look.mode} schedule of {where} as not to be used",
                dive=d.id, measured=look.mode, limit="a schedule the source permits",
            )
        elif tc.state == "short" and (pattern := _pattern(ctx, d, look, a.table)):
            # another oxygen pattern (e.g. chamber oxygen at 50/40 against stops at 20/10):
            # said once, and cover is left to the model (model-margin, model-ceiling)
            yield r.review(
                f"needs review: {pattern} ({where}; {_row_state(look)})",
                dive=d.id, status=status, measured="the plan's oxygen pattern",
                limit="the table's oxygen pattern",
            )
        elif tc.state == "short":
            worst = next(c for c in tc.stops if not c.ok)
            text = shortfall(ctx, tc.stops)
            measured, limit = _stop_figures(ctx, worst)
            yield _breach(
                r, look, f"the proposed stops do not cover {where} ({_row_state(look)}): {text}",
                measured=measured, limit=limit, dive=d.id,
            )
        elif tc.trusted:
            yield r.ok(
                f"the proposed stops cover {where} ({_row_state(look)})", dive=d.id,
                status=status,
            )
        else:
            # the row's status is reported once for the job (references-unverified)
            yield r.note(
                f"the proposed stops cover {where} ({_row_state(look)}: to be confirmed, see "
                "references-unverified)",
                dive=d.id, status=status, verified=False,
                measured=f"row {look.row}", limit="a verified row",
            )
        if look.exceptional_exposure:
            yield r.review(
                f"needs review: {where} is an exceptional-exposure schedule",
                dive=d.id, status=status, measured="exceptional exposure",
            )
        if a.repetitive:
            yield r.review(
                f"needs review: repetitive dive {a.surface_interval_min:.0f} min after "
                f"{a.previous}; the table was entered with the dive's own bottom time, without "
                "the residual nitrogen time of the repetitive group, which the reference does "
                "not give here",
                dive=d.id, status=status, measured=round(a.surface_interval_min or 0.0, 1),
                unit="min",
            )


@FAMILY.rule(
    "table-outside",
    title="The dive lies within the reference table",
    citation="contractor policy (policy.reference_table)",
    kind="policy",
)
def outside(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A dive beyond the policy's reference table has no schedule to follow: fail."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        look = a.reference
        if look is None or not ctx.policy.reference_table:
            continue
        if look.outside_table and look.row is None:
            rows = a.table.rows if a.table is not None else []
            if look.depth is None:
                measured, limit, unit = round(look.depth_requested, 1), max(
                    (float(x.depth) for x in rows), default=None), look.unit
            else:
                measured, unit = look.bottom_time_requested, "min"
                limit = max((float(getattr(x, "bottom_time", 0.0)) for x in rows
                             if x.depth == look.depth), default=None)
            yield r.breach(
                f"outside the reference table: {look.reason}; the policy's table gives no "
                "schedule for this dive",
                measured=measured, limit=limit, unit=unit, dive=d.id,
            )
        elif look.outside_table:
            continue  # the row exists without a schedule in this mode: table-conformance
        else:
            yield r.ok(
                f"within {look.table}: entered at {look.depth:g} {look.unit}", dive=d.id,
                measured=round(look.depth_requested, 1), limit=look.depth, unit=look.unit,
            )
