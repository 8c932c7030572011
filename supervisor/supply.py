"""Gas-supply arithmetic: cylinder and bank contents, consumption, reserves, bailout.

Volumes are free gas, i.e. gas expanded to a reference pressure (one standard
atmosphere unless stated) and a reference temperature: standard cubic feet
(scf) when the water volume is in ft^3, free litres when it is in litres.
Breathing rates (RMV) are actual volumes per minute at the diver's depth
(acfm or L/min), which the ambient pressure turns into free gas.

Navy conventions used by the Navy methods here (constants of this module):

=========================  =========  ==========  ===========================================
name                       unit       value       source
=========================  =========  ==========  ===========================================
NAVY_PSI_PER_ATM           psi        14.7        [1] ch. 7-8 cylinder formulas
NAVY_PSI_PER_FSW           psi/fsw    0.445       [1] p. 8-4, manifold pressure
NAVY_DEMAND_ACFM           acfm       1.4         [1] 8-2.2.2, demand helmet average flow
NAVY_EGS_MIN_FIRST_STAGE   psig       135         [1] 8-2.2.1, EGS first stage over bottom
NAVY_OVER_BOTTOM_PSIG      psig       90/135/165  [1] p. 8-4, demand helmet, 0-60 / 61-130 /
                                                  131-190 fsw; full-face mask 90
ARMY_FREE_FLOW_MMP         psig       0.50 D + 42 [2], 300 ft hose; 0.62 D + 42 for 600 ft
=========================  =========  ==========  ===========================================

These figures come from a superseded Navy edition and an Army equipment manual;
the contractor's manual and the equipment maker's figures govern.  Results are
planning figures for a supervisor to check, not a decision.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 7 (scuba air
       supply) and ch. 8 (surface-supplied air: flow, manifold pressure, EGS,
       flasks).  Superseded by Revision 7 Change A (2018).
.. [2] U.S. Army TM 5-4220-225-14, free-flow helmet air-supply charts.
.. [3] NOAA Diving Manual, air-consumption worked examples (pressure-based
       surface consumption rate).
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from supervisor import constants as C
from supervisor.errors import InputError
from supervisor.gas import AIR, EquationOfState, Gas, Mixture, as_gas, compressibility
from supervisor.profile import Profile
from supervisor.units import (
    DepthUnit,
    Water,
    as_float_array,
    pressure_ratio,
    round_up,
)

SupplyPressureUnit = Literal["bar", "psi"]
HelmetKind = Literal["demand-helmet", "full-face-mask"]

NAVY_PSI_PER_ATM: float = 14.7
NAVY_PSI_PER_FSW: float = 0.445
NAVY_DEMAND_ACFM: float = 1.4
NAVY_EGS_MIN_FIRST_STAGE: float = 135.0
#: (deepest fsw of the band, over-bottom psig) for a demand helmet [1].
NAVY_OVER_BOTTOM_PSIG: tuple[tuple[float, float], ...] = (
    (60.0, 90.0),
    (130.0, 135.0),
    (190.0, 165.0),
)
NAVY_MASK_OVER_BOTTOM_PSIG: float = 90.0
#: hose length [ft] -> (psig per fsw, psig) of the reduced free-flow formulas [2].
ARMY_FREE_FLOW_MMP: dict[int, tuple[float, float]] = {300: (0.50, 42.0), 600: (0.62, 42.0)}

_ATM_IN: dict[str, float] = {"bar": C.P_ATM_BAR, "psi": C.P_ATM_BAR / C.BAR_PER_PSI}
_BAR_PER_UNIT: dict[str, float] = {"bar": 1.0, "psi": C.BAR_PER_PSI}


def _out(arr: NDArray[np.float64]) -> NDArray[np.float64] | float:
    return float(arr) if arr.ndim == 0 else arr


def _unit(pressure_unit: str) -> None:
    if pressure_unit not in _ATM_IN:
        raise InputError("pressure_unit", f"got {pressure_unit!r}; expected bar or psi")


# --------------------------------------------------------------------------- contents


def free_gas_volume(
    p_gauge: ArrayLike,
    water_volume: ArrayLike,
    p_min_gauge: ArrayLike = 0.0,
    count: int = 1,
    pressure_unit: SupplyPressureUnit = "bar",
    p_ref: float | None = None,
    gas: Mixture = AIR,
    temperature_c: float = 15.0,
    reference_temperature_c: float = 15.0,
    eos: EquationOfState = "ideal",
) -> NDArray[np.float64] | float:
    """Usable free gas in cylinders or flasks between two gauge pressures.

    Parameters
    ----------
    p_gauge : array_like
        Gauge pressure of each cylinder [pressure_unit], >= 0.
    water_volume : array_like
        Internal (floodable, water) volume of one cylinder [L or ft^3], > 0.
    p_min_gauge : array_like
        Gauge pressure left unused [pressure_unit], e.g. the minimum that still
        holds the manifold pressure, or a reserve.
    count : int
        Number of identical cylinders, >= 1.
    pressure_unit : {"bar", "psi"}
        Unit of the pressures.
    p_ref : float, optional
        Pressure the free gas is expanded to [pressure_unit]; one standard
        atmosphere by default.  Navy arithmetic uses 14.7 psi.
    gas : Gas, str or mapping
        Gas in the cylinders (for the real-gas correction only).
    temperature_c : float
        Gas temperature in the cylinders [degC].
    reference_temperature_c : float
        Temperature of the free gas [degC].
    eos : {"ideal", "peng-robinson"}
        ``ideal`` is Boyle's and Charles' laws (the Navy method [1]); the
        real-gas option divides each pressure by its compressibility factor,
        see :func:`supervisor.gas.compressibility`.

    Returns
    -------
    ndarray or float
        Free gas [same volume unit as ``water_volume``]; 0 when the cylinder is
        at or below ``p_min_gauge``.

    Notes
    -----
    Ideal: V_free = N V (P - P_min) / P_ref (T_ref / T), the Navy
    Va = (Pc - Pm) / 14.7 * FV * N [1].  Real gas:
    V_free = N V (T_ref / T) (P1 / Z1 - P2 / Z2) Z_ref / P_ref with absolute
    pressures P = gauge + 1 atm.
    """
    _unit(pressure_unit)
    p1 = as_float_array(p_gauge, "p_gauge", pressure_unit, minimum=0.0)
    p2 = as_float_array(p_min_gauge, "p_min_gauge", pressure_unit, minimum=0.0)
    v = as_float_array(water_volume, "water_volume", minimum=1e-9)
    if isinstance(count, bool) or not isinstance(count, (int, np.integer)) or count < 1:
        raise InputError("count", f"got {count!r}; expected a whole number of cylinders >= 1")
    pr = _ATM_IN[pressure_unit] if p_ref is None else float(
        as_float_array(p_ref, "p_ref", pressure_unit, minimum=1e-9)
    )
    t = float(as_float_array(temperature_c, "temperature", "degC", -40.0, 80.0)) + 273.15
    t_ref = float(
        as_float_array(reference_temperature_c, "reference_temperature", "degC", -40.0, 80.0)
    ) + 273.15
    if eos == "ideal":
        per_cyl = (p1 - p2) / pr
    else:
        k = _BAR_PER_UNIT[pressure_unit]
        atm = _ATM_IN[pressure_unit]
        a1, a2 = p1 + atm, p2 + atm
        z1 = np.asarray(compressibility(a1 * k, gas, t - 273.15, eos))
        z2 = np.asarray(compressibility(a2 * k, gas, t - 273.15, eos))
        z_ref = float(compressibility(pr * k, gas, t_ref - 273.15, eos))
        per_cyl = (a1 / z1 - a2 / z2) * z_ref / pr
    out = np.where(p1 > p2, count * v * per_cyl * (t_ref / t), 0.0)
    return _out(np.clip(out, 0.0, None))


def gauge_pressure_for_free_gas(
    free_volume: ArrayLike,
    water_volume: float,
    p_min_gauge: float = 0.0,
    count: int = 1,
    pressure_unit: SupplyPressureUnit = "bar",
    p_ref: float | None = None,
    gas: Mixture = AIR,
    temperature_c: float = 15.0,
    reference_temperature_c: float = 15.0,
    eos: EquationOfState = "ideal",
) -> NDArray[np.float64] | float:
    """Gauge pressure at which cylinders hold a given free-gas volume above a minimum.

    The inverse of :func:`free_gas_volume` in ``p_gauge``; same parameters,
    with ``free_volume`` [L or ft^3, the unit of ``water_volume``] required.

    Returns
    -------
    ndarray or float
        Gauge pressure [pressure_unit], unrounded.

    Raises
    ------
    InputError
        If the real-gas solution would exceed 400 bar.

    Notes
    -----
    Ideal: P = V_free P_ref / (N V) (T / T_ref) + P_min, the Navy
    psig = Vr / FV * 14.7 + Pm [1].  Real gas: bisection on :func:`free_gas_volume`.
    """
    _unit(pressure_unit)
    need = as_float_array(free_volume, "free_volume", minimum=0.0)
    v = float(as_float_array(water_volume, "water_volume", minimum=1e-9))
    pm = float(as_float_array(p_min_gauge, "p_min_gauge", pressure_unit, minimum=0.0))
    pr = _ATM_IN[pressure_unit] if p_ref is None else float(p_ref)
    t = float(temperature_c) + 273.15
    t_ref = float(reference_temperature_c) + 273.15
    if isinstance(count, bool) or not isinstance(count, (int, np.integer)) or count < 1:
        raise InputError("count", f"got {count!r}; expected a whole number of cylinders >= 1")
    if eos == "ideal":
        return _out(need * pr / (count * v) * (t / t_ref) + pm)
    kw = dict(count=count, pressure_unit=pressure_unit, p_ref=pr, gas=gas,
              temperature_c=temperature_c, reference_temperature_c=reference_temperature_c,
              eos=eos)
    hi_limit = 400.0 / _BAR_PER_UNIT[pressure_unit] - _ATM_IN[pressure_unit]
    top = np.asarray(free_gas_volume(hi_limit, v, pm, **kw))
    if np.any(need > top):
        raise InputError(
            "free_volume",
            f"needs more than 400 bar in {count} x {v:g} volume units; add cylinders",
        )
    lo = np.full_like(need, pm)
    hi = np.full_like(need, hi_limit)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        got = np.asarray(free_gas_volume(mid, v, pm, **kw))
        below = got < need
        lo = np.where(below, mid, lo)
        hi = np.where(below, hi, mid)
    return _out(0.5 * (lo + hi))


# --------------------------------------------------------------------------- consumption


def consumption_at_depth(
    rate_surface: ArrayLike,
    depth: ArrayLike,
    unit: DepthUnit,
    p_surface_bar: float = C.P_ATM_BAR,
    water: Water = "salt",
    p_ref_bar: float = C.P_ATM_BAR,
) -> NDArray[np.float64] | float:
    """Gas used per minute at depth from a surface rate.

    Parameters
    ----------
    rate_surface : array_like
        Breathing rate: an actual volume per minute (RMV, [acfm] or [L/min]),
        or a surface consumption rate measured at ``p_ref_bar`` ([bar/min],
        [psi/min], [scfm]).
    depth : array_like
        Depth [unit], >= 0.
    unit : {"fsw", "msw", "ft", "m"}
        Unit of ``depth``.
    p_surface_bar : float
        Absolute surface pressure [bar].
    water : {"salt", "fresh"}
        Water, used for length units only.
    p_ref_bar : float
        Pressure of the free gas or of the surface rate [bar]; 1 atm by default.

    Returns
    -------
    ndarray or float
        Free gas (or cylinder pressure) per minute at depth [rate unit].

    Notes
    -----
    rate = rate_surface * P_amb / P_ref; in fsw with the defaults the Navy
    C = (D + 33) / 33 * RMV [1].
    """
    r = as_float_array(rate_surface, "rate", minimum=0.0)
    return _out(r * np.asarray(pressure_ratio(depth, unit, p_surface_bar, water, p_ref_bar)))


def surface_rate(
    rate_at_depth: ArrayLike,
    depth: ArrayLike,
    unit: DepthUnit,
    p_surface_bar: float = C.P_ATM_BAR,
    water: Water = "salt",
    p_ref_bar: float = C.P_ATM_BAR,
) -> NDArray[np.float64] | float:
    """Surface consumption rate from a rate measured at depth.

    The inverse of :func:`consumption_at_depth`.

    Parameters
    ----------
    rate_at_depth : array_like
        Gas or cylinder pressure used per minute at depth [rate unit], >= 0.
    depth, unit, p_surface_bar, water, p_ref_bar
        As for :func:`consumption_at_depth`.

    Returns
    -------
    ndarray or float
        Rate at ``p_ref_bar`` [rate unit].
    """
    r = as_float_array(rate_at_depth, "rate", minimum=0.0)
    return _out(r / np.asarray(pressure_ratio(depth, unit, p_surface_bar, water, p_ref_bar)))


def duration_min(
    available: ArrayLike, rate: ArrayLike, reserve: ArrayLike = 0.0
) -> NDArray[np.float64] | float:
    """Minutes a supply lasts at a constant rate, keeping a reserve.

    Parameters
    ----------
    available : array_like
        Gas available [volume] or cylinder pressure [bar or psi], >= 0.
    rate : array_like
        Use per minute [same unit/min], > 0.
    reserve : array_like
        Part of ``available`` kept back [same unit], >= 0.

    Returns
    -------
    ndarray or float
        Duration [min], unrounded; 0 when the reserve is not above the supply.
    """
    a = as_float_array(available, "available", minimum=0.0)
    r = as_float_array(rate, "rate", minimum=1e-12)
    k = as_float_array(reserve, "reserve", minimum=0.0)
    return _out(np.clip(a - k, 0.0, None) / r)


def segment_gas(
    start_depth: ArrayLike,
    end_depth: ArrayLike,
    minutes: ArrayLike,
    rmv: ArrayLike,
    unit: DepthUnit,
    p_surface_bar: float = C.P_ATM_BAR,
    water: Water = "salt",
    p_ref_bar: float = C.P_ATM_BAR,
) -> NDArray[np.float64] | float:
    """Free gas used on linear segments of a dive.

    Parameters
    ----------
    start_depth, end_depth : array_like
        Depth at the start and end of each segment [unit], >= 0.
    minutes : array_like
        Duration of each segment [min], >= 0.
    rmv : array_like
        Breathing rate, actual volume per minute [acfm or L/min], >= 0.
    unit, p_surface_bar, water, p_ref_bar
        As for :func:`consumption_at_depth`.

    Returns
    -------
    ndarray or float
        Free gas per segment [scf or L at ``p_ref_bar``].

    Notes
    -----
    Pressure is linear in time on a linear segment, so the exact integral is
    RMV * t * (P_start + P_end) / 2 / P_ref; the Navy uses the same average
    depth for an ascent [1].
    """
    t = as_float_array(minutes, "minutes", "min", minimum=0.0)
    r0 = np.asarray(pressure_ratio(start_depth, unit, p_surface_bar, water, p_ref_bar))
    r1 = np.asarray(pressure_ratio(end_depth, unit, p_surface_bar, water, p_ref_bar))
    rate = as_float_array(rmv, "rmv", minimum=0.0)
    return _out(rate * t * 0.5 * (r0 + r1))


@dataclass(frozen=True)
class GasNeed:
    """Free gas a dive needs, per segment and per gas.

    Attributes
    ----------
    labels : tuple of str
        Segment labels (``descent``, ``bottom``, ``stop``, ``ascent`` ...).
    gases : tuple of str
        Gas name per segment.
    volumes : ndarray
        Free gas per segment [scf or L at the reference pressure].
    by_gas : dict
        Total per gas name [same unit].
    total : float
        Total of all gases [same unit].
    profile : Profile
        The profile the need was computed for.
    """

    labels: tuple[str, ...]
    gases: tuple[str, ...]
    volumes: NDArray[np.float64]
    by_gas: dict[str, float]
    total: float
    profile: Profile = field(repr=False)


def profile_gas_need(
    profile: Profile,
    rmv: float,
    p_ref_bar: float = C.P_ATM_BAR,
    places: Iterable[str] = ("water", "chamber"),
) -> GasNeed:
    """Free gas a profile needs at a breathing rate.

    Parameters
    ----------
    profile : Profile
        The dive, in its own depth unit and surface pressure.
    rmv : float
        Breathing rate, actual volume per minute [acfm or L/min], > 0.
    p_ref_bar : float
        Pressure of the free gas [bar]; 1 atm by default.
    places : iterable of str
        Segment places counted; ``surface`` segments breathe the atmosphere.
        Chamber segments count the breathing gas of one occupant only.

    Returns
    -------
    GasNeed
    """
    r = float(as_float_array(rmv, "rmv", minimum=1e-9))
    keep = set(places)
    segs = [s for s in profile.segments if s.place in keep]
    if not segs:
        raise InputError("profile", "has no segments in the water or chamber to supply")
    d0 = np.array([s.start_depth for s in segs])
    d1 = np.array([s.end_depth for s in segs])
    t = np.array([s.minutes for s in segs])
    vol = np.asarray(
        segment_gas(d0, d1, t, r, profile.unit, profile.p_surface_bar, profile.water, p_ref_bar)
    )
    names = tuple(s.gas.name for s in segs)
    by_gas: dict[str, float] = {}
    for n, v in zip(names, vol, strict=True):
        by_gas[n] = by_gas.get(n, 0.0) + float(v)
    return GasNeed(tuple(s.label for s in segs), names, vol, by_gas, float(vol.sum()), profile)


def dive_gas_need(
    depth: float,
    bottom_time_min: float,
    rmv: float,
    unit: DepthUnit,
    descent_rate: float,
    ascent_rate: float,
    stops: Sequence[tuple[float, float] | tuple[float, float, Gas | str]] = (),
    gas: Gas | str = AIR,
    p_surface_bar: float = C.P_ATM_BAR,
    water: Water = "salt",
    p_ref_bar: float = C.P_ATM_BAR,
) -> GasNeed:
    """Free gas for a square dive: descent, bottom, stops at their depths, ascent.

    Parameters
    ----------
    depth : float
        Bottom depth [unit], > 0.
    bottom_time_min : float
        Bottom time from leaving the surface to leaving the bottom (descent
        included) [min]; must cover the descent.
    rmv : float
        Breathing rate, actual volume per minute [acfm or L/min], > 0.
    unit : {"fsw", "msw", "ft", "m"}
        Depth unit.
    descent_rate, ascent_rate : float
        Travel rates [unit/min], > 0.
    stops : sequence of (depth, minutes) or (depth, minutes, gas)
        Decompression stops, deepest first [unit], [min]; a stop's gas is used
        from the stop to the next stop.
    gas : Gas or str
        Bottom gas.
    p_surface_bar : float
        Absolute surface pressure [bar].
    water : {"salt", "fresh"}
        Water, used for length units only.
    p_ref_bar : float
        Pressure of the free gas [bar].

    Returns
    -------
    GasNeed
        Per-segment and per-gas free gas [scf or L]; add the contractor's reserve.
    """
    d = float(as_float_array(depth, "depth", unit, minimum=1e-9))
    bt = float(as_float_array(bottom_time_min, "bottom_time", "min", minimum=0.0))
    rd = float(as_float_array(descent_rate, "descent_rate", f"{unit}/min", minimum=1e-9))
    ra = float(as_float_array(ascent_rate, "ascent_rate", f"{unit}/min", minimum=1e-9))
    bottom_gas = as_gas(gas)
    t_desc = d / rd
    if bt < t_desc - 1e-9:
        raise InputError(
            "bottom_time",
            f"got {bt:g} min; descent to {d:g} {unit} at {rd:g} {unit}/min takes "
            f"{t_desc:.2f} min, which the bottom time includes",
        )
    prof = Profile(unit=unit, p_surface_bar=p_surface_bar, water=water)
    prof.add(d, t_desc, bottom_gas, "water", "descent")
    prof.add(d, max(bt - t_desc, 0.0), bottom_gas, "water", "bottom")
    here, current = d, bottom_gas
    for i, stop in enumerate(stops):
        if len(stop) not in (2, 3):
            raise InputError(f"stops[{i}]", "expected (depth, minutes) or (depth, minutes, gas)")
        sd = float(as_float_array(stop[0], f"stops[{i}].depth", unit, minimum=0.0))
        sm = float(as_float_array(stop[1], f"stops[{i}].minutes", "min", minimum=0.0))
        if sd > here:
            raise InputError(f"stops[{i}].depth", f"got {sd:g} {unit}; stops go deepest first")
        prof.add(sd, (here - sd) / ra, current, "water", "ascent")
        if len(stop) == 3:
            current = as_gas(stop[2], f"stops[{i}].gas")
        prof.add(sd, sm, current, "water", "stop")
        here = sd
    prof.add(0.0, here / ra, current, "water", "ascent")
    return profile_gas_need(prof, rmv, p_ref_bar, places=("water",))


# --------------------------------------------------------------------------- manifold pressure


def navy_over_bottom_pressure(depth_fsw: float, equipment: HelmetKind = "demand-helmet") -> float:
    """Over-bottom pressure for surface-supplied demand equipment, Navy table [1].

    Parameters
    ----------
    depth_fsw : float
        Working depth [fsw], 0 to 190.
    equipment : {"demand-helmet", "full-face-mask"}
        Demand helmet (90 / 135 / 165 psig by depth band) or demand full-face
        mask (90 psig).

    Returns
    -------
    float
        Over-bottom pressure [psig].

    Raises
    ------
    InputError
        If the depth is outside the table (deeper than 190 fsw).
    """
    d = float(as_float_array(depth_fsw, "depth", "fsw", minimum=0.0))
    if equipment == "full-face-mask":
        if d > NAVY_OVER_BOTTOM_PSIG[-1][0]:
            raise InputError("depth", f"got {d:g} fsw; the over-bottom table ends at 190 fsw")
        return NAVY_MASK_OVER_BOTTOM_PSIG
    if equipment != "demand-helmet":
        raise InputError(
            "equipment", f"got {equipment!r}; expected demand-helmet or full-face-mask"
        )
    for deepest, psig in NAVY_OVER_BOTTOM_PSIG:
        if d <= deepest:
            return psig
    raise InputError(
        "depth",
        f"got {d:g} fsw; the over-bottom table ends at 190 fsw; use the equipment maker's figure",
    )


def minimum_manifold_pressure(
    depth_fsw: ArrayLike,
    over_bottom_psig: ArrayLike,
    psi_per_fsw: float = NAVY_PSI_PER_FSW,
    round_bottom_up: bool = True,
) -> NDArray[np.float64] | float:
    """Minimum manifold pressure: bottom pressure plus over-bottom pressure [1].

    Parameters
    ----------
    depth_fsw : array_like
        Diver's depth [fsw], >= 0.
    over_bottom_psig : array_like
        Over-bottom pressure the equipment needs [psig], >= 0.
    psi_per_fsw : float
        Gauge pressure per fsw [psi/fsw]; 0.445 in the Navy method.
    round_bottom_up : bool
        Round the bottom pressure up to a whole psi before adding, as the
        Navy example does.

    Returns
    -------
    ndarray or float
        Minimum manifold pressure [psig].

    Notes
    -----
    MMP = D * 0.445 + over-bottom pressure [1].
    """
    d = as_float_array(depth_fsw, "depth", "fsw", minimum=0.0)
    ob = as_float_array(over_bottom_psig, "over_bottom", "psig", minimum=0.0)
    k = float(as_float_array(psi_per_fsw, "psi_per_fsw", "psi/fsw", minimum=1e-6))
    bottom = d * k
    if round_bottom_up:
        bottom = np.asarray(round_up(bottom, 1.0))
    return _out(bottom + ob)


def free_flow_manifold_pressure(depth_fsw: ArrayLike, hose_length_ft: int = 300) -> NDArray | float:
    """Manifold pressure for a free-flow helmet by the Army reduced formulas [2].

    Parameters
    ----------
    depth_fsw : array_like
        Diver's depth [fsw], >= 0.
    hose_length_ft : {300, 600}
        Umbilical hose length [ft].

    Returns
    -------
    ndarray or float
        Manifold pressure [psig]: 0.50 D + 42 (300 ft) or 0.62 D + 42 (600 ft).
    """
    if hose_length_ft not in ARMY_FREE_FLOW_MMP:
        raise InputError("hose_length", f"got {hose_length_ft!r} ft; expected 300 or 600")
    k, c = ARMY_FREE_FLOW_MMP[hose_length_ft]
    d = as_float_array(depth_fsw, "depth", "fsw", minimum=0.0)
    return _out(k * d + c)


# --------------------------------------------------------------------------- bailout


@dataclass(frozen=True)
class EgsRequirement:
    """Emergency gas supply (bailout) requirement by the Navy method [1].

    Attributes
    ----------
    ascent_min : float
        Ascent time to the first stop or the surface, rounded up [min].
    ascent_average_depth_fsw : float
        Average depth of the ascent [fsw].
    bottom_scf, ascent_scf, total_scf : float
        Free gas for the time at the bottom, the ascent, and both [scf].
    pm_psig : float
        Minimum cylinder pressure: first-stage setting plus the bottom pressure
        where the bailout ends (first stop, or 0 at the surface) [psig].
    required_psig : float
        Cylinder gauge pressure that holds ``total_scf`` above ``pm_psig`` [psig].
    required_psig_rounded : float
        ``required_psig`` rounded up to the charging step [psig].
    """

    ascent_min: float
    ascent_average_depth_fsw: float
    bottom_scf: float
    ascent_scf: float
    total_scf: float
    pm_psig: float
    required_psig: float
    required_psig_rounded: float


def emergency_gas_requirement(
    depth_fsw: float,
    bottom_min: float,
    floodable_volume_ft3: float,
    ascent_rate_fsw_min: float = 30.0,
    first_stop_fsw: float = 0.0,
    rmv_acfm: float = NAVY_DEMAND_ACFM,
    first_stage_psig: float = NAVY_EGS_MIN_FIRST_STAGE,
    charge_step_psig: float = 100.0,
) -> EgsRequirement:
    """Bailout cylinder pressure for a surface-supplied diver, Navy method [1].

    Parameters
    ----------
    depth_fsw : float
        Working depth [fsw], > 0.
    bottom_min : float
        Time to be covered at the bottom before leaving [min], >= 0.
    floodable_volume_ft3 : float
        Floodable (water) volume of the bailout cylinder [ft^3], > 0.
    ascent_rate_fsw_min : float
        Ascent rate [fsw/min]; 30 in the Navy method.
    first_stop_fsw : float
        First decompression stop, 0 for a no-decompression dive [fsw].
    rmv_acfm : float
        Breathing rate [acfm]; 1.4 in the Navy method.
    first_stage_psig : float
        First-stage over-bottom setting [psig], at least 135 in the Navy method.
    charge_step_psig : float
        Step the required pressure is rounded up to [psig].

    Returns
    -------
    EgsRequirement

    Notes
    -----
    Vr = (D + 33) / 33 * RMV * T for the bottom and for the ascent at its average
    depth; psig = Vr / FV * 14.7 + Pm, Pm = first stage + 0.445 * first stop [1].
    The cylinder must bring the diver to the first stop or the surface; local
    rules may require more.
    """
    d = float(as_float_array(depth_fsw, "depth", "fsw", minimum=1e-9))
    tb = float(as_float_array(bottom_min, "bottom_time", "min", minimum=0.0))
    fv = float(as_float_array(floodable_volume_ft3, "floodable_volume", "ft^3", minimum=1e-9))
    rate = float(as_float_array(ascent_rate_fsw_min, "ascent_rate", "fsw/min", minimum=1e-9))
    stop = float(as_float_array(first_stop_fsw, "first_stop", "fsw", minimum=0.0, maximum=d))
    fs = float(as_float_array(first_stage_psig, "first_stage", "psig", minimum=0.0))
    t_asc = float(round_up((d - stop) / rate, 1.0))
    avg = 0.5 * (d + stop)
    bottom = float(consumption_at_depth(rmv_acfm, d, "fsw")) * tb
    ascent = float(consumption_at_depth(rmv_acfm, avg, "fsw")) * t_asc
    total = bottom + ascent
    pm = fs + stop * NAVY_PSI_PER_FSW
    psig = float(
        gauge_pressure_for_free_gas(
            total, fv, pm, pressure_unit="psi", p_ref=NAVY_PSI_PER_ATM, eos="ideal"
        )
    )
    return EgsRequirement(
        ascent_min=t_asc,
        ascent_average_depth_fsw=avg,
        bottom_scf=bottom,
        ascent_scf=ascent,
        total_scf=total,
        pm_psig=pm,
        required_psig=psig,
        required_psig_rounded=float(round_up(psig, charge_step_psig)),
    )


__all__ = [
    "ARMY_FREE_FLOW_MMP",
    "NAVY_DEMAND_ACFM",
    "NAVY_EGS_MIN_FIRST_STAGE",
    "NAVY_MASK_OVER_BOTTOM_PSIG",
    "NAVY_OVER_BOTTOM_PSIG",
    "NAVY_PSI_PER_ATM",
    "NAVY_PSI_PER_FSW",
    "EgsRequirement",
    "GasNeed",
    "consumption_at_depth",
    "dive_gas_need",
    "duration_min",
    "emergency_gas_requirement",
    "free_flow_manifold_pressure",
    "free_gas_volume",
    "gauge_pressure_for_free_gas",
    "minimum_manifold_pressure",
    "navy_over_bottom_pressure",
    "profile_gas_need",
    "segment_gas",
    "surface_rate",
]
