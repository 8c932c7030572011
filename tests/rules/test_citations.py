"""Citations follow the jurisdiction: a USCG job cites 46 CFR 197, an OSHA job 29 CFR 1910.

A paragraph of the other rule set may be cited only as a labelled cross-reference
("cross-reference: ..."). The check runs on the bundled examples and on variants of
the rule tests' base plan that reach the team, site, supply and regulatory rules in
both jurisdictions. Expected values are the project's own citation convention.
"""

from __future__ import annotations

import re
from pathlib import Path

import _contract as _c
import pytest

from supervisor.check import check_plan, run_check
from supervisor.plan import plan_from_dict
from supervisor.rules.base import CheckContext
from supervisor.rules.citations import cross_reference, for_jurisdiction, own_or_cross
from supervisor.rules.team import FAMILY as TEAM

ROOT = Path(__file__).resolve().parents[2]
OTHER = {"osha-1910-t": "46 CFR", "uscg-46-197-b": "29 CFR"}


def _unlabelled(result):
    """(rule, text) of every citation of the other rule set not labelled a cross-reference."""
    other = OTHER.get(result["job"]["jurisdiction"])
    out = []
    for f in result["findings"]:
        for text in (f["citation"], f["message"]):
            for mt in re.finditer(r"(29|46) CFR", text):
                if text[mt.start():mt.end()] == other and \
                        "cross-reference" not in text[max(0, mt.start() - 20):mt.start()]:
                    out.append((f["rule"], text))
    return out


def _variants():
    for j in ("osha-1910-t", "uscg-46-197-b"):
        plain = _c.base()
        plain["job"]["jurisdiction"] = j
        yield j, "plain", plain
        site = _c.dive(_c.base(), direct_ascent_possible=True)
        site["job"]["jurisdiction"] = j
        site["site"].update(night=True, confined_space=True, current_kt=3)
        yield j, "night, confined, 3 kt", site
        deep = _c.dive(_c.base(), max_depth=140, bottom_time_min=20, heavy_gear=True,
                       tender=None)
        deep["job"]["jurisdiction"] = j
        yield j, "deep heavy gear", deep


@pytest.mark.parametrize(("jurisdiction", "what", "doc"), list(_variants()),
                         ids=lambda x: x if isinstance(x, str) else "")
def test_citations_of_the_other_rule_set_are_cross_references(jurisdiction, what, doc):
    result = check_plan(plan_from_dict(doc))
    assert _unlabelled(result) == []


@pytest.mark.parametrize("name", ["demo-job.toml", "harbour-job-msw.toml"])
def test_examples_cite_their_own_rule_set(name):
    assert _unlabelled(run_check(ROOT / "examples" / name)) == []


@pytest.mark.parametrize(("jurisdiction", "starts"), [
    ("osha-1910-t", "29 CFR 1910 Subpart T team reading"),
    ("uscg-46-197-b", "46 CFR 197 Subpart B team reading"),
    ("none", "cross-reference: 29 CFR 1910 Subpart T team reading"),
])
def test_team_rules_cite_the_jurisdiction(jurisdiction, starts):
    d = _c.base()
    d["job"]["jurisdiction"] = jurisdiction
    for key in ("team-standby", "team-tender"):
        got = TEAM.get(key).run(CheckContext(plan_from_dict(d)))
        assert got and all(f.citation.startswith(starts) for f in got)
    if jurisdiction == "none":
        assert "; cross-reference: 46 CFR 197 Subpart B" in got[0].citation


def test_supply_cites_46_cfr_197_340_as_a_cross_reference_outside_uscg():
    from supervisor.rules.supply import FAMILY as SUPPLY

    d = _c.base()
    rule = SUPPLY.get("supply-primary")
    assert rule.citation_for("osha-1910-t").startswith("cross-reference: 46 CFR 197.340")
    assert rule.citation_for("uscg-46-197-b").startswith("46 CFR 197.340")
    got = rule.run(CheckContext(plan_from_dict(d)))
    assert got and all(f.citation.startswith("cross-reference: 46 CFR") for f in got)


def test_citation_helpers():
    class Ctx:
        jurisdiction = "none"

    assert cross_reference(cross_reference("x")) == "cross-reference: x"
    assert for_jurisdiction(Ctx(), osha="a", uscg="b") == "cross-reference: a; cross-reference: b"
    assert own_or_cross(Ctx(), "46 CFR 197.340", "uscg-46-197-b").startswith("cross-reference")
