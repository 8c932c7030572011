"""Keyrings of trusted supervisor certificates (supervisor.report.keyring)."""

from __future__ import annotations

import datetime as dt
import os
import stat
from pathlib import Path

import pytest
from cryptography import x509

from supervisor.errors import InputError
from supervisor.report import keyring, keys

PASS = "correct horse battery"


def _cert(tmp_path: Path, name: str) -> x509.Certificate:
    files = keys.new_identity(name, tmp_path / f"{name.split()[0].lower()}.p12", PASS)
    return keyring.load_certificate(files.certificate, field="CERT")


def _ring(path: Path, *, must_exist: bool = False) -> keyring.Keyring:
    return keyring.load_keyring(path, label="company keyring", field="--keyring",
                                must_exist=must_exist)


def test_user_keyring_location_follows_xdg_config_home(tmp_path: Path) -> None:
    assert keyring.user_keyring_path({"XDG_CONFIG_HOME": str(tmp_path)}) == \
        tmp_path / "supervisor" / "trusted-signers.toml"
    # a relative XDG_CONFIG_HOME is ignored, as the XDG base-directory specification says
    assert keyring.user_keyring_path({"XDG_CONFIG_HOME": "rel"}) == \
        Path.home() / ".config" / "supervisor" / "trusted-signers.toml"
    assert keyring.user_keyring_path({}) == \
        Path.home() / ".config" / "supervisor" / "trusted-signers.toml"


def test_company_keyring_from_option_then_environment(tmp_path: Path) -> None:
    env = {keyring.COMPANY_ENV: str(tmp_path / "env.toml")}
    assert keyring.company_keyring_path(tmp_path / "opt.toml", env) == \
        (tmp_path / "opt.toml", "--keyring")
    assert keyring.company_keyring_path(None, env) == (tmp_path / "env.toml", keyring.COMPANY_ENV)
    assert keyring.company_keyring_path(None, {}) is None


def test_trust_find_list_and_remove(tmp_path: Path) -> None:
    mara, other = _cert(tmp_path, "Mara Okonjo"), _cert(tmp_path, "Ivo Strand")
    path = tmp_path / "ring.toml"
    empty = _ring(path)
    assert not empty.exists and empty.signers == () and empty.find(mara) is None
    entry, added = keyring.trust(empty, mara, now=dt.datetime(2026, 6, 1, 8, 30, tzinfo=dt.UTC))
    assert added and entry.name == "Mara Okonjo"
    assert entry.added_on == "2026-06-01T08:30:00Z"
    ring = _ring(path, must_exist=True)
    assert ring.find(mara) == entry and ring.find(other) is None
    again, added = keyring.trust(ring, mara)
    assert not added and again == entry  # idempotent
    keyring.trust(ring, other)
    ring = _ring(path)
    assert [s.name for s in ring.signers] == ["Mara Okonjo", "Ivo Strand"]
    picked = keyring.select(ring, entry.fingerprint_sha256[:11], None)  # "AB:CD:EF:01" prefix
    assert picked == entry
    keyring.remove(ring, picked)
    assert [s.name for s in _ring(path).signers] == ["Ivo Strand"]


def test_select_errors(tmp_path: Path) -> None:
    ring = _ring(tmp_path / "ring.toml")
    mara = _cert(tmp_path, "Mara Okonjo")
    with pytest.raises(InputError, match="at least its first 8 hex digits"):
        keyring.select(ring, "AB:CD", None)
    with pytest.raises(InputError, match="no certificate with fingerprint"):
        keyring.select(ring, "ABCDEF0123", None)
    with pytest.raises(InputError, match="is not in the company keyring"):
        keyring.select(ring, "mara.cert.pem", mara)


@pytest.mark.parametrize(
    ("text", "match"),
    [("schema = 'other/1'\n", "is not a keyring"),
     ("not toml = = =\n", "is not a TOML keyring"),
     ("schema = 'supervisor-keyring/1'\nsigners = 3\n", "array of tables"),
     ("schema = 'supervisor-keyring/1'\n[[signers]]\nname = 'x'\n", "certificate is missing"),
     ("schema = 'supervisor-keyring/1'\n[[signers]]\ncertificate = 'junk'\n",
      "not a PEM certificate")],
)
def test_malformed_keyrings_are_one_clear_error(tmp_path: Path, text: str, match: str) -> None:
    path = tmp_path / "ring.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(InputError, match=match) as err:
        _ring(path)
    assert err.value.field == "--keyring"


def test_hand_edited_fingerprint_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "ring.toml"
    keyring.trust(_ring(path), _cert(tmp_path, "Mara Okonjo"))
    text = path.read_text(encoding="utf-8")
    start = text.index('fingerprint_sha256 = "') + len('fingerprint_sha256 = "')
    flipped = "0" if text[start] != "0" else "1"
    path.write_text(text[:start] + flipped + text[start + 1:], encoding="utf-8")
    with pytest.raises(InputError, match="does not match its certificate"):
        _ring(path)


def test_missing_keyring(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="does not exist"):
        _ring(tmp_path / "none.toml", must_exist=True)
    with pytest.raises(InputError, match="folder .* does not exist"):
        keyring.trust(_ring(tmp_path / "no" / "ring.toml"), _cert(tmp_path, "Mara Okonjo"))


def test_per_user_keyring_folder_is_created_private(tmp_path: Path) -> None:
    path = keyring.user_keyring_path({"XDG_CONFIG_HOME": str(tmp_path / "cfg")})
    ring = keyring.load_keyring(path, label="per-user keyring", field="keyring",
                                must_exist=False)
    keyring.trust(ring, _cert(tmp_path, "Mara Okonjo"))
    assert stat.S_IMODE(path.parent.stat().st_mode) == 0o700
    assert path.read_text(encoding="utf-8").count("BEGIN CERTIFICATE") == 1


def test_a_certificate_file_is_required(tmp_path: Path) -> None:
    files = keys.new_identity("Mara Okonjo", tmp_path / "m.p12", PASS)
    with pytest.raises(InputError, match="looks like a key file"):
        keyring.load_certificate(files.key, field="CERT")
    with pytest.raises(InputError, match="cannot read"):
        keyring.load_certificate(tmp_path / "none.pem", field="CERT")


def test_loose_permissions(tmp_path: Path) -> None:
    key = tmp_path / "k.p12"
    key.write_bytes(b"x")
    os.chmod(key, 0o600)
    assert keyring.loose_permissions(key) is None
    os.chmod(key, 0o644)
    assert "readable by other users (mode 0644)" in str(keyring.loose_permissions(key))
    ring = tmp_path / "ring.toml"
    ring.write_text("x")
    os.chmod(ring, 0o644)
    assert keyring.loose_permissions(ring) is None  # a keyring may be read by all ...
    os.chmod(ring, 0o666)
    assert "writable by other users" in str(keyring.loose_permissions(ring))  # ... not written
    assert keyring.loose_permissions(tmp_path / "none.p12") is None
