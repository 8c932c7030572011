"""A supervisor's signature on a record: made with ``supervisor keys new`` keys, checked.

The signature is a detached CMS SignedData (RFC 5652) over the record's header
text; its messageDigest attribute is then the SHA-256 of that text, which is
the record hash (checked with ``asn1crypto``, a general-purpose library).
"""

from __future__ import annotations

import base64

import pytest
from asn1crypto import cms

from supervisor.records.signing import check_signature, signature_record
from supervisor.records.store import NewRecord, RecordStore
from supervisor.report.keys import load_identity, new_identity

PASS = "test-passphrase-1"


@pytest.fixture(scope="module")
def identity(tmp_path_factory: pytest.TempPathFactory):
    path = tmp_path_factory.mktemp("keys") / "ada.p12"
    new_identity("Ada Fenwick (fictional)", path, PASS)
    return load_identity(path, PASS)


def test_signature_covers_the_record_hash(store: RecordStore, identity) -> None:
    dive = store.append(NewRecord("dive", {"dive": "D1"}, diver="Ada Fenwick"))
    sig = store.append(signature_record(dive, identity))
    assert sig.refers_to == dive.seq and sig.kind == "signature"
    der = base64.b64decode(sig.body["cms_der_base64"])
    info = cms.ContentInfo.load(der)
    attrs = info["content"]["signer_infos"][0]["signed_attrs"]
    digest = next(a["values"][0].native for a in attrs if a["type"].native == "message_digest")
    assert digest.hex() == dive.record_hash
    ok, why = check_signature(sig, dive)
    assert ok, why
    assert "Ada Fenwick" in why
    assert store.verify().intact


def test_signature_on_another_record_does_not_verify(store: RecordStore, identity) -> None:
    a = store.append(NewRecord("dive", {"dive": "D1"}))
    b = store.append(NewRecord("dive", {"dive": "D2"}))
    sig = store.append(signature_record(a, identity))
    ok, why = check_signature(sig, b)
    assert not ok and "another hash" in why


def test_damaged_signature_does_not_verify(store: RecordStore, identity) -> None:
    a = store.append(NewRecord("dive", {"dive": "D1"}))
    sig = store.append(signature_record(a, identity))
    der = bytearray(base64.b64decode(sig.body["cms_der_base64"]))
    der[-5] ^= 0x01  # one bit of the signature value
    forged = type(sig)(**{**sig.columns(), "body": {
        **sig.body, "cms_der_base64": base64.b64encode(bytes(der)).decode()}})
    ok, _why = check_signature(forged, a)
    assert not ok


def test_signatures_and_tombstones_are_not_signed(store: RecordStore, identity) -> None:
    from supervisor.errors import InputError

    a = store.append(NewRecord("dive", {}))
    sig = store.append(signature_record(a, identity))
    with pytest.raises(InputError, match="sign the record itself"):
        signature_record(sig, identity)

