"""Bühlmann ZH-L16 coefficients, M-values and gradient-factor ceilings.

Coefficients are loaded from the bundled files ``tables/models/zhl16{a,b,c}.toml``,
which carry provenance and the source status of every value.  Every model
figure the tool prints carries the status of the coefficient set it used
(:attr:`Coefficients.status_for`).

Relations (absolute pressures in bar):

* M-value (tolerated tension): M(P_amb) = a + P_amb / b.
* Gradient factor: GF = (P_t - P_amb) / (M - P_amb).
* Ceiling with gradient factor: P_amb,tol = (P_t - GF a) / (GF / b + 1 - GF);
  GF = 1 gives Bühlmann's (P_t - a) b.
* Mixed N2 + He: a and b weighted by the compartment N2 and He tensions.

References
----------
.. [1] Bühlmann, A. A., Völlm, E. B., Nussberger, P., Tauchmedizin, 4th ed.
       (1995) and 5th ed. (2002), Springer.
.. [2] Baker, E. C., "Understanding M-values", Immersed 3(3), 1998 (gradient factors).
.. [3] Doolette, D. J., "Gradient factors in a post-deep stops world", InDepth, 2019.
"""

from __future__ import annotations

import functools
import tomllib
from dataclasses import dataclass, field
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from supervisor.errors import InputError, TableError
from supervisor.resources import tables_dir

Model = Literal["zhl16a", "zhl16b", "zhl16c"]
MODELS: tuple[str, ...] = ("zhl16a", "zhl16b", "zhl16c")

#: Source statuses from most to least certain.
STATUS_ORDER: tuple[str, ...] = (
    "VERIFIED",
    "COMPUTED",
    "SECONDARY",
    "OLDER-EDITION",
    "DERIVED",
    "FROM MEMORY",
)


def least_certain(statuses: list[str] | tuple[str, ...] | set[str]) -> str:
    """Return the least certain of several source statuses."""
    ranked = [s for s in statuses if s in STATUS_ORDER]
    if not ranked:
        return "FROM MEMORY"
    return max(ranked, key=STATUS_ORDER.index)


@dataclass(frozen=True)
class Coefficients:
    """A ZH-L16 coefficient set.

    Attributes
    ----------
    model : str
        ``zhl16a``, ``zhl16b`` or ``zhl16c``.
    labels : tuple of str
        Compartment labels (``"1"``, ``"1b"``, ``"2"`` ...).
    n2_half, n2_a, n2_b, he_half, he_a, he_b : ndarray
        Half-times [min], a [bar] and b [-] for nitrogen and helium.
    n2_status, he_status : str
        Least certain source status of the nitrogen and the helium values.
    title, edition : str
        Provenance of the file the set was loaded from.
    """

    model: str
    labels: tuple[str, ...]
    n2_half: NDArray[np.float64]
    n2_a: NDArray[np.float64]
    n2_b: NDArray[np.float64]
    he_half: NDArray[np.float64]
    he_a: NDArray[np.float64]
    he_b: NDArray[np.float64]
    n2_status: str
    he_status: str
    title: str = ""
    edition: str = ""
    value_status: tuple[dict, ...] = field(default=(), repr=False)

    @property
    def n(self) -> int:
        """Number of compartments."""
        return len(self.labels)

    def status_for(self, uses_helium: bool) -> str:
        """Least certain status of the values a computation used.

        Parameters
        ----------
        uses_helium : bool
            Whether any breathing gas of the computation contained helium.

        Returns
        -------
        str
            One of :data:`STATUS_ORDER`.
        """
        if uses_helium:
            return least_certain([self.n2_status, self.he_status])
        return self.n2_status


@functools.cache
def load_coefficients(model: str = "zhl16c") -> Coefficients:
    """Load a bundled ZH-L16 coefficient set.

    Parameters
    ----------
    model : {"zhl16a", "zhl16b", "zhl16c"}
        Coefficient set.

    Returns
    -------
    Coefficients

    Raises
    ------
    InputError
        For an unknown model name.
    TableError
        If the bundled file lacks provenance or a value.
    """
    if model not in MODELS:
        raise InputError("--model", f"unknown model {model!r}; expected one of {', '.join(MODELS)}")
    path = tables_dir() / "models" / f"{model}.toml"
    with path.open("rb") as fh:
        doc = tomllib.load(fh)
    prov = doc.get("provenance")
    if not isinstance(prov, dict) or not prov.get("source_document"):
        raise TableError(f"{path.name}: no provenance; a coefficient file must name its source")
    rows = doc.get("rows") or []
    cols = ("n2_half_min", "n2_a_bar", "n2_b", "he_half_min", "he_a_bar", "he_b")
    try:
        arr = {c: np.array([float(r[c]) for r in rows]) for c in cols}
        labels = tuple(str(r["compartment"]) for r in rows)
        vstat = tuple(dict(r["value_status"]) for r in rows)
    except (KeyError, TypeError, ValueError) as exc:
        raise TableError(f"{path.name}: bad coefficient row ({exc})") from None
    n2_stat = least_certain([v[c] for v in vstat for c in cols[:3]])
    he_stat = least_certain([v[c] for v in vstat for c in cols[3:]])
    return Coefficients(
        model=model,
        labels=labels,
        n2_half=arr["n2_half_min"],
        n2_a=arr["n2_a_bar"],
        n2_b=arr["n2_b"],
        he_half=arr["he_half_min"],
        he_a=arr["he_a_bar"],
        he_b=arr["he_b"],
        n2_status=n2_stat,
        he_status=he_stat,
        title=str(doc.get("title", "")),
        edition=str(prov.get("edition", "")),
        value_status=vstat,
    )


def mixed_coefficients(
    p_n2: ArrayLike, p_he: ArrayLike, c: Coefficients
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Return a and b of each compartment weighted by its N2 and He tensions.

    Parameters
    ----------
    p_n2, p_he : array_like, shape (..., n_comp)
        Compartment tensions [bar].
    c : Coefficients
        Coefficient set.

    Returns
    -------
    a : ndarray
        Weighted a [bar].
    b : ndarray
        Weighted b [-].

    Notes
    -----
    a = (a_N2 P_N2 + a_He P_He) / (P_N2 + P_He), likewise b [1].  With no
    inert gas at all (not physical) the nitrogen values are used.
    """
    pn = np.asarray(p_n2, dtype=float)
    ph = np.asarray(p_he, dtype=float)
    if not ph.any():
        # no helium anywhere (an air or nitrox dive): the nitrogen values, as the weighting
        # with a zero helium share gives them exactly
        shape = np.broadcast_shapes(pn.shape, ph.shape)
        return np.broadcast_to(c.n2_a, shape), np.broadcast_to(c.n2_b, shape)
    tot = pn + ph
    safe = np.where(tot > 0, tot, 1.0)
    w_he = np.where(tot > 0, ph / safe, 0.0)
    a = c.n2_a + (c.he_a - c.n2_a) * w_he
    b = c.n2_b + (c.he_b - c.n2_b) * w_he
    return a, b


def m_value(p_amb_bar: ArrayLike, p_n2: ArrayLike, p_he: ArrayLike, c: Coefficients):
    """Tolerated compartment tension (Bühlmann M-value) at an ambient pressure.

    Parameters
    ----------
    p_amb_bar : array_like
        Absolute ambient pressure [bar], broadcast against the tensions.
    p_n2, p_he : array_like, shape (..., n_comp)
        Compartment tensions [bar] (they set the N2/He weighting).
    c : Coefficients
        Coefficient set.

    Returns
    -------
    ndarray
        M = a + P_amb / b [bar].
    """
    a, b = mixed_coefficients(p_n2, p_he, c)
    return a + np.asarray(p_amb_bar, dtype=float) / b


def ceiling(p_n2: ArrayLike, p_he: ArrayLike, c: Coefficients, gf: ArrayLike = 1.0):
    """Lowest tolerated ambient pressure of each compartment with a gradient factor.

    Parameters
    ----------
    p_n2, p_he : array_like, shape (..., n_comp)
        Compartment tensions [bar].
    c : Coefficients
        Coefficient set.
    gf : array_like
        Gradient factor [-] (1.0 = the raw M-value), broadcast against the tensions.

    Returns
    -------
    ndarray, shape (..., n_comp)
        Ceiling as absolute ambient pressure [bar]; the diver may not go where
        the ambient pressure is below it.

    Notes
    -----
    P_amb,tol = (P_t - GF a) / (GF / b + 1 - GF) [2], from
    P_t = P_amb + GF (a + P_amb / b - P_amb).
    """
    a, b = mixed_coefficients(p_n2, p_he, c)
    g = np.asarray(gf, dtype=float)
    pt = np.asarray(p_n2, dtype=float) + np.asarray(p_he, dtype=float)
    return (pt - g * a) / (g / b + 1.0 - g)


def ceiling_n2(p_n2: ArrayLike, c: Coefficients, gf: ArrayLike = 1.0):
    """Ceiling of each compartment when it holds nitrogen only; see :func:`ceiling`.

    Parameters
    ----------
    p_n2 : array_like, shape (..., n_comp)
        Compartment N2 tensions [bar].
    c : Coefficients
        Coefficient set.
    gf : array_like
        Gradient factor [-].

    Returns
    -------
    ndarray
        Ceiling as absolute ambient pressure [bar].
    """
    g = np.asarray(gf, dtype=float)
    return (np.asarray(p_n2, dtype=float) - g * c.n2_a) / (g / c.n2_b + 1.0 - g)


def gradient_factor(p_n2: ArrayLike, p_he: ArrayLike, p_amb_bar: ArrayLike, c: Coefficients):
    """Supersaturation of each compartment as a fraction of its M-value gradient.

    Parameters
    ----------
    p_n2, p_he : array_like, shape (..., n_comp)
        Compartment tensions [bar].
    p_amb_bar : array_like
        Absolute ambient pressure [bar].
    c : Coefficients
        Coefficient set.

    Returns
    -------
    ndarray
        GF = (P_t - P_amb) / (M(P_amb) - P_amb) [-]; negative when undersaturated.
    """
    pamb = np.asarray(p_amb_bar, dtype=float)
    pt = np.asarray(p_n2, dtype=float) + np.asarray(p_he, dtype=float)
    m = m_value(pamb, p_n2, p_he, c)
    return (pt - pamb) / (m - pamb)


def allowed_tension(
    p_amb_bar: ArrayLike, p_n2: ArrayLike, p_he: ArrayLike, c: Coefficients, gf: ArrayLike
):
    """Largest compartment tension allowed at an ambient pressure with a gradient factor.

    Returns
    -------
    ndarray
        P_amb + GF (M - P_amb) [bar].
    """
    pamb = np.asarray(p_amb_bar, dtype=float)
    return pamb + np.asarray(gf, dtype=float) * (m_value(pamb, p_n2, p_he, c) - pamb)


def gf_at_depth(
    depth: ArrayLike, first_stop_depth: ArrayLike, gf_low: ArrayLike, gf_high: ArrayLike
):
    """Gradient factor in force at a depth: GF low at the first stop, GF high at the surface.

    Parameters
    ----------
    depth : array_like
        Depth [any unit], >= 0.
    first_stop_depth : array_like
        Depth of the first (deepest) stop [same unit]; 0 or less means no stop,
        and GF high applies everywhere.
    gf_low, gf_high : array_like
        Gradient factors [-].

    Returns
    -------
    ndarray
        GF, linear in depth between the first stop and the surface, GF low at
        and below the first stop [2].
    """
    d = np.asarray(depth, dtype=float)
    fs = np.asarray(first_stop_depth, dtype=float)
    lo = np.asarray(gf_low, dtype=float)
    hi = np.asarray(gf_high, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = np.where(fs > 0, np.clip(d / np.where(fs > 0, fs, 1.0), 0.0, 1.0), 0.0)
    return hi + (lo - hi) * frac
