"""``supervisor audit LOG|DIR --plan PLAN``: the executed dive against the approved plan.

Reads a depth recorder's CSV or the supervisor's timed log (TOML) with the
record store's importers, and the plan with the plan reader; prints findings in
the check's form and the verdict (``--json``: the ``supervisor.audit/1`` object).
With a folder, every log in it (``*.csv``, ``*.txt``, ``*.toml``) is audited: the
dive from a timed log's ``dive``, else from the file name (``<dive-id>*.csv``),
else ``--dive``; one summary line per log (a progress bar on a terminal's
stderr, none when piped), ``--json`` a list.

``--record`` stores each dive and its audit (and the plan, when it is not on
record) in the record store, in one transaction appended to the hash chain.

Exit status
-----------
0  conforms or needs review (every log);
1  a log does not conform (the worst of the logs);
2  bad input: a plan, log or option that cannot be used (one line naming the
   file, the line and the problem); nothing is stored.
"""

from __future__ import annotations

import sys
import textwrap
from pathlib import Path
from typing import Any

import typer

from supervisor.cli._common import EXIT_FAIL, EXIT_OK, json_text, say
from supervisor.cli.plan import plan_errors
from supervisor.cli.records_common import (
    DB_HELP,
    DEPTH_UNIT_OPTION,
    FORMAT_OPTION,
    GAS_OPTION,
    TEMPERATURE_UNIT_OPTION,
    TIME_UNIT_OPTION,
    WATER_OPTION,
    csv_options,
)
from supervisor.errors import InputError
from supervisor.text import excerpt

LOG_SUFFIXES = (".csv", ".txt", ".toml")
#: Most logs one folder may hold (a week of dives for a large crew is a few hundred).
MAX_LOGS = 5000


def audit(
    log: Path = typer.Argument(..., help="A log (recorder CSV or timed log TOML), or a folder "
                               "of logs.", show_default=False),
    plan: Path = typer.Option(..., "--plan", help="The approved plan (TOML).",
                              show_default=False),
    dive: str | None = typer.Option(None, "--dive", help="The plan's dive id (a timed log "
                                    "names its own; with a folder, for logs that name none)."),
    as_json: bool = typer.Option(False, "--json", help="Print the supervisor.audit/1 JSON "
                                 "object (a list for a folder)."),
    record: bool = typer.Option(False, "--record", help="Store the dive and its audit in the "
                                "record store."),
    db: str | None = typer.Option(None, "--db", help=DB_HELP),
    show_all: bool = typer.Option(False, "--all", help="Also list the checks that passed."),
    fmt: str | None = FORMAT_OPTION,
    depth_unit: str | None = DEPTH_UNIT_OPTION,
    time_unit: str | None = TIME_UNIT_OPTION,
    temperature_unit: str | None = TEMPERATURE_UNIT_OPTION,
    gas: str | None = GAS_OPTION,
    water: str = WATER_OPTION,
    group: str | None = typer.Option(None, "--group", help="With --record: repetitive group "
                                     "designation (a recorder log states none)."),
    since_last: float | None = typer.Option(None, "--since-last", help="With --record: time "
                                            "since the last pressure exposure, under 24 h [h]."),
    no_exposure_24h: bool = typer.Option(False, "--no-exposure-24h", help="With --record: no "
                                         "pressure exposure in the 24 h before the dive."),
    started: str | None = typer.Option(None, "--started", help="Local date and time a CSV of "
                                       "elapsed times starts, e.g. 2031-05-14T09:00."),
) -> None:
    """Audit an executed dive (its log) against the approved plan; print the verdict."""
    opts = {"fmt": fmt, "depth_unit": depth_unit, "time_unit": time_unit,
            "temperature_unit": temperature_unit, "gas": gas, "water": water}
    rec = {"group": group, "since_last": since_last, "no_exposure_24h": no_exposure_24h}
    _run(log, plan, dive, as_json, record, db, show_all, opts, rec, started)


def _logs(folder: Path) -> list[Path]:
    files = sorted(p for p in folder.iterdir() if p.is_file()
                   and p.suffix.lower() in LOG_SUFFIXES)
    if not files:
        raise InputError("LOG", f"{excerpt(str(folder))} holds no log (*.csv, *.txt, *.toml)")
    if len(files) > MAX_LOGS:
        raise InputError("LOG", f"{excerpt(str(folder))} holds {len(files)} logs; at most "
                                f"{MAX_LOGS} are audited at once")
    return files


def _dive_from_name(path: Path, ids: list[str]) -> str | None:
    """The plan's dive id the file name starts with (the longest, case-insensitive)."""
    name = path.name.lower()
    hits = [i for i in ids if name.startswith(i.lower())
            and not name[len(i):len(i) + 1].isalnum()]
    return max(hits, key=len) if hits else None


class _Progress:
    """A one-line progress bar on stderr, only on a terminal."""

    def __init__(self, total: int, label: str) -> None:
        self.total, self.label, self.done = total, label, 0
        self.on = total > 1 and sys.stderr.isatty()

    def step(self, n: int = 1) -> None:
        self.done += n
        if self.on:
            width = 30
            full = int(width * self.done / self.total)
            sys.stderr.write(f"\r{self.label} [{'#' * full}{'.' * (width - full)}] "
                             f"{self.done}/{self.total}")
            sys.stderr.flush()

    def close(self) -> None:
        if self.on:
            sys.stderr.write("\n")
            sys.stderr.flush()


def _started(imported: Any, started: str | None) -> None:
    import datetime as dt

    if started is None:
        return
    try:
        when = dt.datetime.fromisoformat(started)
    except ValueError:
        raise InputError("--started", f"got {excerpt(started)}; expected a date and time such "
                                      "as 2031-05-14T09:00") from None
    if imported.started_at is not None and imported.started_at != when:
        raise InputError("--started", f"{started} differs from the log's own start "
                                      f"{imported.started_at.isoformat()}")
    imported.started_at = when


@plan_errors
def _run(log: Path, plan: Path, dive: str | None, as_json: bool, record: bool, db: str | None,
         show_all: bool, opts: dict[str, Any], rec: dict[str, Any], started: str | None) -> None:
    from supervisor.audit import prepare
    from supervisor.audit.run import audit_many, item_from_log
    from supervisor.records.importers import read_log

    csv = csv_options(opts["depth_unit"], opts["time_unit"], opts["temperature_unit"],
                      opts["gas"], opts["water"])
    folder = log.is_dir()
    files = _logs(log) if folder else [log]
    pa = prepare(plan)
    ids = [d.id for d in pa.plan.dives]
    bar = _Progress(len(files), "reading logs")
    imported, items = [], []
    for f in files:
        one = read_log(f, opts["fmt"], csv)
        _started(one, started)
        want = dive
        if folder and one.meta.get("dive") is None:
            want = _dive_from_name(f, ids) or dive
            if want is None:
                raise InputError("LOG", f"{excerpt(f.name)} in {excerpt(str(f.parent), 60)}: "
                                        "cannot tell the dive; name the file "
                                        "<dive-id>...csv or give --dive")
        elif folder:
            want = None  # a timed log names its dive
        imported.append(one)
        items.append(item_from_log(pa, one, want))
        bar.step()
    bar.close()
    bar = _Progress(len(items), "auditing")
    results = []
    for k in range(0, len(items), 16):
        results += audit_many(pa, items[k:k + 16])
        bar.step(len(items[k:k + 16]))
    bar.close()
    if record:
        _record(pa, imported, results, rec, db)
    if as_json:
        objs = [r.to_json() for r in results]
        typer.echo(json_text(objs if folder else objs[0]))
    elif folder:
        for r in results:
            say(r.summary_line())
    else:
        _text(results[0], show_all)
    worst = {r.verdict for r in results}
    if folder and not as_json:
        say(f"verdict: {_worst(worst)} ({len(results)} logs)")
    raise typer.Exit(EXIT_FAIL if "does-not-conform" in worst else EXIT_OK)


def _worst(verdicts: set[str]) -> str:
    for v in ("does-not-conform", "needs-review", "conforms"):
        if v in verdicts:
            return v
    return "needs-review"


def _record(pa: Any, imported: list[Any], results: list[Any], rec: dict[str, Any],
            db: str | None) -> None:
    """Store the plan (unless on record), then each dive and its audit: one transaction."""
    from supervisor.audit.record import Exposure, dive_items
    from supervisor.cli.records_add import _plan_items, _plan_on_record
    from supervisor.cli.records_common import open_store
    from supervisor.records.kinds import job_ref, summary

    exposure = Exposure(rec["group"], rec["since_last"], rec["no_exposure_24h"])
    name = pa.plan_path or "plan.toml"
    for one, res in zip(imported, results, strict=True):  # refuse bad input before opening
        dive_items(one, res, exposure, "", lambda done: 0)
    with open_store(db, create=True) as store:
        known = _plan_on_record(store, pa.plan_sha256)
        items: list[Any] = [] if known is not None else _plan_items(store, pa.plan_bytes, name,
                                                                   None)
        job = known.job if known is not None else job_ref(pa.plan)

        def plan_seq(done: list[Any]) -> int:
            if known is not None:
                return int(known.seq)
            return next(r.seq for r in done if r.kind == "plan")

        for one, res in zip(imported, results, strict=True):
            items += dive_items(one, res, exposure, str(one.meta.get("job") or job), plan_seq)
        done = store.append_batch(items)
    for r in done:
        say(f"recorded #{r.seq} {r.kind}: {summary(r)}", err=True)
    say(f"chain head #{done[-1].seq} sha256 {done[-1].record_hash}", err=True)


def _text(result: Any, show_all: bool) -> None:
    from supervisor.cli.check import format_table

    j = result.to_json()
    ex, req, u = j["executed"], j["required_schedule"], j["unit"]
    src = j["log"]["source"] or {}
    say(f"audit of dive {j['dive']} ({j['diver']}) from {src.get('file')} "
        f"({'timed log' if src.get('format') == 'toml' else 'recorder CSV'}) against plan "
        f"sha256 {j['plan_sha256'][:16]}")
    bt = ex["bottom_time_min"]
    say(f"executed: max depth {ex['max_depth']:g} {u}, bottom time "
        f"{'unknown' if bt is None else f'{bt:g} min'} (approved "
        f"{req['approved']['depth']:g} {u} / {req['approved']['bottom_time_min']:g} min)")
    table = req.get("table")
    if table and table.get("row"):
        stops = ", ".join(f"{s['depth']:g}/{s['minutes']:g} {s['place']}" for s in
                          table["stops"]) or "no stops"
        say(f"required by {table['table']}: {table['depth']:g} {table['unit']} / "
            f"{table['bottom_time_min']:g} min, {stops} ({table['row_verification']}, "
            f"{table['source_status']})")
    model = req.get("model")
    if model:
        stops = ", ".join(f"{s['depth']:g}/{s['minutes']:g} {s['place']}" for s in
                          model["stops"]) or "no stops"
        say(f"required by the model: {stops} (coefficients {model['coefficient_status']})")
    say(f"the {req['governs']} schedule governs")
    say("")
    shown = [f for f in j["findings"] if show_all or f["severity"] != "pass"]
    for line in format_table(shown, 0):
        typer.echo(line)
    for f in j["findings"]:
        act = f.get("action")
        if act:
            say(f"action ({f['rule']}): {act['text']} [{act['citation']}; {act['source_status']}]")
    say("")
    for caution in j["cautions"][:2]:
        for line in textwrap.wrap(f"caution: {caution}", 100):
            say(line)
    c = j["counts"]
    say(f"verdict: {j['verdict']} ({c['fail']} fail, {c['warn']} warn, {c['info']} info, "
        f"{c['pass']} pass)")


def register(app: typer.Typer) -> None:
    """Add the ``audit`` command to the application."""
    app.command("audit")(audit)
