"""``supervisor plan validate`` and ``supervisor plan schema`` (project logic)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from supervisor.cli import main

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = ROOT / "examples"


def run(args: list[str], capsys) -> tuple[int, str, str]:
    with pytest.raises(SystemExit) as exc:
        main(args)
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


@pytest.mark.parametrize("name", ["demo-job.toml", "nonconforming-job.toml",
                                  "demo-job-msw.toml"])
def test_examples_validate(capsys, name):
    code, out, err = run(["plan", "validate", str(EXAMPLES / name)], capsys)
    assert code == 0, err
    assert out.startswith(f"ok: {EXAMPLES / name}: ")


def test_validate_reports_every_problem(capsys, tmp_path):
    text = (EXAMPLES / "demo-job.toml").read_text(encoding="utf-8")
    text = text.replace("max_depth = 110", "max_depth = -110").replace(
        'mode = "surface-supplied-air"\ngas = "air"\nmax_depth = 40',
        'mode = "surface-supplied-air"\ngas = "nitrox32"\nmax_depth = 40')
    p = tmp_path / "p.toml"
    p.write_text(text, encoding="utf-8")
    code, out, err = run(["plan", "validate", str(p)], capsys)
    assert code == 2 and out == ""
    assert err.splitlines() == [
        "error: dives[1].max_depth: got -110; expected a depth >= 0 fsw",
        "error: dives[2].gas: got 'nitrox32'; expected air for mode surface-supplied-air",
    ]


def test_validate_unreadable(capsys, tmp_path):
    code, _, err = run(["plan", "validate", str(tmp_path)], capsys)
    assert code == 2
    assert err == f"error: plan: {tmp_path}: is a folder; expected a TOML file\n"


def test_schema_to_stdout(capsys):
    code, out, _ = run(["plan", "schema"], capsys)
    assert code == 0
    s = json.loads(out)
    assert s["title"] == "supervisor-plan/1"
    assert s["additionalProperties"] is False


def test_schema_to_file(capsys, tmp_path):
    target = tmp_path / "plan.schema.json"
    code, out, _ = run(["plan", "schema", "--out", str(target)], capsys)
    assert code == 0
    assert out == f"wrote {target}\n"
    assert json.loads(target.read_text(encoding="utf-8"))["properties"]["unit"]["enum"] == [
        "fsw", "msw"]


def test_schema_unwritable(capsys, tmp_path):
    code, _, err = run(["plan", "schema", "--out", str(tmp_path / "no" / "x.json")], capsys)
    assert code == 2
    assert err.startswith("error: --out: cannot write ")


def test_schema_refuses_an_existing_file(capsys, tmp_path):
    target = tmp_path / "plan.schema.json"
    target.write_text("keep me\n", encoding="utf-8")
    code, out, err = run(["plan", "schema", "--out", str(target)], capsys)
    assert code == 2 and out == ""
    assert err == f"error: --out: {target} exists; give --force to replace it\n"
    assert target.read_text(encoding="utf-8") == "keep me\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.schema.json"]  # no temp left


def test_schema_force_replaces(capsys, tmp_path):
    target = tmp_path / "plan.schema.json"
    target.write_text("old\n", encoding="utf-8")
    code, out, _ = run(["plan", "schema", "--out", str(target), "--force"], capsys)
    assert code == 0 and out == f"wrote {target}\n"
    assert json.loads(target.read_text(encoding="utf-8"))["title"] == "supervisor-plan/1"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.schema.json"]


def test_schema_out_is_a_folder(capsys, tmp_path):
    code, _, err = run(["plan", "schema", "--out", str(tmp_path), "--force"], capsys)
    assert code == 2
    assert err == f"error: --out: {tmp_path} is a folder; expected a file path\n"


def test_validate_bottom_time_shorter_than_descent_and_unknown_table(capsys, tmp_path):
    text = (EXAMPLES / "demo-job.toml").read_text(encoding="utf-8")
    text = text.replace("bottom_time_min = 40", "bottom_time_min = 0.5").replace(
        'reference_table = "zhl16c-gf30-85-air-fsw"', 'reference_table = "navy-air"')
    p = tmp_path / "p.toml"
    p.write_text(text, encoding="utf-8")
    code, out, err = run(["plan", "validate", str(p)], capsys)
    assert code == 2 and out == ""
    lines = err.splitlines()
    assert len(lines) == 2
    assert lines[0].startswith("error: policy.reference_table: got 'navy-air': no bundled table")
    # D2: 110 fsw at 75 fsw/min = 1.467 min of descent (shown rounded up)
    assert lines[1] == ("error: dives[1].bottom_time_min: got 0.5 min; expected at least the "
                        "descent time 1.47 min (110 fsw at 75 fsw/min): the bottom time counts "
                        "from leaving the surface")
