"""Pydantic models of the reference-table files in ``tables/``.

One file is one table of one kind.  Every kind shares the header (``schema``,
``name``, ``kind``, ``title``, ``[provenance]``) and the per-row verification
columns; the conventions and data columns depend on the kind:

==================== ===========================================================
kind                 one row is
==================== ===========================================================
no-stop              one depth: its no-stop limit and repetitive-group times
decompression        one depth and bottom time: a schedule per decompression mode
treatment            one step of a treatment table (depth, minutes, gas, rate)
limits               one line of a limit table (e.g. a PO2 and its CNS limit)
model-coefficients   one compartment of a decompression model
==================== ===========================================================

The format is described for authors in ``tables/README.md``.  Depths are in the
file's ``conventions.depth_unit``; times are minutes.
"""

from __future__ import annotations

import datetime as _dt
import re
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Field,
    field_validator,
    model_validator,
)

from supervisor.errors import InputError
from supervisor.gas import parse_gas
from supervisor.references.canonical import VERIFICATION_COLUMNS  # noqa: F401 (re-exported)
from supervisor.text import excerpt

SCHEMA_ID = "supervisor-table/1"

Kind = Literal["no-stop", "decompression", "treatment", "limits", "model-coefficients"]
KINDS: tuple[str, ...] = ("no-stop", "decompression", "treatment", "limits", "model-coefficients")

SourceStatus = Literal[
    "VERIFIED", "SECONDARY", "OLDER-EDITION", "DERIVED", "FROM MEMORY", "COMPUTED"
]
SOURCE_STATUSES: tuple[str, ...] = (
    "VERIFIED", "SECONDARY", "OLDER-EDITION", "DERIVED", "FROM MEMORY", "COMPUTED"
)

Verification = Literal["verified", "unverified"]

#: Decompression modes a decompression row may carry, as TOML keys of the row.
MODES: tuple[str, ...] = ("air", "air_o2", "surd_o2")
Mode = Literal["air", "air_o2", "surd_o2"]
MODE_TITLES: dict[str, str] = {
    "air": "in-water air",
    "air_o2": "in-water air/oxygen",
    "surd_o2": "surface decompression on oxygen",
}

NAME_RE = re.compile(r"^[a-z0-9][a-z0-9._-]*$")
_DATE_RE = re.compile(r"^\d{4}-\d{2}-\d{2}$")

#: Every table model: unknown keys refused, and types strict: a boolean or a quoted
#: number ("70") is not a number, a number is not text (no silent conversion).
_STRICT = ConfigDict(extra="forbid", str_strip_whitespace=True, strict=True)


def is_iso_date(text: str) -> bool:
    """Return True if ``text`` is a real calendar date written YYYY-MM-DD."""
    if not isinstance(text, str) or not _DATE_RE.match(text):
        return False
    try:
        _dt.date.fromisoformat(text)
    except ValueError:
        return False
    return True


def _date_text(value: Any) -> Any:
    # tomllib returns unquoted TOML dates as datetime.date; accept both forms.
    if isinstance(value, _dt.date) and not isinstance(value, _dt.datetime):
        return value.isoformat()
    return value


def _minutes_or_unlimited(value: Any) -> Any:
    if isinstance(value, str):
        if value.strip().lower() == "unlimited":
            return "unlimited"
        raise ValueError(f"got {excerpt(value)}; expected minutes (a number >= 0) or "
                         "\"unlimited\"")
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ValueError(f"got {shown_value(value)}; expected minutes (a number >= 0) or "
                         "\"unlimited\"")
    if not value >= 0 or value != value or value == float("inf"):
        raise ValueError(f"got {value!r}; expected minutes (a number >= 0) or \"unlimited\"")
    return value


DateText = Annotated[str, BeforeValidator(_date_text)]
MinutesOrUnlimited = Annotated[float | Literal["unlimited"], BeforeValidator(_minutes_or_unlimited)]
NonNegative = Annotated[float, Field(ge=0, allow_inf_nan=False)]
Positive = Annotated[float, Field(gt=0, allow_inf_nan=False)]


def shown_value(value: Any) -> str:
    """A rejected cell in a message: a short excerpt, tables and lists by kind."""
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, bool):
        return "true (a boolean)" if value else "false (a boolean)"
    return excerpt(value)


def _gas_name(value: Any) -> Any:
    if not isinstance(value, str):
        raise ValueError(
            f"got {shown_value(value)}; expected a gas such as air, oxygen, 32/0 or 16/84"
        )
    try:
        parse_gas(value)
    except InputError as exc:
        raise ValueError(exc.message) from None
    return value


GasName = Annotated[str, BeforeValidator(_gas_name)]


class Provenance(BaseModel):
    """Where the table comes from; required in every file.

    ``transcribed_on`` may be empty only for a table computed by this project
    (``source_status = "COMPUTED"``), whose build records no date so that it is
    reproducible byte for byte.
    """

    model_config = _STRICT

    source_document: str = Field(min_length=1)
    issuing_body: str = Field(min_length=1)
    edition: str = Field(min_length=1)
    table: str = Field(min_length=1)
    date: DateText = Field(min_length=1)
    licence: str = Field(min_length=1)
    source_status: SourceStatus
    transcribed_by: str = Field(min_length=1)
    transcribed_on: DateText
    notes: str = ""

    @model_validator(mode="after")
    def _check_date(self) -> Provenance:
        if self.transcribed_on == "" and self.source_status == "COMPUTED":
            return self
        if not is_iso_date(self.transcribed_on):
            raise ValueError(
                f"transcribed_on: got {excerpt(self.transcribed_on)}; expected a date YYYY-MM-DD"
            )
        return self


class VerificationLogEntry(BaseModel):
    """One recorded second-person check (appended by ``tables verify``)."""

    model_config = _STRICT

    by: str = Field(min_length=1)
    on: DateText
    method: str = Field(min_length=1)
    rows: str = Field(min_length=1)
    row_count: int = Field(ge=1)


class VerificationSection(BaseModel):
    """File-level verification record: the context hash and the log of checks."""

    model_config = _STRICT

    context_hash: str = ""
    log: list[VerificationLogEntry] = Field(default_factory=list)


class RowBase(BaseModel):
    """Columns every row carries: its source status and its two-person check."""

    model_config = _STRICT

    source_status: SourceStatus | None = None
    verification: Verification = "unverified"
    verified_by: str = ""
    verified_on: DateText = ""
    verification_method: str = ""
    row_hash: str = ""
    note: str = ""


# --------------------------------------------------------------------------- conventions


class ModelSettings(BaseModel):
    """How a table computed by this project was made (``supervisor tables build``)."""

    model_config = _STRICT

    name: Literal["zhl16a", "zhl16b", "zhl16c"]
    gf_low: Annotated[float, Field(gt=0, le=1)]
    gf_high: Annotated[float, Field(gt=0, le=1)]
    descent_rate: Positive
    coefficient_status: SourceStatus
    max_stop_time: Positive
    bottom_times: list[Positive] = Field(default_factory=list)


class TableConventions(BaseModel):
    """Conventions shared by the no-stop and decompression kinds.

    ``repetitive_groups`` lists the group letters in order of increasing
    nitrogen load; empty when the groups are not known.  ``model`` is set only
    in tables computed by this project and says how they were computed.
    """

    model_config = _STRICT

    depth_unit: Literal["fsw", "msw"]
    bottom_time_definition: str = Field(min_length=1)
    depth_rounding: Literal["next-deeper"]
    time_rounding: Literal["next-longer"]
    ascent_rate: Positive
    stop_depth_reference: str = Field(min_length=1)
    gas: GasName
    place: Literal["water", "chamber"]
    repetitive_groups: list[str] = Field(default_factory=list)
    model: ModelSettings | None = None
    notes: str = ""

    @field_validator("repetitive_groups")
    @classmethod
    def _distinct(cls, v: list[str]) -> list[str]:
        if len(set(v)) != len(v):
            raise ValueError("group letters must be distinct")
        if any(not g.strip() for g in v):
            raise ValueError("group letters must not be empty")
        return v


class NoStopConventions(TableConventions):
    """Conventions of a no-stop table (the shared conventions only)."""


class DecompressionConventions(TableConventions):
    """Conventions of a decompression table.

    ``stop_time_includes_travel`` says whether a stop's minutes include the
    travel from the previous stop (so the total ascent is travel to the first
    stop + stop minutes + travel from the last stop).  Oxygen periods and air
    breaks are in minutes; ``air_breaks_in_stop_time`` says whether an air
    break counts as stop time.
    """

    stop_step: Positive
    last_stop: Positive
    stop_time_includes_travel: bool
    o2_period_min: Positive | None = None
    air_break_min: NonNegative | None = None
    air_breaks_in_stop_time: bool = False
    chamber_o2_period_min: Positive | None = None
    chamber_air_break_min: NonNegative | None = None
    surface_interval_min: NonNegative | None = None
    chamber_travel_min: NonNegative | None = None


class ExtensionPeriod(BaseModel):
    """One part of a treatment-table extension: a gas for some minutes at the extension depth."""

    model_config = _STRICT

    gas: GasName
    minutes: Positive


class TreatmentExtension(BaseModel):
    """An extension the table allows, as the plan option that asks for it.

    One extension is ``periods`` at ``depth``, inserted after step ``after_step``
    of the table (after the earlier extensions of the same option); a table
    allows up to ``max_count`` of them.  ``option`` names the planning option:
    ``oxygen`` for ``--extend-oxygen``, ``air`` for ``--extend-air``.
    """

    model_config = _STRICT

    option: Literal["oxygen", "air"]
    depth: NonNegative
    after_step: int = Field(ge=1)
    periods: list[ExtensionPeriod] = Field(min_length=1)
    max_count: int = Field(ge=1, le=20)
    meaning: str = Field(min_length=1)
    source_status: SourceStatus
    citation: str = Field(min_length=1)
    note: str = ""

    @property
    def minutes(self) -> float:
        """Minutes one extension adds [min]."""
        return float(sum(p.minutes for p in self.periods))


class AttendantOxygen(BaseModel):
    """One case of the inside attendant's oxygen rule of a table.

    ``when`` selects the case: ``always``; ``extensions-at-most`` /
    ``extensions-more-than`` the number ``extensions`` of extensions run (the
    base cases; exactly one applies); ``recent-exposure`` adds to the base case
    when the attendant dived or had another hyperbaric exposure recently.  The
    attendant breathes oxygen for the last ``oxygen_min`` oxygen minutes of the
    patient at ``depth`` before the chamber leaves it, and, with
    ``with_ascent``, for the ascent from there to the surface.  A case with no
    oxygen (``oxygen_min = 0`` and no ascent) means chamber air only.
    """

    model_config = _STRICT

    case: str = Field(min_length=1)
    when: Literal["always", "extensions-at-most", "extensions-more-than", "recent-exposure"]
    extensions: int | None = Field(None, ge=0)
    depth: NonNegative | None = None
    oxygen_min: NonNegative = 0.0
    with_ascent: bool = False
    source_status: SourceStatus
    citation: str = Field(min_length=1)
    note: str = ""

    @model_validator(mode="after")
    def _consistent(self) -> AttendantOxygen:
        if self.when in ("extensions-at-most", "extensions-more-than") and self.extensions is None:
            raise ValueError(f"when = {self.when!r} needs extensions (a count)")
        if self.when in ("always", "recent-exposure") and self.extensions is not None:
            raise ValueError(f"when = {self.when!r} takes no extensions count")
        if (self.oxygen_min > 0 or self.with_ascent) and self.depth is None:
            raise ValueError("an oxygen case needs depth (where the attendant breathes oxygen)")
        return self

    def applies(self, n_extensions: int) -> bool:
        """Whether this base case applies to a treatment with ``n_extensions`` extensions."""
        if self.when == "always":
            return True
        if self.when == "extensions-at-most":
            return n_extensions <= (self.extensions or 0)
        if self.when == "extensions-more-than":
            return n_extensions > (self.extensions or 0)
        return False


class TreatmentConventions(BaseModel):
    """Conventions of a treatment table (a chamber or in-water step list).

    Beyond the four original keys every field is optional, so a contractor's
    imported table stays valid; a table is planned by ``supervisor treatment
    plan`` only when it gives ``table_number`` and is ``plannable``.

    ``compression_rate`` [unit/min] is the compression from the surface to the
    first step; with ``compression_in_first_step`` the first step's minutes
    include it (the table's clock starts on leaving the surface), otherwise the
    clock starts on arrival and the compression is outside the table's time.
    ``stated_total_min`` is the table's total as the source states it (table
    time, compression outside it unless included), with its status;
    ``stated_total_extended_min`` the total with every allowed extension.
    ``missing`` says what the bundled source lacks (required when the table is
    not plannable: a table that cannot be planned is refused, never invented).
    """

    model_config = _STRICT

    depth_unit: Literal["fsw", "msw"]
    place: Literal["water", "chamber"]
    time_definition: str = Field(min_length=1)
    travel_in_step_time: bool
    notes: str = ""
    table_number: str = ""
    indication: str = ""
    citation: str = ""
    compression_rate: Positive | None = None
    compression_status: SourceStatus | None = None
    compression_in_first_step: bool = False
    stated_total_min: NonNegative | None = None
    stated_total_status: SourceStatus | None = None
    stated_total_extended_min: NonNegative | None = None
    stated_total_extended_status: SourceStatus | None = None
    plannable: bool = True
    missing: list[str] = Field(default_factory=list)
    extensions: list[TreatmentExtension] = Field(default_factory=list)
    attendant_oxygen: list[AttendantOxygen] = Field(default_factory=list)

    @model_validator(mode="after")
    def _planning(self) -> TreatmentConventions:
        if not self.plannable and not any(m.strip() for m in self.missing):
            raise ValueError("plannable = false needs missing: say what the source lacks")
        if self.stated_total_min is not None and self.stated_total_status is None:
            raise ValueError("stated_total_min needs stated_total_status")
        if self.stated_total_extended_min is not None and \
                self.stated_total_extended_status is None:
            raise ValueError("stated_total_extended_min needs stated_total_extended_status")
        if self.compression_rate is not None and self.compression_status is None:
            raise ValueError("compression_rate needs compression_status")
        options = [e.option for e in self.extensions]
        if len(set(options)) != len(options):
            raise ValueError("extensions: one entry per option (oxygen, air)")
        return self


# --------------------------------------------------------------------------- rows


class NoStopRow(RowBase):
    """One depth of a no-stop table.

    ``repetitive_groups`` maps a group letter to the longest bottom time [min]
    that gives it; empty when the groups are not known.
    """

    depth: Positive
    no_stop_limit: MinutesOrUnlimited
    repetitive_groups: dict[str, Positive] = Field(default_factory=dict)

    @property
    def unlimited(self) -> bool:
        """True when the depth has no no-stop limit."""
        return self.no_stop_limit == "unlimited"

    @property
    def limit_min(self) -> float:
        """No-stop limit [min]; ``inf`` when unlimited."""
        return float("inf") if self.unlimited else float(self.no_stop_limit)


class Stop(BaseModel):
    """One decompression stop: depth [unit], minutes, gas and place."""

    model_config = _STRICT

    depth: Positive
    #: a stop lasts at least some time; a stop that needs none is left out of the row
    minutes: Positive
    gas: GasName = "air"
    place: Literal["water", "chamber"] = "water"


class Schedule(BaseModel):
    """The schedule of one decompression mode in a row.

    ``chamber_o2_periods`` counts chamber oxygen periods (half-periods allowed)
    for surface decompression.  ``total_ascent`` [min] is the time from leaving
    the bottom to surfacing as printed.  ``permitted = false`` marks a schedule
    the source says not to use in this mode.
    """

    model_config = _STRICT

    stops: list[Stop] = Field(default_factory=list)
    chamber_o2_periods: NonNegative | None = None
    total_ascent: NonNegative | None = None
    permitted: bool = True

    @field_validator("chamber_o2_periods")
    @classmethod
    def _half_periods(cls, v: float | None) -> float | None:
        if v is not None and abs(v * 2 - round(v * 2)) > 1e-9:
            raise ValueError(f"got {v:g}; expected whole or half periods (0.5, 1, 1.5, ...)")
        return v

    @property
    def stop_minutes(self) -> float:
        """Sum of the stop times [min]."""
        return float(sum(s.minutes for s in self.stops))


class DecompressionRow(RowBase):
    """One depth and bottom time of a decompression table, one schedule per mode."""

    depth: Positive
    bottom_time: Positive
    time_to_first_stop: NonNegative | None = None
    repetitive_group: str = ""
    exceptional_exposure: bool = False
    air: Schedule | None = None
    air_o2: Schedule | None = None
    surd_o2: Schedule | None = None

    @model_validator(mode="after")
    def _some_mode(self) -> DecompressionRow:
        if all(getattr(self, m) is None for m in MODES):
            raise ValueError(f"a row needs at least one schedule: {', '.join(MODES)}")
        return self

    def schedules(self) -> dict[str, Schedule]:
        """Return the schedules present, keyed by mode."""
        return {m: getattr(self, m) for m in MODES if getattr(self, m) is not None}


class TreatmentStep(RowBase):
    """One step of a treatment table.

    A hold has ``from_depth == to_depth``; a travel step gives ``travel_rate``
    [unit/min].  ``elapsed_min`` is the printed running time at the end of the
    step, when the source prints one.
    """

    step: int = Field(ge=1)
    from_depth: NonNegative
    to_depth: NonNegative
    minutes: NonNegative
    gas: GasName
    travel_rate: Positive | None = None
    elapsed_min: NonNegative | None = None

    @model_validator(mode="after")
    def _rate_for_travel(self) -> TreatmentStep:
        if self.from_depth != self.to_depth and self.travel_rate is None:
            raise ValueError("a travel step (from_depth != to_depth) needs travel_rate")
        return self


_Scalar = str | bool | int | float


class GenericRow(RowBase):
    """A row of a limits or model-coefficients table: free data columns.

    Data columns hold numbers, strings, booleans, lists of those, or one level
    of sub-table (e.g. ``value_status``).  Numbers must be finite.
    """

    model_config = ConfigDict(extra="allow", str_strip_whitespace=True, strict=True)

    @model_validator(mode="after")
    def _scalars(self) -> GenericRow:
        for key, value in (self.model_extra or {}).items():
            _check_generic(key, value, nested=True)
        return self

    def data(self) -> dict[str, Any]:
        """Return the data columns (everything but the common row columns)."""
        return dict(self.model_extra or {})


def _check_generic(key: str, value: Any, nested: bool) -> None:
    if isinstance(value, float) and (value != value or value in (float("inf"), float("-inf"))):
        raise ValueError(f"{key}: got {value!r}; expected a finite number")
    if isinstance(value, (str, bool, int, float)):
        return
    if isinstance(value, _dt.date):
        return
    if isinstance(value, list):
        for v in value:
            if not isinstance(v, (str, bool, int, float)):
                raise ValueError(f"{key}: lists may hold only numbers, strings or booleans")
            _check_generic(key, v, nested=False)
        return
    if isinstance(value, dict) and nested:
        for k, v in value.items():
            _check_generic(f"{key}.{k}", v, nested=False)
        return
    raise ValueError(f"{key}: got {type(value).__name__}; expected a number, string or boolean")


# --------------------------------------------------------------------------- tables


class TableBase(BaseModel):
    """The common header of every table file."""

    model_config = _STRICT

    schema_: Literal["supervisor-table/1"] = Field(alias="schema")
    name: str
    kind: Kind
    title: str = Field(min_length=1)
    provenance: Provenance
    verification: VerificationSection = Field(default_factory=VerificationSection)

    @field_validator("name")
    @classmethod
    def _name(cls, v: str) -> str:
        if not NAME_RE.match(v):
            raise ValueError(
                f"got {excerpt(v)}; expected lower-case letters, digits, '.', '_' or '-' "
                "(the file stem)"
            )
        return v


class NoStopTable(TableBase):
    """A no-stop limits table with repetitive groups."""

    kind: Literal["no-stop"]
    conventions: NoStopConventions
    rows: list[NoStopRow] = Field(min_length=1)


class DecompressionTable(TableBase):
    """A decompression table: schedules by depth and bottom time."""

    kind: Literal["decompression"]
    conventions: DecompressionConventions
    rows: list[DecompressionRow] = Field(min_length=1)


class TreatmentTable(TableBase):
    """A treatment table: one row per step."""

    kind: Literal["treatment"]
    conventions: TreatmentConventions
    rows: list[TreatmentStep] = Field(min_length=1)


class LimitsTable(TableBase):
    """A limit table (e.g. CNS limits by PO2, daily pulmonary dose)."""

    kind: Literal["limits"]
    conventions: dict[str, _Scalar | list[_Scalar]]
    rows: list[GenericRow] = Field(min_length=1)


class ModelCoefficientsTable(TableBase):
    """Coefficients of a decompression model, one row per compartment."""

    kind: Literal["model-coefficients"]
    conventions: dict[str, _Scalar | list[_Scalar]]
    rows: list[GenericRow] = Field(min_length=1)


AnyTable = NoStopTable | DecompressionTable | TreatmentTable | LimitsTable | ModelCoefficientsTable

TABLE_MODELS: dict[str, type[TableBase]] = {
    "no-stop": NoStopTable,
    "decompression": DecompressionTable,
    "treatment": TreatmentTable,
    "limits": LimitsTable,
    "model-coefficients": ModelCoefficientsTable,
}
