"""``supervisor check PLAN``: check a plan against the rules and print the verdict.

Exit status
-----------
0  the plan conforms, or needs review (without ``--strict``);
1  the plan does not conform (with ``--strict``: also when it needs review);
2  bad input: the file cannot be read, is not TOML or does not validate.

Human output is a compact table of findings, worst first (passes only with
``--all``), then the cautions and the verdict line.  ``--json`` prints the
``supervisor.check/1`` object instead.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import typer

from supervisor.check import run_check
from supervisor.cli._common import EXIT_FAIL, EXIT_OK
from supervisor.cli.plan import plan_errors

_COLUMNS = ("SEVERITY", "RULE", "DIVE", "MEASURED", "LIMIT", "FINDING")


def _value(v: Any, unit: str | None) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        text = f"{v:.4g}" if abs(v) < 1e4 else f"{v:.0f}"
    else:
        text = str(v)
    return f"{text} {unit}" if unit and not isinstance(v, str) else text


def format_table(findings: list[dict[str, Any]]) -> list[str]:
    """Return the findings as aligned text lines (header first).

    Parameters
    ----------
    findings : list of dict
        Findings as in the ``supervisor.check/1`` object, already sorted.

    Returns
    -------
    list of str
    """
    rows = []
    for f in findings:
        src = f["citation"] + (f"; {f['source_status']}" if f.get("source_status") else "")
        rows.append(
            (
                f["severity"],
                f["rule"],
                f["dive"] or "-",
                _value(f["measured"], f["unit"]),
                _value(f["limit"], f["unit"]),
                f"{f['message']} [{src}]" if src else f["message"],
            )
        )
    widths = [max([len(_COLUMNS[i])] + [len(r[i]) for r in rows]) for i in range(5)]
    lines = []
    for r in [_COLUMNS, *rows]:
        lines.append("  ".join(c.ljust(widths[i]) for i, c in enumerate(r[:5])) + "  " + r[5])
    return lines


def check(
    plan: Path = typer.Argument(..., help="Plan file (TOML, schema supervisor-plan/1)."),
    as_json: bool = typer.Option(
        False, "--json", help="Print the supervisor.check/1 JSON object instead of the table."
    ),
    strict: bool = typer.Option(
        False, "--strict", help="Exit with status 1 when the plan needs review, not only on a fail."
    ),
    show_all: bool = typer.Option(False, "--all", help="Also list the checks that passed."),
) -> None:
    """Check a plan against the regulatory, procedure and team rules; print the verdict."""
    _run(plan, as_json, strict, show_all)


@plan_errors
def _run(plan: Path, as_json: bool, strict: bool, show_all: bool) -> None:
    result = run_check(plan)
    v = result["verdict"]
    if as_json:
        typer.echo(json.dumps(result, indent=2, ensure_ascii=False))
    else:
        shown = [f for f in result["findings"] if show_all or f["severity"] != "pass"]
        for line in format_table(shown):
            typer.echo(line)
        c = result["counts"]
        typer.echo("")
        for caution in result["cautions"][:3]:
            typer.echo(f"caution: {caution}")
        typer.echo(
            f"verdict: {v} ({c['fail']} fail, {c['warn']} warn, {c['info']} info, {c['pass']} pass)"
        )
    if v == "does-not-conform" or (strict and v == "needs-review"):
        raise typer.Exit(EXIT_FAIL)
    raise typer.Exit(EXIT_OK)


def register(app: typer.Typer) -> None:
    """Add the ``check`` command to the application."""
    app.command("check")(check)
