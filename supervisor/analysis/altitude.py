"""The wait before an ascent to altitude after diving: the trade's minimum first.

For every diver of the plan this module gives the shortest time on the surface
after the diver's last dive before any ascent to altitude (a flight, a drive
over high ground):

* the **minimum** by the kind of diving: after a single no-decompression dive,
  after repetitive dives or several days of diving, after a decompression dive
  (common guidance, FROM MEMORY, read from ``tables/limits/altitude-after-diving
  .toml`` through :mod:`supervisor.references`); a longer minimum of the
  contractor's policy (``policy.altitude_wait_*_h``) replaces it, a shorter one
  is never used;
* the **model's** time (ZH-L16 with GF high, :func:`~supervisor.analysis.figures.
  time_to_altitude`), kept only where it is longer than the minimum: a model
  figure is not a flying rule and never stands alone;
* when the dives' clock times are known (``dives[].start``), the time of
  surfacing and the earliest departure allowed, and for each planned travel
  (``altitude_travel``) whether its departure comes after it.

The Navy table of the surface interval before ascent to altitude (by the
highest repetitive group of the previous 24 h) is not bundled: no verified copy
of it is available, so the minimum above stands in for it and says so.

Which minimum applies: a diver with a dive outside the no-decompression limits
(declared, or stops in the model's or the table's schedule, or a dive that
could not be told either way) takes the decompression minimum; a diver with two
or more dives in the plan, or dives on more than one day, the repetitive one;
otherwise the single-dive one.  The plan is taken to hold all of the diver's
recent dives; dives on earlier days outside the plan call for the repetitive
minimum, which the supervisor must apply.

References
----------
.. [1] Common guidance on flying after diving (12 h, 18 h, 24 h), recalled from
       memory; thought to follow the Divers Alert Network Flying After
       Recreational Diving Workshop (Sheffield PJ, Vann RD, eds., 2002).
.. [2] NOAA Diving Center, *Topside* vol. 2 no. 9 (1999): flying after diving
       with the Navy table, 8,000 ft cabin (OLDER-EDITION).
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any

from supervisor.analysis.assumptions import CABIN_ALTITUDE_M, COMPUTE_ERRORS
from supervisor.analysis.figures import time_to_altitude
from supervisor.analysis.results import DiveAnalysis, DiverDay, PlanAnalysis, _err
from supervisor.plan import Plan
from supervisor.units import altitude_pressure

#: Name of the bundled table of the minimums.
MINIMUM_TABLE = "altitude-after-diving"
#: Kinds of diving before the ascent, shortest minimum first.
BASES: tuple[str, ...] = ("single-no-stop", "repetitive", "decompression")
#: Policy field of each kind.
POLICY_FIELDS: dict[str, str] = {
    "single-no-stop": "altitude_wait_single_h",
    "repetitive": "altitude_wait_repetitive_h",
    "decompression": "altitude_wait_decompression_h",
}
#: Key of the cached results in a check context's ``shared`` dictionary.
SHARED_KEY = "altitude_waits"


@dataclass(frozen=True)
class Minimum:
    """One bundled minimum.

    Attributes
    ----------
    basis : str
        One of :data:`BASES`.
    hours : float
        Shortest time on the surface [h].
    text, citation : str
        What it applies to; its source.
    source_status : str
        FROM MEMORY today.
    verified : bool
        Whether the row was verified by a two-person check (``tables verify``).
    """

    basis: str
    hours: float
    text: str
    citation: str
    source_status: str
    verified: bool


@lru_cache(maxsize=4)
def load_minimums(name: str = MINIMUM_TABLE) -> dict[str, Minimum]:
    """The bundled minimums by basis.

    Parameters
    ----------
    name : str
        Bundled table name or path.

    Returns
    -------
    dict
        Basis to :class:`Minimum`; every basis of :data:`BASES` is present.

    Raises
    ------
    ValueError
        If the table lacks a basis.
    """
    from supervisor.references.loader import load_table

    t = load_table(name)
    out: dict[str, Minimum] = {}
    for row, st in zip(t.rows, t.row_states, strict=True):
        d = row.data()
        out[str(d["basis"])] = Minimum(str(d["basis"]), float(d["min_surface_h"]),
                                       str(d["text"]), str(d["citation"]), st.source_status,
                                       st.verified)
    missing = [b for b in BASES if b not in out]
    if missing:
        raise ValueError(f"{name}: no row for {', '.join(missing)}")
    return out


def table_reference(name: str = MINIMUM_TABLE) -> dict[str, Any]:
    """The minimums' entry for the check's ``references`` list."""
    from supervisor.analysis import _table_reference
    from supervisor.references.loader import load_table

    return _table_reference(load_table(name))


@dataclass
class Travel:
    """One planned travel to altitude and its timing.

    Attributes
    ----------
    index : int
        Position in ``altitude_travel``.
    altitude : float
        As the plan states it [ft in an fsw plan, m in an msw plan].
    unit : str
        ``ft`` or ``m``.
    altitude_m : float
        The same in metres [m].
    departure : datetime
        Earliest planned departure.
    ascent : bool
        False when the travel goes no higher than the site (no wait needed).
    earliest : datetime or None
        Earliest departure the minimum allows (None: dive times unknown).
    model_wait_min : float or None
        The model's time to this altitude [min], only when longer than the minimum.
    model_earliest : datetime or None
        Departure the longer model time allows.
    ok : bool or None
        True: after the minimum (and the longer model time); False: before the
        minimum; None: could not be timed, or after the minimum but before the
        longer model time.
    reason : str
        Why, in words.
    """

    index: int
    altitude: float
    unit: str
    altitude_m: float
    departure: _dt.datetime
    ascent: bool = True
    earliest: _dt.datetime | None = None
    model_wait_min: float | None = None
    model_earliest: _dt.datetime | None = None
    ok: bool | None = None
    reason: str = ""

    @property
    def verdict(self) -> str:
        """``pass``, ``fail`` or ``warn`` (needs review)."""
        return "pass" if self.ok is True else "fail" if self.ok is False else "warn"

    def to_json(self) -> dict[str, Any]:
        """The travel's entry in the check's ``altitude`` list."""
        return {
            "altitude": self.altitude,
            "unit": self.unit,
            "altitude_m": round(self.altitude_m, 1),
            "departure": _iso(self.departure),
            "earliest": _iso(self.earliest),
            "model_wait_min": self.model_wait_min,
            "model_earliest": _iso(self.model_earliest),
            "ascent": self.ascent,
            "ok": self.ok,
            "verdict": self.verdict,
            "reason": self.reason,
        }


@dataclass
class AltitudeWait:
    """The wait before altitude of one diver (see the module docstring).

    Attributes
    ----------
    diver : str
    after_dive : str or None
        The diver's last dive; None for a traveller who does not dive in the plan.
    basis : str
        One of :data:`BASES`.
    guidance : Minimum
        The bundled minimum for the basis.
    policy_h : float or None
        The policy's minimum for the basis [h], when set.
    hours : float
        The minimum used: the longer of the guidance and the policy [h].
    model_cabin_min : float or None
        The model's time to an 8,000 ft cabin [min], only when longer than the minimum.
    model_error : str or None
        Why the model's time could not be given.
    surfaced_at, earliest_departure : datetime or None
        Surfacing after the last dive and the earliest departure the minimum
        allows; None when no dive start is stated.
    travel : list of Travel
    notes : list of str
        What the supervisor must know about these figures.
    reviews : list of str
        What the supervisor must confirm before a planned travel (a policy minimum
        shorter than the guidance, dive starts that disagree with the intervals,
        a model time beyond its search).
    """

    diver: str
    after_dive: str | None
    basis: str
    guidance: Minimum
    policy_h: float | None
    hours: float
    model_cabin_min: float | None = None
    model_error: str | None = None
    surfaced_at: _dt.datetime | None = None
    earliest_departure: _dt.datetime | None = None
    travel: list[Travel] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    reviews: list[str] = field(default_factory=list)

    @property
    def from_policy(self) -> bool:
        """Whether the contractor's policy sets the minimum used."""
        return self.policy_h is not None and self.policy_h >= self.guidance.hours

    @property
    def source_status(self) -> str | None:
        """None for the contractor's policy, else the bundled row's status."""
        return None if self.from_policy else self.guidance.source_status

    @property
    def verified(self) -> bool:
        """Whether the minimum rests on a confirmed source (the policy, or a verified row)."""
        return self.from_policy or self.guidance.verified

    @property
    def source(self) -> str:
        """Where the minimum comes from, in words."""
        if self.from_policy:
            return f"contractor policy (policy.{POLICY_FIELDS[self.basis]})"
        return self.guidance.citation

    @property
    def basis_text(self) -> str:
        """The minimum with what it applies to and its source, e.g. "18 h after ... (common
        guidance)"; the status is ``source_status``."""
        tail = "contractor policy" if self.from_policy else "common guidance"
        return f"{self.hours:g} h {self.guidance.text} ({tail})"

    @property
    def basis_said(self) -> str:
        """:attr:`basis_text` with its status in words, for a message."""
        if self.from_policy:
            return self.basis_text
        status = "from memory" if self.guidance.source_status == "FROM MEMORY" else \
            self.guidance.source_status
        return self.basis_text[:-1] + f", {status})"

    def to_json(self, model_basis: str) -> dict[str, Any]:
        """The diver's entry in the check's ``altitude`` list (keys of both contracts)."""
        wait = self.hours * 60.0
        return {
            "diver": self.diver,
            "after_dive": self.after_dive,
            "floor_h": self.hours,
            "minimum_wait_min": wait,
            "basis": self.basis_text,
            "basis_kind": self.basis,
            "floor_source": self.source,
            "source_status": self.source_status,
            "guidance_h": self.guidance.hours,
            "policy_h": self.policy_h,
            "model_h": round(self.model_cabin_min / 60.0, 2)
            if self.model_cabin_min is not None else None,
            "model_wait_min": self.model_cabin_min,
            "model_basis": model_basis if self.model_cabin_min is not None else None,
            "model_error": self.model_error,
            "surfaced_at": _iso(self.surfaced_at),
            "earliest_departure": _iso(self.earliest_departure),
            "travel": [t.to_json() for t in self.travel],
            "notes": list(self.notes) + list(self.reviews),
        }


def clock(t: _dt.datetime) -> str:
    """A time for a message: ``2026-06-04 09:15`` (with its UTC offset when it has one)."""
    off = t.strftime("%z")
    return t.strftime("%Y-%m-%d %H:%M") + (f" {off[:3]}:{off[3:]}" if off else "")


def hours_minutes(minutes: float) -> str:
    """A wait for a message: ``18 h 00 min``."""
    h, m = divmod(int(math.ceil(minutes - 1e-9)), 60)
    return f"{h} h {m:02d} min"


def _iso(t: _dt.datetime | None) -> str | None:
    return t.isoformat(timespec="minutes") if t is not None else None


def _ceil_minute(t: _dt.datetime) -> _dt.datetime:
    """Round a time up to the whole minute (a departure is never earlier than the rule)."""
    base = t.replace(second=0, microsecond=0)
    return base if base == t else base + _dt.timedelta(minutes=1)


def _decompression(a: DiveAnalysis) -> bool | None:
    """Whether a dive was outside the no-decompression limits; None when nothing says."""
    d = a.dive
    if d.declared_outside_ndl:
        return True
    known = False
    s = a.model_schedule
    if s is not None:
        known = True
        if s.stops:
            return True
    look = a.reference
    if look is not None:
        if look.outside_table or look.within_no_stop_limit is False:
            return True
        if look.schedule is not None and look.schedule.stops:
            return True
        known = known or look.within_no_stop_limit is True or look.schedule is not None
    return False if known else None


def _basis(dives: list[DiveAnalysis], notes: list[str]) -> str:
    deco = [_decompression(a) for a in dives]
    if any(x is True for x in deco):
        return "decompression"
    if any(x is None for x in deco):
        unknown = ", ".join(a.id for a, x in zip(dives, deco, strict=True) if x is None)
        notes.append(f"whether {unknown} stayed within the no-decompression limits could not be "
                     "computed: the decompression minimum is used")
        return "decompression"
    days = {a.dive.start.date() for a in dives if a.dive.start is not None}
    if len(dives) > 1 or len(days) > 1:
        return "repetitive"
    return "single-no-stop"


def _surfacing(dives: list[DiveAnalysis], reviews: list[str]) -> _dt.datetime | None:
    """Clock time of surfacing after the last dive, from the dives' stated starts.

    Each stated start gives the surfacing through the diver's time line (its
    surface intervals and the profiles' durations); when they disagree by more
    than a minute, the latest is taken and the supervisor is told.
    """
    last = dives[-1]
    ends = [a.dive.start + _dt.timedelta(minutes=last.end_min - a.start_min)
            for a in dives if a.dive.start is not None]
    if not ends:
        return None
    if max(ends) - min(ends) > _dt.timedelta(minutes=1):
        reviews.append("the stated dive starts and the surface intervals disagree by "
                     f"{(max(ends) - min(ends)).total_seconds() / 60:.0f} min: the latest "
                     "surfacing is used")
    return _ceil_minute(max(ends))


def _model_min(plan: Plan, last: DiveAnalysis, altitude_m: float) -> tuple[float | None,
                                                                               str | None]:
    """The model's time on the surface before ``altitude_m`` [min], or why there is none."""
    if last.evaluation is None:
        return None, "the last dive could not be evaluated"
    ev, pol = last.evaluation, plan.resolved_policy
    try:
        t = time_to_altitude(ev.final_p_n2, ev.final_p_he, pol.model, pol.gf_high / 100.0,
                             plan.p_surface_bar, float(altitude_pressure(altitude_m)))
    except COMPUTE_ERRORS as exc:
        return None, _err(exc)
    if t is None:
        return math.inf, None
    return t, None


def _cabin_min(day: DiverDay) -> tuple[float | None, str | None]:
    """The analysis's own time to an 8,000 ft cabin [min] (inf: beyond its search)."""
    t = day.time_to_altitude_min[CABIN_ALTITUDE_M]
    if t is not None:
        return t, None
    why = day.errors.get("altitude")
    return (None, why) if why else (math.inf, None)


def _travel(plan: Plan, w: AltitudeWait, last: DiveAnalysis, i: int) -> Travel:
    t = plan.altitude_travel[i]
    alt_m = plan.altitude_to_m(t.altitude)
    tr = Travel(i, t.altitude, plan.altitude_unit, alt_m, t.departure)
    if alt_m <= plan.site.altitude_m + 1e-9:
        tr.ascent, tr.ok = False, True
        tr.reason = "no higher than the site: no ascent to altitude"
        return tr
    wait = w.hours * 60.0
    model, why = _model_min(plan, last, alt_m)
    if model is not None and model > wait:
        tr.model_wait_min = None if math.isinf(model) else model
    if w.surfaced_at is None:
        tr.reason = "no dive start stated (dives[].start): the departure cannot be timed"
        return tr
    tr.earliest = _ceil_minute(w.surfaced_at + _dt.timedelta(minutes=wait))
    if t.departure < tr.earliest:
        tr.ok = False
        short = (tr.earliest - t.departure).total_seconds() / 60.0
        tr.reason = f"{short:.0f} min before the minimum wait of {w.hours:g} h ends"
        return tr
    if model is not None and math.isinf(model):
        tr.reason = ("after the minimum wait, but the model's time to this altitude is longer "
                     "than its 72 h search")
        return tr
    if tr.model_wait_min is not None:
        tr.model_earliest = _ceil_minute(w.surfaced_at + _dt.timedelta(minutes=tr.model_wait_min))
        if t.departure < tr.model_earliest:
            tr.reason = "after the minimum wait but before the model's longer time"
            return tr
    if why:
        w.reviews.append(f"the model's time to {t.altitude:g} {tr.unit} could not be given "
                         f"({why})")
    tr.ok = True
    tr.reason = "after the minimum wait" + (" and the model's longer time"
                                            if tr.model_wait_min is not None else "")
    return tr


def altitude_waits(plan: Plan, pa: PlanAnalysis,
                   minimums: Callable[[], dict[str, Minimum]] = load_minimums
                   ) -> list[AltitudeWait]:
    """The wait before altitude of every diver of the plan.

    A planned travel of a team member with no dive in the plan has no entry
    (:func:`travellers_without_dives` lists them).

    Parameters
    ----------
    plan : Plan
        The validated plan.
    pa : PlanAnalysis
        Its analysis (the divers' time lines and last tissue tensions).
    minimums : callable
        Source of the bundled minimums (:func:`load_minimums`).

    Returns
    -------
    list of AltitudeWait
        Divers in the order of their first dive.
    """
    mins = minimums()
    pol = plan.resolved_policy
    out: list[AltitudeWait] = []
    for name, day in pa.divers.items():
        notes: list[str] = []
        reviews: list[str] = []
        dives = [pa.dives[i] for i in day.dive_ids]
        basis = _basis(dives, notes)
        guide = mins[basis]
        policy_h = getattr(pol, POLICY_FIELDS[basis])
        hours = max(guide.hours, policy_h or 0.0)
        if policy_h is not None and policy_h < guide.hours:
            reviews.append(f"policy.{POLICY_FIELDS[basis]} = {policy_h:g} h is shorter than the "
                         f"common minimum of {guide.hours:g} h: the longer is used")
        last = dives[-1]
        w = AltitudeWait(name, last.id, basis, guide, policy_h, hours)
        w.notes, w.reviews = notes, reviews
        model, w.model_error = _cabin_min(day) if CABIN_ALTITUDE_M in day.time_to_altitude_min \
            else _model_min(plan, last, CABIN_ALTITUDE_M)
        if model is not None and math.isinf(model):
            reviews.append("the model's time to an 8,000 ft cabin is longer than its 72 h search: "
                         "take the wait from the contractor's manual and a diving medical "
                         "officer")
        elif model is not None and model > hours * 60.0:
            w.model_cabin_min = model
        w.surfaced_at = _surfacing(dives, reviews)
        if w.surfaced_at is not None:
            w.earliest_departure = _ceil_minute(w.surfaced_at + _dt.timedelta(hours=hours))
        w.travel = [_travel(plan, w, last, i) for i, t in enumerate(plan.altitude_travel)
                    if t.diver == name]
        out.append(w)
    return out


def travellers_without_dives(plan: Plan, pa: PlanAnalysis) -> list[int]:
    """Indexes of ``altitude_travel`` entries whose traveller has no dive in the plan."""
    return [i for i, t in enumerate(plan.altitude_travel) if t.diver not in pa.divers]


def model_basis(plan: Plan, coefficient_status: str) -> str:
    """What the model figure is, in words (e.g. "ZH-L16C GF high 85 % to 8,000 ft ...")."""
    pol = plan.resolved_policy
    name = {"zhl16a": "ZH-L16A", "zhl16b": "ZH-L16B", "zhl16c": "ZH-L16C"}[pol.model]
    return (f"{name} GF high {pol.gf_high:g} % to an 8,000 ft cabin, breathing air on the "
            f"surface (coefficients {coefficient_status})")


def for_context(ctx: Any) -> list[AltitudeWait]:
    """The waits of a check context's plan, computed once and kept in ``ctx.shared``.

    Also adds the minimums' table to ``ctx.shared["references"]``.

    Parameters
    ----------
    ctx : CheckContext

    Returns
    -------
    list of AltitudeWait
    """
    got = ctx.shared.get(SHARED_KEY)
    if got is None:
        from supervisor import analysis as an

        got = altitude_waits(ctx.plan, an.for_context(ctx))
        ctx.shared[SHARED_KEY] = got
        refs = ctx.shared.setdefault("references", [])
        if not any(r.get("name") == MINIMUM_TABLE for r in refs):
            refs.append(table_reference())
    return got


def check_section(ctx: Any) -> list[dict[str, Any]]:
    """The check's top-level ``altitude`` list (empty when it could not be computed).

    The entries the rule ``exposure-flying`` judged, computed here when no rule did;
    a failure leaves the list empty (the checklist then prints "not computed").
    """
    try:
        waits = for_context(ctx)
    except Exception:  # the rule that uses them reports the failure as a warning
        return []
    basis = model_basis(ctx.plan, str(ctx.shared.get("coefficient_status") or "FROM MEMORY"))
    return [w.to_json(basis) for w in waits]
