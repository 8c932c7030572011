"""Oxygen exposure over a series of dives: rolling 24-hour limits and the REPEX multi-day check.

Split from :mod:`supervisor.engine.oxygen`, which re-exports :func:`daily_exposure`
and :class:`DailyExposure`.

References
----------
.. [1] NOAA Diving Manual, oxygen partial pressure and exposure time limits for normal
       exposures (3rd to 6th editions), adapted from Butler FK, Thalmann ED (1986).
.. [3] Hamilton RW, Kenyon DJ, Peterson RE, REPEX habitat diving procedures, NOAA Office
       of Undersea Research Technical Report 88-1B (1988).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor.engine.oxygen import (
    _LIMIT_TOL,
    _P_TOL_ATM,
    _RESULT_SCHEMA,
    _WINDOW_GRID_MIN,
    DAY_MIN,
    CnsLimits,
    OxygenExposure,
    PulmonaryLimits,
    TableInfo,
    _cns,
    _otu,
    load_cns_limits,
    load_pulmonary_limits,
)
from supervisor.errors import InputError

# --------------------------------------------------------------------------- series


@dataclass(frozen=True, eq=False)
class DailyExposure:
    """Several exposures on one time line: rolling 24-hour and REPEX series checks.

    Attributes
    ----------
    start_min, end_min : ndarray
        Start and end of each exposure, in time order [min from the caller's origin].
    otu, cns_percent, cns_24h_percent : ndarray
        Per-exposure totals [OTU, %, %].
    max_otu_24h : float
        Highest OTU in any 24 hours [OTU].
    otu_24h_window_start_min : float
        Start of that 24-hour window [min].
    otu_allowance_24h : float
        REPEX single-day allowance [OTU].
    series_days : ndarray of int
        Window lengths checked: 1 ... number of days the exposures span [day].
    series_max_otu : ndarray
        Highest OTU in any window of that many consecutive days [OTU].
    series_allowance_otu : ndarray
        REPEX total allowance of a series of that many days [OTU].
    max_cns_24h_percent : float
        Highest sum of time / 24-hour limit over any 24 hours [%]; a lower bound when
        ``out_of_range``.
    cns_24h_window_start_min : float
        Start of that window [min].
    out_of_range : bool
        Some exposure went above the CNS table in the water (charged at the top row's
        rate: the CNS figures are lower bounds).
    max_po2_atm, minutes_above_range : float
        Over all exposures [atm, min].
    cns_half_time_min : float or None
        Recovery half-time supplied by the caller [min], or None (no recovery assumed).
    cns_carried_percent : ndarray or None
        Single-exposure CNS percentage carried at the end of each exposure with that
        half-time [%]; None when no half-time was given.
    cns_limits, pulmonary_limits : TableInfo
        Provenance.
    """

    start_min: NDArray[np.float64]
    end_min: NDArray[np.float64]
    otu: NDArray[np.float64]
    cns_percent: NDArray[np.float64]
    cns_24h_percent: NDArray[np.float64]
    max_otu_24h: float
    otu_24h_window_start_min: float
    otu_allowance_24h: float
    series_days: NDArray[np.int64]
    series_max_otu: NDArray[np.float64]
    series_allowance_otu: NDArray[np.float64]
    max_cns_24h_percent: float
    cns_24h_window_start_min: float
    out_of_range: bool
    max_po2_atm: float
    minutes_above_range: float
    cns_half_time_min: float | None
    cns_carried_percent: NDArray[np.float64] | None
    cns_limits: TableInfo
    pulmonary_limits: TableInfo

    @property
    def otu_24h_exceeded(self) -> bool:
        """Some 24 hours hold more than the REPEX single-day allowance."""
        return bool(self.max_otu_24h > self.otu_allowance_24h + _LIMIT_TOL)

    @property
    def series_exceeded(self) -> bool:
        """Some window of k consecutive days holds more than the k-day REPEX allowance."""
        return bool(np.any(self.series_max_otu > self.series_allowance_otu + _LIMIT_TOL))

    @property
    def cns_24h_exceeded(self) -> bool:
        """Some 24 hours exceed the NOAA 24-hour limits (100 %)."""
        return bool(self.max_cns_24h_percent > 100.0 + _LIMIT_TOL)

    @property
    def single_exposure_exceeded(self) -> bool:
        """Some exposure exceeds the NOAA single-exposure limits (100 %)."""
        return bool(np.any(self.cns_percent > 100.0 + _LIMIT_TOL))

    @property
    def cns_carried_exceeded(self) -> bool | None:
        """Carried CNS above 100 % (None when no recovery half-time was given)."""
        if self.cns_carried_percent is None:
            return None
        return bool(np.any(self.cns_carried_percent > 100.0 + _LIMIT_TOL))

    @property
    def review_reasons(self) -> tuple[str, ...]:
        """Why the figures cannot be taken as checked (empty when they can)."""
        out = []
        if self.out_of_range:
            out.append(
                f"PO2 above the CNS table in the water for {self.minutes_above_range:.4g} "
                "min, counted at the top row's rate: CNS figures are lower bounds"
            )
        for info in (self.cns_limits, self.pulmonary_limits):
            if not info.usable_without_review:
                out.append(
                    f"limits {info.name} are {info.source_status} and "
                    f"{'verified' if info.verified else 'unverified'}"
                )
        if self.cns_half_time_min is not None:
            out.append(
                f"CNS recovery with a {self.cns_half_time_min:g}-min half-time is an "
                "assumption supplied by the caller, not a tabulated limit"
            )
        return tuple(out)

    @property
    def needs_review(self) -> bool:
        """True when any figure is a lower bound or rests on unchecked limits."""
        return bool(self.review_reasons)

    def to_dict(self) -> dict[str, Any]:
        """Return a JSON-ready dictionary (schema ``supervisor-oxygen/1``)."""
        carried = self.cns_carried_percent
        return {
            "schema": _RESULT_SCHEMA,
            "exposures": [
                {
                    "start_min": float(s),
                    "end_min": float(e),
                    "otu": float(o),
                    "cns_percent": float(c),
                    "cns_24h_percent": float(c24),
                    "cns_carried_percent": None if carried is None else float(carried[i]),
                }
                for i, (s, e, o, c, c24) in enumerate(
                    zip(
                        self.start_min,
                        self.end_min,
                        self.otu,
                        self.cns_percent,
                        self.cns_24h_percent,
                        strict=True,
                    )
                )
            ],
            "max_otu_24h": self.max_otu_24h,
            "otu_24h_window_start_min": self.otu_24h_window_start_min,
            "otu_allowance_24h": self.otu_allowance_24h,
            "otu_24h_exceeded": self.otu_24h_exceeded,
            "series": [
                {"days": int(k), "max_otu": float(m), "allowance_otu": float(a)}
                for k, m, a in zip(
                    self.series_days, self.series_max_otu, self.series_allowance_otu, strict=True
                )
            ],
            "series_exceeded": self.series_exceeded,
            "max_cns_24h_percent": self.max_cns_24h_percent,
            "cns_24h_window_start_min": self.cns_24h_window_start_min,
            "cns_24h_exceeded": self.cns_24h_exceeded,
            "single_exposure_exceeded": self.single_exposure_exceeded,
            "cns_status": "lower bound" if self.out_of_range else "computed",
            "out_of_range": self.out_of_range,
            "max_po2_atm": self.max_po2_atm,
            "minutes_above_range": self.minutes_above_range,
            "cns_half_time_min": self.cns_half_time_min,
            "cns_carried_exceeded": self.cns_carried_exceeded,
            "needs_review": self.needs_review,
            "review_reasons": list(self.review_reasons),
            "cns_limits": self.cns_limits.to_dict(),
            "pulmonary_limits": self.pulmonary_limits.to_dict(),
        }


#: Finest PO2 change between window-edge grid points inside a ramp [atm] (a bound on
#: the work of a slow ramp; regression value, own choice, no source).
_RAMP_PO2_STEP_ATM = 0.005


class _Timeline:
    """All segments of several exposures on one absolute time axis, with exact doses."""

    def __init__(
        self,
        t0: NDArray,
        minutes: NDArray,
        p1: NDArray,
        p2: NDArray,
        limits: CnsLimits,
        grid_min: float,
        water: NDArray | None = None,
    ) -> None:
        keep = minutes > 0
        self.t0, self.m, self.p1, self.p2 = t0[keep], minutes[keep], p1[keep], p2[keep]
        # chamber segments add no in-water CNS percentage (the OTU counts everything)
        wet = np.ones(minutes.shape, dtype=bool) if water is None else water
        self.water = wet[keep].astype(float)
        self.limits = limits
        otu = _otu(self.m, self.p1, self.p2)
        cns = _cns(self.m, self.p1, self.p2, limits)[1] * self.water
        self.otu0 = np.concatenate(([0.0], np.cumsum(otu)))
        self.cns0 = np.concatenate(([0.0], np.cumsum(cns)))
        # Window-edge positions: every segment boundary, plus a fine grid inside segments
        # whose PO2 changes (there the dose rate is not constant).
        dp = np.abs(self.p2 - self.p1)
        ramp = dp > _P_TOL_ATM
        # a grid step of grid_min, but no finer than a PO2 change of _RAMP_PO2_STEP_ATM: a
        # slow ramp (1 fsw/min for hours) then costs a few hundred points, not tens of
        # thousands, and the window dose misses at most the second-order term of a step
        # whose dose rate barely changes (bounded work on any valid plan)
        n_time = np.ceil(self.m / grid_min)
        n_po2 = np.ceil(dp / _RAMP_PO2_STEP_ATM) + 1
        n = np.where(ramp, np.maximum(np.minimum(n_time, n_po2), 1), 1).astype(np.int64)
        owner = np.repeat(np.arange(self.m.size), n)
        step = np.arange(owner.size) - np.repeat(np.cumsum(n) - n, n)
        inner = self.t0[owner] + self.m[owner] * step / n[owner]
        self.edges = np.unique(np.concatenate((inner, self.t0 + self.m)))

    def dose_at(self, t: NDArray) -> tuple[NDArray, NDArray]:
        """Cumulative OTU and 24-hour CNS percentage from the first segment up to times t."""
        i = np.searchsorted(self.t0, t, side="right") - 1
        before = i < 0
        j = np.clip(i, 0, None)
        tau = np.clip(t - self.t0[j], 0.0, self.m[j])
        p_tau = self.p1[j] + (self.p2[j] - self.p1[j]) * tau / self.m[j]
        otu = self.otu0[j] + _otu(tau, self.p1[j], p_tau)
        cns = self.cns0[j] + _cns(tau, self.p1[j], p_tau, self.limits)[1] * self.water[j]
        return np.where(before, 0.0, otu), np.where(before, 0.0, cns)

    def window_max(self, length_min: float, want_cns: bool = True):
        """Highest OTU (and 24-hour CNS) in any window of the given length, and its start.

        The window is placed with one edge on each segment boundary or grid point; this is
        exact where PO2 is constant and second order in the grid step inside ramps.
        """
        if self.m.size == 0:
            return 0.0, 0.0, 0.0, 0.0
        s = np.unique(np.concatenate((self.edges, self.edges - length_min)))
        otu_a, cns_a = self.dose_at(s)
        otu_b, cns_b = self.dose_at(s + length_min)
        w_otu = otu_b - otu_a
        k = int(np.argmax(w_otu))
        if not want_cns:
            return float(w_otu[k]), self._first_dose(s[k]), 0.0, 0.0
        w_cns = cns_b - cns_a
        c = int(np.argmax(w_cns))
        return float(w_otu[k]), self._first_dose(s[k]), float(w_cns[c]), self._first_dose(s[c])

    def _first_dose(self, s: float) -> float:
        """Move a window start through a gap to the next segment (the dose is unchanged)."""
        i = int(np.searchsorted(self.t0 + self.m, s, side="right"))
        return float(max(s, self.t0[i])) if i < self.t0.size else float(s)


def _water(e: OxygenExposure) -> NDArray[np.bool_]:
    """In-water flags of an exposure's segments (all in the water when none is given)."""
    n = e.segment_minutes.size
    return ~e.segment_in_chamber if e.segment_in_chamber.size == n else np.ones(n, dtype=bool)


def daily_exposure(
    exposures: Sequence[tuple[float, OxygenExposure]],
    cns_half_time_min: float | None = None,
    pulmonary_limits: PulmonaryLimits | None = None,
    limits: CnsLimits | None = None,
    grid_min: float = _WINDOW_GRID_MIN,
) -> DailyExposure:
    """Combine exposures on one time line and check rolling 24-hour and multi-day limits.

    Parameters
    ----------
    exposures : sequence of (float, OxygenExposure)
        Start time of each exposure [min from any common origin] with its exposure, for
        example from :func:`profile_exposure`.  Exposures must not overlap in time.
    cns_half_time_min : float, optional
        Half-time of an exponential recovery of the single-exposure CNS percentage
        between exposures [min].  None (the default) assumes no recovery: the 24-hour
        check then rests on the NOAA 24-hour limits alone.  No half-time is given in the
        sources of this package's tables; a 90-min half-time is often quoted (from memory).
    pulmonary_limits : PulmonaryLimits, optional
        REPEX allowances; by default the bundled table.
    limits : CnsLimits, optional
        CNS limits used to recompute the 24-hour percentage over partial windows; by
        default the bundled NOAA table.
    grid_min : float
        Placement grid for window edges inside segments whose PO2 changes [min].

    Returns
    -------
    DailyExposure
        Per-exposure totals, rolling 24-hour maxima, and the REPEX series check.

    Raises
    ------
    InputError
        If the list is empty, a start time is not finite, exposures overlap, or the
        half-time or grid is not a positive number.

    Notes
    -----
    The dose in a window is D(s + L) - D(s), with D the exact cumulative dose.  The 24-hour
    CNS percentage is the sum of time / 24-hour limit within the window [1] (the usual
    reading for mixed PO2, common practice, no source); the OTU of every window of k
    consecutive days is compared with the REPEX total allowance of a k-day series [3]
    (k = 1 is the single-day 850 OTU allowance; this placement of windows is an
    interpretation, from memory).  With a half-time h, the carried CNS percentage is
    C_k = C_(k-1) 2^(-gap/h) + CNS_k.

    References
    ----------
    .. [1] NOAA Diving Manual, normal-exposure oxygen limits (3rd to 6th editions).
    .. [2] Clark JM, Lambertsen CJ, Pharmacological Reviews 23 (1971) 37-133 (from memory).
    .. [3] Hamilton RW, Kenyon DJ, Peterson RE, REPEX habitat diving procedures, NOAA OUR
           Technical Report 88-1B (1988).
    """
    items = list(exposures)
    if not items:
        raise InputError("exposures", "got none; expected one or more (start_min, exposure)")
    for i, item in enumerate(items):
        if (
            not isinstance(item, tuple)
            or len(item) != 2
            or not isinstance(item[1], OxygenExposure)
        ):
            raise InputError(
                f"exposures[{i}]", "expected a (start_min, OxygenExposure) pair"
            )
        try:
            ok = math.isfinite(float(item[0]))
        except (TypeError, ValueError):
            ok = False
        if not ok:
            raise InputError(
                f"exposures[{i}].start_min", f"got {item[0]!r}; expected a finite time [min]"
            )
    for name, value in (("cns_half_time_min", cns_half_time_min), ("grid_min", grid_min)):
        if value is not None and not (math.isfinite(value) and value > 0):
            raise InputError(name, f"got {value!r}; expected a positive number of minutes")
    cns_lim = limits or load_cns_limits()
    pul_lim = pulmonary_limits or load_pulmonary_limits()

    items.sort(key=lambda it: float(it[0]))
    start = np.array([float(s) for s, _ in items])
    end = start + np.array([e.duration_min for _, e in items])
    gap = start[1:] - end[:-1]
    if np.any(gap < -1e-9):
        k = int(np.argmax(gap < -1e-9)) + 1
        raise InputError(
            "exposures",
            f"exposure starting at {start[k]:g} min begins before the previous one ends at "
            f"{end[k - 1]:g} min; give non-overlapping start times",
        )

    seg_t0 = np.concatenate(
        [s + np.concatenate(([0.0], np.cumsum(e.segment_minutes)[:-1])) for s, e in items]
    )
    seg_m = np.concatenate([e.segment_minutes for _, e in items])
    seg_p1 = np.concatenate([e.segment_po2_start_atm for _, e in items])
    seg_p2 = np.concatenate([e.segment_po2_end_atm for _, e in items])
    seg_water = np.concatenate([_water(e) for _, e in items])
    line = _Timeline(seg_t0, seg_m, seg_p1, seg_p2, cns_lim, grid_min, seg_water)

    otu24, s_otu, cns24, s_cns = line.window_max(DAY_MIN)
    span = float(end[-1] - start[0])
    n_days = max(1, math.ceil(span / DAY_MIN - 1e-12))
    days = np.arange(1, n_days + 1, dtype=np.int64)
    series_max = np.array(
        [otu24] + [line.window_max(k * DAY_MIN, want_cns=False)[0] for k in days[1:]]
    )

    cns_each = np.array([e.cns_percent for _, e in items])
    carried = None
    if cns_half_time_min is not None:
        carried = np.empty_like(cns_each)
        acc = 0.0
        for i, c in enumerate(cns_each):
            if i:
                acc *= 2.0 ** (-max(gap[i - 1], 0.0) / cns_half_time_min)
            acc += c
            carried[i] = acc

    return DailyExposure(
        start_min=start,
        end_min=end,
        otu=np.array([e.otu for _, e in items]),
        cns_percent=cns_each,
        cns_24h_percent=np.array([e.cns_24h_percent for _, e in items]),
        max_otu_24h=otu24,
        otu_24h_window_start_min=s_otu,
        otu_allowance_24h=float(pul_lim.total_allowance(1)[()]),
        series_days=days,
        series_max_otu=series_max,
        series_allowance_otu=pul_lim.total_allowance(days),
        max_cns_24h_percent=cns24,
        cns_24h_window_start_min=s_cns,
        out_of_range=any(e.out_of_range for _, e in items),
        max_po2_atm=max(e.max_po2_atm for _, e in items),
        minutes_above_range=float(sum(e.minutes_above_range for _, e in items)),
        cns_half_time_min=None if cns_half_time_min is None else float(cns_half_time_min),
        cns_carried_percent=carried,
        cns_limits=cns_lim.info,
        pulmonary_limits=pul_lim.info,
    )
