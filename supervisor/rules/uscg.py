"""Regulatory rules: USCG 46 CFR 197 Subpart B, where it differs from OSHA.

Applies to commercial diving at deepwater ports, from OCS installations or for
OCS activities, and from vessels required to hold a USCG certificate of
inspection.  Each rule carries the id of its row in the project's regulation
notes (e.g. ``uscg-432``) and the status of the source seen for it: VERIFIED
rows can fail a plan, others warn.  Several sections are confirmed only in the
2003/2004 annual CFR prints; compare with the current eCFR text.

The rule text here is a paraphrase, not the regulation and not legal advice.

References
----------
.. [1] 46 CFR 197 Subpart B, Commercial Diving Operations, §§197.200-197.488.
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor.findings import Finding
from supervisor.plan import Dive
from supervisor.rules.base import NONE, CheckContext, Family, Rule
from supervisor.rules.regulatory import (
    ENTRY_DIVER,
    LOCATION_RESERVE,
    MIXED,
    READY,
    RESERVE,
    SCUBA,
    SS_AIR,
    STANDBY,
    SUPERVISOR,
    SURFACE_SUPPLIED,
    TENDER,
    chamber_reaches,
    chamber_state,
    entry_point,
    mixed_status,
    tended,
)

FAMILY = Family("regulatory-uscg", "USCG commercial-diving rules (46 CFR 197 Subpart B)")

USCG = ("uscg-46-197-b",)

STAGE = "a stage or a bell"


@FAMILY.rule(
    "uscg-210",
    title="A diving supervisor designated for the operation",
    citation="46 CFR 197.210",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_supervisor(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The diving supervisor named in the job holds the supervisor role."""
    name = ctx.plan.job.supervisor
    m = ctx.member(name)
    if m is not None and m.has("supervisor"):
        yield r.ok(f"diving supervisor: {name} (designate in writing to the person-in-charge)")
    else:
        yield r.breach(
            f"job.supervisor {name!r} is not a team member with the supervisor role",
            measured=name,
            limit=SUPERVISOR,
        )


@FAMILY.rule(
    "uscg-430",
    title="SCUBA: within NDL and 130 fsw; line, standby, buddy, entry diver",
    citation="46 CFR 197.430",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_scuba(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """SCUBA barred outside NDL and deeper than 130 fsw; tending and standby rules."""
    site = ctx.plan.site
    for d in ctx.dives(SCUBA):
        kw = dict(measured=d.max_depth, limit=ctx.limit(130), unit=ctx.unit, dive=d.id)
        if ctx.fsw(d.max_depth) > 130:
            yield r.breach(f"SCUBA to {ctx.show(d.max_depth)} is deeper than 130 fsw", **kw)
        else:
            yield r.ok("SCUBA within 130 fsw", **kw)
        if ctx.outside_ndl(d):
            yield r.breach(
                "SCUBA outside the no-decompression limits is not allowed",
                dive=d.id,
                measured=d.decompression,
                limit="none",
            )
        if (site.current_kt > 1 or not d.direct_ascent_possible) and not d.line_tended:
            yield r.breach(
                "SCUBA diver not line-tended in current over 1 kt or without direct ascent",
                dive=d.id,
                measured=site.current_kt,
                limit=1.0,
                unit="kt",
            )
        if ctx.standby_for(d) is None:
            yield r.breach("no standby diver available", dive=d.id, measured=NONE, limit=STANDBY)
        if not (d.line_tended or d.buddy):
            yield r.breach(
                "SCUBA diver neither line-tended nor buddied (a pickup boat is also "
                "needed when not line-tended)",
                dive=d.id,
                measured=NONE,
                limit="line or buddy",
            )
        if site.confined_space and not (d.entry_diver and d.entry_diver != d.diver):
            yield r.breach(
                "confined space: no diver at the entry point",
                dive=d.id,
                measured=d.entry_diver or NONE,
                limit=ENTRY_DIVER,
            )


@FAMILY.rule(
    "uscg-432",
    title="Surface-supplied air: depth limits and extra equipment deeper than 130 fsw",
    citation="46 CFR 197.432",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_ss_air(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Shallower than 190 fsw, or 220 fsw with BT <= 30 min; deeper than 130 fsw or outside NDL:
    secondary supply, chamber ready at the site, stage or bell, bell over 120 min in-water
    decompression, tender per diver, standby, diver-carried reserve."""
    ch, gs = ctx.plan.chamber, ctx.plan.gas_supply
    confined = ctx.plan.site.confined_space
    for d in ctx.dives(SS_AIR):
        fsw = ctx.fsw(d.max_depth)
        short = d.bottom_time_min <= 30
        ok_depth = fsw < 190 or (short and fsw <= 220)
        lim = 220 if short else 190
        kw = dict(measured=d.max_depth, limit=ctx.limit(lim), unit=ctx.unit, dive=d.id)
        if ok_depth:
            yield r.ok(f"surface-supplied air to {ctx.show(d.max_depth)} within the limit", **kw)
        else:
            cond = "deeper than 220 fsw" if short else "190 fsw or deeper with more than 30 min"
            yield r.breach(f"surface-supplied air to {ctx.show(d.max_depth)}: {cond}", **kw)
        if not (fsw > 130 or ctx.outside_ndl(d)):
            continue
        bad = []
        if gs.secondary is None:
            bad.append(
                r.breach(
                    "no secondary air supply (gas_supply.secondary)",
                    dive=d.id,
                    measured=NONE,
                    limit=LOCATION_RESERVE,
                )
            )
        if not (ch.on_site and ch.ready):
            bad.append(
                r.breach(
                    "no chamber ready at the site",
                    dive=d.id,
                    measured=chamber_state(ctx),
                    limit=READY,
                )
            )
        if not d.stage and d.bell == "none":
            bad.append(
                r.breach("neither a stage nor a bell", dive=d.id, measured=NONE, limit=STAGE)
            )
        exception = _bell_exception(d, confined)
        if d.in_water_stop_min > 120 and d.bell == "none" and not exception:
            bad.append(
                r.breach(
                    f"{d.in_water_stop_min:g} min in-water decompression and no bell (the "
                    "exceptions, a heavyweight outfit or a physically confining space, do not "
                    "apply)",
                    dive=d.id,
                    measured=d.in_water_stop_min,
                    limit=120.0,
                    unit="min",
                    citation="46 CFR 197.432(e)(4)",
                )
            )
        if not (d.tender and d.tender != d.diver):
            bad.append(
                r.breach(
                    "no separate tender named for this diver",
                    dive=d.id,
                    measured=d.tender or NONE,
                    limit=TENDER,
                )
            )
        if ctx.standby_for(d) is None:
            bad.append(
                r.breach("no standby diver available", dive=d.id, measured=NONE, limit=STANDBY)
            )
        if not (d.heavy_gear or confined or ctx.has_bailout(d)):
            bad.append(
                r.breach(
                    f"no diver-carried reserve listed for {d.diver}",
                    dive=d.id,
                    measured=NONE,
                    limit=RESERVE,
                    citation="46 CFR 197.432(e)(7)",
                )
            )
        if d.in_water_stop_min > 120 and d.bell == "none" and exception:
            yield r.ok(f"{d.in_water_stop_min:g} min in-water decompression without a bell: "
                       f"allowed with {exception}", dive=d.id, measured=d.in_water_stop_min,
                       limit=120.0, unit="min", citation="46 CFR 197.432(e)(4)")
        yield from bad or [
            r.ok(
                "secondary supply, chamber, stage or bell, tender, standby and "
                "reserve in place for a dive deeper than 130 fsw or outside NDL",
                dive=d.id,
            )
        ]


def _bell_exception(d: Dive, confined: bool) -> str:
    """The exception to the bell rules of 46 CFR 197.432(e)(4) and 197.434(c) that applies."""
    if d.heavy_gear:
        return "a heavyweight outfit"
    return "a physically confining space" if confined else ""


@FAMILY.rule(
    "uscg-432-c",
    title="Surface-supplied air: each diver continuously tended",
    citation="46 CFR 197.432(c)",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_ss_tended(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Each surface-supplied air diver is continuously tended, at any depth."""
    for d in ctx.dives(SS_AIR):
        yield tended(ctx, r, d)


@FAMILY.rule(
    "uscg-432-d",
    title="Surface-supplied air in a confined space: a diver at the entry point tends the line",
    citation="46 CFR 197.432(d)",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_ss_entry(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """In a confined space a diver stationed at the underwater entry point tends the line."""
    if not ctx.plan.site.confined_space:
        return
    for d in ctx.dives(SS_AIR):
        yield entry_point(r, d, "confined space: no diver named at the underwater entry point "
                          "to tend the line")


@FAMILY.rule(
    "uscg-434",
    title="Mixed gas: chamber or closed bell, stage, bells by depth, tender, standby, two supplies",
    citation="46 CFR 197.434",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_mixed(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Chamber or closed bell ready; stage unless a bell; bell > 220 fsw or > 120 min in-water
    decompression unless heavyweight or confining space (c); closed bell > 300 fsw unless
    confining space (d); a separate tender per diver (e); standby; primary and secondary gas."""
    ch, gs = ctx.plan.chamber, ctx.plan.gas_supply
    confined = ctx.plan.site.confined_space
    for d in ctx.dives(*MIXED):
        st = mixed_status(d, "VERIFIED")
        fsw = ctx.fsw(d.max_depth)
        bad = []
        if not ((ch.on_site and ch.ready) or d.bell == "closed"):
            bad.append(
                r.breach(
                    "no chamber ready at the site and no closed bell",
                    dive=d.id,
                    status=st,
                    measured=chamber_state(ctx),
                    limit=f"{READY} or a closed bell",
                )
            )
        if not d.stage and d.bell == "none":
            bad.append(
                r.breach(
                    "neither a stage nor a bell",
                    dive=d.id,
                    status=st,
                    measured=NONE,
                    limit=STAGE,
                )
            )
        exception = _bell_exception(d, confined)
        needs_bell = fsw > 220 or d.in_water_stop_min > 120
        if needs_bell and d.bell == "none" and not exception:
            bad.append(
                r.breach(
                    "deeper than 220 fsw or over 120 min in-water decompression without a bell "
                    "(the exceptions, a heavyweight outfit or a physically confining space, do "
                    "not apply)",
                    dive=d.id,
                    measured=d.max_depth,
                    limit=ctx.limit(220),
                    unit=ctx.unit,
                    status=st,
                    citation="46 CFR 197.434(c)",
                )
            )
        elif needs_bell and d.bell == "none":
            yield r.ok(f"no bell: allowed with {exception}", dive=d.id, status=st,
                       citation="46 CFR 197.434(c)")
        if fsw > 300 and d.bell != "closed" and not confined:
            bad.append(
                r.breach(
                    "deeper than 300 fsw without a closed bell (the exception, a physically "
                    "confining space, does not apply)",
                    dive=d.id,
                    measured=d.max_depth,
                    limit=ctx.limit(300),
                    unit=ctx.unit,
                    status=st,
                    citation="46 CFR 197.434(d)",
                )
            )
        elif fsw > 300 and d.bell != "closed":
            yield r.ok("no closed bell deeper than 300 fsw: allowed in a physically confining "
                       "space", dive=d.id, status=st, citation="46 CFR 197.434(d)")
        if not (d.tender and d.tender != d.diver):
            bad.append(
                r.breach(
                    "no separate tender named for this diver",
                    dive=d.id,
                    status=st,
                    measured=d.tender or NONE,
                    limit=TENDER,
                    citation="46 CFR 197.434(e)",
                )
            )
        if ctx.standby_for(d) is None:
            bad.append(
                r.breach(
                    "no standby diver available",
                    dive=d.id,
                    status=st,
                    measured=NONE,
                    limit=STANDBY,
                )
            )
        if gs.secondary is None:
            bad.append(
                r.breach(
                    "no secondary gas supply",
                    dive=d.id,
                    status=st,
                    measured=NONE,
                    limit=LOCATION_RESERVE,
                )
            )
        yield from bad or [
            r.ok(
                "chamber or closed bell, stage or bell, standby and secondary gas in place",
                dive=d.id,
                status=st,
            )
        ]


@FAMILY.rule(
    "uscg-346e",
    title="Surface-supplied outside NDL, deeper than 130 fsw or mixed gas: more supply, reserve",
    citation="46 CFR 197.346(e)-(g)",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_supply(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """More than the primary supply and a diver-carried reserve (the standby diver's hose with
    a heavyweight outfit applies at any depth: ``uscg-346c``)."""
    gs = ctx.plan.gas_supply
    for d in ctx.dives(*SURFACE_SUPPLIED):
        if not (ctx.fsw(d.max_depth) > 130 or ctx.outside_ndl(d) or d.mode in MIXED):
            continue
        if gs.secondary is None:
            yield r.breach(
                "only the primary supply on site",
                dive=d.id,
                measured="primary only",
                limit="primary and secondary supply",
            )
        else:
            yield r.ok("secondary supply on site", dive=d.id)
        yield r.need(ctx.has_bailout(d), f"a diver-carried reserve for {d.diver}", dive=d.id)


@FAMILY.rule(
    "uscg-346c",
    title="Surface-supplied heavyweight outfit: an extra hose for the standby diver, any depth",
    citation="46 CFR 197.346(c)",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_heavy_hose(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Every surface-supplied operation with a heavyweight outfit has an extra breathing-gas
    hose, with the tools to attach it, available to the standby diver, at any depth."""
    for d in ctx.dives(*SURFACE_SUPPLIED):
        if d.heavy_gear:
            yield r.need(d.standby_hose, "an extra breathing-gas hose, with the tools to attach "
                         "it, for the standby diver (heavyweight outfit, any depth; "
                         "dives[].standby_hose)", dive=d.id)


def _uscg_chamber_needed(ctx: CheckContext, d: Dive) -> bool:
    return (
        ctx.fsw(d.max_depth) > 130
        or ctx.outside_ndl(d)
        or d.mode in MIXED
        or d.decompression == "surface-oxygen"
    ) and d.mode != SCUBA


@FAMILY.rule(
    "uscg-332",
    title="Chamber capability: 6 ATA for dives to 300 fsw, else the dive's depth",
    citation="46 CFR 197.332",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_chamber_depth(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The chamber reaches 6 ATA (165 fsw) for dives to 300 fsw, otherwise the maximum depth."""
    ch = ctx.plan.chamber
    for d in ctx.dives():
        if not _uscg_chamber_needed(ctx, d) or not ch.on_site:
            continue
        need_fsw = 165.0 if ctx.fsw(d.max_depth) <= 300 else ctx.fsw(d.max_depth)
        kw = dict(limit=ctx.limit(need_fsw), unit=ctx.unit, dive=d.id)
        yield from chamber_reaches(ctx, r, need_fsw, "", "chamber", kw)


@FAMILY.rule(
    "uscg-314",
    title="First aid; chamber, tables and treatment gas for deeper or decompression dives",
    citation="46 CFR 197.314",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_first_aid(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """First-aid kit, handbook, resuscitator; for mixed gas, > 130 fsw or outside NDL also a
    chamber, decompression and treatment tables and treatment gas."""
    s, ch = ctx.plan.site, ctx.plan.chamber
    yield r.need(s.first_aid_kit, "a physician-approved first-aid kit")
    yield r.need(s.first_aid_handbook, "a first-aid handbook")
    yield r.need(s.resuscitator, "a bag-type manual resuscitator")
    if any(_uscg_chamber_needed(ctx, d) for d in ctx.dives()):
        yield r.need(ch.on_site and ch.ready, "a chamber ready at the site")
        yield r.need(s.tables_on_site, "decompression tables at the site")
        yield r.need(ch.equipment.treatment_tables, "treatment tables at the site")
        yield r.need(ch.equipment.treatment_gas, "treatment gas at the site")


@FAMILY.rule(
    "uscg-410",
    title="Supervisor duties: comms; a non-diving member to run the chamber",
    citation="46 CFR 197.410",
    source_status="VERIFIED",
    jurisdictions=USCG,
)
def uscg_supervisor_duties(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Voice and emergency comms; outside NDL, > 130 fsw or mixed gas: a non-diving member
    trained to operate the chamber."""
    s = ctx.plan.site
    if ctx.dives(*SURFACE_SUPPLIED):
        yield r.need(s.diver_voice_comms, "voice communication with each surface-supplied diver")
    yield r.need(s.emergency_comms, "a two-way link for emergency help")
    for d in ctx.dives():
        if not (ctx.fsw(d.max_depth) > 130 or ctx.outside_ndl(d) or d.mode in MIXED):
            continue
        busy = {d.diver, d.standby_diver}
        ops = [m for m in ctx.members_with("chamber-operator") if m.name not in busy]
        if ops:
            yield r.ok(f"chamber operator not diving: {ops[0].name}", dive=d.id)
        else:
            yield r.breach(
                "no non-diving team member trained to operate the chamber",
                dive=d.id,
                measured=NONE,
                limit="a chamber operator who is not diving",
            )
