"""The findings contract of the rule families, checked rule by rule from a table of cases.

Every failing or warning finding names its rule, the value measured in the plan (a
number, or a word such as ``"no"``, ``"none"`` or ``"not stated"`` for a yes/no item),
the limit it was compared with or, for a review, the reason it could not be compared,
and the citation of its source.  Each family test file lists, for every rule it
registers, a passing plan and a failing plan (:class:`Case`) and runs them through
:func:`check_case`; :func:`check_covers` fails when a registered rule has no case.
"""

from __future__ import annotations

import tomllib
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest

from supervisor.findings import CONFIRMED_STATUSES, Finding
from supervisor.plan import plan_from_dict
from supervisor.rules.base import CheckContext, Family

PLANS = Path(__file__).resolve().parents[1] / "data" / "plans"
BAD = ("fail", "warn")
REVIEW = "needs review: "
_ANY: Any = object()

PlanFn = Callable[[Path], dict[str, Any]]


def base(unit: str = "fsw") -> dict[str, Any]:
    """A fresh copy of the passing test plan of the regulatory, procedure and team tests."""
    return tomllib.loads((PLANS / f"base-{unit}.toml").read_text(encoding="utf-8"))


def dive(d: dict[str, Any], **kw: Any) -> dict[str, Any]:
    """``d`` with its first dive updated by ``kw``."""
    d["dives"][0].update(kw)
    return d


@dataclass(frozen=True)
class Case:
    """A passing and a failing plan for one rule, and what the failing finding must say.

    Attributes
    ----------
    failing : callable
        ``failing(tmp_path) -> plan dict`` on which the rule fails or warns.
    measured : object or callable
        The measured value the failing finding must report (floats compared to 1e-3), or
        ``measured(ctx) -> value`` computing it from the failing plan's check context
        (for figures of the engine, which the engine's own tests check).
    citation : str
        The citation it must carry, exactly.
    passing : callable or None
        ``passing(tmp_path) -> plan dict`` on which the rule gives only passes or
        information; ``None`` only with ``no_pass`` saying why the rule cannot pass.
    severity : {"fail", "warn"}
        Severity of the failing finding.
    rule : str or None
        Id of the failing finding, when it is not the rule's own.
    limit : object or callable
        The limit the failing finding must report, when given (a callable as for
        ``measured``).
    no_pass : str
        Why the rule has no passing plan.
    """

    failing: PlanFn
    measured: Any
    citation: str
    passing: PlanFn | None = None
    severity: str = "fail"
    rule: str | None = None
    limit: Any = _ANY
    no_pass: str = ""


def run_rule(family: Family, key: str, d: dict[str, Any] | CheckContext) -> list[Finding]:
    """Run the rule ``key`` of ``family`` on the plan ``d`` or a context (it must apply)."""
    ctx = d if isinstance(d, CheckContext) else CheckContext(plan_from_dict(d))
    rule = family.get(key)
    assert rule.applies(ctx), f"{key} does not apply to {ctx.jurisdiction}"
    return rule.run(ctx)


def reported(f: Finding) -> None:
    """Assert that a failing or warning finding carries what a supervisor needs."""
    what = f"{f.rule}: {f.message}"
    assert f.rule, what
    assert f.measured is not None, f"measured is None: {what}"
    assert f.limit is not None or (f.message.startswith(REVIEW) and len(f.message) > 20), (
        f"neither a limit nor a stated reason: {what}")
    assert f.citation.strip(), f"no citation: {what}"
    if f.severity == "warn":
        assert not f.verified, f"a warning marked verified: {what}"


def _same(got: Any, want: Any) -> bool:
    if isinstance(want, float) and isinstance(got, (int, float)):
        return got == pytest.approx(want, abs=1e-3)
    return bool(got == want)


def check_case(family: Family, key: str, case: Case, tmp: Path) -> None:
    """Run a rule's failing and passing plans and check the findings against the contract.

    * failing plan: at least one fail or warning; every one meets :func:`reported`; one of
      the case's id and severity reports the case's measured value (and limit) and citation;
    * passing plan: findings, none failing or warning; a pass resting on a source that is
      not confirmed (SECONDARY, FROM MEMORY, OLDER-EDITION, DERIVED) is unverified.
    """
    ctx = CheckContext(plan_from_dict(case.failing(tmp)))
    got = run_rule(family, key, ctx)
    want = case.measured(ctx) if callable(case.measured) else case.measured
    bad = [f for f in got if f.severity in BAD]
    assert bad, f"{key}: the failing plan gave no fail or warning: {[f.message for f in got]}"
    for f in bad:
        reported(f)
    rid = case.rule or family.get(key).id
    hit = [f for f in bad if f.rule == rid and f.severity == case.severity]
    assert hit, f"{key}: no {case.severity} {rid}: {[(f.rule, f.severity) for f in bad]}"
    assert any(_same(f.measured, want) for f in hit), (
        f"{key}: measured {[f.measured for f in hit]}, expected {want!r}")
    f = next(f for f in hit if _same(f.measured, want))
    if case.limit is not _ANY:
        lim = case.limit(ctx) if callable(case.limit) else case.limit
        assert _same(f.limit, lim), f"{key}: limit {f.limit!r}, expected {lim!r}"
    assert f.citation == case.citation, f"{key}: citation {f.citation!r}"
    if case.passing is None:
        assert case.no_pass, f"{key}: no passing plan and no reason given"
        return
    good = run_rule(family, key, case.passing(tmp))
    assert good, f"{key}: the passing plan gave no finding"
    assert not [f for f in good if f.severity in BAD], (
        f"{key}: {[f.message for f in good if f.severity in BAD]}")
    for f in good:
        if f.severity == "pass" and f.source_status not in (None, *CONFIRMED_STATUSES):
            assert not f.verified, f"{key}: verified pass on a {f.source_status} source"


def check_covers(family: Family, cases: dict[str, Case]) -> None:
    """Every rule registered in ``family`` has a case, and every case names a rule."""
    names = {r.name for r in family.rules}
    assert set(cases) == names, (
        f"without a case: {sorted(names - set(cases))}; unknown: {sorted(set(cases) - names)}")
