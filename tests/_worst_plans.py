"""The worst plans a valid plan file can be: shapes that made the check run for minutes.

Issue 12 (bounded work) names them: many back-to-back decompression dives for one
diver, very deep dives (140 msw) repeated, an ascent far slower than any procedure.
Each shape is built from the invented harbour example (``examples/harbour-job-msw.toml``:
fictional people and site) with a fixed seed, at the extremes the plan validator
still accepts (or just past them, where it must refuse with exit 2).

Used by ``tests/test_worst_plans.py`` (few dives per shape, so the suite stays fast)
and by ``bench/bench_worst.py`` (the full size, timed, with peak memory).
"""

from __future__ import annotations

import copy
import random
import tomllib
from pathlib import Path
from typing import Any

from supervisor.plan_fields import MAX_DIVES, MAX_STOP_MIN, MAX_TOTAL_STOP_MIN, rate_range

ROOT = Path(__file__).resolve().parent.parent
BASE = ROOT / "examples" / "harbour-job-msw.toml"

SHAPES = ("back-to-back-deco", "deep-repeated", "slowest-rates", "longest-stops",
          "surface-decompression", "finest-grid", "slower-than-allowed")


def _base() -> dict[str, Any]:
    doc = tomllib.loads(BASE.read_text("utf-8"))
    doc["chamber"] = {"on_site": True, "ready": True, "depth_capability": 50.0}
    doc["team"].append({"name": "Ines Mardy", "role": ["chamber-operator", "tender"],
                        "first_aid_cpr": True, "physics_physiology": True})
    for name in DIVERS[2:]:
        doc["team"].append({"name": name, "role": "diver", "first_aid_cpr": True,
                            "physics_physiology": True})
    return doc


#: Divers of the worst plans (invented): one for back-to-back dives, four in turn for the
#: shapes whose dives are long, so that each diver's timeline stays within 30 days.
DIVERS = ("Oskar Vale", "Wren Castellan", "Pell Arden", "Suvi Lorne")


def _dive(i: int, depth: float, bt: float, stops: list[tuple[float, float, str]],
          prev: str | None, si: float | None, diver: str, **kw: Any) -> dict[str, Any]:
    d: dict[str, Any] = {
        "id": f"W{i}", "diver": diver, "mode": "surface-supplied-air", "gas": "air",
        "max_depth": depth, "bottom_time_min": bt,
        "decompression": "in-water" if stops else "none", "line_tended": True,
        "standby_diver": "Dmitri Holt", "tender": "Lucía Ferro",
        "stops": [{"depth": a, "minutes": b, "place": p} for a, b, p in stops],
    }
    if prev is not None:
        d["previous_dive"], d["surface_interval_min"] = prev, si
    d.update(kw)
    return d


def worst_plan(shape: str, n_dives: int = MAX_DIVES, seed: int = 13) -> dict[str, Any]:
    """One worst plan of ``shape`` with ``n_dives`` dives (a fixed seed: reproducible).

    Parameters
    ----------
    shape : str
        One of :data:`SHAPES`.
    n_dives : int
        Dives in the plan [count]; the validator's cap by default.
    seed : int
        Seed of the random depths, times and intervals.

    Returns
    -------
    dict
        The plan document (``slower-than-allowed`` is just past the accepted range).
    """
    rng = random.Random(f"{shape}-{seed}")
    doc = _base()
    slow, _ = rate_range("msw")
    dives = []
    last: dict[str, str] = {}
    for i in range(n_dives):
        diver = DIVERS[0] if shape in ("back-to-back-deco", "longest-stops") else \
            DIVERS[i % len(DIVERS)]
        prev = last.get(diver)
        kw: dict[str, Any] = {}
        if shape == "back-to-back-deco":
            depth, bt = rng.choice([36, 42, 48, 54]), rng.choice([40, 50, 60])
            stops = [(9.0, 5, "water"), (6.0, 10, "water"), (3.0, rng.choice([20, 40]), "water")]
            si = rng.choice([0, 5, 10])
        elif shape == "deep-repeated":
            depth, bt = 140.0, rng.choice([20, 30, 40])
            stops = [(30.0, 10, "water"), (21.0, 20, "water"), (12.0, 60, "water"),
                     (3.0, 200, "water")]
            si = rng.choice([10, 30, 60])
        elif shape == "slowest-rates":
            depth, bt = rng.choice([30, 45]), 200
            stops = [(6.0, 10, "water"), (3.0, 30, "water")]
            si = 0
            kw = {"descent_rate": slow, "ascent_rate": slow}
        elif shape == "longest-stops":
            depth, bt = 60.0, 120
            half = MAX_TOTAL_STOP_MIN / 2
            stops = [(6.0, min(half, MAX_STOP_MIN), "water"), (3.0, half, "water")]
            si = 0
        elif shape == "surface-decompression":
            depth, bt = rng.choice([40, 45, 50]), rng.choice([40, 60, 80])
            stops = [(12.0, 5, "water"), (15.0, 30, "chamber"), (12.0, 30, "chamber")]
            si = rng.choice([0, 30])
            kw = {"decompression": "surface-oxygen", "surface_transfer_min": 3.0}
            stops = [(a, b, p) for a, b, p in stops]
        elif shape == "finest-grid":
            depth, bt = 90.0, 60
            stops = [(3.0 * k, 5, "water") for k in range(20, 0, -1)]
            si = 5
        elif shape == "slower-than-allowed":
            depth, bt = 30.0, 40
            stops = [(3.0, 20, "water")]
            si = 0
            kw = {"ascent_rate": 0.0001}  # reproducer: 2.8 GB and 120 s before the ranges
        else:
            raise ValueError(f"unknown shape {shape!r}; expected one of {', '.join(SHAPES)}")
        d = _dive(i, float(depth), float(bt), stops, prev, float(si) if prev else None, diver,
                  **kw)
        if shape == "surface-decompression":
            for s in d["stops"]:
                if s["place"] == "chamber":
                    s["gas"] = "oxygen"
        dives.append(d)
        last[diver] = d["id"]
    doc["dives"] = dives
    if shape == "finest-grid":
        doc["policy"]["stop_step"] = 0.3
        doc["policy"]["last_stop"] = 3.0
    return copy.deepcopy(doc)
