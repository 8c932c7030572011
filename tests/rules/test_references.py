"""The job-level ``references-unverified`` finding (issue 8 §3: an unverified reference once)."""

from __future__ import annotations

from _engine_plans import data, second_dive, trusted_table

from supervisor.check import check_plan
from supervisor.plan import plan_from_dict


def _findings(d: dict, rule: str) -> list[dict]:
    out = check_plan(plan_from_dict(d))
    return [f for f in out["findings"] if f["rule"] == rule]


def test_one_finding_for_the_job_however_many_dives_use_the_reference() -> None:
    d = second_dive(data())
    got = _findings(d, "references-unverified")
    assert len(got) == 1
    f = got[0]
    assert f["dive"] is None and f["severity"] == "warn" and not f["verified"]
    assert f["message"].startswith("needs review: ")
    names = [r["name"] for r in f["references_to_confirm"]]
    assert len(names) == len(set(names))  # each reference once
    assert "zhl16c" in names  # the coefficients are FROM MEMORY
    assert "tables verify" in f["message"]
    assert f["rule_sources_file"] == "tables/limits/rule-sources.toml"


def test_rows_used_name_their_dives(tmp_path) -> None:
    d = second_dive(data(bottom_time_min=50, decompression="in-water",
                         stops=[{"depth": 10, "minutes": 5}]))
    d["policy"]["reference_table"] = "zhl16c-gf30-85-air-fsw"
    f = _findings(d, "references-unverified")[0]
    ref = next(r for r in f["references_to_confirm"] if r["name"] == "zhl16c-gf30-85-air-fsw")
    dives = sorted(x for row in ref["rows_used"] for x in row["dives"])
    assert dives == ["D1", "D2"]
    assert ref["file"] == "tables/decompression/zhl16c-gf30-85-air-fsw.toml"


def test_per_dive_table_finding_points_to_the_job_finding_without_warning() -> None:
    d = second_dive(data())
    d["policy"]["reference_table"] = "zhl16c-gf30-85-air-fsw"
    per_dive = _findings(d, "table-conformance")
    covered = [f for f in per_dive if "cover" in f["message"] and "do not" not in f["message"]]
    assert covered and all(f["severity"] == "info" and not f["verified"] for f in covered)
    assert all("references-unverified" in f["message"] for f in covered)


def test_coefficients_not_listed_when_verified_rows_carry_every_dive(tmp_path) -> None:
    d = data(bottom_time_min=50, decompression="in-water", stops=[{"depth": 10, "minutes": 5}])
    d["policy"]["reference_table"] = str(trusted_table(tmp_path))
    f = _findings(d, "references-unverified")[0]
    assert "zhl16c" not in [r["name"] for r in f["references_to_confirm"]]
