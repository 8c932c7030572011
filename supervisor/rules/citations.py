"""Citations that follow the plan's jurisdiction, and cross-references labelled as such.

A USCG job (46 CFR 197 Subpart B) cites 46 CFR 197; an OSHA job (29 CFR 1910
Subpart T) cites 29 CFR 1910.  A paragraph of the other rule set, cited only
because it says the same thing, is a cross-reference and reads
``"cross-reference: 46 CFR 197.340"``; so does any federal row cited for a
plan with no jurisdiction.
"""

from __future__ import annotations

from typing import Any

OSHA_ID = "osha-1910-t"
USCG_ID = "uscg-46-197-b"
#: The label of a citation from another rule set than the plan's.
CROSS = "cross-reference: "


def cross_reference(citation: str) -> str:
    """``citation`` labelled as a cross-reference (once)."""
    return citation if citation.startswith(CROSS) else CROSS + citation


def for_jurisdiction(ctx: Any, *, osha: str, uscg: str, other: str | None = None) -> str:
    """The citation of the plan's jurisdiction.

    Parameters
    ----------
    ctx : CheckContext
        Its ``jurisdiction`` chooses.
    osha, uscg : str
        The citation under each rule set.
    other : str or None
        The citation without a jurisdiction; by default both, as cross-references.

    Returns
    -------
    str
    """
    if ctx.jurisdiction == OSHA_ID:
        return osha
    if ctx.jurisdiction == USCG_ID:
        return uscg
    if other is not None:
        return other
    return f"{cross_reference(osha)}; {cross_reference(uscg)}"


def own_or_cross(ctx: Any, citation: str, home: str) -> str:
    """``citation`` as is in a job under ``home``, else labelled as a cross-reference."""
    return citation if ctx.jurisdiction == home else cross_reference(citation)
