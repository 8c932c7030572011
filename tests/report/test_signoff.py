"""Closing pages: chamber, pre-dive items, cautions, signatures (supervisor.report.signoff).

The fixture check is hand-written and fictional (conftest.py); the tests check
that the checklist prints what the check says.
"""

from __future__ import annotations

from typing import Any

import pytest
from reportlab.platypus import Table

from supervisor.report import signoff
from supervisor.report.blocks import SignerNote
from supervisor.report.document import build_record
from tests.report.test_sections import _texts


def test_signers_are_each_diver_then_standby_without_duplicates(
        check_result: dict[str, Any]) -> None:
    check_result["team"].append({"name": "Morgan Ellery", "role": ["diver", "tender"],
                                 "first_aid_cpr": True})
    check_result["team"].append({"name": "Kit Jarvis", "role": ["standby-diver"],
                                 "first_aid_cpr": True})
    assert signoff._signers(check_result) == ["Morgan Ellery", "Sam Okafor", "Kit Jarvis"]
    assert signoff._signers({"dives": [], "team": []}) == [None]


@pytest.mark.parametrize(
    ("paths", "expected"),
    [(["site.resuscitator"], True), (["site.resuscitator", "site.first_aid_kit"], False),
     (["site.missing"], False), ([], False), (["team[].first_aid_cpr"], False),
     (["dives[].diver"], True), (["!site.night"], True), (["!site.resuscitator"], False),
     (["site.code_flag_a_lit | !site.night"], True), (["site.count"], True),
     (["site.zero"], False), (["site.blank"], False)],
)
def test_stated_in_plan(paths: list[str], expected: bool) -> None:
    record = {"site": {"resuscitator": True, "first_aid_kit": None, "night": False,
                       "code_flag_a_lit": None, "count": 4, "zero": 0, "blank": "  "},
              "team": [{"first_aid_cpr": True}, {"first_aid_cpr": None}],
              "dives": [{"diver": "A"}, {"diver": "B"}]}
    assert signoff.stated_in_plan(record, paths) is expected


def test_items_the_plan_states_are_marked_but_left_unticked(check_result: dict[str, Any],
                                                            plan_bytes: bytes) -> None:
    check_result["site"] = {"safe_practices_manual": True, "resuscitator": True}
    record = build_record(check_result, plan_bytes)
    flow = signoff.predive_checklist(record, 500)
    tables = [f for f in flow if isinstance(f, Table)]
    items = record["checklist"]["modes"][0]["items"]
    boxes = sum(isinstance(c, signoff.TickBox) for t in tables for row in t._cellvalues
                for c in row)
    assert boxes == 2 * len(items)  # done and n/a for every item, ticked by hand
    text = _texts(flow)
    manual = next(i for i, t in enumerate(text) if t.startswith("The safe practices manual"))
    assert text[manual + 2] == "Stated in plan; confirm on site."
    assert text.count("Stated in plan; confirm on site.") == 1  # first aid: kit not stated
    assert {i["group"] for i in items} <= set(text)


def test_chamber_section_is_left_out_when_the_plan_has_none(check_result: dict[str, Any]) -> None:
    check_result["chamber"] = {"on_site": False, "ready": False, "locks": None}
    assert signoff.chamber_section(check_result, 500) == []
    check_result["chamber"] = {"on_site": True, "ready": True, "locks": None,
                               "equipment": {"viewport": None, "voice_comms": True}}
    text = _texts(signoff.chamber_section(check_result, 500))
    assert "—" not in text  # no rows of dashes for what the plan does not state
    assert "Not stated in the plan (needs review on site): locks, equipment.viewport" in text


def test_team_and_acknowledgement(check_result: dict[str, Any]) -> None:
    check_result["team"][0]["role"] = ["supervisor", "tender"]
    text = _texts(signoff.team_and_acknowledgement(check_result, 500))
    row = text.index("Riley Haugen")
    assert text[row:row + 5] == ["Riley Haugen", "tender", "not stated", "—", "—"]
    row = text.index("Morgan Ellery")
    assert text[row + 1:row + 3] == ["diver", "yes"] and text[row + 3].startswith("____")
    assert "supervisor, tender" in text
    check_result["dives"][0]["diver"] = "Ola Nordmann"  # a diver the team does not list
    text = _texts(signoff.team_and_acknowledgement(check_result, 500))
    assert "diver (not in the plan's team)" in text


@pytest.mark.parametrize(
    ("jurisdiction", "chamber", "blocks"),
    [("osha-1910-t", {"on_site": False}, ["Diving supervisor", "Client's representative"]),
     ("uscg-46-197-b", {"on_site": False},
      ["Diving supervisor", "Person-in-charge of the vessel or facility",
       "Client's representative"]),
     ("osha-1910-t", {"on_site": True},
      ["Diving supervisor", "Chamber operator", "Client's representative"])],
)
def test_signature_blocks_fit_the_jurisdiction_and_the_chamber(
        check_result: dict[str, Any], jurisdiction: str, chamber: dict[str, Any],
        blocks: list[str]) -> None:
    check_result["job"]["jurisdiction"] = jurisdiction
    check_result["chamber"] = chamber
    check_result["team"].append({"name": "Ana Ruiz", "role": ["chamber-operator"],
                                 "first_aid_cpr": True})
    text = _texts(signoff.signature_blocks(check_result, 500))
    roles = [t.split(" (")[0] for t in text if t.split(" (")[0] in (
        "Diving supervisor", "Person-in-charge of the vessel or facility", "Chamber operator",
        "Client's representative")]
    assert roles == blocks
    if "Chamber operator" in blocks:
        assert "Printed name: Ana Ruiz" in text


def test_surface_decompression_needs_a_chamber_operator(check_result: dict[str, Any]) -> None:
    check_result["chamber"] = {"on_site": None}
    check_result["dives"][0]["decompression"] = "surface-oxygen"
    assert signoff.chamber_used(check_result)
    assert "Chamber operator" in _texts(signoff.signature_blocks(check_result, 500))


def test_signature_section_states_the_signer(check_result: dict[str, Any]) -> None:
    note = SignerNote("Dana Whitcombe", "AB:CD", self_signed=True)
    text = " ".join(_texts(signoff.signature_section(check_result, 500, note)))
    assert "Digitally signed by Dana Whitcombe. The PDF carries a PDF (PAdES) signature" in text
    assert "AB:CD" in text and "self-signed" in text and "in place of" not in text
    other = SignerNote("Ivo Strand", "AB:CD", self_signed=True)
    text = " ".join(_texts(signoff.signature_section(check_result, 500, other)))
    assert "Digitally signed by Ivo Strand in place of the plan's supervisor Dana Whitcombe." \
        in text


@pytest.mark.parametrize(("jurisdiction", "shown"), [
    ("uscg-46-197-b", "46 CFR 197.420; cross-reference: 29 CFR 1910.420(a)"),
    ("osha-1910-t", "29 CFR 1910.420(a); cross-reference: 46 CFR 197.420"),
    ("none", "29 CFR 1910.420(a); 46 CFR 197.420"),
])
def test_item_citations_follow_the_jurisdiction(jurisdiction: str, shown: str) -> None:
    """A USCG job cites 46 CFR 197 first; the other rule set is labelled a cross-reference."""
    assert signoff.cited_for(["29 CFR 1910.420(a)", "46 CFR 197.420"], jurisdiction) == shown


def test_items_the_check_shows_not_required_are_listed_in_one_line() -> None:
    """Issue 8 §3 (signal, not noise): a chamber item on a job of shallow no-stop dives is not a
    tick box; it is named once under "Not required for these dives", with its citation."""
    from supervisor.report.signoff import required

    item = {"required_if": ["deep-or-decompression", "mixed-gas"]}
    shallow = {"id": "D1", "max_depth": 12, "decompression": "none", "mode":
               "surface-supplied-air", "proposed_stops": [],
               "model_schedule": {"stops": [], "error": None}}
    rec = {"unit": "msw", "dives": [shallow]}
    assert not required(item, rec, ["D1"])
    deep = dict(shallow, max_depth=31)  # 31 msw = 101.7 fsw (1 msw = 0.1 bar, 1 fsw = 1.01325/33)
    assert required(item, {"unit": "msw", "dives": [deep]}, ["D1"])
    assert required(item, {"unit": "msw", "dives": [dict(shallow, decompression="in-water")]},
                    ["D1"])
    assert required(item, {"unit": "msw", "dives": [dict(
        shallow, model_schedule={"stops": [{"depth": 3}]})]}, ["D1"])
    assert required(item, rec, ["D9"])  # a dive the record lacks: cannot judge, keep it
    assert required({"required_if": ["heavy-gear"]}, rec, ["D1"])  # not stated: keep it
    assert required({}, rec, ["D1"])
