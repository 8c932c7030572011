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
    The PDF bytes, deterministic for a given record; it never fails on the
    text a plan holds.  Page 1 (``summary``), findings by dive and the
    appendix of passed checks (``findings_list``), one section per dive
    (``sections``), chamber, pre-dive items, cautions and signature blocks
    (``signoff``); figures in the plan's unit system (``units``); what the
    PDF records about itself in its metadata (``pdf_meta``).
``keys.new_identity``, ``keys.load_identity``
    A supervisor's PKCS#12 key file (passphrase-encrypted, mode 0600) and
    self-signed certificate ``<stem>.cert.pem``.
``signing.sign_pdf``, ``signing.sign_detached``
    PAdES B-B signature on the PDF; detached CMS (DER) on the JSON.
``verify.verify_file(path, expected=None, keyrings=())``
    Valid (intact, signer trusted) / untrusted (intact, signer in no keyring)
    / invalid / unreadable; signer, plan supervisor, time, fingerprint,
    document hash, the checklist's verdict and counts.
``keyring.load_keyring``, ``keyring.trust``, ``keyring.remove``
    Keyrings of trusted supervisor certificates (per-user and company files).

Signature design
----------------
The PDF carries one PAdES signature in an incremental update, visible in any
PDF reader's signature panel.  The JSON record is signed separately by a
detached CMS SignedData in ``<job>-checklist.json.sig``, so the record stays
plain JSON that any tool can read.  Verification checks integrity strictly
(every byte of both files, including the parts of a PDF signature that the
signature itself does not cover).  Certificates are self-signed, so trust
comes from a keyring of the contractor's trusted supervisor certificates (or
one ``--cert`` for a single check); an intact signature by anyone else is
reported as untrusted, exit status 3, never as valid.  Signatures are found by
reading the PDF's structure with pyHanko, never by searching its bytes.
"""
