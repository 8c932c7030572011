"""The surface interval of surface decompression, as executed.

The interval runs from leaving the last water stop (or the bottom, with no water
stop) to arriving at the chamber's first stop depth: the timed log's
``left-last-water-stop`` and ``chamber-at-depth`` events, or the times inferred
from a recorder log (:mod:`supervisor.audit.executed`).  It is judged against
the policy's ``surd_interval_max_min`` when the plan has that field, else
against 5 min, the limit of surface decompression on oxygen in the U.S. Navy
Diving Manual (Rev 7 ch. 9, SECONDARY; Rev 4 Change A ch. 14, OLDER-EDITION).
A late chamber guards against immediate harm, so an interval over the limit
fails whatever the status of the default.  What the procedure then requires is
stated with its status (from memory) and its source, never decided here.
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor.audit.context import FAMILY, AuditContext, with_action
from supervisor.findings import Finding
from supervisor.rules.base import Rule
from supervisor.rules.procedure import NAVY_REV7, SURD_INTERVAL_DEFAULT, SURD_LATE_TEXT

#: Past this interval the procedure abandons surface decompression [min] (from memory; the
#: same procedure text as the check's proc-surd-interval, ``SURD_LATE_TEXT``).
SURD_LATE_MAX_MIN = 7.0

#: What the procedure says about a late chamber: the check's own text (one source of it).
LATE_CHAMBER = {
    "procedure": "surface decompression interval exceeded",
    "text": SURD_LATE_TEXT + "; follow the contractor's manual",
    "citation": f"{NAVY_REV7} (surface decompression on oxygen: surface interval exceeded)",
    "source_status": "FROM MEMORY",
}


def interval_limit(ctx: AuditContext) -> tuple[float, str, str | None]:
    """The limit [min], its citation and source status (None: the contractor's policy)."""
    plan = ctx.pa.plan
    value = float(plan.resolved_policy.surd_interval_max_min)
    if "surd_interval_max_min" in plan.policy.model_fields_set:
        return value, "contractor policy (policy.surd_interval_max_min)", None
    return value, f"contractor policy (policy.surd_interval_max_min); {SURD_INTERVAL_DEFAULT}", \
        "SECONDARY"


def surface_interval(ctx: AuditContext) -> float | None:
    """Leaving the last water stop to arriving at chamber depth [min], or None."""
    ev = ctx.ex.events
    if "left_last_water_stop" in ev and "chamber_at_depth" in ev:
        return ev["chamber_at_depth"] - ev["left_last_water_stop"]
    return None


@FAMILY.rule(
    "audit-surd-interval",
    title="Surface decompression: leaving the water stop to chamber depth within the limit",
    citation="contractor policy (policy.surd_interval_max_min)",
    kind="policy",
)
def interval(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The executed surface interval against the policy's (or the procedure's) maximum."""
    if not ctx.dive.chamber_stops and ctx.dive.decompression != "surface-oxygen":
        return
    limit, citation, status = interval_limit(ctx)
    u = ctx.unit
    si = surface_interval(ctx)
    kw = dict(limit=limit, unit="min", dive=ctx.dive.id, citation=citation, status=status)
    if si is None:
        yield r.review("needs review: the log does not show leaving the last water stop and "
                       "reaching chamber depth; the surface interval cannot be measured",
                       measured="not in the log", **kw)
        return
    inferred = " (inferred from a recorder log)" if ctx.ex.source != "toml" else ""
    chamber = ctx.dive.chamber_stops
    to = f"{chamber[0].depth:g} {u} in the chamber" if chamber else "chamber depth"
    text = f"surface interval {si:.1f} min from leaving the last water stop to {to}{inferred}"
    if si > limit + 1e-9:
        late = ("over 7 min" if si > SURD_LATE_MAX_MIN else "between 5 and 7 min")
        f = r.breach(f"{text}: over the {limit:g}-min limit ({late}; the procedure's answer "
                     "is in 'action')", measured=round(si, 2), kind="policy", **kw)
        yield with_action(f, LATE_CHAMBER)
    else:
        # a pass under the unstated default (SECONDARY) or on inferred times needs review
        default = "" if status is None else f"; the {limit:g}-min limit is the default " \
            f"({status}), not the plan's"
        yield r.ok(text + default, measured=round(si, 2),
                   verified=status is None and not inferred, **kw)
