"""Check a signed checklist PDF or JSON record: valid, who signed, when, changed or not.

Integrity is checked strictly; trust is not checked at all.

**PDF.**  Exactly one signature, whose byte range starts at byte 0 and ends
at the last byte of the file, so nothing was appended after signing.  The
gap the byte range leaves out must hold exactly the signature's DER bytes in
hexadecimal, of one letter case, padded with zeros: this closes the one
region of a signed PDF that a PDF signature does not itself cover (a changed
padding digit, or a hex digit changed only in case, leaves the signature
readable and "valid").  pyHanko then checks the digest of the signed range
and the signature itself, and that the signed revision is the whole file.

**JSON.**  The detached CMS signature ``<file>.sig`` must be canonical DER
with no trailing bytes, and must verify over the exact bytes of the JSON
file, certificate binding included.

**Trust.**  Checklists are signed with self-signed certificates.  A valid
signature proves the file has not changed since someone holding that key
signed it; it does not prove who that was.  The report gives the signer's
name and certificate fingerprint and says whether the certificate is
self-signed; compare the fingerprint with the one the supervisor published,
or pass that certificate with ``--cert`` to require it.
"""

from __future__ import annotations

import asyncio
import datetime as dt
import hashlib
import io
import json
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

from asn1crypto import cms
from asn1crypto import x509 as asn1_x509
from cryptography import x509
from cryptography.hazmat.primitives.serialization import Encoding
from pyhanko.pdf_utils.reader import PdfFileReader
from pyhanko.sign.validation import (
    SignatureCoverageLevel,
    async_validate_detached_cms,
    validate_pdf_signature,
)
from pyhanko_certvalidator import ValidationContext

from supervisor.errors import InputError
from supervisor.report.keys import fingerprint, is_self_signed, subject_name
from supervisor.report.pdf import KEYWORD_PREFIX

Status = Literal["valid", "invalid", "unreadable"]
EXIT = {"valid": 0, "invalid": 1, "unreadable": 2}

_BYTE_RANGE = re.compile(rb"/ByteRange\s*\[\s*(\d+)\s+(\d+)\s+(\d+)\s+(\d+)\s*\]")


@dataclass
class Verification:
    """The outcome of checking one file."""

    path: Path
    kind: Literal["pdf", "json", "unknown"]
    status: Status
    reason: str
    signer: str | None = None
    fingerprint_sha256: str | None = None
    self_signed: bool | None = None
    signed_at: dt.datetime | None = None
    document_sha256: str | None = None
    job_title: str | None = None
    notes: list[str] = field(default_factory=list)

    @property
    def exit_code(self) -> int:
        """0 valid, 1 invalid or changed, 2 unreadable."""
        return EXIT[self.status]

    def lines(self) -> list[str]:
        """The report as printed by ``supervisor verify``."""
        head = {"valid": "VALID", "invalid": "INVALID", "unreadable": "UNREADABLE"}[self.status]
        out = [f"{head}: {self.path} ({self.kind}): {self.reason}"]
        if self.signer is not None:
            out.append(f"  signed by:        {self.signer}")
        if self.fingerprint_sha256:
            out.append(f"  certificate:      SHA-256 {self.fingerprint_sha256}")
        if self.self_signed is not None:
            out.append("  trust:            " + (
                "self-signed certificate; trust is not checked (compare the fingerprint with "
                "the one the supervisor published)" if self.self_signed else
                "certificate issued by another party; its chain of trust is not checked"))
        if self.signed_at is not None:
            out.append(f"  signed at:        {self.signed_at.astimezone(dt.UTC):%Y-%m-%d %H:%M:%S}"
                       " UTC (signer's clock)")
        if self.job_title:
            out.append(f"  job:              {self.job_title}")
        if self.document_sha256:
            out.append(f"  document sha256:  {self.document_sha256}")
        out += [f"  note: {n}" for n in self.notes]
        return out


class _Invalid(Exception):
    """Raised inside the checks; its message becomes the reason."""


def _load_cert(data: bytes) -> x509.Certificate:
    if b"-----BEGIN" in data:
        return x509.load_pem_x509_certificate(data)
    return x509.load_der_x509_certificate(data)


def load_expected_certificate(path: Path) -> x509.Certificate:
    """Read the certificate given with ``--cert`` (PEM or DER).

    Raises
    ------
    InputError
        If the file cannot be read or holds no certificate.
    """
    try:
        return _load_cert(path.read_bytes())
    except OSError as exc:
        raise InputError("--cert", f"cannot read {path} ({exc.strerror or exc})") from None
    except ValueError:
        raise InputError("--cert", f"{path} holds no X.509 certificate; expected the "
                                   ".cert.pem file written by 'supervisor keys new'") from None


def _identity(result: Verification, cert: asn1_x509.Certificate,
              expected: x509.Certificate | None) -> None:
    pyca = x509.load_der_x509_certificate(cert.dump())
    result.signer = subject_name(pyca)
    result.fingerprint_sha256 = fingerprint(pyca)
    result.self_signed = is_self_signed(pyca)
    if expected is not None and expected.public_bytes(Encoding.DER) != pyca.public_bytes(
            Encoding.DER):
        raise _Invalid("signed with a different certificate from the one given with --cert "
                       f"(expected SHA-256 {fingerprint(expected)})")
    if result.signed_at is not None:
        if not pyca.not_valid_before_utc <= result.signed_at <= pyca.not_valid_after_utc:
            raise _Invalid("the reported signing time is outside the certificate's validity")
    if pyca.not_valid_after_utc < dt.datetime.now(dt.UTC):
        result.notes.append(f"the certificate expired on {pyca.not_valid_after_utc:%Y-%m-%d}")


def _trust_self(cert: asn1_x509.Certificate) -> ValidationContext:
    # The signer's own certificate is given as the trust root only so that the
    # validator runs to the end; trust is never reported from it.
    return ValidationContext(trust_roots=[cert])


def _check_profile(signed: cms.SignedData) -> None:
    """Check the CMS fields the signature value does not cover.

    The versions and the list of digest algorithms of a SignedData are
    outside the signed attributes, so a changed byte there would leave the
    signature "valid".  They are fully determined by the rest of the
    structure (RFC 5652, sections 5.1 and 5.3), so they are recomputed and
    compared.
    """
    infos = signed["signer_infos"]
    if len(infos) != 1:
        raise _Invalid(f"the signature holds {len(infos)} signers; expected one")
    info = infos[0]
    sid_kind = info["sid"].name
    want_si = "v1" if sid_kind == "issuer_and_serial_number" else "v3"
    if info["version"].native != want_si:
        raise _Invalid("the signature's signer-info version was changed")
    certs = signed["certificates"]
    other = any(c.name != "certificate" for c in certs) if certs else False
    want_sd = "v3" if (want_si == "v3" or other
                       or signed["encap_content_info"]["content_type"].native != "data") \
        else "v1"
    if signed["version"].native != want_sd:
        raise _Invalid("the signature's SignedData version was changed")
    algos = signed["digest_algorithms"]
    if len(algos) != 1 or algos[0].dump(force=True) != info["digest_algorithm"].dump(force=True):
        raise _Invalid("the signature's list of digest algorithms was changed")


def _check_gap(data: bytes, gap_start: int, gap_end: int) -> bytes:
    """Check the unsigned gap of a PDF signature and return the DER it holds."""
    gap = data[gap_start:gap_end]
    if len(gap) < 4 or gap[:1] != b"<" or gap[-1:] != b">":
        raise _Invalid("the signature contents are not a hexadecimal string")
    digits = gap[1:-1]
    if len(digits) % 2 or not re.fullmatch(rb"[0-9A-Fa-f]*", digits):
        raise _Invalid("the signature contents are not well-formed hexadecimal")
    raw = bytes.fromhex(digits.decode("ascii"))
    try:
        info = cms.ContentInfo.load(raw, strict=False)
        der = info.dump(force=True)
    except Exception as exc:
        raise _Invalid(f"the signature contents cannot be decoded ({exc})") from None
    if raw[: len(der)] != der or raw[len(der):].strip(b"\x00"):
        raise _Invalid("the signature contents were changed (not the DER signature followed "
                       "by zero padding)")
    canonical = {der.hex().upper() + "0" * (len(digits) - 2 * len(der)),
                 der.hex() + "0" * (len(digits) - 2 * len(der))}
    if digits.decode("ascii") not in canonical:
        raise _Invalid("the signature contents were changed (hex digits of mixed case)")
    if info["content_type"].native != "signed_data":
        raise _Invalid("the signature contents are not CMS SignedData")
    _check_profile(info["content"])
    return der


def _verify_pdf(result: Verification, data: bytes, expected: x509.Certificate | None) -> None:
    ranges = _BYTE_RANGE.findall(data)
    if not ranges:
        raise _Invalid("the PDF carries no digital signature")
    if len(ranges) != 1:
        raise _Invalid(f"the PDF carries {len(ranges)} signatures; a checklist has exactly one")
    a, b, c, d = (int(x) for x in ranges[0])
    if a != 0 or not 0 < b < c or c + d != len(data):
        raise _Invalid("the signed byte range does not cover the whole file: something was "
                       "added or removed after signing")
    _check_gap(data, b, c)
    reader = PdfFileReader(io.BytesIO(data), strict=True)
    sigs = reader.embedded_signatures
    if len(sigs) != 1:
        raise _Invalid(f"the PDF carries {len(sigs)} signatures; a checklist has exactly one")
    sig = sigs[0]
    if list(sig.byte_range) != [a, b, c, d]:
        raise _Invalid("the signature's byte range is not the one found in the file")
    result.signed_at = sig.self_reported_timestamp
    status = validate_pdf_signature(sig, _trust_self(sig.signer_cert))
    if not status.intact:
        raise _Invalid("the document was changed after signing (digest mismatch)")
    if not status.valid:
        raise _Invalid("the signature value does not verify")
    if status.coverage != SignatureCoverageLevel.ENTIRE_FILE:
        raise _Invalid("the signature does not cover the whole file")
    info = reader.trailer_view.get("/Info")
    if info is not None and hasattr(info, "get_object"):
        info = info.get_object()
    keywords = str(info.get("/Keywords", "")) if info is not None else ""
    for word in keywords.replace(",", " ").split():
        if word.startswith(KEYWORD_PREFIX):
            result.document_sha256 = word[len(KEYWORD_PREFIX):]
    title = str(info.get("/Title", "")) if info is not None else ""
    if title:
        result.job_title = title.removeprefix("Pre-dive checklist: ")
    _identity(result, sig.signer_cert, expected)


def _verify_json(result: Verification, data: bytes, sig_path: Path,
                 expected: x509.Certificate | None) -> None:
    result.document_sha256 = hashlib.sha256(data).hexdigest()
    try:
        record = json.loads(data.decode("utf-8"))
        title = record.get("job", {}).get("title") if isinstance(record, dict) else None
        result.job_title = title if isinstance(title, str) else None
    except (UnicodeDecodeError, ValueError, AttributeError):
        result.notes.append("the JSON file no longer parses")
    try:
        sig = sig_path.read_bytes()
    except FileNotFoundError:
        raise _Invalid(f"not signed: no detached signature {sig_path.name} beside it") from None
    except OSError as exc:
        raise _Invalid(f"cannot read the signature {sig_path} ({exc.strerror or exc})") from None
    _check_detached(result, data, sig, f"signature file {sig_path.name}", "JSON file",
                    expected)


def _check_detached(result: Verification, data: bytes, sig: bytes, sig_name: str,
                    content: str, expected: x509.Certificate | None) -> None:
    try:
        info = cms.ContentInfo.load(sig, strict=True)
        if info.dump(force=True) != sig:
            raise ValueError("not canonical DER")
        if info["content_type"].native != "signed_data":
            raise ValueError("not CMS SignedData")
        signed = info["content"]
        if signed["encap_content_info"]["content"].native is not None:
            raise ValueError("not a detached signature")
    except Exception as exc:
        raise _Invalid(f"the signature {sig_name} is damaged or changed ({exc})") \
            from None
    _check_profile(signed)
    certs = [c.chosen for c in signed["certificates"] or [] if c.name == "certificate"]
    if not certs:
        raise _Invalid(f"the signature {sig_name} holds no certificate")
    try:
        status = asyncio.run(async_validate_detached_cms(
            data, signed, signer_validation_context=_trust_self(certs[0])))
    except Exception as exc:
        raise _Invalid(f"the signature cannot be checked ({exc})") from None
    result.signed_at = status.signer_reported_dt
    if not status.intact:
        raise _Invalid(f"the {content} was changed after signing (digest mismatch)")
    if not status.valid:
        raise _Invalid("the signature value does not verify")
    _identity(result, status.signing_cert, expected)


def verify_detached(data: bytes, signature: bytes, *,
                    expected: x509.Certificate | None = None,
                    label: str = "record") -> Verification:
    """Check a detached CMS signature over bytes held in memory (a stored record).

    The same checks as for a checklist's ``.json.sig``: canonical DER, the
    unsigned CMS fields, the digest and the signature value, the certificate's
    validity at the reported signing time.

    Parameters
    ----------
    data : bytes
        The signed content.
    signature : bytes
        DER-encoded CMS ContentInfo (detached SignedData).
    expected : x509.Certificate, optional
        Require this certificate.
    label : str
        Name of the signed thing in the report.

    Returns
    -------
    Verification
        ``status`` is ``"valid"`` or ``"invalid"``.
    """
    result = Verification(Path(label), "json", "valid", "")
    result.document_sha256 = hashlib.sha256(data).hexdigest()
    try:
        _check_detached(result, data, signature, "signature", label, expected)
    except _Invalid as exc:
        result.status, result.reason = "invalid", str(exc)
        return result
    result.reason = "signature intact; nothing changed after signing"
    return result


def _kind(path: Path, head: bytes) -> Literal["pdf", "json", "sig", "unknown"]:
    name = path.name.lower()
    if name.endswith(".json.sig"):
        return "sig"
    if name.endswith(".pdf"):
        return "pdf"
    if name.endswith(".json"):
        return "json"
    if b"%PDF-" in head[:1024]:
        return "pdf"
    if head.lstrip()[:1] == b"{":
        return "json"
    return "unknown"


def verify_file(path: Path, *, expected: x509.Certificate | None = None) -> Verification:
    """Check a signed checklist PDF, or a JSON record with its ``.sig`` beside it.

    Parameters
    ----------
    path : Path
        ``<job>-checklist.pdf``, ``<job>-checklist.json`` or
        ``<job>-checklist.json.sig``.
    expected : x509.Certificate, optional
        Require the signature to be made with this certificate.

    Returns
    -------
    Verification
        ``status`` is ``"valid"``, ``"invalid"`` (not signed, changed after
        signing, or signed by another certificate) or ``"unreadable"`` (the
        file cannot be read, or is neither a PDF nor a JSON record).
    """
    json_path = path
    if path.name.lower().endswith(".json.sig"):
        json_path = path.with_name(path.name[: -len(".sig")])
    try:
        data = json_path.read_bytes()
    except OSError as exc:
        return Verification(json_path, "unknown", "unreadable",
                            f"cannot read the file ({exc.strerror or exc})")
    kind = _kind(path, data)
    if kind == "unknown":
        return Verification(path, "unknown", "unreadable",
                            "neither a PDF nor a JSON checklist record")
    if kind == "pdf":
        result = Verification(path, "pdf", "valid", "")
        if b"%PDF-" not in data[:1024] and b"/ByteRange" not in data:
            return Verification(path, "pdf", "unreadable", "not a PDF file")
        try:
            _verify_pdf(result, data, expected)
        except _Invalid as exc:
            result.status, result.reason = "invalid", str(exc)
            return result
        except Exception as exc:  # a damaged PDF the reader cannot parse
            result.status = "invalid"
            result.reason = f"the PDF is damaged or was changed after signing ({exc})"
            return result
        result.reason = "signature intact; nothing changed after signing"
        return result
    result = Verification(json_path, "json", "valid", "")
    try:
        _verify_json(result, data, json_path.with_name(json_path.name + ".sig"), expected)
    except _Invalid as exc:
        result.status, result.reason = "invalid", str(exc)
        return result
    result.reason = "signature intact; nothing changed after signing"
    return result
