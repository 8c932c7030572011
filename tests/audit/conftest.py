"""Fixtures of the audit tests: the invented demo plan, read once."""

from __future__ import annotations

import pytest

from supervisor.audit import prepare
from supervisor.audit.run import PlanAudit
from tests.audit._logs import DEMO


@pytest.fixture(scope="session")
def demo() -> PlanAudit:
    """The demo job's plan, prepared for auditing (analysis included)."""
    return prepare(DEMO)
