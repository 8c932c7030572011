"""Oxygen exposure: PO2 per phase against the policy, CNS percentage and pulmonary dose.

PO2 is the inspired oxygen partial pressure of the dry gas at the diver's depth
(Dalton's law) in each phase of the planned profile: ``bottom`` (descent and
bottom), ``decompression`` (in the water after leaving the bottom) and
``chamber``, in ata.  The limits are the policy's (:mod:`supervisor.rules.po2_limits`):
the contractor's own fail; of the defaults nobody chose, the bottom 1.4 ata warns and
the in-water and chamber ceilings, which guard against oxygen convulsion, fail.  Every
comparison tolerates 0.01 atm.

The CNS percentage is charged against the NOAA normal-exposure limits and the
pulmonary dose (OTU) against the REPEX allowances, both through
:mod:`supervisor.engine.oxygen`.  Those tables are bundled with every row
unverified and FROM MEMORY or SECONDARY, so a figure over a limit warns and a
figure within it is a pass that still needs review.  A PO2 above the CNS table's
highest row (1.6 atm) cannot be charged: the CNS figure is then a lower bound and
needs review.  Across the day, each diver's dives are put on one time line
(:mod:`supervisor.analysis`) for the rolling 24-hour CNS and OTU checks.

References
----------
.. [1] NOAA Diving Manual, oxygen partial pressure and exposure time limits for
       normal exposures (3rd to 6th editions), after Butler and Thalmann (1986).
.. [2] Hamilton, R. W., Kenyon, D. J., Peterson, R. E., REPEX habitat diving
       procedures, NOAA Office of Undersea Research Technical Report 88-1B (1988).
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from typing import Any

from supervisor import analysis as an
from supervisor import constants as C
from supervisor.engine import oxygen as ox
from supervisor.engine.oxygen import PO2_TOLERANCE_ATM
from supervisor.findings import Finding
from supervisor.rules.base import CheckContext, Family, Rule
from supervisor.rules.po2_limits import PHASE_KEYS, po2_limit

FAMILY = Family("oxygen", "Oxygen exposure")

NOAA_CNS = "NOAA Diving Manual, CNS oxygen exposure limits (normal exposures)"
REPEX = "Hamilton, Kenyon & Peterson, REPEX, NOAA OUR Technical Report 88-1B (1988)"
CNS_LIMIT_PERCENT = 100.0
#: Short form of the chamber procedure's limit for a finding's limit column.
CHAMBER_PERIODS = f"{an.O2_AIR_BREAK[0]:g} min O2 / {an.O2_AIR_BREAK[1]:g} min air"
NOT_COMPUTED = "not computed"

_PHASES: dict[str, str] = {
    "bottom": "bottom",
    "decompression": "in-water decompression",
    "chamber": "chamber",
}


def _limit_finding(
    r: Rule, info: ox.TableInfo, exceeded: bool, message: str, **kw: Any
) -> Finding:
    """Over a limit: fail only on a verified VERIFIED table, else warn; within: pass."""
    trusted = info.usable_without_review
    if exceeded:
        if trusted:
            return r.breach(message, status=info.source_status, **kw)
        return r.finding(
            "warn", message + f" ({info.name}: {info.source_status}, unverified rows)",
            status=info.source_status, verified=False, **kw,
        )
    if trusted:
        return r.ok(message, status=info.source_status, **kw)
    return r.ok(
        message + f"; needs review: {info.name} is {info.source_status} with unverified rows",
        status=info.source_status, verified=False, **kw,
    )


def _po2_rule(phase: str) -> Any:
    what = _PHASES[phase]

    def rule(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
        pa = an.for_context(ctx)
        lim = po2_limit(ctx.plan.policy, phase, pa.table)
        for d in ctx.dives():
            a = pa.dives[d.id]
            if "oxygen" in a.errors:
                yield r.review(
                    f"needs review: {what} PO2 could not be computed ({a.errors['oxygen']})",
                    dive=d.id, measured=NOT_COMPUTED, limit=lim.fail_ata, unit="ata",
                )
                continue
            po2_bar = a.po2_max.get(phase)
            if po2_bar is None:
                continue  # the dive has no such phase
            po2 = po2_bar / C.P_ATM_BAR
            sev = lim.judge(po2)
            limit = lim.limit_for(sev)
            kw = dict(measured=round(po2, 3), limit=round(limit, 3), unit="ata", dive=d.id,
                      citation=lim.citation)
            tol = f"tolerance {PO2_TOLERANCE_ATM:g} atm"
            if sev == "fail":
                yield r.breach(f"{what} PO2 reaches {po2:.2f} ata, above the limit {limit:g} "
                               f"ata ({lim.basis}; {tol})", **kw)
            elif sev == "warn":
                yield r.finding(
                    "warn", f"{what} PO2 reaches {po2:.2f} ata, above {limit:g} ata "
                    f"({lim.basis}; {tol}); set policy.{lim.key} to the contractor's own "
                    "limit", status=None, verified=False, **kw)
            else:
                yield r.ok(f"{what} PO2 at most {po2:.2f} ata, within {limit:g} ata "
                           f"({lim.basis}; {tol})", **kw)

    rule.__doc__ = f"Highest {what} PO2 against the policy's limit (rules.po2_limits)."
    return rule


for _phase, _what in _PHASES.items():
    FAMILY.rule(
        f"oxygen-po2-{_phase}",
        title=f"{_what.capitalize()} PO2 within policy",
        citation=f"contractor policy (policy.{PHASE_KEYS[_phase]})",
        kind="policy",
    )(_po2_rule(_phase))


@FAMILY.rule(
    "oxygen-po2-range",
    title="In-water PO2 within the range of the CNS table",
    citation=NOAA_CNS,
    kind="reference",
    source_status="FROM MEMORY",
)
def po2_range(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """An in-water PO2 above the CNS table's top row (+ 0.01 atm): counted at the top row's
    rate, the CNS figure a lower bound; fails on a verified table, else warns for review.
    Chamber oxygen gets a note naming the rule that counts it (the chamber periods)."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        e = pa.dives[d.id].exposure
        if e is None:
            continue
        info = e.cns_limits
        kw = dict(measured=round(e.water_max_po2_atm, 3), limit=e.range_top_atm, unit="atm",
                  dive=d.id, status=info.source_status)
        if e.out_of_range:
            text = (f"in-water PO2 reaches {e.water_max_po2_atm:.2f} atm, above the CNS "
                    f"table's highest row ({e.range_top_atm:g} atm, tolerance "
                    f"{e.po2_tolerance_atm:g} atm) for {e.minutes_above_range:.1f} min; "
                    f"counted at the {e.range_top_atm:g} atm rate, the CNS figure is at "
                    f"least {_floor1(e.cns_percent)} % (a lower bound)")
            if info.usable_without_review:
                yield r.breach(text, **kw)
            else:
                yield r.review(f"needs review: {text} ({info.name}: {info.source_status}, "
                               "unverified rows)", **kw)
        else:
            yield r.ok(f"in-water PO2 at most {e.water_max_po2_atm:.2f} atm, inside the CNS "
                       f"table (tolerance {e.po2_tolerance_atm:g} atm)", **kw)
        c = an.chamber_oxygen_json(e, d)
        if c is not None:  # chamber oxygen: say which rule counts it instead
            yield r.note(
                f"chamber oxygen {c['minutes']:.1f} min ({c['periods']:g} period(s)), "
                f"{c['otu']:g} OTU, PO2 up to {c['max_po2_atm']:.2f} atm: not on the "
                f"in-water CNS table and given no CNS percentage; counted by "
                f"{c['counted_by']}: {c['limit']}",
                measured=c["minutes"], limit=CHAMBER_PERIODS, unit="min", dive=d.id,
            )


def _floor1(x: float) -> str:
    """A lower bound printed rounded down to 0.1 (never rounded up past the figure)."""
    return f"{math.floor(x * 10 + 1e-9) / 10:g}"


@FAMILY.rule(
    "oxygen-cns-dive",
    title="CNS oxygen exposure of each dive",
    citation=f"{NOAA_CNS}, single-exposure column",
    kind="reference",
    source_status="FROM MEMORY",
)
def cns_dive(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The dive's CNS percentage against the single-exposure limits (100 %)."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        e = pa.dives[d.id].exposure
        if e is None:
            yield r.review("needs review: the CNS exposure could not be computed", dive=d.id,
                           measured=NOT_COMPUTED, limit=CNS_LIMIT_PERCENT, unit="%")
            continue
        figure = (f"at least {_floor1(e.cns_percent)} % (a lower bound: PO2 above the "
                  "table in the water)" if e.out_of_range else f"{e.cns_percent:.0f} %")
        where = " (in the water; chamber oxygen counted apart)" if e.has_chamber else ""
        yield _limit_finding(
            r, e.cns_limits, e.cns_percent > CNS_LIMIT_PERCENT + 1e-9,
            f"in-water CNS exposure {figure} of the single-exposure limits{where}",
            measured=round(e.cns_percent, 1), limit=CNS_LIMIT_PERCENT, unit="%", dive=d.id,
        )


def _day_dive(day: an.DiverDay) -> str:
    return day.dive_ids[-1]


@FAMILY.rule(
    "oxygen-cns-day",
    title="CNS oxygen exposure in any 24 hours",
    citation=f"{NOAA_CNS}, 24-hour column",
    kind="reference",
    source_status="FROM MEMORY",
)
def cns_day(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Each diver's highest 24-hour CNS percentage across the plan's dives."""
    pa = an.for_context(ctx)
    for day in pa.divers.values():
        dd = day.daily
        if dd is None:
            yield r.review(
                f"needs review: {day.diver}'s 24-hour oxygen exposure could not be computed "
                f"({day.errors.get('daily', 'no exposure')})",
                dive=_day_dive(day), measured=NOT_COMPUTED, limit=CNS_LIMIT_PERCENT, unit="%",
            )
            continue
        yield _limit_finding(
            r, dd.cns_limits, dd.cns_24h_exceeded,
            f"{day.diver}: highest in-water CNS exposure in any 24 hours "
            + (f"at least {_floor1(dd.max_cns_24h_percent)} % (a lower bound: PO2 above the "
               "table in the water)" if dd.out_of_range else
               f"{dd.max_cns_24h_percent:.0f} %")
            + f" of the 24-hour limits over {len(day.dive_ids)} dive(s)",
            measured=round(dd.max_cns_24h_percent, 1), limit=CNS_LIMIT_PERCENT, unit="%",
            dive=_day_dive(day),
        )


@FAMILY.rule(
    "oxygen-otu-dive",
    title="Pulmonary oxygen dose of each dive",
    citation=f"{REPEX}, single-day allowance",
    kind="reference",
    source_status="FROM MEMORY",
)
def otu_dive(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The dive's OTU against the REPEX single-day allowance."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        e = a.exposure
        day = pa.divers[d.diver].daily
        if e is None or day is None:
            yield r.review("needs review: the pulmonary dose could not be computed", dive=d.id,
                           measured=NOT_COMPUTED, unit="OTU")
            continue
        allow = day.otu_allowance_24h
        yield _limit_finding(
            r, day.pulmonary_limits, e.otu > allow + 1e-9,
            f"pulmonary dose {e.otu:.0f} OTU against the single-day allowance of {allow:g} OTU",
            measured=round(e.otu, 1), limit=allow, unit="OTU", dive=d.id,
        )


@FAMILY.rule(
    "oxygen-otu-day",
    title="Pulmonary oxygen dose in any 24 hours and over the series",
    citation=f"{REPEX}, daily and series allowances",
    kind="reference",
    source_status="FROM MEMORY",
)
def otu_day(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Each diver's highest OTU in any 24 hours, and the multi-day series check."""
    pa = an.for_context(ctx)
    for day in pa.divers.values():
        dd = day.daily
        if dd is None:
            yield r.review(
                f"needs review: {day.diver}'s daily pulmonary dose could not be computed",
                dive=_day_dive(day), measured=NOT_COMPUTED, unit="OTU",
            )
            continue
        text = (f"{day.diver}: highest pulmonary dose in any 24 hours {dd.max_otu_24h:.0f} OTU "
                f"against {dd.otu_allowance_24h:g} OTU")
        if dd.series_exceeded and not dd.otu_24h_exceeded:
            text += "; a multi-day series exceeds its REPEX total"
        yield _limit_finding(
            r, dd.pulmonary_limits, dd.otu_24h_exceeded or dd.series_exceeded, text,
            measured=round(dd.max_otu_24h, 1), limit=dd.otu_allowance_24h, unit="OTU",
            dive=_day_dive(day),
        )
