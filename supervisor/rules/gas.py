"""Breathing gas: hypoxia, maximum operating depth, narcotic depth and gas density.

* Hypoxia: the lowest inspired PO2 of every phase (the bottom gas is breathed from
  the surface on descent, at the site's surface pressure) against the policy's
  minimum ``po2_min_ata``, by default 0.16 ata, below which the U.S. Navy manual
  says hypoxia results (Rev 4 Change A, OLDER-EDITION).  Physics that kills fails,
  whatever the status of the source of the default.
* Maximum operating depth: the bottom gas at the policy's bottom PO2 limit against
  the maximum depth, each water-stop gas at the decompression limit and each
  chamber gas at the chamber limit against its stop depth, with the limits, their
  severity and the 0.01 atm tolerance of :mod:`supervisor.rules.po2_limits`.
* Equivalent narcotic depth, with oxygen counted narcotic (the NOAA convention),
  against ``policy.end_max`` (in the plan's unit): the contractor's fail limit.
  It fails only when the contractor sets it; the default 100 fsw / 30 msw is a
  common planning ceiling known from secondary sources only, so breaking the
  default warns (a surface-supplied air dive the regulation allows, e.g. 220 fsw
  for 30 min, is not failed on a default).
* Gas density at the maximum depth (Peng-Robinson, at the stated water
  temperature, else 15 degC) against the policy's ``density_warn_g_per_l`` (warn)
  and ``density_fail_g_per_l`` (fail).  The fail limit fails only when the
  contractor states it in the policy: the default maximum comes from rebreather
  literature, so a dive above it on the default warns.  The
  defaults, 5.2 g/L preferred and 6.2 g/L maximum, follow the recommendation of
  Anthony and Mitchell (2016) [3], held FROM MEMORY; the underlying finding that
  CO2 retention rises steeply above about 6 g/L (UK defence-research test data on
  breathing apparatus) is known only from secondary reports [4] (SECONDARY).  Each
  finding names the threshold, whether it is the contractor's own or a default,
  and that status.  A pass on a default threshold, or at an assumed water
  temperature (colder water gives denser gas), needs review.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 15: inspired PO2
       below 0.16 ata produces hypoxia.
.. [2] NOAA Diving Manual, 4th ed., §16.3: equivalent narcotic depth.
.. [3] Anthony, T. G., Mitchell, S. J., "Respiratory physiology of rebreather
       diving", in Pollock, Sellers, Godfrey (eds), Rebreathers and Scientific
       Diving, workshop proceedings, 2016.
.. [4] Divers Alert Network, Alert Diver, "Performance Under Pressure" (gas
       density and CO2 retention, reporting the UK test data).
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor import analysis as an
from supervisor import constants as C
from supervisor.engine.oxygen import PO2_TOLERANCE_ATM
from supervisor.findings import Finding
from supervisor.gas import (
    HYPOXIC_PO2_MIN_ATA,
    density_at_depth,
    equivalent_narcotic_depth,
    inspired_po2,
    maximum_operating_depth,
)
from supervisor.rules.base import CheckContext, Family, Rule
from supervisor.rules.po2_limits import po2_limit

FAMILY = Family("gas", "Breathing gas")

HYPOXIA_ATA = HYPOXIC_PO2_MIN_ATA
HYPOXIA_BAR = HYPOXIA_ATA * C.P_ATM_BAR
NAVY_HYPOXIA = "U.S. Navy Diving Manual, Rev 4 Change A, ch. 15 (hypoxia below 0.16 ata)"
HYPOXIA_POLICY = (f"contractor policy (policy.po2_min_ata); default {HYPOXIC_PO2_MIN_ATA:g} "
                  f"ata: {NAVY_HYPOXIA}, OLDER-EDITION")
NOT_COMPUTED = "not computed"
ANTHONY_MITCHELL = (
    "Anthony & Mitchell (2016), Respiratory physiology of rebreather diving, "
    "in Rebreathers and Scientific Diving"
)
END_DEFAULT = "common planning ceiling 100 fsw / 30 msw (SECONDARY)"
DENSITY_TEMPERATURE_C = 15.0
DENSITY_POLICY = "contractor policy (policy.density_warn_g_per_l, density_fail_g_per_l)"
DAN_DENSITY = "DAN Alert Diver, Performance Under Pressure"
#: Status of the source of the default density thresholds (module docstring).
DENSITY_DEFAULT_STATUS = "FROM MEMORY"
DENSITY_DEFAULT_SOURCE = (
    f"default after {ANTHONY_MITCHELL}: 5.2 g/L preferred, 6.2 g/L maximum, FROM MEMORY; "
    f"CO2 retention rising steeply above about 6 g/L: {DAN_DENSITY}, SECONDARY"
)


@FAMILY.rule(
    "gas-hypoxic",
    title="No hypoxic gas at the surface, on descent or at a stop",
    citation=HYPOXIA_POLICY,
    kind="policy",
)
def hypoxic(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Lowest inspired PO2 of each phase against ``policy.po2_min_ata`` (default 0.16 ata).

    The bottom gas is breathed from the surface on descent (at the site's surface
    pressure), each stop gas from where it is taken to where it is left.  Below the
    minimum fails, whoever chose it: hypoxia is physics that kills.  The minimum is
    not relaxed by the 0.01 atm rounding tolerance.  A gas at least as rich as the
    site's own air is never called hypoxic (at altitude the air itself falls below
    0.16 ata, and the diver breathes it on deck).
    """
    pa = an.for_context(ctx)
    plan = ctx.plan
    floor = float(plan.policy.po2_min_ata)
    own = "po2_min_ata" in plan.policy.model_fields_set
    basis = ("policy.po2_min_ata, the contractor's own" if own else
             f"default {HYPOXIC_PO2_MIN_ATA:g} ata: {NAVY_HYPOXIA}, OLDER-EDITION")
    site_air = C.FO2_AIR * plan.p_surface_bar / C.P_ATM_BAR
    limit = min(floor, site_air)
    for d in ctx.dives():
        a = pa.dives[d.id]
        lows = {k: v / C.P_ATM_BAR for k, v in a.po2_min.items() if v is not None}
        if not lows:
            yield r.review("needs review: the phase PO2 could not be computed", dive=d.id,
                           measured=NOT_COMPUTED, limit=floor, unit="ata")
            continue
        phase, low = min(lows.items(), key=lambda kv: kv[1])
        kw = dict(measured=round(low, 3), limit=round(floor, 3), unit="ata", dive=d.id)
        where = "at the surface and on descent" if phase == "bottom" else f"in the {phase}"
        if low + 1e-9 < limit:
            yield r.breach(
                f"hypoxic gas {where}: inspired PO2 {low:.3f} ata, below {floor:g} ata "
                f"({basis})", **kw)
        elif low + 1e-9 < floor:
            yield r.ok(
                f"lowest inspired PO2 {low:.3f} ata ({phase} phase) is below {floor:g} ata but "
                f"no lower than the site's own air ({site_air:.3f} ata at altitude)", **kw)
        else:
            yield r.ok(f"lowest inspired PO2 {low:.3f} ata ({phase} phase), at least "
                       f"{floor:g} ata ({basis})", **kw)


@FAMILY.rule(
    "gas-mod",
    title="Every gas within its maximum operating depth",
    citation="contractor policy (policy.po2_bottom_max_ata, po2_decompression_max_ata, "
    "po2_chamber_max_ata)",
    kind="policy",
)
def mod(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Each gas's PO2 where it is breathed against the phase's PO2 limit (as a depth, MOD).

    The limits and their severity are those of :mod:`supervisor.rules.po2_limits` (the
    contractor's own fail, the bottom default warns), with the same 0.01 atm tolerance.
    """
    plan = ctx.plan
    table = an.for_context(ctx).table
    limits = {ph: po2_limit(plan.policy, ph, table) for ph in ("bottom", "decompression",
                                                               "chamber")}
    rank = {"pass": 0, "warn": 1, "fail": 2}
    for d in ctx.dives():
        uses = [(d.gas_mix, d.max_depth, "bottom", "bottom")]
        for s in d.stops:
            phase = "chamber" if s.place == "chamber" else "decompression"
            uses.append((d.stop_gas(s), s.depth, phase, f"{s.place} stop {s.depth:g}"))
        worst = None
        for gas, depth, phase, where in uses:
            po2 = float(inspired_po2(depth, gas, plan.unit, plan.p_surface_bar)) / C.P_ATM_BAR
            lim = limits[phase]
            sev = lim.judge(po2)
            limit = lim.limit_for(sev)
            m = float(maximum_operating_depth(gas, limit * C.P_ATM_BAR, plan.unit,
                                              plan.p_surface_bar))
            key = (rank[sev], depth - m)
            if worst is None or key > worst[0]:
                worst = (key, sev, gas, depth, limit, where, m, lim)
        _, sev, gas, depth, limit, where, m, lim = worst  # type: ignore[misc]
        kw = dict(measured=depth, limit=round(m, 1), unit=ctx.unit, dive=d.id,
                  citation=lim.citation)
        text = (f"{gas.name} at the {where} ({ctx.show(depth)}); maximum operating depth "
                f"{m:.1f} {ctx.unit} at PO2 {limit:g} ata ({lim.basis}; tolerance "
                f"{PO2_TOLERANCE_ATM:g} atm)")
        if sev == "fail":
            yield r.breach(f"{text}: deeper than its maximum operating depth", **kw)
        elif sev == "warn":
            yield r.finding("warn", f"{text}: deeper than its maximum operating depth at the "
                            f"default; set policy.{lim.key} to the contractor's own limit",
                            status=None, verified=False, **kw)
        else:
            yield r.ok(f"every gas within its maximum operating depth (closest: {text})", **kw)


@FAMILY.rule(
    "gas-end",
    title="Equivalent narcotic depth within the limit",
    citation="contractor policy (policy.end_max); NOAA Diving Manual 4th ed. §16.3 (END)",
    kind="policy",
)
def end(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """END at the maximum depth against the policy (fail) or the default ceiling (warn)."""
    plan = ctx.plan
    limit = float(ctx.policy.end_max)
    own = plan.policy.end_max is not None
    for d in ctx.dives():
        e = float(equivalent_narcotic_depth(d.max_depth, d.gas_mix, plan.unit,
                                            p_surface_bar=plan.p_surface_bar))
        kw = dict(measured=round(e, 1), limit=limit, unit=ctx.unit, dive=d.id)
        text = f"equivalent narcotic depth {e:.1f} {ctx.unit} on {d.gas_mix.name}"
        if e <= limit + 1e-6:
            if own:
                yield r.ok(text, **kw)
            elif _default_confirmed("gas-end"):
                yield r.ok(text + f" within the default ceiling ({END_DEFAULT}, confirmed)",
                           citation=END_DEFAULT, status="VERIFIED", **kw)
            else:
                yield r.ok(text + f" within the default ceiling ({END_DEFAULT})",
                           citation=END_DEFAULT, status="SECONDARY", verified=False, **kw)
        elif own:
            yield r.breach(text + " is beyond the policy's END limit", **kw)
        else:
            yield r.finding(
                "warn", text + f" is beyond the default END ceiling ({END_DEFAULT}); set "
                "policy.end_max to the contractor's own limit",
                citation=END_DEFAULT, status="SECONDARY", verified=False, **kw,
            )


def _default_confirmed(rule_id: str) -> bool:
    """Whether a second person confirmed the source of the rule's default (``rule-sources``)."""
    from supervisor.references.rule_sources import rule_sources

    src = rule_sources().get(rule_id)
    return src is not None and src.confirms


def _threshold(own: bool, field: str, value: float, what: str) -> str:
    if own:
        return f"{what} {value:g} g/L (policy.{field}, the contractor's own)"
    return (f"{what} {value:g} g/L (policy.{field}: default after Anthony & Mitchell 2016, "
            "FROM MEMORY; the steep rise of CO2 retention above about 6 g/L is SECONDARY)")


@FAMILY.rule(
    "gas-density",
    title="Gas density at depth within the policy limits",
    citation=DENSITY_POLICY,
    kind="policy",
)
def density(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Density at the maximum depth against the policy thresholds (see module docstring)."""
    plan = ctx.plan
    pol = ctx.policy
    stated = plan.policy.model_fields_set
    own_warn = "density_warn_g_per_l" in stated
    own_fail = "density_fail_g_per_l" in stated
    temp = plan.site.water_temperature_c
    t = DENSITY_TEMPERATURE_C if temp is None else float(temp)
    t_text = f"{t:g} degC" if temp is not None else f"{t:g} degC assumed: no water temperature"
    hi, lo = float(pol.density_fail_g_per_l), float(pol.density_warn_g_per_l)
    for d in ctx.dives():
        rho = float(density_at_depth(d.max_depth, d.gas_mix, plan.unit, plan.p_surface_bar,
                                     temperature_c=t, eos="peng-robinson"))
        text = (f"gas density {rho:.2f} g/L of {d.gas_mix.name} at {ctx.show(d.max_depth)} "
                f"({t_text})")
        if rho > hi + 1e-9:
            own, limit = own_fail, hi
            msg = text + " is above the " + _threshold(own, "density_fail_g_per_l", hi, "limit")
            sev, verified = "fail", True
            if not own:  # a default nobody chose warns; only the contractor's own fails
                sev, verified = "warn", False
                msg += ("; a default, not the contractor's limit: set "
                        "policy.density_fail_g_per_l for a limit that fails")
        elif rho > lo + 1e-9:
            own, limit = own_warn, lo
            msg = text + " is above the " + _threshold(own, "density_warn_g_per_l", lo,
                                                       "warning threshold")
            sev, verified = "warn", True
        else:
            own, limit = own_warn, lo
            msg = text + " is within the " + _threshold(own, "density_warn_g_per_l", lo,
                                                        "warning threshold")
            confirmed = own or _default_confirmed("gas-density")
            todo = ([] if confirmed else ["set the contractor's own density limits in the policy"])
            todo += [] if temp is not None else ["state the water temperature (site)"]
            sev, verified = "pass", not todo
            if todo:
                msg += "; needs review: " + " and ".join(todo)
        status = (None if own else "VERIFIED" if _default_confirmed("gas-density")
                  else DENSITY_DEFAULT_STATUS)
        citation = DENSITY_POLICY if own else f"{DENSITY_POLICY}; {DENSITY_DEFAULT_SOURCE}"
        yield r.finding(sev, msg, measured=round(rho, 2), limit=limit, unit="g/L", dive=d.id,
                        citation=citation, status=status, verified=verified)
