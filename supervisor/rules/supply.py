"""Gas supply: primary and secondary against the dive's need, manifold pressure, bailout, oxygen.

The figures come from :func:`supervisor.analysis.supply_figures`, which does the
arithmetic with :mod:`supervisor.supply`: free gas in litres at one atmosphere,
a breathing rate of 1.4 acfm per diver (the Navy demand-helmet average), the
standby diver counted as a second diver on the same profile, and bank or
cylinder gas counted down to the minimum manifold pressure.  Supply pressures
(a bank's charge, a compressor's ``delivery_pressure_bar``) are compared with the
minimum manifold pressure; one below the water pressure at depth fails.  The
chamber's own gas is sized by :mod:`supervisor.analysis.chamber` from the
plan's optional chamber figures.  The Navy methods
are known from an older edition and the breathing rate is a planning figure, so
a shortfall warns and a sufficient supply is a pass that needs review; the
contractor's manual and the equipment maker's figures govern.  A plan that
breathes oxygen at its stops with no oxygen source at all fails (the plan cannot
be carried out as written).

References
----------
.. [1] 46 CFR 197.340, breathing gas supply (primary, secondary, diver-carried
       reserve, chamber).
.. [2] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 8: required
       volume, over-bottom and minimum manifold pressure, flasks, EGS sizing;
       ch. 21 and §22-5.4: treatment tables and chamber ventilation.
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from supervisor import analysis as an
from supervisor import constants as C
from supervisor.findings import Finding
from supervisor.rules.base import NO_CHAMBER, CheckContext, Family, Rule
from supervisor.rules.citations import OSHA_ID, USCG_ID, cross_reference, own_or_cross

FAMILY = Family("gas-supply", "Gas supply")

CFR_340 = "46 CFR 197.340"


def _cross(citation: str) -> dict[str, str]:
    """46 CFR 197.340 is the USCG rule: in another job it is a cross-reference."""
    return {j: cross_reference(citation) for j in (OSHA_ID, "none")}
NAVY_CH8 = "U.S. Navy Diving Manual, Rev 4 Change A, ch. 8"




def _figures(ctx: CheckContext, r: Rule) -> Iterator[tuple[Any, an.Supply | None, Finding | None]]:
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        if a.supply is None:
            why = a.errors.get("supply", "not computed")
            yield d, None, r.review(f"needs review: gas supply not computed ({why})", dive=d.id)
        else:
            yield d, a.supply, None


def _compare(
    ctx: CheckContext, r: Rule, what: str, have: float, need: float, quantity: str, basis: str,
    dive: str,
) -> Finding:
    """``have`` against ``need``, litres (``quantity`` "volume") or L/min ("flow"), shown
    in the plan's unit system."""
    u = ctx.units
    conv, unit = (u.to_flow, u.flow_unit) if quantity == "flow" else (u.to_gas, u.gas_unit)
    h, n = conv(have), conv(need)
    kw = dict(measured=round(h, 1), limit=round(n, 1), unit=unit, dive=dive)
    fmt = ".1f" if quantity == "flow" and u.imperial else ".0f"
    text = f"{what}: {h:{fmt}} {unit} against a need of {n:{fmt}} {unit} ({basis})"
    if have + 1e-9 < need:
        return r.breach(text, **kw)
    tail = "" if r.confirmed() else "; planning figures by an older-edition method: needs review"
    return r.ok(text + tail, **kw)


def _basis(ctx: CheckContext, s: an.Supply) -> str:
    who = "diver and standby diver" if s.people == 2 else "diver"
    return f"{who} at {ctx.units.show_rmv(s.rmv_lpm)}"


@FAMILY.rule(
    "supply-primary",
    title="Primary supply covers the dive",
    citation=f"{CFR_340} (primary supply); {NAVY_CH8} (flow x ata x time)",
    citations=_cross(f"{CFR_340} (primary supply); {NAVY_CH8} (flow x ata x time)"),
    kind="reference",
    source_status="OLDER-EDITION",
)
def primary(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Banks and cylinders: free gas against the whole dive; compressors: delivery vs peak flow."""
    for d, s, bad in _figures(ctx, r):
        if bad is not None:
            yield bad
            continue
        if s.primary_delivery_lpm is not None:
            yield _compare(ctx, r, "primary compressor delivery", s.primary_delivery_lpm,
                           s.peak_flow_lpm, "flow", _basis(ctx, s) + " at the maximum depth",
                           d.id)
        else:
            yield _compare(ctx, r, f"primary {s.primary_kind} above the minimum manifold "
                           "pressure", s.primary_available_l or 0.0, s.need_l, "volume",
                           _basis(ctx, s) + ", the whole dive", d.id)


@FAMILY.rule(
    "supply-secondary",
    title="Secondary supply recovers the divers",
    citation=f"{CFR_340} (secondary supply); {NAVY_CH8} (secondary supply)",
    citations=_cross(f"{CFR_340} (secondary supply); {NAVY_CH8} (secondary supply)"),
    kind="reference",
    source_status="OLDER-EDITION",
)
def secondary(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The secondary against the ascent and decompression from the end of the bottom time."""
    for d, s, bad in _figures(ctx, r):
        if bad is not None:
            yield bad
            continue
        if s.secondary_kind is None:
            yield r.note("no secondary supply in the plan; the regulatory rules say when one is "
                         "required", dive=d.id)
        elif s.secondary_delivery_lpm is not None:
            yield _compare(ctx, r, "secondary compressor delivery", s.secondary_delivery_lpm,
                           s.peak_flow_lpm, "flow", _basis(ctx, s) + " at the maximum depth",
                           d.id)
        else:
            yield _compare(ctx, r, f"secondary {s.secondary_kind} above the minimum manifold "
                           "pressure", s.secondary_available_l or 0.0, s.recovery_need_l,
                           "volume", _basis(ctx, s) + ", ascent and decompression from the end "
                           "of the bottom time", d.id)


@FAMILY.rule(
    "supply-over-bottom",
    title="Supply pressure above the minimum manifold pressure",
    citation=f"{NAVY_CH8}, p. 8-4 (over-bottom and minimum manifold pressure)",
    kind="reference",
    source_status="OLDER-EDITION",
)
def over_bottom(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Supply pressures against MMP = 0.445 D + over-bottom pressure.

    Banks and cylinders give their charge (``pressure_bar``); a compressor its
    delivery pressure (``delivery_pressure_bar``, else ``pressure_bar``), or the
    finding needs review.  A supply below the water pressure at the maximum depth
    cannot deliver gas at all: the plan cannot be carried out as written (fails).
    Below the minimum manifold pressure (an older-edition Navy method) warns.
    """
    gs = ctx.plan.gas_supply
    for d, s, bad in _figures(ctx, r):
        if bad is not None:
            yield bad
            continue
        if d.mode == "scuba":
            continue
        if s.mmp_psig is None:
            yield r.review(f"needs review: minimum manifold pressure not computed ({s.mmp_error})",
                           dive=d.id)
            continue
        for label, src in (("primary", gs.primary), ("secondary", gs.secondary)):
            if src is None:
                continue
            field = f"gas_supply.{label}."
            field += "delivery_pressure_bar" if src.kind == "compressor" else "pressure_bar"
            bar = src.supply_pressure_bar
            u = ctx.units
            mmp = u.stated_psig(s.mmp_psig)
            over = f"{u.stated_psig(s.over_bottom_psig)} over bottom"
            if bar is None:
                yield r.review(
                    f"needs review: the plan gives no {label} compressor delivery pressure "
                    f"({field}); it must hold at least {mmp} at the manifold ({over})",
                    measured=None, limit=round(u.to_gauge(s.mmp_psig * C.BAR_PER_PSI), 1),
                    unit=u.gauge_unit, dive=d.id,
                )
                continue
            psig = bar / C.BAR_PER_PSI
            what = "delivering" if src.kind == "compressor" else "charged to"
            kw = dict(measured=round(u.to_gauge(bar), 1), unit=u.gauge_unit, dive=d.id)
            held = (f"{psig:.0f} psig ({bar:g} bar, {field})" if u.imperial
                    else f"{bar:g} bar ({field})")
            text = f"{label} {src.kind} {what} {held}"
            if s.bottom_psig is not None and psig + 1e-9 < s.bottom_psig:
                yield r.finding(
                    "fail", text + f" is below the water pressure at {ctx.show(d.max_depth)} "
                    f"({u.stated_psig(s.bottom_psig)}): it cannot deliver gas to the diver",
                    limit=round(u.to_gauge(s.bottom_psig * C.BAR_PER_PSI), 1),
                    citation=f"plan consistency ({field})", status=None, **kw,
                )
                continue
            text += f" against a minimum manifold pressure of {mmp} ({over})"
            kw["limit"] = round(u.to_gauge(s.mmp_psig * C.BAR_PER_PSI), 1)
            if psig + 1e-9 < s.mmp_psig:
                yield r.breach(text, **kw)
            else:
                tail = "" if r.confirmed() else "; older-edition method: needs review"
                yield r.ok(text + tail, **kw)


@FAMILY.rule(
    "supply-bailout",
    title="Bailout cylinder sized by the Navy emergency-gas method",
    citation=f"{NAVY_CH8}, 8-2.2.1 (emergency gas supply)",
    kind="reference",
    source_status="OLDER-EDITION",
)
def bailout(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The diver's bailout charge against the pressure that reaches the first stop or surface."""
    for d, s, bad in _figures(ctx, r):
        if bad is not None:
            yield bad
            continue
        if s.egs is None:
            if s.egs_error:
                yield r.review(f"needs review: bailout not sized ({s.egs_error})", dive=d.id)
            else:
                yield r.note(f"{d.diver} carries no bailout cylinder in the plan; the regulatory "
                             "and procedure rules say when one is required", dive=d.id)
            continue
        e = s.egs
        u = ctx.units
        have_bar = s.bailout_psig * C.BAR_PER_PSI
        need_bar = e.required_psig * C.BAR_PER_PSI
        kw = dict(measured=round(u.to_gauge(have_bar), 1), limit=round(u.to_gauge(need_bar), 1),
                  unit=u.gauge_unit, dive=d.id)
        if u.imperial:
            needs = f"{e.required_psig:.0f} psig ({e.required_psig_rounded:.0f} psig rounded up)"
        else:
            needs = (f"{round(need_bar, 1):g} bar ({e.required_psig:.0f} psig; "
                     f"{e.required_psig_rounded:.0f} psig = "
                     f"{round(e.required_psig_rounded * C.BAR_PER_PSI, 1):g} bar rounded up)")
        text = (f"bailout charged to {u.show_pressure(have_bar)}; {u.stated_scf(e.total_scf)} "
                f"to reach {'the first stop' if d.water_stops else 'the surface'}"
                f" ({an.EGS_BOTTOM_MIN:g} min at the bottom, {e.ascent_min:g} min ascent) needs "
                f"{needs}")
        if s.bailout_psig + 1e-9 < e.required_psig:
            yield r.breach(text, **kw)
        else:
            yield r.ok(text, **kw)


@FAMILY.rule(
    "supply-oxygen",
    title="Decompression oxygen held",
    citation=f"{CFR_340}; {NAVY_CH8} (flow x ata x time)",
    citations=_cross(f"{CFR_340}; {NAVY_CH8} (flow x ata x time)"),
    kind="reference",
    source_status="OLDER-EDITION",
)
def oxygen(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Oxygen for the in-water and chamber oxygen stops against the oxygen cylinder."""
    for d, s, bad in _figures(ctx, r):
        if bad is not None:
            yield bad
            continue
        if s.oxygen_need_l is None:
            continue
        need, have = s.oxygen_need_l, s.oxygen_available_l or 0.0
        u = ctx.units
        kw = dict(measured=round(u.to_gas(have), 0), limit=round(u.to_gas(need), 0),
                  unit=u.gas_unit, dive=d.id)
        if ctx.plan.gas_supply.oxygen_decompression is None or have <= 0:
            yield r.finding(
                "fail", f"the plan breathes {u.show_gas(need)} of oxygen at its stops but "
                "holds no "
                "decompression oxygen (gas_supply.oxygen_decompression)",
                citation="plan consistency (gas_supply.oxygen_decompression)", status=None, **kw,
            )
            continue
        yield _compare(ctx, r, "decompression oxygen", have, need, "volume",
                       f"the diver at {ctx.units.show_rmv(s.rmv_lpm)}", d.id)


@FAMILY.rule(
    "supply-chamber",
    title="Chamber gas for the dive and a treatment",
    citation=f"{CFR_340} (chamber supplied for the dive and one hour after)",
    citations=_cross(f"{CFR_340} (chamber supplied for the dive and one hour after)"),
    kind="reference",
    source_status="VERIFIED",
)
def chamber(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The chamber's flasks against pressurising and ventilating it (analysis.chamber).

    Needs review when the plan lacks the chamber figures.  A shortfall warns when
    the need rests on a default (Navy ventilation rates, Treatment Table 6) and
    fails when every figure is the plan's own (the plan cannot be carried out as
    written).  A sufficient supply passes, needing review when a default was used.
    """
    for d, s, bad in _figures(ctx, r):
        if bad is not None:
            yield bad
            continue
        if not s.chamber_required:
            continue
        g = s.chamber
        if g is None:
            yield r.review(
                "needs review: no chamber on site in the plan; the gas of the chamber the dive "
                "relies on is not sized here (dive plus one hour, and a treatment)",
                dive=d.id, fact=NO_CHAMBER,
            )
            continue
        if g.error is not None or g.need_l is None or g.available_l is None:
            why = g.error or ("the plan gives no " + " or ".join(g.missing))
            yield r.review(
                f"needs review: the chamber's own gas (pressurising and ventilation for the dive "
                f"and a treatment) is not sized: {why}; confirm it against the chamber's manual",
                dive=d.id,
            )
            continue
        what = "surface decompression and a treatment" if any(
            k.startswith("surface decompression") for k in g.parts) else "a treatment"
        u = ctx.units
        text = (f"chamber flasks {u.show_gas(g.available_l)} against a need of "
                f"{u.show_gas(g.need_l)} for {what}, pressurising and ventilating "
                f"({'; '.join(g.basis)})")
        kw = dict(measured=round(u.to_gas(g.available_l), 0),
                  limit=round(u.to_gas(g.need_l), 0), unit=u.gas_unit, dive=d.id)
        own = g.status is None
        cfr = own_or_cross(ctx, CFR_340, USCG_ID)
        cite = (f"{cfr}; plan consistency (chamber figures of the plan)" if own
                else f"{cfr}; {an.CHAMBER_SOURCES}")
        if g.available_l + 1e-9 < g.need_l:
            yield r.breach("short: " + text, status=g.status, kind="plan" if own else None,
                           citation=cite, **kw)
        elif own:
            yield r.ok(text, citation=cite, status=None, kind="plan", **kw)
        else:
            yield r.ok(text + f"; rests on figures held {g.status}: needs review",
                       citation=cite, status=g.status, verified=False, **kw)
