"""Every bundled table row, in every mode it offers, passes the default policy's limits.

Each row of each bundled no-stop and decompression table becomes a dive of a fictional
plan (the engine base plan; one diver per dive, so no dive is repetitive), with the row's
depth, bottom time and stops in the mode's gas and place, the table as the policy's
reference table and every other policy field left at its default.  No finding of
severity ``fail`` may come from a policy PO2, CNS, density, END or hypoxia rule: the
defaults nobody chose must not fail the tables' own schedules, and the trade's oxygen
depths (20 fsw / 6 msw in the water, 30 fsw / 9 msw where the table uses them) must
not fail through rounding.  The expected value is this project's own rule (no outside
source): the tables are this project's computed tables and the Navy no-stop limits
(FROM MEMORY).  Rows are run in batches of plans; every row of every table in every
mode is run.
"""

from __future__ import annotations

import copy
import tomllib
from typing import Any

import pytest
from _engine_plans import DATA

from supervisor.plan import MAX_TEAM, plan_from_dict
from supervisor.plan_fields import bundled_reference_tables
from supervisor.references import load_table
from supervisor.rules import gas, oxygen
from supervisor.rules.base import CheckContext

#: The rules that judge a policy PO2, CNS, density, END or hypoxia limit.
LIMIT_RULES = frozenset({
    "oxygen-po2-bottom", "oxygen-po2-decompression", "oxygen-po2-chamber",
    "oxygen-po2-range", "oxygen-cns-dive", "oxygen-cns-day",
    "gas-mod", "gas-hypoxic", "gas-density", "gas-end",
})
_MODE_DECO = {"air": "in-water", "air_o2": "in-water-oxygen", "surd_o2": "surface-oxygen"}
_BATCH = MAX_TEAM - 5  # divers per plan, the base plan's other members kept


def _tables() -> list[str]:
    names = [n for n, kind in bundled_reference_tables().items()
             if kind in ("no-stop", "decompression")]
    assert {"usn-rev7-air-ndl", "zhl16c-gf30-85-air-fsw", "zhl16c-gf30-85-air-msw"} <= set(names)
    return sorted(names)


def _dives(name: str) -> list[tuple[str, dict[str, Any]]]:
    """(label, dive fields) for every row and mode of the table."""
    t = load_table(name).model
    out = []
    for i, row in enumerate(t.rows):
        if t.kind == "no-stop":
            if row.unlimited:
                continue
            out.append((f"{name} row {i + 1} no-stop", dict(
                max_depth=row.depth, bottom_time_min=row.limit_min, decompression="none",
                stops=[])))
            continue
        for mode, sched in row.schedules().items():
            if not sched.permitted:
                continue
            stops = [{"depth": s.depth, "minutes": s.minutes, "gas": s.gas, "place": s.place}
                     for s in sched.stops]
            deco = _MODE_DECO[mode] if stops else "none"
            if mode == "surd_o2" and not any(s["place"] == "chamber" for s in stops):
                deco = "in-water" if stops else "none"
            fields: dict[str, Any] = dict(max_depth=row.depth, bottom_time_min=row.bottom_time,
                                          decompression=deco, stops=stops)
            if deco == "surface-oxygen":
                fields["surface_transfer_min"] = 1.0
            out.append((f"{name} row {i + 1} {mode}", fields))
    return out


def _plan(name: str, unit: str, batch: list[tuple[str, dict[str, Any]]]) -> dict[str, Any]:
    base = tomllib.loads((DATA / "base.toml").read_text(encoding="utf-8"))
    base["unit"] = unit
    base["policy"] = {"reference_table": name}  # every limit at its default
    template = base["dives"][0]
    template.pop("descent_rate", None)
    template.pop("ascent_rate", None)
    base["dives"] = []
    for k, (_, fields) in enumerate(batch):
        who = f"Table Diver {k + 1}"
        base["team"].append({"name": who, "role": "diver", "first_aid_cpr": True,
                             "physics_physiology": True})
        d = copy.deepcopy(template)
        d.update(id=f"T{k + 1}", diver=who, **fields)
        base["dives"].append(d)
    return base


@pytest.mark.parametrize("name", _tables())
def test_every_row_and_mode_passes_the_default_policy_limits(name):
    unit = load_table(name).model.conventions.depth_unit
    dives = _dives(name)
    modes = {label.rsplit(" ", 1)[1] for label, _ in dives}
    assert modes == ({"no-stop"} if "ndl" in name else {"air", "air_o2", "surd_o2"})
    bad = []
    for start in range(0, len(dives), _BATCH):
        batch = dives[start:start + _BATCH]
        ctx = CheckContext(plan_from_dict(_plan(name, unit, batch)))
        for fam in (oxygen.FAMILY, gas.FAMILY):
            for rule in fam.rules:
                for f in rule.run(ctx):
                    if f.severity == "fail" and f.rule in LIMIT_RULES:
                        label = batch[int(f.dive[1:]) - 1][0]
                        bad.append(f"{label}: {f.rule}: {f.message}")
    assert not bad, "\n".join(bad[:20]) + f"\n({len(bad)} in all)"
