"""`supervisor treatment plan | log`: exit codes, one-line errors, text and JSON output.

Exit status (supervisor/cli/treatment.py): plan 0 planned, 1 the job plan's chamber cannot
run it, 2 bad input; log 0 conforms or needs review, 1 a deviation fails, 2 bad input.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from supervisor.chamber.catalogue import load_treatment
from supervisor.cli import main
from supervisor.cli.treatment import _EXT_AIR, _EXT_OXYGEN

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(autouse=True)
def _project_folder(monkeypatch):
    monkeypatch.chdir(ROOT)  # the examples name their job plan relative to the project


def run(args: list[str], capsys) -> tuple[int, str, str]:
    with pytest.raises(SystemExit) as exc:
        main(args)
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


def test_plan_text(capsys):
    code, out, err = run(["treatment", "plan", "6", "--start", "21:40"], capsys)
    assert code == 0, err
    lines = out.splitlines()
    assert lines[0].startswith("Treatment Table 6: planned to start 21:40")
    head = next(x for x in lines if x.lstrip().startswith("line"))
    assert head.split()[:4] == ["line", "start", "end", "depth"]
    assert any("02:28 +1d" in x for x in lines)  # 21:40 + 288 min, across midnight
    assert any(x.startswith("total: 285 min table time") for x in lines)
    assert any(x.startswith("verdict: needs-review") for x in lines)
    assert any(x.startswith("caution: ") and "diving medical officer" in x for x in lines)
    assert "no in-water percentage" in out


def test_plan_json(capsys):
    code, out, _ = run(["treatment", "plan", "6", "--start", "08:00", "--extend-oxygen", "2",
                        "--extend-air", "2", "--json"], capsys)
    assert code == 0
    j = json.loads(out)
    assert j["schema"] == "supervisor.treatment/1" and j["total_min"] == 485
    assert j["extensions"] == {"extend_oxygen": 2, "extend_air": 2}
    assert len(j["steps"]) == 1 + 12 + 8 and "doses" in j


def test_plan_from_the_demo_job(capsys):
    code, out, err = run(["treatment", "plan", "6", "--start", "21:40", "--plan",
                          "examples/demo-job.toml", "--attendant-recent-dive",
                          "depth=50,bottom=30,since=4:30"], capsys)
    assert code == 0, err
    assert "chamber gas: " in out and "L in the flasks against" in out
    assert "recent dive 50 fsw / 30 min" in out and "case applies" in out


@pytest.mark.parametrize(("args", "field"), [
    (["12", "--start", "08:00"], "TABLE"),
    (["7", "--start", "08:00"], "TABLE"),
    (["6", "--start", "25:00"], "--start"),
    (["6", "--start", "08:00", "--extend-oxygen", "-1"], "--extend-oxygen"),
    (["6", "--start", "08:00", "--extend-oxygen", "3"], "--extend-oxygen"),
    (["5", "--start", "08:00", "--extend-air", "1"], "--extend-air"),
    (["6", "--start", "08:00", "--extend-air", "two"], "--extend-air"),
    (["6", "--start", "08:00", "--attendant-recent-dive", "100/25"], "--attendant-recent-dive"),
    (["6", "--start", "08:00", "--plan", "missing.toml"], "--plan"),
    (["6"], "--start"),
])
def test_bad_input_is_one_line_and_status_2(capsys, args, field):
    code, out, err = run(["treatment", "plan", *args], capsys)
    assert code == 2 and out == ""
    assert len(err.strip().splitlines()) == 1
    assert err.startswith(f"error: {field}"), err


def test_plan_does_not_conform_exits_1(capsys, tmp_path):
    text = (ROOT / "examples" / "demo-job.toml").read_text("utf-8").replace(
        "depth_capability = 225", "depth_capability = 100")
    plan = tmp_path / "shallow.toml"
    plan.write_text(text, "utf-8")
    code, out, _ = run(["treatment", "plan", "6A", "--start", "08:00", "--plan", str(plan)],
                       capsys)
    assert code == 1 and "verdict: does-not-conform" in out


def test_log_demo(capsys):
    code, out, err = run(["treatment", "log", "examples/demo-treatment.toml",
                          "examples/demo-treatment-events.toml"], capsys)
    assert code == 0, err
    assert "treatment-log-oxygen-period" in out and "verdict: needs-review" in out
    code, out, _ = run(["treatment", "log", "examples/demo-treatment.toml",
                        "examples/demo-treatment-events.toml", "--json"], capsys)
    j = json.loads(out)
    assert j["schema"] == "supervisor.treatment-log/1" and j["verdict"] == "needs-review"
    assert {"rule", "severity", "measured", "limit", "citation"} <= set(j["findings"][0])


def test_log_from_plan_json_and_fail_exit(capsys, tmp_path):
    code, out, _ = run(["treatment", "plan", "6", "--start", "21:40", "--plan",
                        "examples/demo-job.toml", "--attendant-recent-dive",
                        "depth=50,bottom=30,since=4:30", "--json"], capsys)
    planfile = tmp_path / "plan.json"
    planfile.write_text(out, "utf-8")
    events = (ROOT / "examples" / "demo-treatment-events.toml").read_text("utf-8").replace(
        'end = "02:32"', 'end = "02:12"')
    ev = tmp_path / "ev.toml"
    ev.write_text(events, "utf-8")
    code, out, _ = run(["treatment", "log", str(planfile), str(ev)], capsys)
    assert code == 1 and "treatment-log-travel" in out and "does-not-conform" in out


def test_log_bad_events_status_2(capsys, tmp_path):
    ev = tmp_path / "ev.toml"
    ev.write_text('schema = "supervisor.treatment-events/1"\nstart = "08:00"\n', "utf-8")
    code, out, err = run(["treatment", "log", "examples/demo-treatment.toml", str(ev)], capsys)
    assert code == 2 and out == "" and err.startswith("error: EVENTS: steps")
    assert len(err.strip().splitlines()) == 1


def test_help_says_what_each_extension_means():
    # the help text is static; it must agree with the bundled tables' extensions
    for number in ("5", "6", "6A"):
        for e in load_treatment(number).model.conventions.extensions:
            text = _EXT_OXYGEN if e.option == "oxygen" else _EXT_AIR
            assert f"{e.depth:g} fsw" in text and f"up to {e.max_count}" in text
            for p in e.periods:
                assert f"{p.minutes:g} min" in text or f"{p.minutes:g}-min" in text


def test_console_script_subprocess():
    proc = subprocess.run([sys.executable, "-m", "supervisor", "treatment", "plan", "9",
                           "--start", "23:30", "--json"], capture_output=True, text=True,
                          timeout=60, check=False, cwd=ROOT)
    assert proc.returncode == 0, proc.stderr
    assert json.loads(proc.stdout)["end_day"] == 1
