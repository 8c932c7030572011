"""Digital signatures on the checklist: the PDF and its JSON record.

* **PDF**: a PAdES baseline signature (level B-B, ETSI EN 319 142-1) applied
  with pyHanko as an incremental update, in an invisible signature field
  named ``SupervisorSignature``.  Ordinary PDF readers show it in their
  signature panel.  There is no time-stamp authority, so the signing time
  is the one the signer's clock reported.
* **JSON**: a detached CMS signature (RFC 5652 SignedData, DER, with the
  CAdES signing-certificate-v2 attribute that binds the certificate) in
  ``<job>-checklist.json.sig``.  It can also be checked with
  ``openssl cms -verify -binary -inform DER -in X.json.sig -content X.json
  -noverify``.
"""

from __future__ import annotations

import asyncio
import io

from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
from pyhanko.sign import fields, signers

from supervisor.report.blocks import SignerNote
from supervisor.report.keys import SigningIdentity

FIELD_NAME = "SupervisorSignature"
DIGEST = "sha256"


def _signer(identity: SigningIdentity) -> signers.SimpleSigner:
    return signers.SimpleSigner.load_pkcs12_data(
        identity.pkcs12_data, other_certs=[], passphrase=identity.passphrase
    )


def signer_note(identity: SigningIdentity) -> SignerNote:
    """What the signature section of the PDF says about the signer."""
    return SignerNote(name=identity.name, fingerprint_sha256=identity.fingerprint_sha256,
                      self_signed=identity.self_signed)


def sign_pdf(pdf: bytes, identity: SigningIdentity, *, reason: str,
             location: str | None = None) -> bytes:
    """Apply a PAdES B-B signature to a PDF.

    Parameters
    ----------
    pdf : bytes
        The unsigned PDF.
    identity : SigningIdentity
        The supervisor's key and certificate.
    reason : str
        Reason recorded in the signature dictionary.
    location : str, optional
        Location recorded in the signature dictionary (the job site).

    Returns
    -------
    bytes
        The signed PDF: the input bytes followed by one incremental update.
    """
    writer = IncrementalPdfFileWriter(io.BytesIO(pdf), strict=True)
    meta = signers.PdfSignatureMetadata(
        field_name=FIELD_NAME,
        md_algorithm=DIGEST,
        subfilter=fields.SigSeedSubFilter.PADES,
        reason=reason,
        location=location,
        name=identity.name,
    )
    out = signers.PdfSigner(meta, signer=_signer(identity)).sign_pdf(writer)
    return out.getvalue()


def sign_detached(data: bytes, identity: SigningIdentity) -> bytes:
    """A detached CMS signature of ``data`` (DER bytes).

    Parameters
    ----------
    data : bytes
        The content signed (the JSON record bytes).
    identity : SigningIdentity
        The supervisor's key and certificate.

    Returns
    -------
    bytes
        DER-encoded CMS ContentInfo holding SignedData without the content.
    """
    signer = _signer(identity)
    info = asyncio.run(signer.async_sign_general_data(data, DIGEST, detached=True,
                                                      use_cades=True))
    return info.dump()
