"""Section builders of the checklist PDF (supervisor.report.sections)."""

from __future__ import annotations

from typing import Any

import pytest
from reportlab.platypus import Paragraph, Table

from supervisor.report import sections
from supervisor.report.formatting import NOT_COMPUTED
from supervisor.report.units import UnitSystem


def _texts(flowables: Any) -> list[str]:
    """Plain text of every paragraph inside flowables and tables, in order."""
    out: list[str] = []
    items = flowables if isinstance(flowables, list | tuple) else [flowables]
    for item in items:
        if isinstance(item, Paragraph):
            out.append(item.getPlainText())
        elif isinstance(item, Table):
            for row in item._cellvalues:
                for cell in row:
                    out += _texts(cell)
        elif isinstance(item, list | tuple):
            out += _texts(item)
        elif hasattr(item, "_content"):  # KeepTogether, BalancedColumns
            out += _texts(item._content)
    return out


def test_stops_table_missing_empty_and_filled() -> None:
    assert _texts(sections._stops_table(None, "fsw", 100)) == [NOT_COMPUTED]
    assert _texts(sections._stops_table("junk", "fsw", 100)) == [NOT_COMPUTED]
    assert _texts(sections._stops_table([], "fsw", 100)) == ["no decompression stops"]
    rows = _texts(sections._stops_table([{"depth": 20, "minutes": 4.0, "gas": "oxygen",
                                          "place": "water"}], "msw", 100))
    assert rows == ["stop [msw]", "min", "gas", "place", "20", "4", "oxygen", "water"]


def test_reference_outside_table_is_flagged(check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    dive["reference_schedule"]["outside_table"] = True
    dive["reference_schedule"]["exceptional_exposure"] = True
    text = _texts(sections.schedules_side_by_side(dive, check_result, 500))
    assert "Partial reference schedule — needs review:" in text
    assert "outside the table" in text
    assert "Exceptional exposure schedule: needs review." in text


_SURD_REASON = "row 141 has no surface decompression on oxygen schedule (it has: in-water air)"


@pytest.mark.parametrize(
    ("change", "shown"),
    [
        ({"stops": [], "reason": _SURD_REASON, "outside_table": True},
         [_SURD_REASON, "outside the table"]),
        ({"stops": [], "reason": _SURD_REASON}, [_SURD_REASON]),
        ({"stops": [], "outside_table": True}, ["outside the table"]),
        ({"stops": None}, ["no stops given"]),
    ],
)
def test_missing_reference_schedule_prints_why_not_no_stops(
        check_result: dict[str, Any], change: dict[str, Any], shown: list[str]) -> None:
    dive = check_result["dives"][0]
    dive["reference_schedule"].update(change)
    text = _texts(sections.schedules_side_by_side(dive, check_result, 500))
    assert "no decompression stops" not in text
    assert "No reference schedule — needs review:" in text
    for line in shown:
        assert line in text
    assert "row unverified — needs review" in text


def test_whole_verified_reference_row_without_stops_reads_no_stops(
        check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    dive["reference_schedule"].update(stops=[], reason="", row_verification="verified",
                                      source_status="VERIFIED")
    cells = _texts(sections.reference_cells(dive["reference_schedule"], "fsw", 160))
    assert cells[0] == "no decompression stops"
    assert not any("needs review" in c for c in cells)
    dive["reference_schedule"]["row_verification"] = None
    cells = _texts(sections.reference_cells(dive["reference_schedule"], "fsw", 160))
    assert "row verification not stated — needs review" in cells


def test_reference_row_looked_up_for_another_time_says_so(check_result: dict[str, Any]) -> None:
    ref = check_result["dives"][0]["reference_schedule"]
    ref.update(bottom_time_min=40, bottom_time_requested=33)
    assert "row: 100 fsw for 40 min (looked up for 33 min)" in " ".join(
        _texts(sections.reference_cells(ref, "fsw", 160)))


def test_contingency_reference_and_model_gaps(check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    cont = dive["contingency"]
    cont["overrun"]["reference"] = {"table": "usn-air-decompression", "depth": 100,
                                    "bottom_time_min": 40, "stops": [], "reason": _SURD_REASON,
                                    "outside_table": True, "row_verification": "unverified"}
    cont["deeper"] = {"depth": 110, "bottom_time_min": 30, "stops": [], "total_stop_min": None,
                      "error": "coefficients could not be loaded"}
    cont["oxygen_failure"] = {"depth": 100, "bottom_time_min": 30, "stops": [],
                              "total_stop_min": None, "reference": None}
    text = _texts(sections.contingency_section(dive, check_result, 500)[0]._content)
    assert "no decompression stops" not in text
    assert _SURD_REASON in text and "outside the table" in text
    assert "coefficients could not be loaded" in text
    # model and reference of "deeper" and "oxygen failure" (the overrun's CNS is missing too)
    assert sum(t.count(NOT_COMPUTED) for t in text) == 5
    assert "Reference table: " + NOT_COMPUTED in text


def test_oxygen_failure_not_applicable_only_without_oxygen(check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    text = _texts(sections.contingency_section(dive, check_result, 500)[0]._content)
    assert "Loss of decompression oxygen: not applicable: the plan breathes no oxygen at its " \
        "stops" in text
    assert "Loss of decompression oxygen" not in text  # one line, not a third column
    dive["proposed_stops"][-1]["gas"] = "oxygen"
    text = _texts(sections.contingency_section(dive, check_result, 500)[0]._content)
    assert not any("not applicable" in t for t in text)
    assert "Loss of decompression oxygen" in text and NOT_COMPUTED in text


def test_stop_depths_and_minutes_are_rounded() -> None:
    rows = _texts(sections._stops_table([{"depth": 16.6901, "minutes": 2.01, "gas": "air",
                                          "place": "water"},
                                         {"depth": 10.0, "minutes": 15.0, "gas": "oxygen",
                                          "place": "chamber"}], "fsw", 100))
    assert rows[4:] == ["16.7", "2.1", "air", "water", "10", "15", "oxygen", "chamber"]


def test_model_margin_ceiling_broken(check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    dive["model_margin"]["ceiling_broken"] = True
    text = _texts(sections.model_margin(dive, check_result))[0]
    assert text.startswith("The proposed profile goes shallower than the model ceiling.")
    assert "(Model coefficients FROM MEMORY.)" in text
    dive["model_margin"]["ceiling_broken"] = None
    assert NOT_COMPUTED in _texts(sections.model_margin(dive, check_result))[0]


def test_gas_supply_short_of_need(check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    dive["gas_supply"] = {"need_l": 10000, "available_l": 8000}
    text = _texts(sections.gas_supply_table(dive, 300, UnitSystem("msw")))
    assert "0.8 (short of need)" in text
    dive["gas_supply"] = {"need_l": None, "available_l": 8000}
    assert NOT_COMPUTED in _texts(sections.gas_supply_table(dive, 300, UnitSystem("msw")))


_COMPRESSOR = {"need_l": 15401.0, "available_l": None, "primary_kind": "compressor",
               "primary_delivery_lpm": 900.0, "peak_flow_lpm": 343.6, "recovery_need_l": 1900.0,
               "secondary_kind": "hp-bank", "secondary_available_l": 55459.0,
               "secondary_delivery_lpm": None, "mmp_psig": 184.0, "bailout_psig": 2901.0,
               "bailout_required_psig": 2531.0, "oxygen_need_l": None,
               "oxygen_available_l": None}


def test_gas_supply_compressor_compares_flow_in_litres_and_bar_for_msw(
        check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    dive["gas_supply"] = dict(_COMPRESSOR)
    text = _texts(sections.gas_supply_table(dive, 300, UnitSystem("msw")))
    assert NOT_COMPUTED not in text
    row = text.index("primary compressor: delivery against peak flow")
    assert text[row + 1 : row + 4] == ["900 L/min", "344 L/min", "2.62"]
    row = text.index("secondary hp-bank: free gas against the ascent and decompression")
    assert text[row + 1 : row + 4] == ["55459 L", "1900 L", "29.19"]
    row = text.index("bailout cylinder: charge against required")
    # 2901 psig x 0.0689475729 bar/psi = 200.0 bar; 2531 psig = 174.5 bar (NIST SP 811 factor)
    assert text[row + 1 : row + 4] == ["200 bar", "174.5 bar", "1.15"]
    assert "no oxygen stops in the plan" in text
    details = text[-1]
    assert "need of all counted, whole dive 15401 L" in details
    assert "minimum manifold pressure 12.7 bar" in details  # 184 psig
    assert "psig" not in " ".join(text) and "scf" not in " ".join(text)


def test_gas_supply_in_scf_and_psig_for_fsw(check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    dive["gas_supply"] = dict(_COMPRESSOR)
    text = _texts(sections.gas_supply_table(dive, 300, UnitSystem("fsw")))
    row = text.index("primary compressor: delivery against peak flow")
    # 1 ft = 0.3048 m exactly, so 1 ft3 = 28.316846592 L: 900 L/min = 31.8 scfm
    assert text[row + 1 : row + 4] == ["31.8 scfm", "12.1 scfm", "2.62"]
    row = text.index("secondary hp-bank: free gas against the ascent and decompression")
    assert text[row + 1 : row + 4] == ["1959 scf", "67 scf", "29.19"]  # 55459 L, 1900 L
    row = text.index("bailout cylinder: charge against required")
    assert text[row + 1 : row + 4] == ["2901 psig", "2531 psig", "1.15"]
    assert "need of all counted, whole dive 544 scf" in text[-1]
    assert " L" not in " ".join(text).replace(" L/", "")


@pytest.mark.parametrize("missing", ["primary_delivery_lpm", "peak_flow_lpm"])
def test_gas_supply_compressor_without_figures_is_not_computed(
        check_result: dict[str, Any], missing: str) -> None:
    dive = check_result["dives"][0]
    dive["gas_supply"] = {**_COMPRESSOR, missing: None}
    text = _texts(sections.gas_supply_table(dive, 300, UnitSystem("msw")))
    row = text.index("primary compressor: delivery against peak flow")
    assert text[row + 3] == NOT_COMPUTED


def test_gas_supply_oxygen_needed_but_not_given_is_not_computed(
        check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    dive["proposed_stops"][-1]["gas"] = "oxygen"
    dive["gas_supply"] = dict(_COMPRESSOR)
    text = _texts(sections.gas_supply_table(dive, 300, UnitSystem("msw")))
    row = text.index("decompression oxygen")
    assert text[row + 3] == NOT_COMPUTED


def test_surface_interval_is_stated_for_surface_decompression(
        check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    text = _texts(sections.model_margin(dive, check_result))[0]
    assert "surface interval" not in text  # in-water decompression
    dive["decompression"] = "surface-oxygen"
    text = _texts(sections.model_margin(dive, check_result))[0]
    assert "stays at or below the model ceiling in the water and in the chamber" in text
    assert "excluded from the ceiling check" in text
    assert "surface interval: not assessed by the ceiling check — needs review." in text
    dive["model_margin"]["surface_interval_max_gf_percent"] = 96.4
    text = _texts(sections.model_margin(dive, check_result))[0]
    assert "surface interval: peak supersaturation 96 % of the M-value gradient" in text
    del dive["model_margin"]["surface_interval_max_gf_percent"]
    dive["model_margin"]["surface_interval_max_gf"] = 0.5
    assert "peak supersaturation 50 %" in _texts(sections.model_margin(dive, check_result))[0]


def test_dive_verdict_counts_its_own_and_job_wide_findings(check_result: dict[str, Any]) -> None:
    dive = check_result["dives"][0]
    check_result["findings"].append({"rule": "x", "severity": "fail", "message": "m",
                                     "dive": "D9", "citation": "c"})
    check_result["findings"].append({"rule": "y", "severity": "warn", "message": "m",
                                     "dive": None, "citation": "c"})
    text = _texts([sections.dive_verdict(dive, check_result)])[0]
    assert text.startswith("Dive verdict: DOES NOT CONFORM (1 fail, 3 warn, 1 info, 1 pass")
    check_result["findings"] = [f for f in check_result["findings"] if f["severity"] != "fail"]
    dive["verdict"] = "conforms"  # the stated verdict is never better than the findings
    text = _texts([sections.dive_verdict(dive, check_result)])[0]
    assert text.startswith("Dive verdict: NEEDS REVIEW (0 fail, 3 warn")
