"""Findings, ordering and the verdict (project logic; no outside source)."""

from __future__ import annotations

import pytest

from supervisor.findings import (
    Finding,
    could_not_run,
    counts,
    sort_findings,
    verdict,
)


def _f(severity: str, verified: bool = True, rule: str = "r") -> Finding:
    return Finding(rule=rule, severity=severity, message="m", verified=verified)  # type: ignore[arg-type]


def test_verdict_conforms_only_when_all_pass_or_info():
    assert verdict([_f("pass"), _f("info")]) == "conforms"


def test_verdict_warn_needs_review():
    assert verdict([_f("pass"), _f("warn")]) == "needs-review"


def test_verdict_unverified_pass_needs_review():
    assert verdict([_f("pass"), _f("pass", verified=False)]) == "needs-review"


def test_verdict_any_fail_does_not_conform():
    assert verdict([_f("warn"), _f("fail"), _f("pass")]) == "does-not-conform"


def test_verdict_nothing_checked_needs_review():
    assert verdict([]) == "needs-review"


def test_sort_worst_first_and_stable():
    items = [_f("pass", rule="a"), _f("info", rule="b"), _f("fail", rule="c"),
             _f("warn", rule="d"), _f("fail", rule="e")]
    assert [f.rule for f in sort_findings(items)] == ["c", "e", "d", "b", "a"]


def test_counts():
    assert counts([_f("fail"), _f("fail"), _f("pass")]) == {
        "fail": 2, "warn": 0, "info": 0, "pass": 1,
    }


def test_bad_severity_rejected():
    with pytest.raises(ValueError, match="severity"):
        Finding(rule="r", severity="ok", message="m")  # type: ignore[arg-type]


def test_could_not_run_is_an_unverified_warning():
    f = could_not_run("osha-424-b1", ZeroDivisionError("division by zero"), "29 CFR 1910.424")
    assert f.severity == "warn"
    assert not f.verified
    assert "rule could not run" in f.message
    assert "ZeroDivisionError" in f.message
    assert verdict([_f("pass"), f]) == "needs-review"


def test_to_json_has_contract_keys_and_rounds():
    f = Finding(rule="x", severity="fail", message="m", measured=1.23456789, limit=2.0,
                unit="fsw", citation="c", dive="D1", source_status="VERIFIED")
    j = f.to_json()
    for key in ("rule", "severity", "message", "measured", "limit", "unit", "citation",
                "dive", "source_status"):
        assert key in j
    assert j["measured"] == 1.235


def test_one_finding_per_dive_and_fact_keeps_the_worst() -> None:
    """Issue 8 §3: one fact (no chamber) reported by three rules is one finding, the worst."""
    from supervisor.findings import one_per_fact

    def f(rule: str, sev: str, dive: str | None, fact: str | None, verified: bool = True):
        return Finding(rule=rule, severity=sev, message=f"{rule} says", citation=f"cite {rule}",
                       dive=dive, verified=verified, extra={"fact": fact} if fact else {})

    got = one_per_fact([
        f("a", "warn", "D1", "no-chamber", verified=False), f("b", "fail", "D1", "no-chamber"),
        f("c", "warn", "D2", "no-chamber"), f("d", "warn", "D1", None),
        f("e", "warn", "D1", "no-chamber"),
    ])
    assert [x.rule for x in got] == ["b", "c", "d"]
    b = got[0]
    assert b.severity == "fail" and not b.verified
    assert [x["rule"] for x in b.extra["also_cited"]] == ["a", "e"]
    assert "also required by a: cite a; e: cite e" in b.message
