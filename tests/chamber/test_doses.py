"""The patient's dose on a treatment.

Outside values: ``tests/data/treatment_navy_tables.toml`` (DERIVED from the U.S. Navy
step times, which are FROM MEMORY): the UPTD formula with PO2 = 1 + depth/33 atm and
the travel legs integrated exactly.  The figures are rounded to whole OTU there, so
atol = 1 OTU.  The often-quoted ~645 OTU for an unextended Table 6 is FROM MEMORY.
"""

from __future__ import annotations

import pytest

from supervisor.chamber.catalogue import load_treatment
from supervisor.chamber.doses import CNS_RULE, chamber_profile, patient_dose
from supervisor.chamber.timeline import build_timeline
from supervisor.engine.oxygen import otu_rate
from tests.chamber._navy import navy


@pytest.mark.parametrize(("number", "ext", "key"), [
    ("5", {}, "oxygen_otu_exact"), ("5", {"oxygen": 2}, "extended_oxygen_otu_exact"),
    ("6", {}, "oxygen_otu_exact"), ("6", {"oxygen": 2, "air": 2}, "extended_oxygen_otu_exact"),
    ("9", {}, "oxygen_otu_exact")])
def test_patient_oxygen_otu_vs_derived_navy_figures(number, ext, key):
    d = patient_dose(build_timeline(load_treatment(number), "10:00", ext))
    assert d.otu_oxygen == pytest.approx(navy()[number][key], abs=1.0)
    # air at 60 fsw (PO2 0.59 atm) adds a little; at 45 fsw (0.48 atm) nothing
    assert d.otu >= d.otu_oxygen


def test_table6a_deep_air_and_oxygen_vs_derived_figure():
    d = patient_dose(build_timeline(load_treatment("6A"), "10:00"))
    deep_air = sum(d.line_otu[:2])  # 165 fsw and 165 -> 60 fsw on air
    assert d.otu_oxygen + deep_air == pytest.approx(
        navy()["6A"]["deep_air_and_oxygen_otu_exact"], abs=1.0)


def test_table6_cross_check_against_the_often_quoted_645():
    d = patient_dose(build_timeline(load_treatment("6"), "10:00"))
    cc = d.cross_check
    assert cc is not None and cc["quoted_otu"] == 645 and cc["status"] == "FROM MEMORY"
    assert abs(cc["difference_percent"]) < 1.0
    # no cross-check for an extended table: the quoted figure is for the table as printed
    assert patient_dose(build_timeline(load_treatment("6"), "10:00", {"air": 1})).cross_check \
        is None


def test_otu_of_a_hold_is_rate_times_minutes():
    # one 20-min oxygen period at 60 fsw: 20 x ((1 + 60/33 - 0.5)/0.5)^0.833 (the formula)
    d = patient_dose(build_timeline(load_treatment("6"), "10:00"))
    assert d.line_otu[1] == pytest.approx(20 * otu_rate(1 + 60 / 33), rel=1e-9)


def test_cns_is_never_an_in_water_percentage():
    j = patient_dose(build_timeline(load_treatment("6"), "10:00")).to_json()
    cns = j["cns"]
    assert cns["in_water_percent"] is None
    assert "1.6 atm" in cns["in_water_percent_reason"] and cns["rule"] == CNS_RULE
    # minutes above the NOAA table's highest row (1.6 atm): the oxygen deeper than ~20 fsw
    assert 200 < cns["minutes_above_in_water_table"] < 240
    assert [p["minutes"] for p in cns["oxygen_periods"]] == [20, 20, 20, 30, 60, 90]
    assert j["max_po2_atm"] == pytest.approx(1 + 60 / 33, abs=2e-3)


def test_altitude_lowers_the_po2():
    tl = build_timeline(load_treatment("6"), "10:00")
    low = patient_dose(tl, p_surface_bar=0.8)
    assert low.max_po2_atm < patient_dose(tl).max_po2_atm
    assert chamber_profile(tl, 0.8).p_surface_bar == 0.8
