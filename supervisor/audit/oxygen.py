"""Oxygen exposure as breathed: the executed profile with the logged gases.

Inspired PO2 is the dry gas at the executed depth (Dalton's law) on the gas the
log says was breathed (the timed log's gas switches, oxygen periods and air
breaks; the recorder's gas column).  Per phase (``bottom``: in the water before
leaving the bottom; ``decompression``: in the water after it; ``chamber``) the
highest PO2 is judged against the policy's limits, which fail.  The CNS
percentage and the pulmonary dose (OTU) of the whole executed profile come from
:func:`supervisor.engine.oxygen.segment_exposure` and are judged as the check
judges the planned ones (:mod:`supervisor.rules.oxygen`): over a limit warns
while the limit tables are unverified.

References
----------
.. [1] NOAA Diving Manual, CNS oxygen exposure limits (normal exposures).
.. [2] Hamilton, R. W., Kenyon, D. J., Peterson, R. E., REPEX habitat diving
       procedures, NOAA OUR Technical Report 88-1B (1988).
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

import numpy as np

from supervisor import constants as C
from supervisor.audit.context import FAMILY, AuditContext
from supervisor.audit.executed import Executed
from supervisor.engine import oxygen as ox
from supervisor.findings import Finding
from supervisor.rules.base import Rule
from supervisor.rules.oxygen import CNS_LIMIT_PERCENT, NOAA_CNS, REPEX, _limit_finding
from supervisor.rules.po2_limits import po2_limit

PHASES: dict[str, tuple[str, str]] = {
    "bottom": ("po2_bottom_max", "bottom"),
    "decompression": ("po2_decompression_max", "in-water decompression"),
    "chamber": ("po2_chamber_max", "chamber"),
}


def exposure(ex: Executed) -> ox.OxygenExposure:
    """The oxygen exposure of the executed profile, segment by segment."""
    p = ex.p_bar(ex.depth)
    chamber = ex.place == "chamber"
    # chamber oxygen is kept apart, as in the check: no in-water CNS percentage for it
    return ox.segment_exposure(ex.minutes, p[:-1] * ex.fo2, p[1:] * ex.fo2,
                               in_chamber=chamber, chamber_oxygen=chamber & (ex.fo2 > 0.5))


def po2_by_phase(ex: Executed) -> dict[str, float | None]:
    """Highest inspired PO2 [bar] per phase; None for a phase the dive did not have."""
    if "po2_by_phase" not in ex.cache:
        ex.cache["po2_by_phase"] = _po2_by_phase(ex)
    return ex.cache["po2_by_phase"]


def _po2_by_phase(ex: Executed) -> dict[str, float | None]:
    p = ex.p_bar(ex.depth)
    po2 = np.maximum(p[:-1], p[1:]) * ex.fo2
    left = ex.events.get("left_bottom", float(ex.t[int(np.argmax(ex.depth))]))
    water = ex.place == "water"
    before = ex.t[1:] <= left + 1e-9
    masks = {"bottom": water & before, "decompression": water & ~before,
             "chamber": ex.place == "chamber"}
    return {k: (float(po2[m].max()) if m.any() else None) for k, m in masks.items()}


def _po2_rule(phase: str) -> Any:
    field, what = PHASES[phase]

    def rule(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
        # the check's own limits and their severity (supervisor.rules.po2_limits): one rule
        lim = po2_limit(ctx.pa.plan.policy, phase, getattr(ctx.pa, "table", None))
        po2_bar = po2_by_phase(ctx.ex).get(phase)
        if po2_bar is None:
            return
        po2 = po2_bar / C.P_ATM_BAR
        sev = lim.judge(po2)
        kw = dict(measured=round(po2, 3), limit=lim.limit_for(sev), unit="ata",
                  dive=ctx.dive.id, citation=lim.citation)
        if sev == "pass":
            yield r.ok(f"{what} PO2 as breathed at most {po2:.2f} ata ({lim.basis})", **kw)
        else:
            text = (f"{what} PO2 as breathed reached {po2:.2f} ata, above "
                    f"{lim.limit_for(sev):g} ata ({lim.basis})")
            yield r.finding(sev, text, verified=sev == "fail", **kw)

    rule.__doc__ = f"Highest {what} PO2 as breathed against the policy's {what} limit."
    return rule


for _phase, (_field, _what) in PHASES.items():
    FAMILY.rule(
        f"audit-po2-{_phase}",
        title=f"{_what.capitalize()} PO2 as breathed within policy",
        citation=f"contractor policy (policy.{_field}_ata)",
        kind="policy",
    )(_po2_rule(_phase))


def _missing(ctx: AuditContext, r: Rule, limit: float, unit: str) -> Finding:
    why = ctx.errors.get("oxygen", "not computed")
    return r.review(f"needs review: the oxygen exposure as breathed could not be computed "
                    f"({why})", measured="not computed", limit=limit, unit=unit,
                    dive=ctx.dive.id)


@FAMILY.rule(
    "audit-cns",
    title="CNS oxygen exposure as breathed",
    citation=f"{NOAA_CNS}, single-exposure column",
    kind="reference",
    source_status="FROM MEMORY",
)
def cns(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The executed dive's CNS percentage against the single-exposure limits (100 %)."""
    e = ctx.exposure
    if e is None:
        yield _missing(ctx, r, CNS_LIMIT_PERCENT, "%")
        return
    bound = (f" (a lower bound: PO2 reached {e.max_po2_atm:.2f} atm, above the table's "
             f"{e.range_top_atm:g} atm for {e.minutes_above_range:.1f} min)"
             if e.out_of_range else "")
    apart = (f"; chamber oxygen {e.chamber_oxygen_minutes:.0f} min counted apart (no in-water "
             "CNS percentage; chamber oxygen periods against the procedure)"
             if e.chamber_oxygen_minutes > 0 else "")
    f = _limit_finding(r, e.cns_limits, e.cns_percent > CNS_LIMIT_PERCENT + 1e-9,
                       f"CNS exposure as breathed in the water {e.cns_percent:.0f} %{bound} of "
                       f"the single-exposure limits{apart}", measured=round(e.cns_percent, 1),
                       limit=CNS_LIMIT_PERCENT, unit="%", dive=ctx.dive.id)
    if e.out_of_range and f.severity == "pass":
        text = f.message if "needs review" in f.message else f.message + "; needs review"
        f = r.review(text, measured=f.measured, limit=f.limit,
                     unit="%", dive=ctx.dive.id, status=e.cns_limits.source_status)
    yield f


@FAMILY.rule(
    "audit-otu",
    title="Pulmonary oxygen dose as breathed",
    citation=f"{REPEX}, single-day allowance",
    kind="reference",
    source_status="FROM MEMORY",
)
def otu(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The executed dive's OTU against the single-day allowance."""
    limits = ox.load_pulmonary_limits()
    allow = float(limits.total_allowance(1)[()])
    e = ctx.exposure
    if e is None:
        yield _missing(ctx, r, allow, "OTU")
        return
    yield _limit_finding(r, limits.info, e.otu > allow + 1e-9,
                         f"pulmonary dose as breathed {e.otu:.0f} OTU against the single-day "
                         f"allowance of {allow:g} OTU", measured=round(e.otu, 1), limit=allow,
                         unit="OTU", dive=ctx.dive.id)
