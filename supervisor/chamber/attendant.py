"""The inside attendant: oxygen by the table's rule, own decompression, dose and policy.

Oxygen rule
    Each table file lists the cases of its attendant-oxygen rule
    (``[[conventions.attendant_oxygen]]``).  The base case is chosen by the
    number of extensions run; the recent-exposure case is added when the
    attendant dived (or had another hyperbaric exposure) within the window of
    the after-care rules (12 h, OLDER-EDITION; later editions may use 18 h,
    from memory, so a dive 12-18 h before is flagged).  A case's minutes at a
    depth are placed on the patient's last oxygen minutes at that depth before
    the chamber leaves it: the attendant takes the air breaks with the patient
    (this project's reading of the rule).  Oxygen the depth cannot hold (more
    than the patient breathes there) is reported as a shortfall, never
    invented elsewhere.

Own decompression
    The attendant breathes chamber air except on those periods.  That profile
    runs through ZH-L16 with the policy's gradient factors
    (:func:`supervisor.engine.evaluate.evaluate_profile`).  A recent dive
    (``--attendant-recent-dive``) is taken first: its decompression is the
    model's own schedule for its depth and bottom time (its real schedule is not
    known), then the surface interval, then the treatment.  A broken ceiling, a
    surfacing gradient factor above the policy's GF high, a PO2 above the
    policy's chamber limit or a dose above the REPEX single-day allowance is a
    warning: out of policy.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), §21-5.6.8.1.2-.5
       (p. 21-26), inside tenders' oxygen (OLDER-EDITION).
.. [2] Bühlmann AA, Völlm EB, Nussberger P, Tauchmedizin, Springer, 2002 (ZH-L16C).
.. [3] Hamilton RW, Kenyon DJ, Peterson RE, REPEX habitat diving procedures, NOAA
       OUR Technical Report 88-1B (1988): single-day allowance (from memory).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from supervisor import constants as C
from supervisor.chamber.clock import hours_minutes, split_clock
from supervisor.chamber.timeline import Timeline, TimelineLine
from supervisor.engine.evaluate import ProfileEvaluation, evaluate_profile
from supervisor.engine.oxygen import load_pulmonary_limits, profile_exposure
from supervisor.errors import InputError
from supervisor.gas import AIR, parse_gas
from supervisor.profile import Profile, Segment
from supervisor.references.schema import AttendantOxygen
from supervisor.text import excerpt

#: Accepted form of ``--attendant-recent-dive``.
RECENT_DIVE_FORM = ("depth=DEPTH,bottom=MIN,since=H:MM[,gas=GAS], e.g. "
                    "depth=100,bottom=25,since=3:00 (depth in fsw, or 30msw; bottom time in "
                    "min; since = time from surfacing to the start of the treatment)")
#: Window of the recent-exposure case in later editions, checked as well [h] (from memory).
LATER_WINDOW_H = 18.0
_EPS = 1e-9


@dataclass(frozen=True)
class RecentDive:
    """A dive of the attendant before the treatment.

    Attributes
    ----------
    depth_fsw : float
        Maximum depth [fsw].
    bottom_min : float
        Bottom time, from leaving the surface [min].
    since_min : float
        From surfacing to the start of the treatment [min].
    gas : str
        Bottom gas.
    """

    depth_fsw: float
    bottom_min: float
    since_min: float
    gas: str = "air"

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dict (the ``inputs.attendant_recent_dive`` object)."""
        return {"depth_fsw": self.depth_fsw, "bottom_min": self.bottom_min,
                "since_min": self.since_min, "gas": self.gas}


def _number(text: str, field: str) -> float:
    try:
        v = float(text)
    except ValueError:
        raise InputError("--attendant-recent-dive", f"{field}: got {excerpt(text)}; expected "
                         f"{RECENT_DIVE_FORM}") from None
    if not (v == v and v not in (float("inf"), float("-inf"))):
        raise InputError("--attendant-recent-dive", f"{field}: got {excerpt(text)}; expected a "
                         "finite number")
    return v


def parse_recent_dive(spec: str) -> RecentDive:
    """Read ``--attendant-recent-dive`` (see :data:`RECENT_DIVE_FORM`).

    Raises
    ------
    InputError
        ``--attendant-recent-dive`` with the accepted form.
    """
    opt = "--attendant-recent-dive"
    parts: dict[str, str] = {}
    for item in str(spec).split(","):
        if not item.strip():
            continue
        key, sep, value = item.partition("=")
        key = key.strip().lower()
        if not sep or key not in ("depth", "bottom", "since", "gas") or key in parts:
            raise InputError(opt, f"got {excerpt(spec)}; expected {RECENT_DIVE_FORM}")
        parts[key] = value.strip()
    missing = [k for k in ("depth", "bottom", "since") if k not in parts]
    if missing:
        raise InputError(opt, f"missing {', '.join(missing)}; expected {RECENT_DIVE_FORM}")
    d = parts["depth"].lower()
    if d.endswith("msw"):
        depth = _number(d[:-3], "depth") / C.BAR_PER_FSW * C.BAR_PER_MSW
    else:
        depth = _number(d[:-3] if d.endswith("fsw") else d, "depth")
    b = parts["bottom"].lower()
    bottom = _number(b[:-3] if b.endswith("min") else b, "bottom")
    since = _since(parts["since"])
    if not 0 < depth <= 400:
        raise InputError(opt, f"depth: got {depth:g} fsw; expected a depth > 0 and <= 400 fsw")
    if not 0 < bottom <= 480:
        raise InputError(opt, f"bottom: got {bottom:g} min; expected 0 < minutes <= 480")
    gas = parts.get("gas", "air")
    try:
        parse_gas(gas)
    except InputError as exc:
        raise InputError(opt, f"gas: {exc.message}") from None
    return RecentDive(float(depth), float(bottom), float(since), gas)


def _since(text: str) -> float:
    opt = "--attendant-recent-dive"
    m = re.fullmatch(r"\s*(\d{1,3}):(\d{2})\s*", text)
    if m and int(m.group(2)) < 60:
        return int(m.group(1)) * 60.0 + int(m.group(2))
    t = text.strip().lower()
    for suffix, scale in (("min", 1.0), ("h", 60.0)):
        if t.endswith(suffix):
            v = _number(t[: -len(suffix)], "since") * scale
            if v >= 0:
                return v
    raise InputError(opt, f"since: got {excerpt(text)}; expected H:MM (e.g. 3:00), Nh or Nmin, "
                     "the time from surfacing to the start of the treatment")


# --------------------------------------------------------------------------- oxygen rule


@dataclass(frozen=True)
class OxygenInterval:
    """A time the attendant breathes oxygen [min after the start], with its depth range."""

    start_min: float
    end_min: float
    from_depth: float
    to_depth: float

    @property
    def minutes(self) -> float:
        """Length [min]."""
        return self.end_min - self.start_min


@dataclass
class AttendantOxygenPlan:
    """The attendant's oxygen on a timeline.

    Attributes
    ----------
    cases : list of AttendantOxygen
        The cases of the rule that apply (base case first).
    intervals : list of OxygenInterval
        Oxygen times, in order.
    shortfall_min : float
        Oxygen minutes a case asks for that the depth cannot hold [min].
    recent : bool
        Whether the recent-exposure case applies.
    """

    cases: list[AttendantOxygen]
    intervals: list[OxygenInterval]
    shortfall_min: float
    recent: bool

    @property
    def minutes(self) -> float:
        """Oxygen time [min]."""
        return float(sum(i.minutes for i in self.intervals))

    @property
    def chamber_air_only(self) -> bool:
        """True when the rule gives the attendant no oxygen."""
        return not self.intervals and self.shortfall_min <= 0


def select_cases(tl: Timeline, recent: bool) -> list[AttendantOxygen]:
    """The cases of the table's attendant rule for this timeline.

    Returns an empty list when the table states no rule.
    """
    rules = tl.table.model.conventions.attendant_oxygen
    n = tl.extensions.total
    base = [a for a in rules if a.when != "recent-exposure" and a.applies(n)]
    extra = [a for a in rules if a.when == "recent-exposure"] if recent else []
    return base[:1] + extra


def _merge(parts: list[tuple[float, float, float, float]]) -> list[OxygenInterval]:
    out: list[OxygenInterval] = []
    for s, e, d0, d1 in sorted(parts):
        if out and abs(out[-1].end_min - s) < 1e-6:
            last = out[-1]
            out[-1] = OxygenInterval(last.start_min, e, last.from_depth, d1)
        elif e - s > _EPS:
            out.append(OxygenInterval(s, e, d0, d1))
    return out


def place_oxygen(tl: Timeline, cases: list[AttendantOxygen]) -> tuple[list[OxygenInterval],
                                                                      float]:
    """Place the cases' oxygen on the timeline (module docstring).

    Returns
    -------
    tuple
        (the intervals, the shortfall [min]).
    """
    parts: list[tuple[float, float, float, float]] = []
    shortfall = 0.0
    by_depth: dict[float, tuple[float, bool]] = {}
    for a in cases:
        if a.depth is None:
            continue
        m, asc = by_depth.get(a.depth, (0.0, False))
        by_depth[a.depth] = (m + a.oxygen_min, asc or a.with_ascent)
    lines = tl.lines
    for depth, (need, ascent) in by_depth.items():
        holds = [i for i, x in enumerate(lines)
                 if not x.travel and abs(x.to_depth - depth) < _EPS]
        if not holds:
            shortfall += need
            continue
        leave = holds[-1]
        left = need
        i = leave
        while left > _EPS and i >= 0 and not lines[i].travel \
                and abs(lines[i].to_depth - depth) < _EPS:
            x = lines[i]
            if x.on_oxygen:
                take = min(left, x.minutes)
                parts.append((x.end_min - take, x.end_min, depth, depth))
                left -= take
            i -= 1
        shortfall += max(left, 0.0)
        if ascent:
            for x in lines[leave + 1:]:
                if x.on_oxygen:
                    parts.append((x.start_min, x.end_min, x.from_depth, x.to_depth))
    return _merge(parts), shortfall


def attendant_oxygen(tl: Timeline, recent: bool) -> AttendantOxygenPlan:
    """The attendant's oxygen by the table's rule.

    Parameters
    ----------
    tl : Timeline
    recent : bool
        The attendant dived or had a hyperbaric exposure within the rule's window.

    Returns
    -------
    AttendantOxygenPlan
    """
    cases = select_cases(tl, recent)
    intervals, short = place_oxygen(tl, cases)
    return AttendantOxygenPlan(cases, intervals, short,
                               recent and any(c.when == "recent-exposure" for c in cases))


def attendant_gases(tl: Timeline, intervals: list[OxygenInterval]
                    ) -> list[tuple[int, float, float, float, str]]:
    """The attendant's profile: (line index, from depth, to depth, minutes, gas) pieces.

    Timeline lines are cut where an oxygen interval starts or ends, the depth
    interpolated linearly along a travel line; pieces are in time order.
    """
    out: list[tuple[int, float, float, float, str]] = []
    for k, x in enumerate(tl.lines):
        cuts = {x.start_min, x.end_min}
        for iv in intervals:
            for t in (iv.start_min, iv.end_min):
                if x.start_min + _EPS < t < x.end_min - _EPS:
                    cuts.add(t)
        pts = sorted(cuts)

        def depth(t: float, x: TimelineLine = x) -> float:
            if x.minutes <= 0:
                return x.to_depth
            return x.from_depth + (x.to_depth - x.from_depth) * (t - x.start_min) / x.minutes

        for a, b in zip(pts, pts[1:], strict=False):
            mid = 0.5 * (a + b)
            on = any(iv.start_min - _EPS <= mid <= iv.end_min + _EPS for iv in intervals)
            out.append((k, depth(a), depth(b), b - a, "oxygen" if on else "air"))
    return out


# --------------------------------------------------------------------------- evaluation


@dataclass
class AttendantResult:
    """The inside attendant on a treatment (module docstring)."""

    oxygen: AttendantOxygenPlan
    recent_dive: RecentDive | None
    window_h: float
    model: str
    gf_low: float
    gf_high: float
    evaluation: ProfileEvaluation
    otu: float
    otu_oxygen: float
    max_po2_atm: float
    otu_allowance: float
    otu_allowance_status: str
    po2_limit_bar: float
    recent_dive_stop_min: float | None = None
    warnings: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    @property
    def out_of_policy(self) -> bool:
        """True when a dose or model margin is outside the policy."""
        return bool(self.warnings)

    def to_json(self, tl: Timeline) -> dict[str, Any]:
        """JSON-ready dict (the ``attendant`` object of ``supervisor.treatment/1``)."""
        ev = self.evaluation
        return {
            "oxygen_rule": [
                {"case": c.case, "when": c.when, "extensions": c.extensions, "depth": c.depth,
                 "oxygen_min": c.oxygen_min, "with_ascent": c.with_ascent,
                 "source_status": c.source_status, "citation": c.citation, "note": c.note}
                for c in self.oxygen.cases],
            "recent_exposure_case": self.oxygen.recent,
            "recent_exposure_window_h": self.window_h,
            "oxygen_periods": [
                {"start": split_clock(tl.start_clock + i.start_min)[0],
                 "start_day": split_clock(tl.start_clock + i.start_min)[1],
                 "end": split_clock(tl.start_clock + i.end_min)[0],
                 "end_day": split_clock(tl.start_clock + i.end_min)[1],
                 "start_min": round(i.start_min, 4), "end_min": round(i.end_min, 4),
                 "minutes": round(i.minutes, 4), "from_depth": i.from_depth,
                 "to_depth": i.to_depth} for i in self.oxygen.intervals],
            "oxygen_min": round(self.oxygen.minutes, 4),
            "oxygen_shortfall_min": round(self.oxygen.shortfall_min, 4),
            "chamber_air_only": self.oxygen.chamber_air_only,
            "recent_dive": None if self.recent_dive is None else {
                **self.recent_dive.to_json(),
                "model_stop_min": self.recent_dive_stop_min},
            "model": {"name": self.model, "gf_low": self.gf_low, "gf_high": self.gf_high,
                      "coefficient_status": ev.coefficient_status},
            "margin": {"ceiling_broken": ev.ceiling_broken,
                       "surfacing_gf_percent": round(100 * ev.surfacing_gf, 1),
                       "max_gf_percent": round(100 * ev.max_gf, 1),
                       "controlling_compartment": ev.controlling_compartment},
            "otu": round(self.otu, 1),
            "otu_oxygen": round(self.otu_oxygen, 1),
            "otu_allowance": self.otu_allowance,
            "otu_allowance_status": self.otu_allowance_status,
            "max_po2_atm": round(self.max_po2_atm, 3),
            "po2_limit_bar": self.po2_limit_bar,
            "out_of_policy": self.out_of_policy,
            "warnings": list(self.warnings),
            "notes": list(self.notes),
        }


def _recent_tensions(rd: RecentDive, model: str, gf_low: float, gf_high: float,
                     p_surface_bar: float) -> tuple[Any, Any, float]:
    from supervisor.engine.schedule import ScheduleRequest, plan_schedule

    res = plan_schedule(ScheduleRequest(depth=rd.depth_fsw, bottom_time_min=rd.bottom_min,
                                        unit="fsw", gas=rd.gas, model=model, gf_low=gf_low,
                                        gf_high=gf_high, p_surface_bar=p_surface_bar))
    ev = evaluate_profile(res.profile, model, gf_low, gf_high)
    surface = Profile([Segment(0.0, 0.0, max(rd.since_min, 0.0), AIR, "surface",
                               "on the surface before the treatment")], "fsw", p_surface_bar)
    ev2 = evaluate_profile(surface, model, gf_low, gf_high, ev.final_p_n2, ev.final_p_he, 0.0)
    return ev2.final_p_n2, ev2.final_p_he, float(res.total_stop_min)


def evaluate_attendant(tl: Timeline, recent_dive: RecentDive | None = None,
                       window_h: float = 12.0, model: str = "zhl16c", gf_low: float = 0.30,
                       gf_high: float = 0.85, po2_limit_bar: float = 2.8,
                       p_surface_bar: float = C.P_ATM_BAR) -> AttendantResult:
    """The attendant's oxygen, decompression margin and dose on a treatment.

    Parameters
    ----------
    tl : Timeline
    recent_dive : RecentDive, optional
        A dive of the attendant before the treatment.
    window_h : float
        Window of the recent-exposure case [h].
    model : {"zhl16a", "zhl16b", "zhl16c"}
        Coefficient set (the policy's).
    gf_low, gf_high : float
        Gradient factors [-] (the policy's).
    po2_limit_bar : float
        The policy's chamber PO2 limit [bar].
    p_surface_bar : float
        Surface pressure at the chamber [bar].

    Returns
    -------
    AttendantResult
    """
    recent = recent_dive is not None and recent_dive.since_min <= window_h * 60 + _EPS
    ox = attendant_oxygen(tl, recent)
    pieces = attendant_gases(tl, ox.intervals)
    pieces = [p for p in pieces if p[3] > 0]
    prof = Profile([Segment(a, b, m, parse_gas(g), "chamber", "attendant")
                    for _, a, b, m, g in pieces], tl.unit, p_surface_bar)  # type: ignore[arg-type]
    pn0 = ph0 = None
    stop_min = None
    notes: list[str] = []
    if recent_dive is not None:
        pn0, ph0, stop_min = _recent_tensions(recent_dive, model, gf_low, gf_high, p_surface_bar)
        notes.append(
            f"recent dive {recent_dive.depth_fsw:g} fsw / {recent_dive.bottom_min:g} min "
            f"({recent_dive.gas}), surfaced {hours_minutes(recent_dive.since_min)} before the "
            f"start; its decompression taken as the model's own schedule ({stop_min:g} min of "
            "stops): its real schedule is not known")
    ev = evaluate_profile(prof, model, gf_low, gf_high, pn0, ph0)
    ex = profile_exposure(prof)
    lim = load_pulmonary_limits()
    allowance = float(np.atleast_1d(lim.total_allowance(1))[0])
    on_o2 = np.array([g == "oxygen" for *_, g in pieces], dtype=bool)
    otu_o2 = float(np.sum(ex.segment_otu[on_o2])) if on_o2.size else 0.0
    out = AttendantResult(ox, recent_dive, window_h, model, gf_low, gf_high, ev, ex.otu, otu_o2,
                          ex.max_po2_atm, allowance, lim.info.source_status, po2_limit_bar,
                          stop_min, [], notes)
    _policy(out, tl)
    return out


def _policy(r: AttendantResult, tl: Timeline) -> None:
    ev = r.evaluation
    w = r.warnings
    cases = tl.table.model.conventions.attendant_oxygen
    if not cases:
        w.append(f"Treatment Table {tl.number} states no oxygen rule for the inside attendant: "
                 "ask the diving medical officer")
    if r.oxygen.shortfall_min > _EPS:
        w.append(f"the rule asks for {r.oxygen.shortfall_min:g} min more attendant oxygen than "
                 "the patient breathes at that depth; not placed: the diving medical officer "
                 "decides where")
    if ev.ceiling_broken:
        w.append(f"out of policy: the model's ceiling is broken for the attendant "
                 f"({r.model} GF {100 * r.gf_low:.0f}/{100 * r.gf_high:.0f}, coefficients "
                 f"{ev.coefficient_status}): their own decompression is not covered by this "
                 "schedule")
    if ev.surfacing_gf > r.gf_high + 0.005:
        w.append(f"out of policy: the attendant surfaces at {100 * ev.surfacing_gf:.0f} % of the "
                 f"M-value gradient, above the policy's GF high {100 * r.gf_high:.0f} %")
    if r.otu > r.otu_allowance + _EPS:
        w.append(f"out of policy: attendant dose {r.otu:.0f} OTU above the single-day allowance "
                 f"{r.otu_allowance:.0f} OTU (REPEX, {r.otu_allowance_status})")
    if r.max_po2_atm * C.P_ATM_BAR > r.po2_limit_bar + 0.01:
        w.append(f"out of policy: attendant PO2 {r.max_po2_atm * C.P_ATM_BAR:.2f} bar above the "
                 f"policy's chamber limit {r.po2_limit_bar:g} bar")
    rd = r.recent_dive
    if rd is not None:
        h = rd.since_min / 60.0
        if r.window_h < h <= LATER_WINDOW_H:
            w.append(f"the attendant's dive ended {hours_minutes(rd.since_min)} before the "
                     f"start: outside the {r.window_h:g}-h window of the rule but within the "
                     f"{LATER_WINDOW_H:g} h that later editions may use (from memory); the "
                     "recent-exposure oxygen is not planned: the diving medical officer decides")
