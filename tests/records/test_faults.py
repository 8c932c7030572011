"""Fault tests of the record store, on SQLite and PostgreSQL through the same functions.

* a writer killed with SIGKILL in the middle of a batch leaves no partial record
  and a chain that verifies;
* four processes writing at once lose nothing and keep one unbroken chain;
* a row changed behind the tool's back with the database's own client (the
  ``sqlite3`` module, ``psql``) is found by ``records verify``.

Expected values are the project's own contract (append-only, hash chain), not
outside figures.
"""

from __future__ import annotations

import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from supervisor.records.store import NewRecord, RecordStore

ROOT = Path(__file__).resolve().parents[2]


def _writer(db: str, *args: str) -> subprocess.Popen[bytes]:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.Popen([sys.executable, "-m", "tests.records._writer", db, *args],
                            cwd=ROOT, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE)


def test_sigkill_mid_batch_leaves_no_partial_record(store: RecordStore, db_url: str,
                                                    tmp_path: Path) -> None:
    store.append(NewRecord("job", {"before": True}, job="before"))
    marker = tmp_path / "first-insert-done"
    proc = _writer(db_url, "slow-batch", "20", "killed", str(marker))
    deadline = time.monotonic() + 60
    while not marker.exists():
        if proc.poll() is not None or time.monotonic() > deadline:
            _out, err = proc.communicate()
            pytest.fail(f"the writer never started its batch: {err.decode()}")
        time.sleep(0.05)
    time.sleep(0.7)  # a few more inserts of the batch are in, uncommitted
    proc.send_signal(signal.SIGKILL)
    proc.communicate(timeout=30)
    assert proc.returncode == -signal.SIGKILL
    fresh = RecordStore.open(db_url)
    try:
        assert fresh.count() == 1
        assert fresh.records(job="killed") == []
        report = fresh.verify()
        assert report.intact, report.problem
        # the store still takes writes after the crash
        fresh.append(NewRecord("job", {"after": True}, job="after"))
        assert fresh.verify().intact
    finally:
        fresh.close()


def test_four_writers_at_once_lose_nothing(store: RecordStore, db_url: str) -> None:
    n = 25
    procs = [_writer(db_url, "many", str(n), f"w{k}") for k in range(4)]
    for p in procs:
        out, err = p.communicate(timeout=240)
        assert p.returncode == 0, err.decode()
    assert store.count() == 4 * n
    for k in range(4):
        got = sorted(r.body["i"] for r in store.records(job=f"w{k}"))
        assert got == list(range(n))
    seqs = [r.seq for r in store.records()]
    assert seqs == list(range(1, 4 * n + 1))
    report = store.verify()
    assert report.intact, report.problem
    assert report.count == 4 * n


def _tamper(db_url: str, sql: list[str]) -> subprocess.CompletedProcess[str] | None:
    """Run SQL with the database's own client: the sqlite3 module, or psql."""
    if "://" not in db_url:
        import sqlite3

        conn = sqlite3.connect(db_url)
        try:
            for statement in sql:
                conn.execute(statement)
            conn.commit()
        finally:
            conn.close()
        return None
    psql = shutil.which("psql")
    if psql is None:
        pytest.skip("psql not on PATH")
    return subprocess.run([psql, "-v", "ON_ERROR_STOP=1", "-q", db_url, "-c", "; ".join(sql)],
                          capture_output=True, text=True, check=False, timeout=60)


def _disable(db_url: str, table: str) -> str:
    if "://" in db_url:
        return f"ALTER TABLE {table} DISABLE TRIGGER USER"
    return {"records": "DROP TRIGGER records_no_update",
            "record_bodies": "DROP TRIGGER record_bodies_no_update"}[table]


@pytest.fixture
def filled(store: RecordStore) -> RecordStore:
    for i in range(5):
        store.append(NewRecord("job", {"i": i, "site": "Pier 9 (fictional)"}, job=f"j{i}",
                               diver="Ada Fenwick"))
    assert store.verify().intact
    return store


def test_client_update_is_refused_by_the_trigger(filled: RecordStore, db_url: str) -> None:
    sql = ["UPDATE records SET diver = 'Someone Else' WHERE seq = 3"]
    if "://" in db_url:
        done = _tamper(db_url, sql)
        assert done is not None and done.returncode != 0
        assert "append-only" in done.stderr
    else:
        import sqlite3

        with pytest.raises(sqlite3.DatabaseError, match="append-only"):
            _tamper(db_url, sql)
    assert filled.get(3).diver == "Ada Fenwick"
    assert filled.verify().intact


def test_header_changed_behind_the_tools_back_is_found(filled: RecordStore, db_url: str
                                                       ) -> None:
    done = _tamper(db_url, [_disable(db_url, "records"),
                            "UPDATE records SET diver = 'Someone Else' WHERE seq = 3"])
    assert done is None or done.returncode == 0, done.stderr if done else ""
    report = filled.verify()
    assert report.first_bad == 3
    assert "header" in report.problem


def test_body_changed_behind_the_tools_back_is_found(filled: RecordStore, db_url: str) -> None:
    done = _tamper(db_url, [_disable(db_url, "record_bodies"),
                            "UPDATE record_bodies SET body = replace(body, 'Pier 9', 'Pier 8') "
                            "WHERE seq = 4"])
    assert done is None or done.returncode == 0, done.stderr if done else ""
    report = filled.verify()
    assert report.first_bad == 4
    assert "content" in report.problem
