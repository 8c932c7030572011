"""Team and equipment rules: the roles a dive needs, present and kept apart.

These rules hold for every jurisdiction; their citations follow it: a USCG job
cites 46 CFR 197 Subpart B, an OSHA job 29 CFR 1910 Subpart T, and a plan with
no jurisdiction both, each labelled as a cross-reference.  Whether the plan can be carried out
as written (a named supervisor, a diver who is a diver, nobody tending
themselves, someone to run the chamber a surface decompression needs) is the
plan's own consistency and fails.  The usual crew for a mode (a standby diver
for every dive, a tender for every surface-supplied diver) is derived from the
federal rules' team reading, partly secondary, so a gap warns here; the
regulatory family fails it where a VERIFIED row demands it.

References
----------
.. [1] 29 CFR 1910.410, .424(c), .425(c), .426(c) and the OSHA directive
       CPL 02-00-151 (2011) on team size, as summarised in the project's
       regulation notes (team size DERIVED; directive repost SECONDARY).
.. [2] 46 CFR 197.410, 197.430, 197.432(c), (e)(5)-(6), 197.434(e)-(f).
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor.findings import Finding
from supervisor.rules.base import CheckContext, Family, Rule
from supervisor.rules.citations import USCG_ID, cross_reference

FAMILY = Family("team", "Team and equipment")

TEAM_SIZE = "29 CFR 1910 Subpart T team reading (1910.424(c), .425(c), .426(c); OSHA CPL 02-00-151)"
#: The same team reading from 46 CFR 197 Subpart B, for a USCG job.
TEAM_SIZE_USCG = ("46 CFR 197 Subpart B team reading (197.430 SCUBA standby and tending; "
                  "197.432(c), (e)(5)-(6) surface-supplied air; 197.434(e)-(f) mixed gas)")
#: Who runs the chamber: 46 CFR 197.410 (a non-diving member trained to operate it, VERIFIED)
#: for a USCG job; 29 CFR 1910.423(c)(5)-(6) (FROM MEMORY) in the OSHA team reading.
CHAMBER_OPERATOR_USCG = "46 CFR 197.410 (a member trained to operate the chamber)"
#: The citation of the team-size rules by jurisdiction; without one, both as cross-references.
TEAM_CITATIONS = {
    USCG_ID: TEAM_SIZE_USCG,
    "none": f"{cross_reference(TEAM_SIZE)}; {cross_reference(TEAM_SIZE_USCG)}",
}


@FAMILY.rule(
    "team-supervisor",
    title="A diving supervisor on the team",
    citation="plan consistency (job.supervisor and team[].role)",
    kind="plan",
)
def supervisor_present(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The team holds a supervisor, and the job's supervisor is that person."""
    sups = ctx.members_with("supervisor")
    name = ctx.plan.job.supervisor
    if not sups:
        yield r.breach(
            "no team member holds the supervisor role", measured=0, limit=1, unit="members"
        )
    elif name not in {m.name for m in sups}:
        yield r.breach(
            f"job.supervisor {name!r} is not a team member with the supervisor role",
            measured=name,
            limit=", ".join(m.name for m in sups),
        )
    else:
        yield r.ok(f"supervisor: {name}", measured=len(sups), limit=1, unit="members")


@FAMILY.rule(
    "team-diver",
    title="Each dive's diver holds a diving role",
    citation="plan consistency (dives[].diver and team[].role)",
    kind="plan",
)
def diver_role(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The diver named on a dive is a diver or standby diver."""
    for d in ctx.dives():
        m = ctx.member(d.diver)
        if m is not None and (m.has("diver") or m.has("standby-diver")):
            yield r.ok(f"diver: {d.diver}", dive=d.id)
        else:
            roles = ", ".join(m.role) if m is not None else "none"
            yield r.breach(
                f"{d.diver} dives but holds no diving role ({roles})",
                measured=roles,
                limit="diver",
                dive=d.id,
            )


@FAMILY.rule(
    "team-roles-distinct",
    title="Diver, standby diver and tender are different people",
    citation="plan consistency (dives[].diver, standby_diver, tender)",
    kind="plan",
)
def roles_distinct(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Nobody tends their own dive or stands by for it; the supervisor is not the diver."""
    for d in ctx.dives():
        bad = []
        if d.tender is not None and d.tender in (d.diver, d.standby_diver):
            who = "the diver" if d.tender == d.diver else "the standby diver"
            bad.append((f"tender {d.tender} is also {who}", d.tender,
                        "a tender who is neither the diver nor the standby diver"))
        if d.buddy is not None and d.buddy == d.diver:
            bad.append((f"buddy {d.buddy} is the diver", d.buddy, "a buddy other than the diver"))
        for text, who, need in bad:
            yield r.breach(text, dive=d.id, measured=who, limit=need)
        if ctx.plan.job.supervisor == d.diver:
            yield r.breach(
                f"the supervisor {d.diver} is the diver; nobody is in charge at the surface "
                "during this dive",
                measured=d.diver,
                limit="a supervisor who is not diving",
                dive=d.id,
                status="FROM MEMORY",
                rule="team-supervisor-diving",
                kind="reference",
                citation="common practice, no source",
            )
        if not bad:
            yield r.ok("diver, standby diver and tender are different people", dive=d.id)


@FAMILY.rule(
    "team-standby",
    title="A standby diver for every dive",
    citation=TEAM_SIZE,
    source_status="DERIVED",
    kind="reference",
    citations=TEAM_CITATIONS,
)
def standby_present(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A standby diver holding a diving role is available for each dive."""
    for d in ctx.dives():
        sb = ctx.standby_for(d)
        if sb is None:
            yield r.breach(
                "no standby diver for this dive", measured=0, limit=1, unit="members", dive=d.id
            )
        elif not (sb.has("standby-diver") or sb.has("diver")):
            yield r.breach(
                f"standby diver {sb.name} holds no diving role",
                measured=sb.name,
                limit="a member with a diving role",
                dive=d.id,
                status=None,
                kind="plan",
                citation="plan consistency (dives[].standby_diver)",
                rule="team-standby-role",
            )
        else:
            yield r.ok(f"standby diver: {sb.name}", dive=d.id)


@FAMILY.rule(
    "team-tender",
    title="A tender for every surface-supplied or line-tended diver",
    citation=TEAM_SIZE,
    source_status="DERIVED",
    kind="reference",
    citations=TEAM_CITATIONS,
)
def tender_present(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Someone other than the diver tends each surface-supplied or line-tended dive."""
    for d in ctx.dives():
        if d.mode == "scuba" and not d.line_tended:
            continue
        t = ctx.tender_for(d)
        if t is None:
            yield r.breach(
                "no tender for this dive", measured=0, limit=1, unit="members", dive=d.id
            )
        else:
            yield r.ok(f"tender: {t.name}", dive=d.id)


def _chamber_reasons(ctx: CheckContext) -> list[str]:
    out = []
    for d in ctx.dives():
        if d.decompression == "surface-oxygen":
            out.append(f"{d.id}: surface decompression")
        elif ctx.outside_ndl(d):
            out.append(f"{d.id}: decompression dive")
        elif ctx.fsw(d.max_depth) > 100:
            out.append(f"{d.id}: deeper than 100 fsw")
    return out


@FAMILY.rule(
    "team-chamber-operator",
    title="A chamber operator when a chamber is required",
    citation=TEAM_SIZE,
    source_status="DERIVED",
    kind="reference",
    citations={USCG_ID: f"{TEAM_SIZE_USCG}; {CHAMBER_OPERATOR_USCG}",
               "none": TEAM_CITATIONS["none"]},
)
def chamber_operator(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A chamber operator on the team when a dive needs a chamber at the site.

    Surface decompression cannot be carried out without one (fails); for other
    dives that need a chamber, the gap warns.
    """
    reasons = _chamber_reasons(ctx)
    if not reasons:
        return
    ops = ctx.members_with("chamber-operator")
    surd = [d for d in ctx.dives() if d.decompression == "surface-oxygen"]
    why = "; ".join(reasons)
    if ops:
        busy = []
        for d in surd:
            free = [m for m in ops if m.name not in (d.diver, d.standby_diver, d.tender)]
            if not free:
                busy.append(d.id)
                yield r.breach(
                    f"every chamber operator is busy on dive {d.id} (diver, standby or tender)",
                    measured=", ".join(m.name for m in ops),
                    limit="a chamber operator who is not diver, standby or tender on the dive",
                    dive=d.id,
                    status=None,
                    kind="plan",
                    citation="plan consistency (surface decompression)",
                    rule="team-chamber-operator-busy",
                )
        if not busy:
            yield r.ok(
                f"chamber operator: {ops[0].name} ({why})",
                measured=len(ops),
                limit=1,
                unit="members",
            )
    elif surd:
        yield r.breach(
            f"no chamber operator on the team for surface decompression ({why})",
            measured=0,
            limit=1,
            unit="members",
            status=None,
            kind="plan",
            citation="plan consistency (surface decompression)",
        )
    else:
        yield r.breach(
            f"no chamber operator on the team ({why})", measured=0, limit=1, unit="members"
        )
