"""Procedure rules: rates, stops, surface decompression, oxygen periods, special cases.

Two kinds of limit meet here.  The contractor's policy (descent and ascent
rates, stop spacing, last stop) fails a dive that breaks it.  The conventions
of the U.S. Navy air decompression procedure (rates the tables assume, the
5-minute surface interval of surface decompression on oxygen, oxygen periods
and air breaks, exceptional exposure, cold or strenuous work) are known to the
project only from secondary copies, older editions or memory, so a dive that
departs from them is a warning for the supervisor, not a failure.  The plan's
own consistency (a declared decompression that its stops do not carry out)
fails.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 7 Change A (2018), ch. 9 "Air
       Decompression": rules as quoted by secondary sources.
.. [2] U.S. Navy Diving Manual, Revision 4 Change A (2001), chs. 9 and 14:
       older-edition text of the same procedures.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

from supervisor import analysis as an
from supervisor.findings import Finding
from supervisor.gas import parse_gas
from supervisor.plan import Dive, Stop
from supervisor.references import LookupResult, lookup_schedule
from supervisor.rules.base import NO_CHAMBER, CheckContext, Family, Rule
from supervisor.rules.regulatory import READY, chamber_state
from supervisor.rules.tables import shortfall, stop_checks

FAMILY = Family("procedure", "Decompression procedure")

NAVY_REV7 = "U.S. Navy Diving Manual, Rev 7, ch. 9"
NAVY_REV4 = "U.S. Navy Diving Manual, Rev 4 Change A"

#: Navy convention values [fsw, fsw/min, min] with their status; see the rule docstrings.
NAVY_DESCENT_MAX_FSW_MIN = 75.0  # ch. 9 descent rate, from memory
NAVY_ASCENT_MIN_FSW_MIN = 20.0  # ch. 14 tolerance, OLDER-EDITION (Rev 4 Change A)
NAVY_ASCENT_MAX_FSW_MIN = 40.0  # idem
NAVY_ASCENT_FSW_MIN = 30.0  # ascent rate the tables assume, Rev 4 Change A ch. 9, OLDER-EDITION
FIRST_STOP_DELAY_MAX_MIN = 1.0  # delay reaching the first stop that changes the schedule, SECONDARY
O2_PERIOD_MIN = 30.0  # SurDO2 chamber period and in-water O2 run, SECONDARY
O2_FINAL_RUN_MAX_MIN = 35.0  # no final air break if the last run is <= 35 min, OLDER-EDITION
AIR_BREAK_MIN = 5.0  # SECONDARY
EE_DEPTH_FSW = 190.0  # exceptional exposure criteria, SECONDARY
EE_IN_WATER_MIN = 90.0
EE_SURD_PERIODS = 4.0
SHORT_SI_MIN = 10.0  # OLDER-EDITION (pre-2008 Navy air tables)

_TOL = 1e-6


def _is_oxygen(dive: Dive, stop: Stop) -> bool:
    return dive.stop_gas(stop).fo2 >= 0.99


# ---------------------------------------------------------------------------
# rates


@FAMILY.rule(
    "proc-descent-rate",
    title="Descent rate within policy and the table convention",
    citation="contractor policy (policy.descent_rate_max)",
    kind="policy",
)
def descent_rate(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The dive's descent rate against the policy limit (fails) and 75 fsw/min (warns).

    The Navy air procedure wants descent no faster than 75 fsw/min (ch. 9;
    from memory only).
    """
    top = float(ctx.policy.descent_rate_max)
    for d in ctx.dives():
        rate = ctx.plan.descent_rate(d)
        kw = dict(measured=rate, limit=top, unit=f"{ctx.unit}/min", dive=d.id)
        if rate > top + _TOL:
            yield r.breach(
                f"descent at {rate:g} {ctx.unit}/min is faster than the policy limit", **kw
            )
        else:
            yield r.ok(f"descent at {rate:g} {ctx.unit}/min within policy", **kw)
        navy = ctx.limit(NAVY_DESCENT_MAX_FSW_MIN)
        if ctx.fsw(rate) > NAVY_DESCENT_MAX_FSW_MIN + _TOL:
            yield r.breach(
                f"descent at {rate:g} {ctx.unit}/min is faster than the 75 fsw/min the Navy air "
                "procedure assumes",
                rule="proc-descent-rate-table",
                citation=f"{NAVY_REV7} (descent rate)",
                status="FROM MEMORY",
                kind="reference",
                measured=rate,
                limit=navy,
                unit=f"{ctx.unit}/min",
                dive=d.id,
            )


@FAMILY.rule(
    "proc-ascent-rate",
    title="Ascent rate within policy and the table convention",
    citation="contractor policy (policy.ascent_rate_min, policy.ascent_rate_max)",
    kind="policy",
)
def ascent_rate(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The ascent rate against the policy band (fails) and the 20-40 fsw/min tolerance (warns).

    The Navy procedure ascends at 30 fsw/min and accepts minor variation
    between 20 and 40 fsw/min (Rev 4 Change A ch. 14; OLDER-EDITION).
    """
    lo, hi = float(ctx.policy.ascent_rate_min), float(ctx.policy.ascent_rate_max)
    for d in ctx.dives():
        rate = ctx.plan.ascent_rate(d)
        u = f"{ctx.unit}/min"
        if rate > hi + _TOL:
            yield r.breach(
                f"ascent at {rate:g} {u} is faster than the policy's {hi:g} {u}",
                measured=rate,
                limit=hi,
                unit=u,
                dive=d.id,
            )
        elif rate < lo - _TOL:
            yield r.breach(
                f"ascent at {rate:g} {u} is slower than the policy's {lo:g} {u}",
                measured=rate,
                limit=lo,
                unit=u,
                dive=d.id,
            )
        else:
            yield r.ok(
                f"ascent at {rate:g} {u} within policy ({lo:g}-{hi:g} {u})",
                measured=rate,
                limit=f"{lo:g}-{hi:g}",
                unit=u,
                dive=d.id,
            )
        f = ctx.fsw(rate)
        if f > NAVY_ASCENT_MAX_FSW_MIN + _TOL or f < NAVY_ASCENT_MIN_FSW_MIN - _TOL:
            band = f"{ctx.limit(NAVY_ASCENT_MIN_FSW_MIN):g}-{ctx.limit(NAVY_ASCENT_MAX_FSW_MIN):g}"
            yield r.breach(
                f"ascent at {rate:g} {u} is outside the 20-40 fsw/min the table procedure "
                "accepts; the table schedule may not apply",
                rule="proc-ascent-rate-table",
                citation=f"{NAVY_REV4}, ch. 14 (ascent rate)",
                status="OLDER-EDITION",
                kind="reference",
                measured=rate,
                limit=band,
                unit=u,
                dive=d.id,
            )


# ---------------------------------------------------------------------------
# stops


@FAMILY.rule(
    "proc-stop-step",
    title="Stops at multiples of the policy's stop step",
    citation="contractor policy (policy.stop_step)",
    kind="policy",
)
def stop_step(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Every stop depth is a whole multiple of the stop step (10 fsw or 3 msw by default)."""
    step = float(ctx.policy.stop_step)
    for d in ctx.dives():
        if not d.stops:
            continue
        off = [s.depth for s in d.stops if abs(s.depth / step - round(s.depth / step)) > 1e-6]
        if off:
            yield r.breach(
                f"stop at {off[0]:g} {ctx.unit} is not a multiple of {step:g} {ctx.unit}",
                measured=off[0],
                limit=step,
                unit=ctx.unit,
                dive=d.id,
            )
        else:
            yield r.ok(
                f"stops at multiples of {step:g} {ctx.unit}", limit=step, unit=ctx.unit, dive=d.id
            )


@FAMILY.rule(
    "proc-last-stop",
    title="Last water stop no shallower than the policy's last stop",
    citation="contractor policy (policy.last_stop)",
    kind="policy",
)
def last_stop(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The shallowest water stop is at or deeper than the policy's last stop."""
    last = float(ctx.policy.last_stop)
    for d in ctx.dives():
        ws = d.water_stops
        if not ws:
            continue
        shallow = min(s.depth for s in ws)
        kw = dict(measured=shallow, limit=last, unit=ctx.unit, dive=d.id)
        if shallow < last - _TOL:
            yield r.breach(
                f"water stop at {shallow:g} {ctx.unit} is shallower than the last stop "
                f"of {last:g} {ctx.unit}",
                **kw,
            )
        else:
            yield r.ok(f"last water stop at {shallow:g} {ctx.unit}", **kw)


@FAMILY.rule(
    "proc-time-to-first-stop",
    title="Travel time to the first stop: no delay over 1 min",
    citation=f"{NAVY_REV7} (delay in reaching the first stop)",
    source_status="SECONDARY",
    kind="reference",
)
def time_to_first_stop(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The planned travel from the bottom to the first water stop against the table's.

    The tables assume an ascent at 30 fsw/min (Rev 4 Change A, OLDER-EDITION); a
    delay of more than 1 min reaching the first stop changes the schedule (deeper
    than 50 fsw: added to the bottom time; shallower: added to the first stop),
    SECONDARY.  The planned travel at the dive's ascent rate is compared with the
    travel at 30 fsw/min plus 1 min.
    """
    for d in ctx.dives():
        ws = d.water_stops
        if not ws:
            continue
        rate = ctx.plan.ascent_rate(d)
        t = (d.max_depth - ws[0].depth) / rate
        t_table = (ctx.fsw(d.max_depth) - ctx.fsw(ws[0].depth)) / NAVY_ASCENT_FSW_MIN
        limit = round(t_table + FIRST_STOP_DELAY_MAX_MIN, 2)
        to = f"to the first stop at {ws[0].depth:g} {ctx.unit}"
        kw = dict(measured=f"{t:.2f} min {to} ({rate:g} {ctx.unit}/min)",
                  limit=f"{limit:.2f} min {to} ({t_table:.2f} min at 30 fsw/min + 1 min)",
                  dive=d.id)
        head = (f"travel to the first stop at {ws[0].depth:g} {ctx.unit}: {t:.1f} min at "
                f"{rate:g} {ctx.unit}/min against {t_table:.1f} min at 30 fsw/min")
        if t > limit + _TOL:
            yield r.breach(
                f"{head}: a delay of {t - t_table:.1f} min changes the schedule (deeper than "
                "50 fsw add it to the bottom time, shallower to the first stop)",
                **kw,
            )
        else:
            yield r.ok(f"{head}: no delay over 1 min", **kw)


@FAMILY.rule(
    "proc-decompression-declared",
    title="Declared decompression matches the planned stops",
    citation="plan consistency (dives[].decompression and dives[].stops)",
    kind="plan",
)
def decompression_declared(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The stops carry out the decompression the dive declares."""
    for d in ctx.dives():
        ws, cs = d.water_stops, d.chamber_stops
        o2_water = any(_is_oxygen(d, s) for s in ws)
        o2_chamber = any(_is_oxygen(d, s) for s in cs)
        k = d.decompression
        bad = need = None
        if k == "none" and cs:
            bad, need = "declared no decompression but plans chamber stops", "no chamber stops"
        elif k in ("in-water", "in-water-oxygen") and not ws:
            bad, need = f"declared {k} decompression but plans no water stops", "water stops"
        elif k in ("in-water", "in-water-oxygen") and cs:
            bad, need = f"declared {k} decompression but plans chamber stops", "no chamber stops"
        elif k == "in-water-oxygen" and not o2_water:
            bad = "declared in-water oxygen decompression but no water stop is on oxygen"
            need = "a water stop on oxygen"
        elif k == "surface-oxygen" and not cs:
            bad = "declared surface decompression on oxygen but plans no chamber stops"
            need = "chamber stops"
        elif k == "surface-oxygen" and not o2_chamber:
            bad = "declared surface decompression on oxygen but no chamber stop is on oxygen"
            need = "a chamber stop on oxygen"
        if bad:
            yield r.breach(bad, measured=k, limit=need, dive=d.id)
        elif k == "none" and ws:
            yield r.note(
                "stops planned on a no-decompression dive are taken as precautionary",
                measured=k,
                dive=d.id,
            )
        else:
            yield r.ok(
                f"declared {k} decompression matches the planned stops", measured=k, dive=d.id
            )


# ---------------------------------------------------------------------------
# surface decompression and oxygen


@FAMILY.rule(
    "proc-surd-chamber",
    title="Surface decompression needs a ready chamber at the site",
    citation="plan consistency (surface decompression is completed in a chamber)",
    kind="plan",
)
def surd_chamber(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A surface-decompression dive cannot be carried out without a ready chamber at the site."""
    ch = ctx.plan.chamber
    for d in ctx.dives():
        if d.decompression != "surface-oxygen":
            continue
        if ch.on_site and ch.ready:
            yield r.ok("chamber ready at the site for surface decompression", dive=d.id)
        else:
            yield r.breach(
                "surface decompression planned without a ready chamber at the site",
                fact=NO_CHAMBER,
                measured=chamber_state(ctx),
                limit=READY,
                dive=d.id,
            )


def surd_interval_min(ctx: CheckContext, dive: Dive) -> float | None:
    """Planned surface interval of surface decompression [min], or ``None`` if not stated.

    From leaving the last water stop (the bottom if there is none) to arriving
    at the first chamber stop: ascent at the dive's ascent rate, the stated
    deck time, and compression at 100 fsw/min
    (:meth:`supervisor.plan.Plan.surface_decompression_times`).
    """
    if dive.surface_transfer_min is None or not dive.chamber_stops:
        return None
    up, deck, down, _ = ctx.plan.surface_decompression_times(dive)
    return up + deck + down


def _interval_span(ctx: CheckContext, dive: Dive) -> tuple[str, str]:
    """Where the surface interval runs, short and in words.

    ``("40 fsw water stop to 50 fsw chamber", "leaving the 40 fsw water stop to
    arriving at 50 fsw in the chamber")``.
    """
    ws, chamber = dive.water_stops, dive.chamber_stops
    u = ctx.unit
    start = f"{ws[-1].depth:g} {u} water stop" if ws else f"bottom ({dive.max_depth:g} {u})"
    end = f"{chamber[0].depth:g} {u}" if chamber else ""
    short = f"{start} to {end + ' ' if end else ''}chamber"
    words = (f"leaving the {start} to arriving at " + (f"{end} in the chamber" if end
                                                         else "the chamber"))
    return short, words


#: What the procedure does with a late chamber (U.S. Navy Diving Manual Rev 7 ch. 9 as
#: recalled; a secondary source agrees that past the 5-min limit the diver is treated).
SURD_LATE_TEXT = (
    "the procedure (from memory): an interval over 5 and up to 7 min adds a half-period "
    "(15 min oxygen) at 50 fsw; over 7 min surface decompression is abandoned and the diver "
    "is treated: Treatment Table 5 if the schedule needed 2 chamber periods or fewer, Table 6 "
    "if more or on any symptom (secondary sources: past the 5-min limit the diver is treated "
    "on Table 5 or 6)"
)

SURD_INTERVAL_DEFAULT = (
    "default 5 min: U.S. Navy Diving Manual, Rev 7, ch. 9, surface decompression on oxygen "
    "(SECONDARY); Rev 4 Change A, ch. 14 (OLDER-EDITION)"
)


@FAMILY.rule(
    "proc-surd-interval",
    title="Surface decompression: surface interval within the policy's limit",
    citation=f"contractor policy (policy.surd_interval_max_min); {SURD_INTERVAL_DEFAULT}",
    kind="policy",
)
def surd_interval(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Leaving the last water stop to arriving at the first chamber depth within the policy.

    The limit guards against immediate harm (the diver sits on the surface with
    tissues above their M-values until the chamber is pressed), so a longer
    interval fails; the finding says what the procedure does beyond 5 and 7 min.
    """
    top = float(ctx.policy.surd_interval_max_min)
    limit = f"{top:g} min (policy.surd_interval_max_min)"
    for d in ctx.dives():
        if d.decompression != "surface-oxygen" and not d.chamber_stops:
            continue
        short, span = _interval_span(ctx, d)
        si = surd_interval_min(ctx, d)
        if si is None:
            yield r.review(
                f"needs review: surface decompression without surface_transfer_min (the time "
                f"on deck); the surface interval, {span}, cannot be checked against "
                f"{top:g} min",
                measured=f"not stated ({short})", limit=limit, dive=d.id,
            )
            continue
        measured = f"{si:.1f} min, {short}"
        if si > top + _TOL:
            yield r.breach(
                f"surface interval of {si:.1f} min, {span}, is over the policy's {top:g} min; "
                f"{SURD_LATE_TEXT}",
                measured=measured, limit=limit, dive=d.id,
            )
        else:
            yield r.ok(f"surface interval of {si:.1f} min, {span}, within {top:g} min",
                       measured=measured, limit=limit, dive=d.id)


#: Default limit of the supersaturation during a surface-decompression interval [% of
#: the M-value gradient]: DERIVED, not a published limit: the highest peak this project's
#: ZH-L16C model gives (275 %, from 271 % rounded up) for air surface decompression to
#: 190 fsw within 4 chamber periods (the exceptional-exposure line of the Navy procedure,
#: SECONDARY) at a 5-min interval.  Beyond it a dive is outside ordinary surface
#: decompression as this model sees it: needs review, unless the contractor sets a limit.
SURFACE_INTERVAL_GF_DEFAULT = 275.0
SURFACE_INTERVAL_GF_SOURCE = (
    "default 275 %: DERIVED by this project from its own ZH-L16C model (the highest peak of "
    "air surface decompression to 190 fsw within 4 chamber periods at a 5-min interval); "
    "not a published limit"
)


@FAMILY.rule(
    "proc-surd-supersaturation",
    title="Surface decompression: supersaturation during the surface interval within the limit",
    citation=f"contractor policy (policy.surface_interval_gf_max); {SURFACE_INTERVAL_GF_SOURCE}",
    kind="policy",
)
def surd_supersaturation(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The model's peak supersaturation on the surface between the water and the chamber.

    The ceiling check of the planned profile covers the water and the chamber; on
    the surface the ceiling is broken on purpose, so the peak is judged here, as a
    percentage of the M-value gradient (100 % is the M-value) against the
    contractor's ``surface_interval_gf_max``: beyond it the dive fails.  Without a
    contractor limit the project's default applies (DERIVED from its own model, no
    published limit): beyond it the dive needs review, and fails only when the
    interval itself is over the policy's limit too.
    """
    own = ctx.policy.surface_interval_gf_max
    top = float(own) if own is not None else SURFACE_INTERVAL_GF_DEFAULT
    limit = (f"{top:g} % (policy.surface_interval_gf_max)" if own is not None
             else f"{top:g} % (default, DERIVED)")
    si_max = float(ctx.policy.surd_interval_max_min)
    pa = an.for_context(ctx)
    for d in ctx.dives():
        if not d.chamber_stops:
            continue
        a = pa.dives[d.id]
        ev = a.evaluation
        short, span = _interval_span(ctx, d)
        if ev is None or ev.surface_interval_max_gf is None:
            why = a.errors.get("evaluation") or a.errors.get("profile") or "no surface interval"
            yield r.review(f"needs review: the supersaturation during the surface interval "
                           f"({span}) could not be computed ({why})",
                           measured=f"not computed ({short})", limit=limit, dive=d.id)
            continue
        peak = 100.0 * ev.surface_interval_max_gf
        up, deck, down, _ = ctx.plan.surface_decompression_times(d)
        si = up + deck + down
        measured = f"{peak:.0f} % of the M-value gradient, {si:.1f}-min interval"
        head = (f"the model ({a.coefficient_status} coefficients) puts the supersaturation "
                f"during the {si:.1f}-min surface interval ({span}) at up to {peak:.0f} % of "
                f"the M-value gradient (100 % is the M-value)")
        kw = dict(measured=measured, limit=limit, dive=d.id)
        if peak <= top + 1e-9:
            yield r.ok(f"{head}, within {limit}", **kw)
        elif own is not None:
            yield r.breach(f"{head}, beyond the contractor's {top:g} %", **kw)
        elif si > si_max + _TOL:
            yield r.breach(f"{head}, beyond the default {top:g} % (DERIVED, no published "
                           f"limit), and the interval is over {si_max:g} min", **kw)
        else:
            yield r.review(
                f"needs review: {head}, beyond the default {top:g} % ({SURFACE_INTERVAL_GF_SOURCE}"
                "); set policy.surface_interval_gf_max to the contractor's own limit", **kw)


def _o2_runs(dive: Dive, place: str) -> tuple[list[tuple[float, str]], list[tuple[float, str]]]:
    """Continuous oxygen runs and the air breaks between them at ``place``.

    Returns ``(runs, breaks)``, each a list of (minutes, where), where naming the
    stop depths, e.g. ``"30-20 fsw"``.
    """
    runs: list[tuple[float, list[float]]] = []
    breaks: list[tuple[float, list[float]]] = []
    run: tuple[float, list[float]] = (0.0, [])
    gap: tuple[float, list[float]] = (0.0, [])
    for s in (x for x in dive.stops if x.place == place):
        if _is_oxygen(dive, s):
            if run[0] == 0.0 and runs:
                breaks.append(gap)
            run = (run[0] + s.minutes, run[1] + [s.depth])
            gap = (0.0, [])
        else:
            if run[0] > 0.0:
                runs.append(run)
                run = (0.0, [])
            gap = (gap[0] + s.minutes, gap[1] + [s.depth])
    if run[0] > 0.0:
        runs.append(run)

    def where(depths: list[float]) -> str:
        hi, lo = max(depths), min(depths)
        return f"{hi:g}" + (f"-{lo:g}" if lo != hi else "")

    return ([(m, where(ds)) for m, ds in runs], [(m, where(ds)) for m, ds in breaks])


def _o2_period_findings(ctx: CheckContext, r: Rule, d: Dive, place: str) -> Iterator[Finding]:
    runs, breaks = _o2_runs(d, place)
    if not runs:
        return
    where = "in the water" if place == "water" else "in the chamber"
    u = ctx.unit
    over = [
        (i, t, at)
        for i, (t, at) in enumerate(runs)
        if t > (O2_FINAL_RUN_MAX_MIN if i == len(runs) - 1 else O2_PERIOD_MIN) + _TOL
    ]
    short = [(b, at) for b, at in breaks if b < AIR_BREAK_MIN - _TOL]
    for i, t, at in over:
        lim = O2_FINAL_RUN_MAX_MIN if i == len(runs) - 1 else O2_PERIOD_MIN
        last = " (the last run)" if i == len(runs) - 1 else ""
        yield r.breach(
            f"{t:g} min of continuous oxygen {where} at {at} {u} without a 5-min air break",
            measured=f"{t:g} min of oxygen at {at} {u} {where}",
            limit=f"{lim:g} min of oxygen{last}, then air",
            dive=d.id,
        )
    for b, at in short:
        yield r.breach(
            f"air break of {b:g} min {where} at {at} {u} is shorter than 5 min",
            measured=f"{b:g} min air break at {at} {u} {where}",
            limit=f"{AIR_BREAK_MIN:g} min air break",
            dive=d.id,
        )
    if not over and not short:
        t, at = max(runs)
        yield r.ok(
            f"oxygen {where} in runs of at most 30 min with 5-min air breaks",
            measured=f"{t:g} min of oxygen at {at} {u} {where} (longest run)",
            limit=f"{O2_PERIOD_MIN:g} min of oxygen, then air",
            dive=d.id,
        )


@FAMILY.rule(
    "proc-o2-air-breaks",
    title="In-water oxygen: a 5-min air break after every 30 min on oxygen",
    citation=f"{NAVY_REV7} (in-water air/oxygen decompression, air breaks)",
    source_status="SECONDARY",
    kind="reference",
)
def o2_air_breaks(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """No more than 30 min on oxygen in the water without a 5-min air break (the last run
    up to 35 min, OLDER-EDITION); air break time is not stop time."""
    for d in ctx.dives():
        yield from _o2_period_findings(ctx, r, d, "water")


@FAMILY.rule(
    "proc-o2-chamber-periods",
    title="Surface decompression: 30-min oxygen periods with 5-min air breaks",
    citation=f"{NAVY_REV7} (surface decompression on oxygen, chamber periods)",
    source_status="SECONDARY",
    kind="reference",
)
def o2_chamber_periods(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Chamber oxygen in 30-min periods separated by 5-min air breaks (SECONDARY)."""
    for d in ctx.dives():
        if d.chamber_stops:
            yield from _o2_period_findings(ctx, r, d, "chamber")


def surd_periods(dive: Dive) -> float:
    """Chamber oxygen periods of a surface-decompression dive, in half-period steps [periods]."""
    o2 = sum(s.minutes for s in dive.chamber_stops if _is_oxygen(dive, s))
    return math.ceil(o2 / (O2_PERIOD_MIN / 2) - 1e-9) / 2


@FAMILY.rule(
    "proc-exceptional-exposure",
    title="Exceptional exposure",
    citation=f"{NAVY_REV7} (exceptional exposure)",
    source_status="SECONDARY",
    kind="reference",
)
def exceptional_exposure(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Deeper than 190 fsw, over 90 min in-water decompression, or more than 4 chamber
    periods is an exceptional exposure: planned only with special approval."""
    for d in ctx.dives():
        hits = []
        if ctx.fsw(d.max_depth) > EE_DEPTH_FSW:
            hits.append(
                (
                    f"deeper than 190 fsw ({ctx.show(d.max_depth)})",
                    d.max_depth,
                    ctx.limit(EE_DEPTH_FSW),
                    ctx.unit,
                )
            )
        if d.in_water_stop_min > EE_IN_WATER_MIN:
            hits.append(
                (
                    f"{d.in_water_stop_min:g} min in-water decompression, over 90 min",
                    f"{d.in_water_stop_min:g} min of in-water stops",
                    f"{EE_IN_WATER_MIN:g} min of in-water stops",
                    None,
                )
            )
        if d.decompression == "surface-oxygen" and surd_periods(d) > EE_SURD_PERIODS:
            n = surd_periods(d)
            hits.append((f"{n:g} chamber oxygen periods, over 4", n, EE_SURD_PERIODS,
                         "30-min chamber oxygen periods"))
        for text, measured, limit, unit in hits:
            yield r.breach(
                f"exceptional exposure: {text}; needs the approval the contractor's "
                "manual requires",
                measured=measured,
                limit=limit,
                unit=unit,
                dive=d.id,
            )
        if not hits:
            yield r.ok(
                f"not an exceptional exposure: {ctx.show(d.max_depth)} within 190 fsw, "
                f"{d.in_water_stop_min:g} min in-water decompression within 90 min"
                + (f", {surd_periods(d):g} chamber oxygen periods within 4"
                   if d.decompression == "surface-oxygen" else ""),
                measured=d.max_depth,
                limit=ctx.limit(EE_DEPTH_FSW),
                unit=ctx.unit,
                dive=d.id,
            )


NAVY_COLD = (
    "U.S. Navy Diving Manual, pre-2008 air tables (cold or strenuous dives: decompress on the "
    "next longer bottom-time schedule)"
)


def next_longer(ctx: CheckContext, a: an.DiveAnalysis) -> tuple[LookupResult | None, str]:
    """The next longer schedule of the reference table for a dive, or why there is none.

    The dive enters the table at the next deeper depth and the next longer bottom
    time (:mod:`supervisor.references.lookup`); the next longer schedule is the row
    with the next longer bottom time at that same table depth, in the dive's mode.

    Parameters
    ----------
    ctx : CheckContext
        The rules' context.
    a : DiveAnalysis
        The dive's analysis (the policy's table and the dive's look-up).

    Returns
    -------
    (LookupResult or None, str)
        The look-up of the next longer row and ``""``; or ``None`` and the reason
        no such schedule is available.
    """
    table, look, dive = a.table, a.reference, a.dive
    if not ctx.policy.reference_table:
        return None, "the policy names no reference table"
    if table is None:
        return None, a.errors.get("reference") or "the reference table was not loaded"
    if table.kind != "decompression":
        return None, f"{table.name} is a {table.kind} table, without decompression schedules"
    t_gas = parse_gas(table.model.conventions.gas)
    if t_gas != dive.gas_mix:
        return None, f"{table.name} is for {t_gas.name}; the dive breathes {dive.gas_mix.name}"
    if look is None:
        return None, a.errors.get("reference", "the table look-up failed")
    if look.depth is None or look.bottom_time is None:
        return None, look.reason
    unit = table.model.conventions.depth_unit
    longer = sorted(
        float(x.bottom_time) for x in table.rows
        if x.depth == look.depth and x.bottom_time > look.bottom_time + _TOL
    )
    if not longer:
        return None, (f"{look.bottom_time:g} min is the longest bottom time at {look.depth:g} "
                      f"{unit} in {table.name}")
    nxt = lookup_schedule(table, float(look.depth), longer[0], look.mode or "air")  # type: ignore[arg-type]
    if nxt.outside_table:
        return None, nxt.reason
    if not nxt.permitted:
        return None, nxt.reason
    return nxt, ""


@FAMILY.rule(
    "proc-cold-strenuous",
    title="Cold or strenuous work: the proposed stops cover the next longer schedule",
    citation=NAVY_COLD,
    source_status="OLDER-EDITION",
    kind="reference",
)
def cold_strenuous(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A cold or strenuous dive decompresses on the next longer bottom-time schedule.

    The rule of the pre-2008 Navy air tables (OLDER-EDITION): the proposed stops
    must cover the schedule of the next longer bottom time at the same table depth
    (every stop present, on the same gas, at least as long).  The measured value is
    the proposed total stop time against the total of that schedule.  Later tables
    are reported to allow for such conditions already (the comparison is only
    partly confirmed), so the status stays OLDER-EDITION: a shortfall warns and a
    pass needs review.  Without a decompression table row the rule cannot be
    checked: needs review.
    """
    pa = an.for_context(ctx)
    for d in ctx.dives():
        why = " and ".join(w for w, on in (("cold", d.cold), ("strenuous work", d.strenuous))
                           if on)
        if not why:
            continue
        a = pa.dives[d.id]
        have = float(sum(s.minutes for s in d.stops))
        proposed = (f"{have:g} min of proposed stops ({len(d.stops)} stop(s))" if d.stops
                    else "no proposed stops")
        nxt, reason = next_longer(ctx, a)
        if nxt is None:
            yield r.review(
                f"needs review: {why}: the next longer bottom-time schedule is not available "
                f"({reason}); decompress per the contractor's manual",
                measured=proposed,
                dive=d.id,
            )
            continue
        checks = stop_checks(ctx, d, nxt, a.table)
        need = float(sum(c.required_min for c in checks))
        where = (f"{nxt.table} at {nxt.depth:g} {nxt.unit}/{nxt.bottom_time:g} min (row "
                 f"{nxt.row}: {nxt.verification}, {nxt.source_status})")
        kw = dict(measured=proposed,
                  limit=f"{need:g} min of stops, next longer schedule "
                  f"({nxt.depth:g} {nxt.unit}/{nxt.bottom_time:g} min)", dive=d.id)
        tail = ("; later tables may already allow for these conditions: decide per the "
                "contractor's manual")
        if all(c.ok for c in checks):
            yield r.ok(f"{why}: the proposed stops cover the next longer schedule, {where}"
                       + tail, **kw)
        else:
            yield r.breach(
                f"{why}: the proposed stops do not cover the next longer schedule, {where}: "
                + shortfall(ctx, checks) + tail,
                **kw,
            )


@FAMILY.rule(
    "proc-short-surface-interval",
    title="Surface interval under 10 min",
    citation="U.S. Navy Diving Manual, pre-2008 air tables (surface interval under 10 min)",
    source_status="OLDER-EDITION",
    kind="reference",
)
def short_surface_interval(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """A surface interval under 10 min: older practice adds the bottom times and uses the
    deeper depth, as one dive."""
    for d in ctx.dives():
        si = d.surface_interval_min
        if si is None:
            continue
        after = f" after {d.previous_dive}" if d.previous_dive else ""
        kw = dict(measured=f"{si:g} min surface interval{after}",
                  limit=f"{SHORT_SI_MIN:g} min surface interval", dive=d.id)
        if si < SHORT_SI_MIN - _TOL:
            yield r.breach(
                f"surface interval of {si:g} min is under 10 min: treat the dives as "
                "one (bottom times added, deeper depth)",
                **kw,
            )
        else:
            yield r.ok(f"surface interval of {si:g} min", **kw)
