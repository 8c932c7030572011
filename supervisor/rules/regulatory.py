"""Regulatory rules: OSHA 29 CFR 1910 Subpart T (USCG 46 CFR 197 Subpart B in :mod:`.uscg`).

Each rule carries the id of its row in the project's regulation notes (e.g.
``osha-424-b1``), the CFR paragraph it paraphrases and the status of the
source seen for it.  A row seen in the published text (VERIFIED) can fail a
plan; any other row only warns until the current eCFR text confirms it.
Depths are compared in fsw: msw plans are converted (both are pressure units).

The rule text here is a paraphrase, not the regulation and not legal advice;
state plans and local codes may add requirements.  29 CFR 1926 Subpart Y
declares itself identical to Subpart T, so the OSHA rules serve both.

"Outside the no-decompression limits" means the plan declares decompression, or
an engine-backed section (model or reference schedule) requires stops
(:meth:`~supervisor.rules.base.CheckContext.outside_ndl`); whether a dive
declared ``decompression = "none"`` really is within the limits is also the table
and model rules' question.

References
----------
.. [1] 29 CFR 1910 Subpart T, Commercial Diving Operations, §§1910.401-1910.441.
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from supervisor.findings import Finding
from supervisor.plan import Dive
from supervisor.rules.base import NO_CHAMBER, NONE, NOT_STATED, CheckContext, Family, Rule

FAMILY = Family("regulatory", "Federal commercial-diving rules")

OSHA = ("osha-1910-t",)

SCUBA = "scuba"
SS_AIR = "surface-supplied-air"
MIXED = ("surface-supplied-nitrox", "surface-supplied-heliox")
SURFACE_SUPPLIED = (SS_AIR, *MIXED)

#: Treating surface-supplied nitrox as "mixed gas" rests on the definition in
#: 29 CFR 1910.402 / 46 CFR 197.204 (a breathing gas other than air), which the
#: project's notes hold only from memory; findings that depend on it warn.
NITROX_AS_MIXED_STATUS = "FROM MEMORY"


def mixed_status(dive: Dive, status: str) -> str:
    """Status of a mixed-gas finding (nitrox is mixed gas only by a definition from memory)."""
    return NITROX_AS_MIXED_STATUS if dive.mode == "surface-supplied-nitrox" else status


#: Limits of the findings about a missing person or item (measured ``"none"``).
TENDER = "a separate tender (dive.tender)"
STANDBY = "a standby diver"
RESERVE = "a diver-carried reserve (gas_supply.bailout)"
LOCATION_RESERVE = "a dive-location reserve (gas_supply.secondary)"
READY = "a chamber ready at the site"
SUPERVISOR = "a team member with the supervisor role"
ENTRY_DIVER = "a diver at the entry point (dive.entry_diver)"
#: The exception "where physical space does not permit" a diver-carried reserve
#: (29 CFR 1910.425(c)(6), 1910.426(c)(9)), stated by the plan.
NO_SPACE_OK = ("no diver-carried reserve: the plan states physical space does not permit one "
               "(dives[].no_space_for_reserve), the regulation's exception")
NO_SPACE_HINT = (" (where physical space does not permit one, the regulation excepts it: state "
                 "dives[].no_space_for_reserve)")


def chamber_state(ctx: CheckContext) -> str:
    """The plan's chamber as a measured value: ready at the site, or what it lacks."""
    ch = ctx.plan.chamber
    if ch.on_site and ch.ready:
        return "ready at the site"
    if not ch.on_site:
        return "not at the site"
    return "at the site, not ready"


def _deco_text(ctx: CheckContext, dive: Dive) -> str:
    return "outside the no-decompression limits" if ctx.outside_ndl(dive) else ""


def entry_point(r: Rule, d: Dive, missing: str = "confined space: no diver named at the "
                "underwater entry point", **kw: Any) -> Finding:
    """A diver at the entry point of a confined space other than the diver (OSHA and USCG)."""
    if d.entry_diver and d.entry_diver != d.diver:
        return r.ok(f"diver at the entry point: {d.entry_diver}", dive=d.id, **kw)
    return r.breach(missing, dive=d.id, measured=d.entry_diver or NONE, limit=ENTRY_DIVER, **kw)


def tended(ctx: CheckContext, r: Rule, d: Dive) -> Finding:
    """The dive is tended by someone other than the diver (OSHA and USCG)."""
    t = ctx.tender_for(d)
    if t is None or t.name == d.diver:
        return r.breach(
            "no tender for this surface-supplied air diver",
            dive=d.id,
            measured=t.name if t is not None else NONE,
            limit="a tender other than the diver",
        )
    return r.ok(f"tended by {t.name}", dive=d.id)


# ---------------------------------------------------------------------------
# no jurisdiction


@FAMILY.rule(
    "jurisdiction-none",
    title="A rule set is chosen",
    citation="plan job.jurisdiction",
    kind="plan",
    jurisdictions=("none",),
)
def no_jurisdiction(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Warn that no federal rule set was applied."""
    yield r.review(
        "needs review: no jurisdiction chosen, so no regulatory rule was checked; confirm the "
        "local code and the contractor's manual",
        measured=ctx.jurisdiction,
        limit="a rule set (osha-1910-t or uscg-46-197-b)",
    )


# ---------------------------------------------------------------------------
# OSHA: SCUBA (1910.424)


@FAMILY.rule(
    "osha-424-b1",
    title="SCUBA no deeper than 130 fsw",
    citation="29 CFR 1910.424(b)(1)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_scuba_depth(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """SCUBA dives deeper than 130 fsw are not allowed."""
    for d in ctx.dives(SCUBA):
        kw = dict(measured=d.max_depth, limit=ctx.limit(130), unit=ctx.unit, dive=d.id)
        if ctx.fsw(d.max_depth) > 130:
            yield r.breach(f"SCUBA to {ctx.show(d.max_depth)} is deeper than 130 fsw", **kw)
        else:
            yield r.ok(f"SCUBA to {ctx.show(d.max_depth)} is within 130 fsw", **kw)


@FAMILY.rule(
    "osha-424-b2",
    title="SCUBA deeper than 100 fsw or outside NDL only with a ready chamber",
    citation="29 CFR 1910.424(b)(2)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_scuba_chamber(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A chamber ready for use for SCUBA deeper than 100 fsw or outside the NDL."""
    ch = ctx.plan.chamber
    for d in ctx.dives(SCUBA):
        deep = ctx.fsw(d.max_depth) > 100
        if not (deep or ctx.outside_ndl(d)):
            continue
        deco = _deco_text(ctx, d)
        why = f"SCUBA to {ctx.show(d.max_depth)}" + (f", {deco}" if deco else "")
        kw = dict(measured=d.max_depth, limit=ctx.limit(100), unit=ctx.unit, dive=d.id)
        if not ch.ready:
            yield r.breach(f"no chamber ready for use: {why}", fact=NO_CHAMBER, **kw)
        elif not ch.on_site:
            yield r.review(
                f"needs review: chamber ready but not at the site ({why}); the rule does not say "
                "where it must be: the supervisor decides",
                **kw,
            )
        else:
            yield r.ok(f"chamber ready at the site for {why}", **kw)


@FAMILY.rule(
    "osha-424-b3",
    title="SCUBA in current over 1 kt or in confined spaces only line-tended",
    citation="29 CFR 1910.424(b)(3)-(4)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_scuba_line(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Line tending for SCUBA against current over 1 knot or in confining spaces."""
    site = ctx.plan.site
    for d in ctx.dives(SCUBA):
        reasons = []
        if site.current_kt > 1:
            reasons.append(f"current {site.current_kt:g} kt over 1 kt")
        if site.confined_space:
            reasons.append("enclosed or confining space")
        if not reasons:
            continue
        kw = dict(measured=site.current_kt, limit=1.0, unit="kt", dive=d.id)
        why = " and ".join(reasons)
        if d.line_tended:
            yield r.ok(f"SCUBA diver line-tended ({why})", **kw)
        else:
            yield r.breach(f"SCUBA diver not line-tended with {why}", **kw)


@FAMILY.rule(
    "osha-424-c1",
    title="SCUBA: standby diver; line-tended or buddy",
    citation="29 CFR 1910.424(c)(1)-(2)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_scuba_standby(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A standby diver while a SCUBA diver is in the water; tended or buddied."""
    for d in ctx.dives(SCUBA):
        sb = ctx.standby_for(d)
        if sb is None:
            yield r.breach(
                "no standby diver available for this SCUBA dive",
                dive=d.id,
                measured="none",
                limit="1 standby diver",
            )
        else:
            yield r.ok(f"standby diver: {sb.name}", dive=d.id)
        if d.line_tended or (d.buddy and d.buddy != d.diver):
            how = "line-tended" if d.line_tended else f"buddy {d.buddy}"
            yield r.ok(f"SCUBA diver {how}", dive=d.id)
        else:
            yield r.breach(
                "SCUBA diver neither line-tended nor with an in-water buddy",
                dive=d.id,
                measured="none",
                limit="line or buddy",
            )


@FAMILY.rule(
    "osha-424-c3",
    title="SCUBA in confined spaces: a diver at the entry point",
    citation="29 CFR 1910.424(c)(3)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_scuba_entry(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A diver stationed at the underwater entry point of a confined space."""
    if not ctx.plan.site.confined_space:
        return
    for d in ctx.dives(SCUBA):
        yield entry_point(r, d)


@FAMILY.rule(
    "osha-424-c4",
    title="SCUBA: a diver-carried reserve",
    citation="29 CFR 1910.424(c)(4)-(5)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_scuba_reserve(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Each SCUBA diver has a reserve (J-valve or independent cylinder), closed before the dive."""
    for d in ctx.dives(SCUBA):
        if ctx.has_bailout(d):
            yield r.ok(
                "diver-carried reserve listed (keep its valve closed before the dive)", dive=d.id
            )
        else:
            yield r.breach(
                f"no reserve listed for {d.diver} under gas_supply.bailout",
                dive=d.id,
                measured=NONE,
                limit="a diver-carried reserve (gas_supply.bailout)",
            )


# ---------------------------------------------------------------------------
# OSHA: surface-supplied air (1910.425)


@FAMILY.rule(
    "osha-425-b1",
    title="Surface-supplied air no deeper than 190 fsw (220 fsw with bottom time <= 30 min)",
    citation="29 CFR 1910.425(b)(1)",
    source_status="FROM MEMORY",
    jurisdictions=OSHA,
)
def osha_ssa_depth(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """190 fsw limit, 220 fsw when the bottom time is 30 min or less."""
    for d in ctx.dives(SS_AIR):
        fsw = ctx.fsw(d.max_depth)
        limit = 220 if d.bottom_time_min <= 30 else 190
        kw = dict(measured=d.max_depth, limit=ctx.limit(limit), unit=ctx.unit, dive=d.id)
        if fsw > limit:
            yield r.breach(
                f"surface-supplied air to {ctx.show(d.max_depth)} with {d.bottom_time_min:g} min "
                f"bottom time is deeper than {limit} fsw (the same numbers are confirmed in "
                "29 CFR 1910.427(b)(2) for liveboating)",
                **kw,
            )
        else:
            yield r.ok(f"surface-supplied air within {limit} fsw", **kw)


@FAMILY.rule(
    "osha-425-b2",
    title="Surface-supplied air deeper than 100 fsw or outside NDL: chamber ready at the site",
    citation="29 CFR 1910.425(b)(2)",
    source_status="FROM MEMORY",
    jurisdictions=OSHA,
)
def osha_ssa_chamber(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A ready chamber at the site for deep or decompression surface-supplied air dives."""
    ch = ctx.plan.chamber
    for d in ctx.dives(SS_AIR):
        if not (ctx.fsw(d.max_depth) > 100 or ctx.outside_ndl(d)):
            continue
        kw = dict(measured=d.max_depth, limit=ctx.limit(100), unit=ctx.unit, dive=d.id)
        if ch.on_site and ch.ready:
            yield r.ok("chamber ready at the site", **kw)
        else:
            yield r.breach(
                "no chamber ready at the site for a dive deeper than 100 fsw or "
                "outside the no-decompression limits",
                fact=NO_CHAMBER, **kw,
            )


@FAMILY.rule(
    "osha-425-b3",
    title="Surface-supplied air: a bell when in-water decompression exceeds 120 min",
    citation="29 CFR 1910.425(b)(3)",
    source_status="FROM MEMORY",
    jurisdictions=OSHA,
)
def osha_ssa_bell(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Bell for more than 120 min of in-water decompression, except heavy gear or confined."""
    for d in ctx.dives(SS_AIR):
        t = d.in_water_stop_min
        if t <= 120:
            continue
        kw = dict(measured=t, limit=120.0, unit="min", dive=d.id)
        if d.bell != "none" or d.heavy_gear or ctx.plan.site.confined_space:
            yield r.ok(f"{t:g} min in-water decompression with a bell or an exception", **kw)
        else:
            yield r.breach(f"{t:g} min of in-water decompression and no bell", **kw)


@FAMILY.rule(
    "osha-425-c1",
    title="Surface-supplied air: each diver continuously tended",
    citation="29 CFR 1910.425(c)(1)",
    source_status="SECONDARY",
    jurisdictions=OSHA,
)
def osha_ssa_tended(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Each surface-supplied air diver is tended in the water."""
    for d in ctx.dives(SS_AIR):
        yield tended(ctx, r, d)


@FAMILY.rule(
    "osha-425-c2",
    title="Surface-supplied air in an enclosed or confining space: a diver at the entry point",
    citation="29 CFR 1910.425(c)(2)",
    source_status="FROM MEMORY",
    jurisdictions=OSHA,
)
def osha_ssa_entry(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A diver stationed at the underwater entry point of an enclosed or confining space."""
    if not ctx.plan.site.confined_space:
        return
    for d in ctx.dives(SS_AIR):
        yield entry_point(r, d)


def _deep_or_deco(ctx: CheckContext, d: Dive) -> bool:
    return ctx.fsw(d.max_depth) > 100 or ctx.outside_ndl(d)


@FAMILY.rule(
    "osha-425-c3",
    title="Surface-supplied air deeper than 100 fsw or outside NDL: tender, standby, reserve",
    citation="29 CFR 1910.425(c)(3)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_ssa_deep_team(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A separate tender per diver, a standby diver, a diver-carried reserve unless heavy gear."""
    for d in ctx.dives(SS_AIR):
        if not _deep_or_deco(ctx, d):
            continue
        if d.tender and d.tender != d.diver:
            yield r.ok(f"separate tender: {d.tender}", dive=d.id)
        else:
            yield r.breach(
                "no separate tender named for this diver (dive.tender)",
                dive=d.id,
                measured=d.tender or NONE,
                limit=TENDER,
            )
        sb = ctx.standby_for(d)
        if sb is None:
            yield r.breach("no standby diver available", dive=d.id, measured=NONE, limit=STANDBY)
        else:
            yield r.ok(f"standby diver: {sb.name}", dive=d.id)
        if d.heavy_gear:
            yield r.ok("heavy gear: diver-carried reserve not required", dive=d.id)
        elif ctx.has_bailout(d):
            yield r.ok("diver-carried reserve listed", dive=d.id)
        else:
            yield r.breach(
                f"no diver-carried reserve listed for {d.diver}",
                dive=d.id,
                measured=NONE,
                limit=RESERVE,
            )


@FAMILY.rule(
    "osha-425-c4",
    title="Surface-supplied air deeper than 100 fsw or outside NDL: a dive-location reserve",
    citation="29 CFR 1910.425(c)(4)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_ssa_location_reserve(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A dive-location reserve (the secondary supply), independent of the primary."""
    for d in ctx.dives(SS_AIR):
        if not _deep_or_deco(ctx, d):
            continue
        if ctx.plan.gas_supply.secondary is not None:
            yield r.ok(
                "dive-location reserve (secondary supply) listed; its size is checked by "
                "the gas-supply rules",
                dive=d.id,
            )
        else:
            yield r.breach(
                "no dive-location reserve (gas_supply.secondary)",
                dive=d.id,
                measured=NONE,
                limit=LOCATION_RESERVE,
            )


@FAMILY.rule(
    "osha-425-c5",
    title="Heavy gear, deeper than 100 fsw or outside NDL: standby hose and in-water stage",
    citation="29 CFR 1910.425(c)(5)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_ssa_stage(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """An extra hose for the standby diver and an in-water stage."""
    for d in ctx.dives(SS_AIR):
        if not (d.heavy_gear or _deep_or_deco(ctx, d)):
            continue
        for ok, what in (
            (d.standby_hose, "an extra hose for the standby diver (standby_hose)"),
            (d.stage, "an in-water stage (stage)"),
        ):
            yield r.need(ok, what, dive=d.id)


@FAMILY.rule(
    "osha-425-c6",
    title="No direct ascent: a diver-carried reserve",
    citation="29 CFR 1910.425(c)(6)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_ssa_no_direct_ascent(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A diver-carried reserve where the layout prevents direct ascent, except with heavy gear
    or where physical space does not permit one."""
    for d in ctx.dives(SS_AIR):
        if d.direct_ascent_possible:
            continue
        if d.heavy_gear or ctx.has_bailout(d):
            yield r.ok("no direct ascent: reserve listed or heavy gear worn", dive=d.id)
        elif d.no_space_for_reserve:
            yield r.ok(NO_SPACE_OK, dive=d.id)
        else:
            yield r.breach(
                f"no direct ascent and no diver-carried reserve listed{NO_SPACE_HINT}",
                dive=d.id,
                measured=NONE,
                limit=RESERVE,
            )


# ---------------------------------------------------------------------------
# OSHA: mixed gas (1910.426)


@FAMILY.rule(
    "osha-426-b",
    title="Mixed gas: chamber ready at the site; bell and closed bell by depth",
    citation="29 CFR 1910.426(b)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_mixed_chamber_bell(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Chamber ready at the site; bell > 220 fsw or > 120 min deco; closed bell > 300 fsw."""
    ch = ctx.plan.chamber
    confined = ctx.plan.site.confined_space
    for d in ctx.dives(*MIXED):
        st = mixed_status(d, "VERIFIED")
        if ch.on_site and ch.ready:
            yield r.ok("chamber ready at the site for a mixed-gas dive", dive=d.id, status=st)
        else:
            yield r.breach(
                "mixed-gas dive without a chamber ready at the site",
                fact=NO_CHAMBER,
                dive=d.id,
                status=st,
                measured=chamber_state(ctx),
                limit=READY,
            )
        fsw, t = ctx.fsw(d.max_depth), d.in_water_stop_min
        if (fsw > 220 or t > 120) and not (d.heavy_gear or confined):
            kw = dict(
                measured=d.max_depth, limit=ctx.limit(220), unit=ctx.unit, dive=d.id, status=st
            )
            if d.bell == "none":
                yield r.breach(
                    f"no bell: {ctx.show(d.max_depth)}, {t:g} min in-water decompression", **kw
                )
            else:
                yield r.ok(f"{d.bell} bell provided", **kw)
        if fsw > 300 and not confined:
            kw = dict(
                measured=d.max_depth, limit=ctx.limit(300), unit=ctx.unit, dive=d.id, status=st
            )
            if d.bell == "closed":
                yield r.ok("closed bell provided deeper than 300 fsw", **kw)
            else:
                yield r.breach("deeper than 300 fsw without a closed bell", **kw)


@FAMILY.rule(
    "osha-426-c1",
    title="Mixed gas: tender per diver, standby diver, entry-point diver",
    citation="29 CFR 1910.426(c)(1)-(3)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_mixed_team(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A separate tender per diver, a standby diver, a diver at a confined entry point."""
    for d in ctx.dives(*MIXED):
        st = mixed_status(d, "VERIFIED")
        if d.tender and d.tender != d.diver:
            yield r.ok(f"separate tender: {d.tender}", dive=d.id, status=st)
        else:
            yield r.breach(
                "no separate tender named for this diver (dive.tender)",
                dive=d.id,
                status=st,
                measured=d.tender or NONE,
                limit=TENDER,
            )
        if ctx.standby_for(d) is None:
            yield r.breach(
                "no standby diver available", dive=d.id, status=st, measured=NONE, limit=STANDBY
            )
        else:
            yield r.ok("standby diver available", dive=d.id, status=st)
        if ctx.plan.site.confined_space:
            yield entry_point(r, d, "confined space: no diver at the entry point", status=st)


@FAMILY.rule(
    "osha-426-c4",
    title="Mixed gas: a dive-location reserve",
    citation="29 CFR 1910.426(c)(4)-(5)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_mixed_reserve(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A dive-location reserve on site (the primary's size is the gas-supply rules' job)."""
    for d in ctx.dives(*MIXED):
        st = mixed_status(d, "VERIFIED")
        if ctx.plan.gas_supply.secondary is not None:
            yield r.ok("dive-location reserve listed", dive=d.id, status=st)
        else:
            yield r.breach(
                "no dive-location reserve (gas_supply.secondary)",
                dive=d.id,
                status=st,
                measured=NONE,
                limit=LOCATION_RESERVE,
            )


@FAMILY.rule(
    "osha-426-c6",
    title="Mixed gas: standby hose and stage with heavy gear; stage without a bell",
    citation="29 CFR 1910.426(c)(6)-(7)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_mixed_stage(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Heavy gear: spare hose and stage.  No bell, deeper than 100 fsw or outside NDL: stage."""
    for d in ctx.dives(*MIXED):
        st = mixed_status(d, "VERIFIED")
        if d.heavy_gear:
            yield r.need(
                d.standby_hose, "an extra hose for the standby diver", dive=d.id, status=st
            )
            yield r.need(d.stage, "an in-water stage (heavy gear)", dive=d.id, status=st)
        elif d.bell == "none" and _deep_or_deco(ctx, d):
            yield r.need(d.stage, "an in-water stage (no bell)", dive=d.id, status=st)


@FAMILY.rule(
    "osha-426-c8",
    title="Mixed gas: a diver-carried reserve",
    citation="29 CFR 1910.426(c)(8)-(9)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_mixed_diver_reserve(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Diver-carried reserve deeper than 100 fsw, outside NDL or without direct ascent, except
    with heavy gear or where physical space does not permit one ((c)(9))."""
    for d in ctx.dives(*MIXED):
        st = mixed_status(d, "VERIFIED")
        if not (_deep_or_deco(ctx, d) or not d.direct_ascent_possible):
            continue
        if d.heavy_gear:
            yield r.ok("heavy gear: diver-carried reserve not required", dive=d.id, status=st)
        elif ctx.has_bailout(d):
            yield r.ok("diver-carried reserve listed", dive=d.id, status=st)
        elif d.no_space_for_reserve:
            yield r.ok(NO_SPACE_OK, dive=d.id, status=st)
        else:
            yield r.breach(
                f"no diver-carried reserve listed for {d.diver}{NO_SPACE_HINT}",
                dive=d.id,
                status=st,
                measured=NONE,
                limit=RESERVE,
            )


# ---------------------------------------------------------------------------
# OSHA: chamber (1910.423)


def _osha_chamber_triggers(ctx: CheckContext, d: Dive) -> list[str]:
    """Reasons 1910.423(c)(1) wants a chamber at the site for ``d``."""
    fsw = ctx.fsw(d.max_depth)
    why = []
    if d.mode == SS_AIR and 100 < fsw < 220:
        why.append("surface-supplied air deeper than 100 and shallower than 220 fsw")
    if d.mode in MIXED and fsw < 300:
        why.append("mixed gas shallower than 300 fsw")
    if ctx.outside_ndl(d) and fsw < 300:
        why.append("outside the no-decompression limits, shallower than 300 fsw")
    return why


@FAMILY.rule(
    "osha-423-c1",
    title="Chamber of at least 165 fsw at the site",
    citation="29 CFR 1910.423(c)(1)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_chamber_165(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A chamber reaching 165 fsw (6 ATA) at the site for the stated kinds of dive."""
    ch = ctx.plan.chamber
    for d in ctx.dives():
        why = _osha_chamber_triggers(ctx, d)
        if not why:
            continue
        reason = "; ".join(why)
        kw = dict(limit=ctx.limit(165), unit=ctx.unit, dive=d.id)
        if not ch.on_site:
            yield r.breach(f"no chamber at the site ({reason})", measured=NONE, fact=NO_CHAMBER,
                           **kw)
            continue
        yield from chamber_reaches(ctx, r, 165.0, f" ({reason})", "chamber at the site", kw)


@FAMILY.rule(
    "osha-423-c2",
    title="Deeper than 300 fsw: chamber reaches the dive's depth",
    citation="29 CFR 1910.423(c)(2)",
    source_status="SECONDARY",
    jurisdictions=OSHA,
)
def osha_chamber_deep(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """For dives deeper than 300 fsw the chamber reaches the maximum depth of the dive."""
    ch = ctx.plan.chamber
    for d in ctx.dives():
        if ctx.fsw(d.max_depth) <= 300:
            continue
        kw = dict(limit=d.max_depth, unit=ctx.unit, dive=d.id)
        cap = ch.depth_capability if ch.on_site else None
        if cap is None:
            yield r.breach(
                "deeper than 300 fsw: no chamber depth capability at the site",
                measured=NOT_STATED if ch.on_site else NONE,
                **kw,
            )
        elif cap < d.max_depth:
            yield r.breach(
                f"chamber reaches {ctx.show(cap)}, less than the dive's depth", measured=cap, **kw
            )
        else:
            yield r.ok("chamber reaches the dive's depth", measured=cap, **kw)


def _osha_chamber_needed(ctx: CheckContext) -> list[Dive]:
    return [
        d
        for d in ctx.dives()
        if _osha_chamber_triggers(ctx, d)
        or ctx.fsw(d.max_depth) > 300
        or d.decompression == "surface-oxygen"
    ]


@FAMILY.rule(
    "osha-423-c3",
    title="Chamber: dual-lock, multiplace, within 5 minutes",
    citation="29 CFR 1910.423(c)(3)",
    source_status="SECONDARY",
    jurisdictions=OSHA,
)
def osha_chamber_kind(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The required chamber is dual-lock, multiplace and no more than 5 min from the dive."""
    if not _osha_chamber_needed(ctx) or not ctx.plan.chamber.on_site:
        return
    ch = ctx.plan.chamber
    if ch.locks is None:
        yield r.review(
            "needs review: number of chamber locks not stated",
            measured=NOT_STATED,
            limit=2.0,
            unit="locks",
        )
    elif ch.locks < 2:
        yield r.breach(
            f"chamber has {ch.locks} lock; a dual-lock chamber is required",
            measured=float(ch.locks),
            limit=2.0,
            unit="locks",
        )
    else:
        yield r.ok(
            f"chamber has {ch.locks} locks", measured=float(ch.locks), limit=2.0, unit="locks"
        )
    yield r.need(ch.multiplace, "a multiplace chamber")
    if ch.travel_time_min is None:
        yield r.review(
            "needs review: time to the chamber not stated",
            measured=NOT_STATED,
            limit=5.0,
            unit="min",
        )
    elif ch.travel_time_min > 5:
        yield r.breach(
            f"chamber {ch.travel_time_min:g} min from the dive location",
            measured=ch.travel_time_min,
            limit=5.0,
            unit="min",
        )
    else:
        yield r.ok(
            f"chamber {ch.travel_time_min:g} min from the dive location",
            measured=ch.travel_time_min,
            limit=5.0,
            unit="min",
        )


#: Occupants assumed when counting BIBS masks: the patient and an inside tender
#: (from memory: treatment practice puts a tender inside with the patient).
BIBS_OCCUPANTS = 2


@FAMILY.rule(
    "osha-423-c4",
    title="Chamber fittings: gauges, BIBS masks, voice, viewport, lighting",
    citation="29 CFR 1910.423(c)(4)",
    source_status="SECONDARY",
    jurisdictions=OSHA,
)
def osha_chamber_fittings(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Gauge per compartment, a BIBS mask per occupant, voice, viewport, lighting."""
    if not _osha_chamber_needed(ctx) or not ctx.plan.chamber.on_site:
        return
    eq = ctx.plan.chamber.equipment
    yield r.need(eq.pressure_gauges, "a pressure gauge per occupied compartment")
    if eq.bibs_masks is None:
        yield r.review(
            "needs review: number of BIBS masks not stated",
            measured=NOT_STATED,
            limit=float(BIBS_OCCUPANTS),
            unit="masks",
        )
    elif eq.bibs_masks < BIBS_OCCUPANTS:
        yield r.breach(
            f"{eq.bibs_masks} BIBS masks for {BIBS_OCCUPANTS} occupants (patient and "
            "inside tender; from memory)",
            measured=float(eq.bibs_masks),
            limit=float(BIBS_OCCUPANTS),
            unit="masks",
        )
    else:
        yield r.ok(
            f"{eq.bibs_masks} BIBS masks",
            measured=float(eq.bibs_masks),
            limit=float(BIBS_OCCUPANTS),
            unit="masks",
        )
    yield r.need(eq.voice_comms, "two-way voice between chamber and site")
    yield r.need(eq.viewport, "a chamber viewport", status="FROM MEMORY")
    yield r.need(eq.interior_lighting, "chamber interior lighting", status="FROM MEMORY")


@FAMILY.rule(
    "osha-423-c5",
    title="Treatment tables, treatment gas and a chamber operator",
    citation="29 CFR 1910.423(c)(5)-(6)",
    source_status="FROM MEMORY",
    jurisdictions=OSHA,
)
def osha_chamber_treatment(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Treatment tables and gas on site; a member able to run the chamber during and after."""
    if not _osha_chamber_needed(ctx) or not ctx.plan.chamber.on_site:
        return
    ch = ctx.plan.chamber
    yield r.need(ch.equipment.treatment_tables, "treatment tables at the site")
    yield r.need(ch.equipment.treatment_gas, "treatment gas at the site")
    yield r.need(
        ch.operator_available, "a member able to operate the chamber, during the dive and 1 h after"
    )


# ---------------------------------------------------------------------------
# OSHA: team (1910.410)


@FAMILY.rule(
    "osha-410-a3",
    title="CPR and first aid for all team members",
    citation="29 CFR 1910.410(a)(3)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_cpr(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Every member holds CPR and first-aid training."""
    lacking = [m.name for m in ctx.plan.team if not m.first_aid_cpr]
    n = len(ctx.plan.team)
    for name in lacking:
        yield r.breach(
            f"{name} has no CPR and first-aid training", measured=name, limit="all members"
        )
    if not lacking:
        yield r.ok(f"all {n} members hold CPR and first-aid training")


@FAMILY.rule(
    "osha-410-a4",
    title="Physics and physiology training for those exposed to or controlling pressure",
    citation="29 CFR 1910.410(a)(4)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_physics(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Divers, standby divers, supervisor and chamber operators trained in physics/physiology."""
    roles = ("diver", "standby-diver", "supervisor", "chamber-operator")
    need = [m for m in ctx.plan.team if any(m.has(x) for x in roles)]
    lacking = [m.name for m in need if not m.physics_physiology]
    for name in lacking:
        yield r.breach(
            f"{name} lacks diving physics and physiology training", measured=name, limit="trained"
        )
    if not lacking:
        yield r.ok(f"{len(need)} members exposed to or controlling pressure are trained")


@FAMILY.rule(
    "osha-410-c1",
    title="A designated person in charge at the dive location",
    citation="29 CFR 1910.410(c)(1)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_dpic(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The job's supervisor is a team member holding the supervisor role."""
    name = ctx.plan.job.supervisor
    m = ctx.member(name)
    if m is not None and m.has("supervisor"):
        yield r.ok(f"person in charge at the site: {name}")
    elif m is None:
        yield r.breach(
            f"job.supervisor {name!r} is not in the team list", measured=name, limit=SUPERVISOR
        )
    else:
        yield r.breach(
            f"job.supervisor {name!r} does not hold the supervisor role",
            measured=name,
            limit=SUPERVISOR,
        )


# ---------------------------------------------------------------------------
# OSHA: site (1910.420-.422)


@FAMILY.rule(
    "osha-420-a",
    title="Safe practices manual at the site",
    citation="29 CFR 1910.420(a)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_manual(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A safe practices manual kept at the dive location."""
    yield r.need(ctx.plan.site.safe_practices_manual, "a safe practices manual at the site")


@FAMILY.rule(
    "osha-421-b",
    title="Emergency call list at the site",
    citation="29 CFR 1910.421(b)",
    source_status="SECONDARY",
    jurisdictions=OSHA,
)
def osha_contacts(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Numbers for a chamber (if none on site), hospital, physician, transport and USCG RCC."""
    ec = ctx.plan.site.emergency_contacts
    wanted = [
        ("hospital", ec.hospital),
        ("physician", ec.physician),
        ("transport", ec.transport),
        ("uscg_rcc", ec.uscg_rcc),
    ]
    if not ctx.plan.chamber.on_site:
        wanted.insert(0, ("chamber", ec.chamber))
    missing = [k for k, v in wanted if not (v and v.strip())]
    if missing:
        yield r.breach(
            "emergency call list lacks: " + ", ".join(missing),
            measured=len(wanted) - len(missing),
            limit=len(wanted),
            unit="entries",
        )
    else:
        yield r.ok(
            "emergency call list complete", measured=len(wanted), limit=len(wanted), unit="entries"
        )


@FAMILY.rule(
    "osha-421-c",
    title="First-aid kit, handbook and resuscitator at the site",
    citation="29 CFR 1910.421(c)",
    source_status="SECONDARY",
    jurisdictions=OSHA,
)
def osha_first_aid(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A physician-approved first-aid kit, a first-aid handbook and a bag resuscitator."""
    s = ctx.plan.site
    yield r.need(s.first_aid_kit, "a physician-approved first-aid kit")
    yield r.need(s.first_aid_handbook, "a first-aid handbook")
    yield r.need(s.resuscitator, "a bag-type manual resuscitator with transparent mask")


@FAMILY.rule(
    "osha-421-h",
    title="Code flag A when diving from a surface other than a vessel in navigable water",
    citation="29 CFR 1910.421(h)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_flag(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A rigid code flag A at least 1 m high, visible all round, lit at night."""
    s = ctx.plan.site
    if s.from_vessel or not s.marine_traffic:
        return
    yield r.need(
        s.code_flag_a,
        "a rigid code flag A at least 1 m high",
        why="diving from a surface other than a vessel in waters with marine traffic",
    )
    if s.night:
        yield r.need(s.code_flag_a_lit, "lighting on the code flag A at night")


@FAMILY.rule(
    "osha-422-c1",
    title="Two-way voice with each surface-supplied diver",
    citation="29 CFR 1910.422(c)(1)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_voice(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Working two-way voice between each surface-supplied air or mixed-gas diver and the site."""
    if ctx.dives(*SURFACE_SUPPLIED):
        yield r.need(
            ctx.plan.site.diver_voice_comms,
            "two-way voice communication with each surface-supplied diver",
        )


@FAMILY.rule(
    "osha-422-c2",
    title="Emergency communication link at the site",
    citation="29 CFR 1910.422(c)(2)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_emergency_comms(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A working two-way link at the site for obtaining emergency help."""
    yield r.need(ctx.plan.site.emergency_comms, "a two-way link for emergency help")


@FAMILY.rule(
    "osha-422-d",
    title="Decompression, repetitive and no-decompression tables at the site",
    citation="29 CFR 1910.422(d)",
    source_status="VERIFIED",
    jurisdictions=OSHA,
)
def osha_tables(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The applicable tables are at the dive location."""
    yield r.need(
        ctx.plan.site.tables_on_site,
        "decompression, repetitive and no-decompression tables at the site",
    )


def chamber_reaches(
    ctx: CheckContext, r: Rule, need_fsw: float, why: str, ok_text: str, kw: dict
) -> Iterator[Finding]:
    """Findings for "the chamber reaches at least ``need_fsw``" (shared by OSHA and USCG).

    Parameters
    ----------
    ctx : CheckContext
    r : Rule
    need_fsw : float
        Depth the chamber must reach [fsw].
    why : str
        Text appended to the review and breach messages (the trigger), may be empty.
    ok_text : str
        Subject of the passing message.
    kw : dict
        ``limit``, ``unit`` and ``dive`` of the findings.
    """
    cap = ctx.plan.chamber.depth_capability
    if cap is None:
        yield r.review(f"needs review: chamber depth capability not stated{why}",
                       measured=NOT_STATED, **kw)
    elif ctx.fsw(cap) < need_fsw:
        yield r.breach(f"chamber reaches {ctx.show(cap)}, less than {need_fsw:g} fsw{why}",
                       measured=cap, **kw)
    else:
        yield r.ok(f"{ok_text} reaches {ctx.show(cap)}", measured=cap, **kw)
