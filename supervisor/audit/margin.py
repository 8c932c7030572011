"""Model margin of the executed profile: the log through the policy's model.

The executed profile (every knot of the log, on the gases breathed) is run
through the policy's ZH-L16 coefficient set and gradient factors by
:func:`supervisor.engine.evaluate.evaluate_profiles`, from the tissues the
approved plan gives the dive at leaving the surface (saturated with air, or
carried from the diver's planned previous dive over the planned surface
interval, as the check does).  A pass for a dive after another therefore rests
on the planned, not the executed, previous dive and needs review; without the
plan's analysis the tissues of such a dive are unknown and every model figure
needs review.  The gradient-factor line is anchored at the first stop of the
model's schedule for the actual exposure (:mod:`supervisor.audit.required`).

As in the check (:mod:`supervisor.rules.model`), the model and its gradient
factors are the contractor's choice: a profile above the ceiling in the water or
the chamber, or surfacing above GF high, fails.  The surface interval of surface
decompression lies outside the ceiling check (the supersaturation there is
deliberate); its peak is reported.

References
----------
.. [1] Bühlmann, A. A., Völlm, E. B., Nussberger, P., Tauchmedizin, 5th ed.,
       Springer, 2002 (ZH-L16).
.. [2] Baker, E. C., "Understanding M-values", Immersed 3(3), 1998 (gradient factors).
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor.audit.context import FAMILY, AuditContext
from supervisor.findings import Finding
from supervisor.quantities import gf_percent_text, gf_percent_value
from supervisor.rules.base import Rule
from supervisor.rules.model import BUHLMANN, POLICY_MODEL, model_name
from supervisor.units import bar_per_depth_unit


def _gf(ctx: AuditContext) -> str:
    p = ctx.policy
    return f"{model_name(p.model)} GF {p.gf_low:g}/{p.gf_high:g}"


def _start(ctx: AuditContext) -> str:
    a = ctx.analysis()
    if a is None or a.previous is None:
        return "tissues saturated with air at the surface at the start"
    return (f"tissues carried from the planned {a.previous} after its planned "
            f"{a.surface_interval_min:.0f}-min surface interval")


def _carried(ctx: AuditContext) -> str:
    """For a dive after another: its tissues are the plan's, not the executed dive's."""
    a = ctx.analysis()
    if a is None or a.previous is None:
        return ""
    return (f"; needs review: the tissues are carried from the planned {a.previous}, not from "
            "its executed profile")


def _unknown(ctx: AuditContext, r: Rule, what: str) -> Finding | None:
    tissues = ctx.tissues_unknown()
    if tissues is not None:
        return r.review(f"needs review: {what} of the executed profile rests on unknown tissues "
                        f"({tissues})", measured="not computed", dive=ctx.dive.id)
    if ctx.evaluation is not None:
        return None
    why = ctx.errors.get("evaluation", "not computed")
    return r.review(f"needs review: {what} of the executed profile could not be computed "
                    f"({why})", measured="not computed", dive=ctx.dive.id)


@FAMILY.rule(
    "audit-model-ceiling",
    title="The executed profile stays below the model ceiling",
    citation=f"{POLICY_MODEL}; {BUHLMANN}",
    kind="policy",
)
def ceiling(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """Fail when any point of the executed profile in the water or chamber is above the ceiling."""
    bad = _unknown(ctx, r, "the model ceiling")
    if bad is not None:
        yield bad
        return
    ev = ctx.evaluation
    u = ctx.unit
    excess = ev.worst_excess_bar / bar_per_depth_unit(u, ctx.ex.water)  # type: ignore[arg-type]
    status = f"coefficients {ev.coefficient_status}; {_start(ctx)}"
    kw = dict(measured=round(excess, 2), limit=0.0, unit=u, dive=ctx.dive.id)
    if ev.ceiling_broken:
        yield r.breach(f"the executed profile went above the {_gf(ctx)} ceiling, first at "
                       f"{ev.first_break_min:.1f} min of the log, by up to {excess:.1f} {u} "
                       f"({status})", **kw)
    else:
        carried = _carried(ctx)
        yield r.ok(f"the executed profile stayed below the {_gf(ctx)} ceiling, closest "
                   f"{-excess:.1f} {u} below it ({status}{carried})", verified=not carried,
                   **kw)


@FAMILY.rule(
    "audit-surfacing-gf",
    title="Surfacing gradient factor of the executed profile within GF high",
    citation=f"{POLICY_MODEL}; {BUHLMANN}",
    kind="policy",
)
def surfacing(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The supersaturation at the end of the log against the policy's GF high."""
    bad = _unknown(ctx, r, "the surfacing gradient factor")
    if bad is not None:
        yield bad
        return
    ev = ctx.evaluation
    limit = float(ctx.policy.gf_high)
    gf = gf_percent_value(100.0 * ev.surfacing_gf)
    text = (f"surfacing gradient factor of the executed profile {gf_percent_text(gf)} "
            f"(controlling compartment {ev.controlling_compartment}) against GF high "
            f"{limit:g} % (coefficients {ev.coefficient_status})")
    kw = dict(measured=gf, limit=limit, unit="%", dive=ctx.dive.id)
    if gf > limit + 1e-6:
        yield r.breach(text + " is above the policy", **kw)
    else:
        carried = _carried(ctx)
        yield r.ok(text + carried, verified=not carried, **kw)
    si = ev.surface_interval_max_gf
    if si is not None and (ctx.dive.chamber_stops or ctx.ex.surface_interval.any()):
        yield r.note(f"peak supersaturation during the surface interval of surface "
                     f"decompression {gf_percent_text(gf_percent_value(100.0 * si))} "
                     "(outside the ceiling check, as planned)",
                     rule="audit-surface-interval-gf",
                     measured=gf_percent_value(100.0 * si), limit=None, unit="%",
                     dive=ctx.dive.id)
