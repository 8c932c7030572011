"""Check a signed checklist PDF or JSON record: intact, who signed, trusted, what it says.

**PDF.**  The signatures are read from the PDF's structure (pyHanko's
reader), never by searching the bytes, so text a user typed into the plan
cannot pass for a signature.  There must be exactly one, whose byte range
starts at byte 0 and ends at the last byte of the file, so nothing was
appended after signing.  The gap the byte range leaves out must hold exactly
the signature's DER bytes in hexadecimal, of one letter case, padded with
zeros: this closes the one region of a signed PDF that a PDF signature does
not itself cover (a changed padding digit, or a hex digit changed only in
case, leaves the signature readable and "valid").  pyHanko then checks the
digest of the signed range and the signature itself, and that the signed
revision is the whole file.

**JSON.**  The detached CMS signature ``<file>.sig`` must be canonical DER
with no trailing bytes, and must verify over the exact bytes of the JSON
file, certificate binding included.

**Trust.**  An intact signature proves the file has not changed since
someone holding that key signed it, not that this person may approve dives.
The signer is *trusted* when its certificate is the one given with
``--cert`` (a one-off check) or is in a keyring of trusted supervisor
certificates (:mod:`supervisor.report.keyring`).  An intact signature by
anyone else is reported as ``untrusted`` (exit status 3), never as valid.

**What was signed.**  The report gives the checklist's verdict and counts
(from the PDF's keywords, or recomputed from the JSON record's findings, the
worse of stated and recomputed), and the plan's supervisor beside the
signer, so a valid signature on a plan that does not conform, or by someone
other than the plan's supervisor, cannot read as approval.
"""

from __future__ import annotations

import asyncio
import datetime as dt
import hashlib
import io
import json
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

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

from supervisor.report.formatting import VERDICT_LABEL, count_findings, effective_verdict
from supervisor.report.keyring import Keyring, load_certificate
from supervisor.report.keys import fingerprint, is_self_signed, subject_name
from supervisor.report.pdf_meta import read_keywords, same_person
from supervisor.text import printable

Status = Literal["valid", "untrusted", "invalid", "unreadable"]
#: Exit status of ``supervisor verify`` per outcome (3: intact, signer not trusted).
EXIT = {"valid": 0, "invalid": 1, "unreadable": 2, "untrusted": 3}
_HEAD = {"valid": "VALID", "untrusted": "UNTRUSTED SIGNER", "invalid": "INVALID",
         "unreadable": "UNREADABLE"}


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
    trust: str | None = None
    plan_supervisor: str | None = None
    verdict: str | None = None
    counts: dict[str, int] | None = None

    @property
    def exit_code(self) -> int:
        """0 valid and trusted, 1 invalid or changed, 2 unreadable, 3 intact but untrusted."""
        return EXIT[self.status]

    def verdict_text(self) -> str:
        """``"NEEDS REVIEW (0 fail, 9 warn, 12 info, 103 pass)"`` or why it is unknown."""
        if self.verdict is None:
            return "not recorded in this file; read page 1 of the checklist"
        label = VERDICT_LABEL.get(self.verdict, self.verdict)
        if not self.counts:
            return label
        c = self.counts
        return (f"{label} ({c.get('fail', 0)} fail, {c.get('warn', 0)} warn, "
                f"{c.get('info', 0)} info, {c.get('pass', 0)} pass)")

    def lines(self) -> list[str]:
        """The report as printed by ``supervisor verify``, every line terminal-safe."""
        head = f"{_HEAD[self.status]}: {self.path} ({self.kind}): {self.reason}"
        if self.status in ("valid", "untrusted") and self.verdict is not None:
            head += f"; checklist verdict {VERDICT_LABEL.get(self.verdict, self.verdict)}"
        out = [head]
        if self.signer is not None:
            out.append(f"  signed by:        {self.signer}")
        if self.plan_supervisor is not None and self.signer is not None:
            same = same_person(self.signer, self.plan_supervisor)
            out.append(f"  plan supervisor:  {self.plan_supervisor}"
                       + ("" if same else " (NOT the signer: signed in place of the plan's "
                                          "supervisor)"))
        if self.fingerprint_sha256:
            out.append(f"  certificate:      SHA-256 {self.fingerprint_sha256}"
                       + (" (self-signed)" if self.self_signed else ""))
        if self.trust is not None:
            out.append(f"  trust:            {self.trust}")
        if self.signed_at is not None:
            out.append(f"  signed at:        {self.signed_at.astimezone(dt.UTC):%Y-%m-%d %H:%M:%S}"
                       " UTC (signer's clock)")
        if self.job_title:
            out.append(f"  job:              {self.job_title}")
        if self.status in ("valid", "untrusted"):
            out.append(f"  checklist:        {self.verdict_text()}")
            if self.verdict == "does-not-conform":
                out.append("  note: the plan does NOT conform; a valid signature records who "
                           "signed it, not that the dives may proceed as planned")
        if self.document_sha256:
            out.append(f"  document sha256:  {self.document_sha256}")
        out += [f"  note: {n}" for n in self.notes]
        return [printable(line) for line in out]


class _Invalid(Exception):
    """Raised inside the checks; its message becomes the reason."""


def load_expected_certificate(path: Path) -> x509.Certificate:
    """Read the certificate given with ``--cert`` (PEM or DER).

    Raises
    ------
    InputError
        If the file cannot be read or holds no certificate.
    """
    return load_certificate(path, field="--cert")


def _identity(result: Verification, cert: asn1_x509.Certificate,
              expected: x509.Certificate | None) -> x509.Certificate:
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
    return pyca


def _judge_trust(result: Verification, cert: x509.Certificate,
                 expected: x509.Certificate | None, keyrings: Sequence[Keyring]) -> None:
    """Mark an intact result trusted (valid) or untrusted, saying why."""
    if expected is not None:  # _identity already refused any other certificate
        result.trust = "trusted for this check: the certificate given with --cert"
        return
    for ring in keyrings:
        entry = ring.find(cert)
        if entry is not None:
            result.trust = f"trusted: in the {ring.label} {ring.path} (added {entry.added_on})"
            return
    result.status = "untrusted"
    where = "; ".join(f"{r.label} {r.path}" + ("" if r.exists else " (none yet)")
                      for r in keyrings) or "no keyring"
    result.reason = ("signature intact, but the signer's certificate is in no keyring of "
                     "trusted supervisors: NOT an approval")
    result.trust = (f"not trusted; looked in: {where}. If this is the supervisor's certificate "
                    "(compare the fingerprint with the one they published), add it with "
                    "'supervisor keys trust CERT', or check once with --cert CERT")


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


def _info(reader: PdfFileReader) -> Mapping[str, Any]:
    info = reader.trailer_view.get("/Info")
    if info is not None and hasattr(info, "get_object"):
        info = info.get_object()
    return info if isinstance(info, Mapping) else {}


def pdf_facts(data: bytes) -> tuple[bool, str | None]:
    """Whether a PDF's structure holds a signature (pyHanko's reader), and its job title.

    Parameters
    ----------
    data : bytes
        A checklist PDF.

    Returns
    -------
    tuple
        ``True`` when the PDF holds at least one signature field with a
        signature (read from its structure, never by searching the bytes),
        and the job title from the document title (``None`` without one).

    Raises
    ------
    Exception
        Whatever pyHanko raises for a file it cannot parse.
    """
    reader = PdfFileReader(io.BytesIO(data), strict=True)
    title = str(_info(reader).get("/Title", ""))
    prefix = "Pre-dive checklist: "
    return bool(reader.embedded_signatures), (title[len(prefix):]
                                              if title.startswith(prefix) else None)


def _verify_pdf(result: Verification, data: bytes,
                expected: x509.Certificate | None) -> x509.Certificate:
    reader = PdfFileReader(io.BytesIO(data), strict=True)
    sigs = reader.embedded_signatures
    if not sigs:
        raise _Invalid("the PDF carries no digital signature")
    if len(sigs) != 1:
        raise _Invalid(f"the PDF carries {len(sigs)} signatures; a checklist has exactly one")
    sig = sigs[0]
    try:
        a, b, c, d = (int(x) for x in sig.byte_range)
    except (TypeError, ValueError):
        raise _Invalid("the signature's byte range is not four numbers") from None
    if a != 0 or not 0 < b < c or c + d != len(data):
        raise _Invalid("the signed byte range does not cover the whole file: something was "
                       "added or removed after signing")
    _check_gap(data, b, c)
    result.signed_at = sig.self_reported_timestamp
    status = validate_pdf_signature(sig, _trust_self(sig.signer_cert))
    if not status.intact:
        raise _Invalid("the document was changed after signing (digest mismatch)")
    if not status.valid:
        raise _Invalid("the signature value does not verify")
    if status.coverage != SignatureCoverageLevel.ENTIRE_FILE:
        raise _Invalid("the signature does not cover the whole file")
    info = _info(reader)
    meta = read_keywords(str(info.get("/Keywords", "")))
    result.document_sha256 = meta.document_sha256
    result.verdict, result.counts = meta.verdict, meta.counts
    title = str(info.get("/Title", ""))
    if title:
        result.job_title = title.removeprefix("Pre-dive checklist: ")
    author = str(info.get("/Author", ""))
    result.plan_supervisor = author or None
    return _identity(result, sig.signer_cert, expected)


def _record_facts(result: Verification, record: object) -> None:
    """Title, supervisor, verdict and counts of a JSON checklist record."""
    if not isinstance(record, dict):
        return
    job = record.get("job") if isinstance(record.get("job"), dict) else {}
    title, supervisor = job.get("title"), job.get("supervisor")
    result.job_title = title if isinstance(title, str) else None
    result.plan_supervisor = supervisor if isinstance(supervisor, str) else None
    findings = record.get("findings")
    if isinstance(findings, list):
        counts = count_findings([f for f in findings if isinstance(f, dict)])
        result.verdict, _ = effective_verdict(record.get("verdict"), counts)
        result.counts = counts


def _verify_json(result: Verification, data: bytes, sig_path: Path,
                 expected: x509.Certificate | None) -> x509.Certificate:
    result.document_sha256 = hashlib.sha256(data).hexdigest()
    try:
        _record_facts(result, json.loads(data.decode("utf-8")))
    except (UnicodeDecodeError, ValueError, RecursionError):
        result.notes.append("the JSON file no longer parses")
    try:
        sig = sig_path.read_bytes()
    except FileNotFoundError:
        raise _Invalid(f"not signed: no detached signature {sig_path.name} beside it") from None
    except OSError as exc:
        raise _Invalid(f"cannot read the signature {sig_path} ({exc.strerror or exc})") from None
    return _check_detached(result, data, sig, f"signature file {sig_path.name}", "JSON file",
                           expected)


def _check_detached(result: Verification, data: bytes, sig: bytes, sig_name: str,
                    content: str, expected: x509.Certificate | None) -> x509.Certificate:
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
    return _identity(result, status.signing_cert, expected)


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


_INTACT = "signature intact; nothing changed after signing"


def verify_file(path: Path, *, expected: x509.Certificate | None = None,
                keyrings: Sequence[Keyring] = ()) -> Verification:
    """Check a signed checklist PDF, or a JSON record with its ``.sig`` beside it.

    Parameters
    ----------
    path : Path
        ``<job>-checklist.pdf``, ``<job>-checklist.json`` or
        ``<job>-checklist.json.sig``.
    expected : x509.Certificate, optional
        Require the signature to be made with this certificate, and trust it
        for this check.
    keyrings : sequence of Keyring
        Keyrings of trusted supervisor certificates, used when ``expected``
        is not given.

    Returns
    -------
    Verification
        ``status`` is ``"valid"`` (intact, signer trusted), ``"untrusted"``
        (intact, signer in no keyring), ``"invalid"`` (not signed, changed
        after signing, or signed by another certificate than ``expected``)
        or ``"unreadable"`` (the file cannot be read, or is neither a PDF nor
        a JSON record).
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
        result = Verification(path, "pdf", "valid", _INTACT)
        # a PDF starts with its header and ends with its end-of-file marker; a signed PDF
        # with either changed is a changed file (invalid), anything else is not a PDF
        if b"%PDF-" not in data[:1024] and not data[-32:].rstrip().endswith(b"%%EOF"):
            return Verification(path, "pdf", "unreadable", "not a PDF file")
        try:
            cert = _verify_pdf(result, data, expected)
        except _Invalid as exc:
            result.status, result.reason = "invalid", str(exc)
            return result
        except Exception as exc:  # a damaged PDF the reader cannot parse
            result.status = "invalid"
            result.reason = f"the PDF is damaged or was changed after signing ({exc})"
            return result
    else:
        result = Verification(json_path, "json", "valid", _INTACT)
        try:
            cert = _verify_json(result, data, json_path.with_name(json_path.name + ".sig"),
                                expected)
        except _Invalid as exc:
            result.status, result.reason = "invalid", str(exc)
            return result
    _judge_trust(result, cert, expected, keyrings)
    return result
