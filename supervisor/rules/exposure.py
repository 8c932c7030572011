"""Exposure across the day: repetitive dives, 12- and 24-hour windows, altitude, flying.

* Repetitive dives: each diver's dives are put on one time line and the tissue
  tensions at the end of a dive, off-gassed over the surface interval, start the
  next (:mod:`supervisor.analysis`).  A dive within 12 hours of the diver's
  previous dive is repetitive (the Navy window of Rev 4 Change A and earlier,
  OLDER-EDITION; the Rev 7 window is not confirmed).  A missing interval is taken
  as none, the most loaded case, and needs review.
* Windows: the dives and bottom time of each diver within 12 and 24 hours of the
  end of the diver's last dive, for the supervisor.
* Altitude: the model runs at the site's surface pressure (ICAO standard
  atmosphere) and the reference table is entered with the sea-level-equivalent
  depth D * P_sea / P_site (Navy altitude procedure, OLDER-EDITION).  No
  correction is needed from sea level to 300 ft; above 10,000 ft the Navy
  procedure does not apply.  The model takes the divers' tissues as settled at the
  site's pressure: after a recent ascent to the site, that needs review.
* Flying or driving to altitude after diving: never a wait shorter than the
  trade's minimum (12 h after a single no-stop dive, 18 h after repetitive dives
  or several days of diving, 24 h after a decompression dive: common guidance,
  FROM MEMORY, :mod:`supervisor.analysis.altitude`), or the contractor's longer
  policy value.  The model's time to an 8,000 ft cabin is shown beside it only
  when longer.  The Navy rule rests on the highest repetitive group of the
  previous 24 hours; no verified table of it is bundled.  Planned travel
  (``altitude_travel``) departing before the minimum fails; with no travel
  planned the wait is information.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 9: repetitive
       dives, diving at altitude, ascent to altitude after diving.
.. [2] NOAA Diving Center, *Topside* vol. 2 no. 9 (1999): flying after diving with
       the Navy table, 8,000 ft cabin.
.. [3] Common guidance on flying after diving (12, 18, 24 h), recalled from memory;
       thought to follow the Divers Alert Network Flying After Recreational Diving
       Workshop (Sheffield PJ, Vann RD, eds., 2002).
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from supervisor import analysis as an
from supervisor.analysis import altitude as alt
from supervisor.findings import Finding
from supervisor.rules.base import NONE, NOT_STATED, CheckContext, Family, Rule
from supervisor.units import sea_level_equivalent_depth

FAMILY = Family("repetitive-altitude", "Repetitive diving, altitude and flying")

NAVY_CH9 = "U.S. Navy Diving Manual, Rev 4 Change A, ch. 9"
TOPSIDE = "NOAA Diving Center, Topside 2(9), 1999 (Navy flying-after-diving table)"
NOT_COMPUTED = "not computed"
GUIDANCE = ("common guidance on flying after diving, from memory (12 h after a single no-stop "
            "dive, 18 h after repetitive dives or several days of diving, 24 h after a "
            "decompression dive; table altitude-after-diving)")
NAVY_NOT_BUNDLED = ("the Navy table's interval (highest repetitive group of the previous 24 h) "
                    "is not bundled: where it is longer, it governs")
NO_CORRECTION_M = 300 * 0.3048  # 300 ft [m]
NAVY_ALTITUDE_MAX_M = 10000 * 0.3048  # 10,000 ft [m]


@FAMILY.rule(
    "exposure-repetitive",
    title="Repetitive dives: tissues carried across the surface interval",
    citation=f"{NAVY_CH9} (repetitive dive within 12 h)",
    kind="reference",
    source_status="OLDER-EDITION",
)
def repetitive(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Each later dive of a diver starts from the tissues of the earlier one."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        for note in a.notes:
            if "no earlier dive" in note:
                yield r.review(f"needs review: {note}", dive=d.id,
                               measured=d.surface_interval_min, unit="min")
        if a.previous is None:
            continue
        if "tissues" in a.errors:
            yield r.review(f"needs review: {a.errors['tissues']}", dive=d.id,
                           measured=NOT_COMPUTED)
            continue
        si = a.surface_interval_min or 0.0
        load = f"; highest compartment at {a.start_loading_percent:.0f} % of its GF-high " \
            "surface limit on leaving the surface" if a.start_loading_percent is not None else ""
        kw = dict(measured=round(si, 1), limit=an.REPETITIVE_WINDOW_MIN, unit="min", dive=d.id)
        if a.interval_assumed:
            yield r.review(
                f"needs review: no surface interval stated after {a.previous}; none was assumed "
                f"(the most loaded case){load}",
                **kw,
            )
        elif a.repetitive:
            yield r.note(
                f"repetitive dive: {si:.0f} min after {a.previous}, within 12 h; the model "
                f"carried the tissues across the interval{load}",
                **kw,
            )
        else:
            yield r.note(
                f"{si:.0f} min after {a.previous}: beyond the 12-h repetitive window; the model "
                f"still carried the tissues{load}",
                **kw,
            )


@FAMILY.rule(
    "exposure-window",
    title="Dives of each diver in the last 12 and 24 hours",
    citation=f"{NAVY_CH9} (12-h repetitive window; 24 h before ascent to altitude)",
    kind="reference",
    source_status="OLDER-EDITION",
)
def window(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Count each diver's dives and bottom time ending within 12 and 24 hours of the last.

    The counts rest on the dives' places on the diver's time line; where a surface
    interval is not stated, none is assumed (every dive inside the windows), which
    needs review.
    """
    pa = an.for_context(ctx)
    for day in pa.divers.values():
        dives = [pa.dives[i] for i in day.dive_ids]
        end = dives[-1].end_min
        parts = []
        n24 = 0
        for hours, length in ((12, an.REPETITIVE_WINDOW_MIN), (24, an.DAY_WINDOW_MIN)):
            inside = [x for x in dives if x.end_min > end - length - 1e-9]
            bt = sum(x.dive.bottom_time_min for x in inside)
            parts.append(f"{len(inside)} dive(s), {bt:g} min bottom time in the last {hours} h")
            n24 = len(inside)
        text = f"{day.diver}: " + "; ".join(parts)
        kw = dict(measured=float(n24), unit="dives", dive=day.dive_ids[-1])
        assumed = [x.id for x in dives if x.interval_assumed]
        if assumed:
            yield r.review(
                f"needs review: {text}; no surface interval is stated before "
                f"{', '.join(assumed)}, so none was assumed and the counts may include dives "
                "that lie outside the windows",
                **kw,
            )
        else:
            yield r.note(text, **kw)


@FAMILY.rule(
    "exposure-altitude",
    title="Altitude: surface pressure in the model, sea-level-equivalent depth for tables",
    citation=f"{NAVY_CH9} 9-12 (diving at altitude)",
    kind="reference",
    source_status="OLDER-EDITION",
)
def altitude(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """State the altitude correction used, and what the supervisor must confirm."""
    plan = ctx.plan
    alt = float(plan.site.altitude_m)
    ps = plan.p_surface_bar
    kw = dict(measured=alt, unit="m")
    if alt <= NO_CORRECTION_M + 1e-9:
        yield r.ok(
            f"site at {alt:g} m: no altitude correction needed up to 300 ft; surface pressure "
            f"{ps:.4f} bar used in the model",
            limit=round(NO_CORRECTION_M, 1), **kw,
        )
        return
    sled = ", ".join(
        f"{d.id} {ctx.show(d.max_depth)} -> "
        f"{float(sea_level_equivalent_depth(d.max_depth, ps)):.1f} {ctx.unit}"
        for d in ctx.dives()
    )
    yield r.note(
        f"site at {alt:g} m: surface pressure {ps:.4f} bar (standard atmosphere) used in the "
        f"model; sea-level-equivalent depths for table look-up: {sled}; measure the barometric "
        "pressure at the site where the procedure calls for it",
        limit=round(NO_CORRECTION_M, 1), **kw,
    )
    if alt > NAVY_ALTITUDE_MAX_M + 1e-9:
        yield r.review(
            f"needs review: the site is above 10,000 ft ({alt:g} m), outside the Navy altitude "
            "procedure; consult a diving medical officer and the contractor's manual",
            limit=round(NAVY_ALTITUDE_MAX_M, 1), **kw,
        )
    yield r.review(
        "needs review: the model takes the divers' tissues as settled at the site's pressure; "
        "divers who arrived at altitude recently carry extra nitrogen (the Navy procedure gives "
        "them a repetitive group on arrival)",
        **kw,
    )


@FAMILY.rule(
    "exposure-flying",
    title="Time on the surface before travel to altitude (flying, driving over high ground)",
    citation=GUIDANCE,
    kind="reference",
    source_status="FROM MEMORY",
)
def flying(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The trade's minimum wait before altitude per diver; each planned travel against it.

    The minimum (12 h, 18 h or 24 h, common guidance from memory, or the contractor's
    longer policy value) is the wait stated; the model's time appears beside it only
    when longer.  Without a planned travel this is information.  A planned departure
    before the minimum fails: the minimum is a default that guards against immediate
    harm.  After the minimum but before a longer model time, or when the dives' clock
    times are unknown, the travel needs review.
    """
    pa = an.for_context(ctx)
    waits = alt.for_context(ctx)
    for w in waits:
        yield from _wait_findings(ctx, r, w)
    for i in alt.travellers_without_dives(ctx.plan, pa):
        yield _no_dive_travel(ctx, r, i)


def _wait_text(ctx: CheckContext, w: alt.AltitudeWait) -> str:
    parts = [f"{w.diver}: at least {alt.hours_minutes(w.hours * 60)} on the surface after "
             f"{w.after_dive} before any ascent to altitude (a flight, or a drive higher than the "
             f"site): {w.basis_said}"]
    if w.model_cabin_min is not None:
        parts.append(f"the model gives longer to an 8,000 ft cabin: "
                     f"{alt.hours_minutes(w.model_cabin_min)} (GF high {ctx.policy.gf_high:g} %)")
    if w.earliest_departure is not None:
        parts.append(f"surfacing {alt.clock(w.surfaced_at)}, earliest departure "  # type: ignore[arg-type]
                     f"{alt.clock(w.earliest_departure)}")
    if ctx.plan.site.altitude_m >= an.CABIN_ALTITUDE_M:
        parts.append("the site is at or above 8,000 ft: a commercial cabin is no ascent from it "
                     "(Navy rule, OLDER-EDITION); the minimum applies to travel higher than the "
                     "site")
    parts += w.notes
    parts.append(NAVY_NOT_BUNDLED)
    return "; ".join(parts)


def _wait_findings(ctx: CheckContext, r: Rule, w: alt.AltitudeWait) -> Iterator[Finding]:
    base = dict(dive=w.after_dive, citation=w.source, status=w.source_status)
    text = _wait_text(ctx, w)
    if not w.travel:
        tail = "; ".join(w.reviews)
        yield r.note(f"{text}{'; ' + tail if tail else ''}; no travel to altitude is planned "
                     "(altitude_travel)", limit=w.hours, unit="h", **base)
        return
    yield r.note(text, limit=w.hours, unit="h", **base)
    for why in w.reviews:
        yield r.review(f"needs review: {w.diver}: {why}", measured=NOT_COMPUTED, limit=w.hours,
                       unit="h", **base)
    for t in w.travel:
        yield _travel_finding(r, w, t, base)


def _travel_finding(r: Rule, w: alt.AltitudeWait, t: alt.Travel,
                    base: dict[str, Any]) -> Finding:
    where = f"{w.diver}: travel to {t.altitude:,.0f} {t.unit} departing {alt.clock(t.departure)}"
    on_surface = (None if w.surfaced_at is None else
                  round((t.departure - w.surfaced_at).total_seconds() / 3600.0, 2))
    kw = dict(limit=w.hours, unit="h", **base)
    if not t.ascent:
        return r.ok(f"{where}: {t.reason}", measured=on_surface, verified=w.verified,
                    kind="policy" if w.from_policy else None, **kw)
    if t.ok is False:
        return r.breach(
            f"{where}: {t.reason} (earliest departure {alt.clock(t.earliest)}; "  # type: ignore[arg-type]
            f"{w.basis_said}); a departure before the minimum is refused: the minimum guards "
            "against immediate harm",
            measured=on_surface, kind="policy",
            **{**kw, "citation": f"{w.source}; a default guarding against immediate harm"},
        )
    if t.ok is None:
        if t.earliest is None:
            return r.review(f"needs review: {where}: {t.reason}; at least "
                            f"{alt.hours_minutes(w.hours * 60)} after surfacing from "
                            f"{w.after_dive} ({w.basis_said})", measured=NOT_STATED, **kw)
        model = (f"{alt.hours_minutes(t.model_wait_min)}, earliest "
                 f"{alt.clock(t.model_earliest)}" if t.model_wait_min is not None  # type: ignore[arg-type]
                 else "longer than its 72 h search")
        return r.review(f"needs review: {where}: {t.reason} (model: {model}); a model time is "
                        "not a flying rule: the supervisor and a diving medical officer decide",
                        measured=on_surface, **{**kw, "limit": round(
                            (t.model_wait_min or 72 * 60) / 60.0, 2)})
    return r.ok(f"{where}: {t.reason} (earliest departure {alt.clock(t.earliest)})",  # type: ignore[arg-type]
                measured=on_surface, verified=w.verified,
                kind="policy" if w.from_policy else None, **kw)


def _no_dive_travel(ctx: CheckContext, r: Rule, i: int) -> Finding:
    t = ctx.plan.altitude_travel[i]
    m = ctx.member(t.diver)
    where = (f"{t.diver}: travel to {t.altitude:,.0f} {ctx.plan.altitude_unit} departing "
             f"{alt.clock(t.departure)}")
    if m is not None and (m.has("diver") or m.has("standby-diver")):
        return r.review(
            f"needs review: {where}: no dive of {t.diver} is in this plan, but they hold a diving "
            "role; if they dive (a standby who goes in), or dived before this plan, the minimum "
            "wait before altitude applies from their surfacing",
            measured=NONE, limit="a dive in the plan", citation=GUIDANCE)
    return r.note(f"{where}: {t.diver} does not dive in this plan; no wait before altitude is "
                  "computed", citation=GUIDANCE)
