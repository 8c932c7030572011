"""Chamber tests run from the project folder: the examples name their job plan relative to it."""

from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(autouse=True)
def _project_folder(monkeypatch):
    monkeypatch.chdir(ROOT)
