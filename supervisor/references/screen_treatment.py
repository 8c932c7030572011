"""Screen a treatment table (``supervisor tables screen FILE`` on a treatment table).

A treatment table is a step list, not a schedule a decompression model can
judge, so screening checks the arithmetic a transcription error breaks:

* each travel step's minutes against its travel rate (depth change / rate);
* the step times against the table's stated total (``conventions.stated_total_min``),
  and with every allowed extension against ``stated_total_extended_min``;
* each extension's insertion point and the attendant's oxygen minutes against
  the patient's oxygen minutes at that depth (as notes).

A check differing by more than ``tolerance`` minutes (default 1, the printed
tables' resolution) is flagged: re-read the step in the source.  A table that
states no total, or that cannot be planned (its travel is missing), is listed as
not checked on that point, never as passing.
"""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass, field
from typing import Any

from supervisor.errors import InputError
from supervisor.references.issues import Issue
from supervisor.references.loader import Table
from supervisor.references.validate import sanity_issues

#: Default tolerance of the totals and travel checks [min].
DEFAULT_TOLERANCE_MIN = 1.0


@dataclass(frozen=True)
class TreatmentCheck:
    """One arithmetic check of a treatment table.

    Attributes
    ----------
    check : str
        ``travel``, ``total``, ``total-extended`` or ``attendant``.
    label : str
        What was checked (``step 7``, ``table total`` ...).
    expected, found : float or None
        The figure the arithmetic gives and the one the table states [min].
    flagged : bool
    note : str
    row : int or None
        1-based row, for a step check.
    """

    check: str
    label: str
    expected: float | None
    found: float | None
    flagged: bool
    note: str = ""
    row: int | None = None

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready dict."""
        def r(x: float | None) -> float | None:
            return None if x is None else round(x, 3)

        return {"check": self.check, "label": self.label, "row": self.row,
                "expected_min": r(self.expected), "found_min": r(self.found),
                "flagged": self.flagged, "note": self.note}


@dataclass
class TreatmentScreen:
    """All checks of a screened treatment table."""

    table: str
    tolerance_min: float
    checks: list[TreatmentCheck]
    validation_errors: list[Issue] = field(default_factory=list)

    @property
    def flagged(self) -> list[TreatmentCheck]:
        """The flagged checks."""
        return [c for c in self.checks if c.flagged]

    def to_dict(self) -> dict[str, Any]:
        """The ``supervisor.tables-screen/1`` object for a treatment table."""
        return {"schema": "supervisor.tables-screen/1", "table": self.table, "kind": "treatment",
                "tolerance_min": self.tolerance_min,
                "flagged_rows": sorted({c.row for c in self.flagged if c.row is not None}),
                "flagged_checks": len(self.flagged),
                "validation_errors": [i.to_dict() for i in self.validation_errors],
                "checks": [c.to_dict() for c in self.checks]}


def _is_o2(gas: str) -> bool:
    return gas.strip().lower() in ("oxygen", "o2", "100/0")


def screen_treatment(table: Table, tolerance_min: float = DEFAULT_TOLERANCE_MIN
                     ) -> TreatmentScreen:
    """Check a treatment table's arithmetic (module docstring).

    Parameters
    ----------
    table : Table
        A treatment table (loaded with ``strict=False`` to screen a file that
        may still fail the sanity rules).
    tolerance_min : float
        Flag a difference larger than this [min].

    Returns
    -------
    TreatmentScreen

    Raises
    ------
    InputError
        For a table that is not a treatment table, or a bad tolerance.
    """
    if table.kind != "treatment":
        raise InputError("FILE", f"{table.name} is a {table.kind} table, not a treatment table")
    if not (isinstance(tolerance_min, (int, float)) and math.isfinite(tolerance_min)
            and tolerance_min > 0):
        raise InputError("--tolerance", f"got {tolerance_min!r}; expected minutes > 0")
    c = table.model.conventions
    unit = c.depth_unit
    out: list[TreatmentCheck] = []
    for i, s in enumerate(table.rows):
        if s.from_depth == s.to_depth:
            continue
        label = f"step {s.step}"
        if not s.travel_rate:
            out.append(TreatmentCheck("travel", label, None, s.minutes, False,
                                      "no travel rate: not checked", i + 1))
            continue
        want = abs(s.from_depth - s.to_depth) / s.travel_rate
        bad = abs(want - s.minutes) > tolerance_min
        out.append(TreatmentCheck(
            "travel", label, want, s.minutes, bad,
            f"{s.from_depth:g} → {s.to_depth:g} {unit} at {s.travel_rate:g} {unit}/min"
            + ("; re-read this step in the source" if bad else ""), i + 1))
    steps = float(sum(s.minutes for s in table.rows))
    if not c.plannable:
        out.append(TreatmentCheck("total", "table total", None, steps, False,
                                  "not checked: the table cannot be planned (missing: "
                                  + "; ".join(c.missing) + ")"))
    elif c.stated_total_min is None:
        out.append(TreatmentCheck("total", "table total", steps, None, False,
                                  "not checked: the file states no total"))
    else:
        bad = abs(steps - c.stated_total_min) > tolerance_min
        out.append(TreatmentCheck(
            "total", "table total", steps, c.stated_total_min, bad,
            f"step times add up to {steps:g} min; stated {c.stated_total_min:g} min "
            f"({c.stated_total_status})" + ("; re-read the steps" if bad else "")))
    ext = float(sum(e.minutes * e.max_count for e in c.extensions))
    if c.extensions:
        if c.stated_total_extended_min is None:
            out.append(TreatmentCheck("total-extended", "total with every extension",
                                      steps + ext, None, False,
                                      "not checked: the file states no total with extensions"))
        else:
            bad = abs(steps + ext - c.stated_total_extended_min) > tolerance_min
            parts = ", ".join(f"{e.max_count} x {e.minutes:g} min {e.option}"
                              for e in c.extensions)
            out.append(TreatmentCheck(
                "total-extended", "total with every extension", steps + ext,
                c.stated_total_extended_min, bad,
                f"{steps:g} + {ext:g} min of extensions "
                f"({parts}); stated {c.stated_total_extended_min:g} min "
                f"({c.stated_total_extended_status})"
                + ("; re-read the extensions" if bad else "")))
    o2_at: dict[float, float] = defaultdict(float)
    for s in table.rows:
        if s.from_depth == s.to_depth and _is_o2(s.gas):
            o2_at[s.to_depth] += s.minutes
    for a in c.attendant_oxygen:
        if a.depth is None or a.oxygen_min <= 0:
            continue
        have = o2_at.get(a.depth, 0.0)
        out.append(TreatmentCheck(
            "attendant", f"attendant: {a.when}", a.oxygen_min, have, False,
            f"{a.oxygen_min:g} min of the patient's {have:g} oxygen minutes at {a.depth:g} {unit}"
            + ("; more than the table holds there (the plan reports the shortfall)"
               if a.oxygen_min > have else "")))
    errs = [i for i in sanity_issues(table.model) if i.severity == "error"]
    return TreatmentScreen(table.name, float(tolerance_min), out, errs)
