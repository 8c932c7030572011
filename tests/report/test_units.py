"""One unit system per checklist (supervisor.report.units)."""

from __future__ import annotations

import pytest

from supervisor.report.formatting import MISSING
from supervisor.report.units import L_PER_FT3, UnitSystem, fmt_wait, unit_system

MSW, FSW = UnitSystem("msw"), UnitSystem("fsw")


def test_litres_per_cubic_foot_vs_the_international_foot() -> None:
    """1 ft = 0.3048 m exactly (international yard and pound agreement, 1959).

    So 1 ft3 = 0.3048**3 m3 = 28.316846592 L.
    """
    assert L_PER_FT3 == pytest.approx(28.316846592, rel=1e-12)


@pytest.mark.parametrize(
    ("units", "litres", "expected"),
    [(MSW, 10750, "10750 L"), (FSW, 10750, "380 scf"), (FSW, 28.316846592, "1 scf"),
     (FSW, None, MISSING), (MSW, float("nan"), MISSING)],
)
def test_free_gas(units: UnitSystem, litres: object, expected: str) -> None:
    assert units.gas(litres) == expected


def test_flow() -> None:
    assert MSW.flow(700) == "700 L/min"
    assert FSW.flow(700) == "24.7 scfm"  # 700 / 28.3168


@pytest.mark.parametrize(
    ("units", "value", "unit", "expected"),
    # 1 psi = 0.0689475729 bar (NIST SP 811): 2901 psig = 200.0 bar, 200 bar = 2901 psig
    [(MSW, 2901, "psig", "200 bar"), (FSW, 2901, "psig", "2901 psig"),
     (FSW, 200, "bar", "2901 psig"), (MSW, 12, "bar", "12 bar"), (MSW, 90, "psig", "6.2 bar")],
)
def test_gauge(units: UnitSystem, value: float, unit: str, expected: str) -> None:
    assert units.gauge(value, unit) == expected


def test_site_length_and_temperature() -> None:
    assert MSW.length(1.5) == "1.5 m" and FSW.length(1.5) == "5 ft (1.5 m)"
    # degrees Fahrenheit = degrees Celsius x 9/5 + 32 (definition)
    assert MSW.temperature(13) == "13 °C" and FSW.temperature(13) == "55 °F (13 °C)"
    assert FSW.temperature(None) == MISSING


def test_by_key_follows_the_json_suffix() -> None:
    assert MSW.by_key("need_l", 5252) == ("L", "5252 L")
    assert FSW.by_key("need_l", 5252) == ("scf", "185 scf")
    assert MSW.by_key("mmp_psig", 108) == ("bar", "7.4 bar")
    assert MSW.by_key("bailout_required_psig_rounded", 1400) == ("bar", "96.5 bar")
    assert FSW.by_key("peak_flow_lpm", 173.2) == ("scfm", "6.1 scfm")
    assert MSW.by_key("people", 2) is None


def test_unit_system_of_a_record() -> None:
    assert unit_system({"unit": "fsw"}).imperial
    assert not unit_system({"unit": "msw"}).imperial
    assert unit_system({}).depth == "msw"


@pytest.mark.parametrize(("minutes", "expected"),
                         [(1080, "18 h 00 min"), (719.2, "12 h 00 min"), (61, "1 h 01 min"),
                          (None, MISSING), (float("inf"), MISSING)])
def test_waits_round_up(minutes: object, expected: str) -> None:
    assert fmt_wait(minutes) == expected


@pytest.mark.parametrize(
    ("units", "value", "unit", "expected"),
    # depth by pressure: 130 fsw x (1.01325/33) bar/fsw / 0.1 bar/msw = 39.9 msw
    [(MSW, 130, "fsw", "39.9 msw (130 fsw)"), (FSW, 58.3, "msw", "189.9 fsw (58.3 msw)"),
     (MSW, 174, "psig", "12 bar (174 psig)"), (FSW, 12, "bar", "174 psig (12 bar)"),
     (FSW, 10503, "L", "371 scf (10503 L)"), (MSW, 371, "scf", "10506 L (371 scf)"),
     (MSW, 12, "msw", "12 msw"), (FSW, 1.4, "atm", "1.4 atm"), (MSW, "FROM MEMORY", None,
                                                              "FROM MEMORY")],
)
def test_finding_figures_in_the_plans_system(units: UnitSystem, value: object, unit: str | None,
                                              expected: str) -> None:
    assert units.quantity(value, unit) == expected
