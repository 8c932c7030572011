"""``supervisor tables``: list, show, validate, verify and import reference tables.

Exit status
-----------
list      0; 1 if a bundled table fails to load.
show      0; 2 if the table cannot be found, read or loaded.
validate  0 valid (warnings allowed); 1 the file reads but fails validation;
          2 the file cannot be read (missing, not UTF-8, not TOML).
verify    0 recorded; 1 the file fails validation (nothing written);
          2 bad option, unknown row or unreadable file (nothing written).
import    0 written; 1 the imported table fails validation (nothing written);
          2 bad option or cell, or the output exists without --force.
build     0 written; 2 bad option or a schedule the engine cannot compute.
lookup    0 a row found; 1 outside the table or no such schedule; 2 bad input.
screen    0 no row flagged; 1 rows flagged, or the file fails the sanity rules (it is
          still screened: screening is a transcription aid); 2 unreadable file or one
          that fails the schema.  A treatment table is screened for its arithmetic: step
          times against the stated totals, travel against the stated rates.
"""

from __future__ import annotations

import math
from enum import StrEnum
from pathlib import Path
from typing import Any

import typer

from supervisor.cli._common import (
    EXIT_BAD_INPUT,
    EXIT_FAIL,
    error_line,
    guarded,
    json_text,
    say,
)
from supervisor.errors import InputError
from supervisor.references import (
    ImportOptions,
    InvalidTableError,
    Table,
    UnreadableTableError,
    bundled_paths,
    import_csv,
    load_table,
    validate_file,
    verify_rows,
)
from supervisor.references.build import FSW_SPEC, MSW_SPEC, build_tables
from supervisor.references.issues import errors
from supervisor.references.schema import MODE_TITLES
from supervisor.references.screen import DEFAULT_TOLERANCE, screen_table

tables_app = typer.Typer(
    name="tables",
    help="Reference tables: list, show, validate, verify, import, build and screen.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)


class KindChoice(StrEnum):
    """Table kinds accepted by ``tables import``."""

    no_stop = "no-stop"
    decompression = "decompression"
    treatment = "treatment"
    limits = "limits"
    model_coefficients = "model-coefficients"


class StatusChoice(StrEnum):
    """Source statuses accepted by ``tables import``."""

    verified = "VERIFIED"
    secondary = "SECONDARY"
    older_edition = "OLDER-EDITION"
    derived = "DERIVED"
    from_memory = "FROM MEMORY"


class ModelChoice(StrEnum):
    """Coefficient sets of the engine."""

    zhl16a = "zhl16a"
    zhl16b = "zhl16b"
    zhl16c = "zhl16c"


class BuildUnit(StrEnum):
    """Which computed tables ``tables build`` writes."""

    both = "both"
    fsw = "fsw"
    msw = "msw"


class UnitChoice(StrEnum):
    """Depth units of a table."""

    fsw = "fsw"
    msw = "msw"


def _cut(text: str, width: int) -> str:
    return text if len(text) <= width else text[: width - 1] + "…"


def _fmt(x: Any) -> str:
    if isinstance(x, float):
        if math.isinf(x):
            return "unlimited"
        return f"{x:g}"
    return str(x)


@tables_app.command("list")
@guarded
def list_tables(
    as_json: bool = typer.Option(False, "--json", help="Print JSON (supervisor.tables-list/1)."),
) -> None:
    """List the bundled tables: name, kind, edition, source status, rows verified/total."""
    entries: list[dict[str, Any]] = []
    failed = False
    for path in bundled_paths():
        try:
            t = load_table(path)
        except (InvalidTableError, UnreadableTableError) as exc:
            failed = True
            entries.append({"name": path.stem, "kind": path.parent.name, "edition": "",
                            "source_status": "", "rows": 0, "verified": 0,
                            "error": str(exc)})
            continue
        entries.append({"name": t.name, "kind": t.kind, "edition": t.model.provenance.edition,
                        "source_status": t.least_status, "rows": len(t.rows),
                        "verified": t.n_verified, "error": None})
    if as_json:
        typer.echo(json_text({"schema": "supervisor.tables-list/1", "tables": entries}))
    else:
        say(f"{'name':<26} {'kind':<19} {'edition':<32} {'source status':<14} verified")
        for e in entries:
            if e["error"]:
                say(f"{e['name']:<26} {e['kind']:<19} INVALID: {e['error']}")
                continue
            say(f"{e['name']:<26} {e['kind']:<19} {_cut(e['edition'], 32):<32} "
                       f"{e['source_status']:<14} {e['verified']}/{e['rows']}")
    if failed:
        raise typer.Exit(EXIT_FAIL)


def _row_status(t: Table, i: int) -> str:
    st = t.row_states[i]
    return f"{st.source_status}, {'verified' if st.verified else 'unverified'}"


def _show_rows(t: Table) -> list[str]:
    out: list[str] = []
    unit = getattr(t.model.conventions, "depth_unit", "")
    if t.kind == "no-stop":
        out.append(f"{'row':>4}  {'depth ' + unit:>9}  {'no-stop limit':>13}  groups  status")
        for i, r in enumerate(t.rows):
            groups = " ".join(f"{g}:{_fmt(v)}" for g, v in r.repetitive_groups.items()) or "-"
            lim = "unlimited" if r.unlimited else f"{_fmt(r.limit_min)} min"
            out.append(f"{i + 1:>4}  {_fmt(r.depth):>9}  {lim:>13}  {groups}  {_row_status(t, i)}")
    elif t.kind == "decompression":
        # the stops come last and in full, however long (no row is cut)
        out.append(f"{'row':>4}  {'depth/time':>10}  {'mode':<7} {'total':>6} group "
                   f"{'flags':<13} {'status':<22} stops (depth:min)")
        for i, r in enumerate(t.rows):
            key = f"{_fmt(r.depth)}/{_fmt(r.bottom_time)}"
            for k, (mode, s) in enumerate(r.schedules().items()):
                stops = " ".join(
                    f"{_fmt(x.depth)}:{_fmt(x.minutes)}"
                    + ("" if x.gas == "air" else f" {x.gas}")
                    + ("" if x.place == "water" else " ch") for x in s.stops) or "-"
                if s.chamber_o2_periods is not None:
                    stops += f" +{_fmt(s.chamber_o2_periods)} ch-O2"
                flags = ",".join(f for f, on in (("EE", r.exceptional_exposure),
                                                 ("not-permitted", not s.permitted)) if on) or "-"
                total = _fmt(s.total_ascent) if s.total_ascent is not None else "-"
                lead = f"{i + 1:>4}  {key:>10}" if k == 0 else " " * 16
                status = _row_status(t, i) if k == 0 else ""
                out.append(f"{lead}  {mode:<7} {total:>6} {r.repetitive_group or '-':<5} "
                           f"{flags:<13} {status:<22} {stops}")
    elif t.kind == "treatment":
        out.append(f"{'step':>4}  {'from→to ' + unit:>12}  {'min':>5}  {'gas':<8} {'rate':>5} "
                   f"{'elapsed':>7}  status")
        for i, s in enumerate(t.rows):
            ft = f"{_fmt(s.from_depth)}→{_fmt(s.to_depth)}"
            rate = _fmt(s.travel_rate) if s.travel_rate else "-"
            el = _fmt(s.elapsed_min) if s.elapsed_min is not None else "-"
            out.append(f"{s.step:>4}  {ft:>12}  {_fmt(s.minutes):>5}  {s.gas:<8} {rate:>5} "
                       f"{el:>7}  {_row_status(t, i)}")
    else:
        cols = [k for k, v in t.rows[0].data().items() if not isinstance(v, dict)]
        widths = [max(len(c), *(len(_fmt(r.data().get(c, ""))) for r in t.rows)) for c in cols]
        out.append(f"{'row':>4}  " + "  ".join(f"{c:>{w}}" for c, w in zip(cols, widths,
                                                                          strict=True))
                   + "  status")
        for i, r in enumerate(t.rows):
            cells = "  ".join(f"{_fmt(r.data().get(c, '')):>{w}}"
                              for c, w in zip(cols, widths, strict=True))
            out.append(f"{i + 1:>4}  {cells}  {_row_status(t, i)}")
    return out


def _treatment_conventions(t: Table) -> list[str]:
    """The planning conventions of a treatment table, for ``tables show``."""
    c = t.model.conventions
    out = []
    if c.table_number:
        out.append(f"table number: {c.table_number}; {c.citation or 'no citation given'}")
    if c.indication:
        out.append(f"use: {c.indication}")
    if c.compression_rate is not None:
        out.append(f"compression: {_fmt(c.compression_rate)} {c.depth_unit}/min to the first "
                   f"step, outside the table time ({c.compression_status})")
    elif c.compression_in_first_step:
        out.append("compression: included in the first step's time")
    if c.stated_total_min is not None:
        out.append(f"stated total: {_fmt(c.stated_total_min)} min ({c.stated_total_status})"
                   + (f"; with every extension {_fmt(c.stated_total_extended_min)} min "
                      f"({c.stated_total_extended_status})"
                      if c.stated_total_extended_min is not None else ""))
    if c.plannable:
        out.append("planning: `supervisor treatment plan " + (c.table_number or "NUMBER")
                   + " --start HH:MM`")
    else:
        out.append("planning: REFUSED; the bundled source lacks: " + "; ".join(c.missing))
    if c.plannable and c.missing:
        out.append("not planned: " + "; ".join(c.missing))
    for e in c.extensions:
        parts = " + ".join(f"{_fmt(x.minutes)} min {x.gas}" for x in e.periods)
        out.append(f"extension --extend-{e.option}: up to {e.max_count} x ({parts}) at "
                   f"{_fmt(e.depth)} {c.depth_unit} after step {e.after_step}: {e.meaning} "
                   f"[{e.citation}; {e.source_status}]")
    if not c.extensions:
        out.append("extensions: none bundled")
    for a in c.attendant_oxygen:
        out.append(f"attendant ({a.when}{'' if a.extensions is None else ' ' + str(a.extensions)}"
                   f"): {a.case} [{a.citation}; {a.source_status}]")
    if not c.attendant_oxygen:
        out.append("attendant oxygen rule: none bundled")
    return out


def show_json(t: Table) -> dict[str, Any]:
    """The ``supervisor.tables-show/1`` object: header, provenance, conventions, every row.

    Each row is the file's row (data and verification columns) with ``row`` (1-based),
    ``label`` and ``status`` (``source_status``, ``verified`` after the hash checks and
    the ``reason`` when not).
    """
    doc = t.model.model_dump(mode="json", by_alias=True, exclude={"rows"})
    rows = []
    for i, r in enumerate(t.rows):
        st = t.row_states[i]
        rows.append({"row": i + 1, "label": t.label(i),
                     **r.model_dump(mode="json", by_alias=True),
                     "status": {"source_status": st.source_status, "verified": st.verified,
                                "reason": st.reason}})
    return {"schema": "supervisor.tables-show/1", **{k: v for k, v in doc.items()
                                                    if k != "schema"},
            "table_schema": doc.get("schema"), "path": str(t.path) if t.path else None,
            "rows_verified": t.n_verified, "rows": rows,
            "issues": [i.to_dict() for i in t.issues]}


@tables_app.command("show")
@guarded
def show(
    name: str = typer.Argument(..., help="Bundled table name (see `tables list`) or a file path."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON (supervisor.tables-show/1): "
                                 "every row with its data and verification status."),
) -> None:
    """Show one table: source, conventions and every row in full with its status."""
    t = load_table(name)
    if as_json:
        typer.echo(json_text(show_json(t)))
        for issue in t.issues:
            say(issue.line(t.name), err=True)
        return
    p = t.model.provenance
    say(f"{t.name}: {t.model.title} ({t.kind})")
    say(f"source:  {p.source_document}; {p.edition}; {p.table}; {p.date}")
    say(f"issued:  {p.issuing_body}; licence: {p.licence}")
    say(f"status:  {p.source_status}; {t.n_verified} of {len(t.rows)} rows verified; "
               f"transcribed by {p.transcribed_by} {p.transcribed_on}".rstrip())
    c = t.model.conventions
    if t.kind in ("no-stop", "decompression"):
        say(f"conventions: {c.depth_unit}; next deeper depth, next longer bottom time; "
                   f"ascent {_fmt(c.ascent_rate)} {c.depth_unit}/min; gas {c.gas}; {c.place}; "
                   f"stops measured at: {c.stop_depth_reference}")
        say(f"bottom time: {c.bottom_time_definition}")
    elif t.kind == "treatment":
        say(f"conventions: {c.depth_unit}; {c.place}; time: {c.time_definition}")
        for line in _treatment_conventions(t):
            say(line)
    if t.kind == "decompression":
        say("modes: " + "; ".join(f"{k} = {v}" for k, v in MODE_TITLES.items()))
    for line in _show_rows(t):
        say(line.rstrip())
    for issue in t.issues:
        say(issue.line(t.name), err=True)


@tables_app.command("lookup")
@guarded
def lookup(
    name: str = typer.Argument(..., help="Bundled table name (see `tables list`) or a file path."),
    depth: float = typer.Option(..., "--depth", help="Maximum depth of the dive [table unit]."),
    bottom_time: float = typer.Option(..., "--bottom-time", help="Bottom time [min]."),
    mode: str = typer.Option("air", "--mode", help="Decompression mode of a decompression "
                             "table: air, air_o2 or surd_o2."),
    as_json: bool = typer.Option(False, "--json", help="Print the look-up as JSON."),
) -> None:
    """Look a dive up: next deeper depth, next longer bottom time, or outside the table.

    Exit 0 a row was found, 1 the dive is outside the table (or no such schedule), 2 bad
    input.  A row that is not verified, or from a source that is not VERIFIED, needs review.
    """
    from supervisor.references import lookup_no_stop, lookup_schedule

    t = load_table(name)
    if t.kind == "no-stop":
        res = lookup_no_stop(t, depth, bottom_time)
    elif t.kind == "decompression":
        if mode not in MODE_TITLES:
            raise InputError("--mode", f"got {mode!r}; expected one of {', '.join(MODE_TITLES)}")
        res = lookup_schedule(t, depth, bottom_time, mode=mode)
    elif t.kind == "treatment":
        number = t.model.conventions.table_number or "NUMBER"
        raise InputError("NAME", f"{t.name} is a treatment table; look-up works on no-stop and "
                         f"decompression tables; plan a treatment with `supervisor treatment plan "
                         f"{number} --start HH:MM`")
    else:
        raise InputError("NAME", f"{t.name} is a {t.kind} table; look-up works on no-stop and "
                         "decompression tables")
    d = res.to_dict()
    if as_json:
        typer.echo(json_text(d))
    else:
        u = d["unit"]
        if d["outside_table"]:
            say(f"{t.name}: {_fmt(depth)} {u} / {_fmt(bottom_time)} min is outside the "
                       f"table: {d['reason']}")
        else:
            say(f"{t.name}: entered at {_fmt(d['depth'])} {u}"
                       + (f" / {_fmt(d['bottom_time_min'])} min" if d.get("bottom_time_min")
                          is not None else "") + f" (row {d['row']})")
            if t.kind == "decompression" and d.get("stops") is not None:
                stops = ", ".join(f"{_fmt(x['depth'])} {u} {_fmt(x['minutes'])} min {x['gas']}"
                                  f"{' (chamber)' if x['place'] == 'chamber' else ''}"
                                  for x in d["stops"]) or "no decompression stops"
                say(f"{mode}: {stops}")
            if d.get("no_stop_limit_min") is not None:
                lim = d["no_stop_limit_min"]
                lim = lim if isinstance(lim, str) else f"{_fmt(lim)} min"
                within = {True: "yes", False: "no"}.get(d.get("within_no_stop_limit"), "-")
                say(f"no-stop limit: {lim}; bottom time within it: {within}")
            if d.get("exceptional_exposure"):
                say("exceptional exposure")
            if d.get("reason"):
                say(f"note: {d['reason']}")
            review = "needs review" if d.get("needs_review") else "verified row"
            say(f"row: {d['row_verification']}, source {d['source_status']} ({review})")
    no_row = d["outside_table"] or (t.kind == "decompression" and d.get("stops") is None)
    if no_row:
        raise typer.Exit(EXIT_FAIL)


@tables_app.command("validate")
def validate(
    file: Path = typer.Argument(..., help="Table file (TOML) to check."),
    as_json: bool = typer.Option(False, "--json",
                                 help="Print JSON (supervisor.tables-validate/1)."),
) -> None:
    """Check a table file: provenance, schema and units, verification record, sanity rules.

    Exit 0 valid, 1 the file reads but fails validation, 2 the file cannot be read.
    """
    try:
        issues = validate_file(file)
    except UnreadableTableError as exc:
        error_line(exc)
        raise typer.Exit(EXIT_BAD_INPUT) from None
    errs = errors(issues)
    if as_json:
        typer.echo(json_text({"schema": "supervisor.tables-validate/1", "file": str(file),
                               "valid": not errs,
                               "issues": [i.to_dict() for i in issues]}))
    else:
        for i in issues:
            say(i.line(str(file)))
        n_warn = len(issues) - len(errs)
        if errs:
            say(f"{file}: invalid: {len(errs)} error(s), {n_warn} warning(s)")
        else:
            say(f"{file}: valid ({n_warn} warning(s))")
    if errs:
        raise typer.Exit(EXIT_FAIL)


@tables_app.command("verify")
@guarded
def verify(
    file: Path = typer.Argument(..., help="Table file (TOML) whose rows were checked."),
    rows: str = typer.Option(..., "--rows", help="Rows checked: all; row numbers and ranges "
                             "such as 1-5,9; or keys @DEPTH and @DEPTH/TIME."),
    by: str = typer.Option(..., "--by", help="Name of the second person who checked the rows "
                           "(not the transcriber)."),
    method: str = typer.Option(..., "--method", help="How the rows were checked, e.g. 'read "
                               "aloud against the printed table, p. 9-63'."),
    on: str = typer.Option(None, "--on", help="Date of the check, YYYY-MM-DD (default today)."),
) -> None:
    """Record a second person's check of table rows, with the date and the row hashes."""
    try:
        outcome = verify_rows(file, rows, by, method, on)
    except InvalidTableError as exc:
        for i in exc.issues:
            say(i.line(str(file)), err=True)
        say(f"error: {file} fails validation; nothing recorded", err=True)
        raise typer.Exit(EXIT_FAIL) from None
    say(f"{file}: recorded check by {by.strip()} of {len(outcome.rows)} row(s)")
    if outcome.voided:
        say(f"{file}: earlier checks no longer valid, reset to unverified: rows "
                   + ", ".join(map(str, outcome.voided)))
    t = load_table(file)
    low = {t.row_states[r - 1].source_status for r in outcome.rows} - {"VERIFIED"}
    if low:
        say(f"note: the checked rows' source status is {', '.join(sorted(low))}; "
                   "findings that use them stay 'needs review'")


@tables_app.command("import")
@guarded
def import_table(
    csv_file: Path = typer.Argument(..., metavar="CSV", help="The contractor's table as CSV "
                                    "(columns per kind: see tables/README.md)."),
    kind: KindChoice = typer.Option(..., "--kind", help="Kind of table."),
    source: str = typer.Option(..., "--source", help="Title of the source document."),
    out: Path = typer.Option(None, "--out", help="Output table file (default: CSV name with "
                             ".toml)."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing output file."),
    issuing_body: str = typer.Option("not stated", "--issuing-body", help="Who issued it."),
    edition: str = typer.Option("not stated", "--edition", help="Edition or revision."),
    table_id: str = typer.Option("not stated", "--table", help="Table number or section."),
    date: str = typer.Option("not stated", "--date", help="Date of the edition."),
    licence: str = typer.Option("not stated", "--licence", help="Licence or release statement."),
    source_status: StatusChoice = typer.Option(StatusChoice.secondary, "--source-status",
                                               help="How good the source is."),
    transcribed_by: str = typer.Option("not stated", "--transcribed-by",
                                       help="Who transcribed the CSV."),
    unit: UnitChoice = typer.Option(UnitChoice.fsw, "--unit", help="Depth unit."),
    ascent_rate: float = typer.Option(30.0, "--ascent-rate",
                                      help="Ascent rate [depth unit/min]."),
    stop_step: float = typer.Option(10.0, "--stop-step", help="Stop interval [depth unit]."),
    last_stop: float = typer.Option(10.0, "--last-stop", help="Last stop depth [depth unit]."),
    includes_travel: bool = typer.Option(False, "--stop-time-includes-travel",
                                         help="Stop minutes include travel from the stop "
                                         "before."),
    bottom_time_definition: str = typer.Option("not stated", "--bottom-time-definition",
                                               help="How the source defines bottom time."),
    stop_depth_reference: str = typer.Option("not stated", "--stop-depth-reference",
                                             help="Where stop depth is measured."),
) -> None:
    """Import a contractor's own table from CSV; every row unverified, provenance from options."""
    opts = ImportOptions(
        source=source, issuing_body=issuing_body, edition=edition, table=table_id, date=date,
        licence=licence, source_status=source_status.value, transcribed_by=transcribed_by,
        unit=unit.value, ascent_rate=ascent_rate, stop_step=stop_step, last_stop=last_stop,
        stop_time_includes_travel=includes_travel,
        bottom_time_definition=bottom_time_definition,
        stop_depth_reference=stop_depth_reference,
    )
    try:
        target, warnings = import_csv(csv_file, kind.value, opts, out, force)
    except InvalidTableError as exc:
        for i in exc.issues:
            say(i.line(str(exc.path)), err=True)
        say(f"error: {csv_file} does not make a valid table; nothing written", err=True)
        raise typer.Exit(EXIT_FAIL) from None
    for w in warnings:
        say(w.line(str(target)), err=True)
    t = load_table(target)
    say(f"{target}: {t.kind} table {t.name} with {len(t.rows)} rows, all unverified")


@tables_app.command("build")
@guarded
def build(
    out_dir: Path = typer.Option(Path("."), "--out-dir", help="Folder to write the tables to "
                                 "(tables/decompression refreshes the bundled ones)."),
    unit: BuildUnit = typer.Option(BuildUnit.both, "--unit", help="fsw (30-190 fsw, stops "
                                   "every 10 fsw), msw (9-57 msw, stops every 3 msw) or both."),
    model: ModelChoice = typer.Option(ModelChoice.zhl16c, "--model", help="Coefficient set."),
    gf: str = typer.Option("30/85", "--gf", help="Gradient factors LOW/HIGH in percent."),
    max_stop_time: float = typer.Option(180.0, "--max-stop-time", help="End each depth with "
                                        "the first bottom time whose total stop time exceeds "
                                        "this [min]."),
    force: bool = typer.Option(False, "--force", help="Replace existing files that differ."),
) -> None:
    """Compute air decompression tables from ZH-L16 with gradient factors (model output).

    The result is labelled as computed by this project from a published model, not a
    published table, and is reproducible byte for byte.
    """
    from dataclasses import replace

    from supervisor.cli.schedule import parse_gf

    if not (max_stop_time > 0 and math.isfinite(max_stop_time)):
        raise InputError("--max-stop-time", f"got {max_stop_time!r}; expected minutes > 0")
    lo, hi = parse_gf(gf)
    specs = {"fsw": (FSW_SPEC,), "msw": (MSW_SPEC,), "both": (FSW_SPEC, MSW_SPEC)}[unit.value]
    specs = tuple(replace(s, gf_low=lo, gf_high=hi, model=model.value,
                          max_stop_time=max_stop_time) for s in specs)
    for path, state in build_tables(out_dir, specs, force=force):
        say(f"{path}: {state}")


@tables_app.command("screen")
@guarded
def screen(
    file: Path = typer.Argument(..., help="No-stop, decompression or treatment table file "
                                "(TOML)."),
    model: ModelChoice = typer.Option(ModelChoice.zhl16c, "--model", help="Coefficient set "
                                      "(not used for a treatment table)."),
    tolerance: float = typer.Option(None, "--tolerance",
                                    help="Flag a row whose surfacing supersaturation differs "
                                    "from every neighbour's by more than this [% of the "
                                    "M-value gradient, default 10]; for a treatment table, a "
                                    "total or travel time off by more than this [min, default "
                                    "1]."),
    descent_rate: float = typer.Option(None, "--descent-rate", help="Descent rate [depth "
                                       "unit/min] (default 75 fsw/min or 23 msw/min)."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON (supervisor.tables-screen/1)."),
) -> None:
    """Run every row through the model; report its surfacing supersaturation, flag outliers.

    Exit 0 when no row is flagged, 1 when rows are flagged or the file fails the sanity
    rules (it is screened all the same), 2 for an unreadable file.
    """
    t = load_table(file, strict=False)
    if t.kind == "treatment":
        _screen_treatment(t, file, tolerance, as_json)
        return
    if tolerance is None:
        tolerance = 100 * DEFAULT_TOLERANCE
    rep = screen_table(t, model.value, descent_rate, tolerance / 100.0)
    if as_json:
        typer.echo(json_text(rep.to_dict()))
    else:
        say(f"{t.name}: screened with {rep.model} (coefficients {rep.coefficient_status}); "
                   f"flag when a row differs from every neighbour by more than "
                   f"{100 * rep.tolerance:g} % of the M-value gradient")
        say(f"{'row':>4}  {'key':<22} {'mode':<7} {'surfacing':>9} {'max':>5} "
                   f"{'nearest':>7}  note")
        for r in rep.rows:
            def pct(x: float | None) -> str:
                return "-" if x is None else f"{100 * x:.0f}%"

            say(f"{r.row:>4}  {r.label:<22} {r.mode or '-':<7} {pct(r.surfacing_gf):>9} "
                       f"{pct(r.max_gf):>5} {pct(r.nearest_gf):>7}  "
                       f"{'FLAG ' if r.flagged else ''}{r.note}".rstrip())
        flagged = sorted({r.row for r in rep.flagged})
        say(f"{len(flagged)} row(s) flagged" + (": " + ", ".join(map(str, flagged))
                                                        if flagged else ""))
    if rep.validation_errors:
        say(f"note: {file} also fails validation ({len(rep.validation_errors)} "
                   "error(s)); run `supervisor tables validate`", err=True)
    if rep.flagged or rep.validation_errors:
        raise typer.Exit(EXIT_FAIL)


def _screen_treatment(t: Table, file: Path, tolerance: float | None, as_json: bool) -> None:
    """``tables screen`` on a treatment table: step times, totals and travel against rates."""
    from supervisor.references.screen_treatment import DEFAULT_TOLERANCE_MIN, screen_treatment

    rep = screen_treatment(t, DEFAULT_TOLERANCE_MIN if tolerance is None else tolerance)
    if as_json:
        typer.echo(json_text(rep.to_dict()))
    else:
        say(f"{t.name}: treatment table screened: step times against the stated totals "
                   f"and travel against the stated rates (flag beyond {rep.tolerance_min:g} min)")
        say(f"{'check':<15} {'what':<34} {'expected':>9} {'found':>7}  note")
        for ck in rep.checks:
            def m(x: float | None) -> str:
                return "-" if x is None else f"{x:g}"

            say(f"{ck.check:<15} {_cut(ck.label, 34):<34} {m(ck.expected):>9} "
                       f"{m(ck.found):>7}  {'FLAG ' if ck.flagged else ''}{ck.note}".rstrip())
        say(f"{len(rep.flagged)} check(s) flagged")
    if rep.validation_errors:
        say(f"note: {file} also fails validation ({len(rep.validation_errors)} "
                   "error(s)); run `supervisor tables validate`", err=True)
    if rep.flagged or rep.validation_errors:
        raise typer.Exit(EXIT_FAIL)


def register(app: typer.Typer) -> None:
    """Add the ``tables`` sub-app to the application."""
    app.add_typer(tables_app, name="tables")
