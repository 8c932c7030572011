"""Treatment plan assembly (supervisor.treatment/1) and treatment plan files.

Figures here are regression values of this project's own computation unless a test says
otherwise; the outside values are checked in the module tests beside it.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from supervisor.chamber.attendant import RecentDive
from supervisor.chamber.treatment import (
    SCHEMA,
    TreatmentRequest,
    load_request_file,
    plan_treatment,
)
from supervisor.errors import InputError
from supervisor.plan import PlanValidationError

DEMO = "examples/demo-job.toml"


def test_json_contract_keys():
    j = plan_treatment(TreatmentRequest("6", "21:40")).to_json()
    assert j["schema"] == SCHEMA == "supervisor.treatment/1"
    for key in ("steps", "total_min", "doses", "inputs", "attendant", "rules", "atmosphere",
                "chamber_gas", "verdict", "findings", "cautions", "start", "end", "end_day"):
        assert key in j
    assert j["total_min"] == 285 and j["elapsed_min"] == 288
    assert set(j["doses"]) == {"patient", "attendant"}
    assert j["doses"]["patient"]["cns"]["in_water_percent"] is None
    assert j["steps"][0]["role"] == "compression"
    assert json.loads(json.dumps(j)) == j  # JSON-ready


def test_never_conforms_on_unverified_steps():
    p = plan_treatment(TreatmentRequest("5", "08:00"))
    assert p.verdict == "needs-review"
    f = next(f for f in p.findings if f.rule == "treatment-table-status")
    assert f.severity == "warn" and f.source_status == "FROM MEMORY" and not f.verified


def test_from_a_job_plan_uses_its_chamber_policy_and_site():
    p = plan_treatment(TreatmentRequest("6", "21:40", 0, 1, None, DEMO))
    j = p.to_json()
    assert j["job_plan"] and j["occupants"] == 2
    g = j["chamber_gas"]
    assert g["need_l"] is not None and g["available_l"] is not None and g["missing"] == []
    assert "363 min" in " ".join(g["basis"])  # the whole treatment with its extension
    assert j["atmosphere"]["overboard_dump"] is True
    rules = {f["rule"] for f in j["findings"]}
    assert {"treatment-chamber-gas", "treatment-chamber-depth"} <= rules


def test_chamber_too_shallow_does_not_conform(tmp_path):
    text = Path(DEMO).read_text("utf-8").replace("depth_capability = 225",
                                                       "depth_capability = 100")
    plan = tmp_path / "shallow.toml"
    plan.write_text(text, "utf-8")
    p = plan_treatment(TreatmentRequest("6A", "08:00", plan=str(plan)))
    f = next(f for f in p.findings if f.rule == "treatment-chamber-depth")
    assert f.severity == "fail" and f.measured == 100 and f.limit == 165
    assert p.verdict == "does-not-conform"


def test_own_figures_short_of_gas_does_not_conform(tmp_path):
    text = Path(DEMO).read_text("utf-8").replace(
        "treatment_occupants = 2", "treatment_occupants = 2\nventilation_lpm = 3000").replace(
        "water_volume_l = 800", "water_volume_l = 100")
    plan = tmp_path / "short.toml"
    plan.write_text(text, "utf-8")
    p = plan_treatment(TreatmentRequest("6", "08:00", plan=str(plan)))
    f = next(f for f in p.findings if f.rule == "treatment-chamber-gas")
    assert f.severity == "fail" and f.measured < f.limit


def test_without_a_job_plan_the_gas_is_not_sized():
    p = plan_treatment(TreatmentRequest("6", "08:00"))
    f = next(f for f in p.findings if f.rule == "treatment-chamber-gas")
    assert f.severity == "info" and "--plan" in f.message


def test_plan_without_chamber_refused():
    with pytest.raises(InputError) as e:
        plan_treatment(TreatmentRequest("6", "08:00", plan="examples/harbour-job-msw.toml"))
    assert e.value.field == "--plan" and "no chamber on site" in e.value.message


def test_missing_plan_file_names_the_option():
    with pytest.raises(PlanValidationError) as e:
        plan_treatment(TreatmentRequest("6", "08:00", plan="no-such-plan.toml"))
    assert e.value.problems[0][0] == "--plan"


def test_altitude_site_warns(tmp_path):
    text = Path(DEMO).read_text("utf-8").replace("altitude_m = 0", "altitude_m = 900")
    plan = tmp_path / "lake.toml"
    plan.write_text(text, "utf-8")
    p = plan_treatment(TreatmentRequest("6", "08:00", plan=str(plan)))
    f = next(f for f in p.findings if f.rule == "treatment-altitude")
    assert f.severity == "warn" and "Table 21-6" in f.citation
    assert p.p_surface_bar < 1.01325


def test_recent_dive_adds_the_attendant_oxygen():
    base = plan_treatment(TreatmentRequest("6", "08:00")).to_json()["attendant"]
    rec = plan_treatment(TreatmentRequest("6", "08:00", attendant_recent_dive=RecentDive(
        50, 30, 270))).to_json()["attendant"]
    assert rec["oxygen_min"] == base["oxygen_min"] + 60  # Table 6: one more 60-min period
    assert rec["recent_exposure_case"] and rec["recent_dive"]["model_stop_min"] is not None


def test_request_round_trip_through_json_and_toml(tmp_path):
    req = TreatmentRequest("6", "21:40", 0, 1, RecentDive(50, 30, 270), DEMO)
    j = plan_treatment(req).to_json()
    f = tmp_path / "plan.json"
    f.write_text(json.dumps(j), "utf-8")
    assert load_request_file(f) == req
    assert load_request_file("examples/demo-treatment.toml") == TreatmentRequest(
        "6", "21:40", 0, 0, RecentDive(50, 30, 270, "air"), DEMO)


@pytest.mark.parametrize(("text", "words"), [
    ('schema = "supervisor.treatment-plan/1"\nstart = "08:00"\n', "table"),
    ('schema = "supervisor.treatment-plan/1"\ntable = "6"\nstart = "08:00"\nextend_air = -1\n',
     "extend_air"),
    ('schema = "supervisor.treatment-plan/1"\ntable = "6"\nstart = "08:00"\ncolour = 1\n',
     "colour"),
    ('schema = "other"\ntable = "6"\n', "schema"),
    ("{not json", "PLANFILE"),
    ('{"schema": "supervisor.check/1"}', "supervisor.treatment/1"),
])
def test_bad_plan_files(tmp_path, text, words):
    f = tmp_path / "p.toml"
    f.write_text(text, "utf-8")
    with pytest.raises(InputError) as e:
        load_request_file(f)
    assert words in str(e.value)


def test_toml_start_may_be_a_time(tmp_path):
    f = tmp_path / "p.toml"
    f.write_text('schema = "supervisor.treatment-plan/1"\ntable = "9"\nstart = 07:15:00\n',
                 "utf-8")
    assert load_request_file(f).start == "07:15"


def test_gas_enough_as_planned_but_short_with_every_extension(tmp_path):
    text = Path(DEMO).read_text("utf-8").replace("water_volume_l = 800", "water_volume_l = 600")
    plan = tmp_path / "smaller.toml"
    plan.write_text(text, "utf-8")
    p = plan_treatment(TreatmentRequest("6", "08:00", plan=str(plan)))
    g = p.chamber_gas
    assert not g.short and g.short_with_every_extension
    assert g.need_every_extension_l > g.need_l
    fs = [f for f in p.findings if f.rule == "treatment-chamber-gas"]
    assert {f.severity for f in fs} == {"pass", "warn"}
    assert any("every extension" in f.message and f.limit == round(g.need_every_extension_l)
               for f in fs if f.severity == "warn")
    # a plan that already runs every extension has nothing more to size
    full = plan_treatment(TreatmentRequest("6", "08:00", 2, 2, plan=str(plan)))
    assert full.chamber_gas.need_every_extension_l is None
