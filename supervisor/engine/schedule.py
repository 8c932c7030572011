"""Decompression schedules, no-stop limits and profile evaluation with ZH-L16 + gradient factors.

Conventions (also printed in every result under ``conventions``):

* Bottom time counts from leaving the surface (descent included) to leaving the bottom.
* Descent and ascent at the given rates; travel between stops at the ascent rate.
* Stops at multiples of the stop step, none shallower than the last stop; stop
  minutes are whole minutes and exclude travel.
* The first stop is the deepest stop depth at which continuing to the next stop
  would break the GF-low ceiling there.  Ceilings are always judged on the tensions
  when leaving the current depth, with no credit for off-gassing during the travel
  (the criterion of the no-stop limit, applied at every stop).
* The diver leaves a stop when no compartment's ceiling, for the gradient factor in
  force at the next stop (or the surface), is deeper than that next stop; the
  gradient factor is GF low at the first stop and GF high at the surface, linear
  in depth between.
* The no-stop limit is the longest whole-minute bottom time whose GF-high ceiling
  at leaving the bottom is at the surface; a dive within it has no stops, and a dive
  beyond it always has a first stop.
* The first stop lasts at least one whole minute; later stops that need no time are
  left out of the list.
* Deco gases switch on arrival at the first stop depth at or above their switch
  depth; the gas with the shallowest switch depth that is allowed is breathed.
* Tissues start saturated with air (21 % O2, 79 % N2) at the surface pressure.

Every batch of requests that share their settings (unit, rates, stop step, gradient
factors, gases, surface pressure) is computed in one vectorised pass: the loop is
over stop depths, never over dives.

References
----------
.. [1] Bühlmann, A. A., Völlm, E. B., Nussberger, P., Tauchmedizin, Springer, 2002.
.. [2] Baker, E. C., "Understanding M-values", Immersed 3(3), 1998; "Clearing up the
       confusion about deep stops", Immersed, 1998 (gradient factors, first stop).
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from contextlib import contextmanager
from contextvars import ContextVar
from dataclasses import dataclass, field, fields, replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor import constants as C
from supervisor.engine import buhlmann as bm
from supervisor.engine.evaluate import (  # re-exported: part of the engine API
    SURFACE_INTERVAL,
    ProfileEvaluation,
    evaluate_profile,
    evaluate_profiles,
    infer_first_stop,
)
from supervisor.engine.kinetics import (
    inspired_pressure,
    rate_constant,
    saturated_tensions,
    schreiner,
    tissue_tensions,
)
from supervisor.errors import InputError, ScheduleError
from supervisor.gas import AIR, Gas, parse_gas
from supervisor.periods import chamber_pattern, cycle_periods, periods_json, stop_text
from supervisor.profile import Profile, Segment
from supervisor.units import DEPTH_UNITS, bar_per_depth_unit

SCHEMA = "supervisor.schedule/1"

_EPS = 1e-9  # bar; tolerance on ceiling comparisons
#: Accepted range of a schedule request: depth (about 30 bar gauge) and bottom time.
MAX_DEPTH: dict[str, float] = {"fsw": 1000.0, "ft": 1000.0, "msw": 300.0, "m": 300.0}
MAX_BOTTOM_MIN: int = 2880
#: Slowest rate and finest stop step accepted [unit/min, unit]: 1 fsw/min, the slowest
#: travel of the Navy oxygen treatment tables (U.S. Navy Diving Manual Rev 4/5, Treatment
#: Tables 5 and 6, ascent <= 1 ft/min; OLDER-EDITION), and a 1 fsw grid (common practice,
#: no source); in metres 0.3.  They bound the work of one schedule (issue: bounded work).
MIN_RATE: dict[str, float] = {"fsw": 1.0, "ft": 1.0, "msw": 0.3, "m": 0.3}
MIN_STOP_STEP: dict[str, float] = {"fsw": 1.0, "ft": 1.0, "msw": 0.3, "m": 0.3}
#: Largest total stop time the planner computes [min]; a schedule needing more is
#: "beyond the model's range" (:class:`BeyondRangeError`), not an endless search.  Two
#: days: above the 33.5-35 h of Navy Treatment Table 4 (FROM MEMORY), far above any
#: surface-oriented decompression.
MAX_TOTAL_STOP_MIN: int = 2880
#: Longest time on the surface in a surface-decompression interval the planner computes
#: [min]: the plan's ``surface_transfer_min`` cap; far beyond the procedure's 5 min.
MAX_SURFACE_MIN: float = 60.0


class BeyondRangeError(ScheduleError):
    """A decompression obligation larger than the planner computes (not an endless search)."""


class WorkLimitError(BeyondRangeError):
    """More schedule computation than one caller's work budget allows (:func:`work_budget`)."""


@dataclass
class _Budget:
    """Stop levels left to a caller: one level is one pass of the planner's stop loop."""

    levels: int
    total: int


_BUDGET: ContextVar[_Budget | None] = ContextVar("_BUDGET", default=None)


@contextmanager
def work_budget(levels: int) -> Iterator[_Budget]:
    """Bound the schedule computations made inside the ``with`` block.

    Every batch of :func:`plan_schedules` costs the number of stop depths its loop
    visits (deepest candidate stop to the last stop, plus the chamber stops of
    surface decompression), charged before it runs; once the budget is spent,
    further schedules raise :class:`WorkLimitError` at once.  The count is
    deterministic (no clock): the same plan always gets the same answer.

    Parameters
    ----------
    levels : int
        Stop levels allowed in the block [count].

    Yields
    ------
    _Budget
        The counter (``levels`` left, ``total`` given).
    """
    budget = _Budget(int(levels), int(levels))
    token = _BUDGET.set(budget)
    try:
        yield budget
    finally:
        _BUDGET.reset(token)


def _charge(reqs: list[ScheduleRequest]) -> None:
    """Charge one batch's stop levels to the budget in force (if any)."""
    budget = _BUDGET.get()
    if budget is None:
        return
    r0 = reqs[0]
    deepest = max(r.depth for r in reqs)
    levels = int(math.ceil(deepest / r0.stop_step - 1e-9)) - int(round(r0.last_stop /
                                                                     r0.stop_step)) + 1
    sd = r0.surface_decompression
    if sd is not None:
        levels += int(math.floor(sd.chamber_depth / r0.stop_step + 1e-9))
    if levels > budget.levels:
        budget.levels = 0
        raise WorkLimitError(
            f"beyond the check's work limit: not computed (this plan asks for more model "
            f"schedules than one check computes, {budget.total} stop levels; split the job "
            "into smaller plans or use a coarser stop step)"
        )
    budget.levels -= max(levels, 1)

CONVENTIONS: dict[str, str] = {
    "bottom_time": "from leaving the surface (descent included) to leaving the bottom",
    "rates": "descent and ascent at the given rates; travel between stops at the ascent rate",
    "stops": "at multiples of the stop step, none shallower than the last stop; whole minutes, "
    "travel excluded",
    "first_stop": "deepest stop depth at which continuing to the next stop would break the "
    "GF-low ceiling there",
    "ceiling_check": "tensions on leaving the current depth, no credit for off-gassing "
    "during travel",
    "gradient_factors": "GF low at the first stop, GF high at the surface, linear in depth between",
    "no_stop_limit": "longest whole-minute bottom time whose GF-high ceiling at leaving the "
    "bottom is at the surface; compartments still loading during the ascent can surface "
    "slightly above GF high, see surfacing_gf_percent",
    "air": "21 % O2, 79 % N2",
    "initial_tissues": "saturated with air at the surface pressure",
    "water_vapour": "0.0627 bar subtracted from the inspired pressure (Buhlmann, RQ 1)",
}


#: The chamber pattern of surface decompression, as printed with every such schedule.
SURD_PATTERN = (
    "chamber oxygen in whole or half periods: the first half-period at the first chamber "
    "depth, the rest at the second, an air break after every full period that more oxygen "
    "follows (travel between the depths on oxygen, not counted in the periods), then the "
    "ascent to the surface on air; the number of half-periods is the least after which no "
    "compartment's GF-high ceiling is below the surface (this model's figure). Pattern after "
    "the U.S. Navy Diving Manual, Rev 7 ch. 9 (as quoted by secondary sources) and Rev 4 "
    "Change A ch. 14 (older edition): 30-min periods, 5-min air breaks, 50 then 40 fsw; the "
    "metric depths 15 then 12 m are from memory"
)


@dataclass(frozen=True)
class SurfaceDecompression:
    """Surface decompression: leave the water, recompress in a chamber, decompress on a gas.

    Parameters
    ----------
    The chamber follows the trade's pattern (:func:`supervisor.periods.chamber_pattern`):
    the chamber gas in whole or half periods of ``air_break[0]`` minutes, the
    first half-period at ``chamber_depth`` and the rest at ``second_depth``, an
    air break of ``air_break[1]`` minutes after every full period that more gas
    follows; the number of half-periods is the least that clears the model's
    obligation (module docstring).

    Parameters
    ----------
    leave_water_depth : float
        In-water stops at or deeper than this depth are done in the water; the
        diver then surfaces instead of going to the next (shallower) stop [unit].
    surface_interval_min : float
        Time from leaving the last water stop to arriving at chamber depth [min].
    chamber_depth : float
        Chamber depth of the first half-period [unit].
    chamber_gas : str
        Gas breathed in the chamber periods (``oxygen`` by default).
    air_break : tuple of float or None
        (period minutes, air-break minutes); ``None`` gives 30-min periods without
        air breaks.
    compression_rate : float or None
        Rate of the chamber compression to the first chamber depth [unit/min];
        ``None`` uses the dive's descent rate.
    second_depth : float or None
        Chamber depth of the periods after the first half-period [unit], no deeper
        than ``chamber_depth``; ``None`` keeps every period at ``chamber_depth``.
    """

    leave_water_depth: float
    surface_interval_min: float = 5.0
    chamber_depth: float = 50.0
    chamber_gas: str = "oxygen"
    air_break: tuple[float, float] | None = (30.0, 5.0)
    compression_rate: float | None = None
    second_depth: float | None = None

    def compression(self, descent_rate: float) -> float:
        """Chamber compression rate in force [unit/min]."""
        return descent_rate if self.compression_rate is None else self.compression_rate

    @property
    def later_depth(self) -> float:
        """Chamber depth of the periods after the first half-period [unit]."""
        return self.chamber_depth if self.second_depth is None else float(self.second_depth)

    @property
    def period_min(self) -> float:
        """Length of one chamber period [min] (30 without air breaks)."""
        return 30.0 if self.air_break is None else float(self.air_break[0])

    @property
    def break_min(self) -> float:
        """Air break after a full chamber period [min] (0: none)."""
        return 0.0 if self.air_break is None else float(self.air_break[1])


@dataclass(frozen=True)
class ScheduleRequest:
    """Inputs of one schedule; see the module docstring for the conventions.

    Parameters
    ----------
    depth : float
        Maximum (bottom) depth [unit], > 0.
    bottom_time_min : float
        Bottom time [min], counted from leaving the surface.
    unit : {"fsw", "msw", "ft", "m"}
        Depth unit.
    gas : str
        Bottom gas (``air``, ``oxygen``, ``32/0``, ``16/84`` ...).
    model : {"zhl16a", "zhl16b", "zhl16c"}
        Coefficient set.
    gf_low, gf_high : float
        Gradient factors [-], 0.01 <= gf_low <= gf_high <= 1.
    descent_rate, ascent_rate : float
        Rates [unit/min], > 0.
    stop_step, last_stop : float
        Spacing of stop depths and the shallowest stop [unit]; the last stop is a
        multiple of the step.
    deco_gases : tuple of (str, float)
        Decompression gases and the depth [unit] from which each may be breathed.
    p_surface_bar : float
        Surface pressure [bar] (lower at altitude).
    water : {"salt", "fresh"}
        Water, for length units.
    ph2o_bar : float
        Water-vapour pressure [bar].
    o2_air_break : tuple of float or None
        (oxygen minutes, air minutes) cycle for in-water oxygen stops.
    surface_decompression : SurfaceDecompression or None
        Surface decompression in a chamber, if used.
    p_n2_0, p_he_0 : tuple of float or None
        Tensions at leaving the surface [bar] (a repetitive dive); default saturated with air.
    max_stop_min : int
        Longest single stop before the schedule is declared unable to clear [min].
    max_total_stop_min : int
        Largest total stop time computed [min]; beyond it the schedule is "beyond the
        model's range" (:class:`BeyondRangeError`).
    """

    depth: float
    bottom_time_min: float
    unit: str = "fsw"
    gas: str = "air"
    model: str = "zhl16c"
    gf_low: float = 0.30
    gf_high: float = 0.85
    descent_rate: float = 75.0
    ascent_rate: float = 30.0
    stop_step: float = 10.0
    last_stop: float = 10.0
    deco_gases: tuple[tuple[str, float], ...] = ()
    p_surface_bar: float = C.P_ATM_BAR
    water: str = "salt"
    ph2o_bar: float = C.PH2O_BAR
    o2_air_break: tuple[float, float] | None = None
    surface_decompression: SurfaceDecompression | None = None
    p_n2_0: tuple[float, ...] | None = None
    p_he_0: tuple[float, ...] | None = None
    max_stop_min: int = 1440
    max_total_stop_min: int = MAX_TOTAL_STOP_MIN

    def validate(self) -> None:
        """Raise InputError naming the option and the accepted range for bad input."""
        _num = _finite
        if self.unit not in DEPTH_UNITS:
            raise InputError(
                "--unit", f"got {self.unit!r}; expected one of {', '.join(DEPTH_UNITS)}"
            )
        if self.model not in bm.MODELS:
            raise InputError(
                "--model", f"unknown model {self.model!r}; expected one of {', '.join(bm.MODELS)}"
            )
        max_depth = MAX_DEPTH[self.unit]
        if not _num(self.depth) or self.depth <= 0 or self.depth > max_depth:
            raise InputError(
                "--depth", f"got {self.depth!r}; expected a depth > 0 and <= {max_depth:g} "
                f"{self.unit}"
            )
        slowest = MIN_RATE[self.unit]
        for name, v in (("--descent-rate", self.descent_rate), ("--ascent-rate", self.ascent_rate)):
            if not _num(v) or v < slowest:
                raise InputError(name, f"got {v!r}; expected a rate >= {slowest:g} {self.unit}/min")
        if not _num(self.bottom_time_min) or not 0 < self.bottom_time_min <= MAX_BOTTOM_MIN:
            raise InputError(
                "--bottom-time",
                f"got {self.bottom_time_min!r}; expected minutes > 0 and <= {MAX_BOTTOM_MIN}",
            )
        t_desc = self.depth / self.descent_rate
        if self.bottom_time_min + 1e-9 < t_desc:
            raise InputError(
                "--bottom-time",
                f"{self.bottom_time_min:g} min is shorter than the descent "
                f"({t_desc:.2f} min at {self.descent_rate:g} {self.unit}/min); "
                "bottom time counts from leaving the surface",
            )
        for name, v in (("--gf low", self.gf_low), ("--gf high", self.gf_high)):
            if not _num(v) or not (0.01 - 1e-12 <= v <= 1.0 + 1e-12):
                raise InputError("--gf", f"{name[5:]} {v * 100:g} is outside 1-100 %")
        if self.gf_low > self.gf_high + 1e-12:
            raise InputError(
                "--gf",
                f"low {self.gf_low * 100:g} is above high {self.gf_high * 100:g}; "
                "expected LOW/HIGH with LOW <= HIGH",
            )
        finest = MIN_STOP_STEP[self.unit]
        if not _num(self.stop_step) or not finest <= self.stop_step <= max_depth:
            raise InputError("--stop-step", f"got {self.stop_step!r}; expected a step from "
                             f"{finest:g} to {max_depth:g} {self.unit}")
        ratio = self.last_stop / self.stop_step if self.stop_step else 0.0
        if not _num(self.last_stop) or self.last_stop <= 0 or abs(ratio - round(ratio)) > 1e-9:
            raise InputError(
                "--last-stop",
                f"got {self.last_stop!r}; expected a positive multiple of the stop step "
                f"({self.stop_step:g} {self.unit})",
            )
        if not _num(self.p_surface_bar) or not (0.2 <= self.p_surface_bar <= 1.2):
            raise InputError("p_surface_bar", f"got {self.p_surface_bar!r}; expected 0.2-1.2 bar")
        parse_gas(self.gas, "--gas")
        for g, d in self.deco_gases:
            parse_gas(g, "--deco-gas")
            if not _num(d) or d < 0:
                raise InputError("--deco-gas", f"switch depth {d!r} must be >= 0 {self.unit}")
        for name, ab in (("o2_air_break", self.o2_air_break),):
            if ab is not None and (len(ab) != 2 or min(ab) <= 0):
                raise InputError(name, "expected (gas minutes, air minutes), both > 0")
        sd = self.surface_decompression
        if sd is not None:
            u = self.unit
            for name, v in (("--surface-decompression", sd.leave_water_depth),
                            ("--chamber-depth", sd.chamber_depth)):
                if not _num(v) or v < self.last_stop or v > self.depth:
                    raise InputError(
                        name, f"got {v!r}; expected a depth from the last stop "
                        f"({self.last_stop:g} {u}) to the bottom depth ({self.depth:g} {u})"
                    )
            cr = sd.compression_rate
            if cr is not None and (not _num(cr) or cr < slowest):
                raise InputError("--chamber-compression-rate",
                                 f"got {cr!r}; expected a rate >= {slowest:g} {u}/min")
            travel = sd.leave_water_depth / self.ascent_rate + sd.chamber_depth / sd.compression(
                self.descent_rate)
            si = sd.surface_interval_min
            if not _num(si) or si + 1e-9 < travel or si > travel + MAX_SURFACE_MIN + 1e-9:
                raise InputError(
                    "--surface-interval",
                    f"got {si!r} min; expected from the travel time ({travel:.2f} min: up from "
                    f"{sd.leave_water_depth:g} {u}, down to {sd.chamber_depth:g} {u}) to "
                    f"{travel + MAX_SURFACE_MIN:.2f} min (at most {MAX_SURFACE_MIN:g} min on "
                    "the surface)",
                )
            second = sd.second_depth
            if second is not None and (not _num(second) or second <= 0
                                       or second > sd.chamber_depth + 1e-9):
                raise InputError(
                    "--chamber-second-depth", f"got {second!r}; expected a depth > 0 and no "
                    f"deeper than the first chamber depth ({sd.chamber_depth:g} {u})")
            parse_gas(sd.chamber_gas, "surface_decompression.chamber_gas")
            if sd.air_break is not None and (
                len(sd.air_break) != 2 or not all(_num(x) and x > 0 for x in sd.air_break)
            ):
                raise InputError("--chamber-air-break", "expected GAS_MIN/AIR_MIN, both > 0")


def _finite(v: Any) -> bool:
    try:
        return math.isfinite(float(v))
    except (TypeError, ValueError):
        return False


@dataclass(frozen=True)
class Stop:
    """A decompression stop: depth [unit], minutes, gas, place and breathing periods.

    ``minutes`` is the time at the stop, air breaks included (whole minutes in
    the water; chamber stops are whole or half oxygen periods).  ``periods``
    lists what is breathed in order, ``(gas, minutes)``: one period on ``gas``
    for a stop without air breaks.
    """

    depth: float
    minutes: int | float
    gas: str
    place: str = "water"
    periods: tuple[tuple[str, float], ...] = ()

    @property
    def breathing(self) -> list[tuple[str, float]]:
        """The stop's periods (one on its gas when none are recorded)."""
        return list(self.periods) if self.periods else [(self.gas, float(self.minutes))]

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready dictionary; ``periods`` lists the breathing periods in order."""
        return {
            "depth": _num_out(self.depth),
            "minutes": _num_out(self.minutes),
            "gas": self.gas,
            "place": self.place,
            "periods": periods_json(self.breathing),
        }

    def text(self, unit: str) -> str:
        """The stop in words, its periods shown when it has air breaks."""
        return stop_text(self.depth, self.minutes, self.gas, self.place, unit, self.breathing)


def _num_out(x: float) -> float | int:
    return int(round(x)) if abs(x - round(x)) < 1e-9 else round(float(x), 3)


@dataclass
class ScheduleResult:
    """Outcome of one schedule computation."""

    request: ScheduleRequest
    stops: list[Stop]
    no_stop_limit_min: int | None
    first_stop_depth: float | None
    total_stop_min: int
    total_ascent_min: float
    profile: Profile
    final_p_n2: NDArray[np.float64]
    final_p_he: NDArray[np.float64]
    surfacing_gf: float
    controlling_compartment: str
    coefficient_status: str
    surface_interval_max_gf: float | None = None
    chamber_o2_periods: float | None = None
    oxygen: Any = None
    labels: tuple[str, ...] = field(default=())
    warnings: list[str] = field(default_factory=list)

    def to_json(self) -> dict[str, Any]:
        """The ``supervisor.schedule/1`` JSON object."""
        r = self.request
        sd = r.surface_decompression
        ox = self.oxygen
        oxygen = ox.to_dict() if hasattr(ox, "to_dict") else {"cns_percent": None, "otu": None}
        return {
            "schema": SCHEMA,
            "unit": r.unit,
            "depth": _num_out(r.depth),
            "bottom_time_min": _num_out(r.bottom_time_min),
            "gas": parse_gas(r.gas).name,
            "deco_gases": [
                {"gas": parse_gas(g).name, "from_depth": _num_out(d)} for g, d in r.deco_gases
            ],
            "model": r.model,
            "gf_low_percent": round(r.gf_low * 100, 6),
            "gf_high_percent": round(r.gf_high * 100, 6),
            "coefficient_status": self.coefficient_status,
            "no_stop_limit_min": self.no_stop_limit_min,
            "first_stop_depth": None
            if self.first_stop_depth is None
            else _num_out(self.first_stop_depth),
            "stops": [s.to_dict() for s in self.stops],
            "total_stop_min": int(self.total_stop_min),
            "total_ascent_min": round(float(self.total_ascent_min), 2),
            "surfacing_gf_percent": round(100 * self.surfacing_gf, 1),
            "controlling_compartment": self.controlling_compartment,
            "surface_interval_max_gf_percent": None
            if self.surface_interval_max_gf is None
            else round(100 * self.surface_interval_max_gf, 1),
            "chamber_o2_periods": self.chamber_o2_periods,
            "chamber_period_min": None if sd is None else _num_out(sd.period_min),
            "surface_decompression": None if sd is None else {
                "leave_water_depth": _num_out(sd.leave_water_depth),
                "surface_interval_min": _num_out(sd.surface_interval_min),
                "chamber_depths": [_num_out(sd.chamber_depth), _num_out(sd.later_depth)],
                "chamber_gas": parse_gas(sd.chamber_gas).name,
                "period_min": _num_out(sd.period_min),
                "air_break_min": _num_out(sd.break_min),
                "pattern": SURD_PATTERN,
            },
            "oxygen": oxygen,
            "warnings": list(self.warnings),
            "descent_rate": _num_out(r.descent_rate),
            "ascent_rate": _num_out(r.ascent_rate),
            "stop_step": _num_out(r.stop_step),
            "last_stop": _num_out(r.last_stop),
            "p_surface_bar": round(r.p_surface_bar, 5),
            "conventions": dict(CONVENTIONS),
            "caution": "Model output for planning review only; it does not replace the "
            "reference tables named in the contractor's manual or a qualified supervisor's "
            "judgement. Every schedule carries a residual risk of decompression sickness.",
        }


# --------------------------------------------------------------------------- batch engine

_GROUP_EXCLUDE = {"depth", "bottom_time_min", "gas", "p_n2_0", "p_he_0"}


def _group_key(r: ScheduleRequest) -> tuple:
    return tuple(getattr(r, f.name) for f in fields(r) if f.name not in _GROUP_EXCLUDE)


def plan_schedule(request: ScheduleRequest) -> ScheduleResult:
    """Compute one schedule.

    Parameters
    ----------
    request : ScheduleRequest

    Returns
    -------
    ScheduleResult

    Raises
    ------
    InputError
        For bad input (naming the option and the accepted range).
    ScheduleError
        If a stop can never clear (e.g. a GF high the slowest compartment cannot
        reach at the last stop on the gas breathed there).
    """
    return plan_schedules([request])[0]


def plan_schedules(
    requests: list[ScheduleRequest], *, details: bool = True
) -> list[ScheduleResult]:
    """Compute many schedules; requests sharing settings are computed as one batch.

    Parameters
    ----------
    requests : list of ScheduleRequest
    details : bool
        Compute each schedule's oxygen exposure (``ScheduleResult.oxygen``) and gas
        warnings.  A caller that only needs the stops, tensions and profile (a
        search over bottom times) passes False and gets ``oxygen = None`` and no
        warnings.

    Returns
    -------
    list of ScheduleResult, in the order of the requests.
    """
    for r in requests:
        r.validate()
    groups: dict[tuple, list[int]] = {}
    for i, r in enumerate(requests):
        groups.setdefault(_group_key(r), []).append(i)
    out: list[ScheduleResult | None] = [None] * len(requests)
    for idx in groups.values():
        _charge([requests[i] for i in idx])
        res = _Batch([requests[i] for i in idx]).run(details)
        for i, rr in zip(idx, res, strict=True):
            out[i] = rr
    return out  # type: ignore[return-value]


class _Batch:
    """Lock-step schedule computation for requests that share all settings."""

    def __init__(self, reqs: list[ScheduleRequest]) -> None:
        self.reqs = reqs
        r0 = reqs[0]
        self.r0 = r0
        self.c = bm.load_coefficients(r0.model)
        self.kn = rate_constant(self.c.n2_half)
        self.kh = rate_constant(self.c.he_half)
        self.bpu = bar_per_depth_unit(r0.unit, r0.water)  # type: ignore[arg-type]
        self.ps = r0.p_surface_bar
        self.B = len(reqs)
        self.depth = np.array([r.depth for r in reqs], float)
        self.bt = np.array([r.bottom_time_min for r in reqs], float)
        gases = [parse_gas(r.gas) for r in reqs]
        self.bottom_gas = gases
        self.deco = sorted(
            ((parse_gas(g), float(d)) for g, d in r0.deco_gases), key=lambda gd: gd[1]
        )
        n = self.c.n
        pn0 = np.empty((self.B, n))
        ph0 = np.zeros((self.B, n))
        sat = saturated_tensions(self.ps, AIR.fn2, n, r0.ph2o_bar)
        for i, r in enumerate(reqs):
            pn0[i] = sat if r.p_n2_0 is None else np.asarray(r.p_n2_0, float)
            if r.p_he_0 is not None:
                ph0[i] = np.asarray(r.p_he_0, float)
        if pn0.shape[1] != n or ph0.shape[1] != n:
            raise InputError("p_n2_0", f"expected {n} compartment tensions")
        self.pn0, self.ph0 = pn0, ph0
        self.segs: list[list[Segment]] = [[] for _ in range(self.B)]
        self.uses_he = any(g.fhe > 0 for g in gases) or any(g.fhe > 0 for g, _ in self.deco)
        sd = r0.surface_decompression
        if sd is not None and parse_gas(sd.chamber_gas).fhe > 0:
            self.uses_he = True

    # -- helpers --------------------------------------------------------------------------
    def ceiling(self, pn, ph, gf):
        """GF ceiling [bar]; the nitrogen-only form when no helium is present."""
        if not self.uses_he and not np.any(ph):
            return bm.ceiling_n2(pn, self.c, gf)
        return bm.ceiling(pn, ph, self.c, gf)

    def p(self, depth: NDArray | float) -> NDArray:
        return self.ps + np.asarray(depth, float) * self.bpu

    def gas_at(self, stop_depth: float) -> list[Gas]:
        """Gas breathed at a stop depth, per row: the allowed gas with the shallowest switch."""
        for g, d in self.deco:
            if stop_depth <= d + 1e-9:
                return [g] * self.B
        return list(self.bottom_gas)

    def segment(self, pn, ph, d0, d1, minutes, gases: list[Gas]):
        """Advance tensions over one linear segment per row (vectorised)."""
        fn2 = np.array([g.fn2 for g in gases])
        fhe = np.array([g.fhe for g in gases])
        p0, p1 = self.p(d0), self.p(d1)
        t = np.asarray(minutes, float)
        ph2o = self.r0.ph2o_bar
        pa_n = inspired_pressure(p0, fn2, ph2o)
        pa_h = inspired_pressure(p0, fhe, ph2o)
        with np.errstate(divide="ignore", invalid="ignore"):
            rn = np.where(
                t > 0, (inspired_pressure(p1, fn2, ph2o) - pa_n) / np.where(t > 0, t, 1), 0
            )
            rh = np.where(
                t > 0, (inspired_pressure(p1, fhe, ph2o) - pa_h) / np.where(t > 0, t, 1), 0
            )
        pn = schreiner(pn, pa_n[:, None], rn[:, None], t[:, None], self.kn)
        ph = schreiner(ph, pa_h[:, None], rh[:, None], t[:, None], self.kh)
        return pn, ph

    def record(self, rows: NDArray[np.bool_], d0, d1, minutes, gases, place="water", label=""):
        d0 = np.broadcast_to(np.asarray(d0, float), (self.B,))
        d1 = np.broadcast_to(np.asarray(d1, float), (self.B,))
        m = np.broadcast_to(np.asarray(minutes, float), (self.B,))
        for i in np.flatnonzero(rows):
            if m[i] > 0:
                self.segs[i].append(
                    Segment(float(d0[i]), float(d1[i]), float(m[i]), gases[i], place, label)
                )

    def stop_periods(self, gas: Gas, minutes: float, arrival: float) -> list[tuple[str, float]]:
        """Breathing periods of an in-water stop from its arrival in the air-break cycle."""
        ab = self.r0.o2_air_break
        if ab is None:
            return [(gas.name, minutes)]
        periods, _ = cycle_periods(gas.name, minutes, ab[0], ab[1], arrival)
        return periods

    def record_periods(self, b: int, depth: float, periods: list[tuple[str, float]],
                       place: str, label: str = "stop") -> None:
        """Record one row's stop as one level segment per breathing period."""
        for name, minutes in periods:
            if minutes > 0:
                self.segs[b].append(Segment(depth, depth, minutes, parse_gas(name), place,
                                            label))  # type: ignore[arg-type]

    # -- no-stop limit ------------------------------------------------------------------
    def no_stop_limits(self, pn_desc, ph_desc, t_desc) -> list[int | None]:
        """Longest whole-minute bottom time with the GF-high ceiling at the surface."""
        ph2o = self.r0.ph2o_bar
        pb = self.p(self.depth)
        fn2 = np.array([g.fn2 for g in self.bottom_gas])
        fhe = np.array([g.fhe for g in self.bottom_gas])
        pa_n = inspired_pressure(pb, fn2, ph2o)[:, None]
        pa_h = inspired_pressure(pb, fhe, ph2o)[:, None]
        gfh = self.r0.gf_high

        def ok(pn, ph):
            return np.all(bm.ceiling(pn, ph, self.c, gfh) <= self.ps + _EPS, axis=-1)

        if not np.any(fhe > 0) and not np.any(ph_desc > 0):
            ok_sat = np.all(bm.ceiling_n2(np.broadcast_to(pa_n, pn_desc.shape), self.c, gfh)
                            <= self.ps + _EPS, axis=-1)
        else:
            ok_sat = None

        unlimited = ok_sat if ok_sat is not None else ok(
            np.broadcast_to(pa_n, pn_desc.shape), np.broadcast_to(pa_h, ph_desc.shape)
        )
        out: list[int | None] = [None] * self.B
        todo = np.flatnonzero(~unlimited)
        if todo.size == 0:
            return out
        if not np.any(fhe > 0) and not np.any(ph_desc > 0):
            # nitrogen only: closed form.  Tensions rise towards P_alv at the bottom and the
            # GF-high ceiling is at the surface while P <= P_max = GF a + P_s (GF/b + 1 - GF).
            g = gfh
            p_max = g * self.c.n2_a + (self.ps + _EPS) * (g / self.c.n2_b + 1.0 - g)
            pa = pa_n[todo]
            p0 = pn_desc[todo]
            with np.errstate(divide="ignore", invalid="ignore"):
                ratio = (pa - p0) / (pa - p_max)
                t_reach = np.where(
                    p0 > p_max, -np.inf,
                    np.where(pa > p_max, np.log(np.maximum(ratio, 1.0)) / self.kn, np.inf),
                )
            limit = t_desc[todo] + t_reach.min(axis=1)
            for n_i, row in enumerate(todo):
                # finite or -inf (already over at the end of the descent: 0 min)
                out[row] = int(max(np.floor(limit[n_i] + 1e-9), 0.0))
            return out
        start = np.ceil(t_desc[todo] - 1e-9)
        found = np.full(todo.size, -1.0)
        lo = 0
        width = 512
        while np.any(found < 0) and lo < 200000:
            j = np.arange(lo, lo + width, dtype=float)
            bt = start[:, None] + j[None, :]  # (n, W)
            dt = (bt - t_desc[todo, None])[..., None]
            en = np.exp(-self.kn * dt)
            eh = np.exp(-self.kh * dt)
            pn = pa_n[todo, None] + (pn_desc[todo, None] - pa_n[todo, None]) * en
            ph = pa_h[todo, None] + (ph_desc[todo, None] - pa_h[todo, None]) * eh
            bad = ~ok(pn, ph)  # (n, W)
            first = np.where(bad.any(axis=1), bad.argmax(axis=1), -1)
            new = (found < 0) & (first >= 0)
            found[new] = bt[new, first[new]]
            lo += width
            width *= 4
        for n_i, row in enumerate(todo):
            f = found[n_i]
            out[row] = int(max(f - 1, 0)) if f >= 0 else None
        return out

    # -- stop time search --------------------------------------------------------------
    def stop_minutes(self, active, pn, ph, d_stop, d_next, gases, gf_next, breaks, cycle, place):
        """Whole minutes at a stop so that, on arrival at the next stop, no ceiling is broken.

        Only the rows in ``active`` are computed; minutes are searched in growing
        windows, all candidate minutes of a window at once.  Returns minutes (B,),
        the tensions after the stop and the new air-break cycle position.
        """
        B = self.B
        ph2o = self.r0.ph2o_bar
        p_stop = float(self.p(d_stop))
        p_next = float(self.p(d_next))
        # the ceiling is judged on the tensions when leaving the stop (no credit for
        # off-gassing during the travel), the same criterion as the no-stop limit
        minutes = np.zeros(B, dtype=int)
        idx = np.flatnonzero(active)
        if idx.size == 0:
            return minutes, pn, ph, cycle
        g_rows = [gases[i] for i in idx]
        fn2 = np.array([g.fn2 for g in g_rows])
        fhe = np.array([g.fhe for g in g_rows])
        gfv = np.broadcast_to(np.asarray(gf_next, float), (B,))[idx]
        per = None
        if breaks is not None and any(g.fo2 > 0.5 for g in g_rows):
            per = (float(breaks[0]), float(breaks[1]))
        pa_n = inspired_pressure(p_stop, fn2, ph2o)
        pa_h = inspired_pressure(p_stop, fhe, ph2o)
        he = bool(np.any(fhe > 0) or np.any(ph[idx] > 0))

        def clear(pn_, ph_, rows):
            """pn_/ph_ shaped (n, ..., C) for the subset ``rows`` (indices into idx)."""
            sh = (rows,) + (None,) * (pn_.ndim - 1)
            if he:
                ceil = bm.ceiling(pn_, ph_, self.c, gfv[sh])
            else:
                ceil = bm.ceiling_n2(pn_, self.c, gfv[sh])
            return np.all(ceil <= p_next + _EPS, axis=-1)

        sub = np.arange(idx.size)
        done = clear(pn[idx], ph[idx], sub)
        if np.all(done):
            return minutes, pn, ph, cycle
        if per is None:
            sat_n = np.broadcast_to(pa_n[:, None], (idx.size, self.c.n))
            sat_h = np.broadcast_to(pa_h[:, None], (idx.size, self.c.n))
            never = ~done & ~clear(sat_n, sat_h, sub)
            if np.any(never):
                j = int(np.flatnonzero(never)[0])
                ceil = bm.ceiling(sat_n[j], sat_h[j], self.c, gfv[j])
                cj = int(np.argmax(ceil))
                nxt = "the surface" if d_next == 0 else f"{_num_out(d_next)} {self.r0.unit}"
                raise ScheduleError(
                    f"the stop at {_num_out(d_stop)} {self.r0.unit} on {g_rows[j].name} can never "
                    f"clear: compartment {self.c.labels[cj]} (N2 half-time "
                    f"{self.c.n2_half[cj]:g} min) would saturate above the tension that allows "
                    f"going on to {nxt} with GF {gfv[j] * 100:.0f} %; choose a deeper last "
                    "stop, a higher GF high or an oxygen-rich decompression gas"
                )
        cur_n, cur_h = pn[idx].copy(), ph[idx].copy()
        cyc = cycle[idx].copy()
        elapsed = 0
        width = 32
        todo = np.flatnonzero(~done)
        while todo.size:
            if elapsed >= self.r0.max_stop_min:
                j = int(todo[0])
                raise BeyondRangeError(
                    f"beyond the model's range: not computed (the stop at {_num_out(d_stop)} "
                    f"{self.r0.unit} on {g_rows[j].name} does not clear within "
                    f"{self.r0.max_stop_min} min)"
                )
            w = int(min(width, self.r0.max_stop_min - elapsed))
            if per is None:
                m = np.arange(1, w + 1, dtype=float)[:, None]
                en = np.exp(-self.kn * m)  # (w, C), shared by every row
                tn = pa_n[todo, None, None] + (cur_n[todo, None, :] - pa_n[todo, None, None]) * en
                if he:
                    eh = np.exp(-self.kh * m)
                    th = (
                        pa_h[todo, None, None]
                        + (cur_h[todo, None, :] - pa_h[todo, None, None]) * eh
                    )
                else:
                    th = np.zeros_like(tn)
            else:
                pos = (cyc[todo, None] + np.arange(w)[None, :]) % (per[0] + per[1])
                o2row = np.array([g_rows[j].fo2 > 0.5 for j in todo])[:, None]
                brk = (pos >= per[0]) & o2row
                seg_n = np.where(brk, AIR.fn2, fn2[todo, None])
                seg_h = np.where(brk, AIR.fhe, fhe[todo, None])
                t = np.ones((todo.size, w))
                tn = tissue_tensions(t, p_stop, p_stop, seg_n, self.c.n2_half, cur_n[todo], ph2o)
                th = tissue_tensions(t, p_stop, p_stop, seg_h, self.c.he_half, cur_h[todo], ph2o)
            ok = clear(tn, th, todo)  # (n, w)
            hit = ok.any(axis=1)
            first = ok.argmax(axis=1)
            hr = np.flatnonzero(hit)
            rows_b = idx[todo[hr]]
            minutes[rows_b] = elapsed + first[hr] + 1
            pn[rows_b] = tn[hr, first[hr]]
            ph[rows_b] = th[hr, first[hr]]
            if per is not None:
                cycle[rows_b] = (cyc[todo[hr]] + first[hr] + 1) % (per[0] + per[1])
            cur_n[todo] = tn[:, -1]
            cur_h[todo] = th[:, -1]
            if per is not None:
                cyc[todo] = (cyc[todo] + w) % (per[0] + per[1])
            todo = todo[~hit]
            elapsed += w
            width *= 4
        return minutes, pn, ph, cycle

    # -- main ------------------------------------------------------------------------------
    def run(self, details: bool = True) -> list[ScheduleResult]:
        r0, B = self.r0, self.B
        every = np.ones(B, bool)
        t_desc = self.depth / r0.descent_rate
        pn, ph = self.segment(self.pn0, self.ph0, 0.0, self.depth, t_desc, self.bottom_gas)
        self.record(every, 0.0, self.depth, t_desc, self.bottom_gas, "water", "descent")
        ndl = self.no_stop_limits(pn, ph, t_desc)
        t_bot = self.bt - t_desc
        pn, ph = self.segment(pn, ph, self.depth, self.depth, t_bot, self.bottom_gas)
        self.record(every, self.depth, self.depth, t_bot, self.bottom_gas, "water", "bottom")

        needs = np.array(
            [n is not None and bt > n + 1e-9 for n, bt in zip(ndl, self.bt, strict=True)]
        )
        step, last = r0.stop_step, r0.last_stop
        i_last = int(round(last / step))
        i_top = int(math.ceil(self.depth.max() / step - 1e-9)) - 1
        cur = self.depth.copy()
        cur_gas = list(self.bottom_gas)
        phase = np.where(needs, 0, 3)  # 0 seek first stop, 1 stopping, 2 pending SurD, 3 done
        first_stop = np.zeros(B)
        stops: list[list[Stop]] = [[] for _ in range(B)]
        ascent_time = np.zeros(B)
        cycle = np.zeros(B)
        sd = r0.surface_decompression

        for i in range(i_top, i_last - 1, -1):
            s = i * step
            nxt = (i - 1) * step if i - 1 >= i_last else 0.0
            if sd is not None:
                # in-water stops end at the surface-decompression depth: surface from there
                phase = np.where((phase == 1) & (s < sd.leave_water_depth - 1e-9), 2, phase)
            here = (phase < 2) & (s < self.depth - 1e-9)
            if not here.any():
                continue
            # travel to s
            tt = np.where(here, (cur - s) / r0.ascent_rate, 0.0)
            pn2, ph2 = self.segment(pn, ph, cur, np.where(here, s, cur), tt, cur_gas)
            pn = np.where(here[:, None], pn2, pn)
            ph = np.where(here[:, None], ph2, ph)
            self.record(here, cur, s, tt, cur_gas, "water", "travel")
            ascent_time += tt
            cur = np.where(here, s, cur)
            g_here = self.gas_at(s)
            for b in np.flatnonzero(here):
                if g_here[b] != cur_gas[b]:
                    cycle[b] = 0.0
                cur_gas[b] = g_here[b]
            # first stop?
            seek = here & (phase == 0)
            if seek.any():
                broke = np.any(self.ceiling(pn, ph, r0.gf_low) > self.p(nxt) + _EPS, axis=-1)
                newly = seek & broke
                if i == i_last:
                    # beyond the no-stop limit there is always a stop: the last one at least
                    newly = seek
                phase = np.where(newly, 1, phase)
                first_stop = np.where(newly, s, first_stop)
            if sd is not None:
                to_surd = here & (phase == 1) & (s < sd.leave_water_depth - 1e-9)
                phase = np.where(to_surd, 2, phase)
            stopping = here & (phase == 1)
            if stopping.any():
                gf_next = bm.gf_at_depth(nxt, first_stop, r0.gf_low, r0.gf_high)
                arrival = cycle.copy()
                mins, pn, ph, cycle = self.stop_minutes(
                    stopping, pn, ph, s, nxt, cur_gas, gf_next, r0.o2_air_break, cycle, "water"
                )
                # the first stop is a stop: at least one minute there (it is where going on
                # would break the GF-low ceiling; a dive beyond the no-stop limit always has one)
                short = stopping & (mins == 0) & (np.abs(first_stop - s) < 1e-9)
                if short.any():
                    ab = r0.o2_air_break
                    # the forced minute is breathed where the oxygen / air-break cycle stands
                    gas_1 = [AIR if ab is not None and g.fo2 > 0.5 and c >= ab[0] else g
                             for g, c in zip(cur_gas, cycle, strict=True)]
                    one = np.where(short, 1.0, 0.0)
                    pn2, ph2 = self.segment(pn, ph, cur, cur, one, gas_1)
                    pn = np.where(short[:, None], pn2, pn)
                    ph = np.where(short[:, None], ph2, ph)
                    mins = np.where(short, 1, mins)
                    if ab is not None:
                        # the forced minute counts in the oxygen / air-break cycle
                        o2 = short & np.array([g.fo2 > 0.5 for g in cur_gas])
                        cycle = np.where(o2, (cycle + 1) % (ab[0] + ab[1]), cycle)
                for b in np.flatnonzero(stopping & (mins > 0)):
                    periods = self.stop_periods(cur_gas[b], float(mins[b]), float(arrival[b]))
                    self.record_periods(b, s, periods, "water")
                    stops[b].append(Stop(s, int(mins[b]), cur_gas[b].name, "water",
                                         tuple(periods)))
                ascent_time += np.where(stopping, mins, 0)
                _within_range(stops, s, r0)

        si_gf: list[float | None] = [None] * B
        chamber_periods: list[float | None] = [None] * B
        chamber_warnings: list[list[str]] = [[] for _ in range(B)]
        pend = phase == 2
        if sd is not None and pend.any():
            pn, ph, cur = self._surface_decompression(
                pend, pn, ph, cur, cur_gas, first_stop, stops, ascent_time, si_gf,
                chamber_periods, chamber_warnings,
            )
            phase = np.where(pend, 4, phase)  # 4: finished in the chamber, at the surface
        # final ascent to the surface (rows still in the water)
        wet = phase != 4
        tt = np.where(wet, cur / r0.ascent_rate, 0.0)
        pn2, ph2 = self.segment(pn, ph, cur, np.where(wet, 0.0, cur), tt, cur_gas)
        pn = np.where(wet[:, None], pn2, pn)
        ph = np.where(wet[:, None], ph2, ph)
        self.record(wet, cur, 0.0, tt, cur_gas, "water", "ascent")
        ascent_time += tt

        gf_surf = bm.gradient_factor(pn, ph, self.ps, self.c)
        status = self.c.status_for(self.uses_he)
        results = []
        from supervisor.engine import oxygen as _oxygen

        for b, req in enumerate(self.reqs):
            prof = Profile(self.segs[b], req.unit, req.p_surface_bar, req.water)  # type: ignore[arg-type]
            warnings = (_gas_warnings(prof) + chamber_warnings[b]) if details else []
            if details and req.o2_air_break is not None and not any(
                s.gas.fo2 > 0.5 for s in prof.segments if s.label == "stop"
            ):
                warnings.append("air breaks ignored: no stop is on an oxygen-rich gas")
            if details and si_gf[b] is not None and si_gf[b] > req.gf_high:
                warnings.append(
                    f"surface decompression interval: supersaturation peaks at "
                    f"{100 * si_gf[b]:.0f} % of the M-value gradient, above GF high "
                    f"{100 * req.gf_high:.0f} % (inherent to surface decompression; needs review)"
                )
            ctrl = int(np.argmax(gf_surf[b]))
            results.append(
                ScheduleResult(
                    request=req,
                    stops=stops[b],
                    no_stop_limit_min=ndl[b],
                    first_stop_depth=float(first_stop[b]) if first_stop[b] > 0 else None,
                    total_stop_min=int(round(sum(s.minutes for s in stops[b]))),
                    total_ascent_min=float(ascent_time[b]),
                    profile=prof,
                    final_p_n2=pn[b].copy(),
                    final_p_he=ph[b].copy(),
                    surfacing_gf=float(gf_surf[b, ctrl]),
                    controlling_compartment=self.c.labels[ctrl],
                    coefficient_status=status,
                    surface_interval_max_gf=si_gf[b],
                    chamber_o2_periods=chamber_periods[b],
                    oxygen=_oxygen.profile_exposure(prof) if details else None,
                    labels=self.c.labels,
                    warnings=warnings,
                )
            )
        return results

    def _surface_decompression(
        self, rows, pn, ph, cur, cur_gas, first_stop, stops, ascent_time, si_gf, periods_out,
        warnings,
    ):
        """Surface, recompress in the chamber and decompress there in oxygen periods.

        The surface interval (ascent, deck, compression) is followed by the chamber
        pattern of :class:`SurfaceDecompression`: half-periods of the chamber gas,
        the first at the first chamber depth and the rest at the second, an air
        break after every full period that more gas follows.  A row is done after
        the least number of half-periods (at least one) after which no
        compartment's GF-high ceiling is below the surface (the ceiling judged on
        leaving the chamber depth, as at every stop); the chamber then surfaces on
        air at the ascent rate.  Rows are computed in lock-step, one half-period at
        a time.
        """
        r0 = self.r0
        sd = r0.surface_decompression
        assert sd is not None
        up = np.where(rows, cur / r0.ascent_rate, 0.0)
        down = np.where(rows, sd.chamber_depth / sd.compression(r0.descent_rate), 0.0)
        on_surface = np.where(rows, sd.surface_interval_min - up - down, 0.0)
        # peak supersaturation during the interval is at arrival on the surface or just after
        pn, ph = self.segment(pn, ph, cur, np.where(rows, 0.0, cur), up, cur_gas)
        self.record(rows, cur, 0.0, up, cur_gas, "water", SURFACE_INTERVAL + ": ascent")
        gf_peak = bm.gradient_factor(pn, ph, self.ps, self.c).max(axis=1)
        pn, ph = self.segment(
            pn, ph, np.where(rows, 0.0, cur), np.where(rows, 0.0, cur), on_surface, [AIR] * self.B
        )
        self.record(rows, 0.0, 0.0, on_surface, [AIR] * self.B, "surface", SURFACE_INTERVAL)
        gf_peak = np.maximum(gf_peak, bm.gradient_factor(pn, ph, self.ps, self.c).max(axis=1))
        d1, d2 = float(sd.chamber_depth), sd.later_depth
        pn, ph = self.segment(
            pn, ph, np.where(rows, 0.0, cur), np.where(rows, d1, cur), down, [AIR] * self.B
        )
        self.record(rows, 0.0, d1, down, [AIR] * self.B, "chamber",
                    SURFACE_INTERVAL + ": compression")
        ascent_time += up + on_surface + down
        for b in np.flatnonzero(rows):
            si_gf[b] = float(gf_peak[b])
        gas = parse_gas(sd.chamber_gas)
        cgas, air = [gas] * self.B, [AIR] * self.B
        half, brk = sd.period_min / 2.0, sd.break_min
        travel = (d1 - d2) / r0.ascent_rate
        n = np.zeros(self.B, dtype=int)
        active = rows.copy()
        most = max(1, int(math.ceil(min(r0.max_stop_min, r0.max_total_stop_min) / half)))
        k = 0
        while active.any():
            k += 1
            if k > most:
                raise BeyondRangeError(
                    f"beyond the model's range: not computed (the chamber does not clear within "
                    f"{most} half-periods of {half:g} min)")
            if k == 2 and travel > 0:
                # to the second chamber depth on the chamber gas (not counted in the periods)
                tt = np.where(active, travel, 0.0)
                pn2, ph2 = self.segment(pn, ph, d1, d2, tt, cgas)
                pn = np.where(active[:, None], pn2, pn)
                ph = np.where(active[:, None], ph2, ph)
                ascent_time += tt
                gf2 = bm.gf_at_depth(d2, np.maximum(first_stop, d1), r0.gf_low, r0.gf_high)
                deep = active & np.any(
                    self.ceiling(pn2, ph2, np.asarray(gf2)[..., None]) > self.p(d2) + _EPS,
                    axis=-1)
                for b in np.flatnonzero(deep):
                    warnings[b].append(
                        f"chamber: after the first half-period at {_num_out(d1)} {r0.unit} the "
                        f"model's ceiling is deeper than {_num_out(d2)} {r0.unit}, where the "
                        "pattern goes next (needs review)")
            depth = d1 if k == 1 else d2
            if k >= 3 and k % 2 == 1 and brk > 0:
                bt = np.where(active, brk, 0.0)
                pn2, ph2 = self.segment(pn, ph, depth, depth, bt, air)
                pn = np.where(active[:, None], pn2, pn)
                ph = np.where(active[:, None], ph2, ph)
                ascent_time += bt
            ht = np.where(active, half, 0.0)
            pn2, ph2 = self.segment(pn, ph, depth, depth, ht, cgas)
            pn = np.where(active[:, None], pn2, pn)
            ph = np.where(active[:, None], ph2, ph)
            ascent_time += ht
            clear = np.all(self.ceiling(pn, ph, r0.gf_high) <= self.ps + _EPS, axis=-1)
            done = active & clear
            n[done] = k
            active &= ~clear
        for b in np.flatnonzero(rows):
            pattern = chamber_pattern(int(n[b]), d1, d2, sd.period_min, brk, gas.name)
            for j, (depth, periods) in enumerate(pattern):
                if j:
                    self.record(np.arange(self.B) == b, pattern[j - 1][0], depth, travel, cgas,
                                "chamber", "travel")
                self.record_periods(int(b), depth, periods, "chamber")
                minutes = math.fsum(m for _, m in periods)
                stops[b].append(Stop(depth, _num_out(minutes), gas.name, "chamber",
                                     tuple(periods)))
            periods_out[b] = float(n[b]) / 2.0
        _within_range(stops, d2, r0)
        last = np.where(rows, np.where(n > 1, d2, d1), cur)
        tt = np.where(rows, last / r0.ascent_rate, 0.0)
        pn2, ph2 = self.segment(pn, ph, last, np.where(rows, 0.0, last), tt, air)
        pn = np.where(rows[:, None], pn2, pn)
        ph = np.where(rows[:, None], ph2, ph)
        self.record(rows, last, 0.0, tt, air, "chamber", "decompression to surface")
        ascent_time += tt
        return pn, ph, np.where(rows, 0.0, cur)


def _within_range(stops: list[list[Stop]], depth: float, req: ScheduleRequest) -> None:
    """Stop the search once a schedule's stops pass the request's ``max_total_stop_min``."""
    cap = req.max_total_stop_min
    for row in stops:
        total = sum(x.minutes for x in row)
        if total > cap:
            raise BeyondRangeError(
                f"beyond the model's range: not computed (the stops pass {cap} min at "
                f"{_num_out(depth)} {req.unit}, longer than any decompression the planner "
                "computes)"
            )


#: Inspired PO2 below which a gas is hypoxic [bar]: the Navy hypoxia threshold
#: (U.S. Navy Diving Manual, Rev 4/5 ch. 15, 0.16 ata; older edition).
HYPOXIC_PO2_BAR = 0.16 * C.P_ATM_BAR
#: Highest PO2 of the NOAA CNS table [bar] (1.6 atm); above it in the water is flagged.
HYPEROXIC_PO2_BAR = 1.6 * C.P_ATM_BAR


def _gas_warnings(profile: Profile) -> list[str]:
    """Hypoxic or hyperoxic breathing anywhere in a schedule's profile."""
    out: list[str] = []
    a = profile.arrays()
    po2 = np.concatenate([a.p_start * a.fo2, a.p_end * a.fo2])
    depth = np.concatenate([[s.start_depth for s in profile.segments],
                            [s.end_depth for s in profile.segments]])
    gas = [s.gas.name for s in profile.segments] * 2
    water = np.array([s.place == "water" for s in profile.segments] * 2)
    u = profile.unit
    lo = int(np.argmin(po2))
    if po2[lo] < HYPOXIC_PO2_BAR - 1e-12:
        out.append(f"hypoxic: {gas[lo]} gives PO2 {po2[lo]:.2f} bar at {_num_out(depth[lo])} {u}, "
                   "below 0.16 atm (needs review)")
    if water.any():
        hi = int(np.argmax(np.where(water, po2, -np.inf)))
        if po2[hi] > HYPEROXIC_PO2_BAR + 1e-9:
            out.append(f"hyperoxic: {gas[hi]} gives PO2 {po2[hi] / C.P_ATM_BAR:.2f} atm in the "
                       f"water at {_num_out(depth[hi])} {u}, above 1.6 atm, the top of the NOAA "
                       "CNS table (needs review)")
    return out


def with_bottom_time(req: ScheduleRequest, bottom_time_min: float) -> ScheduleRequest:
    """Return a copy of a request with another bottom time."""
    return replace(req, bottom_time_min=bottom_time_min)


__all__ = [
    "MAX_TOTAL_STOP_MIN",
    "BeyondRangeError",
    "WorkLimitError",
    "work_budget",
    "CONVENTIONS",
    "SCHEMA",
    "SURFACE_INTERVAL",
    "ProfileEvaluation",
    "ScheduleRequest",
    "ScheduleResult",
    "Stop",
    "SurfaceDecompression",
    "evaluate_profile",
    "evaluate_profiles",
    "infer_first_stop",
    "plan_schedule",
    "plan_schedules",
    "with_bottom_time",
]
