"""``supervisor keys new | trust | list | remove`` and ``supervisor verify``.

Exit status
-----------
keys new     0 written; 2 bad name, passphrase or --days, or a file already there.
keys trust   0 added (or already trusted); 2 not a certificate, or an unusable keyring.
keys list    0 listed; 2 an unusable keyring.
keys remove  0 removed; 2 not in the keyring, or an unusable keyring.
verify       0 signature intact and the signer trusted (``--cert``, or a keyring);
             1 not signed, changed after signing, or signed with another
             certificate than ``--cert``; 2 unreadable file or keyring;
             3 signature intact but the signer is in no keyring of trusted
             supervisors (not an approval).

Keyrings (see :mod:`supervisor.report.keyring`): the per-user file
``$XDG_CONFIG_HOME/supervisor/trusted-signers.toml`` (default
``~/.config/supervisor/trusted-signers.toml``) and a company file named by
``--keyring FILE`` or the environment variable ``SUPERVISOR_COMPANY_KEYRING``.

The passphrase of a key file comes from the environment variable
``SUPERVISOR_KEY_PASSPHRASE`` when it is set, otherwise from a prompt that
does not echo.  Every line printed passes through
:func:`supervisor.text.printable`, so text from a file cannot drive the
terminal.
"""

from __future__ import annotations

import functools
import logging
import os
from collections.abc import Callable
from enum import StrEnum
from pathlib import Path
from typing import TYPE_CHECKING, Any, TypeVar

import typer

from supervisor.cli._common import EXIT_BAD_INPUT, fail_input
from supervisor.errors import SupervisorError
from supervisor.plan import PlanValidationError
from supervisor.text import printable

if TYPE_CHECKING:
    from supervisor.report.keyring import Keyring

PASSPHRASE_ENV = "SUPERVISOR_KEY_PASSPHRASE"
COMPANY_ENV = "SUPERVISOR_COMPANY_KEYRING"  # supervisor.report.keyring.COMPANY_ENV

KEYRING_HELP = (f"Company keyring file (default: ${COMPANY_ENV} if set). The per-user "
                "keyring ~/.config/supervisor/trusted-signers.toml (under $XDG_CONFIG_HOME "
                "if set) is always read as well.")

keys_app = typer.Typer(
    name="keys",
    help="Signing keys for supervisors, and keyrings of the certificates trusted to sign.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)


class KeyKind(StrEnum):
    """Key algorithms for ``keys new``."""

    ec = "ec"
    rsa = "rsa"


def say(text: object, *, err: bool = False) -> None:
    """Print one terminal-safe line."""
    typer.echo(printable(text), err=err)


F = TypeVar("F", bound=Callable[..., Any])


def one_line_errors(func: F) -> F:
    """Every error a command meets as terminal-safe ``error:`` lines and exit status 2.

    A plan that does not validate gives one ``error: FIELD: MESSAGE`` line per
    problem; any other bad input one line naming its field; an unexpected
    error one "internal error ... please report it" line, never a traceback
    and never status 1, which means "does not conform" or "does not verify".
    """

    @functools.wraps(func)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        try:
            return func(*args, **kwargs)
        except (typer.Exit, BrokenPipeError):
            raise
        except PlanValidationError as exc:
            for line in exc.lines():
                say(line, err=True)
        except (SupervisorError, OSError, UnicodeError) as exc:
            say(f"error: {' '.join(str(exc).split())}", err=True)
        except Exception as exc:  # a bug: still one line, still not status 1
            say(f"error: internal error ({type(exc).__name__}: {' '.join(str(exc).split())}); "
                "nothing was written; please report it", err=True)
        raise typer.Exit(EXIT_BAD_INPUT)

    return wrapper  # type: ignore[return-value]


def quiet_libraries() -> None:
    """Keep pyHanko's diagnostic log lines (with tracebacks) off the terminal."""
    for name in ("pyhanko", "pyhanko_certvalidator"):
        logger = logging.getLogger(name)
        if not any(isinstance(h, logging.NullHandler) for h in logger.handlers):
            logger.addHandler(logging.NullHandler())
        logger.propagate = False


def passphrase(*, confirm: bool) -> str:
    """The key passphrase: from ``SUPERVISOR_KEY_PASSPHRASE``, or a prompt without echo."""
    value = os.environ.get(PASSPHRASE_ENV)
    if value is not None:
        return value
    try:
        return str(typer.prompt("Key passphrase", hide_input=True,
                                confirmation_prompt=confirm))
    except typer.Abort:
        say(f"error: passphrase: none given; type it at the prompt or set {PASSPHRASE_ENV}",
            err=True)
        raise typer.Exit(EXIT_BAD_INPUT) from None


def warn_loose(path: Path, field: str) -> None:
    """Warn on stderr when a key file or keyring is open to other users."""
    from supervisor.report.keyring import loose_permissions

    problem = loose_permissions(path)
    if problem is not None:
        say(f"warning: {field}: {path} {problem}", err=True)


def keyrings(option: Path | None, *, company_must_exist: bool = True) -> list[Keyring]:
    """The per-user keyring and the company keyring (``--keyring``, else the variable).

    Raises
    ------
    InputError
        If a keyring cannot be read, or a company keyring named on purpose is missing.
    """
    from supervisor.report.keyring import (
        company_keyring_path,
        load_keyring,
        user_keyring_path,
    )

    rings = [load_keyring(user_keyring_path(), label="per-user keyring", field="keyring",
                          must_exist=False)]
    company = company_keyring_path(option)
    if company is not None:
        rings.append(load_keyring(company[0], label="company keyring", field=company[1],
                                  must_exist=company_must_exist))
    for ring in rings:
        if ring.exists:
            warn_loose(ring.path, ring.field)
    return rings


def _target(option: Path | None) -> Keyring:
    """The keyring ``trust`` and ``remove`` change: ``--keyring``, else the per-user one."""
    from supervisor.report.keyring import load_keyring, user_keyring_path

    if option is not None:
        return load_keyring(option, label="company keyring", field="--keyring",
                            must_exist=False)
    return load_keyring(user_keyring_path(), label="per-user keyring", field="keyring",
                        must_exist=False)


@one_line_errors
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
    days: int = typer.Option(1095, "--days", help="Certificate validity [days], from 1 to "
                             "3650."),
) -> None:
    """Make a passphrase-protected signing key and a self-signed certificate."""
    from supervisor.report.keys import (
        certificate_path,
        check_days,
        check_passphrase,
        fingerprint,
        new_identity,
    )

    check_days(days)  # before the passphrase is asked for
    for path in (out, certificate_path(out)):
        if path.exists():
            fail_input("--out", printable(f"{path} already exists; choose another path (an "
                                          "existing key is never overwritten)"))
    secret = passphrase(confirm=True)
    check_passphrase(secret)
    files = new_identity(name, out, secret, key_type=key_type.value,
                         organisation=organisation, valid_days=days)
    from cryptography import x509

    cert = x509.load_pem_x509_certificate(files.certificate.read_bytes())
    say(f"wrote {files.key} (private key and certificate, encrypted, mode 0600)")
    say(f"wrote {files.certificate} (certificate, to give to whoever checks your signatures)")
    say(f"certificate SHA-256 fingerprint {fingerprint(cert)}")
    say("The certificate is self-signed: publish its fingerprint, and have the contractor add "
        "the certificate to its keyring ('supervisor keys trust CERT --keyring FILE').")


@one_line_errors
def keys_trust(
    cert: Path = typer.Argument(..., help="Certificate to trust (.cert.pem from 'supervisor "
                                "keys new').", show_default=False),
    keyring: Path | None = typer.Option(None, "--keyring", help="Keyring file to add it to "
                                        "(a company keyring; created if missing). Default: "
                                        "the per-user keyring.", show_default=False),
) -> None:
    """Trust a supervisor's certificate: signatures made with it verify as VALID."""
    import datetime as dt

    from supervisor.report import keyring as kr

    certificate = kr.load_certificate(cert, field="CERT")
    ring = _target(keyring)
    entry, added = kr.trust(ring, certificate)
    verb = "added to" if added else "already in"
    say(f"{entry.name}: {verb} the {ring.label} {ring.path}")
    say(f"certificate SHA-256 fingerprint {entry.fingerprint_sha256}")
    if added:
        say("Compare this fingerprint with the one the supervisor published before relying on "
            "it; remove it with 'supervisor keys remove FINGERPRINT'.")
    if entry.not_after < dt.datetime.now(dt.UTC):
        say(f"warning: CERT: the certificate expired on {entry.not_after:%Y-%m-%d}; only "
            "signatures made before then can verify", err=True)


@one_line_errors
def keys_list(
    keyring: Path | None = typer.Option(None, "--keyring", help=KEYRING_HELP,
                                        show_default=False),
) -> None:
    """List the trusted supervisor certificates of both keyrings."""
    for ring in keyrings(keyring):
        state = "" if ring.exists else " (no file yet)"
        say(f"{ring.label} {ring.path}{state}: {len(ring.signers)} trusted signer(s)")
        for s in ring.signers:
            say(f"  {s.name}  SHA-256 {s.fingerprint_sha256}  valid until "
                f"{s.not_after:%Y-%m-%d}  added {s.added_on}")


@one_line_errors
def keys_remove(
    which: str = typer.Argument(..., metavar="CERT", help="Certificate file, or its SHA-256 "
                                "fingerprint as 'keys list' prints it (at least the first 8 "
                                "hex digits).", show_default=False),
    keyring: Path | None = typer.Option(None, "--keyring", help="Keyring file to remove it "
                                        "from. Default: the per-user keyring.",
                                        show_default=False),
) -> None:
    """Stop trusting a certificate: remove it from a keyring."""
    from supervisor.report import keyring as kr

    ring = _target(keyring)
    cert = kr.load_certificate(Path(which), field="CERT") if Path(which).is_file() else None
    entry = kr.select(ring, which, cert)
    kr.remove(ring, entry)
    say(f"{entry.name} (SHA-256 {entry.fingerprint_sha256}): removed from the {ring.label} "
        f"{ring.path}")


@one_line_errors
def verify(
    file: Path = typer.Argument(..., help="Signed <job>-checklist.pdf, or <job>-checklist.json "
                                "with its .json.sig beside it.", show_default=False),
    cert: Path | None = typer.Option(None, "--cert", help="Require the signature to be made "
                                     "with this certificate (.cert.pem), and trust it for this "
                                     "one check.", show_default=False),
    keyring: Path | None = typer.Option(None, "--keyring", help=KEYRING_HELP,
                                        show_default=False),
) -> None:
    """Check a signed checklist: intact or not, who signed, trusted or not, what it says.

    Exit status: 0 intact and signed by a trusted supervisor (in a keyring, or
    the --cert given); 1 not signed, changed after signing, or not signed with
    --cert; 2 unreadable file or keyring; 3 intact, but the signer is in no
    keyring of trusted supervisors: not an approval.
    """
    from supervisor.report.verify import load_expected_certificate, verify_file

    quiet_libraries()
    expected = load_expected_certificate(cert) if cert is not None else None
    rings = [] if expected is not None else keyrings(keyring)
    result = verify_file(file, expected=expected, keyrings=rings)
    if result.status == "unreadable":
        say(f"error: {result.path}: {result.reason}", err=True)
        raise typer.Exit(EXIT_BAD_INPUT)
    for line in result.lines():
        say(line)
    raise typer.Exit(result.exit_code)


keys_app.command("new")(keys_new)
keys_app.command("trust")(keys_trust)
keys_app.command("list")(keys_list)
keys_app.command("remove")(keys_remove)


def register(app: typer.Typer) -> None:
    """Add ``keys`` and ``verify`` to the application."""
    app.add_typer(keys_app, name="keys")
    app.command("verify")(verify)
