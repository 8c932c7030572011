"""The ``rule-sources`` file: every rule whose source status is fixed in code has a row."""

from __future__ import annotations

from supervisor.references.loader import load_table
from supervisor.references.rule_sources import rule_sources
from supervisor.rules import FAMILIES


def _fixed() -> dict[str, str]:
    return {r.id: r.source_status for f in FAMILIES for r in f.rules if r.source_status}


def test_every_rule_with_a_fixed_status_says_what_confirms_it() -> None:
    rows = rule_sources()
    missing = sorted(set(_fixed()) - set(rows))
    assert not missing, f"rules without a row in tables/limits/rule-sources.toml: {missing}"
    for rule_id in _fixed():
        assert rows[rule_id].confirm_from.strip(), rule_id


def test_rows_hold_the_status_the_code_gives() -> None:
    rows = rule_sources()
    for rule_id, status in _fixed().items():
        assert rows[rule_id].source_status == status, rule_id
        assert not rows[rule_id].verified  # nobody has checked the bundled rows
        assert rows[rule_id].confirms is (False)


def test_file_loads_strictly_with_provenance() -> None:
    t = load_table("rule-sources")
    assert t.kind == "limits" and t.source_status == "FROM MEMORY"
    assert t.n_verified == 0
