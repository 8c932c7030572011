"""The check orchestrator: plan -> engine results -> rules -> findings -> verdict.

:func:`run_check` reads and validates a plan, lets the *providers* compute the
engine-backed sections of each dive (model schedule, ...), runs every rule
family, and returns the ``supervisor.check/1`` JSON object described in
DEVELOPERS.md.

Extension points
----------------
``PROVIDERS``
    Functions ``provider(ctx) -> iterable of Finding`` run before the rules.
    A provider stores its results in ``ctx.dive_data[dive_id][key]`` (merged
    into that dive's JSON entry, e.g. ``"model_schedule"``, ``"oxygen"``) or in
    ``ctx.shared`` (``"references"``, ``"coefficient_status"``).  A provider that
    raises becomes a "could not be computed" warning.
``supervisor.rules.FAMILIES``
    The rule families.  A topic of ``EXPECTED_FAMILIES`` with no registered
    family gives a "needs review: ... not checked" warning, so a plan cannot
    conform while a whole area is unchecked.

The result supports a qualified supervisor's decision; it never makes it.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from supervisor import __version__, analysis
from supervisor.analysis.altitude import check_section as altitude_section
from supervisor.findings import (
    Finding,
    could_not_run,
    counts,
    one_per_fact,
    sort_findings,
    verdict,
)
from supervisor.periods import merge_stops
from supervisor.plan import (
    Dive,
    Plan,
    parse_plan_bytes,
    plan_sha256,
    plan_to_json,
    read_plan_bytes,
)
from supervisor.references.rule_sources import rule_sources
from supervisor.rules import FAMILIES
from supervisor.rules.base import CheckContext, Family

SCHEMA = "supervisor.check/1"

CAUTIONS: tuple[str, ...] = (
    "This check supports the diving supervisor's decision; it does not make it.",
    "Rules are paraphrases of the regulations, not legal text and not legal advice; state "
    "plans, local codes and the contractor's manual may be stricter and take precedence.",
    "Decompression, oxygen and treatment decisions rest with the diving supervisor, the "
    "contractor's manual, a diving medical officer and licensed practice.",
    "Figures marked SECONDARY, FROM MEMORY, OLDER-EDITION or DERIVED must be confirmed "
    "against the current primary document before they are relied on.",
    "Every decompression schedule carries a residual risk of decompression sickness.",
)

#: Per-dive sections filled by engine-backed providers; ``None`` until one does.
ENGINE_SECTIONS: tuple[str, ...] = (
    "reference_schedule",
    "model_schedule",
    "model_margin",
    "oxygen",
    "gas_supply",
    "contingency",
    "chart",
    "compartments",
)


@dataclass(frozen=True)
class Expected:
    """A rule family the check expects, and when it applies.

    Parameters
    ----------
    rule : str
        Rule id of the "not checked" warning.
    message : str
        What is not checked.
    applies : callable
        ``applies(plan) -> bool``: whether the plan needs this family at all.
    """

    rule: str
    message: str
    applies: Callable[[Plan], bool]


def _always(plan: Plan) -> bool:
    return True


def _repetitive_or_altitude(plan: Plan) -> bool:
    return plan.site.altitude_m > 0 or any(
        d.surface_interval_min is not None or d.previous_dive is not None for d in plan.dives
    )


EXPECTED_FAMILIES: dict[str, Expected] = {
    "tables": Expected("table-not-checked", "reference table not checked", _always),
    "model-margin": Expected(
        "model-margin-not-checked", "decompression model margin not checked", _always
    ),
    "oxygen": Expected("oxygen-not-checked", "oxygen exposure not checked", _always),
    "gas": Expected("gas-not-checked", "breathing gas limits not checked", _always),
    "gas-supply": Expected("gas-supply-not-checked", "gas supply quantities not checked", _always),
    "repetitive-altitude": Expected(
        "repetitive-altitude-not-checked",
        "repetitive dive or altitude correction not checked",
        _repetitive_or_altitude,
    ),
    "contingency": Expected(
        "contingency-not-checked", "contingency schedules not checked", _always
    ),
}

Provider = Callable[[CheckContext], Iterable[Finding]]


# ---------------------------------------------------------------------------
# providers


def model_schedule_provider(ctx: CheckContext) -> Iterator[Finding]:
    """Record the coefficient set of the policy's model and its source status.

    The model schedules themselves are computed by :mod:`supervisor.analysis`
    (one code path, with tissues carried across surface intervals).
    """
    from supervisor.engine.buhlmann import load_coefficients

    coeffs = load_coefficients(ctx.policy.model)
    helium = any(
        d.gas_mix.fhe > 0 or any(d.stop_gas(s).fhe > 0 for s in d.stops) for d in ctx.plan.dives
    )
    status = coeffs.status_for(helium)
    ctx.shared["coefficient_status"] = status
    ctx.shared.setdefault("references", []).append(
        {
            "name": coeffs.model,
            "title": coeffs.title,
            "edition": coeffs.edition,
            "source_status": status,
            "verification": None,
        }
    )
    yield from ()


PROVIDERS: list[Provider] = [model_schedule_provider, analysis.provide]


# ---------------------------------------------------------------------------
# running


@dataclass
class RuleRun:
    """Record of one rule's run, for the audit list in the result."""

    rule: str
    name: str
    family: str
    title: str
    citation: str
    source_status: str | None
    kind: str
    findings: int
    error: str | None = None

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dictionary."""
        return dict(self.__dict__)


def run_providers(ctx: CheckContext, providers: Sequence[Provider]) -> list[Finding]:
    """Run the providers; a provider that raises becomes a warning."""
    out: list[Finding] = []
    for prov in providers:
        name = getattr(prov, "__name__", "provider")
        try:
            out.extend(prov(ctx))
        except Exception as exc:  # never let one provider stop the check
            out.append(could_not_run(name, exc, family="engine"))
    return out


def run_families(
    ctx: CheckContext, families: Sequence[Family]
) -> tuple[list[Finding], list[RuleRun]]:
    """Run every applicable rule of ``families``.

    A rule that raises, or returns something other than findings, yields a
    ``warn`` finding "rule could not run" in place of its answer.
    """
    findings: list[Finding] = []
    runs: list[RuleRun] = []
    ctx.shared["rule_runs"] = runs  # read by the references family, which runs last
    sources = rule_sources()
    for fam in families:
        for rule in fam.rules:
            if not rule.applies(ctx):
                continue
            src = sources.get(rule.id)
            if src is not None and src.confirms and rule.source_status != "VERIFIED":
                rule = replace(rule, source_status="VERIFIED")
            error = None
            try:
                got = rule.run(ctx)
                if not all(isinstance(f, Finding) for f in got):
                    raise TypeError("the rule returned something other than findings")
            except Exception as exc:  # a failing rule must not pass silently
                got = [could_not_run(rule.id, exc, rule.citation, fam.name)]
                error = f"{type(exc).__name__}: {exc}"
            findings.extend(got)
            runs.append(
                RuleRun(
                    rule.id,
                    rule.name,
                    fam.name,
                    rule.title,
                    rule.citation,
                    rule.source_status,
                    rule.kind,
                    len(got),
                    error,
                )
            )
    return findings, runs


def pending_findings(plan: Plan, families: Sequence[Family]) -> list[Finding]:
    """Warnings for expected families that are not registered."""
    present = {f.name for f in families}
    out = []
    for name, exp in EXPECTED_FAMILIES.items():
        if name in present or not exp.applies(plan):
            continue
        out.append(
            Finding(
                rule=exp.rule,
                severity="warn",
                message=f"needs review: {exp.message}",
                citation="not yet checked by this tool; check by hand",
                verified=False,
                family=name,
            )
        )
    return out


def _by_dive(findings: list[Finding]) -> tuple[dict[str | None, list[Finding]], list[Finding]]:
    """Findings grouped by dive id (one pass), and the plan-wide findings (dive None)."""
    groups: dict[str | None, list[Finding]] = {}
    for f in findings:
        groups.setdefault(f.dive, []).append(f)
    return groups, groups.get(None, [])


def _dive_entry(
    ctx: CheckContext, d: Dive, groups: dict[str | None, list[Finding]], plan_wide: list[Finding]
) -> dict[str, Any]:
    entry: dict[str, Any] = {
        "id": d.id,
        "diver": d.diver,
        "mode": d.mode,
        "gas": d.gas_mix.name,
        "max_depth": d.max_depth,
        "bottom_time_min": d.bottom_time_min,
        "decompression": d.decompression,
        # a plan writes each oxygen period and air break as a stop; one stop with its periods
        "proposed_stops": merge_stops(
            (s.depth, s.minutes, d.stop_gas(s).name, s.place) for s in d.stops
        ),
        "descent_rate": ctx.plan.descent_rate(d),
        "ascent_rate": ctx.plan.ascent_rate(d),
        "in_water_stop_min": d.in_water_stop_min,
        "chamber_stop_min": float(sum(s.minutes for s in d.chamber_stops)),
        "surface_interval_min": d.surface_interval_min,
        "previous_dive": d.previous_dive,
        "standby_diver": d.standby_diver,
        "tender": d.tender,
        "verdict": verdict(groups.get(d.id, []) + plan_wide),
    }
    for key in ENGINE_SECTIONS:
        entry[key] = None
    entry.update(ctx.dive_data.get(d.id, {}))
    return entry


def check_plan(
    plan: Plan,
    *,
    plan_path: str | None = None,
    plan_sha: str | None = None,
    now: _dt.datetime | None = None,
    families: Sequence[Family] | None = None,
    providers: Sequence[Provider] | None = None,
) -> dict[str, Any]:
    """Check a validated plan and return the ``supervisor.check/1`` object.

    Parameters
    ----------
    plan : Plan
        The plan.
    plan_path : str or None
        Path as given, recorded in the result.
    plan_sha : str or None
        SHA-256 of the plan file bytes; of the canonical JSON of the plan if ``None``.
    now : datetime or None
        Time stamp of the result (UTC now by default).
    families : sequence of Family or None
        Rule families (``supervisor.rules.FAMILIES`` by default).
    providers : sequence of callables or None
        Engine-backed providers (``PROVIDERS`` by default).

    Returns
    -------
    dict
        The result; see DEVELOPERS.md for the keys.
    """
    fams = tuple(FAMILIES if families is None else families)
    provs = tuple(PROVIDERS if providers is None else providers)
    ctx = CheckContext(plan)
    found = run_providers(ctx, provs)
    rule_findings, runs = run_families(ctx, fams)
    found += rule_findings
    found += pending_findings(plan, fams)
    found = sort_findings(one_per_fact(found))
    by_dive = _by_dive(found)
    stamp = (now or _dt.datetime.now(_dt.UTC)).astimezone(_dt.UTC)
    pol = ctx.policy
    sha = plan_sha or hashlib.sha256(plan_to_json(plan).encode()).hexdigest()
    job = plan.job
    return {
        "schema": SCHEMA,
        "tool_version": __version__,
        "generated_at": stamp.strftime("%Y-%m-%dT%H:%M:%SZ"),
        "plan_sha256": sha,
        "plan_path": plan_path,
        "job": {
            "title": job.title,
            "site": job.site,
            "date": job.date.isoformat(),
            "client": job.client,
            "supervisor": job.supervisor,
            "jurisdiction": job.jurisdiction,
            "contractor": job.contractor,
        },
        "unit": plan.unit,
        "verdict": verdict(found),
        "counts": counts(found),
        "findings": [f.to_json() for f in found],
        "references": list(ctx.shared.get("references", [])),
        "model": {
            "name": pol.model,
            "gf_low": round(pol.gf_low / 100.0, 6),
            "gf_high": round(pol.gf_high / 100.0, 6),
            "coefficient_status": ctx.shared.get("coefficient_status"),
        },
        "policy": pol.model_dump(mode="json"),
        "dives": [_dive_entry(ctx, d, *by_dive) for d in plan.dives],
        "altitude": altitude_section(ctx),
        "team": [
            {
                "name": m.name,
                "role": m.role[0],
                "roles": list(m.role),
                "first_aid_cpr": m.first_aid_cpr,
                "physics_physiology": m.physics_physiology,
            }
            for m in plan.team
        ],
        "chamber": plan.chamber.model_dump(mode="json"),
        "site": plan.site.model_dump(mode="json"),
        "rules": [r.to_json() for r in runs],
        "cautions": list(CAUTIONS),
    }


def run_check(
    plan: str | Path | Plan,
    *,
    now: _dt.datetime | None = None,
    families: Sequence[Family] | None = None,
    providers: Sequence[Provider] | None = None,
) -> dict[str, Any]:
    """Read, validate and check a plan file (or a :class:`Plan`).

    Parameters
    ----------
    plan : str, Path or Plan
        Plan file path, or an already validated plan.
    now, families, providers
        See :func:`check_plan`.

    Returns
    -------
    dict
        The ``supervisor.check/1`` object.

    Raises
    ------
    supervisor.plan.PlanValidationError
        If the file cannot be read, is not TOML, or does not validate.
    """
    if isinstance(plan, Plan):
        return check_plan(plan, now=now, families=families, providers=providers)
    raw = read_plan_bytes(plan)
    parsed = parse_plan_bytes(raw, str(plan), Path(plan).absolute().parent)
    return check_plan(
        parsed,
        plan_path=str(plan),
        plan_sha=plan_sha256(raw),
        now=now,
        families=families,
        providers=providers,
    )
