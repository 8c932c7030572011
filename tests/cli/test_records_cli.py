"""``supervisor records ...`` end to end, on SQLite and PostgreSQL (the store's fixtures).

The job, log and people are the invented demo job of ``examples/``; expected
values are those files' own figures and the store's contract (exit codes 0/1/2,
nothing stored on bad input).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from supervisor.cli import main
from supervisor.records.store import RecordStore
from tests.records.conftest import db_url, pg_cluster  # noqa: F401 - fixtures

ROOT = Path(__file__).resolve().parents[2]
EX = ROOT / "examples"
JOB = "2026-06-03-outfall-diffuser-inspection-and-riser-clamp-change"
PASS = "test-passphrase-1"


def run(args: list[str], capsys, db: str | None = None) -> tuple[int, str, str]:
    with pytest.raises(SystemExit) as exc:
        main([*args, "--db", db] if db else args)
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


def _count(db: str) -> int:
    with RecordStore.open(db) as store:
        return store.count()


@pytest.fixture
def recorded(db_url: str, capsys) -> str:  # noqa: F811 - the imported fixture
    code, out, err = run(["records", "add", "plan", str(EX / "demo-job.toml")], capsys, db_url)
    assert code == 0, err
    code, out, err = run(["records", "add", "dive", str(EX / "logs" / "demo-d2-log.toml")], capsys,
                         db_url)
    assert code == 0, err
    assert "recorded #3 dive: dive D2: 110 fsw, BT 40.0 min; table zhl16c-gf30-85-air-fsw, " \
        "schedule 110 fsw / 40 min" in out
    return db_url


def test_add_list_show_verify(recorded: str, capsys) -> None:
    code, out, err = run(["records", "add", "dive", str(EX / "logs" / "demo-d1-recorder.csv"),
                          "--job", JOB, "--dive", "D1", "--diver", "Teodor Lind",
                          "--table", "usn-rev7-air-ndl", "--schedule", "50/50",
                          "--no-exposure-24h"], capsys, recorded)
    assert code == 0, err
    assert "gap: line 305" in out and "duplicate: line 400" in out
    code, out, _ = run(["records", "list"], capsys, recorded)
    assert code == 0
    lines = out.splitlines()
    assert lines[0].split()[:3] == ["SEQ", "KIND", "WHEN"]
    assert [ln.split()[1] for ln in lines[1:]] == ["job", "plan", "dive", "dive"]
    code, out, _ = run(["records", "show", "3", "--json"], capsys, recorded)
    doc = json.loads(out)
    assert doc["body"]["schedule"] == {"depth": 110.0, "bottom_time_min": 40.0}
    assert doc["body"]["no_exposure_24h"] is True
    code, out, _ = run(["records", "verify"], capsys, recorded)
    assert code == 0 and out.startswith("INTACT: ") and "4 records" in out


def test_plan_twice_is_recorded_once(recorded: str, capsys) -> None:
    code, out, _ = run(["records", "add", "plan", str(EX / "demo-job.toml")], capsys, recorded)
    assert code == 0 and "already on record: #2" in out
    assert _count(recorded) == 3


BAD_LOGS = [
    ("time_s,depth_fsw,gas\n0,0,air\n60,12,air\n30,0,air\n", "line 4", "unsorted"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,abc,air\n", "line 3", "not a number"),
    ("", "line 1", "empty"),
    ("time_s,depth_fsw,gas\n0,0,air\n\x00\x00\x00", "line 3", "binary"),
]


@pytest.mark.parametrize(("text", "line", "words"), BAD_LOGS)
def test_bad_log_exits_2_and_stores_nothing(recorded: str, capsys, tmp_path: Path, text: str,
                                            line: str, words: str) -> None:
    log = tmp_path / "bad.csv"
    log.write_text(text)
    before = _count(recorded)
    code, out, err = run(["records", "add", "dive", str(log), "--job", JOB, "--dive", "D1",
                          "--diver", "Teodor Lind", "--table", "t", "--schedule", "50/50",
                          "--no-exposure-24h"], capsys, recorded)
    assert code == 2 and out == ""
    assert len(err.splitlines()) == 1
    assert err.startswith(f"error: {log}, {line}: ") and words in err
    assert _count(recorded) == before


def test_missing_record_fields_exit_2(recorded: str, capsys) -> None:
    code, _out, err = run(["records", "add", "dive", str(EX / "logs" / "demo-d1-recorder.csv"),
                           "--job", JOB, "--dive", "D1", "--diver", "Teodor Lind",
                           "--schedule", "50/50", "--no-exposure-24h"], capsys, recorded)
    assert code == 2 and err.startswith("error: --table: missing")
    code, _out, err = run(["records", "add", "dive", str(EX / "logs" / "demo-d1-recorder.csv"),
                           "--job", JOB, "--dive", "D9", "--diver", "Teodor Lind",
                           "--table", "t", "--schedule", "50/50", "--no-exposure-24h"],
                          capsys, recorded)
    assert code == 2 and "not in the recorded plan" in err
    assert _count(recorded) == 3


def test_correction_and_signature(recorded: str, capsys, tmp_path: Path,
                                  monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("SUPERVISOR_KEY_PASSPHRASE", PASS)
    key = tmp_path / "mara.p12"
    assert run(["keys", "new", "--name", "Mara Okonjo (fictional)", "--out", str(key)],
               capsys)[0] == 0
    code, out, err = run(["records", "add", "dive", str(EX / "logs" / "demo-d2-log.toml"),
                          "--bottom-time", "41", "--corrects", "3", "--reason",
                          "bottom time re-read from the dive sheet", "--sign", str(key)],
                         capsys, recorded)
    assert code == 0, err
    assert "recorded #4 dive" in out and "recorded #5 signature" in out
    code, out, _ = run(["records", "list"], capsys, recorded)
    assert "CORRECTED by #4" in out and "corrects #3" in out and "signed #5" in out
    code, out, _ = run(["records", "verify", "--json"], capsys, recorded)
    doc = json.loads(out)
    assert code == 0 and doc["intact"] and doc["signatures"][0]["valid"]
    code, _out, err = run(["records", "add", "dive", str(EX / "logs" / "demo-d2-log.toml"),
                           "--reason", "no target"], capsys, recorded)
    assert code == 2 and "--reason" in err


@pytest.mark.parametrize("db_url", ["sqlite"], indirect=True)   # psql: tests/records
def test_verify_names_the_first_changed_record(recorded: str, capsys) -> None:
    import sqlite3

    conn = sqlite3.connect(recorded)
    conn.execute("DROP TRIGGER record_bodies_no_update")
    conn.execute("UPDATE record_bodies SET body = replace(body, '\"max_depth\":110.0', "
                 "'\"max_depth\":60.0') WHERE seq = 3")
    conn.commit()
    conn.close()
    code, out, _ = run(["records", "verify"], capsys, recorded)
    assert code == 1
    assert out.startswith(f"BROKEN: {recorded}: record 3 does not match")


def test_export_json_and_csv(recorded: str, capsys, tmp_path: Path) -> None:
    out_file = tmp_path / "all.json"
    code, out, _ = run(["records", "export", "--out", str(out_file)], capsys, recorded)
    assert code == 0 and json.loads(out_file.read_text())["head"]["seq"] == 3
    code, _out, err = run(["records", "export", "--out", str(out_file)], capsys, recorded)
    assert code == 2 and "never written over" in err
    code, out, _ = run(["records", "export", "--format", "csv", "--kind", "dive"], capsys,
                       recorded)
    assert code == 0 and out.splitlines()[0].startswith("seq,kind,") and len(
        out.splitlines()) == 2


def test_retention_archive_and_purge(recorded: str, capsys, tmp_path: Path,
                                     monkeypatch: pytest.MonkeyPatch) -> None:
    code, out, _ = run(["records", "retention", "--as-of", "2027-06-02"], capsys, recorded)
    assert code == 0 and "0 may be archived" in out and "29 CFR 1910.440(b)(3)" in out
    archive = tmp_path / "archive.json"
    code, out, _ = run(["records", "retention", "--as-of", "2027-06-03", "--archive",
                        str(archive)], capsys, recorded)
    assert code == 0 and "3 may be archived" in out and archive.exists()
    code, _out, err = run(["records", "purge", "--archive", str(archive), "--as-of",
                           "2027-06-03"], capsys, recorded)   # no confirmation typed
    assert code == 2 and "not confirmed" in err
    monkeypatch.setattr("typer.prompt", lambda *a, **k: "2")   # the wrong number typed
    code, _out, err = run(["records", "purge", "--archive", str(archive), "--as-of",
                           "2027-06-03"], capsys, recorded)
    assert code == 2 and "not confirmed" in err
    with RecordStore.open(recorded) as store:
        assert all(r.body is not None for r in store.records())
    code, out, _ = run(["records", "purge", "--archive", str(archive), "--as-of",
                        "2027-06-03", "--yes", "--by", "Mara Okonjo"], capsys, recorded)
    assert code == 0 and "removed 3 record bodies; tombstone #4" in out
    code, out, _ = run(["records", "verify"], capsys, recorded)
    assert code == 0 and "3 record bodies removed under tombstones" in out


def test_no_store_and_bad_db(capsys, tmp_path: Path) -> None:
    code, _out, err = run(["records", "list"], capsys, str(tmp_path / "none.sqlite3"))
    assert code == 2 and "no record store" in err
    code, _out, err = run(["records", "list"], capsys, "mysql://x@h/db")
    assert code == 2 and err.startswith("error: --db: ")


def test_schemas_print(capsys) -> None:
    code, out, _ = run(["records", "schema", "dcs"], capsys)
    assert code == 0 and json.loads(out)["$id"] == "urn:supervisor:schema:supervisor-dcs/1"
    code, out, _ = run(["log", "schema"], capsys)
    assert code == 0 and json.loads(out)["$id"] == "urn:supervisor:schema:supervisor-log/1"


def test_signed_checklist_is_recorded_with_its_signer(capsys, tmp_path: Path,
                                                      monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("SUPERVISOR_KEY_PASSPHRASE", PASS)
    db = str(tmp_path / "r.sqlite3")
    key = tmp_path / "mara.p12"
    assert run(["keys", "new", "--name", "Mara Okonjo (fictional)", "--out", str(key)],
               capsys)[0] == 0
    out_dir = tmp_path / "cl"
    code, _out, err = run(["checklist", str(EX / "demo-job.toml"), "--out", str(out_dir),
                           "--sign", str(key)], capsys)
    assert code in (0, 1), err
    checklist = next(out_dir.glob("*-checklist.json"))
    code, out, err = run(["records", "add", "checklist", str(checklist)], capsys, db)
    assert code == 0, err
    assert "recorded #1 job" in out and "recorded #2 plan" in out
    assert "recorded #3 checklist" in out and "signed by Mara Okonjo (fictional)" in out
    with RecordStore.open(db) as store:
        body = store.get(3).body
    assert body["signature_status"] == "valid" and body["fingerprint_sha256"]
    # a checklist changed after signing is refused with exit 1, nothing recorded
    checklist.write_text(checklist.read_text().replace("Halden", "Holden"))
    code, out, err = run(["records", "add", "checklist", str(checklist)], capsys, db)
    assert code == 1 and "signature does not verify" in err, err
    assert _count(db) == 3


def test_elapsed_time_log_needs_its_start(recorded: str, capsys, tmp_path: Path) -> None:
    log = tmp_path / "d1.csv"
    log.write_text("time_min,depth_fsw,gas\n0,0,air\n1,45,air\n44,45,air\n46,0,air\n")
    args = ["records", "add", "dive", str(log), "--job", JOB, "--dive", "D1", "--diver",
            "Teodor Lind", "--table", "usn-rev7-air-ndl", "--schedule", "50/50",
            "--no-exposure-24h"]
    code, _out, err = run(args, capsys, recorded)
    assert code == 2 and err.startswith("error: --started: ")
    code, _out, err = run([*args, "--started", "2026-06-03T08:40"], capsys, recorded)
    assert code == 0, err
    with RecordStore.open(recorded) as store:
        assert store.get(4).occurred_at == "2026-06-03T08:40:00"
