"""The patient's oxygen dose on a treatment: pulmonary (OTU) and CNS by the chamber rule.

Pulmonary dose
    The timeline becomes a chamber profile (each line linear in depth, on the
    line's gas) and runs through the engine's OTU code
    (:func:`supervisor.engine.oxygen.profile_exposure`): the Clark-Lambertsen
    formula integrated exactly along each line.  The total counts every gas (air
    at 60 fsw, PO2 0.59 atm, adds a little); the oxygen lines are also given
    alone.

CNS by the chamber rule
    Chamber oxygen at 1.9-2.8 atm lies far above the NOAA in-water table, which
    stops at 1.6 atm, so no in-water CNS percentage is ever given for it.  The
    procedure limits chamber oxygen by its own schedule: oxygen periods of a set
    length, broken by air breaks, at rest.  The dose is therefore the list of
    oxygen periods (start, length, highest PO2) against the table's periods; a
    treatment log compares the periods as run with them.  The minutes above the
    in-water table are stated.

Cross-check
    The patient dose of an unextended Table 6 is often quoted as about 645 OTU
    (:data:`QUOTED_PATIENT_OTU`, from memory); it is printed beside the computed
    figure, never instead of it.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), p. 21-20 (oxygen
       toxicity during treatment: CNS unlikely at rest at 50 fsw and shallower,
       pulmonary toxicity unlikely on Tables 5, 6 and 6A; OLDER-EDITION).
.. [2] Clark JM, Lambertsen CJ, Pharmacological Reviews 23 (1971) 37-133 (from
       memory); the dose formula as used by :mod:`supervisor.engine.oxygen`.
.. [3] NOAA Diving Manual, normal-exposure oxygen limits (3rd to 6th editions):
       highest row 1.6 atm.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from supervisor import constants as C
from supervisor.chamber.timeline import Timeline, TimelineLine, oxygen_periods
from supervisor.engine.oxygen import OxygenExposure, profile_exposure
from supervisor.gas import parse_gas
from supervisor.profile import Profile, Segment

NAVY_TOXICITY = ("U.S. Navy Diving Manual, Revision 4 Change A (2001), p. 21-20 (oxygen "
                 "toxicity during treatment)")
#: How the chamber oxygen is counted for CNS toxicity (printed with the dose).
CNS_RULE = ("chamber oxygen is counted as oxygen periods against the treatment table's own "
            "periods and air breaks (the procedure's limit), at rest; the NOAA in-water CNS table "
            "stops at 1.6 atm and gives no percentage for chamber oxygen")
#: Quoted patient doses used as a cross-check: table number -> (OTU, status, what it is).
QUOTED_PATIENT_OTU: dict[str, tuple[float, str, str]] = {
    "6": (645.0, "FROM MEMORY", "the patient dose often quoted for an unextended Table 6"),
}


def chamber_profile(tl: Timeline, p_surface_bar: float = C.P_ATM_BAR,
                    gases: list[str] | None = None) -> Profile:
    """The timeline as a chamber profile (one segment per line).

    Parameters
    ----------
    tl : Timeline
    p_surface_bar : float
        Surface pressure at the chamber [bar].
    gases : list of str, optional
        Gas per line (default the patient's).

    Returns
    -------
    Profile
    """
    gases = gases or [x.gas for x in tl.lines]
    segs = [Segment(x.from_depth, x.to_depth, x.minutes, parse_gas(g), "chamber", x.role)
            for x, g in zip(tl.lines, gases, strict=True)]
    return Profile(segs, tl.unit, p_surface_bar, "salt")  # type: ignore[arg-type]


@dataclass(frozen=True)
class OxygenPeriod:
    """One oxygen period of the patient: consecutive oxygen lines.

    Attributes
    ----------
    lines : tuple of int
        Timeline line numbers.
    start_min, minutes : float
        Start after leaving the surface and length [min].
    from_depth, to_depth : float
        Depth at its start and end [unit].
    max_po2_atm : float
        Highest inspired PO2 [atm].
    """

    lines: tuple[int, ...]
    start_min: float
    minutes: float
    from_depth: float
    to_depth: float
    max_po2_atm: float

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dict."""
        return {"lines": list(self.lines), "start_min": round(self.start_min, 4),
                "minutes": round(self.minutes, 4), "from_depth": self.from_depth,
                "to_depth": self.to_depth, "max_po2_atm": round(self.max_po2_atm, 3)}


@dataclass
class PatientDose:
    """The patient's oxygen dose on a treatment (module docstring).

    Attributes
    ----------
    otu : float
        Pulmonary dose over the whole treatment, every gas [OTU].
    otu_oxygen : float
        The part breathed on oxygen [OTU].
    line_otu : list of float
        Per timeline line [OTU].
    max_po2_atm : float
        Highest inspired PO2 [atm].
    minutes_above_in_water_table : float
        Minutes above the NOAA table's highest row [min].
    periods : list of OxygenPeriod
    cross_check : dict or None
        A quoted figure for this table, when there is one.
    exposure : OxygenExposure
        The engine's result.
    """

    otu: float
    otu_oxygen: float
    line_otu: list[float]
    max_po2_atm: float
    minutes_above_in_water_table: float
    in_water_table_top_atm: float
    periods: list[OxygenPeriod]
    cross_check: dict[str, Any] | None
    exposure: OxygenExposure = field(repr=False)

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dict (the ``doses.patient`` object of ``supervisor.treatment/1``)."""
        return {
            "otu": round(self.otu, 1),
            "otu_oxygen": round(self.otu_oxygen, 1),
            "otu_rule": "Clark-Lambertsen UPTD formula, integrated exactly along each line "
                        "(supervisor.engine.oxygen)",
            "max_po2_atm": round(self.max_po2_atm, 3),
            "cns": {
                "rule": CNS_RULE,
                "citation": f"{NAVY_TOXICITY}; the treatment table's figure (periods)",
                "in_water_percent": None,
                "in_water_percent_reason": (
                    f"PO2 up to {self.max_po2_atm:.2f} atm, above the NOAA table's highest row "
                    f"({self.in_water_table_top_atm:g} atm): no in-water percentage"),
                "minutes_above_in_water_table": round(self.minutes_above_in_water_table, 2),
                "oxygen_periods": [p.to_json() for p in self.periods],
                "longest_period_min": round(max((p.minutes for p in self.periods),
                                                default=0.0), 4),
            },
            "pulmonary_note": ("pulmonary oxygen toxicity is unlikely on Tables 5, 6 and 6A and "
                               f"possible on Tables 4, 7 and 8 ({NAVY_TOXICITY}, OLDER-EDITION)"),
            "cross_check": self.cross_check,
        }


def _period(run: list[TimelineLine], po2: np.ndarray) -> OxygenPeriod:
    idx = [x.line - 1 for x in run]
    return OxygenPeriod(tuple(x.line for x in run), run[0].start_min,
                        float(sum(x.minutes for x in run)), run[0].from_depth, run[-1].to_depth,
                        float(np.max(po2[idx])))


def patient_dose(tl: Timeline, p_surface_bar: float = C.P_ATM_BAR) -> PatientDose:
    """The patient's dose on the timeline.

    Parameters
    ----------
    tl : Timeline
    p_surface_bar : float
        Surface pressure at the chamber [bar].

    Returns
    -------
    PatientDose
    """
    ex = profile_exposure(chamber_profile(tl, p_surface_bar))
    po2 = np.maximum(ex.segment_po2_start_atm, ex.segment_po2_end_atm)
    o2 = np.array([x.on_oxygen for x in tl.lines])
    periods = [_period(run, po2) for run in oxygen_periods(tl)]
    cross = None
    quoted = QUOTED_PATIENT_OTU.get(tl.number)
    if quoted is not None and tl.extensions.total == 0:
        value, status, what = quoted
        cross = {"quoted_otu": value, "status": status, "what": what,
                 "computed_otu": round(ex.otu, 1),
                 "difference_percent": round(100.0 * (ex.otu - value) / value, 1)}
    return PatientDose(
        otu=ex.otu,
        otu_oxygen=float(np.sum(ex.segment_otu[o2])),
        line_otu=[float(v) for v in ex.segment_otu],
        max_po2_atm=ex.max_po2_atm,
        minutes_above_in_water_table=ex.minutes_above_range + ex.chamber_minutes_above_table,
        in_water_table_top_atm=ex.range_top_atm,
        periods=periods,
        cross_check=cross,
        exposure=ex,
    )
