"""What the audit rules read: the approved plan and dive, the executed dive, the figures.

The audit's rules are :class:`supervisor.rules.base.Rule` objects in the family
:data:`FAMILY`, so their findings take the check's form and severity logic: a
breach fails for the contractor's policy, the approved plan, or a VERIFIED
source, and warns for an unconfirmed one.  Each rule reads an
:class:`AuditContext`; the engine figures (the executed profile through the
model, the oxygen exposure, the required schedule) are computed before the rules
run (:mod:`supervisor.audit.run`).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

from supervisor.audit.executed import Executed
from supervisor.findings import Finding
from supervisor.plan import Dive, Plan, Policy
from supervisor.rules.base import Family

FAMILY = Family("audit", "Executed dive against the approved plan")

#: Where to look for what to do about omitted decompression or a fast ascent.  The
#: audit points to the procedure; it never says what to do itself.
OMITTED_DECOMPRESSION = {
    "procedure": "omitted decompression",
    "text": "follow the omitted-decompression procedure of the contractor's manual and its "
            "decompression table; the diving supervisor and a diving medical officer decide",
    "citation": "U.S. Navy Diving Manual, Rev 7, ch. 9 (omitted decompression; management "
                "of asymptomatic omitted decompression)",
    "source_status": "FROM MEMORY",
}
FAST_ASCENT = {
    "procedure": "ascent rate exceeded",
    "text": "follow the contractor's manual for an ascent faster than the table's rate (a "
            "stop missed or shortened on the way is omitted decompression); symptoms are "
            "treated as decompression sickness or arterial gas embolism under its treatment "
            "procedures",
    "citation": "U.S. Navy Diving Manual, Rev 4 Change A, ch. 9 (rate of ascent); Rev 7, "
                "ch. 9 (omitted decompression) and ch. 17 (treatment)",
    "source_status": "OLDER-EDITION",
}


@dataclass
class PlanAudit:
    """The approved plan, read once for any number of logs.

    Attributes
    ----------
    plan : Plan
        The validated plan.
    plan_sha256 : str
        SHA-256 of the plan file bytes.
    plan_path : str or None
        The plan's path as given.
    plan_bytes : bytes
        The plan file (for the record store).
    table : Table or None
        The policy's reference table, loaded; ``table_error`` says why not.
    analysis : PlanAnalysis or None
        The check's analysis of the planned dives (tissues carried across the
        planned surface intervals); ``analysis_error`` says why not.
    """

    plan: Plan
    plan_sha256: str
    plan_path: str | None = None
    plan_bytes: bytes = b""
    table: Any = None
    table_error: str | None = None
    analysis: Any = None
    analysis_error: str | None = None

    @property
    def policy(self) -> Policy:
        """The plan's policy with the unit's defaults filled in."""
        return self.plan.resolved_policy

    @property
    def unit(self) -> str:
        """The plan's depth unit."""
        return self.plan.unit


@dataclass
class AuditContext:
    """One executed dive against its approved dive.

    Attributes
    ----------
    pa : PlanAudit
        The plan.
    dive : Dive
        The approved dive.
    ex : Executed
        The executed profile (plan unit).
    log : dict
        The log's source, header fields (``meta``) and import issues.
    required : Required or None
        The schedule the actual exposure requires (:mod:`supervisor.audit.required`).
    evaluation : ProfileEvaluation or None
        The executed profile through the policy's model.
    exposure : OxygenExposure or None
        The oxygen exposure of the executed profile as breathed.
    errors : dict
        Section name to the reason it could not be computed.
    figures : dict
        Figures a rule computed, kept for the result (the approved stops' times).
    """

    pa: PlanAudit
    dive: Dive
    ex: Executed
    log: dict[str, Any] = field(default_factory=dict)
    required: Any = None
    evaluation: Any = None
    exposure: Any = None
    errors: dict[str, str] = field(default_factory=dict)
    figures: dict[str, Any] = field(default_factory=dict)

    @property
    def unit(self) -> str:
        """The plan's depth unit."""
        return self.pa.unit

    @property
    def policy(self) -> Policy:
        """The plan's resolved policy."""
        return self.pa.policy

    @property
    def step(self) -> float:
        """The policy's stop step [unit]."""
        return float(self.policy.stop_step)

    @property
    def travel_rate(self) -> float:
        """The approved dive's ascent rate [unit/min]."""
        return float(self.pa.plan.ascent_rate(self.dive))

    def analysis(self) -> Any:
        """The check's analysis of the approved dive, or None."""
        pa = self.pa.analysis
        return None if pa is None else pa.dives.get(self.dive.id)

    def tissues_unknown(self) -> str | None:
        """Why the tissues this dive starts with are not known, or None when they are.

        A dive after another of its diver starts from that dive's tissues; without the
        plan's analysis (or with its carry failed) they are unknown, and a start from
        saturation at the surface would understate them.
        """
        a = self.analysis()
        repetitive = self.dive.previous_dive is not None or any(
            d.diver == self.dive.diver for d in self.pa.plan.dives[:self.pa.plan.dives.index(
                self.dive)])
        if not repetitive:
            return None
        if a is None:
            return ("the tissues carried from the diver's previous dive are unknown (" +
                    (self.pa.analysis_error or "the plan's analysis is missing") + ")")
        if "tissues" in a.errors:
            return a.errors["tissues"]
        return None


def with_action(f: Finding, action: dict[str, str]) -> Finding:
    """The finding with the procedure that governs what to do (``action`` in its JSON)."""
    return replace(f, extra={**f.extra, "action": dict(action)})
