"""The checklist renders the issue 8 additions to the check JSON, and degrades without them.

``data/check-contract8-uscg.json`` is a fictional USCG job in fsw written for
these tests: stops with oxygen periods and air breaks, an oxygen figure that is
a lower bound with chamber oxygen counted apart, minimum waits before altitude
(one with a longer model figure, one with a shorter one that must never print,
one planned departure that is too early).  Its numbers are illustrative, not
computed; the tests check only that the PDF says what the JSON says and never
something more reassuring.
"""

from __future__ import annotations

import copy
import io
import json
import re
from pathlib import Path
from typing import Any

import pytest
from pypdf import PdfReader

from supervisor.report.document import build_record, document_sha256, record_bytes
from supervisor.report.pdf import render_pdf

DATA = Path(__file__).parent / "data" / "check-contract8-uscg.json"
PLAN = b"# fictional plan text for the report tests\n"


@pytest.fixture(scope="module")
def contract() -> dict[str, Any]:
    return json.loads(DATA.read_text(encoding="utf-8"))


def _text(check: dict[str, Any]) -> tuple[list[str], str]:
    record = build_record(check, PLAN)
    pdf = render_pdf(record, document_sha256(record_bytes(record)))
    pages = [re.sub(r"\s+", " ", p.extract_text()) for p in PdfReader(io.BytesIO(pdf)).pages]
    return pages, " ".join(pages)


@pytest.fixture(scope="module")
def rendered(contract: dict[str, Any]) -> tuple[list[str], str]:
    return _text(copy.deepcopy(contract))


def _dive(text: str, dive_id: str, diver: str) -> str:
    start = text.index(f"Dive {dive_id}: {diver}")
    nxt = re.search(r"Dive D\d+: ", text[start + 5:])
    return text[start:start + 5 + nxt.start()] if nxt else text[start:]


def test_air_breaks_print_as_periods_never_one_oxygen_stop(
        rendered: tuple[list[str], str]) -> None:
    d2 = _dive(rendered[1], "D2", "Priya Raman")
    # the 40 fsw chamber stop of 35 min: O2 15, air 5, O2 15 (proposed and model)
    assert d2.count("40 35 O2 15, air 5, O2 15 min (air breaks) chamber") == 2
    assert "40 35 oxygen chamber" not in d2
    assert "10 9 O2 5, air 1, O2 3 min (air breaks) chamber" in d2  # the table row
    # page 1 schedule line
    assert "chamber 40 fsw 35 min oxygen (O2 15, air 5, O2 15 min)" in rendered[0][0]


def test_cns_lower_bound_and_chamber_oxygen(rendered: tuple[list[str], str]) -> None:
    d2 = _dive(rendered[1], "D2", "Priya Raman")
    assert "in-water CNS [% of limit] at least 6.2 (lower bound)" in d2
    assert "3.0 min above 1.6 atm in the water counted at the 1.6 atm rate" in d2
    assert "3 min in the water above the CNS table's top row (PO2 tolerance 0.01 atm)" in d2
    chamber = d2[d2.index("chamber oxygen (no CNS %"):d2.index("pulmonary dose")]
    assert "50 min in 2 period(s); PO2 up to 2.52 atm; counted by chamber oxygen periods" \
        in chamber
    assert "limit: at most 4 periods of 30 min" in chamber
    assert "%" not in chamber.replace("(no CNS %: counted against the chamber procedure)", "")
    d1 = _dive(rendered[1], "D1", "Teodor Lind")
    oxygen = d1[d1.index("Oxygen exposure"):d1.index("pulmonary dose")]
    assert "in-water CNS [% of limit] 6.1" in oxygen and "lower bound" not in oxygen


def test_altitude_never_shorter_than_the_minimum(rendered: tuple[list[str], str]) -> None:
    first = rendered[0][0]
    assert "Teodor Lind (D3) 18 h 00 min 18 h after repetitive dives" in first
    assert "Priya Raman (D2) 24 h 00 min 24 h after a decompression dive" in first
    assert "model: 25 h 00 min, longer" in first  # shown: longer than the minimum
    assert "Jonah Whitcombe (D1) 12 h 00 min" in first
    assert "0 h 05 min" not in rendered[1]  # the shorter model figure never prints
    assert "0 h 00 min" not in rendered[1]
    assert "8000 ft departing 2031-07-10 06:00 (too early: FAILS the minimum wait)" in first
    assert "2000 ft departing 2031-07-11 08:00 (after the minimum wait)" in first
    assert "2031-07-10 09:15" in first  # earliest departure


@pytest.mark.parametrize("minimum", [0, None, -5, "18 h"])
def test_a_missing_or_zero_minimum_wait_is_not_computed(contract: dict[str, Any],
                                                        minimum: object) -> None:
    check = copy.deepcopy(contract)
    check["altitude"][0]["minimum_wait_min"] = minimum
    check["altitude"][0]["model_wait_min"] = 0
    first = _text(check)[0][0]
    row = first[first.index("Teodor Lind (D3)"):first.index("Priya Raman (D2)")]
    assert "not computed — needs review" in row
    assert "0 h 00 min" not in first


def test_without_the_new_keys_nothing_reassuring(contract: dict[str, Any]) -> None:
    check = copy.deepcopy(contract)
    del check["altitude"]
    for dive in check["dives"]:
        for key in ("cns_note", "minutes_above_table", "po2_tolerance_atm", "chamber_oxygen"):
            dive["oxygen"].pop(key, None)
        for stop in dive["proposed_stops"] + dive["model_schedule"]["stops"]:
            stop.pop("periods", None)
    pages, text = _text(check)
    assert "Minimum surface time before altitude: not computed — needs review" in pages[0]
    d2 = _dive(text, "D2", "Priya Raman")
    # chamber oxygen without its own count: never an in-water CNS figure for it
    assert "CNS [% of limit], water and chamber counted on the in-water table at least 6.2 " \
        "(lower bound)" in d2
    assert "not counted against the chamber procedure's limits by this check — needs review" \
        in d2


def test_uscg_signature_blocks_and_units(rendered: tuple[list[str], str]) -> None:
    text = rendered[1]
    signing = text[text.index("Signatures Diving supervisor"):text.index("Appendix:")]
    assert "Person-in-charge of the vessel or facility" in signing
    assert "46 CFR 197.210, 197.404" in signing
    assert "Chamber operator" in signing and "Printed name: Rafael Dunmore" in signing
    assert "USCG, 46 CFR 197 Subpart B" in rendered[0][0]
    # an fsw plan prints psig and scf, never bar or litres (the JSON holds litres)
    for dive_id, diver in (("D1", "Teodor Lind"), ("D2", "Priya Raman")):
        supply = _dive(text, dive_id, diver)
        supply = supply[supply.index("Gas supply against need"):supply.index("basis: ")]
        assert " scf" in supply and " psig" in supply
        assert " bar" not in supply and not re.search(r"\d L\b", supply)
    # site figures: feet first, metres in parentheses
    assert "Visibility: 8 ft (2.5 m)" in rendered[0][0]
    assert "Water temperature: 52 °F (11 °C)" in rendered[0][0]


def test_job_wide_reference_finding_is_listed_once(rendered: tuple[list[str], str]) -> None:
    findings = rendered[1][rendered[1].index("Findings to act on"):]
    assert findings.count("references-unverified") == 1
    assert findings.index("Job-wide") < findings.index("references-unverified")
