"""Issue 8 §3: ``conforms`` is reachable for a plain dive once every reference is confirmed.

A no-stop surface-supplied air dive under OSHA (the invented harbour job's first
dive), checked against a copy of the bundled tables in which every file and row is
marked VERIFIED and a second person's check is recorded (``tables verify``), must
conform.  With the bundled tables as shipped the same plan needs review, and the
one job-level ``references-unverified`` finding says why.

The verified copy is this test's own construction (no outside source is claimed):
it stands for a contractor's copy after a two-person check against the documents.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest
import tomli_w

from supervisor.references.verify import verify_rows
from supervisor.resources import TABLES_ENV

ROOT = Path(__file__).resolve().parent.parent
HARBOUR = ROOT / "examples" / "harbour-job-msw.toml"


def _verified_copy(dst: Path) -> Path:
    shutil.copytree(ROOT / "tables", dst)
    for f in sorted(dst.rglob("*.toml")):
        doc = tomllib.loads(f.read_text(encoding="utf-8"))
        prov = doc["provenance"]
        prov["source_status"] = "VERIFIED"
        prov["transcribed_on"] = prov.get("transcribed_on") or "2026-12-01"
        prov["transcribed_by"] = prov.get("transcribed_by") or "project engineering team"
        for row in doc.get("rows", []):
            if "source_status" in row:
                row["source_status"] = "VERIFIED"
            if "value_status" in row:
                row["value_status"] = dict.fromkeys(row["value_status"], "VERIFIED")
        f.write_text(tomli_w.dumps(doc), encoding="utf-8")
        verify_rows(f, "all", "Second Checker", "read against the source (test copy)",
                    "2026-12-02")
    return dst


def _one_dive_plan(tmp: Path) -> Path:
    plan = tomllib.loads(HARBOUR.read_text(encoding="utf-8"))
    plan["dives"] = plan["dives"][:1]  # D1: 12 msw, 60 min, no stops, surface-supplied air
    path = tmp / "one-dive.toml"
    path.write_text(tomli_w.dumps(plan), encoding="utf-8")
    return path


def _check(plan: Path, tables: Path | None) -> dict:
    env = {k: v for k, v in os.environ.items() if k != TABLES_ENV}
    if tables is not None:
        env[TABLES_ENV] = str(tables)
    res = subprocess.run([sys.executable, "-m", "supervisor", "check", str(plan), "--json"],
                         capture_output=True, text=True, env=env, check=False)
    assert res.returncode in (0, 1), res.stderr
    return json.loads(res.stdout)


@pytest.fixture(scope="module")
def verified(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    tmp = tmp_path_factory.mktemp("verified")
    return _verified_copy(tmp / "tables"), _one_dive_plan(tmp)


def test_plain_dive_conforms_with_verified_references(verified: tuple[Path, Path]) -> None:
    tables, plan = verified
    out = _check(plan, tables)
    blocking = [(f["rule"], f["severity"], f["message"][:120]) for f in out["findings"]
                if f["severity"] in ("fail", "warn") or not f["verified"]]
    assert out["verdict"] == "conforms", blocking
    ref = next(f for f in out["findings"] if f["rule"] == "references-unverified")
    assert ref["severity"] == "pass" and ref["references_to_confirm"] == []


def test_same_dive_needs_review_with_bundled_references(verified: tuple[Path, Path]) -> None:
    _, plan = verified
    out = _check(plan, None)
    assert out["verdict"] == "needs-review"
    refs = [f for f in out["findings"] if f["rule"] == "references-unverified"]
    assert len(refs) == 1 and refs[0]["dive"] is None and refs[0]["severity"] == "warn"
    names = {r["name"] for r in refs[0]["references_to_confirm"]}
    assert {"zhl16c-gf30-85-air-msw", "noaa-cns-limits"} <= names
    assert all("tables verify" in r["how_to_confirm"] for r in refs[0]["references_to_confirm"])


def test_a_tables_folder_that_is_not_one_is_bad_input(tmp_path: Path) -> None:
    env = {**os.environ, TABLES_ENV: str(tmp_path / "missing")}
    res = subprocess.run([sys.executable, "-m", "supervisor", "check", str(HARBOUR)],
                         capture_output=True, text=True, env=env, check=False)
    assert res.returncode == 2 and "Traceback" not in res.stderr
    assert len(res.stderr.strip().splitlines()) == 1 and TABLES_ENV in res.stderr
