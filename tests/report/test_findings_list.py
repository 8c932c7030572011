"""Findings by dive and the appendix of passed checks (supervisor.report.findings_list)."""

from __future__ import annotations

from typing import Any

from supervisor.report import findings_list
from tests.report.test_sections import _texts


def _f(rule: str, severity: str, dive: object, **kw: Any) -> dict[str, Any]:
    return {"rule": rule, "severity": severity, "dive": dive, "message": f"{rule} message",
            "measured": kw.get("measured"), "limit": kw.get("limit"), "unit": kw.get("unit"),
            "citation": kw.get("citation", "c"), "source_status": "VERIFIED",
            "family": kw.get("family")}


def test_groups_are_job_wide_then_dives_in_plan_order_worst_first() -> None:
    record = {"dives": [{"id": "D1"}, {"id": "D2"}],
              "findings": [_f("a", "warn", "D2"), _f("b", "fail", "D2"), _f("c", "pass", "D1"),
                           _f("d", "warn", None), _f("e", "odd", "D9"), _f("g", "info", "D1")]}
    groups = findings_list.group_findings(record)
    assert [(t, [f["rule"] for f in fs]) for t, fs in groups] == [
        ("Job-wide", ["d"]), ("Dive D2", ["b", "a"]), ("Dive D9", ["e"])]
    info = findings_list.group_findings(record, ("info",))
    assert [(t, [f["rule"] for f in fs]) for t, fs in info] == [("Dive D1", ["g"])]


def test_no_failure_or_warning_is_not_a_pass() -> None:
    record = {"dives": [{"id": "D1"}], "findings": [_f("c", "pass", "D1")]}
    text = " ".join(_texts(findings_list.findings_section(record, 500)))
    assert "No failure and no warning. 1 passed check is listed in the appendix." in text
    assert "That is not a pass" in text


def test_information_lines_leave_out_what_the_section_prints() -> None:
    record = {"findings": [
        _f("contingency-schedules", "info", "D1", family="contingency"),
        _f("model-margin", "info", "D1", family="model-margin", measured=66, limit=0,
           unit="min"),
        _f("exposure-window", "info", "D1", measured=2, unit="dives"),
        _f("exposure-window", "info", None)]}
    text = _texts(findings_list.information_lines(record, "D1", 500))
    assert text[0] == "Information (reported, not judged)"
    assert "contingency schedules and the ceiling check's margin" in text[1]
    assert text[2] == "exposure-window: exposure-window message [2 dives / —] — c (VERIFIED)"
    assert len(text) == 3
    only_shown = {"findings": record["findings"][:2]}
    assert findings_list.information_lines(only_shown, "D1", 500) == []
    assert len(_texts(findings_list.information_lines(record, None, 500))) == 2


def test_passes_compact_by_rule() -> None:
    record = {"findings": [
        _f("osha-425-b1", "pass", "D1", measured=12, limit=58.3, unit="msw",
           citation="29 CFR 1910.425(b)(1)"),
        _f("osha-425-b1", "pass", "D2", measured=18, limit=58.3, unit="msw",
           citation="29 CFR 1910.425(b)(1)"),
        _f("team-diver", "pass", "D1"), _f("osha-420-a", "pass", None),
        _f("gas-mod", "pass", "D1", measured=12, limit=56.5, unit="msw"),
        _f("gas-mod", "pass", "D2", measured=18, limit=50, unit="msw")]}
    text = _texts(findings_list.appendix_passed(record, 500))
    assert "6 passed check(s) of 4 rule(s)" in text[1]
    assert "osha-425-b1: limit 58.3 msw: D1 12 msw, D2 18 msw — 29 CFR 1910.425(b)(1) " \
        "(VERIFIED)" in text
    assert "team-diver: passed: D1 — c (VERIFIED)" in text
    assert "osha-420-a: passed: job — c (VERIFIED)" in text
    assert "gas-mod: D1 12 msw / 56.5 msw; D2 18 msw / 50 msw — c (VERIFIED)" in text
