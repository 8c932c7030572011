"""Depth and pressure units, water density and surface pressure at altitude.

Inside the package pressures are bar absolute and times are minutes.  Units are
explicit at the edges: every public function names the unit of its input and
output.  Depth may be given as a pressure unit (fsw, msw), which does not depend
on the water, or as a length (ft, m), which does.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 7 (2016), ch. 2: 33 fsw = 1 atm.
.. [2] ISO 2533:1975 / ICAO Doc 7488, Manual of the ICAO Standard Atmosphere.
.. [3] EN 13319:2000, 1 msw = 0.1 bar (metre of sea water as a pressure unit).
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

DEPTH_UNITS: tuple[str, ...] = ("fsw", "msw", "ft", "m")
PRESSURE_UNITS: tuple[str, ...] = ("bar", "atm", "psi", "fsw", "msw", "hPa", "kPa")

_BAR_PER: dict[str, float] = {
    "bar": 1.0,
    "atm": C.P_ATM_BAR,
    "psi": C.BAR_PER_PSI,
    "fsw": C.BAR_PER_FSW,
    "msw": C.BAR_PER_MSW,
    "hPa": 1e-3,
    "kPa": 1e-2,
}


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
        Depth below the surface [unit].
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

    Notes
    -----
    P = P_surface + depth * (bar per unit); 33 fsw = 1.01325 bar [1],
    10 msw = 1 bar [3].
    """
    out = p_surface_bar + np.asarray(depth, dtype=float) * bar_per_depth_unit(unit, water)
    return float(out) if out.ndim == 0 else out


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
        Absolute pressure [bar].
    unit : {"fsw", "msw", "ft", "m"}
        Unit of the result.
    p_surface_bar : float
        Absolute pressure at the water surface [bar].
    water : {"salt", "fresh"}
        Water, used for length units only.

    Returns
    -------
    ndarray or float
        Depth [unit]; negative values mean above the water surface.
    """
    out = (np.asarray(p_abs_bar, dtype=float) - p_surface_bar) / bar_per_depth_unit(unit, water)
    return float(out) if out.ndim == 0 else out


def convert_pressure(value: ArrayLike, from_unit: PressureUnit, to_unit: PressureUnit):
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
    out = np.asarray(value, dtype=float) * (_BAR_PER[from_unit] / _BAR_PER[to_unit])
    return float(out) if out.ndim == 0 else out


def gauge_to_absolute(p_gauge_bar: ArrayLike, p_surface_bar: float = C.P_ATM_BAR):
    """Return absolute pressure [bar] from gauge pressure [bar] and surface pressure [bar]."""
    out = np.asarray(p_gauge_bar, dtype=float) + p_surface_bar
    return float(out) if out.ndim == 0 else out


def absolute_to_gauge(p_abs_bar: ArrayLike, p_surface_bar: float = C.P_ATM_BAR):
    """Return gauge pressure [bar] from absolute pressure [bar] and surface pressure [bar]."""
    out = np.asarray(p_abs_bar, dtype=float) - p_surface_bar
    return float(out) if out.ndim == 0 else out


def altitude_pressure(altitude_m: ArrayLike) -> NDArray[np.float64] | float:
    """Surface air pressure at an altitude in the ICAO standard atmosphere.

    Parameters
    ----------
    altitude_m : array_like
        Geopotential altitude above mean sea level [m], valid 0–11,000 m.

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
    P = P0 (1 - L h / T0)^(g M / (R L)), the troposphere layer of [2].
    """
    h = np.asarray(altitude_m, dtype=float)
    if np.any(h < -500.0) or np.any(h > 11000.0):
        raise InputError("altitude", f"got {altitude_m!r} m; expected -500 to 11000 m")
    expo = C.G0 * C.ISA_M_AIR / (C.R_GAS * C.ISA_LAPSE_K_PER_M)
    out = C.P_ATM_BAR * (1.0 - C.ISA_LAPSE_K_PER_M * h / C.ISA_T0_K) ** expo
    return float(out) if out.ndim == 0 else out


def sea_level_equivalent_depth(depth: ArrayLike, p_surface_bar: float) -> NDArray | float:
    """Depth at sea level with the same pressure ratio to the surface (altitude correction).

    Parameters
    ----------
    depth : array_like
        Actual depth at the altitude site [any depth unit].
    p_surface_bar : float
        Surface pressure at the site [bar].

    Returns
    -------
    ndarray or float
        Sea-level-equivalent depth [same unit]; enter a sea-level table with it.

    Notes
    -----
    D_sl = D * P_sea / P_alt, the ratio method of the Navy altitude procedure
    (U.S. Navy Diving Manual, ch. 9, diving at altitude).
    """
    out = np.asarray(depth, dtype=float) * (C.P_ATM_BAR / p_surface_bar)
    return float(out) if out.ndim == 0 else out


def feet_to_metres(x: ArrayLike):
    """Return length in metres [m] from feet [ft] (international foot)."""
    out = np.asarray(x, dtype=float) * C.M_PER_FT
    return float(out) if out.ndim == 0 else out


def metres_to_feet(x: ArrayLike):
    """Return length in feet [ft] from metres [m] (international foot)."""
    out = np.asarray(x, dtype=float) * C.FT_PER_M
    return float(out) if out.ndim == 0 else out
