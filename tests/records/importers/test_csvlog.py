"""Import of a depth recorder's CSV: units declared, handled oddities, refused input.

Expected values are worked by hand from the small logs written in each test
(arithmetic on the samples); the spike and gap thresholds are the importer's
own stated choices (see ``supervisor.records.importers.csvlog``).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from supervisor.records.importers.common import MAX_LOG_BYTES, LogError
from supervisor.records.importers.csvlog import CsvOptions, read_csv_log


def _write(tmp_path: Path, text: str | bytes, name: str = "log.csv") -> Path:
    p = tmp_path / name
    p.write_bytes(text if isinstance(text, bytes) else text.encode())
    return p


GOOD = "# fictional recorder log\ntime_s,depth_fsw,gas,temperature_c\n0,0,air,14.0\n" + "".join(
    f"{t},60,air,13.0\n" for t in range(60, 661, 60)) + "720,30,air,13.0\n780,0,air,14.0\n"


def test_good_log_gives_the_profile(tmp_path: Path) -> None:
    log = read_csv_log(_write(tmp_path, GOOD))
    p = log.profile
    assert p.unit == "fsw" and len(p.segments) == 13
    assert p.duration_min == pytest.approx(13.0)        # 780 s
    assert log.max_depth == 60
    assert p.segments[0].rate == pytest.approx(60.0)     # 60 fsw in 60 s
    # leaving the surface at 0 s, last sample deeper than 30 fsw (half of 60) at 660 s
    assert log.bottom_time_min == pytest.approx(11.0)
    assert log.issues == []
    assert log.temperature_c[0] == [0.0, 14.0]
    assert log.source.format == "csv" and len(log.source.sha256) == 64


def test_units_from_a_units_line_or_an_option(tmp_path: Path) -> None:
    text = "# units: time=min depth=msw\ntime,depth\n0,0\n1,10\n20,10\n21,0\n"
    log = read_csv_log(_write(tmp_path, text), CsvOptions(gas="nitrox32"))
    assert log.profile.unit == "msw" and log.profile.duration_min == pytest.approx(21)
    assert log.profile.segments[0].gas.fo2 == pytest.approx(0.32)
    log2 = read_csv_log(_write(tmp_path, "time,depth\n0,0\n60,33\n120,0\n"),
                        CsvOptions(depth_unit="fsw", time_unit="s", gas="air"))
    assert log2.max_depth == 33


def test_clock_times_and_any_interval(tmp_path: Path) -> None:
    text = ("clock,depth_m,gas\n2031-05-14T09:00:00,0,air\n2031-05-14T09:00:07,3,air\n"
            "2031-05-14T09:01:00,10,air\n2031-05-14T09:20:00,10,air\n"
            "2031-05-14T09:21:00,0,air\n")
    log = read_csv_log(_write(tmp_path, text))
    assert log.started_at.isoformat() == "2031-05-14T09:00:00"
    assert log.profile.duration_min == pytest.approx(21.0)
    assert log.profile.unit == "m"


def test_duplicates_gaps_and_spikes_are_handled_and_reported(tmp_path: Path) -> None:
    rows = ["time_s,depth_fsw,gas"] + [f"{t},{d},air" for t, d in [
        (0, 0), (10, 10), (20, 20), (20, 21), (30, 30), (40, 90), (50, 30), (60, 30),
        (70, 30), (200, 30), (210, 20), (220, 10), (230, 0)]]
    log = read_csv_log(_write(tmp_path, "\n".join(rows) + "\n"))
    kinds = [(i.kind, i.line) for i in log.issues]
    assert ("duplicate", 5) in kinds          # 20 s twice: the deeper (21) kept
    assert ("spike", 7) in kinds              # 90 fsw for one sample: 360 fsw/min out and back
    assert ("gap", 11) in kinds               # 130 s without samples against a 10 s interval
    assert log.max_depth == 30                # the spike was replaced by 30 (its neighbours)
    assert log.profile.segments[1].end_depth == 21


def test_surface_offset_is_taken_as_zero(tmp_path: Path) -> None:
    log = read_csv_log(_write(tmp_path, "time_s,depth_msw,gas\n0,-0.4,air\n60,10,air\n"
                                        "120,0,air\n"))
    assert log.profile.segments[0].start_depth == 0.0
    assert log.issues[0].kind == "surface-offset"


BAD = [
    ("time_s,depth_fsw,gas\n0,0,air\n-5,10,air\n", 3, "negative time"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,10,air\n30,20,air\n", 4, "unsorted times"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,deep,air\n", 3, "not a number"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,nan,air\n", 3, "not a finite number"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,5000,air\n", 3, "absurd"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,-20,air\n", 3, "absurd"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,10 m,air\n", 3, "mixed units"),
    ("# units: depth=msw\ntime_s,depth_fsw,gas\n0,0,air\n60,10,air\n", 2, "mixed units"),
    ("time_s,depth_fsw,gas\n0,0,air\n# units: depth=m\n60,10,air\n", 3, "mixed units"),
    ("time_s,depth,gas\n0,0,air\n60,10,air\n", 1, "depth unit is not declared"),
    ("time,depth_fsw,gas\n0,0,air\n60,10,air\n", 1, "time unit is not declared"),
    ("time_s,depth_fsw\n0,0\n60,10\n", 1, "breathing gas is not given"),
    ("time_s,depth_fsw,gas\n0,0,argon\n60,10,air\n", 2, "gas"),
    ("time_s,depth_fsw,gas\n0,0,air\n60,10\n", 3, "2 fields"),
    ("time_s,depth_fsw,gas\n", 1, "no samples"),
    ("time_s,depth_fsw,gas\n0,0,air\n", 2, "only one sample"),
    ("", 1, "empty"),
    ("\n\n  \n", 1, "empty"),
    ("time_s,height_fsw\n0,0\n", 1, "not known"),
    ("time_s,depth_fsw,gas,temperature_c\n0,0,air,12\n60,10,air,99\n", 3, "absurd"),
    (b"time_s,depth_fsw,gas\n0,0,air\n\x00\x01\x02\xff\xfe", 3, "binary"),
    (b"time_s,depth_fsw,gas\n0,0,air\n\xff\xd8\xff\xe0 JFIF", 3, "not UTF-8"),
    (b"time_s,depth_fsw,gas\n0,0,air\n\x1b[31m60,10,air\n", 3, "control character"),
]


@pytest.mark.parametrize(("text", "line", "words"), BAD)
def test_bad_input_names_the_file_line_and_problem(tmp_path: Path, text: str | bytes,
                                                   line: int, words: str) -> None:
    path = _write(tmp_path, text)
    with pytest.raises(LogError) as exc:
        read_csv_log(path)
    assert exc.value.line == line
    assert words in str(exc.value)
    assert str(exc.value).startswith(f"{path}, line {line}: ")
    assert "\n" not in str(exc.value)


def test_option_that_contradicts_the_header_is_mixed_units(tmp_path: Path) -> None:
    with pytest.raises(LogError, match="mixed units"):
        read_csv_log(_write(tmp_path, GOOD), CsvOptions(depth_unit="msw"))


def test_a_file_far_larger_than_any_log_is_refused_unread(tmp_path: Path) -> None:
    path = tmp_path / "huge.csv"
    line = b"123456,12.5,air,12.0\n"
    with path.open("wb") as fh:
        fh.write(b"time_s,depth_fsw,gas,temperature_c\n")
        fh.write(line * (MAX_LOG_BYTES // len(line) + 10))
    with pytest.raises(LogError, match="MiB") as exc:
        read_csv_log(path)
    assert exc.value.line > 1_000_000
