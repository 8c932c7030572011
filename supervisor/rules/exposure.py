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
* Flying or driving to altitude after diving: the model's time on the surface
  until no compartment's ceiling with GF high is below the pressure of an 8,000 ft
  cabin, beside the Navy rule, which rests on the highest repetitive group of the
  previous 24 hours; the bundled references give no groups, so the rule-based
  interval is not available and must be taken from the current table.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 9: repetitive
       dives, diving at altitude, ascent to altitude after diving.
.. [2] NOAA Diving Center, *Topside* vol. 2 no. 9 (1999): flying after diving with
       the Navy table, 8,000 ft cabin.
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor import analysis as an
from supervisor.findings import Finding
from supervisor.rules.base import CheckContext, Family, Rule
from supervisor.units import sea_level_equivalent_depth

FAMILY = Family("repetitive-altitude", "Repetitive diving, altitude and flying")

NAVY_CH9 = "U.S. Navy Diving Manual, Rev 4 Change A, ch. 9"
TOPSIDE = "NOAA Diving Center, Topside 2(9), 1999 (Navy flying-after-diving table)"
NOT_COMPUTED = "not computed"
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
    title="Time before flying or driving to altitude after the last dive",
    citation=TOPSIDE,
    kind="reference",
    source_status="OLDER-EDITION",
)
def flying(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The model's time to an 8,000 ft cabin beside the (unavailable) table interval.

    Always needs review: a model figure is not a flying rule, and the table
    interval cannot be looked up without repetitive groups.
    """
    pa = an.for_context(ctx)
    gf = ctx.policy.gf_high
    for day in pa.divers.values():
        last = day.dive_ids[-1]
        t = day.time_to_altitude_min.get(an.CABIN_ALTITUDE_M)
        if ctx.plan.site.altitude_m >= an.CABIN_ALTITUDE_M:
            yield r.note(
                f"{day.diver}: the site is at or above 8,000 ft; the Navy rule needs no interval "
                "before a commercial flight (cabin at a higher pressure)",
                dive=last,
            )
            continue
        if t is None:
            why = day.errors.get("altitude", f"more than {an.ALTITUDE_SEARCH_MAX_MIN // 60} h")
            yield r.review(
                f"needs review: {day.diver}: the model's time before flying could not be given "
                f"({why}); take the interval from the current table",
                dive=last, measured=NOT_COMPUTED, unit="min",
            )
            continue
        h, m = divmod(int(t), 60)
        yield r.review(
            f"needs review: {day.diver}: the model (GF high {gf:g} %) gives {h} h {m:02d} min on "
            f"the surface after {last} before ascending to 8,000 ft (a commercial cabin); this is "
            "a model figure, not a flying rule: the Navy table interval (highest repetitive group "
            "of the previous 24 h, OLDER-EDITION) is not available in the bundled references; "
            "take the interval from the current table and the contractor's manual",
            measured=float(t), unit="min", dive=last,
        )
