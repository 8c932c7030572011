"""Screen a table against a decompression model (``supervisor tables screen``).

Every row is turned into a dive profile (descent, bottom, the row's ascent and
stops under the file's conventions) and run through
:func:`supervisor.engine.schedule.evaluate_profile`.  The figure reported is the
model's supersaturation at surfacing, as a fraction of the M-value gradient of
the controlling compartment (the effective gradient factor of the schedule).

A transcription error (a dropped digit, two digits swapped) usually makes one
row's surfacing supersaturation jump away from the rows beside it.  A row is
flagged when its figure differs by more than ``tolerance`` from every one of its
neighbours: the rows before and after it at the same depth (by bottom time), the
rows at the depths above and below with the same bottom time, and the
interpolation between the two neighbours on each axis.  A flag is a prompt to
re-read the row in the source, not a finding about the schedule: the model is
not the table's model, and its coefficients carry their own source status.

In-water air and in-water air/oxygen schedules are screened (air breaks as the
file's conventions place them).  Surface-decompression schedules (surface
interval and chamber phase) and unlimited no-stop rows are listed as not
screened.
"""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from supervisor.engine.buhlmann import load_coefficients
from supervisor.engine.schedule import evaluate_profiles
from supervisor.errors import InputError
from supervisor.gas import parse_gas
from supervisor.profile import Profile
from supervisor.references.issues import Issue
from supervisor.references.loader import Table
from supervisor.references.schema import MODES, DecompressionRow, Schedule
from supervisor.references.validate import sanity_issues

#: Default descent rate by depth unit [unit/min] when the file does not state one
#: (the engine's defaults; common practice, no source).
DEFAULT_DESCENT: dict[str, float] = {"fsw": 75.0, "msw": 23.0}
#: Default flagging tolerance [fraction of the M-value gradient].
DEFAULT_TOLERANCE = 0.10
_EPS = 1e-9


@dataclass(frozen=True)
class ScreenRow:
    """The model figure of one schedule of one row.

    Attributes
    ----------
    row : int
        1-based row number.
    label : str
        Row key (e.g. ``60 fsw / 40 min``).
    mode : str or None
        Decompression mode (None for a no-stop row).
    surfacing_gf : float or None
        Supersaturation at surfacing [fraction of the M-value gradient]; None
        when not screened.
    max_gf : float or None
        Largest supersaturation during the dive [-].
    compartment : str
        Controlling compartment at surfacing.
    nearest_gf : float or None
        The neighbour figure closest to this row's [-].
    flagged : bool
        True when the row is out of line with every neighbour.
    note : str
        Why not screened, or what the flag means.
    """

    row: int
    label: str
    mode: str | None
    surfacing_gf: float | None
    max_gf: float | None = None
    compartment: str = ""
    nearest_gf: float | None = None
    flagged: bool = False
    note: str = ""

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready dict (figures in percent)."""
        def pct(x: float | None) -> float | None:
            return None if x is None else round(100 * x, 1)

        return {"row": self.row, "label": self.label, "mode": self.mode,
                "surfacing_gf_percent": pct(self.surfacing_gf), "max_gf_percent": pct(self.max_gf),
                "controlling_compartment": self.compartment,
                "nearest_neighbour_percent": pct(self.nearest_gf), "flagged": self.flagged,
                "note": self.note}


@dataclass
class ScreenReport:
    """All rows of a screened table."""

    table: str
    model: str
    coefficient_status: str
    tolerance: float
    descent_rate: float
    rows: list[ScreenRow]
    validation_errors: list[Issue] = field(default_factory=list)

    @property
    def flagged(self) -> list[ScreenRow]:
        """The flagged rows."""
        return [r for r in self.rows if r.flagged]

    def to_dict(self) -> dict[str, Any]:
        """The ``supervisor.tables-screen/1`` JSON object."""
        return {"schema": "supervisor.tables-screen/1", "table": self.table, "model": self.model,
                "coefficient_status": self.coefficient_status,
                "tolerance_percent": round(100 * self.tolerance, 3),
                "descent_rate": self.descent_rate,
                "flagged_rows": sorted({r.row for r in self.flagged}),
                "validation_errors": [i.to_dict() for i in self.validation_errors],
                "rows": [r.to_dict() for r in self.rows]}


def _is_oxygen(gas: str) -> bool:
    return parse_gas(gas).fo2 >= 1.0 - 1e-9


def oxygen_switch_depth(table: Table) -> float | None:
    """Depth from which a table's in-water air/oxygen schedules breathe oxygen [unit].

    The file format has no column for it, so it is read off the table: the
    deepest in-water oxygen stop of any ``air_o2`` schedule (None when there is
    none).  Above it the diver is taken to breathe oxygen also while travelling
    and where no oxygen stop is needed, as in the schedules this project computes.
    """
    depths = [x.depth for r in table.rows if getattr(r, "air_o2", None) is not None
              for x in r.air_o2.stops if x.place == "water" and _is_oxygen(x.gas)]
    return max(depths) if depths else None


def schedule_profile(table: Table, row: DecompressionRow, mode: str,
                     descent_rate: float, o2_switch: float | None = None) -> Profile:
    """Build the dive profile of one in-water schedule under the file's conventions.

    Parameters
    ----------
    table : Table
        A decompression table.
    row : DecompressionRow
        The row.
    mode : {"air", "air_o2"}
        An in-water mode present in the row.
    descent_rate : float
        Descent rate [unit/min]; the descent counts in the bottom time.
    o2_switch : float, optional
        Depth from which the diver breathes oxygen while travelling, also where
        no oxygen stop is needed (:func:`oxygen_switch_depth`); by default the
        gas changes only at the stops.

    Returns
    -------
    Profile
        Descent, bottom, travel and stops (with air breaks on oxygen where the
        conventions give a period), ascent to the surface.  With
        ``air_breaks_in_stop_time`` the breaks are taken out of the stop minutes
        and the oxygen/air cycle runs on across the oxygen stops (a stop may end
        within a break; the cycle restarts when oxygen follows another gas);
        otherwise a break follows each full oxygen period except at the end.
    """
    c = table.model.conventions
    s: Schedule = getattr(row, mode)
    p = Profile(unit=c.depth_unit)
    bottom_gas = c.gas
    t_desc = min(row.depth / descent_rate, row.bottom_time)
    p.add(row.depth, t_desc, gas=bottom_gas, place="water", label="descent")
    if row.bottom_time - t_desc > 0:
        p.add(row.depth, row.bottom_time - t_desc, label="bottom")
    cur, gas = row.depth, bottom_gas
    if o2_switch is not None and row.depth <= o2_switch + _EPS:
        # the gas changes on arrival at a stop depth: from a bottom at or above the
        # switch depth, at the first stop depth above the bottom
        k = math.ceil((row.depth - c.last_stop) / c.stop_step - _EPS) - 1
        o2_switch = c.last_stop + max(k, 0) * c.stop_step
    period, brk = c.o2_period_min, c.air_break_min
    o2_run = 0.0
    o2_left = sum(x.minutes for x in s.stops if _is_oxygen(x.gas))

    def travel_to(depth: float, place: str, label: str) -> None:
        nonlocal cur, gas, o2_run
        if o2_switch is not None and not _is_oxygen(gas) and depth < o2_switch - _EPS \
                and cur > o2_switch + _EPS:
            # on air to the switch depth, on oxygen from there (a new oxygen cycle)
            p.add(o2_switch, (cur - o2_switch) / c.ascent_rate, gas=gas, place=place,
                  label=label)
            cur, gas, o2_run = o2_switch, "oxygen", 0.0
        if cur > depth:
            p.add(depth, (cur - depth) / c.ascent_rate, gas=gas, place=place, label=label)

    for k, stop in enumerate(s.stops):
        travel = (cur - stop.depth) / c.ascent_rate
        travel_to(stop.depth, stop.place, "travel")
        hold = stop.minutes - (travel if c.stop_time_includes_travel and k > 0 else 0.0)
        hold = max(hold, 0.0)
        if _is_oxygen(stop.gas) and not _is_oxygen(gas):
            o2_run = 0.0  # a new oxygen phase starts a new cycle
        gas = stop.gas
        if _is_oxygen(gas) and period and brk and c.air_breaks_in_stop_time:
            # the breaks are part of the stop minutes: the oxygen/air cycle runs on over the
            # oxygen stops, and a stop may end (and the next begin) within a break
            remaining = hold
            while remaining > _EPS:
                on_o2 = o2_run < period - _EPS
                chunk = min(remaining, (period if on_o2 else period + brk) - o2_run)
                p.add(stop.depth, chunk, gas=gas if on_o2 else "air", place=stop.place,
                      label="stop" if on_o2 else "air break")
                o2_run += chunk
                remaining -= chunk
                if o2_run >= period + brk - _EPS:
                    o2_run = 0.0
        elif _is_oxygen(gas) and period and brk:
            # the breaks come on top of the stop minutes: one after each full period,
            # none after the last oxygen minute
            remaining = hold
            while remaining > _EPS:
                chunk = min(remaining, period - o2_run)
                p.add(stop.depth, chunk, gas=gas, place=stop.place, label="stop")
                o2_run += chunk
                remaining -= chunk
                o2_left -= chunk
                if o2_run >= period - _EPS and o2_left > _EPS:
                    p.add(stop.depth, brk, gas="air", place=stop.place, label="air break")
                    o2_run = 0.0
        elif hold > 0:
            p.add(stop.depth, hold, gas=gas, place=stop.place, label="stop")
        cur = stop.depth
    if cur > 0:
        travel_to(0.0, "water", "ascent")
    return p


def no_stop_profile(table: Table, depth: float, limit: float, descent_rate: float) -> Profile:
    """Dive to ``depth`` for the no-stop ``limit`` [min] and ascend at the file's rate."""
    c = table.model.conventions
    p = Profile(unit=c.depth_unit)
    t_desc = min(depth / descent_rate, limit)
    p.add(depth, t_desc, gas=c.gas, label="descent")
    if limit - t_desc > 0:
        p.add(depth, limit - t_desc, label="bottom")
    p.add(0.0, depth / c.ascent_rate, label="ascent")
    return p


def _neighbour_values(x: np.ndarray, y: np.ndarray) -> list[list[float]]:
    """For points sorted by x: the neighbour values and the interpolation between them."""
    out: list[list[float]] = []
    for i in range(len(x)):
        vals = []
        if i > 0:
            vals.append(float(y[i - 1]))
        if i + 1 < len(x):
            vals.append(float(y[i + 1]))
        if 0 < i < len(x) - 1 and x[i + 1] > x[i - 1]:
            w = (x[i] - x[i - 1]) / (x[i + 1] - x[i - 1])
            vals.append(float(y[i - 1] + w * (y[i + 1] - y[i - 1])))
        out.append(vals)
    return out


def _flag(entries: list[dict[str, Any]], tolerance: float, axes: tuple[tuple[str, str], ...]
          ) -> None:
    """Set ``nearest`` and ``flagged`` on screened entries.

    ``axes`` lists (line key, position key) pairs: entries with equal line key
    (and mode) form a line ordered by position, and each entry is compared
    with its neighbours on every line it belongs to.
    """
    screened = [e for e in entries if e["gf"] is not None]
    cands: dict[int, list[float]] = defaultdict(list)
    for line_key, pos_key in axes:
        lines: dict[Any, list[dict[str, Any]]] = defaultdict(list)
        for e in screened:
            lines[(e["mode"], e[line_key])].append(e)
        for line in lines.values():
            line.sort(key=lambda e: e[pos_key])
            x = np.array([e[pos_key] for e in line], dtype=float)
            y = np.array([e["gf"] for e in line], dtype=float)
            for e, vals in zip(line, _neighbour_values(x, y), strict=True):
                cands[id(e)].extend(vals)
    for e in screened:
        vals = np.array(cands.get(id(e), []))
        if vals.size == 0:
            e["note"] = "no neighbour to compare"
            continue
        k = int(np.argmin(np.abs(vals - e["gf"])))
        e["nearest"] = float(vals[k])
        if abs(vals[k] - e["gf"]) > tolerance + _EPS:
            e["flagged"] = True
            e["note"] = (f"out of line: {100 * e['gf']:.0f} % against {100 * vals[k]:.0f} % at "
                         "the closest neighbour; re-read this row in the source")


def screen_table(table: Table, model: str = "zhl16c", descent_rate: float | None = None,
                 tolerance: float = DEFAULT_TOLERANCE) -> ScreenReport:
    """Run every row of a no-stop or decompression table through the model.

    Parameters
    ----------
    table : Table
        A no-stop or decompression table (loaded with ``strict=False`` to
        screen a file that may still fail the sanity rules).
    model : {"zhl16a", "zhl16b", "zhl16c"}
        Coefficient set.
    descent_rate : float, optional
        Descent rate [unit/min]; default the file's computed-table setting,
        else 75 fsw/min or 23 msw/min.
    tolerance : float
        Flag a row whose surfacing supersaturation differs from every
        neighbour's by more than this [fraction of the M-value gradient].

    Returns
    -------
    ScreenReport

    Raises
    ------
    InputError
        For a table kind that cannot be screened, or a bad rate or tolerance.
    """
    if table.kind not in ("no-stop", "decompression"):
        raise InputError("FILE", f"{table.name} is a {table.kind} table; screening works on "
                         "no-stop and decompression tables")
    if not (isinstance(tolerance, (int, float)) and math.isfinite(tolerance) and tolerance > 0):
        raise InputError("--tolerance", f"got {tolerance!r}; expected a percentage > 0")
    c = table.model.conventions
    if descent_rate is None:
        descent_rate = c.model.descent_rate if c.model else DEFAULT_DESCENT[c.depth_unit]
    if not (math.isfinite(descent_rate) and descent_rate > 0):
        raise InputError("--descent-rate", f"got {descent_rate!r}; expected a rate > 0 "
                         f"{c.depth_unit}/min")
    coeff = load_coefficients(model)
    o2_switch = oxygen_switch_depth(table) if table.kind == "decompression" else None
    entries: list[dict[str, Any]] = []
    for i, r in enumerate(table.rows):
        if table.kind == "no-stop":
            e = {"row": i + 1, "label": table.label(i), "mode": None, "depth": r.depth,
                 "time": 0.0, "line": 0, "gf": None, "note": "", "flagged": False,
                 "nearest": None}
            if r.unlimited:
                e["note"] = "unlimited: not screened"
            else:
                e["profile"] = no_stop_profile(table, r.depth, r.limit_min, descent_rate)
            entries.append(e)
            continue
        for mode in MODES:
            if getattr(r, mode) is None:
                continue
            e = {"row": i + 1, "label": table.label(i), "mode": mode, "depth": r.depth,
                 "time": r.bottom_time, "line": 0, "gf": None, "note": "", "flagged": False,
                 "nearest": None}
            if mode == "surd_o2":
                e["note"] = ("surface decompression: not screened (the surface interval and "
                             "chamber phase are not modelled by screening)")
            elif mode != "air" and not getattr(r, mode).stops and r.air is not None \
                    and not r.air.stops:
                # no stops: the same dive as in-water air, screened there; its figure is not
                # a neighbour of the schedules that ascend on oxygen
                e["note"] = "no stops: the same dive as in-water air (screened there)"
            else:
                e["profile"] = schedule_profile(table, r, mode, descent_rate,
                                                o2_switch if mode == "air_o2" else None)
            entries.append(e)
    # every row through the model in one vectorised batch, not schedule by schedule
    todo = [e for e in entries if e.get("profile") is not None]
    evs = evaluate_profiles([e.pop("profile") for e in todo], model=model)
    for e, ev in zip(todo, evs, strict=True):
        e.update(gf=ev.surfacing_gf, max_gf=ev.max_gf, comp=ev.controlling_compartment)
    for e in entries:
        e.pop("profile", None)
    if table.kind == "no-stop":
        _flag(entries, tolerance, (("line", "depth"),))
    else:
        _flag(entries, tolerance, (("depth", "time"), ("time", "depth")))
    rows = [ScreenRow(e["row"], e["label"], e["mode"], e["gf"], e.get("max_gf"),
                      e.get("comp", ""), e["nearest"], e["flagged"], e["note"]) for e in entries]
    errs = [i for i in sanity_issues(table.model) if i.severity == "error"]
    return ScreenReport(table.name, model, coeff.status_for(False), float(tolerance),
                        float(descent_rate), rows, errs)
