"""The supervisor's timed log (TOML, schema ``supervisor-log/1``) to a Profile.

The supervisor writes down the clock time of each event of a dive; this file
holds them with the dive's particulars.  ``supervisor log schema`` prints the
JSON Schema; ``docs/logs.md`` describes the format with an example.

Events, in time order (``at`` is a TOML local time ``09:02:00``, or a local
date-time ``2031-05-14T23:58:00`` for a log that passes midnight):

===========================  ==================================================
``left-surface``             the diver leaves the surface (bottom time starts)
``reached-bottom``           ``depth`` reached
``left-bottom``              ascent starts (bottom time ends); ``depth`` is the
                             maximum depth if it differs from the one reached
``arrived-stop``             at a water stop, ``depth`` required
``left-stop``                leaves that stop
``gas-switch``               ``gas`` required; ``depth`` when not at a stop
``reached-surface``          the diver is out of the water
``left-last-water-stop``     surface decompression: leaves the last water stop
                             (or the bottom) for the surface
``compression-started``      surface decompression: the chamber starts down
                             (optional; without it the interval from the
                             surface to chamber depth is taken as one line)
``chamber-at-depth``         the chamber reaches its first stop, ``depth``
``oxygen-start``             a period on oxygen starts (chamber, by mask)
``air-break``                an air break starts (ends at the next
                             ``oxygen-start``)
``chamber-left-stop``        the chamber leaves a stop
``chamber-arrived-stop``     the chamber reaches the next stop, ``depth``
``chamber-surfaced``         the chamber is at the surface
===========================  ==================================================
"""

from __future__ import annotations

import datetime as dt
import re
import tomllib
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, ValidationError

from supervisor import constants as C
from supervisor.engine.evaluate import SURFACE_INTERVAL
from supervisor.errors import InputError
from supervisor.gas import AIR, OXYGEN, Gas, parse_gas
from supervisor.plan_errors import problems_from
from supervisor.profile import Place, Profile
from supervisor.records.importers.common import (
    ImportedLog,
    LogError,
    LogIssue,
    depth_limit,
    read_log_text,
)
from supervisor.text import excerpt
from supervisor.units import altitude_pressure

SCHEMA = "supervisor-log/1"

Event = Literal[
    "left-surface", "reached-bottom", "left-bottom", "arrived-stop", "left-stop",
    "gas-switch", "reached-surface", "left-last-water-stop", "compression-started",
    "chamber-at-depth", "oxygen-start", "air-break", "chamber-left-stop",
    "chamber-arrived-stop", "chamber-surfaced",
]


def _depth_value(v: Any) -> Any:
    """Refuse a depth written with a unit (``"30 m"``): the log's ``unit`` applies to all."""
    if isinstance(v, str):
        m = re.match(r"^\s*[-+]?[\d.]+\s*([a-zA-Z]+)\s*$", v)
        if m:
            raise ValueError(f"mixed units: got {excerpt(v)}; write the number alone, in the "
                             "log's unit")
        raise ValueError(f"got {excerpt(v)}; expected a number")
    return v


Depth = Annotated[float, BeforeValidator(_depth_value)]


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False,
                              populate_by_name=True)


class LogEvent(_Model):
    """One timed event."""

    at: dt.time | dt.datetime = Field(description="Clock time (TOML local time), or local "
                                      "date-time for a log past midnight")
    event: Event = Field(description="What happened (see the module notes)")
    depth: Depth | None = Field(None, ge=0, description="Depth at the event [log unit]")
    gas: str | None = Field(None, description="Gas switched to (gas-switch)")
    note: str = Field("", description="Free text")


class ScheduleUsed(_Model):
    """The table schedule the dive was decompressed on."""

    depth: Depth = Field(gt=0, description="Schedule depth [log unit]")
    bottom_time_min: float = Field(gt=0, le=1440, description="Schedule bottom time [min]")


class TimedLog(_Model):
    """The supervisor's timed log of one dive (``supervisor-log/1``)."""

    schema_: Literal["supervisor-log/1"] = Field(alias="schema",
                                                  description="Format: supervisor-log/1")
    job: str | None = Field(None, description="Job reference as recorded (records list)")
    dive: str = Field(min_length=1, description="The plan's dive id")
    diver: str = Field(min_length=1, description="Name of the diver")
    date: dt.date = Field(description="Date the diver left the surface")
    unit: Literal["fsw", "msw"] = Field(description="Unit of every depth in the log")
    water: Literal["salt", "fresh"] = Field("salt", description="Water")
    altitude_m: float = Field(0.0, ge=-500, le=6000, description="Altitude of the surface [m]")
    gas: str = Field(description="Bottom gas such as air, nitrox32 or 16/84")
    mode: str | None = Field(None, description="Diving mode")
    table: str | None = Field(None, description="Decompression table used")
    schedule: ScheduleUsed | None = Field(None, description="Schedule used in that table")
    repetitive_group: str | None = Field(None, description="Repetitive group designation")
    hours_since_last_exposure: float | None = Field(
        None, ge=0, le=24, description="Time since the last pressure exposure, under 24 h [h]")
    no_exposure_24h: bool = Field(False, description="No pressure exposure in the last 24 h")
    supervisor: str | None = Field(None, description="Supervisor who kept the log")
    events: list[LogEvent] = Field(min_length=3, description="Timed events in order")


def log_json_schema() -> dict[str, Any]:
    """The JSON Schema of the timed log (draft 2020-12)."""
    schema = TimedLog.model_json_schema(by_alias=True, mode="validation")
    schema["$id"] = f"urn:supervisor:schema:{SCHEMA}"
    return schema


# -- line numbers -----------------------------------------------------------

_TABLE = re.compile(r"^\s*\[\[\s*events\s*\]\]\s*(#.*)?$")
_HEADER = re.compile(r"^\s*\[")


def _key_line(lines: list[str], start: int, end: int, key: str | None) -> int:
    if key is not None:
        pat = re.compile(rf"^\s*{re.escape(key)}\s*=")
        for i in range(start, end):
            if pat.match(lines[i]):
                return i + 1
    return start + 1


def locate(text: str, path: tuple[Any, ...]) -> int:
    """Line number of a field of the timed log, from its path (``("events", 3, "depth")``)."""
    lines = text.splitlines()
    if path and path[0] == "events" and len(path) > 1 and isinstance(path[1], int):
        heads = [i for i, line in enumerate(lines) if _TABLE.match(line)]
        if path[1] < len(heads):
            start = heads[path[1]]
            end = next((j for j in range(start + 1, len(lines)) if _HEADER.match(lines[j])),
                       len(lines))
            key = path[2] if len(path) > 2 and isinstance(path[2], str) else None
            return _key_line(lines, start, end, key) if key else start + 1
    top = path[0] if path and isinstance(path[0], str) else None
    end = next((j for j, line in enumerate(lines) if _HEADER.match(line)), len(lines))
    if top is not None:
        found = _key_line(lines, 0, end, top)
        if found != 1 or (lines and re.match(rf"^\s*{re.escape(top)}\s*=", lines[0])):
            return found
        for j, line in enumerate(lines):
            if re.match(rf"^\s*\[\[?\s*{re.escape(top)}\s*\]\]?", line):
                return j + 1
    return 1


def _path(text: str) -> tuple[Any, ...]:
    out: list[Any] = []
    for part in re.findall(r"[^.\[\]]+|\[\d+\]", text):
        out.append(int(part[1:-1]) if part.startswith("[") else part)
    return tuple(out)


# -- building the profile ---------------------------------------------------


class _Builder:
    """Walk the events, check their order, and lay the profile's knots."""

    def __init__(self, log: TimedLog, file: str, text: str) -> None:
        self.log, self.file, self.text = log, file, text
        self.gas: Gas = parse_gas(log.gas)
        self.knots: list[tuple[float, float, Gas, Place, str]] = []
        self.depth = 0.0
        self.place: Place = "water"
        self.state = "start"
        self.surd = False
        self.times: dict[str, float] = {}

    def fail(self, index: int, message: str, key: str | None = None) -> LogError:
        path: tuple[Any, ...] = ("events", index) + ((key,) if key else ())
        return LogError(self.file, locate(self.text, path), message)

    def knot(self, t: float, depth: float, label: str) -> None:
        """Lay a knot: the segment ending here had the gas, place and label given."""
        self.knots.append((t, depth, self.gas, self.place, label))
        self.depth = depth

    def need_depth(self, i: int, ev: LogEvent) -> float:
        if ev.depth is None:
            raise self.fail(i, f"{ev.event} needs a depth")
        return float(ev.depth)

    def step(self, i: int, t: float, ev: LogEvent) -> None:  # noqa: C901 - one case per event
        kind, st = ev.event, self.state
        allowed = {
            "left-surface": ("start",),
            "reached-bottom": ("descending",),
            "left-bottom": ("bottom",),
            "arrived-stop": ("ascending",),
            "left-stop": ("stop",),
            "gas-switch": ("descending", "bottom", "ascending", "stop"),
            "reached-surface": ("ascending", "to-surface"),
            "left-last-water-stop": ("stop", "bottom"),
            "compression-started": ("on-deck",),
            "chamber-at-depth": ("on-deck", "compressing"),
            "oxygen-start": ("chamber", "chamber-stop"),
            "air-break": ("chamber", "chamber-stop"),
            "chamber-left-stop": ("chamber", "chamber-stop"),
            "chamber-arrived-stop": ("chamber-travel",),
            "chamber-surfaced": ("chamber-travel", "chamber", "chamber-stop"),
        }[kind]
        if st not in allowed:
            raise self.fail(i, f"{kind} cannot follow the state '{st}' of the log (events "
                               "out of order or missing)", "event")
        if kind == "left-surface":
            self.knot(t, 0.0, "start")
            self.state = "descending"
        elif kind == "reached-bottom":
            self.knot(t, self.need_depth(i, ev), "descent")
            self.state = "bottom"
        elif kind == "left-bottom":
            self.knot(t, float(ev.depth) if ev.depth is not None else self.depth, "bottom")
            self.state = "ascending"
        elif kind == "arrived-stop":
            d = self.need_depth(i, ev)
            if d >= self.depth:
                raise self.fail(i, f"stop at {d:g} {self.log.unit} is not shallower than "
                                   f"{self.depth:g} {self.log.unit} before it", "depth")
            self.knot(t, d, "travel")
            self.state = "stop"
        elif kind == "left-stop":
            self.knot(t, self.depth, "stop")
            self.state = "ascending"
        elif kind == "gas-switch":
            if not ev.gas:
                raise self.fail(i, "gas-switch needs the gas switched to", "event")
            d = float(ev.depth) if ev.depth is not None else self.depth
            if ev.depth is None and st in ("descending", "ascending"):
                raise self.fail(i, "a gas switch while moving needs its depth", "event")
            self.knot(t, d, "stop" if st == "stop" else st)
            try:
                self.gas = parse_gas(ev.gas)
            except InputError as exc:
                raise self.fail(i, f"gas: {exc.message}", "gas") from None
        elif kind == "reached-surface":
            self.knot(t, 0.0, SURFACE_INTERVAL + ": ascent" if self.surd else "ascent")
            if self.surd:
                self.gas, self.place, self.state = AIR, "surface", "on-deck"
            else:
                self.state = "surfaced"
        elif kind == "left-last-water-stop":
            self.knot(t, self.depth, "stop" if st == "stop" else "bottom")
            self.surd, self.state = True, "to-surface"
            self.times["left_last_water_stop"] = t
            if st == "bottom":  # no water stops: leaving the bottom for the surface
                self.times["left_bottom"] = t
        elif kind == "compression-started":
            self.knot(t, 0.0, SURFACE_INTERVAL)
            self.place, self.state = "chamber", "compressing"
        elif kind == "chamber-at-depth":
            d = self.need_depth(i, ev)
            label = SURFACE_INTERVAL + (": compression" if st == "compressing" else "")
            self.place = "chamber"
            self.knot(t, d, label)
            self.state = "chamber"
            self.times["chamber_at_depth"] = t
        elif kind in ("oxygen-start", "air-break"):
            self.knot(t, self.depth, "stop")
            self.gas = OXYGEN if kind == "oxygen-start" else AIR
            self.state = "chamber-stop"
        elif kind == "chamber-left-stop":
            self.knot(t, self.depth, "stop")
            self.state = "chamber-travel"
        elif kind == "chamber-arrived-stop":
            d = self.need_depth(i, ev)
            if d >= self.depth:
                raise self.fail(i, f"chamber stop at {d:g} {self.log.unit} is not shallower "
                                   f"than {self.depth:g} {self.log.unit}", "depth")
            self.knot(t, d, "travel")
            self.state = "chamber-stop"
        elif kind == "chamber-surfaced":
            self.knot(t, 0.0, "decompression to surface" if st != "chamber-travel" else "travel")
            self.state = "surfaced"
        self.times.setdefault(kind.replace("-", "_"), t)
        if kind == "left-bottom":
            self.times["left_bottom"] = t


def _minutes(events: list[LogEvent], date: dt.date, builder: _Builder) -> list[float]:
    out: list[float] = []
    start: dt.datetime | None = None
    prev: dt.datetime | None = None
    for i, ev in enumerate(events):
        when = ev.at if isinstance(ev.at, dt.datetime) else dt.datetime.combine(date, ev.at)
        if when.tzinfo is not None:
            raise builder.fail(i, "give clock times without a UTC offset (local time of the "
                                  "site)", "at")
        if prev is not None and when < prev:
            raise builder.fail(i, f"unsorted times: {when:%H:%M:%S} is earlier than the event "
                                  f"before ({prev:%H:%M:%S}); a log past midnight gives the "
                                  f"date and time ({date + dt.timedelta(days=1)}T00:10:00)",
                               "at")
        start = start or when
        prev = when
        out.append((when - start).total_seconds() / 60.0)
    return out


def read_timed_log(path: Path) -> ImportedLog:
    """Import the supervisor's timed log (TOML).

    Parameters
    ----------
    path : Path
        The ``.toml`` file.

    Returns
    -------
    ImportedLog
        Profile times are minutes from leaving the surface; ``meta`` holds the
        log's particulars (dive, diver, table, schedule, repetitive group ...).

    Raises
    ------
    LogError
        Not TOML, a field that does not validate, events out of order, times
        that go back, a depth that is absurd or given with a unit.
    """
    text, source = read_log_text(path, "toml")
    file = str(path)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"line (\d+)", str(exc))
        raise LogError(file, int(m.group(1)) if m else 1,
                       f"not valid TOML ({str(exc).split(' (at')[0]})") from None
    try:
        log = TimedLog.model_validate(data)
    except ValidationError as exc:
        unit = data.get("unit") if isinstance(data.get("unit"), str) else "log unit"
        field, message = problems_from(exc, TimedLog, unit)[0]
        raise LogError(file, locate(text, _path(field)), f"{field}: {message}") from None
    b = _Builder(log, file, text)
    deepest = depth_limit(log.unit)
    for i, ev in enumerate(log.events):
        if ev.depth is not None and ev.depth > deepest:
            raise b.fail(i, f"depth {ev.depth:g} {log.unit} is absurd (deeper than "
                            f"{deepest:.0f} {log.unit})", "depth")
    try:
        b.gas = parse_gas(log.gas)
    except InputError as exc:
        raise LogError(file, locate(text, ("gas",)), f"gas: {exc.message}") from None
    minutes = _minutes(log.events, log.date, b)
    for i, (t, ev) in enumerate(zip(minutes, log.events, strict=True)):
        b.step(i, t, ev)
    if b.state != "surfaced":
        raise b.fail(len(log.events) - 1, "the log does not end at the surface (reached-surface "
                                          "or chamber-surfaced)", "event")
    if not (log.repetitive_group or log.hours_since_last_exposure is not None
            or log.no_exposure_24h):
        raise LogError(file, 1, "give repetitive_group, hours_since_last_exposure or "
                                "no_exposure_24h = true (46 CFR 197.482; 29 CFR 1910.423(d))")
    return _result(log, b, source, minutes)


def _result(log: TimedLog, b: _Builder, source: Any, minutes: list[float]) -> ImportedLog:
    p_surface = float(altitude_pressure(log.altitude_m)) if log.altitude_m else C.P_ATM_BAR
    prof = Profile(unit=log.unit, p_surface_bar=p_surface, water=log.water)
    # a knot carries the gas, place and label of the segment that ends at it
    for (t0, _d0, _g0, _p0, _l0), (t1, d1, g1, pl1, lb1) in zip(b.knots, b.knots[1:],
                                                              strict=False):
        if t1 - t0 > 1e-12:
            prof.add(d1, t1 - t0, g1, pl1, lb1)
    issues: list[LogIssue] = []
    if b.surd and "compression_started" not in b.times:
        issues.append(LogIssue("note", 0, "compression start not logged: the interval from "
                                          "the surface to chamber depth is taken as one line"))
    first = log.events[0].at
    started = first if isinstance(first, dt.datetime) else dt.datetime.combine(log.date, first)
    max_depth = max(d for _t, d, _g, pl, _l in b.knots if pl == "water")
    meta = log.model_dump(mode="json", by_alias=True, exclude={"events"})
    if b.surd and "chamber_at_depth" in b.times:
        meta["surface_interval_min"] = (b.times["chamber_at_depth"]
                                        - b.times["left_last_water_stop"])
    return ImportedLog(
        source=source, profile=prof, started_at=started, max_depth=float(max_depth),
        bottom_time_min=b.times["left_bottom"] - b.times["left_surface"],
        bottom_time_basis="from the timed log: left-surface to left-bottom",
        issues=issues, meta=meta,
        events=[{**e.model_dump(mode="json", exclude_defaults=True), "t_min": t}
                for e, t in zip(log.events, minutes, strict=True)],
    )
