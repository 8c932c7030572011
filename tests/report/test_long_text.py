"""The PDF never raises on text the plan accepts: long, unbroken, any script (issues 8 and 13).

Reproducers: a 3,000-character job title ended in reportlab's LayoutError
("tallest cell too large"); so did 48 or more water stops (one table taller
than a page).  A property test feeds long, unbroken and multi-script text into
every text field of the fictional fixture check (conftest.py) and renders.
"""

from __future__ import annotations

import copy
import io
import os
import re
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from pypdf import PdfReader
from reportlab.platypus import LayoutError

from supervisor.report import pdf as pdf_module
from supervisor.report.document import build_record, document_sha256, record_bytes
from supervisor.report.pdf import render_pdf
from supervisor.report.styles import CUT_NOTE, TEXT_LIMIT

#: ``make fuzz`` sets SUPERVISOR_FUZZ_EXAMPLES for a large random run (tests/test_properties.py)
FUZZ = int(os.environ.get("SUPERVISOR_FUZZ_EXAMPLES", "0"))


def _render(check: dict[str, Any], plan: bytes) -> bytes:
    record = build_record(check, plan)
    return render_pdf(record, document_sha256(record_bytes(record)))


def _text(pdf: bytes) -> str:
    return "".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages)


def test_a_3000_character_title_renders(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    check_result["job"]["title"] = "W" * 3000
    check_result["job"]["site"] = "Ж" * 2000
    check_result["team"][0]["name"] = "名" * 1500
    text = _text(_render(check_result, plan_bytes))
    footer = len(text.split("Pre-dive checklist: W")) - 1  # footers hold a shortened title
    assert footer >= 2 and text.count("W") > 3000  # printed whole, wrapped across pages
    assert text.count("名") >= 1500


def test_sixty_water_stops_render(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    stops = [{"depth": float(d), "minutes": 1.0, "gas": "air", "place": "water"}
             for d in range(180, 0, -3)]
    dive = check_result["dives"][0]
    dive["proposed_stops"] = stops
    dive["model_schedule"]["stops"] = copy.deepcopy(stops)
    dive["reference_schedule"]["stops"] = copy.deepcopy(stops)
    dive["contingency"]["overrun"]["stops"] = copy.deepcopy(stops)
    text = " ".join(_text(_render(check_result, plan_bytes)).split())
    # the last stop of the proposed, reference and model tables (the overrun prints inline)
    assert len(re.findall(r"(?<![\d.])3 1 air water", text)) == 3
    assert "water 3 fsw 1 min air" in text


def test_layout_failure_falls_back_to_cut_text(check_result: dict[str, Any], plan_bytes: bytes,
                                               monkeypatch: pytest.MonkeyPatch) -> None:
    """If a layout ever fails, the PDF is still made, with long texts cut and marked."""
    check_result["job"]["site"] = "S" * 1000
    real = pdf_module._render
    calls: list[int | None] = []

    def first_fails(*args: Any, **kwargs: Any) -> bytes:
        calls.append(TEXT_LIMIT.get())
        if len(calls) == 1:
            raise LayoutError("tallest cell too large")
        return real(*args, **kwargs)

    monkeypatch.setattr(pdf_module, "_render", first_fails)
    text = " ".join(_text(_render(check_result, plan_bytes)).split())
    assert calls == [None, pdf_module.FALLBACK_TEXT_LIMIT]
    assert CUT_NOTE.strip() in text
    assert TEXT_LIMIT.get() is None  # reset for the next checklist


# -------------------------------------------------------------------- property test

_SCRIPTS = st.sampled_from([
    "W", "é", "ß", "Ω", "Ж", "王", "語", "ت", "ש", "ก", "🙂", "\u0301", " ", "-", "/", "<b>",
    "&amp;", "\u202e", "\x1b[31m", "\t", "\n", "\u00ad", "\u200b", "0",
])
_TEXT = st.one_of(
    st.lists(_SCRIPTS, min_size=0, max_size=40).map("".join),
    st.builds(lambda c, n: c * n, _SCRIPTS, st.integers(1, 4000)),  # long and unbroken
    st.text(max_size=300),
)

_FIELDS = (
    ("job", "title"), ("job", "site"), ("job", "client"), ("job", "contractor"),
    ("job", "supervisor"), ("job", "jurisdiction"), ("dives", 0, "id"), ("dives", 0, "diver"),
    ("dives", 0, "mode"), ("dives", 0, "gas"), ("team", 0, "name"), ("team", 1, "role"),
    ("findings", 0, "message"), ("findings", 0, "rule"), ("findings", 1, "citation"),
    ("findings", 4, "message"), ("references", 0, "title"), ("dives", 0, "proposed_stops", 0,
                                                               "gas"),
    ("site", "emergency_contacts", "hospital"), ("site", "water"),
    ("altitude", 0, "basis"), ("cautions", 0),
)


def _set(check: dict[str, Any], path: tuple[Any, ...], value: str) -> None:
    target: Any = check
    for key in path[:-1]:
        target = target[key]
    target[path[-1]] = value


@settings(max_examples=FUZZ or 12, deadline=None, derandomize=not FUZZ, database=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])
@given(values=st.lists(_TEXT, min_size=len(_FIELDS), max_size=len(_FIELDS)))
def test_any_text_in_any_field_renders(check_result: dict[str, Any], plan_bytes: bytes,
                                       values: list[str]) -> None:
    check = copy.deepcopy(check_result)
    check["site"] = {"water": "salt", "emergency_contacts": {}}
    check["altitude"] = [{"diver": "x", "after_dive": "D1", "minimum_wait_min": 720,
                          "basis": "", "source_status": "FROM MEMORY", "travel": []}]
    for path, value in zip(_FIELDS, values, strict=True):
        _set(check, path, value)
    pdf = _render(check, plan_bytes)
    reader = PdfReader(io.BytesIO(pdf))
    assert len(reader.pages) >= 5
