"""Inert-gas tissue kinetics: exact Schreiner integration over linear depth segments.

Each compartment obeys dP/dt = k (P_alv(t) - P), k = ln 2 / half-time, where the
inspired (alveolar) inert-gas pressure P_alv = (P_amb - PH2O) * f_inert changes
linearly within a segment.  Its exact solution over a segment of length t is the
Schreiner equation

    P(t) = P_alv0 + R (t - 1/k) - (P_alv0 - P0 - R/k) exp(-k t),

with R the rate of change of P_alv.  Written as P_n = d_n P_(n-1) + c_n with
d_n = exp(-k t_n), a profile is a linear recurrence.  :func:`tissue_tensions`
solves it for every segment, every compartment and a batch of profiles at once,
without a Python loop over segments: within a block of segments,

    P_n = exp(-k (T_n - T_ref)) * [P_ref + sum_(j<=n) c_j exp(k (T_j - T_ref))],

T being elapsed time; blocks are cut so the exponent stays far from overflow and
the working arrays stay in cache.

References
----------
.. [1] Schreiner, H. R. and Kelley, P. L., "A pragmatic view of decompression",
       in Lambertsen (ed.), Underwater Physiology IV, Academic Press, 1971.
.. [2] Bühlmann, A. A., Völlm, E. B., Nussberger, P., Tauchmedizin, 5th ed.,
       Springer, 2002 (water vapour subtraction, half-time form).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from supervisor import constants as C
from supervisor.errors import InputError

LN2 = float(np.log(2.0))

#: Largest k * (time span) allowed inside one block of the vectorised scan.
#: exp(600) ~ 4e260 stays below the float64 maximum (~1.8e308) with margin.
_MAX_EXPONENT = 600.0
#: Largest number of segments in one block (keeps the working arrays in cache).
_BLOCK_LEN = 2048


def rate_constant(half_time_min: ArrayLike) -> NDArray[np.float64]:
    """Rate constant k = ln 2 / half-time.

    Parameters
    ----------
    half_time_min : array_like
        Compartment half-times [min], > 0.

    Returns
    -------
    ndarray
        Rate constants [1/min].
    """
    h = np.asarray(half_time_min, dtype=float)
    if np.any(h <= 0) or not np.all(np.isfinite(h)):
        raise InputError("half_time_min", "half-times must be finite and > 0 min")
    return LN2 / h


def inspired_pressure(
    p_amb_bar: ArrayLike, f_inert: ArrayLike, ph2o_bar: float = C.PH2O_BAR
) -> NDArray[np.float64]:
    """Inspired (alveolar) inert-gas pressure with the water-vapour subtraction.

    Parameters
    ----------
    p_amb_bar : array_like
        Absolute ambient pressure [bar].
    f_inert : array_like
        Inert-gas fraction of the breathing gas [-].
    ph2o_bar : float
        Water-vapour pressure subtracted [bar]; 0.0627 by default [2].

    Returns
    -------
    ndarray
        (P_amb - PH2O) * f_inert [bar], never below zero.
    """
    p = np.asarray(p_amb_bar, dtype=float)
    return np.maximum(p - ph2o_bar, 0.0) * np.asarray(f_inert, dtype=float)


def saturated_tensions(
    p_amb_bar: float,
    f_inert: float,
    n_compartments: int,
    ph2o_bar: float = C.PH2O_BAR,
) -> NDArray[np.float64]:
    """Tensions of compartments saturated at a constant ambient pressure.

    Parameters
    ----------
    p_amb_bar : float
        Absolute ambient pressure [bar] (surface pressure for a diver at rest).
    f_inert : float
        Inert-gas fraction breathed [-] (0.79 N2 for air).
    n_compartments : int
        Number of compartments.
    ph2o_bar : float
        Water-vapour pressure [bar].

    Returns
    -------
    ndarray, shape (n_compartments,)
        Tension [bar] equal to the inspired inert-gas pressure.
    """
    return np.full(n_compartments, float(inspired_pressure(p_amb_bar, f_inert, ph2o_bar)))


def schreiner(
    p0_bar: ArrayLike,
    p_alv0_bar: ArrayLike,
    rate_bar_min: ArrayLike,
    minutes: ArrayLike,
    k_per_min: ArrayLike,
) -> NDArray[np.float64]:
    """Schreiner equation for one linear segment (elementwise, broadcasting).

    Parameters
    ----------
    p0_bar : array_like
        Tension at the start of the segment [bar].
    p_alv0_bar : array_like
        Inspired inert-gas pressure at the start [bar].
    rate_bar_min : array_like
        Rate of change of the inspired inert-gas pressure [bar/min].
    minutes : array_like
        Segment duration [min], >= 0.
    k_per_min : array_like
        Rate constant [1/min].

    Returns
    -------
    ndarray
        Tension at the end of the segment [bar].

    Notes
    -----
    P = P_alv0 + R (t - 1/k) - (P_alv0 - P0 - R/k) e^(-k t)  [1].
    With R = 0 this is the Haldane equation P = P0 + (P_alv - P0)(1 - 2^(-t/t_half)).
    """
    p0 = np.asarray(p0_bar, dtype=float)
    pa = np.asarray(p_alv0_bar, dtype=float)
    r = np.asarray(rate_bar_min, dtype=float)
    t = np.asarray(minutes, dtype=float)
    k = np.asarray(k_per_min, dtype=float)
    one_minus_d = -np.expm1(-k * t)
    return p0 * (1.0 - one_minus_d) + pa * one_minus_d + r * (t - one_minus_d / k)


def _block_starts(
    t_span: NDArray[np.float64], k_max: float, max_len: int = _BLOCK_LEN
) -> list[int]:
    """Indices where blocks of the scan start.

    A block holds at most ``max_len`` segments (so its arrays stay in cache) and
    spans at most ``_MAX_EXPONENT / k_max`` minutes (so the growth factor cannot
    overflow); a single segment longer than that forms a block of its own.
    """
    n = t_span.shape[-1]
    cum = np.cumsum(t_span)
    starts = [0]
    limit = _MAX_EXPONENT / k_max
    while True:
        s = starts[-1]
        base = cum[s - 1] if s > 0 else 0.0
        e = int(np.searchsorted(cum, base + limit, side="right"))
        e = min(max(e, s + 1), s + max_len)
        if e >= n:
            return starts
        starts.append(e)


def tissue_tensions(
    minutes: ArrayLike,
    p_start_bar: ArrayLike,
    p_end_bar: ArrayLike,
    f_inert: ArrayLike,
    half_time_min: ArrayLike,
    p_tissue0_bar: ArrayLike,
    ph2o_bar: float = C.PH2O_BAR,
) -> NDArray[np.float64]:
    """Tensions at the end of every segment, for every compartment and profile.

    Parameters
    ----------
    minutes : array_like, shape (..., n_seg)
        Segment durations [min], >= 0.  Zero-length segments are allowed
        (they change nothing), so profiles of unequal length can be padded.
    p_start_bar, p_end_bar : array_like, shape (..., n_seg)
        Absolute ambient pressure at the start and end of each segment [bar].
    f_inert : array_like, shape (..., n_seg)
        Inert-gas fraction breathed in each segment [-].
    half_time_min : array_like, shape (n_comp,)
        Compartment half-times [min].
    p_tissue0_bar : array_like, shape (..., n_comp) or scalar
        Tensions at the start of the first segment [bar].
    ph2o_bar : float
        Water-vapour pressure [bar].

    Returns
    -------
    ndarray, shape (..., n_seg, n_comp)
        Tension at the end of each segment [bar].

    Notes
    -----
    Exact (closed form) for linear segments [1]; vectorised over segments by the
    block scan described in the module docstring.
    """
    t = np.asarray(minutes, dtype=float)
    if t.ndim == 0:
        raise InputError("minutes", "expected an array of segment durations")
    if np.any(t < 0) or not np.all(np.isfinite(t)):
        raise InputError("minutes", "segment durations must be finite and >= 0 min")
    p1 = np.broadcast_to(np.asarray(p_start_bar, dtype=float), t.shape)
    p2 = np.broadcast_to(np.asarray(p_end_bar, dtype=float), t.shape)
    f = np.broadcast_to(np.asarray(f_inert, dtype=float), t.shape)
    k = rate_constant(half_time_min)
    n_comp = k.shape[0]
    batch = t.shape[:-1]
    p0 = np.broadcast_to(np.asarray(p_tissue0_bar, dtype=float), batch + (n_comp,))
    if not np.any(f) and not np.any(p0):
        # no inert gas breathed and none in the tissues (helium on an air dive): every
        # tension stays exactly zero, so the scan is skipped
        return np.zeros(batch + (t.shape[-1], n_comp))

    pa1 = inspired_pressure(p1, f, ph2o_bar)
    pa2 = inspired_pressure(p2, f, ph2o_bar)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = np.where(t > 0, (pa2 - pa1) / np.where(t > 0, t, 1.0), 0.0)

    n_seg = t.shape[-1]
    out = np.empty(batch + (n_seg, n_comp))
    if n_seg == 0:
        return out
    # Flatten the batch; scan cache-sized groups of profiles, each in blocks of segments.
    rows = int(np.prod(batch)) if batch else 1
    t2, pa2_, r2 = t.reshape(rows, n_seg), pa1.reshape(rows, n_seg), r.reshape(rows, n_seg)
    p02 = np.array(p0, dtype=float).reshape(rows, n_comp)
    out2 = out.reshape(rows, n_seg, n_comp)
    group = max(1, _BLOCK_LEN // n_seg)
    for g0 in range(0, rows, group):
        g1 = min(rows, g0 + group)
        _scan(t2[g0:g1], pa2_[g0:g1], r2[g0:g1], p02[g0:g1], k, out2[g0:g1])
    return out


def _scan(t, pa1, r, p_ref, k, out) -> None:
    """Block scan of the Schreiner recurrence for a group of profiles (2-D inputs)."""
    n_seg = t.shape[-1]
    # One block boundary set for the group, from the longest span per index.
    starts = _block_starts(t.max(axis=0), float(k.max()))
    ends = starts[1:] + [n_seg]
    inv_k = 1.0 / k
    for s, e in zip(starts, ends, strict=True):
        if e - s == 1:
            # a single segment (possibly longer than the block limit): closed form
            block = schreiner(p_ref, pa1[..., s, None], r[..., s, None], t[..., s, None], k)
            out[..., s, :] = block
            p_ref = block
            continue
        tb = t[..., s:e]
        # G_j = exp(k (T_j - T_ref)); c_j G_j = (G_j - G_(j-1)) (P_alv0 - R/k) + R t_j G_j
        grow = np.exp(np.cumsum(tb, axis=-1)[..., None] * k)
        acc = np.empty_like(grow)
        acc[..., 0, :] = 1.0
        acc[..., 1:, :] = grow[..., :-1, :]
        np.subtract(grow, acc, out=acc)
        tmp = pa1[..., s:e, None] - r[..., s:e, None] * inv_k
        np.multiply(acc, tmp, out=acc)
        np.multiply(grow, (r[..., s:e] * tb)[..., None], out=tmp)
        np.add(acc, tmp, out=acc)
        np.cumsum(acc, axis=-2, out=acc)
        acc += p_ref[..., None, :]
        block = out[..., s:e, :]
        np.divide(acc, grow, out=block)
        p_ref = block[..., -1, :]


def final_tensions(
    minutes: ArrayLike,
    p_start_bar: ArrayLike,
    p_end_bar: ArrayLike,
    f_inert: ArrayLike,
    half_time_min: ArrayLike,
    p_tissue0_bar: ArrayLike,
    ph2o_bar: float = C.PH2O_BAR,
) -> NDArray[np.float64]:
    """Tensions at the end of the last segment; see :func:`tissue_tensions`.

    Returns
    -------
    ndarray, shape (..., n_comp)
        Final tension [bar]; the start tensions when there are no segments.
    """
    t = np.asarray(minutes, dtype=float)
    if t.shape[-1] == 0:
        k = rate_constant(half_time_min)
        return np.broadcast_to(
            np.asarray(p_tissue0_bar, dtype=float), t.shape[:-1] + (k.shape[0],)
        ).copy()
    return tissue_tensions(
        minutes, p_start_bar, p_end_bar, f_inert, half_time_min, p_tissue0_bar, ph2o_bar
    )[..., -1, :]
