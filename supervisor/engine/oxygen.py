"""Oxygen exposure: CNS percentage against the NOAA limits and pulmonary dose (UPTD/OTU).

A dive is a list of segments along which the inspired oxygen partial pressure changes
linearly with time.  For every segment the module computes

* the pulmonary dose in OTU (= UPTD) by the Clark–Lambertsen formula, integrated exactly
  along the linear PO2 change [2];
* the CNS percentage, time / limit x 100, against the single-exposure and the 24-hour
  columns of the NOAA normal-exposure table [1], integrated exactly over the table's
  step curve (a PO2 between two rows takes the next-higher row, the shorter limit; a
  PO2 within :data:`PO2_TOLERANCE_ATM` of a row counts at that row, so the standard
  20 fsw oxygen stop at 1.606 atm counts at the 1.6 atm row);
* the minutes spent in the water above the table's highest row (1.6 atm) plus the
  tolerance: they are charged at the top row's rate (never zero) and flagged, since
  the table gives no limit there; the CNS percentage is then a lower bound;
* chamber oxygen (segments whose ``place`` is ``chamber``: surface decompression in
  the chamber, treatment, at 2.0-2.8 ata) is not on the NOAA in-water table at all.
  It adds no in-water CNS percentage; its minutes, OTU and highest PO2 are kept
  apart (:attr:`OxygenExposure.chamber_minutes` ...) for the rule that counts chamber
  oxygen, the chamber oxygen periods against the procedure's limits.

:func:`daily_exposure` combines several exposures on one time line: the highest OTU and
24-hour CNS percentage over any 24 hours, and the REPEX series check over any k
consecutive days [3].

Pressures enter in bar absolute, as everywhere in the package; the NOAA limits and the
UPTD formula are written in atm, so PO2 is converted with 1 atm = 1.01325 bar
(:data:`supervisor.constants.P_ATM_BAR`).  Times are minutes.

The limit tables are ``tables/limits/noaa-cns-limits.toml`` and
``tables/limits/pulmonary-daily-limits.toml``; a file without a ``[provenance]`` table is
refused.  Every row is unverified and FROM MEMORY or SECONDARY, so every result here
carries ``needs_review = True`` until the rows are checked against the documents.

References
----------
.. [1] NOAA Diving Manual, oxygen partial pressure and exposure time limits for normal
       exposures (3rd to 6th editions), adapted from Butler FK, Thalmann ED (1986).
.. [2] Clark JM, Lambertsen CJ, "Pulmonary oxygen toxicity: a review", Pharmacological
       Reviews 23 (1971) 37-133 (journal details from memory); the dose formula as printed
       in Naikagaku (Internal Medicine), 12th ed., Asakura Publishing, digital appendix,
       Fig. 2-1-2.
.. [3] Hamilton RW, Kenyon DJ, Peterson RE, REPEX habitat diving procedures, NOAA Office
       of Undersea Research Technical Report 88-1B (1988).
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from supervisor import constants as C
from supervisor.errors import InputError, TableError
from supervisor.profile import Profile
from supervisor.resources import tables_dir

__all__ = [
    "CHAMBER_NOTE",
    "CNS_TABLE",
    "DAY_MIN",
    "OTU_EXPONENT",
    "OTU_THRESHOLD_ATM",
    "PO2_TOLERANCE_ATM",
    "PULMONARY_TABLE",
    "CnsLimits",
    "DailyExposure",
    "OxygenExposure",
    "PulmonaryLimits",
    "TableInfo",
    "daily_exposure",
    "load_cns_limits",
    "load_pulmonary_limits",
    "otu_rate",
    "profile_exposure",
    "segment_exposure",
]

#: PO2 at or below which the UPTD formula gives no dose [atm] (Clark & Lambertsen [2]).
OTU_THRESHOLD_ATM: float = 0.5
#: Exponent of the UPTD formula [-] (Clark & Lambertsen [2]; often rounded to 0.83).
OTU_EXPONENT: float = 0.833
#: Length of the rolling window of the NOAA 24-hour limit and of a REPEX day [min].
DAY_MIN: float = 24.0 * 60.0
#: File stems of the two limit tables under ``tables/limits``.
CNS_TABLE: str = "noaa-cns-limits"
PULMONARY_TABLE: str = "pulmonary-daily-limits"

#: A PO2 within this distance of a CNS-table row counts at that row, and a policy PO2
#: limit is broken only when exceeded by more than it [atm].  The project's own choice
#: (no source): the table's rows are printed to 0.1 atm, and the PO2 of a standard
#: stop depends on the depth convention by about 0.01 atm (oxygen at 20 fsw: 1.606 atm
#: with 33 fsw per atm, 1.605 atm with 0.030643 bar per fsw), which must not move the
#: stop off the 1.6 atm row.
PO2_TOLERANCE_ATM: float = 0.01
# Floating-point slack of a band edge [atm] (a constant PO2 exactly on an edge).
_P_TOL_ATM = 1e-12
# Exceeding a limit means exceeding it by more than summation rounding.
_LIMIT_TOL = 1e-9
# Placement grid for rolling windows inside segments whose PO2 changes [min].
_WINDOW_GRID_MIN = 0.1

_SCHEMA = "supervisor-table/1"
_RESULT_SCHEMA = "supervisor-oxygen/1"
_PROVENANCE_KEYS = (
    "source_document",
    "issuing_body",
    "edition",
    "table",
    "date",
    "licence",
    "source_status",
    "transcribed_by",
    "transcribed_on",
)
# Larger is less certain; the least certain status of a table's rows is its status.
_STATUS_RANK = {
    "VERIFIED": 0,
    "COMPUTED": 0,
    "OLDER-EDITION": 1,
    "SECONDARY": 2,
    "DERIVED": 3,
    "FROM MEMORY": 4,
}


# --------------------------------------------------------------------------- tables


@dataclass(frozen=True)
class TableInfo:
    """Provenance summary of a limit table.

    Attributes
    ----------
    name : str
        Table name (the file stem).
    source_document, edition, table : str
        From the file's ``[provenance]``.
    source_status : str
        Least certain source status of the rows (``VERIFIED`` ... ``FROM MEMORY``).
    verified : bool
        True only when every row has ``verification = "verified"`` with a checker's name
        and a row hash (the hash itself is checked by ``supervisor tables verify``).
    """

    name: str
    source_document: str
    edition: str
    table: str
    source_status: str
    verified: bool

    @property
    def usable_without_review(self) -> bool:
        """True when every row is verified and the source status is VERIFIED."""
        return self.verified and self.source_status == "VERIFIED"

    def to_dict(self) -> dict[str, Any]:
        """Return a JSON-ready dictionary."""
        return {
            "name": self.name,
            "source_document": self.source_document,
            "edition": self.edition,
            "table": self.table,
            "source_status": self.source_status,
            "verified": self.verified,
        }


@dataclass(frozen=True, eq=False)
class CnsLimits:
    """NOAA single-exposure and 24-hour CNS limits by PO2 [1].

    Attributes
    ----------
    po2_atm : ndarray
        Table rows, increasing [atm].
    single_exposure_min : ndarray
        Single-exposure limit of each row [min].
    daily_limit_min : ndarray
        Total time allowed in 24 hours at each row [min].
    no_accrual_atm : float
        PO2 at or below which no CNS percentage accrues [atm].
    info : TableInfo
        Provenance.
    """

    po2_atm: NDArray[np.float64]
    single_exposure_min: NDArray[np.float64]
    daily_limit_min: NDArray[np.float64]
    no_accrual_atm: float
    info: TableInfo

    @property
    def range_top_atm(self) -> float:
        """Highest tabulated PO2 [atm]; above it no limit is defined."""
        return float(self.po2_atm[-1])

    @property
    def band_edges_atm(self) -> NDArray[np.float64]:
        """Upper-closed band edges [atm]: band j is (edge[j], edge[j+1]] with row j's limits.

        Each row's edge lies :data:`PO2_TOLERANCE_ATM` above the row (a PO2 within the
        tolerance of a row counts at that row); the no-accrual edge has none.
        """
        rows = self.po2_atm + PO2_TOLERANCE_ATM
        return np.concatenate(([self.no_accrual_atm + _P_TOL_ATM], rows))


@dataclass(frozen=True, eq=False)
class PulmonaryLimits:
    """REPEX OTU allowances by number of exposure days [3].

    Attributes
    ----------
    exposure_days : ndarray of int
        1, 2, ... N.
    daily_allowance_otu : ndarray
        Average allowance per day for a series of that many days [OTU].
    total_allowance_otu : ndarray
        Allowance for the whole series [OTU].
    info : TableInfo
        Provenance.
    """

    exposure_days: NDArray[np.int64]
    daily_allowance_otu: NDArray[np.float64]
    total_allowance_otu: NDArray[np.float64]
    info: TableInfo

    def total_allowance(self, days: ArrayLike) -> NDArray[np.float64]:
        """Total OTU allowance of a series of ``days`` consecutive days.

        Parameters
        ----------
        days : array_like of int
            Series length [day], >= 1.

        Returns
        -------
        ndarray
            Allowance [OTU]; beyond the last row each further day adds the last row's
            daily allowance (the file's ``after_last_row`` convention).
        """
        k = np.asarray(days)
        if k.size and (np.any(k < 1) or np.any(k != np.floor(k))):
            raise InputError("days", f"got {days!r}; expected whole numbers of days >= 1")
        k = k.astype(np.int64)
        last = int(self.exposure_days[-1])
        inside = np.minimum(k, last) - 1
        extra = np.maximum(k - last, 0)
        return self.total_allowance_otu[inside] + extra * self.daily_allowance_otu[-1]


def _read_table(path: Path) -> dict[str, Any]:
    """Read a limit table and check its common header; refuse one without provenance."""
    try:
        raw = tomllib.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise TableError(f"{path.name}: limit table not found") from None
    except tomllib.TOMLDecodeError as exc:
        raise TableError(f"{path.name}: not valid TOML ({exc})") from None
    prov = raw.get("provenance")
    if not isinstance(prov, dict):
        raise TableError(
            f"{path.name}: no [provenance] table; a table without provenance cannot be loaded"
        )
    missing = [k for k in _PROVENANCE_KEYS if not str(prov.get(k, "")).strip()]
    if missing:
        raise TableError(f"{path.name}: [provenance] lacks {', '.join(missing)}")
    if prov["source_status"] not in _STATUS_RANK:
        raise TableError(f"{path.name}: unknown source_status {prov['source_status']!r}")
    if raw.get("schema") != _SCHEMA:
        raise TableError(f"{path.name}: schema must be {_SCHEMA!r}, got {raw.get('schema')!r}")
    if raw.get("name") != path.stem:
        raise TableError(f"{path.name}: name {raw.get('name')!r} must equal the file stem")
    if raw.get("kind") != "limits":
        raise TableError(f"{path.name}: kind must be 'limits', got {raw.get('kind')!r}")
    rows = raw.get("rows")
    if not isinstance(rows, list) or not rows or not all(isinstance(r, dict) for r in rows):
        raise TableError(f"{path.name}: expected one or more [[rows]]")
    for i, row in enumerate(rows):
        status = row.get("source_status", prov["source_status"])
        if status not in _STATUS_RANK:
            raise TableError(f"{path.name}: row {i + 1}: unknown source_status {status!r}")
        if row.get("verification") not in ("verified", "unverified"):
            raise TableError(
                f"{path.name}: row {i + 1}: verification must be 'verified' or 'unverified'"
            )
    return raw


def _row_verified(row: dict[str, Any]) -> bool:
    """A row counts as verified only with a checker's name and a matching content hash.

    The hash is recomputed from the row's data columns, so a row edited after its
    check is unverified again (the rule of the reference-table layer).
    """
    from supervisor.references.canonical import row_hash  # local: avoids an import cycle

    stored = str(row.get("row_hash", "")).strip()
    return (
        row.get("verification") == "verified"
        and bool(str(row.get("verified_by", "")).strip())
        and bool(stored)
        and stored == row_hash(row)
    )


def _info(raw: dict[str, Any]) -> TableInfo:
    prov = raw["provenance"]
    statuses = [r.get("source_status", prov["source_status"]) for r in raw["rows"]]
    return TableInfo(
        name=raw["name"],
        source_document=prov["source_document"],
        edition=prov["edition"],
        table=prov["table"],
        source_status=max(statuses, key=_STATUS_RANK.__getitem__),
        verified=all(_row_verified(r) for r in raw["rows"]),
    )


def _column(raw: dict[str, Any], key: str, path: Path) -> NDArray[np.float64]:
    try:
        out = np.array([float(r[key]) for r in raw["rows"]])
    except (KeyError, TypeError, ValueError):
        raise TableError(f"{path.name}: every row needs a numeric {key!r}") from None
    if not np.all(np.isfinite(out)):
        raise TableError(f"{path.name}: {key!r} must be finite")
    out.setflags(write=False)
    return out


def _default_path(stem: str) -> Path:
    return tables_dir() / "limits" / f"{stem}.toml"


@lru_cache(maxsize=8)
def _cns_limits_cached(path: Path) -> CnsLimits:
    raw = _read_table(path)
    po2 = _column(raw, "po2_atm", path)
    single = _column(raw, "single_exposure_min", path)
    daily = _column(raw, "daily_limit_min", path)
    try:
        floor = float(raw.get("conventions", {})["no_accrual_at_or_below_atm"])
    except (KeyError, TypeError, ValueError):
        raise TableError(
            f"{path.name}: [conventions] needs a numeric no_accrual_at_or_below_atm"
        ) from None
    if np.any(np.diff(po2) <= 0):
        raise TableError(f"{path.name}: po2_atm must increase strictly from row to row")
    if not (0.0 <= floor < po2[0]):
        raise TableError(f"{path.name}: no_accrual_at_or_below_atm must lie below the first row")
    if np.any(single <= 0) or np.any(daily <= 0):
        raise TableError(f"{path.name}: limits must be positive minutes")
    if np.any(np.diff(single) > 0) or np.any(np.diff(daily) > 0):
        raise TableError(f"{path.name}: limits must not lengthen as PO2 rises")
    if np.any(daily < single):
        raise TableError(f"{path.name}: a 24-hour limit is shorter than its single exposure")
    return CnsLimits(po2, single, daily, floor, _info(raw))


@lru_cache(maxsize=8)
def _pulmonary_limits_cached(path: Path) -> PulmonaryLimits:
    raw = _read_table(path)
    days = _column(raw, "exposure_days", path)
    daily = _column(raw, "daily_allowance_otu", path)
    total = _column(raw, "total_allowance_otu", path)
    if not np.array_equal(days, np.arange(1, days.size + 1)):
        raise TableError(f"{path.name}: exposure_days must run 1, 2, 3 ... without gaps")
    if np.any(daily <= 0) or np.any(np.diff(daily) > 0):
        raise TableError(f"{path.name}: daily allowances must be positive and not increase")
    if np.any(np.diff(total) < 0):
        raise TableError(f"{path.name}: total allowances must not decrease")
    d = days.astype(np.int64)
    d.setflags(write=False)
    return PulmonaryLimits(d, daily, total, _info(raw))


def load_cns_limits(path: Path | None = None) -> CnsLimits:
    """Load the NOAA CNS limit table.

    Parameters
    ----------
    path : pathlib.Path, optional
        A table file; by default the bundled ``tables/limits/noaa-cns-limits.toml``.

    Returns
    -------
    CnsLimits
        Rows [atm, min] with provenance (cached per path).

    Raises
    ------
    TableError
        If the file lacks ``[provenance]``, its header is wrong or its rows are inconsistent.

    References
    ----------
    .. [1] NOAA Diving Manual, normal-exposure oxygen limits (3rd to 6th editions).
    """
    return _cns_limits_cached(Path(path) if path else _default_path(CNS_TABLE))


def load_pulmonary_limits(path: Path | None = None) -> PulmonaryLimits:
    """Load the REPEX daily OTU allowance table.

    Parameters
    ----------
    path : pathlib.Path, optional
        A table file; by default the bundled ``tables/limits/pulmonary-daily-limits.toml``.

    Returns
    -------
    PulmonaryLimits
        Allowances [OTU] by series length [day] with provenance (cached per path).

    Raises
    ------
    TableError
        If the file lacks ``[provenance]``, its header is wrong or its rows are inconsistent.

    References
    ----------
    .. [1] Hamilton RW, Kenyon DJ, Peterson RE, REPEX habitat diving procedures, NOAA OUR
           Technical Report 88-1B (1988).
    """
    return _pulmonary_limits_cached(Path(path) if path else _default_path(PULMONARY_TABLE))


# --------------------------------------------------------------------------- physics


def otu_rate(po2_atm: ArrayLike) -> NDArray[np.float64] | float:
    """Pulmonary dose rate at a constant PO2.

    Parameters
    ----------
    po2_atm : array_like
        Inspired oxygen partial pressure [atm].

    Returns
    -------
    ndarray or float
        Dose rate [OTU/min]; 0 at or below 0.5 atm.

    Notes
    -----
    OTU/min = ((PO2 - 0.5) / 0.5)^0.833, the UPTD formula of Clark & Lambertsen [1];
    1 OTU is one minute of 100 % oxygen at 1 atm.

    References
    ----------
    .. [1] Clark JM, Lambertsen CJ, Pharmacological Reviews 23 (1971) 37-133 (from memory);
           formula as printed in Naikagaku, 12th ed., Asakura, digital appendix Fig. 2-1-2.
    """
    x = (np.asarray(po2_atm, dtype=float) - OTU_THRESHOLD_ATM) / OTU_THRESHOLD_ATM
    out = np.maximum(x, 0.0) ** OTU_EXPONENT
    return float(out) if out.ndim == 0 else out


def _otu(minutes: NDArray, p1: NDArray, p2: NDArray) -> NDArray[np.float64]:
    """Exact UPTD integral over segments with PO2 linear from p1 to p2 [atm] over minutes.

    With x = (PO2 - 0.5)/0.5 linear from x1 to x2 and a = 0.833 + 1, the dose is
    t (x2+^a - x1+^a) / (a (x2 - x1)), x+ = max(x, 0); this also covers a segment that
    crosses 0.5 atm.  For nearby x1, x2 > 0 the difference of powers is written with
    expm1/log1p to avoid cancellation; for x1 = x2 it is t x^0.833.
    """
    a = OTU_EXPONENT + 1.0
    x1 = (p1 - OTU_THRESHOLD_ATM) / OTU_THRESHOLD_ATM
    x2 = (p2 - OTU_THRESHOLD_ATM) / OTU_THRESHOLD_ATM
    lo = np.minimum(x1, x2)
    hi = np.maximum(x1, x2)
    mean = np.zeros_like(lo)
    both = lo > 0.0
    d = np.zeros_like(lo)
    d[both] = (hi[both] - lo[both]) / lo[both]
    near = both & (d <= 1.0) & (d > 0.0)
    far = both & (d > 1.0)
    equal = both & (d == 0.0)
    cross = (lo <= 0.0) & (hi > 0.0)
    mean[equal] = lo[equal] ** OTU_EXPONENT
    mean[near] = lo[near] ** OTU_EXPONENT * np.expm1(a * np.log1p(d[near])) / (a * d[near])
    mean[far] = (hi[far] ** a - lo[far] ** a) / (a * (hi[far] - lo[far]))
    mean[cross] = hi[cross] ** a / (a * (hi[cross] - lo[cross]))
    return minutes * mean


def _bands(
    minutes: NDArray, p1: NDArray, p2: NDArray, limits: CnsLimits
) -> tuple[NDArray, NDArray, NDArray]:
    """Minutes of each segment in each CNS band, above the table, and below its first row.

    Returns (n, m) minutes per band, (n,) minutes above the highest row plus the
    tolerance and (n,) minutes between the no-accrual PO2 and the first row less the
    tolerance.  A linear PO2 spends in a band the fraction of the segment's time that
    the band's overlap is of its PO2 span, so the CNS integral over the table's step
    curve is exact.
    """
    edges = limits.band_edges_atm
    lo = np.minimum(p1, p2)
    hi = np.maximum(p1, p2)
    width = hi - lo
    ramp = width > _P_TOL_ATM
    safe = np.where(ramp, width, 1.0)
    mid = 0.5 * (lo + hi)
    top = edges[-1]

    overlap = np.minimum(hi[:, None], edges[None, 1:]) - np.maximum(lo[:, None], edges[None, :-1])
    frac_ramp = np.clip(overlap, 0.0, None) / safe[:, None]
    frac_const = (mid[:, None] > edges[None, :-1]) & (mid[:, None] <= edges[None, 1:])
    in_band = minutes[:, None] * np.where(ramp[:, None], frac_ramp, frac_const)

    above_ramp = np.clip(hi - np.maximum(lo, top), 0.0, None) / safe
    above = minutes * np.where(ramp, above_ramp, mid > top)

    first = float(limits.po2_atm[0]) - PO2_TOLERANCE_ATM
    below_ramp = np.clip(np.minimum(hi, first) - np.maximum(lo, edges[0]), 0.0, None) / safe
    below_const = (mid > edges[0]) & (mid < first)
    below = minutes * np.where(ramp, below_ramp, below_const)
    return in_band, above, below


def _cns(minutes: NDArray, p1: NDArray, p2: NDArray, limits: CnsLimits):
    """Single-exposure and 24-hour CNS percentages, minutes above and below the table.

    Minutes above the table's top row are charged at the top row's limits (a lower
    bound: the table gives no limit there, and the true rate can only be higher).
    """
    in_band, above, below = _bands(minutes, p1, p2, limits)
    charged = in_band.copy()
    charged[:, -1] += above
    single = 100.0 * np.sum(charged / limits.single_exposure_min[None, :], axis=1)
    daily = 100.0 * np.sum(charged / limits.daily_limit_min[None, :], axis=1)
    return single, daily, above, below


# --------------------------------------------------------------------------- results


#: How chamber oxygen (surface decompression in the chamber, treatment: 2.0-2.8 ata)
#: is counted instead of an in-water CNS percentage.
CHAMBER_NOTE = (
    "chamber oxygen is not on the NOAA in-water CNS table (it stops at 1.6 atm): no "
    "in-water CNS percentage is given for it; it is counted as chamber oxygen periods "
    "against the procedure's limits"
)


@dataclass(frozen=True, eq=False)
class OxygenExposure:
    """Oxygen exposure of one dive or chamber run, per segment and in total.

    Attributes
    ----------
    segment_minutes : ndarray
        Segment durations [min].
    segment_po2_start_atm, segment_po2_end_atm : ndarray
        Inspired PO2 at segment start and end [atm].
    segment_otu : ndarray
        Pulmonary dose [OTU].
    segment_cns_percent : ndarray
        In-water CNS percentage against the single-exposure limits [%]; minutes above
        the table charged at the top row's rate; 0 for chamber segments.
    segment_cns_24h_percent : ndarray
        The same against the 24-hour limits [%].
    segment_minutes_above_range : ndarray
        In-water minutes above the table's highest PO2 plus the tolerance [min].
    segment_minutes_below_table : ndarray
        Minutes between the no-accrual PO2 and the first row, charged at the first row [min].
    segment_in_chamber : ndarray of bool
        The segment is breathed in a chamber (no in-water CNS percentage).
    segment_chamber_oxygen : ndarray of bool
        A chamber segment on an oxygen-enriched gas (more oxygen than air).
    otu, cns_percent, cns_24h_percent : float
        Totals: OTU of water and chamber; in-water CNS percentages [OTU, %, %].
    max_po2_atm : float
        Highest PO2 reached anywhere, zero-length segments included [atm].
    water_max_po2_atm : float
        Highest PO2 reached in the water [atm].
    out_of_range : bool
        True when an in-water PO2 above the table's highest row plus the tolerance is
        reached: the CNS totals are then lower bounds.
    minutes_above_range, minutes_below_table : float
        In-water totals [min].
    range_top_atm : float
        Highest PO2 of the CNS table [atm].
    po2_tolerance_atm : float
        :data:`PO2_TOLERANCE_ATM` [atm].
    chamber_minutes, chamber_oxygen_minutes : float
        Minutes in the chamber, and of them on an oxygen-enriched gas [min].
    chamber_otu : float
        Pulmonary dose of the chamber segments [OTU] (included in ``otu``).
    chamber_max_po2_atm : float or None
        Highest chamber PO2 [atm]; None without chamber segments.
    chamber_minutes_above_table : float
        Chamber minutes above the in-water table's top row plus the tolerance [min].
    cns_limits : TableInfo
        Provenance of the CNS limits.
    """

    segment_minutes: NDArray[np.float64]
    segment_po2_start_atm: NDArray[np.float64]
    segment_po2_end_atm: NDArray[np.float64]
    segment_otu: NDArray[np.float64]
    segment_cns_percent: NDArray[np.float64]
    segment_cns_24h_percent: NDArray[np.float64]
    segment_minutes_above_range: NDArray[np.float64]
    segment_minutes_below_table: NDArray[np.float64]
    otu: float
    cns_percent: float
    cns_24h_percent: float
    max_po2_atm: float
    out_of_range: bool
    minutes_above_range: float
    minutes_below_table: float
    range_top_atm: float
    cns_limits: TableInfo
    segment_in_chamber: NDArray[np.bool_] = field(
        default_factory=lambda: np.zeros(0, dtype=bool))
    segment_chamber_oxygen: NDArray[np.bool_] = field(
        default_factory=lambda: np.zeros(0, dtype=bool))
    water_max_po2_atm: float = 0.0
    po2_tolerance_atm: float = PO2_TOLERANCE_ATM
    chamber_minutes: float = 0.0
    chamber_oxygen_minutes: float = 0.0
    chamber_otu: float = 0.0
    chamber_max_po2_atm: float | None = None
    chamber_minutes_above_table: float = 0.0

    @property
    def duration_min(self) -> float:
        """Total duration [min]."""
        return float(np.sum(self.segment_minutes))

    @property
    def max_po2_bar(self) -> float:
        """Highest PO2 reached [bar]."""
        return self.max_po2_atm * C.P_ATM_BAR

    @property
    def cns_is_lower_bound(self) -> bool:
        """The in-water CNS figures are lower bounds (PO2 above the table in the water)."""
        return self.out_of_range

    @property
    def cns_status(self) -> str:
        """``"computed"``, or ``"lower bound"`` when PO2 went above the table."""
        return "lower bound" if self.out_of_range else "computed"

    @property
    def has_chamber(self) -> bool:
        """Some segment is breathed in a chamber."""
        return bool(np.any(self.segment_in_chamber))

    @property
    def cns_note(self) -> str:
        """How the in-water CNS figure was counted where it is not plain (empty if plain)."""
        parts = []
        if self.out_of_range:
            parts.append(
                f"{self.minutes_above_range:.1f} min in the water above "
                f"{self.range_top_atm:g} atm (PO2 up to {self.water_max_po2_atm:.2f} atm) "
                f"counted at the {self.range_top_atm:g} atm rate: the CNS figure is a lower "
                "bound"
            )
        if self.has_chamber:
            parts.append(CHAMBER_NOTE)
        return "; ".join(parts)

    @property
    def review_reasons(self) -> tuple[str, ...]:
        """Why the CNS figures cannot be taken as checked (empty when they can)."""
        out = []
        if self.out_of_range:
            out.append(
                f"PO2 reached {self.water_max_po2_atm:.3g} atm in the water, above the CNS "
                f"table's highest row ({self.range_top_atm:g} atm) for "
                f"{self.minutes_above_range:.4g} min: counted at the top row's rate, the "
                "CNS figure shown is a lower bound"
            )
        if not self.cns_limits.usable_without_review:
            out.append(
                f"CNS limits {self.cns_limits.name} are {self.cns_limits.source_status} and "
                f"{'verified' if self.cns_limits.verified else 'unverified'}"
            )
        return tuple(out)

    @property
    def needs_review(self) -> bool:
        """True when the CNS figures are a lower bound or rest on unchecked limits."""
        return bool(self.review_reasons)

    def chamber_dict(self) -> dict[str, Any] | None:
        """Chamber oxygen as kept apart from the in-water CNS figure; None without chamber."""
        if not self.has_chamber:
            return None
        return {
            "minutes": self.chamber_oxygen_minutes,
            "chamber_minutes": self.chamber_minutes,
            "otu": self.chamber_otu,
            "max_po2_atm": self.chamber_max_po2_atm,
            "minutes_above_in_water_table": self.chamber_minutes_above_table,
        }

    def to_dict(self) -> dict[str, Any]:
        """Return a JSON-ready dictionary (schema ``supervisor-oxygen/1``)."""
        segments = [
            {
                "minutes": float(m),
                "po2_start_atm": float(a),
                "po2_end_atm": float(b),
                "otu": float(o),
                "cns_percent": float(c),
                "cns_24h_percent": float(c24),
                "minutes_above_range": float(up),
                "in_chamber": bool(ch),
            }
            for m, a, b, o, c, c24, up, ch in zip(
                self.segment_minutes,
                self.segment_po2_start_atm,
                self.segment_po2_end_atm,
                self.segment_otu,
                self.segment_cns_percent,
                self.segment_cns_24h_percent,
                self.segment_minutes_above_range,
                self.segment_in_chamber,
                strict=True,
            )
        ]
        return {
            "schema": _RESULT_SCHEMA,
            "duration_min": self.duration_min,
            "otu": self.otu,
            "cns_percent": self.cns_percent,
            "cns_24h_percent": self.cns_24h_percent,
            "cns_status": self.cns_status,
            "cns_percent_is_lower_bound": self.out_of_range,
            "cns_is_lower_bound": self.out_of_range,
            "cns_note": self.cns_note,
            "max_po2_atm": self.max_po2_atm,
            "max_po2_bar": self.max_po2_bar,
            "water_max_po2_atm": self.water_max_po2_atm,
            "out_of_range": self.out_of_range,
            "minutes_above_range": self.minutes_above_range,
            "minutes_above_table": self.minutes_above_range,
            "minutes_below_table": self.minutes_below_table,
            "range_top_atm": self.range_top_atm,
            "po2_tolerance_atm": self.po2_tolerance_atm,
            "chamber_oxygen": self.chamber_dict(),
            "needs_review": self.needs_review,
            "review_reasons": list(self.review_reasons),
            "cns_limits": self.cns_limits.to_dict(),
            "segments": segments,
        }


def _checked(value: ArrayLike, field: str, unit: str) -> NDArray[np.float64]:
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(field, f"got {value!r}; expected numbers >= 0 [{unit}]") from None
    if not np.all(np.isfinite(arr)) or np.any(arr < 0):
        bad = arr[~(np.isfinite(arr) & (arr >= 0))].ravel()[0]
        raise InputError(field, f"got {bad!r}; expected finite values >= 0 [{unit}]")
    return arr


def _exposure(
    minutes: NDArray,
    p1: NDArray,
    p2: NDArray,
    limits: CnsLimits,
    chamber: NDArray,
    chamber_o2: NDArray,
) -> OxygenExposure:
    otu = _otu(minutes, p1, p2)
    single, daily, above, below = _cns(minutes, p1, p2, limits)
    water = ~chamber
    chamber_above = np.where(chamber, above, 0.0)
    single, daily, above, below = (np.where(water, a, 0.0) for a in (single, daily, above, below))
    top = limits.range_top_atm
    peak = np.maximum(p1, p2)
    max_po2 = float(np.max(peak)) if p1.size else 0.0
    water_max = float(np.max(peak[water])) if np.any(water) else 0.0
    chamber_max = float(np.max(peak[chamber])) if np.any(chamber) else None
    for arr in (minutes, p1, p2, otu, single, daily, above, below, chamber, chamber_o2):
        arr.setflags(write=False)
    return OxygenExposure(
        segment_minutes=minutes,
        segment_po2_start_atm=p1,
        segment_po2_end_atm=p2,
        segment_otu=otu,
        segment_cns_percent=single,
        segment_cns_24h_percent=daily,
        segment_minutes_above_range=above,
        segment_minutes_below_table=below,
        otu=float(np.sum(otu)),
        cns_percent=float(np.sum(single)),
        cns_24h_percent=float(np.sum(daily)),
        max_po2_atm=max_po2,
        out_of_range=bool(water_max > top + PO2_TOLERANCE_ATM or np.any(above > 0)),
        minutes_above_range=float(np.sum(above)),
        minutes_below_table=float(np.sum(below)),
        range_top_atm=top,
        cns_limits=limits.info,
        segment_in_chamber=chamber,
        segment_chamber_oxygen=chamber_o2,
        water_max_po2_atm=water_max,
        chamber_minutes=float(np.sum(minutes[chamber])),
        chamber_oxygen_minutes=float(np.sum(minutes[chamber_o2])),
        chamber_otu=float(np.sum(otu[chamber])),
        chamber_max_po2_atm=chamber_max,
        chamber_minutes_above_table=float(np.sum(chamber_above)),
    )


def _mask(value: ArrayLike | None, n: int, field: str) -> NDArray[np.bool_]:
    if value is None:
        return np.zeros(n, dtype=bool)
    arr = np.asarray(value, dtype=bool)
    if arr.ndim == 0:
        return np.full(n, bool(arr))
    if arr.shape != (n,):
        raise InputError(field, f"got shape {arr.shape}; expected one flag per segment ({n})")
    return arr.copy()


def segment_exposure(
    minutes: ArrayLike,
    po2_start_bar: ArrayLike,
    po2_end_bar: ArrayLike | None = None,
    limits: CnsLimits | None = None,
    in_chamber: ArrayLike | None = None,
    chamber_oxygen: ArrayLike | None = None,
) -> OxygenExposure:
    """Oxygen exposure of segments with a linear change of PO2, vectorised.

    Parameters
    ----------
    minutes : array_like
        Segment durations [min], >= 0.
    po2_start_bar : array_like
        Inspired oxygen partial pressure at segment start [bar], >= 0.
    po2_end_bar : array_like, optional
        PO2 at segment end [bar]; by default equal to ``po2_start_bar`` (constant PO2).
    limits : CnsLimits, optional
        CNS limits; by default the bundled NOAA table.
    in_chamber : array_like of bool, optional
        Segments breathed in a chamber: no in-water CNS percentage, kept apart (by
        default none).
    chamber_oxygen : array_like of bool, optional
        Chamber segments on an oxygen-enriched gas, whose minutes are the chamber
        oxygen minutes (by default none; :func:`profile_exposure` sets it from the gas).

    Returns
    -------
    OxygenExposure
        Per-segment arrays (in the broadcast order of the inputs) and totals; all the
        segments are taken as one dive.

    Raises
    ------
    InputError
        If a duration or a PO2 is negative or not finite, or the inputs do not broadcast
        to one dimension.

    Notes
    -----
    PO2 is converted to atm with 1 atm = 1.01325 bar.  OTU is the exact integral of
    ((PO2 - 0.5)/0.5)^0.833 over the linear change [2]; it is zero where PO2 <= 0.5 atm.
    The CNS percentage is 100 * sum over the table bands of (minutes in band / limit),
    exact for the step curve of the table [1] (a constant PO2 gives exactly t/limit*100);
    a PO2 within 0.01 atm of a row counts at that row; in-water minutes above 1.6 atm
    (+ 0.01) are charged at the 1.6 atm limits and flagged (a lower bound).  The
    pulmonary formula is applied at any PO2, as in chamber treatment practice, although
    its fit is known to be poor between 1.5 and 2.5 atm.

    References
    ----------
    .. [1] NOAA Diving Manual, normal-exposure oxygen limits (3rd to 6th editions).
    .. [2] Clark JM, Lambertsen CJ, Pharmacological Reviews 23 (1971) 37-133 (from memory).
    """
    t = _checked(minutes, "minutes", "min")
    p1 = _checked(po2_start_bar, "po2_start_bar", "bar")
    p2 = p1 if po2_end_bar is None else _checked(po2_end_bar, "po2_end_bar", "bar")
    try:
        t, p1, p2 = np.broadcast_arrays(t, p1, p2)
    except ValueError:
        raise InputError(
            "minutes",
            f"shapes {np.shape(t)}, {np.shape(p1)}, {np.shape(p2)} do not broadcast; "
            "give one value per segment",
        ) from None
    if t.ndim > 1:
        raise InputError("minutes", f"got shape {t.shape}; expected one value per segment (1-D)")
    t, p1, p2 = (np.atleast_1d(a).astype(float) for a in (t, p1, p2))
    chamber = _mask(in_chamber, t.size, "in_chamber")
    chamber_o2 = _mask(chamber_oxygen, t.size, "chamber_oxygen") & chamber
    return _exposure(t, p1 / C.P_ATM_BAR, p2 / C.P_ATM_BAR, limits or load_cns_limits(),
                     chamber, chamber_o2)


def profile_exposure(profile: Profile, limits: CnsLimits | None = None) -> OxygenExposure:
    """Oxygen exposure of a profile, segment by segment.

    Parameters
    ----------
    profile : Profile
        The dive or chamber run; PO2 = ambient pressure [bar] x oxygen fraction [-],
        linear within each segment because depth is.  Segments whose ``place`` is
        ``"chamber"`` are chamber oxygen: no in-water CNS percentage (module docstring).
    limits : CnsLimits, optional
        CNS limits; by default the bundled NOAA table.

    Returns
    -------
    OxygenExposure
        One entry per profile segment, and totals.

    References
    ----------
    .. [1] NOAA Diving Manual, normal-exposure oxygen limits (3rd to 6th editions).
    .. [2] Clark JM, Lambertsen CJ, Pharmacological Reviews 23 (1971) 37-133 (from memory).
    """
    if not isinstance(profile, Profile):
        raise InputError("profile", f"got {type(profile).__name__}; expected a Profile")
    arr = profile.arrays()
    chamber = np.array([s.place == "chamber" for s in profile.segments], dtype=bool)
    return segment_exposure(
        arr.minutes, arr.p_start * arr.fo2, arr.p_end * arr.fo2, limits=limits,
        in_chamber=chamber, chamber_oxygen=chamber & (np.asarray(arr.fo2) > C.FO2_AIR + 1e-9),
    )


# The multi-day series lives in its own module; imported last because it uses the
# names above.
from supervisor.engine.oxygen_daily import DailyExposure, daily_exposure  # noqa: E402
