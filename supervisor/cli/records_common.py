"""Pieces shared by the ``records`` and ``log`` commands: the store option, the passphrase."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import typer

from supervisor.text import printable

DB_HELP = ("Record store: an SQLite file path, sqlite:///PATH or postgresql://USER@HOST:PORT/NAME "
           "(default: $SUPERVISOR_DB, else $XDG_DATA_HOME/supervisor/records.sqlite3, "
           "~/.local/share/... when unset).")


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
    typer.echo(f"handled on import ({len(issues)}; kept with the record):")
    for i in issues:
        where = f"line {i.line}: " if i.line else ""
        typer.echo(f"  {i.kind}: {where}{printable(i.message)}")
