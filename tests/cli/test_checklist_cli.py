"""``supervisor checklist``, ``keys new`` and ``verify``: files, exit codes, one-line errors.

End-to-end on the bundled fictional demo job (examples/demo-job.toml) through
the real check orchestrator.
"""

from __future__ import annotations

import hashlib
import io
import json
import os
import re
import stat
import subprocess
import sys
import tomllib
from pathlib import Path
from typing import Any

import pytest
import tomli_w
from pypdf import PdfReader
from typer.testing import CliRunner

from supervisor.cli import app

pytest.importorskip("supervisor.check")

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "examples" / "demo-job.toml"
NONCONFORMING = ROOT / "examples" / "nonconforming-job.toml"
ENV = "SUPERVISOR_KEY_PASSPHRASE"
PASS = "tern-rock-2031"
HOSTILE = '<b>Zoë Brontë</b> & Łukasz <font name="x">Ørsted</font> &amp; 王芳'


@pytest.fixture()
def runner(monkeypatch: pytest.MonkeyPatch) -> CliRunner:
    monkeypatch.delenv(ENV, raising=False)
    return CliRunner()


@pytest.fixture(scope="module")
def key(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A key file made through the command line once for this module."""
    folder = tmp_path_factory.mktemp("key")
    res = CliRunner().invoke(app, ["keys", "new", "--name", "Mara Okonjo", "--out",
                                   str(folder / "mara.p12")], env={ENV: PASS})
    assert res.exit_code == 0, res.stderr
    return folder / "mara.p12"


def _pdf_text(path: Path) -> str:
    reader = PdfReader(io.BytesIO(path.read_bytes()))
    return re.sub(r"\s+", " ", " ".join(p.extract_text() for p in reader.pages))


def _outputs(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())} if folder.exists() else {}


def test_checklist_on_the_demo_job(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "out")])
    assert res.exit_code in (0, 1), res.stderr
    slug = "outfall-diffuser-inspection-and-riser-clamp-change-checklist"
    pdf, js = tmp_path / "out" / f"{slug}.pdf", tmp_path / "out" / f"{slug}.json"
    assert f"wrote {pdf}" in res.stdout and f"wrote {js}" in res.stdout
    record = json.loads(js.read_bytes())
    plan = DEMO.read_bytes()
    assert record["schema"] == "supervisor.check/1"
    assert record["plan_text"] == plan.decode("utf-8")
    assert record["plan_sha256"] == hashlib.sha256(plan).hexdigest()
    digest = hashlib.sha256(js.read_bytes()).hexdigest()
    assert f"document sha256 {digest}" in res.stdout
    text = _pdf_text(pdf)
    for fragment in ("Outfall diffuser inspection and riser clamp change", "Mara Okonjo",
                     "Halden Reach Water Board", "osha-1910-t", digest, record["plan_sha256"],
                     "Dive D1: Teodor Lind", "Dive D2: Priya Raman",
                     "Pre-dive checklist: surface-supplied air", "29 CFR 1910.421(b)",
                     "Signatures", "Cautions"):
        assert fragment in text, fragment
    pages = len(PdfReader(io.BytesIO(pdf.read_bytes())).pages)
    assert f"page {pages} of {pages}" in text
    for dive in record["dives"]:
        assert f"Dive {dive['id']}:" in text
    for finding in record["findings"]:
        assert finding["rule"][:12] in text.replace(" ", "")  # rule ids may wrap


def test_nonconforming_job_exits_1_with_files_written(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(app, ["checklist", str(NONCONFORMING), "--out", str(tmp_path)])
    assert res.exit_code == 1
    assert "verdict: DOES NOT CONFORM" in res.stdout
    assert len(list(tmp_path.glob("*-checklist.pdf"))) == 1


def test_sign_and_verify(runner: CliRunner, tmp_path: Path, key: Path) -> None:
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path), "--sign", str(key)],
                        env={ENV: PASS})
    assert res.exit_code in (0, 1), res.stderr
    assert "signed by Mara Okonjo" in res.stdout
    pdf = next(tmp_path.glob("*-checklist.pdf"))
    js = next(tmp_path.glob("*-checklist.json"))
    assert (tmp_path / f"{js.name}.sig").exists()
    for path in (pdf, js):
        res = runner.invoke(app, ["verify", str(path), "--cert",
                                  str(key.with_name("mara.cert.pem"))])
        assert res.exit_code == 0, res.stdout
        assert res.stdout.startswith("VALID")
        assert "signed by:        Mara Okonjo" in res.stdout
        assert "self-signed" in res.stdout and "signed at:" in res.stdout
    data = bytearray(pdf.read_bytes())
    data[len(data) // 3] ^= 0x01
    pdf.write_bytes(bytes(data))
    res = runner.invoke(app, ["verify", str(pdf)])
    assert res.exit_code == 1 and res.stdout.startswith("INVALID")
    assert "Traceback" not in res.stdout + res.stderr


def test_wrong_passphrase_exits_2_and_changes_nothing(runner: CliRunner, tmp_path: Path,
                                                      key: Path) -> None:
    out = tmp_path / "out"
    assert runner.invoke(app, ["checklist", str(DEMO), "--out", str(out)]).exit_code in (0, 1)
    before = _outputs(out)
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(out), "--sign", str(key)],
                        env={ENV: "not-the-passphrase"})
    assert res.exit_code == 2
    assert res.stdout == ""
    assert res.stderr.strip().splitlines() == [
        f"error: --sign: wrong passphrase for {key} (or the key file is damaged)"]
    assert _outputs(out) == before


def test_passphrase_from_prompt(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(app, ["keys", "new", "--name", "Łukasz Ørsted", "--out",
                              str(tmp_path / "l.p12")], input="prompted-pass\nprompted-pass\n")
    assert res.exit_code == 0, res.stderr
    assert stat.S_IMODE((tmp_path / "l.p12").stat().st_mode) == 0o600
    assert "SHA-256 fingerprint" in res.stdout and "prompted-pass" not in res.stdout
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "o"), "--sign",
                              str(tmp_path / "l.p12")], input="prompted-pass\n")
    assert res.exit_code in (0, 1), res.stderr
    assert "signed by Łukasz Ørsted" in res.stdout


def test_no_passphrase_given(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(app, ["keys", "new", "--name", "A Name", "--out", str(tmp_path / "k.p12")],
                        input="")
    assert res.exit_code == 2
    assert res.stderr.strip().endswith(f"error: passphrase: none given; type it at the prompt "
                                       f"or set {ENV}")
    assert list(tmp_path.iterdir()) == []


@pytest.fixture(scope="module")
def folder_with_key(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A folder holding k.p12 and k.cert.pem."""
    folder = tmp_path_factory.mktemp("bad")
    res = CliRunner().invoke(app, ["keys", "new", "--name", "A Name", "--out",
                                   str(folder / "k.p12")], env={ENV: PASS})
    assert res.exit_code == 0, res.stderr
    return folder


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["keys", "new", "--name", "A Name", "--out", "{tmp}/k.p12"], "already exists"),
        (["keys", "new", "--name", "", "--out", "{tmp}/e.p12"], "--name: is empty"),
        (["keys", "new", "--name", "A Name", "--out", "{tmp}/s.p12"], "use at least 8"),
        (["checklist", "{tmp}/missing.toml", "--out", "{tmp}/o"], "error: PLAN: cannot read"),
        (["checklist", str(DEMO), "--out", "{tmp}/o", "--sign", "{tmp}/k.cert.pem"],
         "is a certificate, not a key file"),
        (["checklist", str(DEMO), "--out", "{tmp}/o", "--sign", "{tmp}/none.p12"],
         "error: --sign: cannot read"),
        (["verify", "{tmp}/missing.pdf"], "cannot read the file"),
        (["verify", str(DEMO)], "neither a PDF nor a JSON checklist record"),
        (["verify", str(DEMO), "--cert", "{tmp}/none.pem"], "error: --cert: cannot read"),
    ],
)
def test_bad_input_is_one_line_and_exit_2(runner: CliRunner, folder_with_key: Path,
                                          args: list[str], message: str) -> None:
    argv = [a.replace("{tmp}", str(folder_with_key)) for a in args]
    passphrase = "short" if "s.p12" in " ".join(argv) else PASS
    before = _outputs(folder_with_key)
    res = runner.invoke(app, argv, env={ENV: passphrase})
    assert res.exit_code == 2
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and message in lines[0]
    assert "Traceback" not in res.stderr
    assert _outputs(folder_with_key) == before


def _replace_strings(value: Any, old: str, new: str) -> Any:
    if isinstance(value, dict):
        return {k: _replace_strings(v, old, new) for k, v in value.items()}
    if isinstance(value, list):
        return [_replace_strings(v, old, new) for v in value]
    return value.replace(old, new) if isinstance(value, str) else value


def test_markup_and_non_latin_names_print_literally(runner: CliRunner, tmp_path: Path) -> None:
    plan = tomllib.loads(DEMO.read_text(encoding="utf-8"))
    plan = _replace_strings(plan, "Teodor Lind", HOSTILE)
    plan["job"]["title"] = f"Clamp change {HOSTILE}"
    plan["job"]["client"] = "Ελένη & Дмитрий <i>Co</i>"
    path = tmp_path / "hostile.toml"
    path.write_text(tomli_w.dumps(plan), encoding="utf-8")
    res = runner.invoke(app, ["checklist", str(path), "--out", str(tmp_path / "o")])
    assert res.exit_code in (0, 1), res.stderr
    pdf = next((tmp_path / "o").glob("clamp-change-b-zoe-bronte-b-*-checklist.pdf"))
    text = _pdf_text(pdf)
    assert f"Clamp change {HOSTILE}" in text
    assert f"Dive D1: {HOSTILE}" in text
    assert "Ελένη & Дмитрий <i>Co</i>" in text
    assert text.count(HOSTILE) >= 4


def test_console_script_verifies(tmp_path: Path, key: Path) -> None:
    exe = Path(sys.executable).with_name("supervisor")
    env = {**os.environ, ENV: PASS}
    made = subprocess.run([str(exe), "checklist", str(DEMO), "--out", str(tmp_path), "--sign",
                           str(key)], capture_output=True, text=True, env=env, check=False)
    assert made.returncode in (0, 1), made.stderr
    pdf = next(tmp_path.glob("*-checklist.pdf"))
    checked = subprocess.run([str(exe), "verify", str(pdf)], capture_output=True, text=True,
                             check=False)
    assert checked.returncode == 0 and checked.stdout.startswith("VALID"), checked.stdout
