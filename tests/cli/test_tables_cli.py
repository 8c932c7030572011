"""`supervisor tables ...`: exit codes, stdout and stderr, and nothing changed on failure.

Exit status (documented in supervisor/cli/tables.py and tables/README.md): validate 0 valid,
1 fails validation, 2 unreadable; verify and import 0 done, 1 invalid table, 2 bad input.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest
from typer.testing import CliRunner

from supervisor.cli import app
from supervisor.references.canonical import dumps_table

DATA = Path(__file__).resolve().parent.parent / "data"
runner = CliRunner()


def _copy(tmp_path: Path, kind: str) -> Path:
    src = DATA / f"tables_fictional_{kind}.toml"
    dst = tmp_path / src.name
    dst.write_bytes(src.read_bytes())
    return dst


def _run(*args: str):
    return runner.invoke(app, ["tables", *args])


def test_list_shows_bundled_tables():
    res = _run("list")
    assert res.exit_code == 0, res.output
    line = next(x for x in res.stdout.splitlines() if x.startswith("usn-rev7-air-ndl"))
    assert "no-stop" in line and "FROM MEMORY" in line and line.endswith("0/24")
    js = json.loads(_run("list", "--json").stdout)
    assert js["schema"] == "supervisor.tables-list/1"
    names = {t["name"] for t in js["tables"]}
    assert {"usn-rev7-air-ndl", "zhl16c-gf30-85-air-fsw", "zhl16c-gf30-85-air-msw"} <= names


def test_show_bundled_and_unknown():
    res = _run("show", "usn-rev7-air-ndl")
    assert res.exit_code == 0
    assert "FROM MEMORY; 0 of 24 rows verified" in res.stdout
    assert "unlimited" in res.stdout and "1102 min" in res.stdout
    res = _run("show", "no-such-table")
    assert res.exit_code == 2 and "no bundled table named" in res.stderr


def test_show_decompression_file(tmp_path):
    res = _run("show", str(_copy(tmp_path, "decompression")))
    assert res.exit_code == 0
    assert "20:3 10:8 oxygen" in res.stdout and "+1.5 ch-O2" in res.stdout and "EE" in res.stdout


def test_validate_exit_codes(tmp_path):
    good = _copy(tmp_path, "no_stop")
    res = _run("validate", str(good))
    assert res.exit_code == 0 and "valid (0 warning(s))" in res.stdout
    doc = tomllib.loads(good.read_text("utf-8"))
    doc["rows"][4]["no_stop_limit"] = 80
    good.write_text(dumps_table(doc), "utf-8")
    res = _run("validate", str(good))
    assert res.exit_code == 1
    assert "error: row 5 (60 fsw), column no_stop_limit:" in res.stdout
    js = json.loads(_run("validate", str(good), "--json").stdout)
    assert js["valid"] is False and js["issues"][0]["row"] == 5
    bad = tmp_path / "broken.toml"
    bad.write_text("schema = ", "utf-8")
    res = _run("validate", str(bad))
    assert res.exit_code == 2 and "not valid TOML" in res.stderr and res.stdout == ""
    res = _run("validate", str(tmp_path / "missing.toml"))
    assert res.exit_code == 2 and "cannot read" in res.stderr


def test_validate_without_provenance_fails(tmp_path):
    p = _copy(tmp_path, "no_stop")
    doc = tomllib.loads(p.read_text("utf-8"))
    del doc["provenance"]
    p.write_text(dumps_table(doc), "utf-8")
    res = _run("validate", str(p))
    assert res.exit_code == 1 and "no [provenance] table" in res.stdout


def test_verify_success_and_refusals(tmp_path):
    p = _copy(tmp_path, "decompression")
    before = p.read_bytes()
    res = _run("verify", str(p), "--rows", "9", "--by", "Second Checker", "--method", "read")
    assert res.exit_code == 2 and "--rows: row 9 does not exist" in res.stderr
    res = _run("verify", str(p), "--rows", "all", "--by", "Test Author", "--method", "read")
    assert res.exit_code == 2 and "second person" in res.stderr
    assert p.read_bytes() == before
    res = _run("verify", str(p), "--rows", "@60/40,4", "--by", "Second Checker",
               "--method", "read aloud", "--on", "2026-12-01")
    assert res.exit_code == 0, res.output
    assert "recorded check by Second Checker of 2 row(s)" in res.stdout
    listing = _run("show", str(p)).stdout
    assert listing.count("VERIFIED, verified") == 2


def test_verify_invalid_table_exit_1_unchanged(tmp_path):
    p = _copy(tmp_path, "decompression")
    p.write_text(p.read_text("utf-8").replace("total_ascent = 7\n", "total_ascent = 12\n"),
                 "utf-8")
    before = p.read_bytes()
    res = _run("verify", str(p), "--rows", "all", "--by", "Second Checker", "--method", "read")
    assert res.exit_code == 1 and "fails validation; nothing recorded" in res.stderr
    assert "row 1" in res.stderr and p.read_bytes() == before


def test_import_cli(tmp_path):
    csv = tmp_path / "acme-ndl.csv"
    csv.write_text("depth,no_stop_limit\n20,unlimited\n30,200\n", "utf-8")
    res = _run("import", str(csv), "--kind", "no-stop", "--source", "ACME manual (fictional)",
               "--edition", "rev 2", "--transcribed-by", "J. Smith")
    assert res.exit_code == 0, res.output
    assert "no-stop table acme-ndl with 2 rows, all unverified" in res.stdout
    out = tmp_path / "acme-ndl.toml"
    before = out.read_bytes()
    res = _run("import", str(csv), "--kind", "no-stop", "--source", "other")
    assert res.exit_code == 2 and "--force" in res.stderr and out.read_bytes() == before
    bad = tmp_path / "bad.csv"
    bad.write_text("depth,no_stop_limit\n20,100\n30,lots\n", "utf-8")
    res = _run("import", str(bad), "--kind", "no-stop", "--source", "x")
    assert res.exit_code == 2
    assert res.stderr.strip().endswith("expected minutes (a number >= 0) or unlimited")
    assert "bad.csv: row 2, column no_stop_limit" in res.stderr
    inv = tmp_path / "inv.csv"
    inv.write_text("depth,no_stop_limit\n20,100\n30,200\n", "utf-8")
    res = _run("import", str(inv), "--kind", "no-stop", "--source", "x")
    assert res.exit_code == 1 and "nothing written" in res.stderr
    assert not (tmp_path / "inv.toml").exists()
    res = _run("import", str(csv), "--kind", "saturation", "--source", "x")
    assert res.exit_code == 2


def test_build_and_screen_cli(tmp_path):
    res = _run("build", "--out-dir", str(tmp_path), "--unit", "msw")
    assert res.exit_code == 0, res.output
    out = tmp_path / "zhl16c-gf30-85-air-msw.toml"
    assert f"{out}: written" in res.stdout and not (tmp_path / "zhl16c-gf30-85-air-fsw.toml"
                                                     ).exists()
    res = _run("build", "--out-dir", str(tmp_path), "--unit", "msw")
    assert f"{out}: unchanged" in res.stdout
    res = _run("build", "--out-dir", str(tmp_path), "--gf", "90/30")
    assert res.exit_code == 2 and "--gf" in res.stderr
    res = _run("screen", str(out))
    assert res.exit_code == 0 and "0 row(s) flagged" in res.stdout
    doc = tomllib.loads(out.read_text("utf-8"))
    last = doc["rows"][-1]["air"]["stops"][-1]
    last["minutes"] = max(1, last["minutes"] // 10)  # a dropped digit
    out.write_text(dumps_table(doc), "utf-8")
    res = _run("screen", str(out), "--json")
    assert res.exit_code == 1
    js = json.loads(res.stdout)
    assert js["flagged_rows"] == [len(doc["rows"])]
    assert "also fails validation" in res.stderr
    res = _run("screen", str(DATA / "tables_fictional_limits.toml"))
    assert res.exit_code == 2 and "no-stop and decompression" in res.stderr


@pytest.mark.skipif(shutil.which("supervisor", path=str(Path(sys.executable).parent)) is None,
                    reason="console script not installed beside the interpreter")
def test_console_script_tables_list():
    exe = shutil.which("supervisor", path=str(Path(sys.executable).parent))
    proc = subprocess.run([exe, "tables", "list"], capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stderr
    assert "usn-rev7-air-ndl" in proc.stdout


def test_lookup_rounds_to_next_deeper_depth_and_longer_time():
    """Table entry rule: exact or next deeper depth, exact or next longer bottom time
    (U.S. Navy Diving Manual, Rev 4 Change A, ch. 9; older edition)."""
    res = _run("lookup", "zhl16c-gf30-85-air-fsw", "--depth", "104", "--bottom-time", "33")
    assert res.exit_code == 0, res.output
    assert "entered at 110 fsw / 35 min" in res.stdout and "needs review" in res.stdout
    js = json.loads(_run("lookup", "zhl16c-gf30-85-air-fsw", "--depth", "104",
                         "--bottom-time", "33", "--json").stdout)
    assert js["depth"] == 110 and js["bottom_time_min"] == 35 and js["needs_review"] is True


def test_lookup_modes_no_stop_and_outside():
    res = _run("lookup", "zhl16c-gf30-85-air-fsw", "--depth", "110", "--bottom-time", "40",
               "--mode", "surd_o2")
    assert res.exit_code == 0 and "(chamber)" in res.stdout
    res = _run("lookup", "usn-rev7-air-ndl", "--depth", "58", "--bottom-time", "40")
    assert res.exit_code == 0 and "no-stop limit: 63 min" in res.stdout
    assert "FROM MEMORY" in res.stdout
    res = _run("lookup", "zhl16c-gf30-85-air-fsw", "--depth", "250", "--bottom-time", "30")
    assert res.exit_code == 1 and "outside the table" in res.stdout
    res = _run("lookup", "zhl16c-gf30-85-air-fsw", "--depth", "100", "--bottom-time", "30",
               "--mode", "foo")
    assert res.exit_code == 2 and "--mode" in res.output


def test_treatment_tables_listed_shown_screened_and_verified(tmp_path):
    res = _run("list")
    assert res.exit_code == 0
    for stem in ("usn-tt5", "usn-tt6", "usn-tt6a", "usn-tt9", "usn-tt4", "usn-tt7", "usn-tt8",
                 "usn-tt1a", "usn-tt2a", "usn-tt3"):
        assert any(x.startswith(stem + " ") and " treatment " in x for x in res.stdout.splitlines())
    res = _run("show", "usn-tt6")
    assert res.exit_code == 0
    assert "extension --extend-oxygen: up to 2" in res.stdout
    assert "attendant (extensions-at-most 1)" in res.stdout
    assert "stated total: 285 min (FROM MEMORY)" in res.stdout
    res = _run("show", "usn-tt7")
    assert "planning: REFUSED" in res.stdout
    src = next(p for p in (Path(__file__).resolve().parents[2] / "tables" / "treatment").glob(
        "usn-tt6.toml"))
    copy = tmp_path / src.name
    copy.write_bytes(src.read_bytes())
    assert _run("validate", str(copy)).exit_code == 0
    res = _run("screen", str(copy))
    assert res.exit_code == 0 and "0 check(s) flagged" in res.stdout
    res = _run("screen", str(copy), "--json")
    assert json.loads(res.stdout)["kind"] == "treatment"
    res = _run("verify", str(copy), "--rows", "1-2", "--by", "A. Checker", "--method",
               "read against the figure")
    assert res.exit_code == 0, res.output
    doc = tomllib.loads(copy.read_text("utf-8"))
    assert doc["rows"][0]["verification"] == "verified" and doc["rows"][0]["row_hash"]
    assert doc["conventions"]["extensions"]  # the extensions survive the edit
    res = _run("show", str(copy))
    assert "2 of 12 rows verified" in res.stdout
    res = _run("lookup", "usn-tt6", "--depth", "60", "--bottom-time", "20")
    assert res.exit_code == 2 and "supervisor treatment plan 6" in res.stderr


# ---- issue 13 / issue 8 §3 ----------------------------------------------------------------

BUNDLED = Path(__file__).resolve().parents[2] / "tables"


def _model_file(tmp_path: Path, value: str) -> Path:
    text = (BUNDLED / "models" / "zhl16c.toml").read_text("utf-8")
    p = tmp_path / "zhl16c.toml"
    p.write_text(text.replace('compartment = "1b"', f"compartment = {value}", 1), "utf-8")
    return p


@pytest.mark.parametrize("command", ["validate", "show"])
def test_compartment_table_is_an_error_not_a_traceback(tmp_path, command):
    """Reproducer: `compartment = {v = "6"}` ended in TypeError: unhashable type: 'dict'."""
    res = _run(command, str(_model_file(tmp_path, '{v = "6"}')))
    assert res.exit_code == (1 if command == "validate" else 2)
    assert res.exception is None or isinstance(res.exception, SystemExit)
    assert "compartment label" in res.output and "Traceback" not in res.output


def test_boolean_po2_is_invalid(tmp_path):
    """Reproducer: a boolean PO2 validated, and `tables show` printed `True`."""
    text = (BUNDLED / "limits" / "noaa-cns-limits.toml").read_text("utf-8")
    p = tmp_path / "noaa-cns-limits.toml"
    p.write_text(text.replace("po2_atm = 0.7", "po2_atm = true", 1), "utf-8")
    res = _run("validate", str(p))
    assert res.exit_code == 1 and "got true (a boolean)" in res.stdout
    res = _run("show", str(p))
    assert res.exit_code == 2 and "True" not in res.output


def test_deep_table_file_is_unreadable_not_internal(tmp_path):
    p = tmp_path / "deep.toml"
    p.write_text("x = " + "[" * 1000 + "]" * 1000 + "\n", "utf-8")
    for command in ("validate", "show", "screen"):
        res = _run(command, str(p))
        assert res.exit_code == 2, (command, res.output)
        assert "nested more than 16 levels" in res.stderr


def test_long_name_names_the_problem(tmp_path):
    res = _run("show", "a" * 300)
    assert res.exit_code == 2 and "Errno" not in res.stderr and res.stderr.count("\n") == 1
    assert "cannot be read" in res.stderr or "no bundled table" in res.stderr


def test_show_prints_whole_schedules():
    """Reproducer: long stop lists were cut to 34 characters with '…'."""
    res = _run("show", "zhl16c-gf30-85-air-fsw")
    assert res.exit_code == 0 and "…" not in res.stdout
    js = json.loads(_run("show", "zhl16c-gf30-85-air-fsw", "--json").stdout)
    last = js["rows"][-1]
    stops = " ".join(f"{s['depth']:g}:{s['minutes']:g}" for s in last["air"]["stops"])
    assert stops in res.stdout


def test_show_json():
    js = json.loads(_run("show", "usn-rev7-air-ndl", "--json").stdout)
    assert js["schema"] == "supervisor.tables-show/1" and js["kind"] == "no-stop"
    assert js["provenance"]["source_status"] == "FROM MEMORY"
    assert len(js["rows"]) == 24 and js["rows"][0]["row"] == 1
    assert js["rows"][0]["status"] == {"source_status": "FROM MEMORY", "verified": False,
                                       "reason": "not verified"}


def test_show_escapes_control_characters(tmp_path):
    doc = tomllib.loads((DATA / "tables_fictional_limits.toml").read_text("utf-8"))
    doc["title"] = "Limits \x1b]0;pwned\x07 table"
    p = tmp_path / f"{doc['name']}.toml"
    p.write_text(dumps_table(doc), "utf-8")
    res = runner.invoke(app, ["tables", "show", str(p)], color=True)
    assert res.exit_code == 0 and "\x1b" not in res.output and "\\e]0;pwned" in res.output
