"""``supervisor checklist``, ``supervisor keys new`` and ``supervisor verify``.

Exit status
-----------
checklist  0 written (plan conforms or needs review); 1 written, but the plan
           does not conform; 2 unreadable plan, bad key file, wrong
           passphrase, or a signed checklist already in the folder (nothing
           written).  A missing or wrong key file is reported before the
           passphrase is asked for.  An unsigned checklist of the same job in
           the folder is replaced (the checklist is regenerated); a signed one
           never is.
keys new   0 written; 2 bad name or passphrase, or a file already there.
verify     0 valid; 1 not signed, changed after signing, or signed with
           another certificate than ``--cert``; 2 unreadable file.

The passphrase of a key file comes from the environment variable
``SUPERVISOR_KEY_PASSPHRASE`` when it is set, otherwise from a prompt that
does not echo.
"""

from __future__ import annotations

import logging
import os
from enum import StrEnum
from pathlib import Path
from typing import Any

import typer

from supervisor.cli._common import EXIT_BAD_INPUT, EXIT_FAIL, EXIT_OK, fail_input, guarded

PASSPHRASE_ENV = "SUPERVISOR_KEY_PASSPHRASE"

keys_app = typer.Typer(
    name="keys",
    help="Signing keys for supervisors: a key file and a self-signed certificate.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)


class Paper(StrEnum):
    """Page sizes of the checklist."""

    letter = "letter"
    a4 = "a4"


class KeyKind(StrEnum):
    """Key algorithms for ``keys new``."""

    ec = "ec"
    rsa = "rsa"


def _quiet_libraries() -> None:
    """Keep pyHanko's diagnostic log lines (with tracebacks) off the terminal."""
    for name in ("pyhanko", "pyhanko_certvalidator"):
        logger = logging.getLogger(name)
        if not any(isinstance(h, logging.NullHandler) for h in logger.handlers):
            logger.addHandler(logging.NullHandler())
        logger.propagate = False


def _passphrase(*, confirm: bool) -> str:
    value = os.environ.get(PASSPHRASE_ENV)
    if value is not None:
        return value
    try:
        return str(typer.prompt("Key passphrase", hide_input=True,
                                confirmation_prompt=confirm))
    except typer.Abort:
        typer.echo(f"error: passphrase: none given; type it at the prompt or set "
                   f"{PASSPHRASE_ENV}", err=True)
        raise typer.Exit(EXIT_BAD_INPUT) from None


def _run_check(plan: Path) -> dict[str, Any]:
    """Run the check orchestrator on a plan file (a seam for tests)."""
    try:
        from supervisor.check import run_check
    except ImportError:
        typer.echo("error: check: the check orchestrator (supervisor.check) is not available "
                   "in this installation", err=True)
        raise typer.Exit(EXIT_BAD_INPUT) from None
    return run_check(plan)


@guarded
def checklist(
    plan: Path = typer.Argument(..., help="Plan file (TOML) to check.", show_default=False),
    out: Path = typer.Option(..., "--out", help="Folder for <job>-checklist.pdf and "
                             "<job>-checklist.json (created if its parent exists). An "
                             "unsigned checklist of the same job already there is replaced "
                             "(regenerated); a signed one is never replaced.",
                             show_default=False),
    sign: Path | None = typer.Option(None, "--sign", help="Key file (.p12 from 'supervisor "
                                     "keys new') to sign the PDF and the JSON with.",
                                     show_default=False),
    paper: Paper = typer.Option(Paper.letter, "--paper", help="Page size."),
) -> None:
    """Check a plan and write the pre-dive checklist (PDF and JSON record), optionally signed.

    Running it again on the same job and folder replaces an unsigned checklist
    (it is regenerated from the plan as it is now); a signed checklist is
    never replaced: move it away or choose another --out folder.
    """
    from supervisor.report.checklist import make_checklist
    from supervisor.report.formatting import VERDICT_LABEL, count_findings, effective_verdict
    from supervisor.report.keys import load_identity, read_key_file

    _quiet_libraries()
    try:
        plan_bytes = plan.read_bytes()
    except OSError as exc:
        fail_input("PLAN", f"cannot read {plan} ({exc.strerror or exc}); expected a plan file "
                           "(TOML)")
    identity = None
    if sign is not None:
        read_key_file(sign)  # a missing or wrong file is reported before the prompt
        identity = load_identity(sign, _passphrase(confirm=False))
    result = _run_check(plan)
    files = make_checklist(result, plan_bytes, out, identity=identity, paper=paper.value)
    typer.echo(f"wrote {files.pdf}")
    typer.echo(f"wrote {files.json}")
    if files.signature is not None:
        typer.echo(f"wrote {files.signature}")
        typer.echo(f"signed by {files.signer} (PAdES signature on the PDF, detached CMS "
                   "signature on the JSON)")
    typer.echo(f"document sha256 {files.document_sha256}")
    findings = [f for f in result.get("findings") or [] if isinstance(f, dict)]
    counts = count_findings(findings)
    verdict, _ = effective_verdict(result.get("verdict"), counts)
    typer.echo(f"verdict: {VERDICT_LABEL[verdict]} ({counts['fail']} fail, "
               f"{counts['warn']} warn)")
    typer.echo("The checklist supports the supervisor's decision; it does not make it.")
    raise typer.Exit(EXIT_FAIL if verdict == "does-not-conform" else EXIT_OK)


@guarded
def keys_new(
    name: str = typer.Option(..., "--name", help="The supervisor's name as it should appear "
                             "on signatures (at most 64 characters).", show_default=False),
    out: Path = typer.Option(..., "--out", help="Key file to write (PKCS#12, e.g. name.p12); "
                             "the certificate goes beside it as <stem>.cert.pem.",
                             show_default=False),
    key_type: KeyKind = typer.Option(KeyKind.ec, "--type", help="ec (P-256) or rsa (3072)."),
    organisation: str | None = typer.Option(None, "--organisation",
                                            help="Organisation named in the certificate.",
                                            show_default=False),
    days: int = typer.Option(1095, "--days", help="Certificate validity [days]."),
) -> None:
    """Make a passphrase-protected signing key and a self-signed certificate."""
    from cryptography import x509

    from supervisor.report.keys import (
        certificate_path,
        check_passphrase,
        fingerprint,
        new_identity,
    )

    for path in (out, certificate_path(out)):
        if path.exists():
            fail_input("--out", f"{path} already exists; choose another path (an existing key "
                                "is never overwritten)")
    passphrase = _passphrase(confirm=True)
    check_passphrase(passphrase)
    files = new_identity(name, out, passphrase, key_type=key_type.value,
                         organisation=organisation, valid_days=days)
    cert = x509.load_pem_x509_certificate(files.certificate.read_bytes())
    typer.echo(f"wrote {files.key} (private key and certificate, encrypted, mode 0600)")
    typer.echo(f"wrote {files.certificate} (certificate, to give to whoever checks your "
               "signatures)")
    typer.echo(f"certificate SHA-256 fingerprint {fingerprint(cert)}")
    typer.echo("The certificate is self-signed: publish its fingerprint so others can tell "
               "your signatures from anyone else's.")


@guarded
def verify(
    file: Path = typer.Argument(..., help="Signed <job>-checklist.pdf, or <job>-checklist.json "
                                "with its .json.sig beside it.", show_default=False),
    cert: Path | None = typer.Option(None, "--cert", help="Require the signature to be made "
                                     "with this certificate (.cert.pem).", show_default=False),
) -> None:
    """Check a signed checklist: valid or not, who signed, when, and whether it changed."""
    from supervisor.report.verify import load_expected_certificate, verify_file

    _quiet_libraries()
    expected = load_expected_certificate(cert) if cert is not None else None
    result = verify_file(file, expected=expected)
    if result.status == "unreadable":
        typer.echo(f"error: {result.path}: {result.reason}", err=True)
        raise typer.Exit(EXIT_BAD_INPUT)
    for line in result.lines():
        typer.echo(line)
    raise typer.Exit(result.exit_code)


keys_app.command("new")(keys_new)


def register(app: typer.Typer) -> None:
    """Add ``checklist``, ``keys new`` and ``verify`` to the application."""
    app.command("checklist")(checklist)
    app.add_typer(keys_app, name="keys")
    app.command("verify")(verify)
