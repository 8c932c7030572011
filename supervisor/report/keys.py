"""A supervisor's signing key and self-signed X.509 certificate.

``supervisor keys new`` writes two files:

* the **key file** (PKCS#12, RFC 7292, the path given with ``--out``): the
  private key and its certificate, encrypted with the passphrase
  (PBES2 with PBKDF2-HMAC-SHA256 and AES-256-CBC, HMAC-SHA256 integrity);
  the private key is never written in clear;
* the **certificate** (PEM, beside it as ``<stem>.cert.pem``), to hand to
  whoever will check the supervisor's signatures.

Both are written atomically with mode 0600 and never overwrite an existing
file.  The certificate is self-signed: it proves that a signature was made
with this key, not who holds the key.  Who may sign is recorded in a keyring
of trusted certificates (:mod:`supervisor.report.keyring`, ``supervisor keys
trust``), after comparing the fingerprint with the one the supervisor published.
"""

from __future__ import annotations

import datetime as dt
import unicodedata
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

from asn1crypto import pkcs12 as asn1_pkcs12
from cryptography import x509
from cryptography.exceptions import InvalidSignature
from cryptography.hazmat.primitives import hashes, serialization
from cryptography.hazmat.primitives.asymmetric import ec, rsa
from cryptography.hazmat.primitives.serialization import pkcs12
from cryptography.x509.oid import NameOID

from supervisor.errors import InputError
from supervisor.report.document import write_atomically

KeyType = Literal["ec", "rsa"]
MIN_PASSPHRASE = 8
MAX_NAME = 64  # ub-common-name, RFC 5280 appendix A.1
KEY_MODE = 0o600
#: Longest certificate validity accepted by ``keys new --days`` [days] (ten years).
MAX_DAYS = 3650
_KDF_ROUNDS = 200_000


class KeyFileError(InputError):
    """A key file that cannot be read, is not a PKCS#12 key, or needs another passphrase."""


@dataclass(frozen=True)
class IdentityFiles:
    """The two files written by :func:`new_identity`."""

    key: Path
    certificate: Path


@dataclass(frozen=True)
class SigningIdentity:
    """A loaded signing key with its certificate."""

    private_key: ec.EllipticCurvePrivateKey | rsa.RSAPrivateKey
    certificate: x509.Certificate
    pkcs12_data: bytes
    passphrase: bytes

    @property
    def name(self) -> str:
        """The certificate's common name (or its whole subject if it has none)."""
        return subject_name(self.certificate)

    @property
    def fingerprint_sha256(self) -> str:
        """SHA-256 fingerprint of the certificate, colon-separated hex."""
        return fingerprint(self.certificate)

    @property
    def self_signed(self) -> bool:
        """Whether the certificate is signed by its own key."""
        return is_self_signed(self.certificate)


def certificate_path(key_path: Path) -> Path:
    """Where the certificate of a key file lives: ``<stem>.cert.pem`` beside it."""
    stem = key_path.name[: -len(key_path.suffix)] if key_path.suffix else key_path.name
    return key_path.with_name(f"{stem}.cert.pem")


def subject_name(cert: x509.Certificate) -> str:
    """Common name of a certificate's subject, or the whole subject."""
    names = cert.subject.get_attributes_for_oid(NameOID.COMMON_NAME)
    if names:
        value = names[0].value
        return value if isinstance(value, str) else value.decode("utf-8", "replace")
    return cert.subject.rfc4514_string()


def fingerprint(cert: x509.Certificate) -> str:
    """SHA-256 fingerprint of a certificate as colon-separated upper-case hex."""
    digest = cert.fingerprint(hashes.SHA256()).hex().upper()
    return ":".join(digest[i : i + 2] for i in range(0, len(digest), 2))


def is_self_signed(cert: x509.Certificate) -> bool:
    """True if the certificate's issuer is its subject and its own key verifies it."""
    if cert.issuer != cert.subject:
        return False
    try:
        cert.verify_directly_issued_by(cert)
    except (ValueError, TypeError, InvalidSignature):
        return False
    return True


def _check_name(name: str) -> str:
    name = unicodedata.normalize("NFC", name).strip()
    if not name:
        raise InputError("--name", "is empty; give the supervisor's name as it should appear")
    if any(unicodedata.category(c) in ("Cc", "Cf") for c in name):
        raise InputError("--name", "contains control characters; give a plain printed name")
    if len(name) > MAX_NAME:
        raise InputError("--name", f"is {len(name)} characters; at most {MAX_NAME} fit in a "
                                   "certificate (use initials for long names)")
    return name


def check_passphrase(passphrase: str) -> bytes:
    """Validate a new passphrase and return it as UTF-8 bytes.

    Raises
    ------
    InputError
        If it is shorter than :data:`MIN_PASSPHRASE` characters.
    """
    if len(passphrase) < MIN_PASSPHRASE:
        raise InputError("passphrase", f"is {len(passphrase)} characters; use at least "
                                       f"{MIN_PASSPHRASE}")
    return passphrase.encode("utf-8")


def check_days(days: object) -> int:
    """Validate a certificate validity period [days].

    Raises
    ------
    InputError
        Unless ``days`` is a whole number from 1 to :data:`MAX_DAYS`.
    """
    if isinstance(days, bool) or not isinstance(days, int) or not 1 <= days <= MAX_DAYS:
        shown = days if isinstance(days, int) and abs(days) < 10**12 else "a number that size"
        raise InputError("--days", f"got {shown}; expected a whole number of days from 1 to "
                                   f"{MAX_DAYS} (ten years)")
    return days


def new_identity(
    name: str,
    out: Path,
    passphrase: str,
    *,
    key_type: KeyType = "ec",
    organisation: str | None = None,
    valid_days: int = 3 * 365,
    now: dt.datetime | None = None,
) -> IdentityFiles:
    """Make a signing key and a self-signed certificate for a supervisor.

    Parameters
    ----------
    name : str
        The supervisor's printed name (certificate common name, at most 64
        characters, any script).
    out : Path
        Key file to write (PKCS#12); the certificate goes beside it.
    passphrase : str
        Passphrase that encrypts the key file (at least 8 characters).
    key_type : {"ec", "rsa"}
        ECDSA on P-256 (default) or RSA 3072.
    organisation : str, optional
        Organisation name for the certificate subject.
    valid_days : int
        Certificate validity [days].
    now : datetime, optional
        Start of validity (default: the current time, less five minutes).

    Returns
    -------
    IdentityFiles
        Paths of the key file and the certificate.

    Raises
    ------
    InputError
        If the name or passphrase is unusable, ``valid_days`` is outside
        1 to :data:`MAX_DAYS`, either file already exists, or the folder does
        not exist.
    """
    name = _check_name(name)
    secret = check_passphrase(passphrase)
    check_days(valid_days)
    cert_out = certificate_path(out)
    for path in (out, cert_out):
        if path.exists():
            raise InputError("--out", f"{path} already exists; choose another path "
                                      "(an existing key is never overwritten)")
    if not out.parent.is_dir():
        raise InputError("--out", f"folder {out.parent} does not exist")
    if key_type == "ec":
        key: ec.EllipticCurvePrivateKey | rsa.RSAPrivateKey = ec.generate_private_key(
            ec.SECP256R1())
    elif key_type == "rsa":
        key = rsa.generate_private_key(public_exponent=65537, key_size=3072)
    else:
        raise InputError("--type", f"got {key_type!r}; expected ec or rsa")
    attrs = [x509.NameAttribute(NameOID.COMMON_NAME, name)]
    if organisation:
        attrs.append(x509.NameAttribute(NameOID.ORGANIZATION_NAME, _check_name(organisation)))
    subject = x509.Name(attrs)
    start = (now or dt.datetime.now(dt.UTC)) - dt.timedelta(minutes=5)
    cert = (
        x509.CertificateBuilder()
        .subject_name(subject)
        .issuer_name(subject)
        .public_key(key.public_key())
        .serial_number(x509.random_serial_number())
        .not_valid_before(start)
        .not_valid_after(start + dt.timedelta(days=valid_days))
        .add_extension(x509.BasicConstraints(ca=False, path_length=None), critical=True)
        .add_extension(
            x509.KeyUsage(digital_signature=True, content_commitment=True,
                          key_encipherment=False, data_encipherment=False, key_agreement=False,
                          key_cert_sign=False, crl_sign=False, encipher_only=False,
                          decipher_only=False),
            critical=True,
        )
        .add_extension(x509.SubjectKeyIdentifier.from_public_key(key.public_key()),
                       critical=False)
        .sign(key, hashes.SHA256())
    )
    encryption = (
        serialization.PrivateFormat.PKCS12.encryption_builder()
        .kdf_rounds(_KDF_ROUNDS)
        .key_cert_algorithm(pkcs12.PBES.PBESv2SHA256AndAES256CBC)
        .hmac_hash(hashes.SHA256())
        .build(secret)
    )
    data = pkcs12.serialize_key_and_certificates(name.encode("utf-8"), key, cert, None,
                                                 encryption)
    pem = cert.public_bytes(serialization.Encoding.PEM)
    write_atomically([(out, data, KEY_MODE), (cert_out, pem, KEY_MODE)])
    return IdentityFiles(key=out, certificate=cert_out)


_EXPECTED_KEY = "expected the .p12 key file written by 'supervisor keys new'"


def read_key_file(path: Path, *, field: str = "--sign") -> bytes:
    """Read a key file and check that it is PKCS#12, without its passphrase.

    Lets the command line report a missing or wrong file before it asks for
    the passphrase.

    Parameters
    ----------
    path : Path
        The key file.
    field : str
        Name of the option the path came from, for messages.

    Returns
    -------
    bytes
        The file's contents.

    Raises
    ------
    KeyFileError
        If the file cannot be read, or is a certificate, another PEM file or
        anything but PKCS#12.
    """
    try:
        data = path.read_bytes()
    except OSError as exc:
        raise KeyFileError(field, f"cannot read {path} ({exc.strerror or exc}); "
                                  f"{_EXPECTED_KEY}") from None
    if b"-----BEGIN CERTIFICATE-----" in data[:4096]:
        raise KeyFileError(field, f"{path} is a certificate, not a key file; {_EXPECTED_KEY}")
    if b"-----BEGIN" in data[:4096]:
        raise KeyFileError(field, f"{path} is a PEM file, not a PKCS#12 key file; "
                                  f"{_EXPECTED_KEY}")
    try:
        asn1_pkcs12.Pfx.load(data, strict=True).native  # noqa: B018 - parse fully
    except Exception:
        raise KeyFileError(field, f"{path} is not a PKCS#12 key file; {_EXPECTED_KEY}") \
            from None
    return data


def load_identity(path: Path, passphrase: str, *, field: str = "--sign") -> SigningIdentity:
    """Open a key file written by :func:`new_identity`.

    Parameters
    ----------
    path : Path
        The PKCS#12 key file.
    passphrase : str
        Its passphrase.
    field : str
        Name of the option the path came from, for messages.

    Returns
    -------
    SigningIdentity

    Raises
    ------
    KeyFileError
        If the file cannot be read, is not a PKCS#12 key file (a certificate
        given by mistake is named as such), the passphrase is wrong, or the
        file holds no private key or certificate.
    """
    expected = _EXPECTED_KEY
    data = read_key_file(path, field=field)
    secret = passphrase.encode("utf-8")
    try:
        key, cert, _ = pkcs12.load_key_and_certificates(data, secret)
    except ValueError:
        raise KeyFileError(field, f"wrong passphrase for {path} (or the key file is damaged)") \
            from None
    if key is None or cert is None:
        raise KeyFileError(field, f"{path} holds no private key and certificate; {expected}")
    if not isinstance(key, ec.EllipticCurvePrivateKey | rsa.RSAPrivateKey):
        raise KeyFileError(field, f"{path} holds a {type(key).__name__}; expected an EC or "
                                  "RSA key")
    return SigningIdentity(private_key=key, certificate=cert, pkcs12_data=data,
                           passphrase=secret)


def check_validity(identity: SigningIdentity, when: dt.datetime | None = None) -> None:
    """Refuse to sign with a certificate outside its validity period.

    Raises
    ------
    KeyFileError
        If ``when`` (default: now) is before or after the certificate's
        validity.
    """
    when = when or dt.datetime.now(dt.UTC)
    cert = identity.certificate
    if when < cert.not_valid_before_utc:
        raise KeyFileError("--sign", f"the certificate is valid only from "
                                     f"{cert.not_valid_before_utc:%Y-%m-%d %H:%M} UTC")
    if when > cert.not_valid_after_utc:
        raise KeyFileError("--sign", f"the certificate expired on "
                                     f"{cert.not_valid_after_utc:%Y-%m-%d}; make a new key with "
                                     "'supervisor keys new'")
