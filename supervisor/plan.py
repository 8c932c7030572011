"""The plan file: one diving job written as TOML and validated with pydantic.

A plan holds the job, the unit (stated once), the site conditions, the
recompression chamber, the team, the gas supply, the contractor's policy
limits and the proposed dives.  :func:`load_plan` reads a file and raises
:class:`PlanValidationError` listing every problem as ``(field path, message)``,
for example ``dives[1].stops[0].depth: got -10; expected a depth >= 0 fsw``.
:func:`plan_json_schema` exports the schema (``supervisor plan schema``).

Depths in a plan are in the plan's unit (fsw or msw, both pressure units);
rates are that unit per minute; times are minutes; pressures bar gauge;
volumes litres.

Policy defaults (the contractor's own choice; a plan that breaks its policy
fails):

======================  =================  =============================================
field                   default            source of the default
======================  =================  =============================================
model                   zhl16c             common practice, no source
gf_low, gf_high         30 %, 85 %         common practice, no source
po2_bottom_max_ata      1.4 ata            NOAA working maximum 1.4 ATA (NOAA Diving
                                           Manual; VERIFIED); a default the contractor
                                           did not choose: above it warns, above the
                                           in-water limit fails
po2_decompression_max_  1.6 ata            commercial practice, from memory; guards
ata                                        against oxygen convulsion in the water, so it
                                           fails unless the policy's reference table
                                           itself prescribes oxygen deeper (rules.oxygen)
po2_chamber_max_ata     2.8 ata            Navy treatment practice 2.8 ata (U.S. Navy
                                           Diving Manual Rev 4 Change A; OLDER-EDITION)
po2_min_ata             0.16 ata           hypoxia below 0.16 ata (U.S. Navy Diving
                                           Manual Rev 4 Change A ch. 15; OLDER-EDITION);
                                           physics that kills: fails by default
density_warn/fail       5.2 / 6.2 g/L      Anthony & Mitchell (2016) recommendation,
                                           FROM MEMORY; CO2 retention rising steeply
                                           above about 6 g/L (DAN Alert Diver,
                                           "Performance Under Pressure"; SECONDARY);
                                           the default fail limit only warns: it fails
                                           when the contractor states it
end_max                 100 fsw / 30 msw   common planning ceiling (SECONDARY); the
                                           default only warns, a stated end_max fails
descent_rate_max        75 fsw/min         U.S. Navy Diving Manual ch. 9, from memory
ascent_rate             30 fsw/min         U.S. Navy Diving Manual Rev 4 Change A ch. 9
                                           (OLDER-EDITION)
ascent_rate_min/max     20 / 40 fsw/min    U.S. Navy Diving Manual Rev 4 Change A ch. 14
                                           tolerance (OLDER-EDITION)
stop_step, last_stop    10 fsw / 3 msw     common practice, no source
current_max_kt          1.5 kt             common practice, no source (unset: a current
                                           above it warns; set: it fails)
altitude_wait_*_h       12 / 18 / 24 h     common guidance, FROM MEMORY (tables/limits/
                                           altitude-after-diving.toml); a policy value
                                           shorter than it is never used
surd_chamber_first_     50 / 40 fsw        U.S. Navy Diving Manual Rev 7 ch. 9 surface
depth, surd_chamber_    (15 / 12 msw)      decompression on oxygen (SECONDARY); Rev 4
later_depth                                Change A ch. 14 (OLDER-EDITION); the msw
                                           depths from memory
surd_interval_max_min   5 min              idem (SECONDARY; OLDER-EDITION)
surface_interval_gf_    none: 275 %,       DERIVED from this project's model, no
max                     needs review       published limit (rules.procedure)
======================  =================  =============================================

msw defaults are the fsw values converted and rounded to a practical figure.
PO2 limits are in ata (atm absolute), the trade's unit; the older keys
``po2_bottom_max``, ``po2_decompression_max`` and ``po2_chamber_max`` are the same
limits in bar (1 atm = 1.01325 bar) and keep working.  Every PO2 comparison
tolerates 0.01 atm (:data:`supervisor.engine.oxygen.PO2_TOLERANCE_ATM`).
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import typing
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import (
    AfterValidator,
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Field,
    PrivateAttr,
    ValidationError,
    ValidationInfo,
    WithJsonSchema,
    model_validator,
)

from supervisor import constants as C
from supervisor.errors import InputError, PlanError
from supervisor.gas import HYPOXIC_PO2_MIN_ATA, Gas, parse_gas
from supervisor.plan_errors import Problems, problems_from, show
from supervisor.plan_fields import (  # noqa: F401  (re-exported: the plan module's API)
    MAX_ALTITUDE_WAIT_H,
    MAX_DIVES,
    MAX_PLAN_DEPTH_FSW,
    MAX_STOP_MIN,
    MAX_STOPS,
    MAX_TEAM,
    MAX_TIMELINE_MIN,
    MAX_TOTAL_STOP_MIN,
    MAX_TRAVELS,
    REFERENCE_TABLE_KINDS,
    Depth,
    GasText,
    PositiveDepth,
    Rate,
    TravelAltitude,
    altitude_unit,
    bundled_reference_tables,
    check_reference_table,
    ctx_unit,
    depth_field,
    looks_like_path,
    resolve_table_path,
    unit_overlay,
)
from supervisor.plan_fields import cap as text_cap
from supervisor.profile import Profile
from supervisor.text import excerpt
from supervisor.tomlfile import MAX_NESTING, TomlError, nesting_depth, parse_toml
from supervisor.units import altitude_pressure, convert_pressure

SCHEMA_ID = "supervisor-plan/1"

Jurisdiction = Literal["osha-1910-t", "uscg-46-197-b", "none"]
PlanUnit = Literal["fsw", "msw"]
Mode = Literal[
    "scuba", "surface-supplied-air", "surface-supplied-nitrox", "surface-supplied-heliox"
]
Role = Literal["supervisor", "diver", "standby-diver", "tender", "chamber-operator"]
Decompression = Literal["none", "in-water", "in-water-oxygen", "surface-oxygen"]
StopPlace = Literal["water", "chamber"]
Bell = Literal["none", "open", "closed"]
ModelName = Literal["zhl16a", "zhl16b", "zhl16c"]
SourceKind = Literal["hp-bank", "cylinders", "compressor"]

ROLES: tuple[str, ...] = typing.get_args(Role)
MODES: tuple[str, ...] = typing.get_args(Mode)

#: Chamber compression rate used to draw a surface-decompression profile [fsw/min]:
#: "compress in the chamber to 50 fsw at up to 100 fsw/min", U.S. Navy Diving Manual
#: Rev 7 ch. 9 surface decompression on oxygen (SECONDARY).  The plan has no field for
#: it; :meth:`Plan.chamber_compression_rate` gives it in the plan unit.
CHAMBER_COMPRESSION_FSW_PER_MIN = 100.0

#: Surface interval of surface decompression on oxygen [min]: leaving the last water stop
#: to arriving at the first chamber stop within 5 min, U.S. Navy Diving Manual Rev 7 ch. 9
#: (SECONDARY).  A plan that states no ``surface_transfer_min`` is drawn with the rest of
#: this interval on deck.
SURD_INTERVAL_MIN = 5.0

#: Default PO2 limits of the policy [ata] (module docstring: their sources).
PO2_DEFAULTS_ATA: dict[str, float] = {"bottom": 1.4, "decompression": 1.6, "chamber": 2.8}
# Policy key of each phase's PO2 limit (bar; the ata key adds "_ata").
_PO2_KEYS: dict[str, str] = {
    "bottom": "po2_bottom_max",
    "decompression": "po2_decompression_max",
    "chamber": "po2_chamber_max",
}

# Policy defaults per unit: (fsw value, msw value).
_UNIT_DEFAULTS: dict[str, tuple[float, float]] = {
    "end_max": (100.0, 30.0),
    "descent_rate_max": (75.0, 23.0),
    "ascent_rate": (30.0, 9.0),
    "ascent_rate_min": (20.0, 6.0),
    "ascent_rate_max": (40.0, 12.0),
    "stop_step": (10.0, 3.0),
    "last_stop": (10.0, 3.0),
    "surd_chamber_first_depth": (50.0, 15.0),
    "surd_chamber_later_depth": (40.0, 12.0),
}


class PlanValidationError(PlanError):
    """A plan that does not validate; ``problems`` lists ``(field path, message)``.

    Parameters
    ----------
    problems : list of (str, str)
        One entry per problem: the field path such as ``dives[0].max_depth`` and
        a message giving the value and the accepted form.
    """

    def __init__(self, problems: list[tuple[str, str]]) -> None:
        self.problems = list(problems)
        field, message = self.problems[0] if self.problems else ("plan", "invalid")
        super().__init__(field, message)

    def lines(self) -> list[str]:
        """Return one ``error: FIELD: MESSAGE`` line per problem."""
        return [f"error: {f}: {m}" for f, m in self.problems]

    def __str__(self) -> str:
        return "\n".join(f"{f}: {m}" for f, m in self.problems)


# ---------------------------------------------------------------------------
# field types (ranges and caps: supervisor.plan_fields)

_ctx_unit = ctx_unit
_check_reference_table = check_reference_table
_depth_field = depth_field


def _to_date(value: Any) -> Any:
    if isinstance(value, str):
        try:
            return _dt.date.fromisoformat(value.strip())
        except ValueError:
            raise ValueError(f"got {excerpt(value)}; expected a date such as 2026-05-14") from None
    if isinstance(value, _dt.datetime):
        return value.date()
    return value


def _to_datetime(value: Any) -> Any:
    """A TOML date-time or ISO text as a datetime; a date alone or other text is refused."""
    form = "expected an ISO date-time such as 2026-05-14T08:30 (optionally with a UTC offset)"
    if isinstance(value, str):
        try:
            return _dt.datetime.fromisoformat(value.strip())
        except ValueError:
            raise ValueError(f"got {excerpt(value)}; {form}") from None
    if isinstance(value, _dt.datetime):
        return value
    if isinstance(value, _dt.date):
        raise ValueError(f"got the date {value.isoformat()} without a time; {form}")
    if isinstance(value, _dt.time):
        raise ValueError(f"got the time {value.isoformat()} without a date; {form}")
    raise ValueError(f"got {show(value)}; {form}")


#: A date-time of the plan: a TOML date-time or ISO text (naive: the site's local time).
DateTime = Annotated[_dt.datetime, BeforeValidator(_to_datetime),
                     WithJsonSchema({"type": "string", "format": "date-time"})]


def _to_roles(value: Any) -> Any:
    return [value] if isinstance(value, str) else value


def _ceil2(x: float) -> float:
    """Round up to 0.01 (so a stated minimum is never below the true one)."""
    return math.ceil(x * 100 - 1e-9) / 100


def _depth_field(description: str, default: Any = ..., **kw: Any) -> Any:
    return Field(default, description=description + " [plan unit]", **kw)


class _Section(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False)


# ---------------------------------------------------------------------------
# sections


class Job(_Section):
    """Who, where and under which rules."""

    title: str = Field(min_length=1, max_length=text_cap("title"), description="Job title")
    site: str = Field(min_length=1, max_length=text_cap("title"), description="Dive site name")
    date: Annotated[_dt.date, BeforeValidator(_to_date)] = Field(
        description="Planned date, a TOML date such as 2026-05-14"
    )
    client: str = Field("", max_length=text_cap("title"), description="Client")
    contractor: str = Field(
        min_length=1, max_length=text_cap("title"), description="Diving contractor"
    )
    supervisor: str = Field(
        min_length=1, max_length=text_cap("name"),
        description="Name of the diving supervisor (a team member)",
    )
    jurisdiction: Jurisdiction = Field(
        description="Rule set: osha-1910-t (29 CFR 1910 Subpart T), uscg-46-197-b "
        "(46 CFR 197 Subpart B) or none"
    )


class EmergencyContacts(_Section):
    """Call numbers kept at the site; an empty or missing entry counts as absent."""

    chamber: str | None = Field(
        None, max_length=text_cap("contact"),
        description="Operational chamber (needed when none on site)",
    )
    hospital: str | None = Field(
        None, max_length=text_cap("contact"), description="Hospital"
    )
    physician: str | None = Field(
        None, max_length=text_cap("contact"), description="Diving physician"
    )
    transport: str | None = Field(
        None, max_length=text_cap("contact"), description="Emergency transport"
    )
    uscg_rcc: str | None = Field(
        None, max_length=text_cap("contact"), description="Nearest USCG Rescue Coordination Center"
    )


class Site(_Section):
    """Site conditions and what is kept at the site (``None`` = not stated)."""

    water: Literal["salt", "fresh"] = Field(description="Water: salt or fresh")
    altitude_m: float = Field(
        0.0, ge=-500, le=6000, description="Altitude of the water surface [m]"
    )
    current_kt: float = Field(ge=0, le=15, description="Water current [kt]")
    visibility_m: float | None = Field(None, ge=0, le=100, description="Underwater visibility [m]")
    water_temperature_c: float | None = Field(
        None, ge=-3, le=40, description="Water temperature [degC]"
    )
    confined_space: bool = Field(description="Enclosed or confining space")
    marine_traffic: bool = Field(description="Waters that can carry marine traffic")
    from_vessel: bool = Field(description="Diving from a vessel")
    night: bool = Field(description="Diving at night")
    emergency_contacts: EmergencyContacts = Field(
        default_factory=EmergencyContacts, description="Emergency call list"
    )
    first_aid_kit: bool | None = Field(None, description="Physician-approved first-aid kit on site")
    first_aid_handbook: bool | None = Field(None, description="First-aid handbook on site")
    resuscitator: bool | None = Field(None, description="Bag-type manual resuscitator on site")
    tables_on_site: bool | None = Field(
        None, description="Decompression, repetitive and no-decompression tables on site"
    )
    safe_practices_manual: bool | None = Field(None, description="Safe practices manual on site")
    emergency_comms: bool | None = Field(None, description="Two-way link for emergency help")
    diver_voice_comms: bool | None = Field(
        None, description="Two-way voice between each surface-supplied diver and the surface"
    )
    code_flag_a: bool | None = Field(None, description="Rigid code flag A, at least 1 m high")
    code_flag_a_lit: bool | None = Field(None, description="Code flag A lit at night")
    night_lighting: bool | None = Field(
        None, description="Night diving: lighting of the work site, the water entry and exit "
        "point and the diver"
    )


class ChamberEquipment(_Section):
    """Chamber fittings (``None`` = not stated)."""

    pressure_gauges: bool | None = Field(None, description="Gauge per occupied compartment")
    bibs_masks: int | None = Field(None, ge=0, le=50, description="BIBS masks [count]")
    voice_comms: bool | None = Field(None, description="Two-way voice chamber to site")
    viewport: bool | None = Field(None, description="Viewport")
    interior_lighting: bool | None = Field(None, description="Interior lighting")
    treatment_tables: bool | None = Field(None, description="Treatment tables on site")
    treatment_gas: bool | None = Field(None, description="Treatment gas on site")


class ChamberAirSupply(_Section):
    """The chamber's own gas: its flasks' total water volume and charge pressure."""

    gas: GasText = Field("air", description="Gas such as air")
    water_volume_l: float = Field(gt=0, le=100000, description="Total water volume [L]")
    pressure_bar: float = Field(gt=0, le=450, description="Charge pressure [bar gauge]")


class Chamber(_Section):
    """The recompression chamber (state ``on_site = false`` when there is none).

    The optional sizing fields (``lock_volumes_l`` to ``air_supply``) let the check
    size the chamber's own gas (:mod:`supervisor.analysis.chamber`); without them
    that check needs review.
    """

    on_site: bool = Field(description="A chamber is at the dive location")
    ready: bool = Field(description="The chamber is ready for use during the dives")
    depth_capability: Depth | None = _depth_field("Deepest pressure the chamber reaches", None)
    locks: int | None = Field(None, ge=1, le=4, description="Number of locks [count]")
    multiplace: bool | None = Field(None, description="Holds more than one person")
    travel_time_min: float | None = Field(
        None, ge=0, le=1440, description="Time to bring a diver to the chamber [min]"
    )
    operator_available: bool | None = Field(
        None, description="A member able to run the chamber is present"
    )
    equipment: ChamberEquipment = Field(
        default_factory=ChamberEquipment, description="Chamber fittings"
    )
    lock_volumes_l: list[Annotated[float, Field(gt=0, le=200000)]] | None = Field(
        None,
        min_length=1,
        max_length=4,
        description="Internal volume of each lock, the treatment (inner) lock first [L]",
    )
    treatment_depth: PositiveDepth | None = _depth_field(
        "Depth of the treatment the chamber gas is sized for (default 60 fsw, 18.3 msw)", None
    )
    treatment_min: float | None = Field(
        None,
        ge=60,
        le=2880,
        description="Duration of that treatment (default 285), at least the hour after the "
        "dive [min]",
    )
    treatment_extensions: bool | None = Field(
        None,
        description="Size the chamber gas for the default treatment (Treatment Table 6) with "
        "every extension the table allows (not stated: the table without extensions)",
    )
    treatment_occupants: int | None = Field(
        None, ge=1, le=20, description="People in the treatment lock, patient included "
        "(default 2) [count]"
    )
    bibs_overboard_dump: bool | None = Field(
        None, description="The BIBS masks exhaust overboard (not stated: taken as no dump)"
    )
    ventilation_lpm: float | None = Field(
        None, gt=0, le=100000,
        description="Ventilation of the treatment lock at chamber pressure, the chamber's own "
        "figure (replaces the per-person rates) [L/min]",
    )
    treatment_gas_l: float | None = Field(
        None, gt=0, le=10_000_000,
        description="Free gas for one treatment (pressurising and ventilation) from the "
        "chamber's manual [L]",
    )
    air_supply: ChamberAirSupply | None = Field(
        None, description="The chamber's own gas supply (flasks)"
    )

    @model_validator(mode="after")
    def _consistent(self, info: ValidationInfo) -> Chamber:
        unit = _ctx_unit(info)
        problems: list[tuple[str, str]] = []
        vols = self.lock_volumes_l
        if vols is not None and self.locks is not None and len(vols) != self.locks:
            problems.append(
                ("lock_volumes_l", f"got {len(vols)} volume(s); expected one per lock "
                 f"(locks = {self.locks})")
            )
        cap, td = self.depth_capability, self.treatment_depth
        if cap is not None and td is not None and td > cap:
            problems.append(
                ("treatment_depth", f"got {td:g}; expected a depth <= the chamber's "
                 f"depth_capability ({cap:g} {unit})")
            )
        if td is not None and td <= 0:
            problems.append(("treatment_depth", f"got {td:g}; expected a depth > 0 {unit}"))
        if problems:
            raise Problems(problems)
        return self


class Member(_Section):
    """A team member."""

    name: str = Field(min_length=1, max_length=text_cap("name"), description="Name")
    role: Annotated[list[Role], BeforeValidator(_to_roles), WithJsonSchema({"anyOf": [
        {"enum": list(ROLES)},
        {"type": "array", "items": {"enum": list(ROLES)}, "minItems": 1},
    ]})] = Field(
        min_length=1,
        description="Role or list of roles: supervisor, diver, standby-diver, tender, "
        "chamber-operator",
    )
    first_aid_cpr: bool = Field(description="Holds current CPR and first-aid training")
    physics_physiology: bool = Field(description="Trained in diving physics and physiology")

    def has(self, role: str) -> bool:
        """Return whether the member holds ``role``."""
        return role in self.role


class GasSource(_Section):
    """A primary or secondary breathing-gas source."""

    kind: SourceKind = Field(description="hp-bank, cylinders or compressor")
    gas: GasText = Field("air", description="Gas such as air, nitrox32, 32/0 or 16/84")
    water_volume_l: float | None = Field(
        None, gt=0, le=100000, description="Total water volume of the bank or cylinders [L]"
    )
    pressure_bar: float | None = Field(
        None,
        gt=0,
        le=450,
        description="Charge pressure of a bank or cylinders; on a compressor without "
        "delivery_pressure_bar, read as its delivery pressure [bar gauge]",
    )
    delivery_lpm: float | None = Field(
        None, gt=0, le=100000, description="Compressor free-gas delivery [L/min]"
    )
    delivery_pressure_bar: float | None = Field(
        None,
        gt=0,
        le=450,
        description="Compressor: the supply pressure it holds at the dive manifold [bar gauge]",
    )

    @property
    def supply_pressure_bar(self) -> float | None:
        """Pressure the source supplies [bar gauge]: a bank's or cylinders' charge, a
        compressor's delivery pressure (``delivery_pressure_bar``, else ``pressure_bar``);
        ``None`` when not stated."""
        if self.kind == "compressor" and self.delivery_pressure_bar is not None:
            return self.delivery_pressure_bar
        return self.pressure_bar

    @model_validator(mode="after")
    def _complete(self) -> GasSource:
        problems: list[tuple[str, str]] = []
        if self.kind == "compressor":
            if self.delivery_lpm is None:
                problems.append(
                    ("delivery_lpm", "missing; a compressor needs its delivery [L/min]")
                )
            a, b = self.delivery_pressure_bar, self.pressure_bar
            if a is not None and b is not None and abs(a - b) > 1e-9:
                problems.append(
                    ("pressure_bar", f"got {b:g} and delivery_pressure_bar {a:g}; a compressor's "
                     "pressure_bar is read as its delivery pressure: give one of the two")
                )
        else:
            if self.delivery_pressure_bar is not None:
                problems.append(
                    ("delivery_pressure_bar", f"got {self.delivery_pressure_bar:g} on a "
                     f"{self.kind} source; expected it only on a compressor (a {self.kind} "
                     "gives its charge in pressure_bar [bar gauge])")
                )
            for name, what in (("water_volume_l", "[L]"), ("pressure_bar", "[bar gauge]")):
                if getattr(self, name) is None:
                    problems.append((name, f"missing; a {self.kind} source needs it {what}"))
        if problems:
            raise Problems(problems)
        return self


class Cylinder(_Section):
    """A cylinder of stored gas (bailout or oxygen)."""

    gas: GasText = Field("air", description="Gas such as air, oxygen or 32/0")
    water_volume_l: float = Field(gt=0, le=10000, description="Water volume [L]")
    pressure_bar: float = Field(gt=0, le=450, description="Charge pressure [bar gauge]")


class Bailout(Cylinder):
    """A bailout cylinder carried by one diver (diver-carried reserve)."""

    diver: str = Field(
        min_length=1, max_length=text_cap("name"), description="Name of the diver carrying it"
    )


class GasSupply(_Section):
    """Breathing-gas sources, bailouts and oxygen."""

    primary: GasSource = Field(description="Primary breathing-gas source")
    secondary: GasSource | None = Field(
        None, description="Secondary (dive-location reserve) source"
    )
    bailout: list[Bailout] = Field(
        default_factory=list, max_length=MAX_TEAM, description="Bailout cylinder per diver"
    )
    oxygen_decompression: Cylinder | None = Field(
        None, description="Oxygen for in-water or chamber decompression"
    )
    oxygen_treatment: Cylinder | None = Field(None, description="Oxygen kept for a treatment")


class Policy(_Section):
    """The contractor's own limits; ``None`` takes the unit's default (module docstring)."""

    model: ModelName = Field("zhl16c", description="Decompression model")
    gf_low: float = Field(30.0, gt=0, le=100, description="Gradient factor low [%]")
    gf_high: float = Field(85.0, gt=0, le=100, description="Gradient factor high [%]")
    po2_bottom_max_ata: float = Field(
        PO2_DEFAULTS_ATA["bottom"], gt=0, le=3,
        description="Bottom PO2 limit [ata, atm absolute]: the contractor's own fails; the "
        "1.4 ata default warns, and fails above the in-water limit",
    )
    po2_decompression_max_ata: float = Field(
        PO2_DEFAULTS_ATA["decompression"], gt=0, le=3,
        description="In-water decompression PO2 limit [ata, atm absolute]",
    )
    po2_chamber_max_ata: float = Field(
        PO2_DEFAULTS_ATA["chamber"], gt=0, le=3.5,
        description="Chamber PO2 limit [ata, atm absolute]",
    )
    po2_min_ata: float = Field(
        HYPOXIC_PO2_MIN_ATA, ge=0.1, le=0.5,
        description="Lowest inspired PO2 of any breathing gas, at the surface, on descent "
        "and at every stop [ata, atm absolute]; below it fails (hypoxia)",
    )
    po2_bottom_max: float = Field(
        PO2_DEFAULTS_ATA["bottom"] * C.P_ATM_BAR, gt=0, le=3 * C.P_ATM_BAR,
        description="Bottom PO2 limit in bar, kept for older plans (1 atm = 1.01325 bar); "
        "give po2_bottom_max_ata instead",
    )
    po2_decompression_max: float = Field(
        PO2_DEFAULTS_ATA["decompression"] * C.P_ATM_BAR, gt=0, le=3 * C.P_ATM_BAR,
        description="In-water decompression PO2 limit in bar, kept for older plans; give "
        "po2_decompression_max_ata instead",
    )
    po2_chamber_max: float = Field(
        PO2_DEFAULTS_ATA["chamber"] * C.P_ATM_BAR, gt=0, le=3.5 * C.P_ATM_BAR,
        description="Chamber PO2 limit in bar, kept for older plans; give po2_chamber_max_ata "
        "instead",
    )
    density_warn_g_per_l: float = Field(5.2, gt=0, le=30, description="Gas density warning [g/L]")
    density_fail_g_per_l: float = Field(
        6.2, gt=0, le=30,
        description="Gas density limit [g/L]: fails when the contractor states it; the "
        "6.2 g/L default (rebreather literature) only warns",
    )
    end_max: Depth | None = _depth_field(
        "Equivalent narcotic depth limit, the contractor's fail limit (plan unit); when "
        "absent the 100 fsw / 30 msw default only warns", None)
    reference_table: Annotated[str | None, AfterValidator(_check_reference_table)] = Field(
        None,
        max_length=text_cap("path"),
        description="Reference table in use: a bundled no-stop or decompression table name, "
        "or the path of a table file; a relative path is read from the plan file's folder",
    )
    descent_rate_max: Rate | None = Field(None, description="Fastest descent [plan unit/min]")
    ascent_rate: Rate | None = Field(None, description="Planned ascent rate [plan unit/min]")
    ascent_rate_min: Rate | None = Field(None, description="Slowest ascent [plan unit/min]")
    ascent_rate_max: Rate | None = Field(None, description="Fastest ascent [plan unit/min]")
    stop_step: PositiveDepth | None = _depth_field("Spacing of decompression stops", None)
    last_stop: Depth | None = _depth_field("Shallowest water stop", None)
    current_max_kt: float | None = Field(
        None, gt=0, le=15, description="Strongest water current the contractor dives in [kt]; "
        "unset: 1.5 kt (common practice, no source), which only warns"
    )
    altitude_wait_single_h: float | None = Field(
        None, gt=0, le=MAX_ALTITUDE_WAIT_H, description="Shortest time on the surface before "
        "an ascent to altitude after a single no-decompression dive [h]; unset: the common "
        "guidance (12 h, from memory); a shorter value is not used"
    )
    altitude_wait_repetitive_h: float | None = Field(
        None, gt=0, le=MAX_ALTITUDE_WAIT_H, description="Shortest time on the surface before "
        "an ascent to altitude after repetitive dives or several days of diving [h]; unset: "
        "the common guidance (18 h, from memory); a shorter value is not used"
    )
    altitude_wait_decompression_h: float | None = Field(
        None, gt=0, le=MAX_ALTITUDE_WAIT_H, description="Shortest time on the surface before "
        "an ascent to altitude after a decompression dive [h]; unset: the common guidance "
        "(24 h, from memory); a shorter value is not used"
    )
    surd_chamber_first_depth: PositiveDepth | None = _depth_field(
        "Surface decompression: chamber depth of the first half oxygen period (default "
        "50 fsw, 15 msw)", None)
    surd_chamber_later_depth: PositiveDepth | None = _depth_field(
        "Surface decompression: chamber depth of the later oxygen periods (default 40 fsw, "
        "12 msw)", None)
    surd_interval_max_min: float = Field(
        5.0, gt=0, le=60, description="Surface decompression: longest surface interval, from "
        "leaving the last water stop to arriving at the first chamber depth [min]")
    surface_interval_gf_max: float | None = Field(
        None, gt=0, le=1000, description="Surface decompression: highest supersaturation during "
        "the surface interval, as a percentage of the M-value gradient [%]; not stated: a "
        "default of this project with no source, beyond which the plan needs review")

    def po2_stated(self, phase: str) -> bool:
        """Whether the plan states the ``phase`` PO2 limit (in ata or in the older bar key)."""
        key = _PO2_KEYS[phase]
        return bool({key, key + "_ata"} & self.model_fields_set)

    def po2_limit_ata(self, phase: str) -> float:
        """The ``phase`` PO2 limit [ata]: ``bottom``, ``decompression`` or ``chamber``."""
        return float(getattr(self, _PO2_KEYS[phase] + "_ata"))

    def _sync_po2(self, problems: list[tuple[str, str]]) -> None:
        """Keep each ata limit and its older bar key the same limit (the stated one wins)."""
        stated = self.model_fields_set
        for key in _PO2_KEYS.values():
            ata, bar = float(getattr(self, key + "_ata")), float(getattr(self, key))
            if key in stated and key + "_ata" in stated:
                if abs(ata * C.P_ATM_BAR - bar) > 5e-4:
                    problems.append((key, f"got {bar:g} bar and {key}_ata {ata:g} ata "
                                     f"({ata * C.P_ATM_BAR:.3f} bar); give one of the two"))
            elif key in stated:
                self.__dict__[key + "_ata"] = bar / C.P_ATM_BAR
            else:  # the ata value (stated or default) sets the bar key; not marked stated
                self.__dict__[key] = ata * C.P_ATM_BAR

    @model_validator(mode="after")
    def _ordered(self) -> Policy:
        problems: list[tuple[str, str]] = []
        self._sync_po2(problems)
        if self.gf_low > self.gf_high:
            problems.append(
                ("gf_low", f"got {self.gf_low:g} %; expected <= gf_high ({self.gf_high:g} %)")
            )
        if self.density_warn_g_per_l > self.density_fail_g_per_l:
            problems.append(
                (
                    "density_warn_g_per_l",
                    f"got {self.density_warn_g_per_l:g} g/L; expected <= density_fail_g_per_l "
                    f"({self.density_fail_g_per_l:g} g/L)",
                )
            )
        lo, hi = self.ascent_rate_min, self.ascent_rate_max
        if lo is not None and hi is not None and lo > hi:
            problems.append(
                ("ascent_rate_min", f"got {lo:g}; expected <= ascent_rate_max ({hi:g})")
            )
        if self.stop_step is not None and self.stop_step <= 0:
            problems.append(("stop_step", f"got {self.stop_step:g}; expected a step > 0"))
        first, later = self.surd_chamber_first_depth, self.surd_chamber_later_depth
        if first is not None and later is not None and later > first:
            problems.append(("surd_chamber_later_depth", f"got {later:g}; expected no deeper "
                             f"than surd_chamber_first_depth ({first:g})"))
        if problems:
            raise Problems(problems)
        return self

    def resolved(self, unit: str) -> Policy:
        """Return a copy with every ``None`` default filled for ``unit``."""
        idx = 1 if unit == "msw" else 0
        fill = {k: v[idx] for k, v in _UNIT_DEFAULTS.items() if getattr(self, k) is None}
        if self.last_stop is None and self.stop_step is not None:
            fill["last_stop"] = self.stop_step
        first = self.surd_chamber_first_depth
        if self.surd_chamber_later_depth is None and first is not None:
            # a first depth shallower than the default later one: every period there
            fill["surd_chamber_later_depth"] = min(fill["surd_chamber_later_depth"], first)
        return self.model_copy(update=fill)


class Stop(_Section):
    """A planned decompression stop."""

    depth: PositiveDepth = _depth_field("Stop depth (chamber stops: chamber pressure)")
    minutes: float = Field(gt=0, le=MAX_STOP_MIN, description="Stop time [min]")
    gas: GasText | None = Field(None, description="Gas at the stop; the dive's gas if absent")
    place: StopPlace = Field("water", description="water or chamber")


def _mode_gas_problem(mode: str, gas: Gas, text: str) -> str | None:
    if mode == "surface-supplied-air" and gas.name != "air":
        return f"got {excerpt(text)}; expected air for mode {mode}"
    if mode == "surface-supplied-nitrox" and (gas.fhe > 0 or gas.fo2 <= C.FO2_AIR + 1e-9):
        return (f"got {excerpt(text)}; expected nitrox (more than 21 % O2, no helium) for mode "
                f"{mode}")
    if mode == "surface-supplied-heliox" and (gas.fhe <= 0 or gas.fn2 > 0.005):
        return (f"got {excerpt(text)}; expected heliox O2/He percentages adding up to 100 for "
                f"mode {mode}")
    return None


def _descent_problem(dive: Dive, descent: float, unit: str) -> str | None:
    """The message for a bottom time shorter than the descent, else ``None``."""
    t_desc = dive.max_depth / descent
    if dive.bottom_time_min + 1e-9 >= t_desc:
        return None
    return (
        f"got {dive.bottom_time_min:g} min; expected at least the descent time "
        f"{_ceil2(t_desc):.2f} min ({dive.max_depth:g} {unit} at {descent:g} {unit}/min): the "
        "bottom time counts from leaving the surface"
    )


class Dive(_Section):
    """One proposed dive."""

    id: str = Field(
        min_length=1, max_length=text_cap("id"), description="Dive identifier, unique in the plan"
    )
    diver: str = Field(
        min_length=1, max_length=text_cap("name"), description="Name of the diver (a team member)"
    )
    mode: Mode = Field(description="Diving mode")
    gas: GasText = Field(description="Bottom gas such as air, nitrox32, 32/0 or 16/84")
    max_depth: PositiveDepth = _depth_field("Maximum depth")
    bottom_time_min: float = Field(
        gt=0, le=1440, description="From leaving the surface to leaving the bottom [min]"
    )
    descent_rate: Rate | None = Field(None, description="Descent rate [plan unit/min]")
    ascent_rate: Rate | None = Field(None, description="Ascent rate [plan unit/min]")
    decompression: Decompression = Field(
        description="none, in-water, in-water-oxygen or surface-oxygen"
    )
    stops: list[Stop] = Field(
        default_factory=list, max_length=MAX_STOPS, description="Planned stops, deepest first"
    )
    surface_interval_min: float | None = Field(
        None, ge=0, le=10080, description="Surface interval before this dive (repetitive) [min]"
    )
    previous_dive: str | None = Field(
        None, max_length=text_cap("id"), description="Id of the dive the surface interval follows"
    )
    surface_transfer_min: float | None = Field(
        None,
        ge=0,
        le=60,
        description="Surface decompression: time on deck before compression [min]",
    )
    cold: bool = Field(False, description="Diver cold during the dive")
    strenuous: bool = Field(False, description="Strenuous work")
    line_tended: bool = Field(description="Line-tended from the surface")
    buddy: str | None = Field(
        None, max_length=text_cap("name"),
        description="In-water buddy in visual contact (a team member)",
    )
    standby_diver: str | None = Field(
        None, max_length=text_cap("name"), description="Standby diver (a team member)"
    )
    tender: str | None = Field(
        None, max_length=text_cap("name"), description="Tender (a team member)"
    )
    entry_diver: str | None = Field(
        None, max_length=text_cap("name"),
        description="Diver at the underwater entry point of a confined space",
    )
    heavy_gear: bool = Field(False, description="Heavy gear worn")
    bell: Bell = Field("none", description="Bell used: none, open or closed")
    stage: bool = Field(False, description="In-water stage provided")
    standby_hose: bool = Field(False, description="Extra hose for the standby diver")
    direct_ascent_possible: bool = Field(True, description="The diver can ascend directly")
    no_space_for_reserve: bool = Field(
        False, description="Physical space does not permit a diver-carried reserve (the "
        "exception of 29 CFR 1910.425(c)(6) and 1910.426(c)(9))"
    )
    start: DateTime | None = Field(
        None, description="Planned time of leaving the surface, an ISO date-time such as "
        "2026-05-14T08:30 (the site's local time, or with a UTC offset); times the wait "
        "before travel to altitude"
    )

    @model_validator(mode="after")
    def _consistent(self, info: ValidationInfo) -> Dive:
        unit = _ctx_unit(info)
        problems: list[tuple[str, str]] = []
        gas = parse_gas(self.gas)
        msg = _mode_gas_problem(self.mode, gas, self.gas)
        if msg:
            problems.append(("gas", msg))
        if self.max_depth <= 0:
            problems.append(("max_depth", f"got {self.max_depth:g}; expected a depth > 0 {unit}"))
        last: dict[str, float] = {}
        seen_chamber = False
        for i, s in enumerate(self.stops):
            if s.depth <= 0:
                problems.append(
                    (f"stops[{i}].depth", f"got {s.depth:g}; expected a stop deeper than 0 {unit}")
                )
            if s.place == "chamber":
                seen_chamber = True
            elif seen_chamber:
                problems.append(
                    (
                        f"stops[{i}].place",
                        "got 'water' after a chamber stop; expected the water "
                        "stops first, then the chamber stops",
                    )
                )
            if s.place == "water" and s.depth >= self.max_depth > 0:
                problems.append(
                    (
                        f"stops[{i}].depth",
                        f"got {s.depth:g}; expected a water stop shallower than max_depth "
                        f"({self.max_depth:g} {unit})",
                    )
                )
            prev = last.get(s.place)
            if prev is not None and s.depth > prev:
                problems.append(
                    (
                        f"stops[{i}].depth",
                        f"got {s.depth:g} after a {s.place} stop at {prev:g} {unit}; expected "
                        "stops deepest first",
                    )
                )
            last[s.place] = s.depth
        if self.descent_rate is not None and self.max_depth > 0:
            msg = _descent_problem(self, self.descent_rate, unit)
            if msg:
                problems.append(("bottom_time_min", msg))
        total = sum(s.minutes for s in self.stops)
        if total > MAX_TOTAL_STOP_MIN:
            problems.append(
                ("stops", f"got {total:g} min of stops in all; expected at most "
                 f"{MAX_TOTAL_STOP_MIN:g} min for one dive (longer than any Navy treatment table)")
            )
        if self.previous_dive is not None and self.surface_interval_min is None:
            problems.append(
                (
                    "surface_interval_min",
                    "missing; a dive with previous_dive needs its surface interval [min]",
                )
            )
        if problems:
            raise Problems(problems)
        return self

    @property
    def gas_mix(self) -> Gas:
        """The bottom gas as a :class:`~supervisor.gas.Gas`."""
        return parse_gas(self.gas)

    def stop_gas(self, stop: Stop) -> Gas:
        """Return the gas breathed at ``stop`` (the dive's gas when the stop names none)."""
        return parse_gas(stop.gas) if stop.gas else self.gas_mix

    @property
    def water_stops(self) -> list[Stop]:
        """Planned in-water stops, deepest first."""
        return [s for s in self.stops if s.place == "water"]

    @property
    def chamber_stops(self) -> list[Stop]:
        """Planned chamber stops (surface decompression), deepest first."""
        return [s for s in self.stops if s.place == "chamber"]

    @property
    def in_water_stop_min(self) -> float:
        """Total planned in-water stop time [min]."""
        return float(sum(s.minutes for s in self.water_stops))

    @property
    def declared_outside_ndl(self) -> bool:
        """Whether the plan itself declares decompression (stated mode or chamber stops).

        A dive declared ``decompression = "none"`` counts as within the no-decompression
        limit here; the table-conformance and model rules check that claim.
        """
        return self.decompression != "none" or bool(self.chamber_stops)

    @property
    def mixed_gas(self) -> bool:
        """Whether the dive breathes a bottom gas other than air."""
        return self.gas_mix.name != "air"


class AltitudeTravel(_Section):
    """A planned ascent to altitude after the dives: a flight or a drive over high ground."""

    diver: str = Field(
        min_length=1, max_length=text_cap("name"), description="Who travels (a team member)"
    )
    altitude: TravelAltitude = Field(
        description="Highest altitude of the travel (a commercial cabin: 8,000 ft): in ft in an "
        "fsw plan, in m in an msw plan"
    )
    departure: DateTime = Field(
        description="Earliest planned departure, an ISO date-time such as 2026-05-15T09:00 "
        "(the same kind as dives[].start: local, or with a UTC offset)"
    )


class Plan(_Section):
    """A whole plan file (``schema = "supervisor-plan/1"``)."""

    model_config = ConfigDict(
        extra="forbid",
        strict=True,
        allow_inf_nan=False,
        title="supervisor-plan/1",
        json_schema_extra={
            "$schema": "https://json-schema.org/draft/2020-12/schema",
            "description": "A proposed diving job checked by the supervisor command. "
            "Depths are in the plan's unit (fsw or msw).",
        },
    )

    schema_: Literal["supervisor-plan/1"] = Field(
        alias="schema", description='Plan format: "supervisor-plan/1"'
    )
    unit: PlanUnit = Field(description="Depth unit of the whole plan: fsw or msw")
    job: Job = Field(description="The job")
    site: Site = Field(description="Site conditions")
    chamber: Chamber = Field(description="Recompression chamber")
    team: list[Member] = Field(min_length=1, max_length=MAX_TEAM, description="Team members")
    gas_supply: GasSupply = Field(description="Gas supply")
    policy: Policy = Field(default_factory=Policy, description="The contractor's policy limits")
    dives: list[Dive] = Field(
        min_length=1, max_length=MAX_DIVES, description="Proposed dives in order"
    )
    altitude_travel: list[AltitudeTravel] = Field(
        default_factory=list, max_length=MAX_TRAVELS,
        description="Planned travel to altitude after the dives (flights, drives over high "
        "ground), per diver",
    )

    @model_validator(mode="after")
    def _references(self) -> Plan:
        problems: list[tuple[str, str]] = []
        names = [m.name for m in self.team]
        known = set(names)
        for i, name in enumerate(names):
            if name in names[:i]:
                problems.append(
                    (f"team[{i}].name", f"got {excerpt(name)} twice; expected unique names")
                )
        ids: list[str] = []
        for i, d in enumerate(self.dives):
            if d.id in ids:
                problems.append(
                    (f"dives[{i}].id", f"got {excerpt(d.id)} twice; expected unique ids")
                )
            for fld in ("diver", "buddy", "standby_diver", "tender", "entry_diver"):
                who = getattr(d, fld)
                if who is not None and who not in known:
                    problems.append(
                        (f"dives[{i}].{fld}",
                         f"got {excerpt(who)}; expected the name of a team member")
                    )
            if d.standby_diver is not None and d.standby_diver == d.diver:
                problems.append(
                    (
                        f"dives[{i}].standby_diver",
                        f"got {excerpt(d.diver)}, the diver of this dive; expected another "
                        "team member",
                    )
                )
            if d.descent_rate is None:  # with its own rate the dive checked itself
                msg = _descent_problem(d, self.descent_rate(d), self.unit)
                if msg:
                    problems.append((f"dives[{i}].bottom_time_min", msg))
            if d.previous_dive is not None and d.previous_dive not in ids:
                problems.append(
                    (
                        f"dives[{i}].previous_dive",
                        f"got {excerpt(d.previous_dive)}; expected the id of an earlier dive",
                    )
                )
            ids.append(d.id)
        problems += _time_problems(self, known)
        for i, b in enumerate(self.gas_supply.bailout):
            if b.diver not in known:
                problems.append(
                    (
                        f"gas_supply.bailout[{i}].diver",
                        f"got {excerpt(b.diver)}; expected the name of a team member",
                    )
                )
        if not problems:
            problems += _timeline_problems(self)
        if problems:
            raise Problems(problems)
        return self

    _base_dir: Path | None = PrivateAttr(default=None)

    @property
    def base_dir(self) -> Path | None:
        """Folder of the plan file (relative paths in the plan resolve there); None: cwd."""
        return self._base_dir

    def reference_table_source(self) -> str | Path | None:
        """``policy.reference_table`` as a bundled name or the file it names.

        A relative path is taken from the plan file's folder, so a plan gives the
        same answer from any working directory.
        """
        text = self.policy.reference_table
        if text is None:
            return None
        text = text.strip()
        if not looks_like_path(text) and text in bundled_reference_tables():
            return text
        return resolve_table_path(text, self._base_dir)

    # -- convenience -------------------------------------------------------

    @property
    def schema_id(self) -> str:
        """The plan format identifier."""
        return self.schema_

    @property
    def resolved_policy(self) -> Policy:
        """The policy with unit defaults filled in."""
        return self.policy.resolved(self.unit)

    @property
    def p_surface_bar(self) -> float:
        """Surface pressure at the site altitude [bar] (ICAO standard atmosphere)."""
        return float(altitude_pressure(self.site.altitude_m))

    def member(self, name: str | None) -> Member | None:
        """Return the team member called ``name`` (``None`` if absent)."""
        for m in self.team:
            if m.name == name:
                return m
        return None

    def members_with(self, role: str) -> list[Member]:
        """Return the team members holding ``role``."""
        return [m for m in self.team if m.has(role)]

    def dive(self, dive_id: str) -> Dive:
        """Return the dive with id ``dive_id``."""
        for d in self.dives:
            if d.id == dive_id:
                return d
        raise InputError(
            "dive", f"got {excerpt(dive_id)}; expected one of {[d.id for d in self.dives]}"
        )

    def descent_rate(self, dive: Dive) -> float:
        """Descent rate of ``dive`` [unit/min]: its own or the policy's fastest."""
        return float(dive.descent_rate or self.resolved_policy.descent_rate_max)

    def ascent_rate(self, dive: Dive) -> float:
        """Ascent rate of ``dive`` [unit/min]: its own or the policy's planned rate."""
        return float(dive.ascent_rate or self.resolved_policy.ascent_rate)

    @property
    def chamber_compression_rate(self) -> float:
        """Chamber compression rate of surface decompression [plan unit/min].

        :data:`CHAMBER_COMPRESSION_FSW_PER_MIN` in the plan unit (the plan has no
        field for it).
        """
        return self.from_fsw(CHAMBER_COMPRESSION_FSW_PER_MIN)

    def surface_decompression_times(self, dive: Dive) -> tuple[float, float, float, bool]:
        """Surface interval of a dive's surface decompression, in its three parts [min].

        Returns ``(ascent, deck, compression, stated)``: the ascent from the last
        water stop (the bottom if there is none) at the dive's ascent rate, the time
        on deck (``surface_transfer_min``; when not stated, the rest of a
        :data:`SURD_INTERVAL_MIN` interval, never below 0, and ``stated`` is false),
        and the compression to the first chamber stop at
        :attr:`chamber_compression_rate`.  All zero for a dive without chamber stops.
        """
        chamber = dive.chamber_stops
        if not chamber:
            return 0.0, 0.0, 0.0, dive.surface_transfer_min is not None
        ws = dive.water_stops
        up = (ws[-1].depth if ws else dive.max_depth) / self.ascent_rate(dive)
        down = chamber[0].depth / self.chamber_compression_rate
        if dive.surface_transfer_min is not None:
            return up, float(dive.surface_transfer_min), down, True
        return up, max(SURD_INTERVAL_MIN - up - down, 0.0), down, False

    @property
    def altitude_unit(self) -> str:
        """Unit of ``altitude_travel[].altitude``: ft in an fsw plan, m in an msw plan."""
        return altitude_unit(self.unit)

    def altitude_to_m(self, altitude: float) -> float:
        """A travel altitude in the plan's altitude unit converted to metres [m]."""
        return float(altitude) * (C.M_PER_FT if self.altitude_unit == "ft" else 1.0)

    def to_fsw(self, depth: float) -> float:
        """Convert a plan depth to fsw [fsw] (both are pressure units)."""
        return depth if self.unit == "fsw" else float(convert_pressure(depth, "msw", "fsw"))

    def from_fsw(self, depth_fsw: float) -> float:
        """Convert a depth in fsw to the plan unit [plan unit]."""
        return depth_fsw if self.unit == "fsw" else float(convert_pressure(depth_fsw, "fsw", "msw"))


def _time_problems(plan: Plan, known: set[str]) -> list[tuple[str, str]]:
    """Travellers are team members; the plan's date-times are all local or all with offsets;
    a diver's stated dive starts follow the plan's order."""
    problems: list[tuple[str, str]] = []
    stamps = [(f"dives[{i}].start", d.start) for i, d in enumerate(plan.dives)
              if d.start is not None]
    for i, t in enumerate(plan.altitude_travel):
        if t.diver not in known:
            problems.append((f"altitude_travel[{i}].diver",
                             f"got {excerpt(t.diver)}; expected the name of a team member"))
        stamps.append((f"altitude_travel[{i}].departure", t.departure))
    if stamps:
        first_aware = stamps[0][1].utcoffset() is not None
        for where, t in stamps[1:]:
            if (t.utcoffset() is not None) != first_aware:
                kind = "with" if first_aware else "without"
                problems.append((where, f"got {t.isoformat()}; expected a date-time {kind} a "
                                 f"UTC offset, like {stamps[0][0]}"))
                return problems
    last: dict[str, tuple[int, _dt.datetime]] = {}
    for i, d in enumerate(plan.dives):
        if d.start is None:
            continue
        prev = last.get(d.diver)
        if prev is not None and d.start <= prev[1]:
            problems.append((f"dives[{i}].start",
                             f"got {d.start.isoformat()}; expected a time after the start of "
                             f"{excerpt(d.diver)}'s earlier dive dives[{prev[0]}] "
                             f"({prev[1].isoformat()})"))
        last[d.diver] = (i, d.start)
    return problems


def _timeline_problems(plan: Plan) -> list[tuple[str, str]]:
    """Refuse a plan whose dives of one diver span more than :data:`MAX_TIMELINE_MIN`.

    Start times follow :func:`supervisor.analysis.analyse_plan`: a diver's dive
    starts after the diver's previous dive and its surface interval (from the end
    of ``previous_dive`` when that is another diver's dive).
    """
    end: dict[str, float] = {}
    last_end: dict[str, float] = {}
    first_start: dict[str, float] = {}
    for i, d in enumerate(plan.dives):
        si = d.surface_interval_min or 0.0
        start = 0.0
        if d.diver in last_end:
            start = last_end[d.diver] + si
            if d.previous_dive is not None and d.previous_dive in end:
                start = max(last_end[d.diver], end[d.previous_dive] + si)
        try:
            dur = proposed_profile(plan, d).duration_min
        except InputError:
            dur = d.bottom_time_min
        end[d.id] = start + dur
        last_end[d.diver] = start + dur
        first_start.setdefault(d.diver, start)
        span = start + dur - first_start[d.diver]
        if span > MAX_TIMELINE_MIN:
            days = MAX_TIMELINE_MIN / 1440
            return [(f"dives[{i}]", f"{excerpt(d.diver)}'s dives up to {excerpt(d.id)} span "
                     f"{span / 1440:.1f} days; expected at most {days:g} days of one diver's "
                     "diving in a plan (split the job into plans)")]
    return []


# ---------------------------------------------------------------------------
# loading and errors


def plan_from_dict(data: Any, base_dir: str | Path | None = None) -> Plan:
    """Validate a plan given as a dictionary (a parsed TOML document).

    Parameters
    ----------
    data : dict
        The plan document.
    base_dir : str or Path, optional
        Folder of the plan file: relative paths in the plan (``policy.reference_table``)
        are read from there.  None: the current folder.

    Returns
    -------
    Plan

    Raises
    ------
    PlanValidationError
        Listing every problem found, with its field path.
    """
    if not isinstance(data, dict):
        raise PlanValidationError([("plan", f"got {show(data)}; expected a TOML document")])
    if nesting_depth(data) > MAX_NESTING:
        raise PlanValidationError([("plan", f"tables and lists nested more than {MAX_NESTING} "
                                    f"levels deep; expected at most {MAX_NESTING} levels")])
    schema = data.get("schema")
    if schema is None:
        raise PlanValidationError(
            [("schema", f'missing; expected "{SCHEMA_ID}" on the first line')]
        )
    if schema != SCHEMA_ID:
        raise PlanValidationError([("schema", f'got {show(schema)}; expected "{SCHEMA_ID}"')])
    raw_unit = data.get("unit")
    unit = raw_unit if raw_unit in ("fsw", "msw") else "plan unit"
    base = Path(base_dir) if base_dir is not None else None
    try:
        plan = Plan.model_validate(data, context={"unit": unit, "base_dir": base})
    except ValidationError as exc:
        raise PlanValidationError(problems_from(exc, Plan, unit)) from None
    plan._base_dir = base
    return plan


def _shown_path(p: Path) -> str:
    text = str(p)
    return excerpt(text) if len(text) > 200 else text


def read_plan_bytes(path: str | Path) -> bytes:
    """Read a plan file's bytes, turning OS errors into a :class:`PlanValidationError`."""
    p = Path(path)
    try:
        return p.read_bytes()
    except IsADirectoryError:
        raise PlanValidationError(
            [("plan", f"{_shown_path(p)}: is a folder; expected a TOML file")]) from None
    except FileNotFoundError:
        raise PlanValidationError([("plan", f"{_shown_path(p)}: no such file")]) from None
    except OSError as exc:
        why = exc.strerror or str(exc)
        raise PlanValidationError(
            [("plan", f"{_shown_path(p)}: cannot be read ({why})")]) from None


def parse_plan_bytes(raw: bytes, name: str = "plan", base_dir: str | Path | None = None) -> Plan:
    """Parse and validate plan file bytes (UTF-8 TOML); ``base_dir`` as in plan_from_dict."""
    shown = excerpt(name) if len(name) > 200 else name
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise PlanValidationError(
            [("plan", f"{shown}: not UTF-8 text (byte {exc.start}); expected a TOML file")]
        ) from None
    try:
        data = parse_toml(text)
    except TomlError as exc:
        raise PlanValidationError([("plan", f"{shown}: {exc.reason}")]) from None
    return plan_from_dict(data, base_dir)


def load_plan(path: str | Path) -> Plan:
    """Read and validate a plan file.

    Parameters
    ----------
    path : str or Path
        The TOML plan file; relative paths inside it are read from its folder.

    Returns
    -------
    Plan

    Raises
    ------
    PlanValidationError
        If the file cannot be read, is not TOML or does not validate; every
        problem is listed with its field path.
    """
    return parse_plan_bytes(read_plan_bytes(path), str(path), Path(path).absolute().parent)


def plan_sha256(raw: bytes) -> str:
    """Return the SHA-256 hex digest of plan file bytes."""
    return hashlib.sha256(raw).hexdigest()


def plan_json_schema() -> dict[str, Any]:
    """Return the JSON Schema of the plan file (draft 2020-12).

    Every range the validator enforces is in it: field bounds and text lengths in
    the fields themselves, and the depth and rate ranges of each unit in an
    ``allOf`` of ``if unit = fsw/msw then ...`` fragments at the top level.
    """
    schema = Plan.model_json_schema(by_alias=True, mode="validation")
    schema["$id"] = "urn:supervisor:schema:supervisor-plan/1"
    schema["allOf"] = [
        {"if": {"properties": {"unit": {"const": u}}, "required": ["unit"]},
         "then": unit_overlay(Plan, u)}
        for u in ("fsw", "msw")
    ]
    return schema


def plan_to_json(plan: Plan) -> str:
    """Return the plan as canonical JSON text (sorted keys), e.g. for hashing."""
    return json.dumps(plan.model_dump(mode="json", by_alias=True), sort_keys=True)


# ---------------------------------------------------------------------------
# profile of a proposed dive


def proposed_profile(plan: Plan, dive: Dive, notes: list[str] | None = None) -> Profile:
    """Build the time-ordered profile of a dive as proposed.

    Descent at the dive's descent rate and bottom time counted from leaving the
    surface; travel to each water stop at the ascent rate on the gas breathed
    before it, the stop on its own gas (the switch is on arrival); then either the
    ascent to the surface or, with chamber stops, surface decompression: the ascent
    from the last water stop, the time on deck and the compression to the first
    chamber stop (:meth:`Plan.surface_decompression_times`; these three are labelled
    ``surface interval`` so the decompression engine reports the deliberate
    supersaturation apart), the chamber stops and the chamber ascent to the surface
    on air.  Travel is added to the stop times, never taken out of them.  This is
    the profile every check evaluates (:mod:`supervisor.analysis`).

    Parameters
    ----------
    plan : Plan
        The plan (unit, altitude, water, policy).
    dive : Dive
        One of its dives.
    notes : list of str, optional
        Receives the assumptions made (e.g. a time on deck that is not stated).

    Returns
    -------
    Profile
        Depths in the plan unit.

    Raises
    ------
    InputError
        If the bottom time is shorter than the descent (a validated plan never is;
        a variant built for a search may be).
    """
    from supervisor.engine.evaluate import SURFACE_INTERVAL

    notes = notes if notes is not None else []
    descent = plan.descent_rate(dive)
    ascent = plan.ascent_rate(dive)
    t_desc = dive.max_depth / descent
    if dive.bottom_time_min + 1e-9 < t_desc:
        raise InputError(
            f"dives[{dive.id}].bottom_time_min",
            f"{dive.bottom_time_min:g} min is shorter than the descent ({t_desc:.2f} min at "
            f"{descent:g} {plan.unit}/min); bottom time counts from leaving the surface",
        )
    prof = Profile(unit=plan.unit, p_surface_bar=plan.p_surface_bar, water=plan.site.water)
    gas = dive.gas_mix

    def add(end: float, minutes: float, g: Gas, place: str, label: str) -> None:
        if minutes > 1e-12:
            prof.add(end, minutes, g, place, label)  # type: ignore[arg-type]

    add(dive.max_depth, t_desc, gas, "water", "descent")
    add(dive.max_depth, dive.bottom_time_min - t_desc, gas, "water", "bottom")
    depth, cur = dive.max_depth, gas
    for s in dive.water_stops:
        add(s.depth, (depth - s.depth) / ascent, cur, "water", "travel")
        cur = dive.stop_gas(s)
        add(s.depth, s.minutes, cur, "water", "stop")
        depth = s.depth
    chamber = dive.chamber_stops
    if not chamber:
        add(0.0, depth / ascent, cur, "water", "ascent")
        return prof
    up, deck, down, stated = plan.surface_decompression_times(dive)
    if not stated:
        notes.append(
            f"time on deck not stated: {deck:.2f} min assumed, the rest of a "
            f"{SURD_INTERVAL_MIN:g}-min surface interval (U.S. Navy Diving Manual Rev 7 ch. 9, "
            "SECONDARY)"
        )
    air = parse_gas("air")
    add(0.0, up, cur, "water", SURFACE_INTERVAL + ": ascent")
    add(0.0, deck, air, "surface", SURFACE_INTERVAL)
    add(chamber[0].depth, down, air, "chamber", SURFACE_INTERVAL + ": compression")
    depth = chamber[0].depth
    for s in chamber:
        if abs(s.depth - depth) > 1e-9:
            add(s.depth, abs(depth - s.depth) / ascent, dive.stop_gas(s), "chamber", "travel")
        add(s.depth, s.minutes, dive.stop_gas(s), "chamber", "stop")
        depth = s.depth
    add(0.0, depth / ascent, air, "chamber", "decompression to surface")
    return prof
