"""A dive or chamber run as time-ordered linear segments.

Each segment goes linearly in depth from ``start_depth`` to ``end_depth`` over
``minutes`` on one gas, in the water or in a chamber.  A profile is built from
a schedule (descent, bottom, stops, travel) or from sampled depths of a log.
Depths are in the profile's unit; :meth:`Profile.arrays` gives the engine its
inputs in bar absolute and minutes.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from supervisor import constants as C
from supervisor.errors import InputError
from supervisor.gas import AIR, Gas, parse_gas
from supervisor.units import DepthUnit, Water, bar_per_depth_unit

Place = Literal["water", "chamber", "surface"]


@dataclass(frozen=True)
class Segment:
    """One linear segment of a profile.

    Parameters
    ----------
    start_depth, end_depth : float
        Depth at the start and end of the segment [profile unit], >= 0.
    minutes : float
        Duration [min], >= 0.
    gas : Gas
        Breathing gas.
    place : {"water", "chamber", "surface"}
        Where the diver is; a chamber depth is the chamber's pressure in the
        profile's unit.
    label : str
        Free text such as ``"descent"``, ``"bottom"``, ``"stop"``, ``"travel"``.
    """

    start_depth: float
    end_depth: float
    minutes: float
    gas: Gas = AIR
    place: Place = "water"
    label: str = ""

    def __post_init__(self) -> None:
        if self.minutes < 0 or not np.isfinite(self.minutes):
            raise InputError("segment.minutes", f"got {self.minutes!r}; expected >= 0 min")
        for name in ("start_depth", "end_depth"):
            v = getattr(self, name)
            if v < 0 or not np.isfinite(v):
                raise InputError(f"segment.{name}", f"got {v!r}; expected a depth >= 0")

    @property
    def rate(self) -> float:
        """Rate of depth change [unit/min]; positive going down, 0 for a level segment."""
        if self.minutes == 0:
            return 0.0
        return (self.end_depth - self.start_depth) / self.minutes


@dataclass
class ProfileArrays:
    """Engine inputs of a profile: one entry per segment.

    Attributes
    ----------
    minutes : ndarray
        Segment durations [min].
    p_start, p_end : ndarray
        Absolute ambient pressure at segment start and end [bar].
    fo2, fhe, fn2 : ndarray
        Breathing-gas fractions [-].
    t_end : ndarray
        Elapsed time at the end of each segment [min].
    """

    minutes: NDArray[np.float64]
    p_start: NDArray[np.float64]
    p_end: NDArray[np.float64]
    fo2: NDArray[np.float64]
    fhe: NDArray[np.float64]
    fn2: NDArray[np.float64]
    t_end: NDArray[np.float64]


@dataclass
class Profile:
    """A time-ordered list of segments with the unit and surface conditions.

    Parameters
    ----------
    segments : list of Segment
        Segments in time order.
    unit : {"fsw", "msw", "ft", "m"}
        Unit of all depths.
    p_surface_bar : float
        Absolute surface pressure [bar] (lower at altitude).
    water : {"salt", "fresh"}
        Water, used only for length units.
    """

    segments: list[Segment] = field(default_factory=list)
    unit: DepthUnit = "fsw"
    p_surface_bar: float = C.P_ATM_BAR
    water: Water = "salt"

    def add(
        self,
        end_depth: float,
        minutes: float,
        gas: Gas | str | None = None,
        place: Place | None = None,
        label: str = "",
    ) -> Profile:
        """Append a segment from the current depth to ``end_depth``; return self.

        ``gas`` and ``place`` default to those of the previous segment (air, water).
        """
        start = self.segments[-1].end_depth if self.segments else 0.0
        prev = self.segments[-1] if self.segments else None
        g = parse_gas(gas) if isinstance(gas, str) else gas
        if g is None:
            g = prev.gas if prev else AIR
        pl = place or (prev.place if prev else "water")
        self.segments.append(Segment(start, end_depth, minutes, g, pl, label))
        return self

    @property
    def duration_min(self) -> float:
        """Total duration [min]."""
        return float(sum(s.minutes for s in self.segments))

    @property
    def max_depth(self) -> float:
        """Deepest point [unit]."""
        if not self.segments:
            return 0.0
        return float(max(max(s.start_depth, s.end_depth) for s in self.segments))

    def arrays(self) -> ProfileArrays:
        """Return the engine inputs (bar absolute, minutes, fractions) per segment."""
        k = bar_per_depth_unit(self.unit, self.water)
        n = len(self.segments)
        minutes = np.fromiter((s.minutes for s in self.segments), float, n)
        d0 = np.fromiter((s.start_depth for s in self.segments), float, n)
        d1 = np.fromiter((s.end_depth for s in self.segments), float, n)
        fo2 = np.fromiter((s.gas.fo2 for s in self.segments), float, n)
        fhe = np.fromiter((s.gas.fhe for s in self.segments), float, n)
        fn2 = np.fromiter((s.gas.fn2 for s in self.segments), float, n)
        return ProfileArrays(
            minutes=minutes,
            p_start=self.p_surface_bar + d0 * k,
            p_end=self.p_surface_bar + d1 * k,
            fo2=fo2,
            fhe=fhe,
            fn2=fn2,
            t_end=np.cumsum(minutes),
        )

    @classmethod
    def from_samples(
        cls,
        times_min: ArrayLike,
        depths: ArrayLike,
        gas: Gas | str | Sequence[Gas | str] = AIR,
        unit: DepthUnit = "fsw",
        p_surface_bar: float = C.P_ATM_BAR,
        water: Water = "salt",
        place: Place = "water",
    ) -> Profile:
        """Build a profile from sampled depths (a depth log), linear between samples.

        Parameters
        ----------
        times_min : array_like
            Sample times [min], strictly increasing.
        depths : array_like
            Depth at each sample [unit], >= 0.
        gas : Gas, str or sequence
            One gas for the whole log, or one gas per interval (len(times) - 1).
        unit, p_surface_bar, water, place
            As for :class:`Profile`.

        Returns
        -------
        Profile
        """
        t = np.asarray(times_min, dtype=float)
        d = np.asarray(depths, dtype=float)
        if t.ndim != 1 or d.shape != t.shape or t.size < 2:
            raise InputError("samples", "times and depths must be 1-D of equal length >= 2")
        if np.any(np.diff(t) <= 0):
            raise InputError("samples.time", "sample times must be strictly increasing")
        if np.any(d < 0) or not np.all(np.isfinite(d)):
            raise InputError("samples.depth", "depths must be finite and >= 0")
        n = t.size - 1
        if isinstance(gas, (Gas, str)):
            gases = [parse_gas(gas)] * n
        else:
            gases = [parse_gas(g) for g in gas]
            if len(gases) != n:
                raise InputError("samples.gas", f"expected {n} gases (one per interval)")
        dt = np.diff(t)
        segs = [
            Segment(float(d[i]), float(d[i + 1]), float(dt[i]), gases[i], place)
            for i in range(n)
        ]
        return cls(segs, unit, p_surface_bar, water)
