"""Breathing-gas rules: a passing and a failing plan for every rule.

Outside values: hypoxia below 0.16 ata (U.S. Navy Diving Manual Rev 4 Change A
ch. 15, OLDER-EDITION); MOD(fsw) = 33 (PO2 / FO2 - 1) with PO2 in atm
(gas-and-pressure notes §4.2, SECONDARY); END(ft) = (D + 33)(1 - FHe) - 33, oxygen
narcotic (NOAA convention, SECONDARY); air density at 15 degC and 1.01325 bar +
d/10 bar: 6.07 g/L at 40 m and 7.29 g/L at 50 m (CoolProp ``PropsSI('D', ...)``,
LIBRARY, gas-and-pressure notes §4.5); the 5.2 / 6.2 g/L thresholds after
Anthony and Mitchell (2016), FROM MEMORY.
"""

from __future__ import annotations

import pytest
from _engine_plans import data, msw, no_bad, only, run

from supervisor import constants as C
from supervisor.rules.gas import ANTHONY_MITCHELL, END_DEFAULT, FAMILY, NAVY_HYPOXIA


def test_hypoxic_pass_needs_review():
    f = only(run(data(), FAMILY, "gas-hypoxic"), "pass")
    assert f.measured == pytest.approx(0.21 * C.P_ATM_BAR, abs=1e-3) and not f.verified


def test_hypoxic_gas_at_the_surface_warns():
    d = data(mode="surface-supplied-heliox", gas="10/90", max_depth=200, bottom_time_min=20,
             decompression="in-water", stops=[{"depth": 50, "minutes": 5, "gas": "air"}])
    f = only(run(d, FAMILY, "gas-hypoxic"), "warn")
    assert f.rule == "gas-hypoxic"
    assert f.measured == pytest.approx(0.10 * C.P_ATM_BAR, abs=1e-3)
    assert f.limit == pytest.approx(0.16 * C.P_ATM_BAR, abs=1e-3)  # 0.16 ata
    assert f.citation == NAVY_HYPOXIA and f.source_status == "OLDER-EDITION"


def test_mod_pass():
    no_bad(run(data(), FAMILY, "gas-mod"))


def test_mod_fail():
    d = data(mode="surface-supplied-nitrox", gas="40/0", max_depth=100, bottom_time_min=20)
    f = only(run(d, FAMILY, "gas-mod"), "fail")
    assert f.rule == "gas-mod" and f.measured == 100
    # 1.4 bar = 1.3817 atm; 33 (1.3817 / 0.40 - 1) = 81.0 fsw
    assert f.limit == pytest.approx(33 * (1.4 / C.P_ATM_BAR / 0.40 - 1), abs=0.1)
    assert "policy.po2_bottom_max" in f.citation


def test_mod_of_a_stop_gas_fails():
    d = data(bottom_time_min=50, decompression="in-water-oxygen",
             stops=[{"depth": 30, "minutes": 10, "gas": "oxygen"}])
    f = only(run(d, FAMILY, "gas-mod"), "fail")
    assert f.measured == 30
    assert f.limit == pytest.approx(33 * (1.6 / C.P_ATM_BAR - 1), abs=0.1)  # oxygen at 1.6 bar


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


def test_density_above_preferred_warns_vs_coolprop():
    f = only(run(_dense(40), FAMILY, "gas-density"), "warn")
    assert f.rule == "gas-density"
    assert f.measured == pytest.approx(6.07, rel=0.01)  # CoolProp, air 40 m 15 degC
    assert f.limit == 5.2 and f.citation.startswith(ANTHONY_MITCHELL)
    assert "FROM MEMORY" in f.citation


def test_density_above_maximum_warns_on_default_thresholds():
    f = only(run(_dense(50), FAMILY, "gas-density"), "warn")
    assert f.measured == pytest.approx(7.29, rel=0.01)  # CoolProp, air 50 m 15 degC
    assert f.limit == 6.2


def test_density_policy_limit_fails():
    f = only(run(_dense(50, density_fail_g_per_l=6.2), FAMILY, "gas-density"), "fail")
    assert f.measured == pytest.approx(7.29, rel=0.01) and f.limit == 6.2
    assert f.citation.startswith("contractor policy")
