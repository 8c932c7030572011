"""Contingency schedules: the same dive longer, deeper, or without its oxygen.

For every dive :mod:`supervisor.analysis` computes three contingencies with the
policy's model (and the reference table when one with decompression schedules is
in use):

* ``overrun``: the bottom time overrun to the next longer table time, or by 10 min
  without a decompression table (common practice, no source);
* ``deeper``: the next deeper table depth, or one policy stop step deeper;
* ``oxygen_failure``: for a dive decompressing on oxygen (in water or in the
  chamber), the same dive decompressed in the water on the bottom gas.

The supervisor should have each schedule at hand before the dive.  A contingency
that cannot be computed, or that lies outside the reference table, needs review.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 9: the next
       longer schedule for a dive that runs long, loss of oxygen during
       decompression (OLDER-EDITION).
"""

from __future__ import annotations

from collections.abc import Iterator

from supervisor import analysis as an
from supervisor.findings import Finding
from supervisor.rules.base import CheckContext, Family, Rule

FAMILY = Family("contingency", "Contingency schedules")

NOT_COMPUTED = "not computed"
_TITLES = {"overrun": "bottom-time overrun", "deeper": "deeper than planned",
           "oxygen_failure": "oxygen failure"}


def _stops(c: an.Contingency, unit: str) -> str:
    s = c.schedule
    if s is None:
        return "not computed"
    if not s.stops:
        return "no stops"
    return ", ".join(x.text(unit) for x in s.stops)


@FAMILY.rule(
    "contingency-schedules",
    title="Contingency schedules at hand",
    citation="U.S. Navy Diving Manual, Rev 4 Change A, ch. 9 (next longer schedule; loss of "
    "oxygen); contractor policy (policy.model)",
    kind="reference",
    source_status="OLDER-EDITION",
)
def schedules(ctx: CheckContext, r: Rule) -> Iterator[Finding]:
    """List each contingency schedule; review the ones that could not be computed."""
    pa = an.for_context(ctx)
    for d in ctx.dives():
        a = pa.dives[d.id]
        if a.request is None:
            why = a.errors.get("model_schedule") or a.errors.get("profile", "not computed")
            yield r.review(f"needs review: no contingency schedule could be computed ({why})",
                           dive=d.id, measured=NOT_COMPUTED, unit="min")
            continue
        for kind, c in a.contingencies.items():
            if c is None:
                continue
            title = _TITLES[kind]
            head = f"{title} ({c.basis}; {ctx.show(c.depth)}, {c.bottom_time_min:g} min)"
            if c.schedule is None:
                yield r.review(f"needs review: {head}: the model schedule could not be computed "
                               f"({c.error})", dive=d.id, measured=NOT_COMPUTED, unit="min")
                continue
            s = c.schedule
            text = (f"{head}: model {_stops(c, ctx.unit)}; {s.total_stop_min} min of stops, "
                    f"{s.total_ascent_min:.0f} min to the surface ({a.coefficient_status} "
                    "coefficients)")
            look = c.reference
            if look is not None and look.outside_table:
                where = ("reference schedule not available" if look.row is not None
                         else "outside the reference table")
                yield r.review(f"needs review: {text}; {where} ({look.reason})", dive=d.id,
                               measured=float(s.total_stop_min), unit="min")
                continue
            if look is not None and look.schedule is not None:
                ref = ", ".join(f"{x.depth:g} {look.unit} {x.minutes:g} min {x.gas}"
                                for x in look.schedule.stops) or "no stops"
                text += f"; {look.table} row {look.row}: {ref} ({look.verification})"
            yield r.note(text, dive=d.id, measured=float(s.total_stop_min), unit="min")
