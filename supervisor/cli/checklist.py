"""``supervisor checklist``: check a plan and write its pre-dive checklist (PDF and JSON).

Exit status
-----------
0 written (plan conforms or needs review); 1 written, but the plan does not
conform; 2 unreadable plan, bad key file, wrong passphrase, a signed
checklist (or another job's, or a file that is not a checklist) already at
the file names in the folder, or an internal error: nothing is written then.
A missing or wrong key file is reported before the passphrase is asked for.
An unsigned checklist of the same job (the same title) in the folder is
replaced (the checklist is regenerated); a signed one never is.

The signing commands (``keys``, ``verify``) are in :mod:`supervisor.cli.keys`.
"""

from __future__ import annotations

from enum import StrEnum
from pathlib import Path
from typing import Any

import typer

from supervisor.cli import keys as _keys
from supervisor.cli._common import EXIT_BAD_INPUT, EXIT_FAIL, EXIT_OK, fail_input
from supervisor.cli.keys import one_line_errors, passphrase, quiet_libraries, say, warn_loose
from supervisor.text import printable

# names other command modules import (the record store's commands)
_passphrase = passphrase
_quiet_libraries = quiet_libraries


class Paper(StrEnum):
    """Page sizes of the checklist."""

    letter = "letter"
    a4 = "a4"


def _run_check(plan: Path) -> dict[str, Any]:
    """Run the check orchestrator on a plan file (a seam for tests)."""
    try:
        from supervisor.check import run_check
    except ImportError:
        say("error: check: the check orchestrator (supervisor.check) is not available in this "
            "installation", err=True)
        raise typer.Exit(EXIT_BAD_INPUT) from None
    return run_check(plan)


@one_line_errors
def checklist(
    plan: Path = typer.Argument(..., help="Plan file (TOML) to check.", show_default=False),
    out: Path = typer.Option(..., "--out", help="Folder for <job>-checklist.pdf and "
                             "<job>-checklist.json (created if its parent exists). An "
                             "unsigned checklist of the same job (same title) already there is "
                             "replaced (regenerated); a signed one, another job's with the same "
                             "file name, or a file that is not a checklist is never replaced.",
                             show_default=False),
    sign: Path | None = typer.Option(None, "--sign", help="Key file (.p12 from 'supervisor "
                                     "keys new') to sign the PDF and the JSON with.",
                                     show_default=False),
    paper: Paper = typer.Option(Paper.letter, "--paper", help="Page size."),
) -> None:
    """Check a plan and write the pre-dive checklist (PDF and JSON record), optionally signed.

    Running it again on the same job and folder replaces an unsigned checklist
    (it is regenerated from the plan as it is now); a signed checklist is
    never replaced: move it away or choose another --out folder.  Signing
    with a certificate in another name than the plan's supervisor is allowed,
    with a warning, and the checklist says who signed in place of whom.
    """
    from supervisor.report.checklist import make_checklist
    from supervisor.report.formatting import VERDICT_LABEL, count_findings, effective_verdict

    try:
        plan_bytes = plan.read_bytes()
    except OSError as exc:
        fail_input("PLAN", printable(f"cannot read {plan} ({exc.strerror or exc}); expected a "
                                     "plan file (TOML)"))
    identity = None
    if sign is not None:
        from supervisor.report.keys import load_identity, read_key_file

        quiet_libraries()
        read_key_file(sign)  # a missing or wrong file is reported before the prompt
        warn_loose(sign, "--sign")
        identity = load_identity(sign, passphrase(confirm=False))
    result = _run_check(plan)
    files = make_checklist(result, plan_bytes, out, identity=identity, paper=paper.value)
    if files.signed_in_place:
        say(f"warning: --sign: the certificate is in the name of {files.signer}, not the "
            f"plan's supervisor {files.plan_supervisor}; the checklist says it was signed by "
            f"{files.signer} in place of {files.plan_supervisor}", err=True)
    say(f"wrote {files.pdf}")
    say(f"wrote {files.json}")
    if files.signature is not None:
        say(f"wrote {files.signature}")
        say(f"signed by {files.signer} (PAdES signature on the PDF, detached CMS signature on "
            "the JSON)")
    say(f"document sha256 {files.document_sha256}")
    findings = [f for f in result.get("findings") or [] if isinstance(f, dict)]
    counts = count_findings(findings)
    verdict, _ = effective_verdict(result.get("verdict"), counts)
    say(f"verdict: {VERDICT_LABEL[verdict]} ({counts['fail']} fail, {counts['warn']} warn)")
    say("The checklist supports the supervisor's decision; it does not make it.")
    raise typer.Exit(EXIT_FAIL if verdict == "does-not-conform" else EXIT_OK)


def register(app: typer.Typer) -> None:
    """Add ``checklist``, ``keys`` and ``verify`` to the application."""
    app.command("checklist")(checklist)
    _keys.register(app)
