"""Depth and pressure units, water density and surface pressure at altitude.

Inside the package pressures are bar absolute and times are minutes.  Units are
explicit at the edges: every public function names the unit of its input and
output.  Depth may be given as a pressure unit (fsw, msw), which does not depend
on the water, or as a length (ft, m), which does.

Gauge and absolute pressure are kept apart: depth is a gauge pressure (relative
to the water surface); ambient pressure is absolute.  Use
:func:`gauge_to_absolute` and :func:`absolute_to_gauge` to cross between them,
never a bare ``+ 1``.

Conventions for the foot of sea water differ by up to 0.2 %; the package uses
the U.S. Navy rule 33 fsw = 1 atm throughout, and :func:`bar_per_fsw` gives the
other two for comparison and for procedures written in them.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 7 (2016), ch. 2: 33 fsw = 1 atm.
.. [2] ISO 2533:1975 / ICAO Doc 7488, Manual of the ICAO Standard Atmosphere.
.. [3] EN 13319:2000, 1 msw = 0.1 bar (metre of sea water as a pressure unit).
.. [4] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 8 (0.445 psi per
       fsw in manifold-pressure arithmetic) and ch. 9 (diving at altitude).
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from supervisor import constants as C
from supervisor.errors import InputError

DepthUnit = Literal["fsw", "msw", "ft", "m"]
PressureUnit = Literal["bar", "atm", "psi", "fsw", "msw", "hPa", "kPa"]
Water = Literal["salt", "fresh"]
FswConvention = Literal["navy-33", "navy-0.445psi", "seawater-64lb"]

DEPTH_UNITS: tuple[str, ...] = ("fsw", "msw", "ft", "m")
PRESSURE_UNITS: tuple[str, ...] = ("bar", "atm", "psi", "fsw", "msw", "hPa", "kPa")
FSW_CONVENTIONS: tuple[str, ...] = ("navy-33", "navy-0.445psi", "seawater-64lb")

_BAR_PER: dict[str, float] = {
    "bar": 1.0,
    "atm": C.P_ATM_BAR,
    "psi": C.BAR_PER_PSI,
    "fsw": C.BAR_PER_FSW,
    "msw": C.BAR_PER_MSW,
    "hPa": 1e-3,
    "kPa": 1e-2,
}

#: Mass of one avoirdupois pound [kg] (international yard and pound agreement, 1959).
_KG_PER_LB = 0.45359237
#: Sea water of 64 lb/ft^3 behind the Navy conversion table's 1 fsw = 0.030643 bar.
_RHO_SEAWATER_64LB = 64.0 * _KG_PER_LB / C.M_PER_FT**3
#: Navy gauge-pressure rule of thumb for manifold arithmetic [psi/fsw] [4].
_PSI_PER_FSW_NAVY = 0.445


# --------------------------------------------------------------------------- checks


def as_float_array(
    value: ArrayLike,
    field: str,
    unit: str = "",
    minimum: float | None = None,
    maximum: float | None = None,
) -> NDArray[np.float64]:
    """Return ``value`` as a float array, or raise :class:`InputError` naming ``field``.

    Parameters
    ----------
    value : array_like
        Number or array of numbers.
    field : str
        Input field named in the error message.
    unit : str
        Unit named in the error message, e.g. ``"fsw"``.
    minimum, maximum : float, optional
        Inclusive bounds [unit].

    Returns
    -------
    ndarray
        Finite float array (0-d for a scalar input).

    Raises
    ------
    InputError
        If the value is not numeric, not finite, or out of bounds.
    """
    u = f" {unit}" if unit else ""
    if isinstance(value, (str, bytes)):
        raise InputError(field, f"got {value!r}; expected a number{u}")
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(field, f"got {value!r}; expected a number{u}") from None
    if not np.all(np.isfinite(arr)):
        raise InputError(field, f"got {value!r}; expected a finite number{u}")
    if minimum is not None and np.any(arr < minimum):
        bad = float(np.min(arr))
        raise InputError(field, f"got {bad:g}{u}; expected >= {minimum:g}{u}")
    if maximum is not None and np.any(arr > maximum):
        bad = float(np.max(arr))
        raise InputError(field, f"got {bad:g}{u}; expected <= {maximum:g}{u}")
    return arr


def _out(arr: NDArray[np.float64]) -> NDArray[np.float64] | float:
    return float(arr) if arr.ndim == 0 else arr


def _surface(p_surface_bar: float, field: str = "p_surface_bar") -> float:
    return float(as_float_array(p_surface_bar, field, "bar", minimum=0.2, maximum=1.2))


def _check_depth_unit(unit: str, field: str = "unit") -> None:
    if unit not in DEPTH_UNITS:
        raise InputError(field, f"got {unit!r}; expected one of {', '.join(DEPTH_UNITS)}")


# --------------------------------------------------------------------------- water and units


def water_density(water: Water) -> float:
    """Return the water density used for length depths.

    Parameters
    ----------
    water : {"salt", "fresh"}
        Kind of water.

    Returns
    -------
    float
        Density [kg/m^3]; 1025 for salt water and 1000 for fresh water
        (common practice, no source).
    """
    if water == "salt":
        return C.RHO_SALT
    if water == "fresh":
        return C.RHO_FRESH
    raise InputError("water", f"got {water!r}; expected 'salt' or 'fresh'")


def bar_per_fsw(convention: FswConvention = "navy-33") -> float:
    """Return the gauge pressure of one foot of sea water under a named convention.

    Parameters
    ----------
    convention : {"navy-33", "navy-0.445psi", "seawater-64lb"}
        ``navy-33``: 33 fsw = 1 atm, the package default [1].
        ``navy-0.445psi``: 0.445 psi per fsw, used in Navy manifold arithmetic [4].
        ``seawater-64lb``: a foot of water of 64 lb/ft^3 under standard gravity,
        the 0.030643 bar of the Navy conversion table.

    Returns
    -------
    float
        Gauge pressure of one fsw [bar/fsw].
    """
    if convention == "navy-33":
        return C.BAR_PER_FSW
    if convention == "navy-0.445psi":
        return _PSI_PER_FSW_NAVY * C.BAR_PER_PSI
    if convention == "seawater-64lb":
        return _RHO_SEAWATER_64LB * C.G0 * C.M_PER_FT / 1e5
    raise InputError(
        "fsw_convention", f"got {convention!r}; expected one of {', '.join(FSW_CONVENTIONS)}"
    )


def bar_per_depth_unit(unit: DepthUnit, water: Water = "salt") -> float:
    """Return the gauge pressure of one depth unit.

    Parameters
    ----------
    unit : {"fsw", "msw", "ft", "m"}
        Depth unit.  fsw and msw are pressure units and ignore ``water``.
    water : {"salt", "fresh"}
        Water for length units.

    Returns
    -------
    float
        Gauge pressure of one unit of depth [bar].
    """
    if unit == "fsw":
        return C.BAR_PER_FSW
    if unit == "msw":
        return C.BAR_PER_MSW
    if unit == "m":
        return water_density(water) * C.G0 / 1e5
    if unit == "ft":
        return water_density(water) * C.G0 * C.M_PER_FT / 1e5
    raise InputError("unit", f"got {unit!r}; expected one of {', '.join(DEPTH_UNITS)}")


# --------------------------------------------------------------------------- depth and pressure


def depth_to_pressure(
    depth: ArrayLike,
    unit: DepthUnit,
    p_surface_bar: float = C.P_ATM_BAR,
    water: Water = "salt",
) -> NDArray[np.float64] | float:
    """Convert depth to absolute ambient pressure.

    Parameters
    ----------
    depth : array_like
        Depth below the surface [unit], >= 0.
    unit : {"fsw", "msw", "ft", "m"}
        Unit of ``depth``.
    p_surface_bar : float
        Absolute pressure at the water surface [bar]; 1.01325 at sea level.
    water : {"salt", "fresh"}
        Water, used for length units only.

    Returns
    -------
    ndarray or float
        Absolute ambient pressure [bar].

    Raises
    ------
    InputError
        If the depth is negative or not a number, or the unit is unknown.

    Notes
    -----
    P = P_surface + depth * (bar per unit); 33 fsw = 1.01325 bar [1],
    10 msw = 1 bar [3].
    """
    k = bar_per_depth_unit(unit, water)
    d = as_float_array(depth, "depth", unit, minimum=0.0)
    return _out(_surface(p_surface_bar) + d * k)


def pressure_to_depth(
    p_abs_bar: ArrayLike,
    unit: DepthUnit,
    p_surface_bar: float = C.P_ATM_BAR,
    water: Water = "salt",
) -> NDArray[np.float64] | float:
    """Convert absolute ambient pressure to depth (the inverse of :func:`depth_to_pressure`).

    Parameters
    ----------
    p_abs_bar : array_like
        Absolute pressure [bar], > 0.
    unit : {"fsw", "msw", "ft", "m"}
        Unit of the result.
    p_surface_bar : float
        Absolute pressure at the water surface [bar].
    water : {"salt", "fresh"}
        Water, used for length units only.

    Returns
    -------
    ndarray or float
        Depth [unit]; negative values mean a pressure below the surface pressure.
    """
    k = bar_per_depth_unit(unit, water)
    p = as_float_array(p_abs_bar, "p_abs_bar", "bar", minimum=0.0)
    return _out((p - _surface(p_surface_bar)) / k)


def convert_depth(
    depth: ArrayLike,
    from_unit: DepthUnit,
    to_unit: DepthUnit,
    water: Water = "salt",
) -> NDArray[np.float64] | float:
    """Convert a depth between depth units at equal gauge pressure.

    Parameters
    ----------
    depth : array_like
        Depth [from_unit], >= 0.
    from_unit, to_unit : {"fsw", "msw", "ft", "m"}
        Units.  A pressure unit (fsw, msw) and a length (ft, m) are related
        through the density of ``water``.
    water : {"salt", "fresh"}
        Water, used for length units only.

    Returns
    -------
    ndarray or float
        Depth with the same gauge pressure [to_unit].

    Notes
    -----
    Between the two pressure units the result does not depend on the water:
    1 fsw = (1.01325 / 33) / 0.1 msw = 0.30705 msw.
    """
    _check_depth_unit(from_unit, "from_unit")
    _check_depth_unit(to_unit, "to_unit")
    d = as_float_array(depth, "depth", from_unit, minimum=0.0)
    ratio = bar_per_depth_unit(from_unit, water) / bar_per_depth_unit(to_unit, water)
    return _out(d * ratio)


def convert_pressure(
    value: ArrayLike, from_unit: PressureUnit, to_unit: PressureUnit
) -> NDArray[np.float64] | float:
    """Convert a pressure (or pressure difference) between units.

    Parameters
    ----------
    value : array_like
        Pressure [from_unit].  Gauge stays gauge and absolute stays absolute.
    from_unit, to_unit : {"bar", "atm", "psi", "fsw", "msw", "hPa", "kPa"}
        Units.

    Returns
    -------
    ndarray or float
        Pressure [to_unit].
    """
    for name, u in (("from_unit", from_unit), ("to_unit", to_unit)):
        if u not in _BAR_PER:
            raise InputError(name, f"got {u!r}; expected one of {', '.join(PRESSURE_UNITS)}")
    v = as_float_array(value, "pressure", from_unit)
    return _out(v * (_BAR_PER[from_unit] / _BAR_PER[to_unit]))


def gauge_to_absolute(
    p_gauge_bar: ArrayLike, p_surface_bar: float = C.P_ATM_BAR
) -> NDArray[np.float64] | float:
    """Return absolute pressure from gauge pressure.

    Parameters
    ----------
    p_gauge_bar : array_like
        Gauge pressure [bar].
    p_surface_bar : float
        Absolute pressure of the atmosphere the gauge reads against [bar].

    Returns
    -------
    ndarray or float
        Absolute pressure [bar].
    """
    p = as_float_array(p_gauge_bar, "p_gauge_bar", "bar")
    return _out(p + _surface(p_surface_bar))


def absolute_to_gauge(
    p_abs_bar: ArrayLike, p_surface_bar: float = C.P_ATM_BAR
) -> NDArray[np.float64] | float:
    """Return gauge pressure from absolute pressure.

    Parameters
    ----------
    p_abs_bar : array_like
        Absolute pressure [bar], >= 0.
    p_surface_bar : float
        Absolute pressure of the atmosphere the gauge reads against [bar].

    Returns
    -------
    ndarray or float
        Gauge pressure [bar].
    """
    p = as_float_array(p_abs_bar, "p_abs_bar", "bar", minimum=0.0)
    return _out(p - _surface(p_surface_bar))


def pressure_ratio(
    depth: ArrayLike,
    unit: DepthUnit,
    p_surface_bar: float = C.P_ATM_BAR,
    water: Water = "salt",
    p_ref_bar: float = C.P_ATM_BAR,
) -> NDArray[np.float64] | float:
    """Return ambient pressure at depth divided by a reference pressure.

    With the default reference of one standard atmosphere this is the pressure
    in atmospheres absolute (ata) that multiplies a surface breathing rate.

    Parameters
    ----------
    depth : array_like
        Depth [unit], >= 0.
    unit : {"fsw", "msw", "ft", "m"}
        Unit of ``depth``.
    p_surface_bar : float
        Absolute pressure at the water surface [bar].
    water : {"salt", "fresh"}
        Water, used for length units only.
    p_ref_bar : float
        Reference absolute pressure [bar]; 1.01325 (ata) by default.

    Returns
    -------
    ndarray or float
        P_amb / P_ref [-].

    Notes
    -----
    In fsw with the defaults this is (D + 33) / 33, the factor of the Navy
    gas-consumption formulas [4].
    """
    p_ref = float(as_float_array(p_ref_bar, "p_ref_bar", "bar", minimum=1e-6))
    p = np.asarray(depth_to_pressure(depth, unit, p_surface_bar, water))
    return _out(p / p_ref)


# --------------------------------------------------------------------------- altitude


def altitude_pressure(altitude_m: ArrayLike) -> NDArray[np.float64] | float:
    """Surface air pressure at an altitude in the ICAO standard atmosphere.

    Parameters
    ----------
    altitude_m : array_like
        Geopotential altitude above mean sea level [m], valid -500 to 11,000 m.

    Returns
    -------
    ndarray or float
        Absolute pressure [bar].

    Raises
    ------
    InputError
        If the altitude is outside the troposphere layer (below -500 m or above 11,000 m).

    Notes
    -----
    P = P0 (1 - L h / T0)^(g M / (R L)), the troposphere layer of [2].  The
    standard atmosphere is a planning figure; the Navy altitude procedure [4]
    uses the barometric pressure measured at the site when it is available.
    """
    h = as_float_array(altitude_m, "altitude", "m", minimum=-500.0, maximum=11000.0)
    expo = C.G0 * C.ISA_M_AIR / (C.R_GAS * C.ISA_LAPSE_K_PER_M)
    return _out(C.P_ATM_BAR * (1.0 - C.ISA_LAPSE_K_PER_M * h / C.ISA_T0_K) ** expo)


def sea_level_equivalent_depth(
    depth: ArrayLike, p_surface_bar: float, p_sea_bar: float = C.P_ATM_BAR
) -> NDArray | float:
    """Depth at sea level with the same pressure ratio to the surface (altitude correction).

    Parameters
    ----------
    depth : array_like
        Actual depth at the altitude site [any depth unit], >= 0.
    p_surface_bar : float
        Surface pressure at the site [bar].
    p_sea_bar : float
        Sea-level pressure the tables were computed for [bar].

    Returns
    -------
    ndarray or float
        Sea-level-equivalent depth [same unit]; enter a sea-level table with it.

    Notes
    -----
    D_sl = D * P_sea / P_alt, the ratio method of the Navy altitude procedure [4]
    (ch. 9, diving at altitude).  Use the same depth unit on both sides.
    """
    d = as_float_array(depth, "depth", minimum=0.0)
    p_alt = _surface(p_surface_bar)
    p_sea = _surface(p_sea_bar, "p_sea_bar")
    return _out(d * (p_sea / p_alt))


def altitude_stop_depth(
    stop_depth_sea_level: ArrayLike, p_surface_bar: float, p_sea_bar: float = C.P_ATM_BAR
) -> NDArray | float:
    """Actual depth at altitude of a decompression stop read from a sea-level table.

    Parameters
    ----------
    stop_depth_sea_level : array_like
        Stop depth printed in the sea-level table [any depth unit], >= 0.
    p_surface_bar : float
        Surface pressure at the site [bar].
    p_sea_bar : float
        Sea-level pressure the tables were computed for [bar].

    Returns
    -------
    ndarray or float
        Depth at which to take the stop at the site [same unit].

    Notes
    -----
    D_alt = D_sl * P_alt / P_sea, the inverse of :func:`sea_level_equivalent_depth` [4].
    """
    d = as_float_array(stop_depth_sea_level, "stop_depth", minimum=0.0)
    p_alt = _surface(p_surface_bar)
    p_sea = _surface(p_sea_bar, "p_sea_bar")
    return _out(d * (p_alt / p_sea))


# --------------------------------------------------------------------------- lengths and rounding


def feet_to_metres(x: ArrayLike) -> NDArray[np.float64] | float:
    """Return length in metres [m] from feet [ft] (international foot)."""
    return _out(as_float_array(x, "length", "ft") * C.M_PER_FT)


def metres_to_feet(x: ArrayLike) -> NDArray[np.float64] | float:
    """Return length in feet [ft] from metres [m] (international foot)."""
    return _out(as_float_array(x, "length", "m") * C.FT_PER_M)


#: Relative slack when rounding, so that 11.000000000000002 rounds up to 11, not 12.
_ROUND_SLACK = 1e-9


def round_up(value: ArrayLike, step: float) -> NDArray[np.float64] | float:
    """Round up to a multiple of ``step`` (use for a minimum depth or a required pressure).

    Parameters
    ----------
    value : array_like
        Value [any unit].
    step : float
        Rounding step [same unit], > 0.

    Returns
    -------
    ndarray or float
        Smallest multiple of ``step`` not below ``value`` (within 1e-9 of a step).
    """
    s = float(as_float_array(step, "step", minimum=1e-12))
    v = as_float_array(value, "value")
    return _out(np.ceil(v / s - _ROUND_SLACK) * s)


def round_down(value: ArrayLike, step: float) -> NDArray[np.float64] | float:
    """Round down to a multiple of ``step`` (use for a maximum depth or an available volume).

    Parameters
    ----------
    value : array_like
        Value [any unit].
    step : float
        Rounding step [same unit], > 0.

    Returns
    -------
    ndarray or float
        Largest multiple of ``step`` not above ``value`` (within 1e-9 of a step).
    """
    s = float(as_float_array(step, "step", minimum=1e-12))
    v = as_float_array(value, "value")
    return _out(np.floor(v / s + _ROUND_SLACK) * s)


__all__ = [
    "DEPTH_UNITS",
    "FSW_CONVENTIONS",
    "PRESSURE_UNITS",
    "DepthUnit",
    "FswConvention",
    "PressureUnit",
    "Water",
    "absolute_to_gauge",
    "altitude_pressure",
    "altitude_stop_depth",
    "as_float_array",
    "bar_per_depth_unit",
    "bar_per_fsw",
    "convert_depth",
    "convert_pressure",
    "depth_to_pressure",
    "feet_to_metres",
    "gauge_to_absolute",
    "metres_to_feet",
    "pressure_ratio",
    "pressure_to_depth",
    "round_down",
    "round_up",
    "sea_level_equivalent_depth",
    "water_density",
]
