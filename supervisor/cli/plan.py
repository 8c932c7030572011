"""``supervisor plan``: validate a plan file and print its JSON Schema.

Exit status
-----------
validate  0 valid; 2 the file cannot be read, is not TOML or does not validate
          (one ``error: FIELD: MESSAGE`` line per problem on stderr).
schema    0 written; 2 the output file cannot be written.
"""

from __future__ import annotations

import functools
import json
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar

import typer

from supervisor.cli._common import EXIT_BAD_INPUT, EXIT_OK
from supervisor.errors import SupervisorError
from supervisor.plan import PlanValidationError, load_plan, plan_json_schema

F = TypeVar("F", bound=Callable[..., Any])

plan_app = typer.Typer(
    name="plan",
    help="Plan files: validate a plan, print the plan file's JSON Schema.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)


def plan_errors(func: F) -> F:
    """Report plan problems as one stderr line each with exit status 2; never a traceback.

    An unexpected error is reported as an internal error on one line, also with
    status 2, so a broken check is never mistaken for a plan that conforms.
    """

    @functools.wraps(func)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        try:
            return func(*args, **kwargs)
        except typer.Exit:
            raise
        except PlanValidationError as exc:
            for line in exc.lines():
                typer.echo(line, err=True)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except (SupervisorError, OSError, UnicodeError) as exc:
            typer.echo(f"error: {exc}", err=True)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except Exception as exc:  # keep the one-line promise even for a bug
            msg = " ".join(str(exc).split())
            typer.echo(
                f"error: internal error ({type(exc).__name__}: {msg}); please report it", err=True
            )
            raise typer.Exit(EXIT_BAD_INPUT) from None

    return wrapper  # type: ignore[return-value]


@plan_app.command("validate")
@plan_errors
def validate(
    plan: Path = typer.Argument(..., help="Plan file (TOML, schema supervisor-plan/1)."),
) -> None:
    """Validate a plan file; print one line per problem."""
    p = load_plan(plan)
    typer.echo(
        f"ok: {plan}: {len(p.dives)} dive(s), {len(p.team)} team member(s), unit {p.unit}, "
        f"jurisdiction {p.job.jurisdiction}"
    )
    raise typer.Exit(EXIT_OK)


@plan_app.command("schema")
@plan_errors
def schema(
    out: Path | None = typer.Option(
        None, "--out", help="Write the schema to this file instead of standard output."
    ),
) -> None:
    """Print the JSON Schema of the plan file."""
    text = json.dumps(plan_json_schema(), indent=2, sort_keys=False) + "\n"
    if out is None:
        typer.echo(text, nl=False)
    else:
        try:
            out.write_text(text, encoding="utf-8")
        except OSError as exc:
            typer.echo(f"error: --out: cannot write {out} ({exc.strerror or exc})", err=True)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        typer.echo(f"wrote {out}")
    raise typer.Exit(EXIT_OK)


def register(app: typer.Typer) -> None:
    """Add the ``plan`` commands to the application."""
    app.add_typer(plan_app, name="plan")
