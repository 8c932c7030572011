"""Helpers for the reference-table tests: the fictional test tables and a writer."""

from __future__ import annotations

import copy
import tomllib
from pathlib import Path
from typing import Any

from supervisor.references.canonical import dumps_table

DATA = Path(__file__).resolve().parent.parent / "data"


def fixture_path(kind: str) -> Path:
    """Path of the fictional test table of ``kind`` (no_stop, decompression, ...)."""
    return DATA / f"tables_fictional_{kind}.toml"


def fixture_doc(kind: str) -> dict[str, Any]:
    """A fresh copy of the parsed fictional test table of ``kind``."""
    return copy.deepcopy(tomllib.loads(fixture_path(kind).read_text("utf-8")))


def write_doc(folder: Path, doc: dict[str, Any], name: str | None = None) -> Path:
    """Write ``doc`` as ``<name>.toml`` in ``folder`` (name defaults to doc['name'])."""
    name = name or doc["name"]
    doc["name"] = name
    path = folder / f"{name}.toml"
    path.write_text(dumps_table(doc), "utf-8")
    return path
