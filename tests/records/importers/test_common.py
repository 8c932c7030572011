"""Safe reading of log files, the bottom-time rule of sampled logs, the format choice.

The bottom time follows 29 CFR 1910.402 (leaving the surface to the start of
ascent) by the importer's own, stated rule; expected minutes are worked by hand.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from supervisor.errors import InputError
from supervisor.records.importers import log_format
from supervisor.records.importers.common import LogError, derived_bottom_time, read_log_text


def test_read_log_text_strips_a_byte_order_mark_and_hashes_the_bytes(tmp_path: Path) -> None:
    import hashlib

    p = tmp_path / "a.csv"
    raw = "\ufefftime_s,depth_fsw\r\n0,0\r\n".encode()
    p.write_bytes(raw)
    text, src = read_log_text(p, "csv")
    assert text.startswith("time_s") and src.sha256 == hashlib.sha256(raw).hexdigest()
    assert src.bytes == len(raw) and src.file == "a.csv"


def test_size_limit_names_the_line_where_it_is_passed(tmp_path: Path) -> None:
    p = tmp_path / "b.csv"
    p.write_bytes(b"0123456789\n" * 10)
    with pytest.raises(LogError, match="passes 0 MiB") as exc:
        read_log_text(p, "csv", limit=55)
    assert exc.value.line == 6           # 55 bytes hold five full lines of 11


def test_folder_and_missing_file(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="is a folder"):
        read_log_text(tmp_path, "csv")
    with pytest.raises(InputError, match="cannot read"):
        read_log_text(tmp_path / "none.csv", "csv")


def test_derived_bottom_time() -> None:
    t = np.array([0.0, 2.0, 3.0, 30.0, 32.0, 40.0, 45.0])
    d = np.array([0.0, 0.0, 60.0, 60.0, 28.0, 10.0, 0.0])
    bt, basis = derived_bottom_time(t, d, "fsw")
    assert bt == pytest.approx(28.0)     # last surface sample at 2 min, last > 30 fsw at 30 min
    assert "half the maximum depth" in basis
    assert derived_bottom_time(t, np.zeros_like(t), "fsw")[0] is None


def test_log_format() -> None:
    assert log_format(Path("x.CSV")) == "csv" and log_format(Path("x.toml")) == "toml"
    assert log_format(Path("x.log"), "csv") == "csv"
    with pytest.raises(InputError, match="--format"):
        log_format(Path("x.log"))
    with pytest.raises(InputError, match="--format"):
        log_format(Path("x.csv"), "xml")
