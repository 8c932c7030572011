"""Trade rules of thumb about pressure and depth, each marked "common practice, no source".

These are the figures a diver is taught first.  They hold only approximately in this
package's conventions (33 fsw per atm, 0.1 bar per msw, 1025 kg/m^3 for metres of
salt water, surface at 1.01325 bar), so each check states its tolerance.
"""

from __future__ import annotations

import pytest

from supervisor import constants as C
from supervisor.units import depth_to_pressure, pressure_ratio

UNITS = ["msw", "m"]


@pytest.mark.parametrize("unit", UNITS)
def test_10_m_of_sea_water_doubles_the_surface_pressure(unit):
    """Common practice, no source.  1.987 (msw) / 1.992 (m) times: within 1.5 %."""
    assert depth_to_pressure(10.0, unit) / C.P_ATM_BAR == pytest.approx(2.0, rel=0.015)


@pytest.mark.parametrize("unit", UNITS)
def test_20_m_of_sea_water_triples_the_surface_pressure(unit):
    """Common practice, no source.  2.97 (msw) / 2.98 (m) times: within 1.5 %."""
    assert depth_to_pressure(20.0, unit) / C.P_ATM_BAR == pytest.approx(3.0, rel=0.015)


@pytest.mark.parametrize("unit", UNITS)
def test_90_m_is_about_10_bar_absolute(unit):
    """Common practice, no source.  10.01 (msw) / 10.06 (m) bar: within 1.5 %."""
    assert depth_to_pressure(90.0, unit) == pytest.approx(10.0, rel=0.015)


def test_33_ft_of_sea_water_doubles_the_surface_pressure():
    """Common practice, no source (the imperial form of the 10 m rule)."""
    assert pressure_ratio(33.0, "fsw") == pytest.approx(2.0, rel=1e-12)


@pytest.mark.parametrize("unit", UNITS)
def test_the_largest_pressure_ratio_is_nearest_the_surface(unit):
    """Common practice, no source: 10 m to the surface halves the pressure (2:1), while
    20 m to 10 m only takes it by 3:2, so volume change per metre is greatest near the
    surface."""
    p0, p10, p20 = (depth_to_pressure(d, unit) for d in (0.0, 10.0, 20.0))
    shallow, deeper = p10 / p0, p20 / p10
    assert shallow == pytest.approx(2.0, rel=0.015)
    assert deeper == pytest.approx(1.5, rel=0.015)
    assert shallow > deeper
