"""The audit: read the plan once, audit any number of executed dives in batches.

:func:`prepare` reads and validates the plan, loads the policy's reference
table and runs the check's analysis of the planned dives once (for the tissues
each dive starts with).  :func:`audit_many` then, for a list of executed dives:

1. finds the schedule each actual exposure requires (model schedules of all the
   dives in one batch, :mod:`supervisor.audit.required`);
2. runs every executed profile through the policy's model in batches
   (:func:`supervisor.engine.evaluate.evaluate_profiles` on the profiles' arrays);
3. computes the oxygen exposure as breathed (:mod:`supervisor.audit.oxygen`);
4. runs the rules of :data:`supervisor.audit.context.FAMILY` on each dive; a
   rule that raises becomes a "could not run" warning, as in the check.

Each step works on whole arrays: no Python loop runs per sample.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from supervisor.audit import logfacts, margin, oxygen, rates, required, stops, surd  # noqa: F401 - register rules
from supervisor.audit.context import FAMILY, AuditContext, PlanAudit
from supervisor.audit.executed import Executed
from supervisor.audit.result import AuditResult
from supervisor.errors import InputError
from supervisor.findings import Finding, could_not_run, sort_findings
from supervisor.plan import Plan
from supervisor.records.importers.common import ImportedLog

#: Segments evaluated together at most (a batch pads its profiles to the longest; one
#: long profile is a batch of its own): large enough to spread numpy's per-call cost,
#: small enough that the (segments x 16 compartments) arrays stay a few megabytes.
EVAL_SEGMENTS = 65536


def prepare(plan: str | Path | Plan, *, analyse: bool = True) -> PlanAudit:
    """Read the approved plan for auditing.

    Parameters
    ----------
    plan : str, Path or Plan
        The plan file, or a validated plan.
    analyse : bool
        Run the check's analysis of the planned dives (tissues carried across the
        planned surface intervals).  Without it every dive starts saturated with air.

    Returns
    -------
    PlanAudit

    Raises
    ------
    supervisor.plan.PlanValidationError
        The file cannot be read, is not TOML or does not validate.
    """
    from supervisor.analysis import _load_reference, analyse_plan
    from supervisor.plan import parse_plan_bytes, plan_sha256, plan_to_json, read_plan_bytes

    if isinstance(plan, Plan):
        import hashlib

        pa = PlanAudit(plan, hashlib.sha256(plan_to_json(plan).encode()).hexdigest())
    else:
        raw = read_plan_bytes(plan)
        parsed = parse_plan_bytes(raw, str(plan), Path(plan).absolute().parent)
        pa = PlanAudit(parsed, plan_sha256(raw), str(plan), raw)
    pa.table, pa.table_error = _load_reference(pa.plan)
    if analyse:
        try:
            pa.analysis = analyse_plan(pa.plan)
        except Exception as exc:  # the audit runs on; the model figures say why they are missing
            pa.analysis_error = f"{type(exc).__name__}: {exc}"
    return pa


@dataclass
class Item:
    """One executed dive to audit.

    Attributes
    ----------
    dive : str
        The approved dive's id.
    ex : Executed
        The executed profile.
    log : dict
        The log's ``source``, ``meta`` and ``issues`` (as ``ImportedLog.to_json`` gives).
    """

    dive: str
    ex: Executed
    log: dict[str, Any] = field(default_factory=dict)


def _evaluate(pa: PlanAudit, ctxs: Sequence[AuditContext]) -> None:
    from supervisor.analysis import _anchor
    from supervisor.analysis.batch import robust
    from supervisor.engine.evaluate import evaluate_profiles

    pol = pa.policy

    def run(xs: list[AuditContext]) -> list[Any]:
        starts = [c.analysis() for c in xs]
        return evaluate_profiles(
            [c.ex.arrays() for c in xs], pol.model, pol.gf_low / 100.0, pol.gf_high / 100.0,
            [None if a is None else a.p_n2_0 for a in starts],
            [None if a is None else a.p_he_0 for a in starts],
            [_anchor(c.required.model) if c.required is not None else None for c in xs],
        )

    batches: list[list[AuditContext]] = [[]]
    width = 0
    for c in ctxs:
        width = max(width, c.ex.minutes.size)
        if batches[-1] and width * (len(batches[-1]) + 1) > EVAL_SEGMENTS:
            batches.append([])
            width = c.ex.minutes.size
        batches[-1].append(c)
    for part in batches:
        for c, (ev, err) in zip(part, robust(run, part), strict=True):
            c.evaluation = ev
            if err is not None:
                c.errors["evaluation"] = err


def _rules(ctx: AuditContext) -> list[Finding]:
    out: list[Finding] = []
    for rule in FAMILY.rules:
        try:
            got = list(rule.func(ctx, rule))  # type: ignore[arg-type]
            if not all(isinstance(f, Finding) for f in got):
                raise TypeError("the rule returned something other than findings")
        except Exception as exc:  # a rule that fails must not pass silently
            got = [could_not_run(rule.id, exc, rule.citation, FAMILY.name, ctx.dive.id)]
        out.extend(got)
    return sort_findings(out)


def audit_many(pa: PlanAudit, items: Sequence[Item]) -> list[AuditResult]:
    """Audit executed dives against the approved plan (module notes).

    Parameters
    ----------
    pa : PlanAudit
        From :func:`prepare`.
    items : sequence of Item
        The executed dives; each names an approved dive of the plan.

    Returns
    -------
    list of AuditResult
        In the order of ``items``.

    Raises
    ------
    InputError
        If an item names a dive the plan does not have.
    """
    ctxs = [AuditContext(pa, pa.plan.dive(it.dive), it.ex, it.log) for it in items]
    if pa.analysis_error:
        for c in ctxs:
            c.errors["tissues"] = pa.analysis_error
    required.fill(pa, ctxs)
    _evaluate(pa, ctxs)
    for c in ctxs:
        try:
            c.exposure = oxygen.exposure(c.ex)
        except Exception as exc:  # reported by the oxygen rules as not computed
            c.errors["oxygen"] = f"{type(exc).__name__}: {exc}"
    return [AuditResult(c, _rules(c)) for c in ctxs]


def audit_one(pa: PlanAudit, item: Item) -> AuditResult:
    """Audit one executed dive; see :func:`audit_many`."""
    return audit_many(pa, [item])[0]


def item_from_log(pa: PlanAudit, log: ImportedLog, dive: str | None = None) -> Item:
    """The executed dive of an imported log, for the dive it names or ``dive``.

    Parameters
    ----------
    pa : PlanAudit
        The plan.
    log : ImportedLog
        From :func:`supervisor.records.importers.read_log`.
    dive : str, optional
        The approved dive's id; required unless the log names it (a timed log's
        ``dive``), and then it must agree.

    Returns
    -------
    Item

    Raises
    ------
    InputError
        No dive id, one that differs from the log's, or one the plan does not have.
    """
    from supervisor.audit.executed import from_log
    from supervisor.text import excerpt

    named = log.meta.get("dive")
    if dive is not None and named is not None and dive != named:
        raise InputError("--dive", f"{excerpt(dive)} differs from the log's dive "
                                   f"{excerpt(str(named))}")
    dive_id = dive if dive is not None else named
    if dive_id is None:
        raise InputError("--dive", f"{excerpt(log.source.file)} names no dive; give --dive "
                                   "with the plan's dive id")
    ids = [d.id for d in pa.plan.dives]
    if dive_id not in ids:
        raise InputError("--dive", f"got {excerpt(str(dive_id))}; the plan's dives are "
                                   f"{', '.join(ids)}")
    d = pa.plan.dive(dive_id)
    ws, cs = d.water_stops, d.chamber_stops
    ex = from_log(log, pa.unit, chamber_expected=bool(cs),
                  last_water_stop=ws[-1].depth if ws else None,
                  chamber_depth=cs[0].depth if cs else None, step=float(pa.policy.stop_step))
    return Item(dive_id, ex, {**log.to_json(), "meta": dict(log.meta)})
