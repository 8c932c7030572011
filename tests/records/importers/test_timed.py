"""Import of the supervisor's timed log (TOML): profile, bottom time, refused input.

The bottom time follows 29 CFR 1910.402 (from leaving the surface to the
start of the ascent); the expected minutes are the differences of the clock
times written in each log (arithmetic, by hand).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from supervisor.records.importers.common import LogError
from supervisor.records.importers.timed import log_json_schema, read_timed_log

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "examples" / "logs" / "demo-d2-log.toml"

HEAD = """\
schema = "supervisor-log/1"
dive = "D1"
diver = "Ada Fenwick"
date = 2031-05-14
unit = "fsw"
gas = "air"
table = "fictional-table"
schedule = { depth = 60, bottom_time_min = 50 }
repetitive_group = "C"
"""


def _ev(at: str, event: str, **kw: object) -> str:
    extra = "".join(f"{k} = {v!r}\n" if isinstance(v, str) else f"{k} = {v}\n"
                    for k, v in kw.items())
    return f"\n[[events]]\nat = {at}\nevent = \"{event}\"\n{extra}"


NO_STOP = HEAD + _ev("09:00:00", "left-surface") + _ev("09:02:00", "reached-bottom", depth=58) \
    + _ev("09:45:00", "left-bottom", depth=60) + _ev("09:47:00", "reached-surface")


def _write(tmp_path: Path, text: str | bytes) -> Path:
    p = tmp_path / "log.toml"
    p.write_bytes(text if isinstance(text, bytes) else text.encode())
    return p


def test_no_stop_dive(tmp_path: Path) -> None:
    log = read_timed_log(_write(tmp_path, NO_STOP))
    assert log.bottom_time_min == pytest.approx(45.0)      # 09:00 to 09:45
    assert log.max_depth == 60
    assert log.started_at.isoformat() == "2031-05-14T09:00:00"
    assert [s.label for s in log.profile.segments] == ["descent", "bottom", "ascent"]
    assert log.profile.duration_min == pytest.approx(47.0)
    assert log.meta["repetitive_group"] == "C"
    assert [e["event"] for e in log.events][0] == "left-surface"


def test_demo_surface_decompression_log() -> None:
    log = read_timed_log(DEMO)
    assert log.bottom_time_min == pytest.approx(40.0)      # 10:15 to 10:55
    assert log.max_depth == 110
    # left the 40 fsw stop 11:02:20, chamber at 50 fsw 11:06:10
    assert log.meta["surface_interval_min"] == pytest.approx(3 + 50 / 60)
    segs = log.profile.segments
    stop40 = [s for s in segs if s.place == "water" and s.label == "stop" and s.end_depth == 40]
    assert stop40[0].minutes == pytest.approx(2.0)        # 11:00:20 to 11:02:20
    chamber_o2 = sum(s.minutes for s in segs if s.place == "chamber" and s.gas.fo2 == 1.0)
    assert chamber_o2 == pytest.approx(30.0 + 20 / 60 + 80 / 60)   # stops + travel on oxygen
    assert {s.place for s in segs} == {"water", "surface", "chamber"}


def test_gas_switch_at_a_stop(tmp_path: Path) -> None:
    text = HEAD + _ev("09:00:00", "left-surface") + _ev("09:03:00", "reached-bottom", depth=90) \
        + _ev("09:33:00", "left-bottom") + _ev("09:35:00", "arrived-stop", depth=20) \
        + _ev("09:35:00", "gas-switch", gas="oxygen") + _ev("09:50:00", "left-stop") \
        + _ev("09:51:00", "reached-surface")
    log = read_timed_log(_write(tmp_path, text))
    stop = [s for s in log.profile.segments if s.label == "stop"][0]
    assert stop.gas.fo2 == 1.0 and stop.minutes == pytest.approx(15.0)


BAD = [
    (NO_STOP.replace("09:45:00", "08:45:00"), "unsorted times", "at = 08:45:00"),
    (NO_STOP.replace("depth = 58", "depth = 5000"), "absurd", "depth = 5000"),
    (NO_STOP.replace("depth = 58", 'depth = "deep"'), "expected a number", 'depth = "deep"'),
    (NO_STOP.replace("depth = 58", 'depth = "18 m"'), "mixed units", 'depth = "18 m"'),
    (NO_STOP.replace("depth = 58", "depth = -3"), ">= 0", "depth = -3"),
    (NO_STOP.replace('event = "reached-bottom"', 'event = "left-stop"'), "cannot follow",
     'event = "left-stop"'),
    (NO_STOP.replace('event = "reached-surface"', 'event = "arrived-stop"\ndepth = 10'),
     "does not end at the surface", 'event = "arrived-stop"'),
    (NO_STOP.replace('repetitive_group = "C"\n', ""), "repetitive_group",
     'schema = "supervisor-log/1"'),
    (NO_STOP.replace('unit = "fsw"', 'unit = "furlongs"'), "unit", 'unit = "furlongs"'),
    (NO_STOP.replace("event = \"left-surface\"", "event = \"jumped\""), "event",
     'event = "jumped"'),
    (NO_STOP + "\nnot toml at all\n", "not valid TOML", "not toml at all"),
    ("", "empty", None),
    ("\x00\x00binary", "binary", None),
]


@pytest.mark.parametrize(("text", "words", "line_text"), BAD)
def test_bad_input_names_the_file_line_and_problem(tmp_path: Path, text: str, words: str,
                                                   line_text: str | None) -> None:
    path = _write(tmp_path, text)
    with pytest.raises(LogError) as exc:
        read_timed_log(path)
    msg = str(exc.value)
    assert words in msg
    assert msg.startswith(f"{path}, line {exc.value.line}: ") and "\n" not in msg
    if line_text is not None:
        assert text.splitlines()[exc.value.line - 1].strip() == line_text


def test_schema_is_json_schema_of_the_log() -> None:
    s = log_json_schema()
    assert s["$id"] == "urn:supervisor:schema:supervisor-log/1"
    assert "events" in s["properties"] and "events" in s["required"]
