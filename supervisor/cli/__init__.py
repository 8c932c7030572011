"""The ``supervisor`` command: a thin typer application over the package modules.

Exit status: 0 success (or a plan that conforms / needs review), 1 a plan that
does not conform or a signature that does not verify, 2 bad input or usage.
Each command family lives in its own module and registers itself here.
"""

from __future__ import annotations

import typer

from supervisor import __version__
from supervisor.cli import checklist as _checklist
from supervisor.cli import plan as _plan
from supervisor.cli import schedule as _schedule
from supervisor.cli import tables as _tables

app = typer.Typer(
    name="supervisor",
    help="Check proposed dive and chamber schedules before anyone gets wet.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_show_locals=False,
)


def _version(value: bool) -> None:
    if value:
        typer.echo(f"supervisor {__version__}")
        raise typer.Exit(0)


@app.callback()
def _root(
    version: bool = typer.Option(
        False, "--version", callback=_version, is_eager=True, help="Print the version and exit."
    ),
) -> None:
    """Check proposed dive and chamber schedules before anyone gets wet."""


for _mod in (_schedule, _tables, _plan, _checklist):
    _mod.register(app)


def main() -> None:
    """Console-script entry point."""
    app()
