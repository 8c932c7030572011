"""``supervisor check PLAN``: check a plan against the rules and print the verdict.

Exit status
-----------
0  the plan conforms, or needs review (without ``--strict``);
1  the plan does not conform (with ``--strict``: also when it needs review);
2  bad input: the file cannot be read, is not TOML or does not validate.

Human output is a compact table of findings, worst first (passes only with
``--all``), then the cautions and the verdict line.  ``--json`` prints the
``supervisor.check/1`` object instead.

Layout: on a terminal the findings are wrapped to its width (``--width`` sets
another; a terminal narrower than the aligned columns gets one block per
finding).  Output to a pipe or file is not wrapped unless ``--width`` is given:
one finding per line, a stable layout for ``grep`` and scripts.  Text from the
plan is printed with control characters as visible escapes (``\\e[31m``).
"""

from __future__ import annotations

import shutil
import sys
import textwrap
from pathlib import Path
from typing import Any

import typer

from supervisor.check import run_check
from supervisor.cli._common import EXIT_FAIL, EXIT_OK, fail_input, json_text, say
from supervisor.cli.plan import plan_errors
from supervisor.text import printable

#: Narrowest wrapping width accepted by ``--width`` [columns].
MIN_WIDTH = 40

_COLUMNS = ("SEVERITY", "RULE", "DIVE", "MEASURED", "LIMIT", "FINDING")


def _value(v: Any, unit: str | None) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        text = f"{v:.4g}" if abs(v) < 1e4 else f"{v:.0f}"
    else:
        text = str(v)
    return f"{text} {unit}" if unit and not isinstance(v, str) else text


def _rows(findings: list[dict[str, Any]]) -> list[tuple[str, ...]]:
    rows = []
    for f in findings:
        src = f["citation"] + (f"; {f['source_status']}" if f.get("source_status") else "")
        cells = (
            f["severity"],
            f["rule"],
            f["dive"] or "-",
            _value(f["measured"], f["unit"]),
            _value(f["limit"], f["unit"]),
            f"{f['message']} [{src}]" if src else f["message"],
        )
        rows.append(tuple(printable(c) for c in cells))
    return rows


def format_table(findings: list[dict[str, Any]], width: int = 0) -> list[str]:
    """Return the findings as aligned text lines (header first).

    Parameters
    ----------
    findings : list of dict
        Findings as in the ``supervisor.check/1`` object, already sorted.
    width : int
        Wrap to this many columns [characters]; 0 keeps one line per finding.  When
        the aligned columns leave less than half the width for the text, each
        finding becomes a block (severity, rule and dive; measured and limit; the
        text indented).

    Returns
    -------
    list of str
        Printable lines (control characters from the plan shown as escapes).
    """
    rows = _rows(findings)
    widths = [max([len(_COLUMNS[i])] + [len(r[i]) for r in rows]) for i in range(5)]
    lead = sum(widths) + 2 * 5
    if width and lead > width // 2:
        return _blocks(rows, width)
    lines = []
    for r in [_COLUMNS, *rows]:
        head = "  ".join(c.ljust(widths[i]) for i, c in enumerate(r[:5])) + "  "
        if not width:
            lines.append(head + r[5])
            continue
        body = textwrap.wrap(r[5], width - lead, break_on_hyphens=False) or [""]
        lines.append(head + body[0])
        lines.extend(" " * lead + b for b in body[1:])
    return lines


def _blocks(rows: list[tuple[str, ...]], width: int) -> list[str]:
    """One block per finding, for a terminal narrower than the aligned columns."""
    indent = "    "
    lines: list[str] = []
    for sev, rule, dive, measured, limit, text in rows:
        lines += textwrap.wrap(f"{sev}  {rule}  dive {dive}", width, subsequent_indent=indent)
        lines += textwrap.wrap(f"measured {measured}; limit {limit}", width,
                               initial_indent=indent, subsequent_indent=indent)
        lines += textwrap.wrap(text, width, initial_indent=indent, subsequent_indent=indent,
                               break_on_hyphens=False)
    return lines


def _width(option: int | None) -> int:
    """Wrapping width: the option, else the terminal's on a terminal, else 0 (no wrap)."""
    if option is not None:
        if option != 0 and option < MIN_WIDTH:
            fail_input("--width", f"got {option}; expected 0 (no wrapping) or at least "
                       f"{MIN_WIDTH} columns")
        return option
    if sys.stdout.isatty():
        return max(shutil.get_terminal_size((100, 24)).columns - 1, MIN_WIDTH)
    return 0


def check(
    plan: Path = typer.Argument(..., help="Plan file (TOML, schema supervisor-plan/1)."),
    as_json: bool = typer.Option(
        False, "--json", help="Print the supervisor.check/1 JSON object instead of the table."
    ),
    strict: bool = typer.Option(
        False, "--strict", help="Exit with status 1 when the plan needs review, not only on a fail."
    ),
    show_all: bool = typer.Option(False, "--all", help="Also list the checks that passed."),
    width: int = typer.Option(
        None, "--width", help="Wrap findings to this many columns (0: one line per finding). "
        "Default: the terminal's width on a terminal, no wrapping in a pipe or file."
    ),
) -> None:
    """Check a plan against the regulatory, procedure and team rules; print the verdict."""
    _run(plan, as_json, strict, show_all, width)


@plan_errors
def _run(plan: Path, as_json: bool, strict: bool, show_all: bool, width: int | None = None
         ) -> None:
    cols = _width(width) if not as_json else 0
    result = run_check(plan)
    v = result["verdict"]
    if as_json:
        typer.echo(json_text(result))  # control characters as \u escapes: terminal-safe
    else:
        shown = [f for f in result["findings"] if show_all or f["severity"] != "pass"]
        for line in format_table(shown, cols):
            typer.echo(line)
        c = result["counts"]
        say("")
        for caution in result["cautions"][:3]:
            for line in (textwrap.wrap(f"caution: {caution}", cols) if cols
                         else [f"caution: {caution}"]):
                say(line)
        say(
            f"verdict: {v} ({c['fail']} fail, {c['warn']} warn, {c['info']} info, {c['pass']} pass)"
        )
    if v == "does-not-conform" or (strict and v == "needs-review"):
        raise typer.Exit(EXIT_FAIL)
    raise typer.Exit(EXIT_OK)


def register(app: typer.Typer) -> None:
    """Add the ``check`` command to the application."""
    app.command("check")(check)
