"""Chamber atmosphere and fire safety during a treatment: the limits and their sources.

The limits are data (``tables/limits/chamber-atmosphere-limits.toml``), each row
with its own source and status:

* chamber oxygen at most 23.5 % by volume: the hyperbaric-facilities standard
  (NFPA 99, Class A chambers; FROM MEMORY, section not confirmed), also reported
  for later Navy revisions (from memory).  The stricter figure is the
  **operating limit**;
* chamber oxygen never above 25 %: U.S. Navy Revision 4 Change A §22-6.2.6
  (OLDER-EDITION), the **fire limit**;
* chamber oxygen at least 19 % and carbon dioxide at most 1.5 % surface
  equivalent (11.4 mmHg): Treatment Table 7 notes (VERIFIED as reproduced in a
  handbook), the CO2 figure also the Navy's ventilation design aim;
* inside temperature below 85 °F on the long tables.

When patients or attendants breathe oxygen from BIBS masks without an overboard
dump, their exhaled oxygen enters the chamber: the Navy's oxygen ventilation
rates are meant to hold chamber oxygen within the limit.  A chamber whose own
ventilation figure is below the rate the planned breathing gases need is
flagged.  Readings recorded in a treatment log are judged against the limits
(:func:`judge_reading`).

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), §22-5.4 (p. 22-16)
       and §22-6.2.6 (p. 22-25).
.. [2] NFPA 99, Health Care Facilities Code, hyperbaric facilities chapter
       (ch. 14 from the 2012 edition; ch. 20 in 2005).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from supervisor.chamber.ventilation import VentilationPiece
from supervisor.references.loader import load_table

ATMOSPHERE_TABLE = "chamber-atmosphere-limits"


@dataclass(frozen=True)
class AtmosphereLimit:
    """One chamber atmosphere limit with its source.

    Attributes
    ----------
    limit : str
        Id (``oxygen-percent-operating`` ...).
    bound : {"max", "min"}
    value : float
    unit : str
        ``%``, ``% SEV`` or ``degF``.
    text, citation, source_status : str
    verified : bool
    """

    limit: str
    bound: str
    value: float
    unit: str
    text: str
    citation: str
    source_status: str
    verified: bool
    note: str = ""

    def breached(self, reading: float) -> bool:
        """True when ``reading`` is beyond the limit."""
        return reading > self.value + 1e-9 if self.bound == "max" else reading < self.value - 1e-9

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dict."""
        return {"limit": self.limit, "bound": self.bound, "value": self.value,
                "unit": self.unit, "text": self.text, "citation": self.citation,
                "source_status": self.source_status, "verified": self.verified,
                "note": self.note}


@lru_cache(maxsize=2)
def load_atmosphere_limits(name: str = ATMOSPHERE_TABLE) -> dict[str, AtmosphereLimit]:
    """The bundled chamber atmosphere limits, keyed by id."""
    t = load_table(name)
    out = {}
    for i, row in enumerate(t.rows):
        d = row.data()
        st = t.row_states[i]
        out[str(d["limit"])] = AtmosphereLimit(str(d["limit"]), str(d["bound"]),
                                               float(d["value"]), str(d["unit"]), str(d["text"]),
                                               str(d["citation"]), st.source_status, st.verified,
                                               row.note)
    return out


def atmosphere_plan(pieces: list[VentilationPiece], overboard_dump: bool,
                    own_lpm: float | None, occupants: int) -> dict[str, Any]:
    """What the chamber's atmosphere must stay within during the treatment.

    Parameters
    ----------
    pieces : list of VentilationPiece
        The ventilation the Navy rates give along the treatment (computed
        without the chamber's own figure).
    overboard_dump : bool
        The BIBS masks exhaust overboard.
    own_lpm : float, optional
        The chamber's own ventilation figure [L/min].
    occupants : int
        People in the treatment lock.

    Returns
    -------
    dict
        ``limits`` (each with source and status), the ``oxygen_operating_limit``
        and ``oxygen_fire_limit`` [%], ``co2_limit_sev_percent``, the
        ``ventilation_required_lpm`` (highest Navy rate along the treatment) and
        ``warnings``.
    """
    lim = load_atmosphere_limits()
    need = max((p.lpm for p in pieces), default=0.0)
    warnings = []
    notes = []
    if own_lpm is not None and own_lpm + 1e-9 < need:
        worst = max(pieces, key=lambda p: p.lpm)
        warnings.append(
            f"the chamber's own ventilation {own_lpm:g} L/min is below the {need:.0f} L/min the "
            f"Navy rates give when {worst.situation} ({occupants} occupant(s)): chamber oxygen "
            f"may rise above {lim['oxygen-percent-operating'].value:g} %; monitor it and "
            "ventilate more")
    if not overboard_dump:
        notes.append(
            "no overboard dump stated: exhaled oxygen enters the chamber; keep chamber oxygen "
            f"at or below {lim['oxygen-percent-operating'].value:g} % "
            f"({lim['oxygen-percent-operating'].source_status}) by ventilation, never above "
            f"{lim['oxygen-percent-fire'].value:g} % ({lim['oxygen-percent-fire'].source_status})")
    return {
        "limits": [x.to_json() for x in lim.values()],
        "oxygen_operating_limit_percent": lim["oxygen-percent-operating"].value,
        "oxygen_fire_limit_percent": lim["oxygen-percent-fire"].value,
        "oxygen_low_limit_percent": lim["oxygen-percent-low"].value,
        "co2_limit_sev_percent": lim["co2-sev-max"].value,
        "ventilation_required_lpm": round(need, 1),
        "overboard_dump": overboard_dump,
        "warnings": warnings,
        "notes": notes,
    }


@dataclass(frozen=True)
class ReadingVerdict:
    """A chamber reading judged against the limits: the worst limit breached, if any."""

    limit: AtmosphereLimit | None
    severity: str
    reading: float


def judge_reading(kind: str, reading: float) -> list[ReadingVerdict]:
    """Judge one reading against every limit of its kind.

    Parameters
    ----------
    kind : {"oxygen_percent", "co2_percent_sev", "temperature_f"}
        What was read.
    reading : float
        The value [%, % SEV, degF].

    Returns
    -------
    list of ReadingVerdict
        One per limit of that kind: ``fail`` beyond a limit that guards against
        immediate harm (fire above 25 % oxygen, hypoxia below 19 %, CO2 above its
        limit), ``warn`` beyond the operating oxygen limit or the temperature
        limit, ``pass`` within.
    """
    lim = load_atmosphere_limits()
    ids = {"oxygen_percent": ("oxygen-percent-operating", "oxygen-percent-fire",
                              "oxygen-percent-low"),
           "co2_percent_sev": ("co2-sev-max",),
           "temperature_f": ("temperature-max",)}[kind]
    harm = {"oxygen-percent-fire", "oxygen-percent-low", "co2-sev-max"}
    out = []
    for i in ids:
        x = lim[i]
        if x.breached(reading):
            out.append(ReadingVerdict(x, "fail" if i in harm else "warn", reading))
        else:
            out.append(ReadingVerdict(x, "pass", reading))
    return out
