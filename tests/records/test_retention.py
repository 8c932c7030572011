"""Retention: what may be archived under 29 CFR 1910.440(b)(3), what needs review, the purge.

Periods: one year for the record of dive, five years where there was a case of
decompression sickness (29 CFR 1910.440(b)(3); one year VERIFIED, five years
only partly legible in the copy checked, hence "review" after five years).
USCG logbooks: no general period confirmed (46 CFR 197.480, FROM MEMORY), so
always "review".  Dates below are worked by hand from those periods.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest

from supervisor.errors import InputError
from supervisor.records.export import export_json
from supervisor.records.retention import add_years, archivable, decide, tombstone
from supervisor.records.store import NewRecord, RecordStore, StoredRecord

JOB = "2031-05-14-pier-9"


def _job(store: RecordStore, jurisdiction: str = "osha-1910-t", ref: str = JOB) -> None:
    store.append(NewRecord("job", {"ref": ref, "jurisdiction": jurisdiction},
                           occurred_at="2031-05-14", job=ref))
    store.append(NewRecord("plan", {"plan_sha256": "x"}, occurred_at="2031-05-14", job=ref,
                           refers_to=store.count()))


def _dive(store: RecordStore, when: str = "2031-05-14T09:00:00", ref: str = JOB,
          diver: str = "Ada Fenwick") -> StoredRecord:
    return store.append(NewRecord("dive", {"dive": "D1"}, occurred_at=when, job=ref,
                                  diver=diver))


def _status(store: RecordStore, day: str) -> dict[int, str]:
    return {d.seq: d.status for d in decide(store.records(), dt.date.fromisoformat(day))}


def test_add_years() -> None:
    assert add_years(dt.date(2031, 5, 14), 1) == dt.date(2032, 5, 14)
    assert add_years(dt.date(2032, 2, 29), 1) == dt.date(2033, 3, 1)


def test_one_year_rule(store: RecordStore) -> None:
    _job(store)
    dive = _dive(store)
    store.append(NewRecord("audit", {"findings": []}, job=JOB, refers_to=dive.seq))
    assert set(_status(store, "2032-05-13").values()) == {"keep"}
    after = decide(store.records(), dt.date(2032, 5, 14))
    assert {d.status for d in after} == {"may-archive"}
    d = next(x for x in after if x.kind == "dive")
    assert d.keep_until == "2032-05-14" and d.citation == "29 CFR 1910.440(b)(3)"
    assert d.source_status == "VERIFIED"


def test_a_case_of_dcs_keeps_the_job_five_years(store: RecordStore) -> None:
    _job(store)
    dive = _dive(store)
    other = _dive(store, diver="Ben Okafor")
    store.append(NewRecord("dcs", {"symptoms": ["pain"]}, occurred_at="2031-05-14T11:00:00",
                           job=JOB, diver="Ada Fenwick", refers_to=dive.seq))
    s = _status(store, "2033-01-01")
    assert s[dive.seq] == "keep" and s[other.seq] == "keep" and s[1] == "keep"
    later = decide(store.records(), dt.date(2036, 5, 14))
    assert {d.status for d in later} == {"review"}   # never free after five years
    assert next(d for d in later if d.seq == dive.seq).keep_until == "2036-05-14"


def test_uscg_and_unknown_jurisdictions_need_review(store: RecordStore) -> None:
    _job(store, "uscg-46-197-b")
    _dive(store)
    _job(store, "none", ref="2031-05-14-lake")
    _dive(store, ref="2031-05-14-lake")
    s = _status(store, "2040-01-01")
    assert set(s.values()) == {"review"}
    d = decide(store.records(), dt.date(2040, 1, 1))[2]
    assert "197.480" in d.reason and d.citation == "46 CFR 197.480-197.488"


def test_corrections_and_signatures_follow_their_record(store: RecordStore) -> None:
    _job(store)
    dive = _dive(store)
    fixed = store.append(NewRecord("dive", {"dive": "D1", "fixed": True},
                                   occurred_at="2031-06-01T09:00:00", job=JOB,
                                   diver="Ada Fenwick", corrects=dive.seq))
    sig = store.append(NewRecord("signature", {}, job=JOB, refers_to=dive.seq))
    stone = store.append(NewRecord("tombstone", {"removed": []}))
    s = _status(store, "2032-05-20")   # the original is past a year, its correction is not
    assert s[dive.seq] == s[fixed.seq] == s[sig.seq] == "keep"
    assert s[stone.seq] == "keep"
    assert _status(store, "2032-06-01")[dive.seq] == "may-archive"


def test_archive_then_purge_keeps_the_chain_verifiable(store: RecordStore, tmp_path: Path
                                                       ) -> None:
    _job(store)
    _dive(store)
    day = dt.date(2033, 1, 1)
    eligible, _ = archivable(store, day)
    assert [r.kind for r in eligible] == ["job", "plan", "dive"]
    archive = tmp_path / "archive.json"
    archive.write_text(export_json(store, eligible, complete=False))
    stone, seqs = tombstone(store, archive, day, "Mara Okonjo")
    store.purge(stone, seqs)
    assert all(store.get(s).body is None for s in seqs)
    report = store.verify()
    assert report.intact and report.purged == 3
    # a second purge finds nothing left to remove
    with pytest.raises(InputError, match="nothing to purge"):
        tombstone(store, archive, day, "Mara Okonjo")


def test_purge_refuses_an_archive_that_lacks_or_differs(store: RecordStore, tmp_path: Path
                                                        ) -> None:
    _job(store)
    dive = _dive(store)
    day = dt.date(2033, 1, 1)
    eligible, _ = archivable(store, day)
    partial = tmp_path / "partial.json"
    partial.write_text(export_json(store, [r for r in eligible if r.seq != dive.seq],
                                   complete=False))
    with pytest.raises(InputError, match="not in"):
        tombstone(store, partial, day, "x")
    (tmp_path / "junk.json").write_text("{}")
    with pytest.raises(InputError, match="not a records export"):
        tombstone(store, tmp_path / "junk.json", day, "x")
    assert all(r.body is not None for r in store.records())
