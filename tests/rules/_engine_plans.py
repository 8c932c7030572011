"""Helpers for the engine-backed rule tests: the fictional plans in tests/data/plans_engine."""

from __future__ import annotations

import shutil
import tomllib
from pathlib import Path
from typing import Any

from supervisor.findings import Finding
from supervisor.plan import plan_from_dict
from supervisor.rules.base import CheckContext, Family

DATA = Path(__file__).resolve().parents[1] / "data" / "plans_engine"
TABLE = DATA / "fictional-decompression.toml"


def data(**dive: Any) -> dict[str, Any]:
    """A fresh copy of the base plan, its one dive updated with ``dive``."""
    d = tomllib.loads((DATA / "base.toml").read_text(encoding="utf-8"))
    d["dives"][0].update(dive)
    return d


def msw(**dive: Any) -> dict[str, Any]:
    """The base plan in msw (chamber rated 50 msw), its dive updated with ``dive``."""
    d = data()
    d["unit"] = "msw"
    d["chamber"]["depth_capability"] = 50
    d["dives"][0].update(max_depth=18, descent_rate=18, ascent_rate=9)
    d["dives"][0].update(dive)
    return d


def second_dive(d: dict[str, Any], **kw: Any) -> dict[str, Any]:
    """Append a 40 fsw / 30 min dive by the same diver (``D2``)."""
    extra = dict(d["dives"][0])
    extra.pop("stops", None)
    extra.update(id="D2", max_depth=40, bottom_time_min=30, descent_rate=40, decompression="none")
    extra.update(kw)
    d["dives"].append(extra)
    return d


def context(d: dict[str, Any]) -> CheckContext:
    """A check context for the plan ``d``."""
    return CheckContext(plan_from_dict(d))


def uncomputed(d: dict[str, Any], *sections: str, why: str = "forced by the test") -> CheckContext:
    """A context for ``d`` whose analysis lost ``sections`` of every dive, as a failed
    computation leaves them (the section ``None``, the reason in ``errors``)."""
    from supervisor import analysis as an

    ctx = context(d)
    for a in an.for_context(ctx).dives.values():
        for name in sections:
            a.errors[name] = why
            setattr(a, name, None)
    return ctx


def run(d: dict[str, Any], family: Family, key: str) -> list[Finding]:
    """Run one rule of ``family`` on the plan ``d``."""
    return family.get(key).run(context(d))


def only(findings: list[Finding], severity: str, dive: str | None = None) -> Finding:
    """The single finding of ``severity`` (for ``dive``), failing the test otherwise."""
    got = [f for f in findings if f.severity == severity and (dive is None or f.dive == dive)]
    assert len(got) == 1, [(f.severity, f.message) for f in findings]
    return got[0]


def no_bad(findings: list[Finding]) -> None:
    """No fail and no warning among ``findings`` (and at least one finding)."""
    assert findings, "the rule gave no finding"
    bad = [f for f in findings if f.severity in ("fail", "warn")]
    assert not bad, [f.message for f in bad]


def trusted_table(tmp: Path) -> Path:
    """A copy of the fictional table with every row verified (test-only state)."""
    from supervisor.references import verify_rows

    path = tmp / "fictional-decompression.toml"
    shutil.copy(TABLE, path)
    verify_rows(path, "all", by="second test author", method="fictional test check",
                on="2026-12-01")
    return path
