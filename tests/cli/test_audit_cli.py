"""``supervisor audit`` end to end: one log, a folder of logs, --record on both stores.

The plan and logs are the invented demo job of ``examples/`` (the D2 timed log
has its 40 fsw stop cut short: 2 of the approved 3 min) and variants of them
written in the test; exit codes are the check's (0/1/2), and bad input stores
nothing.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from supervisor.cli import main
from supervisor.records.store import RecordStore
from tests.records.conftest import db_url, pg_cluster  # noqa: F401 - fixtures

ROOT = Path(__file__).resolve().parents[2]
PLAN = ROOT / "examples" / "demo-job.toml"
D2 = ROOT / "examples" / "logs" / "demo-d2-log.toml"
D1 = ROOT / "examples" / "logs" / "demo-d1-recorder.csv"


def run(args: list[str], capsys) -> tuple[int, str, str]:
    with pytest.raises(SystemExit) as exc:
        main(args)
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


def audit(log: Path, capsys, *extra: str) -> tuple[int, str, str]:
    return run(["audit", str(log), "--plan", str(PLAN), *extra], capsys)


def test_timed_log_with_a_cut_short_stop_does_not_conform(capsys):
    code, out, err = audit(D2, capsys)
    assert code == 1, err
    assert "audit-stops" in out and "40 fsw water stop on air: 2.0 min" in out
    assert "action (audit-stops)" in out and "verdict: does-not-conform" in out


def test_json_object(capsys):
    code, out, _ = audit(D2, capsys, "--json")
    assert code == 1
    j = json.loads(out)
    assert j["schema"] == "supervisor.audit/1" and j["dive"] == "D2" and j["unit"] == "fsw"
    for key in ("plan_sha256", "log", "executed", "required_schedule", "findings", "counts",
                "verdict", "cautions"):
        assert key in j
    assert j["log"]["source"]["file"] == "demo-d2-log.toml"
    assert j["executed"]["surface_interval_min"] == pytest.approx(3.83, abs=0.01)
    stops = {(s["depth"], s["place"]): s for s in j["executed"]["stops"]}
    assert stops[(40.0, "water")]["short"] and not stops[(60.0, "water")]["short"]
    bad = [f for f in j["findings"] if f["severity"] == "fail"]
    assert [f["rule"] for f in bad] == ["audit-stops"] and bad[0]["action"]["citation"]
    assert j["counts"]["fail"] == 1 and j["verdict"] == "does-not-conform"


def test_recorder_csv_needs_the_dive(capsys):
    code, _, err = audit(D1, capsys)
    assert code == 2 and "--dive" in err
    code, out, err = audit(D1, capsys, "--dive", "D1")
    assert code == 0, err
    assert "verdict: needs-review" in out


@pytest.mark.parametrize("args, needle", [
    (["--dive", "D1"], "differs from the log's dive"),
    (["--dive", "D9"], "D9"),
])
def test_dive_mismatch_is_bad_input(capsys, args, needle):
    log = D2 if args[1] == "D1" else D1
    code, out, err = audit(log, capsys, *args)
    assert code == 2 and needle in err and out == ""
    assert len(err.strip().splitlines()) == 1


@pytest.mark.parametrize("name, text, needle", [
    ("empty.csv", "", "line 1: the file is empty"),
    ("unsorted.csv", "time_s,depth_fsw,gas\n0,0,air\n10,5,air\n5,6,air\n",
     "line 4: unsorted times"),
    ("units.csv", "time_s,depth_fsw,gas\n0,0,air\n10,5 m,air\n", "line 3: mixed units"),
    ("binary.csv", "time_s,depth_fsw\n\x00\x01\x02", "binary"),
    ("deep.csv", "time_s,depth_fsw,gas\n0,0,air\n10,9000,air\n", "line 3: depth 9000"),
])
def test_bad_logs_exit_2_and_store_nothing(capsys, tmp_path, name, text, needle):
    log = tmp_path / name
    log.write_text(text, encoding="utf-8")
    db = tmp_path / "records.sqlite3"
    code, out, err = audit(log, capsys, "--dive", "D1", "--record", "--db", str(db))
    assert code == 2 and needle in err and name in err and out == ""
    assert len(err.strip().splitlines()) == 1
    assert not db.exists()


def test_bad_plan_exit_2(capsys, tmp_path):
    plan = tmp_path / "plan.toml"
    plan.write_text('schema = "supervisor-plan/1"\nunit = "fsw"\n', encoding="utf-8")
    code, out, err = run(["audit", str(D2), "--plan", str(plan)], capsys)
    assert code == 2 and err.startswith("error:") and out == ""


def _folder(tmp_path: Path) -> Path:
    folder = tmp_path / "logs"
    folder.mkdir()
    shutil.copy(D2, folder / "demo-d2-log.toml")
    shutil.copy(D1, folder / "D1-recorder.csv")
    return folder


def test_folder_of_logs_summary_lines_and_worst_exit(capsys, tmp_path):
    code, out, err = audit(_folder(tmp_path), capsys)
    assert code == 1, err
    lines = out.strip().splitlines()
    assert lines[0].startswith("D1 D1-recorder.csv: needs-review")
    assert lines[1].startswith("D2 demo-d2-log.toml: does-not-conform")
    assert lines[-1] == "verdict: does-not-conform (2 logs)"
    assert "[" not in err  # piped: no progress bar


def test_folder_json_is_a_list(capsys, tmp_path):
    code, out, _ = audit(_folder(tmp_path), capsys, "--json")
    objs = json.loads(out)
    assert code == 1 and [o["dive"] for o in objs] == ["D1", "D2"]


def test_folder_log_without_a_dive_is_bad_input(capsys, tmp_path):
    folder = _folder(tmp_path)
    shutil.copy(D1, folder / "morning.csv")
    code, out, err = audit(folder, capsys)
    assert code == 2 and "morning.csv" in err and out == ""
    # --dive names the dive of the logs that name none
    code, out, _ = audit(folder, capsys, "--dive", "D1")
    assert code == 1 and out.count("D1 ") == 2


def test_progress_bar_on_a_terminal(monkeypatch, capsys):
    from supervisor.cli.audit import _Progress

    monkeypatch.setattr("sys.stderr.isatty", lambda: True)
    bar = _Progress(4, "auditing")
    for _ in range(4):
        bar.step()
    bar.close()
    err = capsys.readouterr().err
    assert "auditing [" in err and "4/4" in err


def test_chamber_stop_cut_short_in_a_timed_log_fails(capsys, tmp_path):
    text = D2.read_text(encoding="utf-8").replace(
        'at = 10:49:30\nevent = "chamber-left-stop"', 'at = 10:43:30\nevent = "chamber-left-stop"'
    ).replace("at = 10:50:50", "at = 10:44:50")
    log = tmp_path / "d2.toml"
    log.write_text(text, encoding="utf-8")
    code, out, _ = audit(log, capsys, "--json")
    bad = [f for f in json.loads(out)["findings"] if f["rule"] == "audit-stops"]
    assert code == 1 and any("40 fsw chamber stop on oxygen: 9.0 min" == f["measured"]
                             for f in bad)


def _count(db: str) -> int:
    with RecordStore.open(db) as store:
        return store.count()


def test_record_stores_the_plan_dive_and_audit(capsys, db_url):  # noqa: F811
    code, _, err = audit(D2, capsys, "--record", "--db", db_url)
    assert code == 1, err
    with RecordStore.open(db_url) as store:
        kinds = [r.kind for r in store.records()]
        assert kinds == ["job", "plan", "dive", "audit"]
        rec = store.records(kind="audit")[0]
        assert rec.body["verdict"] == "does-not-conform"
        assert rec.body["schema"] == "supervisor.audit/1"
        assert any(f["rule"] == "audit-stops" for f in store.findings(rec.seq))
        assert store.verify().intact
    # the plan is on record: a second audit adds its dive and audit only
    code, _, _ = audit(D2, capsys, "--record", "--db", db_url)
    assert code == 1 and _count(db_url) == 6
    code, out, _ = run(["records", "verify", "--db", db_url], capsys)
    assert code == 0 and "INTACT" in out


def test_record_of_a_csv_needs_the_repetitive_status(capsys, db_url):  # noqa: F811
    code, _, _ = audit(D2, capsys, "--record", "--db", db_url)
    before = _count(db_url)
    code, out, err = audit(D1, capsys, "--dive", "D1", "--record", "--db", db_url)
    assert code == 2 and "--group" in err and _count(db_url) == before
    code, _, err = audit(D1, capsys, "--dive", "D1", "--record", "--db", db_url,
                         "--no-exposure-24h")
    assert code == 0, err
    assert _count(db_url) == before + 2


def test_folder_record_is_one_transaction(capsys, tmp_path, db_url):  # noqa: F811
    folder = _folder(tmp_path)
    # a recorder log without its repetitive status: nothing of the folder is stored
    code, _, err = audit(folder, capsys, "--record", "--db", db_url)
    assert code == 2 and "--group" in err
    with RecordStore.open(db_url, create=True) as store:
        assert store.count() == 0
    code, _, err = audit(folder, capsys, "--record", "--db", db_url, "--no-exposure-24h")
    assert code == 1, err
    with RecordStore.open(db_url) as store:
        assert [r.kind for r in store.records()] == ["job", "plan", "dive", "audit", "dive",
                                                     "audit"]
        assert store.verify().intact
