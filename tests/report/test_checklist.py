"""Writing the checklist files (supervisor.report.checklist)."""

from __future__ import annotations

import hashlib
import os
import shutil
from pathlib import Path
from typing import Any

import pytest

from supervisor.errors import InputError
from supervisor.report import keys
from supervisor.report.checklist import ChecklistFiles, make_checklist
from supervisor.report.verify import verify_file


def test_unsigned_checklist_files(check_result: dict[str, Any], plan_bytes: bytes,
                                  tmp_path: Path) -> None:
    files = make_checklist(check_result, plan_bytes, tmp_path / "out")
    assert files.pdf.name == "harbour-outfall-inspection-checklist.pdf"
    assert files.json.name == "harbour-outfall-inspection-checklist.json"
    assert files.signature is None and files.signer is None
    assert files.document_sha256 == hashlib.sha256(files.json.read_bytes()).hexdigest()
    assert files.pdf.read_bytes().startswith(b"%PDF-")
    assert sorted(p.name for p in files.pdf.parent.iterdir()) == [files.json.name, files.pdf.name]
    # an unsigned checklist may be regenerated; the result is byte-identical
    before = files.pdf.read_bytes()
    again = make_checklist(check_result, plan_bytes, tmp_path / "out")
    assert again.pdf.read_bytes() == before
    assert verify_file(files.pdf).status == "invalid"  # not signed


def test_signed_checklist_verifies(signed_checklist: ChecklistFiles, trusted: Any) -> None:
    assert signed_checklist.signature is not None
    assert signed_checklist.signature.name.endswith("-checklist.json.sig")
    for path in (signed_checklist.pdf, signed_checklist.json, signed_checklist.signature):
        result = verify_file(path, keyrings=trusted)
        assert result.status == "valid", result.reason
        assert result.signer == "Dana Whitcombe"
        assert result.document_sha256 == signed_checklist.document_sha256


def test_signed_checklist_is_never_replaced(signed_checklist: ChecklistFiles,
                                           check_result: dict[str, Any], plan_bytes: bytes,
                                           tmp_path: Path) -> None:
    out = tmp_path / "copy"
    shutil.copytree(signed_checklist.pdf.parent, out)
    before = {p.name: p.read_bytes() for p in out.iterdir()}
    with pytest.raises(InputError, match="signed checklist and is never replaced"):
        make_checklist(check_result, plan_bytes, out)
    assert {p.name: p.read_bytes() for p in out.iterdir()} == before


def test_expired_certificate_writes_nothing(check_result: dict[str, Any], plan_bytes: bytes,
                                            tmp_path: Path) -> None:
    import datetime as dt

    files = keys.new_identity("Old Key", tmp_path / "old.p12", "passphrase-1", valid_days=1,
                              now=dt.datetime(2020, 1, 1, tzinfo=dt.UTC))
    identity = keys.load_identity(files.key, "passphrase-1")
    out = tmp_path / "out"
    with pytest.raises(keys.KeyFileError, match="expired"):
        make_checklist(check_result, plan_bytes, out, identity=identity)
    assert list(out.iterdir()) == []


def test_failed_write_keeps_the_previous_checklist(check_result: dict[str, Any],
                                                   plan_bytes: bytes, tmp_path: Path,
                                                   monkeypatch: pytest.MonkeyPatch) -> None:
    files = make_checklist(check_result, plan_bytes, tmp_path)
    before = {p: p.read_bytes() for p in (files.pdf, files.json)}
    check_result["job"]["site"] = "changed site"

    def refuse(src: str, dst: object) -> None:
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", refuse)
    with pytest.raises(OSError, match="disk full"):
        make_checklist(check_result, plan_bytes, tmp_path)
    assert {p: p.read_bytes() for p in before} == before
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(p.name for p in before)


def test_out_must_be_a_usable_folder(check_result: dict[str, Any], plan_bytes: bytes,
                                     tmp_path: Path) -> None:
    a_file = tmp_path / "file"
    a_file.write_text("x")
    with pytest.raises(InputError, match="is a file"):
        make_checklist(check_result, plan_bytes, a_file)
    with pytest.raises(InputError, match="does not exist"):
        make_checklist(check_result, plan_bytes, tmp_path / "a" / "b")


def test_another_jobs_unsigned_checklist_with_the_same_file_name_is_refused(
        check_result: dict[str, Any], plan_bytes: bytes, tmp_path: Path) -> None:
    """Issue 13: "Pier 7 — Zoë" and "Pier 7: Zoe" give one file name; neither replaces the other."""
    check_result["job"]["title"] = "Pier 7 — Zoë"
    first = make_checklist(check_result, plan_bytes, tmp_path)
    before = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
    check_result["job"]["title"] = "Pier 7: Zoe"
    with pytest.raises(InputError, match="unsigned checklist of another job .'Pier 7 — Zoë'.") \
            as err:
        make_checklist(check_result, plan_bytes, tmp_path)
    assert err.value.field == "--out"
    assert {p.name: p.read_bytes() for p in tmp_path.iterdir()} == before
    # only the JSON left behind: still refused, by its recorded title
    first.pdf.unlink()
    with pytest.raises(InputError, match="another job"):
        make_checklist(check_result, plan_bytes, tmp_path)
    # the same job (same title) is regenerated
    check_result["job"]["title"] = "Pier 7 — Zoë"
    assert make_checklist(check_result, plan_bytes, tmp_path).pdf.exists()


@pytest.mark.parametrize("name", ["pdf", "json"])
def test_a_file_that_is_not_a_checklist_is_never_replaced(
        check_result: dict[str, Any], plan_bytes: bytes, tmp_path: Path, name: str) -> None:
    (tmp_path / f"harbour-outfall-inspection-checklist.{name}").write_bytes(b"my notes")
    with pytest.raises(InputError, match="is not a checklist .* so it is not replaced"):
        make_checklist(check_result, plan_bytes, tmp_path)
    assert [p.read_bytes() for p in tmp_path.iterdir()] == [b"my notes"]
