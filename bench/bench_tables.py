"""Reference-table speed: building the bundled computed tables and screening a table.

Targets (issue: reference tables): building both bundled computed tables (every
depth and bottom time) under 2 s on this machine; screening a 300-row table under
1 s.  Each is printed beside a same-run reference that loops schedule by schedule
(one ``plan_schedule`` / ``evaluate_profile`` call per row), so the ratio shows
what the vectorised batch buys.  Run: ``.venv/bin/python bench/bench_tables.py``.
"""

from __future__ import annotations

import time

from supervisor.engine.schedule import evaluate_profile, plan_schedule
from supervisor.references import load_table
from supervisor.references.build import FSW_SPEC, MSW_SPEC, _request, build_document, build_rows
from supervisor.references.screen import schedule_profile, screen_table


def best(fn, repeat=3):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def main() -> None:
    # warm caches (coefficients, limit tables) so both sides start equal
    build_rows(FSW_SPEC)
    t_build = best(lambda: [build_document(s) for s in (FSW_SPEC, MSW_SPEC)])
    reqs = []
    for spec in (FSW_SPEC, MSW_SPEC):
        for r in build_rows(spec)[1]:
            for mode in spec.modes:
                if mode == "surd_o2" and r.request.depth < spec.chamber_depth - 1e-9:
                    continue
                reqs.append(_request(spec, r.request.depth, r.request.bottom_time_min, mode))
    t_loop = best(lambda: [plan_schedule(q) for q in reqs], repeat=1)
    print(f"build both computed tables ({len(reqs)} schedules): {t_build:.3f} s "
          f"(target < 2 s); one schedule at a time: {t_loop:.3f} s "
          f"-> batch is {t_loop / t_build:.1f}x faster")

    # a ~300-row table: both computed tables screened (fsw + msw rows)
    tables = [load_table(f"{FSW_SPEC.name}"), load_table(f"{MSW_SPEC.name}")]
    n_rows = sum(len(t.rows) for t in tables)
    t_screen = best(lambda: [screen_table(t) for t in tables])
    profiles = [schedule_profile(t, r, mode, 75.0 if t.model.conventions.depth_unit == "fsw"
                                 else 23.0)
                for t in tables for r in t.rows for mode in ("air", "air_o2")
                if getattr(r, mode) is not None]
    t_eval_loop = best(lambda: [evaluate_profile(p) for p in profiles], repeat=1)
    print(f"screen {n_rows} rows ({len(profiles)} schedules: air and air/oxygen): "
          f"{t_screen:.3f} s (target < 1 s); one schedule at a time (model only): "
          f"{t_eval_loop:.3f} s -> batch is {t_eval_loop / t_screen:.1f}x faster")


if __name__ == "__main__":
    main()
