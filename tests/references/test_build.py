"""Tables computed by this project from ZH-L16C: one code path with `supervisor schedule`,
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
from supervisor.references.build import FSW_SPEC, MSW_SPEC, build_document, build_tables
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


@pytest.mark.parametrize(("spec", "depth", "bt"), [
    (FSW_SPEC, 100.0, 40.0),
    (FSW_SPEC, 150.0, 30.0),
    (FSW_SPEC, 60.0, 90.0),
    (MSW_SPEC, 30.0, 40.0),
])
def test_built_row_equals_schedule_command(built, spec, depth, bt):
    t = load_table(built / f"{spec.name}.toml")
    row = next(r for r in t.rows if r.depth == depth and r.bottom_time == bt)
    res = CliRunner().invoke(app, [
        "schedule", "--depth", f"{depth:g}", "--bottom-time", f"{bt:g}", "--unit", spec.unit,
        "--gf", "30/85", "--descent-rate", f"{spec.descent_rate:g}",
        "--ascent-rate", f"{spec.ascent_rate:g}", "--stop-step", f"{spec.stop_step:g}",
        "--last-stop", f"{spec.last_stop:g}", "--json"])
    assert res.exit_code == 0, res.output
    js = json.loads(res.stdout)
    assert [(s["depth"], s["minutes"], s["gas"]) for s in js["stops"]] == \
        [(s.depth, s.minutes, s.gas) for s in row.air.stops]
    assert row.air.total_ascent == pytest.approx(js["total_ascent_min"], abs=0.006)
    assert row.air.stops  # these rows are decompression dives


def test_build_is_one_batch_per_pass(monkeypatch):
    calls = []
    real = build_mod.plan_schedules

    def counting(requests):
        calls.append(len(requests))
        return real(requests)

    monkeypatch.setattr(build_mod, "plan_schedules", counting)
    spec = replace(FSW_SPEC, depths=(60.0, 100.0, 150.0))
    rows, _ = build_mod.build_rows(spec)
    assert calls[0] == 3 and len(calls) == 2 and calls[1] >= len(rows) > 10


def test_build_layout_and_labels(built):
    for spec in (FSW_SPEC, MSW_SPEC):
        t = load_table(built / f"{spec.name}.toml")
        p = t.model.provenance
        assert p.source_status == "COMPUTED" and p.transcribed_on == ""
        assert "not a published table" in t.model.title and "not a published table" in \
            p.source_document
        assert t.model.conventions.model.name == "zhl16c"
        assert t.model.conventions.model.coefficient_status in p.edition
        assert {s.source_status for s in t.row_states} == {"COMPUTED"}
        assert t.n_verified == 0
        assert sorted({r.depth for r in t.rows}) == list(spec.depths)
        for r in t.rows:
            assert all(s.depth % spec.stop_step == 0 and s.gas == "air" for s in r.air.stops)
        first = [next(r for r in t.rows if r.depth == d) for d in spec.depths]
        assert all(not r.air.stops for r in first)  # each depth opens with its no-stop limit


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
