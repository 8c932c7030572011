"""The wait before an ascent to altitude after diving (supervisor.analysis.altitude).

Expected minimums: 12 h after a single no-stop dive, 18 h after repetitive dives or
several days of diving, 24 h after a decompression dive.  These are common guidance
on flying after diving, recalled FROM MEMORY (thought to follow the Divers Alert
Network Flying After Recreational Diving Workshop, 2002, for 12 h and 18 h; commercial
practice for 24 h); no outside source confirms them here, so the test checks the
bundled table against that stated guidance, labelled as such.  Other expected values
are the project's own rules (which minimum applies, the timing arithmetic).
"""

from __future__ import annotations

import copy
import datetime as _dt
import sys
import tomllib
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "rules"))
from _engine_plans import context, data, second_dive, uncomputed  # noqa: E402

from supervisor import analysis as an  # noqa: E402
from supervisor.analysis import altitude as alt  # noqa: E402
from supervisor.check import run_check  # noqa: E402
from supervisor.plan import plan_from_dict  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]

#: Common guidance on flying after diving, from memory (see the module docstring).
GUIDANCE_FROM_MEMORY_H = {"single-no-stop": 12.0, "repetitive": 18.0, "decompression": 24.0}


def test_minimums_vs_common_guidance_from_memory():
    """The bundled minimums are the common guidance (from memory), marked FROM MEMORY."""
    got = alt.load_minimums()
    assert {k: m.hours for k, m in got.items()} == GUIDANCE_FROM_MEMORY_H
    for m in got.values():
        assert m.source_status == "FROM MEMORY" and not m.verified
        assert "from memory" in m.citation
    ref = alt.table_reference()
    assert (ref["name"], ref["source_status"]) == ("altitude-after-diving", "FROM MEMORY")


def _waits(d):
    ctx = context(d)
    return ctx, {w.diver: w for w in alt.for_context(ctx)}


def test_single_dive_takes_the_single_dive_minimum():
    _, w = _waits(data())
    assert (w["Dana Diver"].basis, w["Dana Diver"].hours) == ("single-no-stop", 12.0)
    assert w["Dana Diver"].model_cabin_min is None  # the model's shorter time is not kept


def test_two_dives_take_the_repetitive_minimum():
    _, w = _waits(second_dive(data(), surface_interval_min=900, previous_dive="D1"))
    assert (w["Dana Diver"].basis, w["Dana Diver"].hours, w["Dana Diver"].after_dive) == (
        "repetitive", 18.0, "D2")


def test_a_declared_decompression_dive_takes_24_h():
    d = data(bottom_time_min=70, decompression="in-water",
             stops=[{"depth": 20, "minutes": 5}, {"depth": 10, "minutes": 30}])
    _, w = _waits(d)
    assert (w["Dana Diver"].basis, w["Dana Diver"].hours) == ("decompression", 24.0)


def test_a_dive_that_cannot_be_told_takes_the_longest_minimum():
    """No model schedule and no table: the dive may need stops, so 24 h, said so."""
    ctx = uncomputed(data(), "model_schedule", "reference")
    waits = alt.for_context(ctx)
    assert waits[0].basis == "decompression"
    assert "could not be computed" in waits[0].notes[0]


def test_the_model_is_kept_only_when_longer_than_the_minimum():
    """With minimums far below the model (a test double), the model's time is the longer."""
    ctx = context(data())
    pa = an.for_context(ctx)
    tiny = {k: alt.Minimum(k, 0.01, "test", "test double", "FROM MEMORY", False)
            for k in alt.BASES}
    [w] = alt.altitude_waits(ctx.plan, pa, minimums=lambda: tiny)
    model = pa.divers["Dana Diver"].time_to_altitude_min[an.CABIN_ALTITUDE_M]
    assert model > 0.6 and w.model_cabin_min == model
    [w] = alt.altitude_waits(ctx.plan, pa)
    assert w.model_cabin_min is None


def _timed(d, *starts):
    for dive, s in zip(d["dives"], starts, strict=False):
        dive["start"] = s
    return d


def test_surfacing_and_earliest_departure_from_the_dive_start():
    ctx, w = _waits(_timed(data(), "2026-05-14T08:00"))
    a = an.for_context(ctx).dives["D1"]
    end = _dt.datetime(2026, 5, 14, 8) + _dt.timedelta(minutes=a.end_min - a.start_min)
    got = w["Dana Diver"]
    assert got.surfaced_at >= end and got.surfaced_at - end < _dt.timedelta(minutes=1)
    assert got.earliest_departure == got.surfaced_at + _dt.timedelta(hours=12)


def test_starts_that_disagree_with_the_interval_need_review():
    d = second_dive(data(), surface_interval_min=60, previous_dive="D1")
    _timed(d, "2026-05-14T08:00", "2026-05-14T15:00")  # 60 min stated; the starts say more
    _, w = _waits(d)
    assert any("disagree" in r for r in w["Dana Diver"].reviews)


def test_several_days_of_diving_with_one_dive_each_is_repetitive():
    d = second_dive(data(), surface_interval_min=1500, previous_dive="D1")
    _timed(d, "2026-05-14T08:00", "2026-05-15T09:00")
    _, w = _waits(d)
    assert w["Dana Diver"].basis == "repetitive"


def test_offset_times_stay_with_their_offset():
    d = _timed(data(), "2026-05-14T08:00+02:00")
    d["altitude_travel"] = [{"diver": "Dana Diver", "altitude": 8000,
                             "departure": "2026-05-14T23:00+02:00"}]
    _, w = _waits(d)
    t = w["Dana Diver"].travel[0]
    assert t.ok is True and t.earliest.utcoffset() == _dt.timedelta(hours=2)
    assert t.to_json()["earliest"].endswith("+02:00")


def test_msw_plan_travel_altitude_is_in_metres():
    d = data()
    d["unit"] = "msw"
    d["chamber"]["depth_capability"] = 50
    d["dives"][0].update(max_depth=18, descent_rate=18, ascent_rate=9,
                         start="2026-05-14T08:00")
    d["altitude_travel"] = [{"diver": "Dana Diver", "altitude": 2438,
                             "departure": "2026-05-14T12:00"}]
    _, w = _waits(d)
    t = w["Dana Diver"].travel[0]
    assert (t.unit, t.altitude_m, t.ok) == ("m", 2438.0, False)


def test_check_output_altitude_section_keys():
    """The contract key: one entry per diver, with the keys the checklist reads."""
    result = run_check(ROOT / "examples" / "demo-job.toml")
    entries = {e["diver"]: e for e in result["altitude"]}
    assert set(entries) == {"Teodor Lind", "Priya Raman"}
    for e in entries.values():
        assert {"diver", "after_dive", "floor_h", "minimum_wait_min", "basis", "source_status",
                "model_h", "model_wait_min", "model_basis", "earliest_departure",
                "travel"} <= set(e)
        assert e["minimum_wait_min"] == e["floor_h"] * 60 >= 720
        assert e["model_wait_min"] is None or e["model_wait_min"] > e["minimum_wait_min"]
    priya = entries["Priya Raman"]  # the surface-decompression dive: the reproducer
    assert (priya["after_dive"], priya["floor_h"]) == ("D2", 24.0)
    assert priya["travel"][0]["ok"] is True and priya["travel"][0]["unit"] == "ft"
    assert any(r["name"] == "altitude-after-diving" for r in result["references"])


def test_harbour_job_has_no_altitude_warning():
    """No travel planned: the wait is information only (issue 8 target job)."""
    result = run_check(ROOT / "examples" / "harbour-job-msw.toml")
    flying = [f for f in result["findings"] if f["rule"] == "exposure-flying"]
    assert flying and {f["severity"] for f in flying} == {"info"}
    assert all("0 h 00 min" not in f["message"] for f in result["findings"])


@pytest.mark.parametrize(("field", "value", "words"), [
    ("departure", "tomorrow", "expected an ISO date-time"),
    ("departure", _dt.date(2026, 5, 15), "without a time"),
    ("altitude", 30001, "expected an altitude from 0 to 30000 ft"),
    ("altitude", -1, "expected an altitude from 0 to 30000 ft"),
    ("diver", "Nobody", "expected the name of a team member"),
])
def test_bad_travel_is_refused_naming_the_field(field, value, words):
    from supervisor.plan import PlanValidationError

    d = data(start="2026-05-14T08:00")
    d["altitude_travel"] = [{"diver": "Dana Diver", "altitude": 8000,
                             "departure": "2026-05-15T09:00"}]
    d["altitude_travel"][0][field] = value
    with pytest.raises(PlanValidationError) as exc:
        plan_from_dict(d)
    assert exc.value.problems[0][0] == f"altitude_travel[0].{field}"
    assert words in exc.value.problems[0][1]


def test_mixed_local_and_offset_times_are_refused():
    from supervisor.plan import PlanValidationError

    d = data(start="2026-05-14T08:00")
    d["altitude_travel"] = [{"diver": "Dana Diver", "altitude": 8000,
                             "departure": "2026-05-15T09:00Z"}]
    with pytest.raises(PlanValidationError) as exc:
        plan_from_dict(d)
    assert exc.value.problems == [("altitude_travel[0].departure",
                                   "got 2026-05-15T09:00:00+00:00; expected a date-time without "
                                   "a UTC offset, like dives[0].start")]


def test_dive_starts_out_of_order_are_refused():
    from supervisor.plan import PlanValidationError

    d = _timed(second_dive(data(), surface_interval_min=60, previous_dive="D1"),
               "2026-05-14T08:00", "2026-05-14T07:00")
    with pytest.raises(PlanValidationError) as exc:
        plan_from_dict(d)
    assert exc.value.problems[0][0] == "dives[1].start"


def test_the_msw_example_states_no_travel():
    doc = tomllib.loads((ROOT / "examples" / "harbour-job-msw.toml").read_text("utf-8"))
    assert "altitude_travel" not in copy.deepcopy(doc)
