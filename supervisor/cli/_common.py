"""Helpers shared by the command modules: one-line errors and exit codes."""

from __future__ import annotations

import functools
import sys
from collections.abc import Callable
from typing import Any, TypeVar

import typer

from supervisor.errors import InputError, ScheduleError, SupervisorError, TableError

F = TypeVar("F", bound=Callable[..., Any])

EXIT_OK = 0
EXIT_FAIL = 1
EXIT_BAD_INPUT = 2


def fail_input(field: str, message: str) -> None:
    """Print ``error: FIELD: MESSAGE`` on stderr and exit with status 2."""
    typer.echo(f"error: {field}: {message}", err=True)
    raise typer.Exit(EXIT_BAD_INPUT)


def guarded(func: F) -> F:
    """Turn package errors raised by a command into one stderr line and an exit status.

    InputError and TableError give status 2; ScheduleError (a schedule that
    cannot be computed, e.g. cannot clear) gives status 2 with its cause.
    """

    @functools.wraps(func)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        try:
            return func(*args, **kwargs)
        except (InputError, TableError, ScheduleError) as exc:
            typer.echo(f"error: {exc}", err=True)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except SupervisorError as exc:  # pragma: no cover - defensive
            typer.echo(f"error: {exc}", err=True)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except BrokenPipeError:
            raise  # the reader went away (e.g. `| head`): handled quietly by main()
        except (OSError, UnicodeDecodeError) as exc:
            typer.echo(f"error: {exc}", err=True)
            raise typer.Exit(EXIT_BAD_INPUT) from None

    return wrapper  # type: ignore[return-value]


def _flush() -> None:
    sys.stdout.flush()
