"""``supervisor check`` on an invented multi-day job, against a bare interpreter start.

The job is written by :mod:`weekjob` (6 divers, repetitive dives, one surface
decompression a day): 50 dives is the working week of the target; 1, 10, 50 and
200 dives show how the cost grows.  The reference is a bare interpreter that
imports exactly the modules the check command has loaded when it ends (listed by
running the command once), so the difference is the check's own work: reading the
plan and tables, the analysis, the rules and the output.  Both run as
subprocesses with cached bytecode.

Targets (check speed): on the 50-dive job the check adds under 1.0 s to the bare
start, with the findings table (the default) and with ``--json``; the cost per
added dive stays flat: the marginal cost per dive from 50 to 200 dives is at most
1.5 times that from 10 to 50 dives.  Run: ``.venv/bin/python bench/bench_check.py``.
"""

from __future__ import annotations

import json
import subprocess
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from _common import ROOT, Report, run_command, user_env  # noqa: E402
from weekjob import write_plan  # noqa: E402

SIZES = (1, 10, 50, 200)
REPEAT, WARMUP = 5, 1
REPEAT_200 = 3  # the 200-dive runs take seconds each
_LIST_MODULES = """
import atexit, json, sys
out = sys.argv.pop(1)
atexit.register(lambda: open(out, "w").write(json.dumps(sorted(sys.modules))))
sys.argv[0] = "supervisor"
from supervisor.cli import main
main()
"""


def loaded_modules(cmd_args: list[str], env: dict[str, str], tmp: Path) -> list[str]:
    """Modules loaded when ``supervisor <cmd_args>`` ends (run once)."""
    out = tmp / "modules.json"
    subprocess.run([sys.executable, "-c", _LIST_MODULES, str(out), *cmd_args], cwd=ROOT,
                   env=env, capture_output=True, check=False)
    return [m for m in json.loads(out.read_text()) if m != "__main__"]


def bare_command(modules: list[str]) -> list[str]:
    """A bare interpreter importing ``modules`` (those importable on their own)."""
    code = (f"import importlib\nfor m in {modules!r}:\n    try:\n"
            "        importlib.import_module(m)\n    except Exception:\n        pass\n")
    return [sys.executable, "-c", code]


def main() -> int:
    rep = Report("bench_check")
    rep.start("supervisor check on the invented multi-day job (bench/weekjob.py)", WARMUP,
              REPEAT)
    print(f"   200-dive runs: repetitions {REPEAT_200}")
    env = user_env()
    with tempfile.TemporaryDirectory() as d:
        tmp = Path(d)
        plans = {n: write_plan(n, tmp / f"week-{n}.toml") for n in SIZES}
        mods = loaded_modules(["check", str(plans[50]), "--json"], env, tmp)
        bare = run_command(bare_command(mods), env, REPEAT, WARMUP, ok_codes=(0,))
        print(f"bare interpreter importing the check's {len(mods)} modules: {bare.fmt(1, 's', 6)}")
        times: dict[tuple[int, str], float] = {}
        for n in SIZES:
            for flag in ("", "--json"):
                cmd = [sys.executable, "-m", "supervisor", "check", str(plans[n])]
                cmd += [flag] if flag else []
                t = run_command(cmd, env, REPEAT_200 if n >= 200 else REPEAT, WARMUP)
                times[n, flag] = t.min
                extra = t.min - bare.min
                print(f"check {n:3d} dives {flag or '(table)':8s} {t.fmt(1, 's', 6)}  "
                      f"extra {extra:6.3f} s  per dive {1e3 * extra / n:7.1f} ms")
        # the bundled demo job (three dives, one surface decompression): issue 8's figure
        demo = ROOT / "examples" / "demo-job.toml"
        demo_mods = loaded_modules(["check", str(demo)], env, tmp)
        demo_bare = run_command(bare_command(demo_mods), env, REPEAT, WARMUP, ok_codes=(0,))
        demo_t = run_command([sys.executable, "-m", "supervisor", "check", str(demo)], env,
                             REPEAT, WARMUP)
        print(f"bare interpreter importing the demo check's {len(demo_mods)} modules: "
              f"{demo_bare.fmt(1, 's', 6)}")
        print(f"check examples/demo-job.toml     {demo_t.fmt(1, 's', 6)}")
    rep.target("check, demo job: extra over a bare start with the same imports",
               demo_t.min - demo_bare.min, "<", 0.5, ".3f", "s")
    for flag in ("", "--json"):
        label = flag or "table"
        rep.target(f"check, 50 dives, {label}: extra over the bare start",
                   times[50, flag] - bare.min, "<", 1.0, ".3f", "s")
        m1 = (times[50, flag] - times[10, flag]) / 40
        m2 = (times[200, flag] - times[50, flag]) / 150
        print(f"  marginal cost per dive ({label}): 10->50 dives {1e3 * m1:.1f} ms, "
              f"50->200 dives {1e3 * m2:.1f} ms")
        if m1 <= 0:
            print("  the 10->50 cost is not positive: too noisy to judge flatness (counted as "
                  "a miss; run again on a quieter machine)")
            rep.missed.append(f"check, {label}: flatness not measurable")
            continue
        rep.target(f"check, {label}: marginal cost per dive 50->200 / 10->50", m2 / m1, "<=",
                   1.5, ".2f", "x")
    print("times are minima over the repetitions; extra = check - bare start")
    return rep.finish()


if __name__ == "__main__":
    raise SystemExit(main())
