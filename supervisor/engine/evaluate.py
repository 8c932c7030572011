"""Run any profile (a plan, a schedule, an executed log) through ZH-L16 with gradient factors.

Gives the ceiling along the profile, whether and where it is broken, the surfacing
gradient factor and controlling compartment, each compartment's loading at the end
as a share of its limit, and the final tensions to carry across a surface interval.

References
----------
.. [1] Bühlmann, A. A., Völlm, E. B., Nussberger, P., Tauchmedizin, Springer, 2002.
.. [2] Baker, E. C., "Understanding M-values", Immersed 3(3), 1998 (gradient factors).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from supervisor import constants as C
from supervisor.engine import buhlmann as bm
from supervisor.engine.kinetics import saturated_tensions, tissue_tensions
from supervisor.errors import InputError
from supervisor.gas import AIR
from supervisor.profile import Profile
from supervisor.units import bar_per_depth_unit

#: Label (prefix) of the segments of a surface-decompression interval, from leaving
#: the last water stop to arriving at chamber depth; the ceiling is expected to be
#: exceeded there and :func:`evaluate_profile` reports it apart.
SURFACE_INTERVAL = "surface interval"
#: Longest piece of a level segment [min] (its ends bound its ceiling; see _samples).
_LEVEL_SAMPLE_MIN = 5.0


@dataclass
class ProfileEvaluation:
    """A profile run through the model: ceilings, supersaturation and final tensions.

    Attributes
    ----------
    t_min, depth, ceiling_depth : ndarray
        Sample times [min], depths and the gradient-factor ceiling [profile unit]
        (0 where the ceiling is at or above the surface).
    ceiling_broken : bool
        True if, in the water or the chamber, a sample lies above the ceiling.
    worst_excess_bar : float
        Largest (ceiling - ambient) pressure over those samples [bar]; <= 0 when never broken.
    first_break_min : float or None
        Time of the first broken sample [min].
    max_gf : float
        Largest supersaturation, as a fraction of the M-value gradient, in water or chamber.
    surfacing_gf : float
        Supersaturation at the end of the profile [-].
    controlling_compartment : str
        Compartment with the largest supersaturation at the end.
    loading_percent_of_limit : ndarray
        Each compartment's tension at the end as a share of the tension allowed at
        the surface with GF high [%].
    surfacing_gf_by_compartment : ndarray
        Each compartment's supersaturation at the end [-]: the same definition as
        ``surfacing_gf`` (its largest value); negative for a compartment whose inert-gas
        tension is below the surface pressure (undersaturated).
    surface_interval_max_gf : float or None
        Largest supersaturation during ``place == "surface"`` segments (surface decompression).
    final_p_n2, final_p_he : ndarray
        Tensions at the end [bar], to carry across a surface interval.
    first_stop_depth : float or None
        Depth the gradient-factor line was anchored at.
    coefficient_status : str
        Least certain source status of the coefficients used.
    labels : tuple of str
        Compartment labels.
    """

    t_min: NDArray[np.float64]
    depth: NDArray[np.float64]
    ceiling_depth: NDArray[np.float64]
    ceiling_broken: bool
    worst_excess_bar: float
    first_break_min: float | None
    max_gf: float
    surfacing_gf: float
    controlling_compartment: str
    loading_percent_of_limit: NDArray[np.float64]
    surface_interval_max_gf: float | None
    final_p_n2: NDArray[np.float64]
    final_p_he: NDArray[np.float64]
    first_stop_depth: float | None
    coefficient_status: str
    labels: tuple[str, ...]
    surfacing_gf_by_compartment: NDArray[np.float64] = field(
        default_factory=lambda: np.zeros(0), repr=False)


@dataclass(frozen=True)
class ProfileArrays:
    """A profile as one array per segment attribute: the evaluation's input.

    Built from a :class:`~supervisor.profile.Profile` by :meth:`from_profile`, or
    directly from sampled depths (an executed log) without a Python object per
    sample.

    Attributes
    ----------
    minutes, start_depth, end_depth : ndarray
        Duration [min] and depths at the ends [profile unit] of each segment.
    fn2, fhe : ndarray
        Inert-gas fractions breathed [-].
    inside : ndarray of bool
        True for segments in the water or the chamber that the ceiling check
        covers; False on the surface and in a ``surface interval`` of surface
        decompression.
    unit : {"fsw", "msw", "ft", "m"}
        Depth unit.
    water : {"salt", "fresh"}
        Water, for length units.
    p_surface_bar : float
        Absolute surface pressure [bar].
    """

    minutes: NDArray[np.float64]
    start_depth: NDArray[np.float64]
    end_depth: NDArray[np.float64]
    fn2: NDArray[np.float64]
    fhe: NDArray[np.float64]
    inside: NDArray[np.bool_]
    unit: str
    water: str
    p_surface_bar: float

    @classmethod
    def from_profile(cls, profile: Profile) -> ProfileArrays:
        """The arrays of a profile's segments."""
        segs = profile.segments
        if not segs:
            raise InputError("profile", "the profile has no segments")
        n = len(segs)
        place = np.array([s.place for s in segs])
        labels = np.array([s.label for s in segs], dtype=str)
        return cls(
            minutes=np.fromiter((s.minutes for s in segs), float, n),
            start_depth=np.fromiter((s.start_depth for s in segs), float, n),
            end_depth=np.fromiter((s.end_depth for s in segs), float, n),
            fn2=np.fromiter((s.gas.fn2 for s in segs), float, n),
            fhe=np.fromiter((s.gas.fhe for s in segs), float, n),
            inside=(place != "surface") & ~np.char.startswith(labels, SURFACE_INTERVAL),
            unit=profile.unit, water=profile.water, p_surface_bar=profile.p_surface_bar,
        )

    @property
    def max_depth(self) -> float:
        """Deepest point [unit]."""
        return float(max(self.start_depth.max(), self.end_depth.max()))


def infer_first_stop(profile: Profile | ProfileArrays) -> float | None:
    """Depth of the first stop: the deepest level segment shallower than the maximum depth.

    Only level segments after the profile first leaves its maximum depth count.
    Returns None when the profile has no stop.
    """
    a = profile if isinstance(profile, ProfileArrays) else ProfileArrays.from_profile(profile)
    d0, d1 = a.start_depth, a.end_depth
    dmax = a.max_depth
    leaving = (d0 >= dmax - 1e-9) & (d1 < d0)
    if not leaving.any():
        return None
    after = np.arange(d0.size) > int(np.argmax(leaving))
    stop = after & (a.minutes > 0) & (np.abs(d0 - d1) < 1e-9) & (d0 > 0) & (d0 < dmax)
    return float(d0[stop].max()) if stop.any() else None


def _samples(a: ProfileArrays, max_sample_min: float) -> dict[str, NDArray]:
    """Sub-sampled segment arrays of one profile (depths in its unit)."""
    # Travel is cut into pieces of at most max_sample_min.  At constant depth every
    # compartment's ceiling moves monotonically, so the worst point of a level segment is
    # one of its ends: level segments are cut only coarsely (for the chart).
    piece = np.where(a.start_depth != a.end_depth, max_sample_min, _LEVEL_SAMPLE_MIN)
    n = np.maximum(1, np.ceil(a.minutes / piece - 1e-9).astype(int))
    idx = np.repeat(np.arange(n.size), n)
    pos = np.arange(idx.size) - np.repeat(np.cumsum(n) - n, n)
    k = n[idx]
    frac_end = (pos + 1) / k
    frac_start = pos / k
    d0 = a.start_depth[idx]
    d1 = a.end_depth[idx]
    return {
        "minutes": a.minutes[idx] / k,
        "da": d0 + (d1 - d0) * frac_start,
        "db": d0 + (d1 - d0) * frac_end,
        "fn2": a.fn2[idx],
        "fhe": a.fhe[idx],
        "inside": a.inside[idx],
    }


def evaluate_profile(
    profile: Profile | ProfileArrays,
    model: str = "zhl16c",
    gf_low: float = 0.30,
    gf_high: float = 0.85,
    p_n2_0: NDArray[np.float64] | None = None,
    p_he_0: NDArray[np.float64] | None = None,
    first_stop_depth: float | None = None,
    ph2o_bar: float = C.PH2O_BAR,
    max_sample_min: float = 0.5,
) -> ProfileEvaluation:
    """Run a profile through ZH-L16 with gradient factors.

    Parameters
    ----------
    profile : Profile or ProfileArrays
        The dive (or chamber run); segments are subdivided to at most
        ``max_sample_min`` so ceilings are checked inside travel segments too.
    model : {"zhl16a", "zhl16b", "zhl16c"}
        Coefficient set.
    gf_low, gf_high : float
        Gradient factors [-].
    p_n2_0, p_he_0 : ndarray or None
        Starting tensions [bar]; default saturated with air at the surface.
    first_stop_depth : float or None
        Anchor of the gradient-factor line [profile unit]; inferred from the
        profile's first stop when None.
    ph2o_bar : float
        Water-vapour pressure [bar].
    max_sample_min : float
        Longest sub-segment [min].

    Returns
    -------
    ProfileEvaluation
    """
    return evaluate_profiles(
        [profile], model, gf_low, gf_high,
        None if p_n2_0 is None else [p_n2_0],
        None if p_he_0 is None else [p_he_0],
        [first_stop_depth], ph2o_bar, max_sample_min,
    )[0]


def evaluate_profiles(
    profiles: Sequence[Profile | ProfileArrays],
    model: str = "zhl16c",
    gf_low: float = 0.30,
    gf_high: float = 0.85,
    p_n2_0: list[NDArray[np.float64] | None] | None = None,
    p_he_0: list[NDArray[np.float64] | None] | None = None,
    first_stop_depths: list[float | None] | None = None,
    ph2o_bar: float = C.PH2O_BAR,
    max_sample_min: float = 0.5,
) -> list[ProfileEvaluation]:
    """Run many profiles through the model in one vectorised pass.

    Profiles (or their :class:`ProfileArrays`, e.g. of an executed log) are
    padded with zero-length segments to a common length and
    integrated as one batch (:func:`supervisor.engine.kinetics.tissue_tensions`);
    the parameters are those of :func:`evaluate_profile`, given per profile
    where they are lists.

    Returns
    -------
    list of ProfileEvaluation, in the order of the profiles.
    """
    if model not in bm.MODELS:
        raise InputError(
            "model", f"unknown model {model!r}; expected one of {', '.join(bm.MODELS)}"
        )
    c = bm.load_coefficients(model)
    nprof = len(profiles)
    if nprof == 0:
        return []
    arrays = [p if isinstance(p, ProfileArrays) else ProfileArrays.from_profile(p)
              for p in profiles]
    samples = [_samples(p, max_sample_min) for p in arrays]
    width = max(sm["minutes"].size for sm in samples)
    mins = np.zeros((nprof, width))
    pa = np.empty((nprof, width))
    pb = np.empty((nprof, width))
    fn2 = np.zeros((nprof, width))
    fhe = np.zeros((nprof, width))
    pn0 = np.empty((nprof, c.n))
    ph0 = np.zeros((nprof, c.n))
    for j, (prof, sm) in enumerate(zip(arrays, samples, strict=True)):
        m = sm["minutes"].size
        bpu = bar_per_depth_unit(prof.unit, prof.water)  # type: ignore[arg-type]
        ps = prof.p_surface_bar
        mins[j, :m] = sm["minutes"]
        pa[j, :m] = ps + sm["da"] * bpu
        pb[j, :m] = ps + sm["db"] * bpu
        pa[j, m:] = pb[j, m:] = pb[j, m - 1]
        fn2[j, :m], fhe[j, :m] = sm["fn2"], sm["fhe"]
        fn2[j, m:], fhe[j, m:] = sm["fn2"][-1], sm["fhe"][-1]
        n0 = None if p_n2_0 is None else p_n2_0[j]
        h0 = None if p_he_0 is None else p_he_0[j]
        pn0[j] = saturated_tensions(ps, AIR.fn2, c.n, ph2o_bar) if n0 is None else n0
        if h0 is not None:
            ph0[j] = h0
    tn_all = tissue_tensions(mins, pa, pb, fn2, c.n2_half, pn0, ph2o_bar)
    th_all = tissue_tensions(mins, pa, pb, fhe, c.he_half, ph0, ph2o_bar)
    out = []
    for j, (prof, sm) in enumerate(zip(arrays, samples, strict=True)):
        m = sm["minutes"].size
        tn, th = tn_all[j, :m], th_all[j, :m]
        ps = prof.p_surface_bar
        bpu = bar_per_depth_unit(prof.unit, prof.water)  # type: ignore[arg-type]
        fs_in = None if first_stop_depths is None else first_stop_depths[j]
        fs = infer_first_stop(prof) if fs_in is None else fs_in
        db = sm["db"]
        gf = bm.gf_at_depth(db, fs if fs else 0.0, gf_low, gf_high)[:, None]
        p_b = pb[j, :m]
        ceil = bm.ceiling(tn, th, c, gf).max(axis=1)  # bar
        excess = ceil - p_b
        inside = sm["inside"]
        broken = inside & (excess > 1e-6)
        gfs = bm.gradient_factor(tn, th, p_b[:, None], c).max(axis=1)
        t_end = np.cumsum(sm["minutes"])
        surf_gf = bm.gradient_factor(tn[-1], th[-1], ps, c)
        ctrl = int(np.argmax(surf_gf))
        allowed = bm.allowed_tension(ps, tn[-1], th[-1], c, gf_high)
        uses_he = bool(np.any(sm["fhe"] > 0) or np.any(ph0[j] > 0))
        out.append(
            ProfileEvaluation(
                t_min=np.concatenate([[0.0], t_end]),
                depth=np.concatenate([[prof.start_depth[0]], db]),
                ceiling_depth=np.concatenate([[0.0], np.maximum((ceil - ps) / bpu, 0.0)]),
                ceiling_broken=bool(broken.any()),
                worst_excess_bar=float(excess[inside].max()) if inside.any() else float("-inf"),
                first_break_min=float(t_end[np.argmax(broken)]) if broken.any() else None,
                max_gf=float(gfs[inside].max()) if inside.any() else float("nan"),
                surfacing_gf=float(surf_gf[ctrl]),
                controlling_compartment=c.labels[ctrl],
                loading_percent_of_limit=100.0 * (tn[-1] + th[-1]) / allowed,
                surface_interval_max_gf=float(gfs[~inside].max()) if (~inside).any() else None,
                final_p_n2=tn[-1].copy(),
                final_p_he=th[-1].copy(),
                first_stop_depth=fs,
                coefficient_status=c.status_for(uses_he),
                labels=c.labels,
                surfacing_gf_by_compartment=np.asarray(surf_gf, dtype=float).copy(),
            )
        )
    return out
