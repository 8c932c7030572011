"""PAdES signature on the PDF and detached CMS on the JSON (supervisor.report.signing)."""

from __future__ import annotations

import hashlib
import io
from pathlib import Path

from asn1crypto import cms
from pyhanko.pdf_utils.reader import PdfFileReader
from reportlab.pdfgen import canvas

from supervisor.report import keys, signing


def _tiny_pdf() -> bytes:
    buf = io.BytesIO()
    c = canvas.Canvas(buf, invariant=1)
    c.drawString(72, 720, "checklist")
    c.showPage()
    c.save()
    return buf.getvalue()


def test_pdf_signature_is_pades_and_appended(identity_files: tuple[Path, str]) -> None:
    identity = keys.load_identity(*identity_files)
    original = _tiny_pdf()
    signed = signing.sign_pdf(original, identity, reason="test", location="North Mole")
    assert signed.startswith(original)  # an incremental update: the original bytes stay
    sig = PdfFileReader(io.BytesIO(signed)).embedded_signatures[0]
    assert sig.field_name == signing.FIELD_NAME
    # PAdES baseline uses SubFilter /ETSI.CAdES.detached (ETSI EN 319 142-1, 5.1).
    assert sig.sig_object["/SubFilter"] == "/ETSI.CAdES.detached"
    assert sig.sig_object["/Location"] == "North Mole"
    attrs = {a["type"].native for a in sig.signer_info["signed_attrs"]}
    assert "signing_certificate_v2" in attrs
    assert "signing_time" not in attrs  # PAdES B-B: the time is in /M, not in the CMS


def test_detached_json_signature(identity_files: tuple[Path, str]) -> None:
    identity = keys.load_identity(*identity_files)
    data = b'{"schema": "supervisor.check/1"}\n'
    der = signing.sign_detached(data, identity)
    info = cms.ContentInfo.load(der, strict=True)
    signed = info["content"]
    assert info["content_type"].native == "signed_data"
    assert signed["encap_content_info"]["content"].native is None  # detached
    attrs = {a["type"].native: a["values"][0].native for a in
             signed["signer_infos"][0]["signed_attrs"]}
    assert attrs["message_digest"] == hashlib.sha256(data).digest()
    assert "signing_certificate_v2" in attrs


def test_signer_note(identity_files: tuple[Path, str]) -> None:
    identity = keys.load_identity(*identity_files)
    note = signing.signer_note(identity)
    assert note.name == "Dana Whitcombe" and note.self_signed
    assert note.fingerprint_sha256 == identity.fingerprint_sha256
