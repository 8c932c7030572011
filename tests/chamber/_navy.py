"""Expected treatment-table values: ``tests/data/treatment_navy_tables.toml`` (see its header)."""

from __future__ import annotations

import tomllib
from functools import lru_cache
from pathlib import Path
from typing import Any

DATA = Path(__file__).resolve().parent.parent / "data" / "treatment_navy_tables.toml"


@lru_cache(maxsize=1)
def navy() -> dict[str, dict[str, Any]]:
    """The expected values by table number."""
    doc = tomllib.loads(DATA.read_text("utf-8"))
    return {t["number"]: t for t in doc["tables"]}
