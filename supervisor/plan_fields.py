"""Field types of the plan file: depths, rates, gases, text caps and the reference table.

Every range the plan validator enforces is stated here once and appears in the JSON
Schema (:func:`unit_overlay` adds the ranges that depend on the plan's unit), so the
schema and the validator agree (``tests/test_plan_fields.py`` compares them).

Accepted ranges (the msw figures are the fsw ones converted, rounded to 0.1):

=====================  ===================  =========================================
quantity               accepted             why
=====================  ===================  =========================================
depth                  0-2000 fsw           a typing-error guard far beyond any
                       (0-614.1 msw)        surface-supplied dive (common practice,
                                            no source)
rate (descent, ascent  1-300 fsw/min        1 fsw/min is the slowest travel of the
and the policy's)      (0.3-92.1 msw/min)   Navy oxygen treatment tables (U.S. Navy
                                            Diving Manual Rev 4/5, Treatment Tables
                                            5 and 6, ascent <= 1 ft/min;
                                            OLDER-EDITION); 300 fsw/min is a typing-
                                            error guard four times the Navy's 75
                                            fsw/min descent (common practice, no
                                            source)
one stop               up to 1440 min       a day; the longest hold of any Navy
                                            treatment table is shorter (Treatment
                                            Table 4, 11 h at 30 fsw; FROM MEMORY)
planned stops of one   up to 2880 min       two days, above the 33.5-35 h of
dive (sum)                                  Treatment Table 4 (FROM MEMORY)
stops of one dive      up to 100            a 10 fsw grid from 1000 fsw (common
                                            practice, no source)
dives in a plan        up to 200            four times a week-long job of 50 dives
                                            (common practice, no source)
team                   up to 60 members     common practice, no source
one diver's timeline   up to 30 days        one job plan; split longer work (common
                                            practice, no source)
altitude of a planned  0-30,000 ft          a typing-error guard above any road or
travel to altitude     (0-9,144 m)          pressurised cabin; fsw plans state it in
                                            ft, msw plans in m (common practice, no
                                            source)
planned travels        up to 200            one per diver and dive (common practice,
                                            no source)
policy wait before     up to 168 h          a week; longer is a typing error (common
altitude                                    practice, no source)
policy current limit   up to 15 kt          the plan's own current range
=====================  ===================  =========================================

Text fields are capped (:data:`TEXT_CAPS`) so that a title fits a page heading and
a name a table cell; a longer value is refused naming the field and the cap.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Annotated, Any

from pydantic import AfterValidator, Field, ValidationInfo, WithJsonSchema

from supervisor import constants as C
from supervisor.gas import parse_gas
from supervisor.plan_ranges import (  # noqa: F401  (re-exported)
    MAX_PLAN_DEPTH_FSW,
    MAX_RATE_FSW_PER_MIN,
    MIN_RATE_FSW_PER_MIN,
    depth_range,
    rate_range,
)
from supervisor.text import excerpt

#: Longest single stop [min] and longest sum of a dive's planned stops [min].
MAX_STOP_MIN = 1440.0
MAX_TOTAL_STOP_MIN = 2880.0
#: Most stops of one dive, dives in a plan, team members, bailouts [count].
MAX_STOPS = 100
MAX_DIVES = 200
MAX_TEAM = 60
#: Longest timeline of one diver's dives in a plan [min] (30 days).
MAX_TIMELINE_MIN = 30 * 24 * 60.0
#: Highest altitude of a planned travel after diving [ft] (module docstring).
MAX_TRAVEL_ALTITUDE_FT = 30000.0
#: Most planned travels to altitude in a plan [count].
MAX_TRAVELS = 200
#: Longest wait before altitude a policy may set [h] (a week).
MAX_ALTITUDE_WAIT_H = 168.0

#: Longest text of each kind of field [characters] (common practice, no source: a
#: job title of a few hundred characters, a person's name, a short identifier).
TEXT_CAPS: dict[str, int] = {
    "title": 300,     # job title, site name, client, contractor
    "name": 100,      # a person, a vessel, a diver
    "id": 40,         # dive id
    "contact": 300,   # an emergency contact line
    "gas": 40,        # a gas such as "air", "nitrox32", "16/84"
    "path": 1024,     # a table name or file path
}


def cap(kind: str) -> int:
    """Longest text of a field of ``kind`` (a key of :data:`TEXT_CAPS`) [characters]."""
    return TEXT_CAPS[kind]


def altitude_unit(unit: str) -> str:
    """Unit of a travel altitude in a plan of depth ``unit``: ft for fsw, m for msw."""
    return "m" if unit == "msw" else "ft"


def altitude_range(unit: str) -> tuple[float, float]:
    """Accepted travel altitudes ``(lowest, highest)`` in the altitude unit of ``unit``."""
    if unit == "msw":
        return 0.0, round(MAX_TRAVEL_ALTITUDE_FT * C.M_PER_FT, 1)
    return 0.0, MAX_TRAVEL_ALTITUDE_FT


def ctx_unit(info: ValidationInfo | None) -> str:
    """The plan's unit from the validation context (``"plan unit"`` when unknown)."""
    ctx = info.context if info is not None else None
    unit = ctx.get("unit") if isinstance(ctx, dict) else None
    return unit if unit in ("fsw", "msw") else "plan unit"


def ctx_base_dir(info: ValidationInfo | None) -> Path | None:
    """The plan file's folder from the validation context (relative paths resolve there)."""
    ctx = info.context if info is not None else None
    base = ctx.get("base_dir") if isinstance(ctx, dict) else None
    return Path(base) if base is not None else None


@dataclass(frozen=True)
class UnitRange:
    """Marks a field whose accepted range depends on the plan's unit (depth or rate)."""

    quantity: str  # "depth", "rate" or "altitude"
    positive: bool = False  # a depth that must be deeper than 0 (the low bound excluded)

    def bounds(self, unit: str) -> tuple[float, float]:
        """``(low, high)`` in ``unit`` (an altitude: in ft for fsw, m for msw)."""
        if self.quantity == "altitude":
            return altitude_range(unit)
        return depth_range(unit) if self.quantity == "depth" else rate_range(unit)


def _check_depth(value: float, info: ValidationInfo) -> float:
    unit = ctx_unit(info)
    lo, hi = depth_range(unit if unit != "plan unit" else "fsw")
    if value < lo:
        raise ValueError(f"got {value:g}; expected a depth >= 0 {unit}")
    if value > hi:
        raise ValueError(f"got {value:g}; expected a depth from 0 to {hi:g} {unit}")
    return value


def _check_rate(value: float, info: ValidationInfo) -> float:
    unit = ctx_unit(info)
    lo, hi = rate_range(unit if unit != "plan unit" else "fsw")
    if not lo <= value <= hi:
        raise ValueError(f"got {value:g}; expected a rate from {lo:g} to {hi:g} {unit}/min")
    return value


def _check_altitude(value: float, info: ValidationInfo) -> float:
    unit = ctx_unit(info)
    lo, hi = altitude_range(unit if unit != "plan unit" else "fsw")
    if not lo <= value <= hi:
        shown = altitude_unit(unit) if unit != "plan unit" else "ft (fsw plan) or m (msw plan)"
        raise ValueError(f"got {value:g}; expected an altitude from {lo:g} to {hi:g} {shown} "
                         f"above sea level")
    return value


def _check_gas(value: str, info: ValidationInfo) -> str:
    parse_gas(value, field=info.field_name or "gas")
    return value.strip()


# The envelope over both units goes into the field's own schema; unit_overlay()
# narrows it per unit.
_D_LO, _D_HI = depth_range("fsw")
_R_LO, _R_HI = rate_range("msw")[0], rate_range("fsw")[1]

# (in the schema only: the validator's own check names the unit in its message)
Depth = Annotated[float, WithJsonSchema({"type": "number", "minimum": _D_LO, "maximum": _D_HI}),
                  UnitRange("depth"), AfterValidator(_check_depth)]
Rate = Annotated[float, WithJsonSchema({"type": "number", "minimum": _R_LO, "maximum": _R_HI}),
                 UnitRange("rate"), AfterValidator(_check_rate)]
#: A depth deeper than 0 (a dive's maximum depth, a stop, a chamber treatment depth);
#: the models' own validators give the message, the schema states the bound.
PositiveDepth = Annotated[float, WithJsonSchema({"type": "number", "exclusiveMinimum": _D_LO,
                                                 "maximum": _D_HI}),
                          UnitRange("depth", positive=True), AfterValidator(_check_depth)]
#: Altitude of a planned travel after diving: ft in an fsw plan, m in an msw plan.
TravelAltitude = Annotated[float, WithJsonSchema({"type": "number", "minimum": 0.0,
                                                  "maximum": MAX_TRAVEL_ALTITUDE_FT}),
                           UnitRange("altitude"), AfterValidator(_check_altitude)]
GasText = Annotated[str, Field(max_length=TEXT_CAPS["gas"]), AfterValidator(_check_gas)]


def depth_field(description: str, default: Any = ..., **kw: Any) -> Any:
    """A depth field: its description ends with the plan unit."""
    return Field(default, description=description + " [plan unit]", **kw)


def bundled_reference_tables() -> dict[str, str]:
    """Bundled table names by kind folder: ``{name: kind}`` (files are not loaded)."""
    from supervisor.resources import tables_dir

    try:
        root = tables_dir()
    except FileNotFoundError:
        return {}
    return {
        f.stem: f.parent.name
        for f in sorted(root.rglob("*.toml"))
        if not f.name.startswith(".") and f.parent != root
    }


#: Kinds of bundled table a plan may name as its ``policy.reference_table``.
REFERENCE_TABLE_KINDS: tuple[str, ...] = ("no-stop", "decompression")


def looks_like_path(text: str) -> bool:
    """Whether a ``reference_table`` value is a file path rather than a bundled name."""
    p = Path(text)
    return p.suffix == ".toml" or len(p.parts) > 1


def resolve_table_path(text: str, base_dir: Path | None) -> Path:
    """The file a relative ``reference_table`` path names: relative to the plan's folder."""
    p = Path(text).expanduser()
    if p.is_absolute() or base_dir is None:
        return p
    return base_dir / p


def check_reference_table(value: str | None, info: ValidationInfo) -> str | None:
    """Accept a bundled no-stop or decompression table name, or an existing table file.

    A relative path is read from the plan file's folder (the validation context's
    ``base_dir``; the current folder for a plan given as data).
    """
    if value is None:
        return None
    text = value.strip()
    tables = bundled_reference_tables()
    usable = sorted(n for n, k in tables.items() if k in REFERENCE_TABLE_KINDS)
    form = (f"expected a bundled table name ({', '.join(usable) or 'none bundled'}) or the "
            "path of a table file (.toml), relative to the plan's folder")
    if not text:
        raise ValueError(f"got empty text; {form}")
    if looks_like_path(text) or text not in tables:
        path = resolve_table_path(text, ctx_base_dir(info))
        try:
            found = path.is_file()
        except OSError as exc:  # e.g. a name longer than the file system allows
            raise ValueError(f"got {excerpt(text)}: cannot be read ({exc.strerror or exc}); "
                             f"{form}") from None
        if found:
            return text
        if looks_like_path(text):
            where = "" if str(path) == text else f" (looked for {excerpt(str(path), 200)})"
            raise ValueError(f"got {excerpt(text, 200)}: no such file{where}; {form}")
        raise ValueError(f"got {excerpt(text)}: no bundled table of that name; {form}")
    kind = tables[text]
    if kind not in REFERENCE_TABLE_KINDS:
        raise ValueError(
            f"got {excerpt(text)}, a bundled {kind} table; expected a no-stop or decompression "
            f"table: {', '.join(usable)}"
        )
    return text


def unit_overlay(model: Any, unit: str) -> dict[str, Any]:
    """JSON-Schema fragment narrowing every depth and rate of ``model`` to ``unit``'s range.

    Parameters
    ----------
    model : type of pydantic.BaseModel
        The plan model (walked through its sub-models and lists).
    unit : str
        fsw or msw.

    Returns
    -------
    dict
        ``{"properties": {...}}`` nested like the plan; empty when nothing applies.
    """
    import typing

    from pydantic import BaseModel

    def walk(tp: Any) -> dict[str, Any] | None:
        origin = typing.get_origin(tp)
        if origin is Annotated:
            return walk(typing.get_args(tp)[0])
        if origin in (list, tuple):
            inner = walk(typing.get_args(tp)[0])
            return {"items": inner} if inner else None
        if origin is not None:  # a union such as X | None
            subs = [walk(a) for a in typing.get_args(tp) if a is not type(None)]
            subs = [s for s in subs if s]
            return subs[0] if subs else None
        if isinstance(tp, type) and issubclass(tp, BaseModel):
            props: dict[str, Any] = {}
            for name, fld in tp.model_fields.items():
                key = fld.alias or name
                marks = [m for m in fld.metadata if isinstance(m, UnitRange)]
                marks += _marks_in(fld.annotation)
                if marks:
                    lo, hi = marks[0].bounds(unit)
                    props[key] = _bounded(fld.annotation, lo, hi, marks[0].positive)
                    continue
                sub = walk(fld.annotation)
                if sub:
                    props[key] = sub
            return {"properties": props} if props else None
        return None

    return walk(model) or {}


def _marks_in(tp: Any) -> list[UnitRange]:
    import typing

    found: list[UnitRange] = []
    if typing.get_origin(tp) is Annotated:
        found += [m for m in typing.get_args(tp)[1:] if isinstance(m, UnitRange)]
    elif typing.get_origin(tp) is not None and typing.get_origin(tp) not in (list, tuple):
        for a in typing.get_args(tp):
            found += _marks_in(a)
    return found


def _bounded(tp: Any, lo: float, hi: float, positive: bool = False) -> dict[str, Any]:
    """A number in [lo, hi] (lo excluded when ``positive``), or null when optional."""
    import typing

    optional = type(None) in typing.get_args(tp)
    num = {"type": "number", "exclusiveMinimum" if positive else "minimum": lo, "maximum": hi}
    return {"anyOf": [num, {"type": "null"}]} if optional else num
