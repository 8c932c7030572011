"""The checklist PDF read back with pypdf (supervisor.report.pdf).

All expected values come from the hand-written fixture check in conftest.py
(fictional job); the tests check that the PDF prints what the check says.
"""

from __future__ import annotations

import hashlib
import io
import re
from typing import Any

import pytest
from pypdf import PdfReader

from supervisor.report.document import build_record, document_sha256, record_bytes
from supervisor.report.formatting import NOT_COMPUTED
from supervisor.report.pdf import pdf_date, render_pdf

HOSTILE = '<b>Zoë Brontë</b> & Łukasz <font name="x">Ørsted</font> &amp; 王芳 Ελένη Дмитрий'


def _render(check: dict[str, Any], plan: bytes, **kwargs: Any) -> tuple[bytes, str]:
    record = build_record(check, plan)
    digest = document_sha256(record_bytes(record))
    return render_pdf(record, digest, **kwargs), digest


def _pages(pdf: bytes) -> list[str]:
    return [page.extract_text() for page in PdfReader(io.BytesIO(pdf)).pages]


def _flat(text: str) -> str:
    return re.sub(r"\s+", " ", text)


@pytest.fixture()
def rendered(check_result: dict[str, Any], plan_bytes: bytes) -> tuple[bytes, str, list[str]]:
    pdf, digest = _render(check_result, plan_bytes)
    return pdf, digest, _pages(pdf)


def test_every_required_section_is_present(rendered: tuple[bytes, str, list[str]]) -> None:
    text = _flat(" ".join(rendered[2]))
    for heading in (
        "Pre-dive checklist", "Reference tables and model", "Verdict: DOES NOT CONFORM",
        "Dives and their planned schedules", "Emergency contacts", "Site conditions",
        "Before travel to altitude (flying) after the dives",
        "Findings to act on: failures and warnings, by dive", "Dive D1: Morgan Ellery",
        "Schedules", "Proposed (plan)", "Reference table: usn-air-decompression",
        "Model: zhl16c GF 30/85", "Planned profile and model ceiling",
        "Surfacing gradient factor by compartment", "Oxygen exposure", "Gas supply against need",
        "Contingency schedules", "Bottom-time overrun", "Deeper than planned",
        "Loss of decompression oxygen", "Information (reported, not judged)", "Chamber",
        "Pre-dive checklist: surface-supplied air", "Cautions", "Signatures",
        "Diving supervisor", "Client's representative (Example Port Authority)",
        "Dive team and divers' acknowledgement", "Appendix: passed checks",
    ):
        assert heading in text, heading


def test_page_1_is_the_summary(rendered: tuple[bytes, str, list[str]],
                               plan_bytes: bytes) -> None:
    """Job, verdict, dives with schedules and verdicts, contacts, site, identity: page 1 only."""
    _, digest, pages = rendered
    first = _flat(pages[0])
    for value in ("Harbour outfall inspection", "North Mole, Port Example", "2031-05-14",
                  "Example Port Authority", "Dana Whitcombe", "OSHA 29 CFR 1910 Subpart T",
                  "Fictional Subsea Ltd", "supervisor 0.1.0",
                  "Verdict: DOES NOT CONFORM", "1 fail, 2 warn, 1 info, 1 pass",
                  "Failing: osha-423-c1 (D1)",
                  "D1 Morgan Ellery ss_air, air; 100 fsw for 30 min; decompression in-water",
                  "in-water 20 fsw 7 min air; in-water 10 fsw 18 min air DOES NOT CONFORM",
                  "Emergency contacts", "Site conditions", "Digital signature.",
                  hashlib.sha256(plan_bytes).hexdigest()[:40]):
        assert value in first, value
    assert digest in first  # the full document hash on page 1
    assert "Findings to act on" not in first and "Cautions" not in first


def test_findings_by_dive_worst_first_and_passes_in_the_appendix(
        rendered: tuple[bytes, str, list[str]]) -> None:
    text = _flat(" ".join(rendered[2][1:]))
    positions = [text.index(label) for label in ("FAIL osha-423-c1", "WARN gas-supply-reserve",
                                                 "WARN table-row-unverified")]
    assert positions == sorted(positions)
    assert "29 CFR 1910.423(c)(1) (VERIFIED)" in text
    assert "measured: 1.12 limit: 1.5" in text
    # information in the dive's section, compactly, with its figures and citation
    assert "oxygen-cns: CNS oxygen exposure for the dive. [23.7 % / 100 %] — NOAA Diving " \
        "Manual CNS limits (SECONDARY)" in text
    appendix = text[text.index("Appendix: passed checks"):]
    assert "osha-425-b1: limit 190 fsw: D1 100 fsw — 29 CFR 1910.425(b)(1) (FROM MEMORY)" \
        in appendix
    assert "PASS" not in text  # passes are not rows of the findings tables


def test_dive_numbers_match_the_check(rendered: tuple[bytes, str, list[str]]) -> None:
    text = _flat(" ".join(rendered[2][1:]))
    dive = text[text.index("Dive D1: Morgan Ellery"):]
    # proposed 20/7 and 10/18, reference 20/4 and 10/21, model 30/2, 20/6, 10/24
    for fragment in ("20 7 air in-water 10 18 air in-water", "20 4 air in-water 10 21 air",
                     "30 2 air in-water 20 6 air in-water 10 24 air", "repetitive group K",
                     "total stop time: 32 min", "total ascent time: 35.3 min",
                     "no-stop limit: 19.5 min",
                     "Surfacing gradient factor of the planned profile 81 %",
                     "controlling compartment 5", "bottom 0.84", "decompression 0.34",
                     "CNS [% of limit] 23.7", "pulmonary dose [OTU] 41",
                     # fsw plan: free gas in scf (10750 L, 9600 L), flow in scfm (125 L/min)
                     "primary: free gas against the whole dive 380 scf 339 scf 1.12",
                     "reserve 141 scf", "flow 4.4 scfm", "depth: not computed",
                     "bottom time: 40 min", "dive: 110 fsw for 30 min",
                     "total stop time 44 min"):
        assert fragment in dive, fragment
    assert " 81 " in dive.split("Surfacing gradient factor by compartment")[1]  # bar label


def test_missing_sections_read_not_computed(check_result: dict[str, Any],
                                            plan_bytes: bytes) -> None:
    dive = check_result["dives"][0]
    for key in ("reference_schedule", "oxygen", "gas_supply", "contingency", "chart",
                "compartments", "model_margin", "model_schedule"):
        dive[key] = None
    check_result["team"] = []
    pdf, _ = _render(check_result, plan_bytes)
    text = _flat(" ".join(_pages(pdf)))
    for what in ("Model margin", "Depth-time chart", "Compartment loading", "Oxygen exposure",
                 "Gas supply", "Contingency schedules", "Dive team"):
        assert f"{what}: {NOT_COMPUTED}" in text, what
    assert text.count(NOT_COMPUTED) >= 10


def test_stated_verdict_never_prints_better_than_findings(check_result: dict[str, Any],
                                                          plan_bytes: bytes) -> None:
    check_result["verdict"] = "conforms"
    pdf, _ = _render(check_result, plan_bytes)
    first = _flat(_pages(pdf)[0])
    assert "Verdict: DOES NOT CONFORM" in first
    assert "Stated by the check: verdict conforms" in first


def test_no_findings_is_not_a_pass(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    check_result["findings"] = []
    check_result["verdict"] = None
    first = _flat(_pages(_render(check_result, plan_bytes)[0])[0])
    assert "Verdict: NEEDS REVIEW" in first
    assert "That is not a pass" in first


def test_every_page_numbered_with_the_document_hash(
        rendered: tuple[bytes, str, list[str]]) -> None:
    _, digest, pages = rendered
    for n, text in enumerate(pages, start=1):
        assert f"page {n} of {len(pages)}" in text
        assert f"document sha256 {digest[:16]}" in text


def test_pdf_is_deterministic_with_creation_date_from_the_check(
        check_result: dict[str, Any], plan_bytes: bytes) -> None:
    first, digest = _render(check_result, plan_bytes)
    second, _ = _render(check_result, plan_bytes)
    assert first == second
    meta = PdfReader(io.BytesIO(first)).metadata
    assert meta["/CreationDate"] == "D:20310514063000+00'00'"
    # the keywords record the hash, the printed verdict and the counts (pdf_meta)
    assert meta["/Keywords"].replace(",", "").split() == [
        f"document-sha256:{digest}", "verdict:does-not-conform", "fail:1", "warn:2", "info:1",
        "pass:1"]


@pytest.mark.parametrize(
    ("given", "expected"),
    [("2031-05-14T06:30:00Z", "D:20310514063000+00'00'"),
     ("2031-05-14T08:30:00+02:00", "D:20310514063000+00'00'"),
     ("2031-05-14T06:30:00", "D:20310514063000+00'00'"),
     ("yesterday", "D:20000101000000+00'00'"), (None, "D:20000101000000+00'00'")],
)
def test_pdf_date(given: object, expected: str) -> None:
    assert pdf_date(given) == expected


def test_user_text_prints_literally_in_any_script(check_result: dict[str, Any],
                                                  plan_bytes: bytes) -> None:
    check_result["job"]["supervisor"] = HOSTILE
    check_result["job"]["site"] = HOSTILE
    check_result["dives"][0]["diver"] = HOSTILE
    check_result["team"][1]["name"] = HOSTILE
    check_result["findings"][0]["message"] = HOSTILE
    pdf, _ = _render(check_result, plan_bytes)
    pages = [_flat(p) for p in _pages(pdf)]
    assert pages[0].count(HOSTILE) >= 2  # site, supervisor
    assert "".join(pages[0].split()).count("".join(HOSTILE.split())) >= 3  # + the diver (wraps)
    assert HOSTILE in pages[1]  # the finding
    assert f"Dive D1: {HOSTILE}" in _flat(" ".join(pages))
    assert _flat(" ".join(pages)).count(HOSTILE) >= 7  # + team, signature blocks
    reader = PdfReader(io.BytesIO(pdf))
    fonts = {str(f.get_object()["/BaseFont"]).split("+")[-1]
             for page in reader.pages for f in page["/Resources"]["/Font"].values()}
    assert fonts == {"DejaVuSans", "DejaVuSans-Bold", "DroidSansFallback"}


def test_long_names_wrap_inside_the_page(check_result: dict[str, Any],
                                         plan_bytes: bytes) -> None:
    long_name = "Bartholomew-" + "Featherstonehaugh" * 12
    check_result["job"]["client"] = long_name
    check_result["team"][0]["name"] = long_name
    pdf, _ = _render(check_result, plan_bytes)
    reader = PdfReader(io.BytesIO(pdf))
    for page in reader.pages:
        width = float(page.mediabox.width)
        xs: list[float] = []

        def visit(text: str, cm: Any, tm: Any, font: Any, size: Any, xs: list[float] = xs) -> None:
            if text.strip():
                xs.append(tm[4] * cm[0] + cm[4])

        page.extract_text(visitor_text=visit)
        assert xs and min(xs) >= 0 and max(xs) < width
    joined = "".join(_flat(" ".join(_pages(pdf))).split())
    assert long_name in joined


def test_checklist_items_have_tick_boxes_and_citations(
        rendered: tuple[bytes, str, list[str]]) -> None:
    text = _flat(" ".join(rendered[2]))
    for cite in ("29 CFR 1910.421(b)", "29 CFR 1910.421(c); 46 CFR 197.314",
                 "29 CFR 1910.421(g); 46 CFR 197.410", "29 CFR 1910.422(c)(1)"):
        assert cite in text, cite
    assert "don e n/a Item Citation (source status)" in text or \
        "done n/a Item Citation (source status)" in text
    assert "1910.424(c)(4)-(5)" not in text  # the SCUBA reserve item is not for SS air


def test_unknown_mode_lists_every_item(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    check_result["dives"][0]["mode"] = "snorkel"
    text = _flat(" ".join(_pages(_render(check_result, plan_bytes)[0])))
    assert "mode not recognised (snorkel), every item shown" in text
    assert "29 CFR 1910.424(c)(4)-(5)" in text


def test_signature_blocks_name_supervisor_and_each_diver(
        rendered: tuple[bytes, str, list[str]]) -> None:
    text = _flat(" ".join(rendered[2]))
    signing = text[text.index("Signatures Diving supervisor"):text.index("Appendix:")]
    assert "Printed name: Dana Whitcombe" in signing
    # the team with roles and training; the dive's diver and the standby sign, the tender not
    assert "Morgan Ellery diver yes ____" in signing and "Sam Okafor standby yes ____" in signing
    assert "Riley Haugen tender not stated — —" in signing
    assert "Dana Whitcombe dpic yes — —" in signing
    assert "Person-in-charge" not in signing  # an OSHA job
    assert "This copy carries no digital signature." in signing


def test_a4_paper(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    pdf, _ = _render(check_result, plan_bytes, paper="a4")
    box = PdfReader(io.BytesIO(pdf)).pages[0].mediabox
    assert (round(float(box.width)), round(float(box.height))) == (595, 842)
    with pytest.raises(ValueError, match="paper"):
        _render(check_result, plan_bytes, paper="legal")
