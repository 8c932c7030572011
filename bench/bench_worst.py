"""Worst-case work: the slowest valid plans finish under 30 s and 1 GB (issue 12).

Each shape of ``tests/_worst_plans.py`` (fixed seed, the plan caps' full size: 200
dives) is written to a file and checked by the installed ``supervisor check --json``
in its own process, as a user runs it; the wall time and the peak resident memory of
that process are measured (``os.wait4``).  Warm-up: none (each run is a cold start,
as a user's is); repetitions: ``BENCH_REPEAT`` (default 1), median and minimum printed.

Targets: every shape under 30 s and 1 GB peak RSS.  Exit status 1 when one is missed.
A shape just past the accepted range (an ascent of 0.0001 msw/min) must be refused
with exit status 2, at once.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import tomli_w

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from tests._worst_plans import SHAPES, worst_plan  # noqa: E402

TARGET_S = 30.0
TARGET_MB = 1024.0
REFUSED = {"slower-than-allowed"}


def _run(exe: Path, plan: Path) -> tuple[int, float, float]:
    """(exit status, wall seconds, peak RSS in MB) of one ``supervisor check`` process."""
    t0 = time.perf_counter()
    proc = subprocess.Popen([str(exe), "check", str(plan), "--json"],
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.perf_counter() - t0
    proc.returncode = os.waitstatus_to_exitcode(status)
    return proc.returncode, wall, usage.ru_maxrss / 1024.0  # Linux: kilobytes


def main() -> int:
    exe = Path(sys.executable).with_name("supervisor")
    repeat = int(os.environ.get("BENCH_REPEAT", "1"))
    print(f"worst-case plans: supervisor check --json, {repeat} cold run(s) each, no warm-up; "
          f"targets < {TARGET_S:g} s and < {TARGET_MB:g} MB peak RSS")
    missed = []
    with tempfile.TemporaryDirectory() as tmp:
        for shape in SHAPES:
            plan = Path(tmp) / f"{shape}.toml"
            doc = worst_plan(shape)
            plan.write_text(tomli_w.dumps(doc), "utf-8")
            runs = [_run(exe, plan) for _ in range(repeat)]
            codes = {c for c, _, _ in runs}
            walls = [w for _, w, _ in runs]
            rss = max(m for _, _, m in runs)
            med, low = statistics.median(walls), min(walls)
            ok = med < TARGET_S and rss < TARGET_MB and codes <= {0, 1, 2}
            if shape in REFUSED:
                ok = ok and codes == {2}
            print(f"  {shape:<22} {len(doc['dives']):>3} dives  exit {sorted(codes)}  "
                  f"median {med:6.1f} s (min {low:.1f}; target < {TARGET_S:g})  "
                  f"peak {rss:6.0f} MB (target < {TARGET_MB:g})  {'ok' if ok else 'MISSED'}")
            if not ok:
                missed.append(shape)
    if missed:
        print("missed: " + ", ".join(missed))
        return 1
    print("all worst-case plans within the targets")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
