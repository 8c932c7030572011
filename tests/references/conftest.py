"""Fixtures for the reference-table tests."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.references._helpers import fixture_path


@pytest.fixture
def copy_fixture(tmp_path):
    """Copy a fictional test table into tmp_path and return its path."""

    def _copy(kind: str) -> Path:
        src = fixture_path(kind)
        dst = tmp_path / src.name
        dst.write_bytes(src.read_bytes())
        return dst

    return _copy
