"""``supervisor log``: read a depth log without storing it, and the timed log's JSON Schema.

Exit status: 0 read (or schema printed); 2 a log that cannot be imported (one
line naming the file, the line and the problem).
"""

from __future__ import annotations

from pathlib import Path

import typer

from supervisor.cli._common import (
    guarded,
    json_text,
    say,
)
from supervisor.cli.records_common import (
    DEPTH_UNIT_OPTION,
    FORMAT_OPTION,
    GAS_OPTION,
    TEMPERATURE_UNIT_OPTION,
    TIME_UNIT_OPTION,
    csv_options,
    print_issues,
)

log_app = typer.Typer(
    name="log",
    help="Depth logs: read a recorder CSV or a timed log (TOML); the timed log's JSON Schema.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)


@log_app.command("schema")
@guarded
def schema() -> None:
    """Print the JSON Schema of the supervisor's timed log (supervisor-log/1)."""
    from supervisor.records.importers.timed import log_json_schema

    typer.echo(json_text(log_json_schema()))


@log_app.command("read")
@guarded
def read(
    log: Path = typer.Argument(..., help="Recorder CSV or timed log (TOML).",
                               show_default=False),
    fmt: str | None = FORMAT_OPTION,
    depth_unit: str | None = DEPTH_UNIT_OPTION,
    time_unit: str | None = TIME_UNIT_OPTION,
    temperature_unit: str | None = TEMPERATURE_UNIT_OPTION,
    gas: str | None = GAS_OPTION,
    as_json: bool = typer.Option(False, "--json", help="Print the profile and findings of the "
                                 "import as JSON."),
) -> None:
    """Import a log and show its profile, without storing anything."""
    from supervisor.records.importers import read_log
    from supervisor.records.kinds import profile_to_json

    opts = csv_options(depth_unit, time_unit, temperature_unit, gas)
    imported = read_log(log, fmt, opts)
    if as_json:
        typer.echo(json_text({"schema": "supervisor.log-import/1", "log": imported.to_json(),
                               "meta": imported.meta,
                               "profile": profile_to_json(imported.profile)}))
        return
    p = imported.profile
    bt = imported.bottom_time_min
    say(f"{log}: {imported.source.format}, {len(p.segments)} segments over "
               f"{p.duration_min:.1f} min, max depth {imported.max_depth:g} {p.unit}")
    say(f"bottom time: {bt:.1f} min ({imported.bottom_time_basis})" if bt is not None
               else f"bottom time: none ({imported.bottom_time_basis})")
    if imported.started_at is not None:
        say(f"started: {imported.started_at.isoformat()}")
    print_issues(imported.issues)
    say("nothing stored; 'supervisor records add dive LOG ...' records it")


def register(app: typer.Typer) -> None:
    """Add the ``log`` commands to the application."""
    app.add_typer(log_app, name="log")
