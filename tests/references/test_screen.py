"""Screening a table through the model: surfacing supersaturation per row, outliers flagged."""

from __future__ import annotations

import copy
import tomllib

import pytest

from supervisor.errors import InputError
from supervisor.references import load_table
from supervisor.references.loader import inspect_document
from supervisor.references.screen import schedule_profile, screen_table
from supervisor.resources import tables_dir
from tests.references._helpers import fixture_path

BUILT = tables_dir() / "decompression" / "zhl16c-gf30-85-air-fsw.toml"


@pytest.fixture(scope="module")
def built_doc():
    return tomllib.loads(BUILT.read_text("utf-8"))


def _index(doc, depth, bt):
    return next(i for i, r in enumerate(doc["rows"]) if r["depth"] == depth
                and r["bottom_time"] == bt)


def test_clean_computed_table_has_no_flag():
    rep = screen_table(load_table(BUILT))
    assert rep.flagged == [] and rep.validation_errors == []
    gfs = [r.surfacing_gf for r in rep.rows]
    assert all(0.5 < g < 1.0 for g in gfs)  # built at GF high 85 %: well under the M-value


def test_three_injected_typos_are_each_flagged(built_doc):
    """A dropped digit, two swapped digits and an extra digit, each at a last stop."""
    doc = copy.deepcopy(built_doc)
    typos = [(80, 100, 52, 5), (70, 70, 21, 12), (40, 300, 48, 84)]
    targets = set()
    for depth, bt, old, new in typos:
        i = _index(doc, depth, bt)
        last = doc["rows"][i]["air"]["stops"][-1]
        assert last["minutes"] == old  # the typo changes the value the build printed
        last["minutes"] = new
        targets.add(i + 1)
    table, _ = inspect_document(doc, strict=False)
    rep = screen_table(table)
    assert {r.row for r in rep.flagged} == targets
    assert all("re-read this row" in r.note for r in rep.flagged)
    assert rep.validation_errors  # the printed totals no longer add up either


def test_longer_last_stop_lowers_surfacing_supersaturation(built_doc):
    doc = copy.deepcopy(built_doc)
    i = _index(doc, 100, 40)
    table, _ = inspect_document(doc, strict=False)
    before = screen_table(table).rows[i].surfacing_gf
    doc["rows"][i]["air"]["stops"][-1]["minutes"] += 30
    table, _ = inspect_document(doc, strict=False)
    assert screen_table(table).rows[i].surfacing_gf < before


def test_no_stop_table_screening():
    t = load_table("usn-rev7-air-ndl")
    rep = screen_table(t)
    assert [r.note for r in rep.rows[:3]] == ["unlimited: not screened"] * 3
    assert all(r.surfacing_gf is not None for r in rep.rows[3:])
    assert rep.flagged == []
    doc = copy.deepcopy(t.raw)
    doc["rows"][10]["no_stop_limit"] = 36  # 63 min at 60 fsw with its digits swapped
    table, _ = inspect_document(doc, strict=False)
    rep = screen_table(table)
    assert [r.row for r in rep.flagged] == [11]


def test_profile_follows_conventions_with_air_breaks():
    t = load_table(fixture_path("decompression"))
    row = t.rows[2]  # 60 fsw / 80 min; air/O2 has 40 min of oxygen at 10 fsw
    prof = schedule_profile(t, row, "air_o2", descent_rate=60.0)
    breaks = [s for s in prof.segments if s.label == "air break"]
    assert len(breaks) == 1 and breaks[0].minutes == 5 and breaks[0].gas.name == "air"
    assert prof.duration_min == pytest.approx(row.bottom_time + row.air_o2.total_ascent, abs=0.5)
    o2 = sum(s.minutes for s in prof.segments if s.gas.name == "oxygen" and s.label == "stop")
    assert o2 == 40


def test_surface_decompression_rows_not_screened():
    rep = screen_table(load_table(fixture_path("decompression")))
    surd = [r for r in rep.rows if r.mode == "surd_o2"]
    assert len(surd) == 1 and surd[0].surfacing_gf is None and "not screened" in surd[0].note


def test_screen_refusals():
    with pytest.raises(InputError, match="no-stop and decompression"):
        screen_table(load_table(fixture_path("limits")))
    t = load_table(fixture_path("no_stop"))
    with pytest.raises(InputError, match="--tolerance"):
        screen_table(t, tolerance=0)
    with pytest.raises(InputError, match="--descent-rate"):
        screen_table(t, descent_rate=-1.0)
