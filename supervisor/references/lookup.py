"""Look-up in no-stop and decompression tables, for the rules layer.

The tables are entered the way the trade enters a printed table: at the table
depth equal to or next deeper than the dive's depth, then at the bottom time
equal to or next longer than the dive's bottom time (the rounding rule every
file states in its conventions).  A dive beyond the table (deeper than the
deepest depth, or longer than the longest bottom time at that depth) gives an
explicit outside-table result, never the nearest row.  Every result carries
the row's effective verification and source status; :attr:`LookupResult.needs_review`
is True unless the row is verified, from a VERIFIED source and inside the table.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from supervisor.errors import InputError, TableError
from supervisor.periods import breaks_between, cycle_across, periods_json
from supervisor.references.loader import Table
from supervisor.references.schema import MODE_TITLES, MODES, Mode, Schedule

_TOL = 1e-9


@dataclass(frozen=True)
class LookupResult:
    """The answer of a table look-up.

    Attributes
    ----------
    table : str
        Table name.
    unit : str
        Depth unit of the table.
    depth_requested, bottom_time_requested : float
        The dive [unit], [min].
    outside_table : bool
        True when the dive is beyond the table; nothing else is then filled in.
    reason : str
        Why the result needs review or is outside the table, or ``""``.
    depth : float or None
        Table depth entered [unit].
    bottom_time : float or None
        Table bottom time entered [min] (for a no-stop look-up, the time of the
        repetitive group entered, when known).
    row : int or None
        1-based row number in the file.
    no_stop_limit : float or None
        No-stop limit at the table depth [min]; ``inf`` when unlimited.
    within_no_stop_limit : bool or None
        For a no-stop look-up: True when the bottom time is within the limit.
    repetitive_group : str or None
        Group letter, when the table gives one.  None means the table gives no
        group for this dive: a repetitive-dive rule must treat it as missing data.
    exceptional_exposure : bool
        True when the source marks the schedule as exceptional exposure.
    mode : str or None
        Decompression mode of a schedule look-up.
    schedule : Schedule or None
        The schedule found.
    permitted : bool
        False when the source marks the schedule as not to be used in this mode.
    verification : {"verified", "unverified"}
        Effective verification of the row (after the hash checks).
    source_status : str
        Source status of the row.
    """

    table: str
    unit: str
    depth_requested: float
    bottom_time_requested: float
    outside_table: bool
    reason: str = ""
    depth: float | None = None
    bottom_time: float | None = None
    row: int | None = None
    no_stop_limit: float | None = None
    within_no_stop_limit: bool | None = None
    repetitive_group: str | None = None
    exceptional_exposure: bool = False
    mode: str | None = None
    schedule: Schedule | None = None
    permitted: bool = True
    verification: str = "unverified"
    source_status: str = ""
    notes: tuple[str, ...] = field(default_factory=tuple)
    periods: tuple[tuple[tuple[str, float], ...], ...] = field(default_factory=tuple)

    @property
    def needs_review(self) -> bool:
        """True unless the row is inside the table, verified and from a VERIFIED source."""
        return (self.outside_table or self.verification != "verified"
                or self.source_status != "VERIFIED" or not self.permitted)

    def to_dict(self) -> dict[str, Any]:
        """Return a JSON-ready dict (``inf`` limits written as ``"unlimited"``)."""
        lim = self.no_stop_limit
        return {
            "table": self.table,
            "unit": self.unit,
            "depth_requested": self.depth_requested,
            "bottom_time_requested": self.bottom_time_requested,
            "outside_table": self.outside_table,
            "reason": self.reason,
            "depth": self.depth,
            "bottom_time_min": self.bottom_time,
            "row": self.row,
            "no_stop_limit_min": "unlimited" if lim is not None and math.isinf(lim) else lim,
            "within_no_stop_limit": self.within_no_stop_limit,
            "repetitive_group": self.repetitive_group,
            "exceptional_exposure": self.exceptional_exposure,
            "mode": self.mode,
            "stops": [self._stop(i, s) for i, s in enumerate(self.schedule.stops)]
            if self.schedule else [],
            "total_ascent_min": self.schedule.total_ascent if self.schedule else None,
            "chamber_o2_periods": self.schedule.chamber_o2_periods if self.schedule else None,
            "permitted": self.permitted,
            "row_verification": self.verification,
            "source_status": self.source_status,
            "needs_review": self.needs_review,
            "notes": list(self.notes),
        }


    def _stop(self, i: int, stop: Any) -> dict[str, Any]:
        """One stop of the schedule with its breathing periods (air breaks)."""
        d = stop.model_dump()
        periods = self.periods[i] if i < len(self.periods) else ((d["gas"], d["minutes"]),)
        d["periods"] = periods_json(periods)
        return d


def schedule_periods(conventions: Any, schedule: Schedule) -> tuple[
        tuple[tuple[str, float], ...], ...]:
    """Breathing periods of each stop of a table schedule, from the table's conventions.

    In the water, oxygen stops whose minutes count the air breaks
    (``air_breaks_in_stop_time``) run one oxygen/air cycle across the oxygen
    stops; otherwise a break follows every full oxygen period that more oxygen
    follows.  Chamber stops take ``chamber_o2_period_min`` periods with
    ``chamber_air_break_min`` breaks between them, not counted in the stop minutes.
    Without period and break lengths a stop is one period.
    """
    def get(name: str) -> Any:
        return getattr(conventions, name, None)

    out: list[tuple[tuple[str, float], ...]] = []
    water = [(s.gas, float(s.minutes)) for s in schedule.stops if s.place == "water"]
    chamber = [(s.gas, float(s.minutes)) for s in schedule.stops if s.place != "water"]
    if get("air_breaks_in_stop_time"):
        wp = cycle_across(water, get("o2_period_min"), get("air_break_min"))
    else:
        wp = breaks_between(water, get("o2_period_min"), get("air_break_min"))
    cp = breaks_between(chamber, get("chamber_o2_period_min"), get("chamber_air_break_min"))
    wi, ci = iter(wp), iter(cp)
    for s in schedule.stops:
        out.append(tuple(next(wi) if s.place == "water" else next(ci)))
    return tuple(out)


def _check_inputs(depth: float, bottom_time: float) -> tuple[float, float]:
    for name, v, unit in (("depth", depth, "table depth unit"), ("bottom_time", bottom_time,
                                                                  "min")):
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v) \
                or v < 0:
            raise InputError(name, f"got {v!r}; expected a finite number >= 0 [{unit}]")
    return float(depth), float(bottom_time)


def _row_status(table: Table, index: int) -> tuple[str, str, tuple[str, ...]]:
    st = table.row_states[index]
    notes = (st.reason,) if st.reason and st.reason != "not verified" else ()
    return ("verified" if st.verified else "unverified"), st.source_status, notes


def _entry_depth(depths: list[float], depth: float) -> float | None:
    for d in sorted(set(depths)):
        if depth <= d + _TOL:
            return d
    return None


def lookup_no_stop(table: Table, depth: float, bottom_time: float) -> LookupResult:
    """Look up a no-stop dive: the limit and repetitive group at the next deeper depth.

    Parameters
    ----------
    table : Table
        A loaded ``no-stop`` table.
    depth : float
        Maximum depth of the dive, already corrected as the file's conventions
        require [table depth unit].
    bottom_time : float
        Bottom time as the file defines it [min].

    Returns
    -------
    LookupResult
        Outside the table when deeper than the deepest row.  Otherwise the
        limit at the entered depth, whether the bottom time is within it, and
        the group of the next longer group time (None when the table has no
        groups or the time falls in a gap).

    Raises
    ------
    TableError
        If the table is not a no-stop table.
    InputError
        If depth or bottom time is negative or not finite.
    """
    if table.kind != "no-stop":
        raise TableError(f"{table.name} is a {table.kind} table; lookup_no_stop needs a "
                         "no-stop table")
    depth, bottom_time = _check_inputs(depth, bottom_time)
    unit = table.model.conventions.depth_unit
    rows = table.rows
    entered = _entry_depth([r.depth for r in rows], depth)
    if entered is None:
        deepest = max(r.depth for r in rows)
        return LookupResult(table.name, unit, depth, bottom_time, True,
                            reason=f"{depth:g} {unit} is deeper than the deepest row of "
                            f"{table.name} ({deepest:g} {unit})")
    i = next(k for k, r in enumerate(rows) if r.depth == entered)
    r = rows[i]
    verification, status, notes = _row_status(table, i)
    within = bottom_time <= r.limit_min + _TOL
    group = None
    bt_entered = None
    reason = ""
    letters = table.model.conventions.repetitive_groups
    if not within:
        reason = (f"bottom time {bottom_time:g} min is beyond the no-stop limit "
                  f"{r.limit_min:g} min at {entered:g} {unit}: a decompression dive")
    elif not r.repetitive_groups:
        reason = "this table gives no repetitive groups at this depth"
    else:
        ranked = sorted(r.repetitive_groups.items(), key=lambda kv: letters.index(kv[0]))
        hit = next(((g, t) for g, t in ranked if bottom_time <= t + _TOL), None)
        if hit is None:
            reason = f"no repetitive group for {bottom_time:g} min at {entered:g} {unit}"
        else:
            group, bt_entered = hit
    return LookupResult(
        table.name, unit, depth, bottom_time, False, reason=reason, depth=entered,
        bottom_time=bt_entered, row=i + 1, no_stop_limit=r.limit_min,
        within_no_stop_limit=within, repetitive_group=group, verification=verification,
        source_status=status, notes=notes,
    )


def lookup_schedule(table: Table, depth: float, bottom_time: float,
                    mode: Mode = "air") -> LookupResult:
    """Look up a decompression schedule at the next deeper depth and next longer time.

    Parameters
    ----------
    table : Table
        A loaded ``decompression`` table.
    depth : float
        Maximum depth [table depth unit].
    bottom_time : float
        Bottom time [min].
    mode : {"air", "air_o2", "surd_o2"}
        Decompression mode.

    Returns
    -------
    LookupResult
        Outside the table when deeper than the deepest depth, longer than the
        longest bottom time at the entered depth, or when the row found has no
        schedule in ``mode``.

    Raises
    ------
    TableError
        If the table is not a decompression table.
    InputError
        If the inputs are negative, not finite, or the mode is unknown.
    """
    if table.kind != "decompression":
        raise TableError(f"{table.name} is a {table.kind} table; lookup_schedule needs a "
                         "decompression table")
    if mode not in MODES:
        raise InputError("mode", f"got {mode!r}; expected one of {', '.join(MODES)}")
    depth, bottom_time = _check_inputs(depth, bottom_time)
    unit = table.model.conventions.depth_unit
    rows = table.rows
    entered = _entry_depth([r.depth for r in rows], depth)
    if entered is None:
        deepest = max(r.depth for r in rows)
        return LookupResult(table.name, unit, depth, bottom_time, True, mode=mode,
                            reason=f"{depth:g} {unit} is deeper than the deepest depth of "
                            f"{table.name} ({deepest:g} {unit})")
    at_depth = sorted((r.bottom_time, k) for k, r in enumerate(rows) if r.depth == entered)
    hit = next((k for t, k in at_depth if bottom_time <= t + _TOL), None)
    if hit is None:
        return LookupResult(table.name, unit, depth, bottom_time, True, mode=mode,
                            depth=entered,
                            reason=f"{bottom_time:g} min is longer than the longest bottom time "
                            f"at {entered:g} {unit} in {table.name} ({at_depth[-1][0]:g} min)")
    r = rows[hit]
    verification, status, notes = _row_status(table, hit)
    sched = getattr(r, mode)
    if sched is None:
        present = ", ".join(MODE_TITLES[m] for m in r.schedules())
        return LookupResult(table.name, unit, depth, bottom_time, True, mode=mode,
                            depth=entered, bottom_time=r.bottom_time, row=hit + 1,
                            verification=verification, source_status=status,
                            reason=f"row {hit + 1} has no {MODE_TITLES[mode]} schedule "
                            f"(it has: {present})")
    reasons = []
    if not sched.permitted:
        reasons.append(f"the source marks this schedule as not to be used for "
                       f"{MODE_TITLES[mode]}")
    if r.exceptional_exposure:
        reasons.append("exceptional exposure")
    return LookupResult(
        table.name, unit, depth, bottom_time, False, reason="; ".join(reasons), depth=entered,
        bottom_time=r.bottom_time, row=hit + 1, repetitive_group=r.repetitive_group or None,
        exceptional_exposure=r.exceptional_exposure, mode=mode, schedule=sched,
        permitted=sched.permitted, verification=verification, source_status=status,
        notes=notes, periods=schedule_periods(table.model.conventions, sched),
    )
