"""Invented executed dives for the audit tests, built with numpy.

The plan is the invented demo job (``examples/demo-job.toml``): D1 50 fsw for
45 min without stops, D2 110 fsw for 40 min with water stops at 50 and 40 fsw
and surface decompression (chamber oxygen at 50 and 40 fsw), D3 40 fsw for
30 min after D1.  Profiles are straight lines between knots, sampled like a
recorder (every second unless told), or taken at the knots like a timed log.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from supervisor.audit import Executed, Item, from_samples
from supervisor.audit.run import PlanAudit
from supervisor.gas import AIR, OXYGEN, Gas

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "examples" / "demo-job.toml"

Knot = tuple[float, float]  # minutes, fsw


def d1(bt: float = 45.0, depth: float = 50.0, ascent: float = 30.0, descent: float = 50.0
       ) -> list[Knot]:
    """Knots of a D1-like no-stop dive, one minute at the surface either side."""
    t_down = depth / descent
    t_up = depth / ascent
    return [(0.0, 0.0), (1.0, 0.0), (1.0 + t_down, depth), (1.0 + bt, depth),
            (1.0 + bt + t_up, 0.0), (2.0 + bt + t_up, 0.0)]


def d2_water(stop60: float = 1.0, stop40: float = 3.0, bt: float = 40.0,
             depth: float = 110.0) -> list[Knot]:
    """Knots of D2 in the water: descent at 75, ascent at 30 fsw/min, the two water stops
    (60 fsw 1 min and 40 fsw 3 min, as approved)."""
    k = [(0.0, 0.0), (depth / 75.0, depth), (bt, depth)]
    t = bt + (depth - 60.0) / 30.0
    k.append((t, 60.0))
    if stop60 > 0:
        t += stop60
        k.append((t, 60.0))
    t += 20.0 / 30.0
    k.append((t, 40.0))
    if stop40 > 0:
        t += stop40
        k.append((t, 40.0))
    t += 40.0 / 30.0
    k.append((t, 0.0))
    return k


def chamber(start: float, deck: float = 1.5, o2_50: float = 15.0, o2_40: float = 15.0
            ) -> tuple[list[Knot], list[tuple[float, float]]]:
    """Knots after surfacing (deck, compression to 50, oxygen at 50 and 40) and O2 spans."""
    t = start + deck
    k = [(t, 0.0), (t + 0.5, 50.0)]
    t += 0.5
    spans = [(t, t + o2_50)]
    t += o2_50
    k.append((t, 50.0))
    t += 1.0 / 3.0
    k.append((t, 40.0))
    spans.append((t, t + o2_40))
    t += o2_40
    k += [(t, 40.0), (t + 40.0 / 30.0, 0.0), (t + 40.0 / 30.0 + 1.0, 0.0)]
    return k, spans


def sampled(knots: Sequence[Knot], every_s: float = 1.0) -> tuple[np.ndarray, np.ndarray]:
    """The knots sampled every ``every_s`` seconds (the last knot always included)."""
    kt = np.array([k[0] for k in knots])
    kd = np.array([k[1] for k in knots])
    t = np.arange(kt[0], kt[-1], every_s / 60.0)
    t = np.append(t, kt[-1]) if kt[-1] - t[-1] > 1e-9 else t
    return t, np.interp(t, kt, kd)


def gases(t: np.ndarray, oxygen: Sequence[tuple[float, float]] = ()) -> list[Gas]:
    """Air, or oxygen inside the given spans [min], per interval of ``t``."""
    mid = 0.5 * (t[:-1] + t[1:])
    on = np.zeros(mid.size, dtype=bool)
    for a, b in oxygen:
        on |= (mid >= a) & (mid <= b)
    return [OXYGEN if x else AIR for x in on]


def executed(pa: PlanAudit, dive: str, knots: Sequence[Knot], *, every_s: float | None = 1.0,
             oxygen: Sequence[tuple[float, float]] = (), **kw: Any) -> Executed:
    """An executed profile of ``knots`` for ``dive`` of the plan (sampled, or at the knots)."""
    if every_s is None:
        t = np.array([k[0] for k in knots])
        d = np.array([k[1] for k in knots])
        keep = np.concatenate([[True], np.diff(t) > 1e-12])
        t, d = t[keep], d[keep]
    else:
        t, d = sampled(knots, every_s)
    dv = pa.plan.dive(dive)
    ws, cs = dv.water_stops, dv.chamber_stops
    return from_samples(t, d, gases(t, oxygen), unit=pa.unit, chamber_after_surfacing=bool(cs),
                        last_water_stop=ws[-1].depth if ws else None,
                        chamber_depth=cs[0].depth if cs else None,
                        step=float(pa.policy.stop_step), **kw)


def item(pa: PlanAudit, dive: str, ex: Executed, diver: str | None = None,
         issues: list[dict[str, Any]] | None = None) -> Item:
    """An audit item with a log description as the importers give it."""
    meta = {"diver": diver if diver is not None else pa.plan.dive(dive).diver}
    return Item(dive, ex, {"source": {"file": f"{dive}-test.csv", "format": "csv",
                                      "sha256": "0" * 64, "bytes": 0},
                           "meta": meta, "issues": issues or []})


def d2_full(pa: PlanAudit, stop40: float = 3.0, deck: float = 1.5, **kw: Any) -> Executed:
    """D2 executed with its water stops and chamber, recorder-sampled."""
    water = d2_water(stop40=stop40)
    after, spans = chamber(water[-1][0], deck=deck)
    return executed(pa, "D2", water + after, oxygen=spans, **kw)
