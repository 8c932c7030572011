"""Locate bundled data (``tables/`` and ``templates/``) relative to the package.

In an installed wheel the data sits in ``supervisor/_bundled``; in a source
checkout (editable install) it is the project's top-level ``tables/`` and
``templates/``.  Data is never looked up relative to the current directory.
"""

from __future__ import annotations

from pathlib import Path

_PKG = Path(__file__).resolve().parent


def _bundled(name: str) -> Path:
    inside = _PKG / "_bundled" / name
    if inside.is_dir():
        return inside
    source = _PKG.parent / name
    if source.is_dir():
        return source
    raise FileNotFoundError(f"bundled data folder {name!r} not found beside the package")


def tables_dir() -> Path:
    """Return the folder holding the bundled reference tables."""
    return _bundled("tables")


def templates_dir() -> Path:
    """Return the folder holding the bundled checklist and caution templates."""
    return _bundled("templates")
