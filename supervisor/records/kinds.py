"""What each kind of record holds, and how it is built from the tool's own objects.

=============  =============================================================
``job``        the job: title, site, date, client, contractor, supervisor,
               jurisdiction (29 CFR 1910.423(d)(1); 46 CFR 197.482)
``plan``       the approved plan: its full text and SHA-256, its dives
``checklist``  the pre-dive checklist: its document SHA-256, the signer, the
               certificate fingerprint and whether the signature verified
``dive``       per diver and dive: the executed profile, maximum depth and
               bottom time, the table and schedule used, the repetitive
               designation or the time since the last exposure, the log it
               came from and what was handled on import
               (29 CFR 1910.422(e), 1910.423(d); 46 CFR 197.482)
``audit``      findings on a dive in the check's findings form, with the
               verdict (also written row by row to the ``findings`` table)
``dcs``        a case of decompression sickness: symptoms, depth and time of
               onset, hospitalisation (29 CFR 1910.423(d)(3), 1910.440(a)(2))
``treatment``  its treatment and result (29 CFR 1910.423(d)(3))
``signature``  a supervisor's signature on another record
``tombstone``  announces bodies removed under the retention rules
=============  =============================================================

A correction is a record of the same kind with ``corrects`` set and a
``correction`` entry (the reason) in its body.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import tomllib
from collections.abc import Sequence
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from supervisor import __version__
from supervisor.errors import InputError
from supervisor.plan import Plan
from supervisor.plan_errors import problems_from
from supervisor.profile import Profile, Segment
from supervisor.records.importers.common import ImportedLog
from supervisor.records.store import NewRecord, StoredRecord, normalise_finding
from supervisor.text import printable

DCS_SCHEMA = "supervisor-dcs/1"
TREATMENT_SCHEMA = "supervisor-treatment/1"


def job_ref(plan: Plan) -> str:
    """The job reference used in the store: ``<date>-<slug of the title>``."""
    from supervisor.report.document import job_slug

    return f"{plan.job.date.isoformat()}-{job_slug(plan.job.title)}"


def job_record(plan: Plan, ref: str) -> NewRecord:
    """The ``job`` record of a plan."""
    j = plan.job
    body = {"ref": ref, "title": j.title, "site": j.site, "date": j.date.isoformat(),
            "client": j.client, "contractor": j.contractor, "supervisor": j.supervisor,
            "jurisdiction": j.jurisdiction}
    return NewRecord("job", body, occurred_at=j.date.isoformat(), job=ref)


def plan_record(plan: Plan, plan_bytes: bytes, file: str, ref: str, job_seq: int) -> NewRecord:
    """The ``plan`` record: the approved plan's full text and hash."""
    body = {
        "job": ref, "file": file, "plan_sha256": hashlib.sha256(plan_bytes).hexdigest(),
        "plan_text": plan_bytes.decode("utf-8"), "unit": plan.unit,
        "jurisdiction": plan.job.jurisdiction, "approved_by": plan.job.supervisor,
        "dives": [{"id": d.id, "diver": d.diver, "mode": d.mode, "gas": d.gas,
                   "max_depth": d.max_depth, "bottom_time_min": d.bottom_time_min,
                   "decompression": d.decompression} for d in plan.dives],
    }
    return NewRecord("plan", body, occurred_at=plan.job.date.isoformat(), job=ref,
                     refers_to=job_seq)


def checklist_record(record: dict[str, Any], data: bytes, file: str, ref: str,
                     plan_seq: int, verification: Any | None) -> NewRecord:
    """The ``checklist`` record: the checklist's hash, its signer and the signature status.

    Parameters
    ----------
    record : dict
        The checklist JSON record (``supervisor.check/1`` plus the plan text).
    data : bytes
        Its bytes as written (the document sha256 is taken over them).
    file : str
        Its file name.
    ref : str
        Job reference.
    plan_seq : int
        The plan record it was made from.
    verification : supervisor.report.verify.Verification or None
        The signature check, or ``None`` when the checklist is not signed.
    """
    job = record.get("job") if isinstance(record.get("job"), dict) else {}
    body: dict[str, Any] = {
        "job": ref, "file": file, "document_sha256": hashlib.sha256(data).hexdigest(),
        "plan_sha256": record.get("plan_sha256"), "verdict": record.get("verdict"),
        "generated_at": record.get("generated_at"), "signed": verification is not None,
    }
    if verification is not None:
        body.update(
            signer=verification.signer, fingerprint_sha256=verification.fingerprint_sha256,
            self_signed=verification.self_signed,
            signed_at=verification.signed_at.isoformat() if verification.signed_at else None,
            signature_status=verification.status, signature_reason=verification.reason)
    date = job.get("date") if isinstance(job.get("date"), str) else None
    return NewRecord("checklist", body, occurred_at=date, job=ref, refers_to=plan_seq)


def profile_to_json(profile: Profile) -> dict[str, Any]:
    """A profile as stored: unit, surface pressure, water and its segments."""
    return {
        "unit": profile.unit, "p_surface_bar": profile.p_surface_bar, "water": profile.water,
        "segments": [[s.start_depth, s.end_depth, s.minutes, s.gas.name, s.place, s.label]
                     for s in profile.segments],
    }


def profile_from_json(data: dict[str, Any]) -> Profile:
    """The :class:`Profile` of a stored dive (the inverse of :func:`profile_to_json`).

    This is how the per-diver history (``records diver``) and the audit read an
    executed profile back.
    """
    from supervisor.gas import parse_gas

    segs = [Segment(float(a), float(b), float(m), parse_gas(g), p, lb)
            for a, b, m, g, p, lb in data["segments"]]
    return Profile(segs, data["unit"], float(data["p_surface_bar"]), data["water"])


def parse_schedule(text: str) -> dict[str, float]:
    """Parse ``--schedule DEPTH/MINUTES`` (e.g. ``100/40``: 100 at 40 min)."""
    parts = text.replace(" ", "").split("/")
    try:
        depth, minutes = float(parts[0]), float(parts[1])
        if len(parts) != 2 or depth <= 0 or minutes <= 0:
            raise ValueError
    except (ValueError, IndexError):
        raise InputError("--schedule", f"got {text!r}; expected DEPTH/MINUTES of the table "
                                       "schedule used, e.g. 100/40") from None
    return {"depth": depth, "bottom_time_min": minutes}


def dive_record(log: ImportedLog, *, dive: str, diver: str, table: str,
                schedule: dict[str, float], repetitive_group: str | None,
                hours_since_last_exposure: float | None, no_exposure_24h: bool,
                ref: str | None, plan_seq: int | None, mode: str | None = None,
                bottom_time_min: float | None = None) -> NewRecord:
    """The ``dive`` record of one diver's dive from an imported log.

    Raises
    ------
    InputError
        If neither a repetitive designation, a time since the last exposure,
        nor "no exposure in 24 h" is given (46 CFR 197.482; 29 CFR 1910.423(d)).
    """
    if not (repetitive_group or hours_since_last_exposure is not None or no_exposure_24h):
        raise InputError("--group", "the record needs the repetitive designation (--group), "
                                    "the time since the last exposure (--since-last HOURS) or "
                                    "--no-exposure-24h (46 CFR 197.482; 29 CFR 1910.423(d))")
    if hours_since_last_exposure is not None and not 0 <= hours_since_last_exposure <= 24:
        raise InputError("--since-last", f"got {hours_since_last_exposure:g} h; the time since "
                                         "the last exposure is recorded under 24 h (give "
                                         "--no-exposure-24h otherwise)")
    started = log.started_at
    bt = bottom_time_min if bottom_time_min is not None else log.bottom_time_min
    body = {
        "dive": dive, "diver": diver, "job": ref, "plan_record": plan_seq, "mode": mode,
        "started_at": started.isoformat() if started else None,
        "unit": log.profile.unit, "max_depth": log.max_depth, "bottom_time_min": bt,
        "bottom_time_basis": ("stated (--bottom-time)" if bottom_time_min is not None
                              else log.bottom_time_basis),
        "table": table, "schedule": schedule, "repetitive_group": repetitive_group,
        "hours_since_last_exposure": hours_since_last_exposure,
        "no_exposure_24h": no_exposure_24h,
        "profile": profile_to_json(log.profile), "log": log.to_json(),
    }
    when = started.isoformat() if started else None
    return NewRecord("dive", body, occurred_at=when, job=ref, diver=diver, refers_to=plan_seq)


def audit_record(dive: StoredRecord, findings: Sequence[dict[str, Any]], *,
                 schema: str = "supervisor.audit/1", verdict: str | None = None,
                 extra: dict[str, Any] | None = None) -> NewRecord:
    """The ``audit`` record of a dive: findings in the check's findings form and the verdict.

    Parameters
    ----------
    dive : StoredRecord
        The ``dive`` record audited.
    findings : sequence of dict
        Findings as ``Finding.to_json()`` gives them.
    schema : str
        Schema of the audit result the findings came from.
    verdict : str, optional
        The verdict; default: from the findings, by the check's rule (any fail:
        does-not-conform; any warning or unverified finding, or none at all:
        needs-review; else conforms).
    extra : dict, optional
        More of the audit result to keep (measured profile figures ...).
    """
    if dive.kind != "dive":
        raise InputError("--dive-record", f"record {dive.seq} is a {dive.kind} record; an "
                                          "audit refers to a dive record")
    items = [dict(f) for f in findings]
    norm = [normalise_finding(f, i) for i, f in enumerate(items)]
    counts = {s: sum(1 for f in norm if f["severity"] == s) for s in ("fail", "warn", "info",
                                                                       "pass")}
    if verdict is None:
        verdict = ("needs-review" if not norm else "does-not-conform" if counts["fail"]
                   else "needs-review" if counts["warn"] or not all(f["verified"] for f in norm)
                   else "conforms")
    body = {"schema": schema, "dive_record": dive.seq, "tool_version": __version__,
            "verdict": verdict, "counts": counts, "findings": items, **(extra or {})}
    return NewRecord("audit", body, occurred_at=dive.occurred_at, job=dive.job,
                     diver=dive.diver, refers_to=dive.seq)


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False,
                              populate_by_name=True)


class DcsCase(_Model):
    """A case of decompression sickness (``supervisor-dcs/1``; 29 CFR 1910.423(d)(3))."""

    schema_: Literal["supervisor-dcs/1"] = Field(alias="schema",
                                                  description="Format: supervisor-dcs/1")
    diver: str = Field(min_length=1, description="Name of the diver")
    dive_record: int | None = Field(None, ge=1, description="The dive record it followed")
    job: str | None = Field(None, description="Job reference")
    onset: dt.datetime = Field(description="Date and time of onset (local)")
    onset_depth: float = Field(ge=0, le=2000, description="Depth at onset; 0 at the surface "
                               "[unit]")
    unit: Literal["fsw", "msw"] = Field(description="Unit of onset_depth")
    symptoms: list[str] = Field(min_length=1, description="Symptoms as observed")
    hospitalized_24h: bool = Field(description="Hospitalised 24 h or more "
                                   "(29 CFR 1910.440(a)(2))")
    treatment: str = Field("", description="Treatment given, in short (see treatment "
                           "records)")
    result: str = Field("", description="Result of treatment")
    reported_by: str = Field("", description="Who recorded the case")
    notes: str = Field("", description="Free text")


class Treatment(_Model):
    """A treatment of a recorded case (``supervisor-treatment/1``)."""

    schema_: Literal["supervisor-treatment/1"] = Field(
        alias="schema", description="Format: supervisor-treatment/1")
    case_record: int = Field(ge=1, description="The dcs record treated")
    table: str = Field(min_length=1, description="Treatment table used, as named in the "
                       "contractor's manual")
    chamber: str = Field("", description="Chamber used")
    started: dt.datetime = Field(description="Start of treatment (local)")
    finished: dt.datetime | None = Field(None, description="End of treatment (local)")
    extensions: str = Field("", description="Extensions or changes to the table")
    attendants: list[str] = Field(default_factory=list, description="Inside attendants")
    result: str = Field(min_length=1, description="Result of treatment")
    notes: str = Field("", description="Free text")


def _load_toml(path: Path, model: type[_Model]) -> _Model:
    from supervisor.records.importers.common import LogError, read_log_text
    from supervisor.records.importers.timed import _path, locate

    text, _source = read_log_text(path, "toml")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(printable(str(path)), f"not valid TOML ({exc})") from None
    try:
        return model.model_validate(data)
    except ValidationError as exc:
        field, message = problems_from(exc, model, "unit")[0]
        raise LogError(str(path), locate(text, _path(field)), f"{field}: {message}") from None


def dcs_record(path: Path) -> NewRecord:
    """The ``dcs`` record from a ``supervisor-dcs/1`` TOML file."""
    case = _load_toml(path, DcsCase)
    assert isinstance(case, DcsCase)
    body = case.model_dump(mode="json", by_alias=True, exclude={"schema_"})
    return NewRecord("dcs", body, occurred_at=case.onset.isoformat(), job=case.job,
                     diver=case.diver, refers_to=case.dive_record)


def load_treatment(path: Path) -> Treatment:
    """Read and validate a ``supervisor-treatment/1`` TOML file."""
    t = _load_toml(path, Treatment)
    assert isinstance(t, Treatment)
    return t


def treatment_record(t: Treatment, case: StoredRecord) -> NewRecord:
    """The ``treatment`` record of a validated treatment and the case record it treats."""
    if case.seq != t.case_record:
        raise InputError("case_record", f"record {t.case_record} was asked for")
    if case.kind != "dcs":
        raise InputError("case_record", f"record {case.seq} is a {case.kind} record; a "
                                        "treatment refers to a dcs record")
    if t.finished is not None and t.finished < t.started:
        raise InputError("finished", "is before started")
    body = t.model_dump(mode="json", by_alias=True, exclude={"schema_"})
    return NewRecord("treatment", body, occurred_at=t.started.isoformat(), job=case.job,
                     diver=case.diver, refers_to=case.seq)


def schemas() -> dict[str, dict[str, Any]]:
    """JSON Schemas of the TOML inputs of ``records add dcs`` and ``records add treatment``."""
    out = {}
    for name, model, tag in (("dcs", DcsCase, DCS_SCHEMA),
                             ("treatment", Treatment, TREATMENT_SCHEMA)):
        s = model.model_json_schema(by_alias=True, mode="validation")
        s["$id"] = f"urn:supervisor:schema:{tag}"
        out[name] = s
    return out


def as_correction(rec: NewRecord, corrects: StoredRecord, reason: str) -> NewRecord:
    """The same record, marked as the correction of ``corrects`` with a reason."""
    if not reason.strip():
        raise InputError("--reason", "a correction states why it was made")
    if corrects.kind != rec.kind:
        raise InputError("--corrects", f"record {corrects.seq} is a {corrects.kind} record; "
                                       f"this is a {rec.kind} record")
    body = {**rec.body, "correction": {"corrects": corrects.seq, "reason": reason.strip()}}
    return NewRecord(rec.kind, body, occurred_at=rec.occurred_at, job=rec.job,
                     diver=rec.diver, refers_to=rec.refers_to, corrects=corrects.seq)


def _num(v: Any) -> str:
    return f"{v:g}" if isinstance(v, int | float) and not isinstance(v, bool) else "?"


def summary(rec: StoredRecord) -> str:
    """One line about a record for ``records list``."""
    b = rec.body
    if b is None:
        return "(content removed under the retention rules; see the tombstone)"
    k = rec.kind
    if k == "job":
        return f"{b.get('title')} at {b.get('site')} ({b.get('jurisdiction')})"
    if k == "plan":
        return f"plan {b.get('file')} sha256 {str(b.get('plan_sha256'))[:16]}, " \
               f"{len(b.get('dives') or [])} dive(s)"
    if k == "checklist":
        who = f"signed by {b.get('signer')}" if b.get("signed") else "not signed"
        return f"checklist sha256 {str(b.get('document_sha256'))[:16]}, {who}"
    if k == "dive":
        bt = b.get("bottom_time_min")
        bts = f"{bt:.1f} min" if isinstance(bt, int | float) else "?"
        sched = b.get("schedule") if isinstance(b.get("schedule"), dict) else {}
        unit = b.get("unit")
        return (f"dive {b.get('dive')}: {_num(b.get('max_depth'))} {unit}, BT {bts}; table "
                f"{b.get('table')}, schedule {_num(sched.get('depth'))} {unit} / "
                f"{_num(sched.get('bottom_time_min'))} min")
    if k == "audit":
        c = b.get("counts") or {}
        return f"audit of record {b.get('dive_record')}: {b.get('verdict')} " \
               f"({c.get('fail', 0)} fail, {c.get('warn', 0)} warn)"
    if k == "dcs":
        return f"DCS onset {b.get('onset')} at {_num(b.get('onset_depth'))} {b.get('unit')}: " \
               f"{'; '.join(b.get('symptoms') or [])}"
    if k == "treatment":
        return f"treatment of record {b.get('case_record')}: {b.get('table')}, " \
               f"result {b.get('result')}"
    if k == "signature":
        return f"signature on record {b.get('signs')} by {b.get('signer')}"
    if k == "tombstone":
        return f"removed {len(b.get('removed') or [])} record bodies: {b.get('reason')}"
    return ""
