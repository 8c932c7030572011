"""The checklist record, its hash, file names and atomic writing (supervisor.report.document)."""

from __future__ import annotations

import hashlib
import json
import math
import os
import stat
from pathlib import Path
from typing import Any

import pytest

from supervisor.errors import InputError, SupervisorError
from supervisor.report import document


@pytest.mark.parametrize(
    ("title", "expected"),
    [
        ("Harbour outfall inspection", "harbour-outfall-inspection"),
        ("Pier 7 — Zoë's <b>job</b>", "pier-7-zoe-s-b-job-b"),
        ("../../etc/passwd", "etc-passwd"),
        ("Ærøskøbing ferry berth", "aeroskobing-ferry-berth"),
        ("Straße Łódź Đakovo", "strasse-lodz-dakovo"),
        ("Þórshöfn Œuvre Ålesund", "thorshofn-oeuvre-alesund"),
        ("CON", None),
        ("王芳", None),
        ("", None),
    ],
)
def test_job_slug_is_file_name_safe(title: str, expected: str | None) -> None:
    slug = document.job_slug(title)
    assert slug and all(c.isascii() and (c.isalnum() or c == "-") for c in slug)
    if expected is not None:
        assert slug == expected
    else:
        assert slug.startswith("job-")


def test_job_slug_keeps_distinct_non_latin_titles_apart() -> None:
    assert document.job_slug("王芳") != document.job_slug("李明")
    assert len(document.job_slug("x" * 500)) <= 60


def test_sanitize_removes_non_finite_numbers() -> None:
    assert document.sanitize({"a": math.nan, "b": [math.inf, 1.5], 3: (1, 2)}) == {
        "a": None, "b": [None, 1.5], "3": [1, 2]}


def test_record_holds_check_plan_text_and_checklist(check_result: dict[str, Any],
                                                    plan_bytes: bytes) -> None:
    record = document.build_record(check_result, plan_bytes)
    assert record["schema"] == "supervisor.check/1"
    assert record["plan_text"] == plan_bytes.decode()
    assert record["plan_sha256"] == hashlib.sha256(plan_bytes).hexdigest()
    modes = record["checklist"]["modes"]
    assert [m["mode"] for m in modes] == ["surface-supplied-air"]
    assert modes[0]["dives"] == ["D1"] and modes[0]["mode_as_given"] == ["ss_air"]
    assert record["checklist"]["cautions"][-1] == "Demo job: all names and numbers are fictional."


def test_record_bytes_are_deterministic_and_hash_is_file_sha256(
        check_result: dict[str, Any], plan_bytes: bytes, tmp_path: Path) -> None:
    data = document.record_bytes(document.build_record(check_result, plan_bytes))
    again = document.record_bytes(document.build_record(dict(reversed(check_result.items())),
                                                        plan_bytes))
    assert data == again and data.endswith(b"\n")
    path = tmp_path / "x.json"
    path.write_bytes(data)
    assert document.document_sha256(data) == hashlib.sha256(path.read_bytes()).hexdigest()
    assert json.loads(data)["job"]["title"] == "Harbour outfall inspection"


def test_plan_changed_during_check_is_refused(check_result: dict[str, Any]) -> None:
    with pytest.raises(InputError, match="changed while it was being checked"):
        document.build_record(check_result, b"# another plan\n")


def test_plan_not_utf8_is_refused(check_result: dict[str, Any]) -> None:
    check_result["plan_sha256"] = None
    with pytest.raises(InputError, match="UTF-8"):
        document.build_record(check_result, b"\xff\xfe title")


def test_wrong_schema_is_refused(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    check_result["schema"] = "supervisor.check/0"
    with pytest.raises(SupervisorError, match="supervisor.check/1"):
        document.build_record(check_result, plan_bytes)


def test_no_dives_gives_every_item(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    check_result["dives"] = []
    modes = document.build_record(check_result, plan_bytes)["checklist"]["modes"]
    assert len(modes) == 1 and modes[0]["mode"] is None and len(modes[0]["items"]) > 20


def test_output_paths() -> None:
    paths = document.output_paths(Path("out"), "job")
    assert paths == {"pdf": Path("out/job-checklist.pdf"), "json": Path("out/job-checklist.json"),
                     "sig": Path("out/job-checklist.json.sig")}


def test_write_atomically_writes_all_with_modes(tmp_path: Path) -> None:
    a, b = tmp_path / "a", tmp_path / "b"
    document.write_atomically([(a, b"one", 0o600), (b, b"two", None)])
    assert a.read_bytes() == b"one" and b.read_bytes() == b"two"
    assert stat.S_IMODE(a.stat().st_mode) == 0o600
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a", "b"]


def test_write_atomically_changes_nothing_when_a_write_fails(tmp_path: Path) -> None:
    old = tmp_path / "old.json"
    old.write_bytes(b"previous")
    with pytest.raises(OSError):
        document.write_atomically([(old, b"new", None), (tmp_path / "missing" / "x", b"", None)])
    assert old.read_bytes() == b"previous"
    assert [p.name for p in tmp_path.iterdir()] == ["old.json"]


def test_write_atomically_cleans_up_when_rename_fails(tmp_path: Path,
                                                      monkeypatch: pytest.MonkeyPatch) -> None:
    old = tmp_path / "old.pdf"
    old.write_bytes(b"previous")

    def refuse(src: str, dst: object) -> None:
        raise OSError("disk gone")

    monkeypatch.setattr(os, "replace", refuse)
    with pytest.raises(OSError, match="disk gone"):
        document.write_atomically([(old, b"new", None)])
    assert old.read_bytes() == b"previous"
    assert [p.name for p in tmp_path.iterdir()] == ["old.pdf"]


def test_cautions_are_printed_once(check_result: dict[str, Any], plan_bytes: bytes) -> None:
    """A check caution that a bundled caution covers, or repeats in other case, is not added."""
    from supervisor.check import CAUTIONS

    check_result["cautions"] = [*CAUTIONS, "Demo job: all names and numbers are fictional.",
                                "DEMO JOB:  all names and numbers are fictional."]
    cautions = document.build_record(check_result, plan_bytes)["checklist"]["cautions"]
    assert not set(CAUTIONS) & set(cautions)
    assert cautions.count("Demo job: all names and numbers are fictional.") == 1
    assert len(cautions) == len(set(c.casefold() for c in cautions)) == 7
