"""``supervisor records``: the tamper-evident record store.

Commands: ``add`` (see :mod:`supervisor.cli.records_add`), ``list``, ``show``,
``verify``, ``export``, ``sign``, ``retention``, ``purge`` and ``schema``.
The store is named by ``--db``, else ``SUPERVISOR_DB``, else the per-user
default (``$XDG_DATA_HOME/supervisor/records.sqlite3``).

Exit status
-----------
verify     0 the chain and every signature verify; 1 a record or signature does
           not match (the first is named); 2 no store or bad input.
purge      0 purged or nothing done; 2 refused (not confirmed, archive missing or
           different).
others     0 done; 2 bad input or no store (one ``error:`` line).
"""

from __future__ import annotations

import datetime as dt
import json
from enum import StrEnum
from pathlib import Path
from typing import Any

import typer

from supervisor.cli._common import (
    EXIT_BAD_INPUT,
    EXIT_FAIL,
    EXIT_OK,
    error_line,
    fail_input,
    guarded,
    json_text,
    say,
)
from supervisor.cli.records_add import add_app
from supervisor.cli.records_common import DB_HELP, open_store, passphrase
from supervisor.text import printable

records_app = typer.Typer(
    name="records",
    help="The dive records: add, list, show, verify the hash chain, export, retention.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)
records_app.add_typer(add_app, name="add")


class ExportFormat(StrEnum):
    """Export formats."""

    json = "json"
    csv = "csv"


class SchemaName(StrEnum):
    """TOML inputs of ``records add`` with a JSON Schema."""

    dcs = "dcs"
    treatment = "treatment"


def _kind_option(kind: str | None) -> str | None:
    from supervisor.records.store import KINDS

    if kind is not None and kind not in KINDS:
        fail_input("--kind", f"got {kind!r}; expected one of {', '.join(KINDS)}")
    return kind


@records_app.command("list")
@guarded
def list_records(
    kind: str | None = typer.Option(None, "--kind", help="Only records of this kind."),
    diver: str | None = typer.Option(None, "--diver", help="Only this diver's records."),
    job: str | None = typer.Option(None, "--job", help="Only this job's records."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON instead of the table."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """List records in chain order, with what corrects or signs them."""
    from supervisor.records.kinds import summary

    with open_store(db) as store:
        rows = store.records(kind=_kind_option(kind), diver=diver, job=job)
        fixed = store.corrected_by()
        signed: dict[int, list[int]] = {}
        for s in store.records(kind="signature"):
            signed.setdefault(s.refers_to, []).append(s.seq)
    if as_json:
        typer.echo(json_text([{**r.columns(), "summary": summary(r),
                                "corrected_by": fixed.get(r.seq),
                                "signed_by_records": signed.get(r.seq, [])} for r in rows]))
        return
    if not rows:
        say("no records")
        return
    say(f"{'SEQ':>5}  {'KIND':<9}  {'WHEN':<19}  {'DIVER':<18}  RECORD")
    for r in rows:
        notes = []
        if r.corrects:
            notes.append(f"corrects #{r.corrects}")
        if r.seq in fixed:
            notes.append(f"CORRECTED by #{fixed[r.seq]}")
        if r.seq in signed:
            notes.append("signed #" + ",#".join(str(s) for s in signed[r.seq]))
        extra = f" [{'; '.join(notes)}]" if notes else ""
        when = (r.occurred_at or "")[:19]
        say(f"{r.seq:>5}  {r.kind:<9}  {when:<19}  {printable(r.diver or '-')[:18]:<18}  "
                   f"{printable(summary(r))}{extra}")


@records_app.command("show")
@guarded
def show(
    seq: int = typer.Argument(..., help="Record number (SEQ in 'records list')."),
    as_json: bool = typer.Option(False, "--json", help="Print the record as JSON."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Show one record: its header, hashes, content, corrections and signatures."""
    from supervisor.records.export import record_json

    with open_store(db) as store:
        r = store.get(seq)
        doc = record_json(store, r)
        later = [c.seq for c in store.records() if c.corrects == seq]
        sigs = store.records(kind="signature", refers_to=seq)
    if as_json:
        typer.echo(json_text({**doc, "corrected_by": later,
                               "signatures": [s.seq for s in sigs]}))
        return
    for key in ("seq", "kind", "created_at", "occurred_at", "job", "diver", "refers_to",
                "corrects", "content_sha256", "prev_hash", "record_hash"):
        say(f"{key + ':':<16}{printable(doc[key]) if doc[key] is not None else '-'}")
    if later:
        say(f"{'corrected by:':<16}" + ", ".join(f"#{c}" for c in later)
                   + " (this record stays as it was; read the correction)")
    for s in sigs:
        b = s.body or {}
        say(f"{'signature:':<16}#{s.seq} by {printable(b.get('signer'))} (certificate "
                   f"SHA-256 {b.get('fingerprint_sha256')}); check with 'records verify'")
    say("content:")
    body = doc["body"]
    text = json.dumps(body, indent=2, ensure_ascii=False, sort_keys=True) if body is not None \
        else "(removed under the retention rules; the tombstone names its content hash)"
    say(printable(text, keep_newlines=True))


@records_app.command("verify")
@guarded
def verify(
    as_json: bool = typer.Option(False, "--json", help="Print the result as JSON."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Walk the hash chain and check every signature; name the first record that does not match."""
    from supervisor.cli.checklist import _quiet_libraries
    from supervisor.records.signing import check_signature

    _quiet_libraries()
    with open_store(db) as store:
        where = store.location.display()
        report = store.verify()
        sig_results: list[dict[str, Any]] = []
        bad_sig: dict[str, Any] | None = None
        if report.intact:
            for s in store.records(kind="signature"):
                if s.body is None:
                    continue
                ok, why = check_signature(s, store.get(s.refers_to))
                item = {"seq": s.seq, "signs": s.refers_to, "valid": ok, "detail": why}
                sig_results.append(item)
                if not ok and bad_sig is None:
                    bad_sig = item
    first_bad = report.first_bad if not report.intact else (bad_sig or {}).get("seq")
    problem = report.problem if not report.intact else (
        f"signature on record {bad_sig['signs']} does not verify: {bad_sig['detail']}"
        if bad_sig else "")
    if as_json:
        typer.echo(json_text({
            "store": where, "intact": first_bad is None, "records": report.count,
            "head": {"seq": report.head_seq, "record_hash": report.head_hash},
            "first_bad": first_bad, "problem": problem, "purged": report.purged,
            "signatures": sig_results}))
    elif first_bad is not None:
        say(f"BROKEN: {where}: record {first_bad} does not match: {problem}")
        say(f"  records before it verify ({report.count if not report.intact else '-'} "
                   "checked); do not rely on this record or any after it until the cause is "
                   "found")
    else:
        say(f"INTACT: {where}: {report.count} records, every hash and link matches"
                   + (f", {len(sig_results)} signature(s) valid" if sig_results else ""))
        if report.head_seq is not None:
            say(f"  head #{report.head_seq} sha256 {report.head_hash}")
            say("  note: write the head down (daily log, checklist): a chain cut after "
                       "a record still verifies up to it")
        if report.purged:
            say(f"  {report.purged} record bodies removed under tombstones (headers "
                       "verified)")
    raise typer.Exit(EXIT_FAIL if first_bad is not None else EXIT_OK)


@records_app.command("export")
@guarded
def export(
    fmt: ExportFormat = typer.Option(ExportFormat.json, "--format", help="json (complete, "
                                     "re-verifiable) or csv (one row per record)."),
    out: Path | None = typer.Option(None, "--out", help="Write to this file (never replaced) "
                                    "instead of standard output."),
    kind: str | None = typer.Option(None, "--kind", help="Only records of this kind."),
    diver: str | None = typer.Option(None, "--diver", help="Only this diver's records."),
    job: str | None = typer.Option(None, "--job", help="Only this job's records."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Export the records as JSON or CSV, with their hashes."""
    from supervisor.records.export import export_csv, export_json

    with open_store(db) as store:
        rows = store.records(kind=_kind_option(kind), diver=diver, job=job)
        complete = kind is None and diver is None and job is None
        text = export_json(store, rows, complete=complete) if fmt == ExportFormat.json \
            else export_csv(rows)
    _write(out, text)


def _write(out: Path | None, text: str) -> None:
    from supervisor.cli.plan import _Exists, write_new_file

    if out is None:
        typer.echo(text, nl=False)
        return
    try:
        write_new_file(out, text)
    except _Exists:
        fail_input("--out", f"{out} exists; an export is never written over a file")
    say(f"wrote {out}")


def _as_of(value: str | None) -> dt.date:
    if value is None:
        return dt.date.today()
    try:
        return dt.date.fromisoformat(value)
    except ValueError:
        fail_input("--as-of", f"got {value!r}; expected a date such as 2031-05-14")
    raise AssertionError  # unreachable


@records_app.command("retention")
@guarded
def retention(
    as_of: str | None = typer.Option(None, "--as-of", help="The date to decide on (default: "
                                     "today), YYYY-MM-DD."),
    archive: Path | None = typer.Option(None, "--archive", help="Write the records that may "
                                        "be archived to this JSON file (nothing is deleted)."),
    as_json: bool = typer.Option(False, "--json", help="Print the decisions as JSON."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """List what may be archived under the one-year and five-year rules (deletes nothing)."""
    from supervisor.records.export import export_json
    from supervisor.records.retention import archivable

    day = _as_of(as_of)
    with open_store(db) as store:
        eligible, decisions = archivable(store, day)
        text = export_json(store, eligible, complete=False) if archive is not None else ""
    if as_json:
        typer.echo(json_text({"as_of": day.isoformat(),
                               "decisions": [d.to_json() for d in decisions]}))
    else:
        counts = {s: sum(1 for d in decisions if d.status == s)
                  for s in ("may-archive", "keep", "review")}
        say(f"retention on {day}: {counts['may-archive']} may be archived, "
                   f"{counts['keep']} kept, {counts['review']} need review")
        for d in decisions:
            until = d.keep_until or "-"
            cite = f" [{d.citation}; {d.source_status}]" if d.citation else ""
            say(f"{d.seq:>5}  {d.kind:<9}  {d.status:<11}  until {until:<10}  "
                       f"{d.reason}{cite}")
        say("Nothing is deleted by this listing; removal takes 'records retention "
                   "--archive FILE' then 'records purge --archive FILE'.  Local rules and the "
                   "contractor's manual may require longer.")
    if archive is not None:
        if not eligible:
            say("no record may be archived; no archive written")
            return
        _write(archive, text)


@records_app.command("purge")
@guarded
def purge(
    archive: Path = typer.Option(..., "--archive", help="The archive written by 'records "
                                 "retention --archive'.", show_default=False),
    as_of: str | None = typer.Option(None, "--as-of", help="The date to decide on (default: "
                                     "today)."),
    yes: bool = typer.Option(False, "--yes", help="Do not ask; purge (for scripts)."),
    by: str | None = typer.Option(None, "--by", help="Name of the person confirming."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Remove the content of records past retention, after checking they are in the archive."""
    from supervisor.records.retention import tombstone

    day = _as_of(as_of)
    with open_store(db, create=False) as store:
        stone, seqs = tombstone(store, archive, day, by or "")
        say(f"{len(seqs)} record bodies may be removed on {day}: "
                   + ", ".join(f"#{s}" for s in seqs))
        say(f"each is in {archive} unchanged; headers and hashes stay in the chain, "
                   "and a tombstone record names what was removed")
        if not yes:
            try:
                answer = typer.prompt(f"type {len(seqs)} to remove them", default="",
                                      show_default=False)
            except (typer.Abort, EOFError, OSError):  # no terminal to answer on
                answer = ""
            if answer.strip() != str(len(seqs)):
                error_line("purge: not confirmed; nothing removed")
                raise typer.Exit(EXIT_BAD_INPUT)
        done = store.purge(stone, seqs)
    say(f"removed {len(seqs)} record bodies; tombstone #{done.seq} sha256 "
               f"{done.record_hash}")


@records_app.command("sign")
@guarded
def sign(
    seq: int = typer.Argument(..., help="Record to sign."),
    key: Path = typer.Option(..., "--sign", help="Key file (.p12 from 'supervisor keys new').",
                             show_default=False),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
) -> None:
    """Sign a record with the supervisor's key (the signature is a record of its own)."""
    from supervisor.cli.checklist import _quiet_libraries
    from supervisor.records.signing import signature_record
    from supervisor.report.keys import load_identity, read_key_file

    _quiet_libraries()
    read_key_file(key)
    identity = load_identity(key, passphrase())
    with open_store(db) as store:
        target = store.get(seq)
        done = store.append(signature_record(target, identity))
    say(f"recorded #{done.seq} signature on record {seq} by {printable(identity.name)} "
               f"(certificate SHA-256 {identity.fingerprint_sha256})")


@records_app.command("schema")
@guarded
def schema(
    name: SchemaName = typer.Argument(..., help="dcs or treatment."),
) -> None:
    """Print the JSON Schema of a TOML input of 'records add' (dcs, treatment)."""
    from supervisor.records.kinds import schemas

    typer.echo(json_text(schemas()[name.value]))


def register(app: typer.Typer) -> None:
    """Add the ``records`` commands to the application."""
    app.add_typer(records_app, name="records")
