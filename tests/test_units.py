"""Tests for supervisor.units: depth, pressure, altitude conventions against outside references."""

from __future__ import annotations

import math
import tomllib
from pathlib import Path

import gsw
import numpy as np
import pytest

from supervisor import constants as C
from supervisor.errors import InputError
from supervisor.units import (
    absolute_to_gauge,
    altitude_pressure,
    altitude_stop_depth,
    bar_per_depth_unit,
    bar_per_fsw,
    convert_depth,
    convert_pressure,
    depth_to_pressure,
    feet_to_metres,
    gauge_to_absolute,
    metres_to_feet,
    pressure_ratio,
    pressure_to_depth,
    round_down,
    round_up,
    sea_level_equivalent_depth,
)

DATA = Path(__file__).parent / "data"


def _load(name: str) -> dict:
    with open(DATA / name, "rb") as fh:
        return tomllib.load(fh)


# --------------------------------------------------------------------------- fsw and msw


def test_33_fsw_is_one_atmosphere_vs_navy_manual():
    """33 fsw = 1 atm: U.S. Navy Diving Manual, Rev 4 Change A (2001), p. 7-14 (OLDER-EDITION)."""
    assert depth_to_pressure(33.0, "fsw") == pytest.approx(2 * 1.01325, rel=1e-12)
    assert depth_to_pressure(33.0, "fsw", p_surface_bar=1.01325) - 1.01325 == pytest.approx(
        convert_pressure(1.0, "atm", "bar"), rel=1e-12
    )


def test_one_atm_in_bar_and_psi_vs_cgpm_definition():
    """1 atm = 101 325 Pa exactly (10th CGPM, 1954) and 14.696 psi (1 psi = 6894.757 Pa, NIST)."""
    assert convert_pressure(1.0, "atm", "bar") == pytest.approx(1.01325, rel=1e-12)
    assert convert_pressure(1.0, "atm", "psi") == pytest.approx(14.696, abs=5e-4)
    assert convert_pressure(101325.0, "kPa", "atm") == pytest.approx(1000.0, rel=1e-12)


def test_msw_is_a_tenth_of_a_bar_vs_en13319():
    """EN 13319: +1 bar reads +10 m (test-lab summary of the standard, SECONDARY); T6."""
    assert pressure_to_depth(2.01325, "msw") == pytest.approx(10.000, abs=5e-4)
    assert bar_per_depth_unit("msw") == 0.1


def test_fsw_conventions_vs_navy_conversion_table():
    """1 fsw = 0.030643 bar (Navy conversion table, quoted by an encyclopedia article: SECONDARY).

    The same water (64 lb/ft^3, standard gravity) gives 33.066 fsw per atm, while the
    working rule is 33 fsw per atm and 0.445 psi per fsw gives 33.02 (DERIVED in the
    same source); the three differ by at most 0.2 %.
    """
    assert bar_per_fsw("seawater-64lb") == pytest.approx(0.030643, abs=5e-7)
    assert 1.01325 / bar_per_fsw("seawater-64lb") == pytest.approx(33.066, abs=5e-3)
    assert convert_pressure(1.0, "atm", "psi") / 0.445 == pytest.approx(33.02, abs=5e-3)
    assert bar_per_fsw("navy-0.445psi") == pytest.approx(0.445 * 0.0689475729, rel=1e-12)
    assert bar_per_fsw() == bar_per_depth_unit("fsw")
    spread = [bar_per_fsw(c) for c in ("navy-33", "navy-0.445psi", "seawater-64lb")]
    assert max(spread) / min(spread) - 1 < 0.002


# --------------------------------------------------------------------------- vs TEOS-10


def _gsw_gauge_bar(depth_m: np.ndarray, lat: float) -> np.ndarray:
    # gsw.p_from_z takes height (positive up) and returns sea pressure in dbar,
    # i.e. absolute pressure minus one standard atmosphere.
    return gsw.p_from_z(-depth_m, lat) / 10.0


def test_gsw_oracle_reproduces_its_documented_value():
    """gsw_p_from_z(-10, 4) = 10.0557 dbar (R gsw documentation, VERIFIED); guards the oracle."""
    assert gsw.p_from_z(-10.0, 4.0) == pytest.approx(10.0557, abs=5e-4)


# Tolerances are the difference of conventions, not measurement error.  TEOS-10 uses
# the density of real sea water (about 1028 kg/m^3 at the surface for the standard
# ocean, rising by compression about 0.05 % per 100 m) and gravity by latitude
# (9.780 m/s^2 at the equator to 9.832 at the poles).  This package uses 1025 kg/m^3
# with standard gravity 9.80665 for lengths of salt water (0.3 % lighter), 0.1 bar per
# msw (EN 13319, as for water of 1019.7 kg/m^3: 0.8 % lighter) and 33 fsw per atm
# (as for water of 1027.2 kg/m^3 per foot).  Each tolerance covers the density gap
# plus the +-0.27 % gravity spread.
GSW_CASES = [
    ("m", 1.0, 0.0070),
    ("ft", 1.0 / C.M_PER_FT, 0.0070),
    ("msw", 1.0, 0.0120),
    ("fsw", 1.0 / C.M_PER_FT, 0.0050),
]


@pytest.mark.parametrize("lat", [0.0, 30.0, 45.0, 60.0, 90.0])
@pytest.mark.parametrize(("unit", "per_metre", "rtol"), GSW_CASES)
def test_depth_to_pressure_vs_gsw_p_from_z(unit, per_metre, rtol, lat):
    """Gauge pressure at depth vs TEOS-10 ``gsw.p_from_z`` (LIBRARY, gsw 3.6)."""
    depth_m = np.array([1.0, 10.0, 30.0, 60.0, 100.0, 200.0, 300.0])
    ours = np.asarray(depth_to_pressure(depth_m * per_metre, unit)) - C.P_ATM_BAR
    ref = _gsw_gauge_bar(depth_m, lat)
    assert np.all(np.abs(ours / ref - 1.0) < rtol)


def test_salt_water_length_vs_gsw_at_45_degrees_is_the_density_ratio():
    """At 45 deg gravity is close to standard, so the gap is 1025 / rho_TEOS10 (LIBRARY)."""
    depth_m = np.array([10.0, 50.0, 100.0])
    ours = np.asarray(depth_to_pressure(depth_m, "m")) - C.P_ATM_BAR
    ratio = ours / _gsw_gauge_bar(depth_m, 45.0)
    # 1025 / 1028.1 .. 1025 / 1028.8: near-surface TEOS-10 density with compression.
    assert np.all((ratio > 1025 / 1029.2) & (ratio < 1025 / 1027.6))


def test_fresh_water_depth_vs_instrument_application_note():
    """Fresh water: depth [m] = pressure [dbar] x 1.019716 (Sea-Bird AN69, VERIFIED)."""
    dbar = np.array([1.0, 10.0, 35.0])
    p_abs = C.P_ATM_BAR + dbar / 10.0
    depth = pressure_to_depth(p_abs, "m", water="fresh")
    np.testing.assert_allclose(depth, dbar * 1.019716, rtol=2e-6)


# --------------------------------------------------------------------------- altitude


def test_isa_pressure_at_5000_ft_vs_standard_atmosphere():
    """ICAO / U.S. Standard Atmosphere 1976 troposphere formula: 843.1 hPa at 1524 m (T4).

    The formula is VERIFIED; the 843.1 hPa is DERIVED from it.  The Navy altitude
    example quotes 843 mb for 5000 ft (U.S. Navy Diving Manual Rev 4 ChA ch. 9,
    OLDER-EDITION): printed to 1 mb, so atol 0.5 hPa.
    """
    p = altitude_pressure(feet_to_metres(5000.0))
    assert convert_pressure(p, "bar", "hPa") == pytest.approx(843.1, abs=0.05)
    assert convert_pressure(p, "bar", "hPa") == pytest.approx(843.0, abs=0.5)


def test_isa_pressure_at_sea_level_and_tropopause():
    """Sea level 1013.25 hPa (ISO 2533 definition); 226.32 hPa at 11 km (from memory)."""
    assert altitude_pressure(0.0) == pytest.approx(1.01325, rel=1e-12)
    assert convert_pressure(altitude_pressure(11000.0), "bar", "hPa") == pytest.approx(
        226.32, abs=0.05
    )


@pytest.fixture
def navy_altitude():
    return _load("units_navy_altitude.toml")["example"]


def test_sea_level_equivalent_depth_vs_navy_altitude_example(navy_altitude):
    """60 fsw at 843 mb is entered as 72.1 fsw (Navy Rev 4 ChA ch. 9, OLDER-EDITION); 0.1 fsw."""
    ex = navy_altitude
    p_alt = ex["p_altitude_mbar"] / 1000.0
    p_sea = ex["p_sea_mbar"] / 1000.0
    sled = sea_level_equivalent_depth(ex["actual_depth_fsw"], p_alt, p_sea)
    assert sled == pytest.approx(ex["sea_level_equivalent_fsw"], abs=0.05)


def test_altitude_stop_depth_vs_navy_altitude_example(navy_altitude):
    """A 20 fsw table stop is taken at 16.6 fsw at 843 mb (Navy Rev 4 ChA ch. 9); 0.1 fsw."""
    ex = navy_altitude
    p_alt = ex["p_altitude_mbar"] / 1000.0
    p_sea = ex["p_sea_mbar"] / 1000.0
    stop = altitude_stop_depth(ex["sea_level_stop_fsw"], p_alt, p_sea)
    assert stop == pytest.approx(ex["actual_stop_fsw"], abs=0.05)


def test_navy_altitude_example_with_isa_pressure(navy_altitude):
    """The same example with the ISA pressure for 5000 ft and 1013.25 hPa at sea level."""
    p_alt = altitude_pressure(feet_to_metres(navy_altitude["altitude_ft"]))
    assert sea_level_equivalent_depth(60.0, p_alt) == pytest.approx(72.1, abs=0.05)
    assert altitude_stop_depth(20.0, p_alt) == pytest.approx(16.6, abs=0.05)


def test_altitude_correction_round_trip():
    d = np.array([0.0, 20.0, 60.0, 130.0])
    p_alt = altitude_pressure(2000.0)
    back = altitude_stop_depth(sea_level_equivalent_depth(d, p_alt), p_alt)
    np.testing.assert_allclose(back, d, rtol=1e-12)
    assert np.all(np.asarray(sea_level_equivalent_depth(d[1:], p_alt)) > d[1:])


# ------------------------------------------------------------------ analytic and round trips


@pytest.mark.parametrize("unit", ["fsw", "msw", "ft", "m"])
@pytest.mark.parametrize("water", ["salt", "fresh"])
def test_depth_pressure_round_trip_and_zero(unit, water):
    d = np.array([0.0, 3.0, 33.0, 190.0])
    p = depth_to_pressure(d, unit, 0.9, water)
    assert p[0] == 0.9
    np.testing.assert_allclose(pressure_to_depth(p, unit, 0.9, water), d, atol=1e-12)


def test_fresh_water_is_deeper_for_the_same_pressure():
    assert pressure_to_depth(2.0, "m", water="fresh") > pressure_to_depth(2.0, "m", water="salt")
    assert bar_per_depth_unit("fsw", "fresh") == bar_per_depth_unit("fsw", "salt")


def test_convert_depth_between_pressure_units():
    """33 fsw = 1 atm = 10.1325 msw (both definitions above)."""
    assert convert_depth(33.0, "fsw", "msw") == pytest.approx(10.1325, rel=1e-12)
    assert convert_depth(10.1325, "msw", "fsw") == pytest.approx(33.0, rel=1e-12)
    ft = convert_depth(10.0, "m", "ft", water="fresh")
    assert ft == pytest.approx(metres_to_feet(10.0), rel=1e-12)


def test_gauge_and_absolute_are_inverse():
    g = np.array([0.0, 1.0, 200.0])
    a = gauge_to_absolute(g, 0.85)
    np.testing.assert_allclose(a, g + 0.85)
    np.testing.assert_allclose(absolute_to_gauge(a, 0.85), g)


def test_pressure_ratio_is_ata_in_fsw():
    """(D + 33) / 33: the Navy consumption factor (Rev 4 ChA p. 7-14, OLDER-EDITION)."""
    d = np.array([0.0, 33.0, 95.0, 190.0])
    np.testing.assert_allclose(pressure_ratio(d, "fsw"), (d + 33.0) / 33.0, rtol=1e-12)


def test_rounding_is_safe_for_float_noise():
    assert round_up(33 * (0.16 / 0.12 - 1), 1.0) == 11.0
    assert round_up(19.8, 1.0) == 20.0
    assert round_down(95.33, 1.0) == 95.0
    assert round_down(3 * 0.1 / 0.1 * 10, 10.0) == 30.0
    np.testing.assert_array_equal(round_up([0.0, 2.01, 3.0], 3.0), [0.0, 3.0, 3.0])


# --------------------------------------------------------------------------- vector equals scalar


@pytest.mark.parametrize(
    "func",
    [
        lambda x: depth_to_pressure(x, "fsw"),
        lambda x: depth_to_pressure(x, "m", 0.8, "fresh"),
        lambda x: pressure_to_depth(x + 1.0, "msw"),
        lambda x: convert_pressure(x, "psi", "bar"),
        lambda x: convert_depth(x, "ft", "msw"),
        lambda x: altitude_pressure(x * 10.0),
        lambda x: sea_level_equivalent_depth(x, 0.8),
        lambda x: altitude_stop_depth(x, 0.8),
        lambda x: pressure_ratio(x, "msw"),
        lambda x: feet_to_metres(x),
    ],
)
def test_vector_equals_scalar(func):
    xs = np.array([0.0, 1.5, 10.0, 60.0, 190.0])
    vec = np.asarray(func(xs))
    assert vec.shape == xs.shape
    for x, v in zip(xs, vec, strict=True):
        s = func(float(x))
        assert isinstance(s, float)
        assert s == pytest.approx(float(v), rel=1e-14)


# --------------------------------------------------------------------------- bad input


@pytest.mark.parametrize(
    ("call", "field"),
    [
        (lambda: depth_to_pressure(-1.0, "fsw"), "depth"),
        (lambda: depth_to_pressure("ten", "fsw"), "depth"),
        (lambda: depth_to_pressure(math.nan, "msw"), "depth"),
        (lambda: depth_to_pressure([1.0, math.inf], "msw"), "depth"),
        (lambda: depth_to_pressure(10.0, "fathoms"), "unit"),
        (lambda: depth_to_pressure(10.0, "m", water="brackish"), "water"),
        (lambda: depth_to_pressure(10.0, "m", p_surface_bar=0.0), "p_surface_bar"),
        (lambda: pressure_to_depth(-0.5, "msw"), "p_abs_bar"),
        (lambda: convert_pressure(1.0, "bar", "torr"), "to_unit"),
        (lambda: convert_pressure(None, "bar", "psi"), "pressure"),
        (lambda: convert_depth(1.0, "yards", "m"), "from_unit"),
        (lambda: altitude_pressure(12000.0), "altitude"),
        (lambda: sea_level_equivalent_depth(60.0, 2.0), "p_surface_bar"),
        (lambda: bar_per_fsw("metric"), "fsw_convention"),
        (lambda: round_up(1.0, 0.0), "step"),
    ],
)
def test_bad_input_raises_input_error_naming_the_field(call, field):
    with pytest.raises(InputError) as info:
        call()
    assert info.value.field == field
    assert "\n" not in str(info.value)
    assert "expected" in str(info.value)
