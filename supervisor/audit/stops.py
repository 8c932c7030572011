"""Stops of the executed profile against the approved stops: omitted decompression.

A stop's time is the time the executed profile spends in the stop's *band*
after leaving the bottom, in the stop's place (water or chamber): from
:data:`STOP_SHALLOW_TOLERANCE_FSW` shallower than the stop depth to half the
policy's stop step deeper (own choice: the next stop deeper is a whole step
away, and a diver held a little deep is still at the stop; the Navy procedure
wants the diver's chest as close as possible to the stop depth, U.S. Navy
Diving Manual ch. 9, from memory).  The time is exact for the piecewise-linear
profile (the part of each segment inside the band), computed for every segment
and every stop at once.

Travel is not stop time (the approved stop minutes exclude it, as the plan's
profile does).  A timed log says which segments are stops (from arriving at a
stop to leaving it), so only those count.  A recorder log does not: the time it
takes to cross the band at the dive's ascent rate is taken off the band time, so
a stop cut short by about that travel is not hidden by it (the first chamber stop,
reached by compression from the surface, is crossed on its shallow side only).

A stop is *short* when its time is more than :data:`STOP_TIME_TOLERANCE_MIN`
under the approved minutes, and *missed* when the profile never enters its
band.  Either is omitted decompression against the approved plan: it fails,
with the governing procedure pointed to (never a remedy of this tool's own).
A chamber stop of a recorder log, whose chamber part is inferred
(:mod:`supervisor.audit.executed`), needs review instead.
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from supervisor.audit.context import FAMILY, OMITTED_DECOMPRESSION, AuditContext, with_action
from supervisor.audit.executed import Executed
from supervisor.findings import Finding
from supervisor.rules.base import Rule
from supervisor.units import convert_depth

#: A diver this much shallower than the stop depth is still at the stop [fsw]
#: (own choice: the resolution of a pneumofathometer reading).
STOP_SHALLOW_TOLERANCE_FSW = 1.0
#: ... and this share of the stop step deeper [-] (own choice; module notes).
STOP_DEEP_FRACTION = 0.5
#: A stop this much shorter than approved is not yet short [min] (own choice: 6 s,
#: the timing of a log kept to the second and a recorder's sampling).
STOP_TIME_TOLERANCE_MIN = 0.1


def band(depth: float, unit: str, step: float) -> tuple[float, float]:
    """The depth band of a stop [unit]: (shallowest, deepest) counted as at the stop."""
    shallow = float(convert_depth(STOP_SHALLOW_TOLERANCE_FSW, "fsw", unit))  # type: ignore[arg-type]
    return max(depth - shallow, 0.0), depth + STOP_DEEP_FRACTION * step


def time_in_bands(t: NDArray[np.float64], d: NDArray[np.float64], segments: NDArray[np.bool_],
                  lo: NDArray[np.float64], hi: NDArray[np.float64]) -> NDArray[np.float64]:
    """Minutes a piecewise-linear profile spends in each depth band, over chosen segments.

    Parameters
    ----------
    t, d : ndarray, shape (n + 1,)
        Knot times [min] and depths.
    segments : ndarray of bool, shape (n,)
        The segments that count.
    lo, hi : ndarray, shape (k,)
        The bands' shallow and deep edges.

    Returns
    -------
    ndarray, shape (k,)
        Minutes in each band [min].
    """
    m = np.diff(t)[:, None]
    a, b = d[:-1, None], d[1:, None]
    top, bottom = np.minimum(a, b), np.maximum(a, b)
    span = bottom - top
    level = span < 1e-12
    overlap = np.clip(np.minimum(bottom, hi[None, :]) - np.maximum(top, lo[None, :]), 0.0, None)
    inside_level = (top >= lo[None, :]) & (top <= hi[None, :])
    frac = np.where(level, inside_level, overlap / np.where(level, 1.0, span))
    return np.sum(m * frac * segments[:, None], axis=0)


@dataclass(frozen=True)
class StopTime:
    """One stop required of the dive against the time the executed profile spent there.

    Attributes
    ----------
    depth : float
        Stop depth [unit].
    place, gas : str
        Water or chamber; the gas the stop is on.
    required_min, measured_min : float
        Minutes required and spent in the band [min].
    lo, hi : float
        The band [unit].
    """

    depth: float
    place: str
    gas: str
    required_min: float
    measured_min: float
    lo: float
    hi: float

    @property
    def short(self) -> bool:
        """More than the tolerance under the required minutes."""
        return self.measured_min + STOP_TIME_TOLERANCE_MIN < self.required_min - 1e-9

    @property
    def missed(self) -> bool:
        """No time at the stop."""
        return self.measured_min <= 1e-9

    def where(self, unit: str) -> str:
        """``40 fsw water stop on air``."""
        return f"{self.depth:g} {unit} {self.place} stop on {self.gas}"

    def figures(self, unit: str) -> tuple[str, str]:
        """Measured and limit with their context (never a bare number of minutes)."""
        w = self.where(unit)
        have = "missed" if self.missed else f"{self.measured_min:.1f} min"
        return f"{w}: {have}", f"{w}: {self.required_min:g} min"

    def to_json(self) -> dict[str, object]:
        """JSON-ready figures."""
        return {"depth": self.depth, "place": self.place, "gas": self.gas,
                "required_min": self.required_min, "measured_min": round(self.measured_min, 2),
                "band": [round(self.lo, 2), round(self.hi, 2)], "short": self.short}


Spec = tuple[float, str, str, float]  # depth, place, gas, minutes


def measure(ex: Executed, stops: Sequence[Spec], step: float, travel_rate: float
            ) -> list[StopTime]:
    """Time the executed profile spent at each stop, after leaving the bottom (module notes).

    Parameters
    ----------
    ex : Executed
        The executed profile.
    stops : sequence of (depth, place, gas, minutes)
        The stops required [unit, -, -, min].
    step : float
        The policy's stop step [unit].
    travel_rate : float
        The dive's ascent rate [unit/min]: a recorder log's band time less the band's
        width at this rate.

    Returns
    -------
    list of StopTime
        In the order given.
    """
    if not stops:
        return []
    # stops count from the start of the ascent: the last time at the deepest depth reached
    # (a recorder log's conservative bottom time runs to the last sample deeper than half
    # the maximum depth, which would swallow a deep stop)
    deepest = float(ex.depth.max())
    start = float(ex.t[int(np.flatnonzero(ex.depth >= deepest - 1e-9)[-1])])
    left = min(ex.events.get("left_bottom", start), start)
    after = ex.t[:-1] >= left - 1e-9
    if ex.held is not None:
        after &= ex.held
    bands = [band(float(s[0]), ex.unit, step) for s in stops]
    lo = np.array([b[0] for b in bands])
    hi = np.array([b[1] for b in bands])
    out = np.zeros(len(stops))
    for place in {s[1] for s in stops}:
        cols = np.array([s[1] == place for s in stops])
        mins = time_in_bands(ex.t, ex.depth, after & (ex.place == place), lo[cols], hi[cols])
        out[cols] = mins
    if ex.held is None:  # no stop events: the crossing at the ascent rate is travel
        depth = np.array([float(s[0]) for s in stops])
        places = [s[1] for s in stops]
        first_chamber = np.array([p == "chamber" and places.index("chamber") == i
                                  for i, p in enumerate(places)])
        # reached from below: the whole band; the first chamber stop, compressed to from the
        # surface: its shallow part down and up again
        crossing = np.where(first_chamber, 2.0 * (depth - lo), hi - lo)
        out = np.maximum(out - crossing / travel_rate, 0.0)
    return [StopTime(float(s[0]), s[1], s[2], float(s[3]), float(m), b[0], b[1])
            for s, m, b in zip(stops, out, bands, strict=True)]


def approved_stops(ctx: AuditContext) -> list[Spec]:
    """The approved dive's stops as (depth, place, gas, minutes)."""
    d = ctx.dive
    return [(float(s.depth), s.place, d.stop_gas(s).name, float(s.minutes)) for s in d.stops]


def approved_times(ctx: AuditContext) -> list[StopTime]:
    """The approved stops against the executed profile (computed once per audit)."""
    if "stops" not in ctx.figures:
        ctx.figures["stops"] = measure(ctx.ex, approved_stops(ctx), ctx.step,
                                       ctx.travel_rate)
    return ctx.figures["stops"]


def _inferred(ctx: AuditContext, s: StopTime) -> bool:
    return s.place == "chamber" and ctx.ex.source != "toml"


@FAMILY.rule(
    "audit-stops",
    title="Every approved stop taken for its approved time (omitted decompression)",
    citation="the approved plan (dives[].stops)",
    kind="plan",
)
def approved(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """Each approved stop against the time spent at it; a short or missed stop fails."""
    u = ctx.unit
    specs = approved_stops(ctx)
    if not specs:
        yield r.ok("no stops were approved for this dive; none could be missed (see the "
                   "required schedule for what the actual exposure needs)",
                   measured="no stops approved", limit="no stops approved", dive=ctx.dive.id)
        return
    times = approved_times(ctx)
    bad = False
    for s in times:
        measured, limit = s.figures(u)
        if not s.short:
            continue
        bad = True
        what = ("missed" if s.missed else
                f"cut short: {s.measured_min:.1f} of {s.required_min:g} min")
        if _inferred(ctx, s):
            yield r.review(
                f"needs review: {s.where(u)} {what} in the recorder log (the chamber part is "
                "inferred from the samples after surfacing; confirm with the chamber log)",
                measured=measured, limit=limit, dive=ctx.dive.id)
            continue
        f = r.breach(f"omitted decompression: {s.where(u)} {what} (band {s.lo:g}-{s.hi:g} {u})",
                     measured=measured, limit=limit, dive=ctx.dive.id)
        yield with_action(f, OMITTED_DECOMPRESSION)
    if not bad:
        listed = "; ".join(f"{s.depth:g} {u} {s.place} {s.measured_min:.1f}/{s.required_min:g} "
                           "min" for s in times)
        unverified = any(_inferred(ctx, s) for s in times)
        yield r.ok(f"every approved stop taken for its time ({listed})"
                   + ("; chamber part inferred from a recorder log" if unverified else ""),
                   measured=f"{len(times)} of {len(times)} stops taken",
                   limit=f"{len(times)} stops approved", dive=ctx.dive.id,
                   verified=not unverified)

