"""``supervisor plan``: validate a plan file and print its JSON Schema.

Exit status
-----------
validate  0 valid; 2 the file cannot be read, is not TOML or does not validate
          (one ``error: FIELD: MESSAGE`` line per problem on stderr).
schema    0 written; 2 the output file exists (without ``--force``), is a folder or
          cannot be written (one ``error: --out: ...`` line on stderr).

The schema file is written atomically: to a temporary file in the target
folder, then renamed into place, so a reader never sees half a file and a
failure leaves an existing file untouched.
"""

from __future__ import annotations

import contextlib
import functools
import json
import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar

import typer

from supervisor.cli._common import EXIT_BAD_INPUT, EXIT_OK, error_line, say, say_block
from supervisor.errors import SupervisorError
from supervisor.plan import PlanValidationError, load_plan, plan_json_schema
from supervisor.text import excerpt

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
        except (typer.Exit, BrokenPipeError):
            raise  # a closed pipe (`| head`) is handled quietly by main()
        except PlanValidationError as exc:
            for field, message in exc.problems:
                error_line(f"{field}: {message}")
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except (SupervisorError, OSError, UnicodeError) as exc:
            error_line(exc)
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except RecursionError:
            error_line("plan: nested too deeply to be read; expected at most 16 levels of "
                       "tables and lists")
            raise typer.Exit(EXIT_BAD_INPUT) from None
        except Exception as exc:  # keep the one-line promise even for a bug
            msg = excerpt(" ".join(str(exc).split()), 200)
            error_line(f"internal error ({type(exc).__name__}: {msg}); please report it")
            raise typer.Exit(EXIT_BAD_INPUT) from None

    return wrapper  # type: ignore[return-value]


@plan_app.command("validate")
@plan_errors
def validate(
    plan: Path = typer.Argument(..., help="Plan file (TOML, schema supervisor-plan/1)."),
) -> None:
    """Validate a plan file; print one line per problem."""
    p = load_plan(plan)
    say(
        f"ok: {plan}: {len(p.dives)} dive(s), {len(p.team)} team member(s), unit {p.unit}, "
        f"jurisdiction {p.job.jurisdiction}"
    )
    raise typer.Exit(EXIT_OK)


class _Exists(Exception):
    """The output file exists and ``--force`` was not given."""


def _umask() -> int:
    old = os.umask(0o022)
    os.umask(old)
    return old


def write_new_file(path: Path, text: str, force: bool = False) -> None:
    """Write ``text`` (UTF-8) to ``path`` atomically; refuse an existing file unless ``force``.

    The text goes to a temporary file in the target folder, is synced, then
    hard-linked to ``path`` (which fails if ``path`` exists, so nothing is ever
    overwritten by accident) or, with ``force``, renamed over it.

    Raises
    ------
    _Exists
        If ``path`` exists and ``force`` is false.
    OSError
        If the file cannot be written.
    """
    folder = path.parent if str(path.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(text.encode("utf-8"))
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, 0o666 & ~_umask())
        if force:
            os.replace(tmp, path)
            return
        try:
            os.link(tmp, path)
        except FileExistsError:
            raise _Exists from None
        except OSError:  # no hard links on this file system: check, then rename
            if path.exists() or path.is_symlink():
                raise _Exists from None
            os.replace(tmp, path)
    finally:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp)


@plan_app.command("schema")
@plan_errors
def schema(
    out: Path | None = typer.Option(
        None, "--out", help="Write the schema to this file instead of standard output."
    ),
    force: bool = typer.Option(
        False, "--force", help="Replace the --out file if it exists (refused otherwise)."
    ),
) -> None:
    """Print the JSON Schema of the plan file (or write it with --out)."""
    text = json.dumps(plan_json_schema(), indent=2, sort_keys=False) + "\n"
    if out is None:
        say_block(text.rstrip("\n"))
        raise typer.Exit(EXIT_OK)
    shown = excerpt(str(out), 200) if len(str(out)) > 200 else str(out)
    try:
        is_dir = out.is_dir()
    except OSError as exc:
        error_line(f"--out: cannot write {shown} ({exc.strerror or exc})")
        raise typer.Exit(EXIT_BAD_INPUT) from None
    if is_dir:
        error_line(f"--out: {shown} is a folder; expected a file path")
        raise typer.Exit(EXIT_BAD_INPUT)
    try:
        write_new_file(out, text, force)
    except _Exists:
        error_line(f"--out: {shown} exists; give --force to replace it")
        raise typer.Exit(EXIT_BAD_INPUT) from None
    except OSError as exc:
        error_line(f"--out: cannot write {shown} ({exc.strerror or exc})")
        raise typer.Exit(EXIT_BAD_INPUT) from None
    say(f"wrote {out}")
    raise typer.Exit(EXIT_OK)


def register(app: typer.Typer) -> None:
    """Add the ``plan`` commands to the application."""
    app.add_typer(plan_app, name="plan")
