"""Commands of this family (filled in by its own issue)."""

from __future__ import annotations

import typer


def register(app: typer.Typer) -> None:
    """Add this family's commands to the application."""
