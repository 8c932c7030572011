"""Keyrings of trusted supervisor certificates: who may sign a checklist.

A signature proves that a checklist has not changed since someone holding a
key signed it.  Whether that someone may approve dives is the contractor's
decision, recorded in a **keyring**: a TOML file listing the certificates of
the supervisors whose signatures count.  ``supervisor verify`` reports a
checklist whose signer is in no keyring as *untrusted* (exit status 3), never
as valid.

Two keyrings are read, and a signer in either is trusted:

* the **per-user keyring**
  ``$XDG_CONFIG_HOME/supervisor/trusted-signers.toml``, by default
  ``~/.config/supervisor/trusted-signers.toml``;
* the **company keyring**: the file named by ``--keyring FILE`` or, without
  that option, by the environment variable ``SUPERVISOR_COMPANY_KEYRING``
  (a shared file the contractor keeps, for example on the vessel's server).

``supervisor keys trust CERT`` adds a certificate (to the per-user keyring,
or to the ``--keyring`` file), ``keys list`` lists both keyrings and
``keys remove`` takes a certificate out again.

File format (``schema = "supervisor-keyring/1"``)::

    schema = "supervisor-keyring/1"

    [[signers]]
    name = "Mara Okonjo"                     # the certificate's common name
    fingerprint_sha256 = "3F:A0:..."         # SHA-256 of the certificate (DER)
    added_on = "2026-06-01T08:30:00Z"        # when it was trusted (UTC)
    certificate = '''-----BEGIN CERTIFICATE-----
    ...
    -----END CERTIFICATE-----'''

A signer is trusted when the certificate in the signature is byte for byte the
certificate in the keyring (the fingerprint is checked against it when the
file is read).  A keyring that others can write to is reported, since anyone
who can add a line to it can approve checklists.
"""

from __future__ import annotations

import datetime as dt
import os
import stat
import tomllib
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

import tomli_w
from cryptography import x509
from cryptography.hazmat.primitives.serialization import Encoding

from supervisor.errors import InputError
from supervisor.report.document import write_atomically
from supervisor.report.keys import fingerprint, subject_name

SCHEMA = "supervisor-keyring/1"
COMPANY_ENV = "SUPERVISOR_COMPANY_KEYRING"
USER_FILE = Path("supervisor") / "trusted-signers.toml"
#: Largest keyring read [bytes]; a keyring holds certificates, not data.
MAX_BYTES = 4 * 1024 * 1024


@dataclass(frozen=True)
class TrustedSigner:
    """One trusted certificate."""

    name: str
    fingerprint_sha256: str
    added_on: str
    certificate: x509.Certificate

    @property
    def not_after(self) -> dt.datetime:
        """End of the certificate's validity (UTC)."""
        return self.certificate.not_valid_after_utc


@dataclass(frozen=True)
class Keyring:
    """A keyring file as read: where it is, what it is called, what it holds."""

    path: Path
    label: str  # "per-user keyring" or "company keyring"
    field: str  # the option or variable the path came from, for messages
    signers: tuple[TrustedSigner, ...]
    exists: bool

    def find(self, cert: x509.Certificate) -> TrustedSigner | None:
        """The entry holding exactly ``cert``, if any."""
        der = cert.public_bytes(Encoding.DER)
        for signer in self.signers:
            if signer.certificate.public_bytes(Encoding.DER) == der:
                return signer
        return None


def user_keyring_path(environ: Mapping[str, str] | None = None) -> Path:
    """The per-user keyring: ``$XDG_CONFIG_HOME/supervisor/trusted-signers.toml``.

    Parameters
    ----------
    environ : mapping, optional
        Environment to read (default: ``os.environ``).

    Returns
    -------
    Path
        Under ``XDG_CONFIG_HOME`` when it is set to an absolute path, otherwise
        under ``~/.config``.
    """
    env = os.environ if environ is None else environ
    base = env.get("XDG_CONFIG_HOME", "")
    root = Path(base) if base and Path(base).is_absolute() else Path.home() / ".config"
    return root / USER_FILE


def company_keyring_path(option: Path | None,
                         environ: Mapping[str, str] | None = None) -> tuple[Path, str] | None:
    """The company keyring and where its name came from (``--keyring`` first)."""
    if option is not None:
        return option, "--keyring"
    env = os.environ if environ is None else environ
    value = env.get(COMPANY_ENV, "")
    return (Path(value), COMPANY_ENV) if value else None


def load_certificate(path: Path, *, field: str) -> x509.Certificate:
    """Read one X.509 certificate (PEM or DER) from a file.

    Raises
    ------
    InputError
        If the file cannot be read or holds no certificate.
    """
    try:
        data = path.read_bytes()
    except OSError as exc:
        raise InputError(field, f"cannot read {path} ({exc.strerror or exc}); expected a "
                                "certificate (.cert.pem from 'supervisor keys new')") from None
    try:
        if b"-----BEGIN" in data:
            return x509.load_pem_x509_certificate(data)
        return x509.load_der_x509_certificate(data)
    except ValueError:
        hint = " (it looks like a key file: give the .cert.pem beside it)" \
            if b"-----BEGIN" not in data and data[:1] == b"\x30" else ""
        raise InputError(field, f"{path} holds no X.509 certificate{hint}; expected the "
                                ".cert.pem file written by 'supervisor keys new'") from None


def _entry(raw: object, n: int, path: Path, field: str) -> TrustedSigner:
    where = f"{path}: signers[{n}]"
    if not isinstance(raw, dict):
        raise InputError(field, f"{where} is not a table; expected name, fingerprint_sha256, "
                                "added_on and certificate")
    pem = raw.get("certificate")
    if not isinstance(pem, str):
        raise InputError(field, f"{where}.certificate is missing; expected a PEM certificate")
    try:
        cert = x509.load_pem_x509_certificate(pem.encode("ascii"))
    except (ValueError, UnicodeEncodeError):
        raise InputError(field, f"{where}.certificate is not a PEM certificate") from None
    fp = raw.get("fingerprint_sha256")
    if not isinstance(fp, str) or fp.upper() != fingerprint(cert):
        raise InputError(field, f"{where}.fingerprint_sha256 does not match its certificate "
                                f"(the certificate's is {fingerprint(cert)}); the keyring was "
                                "edited by hand: remove the entry and trust the certificate "
                                "again")
    added = raw.get("added_on")
    return TrustedSigner(name=subject_name(cert), fingerprint_sha256=fingerprint(cert),
                         added_on=str(added) if added is not None else "", certificate=cert)


def load_keyring(path: Path, *, label: str, field: str, must_exist: bool) -> Keyring:
    """Read a keyring file.

    Parameters
    ----------
    path : Path
        The keyring file.
    label : str
        "per-user keyring" or "company keyring", for messages.
    field : str
        The option or environment variable that named it, for messages.
    must_exist : bool
        Whether a missing file is an error (a keyring named on purpose) or an
        empty keyring (the per-user default before anything was trusted).

    Returns
    -------
    Keyring

    Raises
    ------
    InputError
        If the file cannot be read, is not TOML, has another schema, or an
        entry's certificate or fingerprint is wrong.
    """
    try:
        size = path.stat().st_size
        if size > MAX_BYTES:
            raise InputError(field, f"{path} is {size} bytes; a keyring is at most "
                                    f"{MAX_BYTES} bytes")
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        if must_exist:
            raise InputError(field, f"{label} {path} does not exist; create it with "
                                    f"'supervisor keys trust CERT --keyring {path}'") from None
        return Keyring(path, label, field, (), exists=False)
    except UnicodeDecodeError:
        raise InputError(field, f"{path} is not UTF-8 text; expected a keyring "
                                f"({SCHEMA})") from None
    except OSError as exc:
        raise InputError(field, f"cannot read {label} {path} ({exc.strerror or exc})") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(field, f"{path} is not a TOML keyring ({exc})") from None
    if data.get("schema") != SCHEMA:
        raise InputError(field, f"{path} is not a keyring: expected schema = \"{SCHEMA}\"")
    raw = data.get("signers", [])
    if not isinstance(raw, list):
        raise InputError(field, f"{path}: signers must be an array of tables ([[signers]])")
    signers = tuple(_entry(e, n, path, field) for n, e in enumerate(raw))
    return Keyring(path, label, field, signers, exists=True)


def loose_permissions(path: Path) -> str | None:
    """A warning when a key file or keyring is open to other users, else ``None``.

    Parameters
    ----------
    path : Path
        A key file (must be readable by its owner only) or a keyring (must
        not be writable by others).

    Returns
    -------
    str or None
        ``"readable by others (mode 0644)"``-style text, or ``None``.
    """
    try:
        mode = stat.S_IMODE(path.stat().st_mode)
    except OSError:
        return None
    if path.suffix.lower() == ".toml":
        if mode & 0o022:
            return f"writable by other users (mode {mode:04o}); anyone who can write it can " \
                   f"add a signer: restrict it with chmod go-w {path}"
        return None
    if mode & 0o077:
        return f"is readable by other users (mode {mode:04o}); keep private keys to their " \
               f"owner: chmod 600 {path}"
    return None


def _serialise(signers: Iterable[TrustedSigner]) -> bytes:
    entries = [{"name": s.name, "fingerprint_sha256": s.fingerprint_sha256,
                "added_on": s.added_on,
                "certificate": s.certificate.public_bytes(Encoding.PEM).decode("ascii")}
               for s in signers]
    head = ("# Trusted supervisor certificates: signatures by these count as approval\n"
            "# ('supervisor keys trust | list | remove'; see README).\n")
    return (head + tomli_w.dumps({"schema": SCHEMA, "signers": entries},
                                 multiline_strings=True)).encode("utf-8")


def _write(keyring: Keyring, signers: Sequence[TrustedSigner]) -> None:
    folder = keyring.path.parent
    if not folder.exists():
        if keyring.label == "per-user keyring":
            folder.mkdir(parents=True, mode=0o700)
        else:
            raise InputError(keyring.field, f"folder {folder} does not exist")
    mode = stat.S_IMODE(keyring.path.stat().st_mode) if keyring.exists else 0o644
    write_atomically([(keyring.path, _serialise(signers), mode)])


def trust(keyring: Keyring, cert: x509.Certificate,
          now: dt.datetime | None = None) -> tuple[TrustedSigner, bool]:
    """Add a certificate to a keyring (atomically); nothing changes if it is there.

    Returns
    -------
    tuple
        The entry and whether it was added (``False``: already trusted).
    """
    found = keyring.find(cert)
    if found is not None:
        return found, False
    when = (now or dt.datetime.now(dt.UTC)).astimezone(dt.UTC)
    entry = TrustedSigner(name=subject_name(cert), fingerprint_sha256=fingerprint(cert),
                          added_on=when.strftime("%Y-%m-%dT%H:%M:%SZ"), certificate=cert)
    _write(keyring, [*keyring.signers, entry])
    return entry, True


def _normal_hex(text: str) -> str:
    return "".join(text.split()).replace(":", "").upper()


def select(keyring: Keyring, selector: str, cert: x509.Certificate | None) -> TrustedSigner:
    """The one entry named by a certificate, a fingerprint or its first 8+ hex digits.

    Raises
    ------
    InputError
        If nothing or more than one entry matches.
    """
    if cert is not None:
        found = keyring.find(cert)
        if found is None:
            raise InputError("CERT", f"{selector} is not in the {keyring.label} "
                                     f"{keyring.path}")
        return found
    want = _normal_hex(selector)
    if len(want) < 8 or any(c not in "0123456789ABCDEF" for c in want):
        raise InputError("CERT", "expected a certificate file, or a SHA-256 fingerprint (at "
                                 "least its first 8 hex digits) as 'supervisor keys list' "
                                 "prints it")
    hits = [s for s in keyring.signers if _normal_hex(s.fingerprint_sha256).startswith(want)]
    if not hits:
        raise InputError("CERT", f"no certificate with fingerprint {selector} in the "
                                 f"{keyring.label} {keyring.path}")
    if len(hits) > 1:
        raise InputError("CERT", f"{len(hits)} certificates start with {selector}; give more "
                                 "of the fingerprint")
    return hits[0]


def remove(keyring: Keyring, entry: TrustedSigner) -> None:
    """Take one entry out of a keyring (atomically)."""
    _write(keyring, [s for s in keyring.signers if s is not entry])
