"""Checking signed checklists: any changed byte fails (supervisor.report.verify)."""

from __future__ import annotations

import json
import re
import shutil
from pathlib import Path
from typing import Any

import pytest
from asn1crypto import algos, cms
from cryptography import x509

from supervisor.report import keys
from supervisor.report.checklist import ChecklistFiles, make_checklist
from supervisor.report.document import record_bytes
from supervisor.report.signing import sign_detached
from supervisor.report.verify import load_expected_certificate, verify_file


@pytest.fixture()
def copy(signed_checklist: ChecklistFiles, tmp_path: Path) -> dict[str, Path]:
    """A private copy of the signed checklist files."""
    out = {}
    for key, path in (("pdf", signed_checklist.pdf), ("json", signed_checklist.json),
                      ("sig", signed_checklist.signature)):
        assert path is not None
        out[key] = Path(shutil.copy(path, tmp_path / path.name))
    return out


def _flip(data: bytes, pos: int) -> bytes:
    """Change one byte; a hex digit stays a hex digit, so only the value changes."""
    digits = b"0123456789ABCDEF"
    byte = data[pos]
    new = digits[(digits.index(byte) + 1) % 16] if byte in digits else byte ^ 0x01
    return data[:pos] + bytes([new]) + data[pos + 1:]


def _layout(pdf: bytes) -> dict[str, int]:
    """Where the parts of a signed PDF are: original, signature gap, appended update."""
    a, b, c, d = (int(x) for x in re.findall(rb"/ByteRange\s*\[\s*(\d+)\s+(\d+)\s+(\d+)\s+(\d+)",
                                             pdf)[0])
    original_end = pdf.index(b"%%EOF") + 5
    der_digits = re.match(rb"<([0-9A-F]*?)(0*)>", pdf[b:c])
    assert der_digits is not None
    return {"gap_start": b, "gap_end": c, "original_end": original_end,
            "der_end": b + 1 + len(der_digits.group(1))}


def test_valid_pdf_reports_signer_time_trust_and_verdict(copy: dict[str, Path],
                                                          trusted: Any) -> None:
    result = verify_file(copy["pdf"], keyrings=trusted)
    assert result.status == "valid" and result.exit_code == 0
    assert result.signer == "Dana Whitcombe" and result.self_signed is True
    assert result.signed_at is not None and result.job_title == "Harbour outfall inspection"
    assert result.plan_supervisor == "Dana Whitcombe"
    # the fixture check: 1 fail, 2 warn, 1 info, 1 pass, does not conform
    assert result.verdict == "does-not-conform"
    assert result.counts == {"fail": 1, "warn": 2, "info": 1, "pass": 1}
    lines = result.lines()
    assert lines[0].startswith("VALID: ")
    assert lines[0].endswith("; checklist verdict DOES NOT CONFORM")
    text = "\n".join(lines)
    assert f"trusted: in the company keyring {trusted[0].path}" in text
    assert "checklist:        DOES NOT CONFORM (1 fail, 2 warn, 1 info, 1 pass)" in text
    assert "the plan does NOT conform; a valid signature records who signed it" in text
    assert "NOT the signer" not in text


def test_json_reports_the_recomputed_verdict(copy: dict[str, Path], trusted: Any) -> None:
    result = verify_file(copy["json"], keyrings=trusted)
    assert result.status == "valid"
    assert result.verdict == "does-not-conform"
    assert result.counts == {"fail": 1, "warn": 2, "info": 1, "pass": 1}


def test_intact_signature_without_trust_is_untrusted_exit_3(copy: dict[str, Path]) -> None:
    for path in (copy["pdf"], copy["json"]):
        result = verify_file(path)
        assert result.status == "untrusted" and result.exit_code == 3
        lines = result.lines()
        assert lines[0].startswith("UNTRUSTED SIGNER: ")
        assert "NOT an approval" in lines[0]
        assert any("supervisor keys trust CERT" in line for line in lines)


@pytest.mark.parametrize(
    "where",
    ["start", "header", "original-body", "original-end", "appended-before-gap", "gap-der-first",
     "gap-der-middle", "gap-padding", "gap-case", "appended-after-gap", "last-byte"],
)
def test_any_changed_pdf_byte_fails(copy: dict[str, Path], where: str) -> None:
    pdf = copy["pdf"].read_bytes()
    lay = _layout(pdf)
    if where == "gap-case":
        pos = next(i for i in range(lay["gap_start"] + 1, lay["der_end"]) if pdf[i] in b"ABCDEF")
        changed = pdf[:pos] + pdf[pos:pos + 1].lower() + pdf[pos + 1:]
    else:
        pos = {
            "start": 0,
            "header": 5,
            "original-body": lay["original_end"] // 2,
            "original-end": lay["original_end"] - 2,
            "appended-before-gap": lay["gap_start"] - 20,
            "gap-der-first": lay["gap_start"] + 1,
            "gap-der-middle": (lay["gap_start"] + lay["der_end"]) // 2,
            "gap-padding": lay["gap_end"] - 3,
            "appended-after-gap": lay["gap_end"] + 30,
            "last-byte": len(pdf) - 2,
        }[where]
        changed = _flip(pdf, pos)
    assert changed != pdf and len(changed) == len(pdf)
    copy["pdf"].write_bytes(changed)
    result = verify_file(copy["pdf"])
    assert result.status == "invalid" and result.exit_code == 1, (where, result.reason)


@pytest.mark.parametrize("change", ["append", "truncate", "insert"])
def test_added_or_removed_pdf_bytes_fail(copy: dict[str, Path], change: str) -> None:
    pdf = copy["pdf"].read_bytes()
    changed = {"append": pdf + b"%extra\n", "truncate": pdf[:-10],
               "insert": pdf[:200] + b" " + pdf[200:]}[change]
    copy["pdf"].write_bytes(changed)
    assert verify_file(copy["pdf"]).status == "invalid"


@pytest.mark.parametrize("where", [0, 1, "middle", -2, -1])
def test_any_changed_json_byte_fails(copy: dict[str, Path], where: int | str) -> None:
    data = copy["json"].read_bytes()
    pos = len(data) // 2 if where == "middle" else int(where) % len(data)
    copy["json"].write_bytes(_flip(data, pos))
    result = verify_file(copy["json"])
    assert result.status == "invalid" and "changed after signing" in result.reason


def test_json_number_change_that_stays_valid_json_fails(copy: dict[str, Path]) -> None:
    data = copy["json"].read_bytes()
    changed = data.replace(b'"cns_percent": 23.7', b'"cns_percent": 13.7')
    assert changed != data
    copy["json"].write_bytes(changed)
    assert verify_file(copy["json"]).status == "invalid"


@pytest.mark.parametrize("where", [0, 10, "middle", -1])
def test_any_changed_signature_byte_fails(copy: dict[str, Path], where: int | str) -> None:
    sig = copy["sig"].read_bytes()
    pos = len(sig) // 2 if where == "middle" else int(where) % len(sig)
    copy["sig"].write_bytes(sig[:pos] + bytes([sig[pos] ^ 0x01]) + sig[pos + 1:])
    assert verify_file(copy["json"]).status == "invalid"


@pytest.mark.parametrize("field", ["signed-data-version", "signer-version", "digest-algorithms"])
def test_unsigned_cms_fields_are_checked(copy: dict[str, Path], field: str) -> None:
    info = cms.ContentInfo.load(copy["sig"].read_bytes())
    signed = info["content"]
    if field == "signed-data-version":
        signed["version"] = "v3"
    elif field == "signer-version":
        signed["signer_infos"][0]["version"] = "v3"
    else:
        signed["digest_algorithms"] = [algos.DigestAlgorithm({"algorithm": "sha256"}),
                                       algos.DigestAlgorithm({"algorithm": "sha512"})]
    copy["sig"].write_bytes(info.dump(force=True))
    result = verify_file(copy["json"])
    assert result.status == "invalid" and "was changed" in result.reason


def test_json_without_signature_is_not_valid(copy: dict[str, Path]) -> None:
    copy["sig"].unlink()
    result = verify_file(copy["json"])
    assert result.status == "invalid" and "not signed" in result.reason


def test_signature_file_path_checks_its_json(copy: dict[str, Path], trusted: Any) -> None:
    assert verify_file(copy["sig"], keyrings=trusted).status == "valid"


def test_required_certificate(copy: dict[str, Path], identity_files: tuple[Path, str],
                              tmp_path: Path) -> None:
    own = load_expected_certificate(keys.certificate_path(identity_files[0]))
    result = verify_file(copy["pdf"], expected=own)
    assert result.status == "valid"  # --cert is a one-off trust, no keyring needed
    assert "the certificate given with --cert" in "\n".join(result.lines())
    other = keys.new_identity("Dana Whitcombe", tmp_path / "other.p12", "other-passphrase")
    stranger = x509.load_pem_x509_certificate(other.certificate.read_bytes())
    result = verify_file(copy["json"], expected=stranger)
    assert result.status == "invalid" and "different certificate" in result.reason


def test_altered_json_re_signed_by_someone_else_is_not_approval(
        copy: dict[str, Path], identity_files: tuple[Path, str], tmp_path: Path,
        trusted: Any) -> None:
    """An altered record re-signed with another key (same printed name) is untrusted."""
    other = keys.new_identity("Dana Whitcombe", tmp_path / "x.p12", "other-passphrase")
    forger = keys.load_identity(other.key, "other-passphrase")
    record = json.loads(copy["json"].read_bytes())
    record["verdict"] = "conforms"
    record["findings"] = [f for f in record["findings"] if f["severity"] == "pass"]
    copy["json"].write_bytes(record_bytes(record))
    copy["sig"].write_bytes(sign_detached(copy["json"].read_bytes(), forger))
    result = verify_file(copy["json"], keyrings=trusted)
    original = keys.load_identity(*identity_files)
    assert result.status == "untrusted" and result.exit_code == 3
    assert result.fingerprint_sha256 == forger.fingerprint_sha256
    assert result.fingerprint_sha256 != original.fingerprint_sha256
    assert not result.lines()[0].startswith("VALID")


def test_altered_pdf_re_signed_by_someone_else_is_not_approval(
        check_result: dict[str, Any], plan_bytes: bytes, tmp_path: Path,
        trusted: Any) -> None:
    """A checklist made again with the verdict "conforms" and signed by a stranger."""
    other = keys.new_identity("Dana Whitcombe", tmp_path / "y.p12", "other-passphrase")
    forger = keys.load_identity(other.key, "other-passphrase")
    check_result["verdict"] = "conforms"
    check_result["findings"] = [f for f in check_result["findings"] if f["severity"] == "pass"]
    files = make_checklist(check_result, plan_bytes, tmp_path / "forged", identity=forger)
    result = verify_file(files.pdf, keyrings=trusted)
    assert result.status == "untrusted" and result.exit_code == 3
    assert result.verdict == "conforms"  # what the forged page says, reported as untrusted


@pytest.mark.parametrize("title", ["Survey /ByteRange [0 10 20 30] check",
                                   "/ByteRange [0 1 2 3] /ByteRange [4 5 6 7]",
                                   "/Type /Sig /Contents <00ff> /ByteRange [0 99 99 0]"])
def test_title_with_signature_syntax_signs_and_verifies(
        check_result: dict[str, Any], plan_bytes: bytes, tmp_path: Path,
        identity_files: tuple[Path, str], trusted: Any, title: str) -> None:
    """Issue 13 reproducer: signatures are read from the PDF's structure, not its bytes."""
    check_result["job"]["title"] = title
    unsigned = make_checklist(check_result, plan_bytes, tmp_path / "u")
    assert verify_file(unsigned.pdf).reason == "the PDF carries no digital signature"
    # the unsigned checklist is not taken for a signed one: it can be regenerated
    again = make_checklist(check_result, plan_bytes, tmp_path / "u")
    assert again.pdf.read_bytes() == unsigned.pdf.read_bytes()
    identity = keys.load_identity(*identity_files)
    signed = make_checklist(check_result, plan_bytes, tmp_path / "s", identity=identity)
    for path in (signed.pdf, signed.json):
        result = verify_file(path, keyrings=trusted)
        assert result.status == "valid", result.reason
        assert result.job_title == title


def test_unreadable_files(tmp_path: Path) -> None:
    assert verify_file(tmp_path / "missing.pdf").status == "unreadable"
    text = tmp_path / "notes.txt"
    text.write_text("hello")
    assert verify_file(text).status == "unreadable"
    assert verify_file(tmp_path).exit_code == 2
    plain = tmp_path / "x.pdf"
    plain.write_text("not a pdf")
    assert verify_file(plain).status == "unreadable"


def test_expected_certificate_errors(tmp_path: Path) -> None:
    from supervisor.errors import InputError

    with pytest.raises(InputError, match="cannot read"):
        load_expected_certificate(tmp_path / "none.pem")
    bad = tmp_path / "bad.pem"
    bad.write_text("-----BEGIN CERTIFICATE-----\nnope\n-----END CERTIFICATE-----\n")
    with pytest.raises(InputError, match="no X.509 certificate"):
        load_expected_certificate(bad)
