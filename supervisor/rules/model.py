"""Model margin: the planned profile through the policy's decompression model.

The contractor's policy names the model (ZH-L16A/B/C) and the gradient factors;
breaking them fails.  The figures come from :mod:`supervisor.analysis`, which runs
the planned profile through :func:`supervisor.engine.schedule.evaluate_profile`
(tissues carried across the diver's surface intervals) and computes the model's
own schedule.

Coefficient status.  The ZH-L16B and C a-values are held FROM MEMORY (the A set
is SECONDARY for nitrogen), so a model result alone cannot make a dive conform:
the job-level ``references-unverified`` finding (:mod:`supervisor.rules.references`)
lists the coefficients to confirm unless they are VERIFIED or every dive conforms
to a verified reference-table row from a VERIFIED source.  A model failure still
fails: the model and its gradient factors are the contractor's own choice.

Margin: see :mod:`supervisor.analysis` (whole minutes of extra bottom time the
proposed stops still cover; negative = minutes short).

References
----------
.. [1] Bühlmann, A. A., Völlm, E. B., Nussberger, P., Tauchmedizin, 5th ed.,
       Springer, 2002 (ZH-L16).
.. [2] Baker, E. C., "Understanding M-values", Immersed 3(3), 1998 (gradient factors).
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor import analysis as an
from supervisor.findings import Finding
from supervisor.quantities import gf_percent_text, gf_percent_value
from supervisor.rules.base import CheckContext, Family, Rule

FAMILY = Family("model-margin", "Decompression model margin")

NOT_COMPUTED = "not computed"
POLICY_MODEL = "contractor policy (policy.model, policy.gf_low, policy.gf_high)"
BUHLMANN = "Bühlmann, Tauchmedizin (2002), ZH-L16; Baker, Understanding M-values (1998)"


def model_name(model: str) -> str:
    """Display name of a coefficient set: ``zhl16c`` -> ``ZH-L16C``."""
    return "ZH-L16" + model[len("zhl16"):].upper() if model.startswith("zhl16") else model


def _gf(ctx: CheckContext) -> str:
    p = ctx.policy
    return f"{model_name(p.model)} GF {p.gf_low:g}/{p.gf_high:g}"


def _status(a: an.DiveAnalysis) -> str:
    return f"coefficients {a.coefficient_status}"


def _carried(a: an.DiveAnalysis) -> str:
    if a.previous is None:
        return ""
    return f"; tissues carried from {a.previous} after {a.surface_interval_min:.0f} min"


def _unknown(r: Rule, a: an.DiveAnalysis, what: str) -> Finding | None:
    """A review finding when the model figures of a dive are missing or rest on guesses."""
    why = a.errors.get("evaluation") or a.errors.get("profile")
    if why:
        return r.review(f"needs review: {what} could not be computed ({why})", dive=a.id,
                        measured=NOT_COMPUTED)
    if "tissues" in a.errors:
        return r.review(f"needs review: {a.errors['tissues']}", dive=a.id,
                        measured=NOT_COMPUTED)
    return None


@FAMILY.rule(
    "model-ceiling",
    title="The planned profile stays below the model ceiling",
    citation=f"{POLICY_MODEL}; {BUHLMANN}",
    kind="policy",
)
def ceiling(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Fail when any point of the planned profile in the water or chamber is above the ceiling."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        bad = _unknown(r, a, "the model ceiling")
        if bad is not None:
            yield bad
            continue
        ev = a.evaluation
        excess = ev.worst_excess_bar / an.bar_per_unit(ctx.unit)
        kw = dict(measured=round(excess, 2), limit=0.0, unit=ctx.unit, dive=d.id)
        if ev.ceiling_broken:
            yield r.breach(
                f"the planned profile goes above the {_gf(ctx)} ceiling, first at "
                f"{ev.first_break_min:.1f} min, by up to {excess:.1f} {ctx.unit} "
                f"({_status(a)}{_carried(a)})",
                **kw,
            )
        else:
            yield r.ok(
                f"the planned profile stays below the {_gf(ctx)} ceiling, closest "
                f"{-excess:.1f} {ctx.unit} below it ({_status(a)}{_carried(a)})",
                **kw,
            )


@FAMILY.rule(
    "model-surfacing-gf",
    title="Surfacing gradient factor within GF high",
    citation=f"{POLICY_MODEL}; {BUHLMANN}",
    kind="policy",
)
def surfacing_gf(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The supersaturation on reaching the surface against the policy's GF high."""
    pa = an.for_context(ctx)
    limit = float(ctx.policy.gf_high)
    for d in ctx.dives():
        a = pa.dives[d.id]
        bad = _unknown(r, a, "the surfacing gradient factor")
        if bad is not None:
            yield bad
            continue
        gf = gf_percent_value(100.0 * a.evaluation.surfacing_gf)
        comp = a.evaluation.controlling_compartment
        kw = dict(measured=gf, limit=limit, unit="%", dive=d.id)
        text = (f"surfacing gradient factor of the planned profile {gf_percent_text(gf)} "
                f"(controlling compartment {comp}) against GF high {limit:g} % ({_status(a)})")
        if gf > limit + 1e-6:
            yield r.breach(text + " is above the policy", **kw)
        else:
            yield r.ok(text, **kw)


@FAMILY.rule(
    "model-margin",
    title="Margin of the proposed stops in minutes of bottom time",
    citation=f"{POLICY_MODEL}; margin as defined in supervisor.analysis",
    kind="policy",
)
def margin(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """How many whole minutes of extra bottom time the proposed stops still cover."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        bad = _unknown(r, a, "the margin")
        if bad is not None:
            yield bad
            continue
        m = a.margin
        if m is None:
            why = a.errors.get("model_schedule", "not computed")
            yield r.review(f"needs review: the margin could not be computed ({why})", dive=d.id,
                           measured=NOT_COMPUTED, unit="min")
            continue
        kw = dict(unit="min", limit=0.0, dive=d.id)
        if m.uncoverable:
            yield r.breach(
                f"the proposed stops do not cover even the shortest bottom time (the descent) "
                f"under {_gf(ctx)} ({_status(a)})",
                measured="no bottom time covered", **kw,
            )
        elif m.minutes is not None and m.minutes < 0:
            yield r.breach(
                f"the proposed stops are {-m.minutes} min of bottom time short under "
                f"{_gf(ctx)}: they cover a bottom time of at most "
                f"{d.bottom_time_min + m.minutes:g} min ({_status(a)})",
                measured=float(m.minutes), **kw,
            )
        else:
            least = "at least " if m.capped else ""
            yield r.note(
                f"margin: the proposed stops cover {least}{m.minutes} min more bottom time "
                f"under {_gf(ctx)} ({_status(a)})",
                measured=float(m.minutes), **kw,
            )


@FAMILY.rule(
    "model-schedule",
    title="Proposed decompression against the model's schedule",
    citation=f"{POLICY_MODEL}; schedule conventions of supervisor.engine.schedule",
    kind="policy",
)
def schedule(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The model's own schedule: a dive it says needs stops must have stops.

    Planned stops shorter in total than the model's schedule warn even when the
    ceiling holds: the plan spreads its decompression differently from the model.
    """
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        res = a.model_schedule
        if res is None:
            why = a.errors.get("model_schedule", "not computed")
            yield r.review(f"needs review: the model schedule could not be computed ({why})",
                           dive=d.id, measured=NOT_COMPUTED, unit="min")
            continue
        need = float(res.total_stop_min)
        have = float(sum(s.minutes for s in d.stops))
        kw = dict(measured=have, limit=need, unit="min", dive=d.id)
        stops = ", ".join(f"{s.depth:g}/{s.minutes}" for s in res.stops) or "none"
        if res.stops and not d.stops:
            ndl = res.no_stop_limit_min
            yield r.breach(
                f"the model ({_gf(ctx)}) needs {need:g} min of stops ({stops} {ctx.unit}/min); "
                f"no-stop limit {ndl} min; the plan has no stops ({_status(a)})",
                **kw,
            )
        elif have + 1e-9 < need:
            yield r.review(
                f"needs review: {have:g} min of planned stops against {need:g} min in the "
                f"model's schedule ({stops} {ctx.unit}/min, {_gf(ctx)}, {_status(a)})",
                **kw,
            )
        else:
            yield r.ok(
                f"{have:g} min of planned stops against {need:g} min in the model's schedule "
                f"({stops})",
                **kw,
            )
