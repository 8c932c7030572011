"""Helpers shared by the command modules: one-line errors and exit codes."""

from __future__ import annotations

import functools
import sys
from collections.abc import Callable
from typing import Any, TypeVar

import typer

from supervisor.errors import InputError, ScheduleError, SupervisorError, TableError
from supervisor.text import printable

F = TypeVar("F", bound=Callable[..., Any])

EXIT_OK = 0
EXIT_FAIL = 1
EXIT_BAD_INPUT = 2


def say(text: object = "", *, err: bool = False) -> None:
    """Print one line for a terminal: control characters shown as visible escapes.

    Every line a command prints that may hold text from input (a plan's title, a
    table's notes, a file name) goes through here, so an escape sequence in a file
    can never recolour the terminal or set its title.
    """
    typer.echo(printable(text), err=err)


def say_block(text: str, *, err: bool = False) -> None:
    """Print a block of lines (e.g. JSON) with control characters escaped, newlines kept."""
    typer.echo(printable(text, keep_newlines=True), err=err)


def json_text(obj: Any, indent: int | None = 2) -> str:
    """JSON text that is safe on a terminal and still valid JSON.

    ``json`` escapes C0 controls itself; the C1 controls and the bidirectional
    overrides that :func:`supervisor.text.printable` also guards against are
    written as ``\\uXXXX`` escapes.  Other non-ASCII text stays readable.
    """
    import json

    from supervisor.text import CONTROL_NOT_LF_RE

    text = json.dumps(obj, indent=indent, ensure_ascii=False)
    return CONTROL_NOT_LF_RE.sub(lambda m: f"\\u{ord(m.group()):04x}", text)


def error_line(message: object) -> None:
    """Print ``error: MESSAGE`` on stderr as one printable line."""
    typer.echo("error: " + printable(message), err=True)


def fail_input(field: str, message: str) -> None:
    """Print ``error: FIELD: MESSAGE`` on stderr and exit with status 2."""
    error_line(f"{field}: {message}")
    raise typer.Exit(EXIT_BAD_INPUT)


def os_error(field: str, path: object, exc: OSError) -> str:
    """One-line message for an OS error on a path taken from input, naming its field."""
    from supervisor.text import excerpt

    text = str(path)
    shown = excerpt(text, 200) if len(text) > 200 else text
    return f"{field}: {shown}: {exc.strerror or type(exc).__name__}"


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
            error_line(exc)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except SupervisorError as exc:  # pragma: no cover - defensive
            error_line(exc)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except BrokenPipeError:
            raise  # the reader went away (e.g. `| head`): handled quietly by main()
        except OSError as exc:  # a path from input; commands name the field where they can
            where = f"{exc.filename}: " if exc.filename else ""
            error_line(f"{printable(where)}{exc.strerror or exc}")
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except UnicodeDecodeError as exc:
            error_line(f"not UTF-8 text (byte {exc.start})")
            raise typer.Exit(EXIT_BAD_INPUT) from None

    return wrapper  # type: ignore[return-value]


def _flush() -> None:
    sys.stdout.flush()
