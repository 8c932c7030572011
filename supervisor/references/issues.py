"""Validation issues: one finding about a table file, naming its row and column."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

Severity = Literal["error", "warning"]


@dataclass(frozen=True)
class Issue:
    """One problem found in a table file.

    Parameters
    ----------
    severity : {"error", "warning"}
        An error makes the file invalid; a warning does not (for example a row
        whose data changed since it was verified, which is then unverified).
    message : str
        What is wrong, the value found and the accepted form.
    row : int or None
        1-based row number in file order, or None for the header.
    column : str or None
        Column or key (dotted for nested keys), or None.
    label : str
        Short row key such as ``depth 60`` or ``60/40``, for the reader.
    """

    severity: Severity
    message: str
    row: int | None = None
    column: str | None = None
    label: str = ""

    def where(self) -> str:
        """Return ``row N (label), column C`` or the parts that apply."""
        parts = []
        if self.row is not None:
            parts.append(f"row {self.row}" + (f" ({self.label})" if self.label else ""))
        if self.column:
            parts.append(f"column {self.column}")
        return ", ".join(parts)

    def line(self, file: str) -> str:
        """Return the one-line form ``FILE: SEVERITY: row N, column C: message``."""
        where = self.where()
        return f"{file}: {self.severity}: " + (f"{where}: " if where else "") + self.message

    def to_dict(self) -> dict[str, object]:
        """Return a JSON-ready dict."""
        return {
            "severity": self.severity,
            "row": self.row,
            "column": self.column,
            "label": self.label,
            "message": self.message,
        }


def errors(issues: list[Issue] | tuple[Issue, ...]) -> list[Issue]:
    """Return the issues of severity ``error``."""
    return [i for i in issues if i.severity == "error"]
