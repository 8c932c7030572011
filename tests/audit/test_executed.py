"""The executed profile from a log (supervisor.audit.executed).

The expected depth of a metre log in fsw is the project's own conversion
(supervisor.units.convert_depth, salt water); the events of the demo D2 timed
log are that file's clock times.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from supervisor.audit import from_samples
from supervisor.audit.run import item_from_log
from supervisor.errors import InputError
from supervisor.records.importers import read_log
from supervisor.units import convert_depth
from tests.audit._logs import ROOT, d2_full

D2 = ROOT / "examples" / "logs" / "demo-d2-log.toml"


def test_timed_log_events_and_places(demo):
    it = item_from_log(demo, read_log(D2))
    ex = it.ex
    assert it.dive == "D2" and ex.source == "toml"
    assert ex.events["left_bottom"] == 40.0
    assert ex.events["chamber_at_depth"] - ex.events["left_last_water_stop"] == \
        pytest.approx(3 + 50 / 60)
    assert set(ex.place) == {"water", "surface", "chamber"} and ex.surface_interval.any()
    assert ex.max_depth == 110.0 and ex.bottom_time_min == 40.0


def test_recorder_log_in_metres_is_converted_to_the_plan_unit(demo, tmp_path: Path):
    log = tmp_path / "D1-m.csv"
    rows = ["time_s,depth_m,gas"] + [f"{k * 10},{min(k, 15)},air" for k in range(0, 300)]
    rows += [f"{3000 + k * 10},{max(15 - k, 0)},air" for k in range(1, 20)]
    log.write_text("\n".join(rows) + "\n", encoding="utf-8")
    ex = item_from_log(demo, read_log(log), "D1").ex
    want = float(convert_depth(15.0, "m", "fsw", "salt"))
    assert ex.unit == "fsw" and ex.max_depth == pytest.approx(want)


def test_recorder_log_of_surface_decompression_infers_deck_and_chamber(demo):
    ex = d2_full(demo)
    assert ex.chamber_inferred and "chamber" in set(ex.place) and "surface" in set(ex.place)
    assert ex.events["left_last_water_stop"] < ex.events["reached_surface"] < \
        ex.events["chamber_at_depth"]
    # the interval is outside the ceiling check
    a = ex.arrays()
    assert not a.inside[ex.surface_interval].any()


def test_from_samples_refuses_bad_arrays():
    with pytest.raises(InputError, match="strictly increasing"):
        from_samples(np.array([0.0, 1.0, 1.0]), np.array([0.0, 5.0, 5.0]))
    with pytest.raises(InputError, match=">= 0"):
        from_samples(np.array([0.0, 1.0]), np.array([0.0, -5.0]))


def test_item_from_log_refuses_an_unknown_dive(demo):
    csv = read_log(ROOT / "examples" / "logs" / "demo-d1-recorder.csv")
    with pytest.raises(InputError, match="D1, D2, D3"):
        item_from_log(demo, csv, "D7")
    with pytest.raises(InputError, match="names no dive"):
        item_from_log(demo, csv, None)
