"""The chamber's own gas: pressurising it and ventilating it for one treatment.

46 CFR 197.340 asks for the chamber's gas for the dive and one hour after.  The
figure here is a planning estimate of that need, in free litres at one standard
atmosphere, for one dive:

``need = surface decompression + treatment``

surface decompression (a dive with chamber stops)
    pressurising the treatment (inner) lock to the deepest chamber stop, plus
    ventilating it over the chamber part of the planned profile;
treatment (every dive for which the chamber is required)
    pressurising every lock to the treatment depth once, plus ventilating the
    treatment lock for the whole treatment at that depth (an upper bound: a
    treatment spends much of its time shallower); or, when the plan gives it,
    the chamber manual's own figure ``chamber.treatment_gas_l``.

Arithmetic (Boyle's law, ideal gas, one temperature):

* pressurising a lock of internal volume ``V`` to depth ``D`` takes
  ``V (P(D) - P_s) / P_atm`` free litres, ``P(D) = P_s + D x (bar per unit)``,
  ``P_s`` the site's surface pressure;
* ventilating at ``Q`` actual litres per minute at chamber pressure for ``t``
  minutes takes ``Q t P(D) / P_atm`` free litres (linear segments use their mean
  pressure);
* the flasks hold about ``V_w (P_c - P_m) / P_atm`` free litres above ``P_m``,
  the chamber's gauge pressure at the deepest depth needed (gas below it cannot
  flow into the chamber); counted as a real gas (Peng-Robinson,
  :func:`supervisor.supply.free_gas_volume`), which at 200-300 bar holds less
  than the ideal-gas figure.

Ventilation ``Q``: the plan's ``chamber.ventilation_lpm`` if given; otherwise the
U.S. Navy per-person rates (Rev 4 Change A §22-5.4, OLDER-EDITION,
:mod:`supervisor.chamber.ventilation`).  For surface decompression: 12.5 acfm per
person breathing oxygen from BIBS with no overboard dump, every occupant counted on
oxygen (an upper bound); with an overboard dump, the air rates 2 acfm for the
patient at rest and 4 acfm per tender working (that the dump case takes the air
rates is FROM MEMORY).

Treatment default: with none of ``chamber.treatment_depth``, ``treatment_min`` and
``treatment_gas_l`` given, the treatment is the bundled U.S. Navy Treatment Table 6
(``tables/treatment/usn-tt6.toml``, steps FROM MEMORY) laid out as its timeline:
compression to 60 fsw, then each step at its own depth (60 fsw, the 60-30 fsw
travel, 30 fsw, the ascent), ventilated per step for who breathes oxygen (the
patient on the oxygen periods, the inside attendant on the table's attendant
rule), 288 min from leaving the surface; with ``chamber.treatment_extensions =
true``, with every extension the table allows (488 min).  Every lock is
pressurised once to 60 fsw.  When the plan gives a treatment depth or duration of
its own, the older estimate is kept: that depth for that time (60 fsw, 285 min
for what is not given).  Occupants: ``chamber.treatment_occupants`` or two, the
patient and one inside tender (common practice, no source).  The result carries
the least certain status of what it used; with only the plan's own figures it
carries none.  The chamber maker's manual and the contractor's manual govern.

References
----------
.. [1] 46 CFR 197.340, breathing gas supply (chamber for the dive and one hour after).
.. [2] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 21 (treatment
       tables) and §22-5.4 (chamber ventilation).
.. [3] U.S. Navy Diving Manual, Revision 7 Change A (2018), ch. 17, Treatment
       Table 6 (steps from memory; see the table file).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache
from typing import TYPE_CHECKING, Any

from supervisor import constants as C
from supervisor.analysis.assumptions import (
    CHAMBER_OCCUPANTS,
    L_PER_FT3,
    NAVY_VENT_AIR_REST_ACFM,
    NAVY_VENT_AIR_WORK_ACFM,
    NAVY_VENT_O2_ACFM,
    TREATMENT_DEPTH_FSW,
    TREATMENT_MIN,
)
from supervisor.analysis.results import _r, bar_per_unit
from supervisor.engine.buhlmann import least_certain
from supervisor.plan import Dive, Plan
from supervisor.profile import Profile

if TYPE_CHECKING:
    from supervisor.chamber.timeline import Timeline

NAVY_VENTILATION = "U.S. Navy Diving Manual, Rev 4 Change A, §22-5.4 (chamber ventilation)"
NAVY_TT6 = "U.S. Navy Diving Manual, Rev 4 Change A, ch. 21 (Treatment Table 6)"
#: Sources of the default figures of the estimate.
CHAMBER_SOURCES = f"{NAVY_VENTILATION}; {NAVY_TT6}"
#: The bundled table the treatment default is laid out from.
DEFAULT_TREATMENT_TABLE = "6"


@lru_cache(maxsize=2)
def default_treatment(extended: bool) -> Timeline:
    """The bundled Treatment Table 6 timeline (every extension when ``extended``)."""
    from supervisor.chamber.catalogue import load_treatment
    from supervisor.chamber.extensions import full_request
    from supervisor.chamber.timeline import build_timeline

    table = load_treatment(DEFAULT_TREATMENT_TABLE)
    return build_timeline(table, 0.0, full_request(table) if extended else None)


@dataclass
class ChamberGas:
    """The chamber's gas for one dive (free litres at 1 atm); see the module docstring.

    Attributes
    ----------
    need_l, available_l : float or None
        Need and the flasks' usable gas [L]; None when not computed.
    parts : dict
        The need by part [L] (``surface decompression: pressurising`` ...).
    basis : list of str
        How each figure was obtained, with its source and status.
    status : str or None
        Least certain source status of the figures used; None when every figure
        is the plan's own.
    missing : list of str
        Plan fields the estimate needs and the plan does not give.
    occupants : int
        People counted in the treatment lock.
    ventilation_lpm : float or None
        Ventilation of the treatment lock [L/min actual at chamber pressure].
    p_min_bar : float or None
        Chamber gauge pressure at the deepest depth needed [bar]: the flasks'
        gas below it is not counted.
    error : str or None
        Why the estimate could not be computed.
    """

    need_l: float | None = None
    available_l: float | None = None
    parts: dict[str, float] = field(default_factory=dict)
    basis: list[str] = field(default_factory=list)
    status: str | None = None
    missing: list[str] = field(default_factory=list)
    occupants: int = CHAMBER_OCCUPANTS
    ventilation_lpm: float | None = None
    p_min_bar: float | None = None
    error: str | None = None

    def to_json(self) -> dict[str, Any]:
        """JSON-ready dictionary."""
        return {
            "need_l": _r(self.need_l, 0),
            "available_l": _r(self.available_l, 0),
            "parts_l": {k: _r(v, 0) for k, v in self.parts.items()},
            "basis": list(self.basis),
            "source_status": self.status,
            "missing": list(self.missing),
            "occupants": self.occupants,
            "ventilation_lpm": _r(self.ventilation_lpm, 1),
            "p_min_bar": _r(self.p_min_bar, 2),
            "error": self.error,
        }


def _ventilation(plan: Plan, statuses: list[str], basis: list[str]) -> tuple[float, int]:
    """Ventilation of the treatment lock [L/min actual] and the occupants counted."""
    c = plan.chamber
    n = c.treatment_occupants or CHAMBER_OCCUPANTS
    if c.ventilation_lpm is not None:
        basis.append(f"ventilation {c.ventilation_lpm:g} L/min (chamber.ventilation_lpm)")
        return float(c.ventilation_lpm), n
    if c.treatment_occupants is None:
        statuses.append("FROM MEMORY")
        basis.append(f"{n} occupants (default; common practice, no source)")
    if c.bibs_overboard_dump:
        acfm = NAVY_VENT_AIR_REST_ACFM + NAVY_VENT_AIR_WORK_ACFM * (n - 1)
        statuses.append("FROM MEMORY")
        basis.append(
            f"ventilation {acfm:g} acfm (Navy air rates with an overboard dump: "
            f"{NAVY_VENT_AIR_REST_ACFM:g} patient, {NAVY_VENT_AIR_WORK_ACFM:g} per tender; "
            "OLDER-EDITION, dump case FROM MEMORY)"
        )
    else:
        acfm = NAVY_VENT_O2_ACFM * n
        statuses.append("OLDER-EDITION")
        told = "no overboard dump" if c.bibs_overboard_dump is False else (
            "overboard dump not stated, taken as none")
        basis.append(
            f"ventilation {acfm:g} acfm (Navy {NAVY_VENT_O2_ACFM:g} acfm per occupant on "
            f"oxygen, {told}; OLDER-EDITION)"
        )
    return acfm * L_PER_FT3, n


def _table_treatment(plan: Plan, out: ChamberGas, statuses: list[str]) -> float:
    """The treatment part from the bundled Treatment Table 6 timeline; returns its depth."""
    from supervisor.chamber.attendant import attendant_oxygen
    from supervisor.chamber.ventilation import (
        pressurising_gas_l,
        ventilation_gas_l,
        ventilation_pieces,
        ventilation_summary,
    )

    c = plan.chamber
    assert c.lock_volumes_l is not None
    extended = bool(c.treatment_extensions)
    tl = default_treatment(extended)
    n = c.treatment_occupants or CHAMBER_OCCUPANTS
    out.occupants = n
    if c.treatment_occupants is None:
        statuses.append("FROM MEMORY")
        out.basis.append(f"{n} occupants (default; common practice, no source)")
    dump = bool(c.bibs_overboard_dump)
    pieces = ventilation_pieces(tl, attendant_oxygen(tl, False).intervals, n, dump,
                                c.ventilation_lpm)
    bpf = bar_per_unit("fsw")
    out.parts["treatment: pressurising"] = pressurising_gas_l(c.lock_volumes_l, tl.max_depth, bpf)
    out.parts["treatment: ventilation"] = ventilation_gas_l(pieces, "fsw", plan.p_surface_bar)
    statuses.append(tl.status)
    if c.ventilation_lpm is None:
        statuses.append("FROM MEMORY" if dump else "OLDER-EDITION")
        rates = "; ".join(f"{v['acfm']:g} acfm for {v['minutes']:g} min ({v['situation']})"
                          for v in ventilation_summary(pieces))
        vent = f"ventilation per step by the Navy per-person rates: {rates}"
    else:
        vent = f"ventilation {c.ventilation_lpm:g} L/min (chamber.ventilation_lpm)"
    ext = (f", with every extension ({tl.elapsed_min:g} min)" if extended else
           f", no extensions ({tl.elapsed_min:g} min; chamber.treatment_extensions = true sizes "
           "for every extension)")
    out.basis.append(
        f"treatment: Treatment Table {tl.number} as its timeline (bundled {tl.table.name}, steps "
        f"{tl.status}), depth by step from leaving the surface{ext}; all locks to "
        f"{tl.max_depth:g} fsw once; {vent}")
    return plan.from_fsw(tl.max_depth)


def chamber_gas(plan: Plan, dive: Dive, profile: Profile) -> ChamberGas:
    """Estimate the chamber's gas for ``dive`` (module docstring).

    Parameters
    ----------
    plan : Plan
        The plan (its ``chamber`` section gives the figures).
    dive : Dive
        The dive.
    profile : Profile
        Its planned profile (the chamber segments of a surface decompression).

    Returns
    -------
    ChamberGas
        ``missing`` lists the fields needed when the estimate cannot be made.
    """
    from supervisor.supply import free_gas_volume, segment_gas

    c = plan.chamber
    out = ChamberGas()
    surd = bool(dive.chamber_stops)
    if c.air_supply is None:
        out.missing.append("chamber.air_supply (water_volume_l, pressure_bar)")
    if c.lock_volumes_l is None and (surd or c.treatment_gas_l is None):
        out.missing.append("chamber.lock_volumes_l")
    if out.missing:
        return out
    statuses: list[str] = []
    bpu = bar_per_unit(plan.unit)
    ps = plan.p_surface_bar

    def fill(volume_l: float, depth: float) -> float:
        return volume_l * depth * bpu / C.P_ATM_BAR

    own_treatment = c.treatment_depth is not None or c.treatment_min is not None
    use_table = c.treatment_gas_l is None and not own_treatment
    need_vent = surd or (c.treatment_gas_l is None and not use_table)
    q = None
    if need_vent:
        q, out.occupants = _ventilation(plan, statuses, out.basis)
        out.ventilation_lpm = q
    deepest = 0.0
    if surd:
        assert c.lock_volumes_l is not None and q is not None
        d_max = max(s.depth for s in dive.chamber_stops)
        deepest = d_max
        out.parts["surface decompression: pressurising"] = fill(c.lock_volumes_l[0], d_max)
        segs = [s for s in profile.segments if s.place == "chamber"]
        out.parts["surface decompression: ventilation"] = float(sum(
            segment_gas(s.start_depth, s.end_depth, s.minutes, q, plan.unit, ps, plan.site.water)
            for s in segs
        ))
        out.basis.append(
            f"surface decompression: inner lock to {d_max:g} {plan.unit}, "
            f"{sum(s.minutes for s in segs):.1f} min in the chamber"
        )
    if c.treatment_gas_l is not None:
        depth = c.treatment_depth if c.treatment_depth is not None else plan.from_fsw(
            TREATMENT_DEPTH_FSW)
        out.parts["treatment (chamber manual)"] = float(c.treatment_gas_l)
        out.basis.append(f"treatment {c.treatment_gas_l:g} L (chamber.treatment_gas_l)")
        if c.treatment_depth is None:
            statuses.append("OLDER-EDITION")
    elif use_table:
        assert c.lock_volumes_l is not None
        depth = _table_treatment(plan, out, statuses)
    else:
        assert c.lock_volumes_l is not None and q is not None
        depth = c.treatment_depth if c.treatment_depth is not None else plan.from_fsw(
            TREATMENT_DEPTH_FSW)
        minutes = c.treatment_min if c.treatment_min is not None else TREATMENT_MIN
        defaults = []
        if c.treatment_depth is None:
            statuses.append("OLDER-EDITION")
            defaults.append("depth OLDER-EDITION")
        if c.treatment_min is None:
            statuses.append("FROM MEMORY")
            defaults.append(f"{TREATMENT_MIN:g} min FROM MEMORY")
        why = f" (Treatment Table 6 default: {', '.join(defaults)})" if defaults else ""
        out.parts["treatment: pressurising"] = sum(fill(v, depth) for v in c.lock_volumes_l)
        out.parts["treatment: ventilation"] = q * minutes * (ps + depth * bpu) / C.P_ATM_BAR
        out.basis.append(
            f"treatment: all locks to {depth:g} {plan.unit}, {minutes:g} min at that depth "
            f"(the plan's own treatment figures){why}"
        )
    deepest = max(deepest, depth)
    out.need_l = float(sum(out.parts.values()))
    air = c.air_supply
    assert air is not None
    out.p_min_bar = deepest * bpu
    out.available_l = float(free_gas_volume(air.pressure_bar, air.water_volume_l,
                                            p_min_gauge=out.p_min_bar, gas=air.gas,
                                            eos="peng-robinson"))
    out.basis.append(f"flasks counted down to {out.p_min_bar:.2f} bar, real gas")
    out.status = least_certain(statuses) if statuses else None
    return out
