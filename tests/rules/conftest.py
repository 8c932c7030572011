"""Fixtures for the rule-family tests: a passing base plan and a one-rule runner."""

from __future__ import annotations

import tomllib
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest

from supervisor.findings import Finding
from supervisor.plan import plan_from_dict
from supervisor.rules.base import CheckContext, Family

PLANS = Path(__file__).resolve().parents[1] / "data" / "plans"


@pytest.fixture
def base() -> Callable[..., dict[str, Any]]:
    """Factory for a fresh copy of the passing test plan (``base("msw")`` for metres)."""

    def make(unit: str = "fsw") -> dict[str, Any]:
        return tomllib.loads((PLANS / f"base-{unit}.toml").read_text(encoding="utf-8"))

    return make


@pytest.fixture
def run() -> Callable[[dict[str, Any], Family, str], list[Finding]]:
    """Run one rule (by its key in a family) on a plan given as a dictionary."""

    def go(data: dict[str, Any], family: Family, key: str) -> list[Finding]:
        ctx = CheckContext(plan_from_dict(data))
        rule = family.get(key)
        assert rule.applies(ctx), f"{key} does not apply to {ctx.jurisdiction}"
        return rule.run(ctx)

    return go

