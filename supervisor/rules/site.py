"""Site conditions: current, night diving, confined spaces, and every stated site field.

* **Current** against the contractor's limit ``policy.current_max_kt``.  Unset,
  the default of 1.5 kt (common practice, no source) only warns; a limit the
  contractor sets fails when broken.  The regulation's own current rows (SCUBA
  line-tended above 1 kt) are in the regulatory families.
* **Night diving**: lighting of the work site, the water entry and exit point and
  the diver (``site.night_lighting``; common practice, no source: no row of
  29 CFR 1910 Subpart T or 46 CFR 197 Subpart B sets it), with the regulation's
  night rows named: the code flag A lit at night (29 CFR 1910.421(h)) and no
  liveboating at night (29 CFR 1910.427(b); 46 CFR 197.436).
* **Confined spaces**: which regulation rows check the diver at the entry point
  and tending for the plan's jurisdiction (the regulatory families check them
  dive by dive); without a jurisdiction, the same items warn here as a
  cross-reference.  A dive in a confined space that states a direct ascent is
  possible needs review: the reserve rules turn on it.
* **Every stated site field** is read by a rule of the plan's jurisdiction
  (:data:`READ_BY`) or shown here as information, so no condition the plan
  states is silently ignored.

References
----------
.. [1] 29 CFR 1910 Subpart T: 1910.421(h), 1910.424(b)(3)-(4), (c)(3),
       1910.425(c)(1)-(2), 1910.426(c)(3), 1910.427(b).
.. [2] 46 CFR 197 Subpart B: 197.430, 197.432(c)-(d), 197.436.
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor.findings import Finding
from supervisor.plan import Dive
from supervisor.rules.base import NONE, NOT_STATED, CheckContext, Family, Rule
from supervisor.rules.citations import OSHA_ID, USCG_ID, cross_reference, for_jurisdiction

FAMILY = Family("site", "Site conditions")

#: Strongest current dived without the contractor's own limit [kt] (common practice,
#: no source).
CURRENT_DEFAULT_KT = 1.5
NO_SOURCE = "common practice, no source"

#: Which jurisdictions' rules read each site field (None: every jurisdiction; the
#: engine counts as a reader: ``water`` and ``altitude_m`` set the model's pressures).
READ_BY: dict[str, frozenset[str] | None] = {
    "water": None,
    "altitude_m": None,
    "current_kt": None,
    "visibility_m": frozenset(),
    "water_temperature_c": frozenset(),
    "confined_space": None,
    "marine_traffic": frozenset({OSHA_ID}),
    "from_vessel": frozenset({OSHA_ID}),
    "night": None,
    "night_lighting": None,
    "emergency_contacts": frozenset({OSHA_ID}),
    "first_aid_kit": frozenset({OSHA_ID, USCG_ID}),
    "first_aid_handbook": frozenset({OSHA_ID, USCG_ID}),
    "resuscitator": frozenset({OSHA_ID, USCG_ID}),
    "tables_on_site": frozenset({OSHA_ID, USCG_ID}),
    "safe_practices_manual": frozenset({OSHA_ID}),
    "emergency_comms": frozenset({OSHA_ID, USCG_ID}),
    "diver_voice_comms": frozenset({OSHA_ID, USCG_ID}),
    "code_flag_a": frozenset({OSHA_ID}),
    "code_flag_a_lit": frozenset({OSHA_ID}),
}

#: Words and units of the site fields shown as information.
_SHOWN: dict[str, tuple[str, str]] = {
    "water": ("water", ""),
    "altitude_m": ("altitude", "m"),
    "current_kt": ("current", "kt"),
    "visibility_m": ("visibility", "m"),
    "water_temperature_c": ("water temperature", "°C"),
    "marine_traffic": ("waters with marine traffic", ""),
    "from_vessel": ("diving from a vessel", ""),
    "safe_practices_manual": ("safe practices manual at the site", ""),
    "code_flag_a": ("code flag A", ""),
    "code_flag_a_lit": ("code flag A lit at night", ""),
    "first_aid_kit": ("first-aid kit", ""),
    "first_aid_handbook": ("first-aid handbook", ""),
    "resuscitator": ("resuscitator", ""),
    "tables_on_site": ("tables at the site", ""),
    "emergency_comms": ("emergency link", ""),
    "diver_voice_comms": ("diver voice communication", ""),
}

#: Where each jurisdiction checks the confined-space entry diver and tending.
CONFINED_ROWS = {
    OSHA_ID: "29 CFR 1910.424(b)(3)-(4), (c)(3) (SCUBA); 1910.425(c)(1)-(2) (surface-supplied "
             "air); 1910.426(c)(3) (mixed gas)",
    USCG_ID: "46 CFR 197.430 (SCUBA); 197.432(c)-(d) (surface-supplied air)",
}
CONFINED_CROSS = cross_reference(f"{CONFINED_ROWS[OSHA_ID]}; {CONFINED_ROWS[USCG_ID]}")
NIGHT_ROWS = {
    OSHA_ID: "29 CFR 1910.421(h) (code flag A lit at night), 1910.427(b) (no liveboating "
             "outside daylight hours)",
    USCG_ID: "46 CFR 197.436 (no liveboating from 1 h after sunset to 1 h before sunrise)",
}


@FAMILY.rule(
    "site-current",
    title="Water current within the contractor's limit",
    citation="contractor policy (policy.current_max_kt)",
    kind="policy",
)
def current(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """The site's current against ``policy.current_max_kt`` (default 1.5 kt, warns only)."""
    kt = float(ctx.plan.site.current_kt)
    own = ctx.policy.current_max_kt
    limit = float(own) if own is not None else CURRENT_DEFAULT_KT
    kw = dict(measured=kt, limit=limit, unit="kt")
    scuba = [d.id for d in ctx.dives("scuba")]
    tail = ("; SCUBA in more than 1 kt must be line-tended (regulatory rows)"
            if scuba and kt > 1 else "")
    if kt <= limit:
        src = "the contractor's limit" if own is not None else f"the default ({NO_SOURCE})"
        yield r.ok(f"current {kt:g} kt within {limit:g} kt, {src}{tail}", **kw)
    elif own is not None:
        yield r.breach(f"current {kt:g} kt is above the contractor's limit of {limit:g} kt"
                       f"{tail}", **kw)
    else:
        yield r.finding(
            "warn",
            f"current {kt:g} kt is above {limit:g} kt, a default the contractor did not choose "
            f"({NO_SOURCE}): confirm the diver can hold station and be recovered, or set "
            f"policy.current_max_kt{tail}",
            citation=f"{NO_SOURCE} (default of policy.current_max_kt)", status=None,
            verified=False, **kw)


@FAMILY.rule(
    "site-night",
    title="Night diving: lighting, and the regulation's night rows",
    citation=f"{NO_SOURCE} (site.night_lighting)",
    kind="reference",
    source_status="FROM MEMORY",
)
def night(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Night diving needs lighting of the site, the entry and exit point and the diver."""
    s = ctx.plan.site
    if not s.night:
        yield r.ok("daylight diving (site.night is false)", status=None, kind="plan",
                   citation="plan (site.night)")
        return
    rows = NIGHT_ROWS.get(ctx.jurisdiction, cross_reference(
        f"{NIGHT_ROWS[OSHA_ID]}; {NIGHT_ROWS[USCG_ID]}"))
    what = "lighting of the work site, the water entry and exit point and the diver"
    also = f"; the regulation's night rows: {rows}; the plan states no liveboating"
    kw = dict(limit="yes", status=None)
    if s.night_lighting is True:
        yield r.ok(f"night diving: {what} stated{also}", measured="yes", verified=False, **kw)
    elif s.night_lighting is None:
        yield r.review(f"needs review: night diving: the plan does not state {what} "
                       f"(site.night_lighting){also}", measured=NOT_STATED, **kw)
    else:
        yield r.breach(f"night diving without {what} (site.night_lighting = false){also}",
                       measured="no", **kw)


def _entry_tending_problems(ctx: CheckContext, d: Dive) -> list[str]:
    out = []
    if not (d.entry_diver and d.entry_diver != d.diver):
        out.append("no diver named at the entry point (dives[].entry_diver)")
    tender = ctx.tender_for(d)
    if not d.line_tended or tender is None or tender.name == d.diver:
        out.append("not line-tended by a tender other than the diver")
    return out


@FAMILY.rule(
    "site-confined",
    title="Confined space: entry-point diver, tending and direct ascent",
    citation="plan (site.confined_space, dives[].direct_ascent_possible)",
    kind="reference",
    source_status="FROM MEMORY",
)
def confined(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """Where the entry-point diver and tending are checked; the direct-ascent claim."""
    if not ctx.plan.site.confined_space:
        yield r.ok("no confined space (site.confined_space is false)", status=None, kind="plan")
        return
    rows = CONFINED_ROWS.get(ctx.jurisdiction)
    if rows is not None:
        yield r.note(f"confined space: the diver at the entry point and tending are checked dive "
                     f"by dive under {rows}", citation=rows, status=None)
    for d in ctx.dives():
        if rows is None:
            bad = _entry_tending_problems(ctx, d)
            if bad:
                yield r.review(f"needs review: confined space: {'; '.join(bad)} (no jurisdiction "
                               "chosen; the federal rows require both)", dive=d.id,
                               measured=d.entry_diver or NONE,
                               limit="a diver at the entry point and a tender",
                               citation=CONFINED_CROSS)
        if d.direct_ascent_possible:
            yield r.review(
                "needs review: confined space, yet the dive states a direct ascent to the "
                "surface is possible (dives[].direct_ascent_possible): confirm it; where it is "
                "not, a diver-carried reserve is required "
                + for_jurisdiction(ctx, osha="(29 CFR 1910.425(c)(6), 1910.426(c)(9))",
                                   uscg="(46 CFR 197.432(e)(7) has its own exceptions)",
                                   other="(cross-reference: 29 CFR 1910.425(c)(6))"),
                dive=d.id, measured="direct ascent possible", limit="confirmed")


def _shown(field: str, value: object) -> str:
    word, unit = _SHOWN.get(field, (field.replace("_", " "), ""))
    if isinstance(value, bool):
        return f"{word}: {'yes' if value else 'no'}"
    if isinstance(value, float):
        return f"{word} {value:g}{' ' + unit if unit else ''}"
    return f"{word} {value}"


def _contacts(ctx: CheckContext) -> str | None:
    ec = ctx.plan.site.emergency_contacts
    names = ("chamber", "hospital", "physician", "transport", "uscg_rcc")
    given = [n for n in names if (getattr(ec, n) or "").strip()]
    if not given:
        return None
    missing = [n for n in names if n not in given]
    return (f"emergency contacts: {len(given)} of {len(names)} stated"
            + (f" (none for {', '.join(missing)})" if missing else "")
            + f" [{cross_reference('29 CFR 1910.421(b)')}]")


@FAMILY.rule(
    "site-fields",
    title="Site conditions the plan states that no rule of its jurisdiction checks",
    citation="plan (site)",
    kind="plan",
)
def unread(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """List the stated site fields no rule of the plan's jurisdiction reads, as information."""
    s = ctx.plan.site
    parts = []
    for name in type(s).model_fields:
        readers = READ_BY.get(name, frozenset())
        if readers is None or ctx.jurisdiction in readers:
            continue
        if name == "emergency_contacts":
            text = _contacts(ctx)
            if text:
                parts.append(text)
            continue
        value = getattr(s, name)
        if value is not None:
            parts.append(_shown(name, value))
    if parts:
        yield r.note("site conditions stated for the supervisor, checked by no rule of this "
                     "jurisdiction: " + "; ".join(parts))
    else:
        yield r.ok("every stated site condition is read by a rule")
