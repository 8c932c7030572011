"""Page 1 of the checklist (supervisor.report.summary).

Values come from the hand-written fictional fixture check in conftest.py; the
tests check that page 1 prints what the check says and nothing better.
"""

from __future__ import annotations

from typing import Any

import pytest

from supervisor.report import summary
from supervisor.report.formatting import NOT_COMPUTED, count_findings
from tests.report.test_sections import _texts


def test_verdict_panel_names_the_failing_checks(check_result: dict[str, Any]) -> None:
    text = _texts(summary.verdict_panel(check_result, 500)[1]._cellvalues[0][0])
    assert text[:3] == ["Verdict: DOES NOT CONFORM", "1 fail, 2 warn, 1 info, 1 pass",
                        "Failing: osha-423-c1 (D1)"]


def test_many_failures_are_named_up_to_a_limit(check_result: dict[str, Any]) -> None:
    fail = check_result["findings"][0]
    check_result["findings"] += [dict(fail, rule=f"rule-{n}", dive=None) for n in range(12)]
    text = " ".join(_texts(summary.verdict_panel(check_result, 500)[1]._cellvalues[0][0]))
    assert "rule-6, and 5 more" in text and "rule-7" not in text


def test_dives_table_shows_schedule_and_verdict(check_result: dict[str, Any]) -> None:
    check_result["dives"][0].update(standby_diver="Sam Okafor", tender="Riley Haugen",
                                    previous_dive="D0", surface_interval_min=95)
    text = _texts(summary.dives_table(check_result, 500))
    assert "standby Sam Okafor; tender Riley Haugen" in text
    assert any(t.endswith("repetitive after D0, surface interval 95 min") for t in text)
    assert "in-water 20 fsw 7 min air; in-water 10 fsw 18 min air" in text
    assert text[-2:] == ["DOES NOT CONFORM", "1 fail, 2 warn"]


def test_missing_contacts_and_site_need_review(check_result: dict[str, Any]) -> None:
    text = _texts(summary.emergency_and_site(check_result, 500))
    assert text.count("Hospital: not stated in the plan — needs review") == 1
    assert f"Site: {NOT_COMPUTED}" in text
    check_result["site"] = {"water": "fresh", "altitude_m": 1200, "current_kt": 0.5,
                            "visibility_m": None, "water_temperature_c": 4, "night": True,
                            "confined_space": False, "emergency_contacts": {
                                "chamber": "Lakeside unit", "hospital": "General, 555-0100"}}
    text = _texts(summary.emergency_and_site(check_result, 500))
    assert "Hospital: General, 555-0100" in text
    assert "Physician: not stated in the plan — needs review" in text
    # an fsw plan: feet (metres) and °F (°C); 1200 m = 3937 ft (0.3048 m per foot)
    assert "Altitude of the water surface: 3937 ft (1200 m)" in text
    assert "Water temperature: 39 °F (4 °C)" in text
    assert f"Visibility: {'not computed'}" in text
    assert "Night: yes" in text and "From a vessel: not stated" in text


@pytest.mark.parametrize(
    ("chamber", "expected"),
    [({"on_site": False}, "Chamber: none at the dive location; nearest: Lakeside unit"),
     ({"on_site": True, "ready": True}, "Chamber: at the dive location, ready."),
     ({"on_site": True, "ready": None},
      "Chamber: at the dive location, readiness not stated — needs review."),
     ({}, f"Chamber: {NOT_COMPUTED}")],
)
def test_chamber_line(check_result: dict[str, Any], chamber: dict[str, Any],
                      expected: str) -> None:
    check_result["chamber"] = chamber
    check_result["site"] = {"emergency_contacts": {"chamber": "Lakeside unit"}}
    assert _texts([summary.chamber_line(check_result)]) == [expected]


def test_altitude_minimum_is_the_floor(check_result: dict[str, Any]) -> None:
    check_result["altitude"] = [
        {"diver": "Morgan Ellery", "after_dive": "D1", "minimum_wait_min": 1440,
         "basis": "24 h after a decompression dive (common guidance, from memory)",
         "source_status": "FROM MEMORY", "model_wait_min": 30, "model_basis": "model",
         "earliest_departure": "2031-05-15T07:00:00Z", "travel": []}]
    text = " ".join(_texts(summary.altitude_block(check_result, 500)))
    assert "24 h 00 min 24 h after a decompression dive" in text
    assert "0 h 30 min" not in text and "model:" not in text  # shorter model: never shown
    assert "2031-05-15 07:00 UTC" in text and "none planned" in text
    check_result["altitude"][0]["model_wait_min"] = 1501
    text = " ".join(_texts(summary.altitude_block(check_result, 500)))
    assert "model: 25 h 01 min, longer (model)" in text


def test_altitude_without_the_check_key_is_not_computed(check_result: dict[str, Any]) -> None:
    text = " ".join(_texts(summary.altitude_block(check_result, 500)))
    assert NOT_COMPUTED in text and "follow the contractor's manual" in text


@pytest.mark.parametrize(("given", "shown"),
                         [("2031-07-10T09:15:00", "2031-07-10 09:15"),
                          ("2031-07-10T09:15:00Z", "2031-07-10 09:15 UTC"),
                          ("2031-07-10 09:15:30+02:00", "2031-07-10 09:15 +02:00"),
                          ("tomorrow", "tomorrow"), (None, "not computed")])
def test_fmt_time(given: object, shown: str) -> None:
    assert summary.fmt_time(given) == shown


def test_dive_findings_equal_a_scan_of_the_findings() -> None:
    """The by-dive index answers as filtering every finding (order kept)."""
    from supervisor.report.summary import dive_counts, dive_findings

    findings = [{"rule": f"r{i}", "severity": ("fail", "warn", "info", "pass")[i % 4],
                 "dive": (None, "D1", "D2", "D3")[i % 4 if i % 7 else 1]} for i in range(60)]
    record = {"findings": findings}
    for dive in (None, "D1", "D2", "D3", "D9"):
        assert dive_findings(record, dive) == [f for f in findings if f.get("dive") == dive]
        assert dive_counts(record, dive) == count_findings(
            [f for f in findings if f.get("dive") in (dive, None)])
    odd = {"findings": [*findings, {"rule": "x", "severity": "warn", "dive": ["D1"]}]}
    assert dive_findings(odd, ["D1"]) == [odd["findings"][-1]]
    assert dive_findings(odd, "D2") == [f for f in findings if f.get("dive") == "D2"]
    assert dive_findings({"findings": findings[:10]}, "D1") == [
        f for f in findings[:10] if f.get("dive") == "D1"]
