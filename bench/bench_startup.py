"""Start-up: ``supervisor --help`` and ``supervisor schedule`` against a bare interpreter.

The reference is ``python -c "import typer, numpy"``: the two libraries every
command needs.  The difference is what the command adds at start-up (its own
imports and command registration) plus, for ``schedule``, one schedule.  All run as
subprocesses with cached bytecode.

Target (start-up): each within 0.15 s of the bare start.  The package imports
check, plan, analysis and rules for every command today; lazy command
registration is planned with the package redesign, so this target is expected to
be missed until then.  Run: ``.venv/bin/python bench/bench_startup.py``.
"""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from _common import Report, run_command, user_env  # noqa: E402

REPEAT, WARMUP = 7, 1
COMMANDS = {
    "supervisor --help": ["--help"],
    "supervisor schedule (100 fsw, 30 min)": ["schedule", "--depth", "100", "--bottom-time", "30"],
}


def main() -> int:
    rep = Report("bench_startup")
    rep.start("command start-up against a bare 'import typer, numpy'", WARMUP, REPEAT)
    env = user_env()
    bare = run_command([sys.executable, "-c", "import typer, numpy"], env, REPEAT, WARMUP,
                       ok_codes=(0,))
    print(f"bare 'import typer, numpy'         {bare.fmt(1, 's', 6)}")
    for name, args in COMMANDS.items():
        t = run_command([sys.executable, "-m", "supervisor", *args], env, REPEAT, WARMUP,
                        ok_codes=(0,))
        print(f"{name:34s} {t.fmt(1, 's', 6)}")
        rep.target(f"{name}: extra over the bare start", t.min - bare.min, "<=", 0.15, ".3f",
                   "s")
    print("times are minima over the repetitions")
    return rep.finish()


if __name__ == "__main__":
    raise SystemExit(main())
