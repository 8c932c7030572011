"""The oxygen section of a dive in the check JSON: the CNS contract keys.

PO2 values follow Dalton's law on the dry gas (PO2 = FO2 x P_amb); the CNS limits are the
bundled NOAA normal-exposure rows (FROM MEMORY; 1.6 atm single exposure 45 min also
SECONDARY: a quotation of the NOAA Diving Manual 3rd edition).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "rules"))

from _engine_plans import data  # noqa: E402

from supervisor.check import check_plan  # noqa: E402
from supervisor.plan import plan_from_dict  # noqa: E402

KEYS = {"cns_is_lower_bound", "cns_note", "minutes_above_table", "po2_tolerance_atm",
        "chamber_oxygen"}


def _oxygen(d: dict) -> dict:
    return check_plan(plan_from_dict(d))["dives"][0]["oxygen"]


def test_plain_dive_has_the_keys_and_no_chamber():
    ox = _oxygen(data())
    assert KEYS <= set(ox)
    assert ox["cns_is_lower_bound"] is False and ox["cns_note"] == ""
    assert ox["minutes_above_table"] == 0.0 and ox["po2_tolerance_atm"] == 0.01
    assert ox["chamber_oxygen"] is None


def test_oxygen_at_20_fsw_counts_at_the_top_row_not_zero():
    """Oxygen at 20 fsw, 1.606 atm (33 fsw/atm): within 0.01 atm of the NOAA 1.6 atm row,
    so 30 min count 30/45 = 66.7 % of the single-exposure limit (NOAA rows), never 0 %."""
    ox = _oxygen(data(bottom_time_min=50, decompression="in-water-oxygen",
                      stops=[{"depth": 20, "minutes": 30, "gas": "oxygen"}]))
    assert ox["cns_is_lower_bound"] is False and ox["minutes_above_table"] == 0.0
    assert ox["cns_percent"] >= 100 * 30 / 45 - 0.1


def test_in_water_above_the_table_is_a_lower_bound_with_its_minutes():
    ox = _oxygen(data(bottom_time_min=50, decompression="in-water-oxygen",
                      stops=[{"depth": 30, "minutes": 10, "gas": "oxygen"}]))
    assert ox["cns_is_lower_bound"] is True
    assert ox["minutes_above_table"] > 10.0
    assert "counted at the 1.6 atm rate" in ox["cns_note"]
    # 10 min at the 1.6 atm rate (45 min) at least (NOAA rows)
    assert ox["cns_percent"] >= 100 * 10 / 45


def test_chamber_oxygen_is_reported_apart():
    """Surface decompression: oxygen at 50 fsw in the chamber (2.52 atm) has no in-water
    CNS percentage; its minutes, OTU, highest PO2 and counting rule are given apart."""
    d = data(max_depth=100, bottom_time_min=30, decompression="surface-oxygen",
             surface_transfer_min=2,
             stops=[{"depth": 40, "minutes": 2},
                    {"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    ox = _oxygen(d)
    c = ox["chamber_oxygen"]
    assert {"minutes", "otu", "max_po2_atm", "rule"} <= set(c)
    assert c["minutes"] == 30.0 and c["periods"] == 1.0
    assert c["max_po2_atm"] == pytest.approx(1 + 50 / 33, abs=0.01)
    assert c["rule"] == "proc-o2-chamber-periods"
    assert ox["cns_is_lower_bound"] is False  # the water part stays inside the table
    assert "not on the NOAA in-water CNS table" in ox["cns_note"]
    assert 0 < c["otu"] <= ox["otu"]
