"""Checklist PDF layout time against the number of dives: linear, and a 50-dive job fast.

Target (issues 8 and 12): ``supervisor checklist`` on a 50-dive job runs in under
4 s, linear in dives.  The check itself belongs to the rules layer and is timed by
``bench_check.py``; this benchmark times what the report adds (the JSON record and
the PDF) on check results of 5 and of 50 dives.  Both are made from the check of
the invented harbour job (``examples/harbour-job-msw.toml``) by repeating its dives
and their findings under new ids, so the content per dive is real.  It prints the
time per dive of the 50-dive job as a ratio to the 5-dive job's, measured in the
same run (1.0 is linear).  Run: ``.venv/bin/python bench/bench_report_layout.py``.
"""

from __future__ import annotations

import copy
import time
from pathlib import Path
from typing import Any

from supervisor.check import run_check
from supervisor.report.document import build_record, document_sha256, record_bytes
from supervisor.report.pdf import render_pdf

ROOT = Path(__file__).resolve().parents[1]
PLAN = ROOT / "examples" / "harbour-job-msw.toml"


def job_of(check: dict[str, Any], dives: int) -> dict[str, Any]:
    """The check with its dives (and their findings) repeated to ``dives`` dives."""
    out = copy.deepcopy(check)
    base = check["dives"]
    out["dives"], out["findings"] = [], [f for f in check["findings"] if f["dive"] is None]
    for n in range(dives):
        dive = copy.deepcopy(base[n % len(base)])
        old, new = dive["id"], f"D{n + 1}"
        dive["id"] = new
        if dive.get("previous_dive"):
            dive["previous_dive"] = f"D{n}" if n else None
        out["dives"].append(dive)
        for f in check["findings"]:
            if f["dive"] == old:
                out["findings"].append({**f, "dive": new})
    out["plan_sha256"] = None
    return out


def best(check: dict[str, Any], plan: bytes, repeat: int = 3) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        record = build_record(check, plan)
        render_pdf(record, document_sha256(record_bytes(record)))
        times.append(time.perf_counter() - t0)
    return min(times)


def main() -> None:
    check = run_check(PLAN)
    plan = PLAN.read_bytes()
    check["plan_sha256"] = None
    small = best(job_of(check, 5), plan)
    large = best(job_of(check, 50), plan)
    ratio = (large / 50) / (small / 5)
    print(f"checklist record + PDF, 5 dives: {small:.2f} s ({small / 5 * 1000:.0f} ms per dive)")
    print(f"checklist record + PDF, 50 dives: {large:.2f} s ({large / 50 * 1000:.0f} ms per dive)")
    flag = "ok" if large < 4.0 else "OVER TARGET"
    print(f"time per dive, 50 against 5 dives: {ratio:.2f}x (1.0 = linear); "
          f"50 dives under 4 s: {flag}")


if __name__ == "__main__":
    main()
