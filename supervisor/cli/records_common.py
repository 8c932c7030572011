"""Pieces shared by the ``records`` and ``log`` commands: the store option, the passphrase."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import typer

from supervisor.cli._common import say
from supervisor.text import printable

DB_HELP = ("Record store: an SQLite file path, sqlite:///PATH or postgresql://USER@HOST:PORT/NAME "
           "(default: $SUPERVISOR_DB, else $XDG_DATA_HOME/supervisor/records.sqlite3, "
           "~/.local/share/... when unset).")


# options shared by the commands that read a log (``log read``, ``records add dive``)
FORMAT_OPTION = typer.Option(None, "--format", help="csv or toml (default: from the file name).")
DEPTH_UNIT_OPTION = typer.Option(None, "--depth-unit", help="CSV depth unit: fsw, msw, ft or m "
                                 "(when the file does not declare it).")
TIME_UNIT_OPTION = typer.Option(None, "--time-unit", help="CSV time unit: s or min.")
TEMPERATURE_UNIT_OPTION = typer.Option(None, "--temperature-unit",
                                       help="CSV temperature unit: C or F.")
GAS_OPTION = typer.Option(None, "--gas", help="CSV breathing gas when the file has no gas "
                          "column.")
WATER_OPTION = typer.Option("salt", "--water", help="salt or fresh (length units).")


def csv_options(depth_unit: str | None, time_unit: str | None, temperature_unit: str | None,
                gas: str | None, water: str = "salt") -> Any:
    """Check the CSV unit options and return the importer's ``CsvOptions``."""
    from supervisor.cli._common import fail_input
    from supervisor.records.importers import CsvOptions

    for name, value, allowed in (("--depth-unit", depth_unit, ("fsw", "msw", "ft", "m")),
                                 ("--time-unit", time_unit, ("s", "min")),
                                 ("--temperature-unit", temperature_unit, ("C", "F")),
                                 ("--water", water, ("salt", "fresh"))):
        if value is not None and value not in allowed:
            fail_input(name, f"got {value!r}; expected {', '.join(allowed)}")
    return CsvOptions(depth_unit=depth_unit, time_unit=time_unit,  # type: ignore[arg-type]
                      temperature_unit=temperature_unit,  # type: ignore[arg-type]
                      gas=gas, water=water)  # type: ignore[arg-type]


def open_store(db: str | None, *, create: bool = False) -> Any:
    """Open the record store named by ``--db``, ``SUPERVISOR_DB`` or the default."""
    from supervisor.records.store import RecordStore

    return RecordStore.open(db, create=create)


def passphrase() -> str:
    """The key passphrase: ``SUPERVISOR_KEY_PASSPHRASE`` or a prompt (as for the checklist)."""
    from supervisor.cli.checklist import _passphrase

    return _passphrase(confirm=False)


def print_issues(issues: Sequence[Any]) -> None:
    """Print what was handled on import, one line each."""
    if not issues:
        return
    say(f"handled on import ({len(issues)}; kept with the record):")
    for i in issues:
        where = f"line {i.line}: " if i.line else ""
        say(f"  {i.kind}: {where}{printable(i.message)}")
