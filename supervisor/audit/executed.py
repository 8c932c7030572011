"""The executed profile of a dive, from a log, as arrays in the plan's unit.

An audit works on one array per quantity: the knots of the profile (time and
depth, linear between them) and, per segment between two knots, the gas
breathed and where the diver was (water, surface, chamber).  A log imported by
:mod:`supervisor.records.importers` becomes one with :func:`from_log`; sampled
depths held in memory with :func:`from_samples`, without a Python object per
sample.

Event times (minutes from the start of the profile) are those of the
supervisor's timed log when it has them.  A recorder's CSV has no events:

* leaving the surface is the last sample at the surface before the first
  deeper one, leaving the bottom is the end of the bottom time the importer
  derived (:func:`supervisor.records.importers.common.derived_bottom_time`),
  reaching the surface is the first sample at the surface after the deepest one;
* for a dive whose approved plan has chamber stops (surface decompression),
  what the recorder shows after that first surfacing is taken as the time on
  deck and in the chamber (the recorder stays with the diver): the chamber part
  is *inferred*, and findings on it say so.  Leaving the last water stop is the
  last sample, before surfacing, within the stop band of the approved last water
  stop (the bottom when the plan has none); reaching chamber depth is the first
  sample after surfacing within the band of the first chamber stop.

A depth within :data:`~supervisor.records.importers.common.SURFACE_OFFSET_FSW`
of zero counts as the surface.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray

from supervisor.engine.evaluate import SURFACE_INTERVAL, ProfileArrays
from supervisor.errors import InputError
from supervisor.gas import Gas, parse_gas
from supervisor.records.importers.common import SURFACE_OFFSET_FSW, ImportedLog
from supervisor.units import Water, convert_depth

#: Events an audit reads, as the timed log names them (``-`` written ``_``).
EVENTS: tuple[str, ...] = ("left_surface", "reached_bottom", "left_bottom", "reached_surface",
                           "left_last_water_stop", "chamber_at_depth", "chamber_surfaced")


@dataclass
class Executed:
    """A dive as executed: knots, per-segment gas and place, and event times.

    Attributes
    ----------
    t : ndarray, shape (n + 1,)
        Knot times [min], increasing.
    depth : ndarray, shape (n + 1,)
        Depth at each knot [unit] (chamber pressure in the chamber).
    fo2, fhe : ndarray, shape (n,)
        Oxygen and helium fractions breathed in each segment [-].
    place : ndarray of str, shape (n,)
        ``water``, ``surface`` or ``chamber``.
    surface_interval : ndarray of bool, shape (n,)
        Segments of the surface interval of surface decompression (leaving the
        last water stop to chamber depth); the model ceiling is not checked there.
    unit : {"fsw", "msw"}
        The plan's depth unit.
    water : {"salt", "fresh"}
        Water.
    p_surface_bar : float
        Absolute surface pressure [bar].
    max_depth : float
        Deepest point in the water [unit].
    bottom_time_min : float or None
        Bottom time [min], with ``bottom_time_basis`` saying how it was found.
    events : dict of str to float
        Time of each event of :data:`EVENTS` found [min].
    source : str
        ``toml`` (timed log), ``csv`` (recorder) or ``samples``.
    chamber_inferred : bool
        True when the chamber part was inferred from a recorder log.
    notes : list of str
        What was assumed in building the profile.
    held : ndarray of bool, shape (n,), or None
        Segments at a stop, from arriving to leaving it (a timed log); None when
        the log does not say (a recorder).
    cache : dict
        Figures computed once per profile (the rate windows); cleared by nothing, so
        change no array after auditing.
    """

    t: NDArray[np.float64]
    depth: NDArray[np.float64]
    fo2: NDArray[np.float64]
    fhe: NDArray[np.float64]
    place: NDArray[np.str_]
    surface_interval: NDArray[np.bool_]
    unit: str
    water: str
    p_surface_bar: float
    max_depth: float
    bottom_time_min: float | None
    bottom_time_basis: str
    events: dict[str, float] = field(default_factory=dict)
    source: str = "samples"
    chamber_inferred: bool = False
    notes: list[str] = field(default_factory=list)
    held: NDArray[np.bool_] | None = None
    cache: dict[Any, Any] = field(default_factory=dict, repr=False, compare=False)



    @property
    def minutes(self) -> NDArray[np.float64]:
        """Segment durations [min]."""
        return np.diff(self.t)

    @property
    def duration_min(self) -> float:
        """From the first to the last knot [min]."""
        return float(self.t[-1] - self.t[0])

    def arrays(self) -> ProfileArrays:
        """The engine's input (:class:`supervisor.engine.evaluate.ProfileArrays`)."""
        return ProfileArrays(
            minutes=self.minutes, start_depth=self.depth[:-1], end_depth=self.depth[1:],
            fn2=1.0 - self.fo2 - self.fhe, fhe=self.fhe,
            inside=(self.place != "surface") & ~self.surface_interval,
            unit=self.unit, water=self.water, p_surface_bar=self.p_surface_bar,
        )

    def p_bar(self, depth: NDArray[np.float64]) -> NDArray[np.float64]:
        """Absolute pressure at depths of this profile [bar]."""
        from supervisor.units import bar_per_depth_unit

        return self.p_surface_bar + depth * bar_per_depth_unit(self.unit, self.water)  # type: ignore[arg-type]

    def summary(self) -> dict[str, Any]:
        """JSON-ready figures of the executed dive."""
        return {
            "unit": self.unit, "max_depth": round(self.max_depth, 2),
            "bottom_time_min": None if self.bottom_time_min is None
            else round(self.bottom_time_min, 2),
            "bottom_time_basis": self.bottom_time_basis,
            "duration_min": round(self.duration_min, 2),
            "knots": int(self.t.size),
            "events_min": {k: round(v, 3) for k, v in self.events.items()},
            "chamber_inferred": self.chamber_inferred,
            "notes": list(self.notes),
        }


def surface_band(unit: str) -> float:
    """Depth counted as the surface [unit]."""
    return float(convert_depth(SURFACE_OFFSET_FSW, "fsw", unit))  # type: ignore[arg-type]


def _gas_arrays(gas: Gas | str | Sequence[Gas | str], n: int
                ) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    if isinstance(gas, (Gas, str)):
        g = parse_gas(gas) if isinstance(gas, str) else gas
        return np.full(n, g.fo2), np.full(n, g.fhe)
    gases = [parse_gas(x) if isinstance(x, str) else x for x in gas]
    if len(gases) != n:
        raise InputError("samples.gas", f"expected {n} gases (one per interval)")
    return (np.fromiter((g.fo2 for g in gases), float, n),
            np.fromiter((g.fhe for g in gases), float, n))


def from_samples(
    t_min: NDArray[np.float64],
    depth: NDArray[np.float64],
    gas: Gas | str | Sequence[Gas | str] = "air",
    *,
    unit: str = "fsw",
    water: Water = "salt",
    p_surface_bar: float = 1.01325,
    bottom_time_min: float | None = None,
    chamber_after_surfacing: bool = False,
    last_water_stop: float | None = None,
    chamber_depth: float | None = None,
    step: float = 10.0,
) -> Executed:
    """An executed profile from sampled depths (a recorder log held in memory).

    Parameters
    ----------
    t_min : ndarray
        Sample times [min], increasing.
    depth : ndarray
        Depths [unit], >= 0.
    gas : Gas, str or sequence
        One gas, or one per interval.
    unit, water, p_surface_bar
        The plan's unit, the water and the surface pressure [bar].
    bottom_time_min : float, optional
        Bottom time [min]; by default derived as the importer does.
    chamber_after_surfacing : bool
        Take what follows the first surfacing after the bottom as deck and chamber.
    last_water_stop, chamber_depth : float, optional
        Approved last water stop and first chamber stop [unit] (surface decompression).
    step : float
        Stop step [unit], for the stop bands.

    Returns
    -------
    Executed
    """
    t = np.asarray(t_min, dtype=float)
    d = np.asarray(depth, dtype=float)
    if t.ndim != 1 or d.shape != t.shape or t.size < 2:
        raise InputError("samples", "times and depths must be 1-D of equal length >= 2")
    if np.any(np.diff(t) <= 0):
        raise InputError("samples.time", "sample times must be strictly increasing")
    if not np.all(np.isfinite(d)) or np.any(d < 0):
        raise InputError("samples.depth", "depths must be finite and >= 0")
    n = t.size - 1
    fo2, fhe = _gas_arrays(gas, n)
    ex = Executed(t=t, depth=d, fo2=fo2, fhe=fhe, place=np.full(n, "water"),
                  surface_interval=np.zeros(n, dtype=bool), unit=unit, water=water,
                  p_surface_bar=float(p_surface_bar), max_depth=float(d.max()),
                  bottom_time_min=None, bottom_time_basis="", source="samples")
    _recorder_events(ex, bottom_time_min, chamber_after_surfacing, last_water_stop,
                     chamber_depth, step)
    return ex


def _recorder_events(ex: Executed, bottom_time: float | None, chamber: bool,
                     last_stop: float | None, chamber_depth: float | None, step: float) -> None:
    """Events of a recorder log (module notes), and the inferred deck and chamber part."""
    from supervisor.audit.stops import band

    t, d = ex.t, ex.depth
    surf = surface_band(ex.unit)
    deep = np.flatnonzero(d > surf)
    if deep.size == 0:
        ex.bottom_time_min, ex.bottom_time_basis = None, "the log never leaves the surface"
        return
    first = int(deep[0])
    t_left = float(t[first - 1]) if first > 0 else float(t[0])
    deepest = int(np.argmax(d))
    after = np.flatnonzero(d[deepest:] <= surf)
    up = deepest + int(after[0]) if after.size else None
    ex.events["left_surface"] = t_left
    if up is not None:
        ex.events["reached_surface"] = float(t[up])
    if bottom_time is None:
        half = np.flatnonzero(d > 0.5 * float(d.max()))
        bottom_time = float(t[int(half[-1])]) - t_left
        ex.bottom_time_basis = ("derived from the samples: from the last sample at the surface "
                                "to the last sample deeper than half the maximum depth")
    else:
        ex.bottom_time_basis = ex.bottom_time_basis or "given"
    ex.bottom_time_min = float(bottom_time)
    ex.events["left_bottom"] = t_left + float(bottom_time)
    if not chamber or up is None:
        if up is not None:
            ex.max_depth = float(d[: up + 1].max())
        return
    ex.max_depth = float(d[: up + 1].max())
    # after the first surfacing: on deck at the surface, in the chamber below it
    seg_after = np.arange(ex.place.size) >= up
    below = np.maximum(d[:-1], d[1:]) > surf
    ex.place = np.where(seg_after, np.where(below, "chamber", "surface"), ex.place)
    ex.chamber_inferred = bool((seg_after & below).any())
    ex.notes.append("recorder log of a surface-decompression dive: the samples after the "
                    "first surfacing are taken as the time on deck and in the chamber")
    lo = None
    if last_stop is not None:
        lo, _hi = band(last_stop, ex.unit, step)
    at_stop = np.flatnonzero(d[: up + 1] >= (lo if lo is not None else 0.5 * ex.max_depth))
    t_leave = float(t[int(at_stop[-1])]) if at_stop.size else float(t[up])
    ex.events["left_last_water_stop"] = t_leave
    t_chamber = None
    if chamber_depth is not None:
        clo, _chi = band(chamber_depth, ex.unit, step)
        reach = np.flatnonzero(d[up:] >= clo)
        if reach.size:
            t_chamber = float(t[up + int(reach[0])])
            ex.events["chamber_at_depth"] = t_chamber
    end = t_chamber if t_chamber is not None else float(t[up])
    ex.surface_interval = (t[:-1] >= t_leave - 1e-12) & (t[1:] <= end + 1e-12)


def from_log(log: ImportedLog, unit: str, *, chamber_expected: bool = False,
             last_water_stop: float | None = None, chamber_depth: float | None = None,
             step: float = 10.0) -> Executed:
    """The executed profile of an imported log, in the plan's unit.

    Parameters
    ----------
    log : ImportedLog
        From :func:`supervisor.records.importers.read_log`.
    unit : {"fsw", "msw"}
        The plan's depth unit; depths are converted to it.
    chamber_expected : bool
        The approved dive has chamber stops (surface decompression).
    last_water_stop, chamber_depth, step
        See :func:`from_samples` (used for a recorder log).

    Returns
    -------
    Executed
    """
    prof = log.profile
    segs = prof.segments
    if not segs:
        raise InputError("LOG", "the log gives no profile")
    n = len(segs)
    d0 = np.fromiter((s.start_depth for s in segs), float, n)
    d1 = np.fromiter((s.end_depth for s in segs), float, n)
    minutes = np.fromiter((s.minutes for s in segs), float, n)
    t = np.concatenate([[0.0], np.cumsum(minutes)])
    depth = np.concatenate([[d0[0]], d1])
    if prof.unit != unit:
        depth = np.asarray(convert_depth(depth, prof.unit, unit, prof.water), dtype=float)  # type: ignore[arg-type]
    fo2 = np.fromiter((s.gas.fo2 for s in segs), float, n)
    fhe = np.fromiter((s.gas.fhe for s in segs), float, n)
    if log.source.format == "csv":
        ex = Executed(t=t, depth=depth, fo2=fo2, fhe=fhe, place=np.full(n, "water"),
                      surface_interval=np.zeros(n, dtype=bool), unit=unit, water=prof.water,
                      p_surface_bar=prof.p_surface_bar, max_depth=float(depth.max()),
                      bottom_time_min=None, bottom_time_basis=log.bottom_time_basis,
                      source="csv")
        _recorder_events(ex, log.bottom_time_min, chamber_expected, last_water_stop,
                         chamber_depth, step)
        return ex
    place = np.array([s.place for s in segs])
    labels = np.array([s.label for s in segs], dtype=str)
    events: dict[str, float] = {}
    for e in log.events:
        key = str(e.get("event", "")).replace("-", "_")
        if key in EVENTS and key not in events:
            events[key] = float(e["t_min"])
    if "left_last_water_stop" in events and "left_bottom" not in events:
        events["left_bottom"] = events["left_last_water_stop"]
    max_depth = log.max_depth
    if prof.unit != unit:
        max_depth = float(convert_depth(max_depth, prof.unit, unit, prof.water))  # type: ignore[arg-type]
    return Executed(
        t=t, depth=depth, fo2=fo2, fhe=fhe, place=place,
        surface_interval=np.char.startswith(labels, SURFACE_INTERVAL), unit=unit,
        water=prof.water, p_surface_bar=prof.p_surface_bar, max_depth=float(max_depth),
        bottom_time_min=log.bottom_time_min, bottom_time_basis=log.bottom_time_basis,
        events=events, source="toml", held=labels == "stop",
    )

