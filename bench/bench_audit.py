"""Audit throughput: 1,000 one-hour logs sampled every second, and 10x the samples.

Work: invented recorder logs of the demo job's no-stop dive D1 (``examples/demo-job.toml``):
each one hour long, sampled every second (3,601 samples), with a random maximum depth
(44-50 fsw), bottom time (35-45 min), ascent rate (30 fsw/min, one log in three at
60 fsw/min) and recorder noise (0.1 fsw).  The plan is read once
(:func:`supervisor.audit.prepare`, not timed); what is timed is the library's audit of
every log: the executed profile from the samples (:func:`supervisor.audit.from_samples`),
:func:`supervisor.audit.audit_many` (required schedules, the model, oxygen, every rule)
and each result's ``supervisor.audit/1`` object.  The command line is not timed per log
(reading a CSV is the importer's work, one Python step per line).

Scaling: 100 of the logs at one sample a second, against the same 100 sampled ten times
a second (36,001 samples each), in the same run: the time ratio against the sample ratio
(10x).

Targets: 1,000 logs in under 10 s; 10x the samples at most 11x the time.
Run: ``.venv/bin/python bench/bench_audit.py``.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

sys.path.insert(0, str(Path(__file__).resolve().parent))

from _common import ROOT, Report, measure  # noqa: E402

from supervisor.audit import Item, audit_many, from_samples, prepare  # noqa: E402

PLAN = ROOT / "examples" / "demo-job.toml"
LOGS = 1000
SCALE_LOGS = 100
REPEAT, WARMUP = 3, 1

Log = tuple[NDArray[np.float64], NDArray[np.float64]]


def logs(n: int, per_second: float, seed: int = 1) -> list[Log]:
    """``n`` invented one-hour D1 logs sampled ``per_second`` times a second (module notes)."""
    rng = np.random.default_rng(seed)
    out = []
    t = np.arange(int(3600 * per_second) + 1) / (60.0 * per_second)
    for _ in range(n):
        depth = rng.uniform(44.0, 50.0)
        bt = rng.uniform(35.0, 45.0)
        up = 60.0 if rng.random() < 1 / 3 else 30.0
        kt = [0.0, 1.0, 1.0 + depth / 50.0, 1.0 + bt, 1.0 + bt + depth / up, 60.0]
        d = np.interp(t, kt, [0.0, 0.0, depth, depth, 0.0, 0.0])
        out.append((t, np.clip(d + rng.normal(0.0, 0.1, t.size), 0.0, None)))
    return out


def audit(pa, work: list[Log]) -> list[dict]:
    """The library's audit of every log, to the JSON object of each."""
    items = [Item("D1", from_samples(t, d, "air", unit=pa.unit),
                  {"source": {"file": f"D1-{k}.csv", "format": "csv"}, "meta": {},
                   "issues": []})
             for k, (t, d) in enumerate(work)]
    return [r.to_json() for r in audit_many(pa, items)]


def main() -> int:
    rep = Report("bench_audit")
    rep.start(f"{LOGS} one-hour logs at 1 Hz; {SCALE_LOGS} logs at 1 Hz and 10 Hz",
              WARMUP, REPEAT)
    pa = prepare(PLAN)
    work = logs(LOGS, 1.0)
    result = audit(pa, work[:100])
    verdicts = {v: sum(r["verdict"] == v for r in result) for v in
                ("conforms", "needs-review", "does-not-conform")}
    print(f"   verdicts of the first 100 logs: {verdicts}; findings per log "
          f"{len(result[0]['findings'])}")
    big = measure(lambda: audit(pa, work), REPEAT, WARMUP)
    print(f"   {LOGS} logs x 3,601 samples: {big.fmt(1.0, 's')}; per log "
          f"{big.min / LOGS * 1e3:.2f} ms")
    small = logs(SCALE_LOGS, 1.0, seed=2)
    dense = logs(SCALE_LOGS, 10.0, seed=2)
    t1 = measure(lambda: audit(pa, small), REPEAT, WARMUP)
    t10 = measure(lambda: audit(pa, dense), REPEAT, WARMUP)
    ratio = t10.min / t1.min
    print(f"   {SCALE_LOGS} logs x 3,601 samples: {t1.fmt(1.0, 's')}")
    print(f"   {SCALE_LOGS} logs x 36,001 samples: {t10.fmt(1.0, 's')}")
    print(f"   time ratio for 10x the samples: {ratio:.2f}x; 1,000-log time against the "
          f"10 s target: {big.min / 10.0:.2f}")
    rep.target(f"{LOGS} one-hour logs at 1 Hz audited", big.min, "<", 10.0, unit="s")
    rep.target("time for 10x the samples (ratio)", ratio, "<=", 11.0, unit="x")
    return rep.finish()


if __name__ == "__main__":
    raise SystemExit(main())
