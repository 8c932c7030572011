"""Sanity rules for reference tables, run after the schema has been checked.

Each rule returns :class:`~supervisor.references.issues.Issue` objects that
name the row (1-based, in file order) and the column.  The rules:

no-stop
    rows in increasing depth, no duplicates; a deeper depth never has a longer
    no-stop limit; within a row a longer bottom time never gives an earlier
    repetitive group, and no group time exceeds the limit; at a deeper depth a
    group is never reached later than at a shallower one.
decompression
    rows in increasing depth then bottom time, no duplicates; stops deepest
    first, on the stop grid, shallower than the bottom; at one depth a longer
    bottom time never needs less decompression (stop time, total ascent,
    chamber periods) or an earlier group; at one bottom time a deeper depth
    never needs less stop time; time to first stop and total ascent add up
    within a minute under the file's conventions.
treatment
    steps numbered 1..n, each starting where the last ended; travel minutes
    agree with the travel rate and printed running times add up, within a minute.
limits, model-coefficients
    every row has the same columns; the key column (``conventions.key_column``,
    or else the first data column when it is numeric in every row) strictly
    increases;
    declared monotone columns are monotone; model half-times increase, a > 0,
    0 < b < 1, and per-value statuses are known tags.
"""

from __future__ import annotations

import math
from collections import defaultdict
from collections.abc import Sequence
from contextvars import ContextVar
from typing import Any

import numpy as np

from supervisor.references.issues import Issue
from supervisor.references.schema import (
    MODES,
    SOURCE_STATUSES,
    AnyTable,
    DecompressionRow,
    DecompressionTable,
    GenericRow,
    LimitsTable,
    ModelCoefficientsTable,
    NoStopTable,
    Schedule,
    TableConventions,
    TreatmentTable,
    shown_value,
)
from supervisor.text import excerpt, printable

#: Totals and running times must agree within this many minutes.
TOTAL_TOLERANCE_MIN = 1.0
_EPS = 1e-9

#: File row numbers of the rows being checked, when some rows were left out because
#: they fail the schema (so the sanity rules still run on the others); None: all rows.
_ROW_NUMBERS: ContextVar[Sequence[int] | None] = ContextVar("_ROW_NUMBERS", default=None)


def _no(i: int) -> int:
    """1-based file row number of row ``i`` (0-based) of the table being checked."""
    numbers = _ROW_NUMBERS.get()
    return numbers[i] if numbers is not None else i + 1


def row_label(table: AnyTable, index: int) -> str:
    """Return a short key for row ``index`` (0-based): ``depth 60``, ``60/40``, ``step 3``."""
    row = table.rows[index]
    unit = getattr(table.conventions, "depth_unit", "")
    if isinstance(table, NoStopTable):
        return f"{_num(row.depth)} {unit}"
    if isinstance(table, DecompressionTable):
        return f"{_num(row.depth)} {unit} / {_num(row.bottom_time)} min"
    if isinstance(table, TreatmentTable):
        return f"step {row.step}"
    data = row.data()
    if data:
        key, value = next(iter(data.items()))
        if isinstance(value, (dict, list, bool)):
            return ""  # a wrong type is named by the issue itself
        return f"{printable(key)} {excerpt(value) if isinstance(value, str) else value}"
    return ""


def _num(x: float) -> str:
    return f"{x:g}"


def sanity_issues(table: AnyTable, row_numbers: Sequence[int] | None = None) -> list[Issue]:
    """Run the sanity rules of the table's kind.

    Parameters
    ----------
    table : AnyTable
        A table that passed the schema.
    row_numbers : sequence of int, optional
        File row number (1-based) of each row of ``table``, when rows that fail the
        schema were left out; issues then name the rows by their number in the file.

    Returns
    -------
    list of Issue
        Errors and warnings, in row order within each rule.
    """
    token = _ROW_NUMBERS.set(row_numbers)
    try:
        return _sanity(table)
    finally:
        _ROW_NUMBERS.reset(token)


def _sanity(table: AnyTable) -> list[Issue]:
    if isinstance(table, NoStopTable):
        return _no_stop(table)
    if isinstance(table, DecompressionTable):
        return _decompression(table)
    if isinstance(table, TreatmentTable):
        return _treatment(table)
    if isinstance(table, ModelCoefficientsTable):
        return _generic(table, own=("compartment",)) + _model(table)
    if isinstance(table, LimitsTable):
        return _generic(table)
    return []  # pragma: no cover - every kind is handled above


def _err(table: AnyTable, i: int | None, column: str | None, msg: str,
         severity: str = "error") -> Issue:
    label = row_label(table, i) if i is not None else ""
    return Issue(severity, msg, None if i is None else _no(i), column, label)  # type: ignore[arg-type]


def _group_order(table: AnyTable, i: int, column: str, group: str,
                 out: list[Issue]) -> int | None:
    conv: TableConventions = table.conventions  # type: ignore[assignment]
    letters = conv.repetitive_groups
    if not letters:
        out.append(_err(table, i, column, f"group {group!r} given but "
                        "conventions.repetitive_groups does not list the group letters"))
        return None
    if group not in letters:
        out.append(_err(table, i, column, f"got group {group!r}; expected one of "
                        f"{', '.join(letters)} (conventions.repetitive_groups)"))
        return None
    return letters.index(group)


# --------------------------------------------------------------------------- no-stop


def _no_stop(t: NoStopTable) -> list[Issue]:
    out: list[Issue] = []
    unit = t.conventions.depth_unit
    depths = np.array([r.depth for r in t.rows])
    limits = np.array([r.limit_min for r in t.rows])
    for i in range(1, len(t.rows)):
        if depths[i] <= depths[i - 1]:
            what = "repeats" if depths[i] == depths[i - 1] else "is shallower than"
            out.append(_err(t, i, "depth", f"{depths[i]:g} {unit} {what} the previous row "
                            f"({depths[i - 1]:g} {unit}); rows must be in increasing depth"))
    # a deeper depth never has a longer no-stop limit
    order = np.argsort(depths, kind="stable")
    d_s, l_s = depths[order], limits[order]
    bad = np.nonzero((np.diff(d_s) > 0) & (l_s[1:] > l_s[:-1]))[0]
    for k in bad:
        i, j = int(order[k + 1]), int(order[k])
        out.append(_err(t, i, "no_stop_limit",
                        f"{_lim(l_s[k + 1])} is longer than the {_lim(l_s[k])} at "
                        f"{d_s[k]:g} {unit} (row {_no(j)}); a deeper depth never has a "
                        "longer no-stop limit"))
    # groups within a row
    ranks: list[dict[int, float]] = []
    for i, r in enumerate(t.rows):
        rank_time: dict[int, float] = {}
        for g, minutes in r.repetitive_groups.items():
            col = f"repetitive_groups.{g}"
            k = _group_order(t, i, col, g, out)
            if k is None:
                continue
            rank_time[k] = minutes
            if minutes > r.limit_min + _EPS:
                out.append(_err(t, i, col, f"group {g} at {minutes:g} min is beyond the "
                                f"no-stop limit {_lim(r.limit_min)}"))
        ks = sorted(rank_time)
        for a, b in zip(ks, ks[1:], strict=False):
            if rank_time[b] <= rank_time[a]:
                ga, gb = t.conventions.repetitive_groups[a], t.conventions.repetitive_groups[b]
                out.append(_err(t, i, f"repetitive_groups.{gb}",
                                f"group {gb} at {rank_time[b]:g} min is not longer than group "
                                f"{ga} at {rank_time[a]:g} min; a longer bottom time never "
                                "gives an earlier group"))
        if ks and math.isfinite(r.limit_min) and rank_time[ks[-1]] < r.limit_min - _EPS:
            out.append(_err(t, i, "repetitive_groups",
                            f"bottom times from {rank_time[ks[-1]]:g} to {_lim(r.limit_min)} "
                            "have no group", severity="warning"))
        ranks.append(rank_time)
    # across depths: a group is never reached later at a deeper depth
    for k in range(len(order) - 1):
        i, j = int(order[k]), int(order[k + 1])
        if depths[j] <= depths[i]:
            continue
        for g_rank, minutes in ranks[j].items():
            shallow = ranks[i].get(g_rank)
            if shallow is not None and minutes > shallow + _EPS:
                g = t.conventions.repetitive_groups[g_rank]
                out.append(_err(t, j, f"repetitive_groups.{g}",
                                f"group {g} at {minutes:g} min is later than at "
                                f"{depths[i]:g} {unit} ({shallow:g} min, row {_no(i)}); a deeper "
                                "depth never reaches a group later"))
    return out


def _lim(x: float) -> str:
    return "unlimited" if not math.isfinite(x) else f"{x:g} min"


# --------------------------------------------------------------------------- decompression


def travel_minutes(schedule: Schedule, depth: float, rate: float,
                   includes_travel: bool) -> tuple[float, float, float]:
    """Split the ascent of an in-water schedule into its parts.

    Parameters
    ----------
    schedule : Schedule
        The schedule (stops deepest first).
    depth : float
        Bottom depth [unit].
    rate : float
        Ascent rate [unit/min].
    includes_travel : bool
        Whether stop minutes include travel from the previous stop.

    Returns
    -------
    tuple of float
        (travel to the first stop, travel between stops not counted in stop
        time, travel from the last stop to the surface) [min].
    """
    if not schedule.stops:
        return depth / rate, 0.0, 0.0
    first, last = schedule.stops[0].depth, schedule.stops[-1].depth
    between = 0.0 if includes_travel else (first - last) / rate
    return (depth - first) / rate, between, last / rate


def air_breaks(o2_minutes: float, period: float | None, brk: float | None) -> float:
    """Air-break minutes for ``o2_minutes`` of oxygen: one break after each full period.

    Returns 0 when the period or break length is not given.  No break is
    taken at the end of the oxygen time.
    """
    if not period or not brk or o2_minutes <= 0:
        return 0.0
    return max(0, math.ceil(o2_minutes / period - _EPS) - 1) * brk


def expected_total_ascent(t: DecompressionTable, row: DecompressionRow,
                          mode: str) -> tuple[float | None, str]:
    """Total ascent time [min] implied by a schedule and the conventions.

    Returns
    -------
    tuple
        (minutes or None when the conventions do not allow the check, text
        showing the parts added).
    """
    c = t.conventions
    s: Schedule = getattr(row, mode)
    water = [x for x in s.stops if x.place == "water"]
    ws = Schedule(stops=water)
    to_first, between, to_surface = travel_minutes(ws, row.depth, c.ascent_rate,
                                                   c.stop_time_includes_travel)
    if row.time_to_first_stop is not None and water:
        to_first = row.time_to_first_stop
    stops = ws.stop_minutes
    o2 = sum(x.minutes for x in water if x.gas.strip().lower() in ("oxygen", "o2", "100/0"))
    breaks = 0.0 if c.air_breaks_in_stop_time else air_breaks(o2, c.o2_period_min,
                                                              c.air_break_min)
    if mode != "surd_o2":
        total = to_first + stops + between + to_surface + breaks
        return total, (f"{to_first:.2f} to first stop + {stops:g} stops + {between:.2f} travel "
                       f"between + {to_surface:.2f} to surface + {breaks:g} air breaks")
    need = {"surface_interval_min": c.surface_interval_min,
            "chamber_o2_period_min": c.chamber_o2_period_min,
            "chamber_air_break_min": c.chamber_air_break_min,
            "chamber_travel_min": c.chamber_travel_min}
    missing = [k for k, v in need.items() if v is None]
    if missing or s.chamber_o2_periods is None:
        what = ", ".join(f"conventions.{k}" for k in missing) or "surd_o2.chamber_o2_periods"
        return None, f"not checked: {what} not given"
    periods = s.chamber_o2_periods
    chamber = (periods * c.chamber_o2_period_min
               + max(0, math.ceil(periods - _EPS) - 1) * c.chamber_air_break_min
               + c.chamber_travel_min)
    if not water:
        to_first, between = 0.0, 0.0
    total = to_first + stops + between + breaks + c.surface_interval_min + chamber
    return total, (f"{to_first:.2f} to first stop + {stops:g} water stops + {between:.2f} travel "
                   f"+ {breaks:g} air breaks + {c.surface_interval_min:g} surface interval + "
                   f"{chamber:g} chamber")


def _decompression(t: DecompressionTable) -> list[Issue]:
    out: list[Issue] = []
    c = t.conventions
    unit = c.depth_unit
    keys = [(r.depth, r.bottom_time) for r in t.rows]
    for i in range(1, len(keys)):
        if keys[i] <= keys[i - 1]:
            what = "repeats" if keys[i] == keys[i - 1] else "comes after"
            out.append(_err(t, i, "bottom_time" if keys[i][0] == keys[i - 1][0] else "depth",
                            f"{keys[i][0]:g} {unit} / {keys[i][1]:g} min {what} "
                            f"{keys[i - 1][0]:g} {unit} / {keys[i - 1][1]:g} min; rows must be in "
                            "increasing depth, then increasing bottom time"))
    for i, r in enumerate(t.rows):
        if r.repetitive_group:
            _group_order(t, i, "repetitive_group", r.repetitive_group, out)
        for mode, s in r.schedules().items():
            out.extend(_stop_checks(t, i, r, mode, s))
            total, parts = expected_total_ascent(t, r, mode)
            if s.total_ascent is not None and total is not None and \
                    abs(total - s.total_ascent) > TOTAL_TOLERANCE_MIN:
                out.append(_err(t, i, f"{mode}.total_ascent",
                                f"printed {s.total_ascent:g} min but the parts add up to "
                                f"{total:.1f} min ({parts}); totals must agree within "
                                f"{TOTAL_TOLERANCE_MIN:g} min"))
            elif s.total_ascent is not None and total is None:
                out.append(_err(t, i, f"{mode}.total_ascent", f"total {parts}",
                                severity="warning"))
        if r.time_to_first_stop is not None:
            first = next((s.stops[0] for s in r.schedules().values() if s.stops), None)
            if first is not None:
                want = (r.depth - first.depth) / c.ascent_rate
                if abs(want - r.time_to_first_stop) > TOTAL_TOLERANCE_MIN:
                    out.append(_err(t, i, "time_to_first_stop",
                                    f"printed {r.time_to_first_stop:g} min but "
                                    f"{r.depth:g} → {first.depth:g} {unit} at "
                                    f"{c.ascent_rate:g} {unit}/min takes {want:.1f} min"))
    out.extend(_decompression_monotone(t))
    return out


def _stop_checks(t: DecompressionTable, i: int, r: DecompressionRow, mode: str,
                 s: Schedule) -> list[Issue]:
    out: list[Issue] = []
    c = t.conventions
    unit = c.depth_unit
    prev: float | None = None
    place = None
    for k, stop in enumerate(s.stops):
        col = f"{mode}.stops[{k + 1}].depth"
        if place == "chamber" and stop.place == "water":
            out.append(_err(t, i, f"{mode}.stops[{k + 1}].place", "a water stop after a "
                            "chamber stop; list the water stops first, then the chamber stops"))
        if stop.place != place:
            prev = None  # surface decompression: the chamber starts deeper than the last
            place = stop.place  # water stop (recompression); each place deepest first
        if prev is not None and stop.depth >= prev:
            out.append(_err(t, i, col, f"stop at {stop.depth:g} {unit} is not shallower than the "
                            f"stop before ({prev:g} {unit}); list stops deepest first"))
        if stop.place == "water" and stop.depth >= r.depth:
            out.append(_err(t, i, col, f"stop at {stop.depth:g} {unit} is not shallower than the "
                            f"bottom ({r.depth:g} {unit})"))
        if stop.place == "water":
            steps = (stop.depth - c.last_stop) / c.stop_step
            if stop.depth < c.last_stop - _EPS or abs(steps - round(steps)) > 1e-6:
                out.append(_err(t, i, col, f"stop at {stop.depth:g} {unit} is off the stop grid "
                                f"(last stop {c.last_stop:g}, every {c.stop_step:g} {unit})"))
        prev = stop.depth
    return out


def _decomp_measure(r: DecompressionRow, mode: str) -> dict[str, float]:
    s: Schedule = getattr(r, mode)
    m = {"stop time": s.stop_minutes}
    if s.total_ascent is not None:
        m["total ascent"] = s.total_ascent
    if s.chamber_o2_periods is not None:
        m["chamber periods"] = s.chamber_o2_periods
    return m


def _decompression_monotone(t: DecompressionTable) -> list[Issue]:
    out: list[Issue] = []
    unit = t.conventions.depth_unit
    by_depth: dict[float, list[int]] = defaultdict(list)
    by_time: dict[float, list[int]] = defaultdict(list)
    for i, r in enumerate(t.rows):
        by_depth[r.depth].append(i)
        by_time[r.bottom_time].append(i)
    columns = {"stop time": "stops", "total ascent": "total_ascent",
               "chamber periods": "chamber_o2_periods"}
    letters = t.conventions.repetitive_groups
    for depth, idx in by_depth.items():
        idx = sorted(idx, key=lambda i: t.rows[i].bottom_time)
        for a, b in zip(idx, idx[1:], strict=False):
            ra, rb = t.rows[a], t.rows[b]
            for mode in MODES:
                if getattr(ra, mode) is None or getattr(rb, mode) is None:
                    continue
                ma, mb = _decomp_measure(ra, mode), _decomp_measure(rb, mode)
                for what in ma:
                    if what in mb and mb[what] < ma[what] - _EPS:
                        out.append(_err(t, b, f"{mode}.{columns[what]}",
                                        f"{what} {mb[what]:g} is less than {ma[what]:g} at "
                                        f"{ra.bottom_time:g} min (row {_no(a)}); at one depth a "
                                        "longer bottom time never needs less decompression"))
            ga, gb = ra.repetitive_group, rb.repetitive_group
            if ga in letters and gb in letters and letters.index(gb) < letters.index(ga):
                out.append(_err(t, b, "repetitive_group",
                                f"group {gb} is earlier than group {ga} at {ra.bottom_time:g} min "
                                f"(row {_no(a)}); at one depth a longer bottom time never gives "
                                "an earlier group"))
        del depth
    for bt, idx in by_time.items():
        idx = sorted(idx, key=lambda i: t.rows[i].depth)
        for a, b in zip(idx, idx[1:], strict=False):
            ra, rb = t.rows[a], t.rows[b]
            for mode in MODES:
                sa, sb = getattr(ra, mode), getattr(rb, mode)
                if sa is None or sb is None:
                    continue
                if sb.stop_minutes < sa.stop_minutes - _EPS:
                    out.append(_err(t, b, f"{mode}.stops",
                                    f"stop time {sb.stop_minutes:g} min is less than "
                                    f"{sa.stop_minutes:g} min at {ra.depth:g} {unit} "
                                    f"(row {_no(a)}) for the same {bt:g}-min bottom time; a deeper "
                                    "depth never needs less decompression"))
    return out


# --------------------------------------------------------------------------- treatment


def _treatment(t: TreatmentTable) -> list[Issue]:
    out: list[Issue] = []
    c = t.conventions
    unit = c.depth_unit
    elapsed = 0.0
    for i, s in enumerate(t.rows):
        if s.step != i + 1:
            out.append(_err(t, i, "step", f"got step {s.step}; expected {i + 1} (steps are "
                            "numbered 1, 2, ... in file order)"))
        # a table that cannot be planned may list its stops without the travel between them
        # (the travel is what conventions.missing names)
        if i > 0 and c.plannable and abs(s.from_depth - t.rows[i - 1].to_depth) > _EPS:
            out.append(_err(t, i, "from_depth", f"starts at {s.from_depth:g} {unit} but the step "
                            f"before ends at {t.rows[i - 1].to_depth:g} {unit}"))
        if s.from_depth != s.to_depth and s.travel_rate:
            want = abs(s.from_depth - s.to_depth) / s.travel_rate
            if abs(want - s.minutes) > TOTAL_TOLERANCE_MIN:
                out.append(_err(t, i, "minutes", f"{s.minutes:g} min but {s.from_depth:g} → "
                                f"{s.to_depth:g} {unit} at {s.travel_rate:g} {unit}/min takes "
                                f"{want:.1f} min"))
        elapsed += s.minutes
        if s.elapsed_min is not None and abs(elapsed - s.elapsed_min) > TOTAL_TOLERANCE_MIN:
            out.append(_err(t, i, "elapsed_min", f"printed {s.elapsed_min:g} min but the step "
                            f"times add up to {elapsed:g} min"))
    return out + _treatment_planning(t)


def _is_o2(gas: str) -> bool:
    return gas.strip().lower() in ("oxygen", "o2", "100/0")


def _treatment_planning(t: TreatmentTable) -> list[Issue]:
    """Checks of a treatment table's planning conventions: extensions, attendant oxygen."""
    out: list[Issue] = []
    c = t.conventions
    unit = c.depth_unit
    rows = t.rows
    if c.plannable and c.table_number:
        if rows[-1].to_depth > _EPS:
            out.append(_err(t, len(rows) - 1, "to_depth", f"the last step ends at "
                            f"{rows[-1].to_depth:g} {unit}; a table that can be planned ends at "
                            "the surface"))
        if rows[0].from_depth > _EPS and c.compression_rate is None \
                and not c.compression_in_first_step:
            out.append(_err(t, None, "conventions.compression_rate", "the first step starts at "
                            f"{rows[0].from_depth:g} {unit}: give compression_rate or set "
                            "compression_in_first_step"))
    for k, e in enumerate(c.extensions):
        col = f"conventions.extensions[{k + 1}]"
        if e.after_step > len(rows):
            out.append(_err(t, None, f"{col}.after_step", f"got step {e.after_step}; the table "
                            f"has {len(rows)} steps"))
            continue
        at = rows[e.after_step - 1]
        if abs(at.to_depth - e.depth) > _EPS:
            out.append(_err(t, None, f"{col}.depth", f"{e.depth:g} {unit} but step "
                            f"{e.after_step} ends at {at.to_depth:g} {unit}; an extension is "
                            "inserted where its depth is reached"))
    n_max = sum(e.max_count for e in c.extensions)
    base = [a for a in c.attendant_oxygen if a.when != "recent-exposure"]
    if base:
        for n in range(n_max + 1):
            hits = [a.case for a in base if a.applies(n)]
            if len(hits) != 1:
                what = "no case applies" if not hits else f"{len(hits)} cases apply"
                out.append(_err(t, None, "conventions.attendant_oxygen", f"with {n} "
                                f"extension(s) {what}; exactly one base case must apply"))
    o2_at: dict[float, float] = defaultdict(float)
    for r in rows:
        if r.from_depth == r.to_depth and _is_o2(r.gas):
            o2_at[r.to_depth] += r.minutes
    for k, a in enumerate(c.attendant_oxygen):
        col = f"conventions.attendant_oxygen[{k + 1}]"
        if a.depth is None or not c.plannable:
            continue
        if not any(abs(r.to_depth - a.depth) < _EPS for r in rows):
            out.append(_err(t, None, f"{col}.depth", f"no step of the table is at "
                            f"{a.depth:g} {unit}"))
        elif a.oxygen_min > o2_at.get(a.depth, 0.0) + _EPS:
            out.append(_err(t, None, f"{col}.oxygen_min", f"{a.oxygen_min:g} min is more than "
                            f"the patient's {o2_at.get(a.depth, 0.0):g} oxygen minutes at "
                            f"{a.depth:g} {unit} in the table", severity="warning"))
    return out


# --------------------------------------------------------------------------- limits, models


def _numeric(v: Any) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def value_kind(v: Any) -> str:
    """The kind of a data cell as a reader names it: number, text, boolean, date, list, table."""
    if isinstance(v, bool):
        return "boolean"
    if isinstance(v, (int, float)):
        return "number"
    if isinstance(v, str):
        return "text"
    if isinstance(v, list):
        return "list"
    if isinstance(v, dict):
        return "table"
    return "date"


def _column_kinds(t: LimitsTable | ModelCoefficientsTable, columns: dict[str, None],
                  skip: set[str]) -> list[Issue]:
    """Every row holds the same kind of value in a column (the most common kind wins)."""
    out: list[Issue] = []
    rows: list[GenericRow] = t.rows
    for col in columns:
        if col in skip:
            continue
        kinds = [value_kind(r.data()[col]) for r in rows if col in r.data()]
        if len(set(kinds)) < 2:
            continue
        want = max(dict.fromkeys(kinds), key=kinds.count)  # ties: the first row's kind
        for i, r in enumerate(rows):
            if col in r.data() and value_kind(r.data()[col]) != want:
                v = r.data()[col]
                out.append(_err(t, i, col, f"got {shown_value(v)}; the other rows hold "
                                f"a {want} in this column"))
    return out


def _generic(t: LimitsTable | ModelCoefficientsTable, own: tuple[str, ...] = ()) -> list[Issue]:
    """Rules of every free-column table; ``own`` columns are typed by the kind's rules."""
    out: list[Issue] = []
    rows: list[GenericRow] = t.rows
    columns: dict[str, None] = {}
    for r in rows:
        for k in r.data():
            columns.setdefault(k, None)
    for i, r in enumerate(rows):
        missing = [k for k in columns if k not in r.data()]
        for k in missing:
            out.append(_err(t, i, k, "missing; every row must have the same columns"))
    conv = t.conventions
    key = conv.get("key_column")
    if key is None and rows and rows[0].data():
        first = next(iter(rows[0].data()))
        # a first column holding numbers is the key unless conventions name another;
        # one row of another type does not turn the check off (it is reported below)
        kinds = [value_kind(r.data().get(first)) for r in rows]
        if kinds.count("number") * 2 > len(kinds):
            key = first
    if isinstance(key, str):
        vals = [r.data().get(key) for r in rows]
        for i, v in enumerate(vals):
            if not _numeric(v):
                out.append(_err(t, i, key, f"got {shown_value(v)}; the key column "
                                "needs a number in every row"))
        nums = [(i, v) for i, v in enumerate(vals) if _numeric(v)]
        for (_, a), (i, b) in zip(nums, nums[1:], strict=False):
            if b <= a:
                out.append(_err(t, i, key, f"{b:g} does not follow {a:g}; the key "
                                "column must strictly increase"))
    out.extend(_column_kinds(t, columns, {*own, *([key] if isinstance(key, str) else [])}))
    for direction in ("increasing", "decreasing"):
        cols = conv.get(f"{direction}_columns", [])
        if isinstance(cols, str):
            cols = [cols]
        for col in cols if isinstance(cols, list) else []:
            vals = [r.data().get(col) for r in rows]
            nums = [(i, v) for i, v in enumerate(vals) if _numeric(v)]
            for (_, a), (i, b) in zip(nums, nums[1:], strict=False):
                if (direction == "increasing" and b < a) or (direction == "decreasing" and b > a):
                    out.append(_err(t, i, col, f"{b:g} after {a:g}; the column is declared "
                                    f"{direction} (conventions.{direction}_columns)"))
    return out


def _model(t: ModelCoefficientsTable) -> list[Issue]:
    out: list[Issue] = []
    rows = [r.data() for r in t.rows]
    seen: dict[Any, int] = {}
    for i, d in enumerate(rows):
        if "compartment" in d:
            label = d["compartment"]
            if isinstance(label, bool) or not isinstance(label, (str, int)):
                out.append(_err(t, i, "compartment", f"got {shown_value(label)}; "
                                "expected a compartment label: text such as \"1b\" or a whole "
                                "number"))
                continue
            if label in seen:
                out.append(_err(t, i, "compartment", f"compartment {excerpt(label)} repeats "
                                f"row {_no(seen[label])}"))
            seen.setdefault(label, i)
        for k, v in d.items():
            shown = shown_value(v)
            if k.endswith("_half_min") and (not _numeric(v) or v <= 0):
                out.append(_err(t, i, k, f"got {shown}; expected a half-time > 0 min"))
            elif k.endswith("_a_bar") and (not _numeric(v) or v <= 0):
                out.append(_err(t, i, k, f"got {shown}; expected a > 0 bar"))
            elif k.endswith("_b") and (not _numeric(v) or not 0 < v < 1):
                out.append(_err(t, i, k, f"got {shown}; expected 0 < b < 1"))
        vs = d.get("value_status")
        if isinstance(vs, dict):
            for k, v in vs.items():
                if not isinstance(v, str) or v not in SOURCE_STATUSES:
                    out.append(_err(t, i, f"value_status.{k}", f"got {excerpt(v)}; expected one of "
                                    f"{', '.join(SOURCE_STATUSES)}"))
    half_cols = sorted({k for d in rows for k in d if k.endswith("_half_min")})
    for col in half_cols:
        for i in range(1, len(rows)):
            a, b = rows[i - 1].get(col), rows[i].get(col)
            if _numeric(a) and _numeric(b) and b <= a:
                out.append(_err(t, i, col, f"half-time {b:g} min does not follow {a:g} min; "
                                "compartments are listed in increasing half-time"))
    return out
