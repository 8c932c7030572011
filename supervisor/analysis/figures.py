"""Figures of one dive: planned profile, model request, margin search, PO2, table entry, supply.

See :mod:`supervisor.analysis` for the definitions and
:mod:`supervisor.analysis.assumptions` for the planning figures used.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Generator
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor import constants as C
from supervisor.analysis.assumptions import (
    ALTITUDE_SEARCH_MAX_MIN,
    COMPUTE_ERRORS,
    EGS_BOTTOM_MIN,
    L_PER_FT3,
    MARGIN_CAP_MIN,
    O2_AIR_BREAK,
    O2_SWITCH_DEPTH_FSW,
    RMV_LPM,
    SURD_INTERVAL_MIN,
)
from supervisor.analysis.chamber import ChamberGas, chamber_gas
from supervisor.analysis.results import Margin, Supply, _err
from supervisor.engine import buhlmann as bm
from supervisor.engine.kinetics import inspired_pressure, rate_constant, schreiner
from supervisor.engine.schedule import (
    SURFACE_INTERVAL,
    ProfileEvaluation,
    ScheduleRequest,
    ScheduleResult,
    SurfaceDecompression,
    evaluate_profile,
)
from supervisor.errors import InputError
from supervisor.gas import AIR, inspired_po2, parse_gas
from supervisor.plan import Dive, GasSource, Plan, proposed_profile
from supervisor.profile import Profile, Segment
from supervisor.units import (
    altitude_stop_depth,
    convert_pressure,
    sea_level_equivalent_depth,
)

_MODE_OF: dict[str, str] = {
    "none": "air",
    "in-water": "air",
    "in-water-oxygen": "air_o2",
    "surface-oxygen": "surd_o2",
}


def _round_down(x: float, step: float) -> float:
    return math.floor(x / step + 1e-9) * step


def _step(plan: Plan) -> float:
    return float(plan.resolved_policy.stop_step)


def planned_profile(plan: Plan, dive: Dive, notes: list[str] | None = None) -> Profile:
    """Build the planned profile of a dive, labelled for the engine.

    The profile of :func:`supervisor.plan.proposed_profile` (one builder for the
    plan and the analysis): descent, bottom, water stops, and for surface
    decompression the ascent, time on deck and compression at
    :attr:`supervisor.plan.Plan.chamber_compression_rate` (labelled
    ``surface interval``), the chamber stops and the chamber ascent on air.

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
    return proposed_profile(plan, dive, notes)


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
    Surface decompression follows the policy's chamber pattern
    (``surd_chamber_first_depth`` then ``surd_chamber_later_depth``, no deeper than
    the dive) on the gas of the proposed chamber stops, oxygen by default.

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
        compress = plan.chamber_compression_rate
        water = dive.water_stops
        leave = min(s.depth for s in water) if water else dive.max_depth
        leave = max(leave, float(pol.last_stop))
        # the policy's chamber pattern: the first half-period, then the later periods
        c_depth = min(float(pol.surd_chamber_first_depth), float(dive.max_depth))
        c_depth = max(c_depth, float(pol.last_stop))
        c_later = min(float(pol.surd_chamber_later_depth), c_depth)
        c_gases = [dive.stop_gas(s) for s in chamber if dive.stop_gas(s).fo2 > C.FO2_AIR + 1e-9]
        c_gas = c_gases[0].name if c_gases else "oxygen"
        if chamber:
            up, deck, _, _ = plan.surface_decompression_times(dive)
        else:
            up = (water[-1].depth if water else dive.max_depth) / ascent
            deck = max(SURD_INTERVAL_MIN - up - c_depth / compress, 0.0)
        up = max(up, leave / ascent)
        si = up + deck + c_depth / compress
        sd = SurfaceDecompression(
            leave_water_depth=leave,
            surface_interval_min=si + 1e-9,
            chamber_depth=c_depth,
            chamber_gas=c_gas,
            air_break=O2_AIR_BREAK,
            compression_rate=compress,
            second_depth=c_later,
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


def margin_search(
    bottom_time_min: float, shortest_min: float, ok_now: bool
) -> Generator[float, bool, Margin]:
    """The margin search (module docstring) as a generator, so many dives search in step.

    Yields each bottom time to try [min] and receives whether the proposed stops
    cover it; returns the :class:`Margin`.  :func:`margin_minutes` drives one search
    with a callable, :func:`margin_minutes_many` drives many with one batched call
    per round.

    Parameters
    ----------
    bottom_time_min : float
        Planned bottom time [min].
    shortest_min : float
        Shortest bottom time possible (the descent) [min].
    ok_now : bool
        Whether the planned bottom time itself is covered.

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
            if (yield bottom_time_min + step):
                good = step
                step *= 2
            else:
                bad = step
                break
        if bad is None:
            if good < MARGIN_CAP_MIN and (yield bottom_time_min + MARGIN_CAP_MIN):
                return Margin(MARGIN_CAP_MIN, capped=True)
            if good < MARGIN_CAP_MIN:
                bad = MARGIN_CAP_MIN
            else:
                return Margin(MARGIN_CAP_MIN, capped=True)
        while bad - good > 1:
            mid = (good + bad) // 2
            if (yield bottom_time_min + mid):
                good = mid
            else:
                bad = mid
        return Margin(good)
    most = int(math.floor(bottom_time_min - shortest_min + 1e-9))
    if most < 1 or not (yield bottom_time_min - most):
        return Margin(None, uncoverable=True)
    bad, good = 0, most  # reductions: bad breaks, good is covered
    while good - bad > 1:
        mid = (good + bad) // 2
        if (yield bottom_time_min - mid):
            good = mid
        else:
            bad = mid
    return Margin(-good)


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
    See :func:`margin_search`.
    """
    return margin_minutes_many(
        lambda bts: [covered(bt) for _, bt in bts], [(bottom_time_min, shortest_min, ok_now)]
    )[0]


def margin_minutes_many(
    covered: Callable[[list[tuple[int, float]]], list[bool]],
    cases: list[tuple[float, float, bool]],
) -> list[Margin]:
    """Search the margins of many dives in step: one call of ``covered`` per round.

    Parameters
    ----------
    covered : callable
        ``covered([(case index, bottom time [min]), ...]) -> [bool, ...]``: whether
        the proposed stops of each case cover each bottom time (one batch).
    cases : list of (float, float, bool)
        Per dive: planned bottom time [min], shortest bottom time [min] and
        whether the planned bottom time is covered (see :func:`margin_search`).

    Returns
    -------
    list of Margin, in the order of the cases.
    """
    out: list[Margin | None] = [None] * len(cases)
    searches: dict[int, Generator[float, bool, Margin]] = {}
    asks: dict[int, float] = {}
    for i, (bt, shortest, ok) in enumerate(cases):
        gen = margin_search(bt, shortest, ok)
        try:
            asks[i] = next(gen)
            searches[i] = gen
        except StopIteration as stop:
            out[i] = stop.value
    while asks:
        queries = list(asks.items())
        answers = covered(queries)
        asks = {}
        for (i, _), ok in zip(queries, answers, strict=True):
            try:
                asks[i] = searches[i].send(bool(ok))
            except StopIteration as stop:
                out[i] = stop.value
    return out  # type: ignore[return-value]


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
    return _evaluate(plan, surface_interval_profile(plan, minutes), p_n2, p_he, 0.0)


def surface_interval_profile(plan: Plan, minutes: float) -> Profile:
    """The profile of a surface interval: breathing air on the surface for ``minutes`` [min]."""
    return Profile(
        [Segment(0.0, 0.0, max(minutes, 0.0), AIR, "surface", SURFACE_INTERVAL)],
        plan.unit,
        plan.p_surface_bar,
        plan.site.water,
    )


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
    ob = mmp = bottom_psig = None
    mmp_error = None
    if dive.mode == "scuba":
        mmp_error = "scuba: no manifold; the cylinder regulator's own minimum applies"
    else:
        bottom_psig = depth_fsw * sp.NAVY_PSI_PER_FSW
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
    chamber = None
    if chamber_required and plan.chamber.on_site:
        try:
            chamber = chamber_gas(plan, dive, profile)
        except COMPUTE_ERRORS as exc:
            chamber = ChamberGas(error=_err(exc))
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
        bottom_psig=bottom_psig,
        chamber=chamber,
    )
