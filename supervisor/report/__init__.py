"""The signed pre-dive checklist: a PDF to print, sign and file, and its JSON record.

reportlab and pyHanko are used only inside this package.

Public API
----------
``checklist.make_checklist(check, plan_bytes, out_dir, identity=None, paper="letter")``
    Write ``<job>-checklist.pdf`` and ``<job>-checklist.json`` (and, with an
    identity, ``<job>-checklist.json.sig``) atomically; refuses to replace a
    signed checklist.
``document.build_record``, ``document.record_bytes``, ``document.document_sha256``
    The JSON record (the ``supervisor.check/1`` object plus ``plan_text`` and
    ``checklist``), its deterministic bytes, and the document hash: the
    SHA-256 of those bytes, printed in full on page 1 and shortened on every
    page.
``pdf.render_pdf(record, document_sha256, signer=None, paper="letter")``
    The PDF bytes, deterministic for a given record.
``keys.new_identity``, ``keys.load_identity``
    A supervisor's PKCS#12 key file (passphrase-encrypted, mode 0600) and
    self-signed certificate ``<stem>.cert.pem``.
``signing.sign_pdf``, ``signing.sign_detached``
    PAdES B-B signature on the PDF; detached CMS (DER) on the JSON.
``verify.verify_file(path, expected=None)``
    Valid / invalid / unreadable, signer, time, fingerprint, document hash.

Signature design
----------------
The PDF carries one PAdES signature in an incremental update, visible in any
PDF reader's signature panel.  The JSON record is signed separately by a
detached CMS SignedData in ``<job>-checklist.json.sig``, so the record stays
plain JSON that any tool can read.  Verification checks integrity strictly
(every byte of both files, including the parts of a PDF signature that the
signature itself does not cover) and does not check trust: certificates are
self-signed, and the report says so.
"""
