"""Findings of the rules and the verdict they add up to.

A finding is one rule's answer about one dive (or the whole plan): its
severity, a message, the measured value against the limit, the unit, the
citation of the source, and the status of that source.

Verdict (the supervisor's decision stays theirs):

* ``does-not-conform``: any finding is ``fail``;
* ``needs-review``: no fail, but a warning, or anything that could not be
  verified (a finding marked ``verified=False``);
* ``conforms``: none of the above.
"""

from __future__ import annotations

import copy
from collections.abc import Iterable
from dataclasses import dataclass, field, fields, replace
from typing import Any, Literal

Severity = Literal["fail", "warn", "info", "pass"]
Verdict = Literal["conforms", "needs-review", "does-not-conform"]

SEVERITIES: tuple[str, ...] = ("fail", "warn", "info", "pass")
_RANK = {s: i for i, s in enumerate(SEVERITIES)}

#: Source statuses that may, on their own, fail a plan (see DEVELOPERS.md).
CONFIRMED_STATUSES: frozenset[str] = frozenset({"VERIFIED", "COMPUTED"})


@dataclass(frozen=True)
class Finding:
    """One rule's answer.

    Parameters
    ----------
    rule : str
        Rule id, e.g. ``"osha-424-b1"``.
    severity : {"fail", "warn", "info", "pass"}
        How bad it is.
    message : str
        One sentence for the supervisor.
    measured, limit : float, str or None
        The value found in the plan and the limit it was compared with.
    unit : str or None
        Unit of ``measured`` and ``limit``.
    citation : str
        The source of the rule, e.g. ``"29 CFR 1910.424(b)(1)"``.
    dive : str or None
        Dive id, or ``None`` for the whole plan.
    source_status : str or None
        Status of the source: VERIFIED, SECONDARY, OLDER-EDITION, DERIVED,
        FROM MEMORY, COMPUTED, or ``None`` for a company policy or the plan itself.
    verified : bool
        ``False`` when the answer rests on something that could not be verified;
        such a finding makes the verdict at best ``needs-review``.
    family : str
        Rule family that produced it.
    """

    rule: str
    severity: Severity
    message: str
    measured: float | str | None = None
    limit: float | str | None = None
    unit: str | None = None
    citation: str = ""
    dive: str | None = None
    source_status: str | None = None
    verified: bool = True
    family: str = ""
    extra: dict[str, Any] = field(default_factory=dict, compare=False)

    def __post_init__(self) -> None:
        if self.severity not in _RANK:
            raise ValueError(f"severity {self.severity!r}; expected one of {SEVERITIES}")

    def to_json(self) -> dict[str, Any]:
        """Return the finding as a JSON-ready dictionary (contract ``supervisor.check/1``)."""
        out = {name: getattr(self, name) for name in _JSON_FIELDS}
        for k in ("measured", "limit"):
            v = out[k]
            if isinstance(v, float):
                out[k] = round(v, 3)
        if self.extra:
            out.update(copy.deepcopy(self.extra))
        return out


#: Keys of a finding's JSON object, in field order (``extra`` is merged in after them).
_JSON_FIELDS: tuple[str, ...] = tuple(f.name for f in fields(Finding) if f.name != "extra")


def sort_findings(findings: Iterable[Finding]) -> list[Finding]:
    """Return findings worst first; stable within a severity (rule order kept)."""
    return sorted(findings, key=lambda f: _RANK[f.severity])


def one_per_fact(findings: Iterable[Finding]) -> list[Finding]:
    """Keep one finding per dive and fact: the worst; the others' citations go into it.

    Findings that name a fact (``extra["fact"]``, set by rules that may report the same
    fact, such as a missing chamber) are merged per (dive, fact): the most severe one
    stays, in its place, with ``also_cited`` listing the rule and citation of each
    finding it stands for, and the message saying so.  Findings without a fact are
    kept as they are.  An unverified finding among them keeps the merged one
    unverified.

    Parameters
    ----------
    findings : iterable of Finding

    Returns
    -------
    list of Finding
        In the original order, merged findings at the position of the kept one.
    """
    items = list(findings)
    groups: dict[tuple[str | None, str], list[int]] = {}
    for i, f in enumerate(items):
        fact = f.extra.get("fact")
        if fact:
            groups.setdefault((f.dive, str(fact)), []).append(i)
    drop: set[int] = set()
    for idx in groups.values():
        if len(idx) < 2:
            continue
        keep = min(idx, key=lambda i: (_RANK[items[i].severity], i))
        others = [items[i] for i in idx if i != keep]
        k = items[keep]
        also = [{"rule": o.rule, "citation": o.citation, "severity": o.severity} for o in others]
        cites = "; ".join(f"{o.rule}: {o.citation}" for o in others)
        extra = {**k.extra, "also_cited": also}
        items[keep] = replace(k, message=f"{k.message} (also required by {cites})",
                              verified=k.verified and all(o.verified for o in others),
                              extra=extra)
        drop.update(i for i in idx if i != keep)
    return [f for i, f in enumerate(items) if i not in drop]


def counts(findings: Iterable[Finding]) -> dict[str, int]:
    """Return the number of findings per severity."""
    out = dict.fromkeys(SEVERITIES, 0)
    for f in findings:
        out[f.severity] += 1
    return out


def verdict(findings: Iterable[Finding]) -> Verdict:
    """Return the verdict of a set of findings.

    Parameters
    ----------
    findings : iterable of Finding

    Returns
    -------
    {"conforms", "needs-review", "does-not-conform"}
        ``does-not-conform`` for any fail; ``needs-review`` for any warning or
        unverified finding; ``conforms`` otherwise.  An empty set of findings
        is ``needs-review``: nothing was checked.
    """
    items = list(findings)
    if not items:
        return "needs-review"
    if any(f.severity == "fail" for f in items):
        return "does-not-conform"
    if any(f.severity == "warn" or not f.verified for f in items):
        return "needs-review"
    return "conforms"


def could_not_run(
    rule: str, error: BaseException, citation: str = "", family: str = "", dive: str | None = None
) -> Finding:
    """Return the warning that stands in for a rule that raised an exception.

    A rule that cannot run never passes silently: it becomes a ``warn``
    finding so the verdict is at best ``needs-review``.
    """
    why = f"{type(error).__name__}: {error}" if str(error) else type(error).__name__
    return Finding(
        rule=rule,
        severity="warn",
        message=f"rule could not run ({why}); check this item by hand",
        citation=citation,
        dive=dive,
        verified=False,
        family=family,
    )
