"""The source status of each rule whose source is fixed in code (``rule-sources``).

Rules carry the status of their source in code (a regulation paraphrase read in
a secondary source is SECONDARY, a Navy rule of a superseded edition is
OLDER-EDITION ...).  The limits file ``tables/limits/rule-sources.toml`` lists
every such rule with the document that confirms it.  When a second person has
read that document and recorded the check (``supervisor tables verify``) on a
row whose ``source_status`` is VERIFIED, the rule's answers rest on a confirmed
source; an unverified row changes nothing.  A contractor does this in its own
copy of the tables (``SUPERVISOR_TABLES``).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from supervisor.resources import tables_dir

RULE_SOURCES_TABLE = "rule-sources"


@dataclass(frozen=True)
class RuleSource:
    """One row: a rule, the status of its source and what confirms it.

    Attributes
    ----------
    rule : str
        Rule id.
    source_status : str
        Status of the rule's source as the row holds it.
    confirm_from : str
        The document a second person reads to confirm it.
    verified : bool
        Whether a second person's check of the row is recorded and still holds.
    """

    rule: str
    source_status: str
    confirm_from: str
    verified: bool

    @property
    def confirms(self) -> bool:
        """Whether the row makes the rule's source VERIFIED."""
        return self.verified and self.source_status == "VERIFIED"


@lru_cache(maxsize=4)
def _load(path: Path) -> dict[str, RuleSource]:
    from supervisor.references.loader import load_table

    if not path.is_file():
        return {}
    t = load_table(path)
    out: dict[str, RuleSource] = {}
    for i, row in enumerate(t.rows):
        d = row.data()
        st = t.row_states[i]
        out[str(d["rule"])] = RuleSource(str(d["rule"]), st.source_status,
                                         str(d.get("confirm_from", "")), bool(st.verified))
    return out


def rule_sources() -> dict[str, RuleSource]:
    """Rows of the ``rule-sources`` file of the tables in use, by rule id (empty if absent)."""
    return _load(tables_dir() / "limits" / f"{RULE_SOURCES_TABLE}.toml")
