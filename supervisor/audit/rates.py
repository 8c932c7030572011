"""Descent and ascent rates of the executed profile over a sliding window.

The rate is the depth change over a window of :data:`RATE_WINDOW_MIN` (30 s)
divided by the window, at every window that lies wholly in the water (the deck
and the chamber are left out).  For a piecewise-linear profile the largest
change over a window of fixed length is found with the window starting or
ending at a knot, so the windows examined end at every knot and at every knot
plus the window: exact for the timed log's straight lines, and every sample of
a recorder log, all in one vectorised pass.

A window is over the limit when its depth change exceeds the limit times the
window by more than :data:`RATE_SLACK_FSW` (a depth reading's resolution, so
that one sample's noise is not a violation); a fastest window over the limit by
less than that needs review (never a pass).  Both figures are own choices and
are stated in every finding.

The limits are the policy's: ``ascent_rate_max`` (a fast ascent guards against
immediate harm, so it fails whether the plan states the limit or takes the
default) and ``descent_rate_max`` (fails when the plan states it; the unit's
default only warns).
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from supervisor.audit.context import FAMILY, FAST_ASCENT, AuditContext, with_action
from supervisor.audit.executed import Executed
from supervisor.findings import Finding
from supervisor.rules.base import Rule
from supervisor.units import convert_depth

#: Length of the sliding window [min] (own choice: 30 s, long enough to smooth a
#: recorder's noise, short enough to catch a burst that a one-minute average hides).
RATE_WINDOW_MIN = 0.5
#: Depth change allowed over a window beyond limit x window [fsw] (own choice).
RATE_SLACK_FSW = 1.0

Direction = Literal["ascent", "descent"]


@dataclass(frozen=True)
class RateCheck:
    """The fastest ascent or descent of a profile against a limit.

    Attributes
    ----------
    direction : {"ascent", "descent"}
        Which way.
    limit : float
        Limit [unit/min].
    window_min, slack : float
        Window [min] and depth slack [unit].
    windows : int
        Windows examined.
    max_rate : float or None
        Fastest rate over a window [unit/min]; None when no window fits in the water.
    at_min : float or None
        End of that window [min from the start of the log].
    from_depth, to_depth : float or None
        Depths at its start and end [unit].
    episodes : int
        Separate stretches of windows over the limit.
    over_min : float
        Time covered by windows over the limit [min].
    """

    direction: Direction
    limit: float
    window_min: float
    slack: float
    windows: int
    max_rate: float | None
    at_min: float | None
    from_depth: float | None
    to_depth: float | None
    episodes: int
    over_min: float

    def to_json(self) -> dict[str, object]:
        """JSON-ready figures."""
        r = (lambda x: None if x is None else round(x, 2))  # noqa: E731
        return {"direction": self.direction, "limit": self.limit,
                "window_s": round(self.window_min * 60.0, 1), "slack": round(self.slack, 3),
                "windows": self.windows, "max_rate": r(self.max_rate), "at_min": r(self.at_min),
                "from_depth": r(self.from_depth), "to_depth": r(self.to_depth),
                "episodes": self.episodes, "over_min": round(self.over_min, 2)}


def window_changes(t: NDArray[np.float64], d: NDArray[np.float64], excluded: NDArray[np.bool_],
                   window: float) -> tuple[NDArray[np.float64], NDArray[np.float64],
                                           NDArray[np.float64]]:
    """Depth change over every window that avoids the excluded segments.

    Parameters
    ----------
    t, d : ndarray, shape (n + 1,)
        Knot times [min] and depths.
    excluded : ndarray of bool, shape (n,)
        Segments no window may overlap (deck, chamber).
    window : float
        Window length [min].

    Returns
    -------
    (starts, ends, change) : ndarray
        Window start and end times [min] and the depth change over each (positive
        going down).
    """
    ends = np.unique(np.concatenate([t, t + window]))
    ends = ends[(ends >= t[0] + window - 1e-12) & (ends <= t[-1] + 1e-12)]
    starts = ends - window
    blocked = np.concatenate([[0.0], np.cumsum(np.diff(t) * excluded)])
    ok = np.interp(ends, t, blocked) - np.interp(starts, t, blocked) < 1e-12
    starts, ends = starts[ok], ends[ok]
    return starts, ends, np.interp(ends, t, d) - np.interp(starts, t, d)


def check_rate(ex: Executed, direction: Direction, limit: float,
               window: float = RATE_WINDOW_MIN) -> RateCheck:
    """The fastest ascent or descent of the executed profile in the water.

    Parameters
    ----------
    ex : Executed
        The executed profile.
    direction : {"ascent", "descent"}
        Which way.
    limit : float
        Limit [unit/min].
    window : float
        Window [min].

    Returns
    -------
    RateCheck
    """
    slack = float(convert_depth(RATE_SLACK_FSW, "fsw", ex.unit))  # type: ignore[arg-type]
    key = ("windows", window)
    if key not in ex.cache:  # both directions and the result's figures share one pass
        ex.cache[key] = window_changes(ex.t, ex.depth, ex.place != "water", window)
    s, e, change = ex.cache[key]
    if direction == "ascent":
        change = -change
    if change.size == 0:
        return RateCheck(direction, limit, window, slack, 0, None, None, None, None, 0, 0.0)
    over = change > limit * window + slack
    k = int(np.argmax(change))
    episodes = int(np.count_nonzero(np.diff(np.concatenate([[0], over.astype(int)])) == 1))
    so, eo = s[over], e[over]
    if so.size:
        prev = np.concatenate([[-np.inf], np.maximum.accumulate(eo[:-1])])
        over_min = float(np.sum(np.clip(eo - np.maximum(so, prev), 0.0, None)))
    else:
        over_min = 0.0
    return RateCheck(direction, limit, window, slack, int(change.size),
                     float(change[k] / window), float(e[k]),
                     float(np.interp(s[k], ex.t, ex.depth)), float(np.interp(e[k], ex.t,
                                                                             ex.depth)),
                     episodes, over_min)


def _finding(ctx: AuditContext, r: Rule, rc: RateCheck, stated: bool) -> Finding:
    u = ctx.unit
    how = (f"over a {rc.window_min * 60:.0f}-s window, {rc.slack:g} {u} of depth allowed "
           "beyond the limit")
    kw = dict(unit=f"{u}/min", limit=rc.limit, dive=ctx.dive.id)
    if rc.max_rate is None:
        return r.review(f"needs review: no {rc.window_min * 60:.0f}-s stretch of the log in the "
                        f"water; the {rc.direction} rate cannot be measured",
                        measured="not measured", **kw)
    measured = round(rc.max_rate, 1)
    if rc.episodes == 0 and rc.max_rate > rc.limit + 1e-9:
        # over the limit by less than the slack: not shown to be a violation, nor to be fine
        return r.review(f"needs review: fastest {rc.direction} {measured:g} {u}/min, over "
                        f"{rc.limit:g} {u}/min by less than the depth slack ({how})",
                        measured=measured, **kw)
    if rc.episodes == 0:
        return r.ok(f"fastest {rc.direction} {measured:g} {u}/min ({how})", measured=measured,
                    **kw)
    where = (f"at {rc.at_min:.1f} min of the log, {rc.from_depth:.0f} to {rc.to_depth:.0f} {u}; "
             f"{rc.episodes} stretch(es), {rc.over_min * 60:.0f} s in all")
    text = (f"{rc.direction} at up to {measured:g} {u}/min, faster than {rc.limit:g} {u}/min "
            f"({where}; {how})")
    if stated or rc.direction == "ascent":
        f = r.breach(text, measured=measured, **kw)
    else:
        f = r.finding("warn", text + "; the limit is the unit's default, not the plan's",
                      measured=measured, verified=False, **kw)
    return with_action(f, FAST_ASCENT) if rc.direction == "ascent" else f


@FAMILY.rule(
    "audit-ascent-rate",
    title="Ascent no faster than the policy's fastest ascent",
    citation="contractor policy (policy.ascent_rate_max)",
    kind="policy",
)
def ascent(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The fastest ascent in the water over the window against ``ascent_rate_max``."""
    limit = float(ctx.policy.ascent_rate_max)
    yield _finding(ctx, r, check_rate(ctx.ex, "ascent", limit), True)


@FAMILY.rule(
    "audit-descent-rate",
    title="Descent no faster than the policy's fastest descent",
    citation="contractor policy (policy.descent_rate_max)",
    kind="policy",
)
def descent(ctx: AuditContext, r: Rule) -> Iterator[Finding]:
    """The fastest descent in the water over the window against ``descent_rate_max``."""
    limit = float(ctx.policy.descent_rate_max)
    stated = ctx.pa.plan.policy.descent_rate_max is not None
    yield _finding(ctx, r, check_rate(ctx.ex, "descent", limit), stated)
