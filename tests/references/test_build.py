"""Tables computed by this project from ZH-L16C: one code path with `supervisor schedule`
in every mode (in-water air, in-water air/oxygen, surface decompression on oxygen),
vectorised, byte-for-byte reproducible, labelled as model output."""

from __future__ import annotations

import json
import tomllib
from dataclasses import replace

import pytest
from typer.testing import CliRunner

from supervisor import __version__
from supervisor.cli import app
from supervisor.engine.schedule import ScheduleRequest, plan_schedule
from supervisor.errors import InputError
from supervisor.references import build as build_mod
from supervisor.references import load_table
from supervisor.references.build import (
    FSW_SPEC,
    MSW_SPEC,
    build_document,
    build_tables,
)
from supervisor.resources import tables_dir


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    out = tmp_path_factory.mktemp("built")
    build_tables(out)
    return out


def test_build_is_byte_reproducible_and_matches_bundled(built, tmp_path):
    build_tables(tmp_path)
    for spec in (FSW_SPEC, MSW_SPEC):
        name = f"{spec.name}.toml"
        assert (built / name).read_bytes() == (tmp_path / name).read_bytes()
        bundled = tables_dir() / "decompression" / name
        assert bundled.read_bytes() == (built / name).read_bytes(), (
            f"{bundled.name} is stale; regenerate with "
            "`supervisor tables build --out-dir tables/decompression --force`")


def _options(spec, mode):
    """`supervisor schedule` options of a build mode (the conventions of the file)."""
    if mode == "air_o2":
        return ["--deco-gas", f"oxygen@{spec.o2_switch:g}", "--o2-air-break",
                f"{spec.o2_air_break[0]:g}/{spec.o2_air_break[1]:g}"]
    if mode == "surd_o2":
        return ["--surface-decompression", f"{spec.surd_leave_water:g}", "--surface-interval",
                f"{spec.surd_interval:g}", "--chamber-depth", f"{spec.chamber_depth:g}",
                "--chamber-second-depth", f"{spec.chamber_second_depth:g}", "--chamber-air-break",
                f"{spec.chamber_air_break[0]:g}/{spec.chamber_air_break[1]:g}"]
    return []


@pytest.mark.parametrize(("spec", "depth", "bt", "mode"), [
    (FSW_SPEC, 100.0, 40.0, "air"),
    (FSW_SPEC, 150.0, 30.0, "air"),
    (FSW_SPEC, 60.0, 90.0, "air"),
    (MSW_SPEC, 30.0, 40.0, "air"),
    (FSW_SPEC, 110.0, 40.0, "air_o2"),
    (FSW_SPEC, 190.0, 40.0, "air_o2"),
    (MSW_SPEC, 30.0, 40.0, "air_o2"),
    (FSW_SPEC, 110.0, 40.0, "surd_o2"),
    (FSW_SPEC, 190.0, 40.0, "surd_o2"),
    (MSW_SPEC, 30.0, 40.0, "surd_o2"),
])
def test_built_row_equals_schedule_command(built, spec, depth, bt, mode):
    t = load_table(built / f"{spec.name}.toml")
    row = next(r for r in t.rows if r.depth == depth and r.bottom_time == bt)
    sched = getattr(row, mode)
    res = CliRunner().invoke(app, [
        "schedule", "--depth", f"{depth:g}", "--bottom-time", f"{bt:g}", "--unit", spec.unit,
        "--gf", "30/85", "--descent-rate", f"{spec.descent_rate:g}",
        "--ascent-rate", f"{spec.ascent_rate:g}", "--stop-step", f"{spec.stop_step:g}",
        "--last-stop", f"{spec.last_stop:g}", *_options(spec, mode), "--json"])
    assert res.exit_code == 0, res.output
    js = json.loads(res.stdout)
    def listed(s):
        # the file lists a chamber stop's oxygen minutes; its air breaks are not stop time
        oxygen = sum(p["minutes"] for p in s["periods"] if p["gas"] == s["gas"])
        return s["depth"], oxygen if s["place"] == "chamber" else s["minutes"], s["gas"], \
            s["place"]

    assert [listed(s) for s in js["stops"]] == \
        [(s.depth, s.minutes, s.gas, s.place) for s in sched.stops]
    assert sched.stops  # these rows are decompression dives
    if mode == "surd_o2":
        assert f"{js['total_ascent_min']:g} min from leaving the bottom" in row.note
        assert sched.chamber_o2_periods == js["chamber_o2_periods"]
        assert {s.place for s in sched.stops} == {"water", "chamber"}
    assert sched.total_ascent == pytest.approx(js["total_ascent_min"], abs=0.006)


def test_build_is_one_batch_per_pass_and_mode(monkeypatch):
    calls = []
    real = build_mod.plan_schedules

    def counting(requests):
        calls.append(len(requests))
        return real(requests)

    monkeypatch.setattr(build_mod, "plan_schedules", counting)
    spec = replace(FSW_SPEC, depths=(40.0, 60.0, 100.0, 150.0))
    rows, _ = build_mod.build_rows(spec)
    # no-stop probe, in-water air, then one batch per further mode over the rows kept
    assert calls[0] == 4 and len(calls) == 4 and calls[1] >= len(rows) > 10
    assert calls[2] == len(rows)
    assert calls[3] == sum(r["depth"] >= spec.chamber_depth for r in rows) < len(rows)


def test_build_layout_and_labels(built):
    for spec in (FSW_SPEC, MSW_SPEC):
        t = load_table(built / f"{spec.name}.toml")
        p = t.model.provenance
        c = t.model.conventions
        assert p.source_status == "COMPUTED" and p.transcribed_on == ""
        assert "not a published table" in t.model.title and "not a published table" in \
            p.source_document
        assert "computed by this project" in t.model.title
        assert c.model.name == "zhl16c"
        assert c.model.coefficient_status in p.edition
        assert {s.source_status for s in t.row_states} == {"COMPUTED"}
        assert t.n_verified == 0
        assert sorted({r.depth for r in t.rows}) == list(spec.depths)
        # the conventions of the oxygen modes are recorded
        assert (c.o2_period_min, c.air_break_min, c.air_breaks_in_stop_time) == (30, 5, True)
        assert (c.chamber_o2_period_min, c.chamber_air_break_min, c.surface_interval_min) == \
            (30, 5, 5)
        assert f"oxygen from the {spec.o2_switch:g} {spec.unit} stop" in c.notes
        assert f"arriving at {spec.chamber_depth:g} {spec.unit} in the chamber" in c.notes
        for r in t.rows:
            assert all(s.depth % spec.stop_step == 0 and s.gas == "air" for s in r.air.stops)
            assert r.air_o2 is not None
            for s in r.air_o2.stops:
                assert s.place == "water"
                assert s.gas == ("oxygen" if s.depth <= spec.o2_switch else "air")
            if r.depth < spec.chamber_depth:
                assert r.surd_o2 is None  # the first chamber stop is within the dive only
                continue
            water = [s for s in r.surd_o2.stops if s.place == "water"]
            chamber = [s for s in r.surd_o2.stops if s.place == "chamber"]
            assert r.surd_o2.stops == water + chamber
            assert all(s.depth >= spec.surd_leave_water and s.gas == "air" for s in water)
            if not r.surd_o2.stops:
                continue
            # the trade's pattern: half a period at the first chamber depth, the rest at the
            # second, whole or half 30-min periods of oxygen (air breaks not stop time)
            periods = r.surd_o2.chamber_o2_periods
            assert periods is not None and periods >= 0.5 and (2 * periods).is_integer()
            want = [(spec.chamber_depth, 15.0)]
            if periods > 0.5:
                want.append((spec.chamber_second_depth, 30 * periods - 15))
            assert [(s.depth, s.minutes) for s in chamber] == want
            assert all(s.gas == "oxygen" for s in chamber)
            assert (r.surd_o2.total_ascent is None) == (not water)
        first = [next(r for r in t.rows if r.depth == d) for d in spec.depths]
        # each depth opens with its no-stop limit: no stops in any mode
        assert all(not s.stops for r in first for s in r.schedules().values())


def test_build_first_row_is_engine_no_stop_limit(built):
    t = load_table(built / f"{FSW_SPEC.name}.toml")
    r = next(r for r in t.rows if r.depth == 100)
    ndl = plan_schedule(ScheduleRequest(depth=100, bottom_time_min=10)).no_stop_limit_min
    assert r.bottom_time == ndl


def test_build_rows_end_after_stop_time_cap(built):
    t = load_table(built / f"{FSW_SPEC.name}.toml")
    cap = FSW_SPEC.max_stop_time
    for d in FSW_SPEC.depths:
        stop = [r.air.stop_minutes for r in t.rows if r.depth == d]
        assert all(s <= cap for s in stop[:-1])
    assert [r.air.stop_minutes for r in t.rows if r.depth == 100][-1] > cap


def test_build_refuses_to_replace_a_different_file(tmp_path):
    spec = replace(FSW_SPEC, depths=(100.0, 110.0))
    build_tables(tmp_path, (spec,))
    path = tmp_path / f"{spec.name}.toml"
    path.write_text(path.read_text("utf-8").replace('verified_by = ""', 'verified_by = "X"', 1),
                    "utf-8")
    before = path.read_bytes()
    with pytest.raises(InputError, match="--force"):
        build_tables(tmp_path, (spec,))
    assert path.read_bytes() == before
    assert build_tables(tmp_path, (spec,), force=True) == [(path, "replaced")]
    assert build_tables(tmp_path, (spec,)) == [(path, "unchanged")]


def test_build_document_has_no_date_or_version():
    doc = build_document(replace(FSW_SPEC, depths=(100.0,)))
    text = json.dumps(doc)
    assert __version__ not in text
    assert tomllib.loads(build_mod.dumps_table(doc)) == doc


def test_a_longer_or_deeper_row_never_lists_less_surface_decompression():
    """Where the model gives a longer or deeper dive less in this mode (its gradient-factor
    line moves with the first stop), the row is raised to its neighbour's, stop by stop,
    and says so; every other row is the engine's (this project's model, no outside table)."""
    spec = replace(FSW_SPEC, depths=(85.0, 90.0, 95.0))
    doc = build_document(spec)
    t = load_table_doc(doc, spec)
    raised = [r for r in t.rows if "surface decompression raised" in r.note]
    assert raised  # 90 fsw / 50 min and 95 fsw / 45 min on this grid
    for r in raised:
        eng = plan_schedule(build_mod._request(spec, r.depth, r.bottom_time, "surd_o2"))
        water = {s.depth: s.minutes for s in eng.stops if s.place == "water"}
        listed = {s.depth: s.minutes for s in r.surd_o2.stops if s.place == "water"}
        assert all(listed.get(d, 0) >= m for d, m in water.items())
        assert r.surd_o2.chamber_o2_periods >= eng.chamber_o2_periods
    for depth in spec.depths:
        rows = [r for r in t.rows if r.depth == depth and r.surd_o2 is not None]
        times = [r.surd_o2.stop_minutes for r in rows]
        assert times == sorted(times)


def load_table_doc(doc, spec):
    from pathlib import Path

    from supervisor.references.loader import inspect_document

    table, issues = inspect_document(doc, Path(f"{spec.name}.toml"), strict=True)
    assert table is not None, issues
    return table
