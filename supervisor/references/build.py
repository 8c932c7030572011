"""Decompression tables computed by this project from ZH-L16 (``supervisor tables build``).

These are model output laid out as a table, not a published table: every file
says so in its title and provenance (source status ``COMPUTED``), names the
model, the gradient factors, the rates and the status of the coefficients, and
records no date, so that a build is reproducible byte for byte.

Every schedule comes from :func:`supervisor.engine.schedule.plan_schedules`,
the same code path as ``supervisor schedule``, in vectorised batches (one per
pass and mode, never schedule by schedule).  Each depth gets a row at its
no-stop limit (no stops), then one row per bottom time of :data:`BOTTOM_TIMES`
beyond the limit, up to and including the first bottom time whose total
in-water air stop time exceeds the ``max_stop_time`` of the build (a choice of
this build, not a published limit).

Every row carries up to three decompression modes (``schema.MODES``), each the
engine's schedule for the same dive under the build's settings:

``air``
    in-water stops on air.
``air_o2``
    in-water stops on air deeper than ``o2_switch``, on oxygen from it (the
    diver changes on arriving there, also where no stop is needed, and travels
    on oxygen above it), with ``o2_air_break`` (oxygen minutes, air minutes)
    cycles; the air breaks count in the stop minutes (the engine's convention),
    the cycle starts on the change to oxygen and runs on across the oxygen stops.
``surd_o2``
    in-water stops at and deeper than ``surd_leave_water`` only, then the
    surface interval (``surd_interval`` minutes from leaving the water stop to
    arriving at ``chamber_depth`` in the chamber: ascent, time on deck,
    compression at the descent rate), then the chamber in the trade's pattern
    (:data:`supervisor.engine.schedule.SURD_PATTERN`): oxygen in whole or half
    periods of ``chamber_air_break[0]`` minutes, the first half-period at
    ``chamber_depth`` and the rest at ``chamber_second_depth``, a
    ``chamber_air_break[1]``-minute air break after every full period that more
    oxygen follows, then the chamber's ascent to the surface on air.  The number
    of half-periods is the engine's: the least that clears the model's
    obligation.  Chamber stops are listed with ``place = "chamber"`` and their
    oxygen minutes (the air breaks between periods are not stop time, as the
    file's ``chamber_air_break_min`` convention says); ``chamber_o2_periods`` is
    the engine's count and ``total_ascent`` the engine's time from leaving the
    bottom to leaving the chamber, except for a schedule without water stops
    (the file's total-ascent check then counts no travel to the surface
    interval; the total is in the row's ``note``).  Only for depths at or deeper
    than the chamber depth (the engine puts the first chamber depth no deeper
    than the dive).

The chamber pattern (30-min periods, 5-min air breaks, 50 then 40 fsw) follows
the U.S. Navy Diving Manual, Rev 7 ch. 9 as quoted by secondary sources and Rev
4 Change A ch. 14 (older edition); the metric chamber depths 15 then 12 m are
from memory.  The number of periods is this project's model output (COMPUTED).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from supervisor.engine.buhlmann import load_coefficients
from supervisor.engine.schedule import (
    ScheduleRequest,
    ScheduleResult,
    Stop,
    SurfaceDecompression,
    plan_schedules,
)
from supervisor.errors import InputError
from supervisor.periods import chamber_pattern
from supervisor.references.canonical import atomic_write_text, dumps_table
from supervisor.references.loader import InvalidTableError, inspect_document
from supervisor.references.schema import MODE_TITLES, MODES, SCHEMA_ID

#: Bottom times tried at every depth beyond its no-stop limit [min].
BOTTOM_TIMES: tuple[int, ...] = (
    5, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 70, 80, 90, 100, 110, 120, 130, 140, 150,
    160, 170, 180, 200, 220, 240, 270, 300, 330, 360, 400, 450, 480,
)


@dataclass(frozen=True)
class BuildSpec:
    """One computed table: unit, depth grid, rates, stop grid and gradient factors.

    Parameters
    ----------
    unit : {"fsw", "msw"}
        Depth unit.
    depths : tuple of float
        Table depths [unit].
    descent_rate, ascent_rate : float
        Rates [unit/min].
    stop_step, last_stop : float
        Stop spacing and shallowest stop [unit].
    gf_low, gf_high : float
        Gradient factors [-].
    model : str
        Coefficient set.
    max_stop_time : float
        The rows of a depth end with the first bottom time whose total
        in-water air stop time exceeds this [min].
    o2_switch : float or None
        In-water air/oxygen: oxygen from this stop depth up [unit]; None builds
        no ``air_o2`` mode.
    o2_air_break : tuple of float
        In-water (oxygen minutes, air minutes) cycle.
    surd_leave_water : float or None
        Surface decompression: in-water stops at and deeper than this depth,
        then leave the water [unit]; None builds no ``surd_o2`` mode.
    surd_interval : float
        Surface interval from leaving the water stop to arriving at the chamber
        depth [min].
    chamber_depth : float
        Chamber depth of the first oxygen half-period [unit].
    chamber_second_depth : float
        Chamber depth of the later oxygen periods [unit].
    chamber_air_break : tuple of float
        Chamber (oxygen period minutes, air-break minutes).
    """

    unit: str
    depths: tuple[float, ...]
    descent_rate: float
    ascent_rate: float
    stop_step: float
    last_stop: float
    gf_low: float = 0.30
    gf_high: float = 0.85
    model: str = "zhl16c"
    max_stop_time: float = 180.0
    o2_switch: float | None = None
    o2_air_break: tuple[float, float] = (30.0, 5.0)
    surd_leave_water: float | None = None
    surd_interval: float = 5.0
    chamber_depth: float = 50.0
    chamber_second_depth: float = 40.0
    chamber_air_break: tuple[float, float] = (30.0, 5.0)

    @property
    def modes(self) -> tuple[str, ...]:
        """The decompression modes this build computes, in ``schema.MODES`` order."""
        have = {"air": True, "air_o2": self.o2_switch is not None,
                "surd_o2": self.surd_leave_water is not None}
        return tuple(m for m in MODES if have[m])

    @property
    def name(self) -> str:
        """File stem, e.g. ``zhl16c-gf30-85-air-fsw``."""
        return (f"{self.model}-gf{round(self.gf_low * 100)}-{round(self.gf_high * 100)}"
                f"-air-{self.unit}")


#: The two bundled computed tables: 30-190 fsw with stops every 10 fsw, and the
#: metric variant 9-57 msw with stops every 3 msw.  Rates and stop grids are the
#: defaults of ``supervisor schedule``; in-water oxygen from 30 fsw / 9 msw;
#: surface decompression leaves the water after the 40 fsw / 12 msw stop (a choice of
#: this build) and breathes chamber oxygen at 50 then 40 fsw / 15 then 12 msw (the
#: trade's pattern; the metric depths from memory).
FSW_SPEC = BuildSpec("fsw", tuple(float(d) for d in range(30, 200, 10)), 75.0, 30.0, 10.0, 10.0,
                     o2_switch=30.0, surd_leave_water=40.0, chamber_depth=50.0,
                     chamber_second_depth=40.0)
MSW_SPEC = BuildSpec("msw", tuple(float(d) for d in range(9, 60, 3)), 23.0, 9.0, 3.0, 3.0,
                     o2_switch=9.0, surd_leave_water=12.0, chamber_depth=15.0,
                     chamber_second_depth=12.0)


def model_title(model: str) -> str:
    """Display name of a coefficient set: ``zhl16c`` -> ``ZH-L16C``."""
    return f"ZH-L16{model[-1].upper()}" if model.startswith("zhl16") else model


#: Total stop time the build lets the planner compute [min] (its grid is fixed).
_BUILD_MAX_TOTAL_STOP_MIN = 100_000


def _request(spec: BuildSpec, depth: float, bottom_time: float,
             mode: str = "air") -> ScheduleRequest:
    """The engine request of one row in one mode (the options of ``supervisor schedule``)."""
    extra: dict[str, Any] = {}
    if mode == "air_o2":
        extra = {"deco_gases": (("oxygen", float(spec.o2_switch)),),  # type: ignore[arg-type]
                 "o2_air_break": tuple(spec.o2_air_break)}
    elif mode == "surd_o2":
        extra = {"surface_decompression": SurfaceDecompression(
            leave_water_depth=float(spec.surd_leave_water),  # type: ignore[arg-type]
            surface_interval_min=spec.surd_interval, chamber_depth=spec.chamber_depth,
            chamber_gas="oxygen", air_break=tuple(spec.chamber_air_break),
            second_depth=spec.chamber_second_depth)}
    return ScheduleRequest(
        depth=depth, bottom_time_min=bottom_time, unit=spec.unit, gas="air", model=spec.model,
        gf_low=spec.gf_low, gf_high=spec.gf_high, descent_rate=spec.descent_rate,
        ascent_rate=spec.ascent_rate, stop_step=spec.stop_step, last_stop=spec.last_stop,
        # the build's fixed grid of depths and bottom times runs past the planner's usual
        # range before its rows are cut at max_stop_time (a bounded, known set of requests)
        max_total_stop_min=_BUILD_MAX_TOTAL_STOP_MIN, **extra,
    )


def _num(x: float) -> int | float:
    r = round(float(x), 2)
    return int(r) if r.is_integer() else r


def _stop_minutes(stop: Stop) -> float:
    """A stop's minutes as the file lists them: chamber stops without their air breaks."""
    if stop.place != "chamber":
        return float(stop.minutes)
    return math.fsum(m for g, m in stop.breathing if g == stop.gas)


def _stops(res: ScheduleResult) -> list[dict[str, Any]]:
    return [{"depth": _num(s.depth), "minutes": _num(_stop_minutes(s)), "gas": s.gas,
             "place": s.place} for s in res.stops]


def _surd_chamber_o2(res: ScheduleResult) -> float:
    """Chamber oxygen minutes of a surface-decompression schedule (air breaks left out)."""
    return math.fsum(_stop_minutes(s) for s in res.stops if s.place == "chamber")


_LABEL = {"air": "air", "air_o2": "air/oxygen", "surd_o2": "surface decompression"}


def _row(spec: BuildSpec, by_mode: dict[str, ScheduleResult]) -> dict[str, Any]:
    res = by_mode["air"]
    req = res.request
    row: dict[str, Any] = {"depth": _num(req.depth), "bottom_time": _num(req.bottom_time_min)}
    if res.stops:
        row["time_to_first_stop"] = _num((req.depth - res.stops[0].depth) / spec.ascent_rate)
    gf = [f"{_LABEL[m]} {100 * r.surfacing_gf:.0f} % (compartment "
          f"{r.controlling_compartment})" for m, r in by_mode.items()]
    note = ("model surfacing supersaturation, share of the M-value gradient: " + ", ".join(gf))
    surd = by_mode.get("surd_o2")
    if surd is not None and surd.surface_interval_max_gf is not None:
        note += (f"; surface decompression: {_num(surd.total_ascent_min)} min from leaving the "
                 f"bottom to leaving the chamber, chamber oxygen {_num(_surd_chamber_o2(surd))} "
                 f"min in {surd.chamber_o2_periods:g} period(s), supersaturation peaks at "
                 f"{100 * surd.surface_interval_max_gf:.0f} % of the M-value gradient during "
                 "the surface interval")
    row.update({"repetitive_group": "", "exceptional_exposure": False, "note": note})
    for mode, r in by_mode.items():
        sched: dict[str, Any] = {"stops": _stops(r)}
        if mode == "surd_o2" and r.chamber_o2_periods is not None:
            sched["chamber_o2_periods"] = _num(r.chamber_o2_periods)
        if mode != "surd_o2" or any(s.place == "water" for s in r.stops):
            sched["total_ascent"] = _num(r.total_ascent_min)
        row[mode] = sched
    row.update({
        "source_status": "COMPUTED",
        "verification": "unverified", "verified_by": "", "verified_on": "",
        "verification_method": "", "row_hash": "",
    })
    return row



def build_rows(spec: BuildSpec) -> tuple[list[dict[str, Any]], list[ScheduleResult]]:
    """Compute the rows of one table.

    Vectorised passes of :func:`plan_schedules`: one for the no-stop limit at
    every depth, one for every (depth, bottom time) beyond it in air (which
    fixes the rows), then one per further mode over the rows kept.

    Parameters
    ----------
    spec : BuildSpec

    Returns
    -------
    tuple
        (raw rows in depth then bottom-time order, the in-water air engine
        results behind them).
    """
    depths = np.asarray(spec.depths, dtype=float)
    first = [max(1.0, float(np.ceil(d / spec.descent_rate))) for d in depths]
    probe = plan_schedules([_request(spec, float(d), t) for d, t in zip(depths, first,
                                                                          strict=True)])
    requests: list[ScheduleRequest] = []
    for d, pr in zip(depths, probe, strict=True):
        ndl = pr.no_stop_limit_min
        times = [float(t) for t in BOTTOM_TIMES if ndl is None or t > ndl]
        if ndl is not None and ndl >= d / spec.descent_rate:
            times = [float(ndl)] + times
        requests += [_request(spec, float(d), t) for t in times
                     if t >= d / spec.descent_rate]
    results = plan_schedules(requests)
    stop_time = np.array([r.total_stop_min for r in results], dtype=float)
    depth_of = np.array([r.request.depth for r in results])
    keep = np.ones(len(results), dtype=bool)
    for d in depths:
        idx = np.nonzero(depth_of == d)[0]
        over = idx[stop_time[idx] > spec.max_stop_time]
        if over.size:
            keep[idx[idx > over[0]]] = False  # keep the first row beyond the cap, drop the rest
    kept = [r for r, k in zip(results, keep, strict=True) if k]
    by_row: list[dict[str, ScheduleResult]] = [{"air": r} for r in kept]
    for mode in spec.modes[1:]:
        # surface decompression needs the chamber depth within the dive (engine rule)
        idx = [k for k, r in enumerate(kept)
               if mode != "surd_o2" or r.request.depth >= spec.chamber_depth - 1e-9]
        reqs = [_request(spec, kept[k].request.depth, kept[k].request.bottom_time_min, mode)
                for k in idx]
        for k, res in zip(idx, plan_schedules(reqs) if reqs else [], strict=True):
            by_row[k][mode] = res
    rows = [_row(spec, m) for m in by_row]
    if "surd_o2" in spec.modes:
        _surd_never_less(spec, rows)
    return rows, kept


def _surd_never_less(spec: BuildSpec, rows: list[dict[str, Any]]) -> None:
    """Raise a surface-decompression row that needs less than a shorter or shallower row.

    The model can give a longer or deeper dive less in-water time in this mode (its
    gradient-factor line moves with a deeper first stop, and the shallower stops
    that make up for it in the water are done in the chamber here).  A table never
    lists less decompression for a longer bottom time or a deeper depth, so such a
    row takes, stop by stop, the longer of its own and that row's water stops and
    the larger number of chamber periods; its total ascent follows the file's
    convention and its note says so.  Rows are in depth, then bottom-time order.
    """
    by_time: dict[float, dict[str, Any]] = {}  # the deepest row so far at each bottom time
    floor: dict[str, Any] | None = None  # the row before at the same depth
    for k, row in enumerate(rows):
        if k and row["depth"] != rows[k - 1]["depth"]:
            floor = None
        sched = row.get("surd_o2")
        if not sched or not sched["stops"]:
            continue
        mine = _surd_figures(row["bottom_time"], sched)
        for _ in range(2):  # raising for one neighbour may fall short of the other
            low = [f for f in (floor, by_time.get(row["bottom_time"])) if f is not None
                   and _less(mine, f)]
            if not low:
                break
            water = dict(mine["water"])
            for f in low:
                water = {d: max(water.get(d, 0), f["water"].get(d, 0))
                         for d in set(water) | set(f["water"])}
            periods = max([mine["periods"], *(f["periods"] for f in low)])
            sched.update(_surd_schedule(spec, float(row["depth"]), water, periods))
            mine = _surd_figures(row["bottom_time"], sched)
            row["note"] += "; surface decompression raised to at least " + " and ".join(
                f"the {f['label']} row's" for f in low) + (
                ", stop by stop (the model gives less here; a table never lists less "
                "decompression for a longer bottom time or a deeper depth)")
        mine["label"] = f"{_num(row['depth'])} {spec.unit} / {_num(row['bottom_time'])} min"
        floor = by_time[row["bottom_time"]] = mine


def _surd_figures(bottom_time: float, sched: dict[str, Any]) -> dict[str, Any]:
    """Water stops, periods, stop time and total ascent of a surface-decompression schedule."""
    return {"water": {s["depth"]: s["minutes"] for s in sched["stops"] if s["place"] == "water"},
            "periods": float(sched.get("chamber_o2_periods") or 0.0),
            "stop_time": math.fsum(s["minutes"] for s in sched["stops"]),
            "total": sched.get("total_ascent"), "bottom_time": bottom_time, "label": ""}


def _less(a: dict[str, Any], b: dict[str, Any]) -> bool:
    """Whether schedule ``a`` lists less decompression than ``b`` in any of the file's checks."""
    return (a["stop_time"] < b["stop_time"] - 1e-9 or a["periods"] < b["periods"]
            or (a["total"] is not None and b["total"] is not None
                and a["total"] < b["total"] - 1e-9))


def _surd_schedule(spec: BuildSpec, depth: float, water: dict[float, float],
                   periods: float) -> dict[str, Any]:
    """A surface-decompression schedule from its water stops and chamber periods."""
    o2, brk = spec.chamber_air_break
    stops = [{"depth": _num(d), "minutes": _num(m), "gas": "air", "place": "water"}
             for d, m in sorted(water.items(), reverse=True) if m > 0]
    for d, parts in chamber_pattern(int(round(2 * periods)), spec.chamber_depth,
                                    spec.chamber_second_depth, o2, brk):
        stops.append({"depth": _num(d), "minutes": _num(math.fsum(m for g, m in parts
                                                                   if g == "oxygen")),
                      "gas": "oxygen", "place": "chamber"})
    out: dict[str, Any] = {"stops": stops, "chamber_o2_periods": _num(periods)}
    ws = [s for s in stops if s["place"] == "water"]
    if ws:
        # travel to the last water stop, the water stops, the surface interval, the chamber
        chamber = (periods * o2 + max(0, math.ceil(periods - 1e-9) - 1) * brk
                   + spec.chamber_depth / spec.ascent_rate)
        out["total_ascent"] = _num((depth - ws[-1]["depth"]) / spec.ascent_rate
                                   + math.fsum(s["minutes"] for s in ws)
                                   + spec.surd_interval + chamber)
    return out


def _mode_conventions(spec: BuildSpec) -> tuple[dict[str, Any], list[str]]:
    """The conventions keys and the convention notes of the modes beyond in-water air."""
    u = spec.unit
    conv: dict[str, Any] = {}
    notes: list[str] = []
    if "air_o2" in spec.modes:
        o2, air = spec.o2_air_break
        conv.update({"o2_period_min": float(o2), "air_break_min": float(air),
                     "air_breaks_in_stop_time": True})
        notes.append(
            f"In-water air/oxygen (air_o2): air at the stops deeper than {spec.o2_switch:g} {u}, "
            f"oxygen from the {spec.o2_switch:g} {u} stop up: the diver changes to oxygen on "
            f"arriving at {spec.o2_switch:g} {u} (from a bottom at or above it, at the first "
            "stop depth above the bottom), also where no stop is needed there, and travels and "
            f"ascends on oxygen above it; cycles of {o2:g} min oxygen and {air:g} min air start "
            "on the change to oxygen and run on across the oxygen stops; the air breaks count "
            "in the stop minutes (a stop may end, and the next begin, within an air break). "
            f"Oxygen at {spec.o2_switch:g} {u} is above a PO2 of 1.6 atm (the top of the NOAA "
            "CNS table): the engine warns for every such schedule.")
    if "surd_o2" in spec.modes:
        o2, air = spec.chamber_air_break
        c1, c2 = spec.chamber_depth, spec.chamber_second_depth
        conv.update({"chamber_o2_period_min": float(o2), "chamber_air_break_min": float(air),
                     "surface_interval_min": float(spec.surd_interval),
                     "chamber_travel_min": _num(c1 / spec.ascent_rate)})
        notes.append(
            f"Surface decompression on oxygen (surd_o2): the in-water air stops at and deeper "
            f"than {spec.surd_leave_water:g} {u}, then a surface interval of "
            f"{spec.surd_interval:g} min from leaving the water stop (or, with no stop that "
            "deep, the depth of the first stop) to arriving at "
            f"{c1:g} {u} in the chamber (ascent at {spec.ascent_rate:g} "
            f"{u}/min, air on deck, compression on air at {spec.descent_rate:g} {u}/min), then "
            f"chamber oxygen in whole or half {o2:g}-min periods: the first half-period "
            f"({o2 / 2:g} min) at {c1:g} {u}, the rest at {c2:g} {u}, a {air:g}-min air break "
            "after every full period that more oxygen follows, then the ascent to the surface "
            f"on air; chamber travel at {spec.ascent_rate:g} {u}/min on oxygen between the "
            f"depths, not counted in the periods (chamber_travel_min: {c1:g} {u} to the "
            "surface in all). The number of periods (chamber_o2_periods) is the least number "
            "of half-periods after which the model's GF-high ceiling is at the surface "
            "(COMPUTED). Chamber stops are listed with place = chamber and their oxygen "
            "minutes; the air breaks are not stop time. The pattern follows the U.S. Navy "
            "Diving Manual, Rev 7 ch. 9 (as quoted by secondary sources) and Rev 4 Change A "
            "ch. 14 (older edition): 30-min periods, 5-min air breaks, 50 then 40 fsw; the "
            "metric depths 15 then 12 m are from memory. total_ascent is the engine's time "
            "from leaving the bottom to leaving the chamber, left out where the schedule has "
            "no water stop (the file's check then counts no travel to the surface interval; "
            "the row note gives the total); the row note also gives the peak supersaturation "
            "of the surface interval. Only depths at or deeper than "
            f"{c1:g} {u} have this mode.")
    return conv, notes


def build_document(spec: BuildSpec) -> dict[str, Any]:
    """Return the table document of a build (deterministic: no date, no version)."""
    rows, _ = build_rows(spec)
    coeff = load_coefficients(spec.model)
    status = coeff.status_for(False)
    gf = f"{round(spec.gf_low * 100)}/{round(spec.gf_high * 100)}"
    mt = model_title(spec.model)
    u = spec.unit
    depths = f"{spec.depths[0]:g}-{spec.depths[-1]:g} {u}"
    modes = ", ".join(MODE_TITLES[m] for m in spec.modes)
    mode_conv, mode_notes = _mode_conventions(spec)
    options = {"air_o2": f"--deco-gas oxygen@{spec.o2_switch:g} --o2-air-break "
                         f"{spec.o2_air_break[0]:g}/{spec.o2_air_break[1]:g}",
               "surd_o2": f"--surface-decompression {spec.surd_leave_water:g} "
                          f"--surface-interval {spec.surd_interval:g} --chamber-depth "
                          f"{spec.chamber_depth:g} --chamber-second-depth "
                          f"{spec.chamber_second_depth:g} --chamber-air-break "
                          f"{spec.chamber_air_break[0]:g}/{spec.chamber_air_break[1]:g}"}
    same = "; ".join(f"{m}: {options[m]}" for m in spec.modes if m in options)
    return {
        "schema": SCHEMA_ID,
        "name": spec.name,
        "kind": "decompression",
        "title": f"Air decompression schedules ({modes}) computed by this project from {mt} "
                 f"with gradient factors {gf} ({depths}): model output, not a published table",
        "provenance": {
            "source_document": f"Computed by this project (supervisor tables build) from the "
                               f"Bühlmann {mt} decompression model with gradient factors; "
                               "not a published table",
            "issuing_body": "this project (computed; not issued by any diving authority)",
            "edition": f"model {spec.model}, gradient factors {gf}, coefficients {status}",
            "table": f"air; {modes}; stops every {spec.stop_step:g} {u}, {depths}",
            "date": "not recorded: computed, so that the build is reproducible byte for byte",
            "licence": "output of this project's software (MIT licence); no published table "
                       "is reproduced",
            "source_status": "COMPUTED",
            "transcribed_by": "supervisor tables build",
            "transcribed_on": "",
            "notes": "Every schedule is the engine's (the same as `supervisor schedule` with "
                     "the same options" + (f"; {same}" if same else "") + f"). The "
                     f"{spec.model} coefficients used have source status {status}; the "
                     "schedules are no more certain than that." + (
                         " The surface-decompression chamber pattern (whole or half 30-min "
                         "oxygen periods with 5-min air breaks, the first half-period at "
                         f"{spec.chamber_depth:g} {u}, the rest at "
                         f"{spec.chamber_second_depth:g} {u}) is the trade's, known here from "
                         "secondary copies of the U.S. Navy Diving Manual Rev 7 ch. 9 and "
                         "from Rev 4 Change A ch. 14 (older edition)"
                         + (", its metric depths from memory" if u == "msw" else "")
                         + "; the number of periods in each row is model output (COMPUTED)."
                         if "surd_o2" in spec.modes else "") + " Model output for planning "
                     "review, not a table issued by any authority. Regenerate with "
                     "`supervisor tables build`.",
        },
        "conventions": {
            "depth_unit": u,
            "bottom_time_definition": "from leaving the surface (descent included) to leaving "
                                      "the bottom",
            "depth_rounding": "next-deeper",
            "time_rounding": "next-longer",
            "ascent_rate": float(spec.ascent_rate),
            "stop_depth_reference": "the model treats the stop depth as the pressure at the "
                                    "diver",
            "gas": "air",
            "place": "water",
            "repetitive_groups": [],
            "model": {
                "name": spec.model,
                "gf_low": float(spec.gf_low),
                "gf_high": float(spec.gf_high),
                "descent_rate": float(spec.descent_rate),
                "coefficient_status": status,
                "max_stop_time": float(spec.max_stop_time),
                "bottom_times": [float(t) for t in BOTTOM_TIMES],
            },
            "notes": " ".join([
                f"Stops whole minutes, travel at {spec.ascent_rate:g} {u}/min excluded; descent "
                f"at {spec.descent_rate:g} {u}/min. Each depth starts at its model no-stop "
                "limit; its rows end with the first bottom time whose total in-water air stop "
                f"time exceeds {spec.max_stop_time:g} min (a choice of this build).",
                *mode_notes]),
            "stop_step": float(spec.stop_step),
            "last_stop": float(spec.last_stop),
            "stop_time_includes_travel": False,
            **mode_conv,
        },
        "rows": rows,
    }


def build_tables(out_dir: str | Path, specs: tuple[BuildSpec, ...] = (FSW_SPEC, MSW_SPEC),
                 force: bool = False) -> list[tuple[Path, str]]:
    """Compute and write the tables; refuse to replace a different file without ``force``.

    Parameters
    ----------
    out_dir : str or Path
        Folder to write into (created if missing).
    specs : tuple of BuildSpec
        Tables to build.
    force : bool
        Replace an existing file whose content differs (it may hold verification
        records that the new file would not).

    Returns
    -------
    list of (Path, str)
        Each file and what happened: ``written``, ``unchanged`` or ``replaced``.

    Raises
    ------
    InputError
        If a file exists with other content and ``force`` is not given (nothing
        is written then).
    InvalidTableError
        If a computed table fails validation (nothing is written).
    """
    out = Path(out_dir)
    texts: list[tuple[Path, str]] = []
    for spec in specs:
        doc = build_document(spec)
        path = out / f"{spec.name}.toml"
        table, issues = inspect_document(doc, path, strict=True)
        if table is None:
            raise InvalidTableError(path, issues)
        texts.append((path, dumps_table(doc)))
    for path, text in texts:
        if path.exists() and path.read_text("utf-8") != text and not force:
            raise InputError("--out-dir", f"{path} exists with other content (it may hold "
                             "verification records); give --force to replace it")
    done = []
    out.mkdir(parents=True, exist_ok=True)
    for path, text in texts:
        if path.exists() and path.read_text("utf-8") == text:
            done.append((path, "unchanged"))
            continue
        state = "replaced" if path.exists() else "written"
        atomic_write_text(path, text)
        done.append((path, state))
    return done
