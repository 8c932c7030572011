"""The rule framework: rules, families and the context they read.

A rule is one small function ``func(ctx, rule) -> iterable of Finding``.  It is
declared in a :class:`Family` with its id, citation and source status::

    FAMILY = Family("oxygen", "Oxygen exposure")

    @FAMILY.rule("oxygen-po2-bottom", title="Bottom PO2 within policy",
                 citation="contractor policy (policy.po2_bottom_max)", kind="policy")
    def bottom_po2(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
        for dive in ctx.plan.dives:
            ...
            yield r.breach("...", measured=..., limit=..., unit="bar", dive=dive.id)

The rule asks ``r`` for its findings so that the severity follows the source:
:meth:`Rule.breach` fails for a VERIFIED regulatory row, a company policy or the
plan's own consistency, and only warns for an unconfirmed row (SECONDARY,
FROM MEMORY, OLDER-EDITION, DERIVED).  :meth:`Rule.review` warns that something
could not be verified; :meth:`Rule.ok` records a pass; :meth:`Rule.note` gives
information.  A rule that raises is turned into a "rule could not run" warning
by the orchestrator (:mod:`supervisor.check`).

Rules never compute physics themselves: engine results are put in
``ctx.dive_data[dive.id]`` by the orchestrator's providers before the rules run.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass, field, replace
from typing import Any, Literal

from supervisor.findings import CONFIRMED_STATUSES, Finding
from supervisor.plan import Dive, Member, Plan, Policy
from supervisor.quantities import UnitSystem

RuleKind = Literal["regulatory", "reference", "policy", "plan"]
"""What a rule compares against:

* ``regulatory``: a regulation row; fails only when its status is VERIFIED;
* ``reference``: a reference document or table (Navy manual, NOAA ...); same;
* ``policy``: the contractor's own limit; always fails when broken;
* ``plan``: the plan's own consistency (a plan that cannot be carried out as
  written); always fails.
"""

RuleFunc = Callable[["CheckContext", "Rule"], Iterable[Finding]]

_UNSET: Any = object()

#: Measured values and limit of a yes/no item (:meth:`Rule.need`), and of a missing
#: person or item (``measured=NONE`` against the item required).
YES, NO, NOT_STATED, NONE = "yes", "no", "not stated", "none"

#: Facts several rules report (``fact=`` of :meth:`Rule.finding`): the check keeps one finding
#: per dive and fact (:func:`supervisor.findings.one_per_fact`).
NO_CHAMBER = "no-chamber"


@dataclass
class CheckContext:
    """What the rules read: the plan and the engine results computed for it.

    Parameters
    ----------
    plan : Plan
        The validated plan.
    dive_data : dict
        Per dive id, the results of the orchestrator's providers (engine-backed
        sections such as ``model_schedule``); empty until a provider fills them.
    shared : dict
        Plan-wide results of providers (e.g. the reference tables used).
    """

    plan: Plan
    dive_data: dict[str, dict[str, Any]] = field(default_factory=dict)
    shared: dict[str, Any] = field(default_factory=dict)

    def __post_init__(self) -> None:
        self.policy: Policy = self.plan.resolved_policy
        self.unit: str = self.plan.unit
        self.units: UnitSystem = UnitSystem(self.unit)
        self.jurisdiction: str = self.plan.job.jurisdiction
        for d in self.plan.dives:
            self.dive_data.setdefault(d.id, {})

    # -- depths ------------------------------------------------------------

    def fsw(self, depth: float) -> float:
        """Plan depth converted to fsw [fsw], rounded to 1e-6 against float noise."""
        return round(self.plan.to_fsw(depth), 6)

    def limit(self, depth_fsw: float) -> float:
        """A limit given in fsw expressed in the plan unit, rounded to 0.1 [plan unit]."""
        return round(self.plan.from_fsw(depth_fsw), 1)

    def show(self, depth: float) -> str:
        """Format a plan depth, adding the fsw value for msw plans."""
        if self.unit == "fsw":
            return f"{depth:g} fsw"
        return f"{depth:g} msw ({self.fsw(depth):.1f} fsw)"

    # -- dives and team ----------------------------------------------------

    def dives(self, *modes: str) -> list[Dive]:
        """The plan's dives, optionally only those in ``modes``."""
        return [d for d in self.plan.dives if not modes or d.mode in modes]

    def member(self, name: str | None) -> Member | None:
        """The team member called ``name``."""
        return self.plan.member(name)

    def members_with(self, role: str) -> list[Member]:
        """Team members holding ``role``."""
        return self.plan.members_with(role)

    def standby_for(self, dive: Dive) -> Member | None:
        """The standby of ``dive``: the named one, else a standby-diver not diving it."""
        if dive.standby_diver is not None:
            return self.member(dive.standby_diver)
        for m in self.members_with("standby-diver"):
            if m.name != dive.diver:
                return m
        return None

    def tender_for(self, dive: Dive) -> Member | None:
        """The tender of ``dive``: the named one, else a tender who is not diving or on standby."""
        if dive.tender is not None:
            return self.member(dive.tender)
        busy = {dive.diver, dive.standby_diver}
        for m in self.members_with("tender"):
            if m.name not in busy:
                return m
        return None

    def outside_ndl(self, dive: Dive) -> bool:
        """Whether ``dive`` is outside the no-decompression limits, as far as anything says.

        True when the plan declares decompression, or when an engine-backed section
        (``model_schedule`` or ``reference_schedule`` in ``dive_data``) requires stops
        or marks the dive outside its table.  A dive is never taken as within the
        limits just because the plan says so; the table and model rules check it.
        """
        if dive.declared_outside_ndl:
            return True
        data = self.dive_data.get(dive.id, {})
        for key in ("model_schedule", "reference_schedule"):
            sec = data.get(key)
            if isinstance(sec, dict) and (sec.get("stops") or sec.get("outside_table")):
                return True
        return False

    def has_bailout(self, dive: Dive) -> bool:
        """Whether the dive's diver carries a bailout cylinder (diver-carried reserve)."""
        return any(b.diver == dive.diver for b in self.plan.gas_supply.bailout)


@dataclass(frozen=True)
class Rule:
    """One rule: its id, source and function.

    Parameters
    ----------
    id : str
        Rule id put on its findings (a regulation row id such as ``osha-424-b1``).
    name : str
        Unique key of the rule in its family (defaults to ``id``).
    family : str
        Family name.
    title : str
        Short description.
    citation : str
        Source, e.g. ``"29 CFR 1910.424(b)(1)"``.
    source_status : str or None
        VERIFIED, SECONDARY, FROM MEMORY ... or ``None`` for policy and plan rules.
    kind : {"regulatory", "reference", "policy", "plan"}
        What the rule compares against (decides the severity of a breach).
    jurisdictions : frozenset of str or None
        Jurisdictions the rule applies to; ``None`` for all.
    func : callable
        ``func(ctx, rule)`` yielding findings.
    citations : dict or None
        The citation under a jurisdiction, where it differs from ``citation``
        (e.g. the USCG paragraph for a USCG job, or the other rule set's paragraph
        labelled ``"cross-reference: ..."``); :meth:`run` puts it on every finding
        that carries the default citation.
    """

    id: str
    name: str
    family: str
    title: str
    citation: str
    source_status: str | None
    kind: RuleKind
    jurisdictions: frozenset[str] | None
    func: RuleFunc
    citations: dict[str, str] | None = field(default=None, hash=False, compare=False)

    def citation_for(self, jurisdiction: str) -> str:
        """The rule's citation in a job under ``jurisdiction``."""
        return (self.citations or {}).get(jurisdiction, self.citation)

    def applies(self, ctx: CheckContext) -> bool:
        """Whether the rule applies to the plan's jurisdiction."""
        return self.jurisdictions is None or ctx.jurisdiction in self.jurisdictions

    def run(self, ctx: CheckContext) -> list[Finding]:
        """Run the rule and return its findings (exceptions propagate).

        A finding carrying the rule's default citation gets the citation of the
        plan's jurisdiction (:attr:`citations`).
        """
        got = list(self.func(ctx, self))
        cite = self.citation_for(ctx.jurisdiction)
        if cite == self.citation:
            return got
        return [replace(f, citation=cite) if isinstance(f, Finding) and f.citation == self.citation
                else f for f in got]

    def confirmed(self, status: str | None = _UNSET, kind: str | None = None) -> bool:
        """Whether an answer of this rule rests on a confirmed source.

        True for a company policy or the plan's own consistency (``kind`` "policy" or
        "plan"), and for a regulation or reference whose status is VERIFIED (or
        COMPUTED by this project, :data:`~supervisor.findings.CONFIRMED_STATUSES`).
        A SECONDARY, FROM MEMORY, OLDER-EDITION or DERIVED source, or none, is not.

        Parameters
        ----------
        status : str or None
            Source status of the finding; the rule's own when not given.
        kind : str or None
            Kind of the finding; the rule's own when not given.
        """
        if (kind or self.kind) in ("policy", "plan"):
            return True
        st = self.source_status if status is _UNSET else status
        return st in CONFIRMED_STATUSES

    def _severity_of_breach(self, status: str | None, kind: str | None = None) -> str:
        return "fail" if self.confirmed(status, kind) else "warn"

    def finding(
        self,
        severity: str,
        message: str,
        *,
        measured: float | str | None = None,
        limit: float | str | None = None,
        unit: str | None = None,
        dive: str | None = None,
        rule: str | None = None,
        citation: str | None = None,
        status: str | None = _UNSET,
        verified: bool = True,
        fact: str | None = None,
    ) -> Finding:
        """Return a finding of this rule; keyword arguments override the rule's defaults.

        ``fact`` names the fact the finding is about when other rules may report the same
        fact (e.g. ``"no-chamber"``): the check keeps one finding per dive and fact, the
        worst, and lists the others' citations in it (:func:`supervisor.findings.one_per_fact`).
        """
        return Finding(
            rule=rule or self.id,
            severity=severity,  # type: ignore[arg-type]
            message=message,
            measured=measured,
            limit=limit,
            unit=unit,
            citation=self.citation if citation is None else citation,
            dive=dive,
            source_status=self.source_status if status is _UNSET else status,
            verified=verified,
            family=self.family,
            extra={"fact": fact} if fact else {},
        )

    def breach(
        self,
        message: str,
        *,
        status: str | None = _UNSET,
        kind: RuleKind | None = None,
        **kw: Any,
    ) -> Finding:
        """A broken requirement: ``fail`` if the source can fail a plan, else ``warn``.

        ``kind`` overrides the rule's kind for this finding (e.g. a plan-consistency
        breach inside a reference rule).
        """
        st = self.source_status if status is _UNSET else status
        sev = self._severity_of_breach(st, kind)
        return self.finding(sev, message, status=st, verified=sev == "fail", **kw)

    def ok(
        self,
        message: str,
        *,
        status: str | None = _UNSET,
        kind: RuleKind | None = None,
        verified: bool | None = None,
        **kw: Any,
    ) -> Finding:
        """A requirement that is met.

        The pass is ``verified`` only when it rests on a confirmed source
        (:meth:`confirmed`): a pass on a SECONDARY, FROM MEMORY, OLDER-EDITION or
        DERIVED row is marked unverified, so the verdict is at best "needs review".
        ``verified=False`` marks a pass unverified for another reason; a pass on an
        unconfirmed source can never be marked verified.
        """
        ok = self.confirmed(status, kind)
        return self.finding(
            "pass", message, status=status, verified=ok and verified is not False, **kw
        )

    def review(self, message: str, **kw: Any) -> Finding:
        """Something that could not be verified: a ``warn`` marked unverified."""
        return self.finding("warn", message, verified=False, **kw)

    def note(self, message: str, **kw: Any) -> Finding:
        """Information for the supervisor; does not change the verdict."""
        return self.finding("info", message, **kw)

    def need(
        self,
        value: bool | None,
        what: str,
        *,
        dive: str | None = None,
        status: str | None = _UNSET,
        why: str = "",
    ) -> Finding:
        """Check a stated yes/no item: pass if true, breach if false, review if not stated.

        Parameters
        ----------
        value : bool or None
            The plan's answer; ``None`` means the plan does not state it.
        what : str
            The item, e.g. ``"a safe practices manual at the site"``.
        dive : str or None
            Dive id.
        status : str or None
            Source status overriding the rule's.
        why : str
            Why the item is required here, appended to the message.

        Returns
        -------
        Finding
            ``measured`` is ``"yes"``, ``"no"`` or ``"not stated"`` against the limit
            ``"yes"``.
        """
        tail = f" ({why})" if why else ""
        kw: dict[str, Any] = dict(limit=YES, dive=dive, status=status)
        if value is True:
            return self.ok(f"{what}: stated{tail}", measured=YES, **kw)
        if value is None:
            return self.review(
                f"needs review: the plan does not state {what}{tail}", measured=NOT_STATED, **kw
            )
        return self.breach(f"missing: {what}{tail}", measured=NO, **kw)


@dataclass
class Family:
    """A named list of rules; register a rule with :meth:`rule`.

    Parameters
    ----------
    name : str
        Family name, e.g. ``"regulatory"``.  The orchestrator knows which
        families it expects (``supervisor.check.EXPECTED_FAMILIES``); a family
        that is not registered is reported as "not checked".
    title : str
        Human title.
    """

    name: str
    title: str
    rules: list[Rule] = field(default_factory=list)

    def rule(
        self,
        rule_id: str,
        *,
        title: str,
        citation: str,
        source_status: str | None = None,
        kind: RuleKind = "regulatory",
        jurisdictions: Iterable[str] | None = None,
        name: str | None = None,
        citations: dict[str, str] | None = None,
    ) -> Callable[[RuleFunc], RuleFunc]:
        """Decorator registering ``func(ctx, rule)`` as a rule of this family.

        Parameters
        ----------
        rule_id : str
            Id put on the findings.
        title, citation, source_status, kind, jurisdictions
            See :class:`Rule`.
        name : str or None
            Unique key when several functions share one rule id.
        citations : dict or None
            Citation per jurisdiction where it differs (see :class:`Rule`).

        Raises
        ------
        ValueError
            If the key is already registered in the family.
        """
        key = name or rule_id

        def deco(func: RuleFunc) -> RuleFunc:
            if any(r.name == key for r in self.rules):
                raise ValueError(f"rule {key!r} registered twice in family {self.name!r}")
            self.rules.append(
                Rule(
                    id=rule_id,
                    name=key,
                    family=self.name,
                    title=title,
                    citation=citation,
                    source_status=source_status,
                    kind=kind,
                    jurisdictions=frozenset(jurisdictions) if jurisdictions is not None else None,
                    func=func,
                    citations=dict(citations) if citations else None,
                )
            )
            return func

        return deco

    def get(self, key: str) -> Rule:
        """Return the rule registered under ``key``."""
        for r in self.rules:
            if r.name == key:
                return r
        raise KeyError(key)
