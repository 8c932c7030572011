"""``supervisor log read`` (nothing stored) on the demo logs of ``examples/``."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from supervisor.cli import main

EX = Path(__file__).resolve().parents[2] / "examples"


def run(args: list[str], capsys) -> tuple[int, str, str]:
    with pytest.raises(SystemExit) as exc:
        main(args)
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


def test_read_timed_log(capsys) -> None:
    code, out, _ = run(["log", "read", str(EX / "logs" / "demo-d2-log.toml")], capsys)
    assert code == 0
    assert "max depth 110 fsw" in out and "bottom time: 40.0 min" in out
    assert out.rstrip().endswith("nothing stored; 'supervisor records add dive LOG ...' "
                                 "records it")


def test_read_recorder_csv_json(capsys) -> None:
    code, out, _ = run(["log", "read", str(EX / "logs" / "demo-d1-recorder.csv"), "--json"], capsys)
    doc = json.loads(out)
    assert code == 0 and doc["profile"]["unit"] == "fsw"
    assert {i["kind"] for i in doc["log"]["issues"]} == {"gap", "duplicate"}


def test_unknown_suffix_and_bad_unit(capsys, tmp_path: Path) -> None:
    p = tmp_path / "log.dat"
    p.write_text("x")
    code, _out, err = run(["log", "read", str(p)], capsys)
    assert code == 2 and "--format" in err
    code, _out, err = run(["log", "read", str(EX / "logs" / "demo-d1-recorder.csv"), "--depth-unit",
                           "yards"], capsys)
    assert code == 2 and err.startswith("error: --depth-unit: ")
