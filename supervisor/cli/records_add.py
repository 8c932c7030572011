"""``supervisor records add KIND ...``: put a plan, dive, case or treatment on record.

Every ``add`` writes one transaction: the record (and, with ``--sign``, its
signature record) or nothing.  ``--corrects SEQ --reason TEXT`` makes the new
record the correction of an earlier one of the same kind; the earlier record
stays as it was.

Exit status: 0 recorded (or already on record); 1 a checklist whose signature
does not verify (nothing recorded); 2 bad input (one ``error:`` line; nothing
recorded).
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import typer

from supervisor.cli._common import (
    EXIT_FAIL,
    error_line,
    fail_input,
    guarded,
    say,
)
from supervisor.cli.records_common import (
    DB_HELP,
    DEPTH_UNIT_OPTION,
    FORMAT_OPTION,
    GAS_OPTION,
    TEMPERATURE_UNIT_OPTION,
    TIME_UNIT_OPTION,
    WATER_OPTION,
    csv_options,
    open_store,
    passphrase,
    print_issues,
)
from supervisor.text import printable

add_app = typer.Typer(
    name="add",
    help="Add a record: plan (with its job), checklist, dive (from a log), audit, dcs, "
         "treatment.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)

_SIGN_HELP = "Sign the new record with this key file (.p12 from 'supervisor keys new')."
_CORRECTS_HELP = "This record corrects record SEQ (same kind); give --reason."


def _finish(store: Any, items: list[Any], sign: Path | None, corrects: int | None,
            reason: str | None) -> list[Any]:
    """Write the records (marking the last as a correction, signing it) in one batch."""
    from supervisor.records.kinds import as_correction
    from supervisor.records.signing import signature_record

    if corrects is not None:
        old = store.get(corrects)
        last = items[-1]
        if callable(last):
            items[-1] = lambda done, f=last: as_correction(f(done), old, reason or "")
        else:
            items[-1] = as_correction(last, old, reason or "")
    elif reason:
        fail_input("--reason", "is given without --corrects")
    if sign is not None:
        from supervisor.report.keys import load_identity, read_key_file

        read_key_file(sign)
        identity = load_identity(sign, passphrase())
        items.append(lambda done: signature_record(done[-1], identity))
    done = store.append_batch(items)
    for r in done:
        from supervisor.records.kinds import summary

        say(f"recorded #{r.seq} {r.kind}: {printable(summary(r))}")
    say(f"chain head #{done[-1].seq} sha256 {done[-1].record_hash}")
    return done


def _plan_items(store: Any, plan_bytes: bytes, file: str, job: str | None) -> list[Any]:
    """The job record (unless on record) and the plan record of a plan file."""
    from supervisor.plan import parse_plan_bytes
    from supervisor.records.kinds import job_record, job_ref, plan_record

    plan = parse_plan_bytes(plan_bytes, file)
    ref = job or job_ref(plan)
    jobs = store.records(kind="job", job=ref)
    items: list[Any] = []
    if not jobs:
        items.append(job_record(plan, ref))
        items.append(lambda done: plan_record(plan, plan_bytes, Path(file).name, ref,
                                              done[0].seq))
    else:
        seq = jobs[-1].seq
        items.append(plan_record(plan, plan_bytes, Path(file).name, ref, seq))
    return items


def _plan_on_record(store: Any, sha: str) -> Any | None:
    for r in reversed(store.records(kind="plan")):
        if r.body and r.body.get("plan_sha256") == sha:
            return r
    return None


@add_app.command("plan")
@guarded
def add_plan(
    plan: Path = typer.Argument(..., help="The approved plan file (TOML).", show_default=False),
    job: str | None = typer.Option(None, "--job", help="Job reference (default: "
                                   "<date>-<title> of the plan)."),
    sign: Path | None = typer.Option(None, "--sign", help=_SIGN_HELP, show_default=False),
    corrects: int | None = typer.Option(None, "--corrects", help=_CORRECTS_HELP),
    reason: str | None = typer.Option(None, "--reason", help="Why the correction is made."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Record the job (once) and the approved plan: its full text and SHA-256."""
    import hashlib

    try:
        data = plan.read_bytes()
    except OSError as exc:
        fail_input("PLAN", f"cannot read {plan} ({exc.strerror or exc})")
    with open_store(db, create=True) as store:
        known = _plan_on_record(store, hashlib.sha256(data).hexdigest())
        if known is not None and corrects is None:
            say(f"already on record: #{known.seq} (plan {known.body.get('file')}, same "
                       "SHA-256); nothing written")
            return
        _finish(store, _plan_items(store, data, str(plan), job), sign, corrects, reason)


@add_app.command("checklist")
@guarded
def add_checklist(
    checklist: Path = typer.Argument(..., help="<job>-checklist.json (its .json.sig beside it "
                                     "when signed).", show_default=False),
    job: str | None = typer.Option(None, "--job", help="Job reference (default: that of its "
                                   "plan)."),
    sign: Path | None = typer.Option(None, "--sign", help=_SIGN_HELP, show_default=False),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Record a pre-dive checklist: its SHA-256, signer and signature status (and its plan)."""
    import hashlib

    from supervisor.cli.checklist import _quiet_libraries
    from supervisor.records.kinds import checklist_record, job_ref
    from supervisor.report.verify import verify_file

    _quiet_libraries()
    try:
        data = checklist.read_bytes()
        record = json.loads(data.decode("utf-8"))
    except OSError as exc:
        fail_input("CHECKLIST", f"cannot read {checklist} ({exc.strerror or exc})")
    except (UnicodeDecodeError, ValueError):
        fail_input("CHECKLIST", f"{checklist} is not a JSON checklist record")
    if not isinstance(record, dict) or not isinstance(record.get("plan_text"), str):
        fail_input("CHECKLIST", f"{checklist} is not a checklist record (no plan_text); "
                                "expected <job>-checklist.json from 'supervisor checklist'")
    verification = None
    if checklist.with_name(checklist.name + ".sig").exists():
        verification = verify_file(checklist)
        if verification.status != "valid":
            error_line(f"{checklist}: signature does not verify ({verification.reason}); "
                       "nothing recorded")
            raise typer.Exit(EXIT_FAIL)
    plan_bytes = record["plan_text"].encode("utf-8")
    if hashlib.sha256(plan_bytes).hexdigest() != record.get("plan_sha256"):
        fail_input("CHECKLIST", f"{checklist}: its plan_text does not match its plan_sha256")
    with open_store(db, create=True) as store:
        plan_rec = _plan_on_record(store, record["plan_sha256"])
        items: list[Any] = []
        if plan_rec is None:
            items = _plan_items(store, plan_bytes, f"{checklist.name}#plan_text", job)
        from supervisor.plan import parse_plan_bytes

        ref = job or (plan_rec.job if plan_rec else job_ref(parse_plan_bytes(plan_bytes)))
        if plan_rec is not None:
            items.append(checklist_record(record, data, checklist.name, ref, plan_rec.seq,
                                          verification))
        else:
            items.append(lambda done: checklist_record(record, data, checklist.name, ref,
                                                       done[-1].seq, verification))
        _finish(store, items, sign, None, None)
    if verification is None:
        say("note: the checklist is not signed (no .json.sig beside it)")


@add_app.command("dive")
@guarded
def add_dive(
    log: Path = typer.Argument(..., help="Depth log: recorder CSV or timed log (TOML).",
                               show_default=False),
    job: str | None = typer.Option(None, "--job", help="Job reference (a recorded plan's "
                                   "job; the timed log's job if it names one)."),
    dive: str | None = typer.Option(None, "--dive", help="The plan's dive id."),
    diver: str | None = typer.Option(None, "--diver", help="Name of the diver."),
    table: str | None = typer.Option(None, "--table", help="Decompression table used."),
    schedule: str | None = typer.Option(None, "--schedule", help="Schedule used, DEPTH/MINUTES "
                                        "in the log's unit (e.g. 100/40)."),
    group: str | None = typer.Option(None, "--group", help="Repetitive group designation."),
    since_last: float | None = typer.Option(None, "--since-last", help="Time since the last "
                                            "pressure exposure, under 24 h [h]."),
    no_exposure_24h: bool = typer.Option(False, "--no-exposure-24h", help="No pressure "
                                         "exposure in the 24 h before this dive."),
    bottom_time: float | None = typer.Option(None, "--bottom-time", help="Bottom time as "
                                             "logged by the supervisor [min] (default: from "
                                             "the log)."),
    fmt: str | None = FORMAT_OPTION,
    depth_unit: str | None = DEPTH_UNIT_OPTION,
    time_unit: str | None = TIME_UNIT_OPTION,
    temperature_unit: str | None = TEMPERATURE_UNIT_OPTION,
    gas: str | None = GAS_OPTION,
    water: str = WATER_OPTION,
    started: str | None = typer.Option(None, "--started", help="Local date and time the log "
                                       "starts, e.g. 2031-05-14T09:00 (a CSV with elapsed "
                                       "times only)."),
    sign: Path | None = typer.Option(None, "--sign", help=_SIGN_HELP, show_default=False),
    corrects: int | None = typer.Option(None, "--corrects", help=_CORRECTS_HELP),
    reason: str | None = typer.Option(None, "--reason", help="Why the correction is made."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Record one diver's dive from a log: profile, table and schedule, repetitive status."""
    import datetime as dt

    from supervisor.records.importers import read_log
    from supervisor.records.kinds import dive_record, parse_schedule

    opts = csv_options(depth_unit, time_unit, temperature_unit, gas, water)
    imported = read_log(log, fmt, opts)
    meta = imported.meta
    if started is not None:
        try:
            when = dt.datetime.fromisoformat(started)
        except ValueError:
            fail_input("--started", f"got {started!r}; expected a date and time such as "
                                    "2031-05-14T09:00")
        if imported.started_at is not None and imported.started_at != when:
            fail_input("--started", f"{started} differs from the log's own start "
                                    f"{imported.started_at.isoformat()}")
        imported.started_at = when
    if imported.started_at is None:
        fail_input("--started", "the log has no clock times; give the date and time it starts "
                                "(e.g. 2031-05-14T09:00): the record of dive is dated "
                                "(29 CFR 1910.423(d)(1); 46 CFR 197.482)")

    def pick(option: str, given: Any, key: str) -> Any:
        held = meta.get(key)
        if given is not None and held is not None and given != held:
            fail_input(option, f"{given!r} differs from the log's {key} {held!r}")
        return given if given is not None else held

    job_ = pick("--job", job, "job")
    dive_ = pick("--dive", dive, "dive")
    diver_ = pick("--diver", diver, "diver")
    table_ = pick("--table", table, "table")
    group_ = pick("--group", group, "repetitive_group")
    since_ = pick("--since-last", since_last, "hours_since_last_exposure")
    sched = parse_schedule(schedule) if schedule else meta.get("schedule")
    for option, value in (("--job", job_), ("--dive", dive_), ("--diver", diver_),
                          ("--table", table_), ("--schedule", sched)):
        if value in (None, ""):
            fail_input(option, "missing; the dive record names the job, the dive, the diver, "
                               "the table and the schedule used (29 CFR 1910.423(d); 46 CFR "
                               "197.482)")
    with open_store(db, create=True) as store:
        plans = store.records(kind="plan", job=job_)
        if not plans:
            fail_input("--job", f"no plan of job {job_!r} on record; record it first "
                                "(supervisor records add plan PLAN)")
        plan_rec = plans[-1]
        dives = {d["id"]: d for d in plan_rec.body.get("dives", [])} if plan_rec.body else {}
        if dive_ not in dives:
            fail_input("--dive", f"dive {dive_!r} is not in the recorded plan (dives: "
                                 f"{', '.join(dives) or 'none'})")
        if plan_rec.body.get("unit") != imported.profile.unit:
            say(f"note: the log is in {imported.profile.unit}, the plan in "
                       f"{plan_rec.body.get('unit')}; the record keeps the log's unit")
        if dives[dive_]["diver"] != diver_:
            say(f"note: the plan gives dive {dive_} to {dives[dive_]['diver']}; recorded "
                       f"for {diver_} as logged")
        rec = dive_record(imported, dive=dive_, diver=diver_, table=table_, schedule=sched,
                          repetitive_group=group_, hours_since_last_exposure=since_,
                          no_exposure_24h=no_exposure_24h or bool(meta.get("no_exposure_24h")),
                          ref=job_, plan_seq=plan_rec.seq, mode=meta.get("mode")
                          or dives[dive_].get("mode"), bottom_time_min=bottom_time)
        _finish(store, [rec], sign, corrects, reason)
    print_issues(imported.issues)


@add_app.command("audit")
@guarded
def add_audit(
    findings: Path = typer.Argument(..., help="JSON with a 'findings' list in the check's "
                                    "findings form (and optionally 'verdict', 'schema').",
                                    show_default=False),
    dive_record: int = typer.Option(..., "--dive-record", help="The dive record audited."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Record findings on a dive (the audit's result) in the check's findings form."""
    from supervisor.records.kinds import audit_record

    try:
        doc = json.loads(findings.read_text(encoding="utf-8"))
    except OSError as exc:
        fail_input("FINDINGS", f"cannot read {findings} ({exc.strerror or exc})")
    except (UnicodeDecodeError, ValueError) as exc:
        fail_input("FINDINGS", f"{findings} is not JSON ({exc})")
    if not isinstance(doc, dict) or not isinstance(doc.get("findings"), list):
        fail_input("FINDINGS", f"{findings} has no 'findings' list")
    with open_store(db, create=True) as store:
        dive = store.get(dive_record)
        rec = audit_record(dive, doc["findings"], schema=str(doc.get("schema")
                                                                 or "supervisor.audit/1"),
                           verdict=doc.get("verdict"))
        _finish(store, [rec], None, None, None)


@add_app.command("dcs")
@guarded
def add_dcs(
    case: Path = typer.Argument(..., help="The case (TOML, supervisor-dcs/1; 'supervisor "
                                "records schema dcs').", show_default=False),
    sign: Path | None = typer.Option(None, "--sign", help=_SIGN_HELP, show_default=False),
    corrects: int | None = typer.Option(None, "--corrects", help=_CORRECTS_HELP),
    reason: str | None = typer.Option(None, "--reason", help="Why the correction is made."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Record a case of decompression sickness: symptoms, depth and time of onset."""
    from supervisor.records.kinds import dcs_record

    rec = dcs_record(case)
    with open_store(db, create=True) as store:
        if rec.refers_to is not None and store.get(rec.refers_to).kind != "dive":
            fail_input("dive_record", f"record {rec.refers_to} is not a dive record")
        _finish(store, [rec], sign, corrects, reason)
    say("note: the case is kept five years (29 CFR 1910.440(b)(3)); the decompression "
               "procedure assessment is due within 45 days (29 CFR 1910.423(e))")


@add_app.command("treatment")
@guarded
def add_treatment(
    treatment: Path = typer.Argument(..., help="The treatment (TOML, supervisor-treatment/1; "
                                     "'supervisor records schema treatment').",
                                     show_default=False),
    sign: Path | None = typer.Option(None, "--sign", help=_SIGN_HELP, show_default=False),
    corrects: int | None = typer.Option(None, "--corrects", help=_CORRECTS_HELP),
    reason: str | None = typer.Option(None, "--reason", help="Why the correction is made."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Record the treatment of a recorded case and its result."""
    from supervisor.records.kinds import load_treatment, treatment_record

    t = load_treatment(treatment)
    with open_store(db, create=True) as store:
        rec = treatment_record(t, store.get(t.case_record))
        _finish(store, [rec], sign, corrects, reason)
