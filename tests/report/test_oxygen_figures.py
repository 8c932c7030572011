"""The checklist PDF prints the engine's oxygen figures as the check computes them.

A fictional plan (the engine test plan) with oxygen at 30 fsw in the water (1.91 ata,
Dalton's law with 33 fsw = 1 atm, above the NOAA table's 1.6 atm row) and one with
chamber oxygen at 50 fsw; the PDF must call the in-water CNS figure a lower bound and
never give chamber oxygen an in-water CNS percentage.
"""

from __future__ import annotations

import io
import re
import sys
from pathlib import Path

import tomli_w
from pypdf import PdfReader

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "rules"))

from _engine_plans import data  # noqa: E402

from supervisor.check import run_check  # noqa: E402
from supervisor.report.document import build_record, document_sha256, record_bytes  # noqa: E402
from supervisor.report.pdf import render_pdf  # noqa: E402


def _pdf_text(d: dict, tmp: Path) -> tuple[dict, str]:
    path = tmp / "plan.toml"
    path.write_bytes(tomli_w.dumps(d).encode("utf-8"))
    check = run_check(path)
    record = build_record(check, path.read_bytes())
    pdf = render_pdf(record, document_sha256(record_bytes(record)))
    pages = [re.sub(r"\s+", " ", p.extract_text()) for p in PdfReader(io.BytesIO(pdf)).pages]
    return check, " ".join(pages)


def test_in_water_lower_bound_is_marked_in_json_text_and_pdf(tmp_path):
    check, text = _pdf_text(data(bottom_time_min=50, decompression="in-water-oxygen",
                                 stops=[{"depth": 30, "minutes": 10, "gas": "oxygen"}]),
                            tmp_path)
    ox = check["dives"][0]["oxygen"]
    assert ox["cns_is_lower_bound"] is True
    assert "at least" in text and "(lower bound)" in text
    msgs = [f["message"] for f in check["findings"] if f["rule"] == "oxygen-po2-range"]
    assert any("at least" in m and "lower bound" in m for m in msgs)


def test_chamber_oxygen_gets_no_in_water_cns_in_the_pdf(tmp_path):
    d = data(max_depth=100, bottom_time_min=30, decompression="surface-oxygen",
             surface_transfer_min=2,
             stops=[{"depth": 40, "minutes": 2},
                    {"depth": 50, "minutes": 30, "gas": "oxygen", "place": "chamber"}])
    check, text = _pdf_text(d, tmp_path)
    assert check["dives"][0]["oxygen"]["chamber_oxygen"]["rule"] == "proc-o2-chamber-periods"
    assert "in-water CNS [% of limit]" in text
    assert "chamber oxygen (no CNS %" in text
    assert "water and chamber counted on the in-water table" not in text
