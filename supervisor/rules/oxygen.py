"""Oxygen exposure: PO2 per phase against the policy, CNS percentage and pulmonary dose.

PO2 is the inspired oxygen partial pressure of the dry gas at the diver's depth
(Dalton's law) in each phase of the planned profile: ``bottom`` (descent and
bottom), ``decompression`` (in the water after leaving the bottom) and
``chamber``.  The policy's PO2 limits are the contractor's own: a dive above one
fails.

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

from collections.abc import Iterator
from typing import Any

from supervisor import analysis as an
from supervisor.engine import oxygen as ox
from supervisor.findings import Finding
from supervisor.rules.base import CheckContext, Family, Rule

FAMILY = Family("oxygen", "Oxygen exposure")

NOAA_CNS = "NOAA Diving Manual, CNS oxygen exposure limits (normal exposures)"
REPEX = "Hamilton, Kenyon & Peterson, REPEX, NOAA OUR Technical Report 88-1B (1988)"
CNS_LIMIT_PERCENT = 100.0
NOT_COMPUTED = "not computed"

_PHASES: dict[str, tuple[str, str]] = {
    "bottom": ("po2_bottom_max", "bottom"),
    "decompression": ("po2_decompression_max", "in-water decompression"),
    "chamber": ("po2_chamber_max", "chamber"),
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
    field, what = _PHASES[phase]

    def rule(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
        pa = an.for_context(ctx)
        limit = float(getattr(ctx.policy, field))
        for d in ctx.dives():
            a = pa.dives[d.id]
            if "oxygen" in a.errors:
                yield r.review(
                    f"needs review: {what} PO2 could not be computed ({a.errors['oxygen']})",
                    dive=d.id, measured=NOT_COMPUTED, limit=limit,
                    unit="bar",
                )
                continue
            po2 = a.po2_max.get(phase)
            if po2 is None:
                continue  # the dive has no such phase
            kw = dict(measured=round(po2, 3), limit=limit, unit="bar", dive=d.id)
            if po2 > limit + 1e-6:
                yield r.breach(f"{what} PO2 reaches {po2:.2f} bar, above the policy limit", **kw)
            else:
                yield r.ok(f"{what} PO2 at most {po2:.2f} bar", **kw)

    rule.__doc__ = f"Highest {what} PO2 against policy.{field}."
    return rule


for _phase, (_field, _what) in _PHASES.items():
    FAMILY.rule(
        f"oxygen-po2-{_phase}",
        title=f"{_what.capitalize()} PO2 within policy",
        citation=f"contractor policy (policy.{_field})",
        kind="policy",
    )(_po2_rule(_phase))


@FAMILY.rule(
    "oxygen-po2-range",
    title="PO2 within the range of the CNS table",
    citation=NOAA_CNS,
    kind="reference",
    source_status="FROM MEMORY",
)
def po2_range(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A PO2 above the CNS table's highest row makes the CNS figure a lower bound: review."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        e = pa.dives[d.id].exposure
        if e is None:
            continue
        kw = dict(measured=round(e.max_po2_atm, 3), limit=e.range_top_atm, unit="atm", dive=d.id,
                  status=e.cns_limits.source_status)
        if e.out_of_range:
            yield r.review(
                f"needs review: PO2 reaches {e.max_po2_atm:.2f} atm, above the CNS table's "
                f"highest row ({e.range_top_atm:g} atm) for {e.minutes_above_range:.1f} min; "
                f"the CNS figure of {e.cns_percent:.0f} % is a lower bound",
                **kw,
            )
        else:
            yield r.ok(f"PO2 at most {e.max_po2_atm:.2f} atm, inside the CNS table", **kw)


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
        bound = " (lower bound)" if e.out_of_range else ""
        yield _limit_finding(
            r, e.cns_limits, e.cns_percent > CNS_LIMIT_PERCENT + 1e-9,
            f"CNS exposure {e.cns_percent:.0f} %{bound} of the single-exposure limits",
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
            f"{day.diver}: highest CNS exposure in any 24 hours {dd.max_cns_24h_percent:.0f} % "
            f"of the 24-hour limits over {len(day.dive_ids)} dive(s)",
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
