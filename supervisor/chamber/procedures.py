"""The rules around a treatment, each pointed to and cited: never improvised here.

The rules are data (``tables/limits/usn-treatment-after-care.toml``), read in
the U.S. Navy Diving Manual Revision 4 Change A (OLDER-EDITION) and written in
this project's words with the section beside each.  For one treatment this
module picks the rules that name its table and, for a time counted from the end
of the treatment, gives the clock time it ends.  Topics:

``attendant``   intervals before the inside attendant may tend again, dive or fly,
                and how long they stay near a chamber; the recent-exposure window
``patient``     observation at the chamber, flying, return to diving
``retreatment`` re-treatment of residual symptoms and when to stop
``oxygen``      what the procedure says to do on oxygen-toxicity symptoms, on
                losing the oxygen system, and where the CNS risk is low

A rule that names no interval for a table (e.g. the attendant of a Table 9) is
not filled in: the plan says that none is bundled.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), Volume 5 ch. 21:
       §21-5.6.8 (inside tenders), §21-6 (after treatment), pp. 21-20 to 21-30.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from supervisor.chamber.clock import clock_label

AFTER_CARE_TABLE = "usn-treatment-after-care"
#: Units counted in minutes from the end of the treatment.
_TIME_UNITS = {"h": 60.0, "days": 1440.0, "weeks": 7 * 1440.0, "months": None}


@dataclass(frozen=True)
class TreatmentRule:
    """One rule around a treatment.

    Attributes
    ----------
    rule, who : str
        Id and who it concerns (``attendant`` or ``patient``).
    tables : tuple of str
        The table numbers it names.
    value : float
    unit : str
        ``h``, ``min``, ``days``, ``weeks``, ``months``, ``fsw`` or ``treatments``.
    text, citation, source_status : str
    from_end : bool
        True for a time counted from the end of the treatment (surfacing).
    verified : bool
    note : str
    """

    rule: str
    who: str
    tables: tuple[str, ...]
    value: float
    unit: str
    from_end: bool
    text: str
    citation: str
    source_status: str
    verified: bool
    note: str = ""

    @property
    def topic(self) -> str:
        """``attendant``, ``patient``, ``retreatment`` or ``oxygen``."""
        head = self.rule.split("-", 1)[0]
        return head if head in ("attendant", "patient", "retreatment", "oxygen") else "other"

    def after_end_min(self) -> float | None:
        """Minutes after the end of the treatment, for a time rule; None otherwise."""
        if not self.from_end:
            return None
        scale = _TIME_UNITS.get(self.unit)
        return None if scale is None else self.value * scale


@lru_cache(maxsize=2)
def load_rules(name: str = AFTER_CARE_TABLE) -> tuple[TreatmentRule, ...]:
    """Every bundled rule around a treatment."""
    from supervisor.references.loader import load_table

    t = load_table(name)
    out = []
    for i, row in enumerate(t.rows):
        d = row.data()
        st = t.row_states[i]
        out.append(TreatmentRule(str(d["rule"]), str(d["who"]),
                                 tuple(str(x).upper() for x in d["tables"]), float(d["value"]),
                                 str(d["unit"]), bool(d["from_end"]), str(d["text"]),
                                 str(d["citation"]),
                                 st.source_status, st.verified, row.note))
    return tuple(out)


def rules_for(number: str) -> list[TreatmentRule]:
    """The rules that name Treatment Table ``number``."""
    key = number.strip().upper()
    return [r for r in load_rules() if key in r.tables]


def window_h(number: str, default: float = 12.0) -> float:
    """The attendant's recent-exposure window of a table [h]."""
    for r in rules_for(number):
        if r.rule == "attendant-recent-exposure-window":
            return r.value
    return default


def _value(r: TreatmentRule) -> str:
    v = f"{r.value:g}"
    return f"{v} {r.unit}"


def rules_json(number: str, end_clock_min: float) -> list[dict[str, Any]]:
    """The rules of a treatment as JSON-ready dicts, with the clock time a time rule ends.

    Parameters
    ----------
    number : str
        Table number.
    end_clock_min : float
        End of the treatment (surfacing) [min after midnight of the start day].

    Returns
    -------
    list of dict
        ``rule``, ``topic``, ``who``, ``value``, ``unit``, ``text``, ``until`` (clock
        label or None), ``citation``, ``source_status``, ``verified``, ``note``.
    """
    out = []
    for r in rules_for(number):
        after = r.after_end_min()
        until = None
        if after is not None and r.unit == "h":
            until = clock_label(end_clock_min + after)
        elif after is not None:
            until = f"{_value(r)} after surfacing"
        out.append({"rule": r.rule, "topic": r.topic, "who": r.who, "value": r.value,
                    "unit": r.unit, "text": r.text, "until": until, "citation": r.citation,
                    "source_status": r.source_status, "verified": r.verified, "note": r.note})
    return out


def missing_topics(number: str) -> list[str]:
    """Topics for which no rule names this table (said plainly in the plan)."""
    have = {r.topic for r in rules_for(number)}
    want = {"attendant": "intervals before the attendant may dive or fly",
            "patient": "the patient's observation period and flying",
            "retreatment": "re-treatment and its limits",
            "oxygen": "what to do on oxygen-toxicity symptoms"}
    out = [text for topic, text in want.items() if topic not in have]
    dive_rules = {"attendant-dive-no-decompression", "attendant-dive-deep"}
    if "attendant" in have and not any(r.rule in dive_rules for r in rules_for(number)):
        out.append("intervals before the attendant may dive or fly")
    return out
