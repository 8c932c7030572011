"""How long records are kept, what may be archived, and the one way to remove a body.

Rules (paraphrased; the status says how far each was confirmed):

* **29 CFR 1910.440(b)(3)** (OSHA): the record of dive (1910.423) is kept one
  year, five years where there has been an incident of decompression sickness;
  the depth-time profile (1910.422) until the record of dive is complete, or
  the DCS assessment is done.  One year VERIFIED; the five-year figure only
  partly legible in the copy checked, so a DCS record past five years is
  listed for review, never as free to archive.  Hospitalisation records
  (1910.440(a)(2)): five years, FROM MEMORY (kept with the case).
* **46 CFR 197.480 to 197.488** (USCG): logbooks are kept (197.480, FROM
  MEMORY: no general retention period confirmed); after a casualty, logbooks
  and reports stay on board six months after the report or until the Officer
  in Charge, Marine Inspection releases them (197.488, VERIFIED).  Without a
  confirmed period, USCG records are always listed for review.

The executed profile is kept inside the dive record, so it follows the dive
record's period.  Audit findings, signatures and corrections follow the record
they belong to; job, plan and checklist records are kept as long as the
longest-kept dive or case of their job; tombstones are never archived.

Nothing is deleted by listing.  Removal takes two explicit commands: ``records
retention --archive FILE`` writes the records that may be archived to a JSON
export; ``records purge --archive FILE`` checks that every one of them is in
that file unchanged, asks for confirmation, then chains a tombstone record
naming them with their content hashes and removes their bodies, all in one
transaction.  Headers stay, so the chain verifies end to end afterwards.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

from supervisor.errors import InputError
from supervisor.records.chain import canonical_json
from supervisor.records.store import NewRecord, RecordStore, StoredRecord

Status = Literal["keep", "may-archive", "review"]

OSHA = "29 CFR 1910.440(b)(3)"
OSHA_HOSP = "29 CFR 1910.440(a)(2), (b)(3)"
USCG = "46 CFR 197.480-197.488"


@dataclass(frozen=True)
class Decision:
    """Retention of one record on a date."""

    seq: int
    kind: str
    status: Status
    keep_until: str | None
    reason: str
    citation: str
    source_status: str

    def to_json(self) -> dict[str, Any]:
        """JSON-ready form."""
        return {"seq": self.seq, "kind": self.kind, "status": self.status,
                "keep_until": self.keep_until, "reason": self.reason,
                "citation": self.citation, "source_status": self.source_status}


def add_years(day: dt.date, years: int) -> dt.date:
    """The same calendar day ``years`` later (29 February goes to 1 March)."""
    try:
        return day.replace(year=day.year + years)
    except ValueError:
        return day.replace(year=day.year + years, month=3, day=1)


def _day(text: str | None) -> dt.date | None:
    if not text:
        return None
    try:
        return dt.date.fromisoformat(text[:10])
    except ValueError:
        return None


@dataclass
class _Rule:
    status: Status
    until: dt.date | None
    reason: str
    citation: str
    source: str


def _dive_rule(day: dt.date | None, jurisdiction: str | None, dcs: bool,
               as_of: dt.date) -> _Rule:
    if day is None:
        return _Rule("review", None, "no date on the record; keep until reviewed", OSHA,
                     "VERIFIED")
    if jurisdiction == "uscg-46-197-b":
        return _Rule("review", None, "no general retention period for the diving log is "
                                     "confirmed (197.480); after a casualty at least six "
                                     "months after the report or until released (197.488)",
                     USCG, "FROM MEMORY (197.480); VERIFIED (197.488)")
    if jurisdiction != "osha-1910-t":
        return _Rule("review", None, f"jurisdiction {jurisdiction or 'unknown'}: no "
                                     "retention rule applied; the contractor's manual decides",
                     "", "")
    if dcs:
        until = add_years(day, 5)
        status: Status = "keep" if as_of < until else "review"
        return _Rule(status, until, "five years: a decompression sickness case in this dive's "
                                    "job (review before archiving: the five-year figure was "
                                    "only partly legible in the copy checked)", OSHA,
                     "SECONDARY")
    until = add_years(day, 1)
    return _Rule("keep" if as_of < until else "may-archive", until,
                 "one year from the dive (record of dive, 1910.423; depth-time profile, "
                 "1910.422)", OSHA, "VERIFIED")


def decide(records: list[StoredRecord], as_of: dt.date) -> list[Decision]:
    """Retention of every record on ``as_of``.

    Parameters
    ----------
    records : list of StoredRecord
        The whole chain, in order.
    as_of : date
        The day the question is asked.

    Returns
    -------
    list of Decision
        One per record, in chain order.
    """
    by_seq = {r.seq: r for r in records}
    jurisdiction: dict[str, str] = {}
    for r in records:
        if r.kind == "job" and r.body and r.job:
            jurisdiction[r.job] = str(r.body.get("jurisdiction"))
    # a case of DCS keeps every dive record of its job (the operation) five years, and
    # the dive it names even when it names no job (the conservative reading of "where
    # there has been an incident of decompression sickness")
    dcs_dives: set[int] = set()
    dcs_jobs: set[str] = set()
    for r in records:
        if r.kind == "dcs":
            if r.refers_to:
                dcs_dives.add(r.refers_to)
            if r.job:
                dcs_jobs.add(r.job)
    own: dict[int, _Rule] = {}
    for r in records:
        j = jurisdiction.get(r.job or "")
        if r.kind == "dive":
            dcs = r.seq in dcs_dives or (r.job or "") in dcs_jobs
            own[r.seq] = _dive_rule(_day(r.occurred_at), j, dcs, as_of)
        elif r.kind in ("dcs", "treatment"):
            rule = _dive_rule(_day(r.occurred_at), j, True, as_of)
            if j == "osha-1910-t":
                rule.reason = ("five years: a decompression sickness case and its treatment "
                               "(hospitalisation records five years, FROM MEMORY; review "
                               "before archiving)")
                rule.citation = OSHA_HOSP
            own[r.seq] = rule

    def root(r: StoredRecord) -> StoredRecord:
        """The record a record belongs to: through signatures, audits and corrections."""
        seen: set[int] = set()
        while r.seq not in seen:
            seen.add(r.seq)
            if r.corrects in by_seq:
                r = by_seq[r.corrects]  # type: ignore[index]
            elif r.kind in ("audit", "signature") and r.refers_to in by_seq:
                r = by_seq[r.refers_to]  # type: ignore[index]
            else:
                break
        return r

    # a record, its corrections, audits and signatures are kept together, as long as
    # the longest-kept of them; a job's own records as long as its longest-kept family
    family: dict[int, _Rule] = {}
    for seq, rule in own.items():
        f = root(by_seq[seq]).seq
        if f not in family or _later(rule, family[f]):
            family[f] = rule
    job_rule: dict[str, _Rule] = {}
    for f, rule in family.items():
        job = by_seq[f].job
        if job and (job not in job_rule or _later(rule, job_rule[job])):
            job_rule[job] = rule
    out: list[Decision] = []
    for r in records:
        base = root(r)
        rule = family.get(base.seq)
        if rule is not None and base.seq != r.seq:
            rule = _Rule(rule.status, rule.until, f"kept with record {base.seq}: {rule.reason}",
                         rule.citation, rule.source)
        if rule is None and base.kind in ("job", "plan", "checklist"):
            found = job_rule.get(base.job or "")
            if found is not None:
                rule = _Rule(found.status, found.until, "kept as long as the job's longest-"
                             f"kept dive or case: {found.reason}", found.citation, found.source)
            else:
                rule = _dive_rule(_day(base.occurred_at), jurisdiction.get(base.job or ""),
                                  False, as_of)
        if r.kind == "tombstone":
            rule = _Rule("keep", None, "tombstones are kept for good: they keep the chain "
                                       "verifiable", "", "")
        if rule is None:
            rule = _Rule("review", None, "no retention rule found for this record", "", "")
        if r.body is None:
            rule = _Rule("keep", rule.until, "content already removed; the header stays in the "
                                             "chain", rule.citation, rule.source)
        out.append(Decision(r.seq, r.kind, rule.status,
                            rule.until.isoformat() if rule.until else None, rule.reason,
                            rule.citation, rule.source))
    return out


def _later(a: _Rule, b: _Rule) -> bool:
    """Whether rule ``a`` keeps longer than ``b`` (review first, then no date, then the date)."""
    rank = {"may-archive": 0, "keep": 1, "review": 2}

    def key(r: _Rule) -> tuple[bool, bool, dt.date, int]:
        return (r.status == "review", r.until is None, r.until or dt.date.min, rank[r.status])

    return key(a) > key(b)


def archivable(store: RecordStore, as_of: dt.date) -> tuple[list[StoredRecord], list[Decision]]:
    """The records that may be archived on ``as_of``, and every decision."""
    records = store.records()
    decisions = decide(records, as_of)
    ok = {d.seq for d in decisions if d.status == "may-archive"}
    return [r for r in records if r.seq in ok], decisions


def read_archive(path: Path) -> dict[int, dict[str, Any]]:
    """The records of an archive file (a JSON export), by sequence number.

    Raises
    ------
    InputError
        If the file cannot be read or is not an export of this tool.
    """
    from supervisor.records.export import EXPORT_SCHEMA

    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, ValueError) as exc:
        raise InputError("--archive", f"cannot read {path} as a JSON export ({exc})") from None
    if not isinstance(data, dict) or data.get("schema") != EXPORT_SCHEMA:
        raise InputError("--archive", f"{path} is not a records export ({EXPORT_SCHEMA})")
    return {int(r["seq"]): r for r in data.get("records", []) if isinstance(r, dict)}


def tombstone(store: RecordStore, archive: Path, as_of: dt.date, confirmed_by: str
              ) -> tuple[NewRecord, list[int]]:
    """The tombstone for purging what may be archived on ``as_of`` and is in ``archive``.

    Every record that may be archived must be in the archive with the same
    record hash and content; a record missing from it stops the purge.

    Returns
    -------
    (NewRecord, list of int)
        The tombstone and the records whose bodies it removes.

    Raises
    ------
    InputError
        If there is nothing to purge, or the archive lacks or differs from a
        record to purge.
    """
    eligible, _ = archivable(store, as_of)
    if not eligible:
        raise InputError("purge", f"no record may be archived on {as_of}; nothing to purge")
    held = read_archive(archive)
    for r in eligible:
        a = held.get(r.seq)
        if a is None:
            raise InputError("--archive", f"record {r.seq} may be archived but is not in "
                                          f"{archive}; write the archive again")
        if a.get("record_hash") != r.record_hash or canonical_json(a.get("body")) != \
                canonical_json(r.body):
            raise InputError("--archive", f"record {r.seq} in {archive} differs from the "
                                          "store; write the archive again")
    digest = hashlib.sha256(archive.read_bytes()).hexdigest()
    body = {
        "reason": f"retention period over on {as_of.isoformat()} ({OSHA}, one year)",
        "as_of": as_of.isoformat(), "archive_file": archive.name, "archive_sha256": digest,
        "confirmed_by": confirmed_by,
        "removed": [{"seq": r.seq, "kind": r.kind, "content_sha256": r.content_sha256,
                     "record_hash": r.record_hash} for r in eligible],
    }
    return NewRecord("tombstone", body, occurred_at=as_of.isoformat()), [r.seq for r in eligible]
