"""Results of the per-dive analysis and their ``supervisor.check/1`` JSON sections."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor import constants as C
from supervisor.analysis.assumptions import (
    O2_AIR_BREAK,
    REPETITIVE_WINDOW_MIN,
    RMV_SOURCE,
)
from supervisor.engine import oxygen as ox
from supervisor.engine.schedule import (
    ProfileEvaluation,
    ScheduleRequest,
    ScheduleResult,
)
from supervisor.plan import Dive
from supervisor.profile import Profile
from supervisor.quantities import gf_percent_value


def _err(exc: BaseException) -> str:
    return f"{type(exc).__name__}: {exc}" if str(exc) else type(exc).__name__


def _r(x: float | None, nd: int = 3) -> float | None:
    if x is None or not math.isfinite(x):
        return None
    return round(float(x), nd)


def bar_per_unit(unit: str) -> float:
    """Bar per plan depth unit (fsw or msw, both pressure units) [bar/unit]."""
    return C.BAR_PER_FSW if unit == "fsw" else C.BAR_PER_MSW


#: The rule that counts chamber oxygen in a check instead of an in-water CNS percentage.
CHAMBER_OXYGEN_RULE = "proc-o2-chamber-periods"
CHAMBER_OXYGEN_COUNTED_BY = (
    "chamber oxygen periods against the surface-decompression procedure's limits "
    f"(rule {CHAMBER_OXYGEN_RULE}); the NOAA in-water CNS table does not apply"
)
CHAMBER_OXYGEN_LIMIT = (
    f"oxygen periods of at most {O2_AIR_BREAK[0]:g} min separated by {O2_AIR_BREAK[1]:g}-min "
    "air breaks (U.S. Navy Diving Manual Rev 7 ch. 9, surface decompression on oxygen; "
    "SECONDARY)"
)


def chamber_oxygen_json(
    e: ox.OxygenExposure | None, dive: Dive | None = None
) -> dict[str, Any] | None:
    """The ``chamber_oxygen`` object of a dive's oxygen section; None without a chamber.

    ``minutes`` are the minutes on an oxygen-enriched gas in the chamber (travel
    included), ``periods`` the planned chamber oxygen stop minutes (of ``dive``; else
    ``minutes``) in 30-min periods rounded up to half periods, ``rule`` the rule that
    counts them (never an in-water CNS percentage).
    """
    if e is None or not e.has_chamber:
        return None
    period = O2_AIR_BREAK[0]
    minutes = e.chamber_oxygen_minutes
    planned = minutes if dive is None else sum(
        s.minutes for s in dive.chamber_stops if dive.stop_gas(s).fo2 > C.FO2_AIR + 1e-9)
    return {
        "minutes": _r(minutes, 2),
        "otu": _r(e.chamber_otu, 1),
        "max_po2_atm": _r(e.chamber_max_po2_atm),
        "periods": math.ceil(planned / (period / 2) - 1e-9) / 2,
        "rule": CHAMBER_OXYGEN_RULE,
        "counted_by": CHAMBER_OXYGEN_COUNTED_BY,
        "limit": CHAMBER_OXYGEN_LIMIT,
    }


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
        deeper than 100 fsw).
    notes : list of str
        Assumptions and figures that could not be computed.
    bottom_psig : float or None
        Water pressure at the maximum depth [psig] (Navy 0.445 psi/fsw, unrounded);
        a supply below it cannot deliver gas to the diver at all.  None for scuba.
    chamber : ChamberGas or None
        The chamber's own gas (:mod:`supervisor.analysis.chamber`); None when the
        chamber is not required or not on site.
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
    bottom_psig: float | None = None
    chamber: Any = None

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
            "bottom_psig": _r(self.bottom_psig, 0),
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
            "chamber_gas": self.supply.chamber.to_json()
            if self.supply is not None and self.supply.chamber is not None
            else None,
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
            "surfacing_gf_percent": gf_percent_value(100 * s.surfacing_gf),
            "controlling_compartment": s.controlling_compartment,
            "coefficient_status": s.coefficient_status,
            "error": None,
        }

    def _margin_json(self) -> dict[str, Any]:
        ev, m = self.evaluation, self.margin
        bpu = bar_per_unit(self.dive_unit)
        return {
            "ceiling_broken": ev.ceiling_broken if ev else None,
            "surfacing_gf_percent": gf_percent_value(100 * ev.surfacing_gf) if ev else None,
            "max_gf_percent": _r(100 * ev.max_gf, 1) if ev else None,
            "controlling_compartment": ev.controlling_compartment if ev else None,
            "first_break_min": _r(ev.first_break_min, 2) if ev else None,
            "worst_excess_depth": _r(ev.worst_excess_bar / bpu, 2) if ev else None,
            # surface decompression: the interval from leaving the water stop to arriving at
            # chamber depth lies outside the ceiling check; its peak is reported here
            "surface_interval_max_gf_percent": _r(100 * ev.surface_interval_max_gf, 1)
            if ev and ev.surface_interval_max_gf is not None else None,
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
            "max_po2_atm": _r(e.max_po2_atm) if e else None,
            "cns_percent": _r(e.cns_percent, 1) if e else None,
            "cns_24h_percent": _r(e.cns_24h_percent, 1) if e else None,
            "otu": _r(e.otu, 1) if e else None,
            "cns_is_lower_bound": e.out_of_range if e else None,
            "cns_note": e.cns_note if e else "",
            "minutes_above_table": _r(e.minutes_above_range, 2) if e else None,
            "po2_tolerance_atm": ox.PO2_TOLERANCE_ATM,
            "chamber_oxygen": chamber_oxygen_json(e, self.dive),
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
            return {"labels": [], "loading_percent_of_limit": [], "surfacing_gf_percent": []}
        return {
            "labels": list(ev.labels),
            "loading_percent_of_limit": [round(float(x), 1) for x in ev.loading_percent_of_limit],
            # the same quantity as model_margin.surfacing_gf_percent, per compartment
            "surfacing_gf_percent": [gf_percent_value(100 * float(x))
                                     for x in ev.surfacing_gf_by_compartment],
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
