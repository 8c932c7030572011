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

import math
from dataclasses import dataclass

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


def infer_first_stop(profile: Profile) -> float | None:
    """Depth of the first stop: the deepest level segment shallower than the maximum depth.

    Only level segments after the profile first leaves its maximum depth count.
    Returns None when the profile has no stop.
    """
    dmax = profile.max_depth
    left_bottom = False
    best = None
    for s in profile.segments:
        if not left_bottom:
            if s.start_depth >= dmax - 1e-9 and s.end_depth < s.start_depth:
                left_bottom = True
            continue
        if s.minutes > 0 and abs(s.start_depth - s.end_depth) < 1e-9 and 0 < s.start_depth < dmax:
            best = s.start_depth if best is None else max(best, s.start_depth)
    return best


def evaluate_profile(
    profile: Profile,
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
    profile : Profile
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
    if model not in bm.MODELS:
        raise InputError(
            "model", f"unknown model {model!r}; expected one of {', '.join(bm.MODELS)}"
        )
    c = bm.load_coefficients(model)
    if not profile.segments:
        raise InputError("profile", "the profile has no segments")
    bpu = bar_per_depth_unit(profile.unit, profile.water)  # type: ignore[arg-type]
    ps = profile.p_surface_bar
    n = np.array(
        [max(1, int(math.ceil(s.minutes / max_sample_min - 1e-9))) for s in profile.segments]
    )
    seg_idx = np.repeat(np.arange(len(profile.segments)), n)
    frac_end = np.concatenate([np.arange(1, k + 1) / k for k in n])
    frac_start = np.concatenate([np.arange(0, k) / k for k in n])
    d0 = np.array([s.start_depth for s in profile.segments])[seg_idx]
    d1 = np.array([s.end_depth for s in profile.segments])[seg_idx]
    mins = np.array([s.minutes for s in profile.segments])[seg_idx] / n[seg_idx]
    da = d0 + (d1 - d0) * frac_start
    db = d0 + (d1 - d0) * frac_end
    fn2 = np.array([s.gas.fn2 for s in profile.segments])[seg_idx]
    fhe = np.array([s.gas.fhe for s in profile.segments])[seg_idx]
    place = np.array([s.place for s in profile.segments])[seg_idx]
    pn0 = saturated_tensions(ps, AIR.fn2, c.n, ph2o_bar) if p_n2_0 is None else np.asarray(p_n2_0)
    ph0 = np.zeros(c.n) if p_he_0 is None else np.asarray(p_he_0)
    pa, pb = ps + da * bpu, ps + db * bpu
    tn = tissue_tensions(mins, pa, pb, fn2, c.n2_half, pn0, ph2o_bar)
    th = tissue_tensions(mins, pa, pb, fhe, c.he_half, ph0, ph2o_bar)
    fs = infer_first_stop(profile) if first_stop_depth is None else first_stop_depth
    gf = bm.gf_at_depth(db, fs if fs else 0.0, gf_low, gf_high)[:, None]
    ceil = bm.ceiling(tn, th, c, gf).max(axis=1)  # bar
    excess = ceil - pb
    labels = np.array([s.label for s in profile.segments])[seg_idx]
    inside = (place != "surface") & ~np.char.startswith(labels.astype(str), SURFACE_INTERVAL)
    broken = inside & (excess > 1e-6)
    gfs = bm.gradient_factor(tn, th, pb[:, None], c).max(axis=1)
    t_end = np.cumsum(mins)
    surf_gf = bm.gradient_factor(tn[-1], th[-1], ps, c)
    ctrl = int(np.argmax(surf_gf))
    allowed = bm.allowed_tension(ps, tn[-1], th[-1], c, gf_high)
    uses_he = bool(np.any(fhe > 0) or np.any(ph0 > 0))
    return ProfileEvaluation(
        t_min=np.concatenate([[0.0], t_end]),
        depth=np.concatenate([[profile.segments[0].start_depth], db]),
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
    )
