"""One job-level finding for every reference the check relied on that is not confirmed.

A reference table, limit table or coefficient set that is not VERIFIED with every
row checked by a second person cannot, on its own, let a plan conform.  Rather
than repeat that for every dive, the check lists each such reference once: its
status, how far its rows are verified, the rows the plan's dives used, and how
to confirm it (``supervisor tables verify`` after a second person's check
against the source).  Rules whose source status is fixed in code as unconfirmed
(a regulation paraphrase read in a secondary source, a Navy rule of an older
edition ...) are counted too, with the file that says which source confirms each
(``tables/limits/rule-sources.toml``).

This family runs last: it reads the references the providers recorded in
``ctx.shared["references"]`` and the rules that ran before it
(``ctx.shared["rule_runs"]``).
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field, replace
from typing import Any

from supervisor import analysis as an
from supervisor.findings import Finding
from supervisor.plan_fields import bundled_reference_tables
from supervisor.rules.base import CheckContext, Family, Rule
from supervisor.rules.tables import table_check

FAMILY = Family("references", "Status of the references the check relied on")

#: Where a rule's fixed source status and the source that would confirm it are listed.
RULE_SOURCES_FILE = "tables/limits/rule-sources.toml"

VERIFY_HOW = (
    "have a second person check each row against the source document, then record the check "
    "with `supervisor tables verify FILE --rows ROWS --by NAME --method HOW`"
)


@dataclass
class ToConfirm:
    """One reference to confirm.

    Attributes
    ----------
    name : str
        Reference name (table or coefficient set).
    status : str
        Source status.
    verification : str
        Row verification state as the loader reports it.
    rows : dict
        Row number -> dive ids that used it (reference tables only).
    how : str
        What confirms it.
    """

    name: str
    status: str
    verification: str
    rows: dict[int, list[str]] = field(default_factory=dict)
    how: str = VERIFY_HOW
    file: str | None = None

    def phrase(self) -> str:
        """One line for the message."""
        used = ""
        if self.rows:
            parts = [f"row {r} ({', '.join(d)})" for r, d in sorted(self.rows.items())]
            used = "; used: " + ", ".join(parts)
        return f"{self.name} ({self.status}, {self.verification}{used})"

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dictionary."""
        return {
            "name": self.name,
            "source_status": self.status,
            "verification": self.verification,
            "rows_used": [{"row": r, "dives": d} for r, d in sorted(self.rows.items())],
            "file": self.file,
            "how_to_confirm": self.how,
        }


def _confirmed(ref: dict[str, Any]) -> bool:
    return ref.get("source_status") == "VERIFIED" and ref.get("verification") == "verified"


def _coefficients_carried(ctx: CheckContext) -> bool:
    """Whether every dive conforms to a trusted table row, which then carries the check."""
    pa = an.for_context(ctx)
    dives = ctx.dives()
    return bool(dives) and all(table_check(ctx, pa.dives[d.id]).trusted for d in dives)


def to_confirm(ctx: CheckContext) -> list[ToConfirm]:
    """The references of this check that are not confirmed, in the order recorded.

    Parameters
    ----------
    ctx : CheckContext
        The rules' context, after the providers ran.

    Returns
    -------
    list of ToConfirm
    """
    pa = an.for_context(ctx)
    rows: dict[str, dict[int, list[str]]] = {}
    for d in ctx.dives():
        look = pa.dives[d.id].reference
        if look is None or look.row is None:
            continue
        if look.verification == "verified" and look.source_status == "VERIFIED":
            continue
        rows.setdefault(str(look.table), {}).setdefault(int(look.row), []).append(d.id)
    coeff = str(ctx.shared.get("coefficient_status") or "")
    files = {n: f"tables/{k}/{n}.toml" for n, k in bundled_reference_tables().items()}
    out: list[ToConfirm] = []
    for ref in ctx.shared.get("references", []):
        name = str(ref.get("name"))
        is_coeff = ref.get("verification") is None and name.startswith("zhl16")
        if is_coeff:
            if coeff == "VERIFIED" or _coefficients_carried(ctx):
                continue
            out.append(ToConfirm(
                name, coeff or str(ref.get("source_status")), "values per status in the file",
                file=files.get(name),
                how="confirm each coefficient against the published set (Bühlmann, "
                    "Tauchmedizin), mark its value_status VERIFIED and have a second person "
                    "verify the rows with `supervisor tables verify`",
            ))
            continue
        if _confirmed(ref):
            continue
        out.append(ToConfirm(name, str(ref.get("source_status")), str(ref.get("verification")),
                             rows=rows.get(name, {}), file=files.get(name)))
    return out


def _rule_counts(ctx: CheckContext) -> dict[str, int]:
    """Rules run so far whose own source status is unconfirmed, counted by status."""
    out: dict[str, int] = {}
    for run in ctx.shared.get("rule_runs", []):
        st = run.source_status
        if st and st not in ("VERIFIED", "COMPUTED"):
            out[st] = out.get(st, 0) + 1
    return out


@FAMILY.rule(
    "references-unverified",
    title="References the check relied on that a second person has not confirmed",
    citation="provenance and row verification of the bundled reference files (tables/)",
    kind="reference",
)
def unverified(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """List, once for the job, every unconfirmed reference and how to confirm it."""
    refs = to_confirm(ctx)
    rules = _rule_counts(ctx)
    n_rules = sum(rules.values())
    extra = {
        "references_to_confirm": [t.to_json() for t in refs],
        "rules_with_unconfirmed_sources": dict(sorted(rules.items())),
        "rule_sources_file": RULE_SOURCES_FILE,
    }
    if not refs and not n_rules:
        yield replace(r.ok("every reference and rule source the check relied on is confirmed",
                           status="VERIFIED", measured=0, limit=0, unit="references"),
                      extra=extra)
        return
    parts = []
    if refs:
        parts.append(f"{len(refs)} reference(s) to confirm: " + "; ".join(t.phrase() for t in refs)
                     + f"; {VERIFY_HOW}")
    if n_rules:
        by = ", ".join(f"{n} {st}" for st, n in sorted(rules.items()))
        parts.append(f"{n_rules} rule(s) rest on sources not yet confirmed ({by}); "
                     f"{RULE_SOURCES_FILE} names the source that confirms each")
    f = r.review("needs review: " + ". ".join(parts), status=None,
                 measured=f"{len(refs)} references, {n_rules} rules",
                 limit="all confirmed")
    yield replace(f, extra=extra)
