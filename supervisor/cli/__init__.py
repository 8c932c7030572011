"""The ``supervisor`` command: a thin typer application over the package modules.

Exit status: 0 success (or a plan that conforms / needs review), 1 a plan that
does not conform or a signature that does not verify, 2 bad input or usage.
Each command family lives in its own module with a ``register(app)`` function;
the root group (:mod:`supervisor.cli.lazy`) imports it only when one of its
commands is used.
"""

from __future__ import annotations

import typer

from supervisor import __version__
from supervisor.cli.lazy import Entry, LazyGroup

# Every top-level command, in listing order, with the family module that registers
# it and its help text's first paragraph.  A module is imported only when one of its
# commands is invoked or its own --help is asked (tests/cli/test_lazy.py checks this
# table against the registered commands).
COMMANDS: dict[str, Entry] = {
    "schedule": Entry("supervisor.cli.schedule",
                      "Compute a model decompression schedule (ZH-L16 with gradient factors)."),
    "check": Entry("supervisor.cli.check", "Check a plan against the regulatory, procedure and "
                   "team rules; print the verdict."),
    "checklist": Entry("supervisor.cli.checklist", "Check a plan and write the pre-dive "
                       "checklist (PDF and JSON record), optionally signed."),
    "verify": Entry("supervisor.cli.checklist", "Check a signed checklist: intact or not, who "
                    "signed, trusted or not, what it says."),
    "audit": Entry("supervisor.cli.audit", "Audit an executed dive (its log) against the "
                   "approved plan; print the verdict."),
    "tables": Entry("supervisor.cli.tables", "Reference tables: list, show, validate, verify, "
                    "import, build and screen."),
    "plan": Entry("supervisor.cli.plan",
                  "Plan files: validate a plan, print the plan file's JSON Schema."),
    "keys": Entry("supervisor.cli.checklist", "Signing keys for supervisors, and keyrings of the "
                  "certificates trusted to sign."),
    "records": Entry("supervisor.cli.records", "The dive records: add, list, show, verify the "
                     "hash chain, export, retention."),
    "log": Entry("supervisor.cli.log", "Depth logs: read a recorder CSV or a timed log (TOML); "
                 "the timed log's JSON Schema."),
    "treatment": Entry("supervisor.cli.treatment", "Recompression treatments: plan one from a "
                       "treatment table, log it as run."),
}


def _new_app(**settings: object) -> typer.Typer:
    """An application with the root's settings (the root passes ``cls`` and ``help``)."""
    return typer.Typer(
        add_completion=False,
        pretty_exceptions_show_locals=False,
        # help texts carry units in brackets ([min], [m]); they are text, not markup
        rich_markup_mode=None,
        **settings,  # type: ignore[arg-type]
    )


class _Root(LazyGroup):
    table = COMMANDS
    make_app = staticmethod(_new_app)


app = _new_app(
    cls=_Root,
    name="supervisor",
    help="Check proposed dive and chamber schedules before anyone gets wet.",
    no_args_is_help=True,
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
