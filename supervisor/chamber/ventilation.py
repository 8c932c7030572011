"""Chamber ventilation for a treatment, and the chamber's own gas to pressurise and ventilate it.

U.S. Navy per-person ventilation rates, in actual cubic feet per minute at
chamber pressure (Revision 4 Change A §22-5.4, p. 22-16, OLDER-EDITION):

===========================  ========  ==========  ======================================
name                         at rest   not at rest  situation
===========================  ========  ==========  ======================================
``NAVY_VENT_AIR_REST_ACFM``  2         4           breathing chamber air
``NAVY_VENT_O2_ACFM``        12.5      25          breathing oxygen from BIBS, no overboard
                                                   dump (air breathers then need no extra)
===========================  ========  ==========  ======================================

The patient is counted at rest, every attendant not at rest (an upper bound:
an attendant sits for much of a treatment).  With an overboard dump the exhaled
oxygen leaves the chamber, so the air rates apply throughout (that the dump
case takes the air rates is FROM MEMORY).  A ventilation figure of the chamber's
own (``chamber.ventilation_lpm`` of a plan) replaces the rates.

Gas of a treatment (free litres at one standard atmosphere, Boyle's law):
pressurising every lock to the deepest depth once,
``V D (bar per unit) / P_atm`` per lock; ventilating at ``Q`` actual L/min along
each piece of the timeline, ``Q t (P_start + P_end) / 2 / P_atm``
(:func:`supervisor.supply.segment_gas`); the flasks hold the real-gas content
above the chamber's gauge pressure at the deepest depth
(:func:`supervisor.supply.free_gas_volume`, Peng-Robinson).

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), §22-5.4 (p. 22-16) and
       pp. 22-18/22-19, chamber ventilation.
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from supervisor import constants as C

if TYPE_CHECKING:
    from supervisor.chamber.timeline import Timeline
    from supervisor.plan import Chamber

L_PER_FT3: float = 28.316846592  # litres per cubic foot (international foot, exact)
NAVY_VENT_AIR_REST_ACFM: float = 2.0
NAVY_VENT_AIR_WORK_ACFM: float = 4.0
NAVY_VENT_O2_ACFM: float = 12.5
NAVY_VENT_O2_WORK_ACFM: float = 25.0
NAVY_VENTILATION = "U.S. Navy Diving Manual, Rev 4 Change A, §22-5.4 (chamber ventilation)"


def required_acfm(patient_on_oxygen: bool, attendants: int, attendants_on_oxygen: bool,
                  overboard_dump: bool) -> tuple[float, str]:
    """Navy ventilation for one moment of a treatment (module docstring).

    Parameters
    ----------
    patient_on_oxygen : bool
        The patient breathes oxygen from BIBS.
    attendants : int
        Inside attendants (not at rest), >= 0.
    attendants_on_oxygen : bool
        The attendants breathe oxygen from BIBS.
    overboard_dump : bool
        The BIBS masks exhaust overboard.

    Returns
    -------
    tuple
        (flow [acfm], the situation in words).
    """
    air = NAVY_VENT_AIR_REST_ACFM + NAVY_VENT_AIR_WORK_ACFM * attendants
    if overboard_dump:
        return air, "overboard dump: air rates"
    if not patient_on_oxygen and not (attendants and attendants_on_oxygen):
        return air, "everyone on chamber air"
    q = (NAVY_VENT_O2_ACFM if patient_on_oxygen else 0.0) + \
        (NAVY_VENT_O2_WORK_ACFM * attendants if attendants_on_oxygen else 0.0)
    who = " and ".join(w for w, on in (("patient", patient_on_oxygen),
                                       ("attendants" if attendants > 1 else "attendant",
                                        attendants_on_oxygen and attendants > 0)) if on)
    return q, f"{who} on oxygen, no overboard dump"


@dataclass
class VentilationPiece:
    """A piece of the timeline with its ventilation: depths [unit], minutes, flow [L/min]."""

    from_depth: float
    to_depth: float
    minutes: float
    lpm: float
    situation: str


def ventilation_pieces(tl: Timeline, oxygen_intervals: list[Any], occupants: int,
                       overboard_dump: bool, own_lpm: float | None = None
                       ) -> list[VentilationPiece]:
    """Ventilation along the timeline, cut where the attendant's gas changes.

    Parameters
    ----------
    tl : Timeline
    oxygen_intervals : list of OxygenInterval
        The attendant's oxygen times.
    occupants : int
        People in the treatment lock, the patient included (>= 1).
    overboard_dump : bool
        The BIBS masks exhaust overboard.
    own_lpm : float, optional
        The chamber's own ventilation figure [L/min], replacing the rates.

    Returns
    -------
    list of VentilationPiece
    """
    from supervisor.chamber.attendant import attendant_gases

    out = []
    n_att = max(occupants - 1, 0)
    for k, d0, d1, m, gas in attendant_gases(tl, oxygen_intervals):
        if m <= 0:
            continue
        if own_lpm is not None:
            out.append(VentilationPiece(d0, d1, m, float(own_lpm), "the chamber's own figure"))
            continue
        acfm, why = required_acfm(tl.lines[k].on_oxygen, n_att, gas == "oxygen", overboard_dump)
        out.append(VentilationPiece(d0, d1, m, acfm * L_PER_FT3, why))
    return out


def ventilation_summary(pieces: list[VentilationPiece]) -> list[dict[str, Any]]:
    """Minutes at each ventilation rate, highest first (for the printed plan)."""
    minutes: dict[tuple[float, str], float] = defaultdict(float)
    for p in pieces:
        minutes[(round(p.lpm, 3), p.situation)] += p.minutes
    return [{"lpm": round(q, 1), "acfm": round(q / L_PER_FT3, 2), "situation": s,
             "minutes": round(m, 2)} for (q, s), m in sorted(minutes.items(), reverse=True)]


def ventilation_gas_l(pieces: list[VentilationPiece], unit: str,
                      p_surface_bar: float = C.P_ATM_BAR) -> float:
    """Free gas to ventilate along the pieces [L at 1 atm]."""
    import numpy as np

    from supervisor.supply import segment_gas

    if not pieces:
        return 0.0
    return float(np.sum(segment_gas([p.from_depth for p in pieces], [p.to_depth for p in pieces],
                                    [p.minutes for p in pieces], [p.lpm for p in pieces],
                                    unit, p_surface_bar)))  # type: ignore[arg-type]


def pressurising_gas_l(volumes_l: list[float], depth: float, bar_per_unit: float) -> float:
    """Free gas to pressurise each lock once to ``depth`` [L at 1 atm]."""
    return float(sum(v * depth * bar_per_unit / C.P_ATM_BAR for v in volumes_l))


@dataclass
class TreatmentGas:
    """The chamber's own gas for a whole treatment (module docstring).

    Attributes
    ----------
    need_l, available_l : float or None
        Need and the flasks' usable gas [L at 1 atm]; None when not computed.
    parts : dict
        The need by part [L].
    basis : list of str
        How each figure was obtained.
    missing : list of str
        Plan fields the sizing needs and the plan does not give.
    status : str
        Least certain source status of what it used.
    ventilation : list of dict
        Minutes at each ventilation rate.
    p_min_bar : float or None
        Chamber gauge pressure at the deepest depth [bar].
    need_every_extension_l : float or None
        The need if every extension the table allows were run [L]; None when the
        plan already runs them all or the need is not computed.
    """

    need_l: float | None = None
    available_l: float | None = None
    parts: dict[str, float] = field(default_factory=dict)
    basis: list[str] = field(default_factory=list)
    missing: list[str] = field(default_factory=list)
    status: str = "FROM MEMORY"
    ventilation: list[dict[str, Any]] = field(default_factory=list)
    p_min_bar: float | None = None
    need_every_extension_l: float | None = None

    @property
    def short(self) -> bool:
        """True when the flasks hold less than the need."""
        return self.need_l is not None and self.available_l is not None and \
            self.available_l + 1e-9 < self.need_l

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dict (the ``chamber_gas`` object of ``supervisor.treatment/1``)."""
        def r(x: float | None) -> float | None:
            return None if x is None else round(x, 0)

        return {"need_l": r(self.need_l), "available_l": r(self.available_l),
                "parts_l": {k: r(v) for k, v in self.parts.items()}, "basis": list(self.basis),
                "missing": list(self.missing), "source_status": self.status,
                "short": self.short, "ventilation": self.ventilation,
                "p_min_bar": None if self.p_min_bar is None else round(self.p_min_bar, 2),
                "need_every_extension_l": r(self.need_every_extension_l),
                "short_with_every_extension": self.short_with_every_extension}

    @property
    def short_with_every_extension(self) -> bool:
        """True when the flasks would fall short if every allowed extension were run."""
        need = self.need_every_extension_l
        return need is not None and self.available_l is not None and \
            self.available_l + 1e-9 < need


def treatment_gas(tl: Timeline, oxygen_intervals: list[Any], chamber: Chamber | None,
                  occupants: int, p_surface_bar: float = C.P_ATM_BAR) -> TreatmentGas:
    """Size the chamber's own gas for the whole treatment from a plan's chamber fields.

    Parameters
    ----------
    tl : Timeline
        The treatment, with its extensions.
    oxygen_intervals : list of OxygenInterval
        The attendant's oxygen times.
    chamber : Chamber or None
        The plan's chamber section (None: no plan, only the ventilation is given).
    occupants : int
        People in the treatment lock.
    p_surface_bar : float
        Surface pressure at the chamber [bar].

    Returns
    -------
    TreatmentGas
    """
    from supervisor.engine.buhlmann import least_certain
    from supervisor.supply import free_gas_volume
    from supervisor.units import bar_per_depth_unit

    dump = bool(chamber.bibs_overboard_dump) if chamber is not None else False
    own = chamber.ventilation_lpm if chamber is not None else None
    pieces = ventilation_pieces(tl, oxygen_intervals, occupants, dump, own)
    out = TreatmentGas(ventilation=ventilation_summary(pieces))
    statuses = [tl.status]
    if own is None:
        statuses.append("OLDER-EDITION" if not dump else "FROM MEMORY")
        out.basis.append(
            f"ventilation by the Navy per-person rates for {occupants} occupant(s) (patient at "
            f"rest, attendants not at rest), "
            + ("overboard dump: air rates (dump case FROM MEMORY)" if dump else "no overboard dump")
            + f" ({NAVY_VENTILATION}, OLDER-EDITION)")
    else:
        out.basis.append(f"ventilation {own:g} L/min (chamber.ventilation_lpm)")
    out.basis.append(f"over Treatment Table {tl.number} as planned, {tl.elapsed_min:g} min from "
                     f"leaving the surface, depth by step (steps {tl.status})")
    out.status = least_certain(statuses)
    if chamber is None:
        out.missing.append("a job plan (--plan) with chamber.lock_volumes_l and chamber.air_supply")
        return out
    if chamber.lock_volumes_l is None:
        out.missing.append("chamber.lock_volumes_l")
    if chamber.air_supply is None:
        out.missing.append("chamber.air_supply (water_volume_l, pressure_bar)")
    if out.missing:
        return out
    assert chamber.lock_volumes_l is not None and chamber.air_supply is not None
    bpu = bar_per_depth_unit(tl.unit, "salt")  # type: ignore[arg-type]
    deepest = tl.max_depth
    out.parts["pressurising every lock once"] = pressurising_gas_l(chamber.lock_volumes_l,
                                                                    deepest, bpu)
    out.parts["ventilation"] = ventilation_gas_l(pieces, tl.unit, p_surface_bar)
    out.basis.append(f"all {len(chamber.lock_volumes_l)} lock(s) pressurised once to "
                     f"{deepest:g} {tl.unit}")
    out.need_l = float(sum(out.parts.values()))
    air = chamber.air_supply
    out.p_min_bar = deepest * bpu
    out.available_l = float(free_gas_volume(air.pressure_bar, air.water_volume_l,
                                            p_min_gauge=out.p_min_bar, gas=air.gas,
                                            eos="peng-robinson"))
    out.basis.append(f"flasks counted down to {out.p_min_bar:.2f} bar gauge, real gas")
    return out
