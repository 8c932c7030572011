"""``supervisor checklist`` (PDF and JSON record, unsigned) on the invented multi-day job.

The job is written by :mod:`weekjob` at 10, 50 and 200 dives.  Each run writes a
fresh output folder.  Peak memory is the largest resident set of the checklist
process (``getrusage`` of a wrapper whose only child it is).

Targets (checklist): under 4 s on the 50-dive job; at most linear in the dives
(the marginal cost per dive from 50 to 200 dives at most 1.5 times that from 10 to
50); peak memory at 200 dives under 250 MB.  Run:
``.venv/bin/python bench/bench_checklist.py``.
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from _common import ROOT, Report, run_command, user_env  # noqa: E402
from weekjob import write_plan  # noqa: E402

SIZES = (10, 50, 200)
REPEAT, WARMUP = 3, 1
#: the 200-dive checklist takes tens of seconds: one run, no warm-up
REPEAT_200, WARMUP_200 = 1, 0
_PEAK = """
import resource, subprocess, sys
subprocess.run(sys.argv[1:], capture_output=True, check=False)
print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)
"""


def main() -> int:
    rep = Report("bench_checklist")
    rep.start("supervisor checklist on the invented multi-day job (unsigned)", WARMUP, REPEAT)
    print(f"   200 dives: warm-up {WARMUP_200}, repetitions {REPEAT_200}")
    env = user_env()
    times: dict[int, float] = {}
    with tempfile.TemporaryDirectory() as d:
        tmp = Path(d)
        for n in SIZES:
            plan = write_plan(n, tmp / f"week-{n}.toml")
            cmd = [sys.executable, "-m", "supervisor", "checklist", str(plan), "--out",
                   str(tmp / f"out-{n}")]
            big = n >= 200
            t = run_command(cmd, env, REPEAT_200 if big else REPEAT,
                            WARMUP_200 if big else WARMUP)
            times[n] = t.min
            print(f"checklist {n:3d} dives  {t.fmt(1, 's', 6)}  per dive {1e3 * t.min / n:6.1f} ms")
        out = subprocess.run([sys.executable, "-c", _PEAK, *cmd], cwd=ROOT, env=env,
                             capture_output=True, text=True, check=True)
        peak_mb = int(out.stdout.split()[-1]) / 1024  # ru_maxrss is in KiB on Linux
    rep.target("checklist, 50 dives", times[50], "<", 4.0, ".2f", "s")
    m1 = (times[50] - times[10]) / 40
    m2 = (times[200] - times[50]) / 150
    print(f"  marginal cost per dive: 10->50 dives {1e3 * m1:.1f} ms, 50->200 dives "
          f"{1e3 * m2:.1f} ms")
    if m1 <= 0:
        print("  the 10->50 cost is not positive: too noisy to judge (counted as a miss)")
        rep.missed.append("checklist: linearity not measurable")
    else:
        rep.target("checklist: marginal cost per dive 50->200 / 10->50", m2 / m1, "<=", 1.5,
                   ".2f", "x")
    rep.target("checklist, 200 dives: peak memory", peak_mb, "<", 250.0, ".0f", "MB")
    print("times are minima over the repetitions")
    return rep.finish()


if __name__ == "__main__":
    raise SystemExit(main())
