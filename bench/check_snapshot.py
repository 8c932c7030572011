"""Save or compare the check JSON of every example and of the bench job, for speed work.

A change that only makes the check faster must leave its answer alone.  Save the
``supervisor.check/1`` objects before the change, compare after it:

    .venv/bin/python bench/check_snapshot.py save out/snap-before
    .venv/bin/python bench/check_snapshot.py compare out/snap-before

Covered: every plan in ``examples/`` and the bench job (:mod:`weekjob`) at 10 and 50
dives.  The time stamp is fixed; everything else must match exactly (floats
included).  ``compare`` prints the first differing key of each plan and exits 1
when any plan differs.
"""

from __future__ import annotations

import datetime as dt
import json
import sys
import tempfile
import tomllib
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from weekjob import write_plan  # noqa: E402

from supervisor.check import run_check  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
NOW = dt.datetime(2026, 1, 1, tzinfo=dt.UTC)


def _plans(tmp: Path) -> dict[str, Path]:
    plans = {p.stem: p for p in sorted((ROOT / "examples").glob("*.toml"))
             if tomllib.loads(p.read_text(encoding="utf-8")).get("schema") == "supervisor-plan/1"}
    for n in (10, 50):
        plans[f"weekjob-{n}"] = write_plan(n, tmp / f"weekjob-{n}.toml")
    return plans


def _result(path: Path, name: str) -> dict:
    res = run_check(path, now=NOW)
    res["plan_path"] = name  # the bench job is written to a temporary directory
    return res


def _first_difference(a, b, where: str = "") -> str | None:
    if type(a) is not type(b):
        return f"{where}: {type(a).__name__} != {type(b).__name__}"
    if isinstance(a, dict):
        for k in sorted(set(a) | set(b)):
            if k not in a or k not in b:
                return f"{where}.{k}: present on one side only"
            d = _first_difference(a[k], b[k], f"{where}.{k}")
            if d:
                return d
        return None
    if isinstance(a, list):
        if len(a) != len(b):
            return f"{where}: {len(a)} != {len(b)} items"
        for i, (x, y) in enumerate(zip(a, b, strict=True)):
            d = _first_difference(x, y, f"{where}[{i}]")
            if d:
                return d
        return None
    return None if a == b else f"{where}: {a!r} != {b!r}"


def main(argv: list[str]) -> int:
    if len(argv) != 2 or argv[0] not in ("save", "compare"):
        print(__doc__)
        return 2
    mode, folder = argv[0], Path(argv[1])
    with tempfile.TemporaryDirectory() as tmp:
        plans = _plans(Path(tmp))
        bad = 0
        folder.mkdir(parents=True, exist_ok=True)
        for name, path in plans.items():
            res = _result(path, name)
            f = folder / f"{name}.json"
            if mode == "save":
                f.write_text(json.dumps(res, indent=1, sort_keys=True), encoding="utf-8")
                print(f"saved {f.name}: {len(res['findings'])} findings")
                continue
            old = json.loads(f.read_text(encoding="utf-8"))
            new = json.loads(json.dumps(res))
            diff = _first_difference(old, new)
            print(f"{name}: {'identical' if diff is None else 'DIFFERS at ' + diff}")
            bad += diff is not None
    return 1 if bad else 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
