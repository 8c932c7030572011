"""Gas-supply rules: a passing and a failing plan for every rule.

Outside values (U.S. Navy Diving Manual Rev 4 Change A ch. 8, pp. 8-2 to 8-5,
OLDER-EDITION): demand flow 1.4 acfm per diver; free gas =
(D + 33) / 33 x acfm x minutes; minimum manifold pressure = 0.445 D (rounded up) +
90 psig over bottom for 0-60 fsw, so 117 psig at 60 fsw; the EGS charge Vr / FV x
14.7 + Pm.  Methods from an older edition: a shortfall warns.
"""

from __future__ import annotations

import pytest
from _engine_plans import data, no_bad, only, run

from supervisor import analysis as an
from supervisor import constants as C
from supervisor.rules.supply import CFR_340, FAMILY, NAVY_CH8

# An fsw plan states gas in scf, scfm and psig (issue 8: one unit system per plan).
PEAK_60 = 2 * 1.4 * (60 + 33) / 33  # diver + standby at 60 fsw, 1.4 acfm each [scfm]


def scf(litres: float) -> float:
    """Free litres in scf (1 ft³ = 28.316846592 L, NIST SP 811)."""
    return litres / an.L_PER_FT3


def _o2_dive(**kw):
    d = data(bottom_time_min=50, decompression="in-water-oxygen",
             stops=[{"depth": 20, "minutes": 10, "gas": "oxygen"}])
    d["gas_supply"]["oxygen_decompression"].update(kw)
    return d


def test_primary_compressor_pass():
    f = only(run(data(), FAMILY, "supply-primary"), "pass")
    assert f.limit == pytest.approx(PEAK_60, abs=0.1) and not f.verified


def test_primary_compressor_short_warns():
    d = data()
    d["gas_supply"]["primary"]["delivery_lpm"] = 150
    f = only(run(d, FAMILY, "supply-primary"), "warn")
    assert f.rule == "supply-primary"
    assert (f.measured, f.unit) == (pytest.approx(scf(150), abs=0.05), "scfm")
    assert f.limit == pytest.approx(PEAK_60, abs=0.1)  # Navy flow x ata, two divers
    assert CFR_340 in f.citation and NAVY_CH8 in f.citation


def _bank(volume_l, bar):
    d = data()
    d["gas_supply"]["primary"] = {"kind": "hp-bank", "gas": "air", "water_volume_l": volume_l,
                                  "pressure_bar": bar}
    return d


def test_primary_bank_pass_and_short():
    only(run(_bank(200, 200), FAMILY, "supply-primary"), "pass")
    f = only(run(_bank(10, 50), FAMILY, "supply-primary"), "warn")
    mmp_bar = 117 * C.BAR_PER_PSI
    # (50 - MMP) bar x 10 L / 1 atm of free gas, Boyle (Navy Va formula)
    assert f.measured == pytest.approx(scf((50 - mmp_bar) * 10 / C.P_ATM_BAR), abs=0.05)
    assert f.unit == "scf" and f.measured < f.limit


def test_secondary_pass_and_short():
    only(run(data(), FAMILY, "supply-secondary"), "pass")
    d = data()
    d["gas_supply"]["secondary"].update(water_volume_l=1, pressure_bar=10)
    f = only(run(d, FAMILY, "supply-secondary"), "warn")
    assert f.rule == "supply-secondary" and f.measured < f.limit
    assert f.measured == pytest.approx(scf((10 - 117 * C.BAR_PER_PSI) * 1 / C.P_ATM_BAR),
                                       abs=0.05)
    assert CFR_340 in f.citation


def test_secondary_absent_is_information():
    d = data()
    del d["gas_supply"]["secondary"]
    only(run(d, FAMILY, "supply-secondary"), "info")


def test_over_bottom_pass_for_bank():
    got = run(_bank(200, 200), FAMILY, "supply-over-bottom")
    no_bad(got)
    assert [f.limit for f in got] == [117, 117]  # 60 x 0.445 = 26.7 -> 27, + 90 psig (p. 8-4)


def test_over_bottom_bank_below_mmp_warns():
    f = only(run(_bank(200, 5), FAMILY, "supply-over-bottom"), "warn")  # primary only
    assert f.rule == "supply-over-bottom"
    assert f.measured == pytest.approx(5 / C.BAR_PER_PSI, abs=0.5) and f.limit == 117
    assert f.citation.startswith(NAVY_CH8)


def test_over_bottom_compressor_needs_review():
    f = [x for x in run(data(), FAMILY, "supply-over-bottom") if x.severity == "warn"]
    assert len(f) == 1 and "delivery pressure" in f[0].message
    assert "gas_supply.primary.delivery_pressure_bar" in f[0].message and not f[0].verified


def _compressor(**kw):
    d = data()
    d["gas_supply"]["primary"].update(kw)
    return run(d, FAMILY, "supply-over-bottom")


def test_over_bottom_compressor_delivery_pressure_pass():
    got = _compressor(delivery_pressure_bar=10)
    no_bad(got)
    f = got[0]
    # 10 bar = 145 psig against 117 psig (60 x 0.445 = 26.7 -> 27, + 90 psig, p. 8-4)
    assert (f.measured, f.limit) == (pytest.approx(10 / C.BAR_PER_PSI, abs=0.5), 117)
    assert "delivery_pressure_bar" in f.message and not f.verified


def test_over_bottom_compressor_below_mmp_warns():
    f = only(_compressor(delivery_pressure_bar=7), "warn")  # 101.5 psig < 117 psig
    assert f.rule == "supply-over-bottom" and f.limit == 117
    assert f.measured == pytest.approx(7 / C.BAR_PER_PSI, abs=0.5)
    assert f.citation.startswith(NAVY_CH8) and f.source_status == "OLDER-EDITION"


def test_over_bottom_compressor_below_the_water_pressure_fails():
    # 1.5 bar = 21.8 psig is below the water at 60 fsw (60 x 0.445 = 26.7 psig, p. 8-4)
    f = only(_compressor(delivery_pressure_bar=1.5), "fail")
    assert f.limit == pytest.approx(60 * 0.445, abs=0.5)
    assert f.measured == pytest.approx(1.5 / C.BAR_PER_PSI, abs=0.5)
    assert f.citation == "plan consistency (gas_supply.primary.delivery_pressure_bar)"
    assert "cannot deliver gas" in f.message


def test_over_bottom_compressor_pressure_bar_is_its_delivery_pressure():
    f = only(_compressor(pressure_bar=7), "warn")  # an older plan's field, no longer ignored
    assert f.measured == pytest.approx(7 / C.BAR_PER_PSI, abs=0.5) and f.limit == 117


def test_over_bottom_bank_below_the_water_pressure_fails():
    f = only(run(_bank(200, 1), FAMILY, "supply-over-bottom"), "fail")
    assert f.citation == "plan consistency (gas_supply.primary.pressure_bar)"


def test_bailout_pass():
    f = only(run(data(), FAMILY, "supply-bailout"), "pass")
    assert f.measured > f.limit and not f.verified


def test_bailout_short_warns():
    d = data()
    d["gas_supply"]["bailout"][0]["pressure_bar"] = 50
    f = only(run(d, FAMILY, "supply-bailout"), "warn")
    assert f.rule == "supply-bailout"
    assert f.measured == pytest.approx(50 / C.BAR_PER_PSI, abs=0.5)
    # Navy EGS: 5 min at 60 fsw + 2 min ascent at 30 fsw average depth, 1.4 acfm,
    # FV = 7 L, Pm = 135 psig
    scf = 1.4 * (93 / 33 * 5 + 63 / 33 * 2)
    assert f.limit == pytest.approx(scf / (7 / an.L_PER_FT3) * 14.7 + 135, abs=1)
    assert "8-2.2.1" in f.citation


def test_bailout_absent_is_information():
    d = data()
    d["gas_supply"]["bailout"] = [b for b in d["gas_supply"]["bailout"]
                                  if b["diver"] != "Dana Diver"]
    only(run(d, FAMILY, "supply-bailout"), "info")


def test_oxygen_pass_and_short():
    only(run(_o2_dive(), FAMILY, "supply-oxygen"), "pass")
    f = only(run(_o2_dive(water_volume_l=1, pressure_bar=5), FAMILY, "supply-oxygen"), "warn")
    assert f.rule == "supply-oxygen" and f.measured < f.limit
    # 10 min of oxygen at 20 fsw, 1.4 acfm: (20 + 33) / 33 x 1.4 acfm x 10 min and more [scf]
    assert f.unit == "scf" and f.limit >= 10 * 1.4 * 53 / 33 - 0.5


def test_oxygen_missing_fails():
    d = _o2_dive()
    del d["gas_supply"]["oxygen_decompression"]
    f = only(run(d, FAMILY, "supply-oxygen"), "fail")
    assert f.measured == 0 and f.citation.startswith("plan consistency")


def test_no_oxygen_stops_no_finding():
    assert run(data(), FAMILY, "supply-oxygen") == []


def test_chamber_gas_needs_review_for_decompression_dives():
    assert run(data(), FAMILY, "supply-chamber") == []
    f = only(run(_o2_dive(), FAMILY, "supply-chamber"), "warn")
    assert f.rule == "supply-chamber" and CFR_340 in f.citation and not f.verified
    assert "chamber.air_supply" in f.message and "chamber.lock_volumes_l" in f.message


def _chamber_dive(flask_l=1000, **chamber):
    d = _o2_dive()
    d["chamber"].update(lock_volumes_l=[4000, 2000],
                        air_supply={"gas": "air", "water_volume_l": flask_l, "pressure_bar": 200})
    d["chamber"].update(chamber)
    return d


OWN = dict(treatment_depth=60, treatment_min=120, ventilation_lpm=200)
# Boyle's law with 33 fsw = 1 atm (U.S. Navy convention): both locks to 60 fsw once,
# then 200 L/min at 1 + 60/33 atm for 120 min
OWN_NEED = 6000 * 60 / 33 + 200 * 120 * (1 + 60 / 33)


def test_chamber_gas_own_figures_pass():
    f = only(run(_chamber_dive(**OWN), FAMILY, "supply-chamber"), "pass")
    assert f.limit == pytest.approx(scf(OWN_NEED), abs=1)
    # 1000 L at 200 bar above 60 fsw: no more than the ideal-gas (Boyle) content
    assert scf(0.8 * 1000 * (200 - 60 * C.BAR_PER_FSW) / C.P_ATM_BAR) < f.measured
    assert f.measured < scf(1000 * (200 - 60 * C.BAR_PER_FSW) / C.P_ATM_BAR)
    assert f.verified and f.source_status is None


def test_chamber_gas_own_figures_short_fails():
    f = only(run(_chamber_dive(flask_l=200, **OWN), FAMILY, "supply-chamber"), "fail")
    assert f.rule == "supply-chamber" and f.measured < f.limit
    assert f.limit == pytest.approx(scf(OWN_NEED), abs=1)
    assert CFR_340 in f.citation and "plan consistency" in f.citation


# Treatment Table 6 as laid out by the bundled table (steps FROM MEMORY; U.S. Navy Diving
# Manual Rev 7 Change A ch. 17): (from fsw, to fsw, minutes, patient on oxygen, attendant on
# oxygen).  The attendant breathes oxygen for the last 30 min at 30 fsw and the ascent (Rev 4
# Change A §21-5.6.8.1.3, OLDER-EDITION); compression to 60 fsw at 20 fsw/min (FROM MEMORY).
TT6_VENT_STEPS = (
    [(0, 60, 3, False, False)]
    + [(60, 60, 20, True, False), (60, 60, 5, False, False)] * 3
    + [(60, 30, 30, True, False), (30, 30, 15, False, False), (30, 30, 60, True, False),
       (30, 30, 15, False, False), (30, 30, 30, True, False), (30, 30, 30, True, True),
       (30, 0, 30, True, True)]
)
TT6_EXT_STEPS = (
    [(0, 60, 3, False, False)]
    + [(60, 60, 20, True, False), (60, 60, 5, False, False)] * 5
    + [(60, 30, 30, True, False)]
    + [(30, 30, 15, False, False), (30, 30, 60, True, False)] * 3
    + [(30, 30, 15, False, False), (30, 30, 60, True, True), (30, 0, 30, True, True)]
)


def _tt6_ventilation_l(steps, dump, occupants=2):
    """Free litres to ventilate the steps at the Navy rates (Rev 4 Change A §22-5.4,
    OLDER-EDITION): 12.5 acfm per person on oxygen at rest, 25 not at rest, 2 / 4 acfm on
    air; the patient at rest, attendants not at rest; with an overboard dump the air rates
    throughout.  Pressure 1 + depth/33 atm, the mean over a travel step."""
    total = 0.0
    n_att = occupants - 1
    for d0, d1, minutes, patient_o2, attendant_o2 in steps:
        air = 2 + 4 * n_att
        if dump or not (patient_o2 or attendant_o2):
            acfm = air
        else:
            acfm = 12.5 * patient_o2 + 25 * n_att * attendant_o2
        total += acfm * an.L_PER_FT3 * minutes * (1 + (d0 + d1) / 2 / 33)
    return total


def test_chamber_gas_from_navy_defaults_short_warns():
    # no dump stated; every lock pressurised once to 60 fsw, then Treatment Table 6 step by
    # step (regression arithmetic of this project's own sizing rule, spelt out above)
    f = only(run(_chamber_dive(flask_l=1000), FAMILY, "supply-chamber"), "warn")
    assert f.limit == pytest.approx(
        scf(6000 * 60 / 33 + _tt6_ventilation_l(TT6_VENT_STEPS, False)), abs=1)
    assert f.source_status == "FROM MEMORY" and "short" in f.message
    assert "Treatment Table 6 as its timeline" in f.message and "288 min" in f.message


def test_chamber_gas_default_sized_with_every_extension_when_asked():
    f = only(run(_chamber_dive(flask_l=1000, treatment_extensions=True), FAMILY,
                 "supply-chamber"), "warn")
    assert f.limit == pytest.approx(
        scf(6000 * 60 / 33 + _tt6_ventilation_l(TT6_EXT_STEPS, False)), abs=1)
    assert "with every extension (488 min)" in f.message


def test_chamber_gas_defaults_sufficient_needs_review():
    f = only(run(_chamber_dive(flask_l=4000), FAMILY, "supply-chamber"), "pass")
    assert not f.verified and "needs review" in f.message


def test_chamber_gas_overboard_dump_uses_air_rates():
    d = _chamber_dive(flask_l=4000, bibs_overboard_dump=True, treatment_occupants=3,
                      treatment_depth=60, treatment_min=285)
    f = only(run(d, FAMILY, "supply-chamber"), "pass")
    # the plan's own treatment figures: 2 acfm for the patient at rest + 4 acfm for each of
    # two tenders (Navy §22-5.4), 285 min at 60 fsw
    q = (2 + 2 * 4) * an.L_PER_FT3
    assert f.limit == pytest.approx(scf(6000 * 60 / 33 + q * 285 * (1 + 60 / 33)), abs=1)


def test_chamber_gas_default_overboard_dump_air_rates_per_step():
    d = _chamber_dive(flask_l=4000, bibs_overboard_dump=True, treatment_occupants=3)
    f = only(run(d, FAMILY, "supply-chamber"), "pass")
    assert f.limit == pytest.approx(scf(
        6000 * 60 / 33 + _tt6_ventilation_l(TT6_VENT_STEPS, True, occupants=3)), abs=1)


def test_chamber_gas_treatment_figure_from_the_manual():
    d = _chamber_dive(treatment_gas_l=50000, treatment_depth=60)
    del d["chamber"]["lock_volumes_l"]  # not needed without chamber stops
    f = only(run(d, FAMILY, "supply-chamber"), "pass")
    assert f.limit == pytest.approx(scf(50000), abs=1) and f.verified


def test_chamber_not_on_site_needs_review():
    d = _o2_dive()
    d["chamber"]["on_site"] = False
    f = only(run(d, FAMILY, "supply-chamber"), "warn")
    assert "no chamber on site" in f.message


def test_supply_rules_pass_shallow_base():
    no_bad(run(data(), FAMILY, "supply-secondary"))
