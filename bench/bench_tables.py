"""Reference-table speed: building the computed tables and screening tables, batch vs loop.

Targets (reference tables): building both bundled computed tables (every depth
and bottom time) under 2 s; screening a 300-row table under 1 s.

Each is compared, like for like, with the same work done one schedule at a time:
the very same code path runs twice, once as shipped and once with its one batched
engine call replaced by a loop of single calls (``plan_schedules`` by
``plan_schedule`` per request in the build; ``evaluate_profiles`` by
``evaluate_profile`` per profile in the screen).  So both sides compute the same
requests (counted and printed), build their own profiles and rows, and give the
same answer (checked).  Run: ``.venv/bin/python bench/bench_tables.py``.
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parent))

from _common import Report, measure  # noqa: E402

from supervisor.engine.schedule import evaluate_profile, plan_schedule  # noqa: E402
from supervisor.references import build as build_mod  # noqa: E402
from supervisor.references import load_table  # noqa: E402
from supervisor.references import screen as screen_mod  # noqa: E402
from supervisor.references.build import FSW_SPEC, MSW_SPEC, build_document  # noqa: E402
from supervisor.references.loader import inspect_document  # noqa: E402

REPEAT, WARMUP = 3, 1
#: Depths of the 300-row table: the bundled fsw grid at 5 fsw spacing (its first 300 rows).
WIDE_DEPTHS = tuple(float(d) for d in range(30, 190, 5))


class _Counted:
    """Wraps an engine function, counting the items it is asked for."""

    def __init__(self, fn: Any) -> None:
        self.fn, self.items = fn, 0

    def __call__(self, items: list[Any], *args: Any, **kw: Any) -> Any:
        self.items += len(items)
        return self.fn(items, *args, **kw)


def _one_schedule_at_a_time(reqs: list[Any], **_: Any) -> list[Any]:
    return [plan_schedule(r) for r in reqs]


def _one_profile_at_a_time(profiles: list[Any], model: str = "zhl16c", **kw: Any) -> list[Any]:
    return [evaluate_profile(p, model=model, **kw) for p in profiles]


def _with(module: Any, name: str, fn: Any, work: Any) -> Any:
    real = getattr(module, name)
    setattr(module, name, fn)
    try:
        return work()
    finally:
        setattr(module, name, real)


def _compare(rep: Report, what: str, target: float | None, work: Any, module: Any, name: str,
             loop_fn: Any, same: Any) -> None:
    batch_fn = _Counted(getattr(module, name))
    loop_c = _Counted(loop_fn)
    got_b = _with(module, name, batch_fn, work)
    got_l = _with(module, name, loop_c, work)
    if batch_fn.items != loop_c.items:
        raise SystemExit(f"{what}: batch asked for {batch_fn.items} items, loop for {loop_c.items}")
    if not same(got_b, got_l):
        raise SystemExit(f"{what}: the batch and the loop give different answers")
    t_b = measure(work, REPEAT, WARMUP)
    t_l = measure(lambda: _with(module, name, loop_fn, work), 1, 0)
    print(f"{what}: {batch_fn.items} items on both sides, same answer")
    print(f"  batch               {t_b.fmt(1, 's', 7)}")
    print(f"  one at a time       {t_l.fmt(1, 's', 7)}  (one run)")
    print(f"  batch is {t_l.min / t_b.min:.1f}x faster")
    if target is not None:
        rep.target(f"{what} (batch)", t_b.min, "<", target, ".3f", "s")


def _rows(docs: list[dict[str, Any]]) -> list[Any]:
    return [d["rows"] for d in docs]


def _screen_rows(reports: list[Any]) -> list[Any]:
    """Row, mode, surfacing GF (to 1e-9: batching may change the last bits) and flag."""
    return [[(r.row, r.mode, None if r.surfacing_gf is None else round(r.surfacing_gf, 9),
              r.flagged) for r in sr.rows] for sr in reports]


def main() -> int:
    rep = Report("bench_tables")
    rep.start("computed tables: build and screen, batch vs one at a time", WARMUP, REPEAT)
    print("   one at a time: one run each (it takes seconds)\n")
    specs = (FSW_SPEC, MSW_SPEC)
    _compare(rep, "build both bundled computed tables", 2.0,
             lambda: [build_document(s) for s in specs], build_mod, "plan_schedules",
             _one_schedule_at_a_time, lambda a, b: _rows(a) == _rows(b))

    tables = [load_table(s.name) for s in specs]
    n_rows = sum(len(t.rows) for t in tables)
    _compare(rep, f"screen both bundled computed tables ({n_rows} rows)", None,
             lambda: [screen_mod.screen_table(t) for t in tables], screen_mod,
             "evaluate_profiles", _one_profile_at_a_time,
             lambda a, b: _screen_rows(a) == _screen_rows(b))

    doc = build_document(replace(FSW_SPEC, depths=WIDE_DEPTHS))
    doc["rows"] = doc["rows"][:300]  # the first 300 rows (30 to 115 fsw)
    wide, issues = inspect_document(doc)
    if wide is None or len(wide.rows) != 300:
        raise SystemExit(f"the 300-row table does not validate: {issues}")
    _compare(rep, f"screen a {len(wide.rows)}-row table (fsw, every 5 fsw)", 1.0,
             lambda: [screen_mod.screen_table(wide)], screen_mod, "evaluate_profiles",
             _one_profile_at_a_time, lambda a, b: _screen_rows(a) == _screen_rows(b))
    return rep.finish()


if __name__ == "__main__":
    raise SystemExit(main())
