"""The audit's result and verdict: the ``supervisor.audit/1`` object.

Findings, counts and verdict follow the check (:mod:`supervisor.findings`):
any fail is ``does-not-conform``; a warning or an unverified finding
``needs-review``; else ``conforms``.  The JSON object (keys may be added, never
renamed)::

    {"schema": "supervisor.audit/1", "tool_version", "generated_at",
     "plan_sha256", "plan_path", "dive", "diver", "unit",
     "log": {"source": {"file", "format", "sha256", "bytes"}, "meta", "issues"},
     "executed": {"max_depth", "bottom_time_min", "bottom_time_basis", "duration_min",
                  "knots", "events_min", "chamber_inferred", "notes",
                  "rates": {"ascent": {...}, "descent": {...}},
                  "stops": [{"depth", "place", "gas", "required_min", "measured_min",
                             "band", "short"}],
                  "surface_interval_min", "po2_by_phase",
                  "oxygen": {"cns_percent", "cns_is_lower_bound", "otu", "max_po2_atm"},
                  "model_margin": {"ceiling_broken", "worst_excess", "surfacing_gf_percent",
                                   "controlling_compartment", "surface_interval_max_gf_percent",
                                   "coefficient_status"}},
     "required_schedule": {"approved", "actual", "deeper_than_approved",
                           "longer_than_approved", "governs", "table", "table_error",
                           "model", "model_error"},
     "findings": [check findings form, plus "action" where a procedure governs],
     "counts", "verdict", "cautions"}
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from typing import Any

from supervisor import __version__
from supervisor.audit.context import AuditContext
from supervisor.findings import Finding, Verdict, counts, verdict

SCHEMA = "supervisor.audit/1"

CAUTIONS: tuple[str, ...] = (
    "This audit compares the log with the approved plan; it supports the diving "
    "supervisor's decision and does not make it.",
    "What to do about a finding is the governing procedure's (the contractor's manual, its "
    "decompression tables, a diving medical officer), pointed to in each finding's action; "
    "watch the diver for symptoms whatever the verdict.",
    "A log shows what was recorded: a recorder's samples or a supervisor's times. Figures "
    "marked SECONDARY, FROM MEMORY, OLDER-EDITION or DERIVED must be confirmed against the "
    "current primary document.",
)


def _r(x: float | None, nd: int = 2) -> float | None:
    return None if x is None else round(float(x), nd)


@dataclass
class AuditResult:
    """One executed dive audited: its context and findings (sorted worst first)."""

    ctx: AuditContext
    findings: list[Finding]

    @property
    def verdict(self) -> Verdict:
        """The check's verdict of the findings."""
        return verdict(self.findings)

    @property
    def counts(self) -> dict[str, int]:
        """Findings per severity."""
        return counts(self.findings)

    def executed_json(self) -> dict[str, Any]:
        """The executed figures (``executed``)."""
        from supervisor.audit import oxygen, rates, stops, surd
        from supervisor.quantities import gf_percent_value
        from supervisor.units import bar_per_depth_unit

        c = self.ctx
        out = c.ex.summary()
        pol = c.policy
        out["rates"] = {
            "ascent": rates.check_rate(c.ex, "ascent", float(pol.ascent_rate_max)).to_json(),
            "descent": rates.check_rate(c.ex, "descent", float(pol.descent_rate_max)).to_json(),
        }
        out["stops"] = [s.to_json() for s in stops.approved_times(c)]
        out["surface_interval_min"] = _r(surd.surface_interval(c))
        out["po2_by_phase"] = {k: _r(v, 3) for k, v in oxygen.po2_by_phase(c.ex).items()}
        e = c.exposure
        out["oxygen"] = None if e is None else {
            "cns_percent": _r(e.cns_percent, 1), "cns_is_lower_bound": e.out_of_range,
            "otu": _r(e.otu, 1), "max_po2_atm": _r(e.max_po2_atm, 3)}
        ev = c.evaluation
        out["model_margin"] = None if ev is None else {
            "ceiling_broken": ev.ceiling_broken,
            "worst_excess": _r(ev.worst_excess_bar / bar_per_depth_unit(c.unit, c.ex.water)),  # type: ignore[arg-type]
            "surfacing_gf_percent": gf_percent_value(100.0 * ev.surfacing_gf),
            "controlling_compartment": ev.controlling_compartment,
            "surface_interval_max_gf_percent": None if ev.surface_interval_max_gf is None
            else gf_percent_value(100.0 * ev.surface_interval_max_gf),
            "coefficient_status": ev.coefficient_status,
        }
        return out

    def to_json(self, now: dt.datetime | None = None) -> dict[str, Any]:
        """The ``supervisor.audit/1`` object (module notes)."""
        c = self.ctx
        stamp = (now or dt.datetime.now(dt.UTC)).astimezone(dt.UTC)
        return {
            "schema": SCHEMA,
            "tool_version": __version__,
            "generated_at": stamp.strftime("%Y-%m-%dT%H:%M:%SZ"),
            "plan_sha256": c.pa.plan_sha256,
            "plan_path": c.pa.plan_path,
            "dive": c.dive.id,
            "diver": c.dive.diver,
            "unit": c.unit,
            "log": {k: c.log.get(k) for k in ("source", "meta", "issues")},
            "executed": self.executed_json(),
            "required_schedule": None if c.required is None else c.required.to_json(),
            "findings": [f.to_json() for f in self.findings],
            "counts": self.counts,
            "verdict": self.verdict,
            "cautions": list(CAUTIONS),
        }

    def summary_line(self) -> str:
        """One line: dive, log file, verdict and counts."""
        n = self.counts
        src = (self.ctx.log.get("source") or {}).get("file", "log")
        return (f"{self.ctx.dive.id} {src}: {self.verdict} ({n['fail']} fail, {n['warn']} "
                f"warn, {n['info']} info, {n['pass']} pass)")
