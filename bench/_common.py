"""Shared helpers of the benchmarks: timing with stated warm-up and repetitions, targets.

Every benchmark prints its warm-up and repetitions, the median and minimum of each
measurement, the machine's load before and after (the benchmarks share the
machine with whatever else runs), and one line per target:

    TARGET  <what>: <value> (target <op> <limit>)  ok | MISSED

:func:`Report.finish` returns the exit status: 1 when any target was missed, so
``make bench`` fails on a missed target.  Commands run as subprocesses use the
package's cached bytecode, as a user's installed copy does: :func:`user_env`
compiles the package once and drops ``PYTHONDONTWRITEBYTECODE`` from the
environment.
"""

from __future__ import annotations

import compileall
import os
import statistics
import subprocess
import sys
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


@dataclass
class Timing:
    """Wall-clock times of repeated runs [s] and the warm-up runs left out."""

    times: list[float]
    warmup: int

    @property
    def median(self) -> float:
        """Median time [s]."""
        return statistics.median(self.times)

    @property
    def min(self) -> float:
        """Shortest time [s]."""
        return min(self.times)

    def fmt(self, scale: float = 1e3, unit: str = "ms", width: int = 9) -> str:
        """``median X ms, min Y ms`` with the given scale."""
        return (f"median {self.median * scale:{width}.2f} {unit}, "
                f"min {self.min * scale:{width}.2f} {unit}")


def measure(fn: Callable[[], object], repeat: int = 5, warmup: int = 1) -> Timing:
    """Time ``fn()``: ``warmup`` untimed calls, then ``repeat`` timed ones."""
    for _ in range(warmup):
        fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return Timing(times, warmup)


def user_env() -> dict[str, str]:
    """Environment for timed subprocesses, after compiling the package's bytecode once."""
    compileall.compile_dir(str(ROOT / "supervisor"), quiet=1)
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    return env


def run_command(
    cmd: Sequence[str], env: dict[str, str], repeat: int = 5, warmup: int = 1,
    ok_codes: tuple[int, ...] = (0, 1),
) -> Timing:
    """Time a command as a subprocess (output captured); fail on an unexpected exit status."""

    def once() -> None:
        proc = subprocess.run(list(cmd), cwd=ROOT, env=env, capture_output=True, text=True,
                              check=False)
        if proc.returncode not in ok_codes:
            raise SystemExit(f"{' '.join(cmd)} exited {proc.returncode}: {proc.stderr.strip()}")

    return measure(once, repeat, warmup)


def load() -> str:
    """The machine's load averages and core count, for the record."""
    try:
        a, b, c = os.getloadavg()
    except OSError:
        return "load: unknown"
    return f"load average {a:.2f} {b:.2f} {c:.2f} on {os.cpu_count()} cores"


@dataclass
class Report:
    """Targets of one benchmark and whether each was met."""

    name: str
    missed: list[str] = field(default_factory=list)

    def start(self, what: str, warmup: int, repeat: int) -> None:
        """Print the benchmark's heading, its warm-up and repetitions and the load."""
        print(f"== {self.name}: {what}")
        print(f"   warm-up {warmup}, repetitions {repeat} (median and minimum shown); "
              f"{load()}; Python {sys.version.split()[0]}")

    def target(self, what: str, value: float, op: str, limit: float, fmt: str = ".2f",
               unit: str = "") -> bool:
        """Print one target line; remember a miss.  ``op`` is ``<=``, ``<``, ``>=`` or ``>``."""
        ok = {"<=": value <= limit, "<": value < limit, ">=": value >= limit,
              ">": value > limit}[op]
        u = f" {unit}" if unit else ""
        print(f"TARGET  {what}: {value:{fmt}}{u} (target {op} {limit:{fmt}}{u})  "
              f"{'ok' if ok else 'MISSED'}")
        if not ok:
            self.missed.append(what)
        return ok

    def finish(self) -> int:
        """Print the summary and the load; return the exit status (1 if a target was missed)."""
        print(f"   {load()} at the end")
        if self.missed:
            print(f"{self.name}: {len(self.missed)} target(s) missed: {'; '.join(self.missed)}")
            return 1
        print(f"{self.name}: every target met")
        return 0
