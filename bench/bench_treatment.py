"""``supervisor treatment plan`` against a bare interpreter start with the same imports.

Target (issue 11): a treatment plan is computed in under 0.2 s over starting Python and
importing what the command imports.  Both are run as subprocesses, several times, and
the best times are compared; the script exits with status 1 when a case misses the
target.  Run: ``.venv/bin/python bench/bench_treatment.py``.
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
TARGET_S = 0.2
#: Lists the package modules a command imports, run in one process (the bare start then
#: imports exactly those, and with them every library they need).
_MODULES = (
    "import sys, contextlib, io\n"
    "from supervisor.cli import main\n"
    "with contextlib.redirect_stdout(io.StringIO()), contextlib.suppress(SystemExit):\n"
    "    main(sys.argv[1:])\n"
    "print(' '.join(sorted(m for m in sys.modules if m.split('.')[0] == 'supervisor')))\n"
)
CASES = {
    "Table 6, no job plan": ["treatment", "plan", "6", "--start", "21:40", "--json"],
    "Table 6 with every extension, the demo job's chamber, a recent dive": [
        "treatment", "plan", "6", "--start", "21:40", "--extend-oxygen", "2", "--extend-air",
        "2", "--plan", "examples/demo-job.toml", "--attendant-recent-dive",
        "depth=50,bottom=30,since=4:30", "--json"],
    "Table 6A": ["treatment", "plan", "6A", "--start", "03:00", "--json"],
}


def _time(cmd: list[str]) -> float:
    t0 = time.perf_counter()
    proc = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True, check=False)
    elapsed = time.perf_counter() - t0
    if proc.returncode not in (0, 1):
        raise SystemExit(f"{' '.join(cmd)} failed: {proc.stderr.strip()}")
    return elapsed


def main(repeat: int = 9) -> int:
    """Time each case and its own bare start in turn, ``repeat`` rounds; compare the best times.

    Each case's bare start imports exactly the package modules that case imports.
    Interleaving the runs keeps a busy machine's slow spells from landing on one side only.
    """
    bare_cmds, cmds = {}, {}
    for name, args in CASES.items():
        out = subprocess.run([sys.executable, "-c", _MODULES, *args], cwd=ROOT,
                             capture_output=True, text=True, check=True).stdout
        bare_cmds[name] = [sys.executable, "-c", "import " + ", ".join(sorted(out.split()))]
        cmds[name] = [sys.executable, "-m", "supervisor", *args]
    bare = dict.fromkeys(cmds, float("inf"))
    best = dict.fromkeys(cmds, float("inf"))
    for _ in range(repeat):
        for name in cmds:
            bare[name] = min(bare[name], _time(bare_cmds[name]))
            best[name] = min(best[name], _time(cmds[name]))
    missed = 0
    for name, t in best.items():
        extra = t - bare[name]
        ok = extra < TARGET_S
        missed += not ok
        print(f"{name}: {t:.3f} s against a bare start with its imports {bare[name]:.3f} s "
              f"(best of {repeat}) -> extra {extra:.3f} s (target < {TARGET_S} s: "
              f"{'ok' if ok else 'MISSED'}; ratio {t / bare[name]:.2f}x)")
    return 1 if missed else 0


if __name__ == "__main__":
    raise SystemExit(main())
