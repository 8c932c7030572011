"""The ``supervisor`` command: a thin typer application over the package modules.

Exit status: 0 success (or a plan that conforms / needs review), 1 a plan that
does not conform or a signature that does not verify, 2 bad input or usage.
Each command family lives in its own module and registers itself here.
"""

from __future__ import annotations

import typer

from supervisor import __version__
from supervisor.cli import audit as _audit
from supervisor.cli import check as _check
from supervisor.cli import checklist as _checklist
from supervisor.cli import log as _log
from supervisor.cli import plan as _plan
from supervisor.cli import records as _records
from supervisor.cli import schedule as _schedule
from supervisor.cli import tables as _tables
from supervisor.cli import treatment as _treatment

app = typer.Typer(
    name="supervisor",
    help="Check proposed dive and chamber schedules before anyone gets wet.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_show_locals=False,
    # help texts carry units in brackets ([min], [m]); they are text, not markup
    rich_markup_mode=None,
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


for _mod in (_schedule, _tables, _plan, _check, _checklist, _records, _log, _treatment,
             _audit):
    _mod.register(app)


def main(argv: list[str] | None = None) -> None:
    """Console-script entry point.

    Usage errors (unknown option, a value of the wrong type) are printed as one
    ``error:`` line on stderr with exit status 2, like every other bad input.
    """
    import sys

    try:
        rv = app(args=argv, standalone_mode=False)
    except typer.Exit as exc:
        sys.exit(getattr(exc, "exit_code", 0))
    except BrokenPipeError:
        # the reader closed the pipe (e.g. `supervisor tables show X | head`): stop quietly
        import os

        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        sys.exit(0)
    except typer.Abort:
        typer.echo("error: aborted", err=True)
        sys.exit(2)
    except Exception as exc:
        # click (or typer's vendored click) usage errors: one line, exit status 2
        if not hasattr(exc, "format_message") or not hasattr(exc, "exit_code"):
            raise
        param = getattr(exc, "param", None)
        opts = getattr(param, "opts", None) if param is not None else None
        prefix = f"{opts[0]}: " if opts else ""
        msg = " ".join(str(exc.format_message()).split())
        typer.echo(f"error: {prefix}{msg}", err=True)
        sys.exit(2)
    sys.exit(rv if isinstance(rv, int) else 0)
