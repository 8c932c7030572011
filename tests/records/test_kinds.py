"""Record contents built from the tool's objects: plans, logs, findings, cases.

Fields follow 29 CFR 1910.423(d) and 46 CFR 197.482 (the record of dive: max
depth, bottom time, table and schedule, repetitive designation or time since
the last exposure); the values are those of the fictional inputs.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from supervisor.errors import InputError
from supervisor.plan import load_plan
from supervisor.records.importers.timed import read_timed_log
from supervisor.records.kinds import (
    audit_record,
    dcs_record,
    dive_record,
    job_record,
    job_ref,
    parse_schedule,
    plan_record,
    profile_from_json,
    profile_to_json,
)
from supervisor.records.store import StoredRecord

ROOT = Path(__file__).resolve().parents[2]


def _dive_stored(seq: int = 3) -> StoredRecord:
    return StoredRecord(seq, "dive", "t", "2026-06-03T10:15:00", "job", "Priya Raman", None,
                        None, "0" * 64, "0" * 64, "1" * 64, {})


def test_job_and_plan_of_the_demo_job() -> None:
    path = ROOT / "examples" / "demo-job.toml"
    plan = load_plan(path)
    ref = job_ref(plan)
    assert ref == "2026-06-03-outfall-diffuser-inspection-and-riser-clamp-change"
    job = job_record(plan, ref)
    assert job.body["jurisdiction"] == "osha-1910-t" and job.occurred_at == "2026-06-03"
    rec = plan_record(plan, path.read_bytes(), path.name, ref, 1)
    assert rec.body["plan_text"] == path.read_text()
    assert [d["id"] for d in rec.body["dives"]] == ["D1", "D2", "D3"]
    assert rec.refers_to == 1


def test_dive_record_keeps_the_profile_exactly() -> None:
    log = read_timed_log(ROOT / "examples" / "logs" / "demo-d2-log.toml")
    rec = dive_record(log, dive="D2", diver="Priya Raman", table="t",
                      schedule={"depth": 110, "bottom_time_min": 40}, repetitive_group=None,
                      hours_since_last_exposure=None, no_exposure_24h=True, ref="job",
                      plan_seq=2)
    assert rec.body["max_depth"] == 110 and rec.body["bottom_time_min"] == 40
    back = profile_from_json(rec.body["profile"])
    assert back.segments == log.profile.segments
    assert profile_to_json(back) == rec.body["profile"]
    assert rec.occurred_at == "2026-06-03T09:30:00" and rec.diver == "Priya Raman"


def test_dive_record_needs_the_repetitive_status() -> None:
    log = read_timed_log(ROOT / "examples" / "logs" / "demo-d2-log.toml")
    with pytest.raises(InputError, match="197.482"):
        dive_record(log, dive="D2", diver="x", table="t", schedule={}, repetitive_group=None,
                    hours_since_last_exposure=None, no_exposure_24h=False, ref=None,
                    plan_seq=None)
    with pytest.raises(InputError, match="under 24 h"):
        dive_record(log, dive="D2", diver="x", table="t", schedule={}, repetitive_group=None,
                    hours_since_last_exposure=30, no_exposure_24h=False, ref=None,
                    plan_seq=None)


def test_parse_schedule() -> None:
    assert parse_schedule("100/40") == {"depth": 100.0, "bottom_time_min": 40.0}
    for bad in ("100", "a/b", "-1/40", "100/40/2"):
        with pytest.raises(InputError, match="--schedule"):
            parse_schedule(bad)


def test_audit_verdict_follows_the_check_rule() -> None:
    f = {"rule": "r", "message": "m", "citation": "c"}
    dive = _dive_stored()
    assert audit_record(dive, [{**f, "severity": "pass"}]).body["verdict"] == "conforms"
    assert audit_record(dive, [{**f, "severity": "pass", "verified": False}]) \
        .body["verdict"] == "needs-review"
    assert audit_record(dive, [{**f, "severity": "warn"}]).body["verdict"] == "needs-review"
    assert audit_record(dive, [{**f, "severity": "fail"}, {**f, "severity": "pass"}]) \
        .body["verdict"] == "does-not-conform"
    assert audit_record(dive, []).body["verdict"] == "needs-review"   # nothing was checked
    with pytest.raises(InputError, match="severity"):
        audit_record(dive, [{**f, "severity": "fine"}])


def test_dcs_case_from_toml(tmp_path: Path) -> None:
    p = tmp_path / "case.toml"
    p.write_text('schema = "supervisor-dcs/1"\ndiver = "Priya Raman"\ndive_record = 3\n'
                 'onset = 2026-06-03T12:20:00\nonset_depth = 0\nunit = "fsw"\n'
                 'symptoms = ["shoulder pain"]\nhospitalized_24h = false\n')
    rec = dcs_record(p)
    assert rec.refers_to == 3 and rec.body["symptoms"] == ["shoulder pain"]
    p.write_text(p.read_text().replace('symptoms = ["shoulder pain"]', "symptoms = []"))
    with pytest.raises(InputError, match="line 7"):
        dcs_record(p)
