"""The checklist PDF prints a computed stop with air breaks as its periods (issue 8).

A fictional 130 fsw / 150 min air dive with in-water oxygen from 30 fsw (the check's
own model schedule has oxygen stops of more than 30 min): the PDF must show their
periods, never one continuous oxygen line.  Expected figures come from the check JSON
of the same plan (this project's own output), not from an outside table.
"""

from __future__ import annotations

import hashlib
import io
import re
import tomllib
from pathlib import Path

from pypdf import PdfReader

from supervisor.check import check_plan
from supervisor.plan import plan_from_dict
from supervisor.report.document import build_record, document_sha256, record_bytes
from supervisor.report.formatting import fmt_periods
from supervisor.report.pdf import render_pdf

PLANS = Path(__file__).resolve().parents[1] / "data" / "plans"


def test_model_oxygen_stops_print_as_periods() -> None:
    d = tomllib.loads((PLANS / "base-fsw.toml").read_text(encoding="utf-8"))
    d["dives"][0].update(
        max_depth=130, bottom_time_min=150, decompression="in-water-oxygen",
        stops=[{"depth": 40, "minutes": 45}, {"depth": 30, "minutes": 30, "gas": "oxygen"},
               {"depth": 30, "minutes": 5, "gas": "air"},
               {"depth": 30, "minutes": 30, "gas": "oxygen"},
               {"depth": 20, "minutes": 5, "gas": "air"},
               {"depth": 20, "minutes": 30, "gas": "oxygen"}])
    plan_text = b"# fictional plan\n"
    check = check_plan(plan_from_dict(d), plan_sha=hashlib.sha256(plan_text).hexdigest())
    [dive] = check["dives"]
    broken = [s for s in dive["model_schedule"]["stops"] if len(s["periods"]) > 1]
    assert broken, dive["model_schedule"]
    record = build_record(check, plan_text)
    pdf = render_pdf(record, document_sha256(record_bytes(record)))
    text = re.sub(r"\s+", " ", " ".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages))
    for s in broken:
        assert fmt_periods(s["periods"]) in text
    proposed = [s for s in dive["proposed_stops"] if len(s["periods"]) > 1]
    # oxygen, air, oxygen at 30 fsw and air, oxygen at 20 fsw: one stop each
    assert [s["depth"] for s in proposed] == [30, 20]
    assert "O2 30, air 5, O2 30 min" in text and "air 5, O2 30 min" in text
