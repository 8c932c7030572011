"""A supervisor's signature on a record, with the keys of ``supervisor keys new``.

A signature is itself a record (kind ``signature``, ``refers_to`` the signed
record), so it is chained like any other and cannot be removed unnoticed.
What is signed is the canonical JSON of the signed record's header: the exact
text whose SHA-256 is its record hash, so the CMS ``messageDigest`` equals the
record hash and the signature covers the record's content (through its
content hash) and its place in the chain (through ``prev_hash``).

The signature is a detached CMS SignedData made by
:func:`supervisor.report.signing.sign_detached`, the same as the checklist's
JSON signature, and is checked by
:func:`supervisor.report.verify.verify_detached`.  As for the checklist, trust
in the certificate is not checked: the report names the signer and the
certificate fingerprint.
"""

from __future__ import annotations

import base64
import datetime as dt
from typing import Any

from supervisor.errors import InputError
from supervisor.records.store import NewRecord, StoredRecord


def signature_record(target: StoredRecord, identity: Any) -> NewRecord:
    """A ``signature`` record for ``target``, signed with a loaded key.

    Parameters
    ----------
    target : StoredRecord
        The record to sign.
    identity : supervisor.report.keys.SigningIdentity
        The supervisor's key and certificate.

    Returns
    -------
    NewRecord
    """
    from supervisor.report.keys import check_validity
    from supervisor.report.signing import sign_detached

    if target.kind in ("signature", "tombstone"):
        raise InputError("SEQ", f"record {target.seq} is a {target.kind} record; sign the "
                                "record itself")
    check_validity(identity)
    cms = sign_detached(target.header_text().encode("utf-8"), identity)
    body = {
        "signs": target.seq, "record_hash": target.record_hash,
        "signer": identity.name, "fingerprint_sha256": identity.fingerprint_sha256,
        "signed_at": dt.datetime.now(dt.UTC).isoformat(timespec="seconds"),
        "cms_der_base64": base64.b64encode(cms).decode("ascii"),
    }
    return NewRecord("signature", body, occurred_at=target.occurred_at, job=target.job,
                     diver=target.diver, refers_to=target.seq)


def check_signature(sig: StoredRecord, target: StoredRecord) -> tuple[bool, str]:
    """Check a signature record against the record it signs.

    Returns
    -------
    (bool, str)
        Whether it verifies, and what was found (the signer, or the reason).
    """
    from supervisor.report.verify import verify_detached

    body = sig.body or {}
    if body.get("signs") != target.seq or body.get("record_hash") != target.record_hash:
        return False, f"it names record {body.get('signs')} with another hash"
    try:
        der = base64.b64decode(str(body.get("cms_der_base64", "")), validate=True)
    except ValueError:
        return False, "its signature is not base64"
    result = verify_detached(target.header_text().encode("utf-8"), der)
    if result.status != "valid":
        return False, result.reason
    if result.fingerprint_sha256 != body.get("fingerprint_sha256"):
        return False, "it names another certificate than the one that signed"
    return True, f"signed by {result.signer} (certificate SHA-256 {result.fingerprint_sha256})"
