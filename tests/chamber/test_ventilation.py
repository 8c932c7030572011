"""Chamber ventilation for a treatment and the chamber's own gas.

Rates: U.S. Navy Diving Manual, Revision 4 Change A (2001), §22-5.4 (p. 22-16),
OLDER-EDITION: 2 / 4 acfm per person on air at rest / not at rest, 12.5 / 25 acfm per
person on oxygen from BIBS with no overboard dump (air breathers then need no extra);
the dump case taking the air rates is FROM MEMORY.  Boyle's law with 33 fsw = 1 atm.
"""

from __future__ import annotations

import pytest

from supervisor.chamber.attendant import attendant_oxygen
from supervisor.chamber.catalogue import load_treatment
from supervisor.chamber.timeline import build_timeline
from supervisor.chamber.ventilation import (
    L_PER_FT3,
    pressurising_gas_l,
    required_acfm,
    treatment_gas,
    ventilation_gas_l,
    ventilation_pieces,
    ventilation_summary,
)
from supervisor.plan import Chamber


@pytest.mark.parametrize(("patient", "n", "att", "dump", "acfm"), [
    (True, 1, False, False, 12.5),      # patient on oxygen, attendant on air: 12.5
    (True, 1, True, False, 37.5),       # both on oxygen: 12.5 + 25
    (False, 1, False, False, 6.0),      # both on air: 2 + 4
    (False, 2, False, False, 10.0),     # patient + two attendants on air: 2 + 2 x 4
    (True, 2, True, True, 10.0),        # overboard dump: the air rates throughout
    (False, 0, False, False, 2.0),      # the patient alone at rest on air
])
def test_navy_rates(patient, n, att, dump, acfm):
    assert required_acfm(patient, n, att, dump)[0] == acfm


def test_pieces_follow_who_breathes_oxygen():
    tl = build_timeline(load_treatment("6"), "08:00")
    pieces = ventilation_pieces(tl, attendant_oxygen(tl, False).intervals, 2, False)
    summary = {round(v["acfm"], 2): v["minutes"] for v in ventilation_summary(pieces)}
    # Table 6 (steps FROM MEMORY): air 3 + 15 + 15 + 15 = 48 min at 6 acfm; patient oxygen
    # 240 min of which the last 60 with the attendant on oxygen (37.5 acfm), 180 at 12.5
    assert summary == {37.5: 60.0, 12.5: 180.0, 6.0: 48.0}
    assert sum(p.minutes for p in pieces) == pytest.approx(tl.elapsed_min)


def test_ventilation_gas_is_boyle_along_each_piece():
    tl = build_timeline(load_treatment("9"), "08:00")
    pieces = ventilation_pieces(tl, [], 1, True)  # the patient alone, dump: 2 acfm throughout
    got = ventilation_gas_l(pieces, "fsw")
    # 2.25 min compression at mean 22.5 fsw, 100 min at 45 fsw, 2.25 min ascent at mean 22.5
    want = 2 * L_PER_FT3 * (2.25 * (1 + 22.5 / 33) * 2 + 100 * (1 + 45 / 33))
    assert got == pytest.approx(want, rel=1e-9)


def test_pressurising_each_lock_once():
    assert pressurising_gas_l([4000, 2000], 60, 1.01325 / 33) == pytest.approx(
        6000 * 60 / 33, rel=1e-12)


def _chamber(**kw):
    base = dict(on_site=True, ready=True, lock_volumes_l=[4200, 1800],
                air_supply={"water_volume_l": 800, "pressure_bar": 300})
    base.update(kw)
    return Chamber.model_validate(base, context={"unit": "fsw"})


def test_treatment_gas_with_extensions_needs_more():
    t = load_treatment("6")
    plain = build_timeline(t, "08:00")
    ext = build_timeline(t, "08:00", {"oxygen": 2, "air": 2})
    dump = _chamber(bibs_overboard_dump=True)
    g0 = treatment_gas(plain, attendant_oxygen(plain, False).intervals, dump, 2)
    g1 = treatment_gas(ext, attendant_oxygen(ext, False).intervals, dump, 2)
    assert g1.need_l > g0.need_l and g0.available_l == g1.available_l
    assert g0.parts["pressurising every lock once"] == pytest.approx(6000 * 60 / 33, rel=1e-9)
    assert not g0.short and g0.status == "FROM MEMORY"
    # without the dump the oxygen rates apply and the same flasks fall short
    g2 = treatment_gas(plain, attendant_oxygen(plain, False).intervals, _chamber(), 2)
    assert g2.short and g2.need_l > g0.need_l


def test_treatment_gas_own_ventilation_and_missing_fields():
    t = load_treatment("6")
    tl = build_timeline(t, "08:00")
    g = treatment_gas(tl, [], _chamber(ventilation_lpm=100.0), 2)
    assert all(v["lpm"] == 100.0 for v in g.ventilation)
    g = treatment_gas(tl, [], None, 2)
    assert g.need_l is None and "--plan" in g.missing[0]
    g = treatment_gas(tl, [], _chamber(lock_volumes_l=None, air_supply=None), 2)
    assert g.need_l is None and len(g.missing) == 2


def test_small_flasks_are_short():
    tl = build_timeline(load_treatment("6"), "08:00")
    g = treatment_gas(tl, [], _chamber(air_supply={"water_volume_l": 50, "pressure_bar": 200}), 2)
    assert g.short and g.to_json()["short"] is True
