"""``supervisor check`` on the demo job against a bare interpreter start with the same imports.

Target (issue: the rules layer): the check itself adds less than 0.5 s to starting
Python and importing what the command imports, so it feels instant.  Both are run
as subprocesses, several times, and the best times are compared.
Run: ``.venv/bin/python bench/bench_check.py``.
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PLANS = ["examples/demo-job.toml", "examples/demo-job-msw.toml"]
IMPORTS = (
    "import supervisor.cli, supervisor.check, supervisor.plan, supervisor.rules, "
    "supervisor.engine.schedule, supervisor.engine.oxygen, supervisor.references"
)


def best(cmd: list[str], repeat: int = 7) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        proc = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True, check=False)
        times.append(time.perf_counter() - t0)
        if proc.returncode not in (0, 1):
            raise SystemExit(f"{' '.join(cmd)} failed: {proc.stderr.strip()}")
    return min(times)


def main() -> None:
    bare = best([sys.executable, "-c", IMPORTS])
    print(f"bare interpreter with the command's imports: {bare:.3f} s")
    for plan in PLANS:
        if not (ROOT / plan).exists():
            continue
        t = best([sys.executable, "-m", "supervisor", "check", plan, "--json"])
        extra = t - bare
        flag = "ok" if extra < 0.5 else "OVER TARGET"
        print(f"supervisor check {plan}: {t:.3f} s -> extra {extra:.3f} s "
              f"(target < 0.5 s: {flag}; ratio {t / bare:.2f}x the bare start)")


if __name__ == "__main__":
    main()
