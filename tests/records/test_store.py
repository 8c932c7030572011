"""The record store on SQLite and PostgreSQL, through the same test functions.

Expected values are the store's own contract (chain order, append-only,
corrections, purges), written out by hand; no outside figures.
"""

from __future__ import annotations

import pytest

from supervisor.errors import InputError
from supervisor.records.chain import GENESIS, record_hash
from supervisor.records.store import NewRecord, RecordStore, StoreError


def _job(i: int, **kw: object) -> NewRecord:
    return NewRecord("job", {"i": i, "site": "Gull Point (fictional)"}, job=f"job-{i}", **kw)


def test_append_links_each_record_to_the_one_before(store: RecordStore) -> None:
    a = store.append(_job(1))
    b = store.append(_job(2, diver="Ada Fenwick"))
    assert (a.seq, b.seq) == (1, 2)
    assert a.prev_hash == GENESIS
    assert b.prev_hash == a.record_hash
    assert record_hash(b.columns()) == b.record_hash
    got = store.get(2)
    assert got == b and got.body == {"i": 2, "site": "Gull Point (fictional)"}
    assert [r.seq for r in store.records(diver="Ada Fenwick")] == [2]
    report = store.verify()
    assert report.intact and report.count == 2 and report.head_hash == b.record_hash


def test_batch_is_all_or_nothing(store: RecordStore) -> None:
    store.append(_job(0))

    def bad(_done: list) -> NewRecord:
        return NewRecord("no-such-kind", {})

    with pytest.raises(InputError, match="kind"):
        store.append_batch([_job(1), _job(2), bad])
    assert store.count() == 1
    done = store.append_batch([_job(1), lambda d: NewRecord("plan", {"x": 1},
                                                            refers_to=d[0].seq)])
    assert [r.refers_to for r in done] == [None, 2]
    assert store.verify().intact


def test_correction_keeps_the_original_and_names_it(store: RecordStore) -> None:
    store.append(_job(1))
    fixed = store.append(NewRecord("job", {"i": 1, "site": "Gull Point North (fictional)"},
                                   job="job-1", corrects=1))
    assert store.get(1).body["site"] == "Gull Point (fictional)"
    assert store.corrected_by() == {1: fixed.seq}
    with pytest.raises(InputError, match="kind of what it corrects"):
        store.append(NewRecord("plan", {}, corrects=1))
    with pytest.raises(InputError, match="does not exist"):
        store.append(NewRecord("job", {}, corrects=99))
    assert store.verify().intact


def test_audit_findings_go_to_the_findings_table(store: RecordStore) -> None:
    store.append(NewRecord("dive", {"dive": "D1"}, diver="Ada Fenwick"))
    findings = [
        {"rule": "audit-ascent-rate", "severity": "fail", "message": "ascent too fast",
         "measured": 61.234, "limit": 30.0, "unit": "fsw/min", "citation": "own example",
         "dive": "D1", "source_status": "VERIFIED", "verified": True, "family": "audit",
         "window_s": 60},
        {"rule": "audit-stops", "severity": "pass", "message": "stops kept",
         "citation": "own example"},
    ]
    store.append(NewRecord("audit", {"findings": findings}, refers_to=1))
    rows = store.findings(2)
    assert [r["rule"] for r in rows] == ["audit-ascent-rate", "audit-stops"]
    assert rows[0]["measured"] == 61.234 and rows[0]["unit"] == "fsw/min"
    assert rows[1]["verified"] is True and rows[1]["measured"] is None
    assert store.verify().intact


def test_findings_rows_that_differ_from_the_content_are_found(store: RecordStore) -> None:
    from sqlalchemy import insert

    from supervisor.records import schema as S

    store.append(NewRecord("audit", {"findings": []}))
    with store.engine.begin() as conn:  # a row slipped in behind the tool's back
        conn.execute(insert(S.findings).values(seq=1, position=0, rule="x", severity="pass",
                                               message="m", citation="", verified=True,
                                               family=""))
    report = store.verify()
    assert report.first_bad == 1 and "findings" in report.problem


def test_purge_removes_bodies_under_a_tombstone_and_the_chain_verifies(store: RecordStore
                                                                       ) -> None:
    for i in range(3):
        store.append(_job(i))
    old = store.get(2)
    stone = store.purge(NewRecord("tombstone", {"reason": "test", "removed": [
        {"seq": 2, "content_sha256": old.content_sha256}]}), [2])
    assert stone.seq == 4
    assert store.get(2).body is None
    assert store.get(2).record_hash == old.record_hash
    report = store.verify()
    assert report.intact, report.problem
    assert report.purged == 1


def test_body_deleted_without_a_tombstone_is_found(store: RecordStore, db_url: str) -> None:
    from sqlalchemy import insert

    from supervisor.records import schema as S

    for i in range(3):
        store.append(_job(i))
    with store.engine.begin() as conn:
        conn.execute(insert(S.purges).values(seq=2, tombstone=3))  # a forged purge mark
        conn.execute(S.record_bodies.delete().where(S.record_bodies.c.seq == 2))
    report = store.verify()
    assert report.first_bad == 2 and "no tombstone" in report.problem


def test_update_and_delete_are_refused_by_the_database(store: RecordStore) -> None:
    from sqlalchemy import update

    from supervisor.records import schema as S

    store.append(_job(1))
    for stmt in (update(S.records).values(diver="x"), S.records.delete(),
                 update(S.record_bodies).values(body="{}"), S.record_bodies.delete()):
        with pytest.raises(Exception, match="append-only|removed only"):
            with store.engine.begin() as conn:
                conn.execute(stmt)
    assert store.get(1).body["i"] == 1
    assert store.verify().intact


def test_reading_never_creates_a_store(tmp_path) -> None:
    missing = tmp_path / "none.sqlite3"
    with pytest.raises(InputError, match="no record store"):
        RecordStore.open(str(missing))
    assert not missing.exists()


def test_unreachable_server_is_one_error(tmp_path) -> None:
    with pytest.raises(StoreError, match="cannot open the record store"):
        RecordStore.open("postgresql://nobody@127.0.0.1:1/none", create=True)
