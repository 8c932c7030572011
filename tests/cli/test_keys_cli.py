"""``supervisor keys new | trust | list | remove`` and ``verify`` with keyrings.

The checklists here are made from the hand-written fixture check of
``tests/report/conftest.py`` (a fictional job) through ``make_checklist``;
the end-to-end run through the real check is in ``test_checklist_cli.py``.
"""

from __future__ import annotations

import copy
import hashlib
import os
import stat
from pathlib import Path
from typing import Any

import pytest
from typer.testing import CliRunner

from supervisor.cli import app
from supervisor.report.checklist import make_checklist
from supervisor.report.keys import load_identity
from tests.report.conftest import PLAN_TEXT, _check

ENV = "SUPERVISOR_KEY_PASSPHRASE"
PASS = "north-mole-2031"
COMPANY = "SUPERVISOR_COMPANY_KEYRING"
CONTROL = set(map(chr, range(32))) - {"\n"} | {"\x7f"}


@pytest.fixture(autouse=True)
def config(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> Path:
    """A private XDG config folder: the real per-user keyring is never touched."""
    folder = tmp_path / "config"
    folder.mkdir()
    monkeypatch.setenv("XDG_CONFIG_HOME", str(folder))
    monkeypatch.delenv(COMPANY, raising=False)
    monkeypatch.setenv(ENV, PASS)
    return folder


@pytest.fixture()
def runner() -> CliRunner:
    return CliRunner()


def _new_key(runner: CliRunner, folder: Path, name: str, stem: str) -> Path:
    res = runner.invoke(app, ["keys", "new", "--name", name, "--out", str(folder / f"{stem}.p12")])
    assert res.exit_code == 0, res.stderr
    return folder / f"{stem}.p12"


@pytest.fixture()
def dana(runner: CliRunner, tmp_path: Path) -> Path:
    return _new_key(runner, tmp_path, "Dana Whitcombe", "dana")


def _signed(tmp_path: Path, key: Path, **job: str) -> Any:
    plan = PLAN_TEXT.encode("utf-8")
    check = copy.deepcopy(_check(hashlib.sha256(plan).hexdigest()))
    check["job"].update(job)
    return make_checklist(check, plan, tmp_path / "out", identity=load_identity(key, PASS))


def _one_line(res: Any) -> str:
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), res.stderr
    assert "Traceback" not in res.stdout + res.stderr
    return str(lines[0])


def test_trust_list_remove_in_the_per_user_keyring(runner: CliRunner, dana: Path,
                                                  config: Path) -> None:
    cert = dana.with_name("dana.cert.pem")
    user = config / "supervisor" / "trusted-signers.toml"
    res = runner.invoke(app, ["keys", "trust", str(cert)])
    assert res.exit_code == 0, res.stderr
    assert f"Dana Whitcombe: added to the per-user keyring {user}" in res.stdout
    assert user.exists()
    res = runner.invoke(app, ["keys", "trust", str(cert)])
    assert res.exit_code == 0 and "already in the per-user keyring" in res.stdout
    res = runner.invoke(app, ["keys", "list"])
    assert res.exit_code == 0
    assert f"per-user keyring {user}: 1 trusted signer(s)" in res.stdout
    fp = res.stdout.split("SHA-256 ")[1].split()[0]
    assert len(fp.split(":")) == 32
    res = runner.invoke(app, ["keys", "remove", fp[:11]])
    assert res.exit_code == 0 and "removed from the per-user keyring" in res.stdout
    res = runner.invoke(app, ["keys", "list"])
    assert "0 trusted signer(s)" in res.stdout
    res = runner.invoke(app, ["keys", "remove", str(cert)])
    assert res.exit_code == 2 and "is not in the per-user keyring" in _one_line(res)


def test_company_keyring_by_option_or_environment(runner: CliRunner, dana: Path, tmp_path: Path,
                                                  monkeypatch: pytest.MonkeyPatch) -> None:
    files = _signed(tmp_path, dana)
    company = tmp_path / "company.toml"
    res = runner.invoke(app, ["verify", str(files.pdf), "--keyring", str(company)])
    assert res.exit_code == 2
    assert f"--keyring: company keyring {company} does not exist" in _one_line(res)
    res = runner.invoke(app, ["keys", "trust", str(dana.with_name("dana.cert.pem")),
                              "--keyring", str(company)])
    assert res.exit_code == 0 and "added to the company keyring" in res.stdout
    res = runner.invoke(app, ["verify", str(files.pdf), "--keyring", str(company)])
    assert res.exit_code == 0 and res.stdout.startswith("VALID: "), res.stdout
    assert f"trusted: in the company keyring {company}" in res.stdout
    assert runner.invoke(app, ["verify", str(files.pdf)]).exit_code == 3
    monkeypatch.setenv(COMPANY, str(company))
    res = runner.invoke(app, ["verify", str(files.json)])
    assert res.exit_code == 0, res.stdout
    res = runner.invoke(app, ["keys", "list"])
    assert f"company keyring {company}: 1 trusted signer(s)" in res.stdout


def test_untrusted_signer_exit_3_and_help_says_so(runner: CliRunner, dana: Path,
                                                  tmp_path: Path) -> None:
    files = _signed(tmp_path, dana)
    res = runner.invoke(app, ["verify", str(files.pdf)])
    assert res.exit_code == 3
    first = res.stdout.splitlines()[0]
    assert first.startswith("UNTRUSTED SIGNER: ") and "NOT an approval" in first
    assert "supervisor keys trust CERT" in res.stdout
    res = runner.invoke(app, ["verify", str(files.pdf), "--cert",
                              str(dana.with_name("dana.cert.pem"))])
    assert res.exit_code == 0  # --cert: a one-off check
    res = runner.invoke(app, ["verify", "--help"], env={"COLUMNS": "200"})
    text = " ".join(res.stdout.split())
    assert "3 intact, but the signer is in no keyring of trusted supervisors" in text


def test_signed_by_someone_else_is_visible(runner: CliRunner, tmp_path: Path) -> None:
    """Signing a checklist with another person's certificate: a warning, and the PDF says so."""
    from tests.cli.test_checklist_cli import DEMO, _pdf_text

    ivo = _new_key(runner, tmp_path, "Ivo Strand", "ivo")
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "o"), "--sign",
                              str(ivo)])
    assert res.exit_code in (0, 1), res.stderr
    assert res.stderr.strip().splitlines() == [
        "warning: --sign: the certificate is in the name of Ivo Strand, not the plan's "
        "supervisor Mara Okonjo; the checklist says it was signed by Ivo Strand in place of "
        "Mara Okonjo"]
    pdf = next((tmp_path / "o").glob("*.pdf"))
    assert "signed by Ivo Strand in place of the plan's supervisor Mara Okonjo" in \
        _pdf_text(pdf)
    res = runner.invoke(app, ["verify", str(pdf), "--cert", str(ivo.with_name("ivo.cert.pem"))])
    assert "plan supervisor:  Mara Okonjo (NOT the signer" in res.stdout


def test_loose_key_file_warns(runner: CliRunner, dana: Path, tmp_path: Path) -> None:
    from tests.cli.test_checklist_cli import DEMO

    os.chmod(dana, 0o644)
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "o"), "--sign",
                              str(dana)])
    assert res.exit_code in (0, 1), res.stderr
    assert f"warning: --sign: {dana} is readable by other users (mode 0644)" in res.stderr
    assert f"chmod 600 {dana}" in res.stderr
    os.chmod(dana, 0o600)
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "p"), "--sign",
                              str(dana)])
    assert "readable by other users" not in res.stderr


def test_writable_keyring_warns(runner: CliRunner, dana: Path, tmp_path: Path) -> None:
    company = tmp_path / "company.toml"
    assert runner.invoke(app, ["keys", "trust", str(dana.with_name("dana.cert.pem")),
                               "--keyring", str(company)]).exit_code == 0
    os.chmod(company, 0o666)
    res = runner.invoke(app, ["keys", "list", "--keyring", str(company)])
    assert res.exit_code == 0
    assert f"warning: --keyring: {company} writable by other users" in res.stderr


@pytest.mark.parametrize("days", ["0", "3651", "3000000", "-5"])
def test_keys_new_days_out_of_range_is_one_line_before_the_prompt(
        runner: CliRunner, tmp_path: Path, monkeypatch: pytest.MonkeyPatch, days: str) -> None:
    monkeypatch.delenv(ENV)
    res = runner.invoke(app, ["keys", "new", "--name", "A Name", "--out",
                              str(tmp_path / "k.p12"), "--days", days], input="")
    assert res.exit_code == 2
    assert _one_line(res) == (f"error: --days: got {days}; expected a whole number of days "
                              "from 1 to 3650 (ten years)")
    assert "passphrase" not in res.stdout.lower()
    assert not (tmp_path / "k.p12").exists()


def test_terminal_escapes_in_the_job_are_not_printed_raw(runner: CliRunner, dana: Path,
                                                         tmp_path: Path) -> None:
    """Issue 13: a title with escape sequences reached the terminal through ``verify``."""
    title = "Pier \x1b[31mred\x1b[0m \x1b]0;owned\x07 \u202eevil"
    files = _signed(tmp_path, dana, title=title, supervisor="Dana \x1b[2J Whitcombe")
    # the JSON record keeps the text as typed; the PDF's title holds it as printed
    for path, shown in ((files.json, "Pier \\e[31mred\\e[0m \\e]0;owned\\x07 \\u202eevil"),
                        (files.pdf, "Pier [U+001B][31mred[U+001B][0m")):
        res = runner.invoke(app, ["verify", str(path)])
        assert res.exit_code == 3
        out = res.stdout + res.stderr
        assert not set(out) & CONTROL and "\u202e" not in out
        assert shown in out


def test_bad_keyring_and_certificate_inputs(runner: CliRunner, dana: Path,
                                            tmp_path: Path, config: Path) -> None:
    res = runner.invoke(app, ["keys", "trust", str(dana)])  # the key file, not the certificate
    assert res.exit_code == 2 and "error: CERT: " in _one_line(res)
    res = runner.invoke(app, ["keys", "trust", str(tmp_path / "none.pem")])
    assert res.exit_code == 2 and "cannot read" in _one_line(res)
    res = runner.invoke(app, ["keys", "remove", "xyz"])
    assert res.exit_code == 2 and "at least its first 8 hex digits" in _one_line(res)
    user = config / "supervisor" / "trusted-signers.toml"
    user.parent.mkdir()
    user.write_text("schema = 'something-else'\n")
    files = _signed(tmp_path, dana)
    res = runner.invoke(app, ["verify", str(files.pdf)])
    assert res.exit_code == 2
    assert f"error: keyring: {user} is not a keyring" in _one_line(res)
    assert stat.S_IMODE(dana.stat().st_mode) == 0o600
