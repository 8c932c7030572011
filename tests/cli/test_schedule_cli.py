"""Tests of the ``supervisor schedule`` command: options, JSON keys and exit codes."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from supervisor.cli import main

CONTRACT = [
    "--depth", "100", "--unit", "fsw", "--bottom-time", "30", "--gas", "air", "--model", "zhl16c",
    "--gf", "30/85", "--descent-rate", "75", "--ascent-rate", "30", "--stop-step", "10",
    "--last-stop", "10",
]


def run(args, capsys):
    with pytest.raises(SystemExit) as exc:
        main(["schedule", *args])
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


def test_contract_command_json(capsys):
    code, out, err = run([*CONTRACT, "--deco-gas", "oxygen@20", "--json"], capsys)
    assert code == 0, err
    js = json.loads(out)
    assert js["schema"] == "supervisor.schedule/1"
    assert js["unit"] == "fsw"
    for key in ("no_stop_limit_min", "stops", "total_stop_min", "total_ascent_min", "oxygen",
                "conventions"):
        assert key in js
    assert js["stops"] and js["stops"][0]["depth"] > js["stops"][-1]["depth"]
    assert {s["gas"] for s in js["stops"] if s["depth"] <= 20} == {"oxygen"}
    assert js["oxygen"]["cns_percent"] > 0 and js["oxygen"]["otu"] > 0
    assert js["total_stop_min"] == sum(s["minutes"] for s in js["stops"])


def test_human_table(capsys):
    code, out, _ = run(CONTRACT, capsys)
    assert code == 0
    assert "no-stop limit: " in out and "10 fsw" in out and "not a published table" in out


def test_no_stop_dive_has_empty_stops(capsys):
    code, out, _ = run(["--depth", "40", "--bottom-time", "20", "--json"], capsys)
    js = json.loads(out)
    assert code == 0 and js["stops"] == [] and js["total_stop_min"] == 0
    assert isinstance(js["no_stop_limit_min"], int)


def test_unlimited_no_stop_is_null(capsys):
    code, out, _ = run(["--depth", "10", "--bottom-time", "300", "--json"], capsys)
    assert code == 0 and json.loads(out)["no_stop_limit_min"] is None


def test_msw(capsys):
    code, out, _ = run(["--depth", "30", "--unit", "msw", "--bottom-time", "30", "--json"], capsys)
    js = json.loads(out)
    assert code == 0 and js["unit"] == "msw"
    assert all(s["depth"] % 3 == 0 for s in js["stops"])


@pytest.mark.parametrize(
    ("args", "option"),
    [
        (["--depth", "-10", "--bottom-time", "30"], "--depth"),
        (["--depth", "0", "--bottom-time", "30"], "--depth"),
        (["--depth", "100", "--bottom-time", "1"], "--bottom-time"),
        (["--depth", "100", "--bottom-time", "30", "--gf", "0/85"], "--gf"),
        (["--depth", "100", "--bottom-time", "30", "--gf", "90/40"], "--gf"),
        (["--depth", "100", "--bottom-time", "30", "--gf", "30-85"], "--gf"),
        (["--depth", "100", "--bottom-time", "30", "--gas", "80/40"], "--gas"),
        (["--depth", "100", "--bottom-time", "30", "--model", "foo"], "--model"),
        (["--depth", "abc", "--bottom-time", "30"], "--depth"),
        (["--depth", "100", "--bottom-time", "30", "--unit", "furlong"], "--unit"),
        (["--depth", "100", "--bottom-time", "30", "--deco-gas", "oxygen"], "--deco-gas"),
    ],
)
def test_bad_input_exit_2_one_line(args, option, capsys):
    code, out, err = run(args, capsys)
    assert code == 2
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and option in lines[0]


def test_cannot_clear_is_a_clear_message(capsys):
    code, _, err = run(["--depth", "100", "--bottom-time", "60", "--last-stop", "20",
                        "--gf", "30/70"], capsys)
    assert code == 2
    assert "never clear" in err and "compartment 16" in err


def test_console_script_subprocess():
    """One run of the installed console entry point in a subprocess."""
    proc = subprocess.run([sys.executable, "-m", "supervisor", "schedule", *CONTRACT, "--json"],
                          capture_output=True, text=True, timeout=60, check=False)
    assert proc.returncode == 0, proc.stderr
    assert json.loads(proc.stdout)["schema"] == "supervisor.schedule/1"


def test_altitude_out_of_range(capsys):
    code, _, err = run(["--depth", "100", "--bottom-time", "30", "--altitude", "-1000"], capsys)
    assert code == 2 and err.startswith("error: --altitude:")


def test_surface_decompression_shows_the_interval(capsys):
    code, out, _ = run(["--depth", "100", "--bottom-time", "60", "--surface-decompression",
                        "40"], capsys)
    assert code == 0
    assert "surface interval: peak supersaturation" in out and "warning:" in out
    assert "chamber" in out


def test_help_keeps_units_in_brackets(capsys):
    with pytest.raises(SystemExit):
        main(["schedule", "--help"])
    assert "[min]" in capsys.readouterr().out


# ---- issue 13: every option given is validated, or refused as not applicable ---------------

SURD_ONLY = ["--surface-interval", "--chamber-depth", "--chamber-compression-rate",
             "--chamber-air-break", "--chamber-second-depth"]


@pytest.mark.parametrize("value", ["nan", "-1", "50"])
@pytest.mark.parametrize("option", SURD_ONLY)
def test_surface_decompression_option_without_it_is_refused(capsys, option, value):
    """Reproducer: `--chamber-compression-rate nan` or `-1` without
    --surface-decompression gave exit 0."""
    value = "30/5" if option == "--chamber-air-break" else value
    code, out, err = run([*CONTRACT, option, value], capsys)
    assert code == 2 and out == ""
    assert err.startswith(f"error: {option}: ") and "--surface-decompression" in err
    assert err.count("\n") == 1


@pytest.mark.parametrize(("option", "value"), [
    ("--chamber-compression-rate", "nan"), ("--chamber-compression-rate", "-1"),
    ("--chamber-compression-rate", "0.5"), ("--surface-interval", "nan"),
    ("--chamber-depth", "nan"), ("--chamber-air-break", "0/5"),
    ("--chamber-second-depth", "nan"), ("--chamber-second-depth", "60"),
    ("--chamber-second-depth", "0"),
])
def test_surface_decompression_options_are_checked(capsys, option, value):
    code, _, err = run([*CONTRACT, "--surface-decompression", "40", option, value], capsys)
    assert code == 2 and err.startswith(f"error: {option}: "), err


@pytest.mark.parametrize(("option", "value", "words"), [
    ("--ascent-rate", "0.0001", "expected a rate from 1 to 300 fsw/min"),
    ("--descent-rate", "nan", "expected a rate from 1 to 300 fsw/min"),
    ("--descent-rate", "1000", "expected a rate from 1 to 300 fsw/min"),
    ("--stop-step", "0.001", "expected a step from 1 to 1000 fsw"),
    ("--deco-gas", "oxygen@nan", "expected a number such as 20"),
])
def test_meaningless_rates_and_steps(capsys, option, value, words):
    args = [a for a in CONTRACT]
    if option in args:
        i = args.index(option)
        args[i + 1] = value
    else:
        args += [option, value]
    code, _, err = run(args, capsys)
    assert code == 2 and err.startswith(f"error: {option}: ") and words in err, err


def test_msw_rate_range(capsys):
    code, _, err = run(["--depth", "30", "--unit", "msw", "--bottom-time", "20",
                        "--ascent-rate", "0.2"], capsys)
    assert code == 2 and "expected a rate from 0.3 to 92.1 msw/min" in err


def test_surface_decompression_defaults_still_apply(capsys):
    code, out, err = run([*CONTRACT, "--surface-decompression", "40", "--json"], capsys)
    assert code == 0, err
    assert any(s["place"] == "chamber" for s in json.loads(out)["stops"])


def test_obligation_beyond_the_planner_is_one_line(capsys):
    """A schedule needing more than two days of stops is not searched for ever."""
    code, out, err = run(["--depth", "300", "--bottom-time", "600", "--gf", "30/85"], capsys)
    assert code == 2 and out == ""
    assert "beyond the model's range: not computed" in err and err.count("\n") == 1


# ---- issue 8: air breaks are visible; the chamber follows the trade's pattern -----------


def test_oxygen_stop_prints_its_periods(capsys):
    args = ["--depth", "130", "--bottom-time", "150", "--deco-gas", "oxygen@30",
            "--o2-air-break", "30/5"]
    code, out, err = run(args, capsys)
    assert code == 0, err
    line = next(x for x in out.splitlines() if x.strip().startswith("10 fsw"))
    assert "oxygen" in line and "air 5" in line and "O2 30" in line  # never one oxygen line
    code, out, err = run([*args, "--json"], capsys)
    js = json.loads(out)
    for stop in js["stops"]:  # the contract: every stop has its periods, in order
        assert [set(p) for p in stop["periods"]] == [{"gas", "minutes"}] * len(stop["periods"])
        assert sum(p["minutes"] for p in stop["periods"]) == pytest.approx(stop["minutes"])
    assert any(len(s["periods"]) > 1 for s in js["stops"])


@pytest.mark.parametrize(("unit", "depth", "first", "second"), [
    ("fsw", "130", 50, 40), ("msw", "40", 15, 12)])
def test_surface_decompression_chamber_pattern(capsys, unit, depth, first, second):
    code, out, err = run(["--depth", depth, "--unit", unit, "--bottom-time", "90",
                          "--surface-decompression", "40" if unit == "fsw" else "12", "--json"],
                         capsys)
    assert code == 0, err
    js = json.loads(out)
    chamber = [s for s in js["stops"] if s["place"] == "chamber"]
    assert [s["depth"] for s in chamber] == [first, second]
    assert chamber[0]["periods"] == [{"gas": "oxygen", "minutes": 15}]
    assert {"gas": "air", "minutes": 5} in chamber[1]["periods"]
    o2 = sum(p["minutes"] for s in chamber for p in s["periods"] if p["gas"] == "oxygen")
    assert o2 == 30 * js["chamber_o2_periods"]
    assert js["surface_decompression"]["chamber_depths"] == [first, second]
    assert "from memory" in js["surface_decompression"]["pattern"]
    code, out, err = run(["--depth", depth, "--unit", unit, "--bottom-time", "90",
                          "--surface-decompression", "40" if unit == "fsw" else "12"], capsys)
    assert f"chamber oxygen: {js['chamber_o2_periods']:g} period(s) of 30 min" in out
    assert "O2 15, air 5" in out


def test_chamber_depth_shallower_than_the_default_second_keeps_one_depth(capsys):
    code, out, err = run([*CONTRACT, "--bottom-time", "60", "--surface-decompression", "40",
                          "--chamber-depth", "30", "--json"], capsys)
    assert code == 0, err
    assert {s["depth"] for s in json.loads(out)["stops"] if s["place"] == "chamber"} == {30}
