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
  (:mod:`supervisor.supply`) and the reference-table look-up;

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

Assumptions (each is printed with the figure it affects)
---------------------------------------------------------

=============================  ==================  ===============================================
name                           value               source
=============================  ==================  ===============================================
RMV_LPM                        1.4 acfm = 39.6 L   U.S. Navy Diving Manual Rev 4 Change A 8-2.2.2,
                               per min             demand-helmet average (OLDER-EDITION)
CABIN_ALTITUDE_M               8,000 ft = 2438 m   NOAA Diving Center newsletter *Topside* 2(9),
                                                   1999, on the Navy flying-after-diving table
                                                   (OLDER-EDITION)
REPETITIVE_WINDOW_MIN          12 h                U.S. Navy Diving Manual Rev 4 Change A ch. 9
                                                   (OLDER-EDITION)
DAY_WINDOW_MIN                 24 h                Navy flying rule: highest group in the previous
                                                   24 h (OLDER-EDITION); NOAA 24-hour CNS limits
OVERRUN_INCREMENT_MIN          10 min              common practice, no source (used only when no
                                                   decompression table gives the next longer time)
SURD_INTERVAL_MIN              5 min               U.S. Navy Diving Manual Rev 7 ch. 9 SurDO2
                                                   surface interval (SECONDARY)
SURD_CHAMBER_DEPTH_FSW         50 fsw              idem (SECONDARY)
O2_SWITCH_DEPTH_FSW            30 fsw              in-water oxygen stops at 30 and 20 fsw
                                                   (FROM MEMORY for Rev 7)
O2_AIR_BREAK                   30 min O2 / 5 air   Rev 7 ch. 9 (SECONDARY)
EGS_BOTTOM_MIN                 5 min               Navy ch. 8 EGS sample problem states five
                                                   minutes (its arithmetic uses three); the larger
                                                   is used (OLDER-EDITION)
=============================  ==================  ===============================================

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

import math
from collections.abc import Callable
from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor import constants as C
from supervisor.engine import buhlmann as bm
from supervisor.engine import oxygen as ox
from supervisor.engine.kinetics import inspired_pressure, rate_constant, schreiner
from supervisor.engine.schedule import (
    SURFACE_INTERVAL,
    ProfileEvaluation,
    ScheduleRequest,
    ScheduleResult,
    SurfaceDecompression,
    evaluate_profile,
    plan_schedule,
)
from supervisor.errors import InputError, SupervisorError
from supervisor.gas import AIR, Gas, inspired_po2, parse_gas
from supervisor.plan import CHAMBER_COMPRESSION_FSW_PER_MIN, Dive, GasSource, Plan
from supervisor.profile import Profile, Segment
from supervisor.units import (
    altitude_pressure,
    altitude_stop_depth,
    convert_pressure,
    sea_level_equivalent_depth,
)

#: Errors a computation may raise on bad or out-of-range input; they become a
#: recorded error (and a "needs review" finding), never a traceback.
COMPUTE_ERRORS: tuple[type[BaseException], ...] = (
    SupervisorError,
    ValueError,
    ArithmeticError,
)

L_PER_FT3: float = 28.316846592  # litres per cubic foot (international foot, exact)
RMV_LPM: float = 1.4 * L_PER_FT3
RMV_SOURCE = "1.4 acfm demand-helmet average, U.S. Navy Diving Manual Rev 4 Change A 8-2.2.2"
CABIN_ALTITUDE_M: float = 8000 * C.M_PER_FT
REPETITIVE_WINDOW_MIN: float = 12 * 60.0
DAY_WINDOW_MIN: float = 24 * 60.0
OVERRUN_INCREMENT_MIN: float = 10.0
SURD_INTERVAL_MIN: float = 5.0
SURD_CHAMBER_DEPTH_FSW: float = 50.0
O2_SWITCH_DEPTH_FSW: float = 30.0
O2_AIR_BREAK: tuple[float, float] = (30.0, 5.0)
EGS_BOTTOM_MIN: float = 5.0
MARGIN_CAP_MIN: int = 120
ALTITUDE_SEARCH_MAX_MIN: int = 72 * 60
#: Tolerance when matching a proposed stop with a reference stop, as a share of the stop step.
STOP_MATCH_FRACTION: float = 0.1

_MODE_OF: dict[str, str] = {
    "none": "air",
    "in-water": "air",
    "in-water-oxygen": "air_o2",
    "surface-oxygen": "surd_o2",
}


def _err(exc: BaseException) -> str:
    return f"{type(exc).__name__}: {exc}" if str(exc) else type(exc).__name__


def _r(x: float | None, nd: int = 3) -> float | None:
    if x is None or not math.isfinite(x):
        return None
    return round(float(x), nd)


# --------------------------------------------------------------------------- results


@dataclass
class Margin:
    """Margin of the proposed stops in minutes of bottom time (module docstring).

    Attributes
    ----------
    minutes : int or None
        Margin [min]; None when not computable or when no bottom time is covered.
    capped : bool
        True when the search stopped at :data:`MARGIN_CAP_MIN` (margin at least that).
    uncoverable : bool
        True when even the shortest bottom time (the descent alone) breaks the ceiling.
    """

    minutes: int | None
    capped: bool = False
    uncoverable: bool = False


@dataclass
class Contingency:
    """One contingency schedule: the same dive longer, deeper or without oxygen.

    Attributes
    ----------
    kind : {"overrun", "deeper", "oxygen_failure"}
        Which contingency.
    depth, bottom_time_min : float
        The dive computed [plan unit], [min].
    basis : str
        How depth and time were chosen.
    schedule : ScheduleResult or None
        The model's schedule, None when it could not be computed.
    reference : LookupResult or None
        The reference-table schedule, when a decompression table is in use.
    error : str or None
        Why the model schedule could not be computed.
    """

    kind: str
    depth: float
    bottom_time_min: float
    basis: str
    schedule: ScheduleResult | None = None
    reference: Any = None
    error: str | None = None

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dictionary."""
        s = self.schedule
        return {
            "kind": self.kind,
            "depth": _r(self.depth),
            "bottom_time_min": _r(self.bottom_time_min),
            "basis": self.basis,
            "stops": [x.to_dict() for x in s.stops] if s else [],
            "total_stop_min": int(s.total_stop_min) if s else None,
            "total_ascent_min": _r(s.total_ascent_min, 2) if s else None,
            "no_stop_limit_min": s.no_stop_limit_min if s else None,
            "oxygen": {"cns_percent": _r(s.oxygen.cns_percent, 1), "otu": _r(s.oxygen.otu, 1)}
            if s is not None and s.oxygen is not None
            else None,
            "reference": _reference_json(self.reference),
            "error": self.error,
        }


@dataclass
class Supply:
    """Gas-supply figures of one dive (free litres at 1 atm unless stated).

    Attributes
    ----------
    rmv_lpm : float
        Breathing rate assumed [L/min actual].
    people : int
        Divers counted on the primary and secondary: the diver, plus the standby
        diver when one is assigned.
    diver_need_l : float
        The diver's need of the primary gas over the whole dive in the water [L].
    need_l : float
        Primary need: ``people`` times the diver's need [L].
    recovery_need_l : float
        Secondary need: ``people`` times the diver's need from leaving the bottom [L].
    peak_flow_lpm : float
        Free gas per minute for ``people`` at the maximum depth [L/min].
    primary_available_l, secondary_available_l : float or None
        Usable free gas above the minimum manifold pressure; None for a
        compressor (its delivery is compared with the peak flow) or no source.
    primary_delivery_lpm, secondary_delivery_lpm : float or None
        Compressor delivery [L/min free gas].
    over_bottom_psig, mmp_psig : float or None
        Navy over-bottom and minimum manifold pressure [psig]; None for scuba
        or outside the Navy table (``mmp_error`` says why).
    egs : EgsRequirement or None
        Navy emergency-gas requirement for the diver's bailout cylinder.
    bailout_psig : float or None
        The bailout cylinder's charge [psig].
    oxygen_need_l, oxygen_available_l : float or None
        Decompression oxygen (in-water and chamber) needed and held [L].
    chamber_required : bool
        Whether the dive needs the chamber (decompression, chamber stops or
        deeper than 100 fsw), whose own gas the plan cannot size.
    notes : list of str
        Assumptions and figures that could not be computed.
    """

    rmv_lpm: float
    people: int
    diver_need_l: float
    need_l: float
    recovery_need_l: float
    peak_flow_lpm: float
    primary_kind: str
    primary_available_l: float | None
    primary_delivery_lpm: float | None
    secondary_kind: str | None
    secondary_available_l: float | None
    secondary_delivery_lpm: float | None
    over_bottom_psig: float | None
    mmp_psig: float | None
    mmp_error: str | None
    egs: Any
    bailout_psig: float | None
    egs_error: str | None
    oxygen_need_l: float | None
    oxygen_available_l: float | None
    chamber_required: bool
    notes: list[str] = field(default_factory=list)

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dictionary."""
        egs = self.egs
        return {
            "basis": f"free litres at 1 atm; breathing rate {self.rmv_lpm:.1f} L/min "
            f"({RMV_SOURCE}); {self.people} diver(s) counted",
            "rmv_lpm": _r(self.rmv_lpm, 2),
            "people": self.people,
            "diver_need_l": _r(self.diver_need_l, 0),
            "need_l": _r(self.need_l, 0),
            "available_l": _r(self.primary_available_l, 0),
            "primary_kind": self.primary_kind,
            "primary_delivery_lpm": _r(self.primary_delivery_lpm, 1),
            "peak_flow_lpm": _r(self.peak_flow_lpm, 1),
            "recovery_need_l": _r(self.recovery_need_l, 0),
            "secondary_kind": self.secondary_kind,
            "secondary_available_l": _r(self.secondary_available_l, 0),
            "secondary_delivery_lpm": _r(self.secondary_delivery_lpm, 1),
            "over_bottom_psig": _r(self.over_bottom_psig, 0),
            "mmp_psig": _r(self.mmp_psig, 0),
            "bailout_required_psig": _r(egs.required_psig, 0) if egs else None,
            "bailout_required_psig_rounded": _r(egs.required_psig_rounded, 0) if egs else None,
            "bailout_psig": _r(self.bailout_psig, 0),
            "oxygen_need_l": _r(self.oxygen_need_l, 0),
            "oxygen_available_l": _r(self.oxygen_available_l, 0),
            "chamber_required": self.chamber_required,
            "notes": list(self.notes),
        }


@dataclass
class DiveAnalysis:
    """Everything computed for one dive; see the module docstring.

    Attributes
    ----------
    dive : Dive
        The plan's dive.
    start_min, end_min : float
        Leaving and reaching the surface on the diver's time line [min].
    previous : str or None
        Id of the diver's dive whose tissue tensions this dive starts from.
    surface_interval_min : float or None
        Surface interval used [min].
    interval_assumed : bool
        True when the plan gives no interval after a previous dive of the
        diver and none (0 min, the most loaded case) was assumed.
    start_loading_percent : float or None
        Highest compartment tension at leaving the surface as a share of the
        GF-high surface limit [%] (a diver fresh from saturation at the
        surface sits near 100 * P_inspired / limit).
    profile : Profile or None
        The planned profile.
    evaluation : ProfileEvaluation or None
        The planned profile through the model.
    request : ScheduleRequest or None
        The model-schedule request for the dive.
    model_schedule : ScheduleResult or None
        The model's schedule.
    margin : Margin or None
        Margin of the proposed stops.
    contingencies : dict
        ``overrun``, ``deeper``, ``oxygen_failure``: :class:`Contingency` or None.
    exposure : OxygenExposure or None
        Oxygen exposure of the planned profile.
    po2_max, po2_min : dict
        Highest and lowest PO2 [bar] per phase (``bottom``, ``decompression``,
        ``chamber``), None for a phase the dive does not have.
    table : Table or None
        The policy's reference table.
    table_depth : float or None
        Depth the table is entered with: sea-level-equivalent depth in the
        table's unit [table unit].
    reference : LookupResult or None
        The look-up at the planned depth and time.
    supply : Supply or None
        Gas-supply figures.
    errors : dict
        Section name to the reason it could not be computed.
    notes : list of str
        Assumptions made for this dive.
    """

    dive: Dive
    start_min: float = 0.0
    end_min: float = 0.0
    previous: str | None = None
    surface_interval_min: float | None = None
    interval_assumed: bool = False
    start_loading_percent: float | None = None
    p_n2_0: NDArray[np.float64] | None = None
    p_he_0: NDArray[np.float64] | None = None
    profile: Profile | None = None
    evaluation: ProfileEvaluation | None = None
    request: ScheduleRequest | None = None
    model_schedule: ScheduleResult | None = None
    margin: Margin | None = None
    contingencies: dict[str, Contingency | None] = field(default_factory=dict)
    exposure: ox.OxygenExposure | None = None
    po2_max: dict[str, float | None] = field(default_factory=dict)
    po2_min: dict[str, float | None] = field(default_factory=dict)
    table: Any = None
    table_depth: float | None = None
    reference: Any = None
    supply: Supply | None = None
    errors: dict[str, str] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)

    @property
    def id(self) -> str:
        """The dive id."""
        return self.dive.id

    @property
    def repetitive(self) -> bool:
        """Whether the dive starts within the repetitive window of the diver's previous dive."""
        return (
            self.previous is not None
            and self.surface_interval_min is not None
            and self.surface_interval_min < REPETITIVE_WINDOW_MIN
        )

    @property
    def coefficient_status(self) -> str:
        """Status of the coefficients behind the model figures ("FROM MEMORY" if none ran)."""
        if self.evaluation is not None:
            return self.evaluation.coefficient_status
        if self.model_schedule is not None:
            return self.model_schedule.coefficient_status
        return "FROM MEMORY"

    def to_json(self) -> dict[str, Any]:
        """The engine-backed sections of a ``supervisor.check/1`` dive object."""
        return {
            "reference_schedule": _reference_json(self.reference),
            "model_schedule": self._model_schedule_json(),
            "model_margin": self._margin_json(),
            "oxygen": self._oxygen_json(),
            "gas_supply": self.supply.to_json() if self.supply else None,
            "contingency": {
                k: (c.to_json() if c is not None else None)
                for k, c in (
                    (k, self.contingencies.get(k)) for k in ("overrun", "deeper", "oxygen_failure")
                )
            },
            "chart": self._chart_json(),
            "compartments": self._compartments_json(),
            "repetitive": {
                "previous_dive": self.previous,
                "surface_interval_min": _r(self.surface_interval_min, 1),
                "interval_assumed": self.interval_assumed,
                "start_min": _r(self.start_min, 2),
                "start_loading_percent": _r(self.start_loading_percent, 1),
            },
            "analysis_notes": list(self.notes),
            "analysis_errors": dict(self.errors),
        }

    def _model_schedule_json(self) -> dict[str, Any]:
        s = self.model_schedule
        if s is None:
            return {
                "stops": [],
                "total_stop_min": None,
                "total_ascent_min": None,
                "no_stop_limit_min": None,
                "coefficient_status": self.coefficient_status,
                "error": self.errors.get("model_schedule", "not computed"),
            }
        return {
            "stops": [x.to_dict() for x in s.stops],
            "total_stop_min": int(s.total_stop_min),
            "total_ascent_min": _r(s.total_ascent_min, 2),
            "no_stop_limit_min": s.no_stop_limit_min,
            "first_stop_depth": s.first_stop_depth,
            "surfacing_gf_percent": _r(100 * s.surfacing_gf, 1),
            "controlling_compartment": s.controlling_compartment,
            "coefficient_status": s.coefficient_status,
            "error": None,
        }

    def _margin_json(self) -> dict[str, Any]:
        ev, m = self.evaluation, self.margin
        bpu = _bar_per_unit(self.dive_unit)
        return {
            "ceiling_broken": ev.ceiling_broken if ev else None,
            "surfacing_gf_percent": _r(100 * ev.surfacing_gf, 1) if ev else None,
            "max_gf_percent": _r(100 * ev.max_gf, 1) if ev else None,
            "controlling_compartment": ev.controlling_compartment if ev else None,
            "first_break_min": _r(ev.first_break_min, 2) if ev else None,
            "worst_excess_depth": _r(ev.worst_excess_bar / bpu, 2) if ev else None,
            "margin_min": m.minutes if m else None,
            "margin_capped": m.capped if m else None,
            "margin_uncoverable": m.uncoverable if m else None,
            "margin_definition": "whole minutes of extra bottom time the proposed stops still "
            "cover without breaking the model ceiling; negative = minutes short",
            "coefficient_status": self.coefficient_status,
            "error": self.errors.get("evaluation"),
        }

    def _oxygen_json(self) -> dict[str, Any]:
        e = self.exposure
        return {
            "po2_by_phase": {k: _r(v) for k, v in self.po2_max.items()},
            "min_po2_by_phase": {k: _r(v) for k, v in self.po2_min.items()},
            "max_po2": _r(e.max_po2_bar) if e else None,
            "cns_percent": _r(e.cns_percent, 1) if e else None,
            "cns_24h_percent": _r(e.cns_24h_percent, 1) if e else None,
            "otu": _r(e.otu, 1) if e else None,
            "cns_is_lower_bound": e.out_of_range if e else None,
            "needs_review": e.needs_review if e else True,
            "error": self.errors.get("oxygen"),
        }

    def _chart_json(self) -> dict[str, list[float]]:
        ev = self.evaluation
        if ev is None:
            return {"t_min": [], "depth": [], "ceiling_depth": []}
        return {
            "t_min": [round(float(x), 3) for x in ev.t_min],
            "depth": [round(float(x), 3) for x in ev.depth],
            "ceiling_depth": [round(float(x), 3) for x in ev.ceiling_depth],
        }

    def _compartments_json(self) -> dict[str, list[Any]]:
        ev = self.evaluation
        if ev is None:
            return {"labels": [], "loading_percent_of_limit": []}
        return {
            "labels": list(ev.labels),
            "loading_percent_of_limit": [round(float(x), 1) for x in ev.loading_percent_of_limit],
        }

    @property
    def dive_unit(self) -> str:
        """Depth unit of the profile (the plan's unit)."""
        return self.profile.unit if self.profile is not None else "fsw"


@dataclass
class DiverDay:
    """One diver's dives of the plan on one time line.

    Attributes
    ----------
    diver : str
        Name.
    dive_ids : list of str
        The diver's dives in time order.
    daily : DailyExposure or None
        Oxygen exposure across the dives (rolling 24 h, REPEX series).
    time_to_altitude_min : dict
        Target altitude [m] to minutes after the last dive (None: more than
        :data:`ALTITUDE_SEARCH_MAX_MIN`, or not computable).
    errors : dict
        Section name to the reason it could not be computed.
    """

    diver: str
    dive_ids: list[str] = field(default_factory=list)
    daily: ox.DailyExposure | None = None
    time_to_altitude_min: dict[float, float | None] = field(default_factory=dict)
    errors: dict[str, str] = field(default_factory=dict)


@dataclass
class PlanAnalysis:
    """The analysis of a whole plan.

    Attributes
    ----------
    dives : dict
        Dive id to :class:`DiveAnalysis`, in plan order.
    divers : dict
        Diver name to :class:`DiverDay`.
    p_surface_bar : float
        Surface pressure at the site [bar].
    table_error : str or None
        Why the policy's reference table could not be loaded.
    """

    dives: dict[str, DiveAnalysis]
    divers: dict[str, DiverDay]
    p_surface_bar: float
    table: Any = None
    table_error: str | None = None


# --------------------------------------------------------------------------- helpers


def _bar_per_unit(unit: str) -> float:
    return C.BAR_PER_FSW if unit == "fsw" else C.BAR_PER_MSW


def _round_down(x: float, step: float) -> float:
    return math.floor(x / step + 1e-9) * step


def _step(plan: Plan) -> float:
    return float(plan.resolved_policy.stop_step)


def planned_profile(plan: Plan, dive: Dive, notes: list[str] | None = None) -> Profile:
    """Build the planned profile of a dive, labelled for the engine.

    Descent at the dive's descent rate and bottom time counted from leaving the
    surface; travel to each water stop at the ascent rate on the gas breathed
    before it, the stop on its own gas (the switch is on arrival); then either the
    ascent to the surface or, with chamber stops, surface decompression: ascent
    from the last water stop, time on deck, compression to the first chamber stop
    at :data:`supervisor.plan.CHAMBER_COMPRESSION_FSW_PER_MIN` (these three labelled
    ``surface interval`` so the engine reports the deliberate supersaturation apart),
    the chamber stops and the chamber ascent to the surface on air.  Travel is added
    to the stop times, never taken out of them.

    Parameters
    ----------
    plan : Plan
        The plan (unit, altitude, water, rates).
    dive : Dive
        One of its dives.
    notes : list of str, optional
        Receives the assumptions made (e.g. a deck time that is not stated).

    Returns
    -------
    Profile
        Depths in the plan unit.

    Raises
    ------
    InputError
        If the bottom time is shorter than the descent.
    """
    notes = notes if notes is not None else []
    descent = plan.descent_rate(dive)
    ascent = plan.ascent_rate(dive)
    t_desc = dive.max_depth / descent
    if dive.bottom_time_min + 1e-9 < t_desc:
        raise InputError(
            f"dives[{dive.id}].bottom_time_min",
            f"{dive.bottom_time_min:g} min is shorter than the descent ({t_desc:.2f} min at "
            f"{descent:g} {plan.unit}/min); bottom time counts from leaving the surface",
        )
    prof = Profile(unit=plan.unit, p_surface_bar=plan.p_surface_bar, water=plan.site.water)
    gas = dive.gas_mix

    def add(end: float, minutes: float, g: Gas, place: str, label: str) -> None:
        if minutes > 1e-12:
            prof.add(end, minutes, g, place, label)  # type: ignore[arg-type]

    add(dive.max_depth, t_desc, gas, "water", "descent")
    add(dive.max_depth, dive.bottom_time_min - t_desc, gas, "water", "bottom")
    depth, cur = dive.max_depth, gas
    for s in dive.water_stops:
        add(s.depth, (depth - s.depth) / ascent, cur, "water", "travel")
        cur = dive.stop_gas(s)
        add(s.depth, s.minutes, cur, "water", "stop")
        depth = s.depth
    chamber = dive.chamber_stops
    if not chamber:
        add(0.0, depth / ascent, cur, "water", "ascent")
        return prof
    compress = plan.from_fsw(CHAMBER_COMPRESSION_FSW_PER_MIN)
    up = depth / ascent
    down = chamber[0].depth / compress
    deck = dive.surface_transfer_min
    if deck is None:
        deck = max(SURD_INTERVAL_MIN - up - down, 0.0)
        notes.append(
            f"time on deck not stated: {deck:.2f} min assumed, the rest of a "
            f"{SURD_INTERVAL_MIN:g}-min surface interval (U.S. Navy Diving Manual Rev 7 ch. 9, "
            "SECONDARY)"
        )
    add(0.0, up, cur, "water", SURFACE_INTERVAL + ": ascent")
    add(0.0, deck, AIR, "surface", SURFACE_INTERVAL)
    add(chamber[0].depth, down, AIR, "chamber", SURFACE_INTERVAL + ": compression")
    depth = chamber[0].depth
    for s in chamber:
        if abs(s.depth - depth) > 1e-9:
            add(s.depth, abs(depth - s.depth) / ascent, dive.stop_gas(s), "chamber", "travel")
        add(s.depth, s.minutes, dive.stop_gas(s), "chamber", "stop")
        depth = s.depth
    add(0.0, depth / ascent, AIR, "chamber", "decompression to surface")
    return prof


def _deco_gases(plan: Plan, dive: Dive) -> tuple[tuple[str, float], ...]:
    """Decompression gases of the proposed water stops: gas and its deepest stop depth."""
    bottom = dive.gas_mix
    out: dict[str, float] = {}
    for s in dive.water_stops:
        g = dive.stop_gas(s)
        if g != bottom:
            out[g.name] = max(out.get(g.name, 0.0), s.depth)
    if dive.decompression == "in-water-oxygen" and "oxygen" not in out:
        out["oxygen"] = _round_down(plan.from_fsw(O2_SWITCH_DEPTH_FSW), _step(plan))
    return tuple(sorted(out.items(), key=lambda kv: -kv[1]))


def schedule_request(
    plan: Plan,
    dive: Dive,
    p_n2_0: NDArray[np.float64] | None = None,
    p_he_0: NDArray[np.float64] | None = None,
    notes: list[str] | None = None,
) -> ScheduleRequest:
    """The model-schedule request matching a planned dive.

    The policy gives the model, gradient factors, stop step and last stop; the
    dive gives depth, time, gas and rates.  Decompression gases are those of the
    proposed water stops (each from its deepest proposed stop), with oxygen from
    :data:`O2_SWITCH_DEPTH_FSW` for an ``in-water-oxygen`` dive that names none.
    Surface decompression follows the proposed chamber stops (first chamber stop
    depth and gas), else the Navy 50 fsw on oxygen.

    Parameters
    ----------
    plan : Plan
        The plan.
    dive : Dive
        The dive.
    p_n2_0, p_he_0 : ndarray, optional
        Tensions at leaving the surface [bar] (a repetitive dive).
    notes : list of str, optional
        Receives the assumptions made.

    Returns
    -------
    ScheduleRequest
    """
    notes = notes if notes is not None else []
    pol = plan.resolved_policy
    step = float(pol.stop_step)
    deco = _deco_gases(plan, dive)
    sd = None
    chamber = dive.chamber_stops
    if chamber or dive.decompression == "surface-oxygen":
        ascent = plan.ascent_rate(dive)
        compress = plan.from_fsw(CHAMBER_COMPRESSION_FSW_PER_MIN)
        water = dive.water_stops
        leave = min(s.depth for s in water) if water else math.ceil(dive.max_depth / step) * step
        leave = max(leave, float(pol.last_stop))
        c_depth = chamber[0].depth if chamber else plan.from_fsw(SURD_CHAMBER_DEPTH_FSW)
        c_depth = max(c_depth, float(pol.last_stop))
        c_gases = [dive.stop_gas(s) for s in chamber if dive.stop_gas(s).fo2 > C.FO2_AIR + 1e-9]
        c_gas = c_gases[0].name if c_gases else "oxygen"
        travel = (min(s.depth for s in water) if water else dive.max_depth) / ascent
        travel += c_depth / compress
        if dive.surface_transfer_min is not None:
            si = travel + dive.surface_transfer_min
        else:
            si = max(SURD_INTERVAL_MIN, travel)
        sd = SurfaceDecompression(
            leave_water_depth=leave,
            surface_interval_min=si + 1e-9,
            chamber_depth=c_depth,
            chamber_gas=c_gas,
            air_break=O2_AIR_BREAK,
        )
    o2_break = O2_AIR_BREAK if any(parse_gas(g).fo2 > 0.5 for g, _ in deco) else None
    return ScheduleRequest(
        depth=float(dive.max_depth),
        bottom_time_min=float(dive.bottom_time_min),
        unit=plan.unit,
        gas=dive.gas_mix.name,
        model=pol.model,
        gf_low=pol.gf_low / 100.0,
        gf_high=pol.gf_high / 100.0,
        descent_rate=plan.descent_rate(dive),
        ascent_rate=plan.ascent_rate(dive),
        stop_step=step,
        last_stop=float(pol.last_stop),
        deco_gases=deco,
        p_surface_bar=plan.p_surface_bar,
        water=plan.site.water,
        o2_air_break=o2_break,
        surface_decompression=sd,
        p_n2_0=None if p_n2_0 is None else tuple(float(x) for x in p_n2_0),
        p_he_0=None if p_he_0 is None else tuple(float(x) for x in p_he_0),
    )


def _anchor(res: ScheduleResult | None) -> float | None:
    """GF-line anchor for a profile: the model schedule's first stop (0 = GF high throughout)."""
    if res is None:
        return None
    return res.first_stop_depth if res.first_stop_depth else 0.0


def _evaluate(
    plan: Plan,
    profile: Profile,
    p_n2_0: NDArray[np.float64] | None,
    p_he_0: NDArray[np.float64] | None,
    anchor: float | None,
) -> ProfileEvaluation:
    pol = plan.resolved_policy
    return evaluate_profile(
        profile,
        model=pol.model,
        gf_low=pol.gf_low / 100.0,
        gf_high=pol.gf_high / 100.0,
        p_n2_0=p_n2_0,
        p_he_0=p_he_0,
        first_stop_depth=anchor,
    )


def margin_minutes(
    covered: Callable[[float], bool], bottom_time_min: float, shortest_min: float, ok_now: bool
) -> Margin:
    """Search the margin of the proposed stops (module docstring).

    Parameters
    ----------
    covered : callable
        ``covered(bottom_time_min) -> bool``: whether the proposed stops keep the
        diver below the ceiling with that bottom time [min].
    bottom_time_min : float
        Planned bottom time [min].
    shortest_min : float
        Shortest bottom time possible (the descent) [min].
    ok_now : bool
        ``covered(bottom_time_min)``, already known.

    Returns
    -------
    Margin

    Notes
    -----
    The covered bottom times are taken to form one interval starting at the
    shortest (a longer bottom time never loads the tissues less); the search
    doubles the step, then bisects.
    """
    if ok_now:
        good, bad, step = 0, None, 1
        while step <= MARGIN_CAP_MIN:
            if covered(bottom_time_min + step):
                good = step
                step *= 2
            else:
                bad = step
                break
        if bad is None:
            if good < MARGIN_CAP_MIN and covered(bottom_time_min + MARGIN_CAP_MIN):
                return Margin(MARGIN_CAP_MIN, capped=True)
            if good < MARGIN_CAP_MIN:
                bad = MARGIN_CAP_MIN
            else:
                return Margin(MARGIN_CAP_MIN, capped=True)
        while bad - good > 1:
            mid = (good + bad) // 2
            if covered(bottom_time_min + mid):
                good = mid
            else:
                bad = mid
        return Margin(good)
    most = int(math.floor(bottom_time_min - shortest_min + 1e-9))
    if most < 1 or not covered(bottom_time_min - most):
        return Margin(None, uncoverable=True)
    bad, good = 0, most  # reductions: bad breaks, good is covered
    while good - bad > 1:
        mid = (good + bad) // 2
        if covered(bottom_time_min - mid):
            good = mid
        else:
            bad = mid
    return Margin(-good)


def time_to_altitude(
    p_n2: NDArray[np.float64],
    p_he: NDArray[np.float64],
    model: str,
    gf_high: float,
    p_surface_bar: float,
    p_target_bar: float,
    max_min: int = ALTITUDE_SEARCH_MAX_MIN,
) -> float | None:
    """Minutes on the surface until every compartment tolerates a lower ambient pressure.

    Parameters
    ----------
    p_n2, p_he : ndarray
        Tensions on surfacing [bar].
    model : str
        Coefficient set.
    gf_high : float
        Gradient factor applied at the target pressure [-].
    p_surface_bar : float
        Pressure the diver waits at, breathing air [bar].
    p_target_bar : float
        Ambient pressure of the target altitude [bar].
    max_min : int
        Longest wait searched [min].

    Returns
    -------
    float or None
        Whole minutes (0 when the diver may go at once); None when longer than
        ``max_min``.

    Notes
    -----
    Constant-pressure (Haldane) off-gassing, P(t) = P_alv + (P0 - P_alv) e^(-k t),
    with the Bühlmann ceiling P_tol = (P - GF a) / (GF / b + 1 - GF) compared
    with the target pressure [minute grid].
    """
    c = bm.load_coefficients(model)
    t = np.arange(0, max_min + 1, dtype=float)[:, None]
    pa_n = float(inspired_pressure(p_surface_bar, AIR.fn2))
    pn = schreiner(np.asarray(p_n2)[None, :], pa_n, 0.0, t, rate_constant(c.n2_half))
    ph = schreiner(np.asarray(p_he)[None, :], 0.0, 0.0, t, rate_constant(c.he_half))
    ok = np.all(bm.ceiling(pn, ph, c, gf_high) <= p_target_bar + 1e-9, axis=1)
    if not ok.any():
        return None
    return float(np.argmax(ok))


def _surface_interval(
    plan: Plan, p_n2: NDArray[np.float64], p_he: NDArray[np.float64], minutes: float
) -> ProfileEvaluation:
    """Off-gassing on the surface between two dives (a one-segment engine run)."""
    prof = Profile(
        [Segment(0.0, 0.0, max(minutes, 0.0), AIR, "surface", SURFACE_INTERVAL)],
        plan.unit,
        plan.p_surface_bar,
        plan.site.water,
    )
    return _evaluate(plan, prof, p_n2, p_he, 0.0)


def _phase(seg: Segment) -> str | None:
    if seg.place == "surface":
        return None
    if seg.place == "chamber":
        return "chamber"
    if seg.label in ("descent", "bottom"):
        return "bottom"
    return "decompression"


def po2_by_phase(profile: Profile) -> tuple[dict[str, float | None], dict[str, float | None]]:
    """Highest and lowest inspired PO2 [bar] per phase of a profile (dry gas, Dalton).

    Phases: ``bottom`` (descent and bottom), ``decompression`` (in the water after
    leaving the bottom) and ``chamber``; surface segments breathe the atmosphere.
    """
    hi: dict[str, float | None] = dict.fromkeys(("bottom", "decompression", "chamber"))
    lo: dict[str, float | None] = dict.fromkeys(("bottom", "decompression", "chamber"))
    for s in profile.segments:
        ph = _phase(s)
        if ph is None:
            continue
        vals = inspired_po2(
            np.array([s.start_depth, s.end_depth]), s.gas, profile.unit, profile.p_surface_bar,
            profile.water,
        )
        a, b = float(np.max(vals)), float(np.min(vals))
        hi[ph] = a if hi[ph] is None else max(hi[ph], a)  # type: ignore[type-var]
        lo[ph] = b if lo[ph] is None else min(lo[ph], b)  # type: ignore[type-var]
    return hi, lo


def to_table_depth(plan: Plan, depth: float, unit: str) -> float:
    """Plan depth [plan unit] to the sea-level-equivalent depth in a table's unit [unit].

    The Navy altitude correction D_sl = D * P_sea / P_site (Rev 4 Change A 9-12,
    OLDER-EDITION); never shallower than the actual depth (a site below sea level
    gets no credit).
    """
    d = depth if unit == plan.unit else float(convert_pressure(depth, plan.unit, unit))
    return max(d, float(sea_level_equivalent_depth(d, plan.p_surface_bar)))


def from_table_depth(plan: Plan, depth: float, unit: str) -> float:
    """Sea-level table depth [unit] to the actual depth at the site [plan unit].

    D_site = D_sl * P_site / P_sea above sea level (Rev 4 Change A 9-12, OLDER-EDITION).
    """
    d = float(altitude_stop_depth(depth, plan.p_surface_bar)) if plan.p_surface_bar < C.P_ATM_BAR \
        else depth
    return d if unit == plan.unit else float(convert_pressure(d, unit, plan.unit))


def _reference_json(look: Any) -> dict[str, Any] | None:
    if look is None:
        return None
    d = look.to_dict()
    return {
        "table": d["table"],
        "unit": d["unit"],
        "depth": d["depth"],
        "depth_requested": _r(d["depth_requested"], 2),
        "bottom_time_min": d["bottom_time_min"],
        "bottom_time_requested": d["bottom_time_requested"],
        "mode": d["mode"],
        "stops": d["stops"],
        "no_stop_limit_min": d["no_stop_limit_min"],
        "within_no_stop_limit": d["within_no_stop_limit"],
        "repetitive_group": d["repetitive_group"],
        "outside_table": d["outside_table"],
        "row_verification": d["row_verification"],
        "source_status": d["source_status"],
        "exceptional_exposure": d["exceptional_exposure"],
        "needs_review": d["needs_review"],
        "reason": d["reason"],
    }


def _lookup(plan: Plan, table: Any, dive: Dive, depth: float, bottom_time: float) -> Any:
    from supervisor.references import lookup_no_stop, lookup_schedule

    unit = table.model.conventions.depth_unit
    d = to_table_depth(plan, depth, unit)
    if table.kind == "no-stop":
        return lookup_no_stop(table, d, bottom_time)
    if table.kind == "decompression":
        return lookup_schedule(table, d, bottom_time, _MODE_OF[dive.decompression])  # type: ignore[arg-type]
    raise InputError(
        "policy.reference_table",
        f"{table.name} is a {table.kind} table; expected a no-stop or decompression table",
    )


def _standby_named(plan: Plan, dive: Dive) -> bool:
    if dive.standby_diver is not None:
        return True
    return any(m.name != dive.diver for m in plan.members_with("standby-diver"))


def _source_figures(
    src: GasSource | None, mmp_bar: float
) -> tuple[str | None, float | None, float | None]:
    from supervisor.supply import free_gas_volume

    if src is None:
        return None, None, None
    if src.kind == "compressor":
        return src.kind, None, src.delivery_lpm
    avail = float(
        free_gas_volume(src.pressure_bar, src.water_volume_l, p_min_gauge=mmp_bar, gas=src.gas)
    )
    return src.kind, avail, None


def supply_figures(plan: Plan, dive: Dive, profile: Profile) -> Supply:
    """Gas-supply figures of one dive (see :class:`Supply`).

    The diver's need is the planned profile in the water at :data:`RMV_LPM`; the
    standby diver, when assigned, is counted as a second diver on the same profile
    (an interpretation of 46 CFR 197.340, common practice, no source).  The
    secondary must recover the same people from the end of the bottom time, the
    case with the largest decompression (46 CFR 197.340; Navy ch. 8).  Banks and
    cylinders count their gas above the minimum manifold pressure (Navy ch. 8).
    """
    from supervisor import supply as sp

    notes: list[str] = []
    depth_fsw = plan.to_fsw(dive.max_depth)
    people = 2 if _standby_named(plan, dive) else 1
    bottom = dive.gas_mix
    gs = plan.gas_supply
    if parse_gas(gs.primary.gas) != bottom:
        notes.append(
            f"the primary supply holds {parse_gas(gs.primary.gas).name}, the dive breathes "
            f"{bottom.name}: the need is counted against it all the same"
        )
    need = sp.profile_gas_need(profile, RMV_LPM, places=("water",))
    diver_need = float(need.by_gas.get(bottom.name, 0.0))
    for g, v in need.by_gas.items():
        if g not in (bottom.name, "oxygen") and v > 0:
            notes.append(f"{v:.0f} L of {g} at the stops has no source in the plan's gas supply")
    k = max((i for i, s in enumerate(profile.segments) if s.label == "bottom"), default=0) + 1
    after = [s for s in profile.segments[k:] if s.place == "water"]
    recovery = 0.0
    if after:
        rest = Profile(after, profile.unit, profile.p_surface_bar, profile.water)
        recovery = float(sp.profile_gas_need(rest, RMV_LPM, places=("water",)).by_gas.get(
            bottom.name, 0.0))
    peak = people * float(
        sp.consumption_at_depth(RMV_LPM, dive.max_depth, plan.unit, plan.p_surface_bar)
    )
    ob = mmp = None
    mmp_error = None
    if dive.mode == "scuba":
        mmp_error = "scuba: no manifold; the cylinder regulator's own minimum applies"
    else:
        try:
            ob = sp.navy_over_bottom_pressure(depth_fsw, "demand-helmet")
            mmp = float(sp.minimum_manifold_pressure(depth_fsw, ob))
        except COMPUTE_ERRORS as exc:
            mmp_error = _err(exc)
    mmp_bar = (mmp or 0.0) * C.BAR_PER_PSI
    p_kind, p_avail, p_flow = _source_figures(gs.primary, mmp_bar)
    s_kind, s_avail, s_flow = _source_figures(gs.secondary, mmp_bar)
    egs = bail_psig = egs_error = None
    bail = next((b for b in gs.bailout if b.diver == dive.diver), None)
    if bail is not None:
        water = dive.water_stops
        try:
            egs = sp.emergency_gas_requirement(
                depth_fsw,
                EGS_BOTTOM_MIN,
                bail.water_volume_l / L_PER_FT3,
                ascent_rate_fsw_min=plan.to_fsw(plan.ascent_rate(dive)),
                first_stop_fsw=plan.to_fsw(water[0].depth) if water else 0.0,
            )
            bail_psig = bail.pressure_bar / C.BAR_PER_PSI
        except COMPUTE_ERRORS as exc:
            egs_error = _err(exc)
    o2_need = o2_avail = None
    all_need = sp.profile_gas_need(profile, RMV_LPM, places=("water", "chamber"))
    if all_need.by_gas.get("oxygen", 0.0) > 0:
        o2_need = float(all_need.by_gas["oxygen"])
        cyl = gs.oxygen_decompression
        if cyl is not None and parse_gas(cyl.gas).fo2 >= 0.99:
            o2_avail = float(sp.free_gas_volume(cyl.pressure_bar, cyl.water_volume_l, gas=cyl.gas))
        else:
            o2_avail = 0.0
    chamber_required = dive.declared_outside_ndl or bool(dive.chamber_stops) or depth_fsw > 100
    return Supply(
        rmv_lpm=RMV_LPM,
        people=people,
        diver_need_l=diver_need,
        need_l=people * diver_need,
        recovery_need_l=people * recovery,
        peak_flow_lpm=peak,
        primary_kind=gs.primary.kind,
        primary_available_l=p_avail,
        primary_delivery_lpm=p_flow,
        secondary_kind=s_kind,
        secondary_available_l=s_avail,
        secondary_delivery_lpm=s_flow,
        over_bottom_psig=ob,
        mmp_psig=mmp,
        mmp_error=mmp_error,
        egs=egs,
        bailout_psig=bail_psig,
        egs_error=egs_error,
        oxygen_need_l=o2_need,
        oxygen_available_l=o2_avail,
        chamber_required=chamber_required,
        notes=notes,
    )


# --------------------------------------------------------------------------- one dive


def _variant(dive: Dive, **update: Any) -> Dive:
    return dive.model_copy(update=update)


def _covered(plan: Plan, a: DiveAnalysis) -> Callable[[float], bool]:
    """Whether the proposed stops cover a bottom time (anchor from the model's schedule)."""
    req = a.request

    def covered(bt: float) -> bool:
        d2 = _variant(a.dive, bottom_time_min=bt)
        try:
            prof = planned_profile(plan, d2)
            res = plan_schedule(replace(req, bottom_time_min=bt)) if req is not None else None
            ev = _evaluate(plan, prof, a.p_n2_0, a.p_he_0, _anchor(res))
        except COMPUTE_ERRORS:
            return False
        if not a.dive.stops and (res is None or res.stops):
            return False  # no stops proposed: covered only within the model's no-stop limit
        return not ev.ceiling_broken

    return covered


def _schedule_or_error(req: ScheduleRequest) -> tuple[ScheduleResult | None, str | None]:
    try:
        return plan_schedule(req), None
    except COMPUTE_ERRORS as exc:
        return None, _err(exc)


def _contingencies(plan: Plan, a: DiveAnalysis) -> dict[str, Contingency | None]:
    """Overrun, deeper and oxygen-failure schedules (module docstring)."""
    dive, req, ref, table = a.dive, a.request, a.reference, a.table
    out: dict[str, Contingency | None] = dict.fromkeys(("overrun", "deeper", "oxygen_failure"))
    if req is None:
        return out
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

    cases: list[tuple[str, ScheduleRequest, float, float, str, Dive]] = [
        ("overrun", replace(req, bottom_time_min=bt2), dive.max_depth, bt2, basis_t,
         _variant(dive, bottom_time_min=bt2)),
        ("deeper", replace(req, depth=d2), d2, dive.bottom_time_min, basis_d,
         _variant(dive, max_depth=d2)),
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
            _variant(dive, decompression="in-water"),
        ))
    for kind, r2, depth, bt, basis, d_var in cases:
        res, error = _schedule_or_error(r2)
        look = None
        if table is not None:
            try:
                look = _lookup(plan, table, d_var, depth, bt)
            except COMPUTE_ERRORS as exc:
                error = error or _err(exc)
        out[kind] = Contingency(kind, depth, bt, basis, res, look, error)
    return out


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
    a = DiveAnalysis(dive=dive, p_n2_0=p_n2_0, p_he_0=p_he_0, table=table)
    try:
        a.profile = planned_profile(plan, dive, a.notes)
    except COMPUTE_ERRORS as exc:
        a.errors["profile"] = _err(exc)
        for key in ("model_schedule", "evaluation", "oxygen", "supply"):
            a.errors[key] = "no profile: " + a.errors["profile"]
        return a
    try:
        a.request = schedule_request(plan, dive, p_n2_0, p_he_0, a.notes)
        a.model_schedule = plan_schedule(a.request)
    except COMPUTE_ERRORS as exc:
        a.errors["model_schedule"] = _err(exc)
    try:
        a.evaluation = _evaluate(plan, a.profile, p_n2_0, p_he_0, _anchor(a.model_schedule))
    except COMPUTE_ERRORS as exc:
        a.errors["evaluation"] = _err(exc)
    if a.evaluation is not None and a.request is not None:
        t_desc = dive.max_depth / plan.descent_rate(dive)
        a.margin = margin_minutes(
            _covered(plan, a), dive.bottom_time_min, t_desc, not a.evaluation.ceiling_broken
        )
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
    a.contingencies = _contingencies(plan, a)
    try:
        a.supply = supply_figures(plan, dive, a.profile)
    except COMPUTE_ERRORS as exc:
        a.errors["supply"] = _err(exc)
    return a


# --------------------------------------------------------------------------- whole plan


def _load_reference(plan: Plan) -> tuple[Any, str | None]:
    name = plan.resolved_policy.reference_table
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
    for d in plan.dives:
        prev = last.get(d.diver)
        p_n2 = p_he = None
        start, si, assumed, loading = 0.0, None, False, None
        notes: list[str] = []
        errors: dict[str, str] = {}
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
            if prev.evaluation is not None:
                try:
                    sie = _surface_interval(
                        plan, prev.evaluation.final_p_n2, prev.evaluation.final_p_he, si
                    )
                    p_n2, p_he = sie.final_p_n2, sie.final_p_he
                    loading = float(np.max(sie.loading_percent_of_limit))
                except COMPUTE_ERRORS as exc:
                    errors["tissues"] = f"surface interval after {prev.id}: {_err(exc)}"
            else:
                errors["tissues"] = (
                    f"the tissue state after {prev.id} is unknown (its profile could not be "
                    "evaluated): this dive was computed from saturation at the surface"
                )
        elif d.surface_interval_min is not None:
            notes.append(
                "a surface interval is given but the plan holds no earlier dive of this diver: "
                "tissues taken as saturated at the surface; add the earlier dive to the plan"
            )
        a = analyse_dive(plan, d, p_n2, p_he, table)
        a.previous = prev.id if prev is not None else None
        a.surface_interval_min = si
        a.interval_assumed = assumed
        a.start_min = start
        a.notes[:0] = notes
        a.errors.update(errors)
        if table_error:
            a.errors["reference"] = table_error
        if loading is None and "tissues" not in errors:
            try:
                first = _surface_interval(
                    plan,
                    p_n2 if p_n2 is not None else _saturated(plan),
                    p_he if p_he is not None else np.zeros_like(_saturated(plan)),
                    0.0,
                )
                loading = float(np.max(first.loading_percent_of_limit))
            except COMPUTE_ERRORS:
                loading = None
        a.start_loading_percent = loading
        dur = a.profile.duration_min if a.profile is not None else d.bottom_time_min
        a.end_min = start + dur
        dives[d.id] = a
        last[d.diver] = a
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
