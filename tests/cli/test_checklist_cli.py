"""``supervisor checklist``, ``keys new`` and ``verify``: files, exit codes, one-line errors.

End-to-end on the bundled fictional demo job (examples/demo-job.toml) through
the real check orchestrator.
"""

from __future__ import annotations

import hashlib
import io
import json
import math
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
from supervisor.report.document import sanitize
from supervisor.report.formatting import (
    VERDICT_LABEL,
    fmt_gf,
    fmt_number,
    fmt_stop_depth,
    fmt_stop_minutes,
)
from supervisor.report.units import UnitSystem

pytest.importorskip("supervisor.check")

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "examples" / "demo-job.toml"
NONCONFORMING = ROOT / "examples" / "nonconforming-job.toml"
ENV = "SUPERVISOR_KEY_PASSPHRASE"
PASS = "tern-rock-2031"
HOSTILE = '<b>Zoë Brontë</b> & Łukasz <font name="x">Ørsted</font> &amp; 王芳'


@pytest.fixture(autouse=True)
def own_keyrings(monkeypatch: pytest.MonkeyPatch, tmp_path_factory: pytest.TempPathFactory) -> Path:
    """Never read or write the real per-user keyring; no company keyring unless a test sets one."""
    config = tmp_path_factory.mktemp("config")
    monkeypatch.setenv("XDG_CONFIG_HOME", str(config))
    monkeypatch.delenv("SUPERVISOR_COMPANY_KEYRING", raising=False)
    return config


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


# exit status of `supervisor checklist` per verdict (supervisor.cli.checklist docstring)
EXIT_FOR = {"conforms": 0, "needs-review": 0, "does-not-conform": 1}

HEADINGS = ("Dives and their planned schedules", "Emergency contacts", "Site conditions",
            "Reference tables and model", "Findings to act on: failures and warnings, by dive",
            "Schedules", "Proposed (plan)", "Reference table: ", "Planned profile and model "
            "ceiling", "Surfacing gradient factor by compartment", "Oxygen exposure",
            "Gas supply against need", "Contingency schedules", "Bottom-time overrun",
            "Deeper than planned", "Loss of decompression oxygen", "Chamber",
            "Pre-dive checklist: surface-supplied air", "Cautions", "Signatures",
            "Diving supervisor", "Client's representative", "Chamber operator",
            "Dive team and divers' acknowledgement", "Appendix: passed checks")


@pytest.fixture(scope="module")
def demo_check() -> dict[str, Any]:
    """The check of the demo job, run on its own (the numbers the checklist must print)."""
    from supervisor.check import run_check

    return run_check(DEMO)


def _dive_text(text: str, dives: list[dict[str, Any]], index: int) -> str:
    """The part of the PDF text about one dive: from its heading to the next one."""
    start = text.index(f"Dive {dives[index]['id']}: {dives[index]['diver']}")
    ends = [text.index(f"Dive {d['id']}: {d['diver']}", start + 1) for d in dives[index + 1:]]
    return text[start:min(ends or [text.index("Pre-dive checklist: surface-supplied air",
                                              start)])]


def _stops_text(stops: list[dict[str, Any]], unit: str) -> str:
    if not stops:
        return "no decompression stops"
    return f"stop [{unit}] min gas place " + " ".join(
        f"{fmt_stop_depth(s['depth'])} {fmt_stop_minutes(s['minutes'])} {s['gas']} {s['place']}"
        for s in stops)


def test_checklist_on_the_demo_job(runner: CliRunner, tmp_path: Path,
                                   demo_check: dict[str, Any]) -> None:
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "out")])
    assert res.exit_code == EXIT_FOR[demo_check["verdict"]], res.stderr
    slug = "outfall-diffuser-inspection-and-riser-clamp-change-checklist"
    pdf, js = tmp_path / "out" / f"{slug}.pdf", tmp_path / "out" / f"{slug}.json"
    assert f"wrote {pdf}" in res.stdout and f"wrote {js}" in res.stdout
    record = json.loads(js.read_bytes())
    plan = DEMO.read_bytes()
    assert record["schema"] == "supervisor.check/1"
    assert record["plan_text"] == plan.decode("utf-8")
    assert record["plan_sha256"] == hashlib.sha256(plan).hexdigest() == demo_check["plan_sha256"]
    for key in ("verdict", "counts", "findings", "dives", "model"):
        assert record[key] == sanitize(demo_check[key]), key
    digest = hashlib.sha256(js.read_bytes()).hexdigest()
    assert f"document sha256 {digest}" in res.stdout
    counts = demo_check["counts"]
    verdict = VERDICT_LABEL[demo_check["verdict"]]
    assert f"verdict: {verdict} ({counts['fail']} fail, {counts['warn']} warn)" in res.stdout

    text = _pdf_text(pdf)
    for heading in HEADINGS:
        assert heading in text, heading
    assert f"Verdict: {verdict} {counts['fail']} fail, {counts['warn']} warn, " \
        f"{counts['info']} info, {counts['pass']} pass" in text
    model = demo_check["model"]
    assert f"Model: {model['name']} GF {fmt_gf(model['gf_low'], model['gf_high'])}" in text
    for fragment in ("Outfall diffuser inspection and riser clamp change", "Mara Okonjo",
                     "Halden Reach Water Board", "OSHA, 29 CFR 1910 Subpart T", digest,
                     demo_check["plan_sha256"], "29 CFR 1910.421(b)"):
        assert fragment in text, fragment
    pages = len(PdfReader(io.BytesIO(pdf.read_bytes())).pages)
    assert f"page {pages} of {pages}" in text
    for finding in demo_check["findings"]:
        if finding["severity"] == "info" and (finding.get("family") == "contingency"
                                              or finding["rule"] == "model-margin"):
            continue  # printed as the dive's contingency table and margin (SHOWN_IN_DIVE_SECTION)
        assert finding["rule"][:12] in text.replace(" ", "")  # rule ids may wrap

    unit = demo_check["unit"]
    dives = demo_check["dives"]
    assert len(dives) == 3
    for i, dive in enumerate(dives):
        part = _dive_text(text, dives, i)
        mine = [f for f in demo_check["findings"] if f["dive"] in (dive["id"], None)]
        fails = sum(f["severity"] == "fail" for f in mine)
        warns = sum(f["severity"] == "warn" for f in mine)
        assert f"Dive verdict: {VERDICT_LABEL[dive['verdict']]} ({fails} fail, {warns} warn, " \
            in part, dive["id"]
        model_schedule = dive["model_schedule"]
        assert _stops_text(model_schedule["stops"], unit) in part, dive["id"]
        assert f"total stop time: {fmt_number(model_schedule['total_stop_min'])} min" in part
        assert _stops_text(dive["proposed_stops"], unit) in part, dive["id"]
        oxygen = dive["oxygen"]
        cns = fmt_number(oxygen["cns_percent"], 1)
        if oxygen.get("cns_is_lower_bound"):
            cns = f"at least {fmt_number(math.floor(oxygen['cns_percent'] * 10) / 10, 1)} " \
                "(lower bound)"
        if oxygen["po2_by_phase"].get("chamber") is not None and "chamber_oxygen" not in oxygen:
            assert "CNS [% of limit], water and chamber counted on the in-water table " \
                f"{cns}" in part, dive["id"]
            assert "not counted against the chamber procedure's limits" in part
        else:
            label = "in-water CNS" if "chamber_oxygen" in oxygen else "CNS"
            assert f"{label} [% of limit] {cns}" in part, dive["id"]
        assert f"pulmonary dose [OTU] {fmt_number(oxygen['otu'], 0)}" in part, dive["id"]
        margin = dive["model_margin"]
        assert f"margin {fmt_number(margin['margin_min'])} min" in part, dive["id"]
        supply = dive["gas_supply"]
        if supply["primary_kind"] == "compressor":  # an fsw plan prints flows in scfm
            units = UnitSystem(unit)
            assert "primary compressor: delivery against peak flow " \
                f"{units.flow(supply['primary_delivery_lpm'])} " \
                f"{units.flow(supply['peak_flow_lpm'])}" in part, dive["id"]
            assert units.flow(supply["peak_flow_lpm"]).endswith(" scfm")
        ref = dive["reference_schedule"]
        if ref["reason"] or ref["outside_table"]:
            assert "No reference schedule — needs review:" in part or \
                "Partial reference schedule — needs review:" in part, dive["id"]
            assert ref["reason"] in part, dive["id"]
        if dive["decompression"] == "surface-oxygen":
            assert "surface interval: not assessed by the ceiling check" in part or \
                "surface interval: peak supersaturation" in part, dive["id"]
            assert "surface interval not in the ceiling check" in part  # the chart's label


def test_nonconforming_job_exits_1_with_files_written(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(app, ["checklist", str(NONCONFORMING), "--out", str(tmp_path)])
    assert res.exit_code == 1
    assert "verdict: DOES NOT CONFORM" in res.stdout
    assert len(list(tmp_path.glob("*-checklist.pdf"))) == 1


def test_sign_and_verify(runner: CliRunner, tmp_path: Path, key: Path,
                         demo_check: dict[str, Any]) -> None:
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path), "--sign", str(key)],
                        env={ENV: PASS})
    assert res.exit_code == EXIT_FOR[demo_check["verdict"]], res.stderr
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
    res = runner.invoke(app, ["verify", str(js)])  # intact, signer in no keyring
    assert res.exit_code == 3 and res.stdout.startswith("UNTRUSTED SIGNER")


def test_wrong_passphrase_exits_2_and_changes_nothing(runner: CliRunner, tmp_path: Path,
                                                      key: Path,
                                                      demo_check: dict[str, Any]) -> None:
    out = tmp_path / "out"
    assert runner.invoke(app, ["checklist", str(DEMO), "--out", str(out)]).exit_code \
        == EXIT_FOR[demo_check["verdict"]]
    before = _outputs(out)
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(out), "--sign", str(key)],
                        env={ENV: "not-the-passphrase"})
    assert res.exit_code == 2
    assert res.stdout == ""
    assert res.stderr.strip().splitlines() == [
        f"error: --sign: wrong passphrase for {key} (or the key file is damaged)"]
    assert _outputs(out) == before


def test_passphrase_from_prompt(runner: CliRunner, tmp_path: Path,
                                demo_check: dict[str, Any]) -> None:
    res = runner.invoke(app, ["keys", "new", "--name", "Łukasz Ørsted", "--out",
                              str(tmp_path / "l.p12")], input="prompted-pass\nprompted-pass\n")
    assert res.exit_code == 0, res.stderr
    assert stat.S_IMODE((tmp_path / "l.p12").stat().st_mode) == 0o600
    assert "SHA-256 fingerprint" in res.stdout and "prompted-pass" not in res.stdout
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "o"), "--sign",
                              str(tmp_path / "l.p12")], input="prompted-pass\n")
    assert res.exit_code == EXIT_FOR[demo_check["verdict"]], res.stderr
    assert "signed by Łukasz Ørsted" in res.stdout


def test_no_passphrase_given(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(app, ["keys", "new", "--name", "A Name", "--out", str(tmp_path / "k.p12")],
                        input="")
    assert res.exit_code == 2
    assert res.stderr.strip().endswith(f"error: passphrase: none given; type it at the prompt "
                                       f"or set {ENV}")
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("name", ["none.p12", "k.cert.pem"])
def test_bad_key_file_is_reported_before_the_passphrase_prompt(
        runner: CliRunner, folder_with_key: Path, tmp_path: Path, name: str) -> None:
    key_file = folder_with_key / name
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path / "o"), "--sign",
                              str(key_file)], input="")
    assert res.exit_code == 2
    assert "passphrase" not in res.stdout.lower()  # no prompt was shown
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: --sign: ")
    assert str(key_file) in lines[0] and "expected the .p12 key file" in lines[0]
    assert not (tmp_path / "o").exists()


def test_help_says_unsigned_checklists_are_regenerated(runner: CliRunner) -> None:
    res = runner.invoke(app, ["checklist", "--help"], env={"COLUMNS": "200"})
    assert res.exit_code == 0
    text = " ".join(res.stdout.split())
    assert "replaces an unsigned checklist" in text
    assert "a signed checklist is never replaced" in text


def test_unsigned_checklist_is_regenerated_but_a_signed_one_is_kept(
        runner: CliRunner, tmp_path: Path, key: Path, demo_check: dict[str, Any]) -> None:
    expected = EXIT_FOR[demo_check["verdict"]]
    # an older checklist of the same job (same title, an earlier date in the plan)
    older = tmp_path / "older.toml"
    older.write_text(DEMO.read_text(encoding="utf-8").replace("date = 2026-06-03",
                                                              "date = 2026-06-02"),
                     encoding="utf-8")
    assert runner.invoke(app, ["checklist", str(older), "--out", str(tmp_path / "o")]) \
        .exit_code == expected
    first = _outputs(tmp_path / "o")
    argv = ["checklist", str(DEMO), "--out", str(tmp_path / "o")]
    assert runner.invoke(app, argv).exit_code == expected
    second = _outputs(tmp_path / "o")
    assert second.keys() == first.keys()
    assert all(second[k] != first[k] for k in first)  # regenerated from the plan as it is now
    assert all(json.loads(v)["job"]["date"] == "2026-06-03"
               for k, v in second.items() if k.endswith(".json"))
    assert runner.invoke(app, [*argv, "--sign", str(key)], env={ENV: PASS}).exit_code == expected
    signed = _outputs(tmp_path / "o")
    res = runner.invoke(app, argv)
    assert res.exit_code == 2
    assert "is a signed checklist and is never replaced" in res.stderr
    assert _outputs(tmp_path / "o") == signed


def test_a_file_at_the_checklist_name_that_is_not_a_checklist_is_refused(
        runner: CliRunner, tmp_path: Path) -> None:
    slug = "outfall-diffuser-inspection-and-riser-clamp-change-checklist"
    (tmp_path / f"{slug}.pdf").write_bytes(b"an older file of the user's")
    res = runner.invoke(app, ["checklist", str(DEMO), "--out", str(tmp_path)])
    assert res.exit_code == 2 and res.stdout == ""
    assert res.stderr.strip().splitlines() == [
        f"error: --out: {tmp_path / slug}.pdf is there but is not a checklist PDF this tool "
        "can read, so it is not replaced; move it away or choose another --out folder"]
    assert [p.name for p in tmp_path.iterdir()] == [f"{slug}.pdf"]


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


def test_markup_and_non_latin_names_print_literally(runner: CliRunner, tmp_path: Path,
                                                    demo_check: dict[str, Any]) -> None:
    plan = tomllib.loads(DEMO.read_text(encoding="utf-8"))
    plan = _replace_strings(plan, "Teodor Lind", HOSTILE)
    plan["job"]["title"] = f"Clamp change {HOSTILE}"
    plan["job"]["client"] = "Ελένη & Дмитрий <i>Co</i>"
    path = tmp_path / "hostile.toml"
    path.write_text(tomli_w.dumps(plan), encoding="utf-8")
    res = runner.invoke(app, ["checklist", str(path), "--out", str(tmp_path / "o")])
    assert res.exit_code == EXIT_FOR[demo_check["verdict"]], res.stderr  # only names changed
    # letters are spelt out in the file name (Ł, Ø), the Chinese name is left out
    pdf = next((tmp_path / "o").glob("clamp-change-b-zoe-bronte-b-lukasz-*-orsted-*checklist.pdf"))
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
                             check=False, env=env)
    assert checked.returncode == 3 and checked.stdout.startswith("UNTRUSTED SIGNER"), \
        checked.stdout
    ring = tmp_path / "company-keyring.toml"
    trusted = subprocess.run([str(exe), "keys", "trust", str(key.with_name("mara.cert.pem")),
                              "--keyring", str(ring)], capture_output=True, text=True,
                             check=False, env=env)
    assert trusted.returncode == 0, trusted.stderr
    checked = subprocess.run([str(exe), "verify", str(pdf)], capture_output=True, text=True,
                             check=False, env={**env, "SUPERVISOR_COMPANY_KEYRING": str(ring)})
    assert checked.returncode == 0 and checked.stdout.startswith("VALID"), checked.stdout


HARBOUR = ROOT / "examples" / "harbour-job-msw.toml"


@pytest.fixture(scope="module")
def harbour_pages(tmp_path_factory: pytest.TempPathFactory) -> tuple[list[str], dict[str, Any]]:
    """The harbour job's checklist (invented three-dive no-stop job in msw), page by page."""
    from supervisor.check import run_check

    out = tmp_path_factory.mktemp("harbour")
    res = CliRunner().invoke(app, ["checklist", str(HARBOUR), "--out", str(out)])
    assert res.exit_code in (0, 1), res.stderr
    reader = PdfReader(io.BytesIO(next(out.glob("*.pdf")).read_bytes()))
    pages = [re.sub(r"\s+", " ", p.extract_text()) for p in reader.pages]
    return pages, run_check(HARBOUR)


def test_harbour_job_page_1_is_a_one_page_summary(
        harbour_pages: tuple[list[str], dict[str, Any]]) -> None:
    pages, check = harbour_pages
    first = pages[0]
    for fragment in ("Verdict: ", "Dives and their planned schedules", "D1 Oskar Vale",
                     "D3 Oskar Vale", "no decompression stops", "Emergency contacts",
                     "Hospital: Ardley Infirmary emergency department, 555-0170",
                     "Rescue coordination (USCG RCC): Coastal rescue coordination centre",
                     "Site conditions", "Current: 0.3 kt", "Visibility: 1.5 m",
                     "Water temperature: 13 °C", "Chamber: none at the dive location; nearest: "
                     "Ardley Bay hyperbaric unit", "Before travel to altitude",
                     "Document sha256"):
        assert fragment in first, fragment
    assert pages[1].startswith("Findings to act on")
    # an msw plan prints bar and litres (issue 8: one unit system per plan); a figure a source
    # states in psig or scf appears only in parentheses beside its conversion
    body = " ".join(pages)
    outside = re.sub(r"\([^()]*\)", "", body)
    assert " psig" not in outside and " scf" not in outside and " bar" in outside
    assert re.search(r"\d bar", outside) and re.search(r"\d L\b", outside)


def test_harbour_job_checklist_is_short(harbour_pages: tuple[list[str], dict[str, Any]]) -> None:
    """Issue 8 target: at most 8 pages (it was 19: every passed check a table row) and at most
    5 warnings, the unverified references reported once for the job."""
    pages, check = harbour_pages
    assert len(pages) <= 8
    assert check["counts"]["warn"] <= 5
    assert sum(f["rule"] == "references-unverified" for f in check["findings"]) == 1


def test_longest_accepted_text_and_many_stops_never_crash(runner: CliRunner,
                                                          tmp_path: Path) -> None:
    """Issue 13 reproducers: long unbroken text in every named field and 60 water stops."""
    plan = tomllib.loads(DEMO.read_text(encoding="utf-8"))
    plan["job"].update(title="T" * 300, site="S" * 300, client="王" * 300,
                       contractor="Д" * 300)
    old_supervisor = plan["job"]["supervisor"]
    plan = _replace_strings(plan, old_supervisor, "M" * 100)
    plan = _replace_strings(plan, "Teodor Lind", "L" * 100)
    dive = plan["dives"][1]
    dive.update(id="I" * 40, max_depth=190, bottom_time_min=10, decompression="in-water",
                stops=[{"depth": float(d), "minutes": 1.0, "gas": "air", "place": "water"}
                       for d in range(180, 0, -3)])
    dive.pop("surface_transfer_min", None)
    path = tmp_path / "long.toml"
    path.write_text(tomli_w.dumps(plan), encoding="utf-8")
    assert runner.invoke(app, ["plan", "validate", str(path)]).exit_code == 0
    res = runner.invoke(app, ["checklist", str(path), "--out", str(tmp_path / "o")])
    assert res.exit_code in (0, 1), res.stderr
    assert "Traceback" not in res.stdout + res.stderr
    pdf = next((tmp_path / "o").glob("*.pdf"))
    text = _pdf_text(pdf)
    assert "".join(text.split()).count("I" * 40) >= 2  # the dive id, whole
    assert "3 1 air water" in text
