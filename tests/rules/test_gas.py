"""Breathing-gas rules: a passing and a failing plan for every rule.

Outside values: hypoxia below 0.16 ata (U.S. Navy Diving Manual Rev 4 Change A
ch. 15, OLDER-EDITION); MOD(fsw) = 33 (PO2 / FO2 - 1) with PO2 in atm (the common
diving formula, as in the encyclopedia article "Maximum operating depth",
SECONDARY); END(ft) = (D + 33)(1 - FHe) - 33, oxygen narcotic (NOAA convention,
SECONDARY); air density at 15 degC and 1.01325 bar + d/10 bar: 6.07 g/L at 40 m
and 7.29 g/L at 50 m (CoolProp
``PropsSI('D', 'T', 288.15, 'P', (1.01325 + d / 10) * 1e5, 'Air')``, LIBRARY);
the 5.2 / 6.2 g/L thresholds after Anthony and Mitchell (2016), FROM MEMORY; the
rise of CO2 retention above about 6 g/L (DAN Alert Diver, "Performance Under
Pressure"), SECONDARY.
"""

from __future__ import annotations

import pytest
from _engine_plans import data, msw, no_bad, only, run

from supervisor.rules.gas import (
    ANTHONY_MITCHELL,
    DAN_DENSITY,
    DENSITY_DEFAULT_STATUS,
    DENSITY_POLICY,
    END_DEFAULT,
    FAMILY,
    HYPOXIA_POLICY,
    NAVY_HYPOXIA,
)


def test_hypoxic_pass():
    """Air at the sea-level surface: 0.21 ata (Dalton), above the 0.16 ata minimum."""
    f = only(run(data(), FAMILY, "gas-hypoxic"), "pass")
    assert f.measured == pytest.approx(0.21, abs=1e-3) and f.unit == "ata"
    assert f.limit == 0.16 and f.citation == HYPOXIA_POLICY


@pytest.mark.parametrize("gas", ["10/90", "2/98"])
def test_hypoxic_gas_at_the_surface_fails(gas):
    """Heliox 10/90 or 2/98 breathed from the surface: 0.10 / 0.02 ata (Dalton's law at
    1 atm), below the 0.16 ata under which hypoxia results (U.S. Navy Diving Manual Rev 4
    Change A ch. 15, OLDER-EDITION): physics that kills fails on the default."""
    d = data(mode="surface-supplied-heliox", gas=gas, max_depth=200, bottom_time_min=20,
             decompression="in-water", stops=[{"depth": 50, "minutes": 5, "gas": "air"}])
    f = only(run(d, FAMILY, "gas-hypoxic"), "fail")
    assert f.rule == "gas-hypoxic" and f.verified
    assert f.measured == pytest.approx(int(gas.split("/")[0]) / 100, abs=1e-3)
    assert f.limit == pytest.approx(0.16, abs=1e-9)  # 0.16 ata
    assert f.citation == HYPOXIA_POLICY and NAVY_HYPOXIA in f.message


def test_hypoxic_policy_minimum_is_the_contractors():
    """A contractor minimum of 0.18 ata fails 16/84 at the surface (0.16 ata, Dalton)."""
    d = data(mode="surface-supplied-heliox", gas="16/84", max_depth=150, bottom_time_min=15,
             decompression="in-water", stops=[{"depth": 20, "minutes": 10}])
    only(run(d, FAMILY, "gas-hypoxic"), "pass")
    d["policy"]["po2_min_ata"] = 0.18
    f = only(run(d, FAMILY, "gas-hypoxic"), "fail")
    assert f.limit == 0.18 and "the contractor's own" in f.message


def test_air_at_altitude_is_not_called_hypoxic():
    """At 3000 m (ICAO standard atmosphere, 0.701 bar) air gives 0.145 ata: the site's own
    air, which the diver breathes on deck, is not a hypoxic breathing gas."""
    d = data()
    d["site"]["altitude_m"] = 3000
    f = only(run(d, FAMILY, "gas-hypoxic"), "pass")
    assert f.measured == pytest.approx(0.21 * 0.7012 / 1.01325, abs=2e-3)
    assert "site's own air" in f.message


def test_hypoxia_constant_has_its_unit_and_source():
    from supervisor.gas import HYPOXIC_PO2_MIN_ATA
    from supervisor.plan import Policy

    assert HYPOXIC_PO2_MIN_ATA == 0.16 == Policy().po2_min_ata


def test_mod_pass():
    no_bad(run(data(), FAMILY, "gas-mod"))


def test_mod_fail():
    """Nitrox 40 at 100 fsw: 0.40 x 133/33 = 1.61 ata, beyond the 1.6 ata in-water limit
    that the bottom default fails at: MOD 33 (1.6 / 0.40 - 1) = 99 fsw (MOD formula)."""
    d = data(mode="surface-supplied-nitrox", gas="40/0", max_depth=102, bottom_time_min=20)
    f = only(run(d, FAMILY, "gas-mod"), "fail")
    assert f.rule == "gas-mod" and f.measured == 102
    assert f.limit == pytest.approx(33 * (1.6 / 0.40 - 1), abs=0.3)
    assert "policy.po2_bottom_max_ata" in f.citation


def test_mod_beyond_the_bottom_default_warns():
    """Nitrox 36 at 100 fsw: beyond its MOD at the 1.4 ata default, 33 (1.4 / 0.36 - 1) =
    95.3 fsw (MOD formula; the encyclopedia example 36 % at 1.4 -> 95.3 fsw): a default
    nobody chose warns; the contractor's own 1.4 ata fails."""
    d = data(mode="surface-supplied-nitrox", gas="36/0", max_depth=100, bottom_time_min=20)
    f = only(run(d, FAMILY, "gas-mod"), "warn")
    assert f.limit == pytest.approx(95.3, abs=0.3) and not f.verified
    d["policy"]["po2_bottom_max_ata"] = 1.4
    f = only(run(d, FAMILY, "gas-mod"), "fail")
    assert f.limit == pytest.approx(95.3, abs=0.3)


def test_mod_of_a_stop_gas_fails():
    """Oxygen at 30 fsw in the water: beyond its MOD at 1.6 ata, 33 (1.6 - 1) = 19.8 fsw."""
    d = data(bottom_time_min=50, decompression="in-water-oxygen",
             stops=[{"depth": 30, "minutes": 10, "gas": "oxygen"}])
    f = only(run(d, FAMILY, "gas-mod"), "fail")
    assert f.measured == 30
    assert f.limit == pytest.approx(33 * (1.6 - 1), abs=0.2)


def test_mod_of_oxygen_at_20_fsw_passes():
    """Oxygen at 20 fsw (1.606 ata) is within the 1.6 ata limit plus 0.01 atm tolerance."""
    d = data(bottom_time_min=50, decompression="in-water-oxygen",
             stops=[{"depth": 20, "minutes": 10, "gas": "oxygen"}])
    no_bad(run(d, FAMILY, "gas-mod"))


def test_end_pass_default_needs_review():
    f = only(run(data(), FAMILY, "gas-end"), "pass")
    assert f.measured == 60 and not f.verified and f.citation == END_DEFAULT


def test_end_of_heliox_vs_formula():
    d = data(mode="surface-supplied-heliox", gas="16/84", max_depth=190, bottom_time_min=15,
             decompression="in-water", stops=[{"depth": 20, "minutes": 10}])
    f = only(run(d, FAMILY, "gas-end"), "pass")
    # oxygen narcotic: (190 + 33)(1 - 0.84) - 33 = 2.7 fsw
    assert f.measured == pytest.approx((190 + 33) * (1 - 0.84) - 33, abs=0.1)


def test_end_policy_fail():
    d = data()
    d["policy"]["end_max"] = 50
    f = only(run(d, FAMILY, "gas-end"), "fail")
    assert f.rule == "gas-end" and (f.measured, f.limit) == (60, 50)
    assert "policy.end_max" in f.citation


def test_end_default_ceiling_warns():
    d = data(max_depth=110, bottom_time_min=20, decompression="in-water",
             stops=[{"depth": 10, "minutes": 10}])
    f = only(run(d, FAMILY, "gas-end"), "warn")
    # air: (110 + 33)(1 - 0) - 33 = 110 fsw
    assert f.measured == pytest.approx((110 + 33) * (1 - 0.0) - 33, abs=0.1)
    assert f.limit == 100 and f.citation == END_DEFAULT and f.source_status == "SECONDARY"


def _dense(depth_m, **policy):
    d = msw(max_depth=depth_m, bottom_time_min=15, decompression="in-water",
            stops=[{"depth": 3, "minutes": 10}])
    d["site"]["water_temperature_c"] = 15
    d["policy"].update(policy)
    return d


def test_density_pass_needs_review():
    f = only(run(data(), FAMILY, "gas-density"), "pass")
    assert not f.verified and f.limit == 5.2
    assert "needs review: set the contractor's own density limits" in f.message
    assert f.source_status == DENSITY_DEFAULT_STATUS == "FROM MEMORY"


def test_density_above_preferred_warns_vs_coolprop():
    f = only(run(_dense(40), FAMILY, "gas-density"), "warn")
    assert f.rule == "gas-density"
    assert f.measured == pytest.approx(6.07, rel=0.01)  # CoolProp, air 40 m 15 degC
    # 5.2 g/L preferred maximum: Anthony & Mitchell (2016), FROM MEMORY
    assert f.limit == 5.2 and f.citation.startswith(DENSITY_POLICY)
    assert ANTHONY_MITCHELL in f.citation and "FROM MEMORY" in f.citation
    assert "policy.density_warn_g_per_l" in f.message


def test_density_above_the_default_maximum_only_warns():
    """Air at 50 m: 7.29 g/L (CoolProp), above the 6.2 g/L default maximum (Anthony &
    Mitchell 2016, FROM MEMORY; the inflection near 6 g/L from UK test data reported by
    DAN Alert Diver, SECONDARY): a default nobody chose warns, it does not fail."""
    f = only(run(_dense(50), FAMILY, "gas-density"), "warn")
    assert f.measured == pytest.approx(7.29, rel=0.01)  # CoolProp, air 50 m 15 degC
    assert f.limit == 6.2 and not f.verified
    assert f.source_status == "FROM MEMORY"
    assert "policy.density_fail_g_per_l: default after Anthony & Mitchell 2016, FROM MEMORY" \
        in f.message
    assert "set policy.density_fail_g_per_l" in f.message
    assert "6 g/L is SECONDARY" in f.message
    assert DAN_DENSITY in f.citation and "SECONDARY" in f.citation


def test_density_policy_limit_fails():
    f = only(run(_dense(50, density_fail_g_per_l=6.2), FAMILY, "gas-density"), "fail")
    assert f.measured == pytest.approx(7.29, rel=0.01) and f.limit == 6.2
    assert f.citation == DENSITY_POLICY and f.source_status is None
    assert "the contractor's own" in f.message


def test_density_own_higher_limit_warns_at_the_default_warning():
    # the contractor allows 8 g/L; 7.29 g/L (CoolProp, 50 m) is then only above 5.2 g/L
    f = only(run(_dense(50, density_fail_g_per_l=8), FAMILY, "gas-density"), "warn")
    assert f.limit == 5.2 and f.source_status == "FROM MEMORY"


def test_density_own_thresholds_pass_verified():
    f = only(run(_own(data()), FAMILY, "gas-density"), "pass")
    assert f.verified and f.source_status is None and f.citation == DENSITY_POLICY


def _own(d):
    d["policy"].update(density_warn_g_per_l=5.0, density_fail_g_per_l=6.0)
    return d


def test_density_without_water_temperature_needs_review():
    d = _own(data())
    del d["site"]["water_temperature_c"]
    f = only(run(d, FAMILY, "gas-density"), "pass")
    assert not f.verified and "15 degC assumed" in f.message
    assert "state the water temperature" in f.message


def test_density_fails_in_the_nonconforming_example():
    from pathlib import Path

    from supervisor.plan import load_plan
    from supervisor.rules.base import CheckContext

    root = Path(__file__).resolve().parents[2]
    ctx = CheckContext(load_plan(root / "examples" / "nonconforming-job.toml"))
    f = only(FAMILY.get("gas-density").run(ctx), "fail")
    assert f.measured == pytest.approx(6.53, abs=0.01) and f.limit == 6.2


def test_a_legal_uscg_air_dive_fails_no_gas_or_oxygen_default():
    """Surface-supplied air to 220 fsw for 30 min, which 46 CFR 197.432 allows (air to
    220 fsw with a bottom time of 30 min or less; regulation text, VERIFIED), does not
    fail on a default: PO2 1.61 ata (within 1.6 + 0.01),
    density about 10 g/L, END 220 fsw only warn.  Stops from the project's model (its
    own schedule, not an outside value)."""
    from supervisor.rules import oxygen

    stops = [{"depth": dd, "minutes": mm} for dd, mm in
             ((120, 1), (100, 1), (90, 3), (80, 2), (70, 4), (60, 6), (50, 8), (40, 13),
              (30, 20))]
    stops += [{"depth": 20, "minutes": 13, "gas": "oxygen"},
              {"depth": 10, "minutes": 25, "gas": "oxygen"}]
    d = data(max_depth=220, bottom_time_min=30, decompression="in-water-oxygen", stops=stops)
    d["job"]["jurisdiction"] = "uscg-46-197-b"
    got = []
    for fam in (FAMILY, oxygen.FAMILY):
        for rule in fam.rules:
            got += run(d, fam, rule.name)
    assert not [(f.rule, f.message) for f in got if f.severity == "fail"]
    warned = {f.rule for f in got if f.severity == "warn"}
    assert {"gas-density", "gas-end", "oxygen-po2-bottom"} <= warned


def test_end_is_the_contractors_fail_limit_in_the_plan_unit():
    """policy.end_max in msw fails when stated (30 msw of air = 30 msw END, oxygen narcotic);
    absent, the 30 msw default warns."""
    d = msw(max_depth=33, bottom_time_min=15, decompression="in-water",
            stops=[{"depth": 3, "minutes": 10}])
    f = only(run(d, FAMILY, "gas-end"), "warn")
    assert f.limit == 30 and f.unit == "msw"
    d["policy"]["end_max"] = 30
    f = only(run(d, FAMILY, "gas-end"), "fail")
    assert f.limit == 30 and f.unit == "msw"
