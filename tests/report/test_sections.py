"""Section builders of the checklist PDF (supervisor.report.sections)."""

from __future__ import annotations

from typing import Any

from reportlab.platypus import Paragraph, Table

from supervisor.report import sections
from supervisor.report.document import build_record
from supervisor.report.formatting import NOT_COMPUTED


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
    return out


def test_signers_are_each_diver_then_standby_without_duplicates(
        check_result: dict[str, Any]) -> None:
    check_result["team"].append({"name": "Morgan Ellery", "role": ["diver", "tender"],
                                 "first_aid_cpr": True})
    check_result["team"].append({"name": "Kit Jarvis", "role": ["standby-diver"],
                                 "first_aid_cpr": True})
    assert sections._signers(check_result) == ["Morgan Ellery", "Sam Okafor", "Kit Jarvis"]
    assert sections._signers({"dives": [], "team": []}) == [None]


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
    assert "Exposure outside the table: needs review." in text
    assert "Exceptional exposure schedule: needs review." in text


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
    text = _texts(sections.gas_supply_table(dive, 300))
    assert "0.8 (short of need)" in text
    dive["gas_supply"] = {"need_l": None, "available_l": 8000}
    assert NOT_COMPUTED in _texts(sections.gas_supply_table(dive, 300))


def test_team_lists_roles_and_unstated_training(check_result: dict[str, Any]) -> None:
    check_result["team"][0]["role"] = ["supervisor", "tender"]
    text = _texts(sections.team_and_chamber(check_result, 500))
    assert "supervisor, tender" in text
    assert "not stated" in text  # Riley Haugen's first_aid_cpr is None
    assert "depth capability [fsw]" in text and "165" in text


def test_checklist_groups_items_with_tick_boxes(check_result: dict[str, Any],
                                                plan_bytes: bytes) -> None:
    record = build_record(check_result, plan_bytes)
    flow = sections.predive_checklist(record, 500)
    tables = [f for f in flow if isinstance(f, Table)]
    items = record["checklist"]["modes"][0]["items"]
    boxes = sum(isinstance(c, sections.TickBox) for t in tables for row in t._cellvalues
                for c in row)
    assert boxes == 2 * len(items)  # done and n/a for every item
    groups = {i["group"] for i in items}
    assert groups <= set(_texts(flow))


def test_signature_section_states_the_signer(check_result: dict[str, Any]) -> None:
    note = sections.SignerNote("Dana Whitcombe", "AB:CD", self_signed=True)
    text = " ".join(_texts(sections.signature_section(check_result, 500, note)))
    assert "PDF (PAdES) signature by Dana Whitcombe" in text
    assert "AB:CD" in text and "self-signed" in text
