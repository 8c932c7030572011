"""What the log itself says about how far it can be trusted, and whose dive it is.

* Gaps in a recorder log: the profile is a straight line across them and what
  happened there is not known (a fast ascent or a missed stop could hide in
  one), so a gap needs review.  Spikes, duplicate time stamps and a surface
  offset were handled on import and are listed as information.
* The diver and dive the timed log names against the approved dive's.
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor.audit.context import FAMILY, AuditContext
from supervisor.findings import Finding
from supervisor.rules.base import Rule


@FAMILY.rule(
    "audit-log",
    title="The log covers the dive without gaps",
    citation="the log as imported (supervisor.records.importers)",
    kind="plan",
)
def coverage(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """Gaps need review; what was handled on import is information."""
    issues = ctx.log.get("issues", [])
    gaps = [i for i in issues if i.get("kind") == "gap"]
    handled = [i for i in issues if i.get("kind") in ("spike", "duplicate", "surface-offset")]
    kw = dict(dive=ctx.dive.id)
    for g in gaps:
        yield r.review(f"needs review: line {g.get('line')}: {g.get('message')}",
                       measured="gap", limit="no gap", **kw)
    if handled:
        kinds = sorted({str(i.get("kind")) for i in handled})
        yield r.note(f"{len(handled)} sample(s) handled on import ({', '.join(kinds)}); listed "
                     "in the log's issues", measured=len(handled), **kw)
    if not gaps:
        yield r.ok(f"the log covers the dive without gaps ({ctx.ex.t.size} knots over "
                   f"{ctx.ex.duration_min:.1f} min)", measured="no gap", limit="no gap", **kw)


@FAMILY.rule(
    "audit-diver",
    title="The log is of the approved dive's diver",
    citation="the approved plan (dives[].diver)",
    kind="plan",
)
def diver(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The timed log's diver against the approved dive's; a recorder log names none."""
    logged = ctx.log.get("meta", {}).get("diver")
    want = ctx.dive.diver
    kw = dict(measured=logged or "not stated", limit=want, dive=ctx.dive.id)
    if logged is None:
        yield r.review("needs review: the recorder log does not name the diver; confirm it is "
                       f"{want}'s", **kw)
    elif logged != want:
        yield r.finding("warn", f"the log is of {logged}; the approved dive {ctx.dive.id} is "
                        f"{want}'s", verified=False, **kw)
    else:
        yield r.ok(f"the log is of {want}, as approved", **kw)
