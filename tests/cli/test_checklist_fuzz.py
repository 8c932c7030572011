"""Property tests of ``checklist``, ``keys new`` and ``verify`` on generated input (issue 13).

Properties: the exit status is one the commands document ({0, 1, 2}, and 3 for
``verify`` on an intact file by an untrusted signer), no traceback, every
error is one ``error: FIELD: ...`` line, no control character reaches the
terminal, and a failed ``checklist`` writes nothing.  Plans start from the
fictional demo job (examples/demo-job.toml).  The example counts keep the
suite fast; ``make fuzz`` (``SUPERVISOR_FUZZ_EXAMPLES=500``) runs a large random profile.
"""

from __future__ import annotations

import os
import re
import shutil
import tomllib
from pathlib import Path
from typing import Any

import pytest
import tomli_w
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from supervisor.cli import app

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "examples" / "demo-job.toml"
HARBOUR = ROOT / "examples" / "harbour-job-msw.toml"
ENV = "SUPERVISOR_KEY_PASSPHRASE"
PASS = "fuzz-passphrase-1"
#: ``make fuzz`` sets SUPERVISOR_FUZZ_EXAMPLES for a large random run (tests/test_properties.py)
FUZZ = int(os.environ.get("SUPERVISOR_FUZZ_EXAMPLES", "0"))
CONTROL = re.compile(r"[\x00-\x09\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")
SETTINGS = {"deadline": None, "derandomize": not FUZZ, "database": None,
            "suppress_health_check": [HealthCheck.function_scoped_fixture,
                                      HealthCheck.too_slow]}


@pytest.fixture(autouse=True)
def _private_keyrings(monkeypatch: pytest.MonkeyPatch, tmp_path_factory: Any) -> None:
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path_factory.mktemp("config")))
    monkeypatch.delenv("SUPERVISOR_COMPANY_KEYRING", raising=False)
    monkeypatch.setenv(ENV, PASS)


def _clean_output(res: Any) -> None:
    out = res.stdout + res.stderr
    assert "Traceback" not in out, out
    assert not CONTROL.search(out), repr(out[:400])
    if res.exit_code == 2:
        lines = res.stderr.strip().splitlines()
        assert lines and all(re.match(r"error: [^\s:][^:]*: \S", line) for line in lines), lines


_NASTY = st.sampled_from(["W" * 2500, "\x1b[31mred\x1b[0m", "\x1b]0;title\x07", "王芳" * 300,
                          "<b>&amp;</b>", "/ByteRange [0 10 20 30]", "\u202eevil", "a\tb\nc",
                          "Zoë Brontë", " ", "%PDF-1.7 %%EOF"])
_TEXT_FIELDS = (("job", "title"), ("job", "site"), ("job", "client"), ("job", "contractor"),
                ("site", "emergency_contacts", "hospital"), ("dives", 0, "id"))


@settings(max_examples=FUZZ or 6, **SETTINGS)
@given(values=st.lists(_NASTY, min_size=len(_TEXT_FIELDS), max_size=len(_TEXT_FIELDS)))
def test_checklist_on_accepted_plans(tmp_path_factory: Any, values: list[str]) -> None:
    plan = tomllib.loads(HARBOUR.read_text(encoding="utf-8"))
    for path, value in zip(_TEXT_FIELDS, values, strict=True):
        target: Any = plan
        for key in path[:-1]:
            target = target[key]
        target[path[-1]] = value
    if plan["dives"][0]["id"] != "D1":
        plan["dives"][2]["previous_dive"] = plan["dives"][0]["id"]
    folder = tmp_path_factory.mktemp("accepted")
    path = folder / "plan.toml"
    path.write_text(tomli_w.dumps(plan), encoding="utf-8")
    res = CliRunner().invoke(app, ["checklist", str(path), "--out", str(folder / "out")])
    _clean_output(res)
    assert res.exit_code in (0, 1, 2), res.stderr
    written = sorted(p.suffix for p in (folder / "out").glob("*")) if (folder / "out").exists() \
        else []
    if res.exit_code == 2:  # refused (a text the plan does not accept): nothing written
        assert written == []
    else:
        assert written == [".json", ".pdf"]


def _mutations() -> st.SearchStrategy[tuple[str, Any]]:
    keys = st.sampled_from(["job.title", "job.date", "unit", "dives.0.max_depth",
                            "dives.1.stops.0.depth", "dives.0.bottom_time_min", "site.current_kt",
                            "team.0.role", "policy.gf_low", "chamber.on_site", "schema",
                            "dives.0.gas", "gas_supply.primary.delivery_lpm"])
    values = st.one_of(st.none(), st.booleans(), st.integers(-10**6, 10**9),
                       st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=40),
                       st.just([]), st.just({"v": "6"}))
    return st.tuples(keys, values)


def _apply(plan: dict[str, Any], key: str, value: Any) -> None:
    parts = [int(p) if p.isdigit() else p for p in key.split(".")]
    target: Any = plan
    for part in parts[:-1]:
        target = target[part]
    if value is None:
        if isinstance(target, dict):
            target.pop(parts[-1], None)
    else:
        target[parts[-1]] = value


@settings(max_examples=FUZZ or 8, **SETTINGS)
@given(changes=st.lists(_mutations(), min_size=1, max_size=3))
@example(changes=[("job.title", "Another title")])  # still accepted: exit 0 or 1
def test_checklist_on_mutated_plans(tmp_path_factory: Any,
                                    changes: list[tuple[str, Any]]) -> None:
    plan = tomllib.loads(DEMO.read_text(encoding="utf-8"))
    for key, value in changes:
        _apply(plan, key, value)
    folder = tmp_path_factory.mktemp("mutated")
    path = folder / "plan.toml"
    try:
        path.write_text(tomli_w.dumps(plan), encoding="utf-8")
    except (ValueError, TypeError):  # not expressible in TOML (e.g. NaN in a strict writer)
        path.write_text(f"{DEMO.read_text(encoding='utf-8')}\nbroken = [\n", encoding="utf-8")
    res = CliRunner().invoke(app, ["checklist", str(path), "--out", str(folder / "out")])
    _clean_output(res)
    assert res.exit_code in (0, 1, 2), res.stdout + res.stderr
    if changes == [("job.title", "Another title")]:
        assert res.exit_code in (0, 1)
    if res.exit_code == 2:
        assert not (folder / "out").exists() or not list((folder / "out").iterdir())


@settings(max_examples=FUZZ or 10, **SETTINGS)
@given(name=st.one_of(st.text(max_size=80), _NASTY,
                     st.text(st.characters(blacklist_categories=("Cc", "Cf", "Cs")),
                             min_size=1, max_size=64)),
       days=st.one_of(st.integers(-10, 4000), st.integers(-10**20, 10**20)),
       organisation=st.one_of(st.none(), st.text(max_size=70)))
def test_keys_new_options(tmp_path_factory: Any, name: str, days: int,
                          organisation: str | None) -> None:
    folder = tmp_path_factory.mktemp("keys")
    argv = ["keys", "new", "--name", name, "--out", str(folder / "k.p12"), "--days", str(days)]
    if organisation is not None:
        argv += ["--organisation", organisation]
    res = CliRunner().invoke(app, argv)
    _clean_output(res)
    assert res.exit_code in (0, 2), res.stdout + res.stderr
    made = sorted(p.name for p in folder.iterdir())
    assert made == (["k.cert.pem", "k.p12"] if res.exit_code == 0 else [])
    if not 1 <= days <= 3650:
        assert res.exit_code == 2 and "--days" in res.stderr


@pytest.fixture(scope="module")
def signed(tmp_path_factory: pytest.TempPathFactory) -> dict[str, bytes]:
    folder = tmp_path_factory.mktemp("signed")
    runner = CliRunner()
    res = runner.invoke(app, ["keys", "new", "--name", "Mara Okonjo", "--out",
                              str(folder / "m.p12")], env={ENV: PASS})
    assert res.exit_code == 0, res.stderr
    res = runner.invoke(app, ["checklist", str(HARBOUR), "--out", str(folder / "o"), "--sign",
                              str(folder / "m.p12")], env={ENV: PASS})
    assert res.exit_code in (0, 1), res.stderr
    return {p.name: p.read_bytes() for p in (folder / "o").iterdir()}


@settings(max_examples=FUZZ or 16, **SETTINGS)
@given(which=st.sampled_from(["pdf", "json", "sig"]),
       kind=st.sampled_from(["flip", "truncate", "insert", "append", "empty"]),
       where=st.floats(0, 1), byte=st.integers(0, 255))
def test_verify_on_mutated_files(tmp_path_factory: Any, signed: dict[str, bytes], which: str,
                                 kind: str, where: float, byte: int) -> None:
    folder = tmp_path_factory.mktemp("verify")
    for name, data in signed.items():
        (folder / name).write_bytes(data)
    suffix = {"pdf": ".pdf", "json": ".json", "sig": ".json.sig"}[which]
    target = next(p for p in folder.iterdir() if p.name.endswith(suffix)
                  and not (which == "json" and p.name.endswith(".sig")))
    data = target.read_bytes()
    pos = min(int(where * len(data)), len(data) - 1)
    changed = {"flip": data[:pos] + bytes([data[pos] ^ (byte or 1)]) + data[pos + 1:],
               "truncate": data[:pos], "insert": data[:pos] + bytes([byte]) + data[pos:],
               "append": data + bytes([byte]), "empty": b""}[kind]
    target.write_bytes(changed)
    checked = target if which != "sig" else target.with_name(target.name[:-4])
    res = CliRunner().invoke(app, ["verify", str(checked)])
    _clean_output(res)
    assert res.exit_code in (1, 2), res.stdout + res.stderr  # never valid, never untrusted
    shutil.rmtree(folder)


def test_verify_on_the_intact_files_is_untrusted(tmp_path: Path,
                                                 signed: dict[str, bytes]) -> None:
    for name, data in signed.items():
        (tmp_path / name).write_bytes(data)
    for path in tmp_path.iterdir():
        res = CliRunner().invoke(app, ["verify", str(path)])
        _clean_output(res)
        assert res.exit_code == 3, res.stdout
