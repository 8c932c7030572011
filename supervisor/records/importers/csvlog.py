"""A depth recorder's CSV log to a :class:`~supervisor.profile.Profile`.

Format (``docs/logs.md`` describes it with an example)::

    # any comment line starts with '#'
    # units: time=s depth=fsw temperature=C      (optional declaration line)
    time_s,depth_fsw,gas,temperature_c
    0,0.0,air,12.5
    10,8.4,air,12.4
    ...

* **Columns** (header line, any order; comma, semicolon or tab separated):
  ``time`` (elapsed, with a unit: ``time_s``, ``time_min``, ``time [s]``) or
  ``clock`` (ISO 8601 date-times, ``2031-05-14T09:02:10``); ``depth`` with a
  unit (``depth_fsw``, ``depth_msw``, ``depth_ft``, ``depth_m``); optional
  ``gas`` (``air``, ``oxygen``, ``nitrox32``, ``O2/He`` percentages; an empty
  cell keeps the gas before) and ``temperature`` (``_c`` or ``_f``).
* **Units** are declared in the header, in a ``# units:`` line or by an option
  (``--depth-unit``, ``--time-unit``, ``--temperature-unit``), never guessed.
  Two declarations that differ, or a value written with another unit
  (``10 m`` in an fsw column), are refused as mixed units.
* **Any sampling interval**, regular or not.

Handled and reported (kept with the record): duplicate time stamps (the
deepest sample is kept), gaps (longer than :data:`GAP_FACTOR` times the usual
interval and at least :data:`GAP_FLOOR_MIN`; the profile is linear across
them), spikes (one sample that leaves and returns faster than
:data:`SPIKE_RATE_FSW_MIN`; replaced by the line between its neighbours) and a
small negative depth at the surface (taken as 0).  Refused with the line
number: a negative time, a time earlier than the one before, a depth that is
not a number or absurd (negative beyond the surface offset, deeper than 2,000
fsw), an unknown gas, a temperature outside -5 to 45 degC.
"""

from __future__ import annotations

import datetime as dt
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from supervisor import constants as C
from supervisor.errors import InputError
from supervisor.gas import Gas, parse_gas
from supervisor.profile import Profile
from supervisor.records.importers.common import (
    ImportedLog,
    LogError,
    LogIssue,
    LogSource,
    depth_limit,
    derived_bottom_time,
    offset_limit,
    parse_number,
    read_log_text,
)
from supervisor.text import excerpt
from supervisor.units import DepthUnit, Water, convert_depth

TimeUnit = Literal["s", "min"]
TemperatureUnit = Literal["C", "F"]

#: A sample that leaves and comes back faster than this is a spike [fsw/min]
#: (own choice: ten times the 30 fsw/min ascent rate of the U.S. Navy Diving
#: Manual, Rev 7, ch. 9; no diver moves 5 fsw in a second and back).
SPIKE_RATE_FSW_MIN = 300.0
#: An interval this many times the median interval is a gap [-] (own choice).
GAP_FACTOR = 4.0
#: ... and at least this long [min] (own choice: 10 s).
GAP_FLOOR_MIN = 10.0 / 60.0
#: Water temperatures outside this range are refused [degC] (own choice).
TEMPERATURE_RANGE_C = (-5.0, 45.0)
#: Issues of one kind listed one by one before they are summed up.
MAX_LISTED = 50

_TIME_FACTORS = {"s": 1.0 / 60.0, "min": 1.0}
_NAMES = {
    "time": "time", "elapsed": "time", "clock": "clock", "timestamp": "clock",
    "datetime": "clock", "depth": "depth", "gas": "gas", "mix": "gas",
    "temperature": "temperature", "temp": "temperature", "water_temperature": "temperature",
}
_UNIT_ALIASES = {
    "time": {"s": "s", "sec": "s", "secs": "s", "seconds": "s", "min": "min", "mins": "min",
             "minutes": "min"},
    "depth": {"fsw": "fsw", "msw": "msw", "ft": "ft", "feet": "ft", "m": "m", "metres": "m",
              "meters": "m"},
    "temperature": {"c": "C", "degc": "C", "°c": "C", "celsius": "C", "f": "F", "degf": "F",
                    "°f": "F", "fahrenheit": "F"},
}
_COLUMN = re.compile(
    r"^(?P<name>[a-z_ ]+?)\s*(?:[\[(]\s*(?P<u1>[^\])]+?)\s*[\])]|_(?P<u2>[a-z°]+))?$")
_VALUE = re.compile(
    r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>[a-zA-Z°]+)?\s*$")
_UNITS_LINE = re.compile(r"^#\s*units\s*:\s*(?P<body>.*)$", re.IGNORECASE)


@dataclass(frozen=True)
class CsvOptions:
    """Units and defaults given on the command line.

    Parameters
    ----------
    depth_unit, time_unit, temperature_unit : str, optional
        Units of the columns, when the file does not declare them (or to
        confirm them: a different declaration is refused as mixed units).
    gas : str, optional
        Breathing gas for a log without a gas column.
    water : {"salt", "fresh"}
        Water, for length units.
    p_surface_bar : float
        Surface pressure [bar].
    """

    depth_unit: DepthUnit | None = None
    time_unit: TimeUnit | None = None
    temperature_unit: TemperatureUnit | None = None
    gas: str | None = None
    water: Water = "salt"
    p_surface_bar: float = C.P_ATM_BAR


@dataclass
class _Declared:
    unit: str
    where: str
    line: int


class _Units:
    """Unit declarations per quantity; a second, different one is mixed units."""

    def __init__(self, file: str) -> None:
        self.file = file
        self.seen: dict[str, _Declared] = {}

    def declare(self, quantity: str, raw: str, where: str, line: int) -> None:
        unit = _UNIT_ALIASES[quantity].get(raw.strip().lower())
        if unit is None:
            accepted = ", ".join(sorted(set(_UNIT_ALIASES[quantity].values())))
            raise LogError(self.file, line, f"{quantity} unit {excerpt(raw)} is not known; "
                                            f"expected {accepted}")
        old = self.seen.get(quantity)
        if old is not None and old.unit != unit:
            raise LogError(self.file, line, f"mixed units: {quantity} in {unit} ({where}) but "
                                            f"in {old.unit} ({old.where}); one unit per log")
        if old is None:
            self.seen[quantity] = _Declared(unit, where, line)

    def get(self, quantity: str) -> str | None:
        d = self.seen.get(quantity)
        return d.unit if d else None


def _delimiter(header: str) -> str:
    for d in (",", ";", "\t"):
        if d in header:
            return d
    return ","


def _columns(header: str, delim: str, units: _Units, file: str, line: int) -> list[str]:
    cols: list[str] = []
    for raw in header.split(delim):
        text = raw.strip().strip('"').strip().lower()
        key = _NAMES.get(text.replace(" ", "_"))
        unit = None
        if key is None:
            m = _COLUMN.match(text)
            name = m.group("name").strip().replace(" ", "_") if m else ""
            key = _NAMES.get(name)
            unit = (m.group("u1") or m.group("u2")) if m else None
        if key is None:
            raise LogError(file, line, f"column {excerpt(raw.strip())} is not known; expected "
                                       "time_<unit> or clock, depth_<unit>, and optionally gas "
                                       "and temperature_<unit>")
        if key in cols:
            raise LogError(file, line, f"column {key!r} appears twice")
        if unit:
            if key in ("clock", "gas"):
                raise LogError(file, line, f"column {key!r} takes no unit")
            units.declare(key, unit, f"header line {line}", line)
        cols.append(key)
    if "depth" not in cols:
        raise LogError(file, line, "no depth column; expected depth_fsw, depth_msw, depth_ft "
                                   "or depth_m")
    if ("time" in cols) == ("clock" in cols):
        raise LogError(file, line, "expected one time column: time_<unit> (elapsed) or clock "
                                   "(date and time)")
    return cols


def _units_line(body: str, units: _Units, file: str, line: int) -> None:
    for part in body.replace(",", " ").split():
        if "=" not in part:
            raise LogError(file, line, f"units line: {excerpt(part)} is not NAME=UNIT (e.g. "
                                       "depth=fsw)")
        name, unit = part.split("=", 1)
        key = _NAMES.get(name.strip().lower())
        if key not in ("time", "depth", "temperature"):
            raise LogError(file, line, f"units line: {excerpt(name)} is not time, depth or "
                                       "temperature")
        units.declare(key, unit, f"units line {line}", line)


def _value(cell: str, quantity: str, unit: str, file: str, line: int) -> float:
    m = _VALUE.match(cell)
    if m is None:
        return parse_number(cell, file, line, quantity)  # raises with the value quoted
    if m.group("unit"):
        given = _UNIT_ALIASES[quantity].get(m.group("unit").lower())
        if given != unit:
            raise LogError(file, line, f"mixed units: {quantity} {excerpt(cell.strip())} but the "
                                       f"column is in {unit}")
    return parse_number(m.group("num"), file, line, quantity)


def _clock(cell: str, file: str, line: int) -> dt.datetime:
    text = cell.strip().strip('"')
    try:
        return dt.datetime.fromisoformat(text)
    except ValueError:
        raise LogError(file, line, f"clock {excerpt(text)} is not an ISO 8601 date and time "
                                   "(such as 2031-05-14T09:02:10)") from None


def _gas(cell: str, file: str, line: int) -> Gas:
    try:
        return parse_gas(cell.strip().strip('"'))
    except InputError as exc:
        raise LogError(file, line, f"gas: {exc.message}") from None


class _Issues:
    def __init__(self) -> None:
        self.items: list[LogIssue] = []
        self.counts: dict[str, int] = {}

    def add(self, kind: str, line: int, message: str) -> None:
        n = self.counts.get(kind, 0) + 1
        self.counts[kind] = n
        if n <= MAX_LISTED:
            self.items.append(LogIssue(kind, line, message))  # type: ignore[arg-type]

    def done(self) -> list[LogIssue]:
        for kind, n in self.counts.items():
            if n > MAX_LISTED:
                self.items.append(LogIssue("note", 0, f"{n - MAX_LISTED} more {kind} "
                                                      "entries not listed"))
        return sorted(self.items, key=lambda i: (i.line == 0, i.line))


def read_csv_log(path: Path, options: CsvOptions | None = None) -> ImportedLog:
    """Import a depth recorder's CSV log.

    Parameters
    ----------
    path : Path
        The CSV file.
    options : CsvOptions, optional
        Units and gas given on the command line.

    Returns
    -------
    ImportedLog

    Raises
    ------
    LogError
        For any problem listed in the module notes, naming the line.
    """
    opts = options or CsvOptions()
    text, source = read_log_text(path, "csv")
    file = str(path)
    units = _Units(file)
    lines = text.splitlines()
    cols: list[str] | None = None
    delim = ","
    rows: list[tuple[int, list[str]]] = []
    for i, raw in enumerate(lines, start=1):
        s = raw.strip()
        if not s:
            continue
        if s.startswith("#"):
            m = _UNITS_LINE.match(s)
            if m:
                _units_line(m.group("body"), units, file, i)
            continue
        if cols is None:
            delim = _delimiter(s)
            cols = _columns(s, delim, units, file, i)
            continue
        rows.append((i, s.split(delim)))
    if cols is None:
        raise LogError(file, len(lines), "no header line; expected e.g. time_s,depth_fsw")
    for quantity, given in (("depth", opts.depth_unit), ("time", opts.time_unit),
                            ("temperature", opts.temperature_unit)):
        if given:
            units.declare(quantity, given, f"--{quantity}-unit", 1)
    depth_unit = units.get("depth")
    if depth_unit is None:
        raise LogError(file, 1, "the depth unit is not declared; write depth_fsw, depth_msw, "
                                "depth_ft or depth_m in the header, a '# units: depth=...' "
                                "line, or give --depth-unit (it is never guessed)")
    time_unit = units.get("time")
    if "time" in cols and time_unit is None:
        raise LogError(file, 1, "the time unit is not declared; write time_s or time_min in "
                                "the header, a '# units: time=...' line, or give --time-unit")
    temp_unit = units.get("temperature")
    if "temperature" in cols and temp_unit is None:
        raise LogError(file, 1, "the temperature unit is not declared; write temperature_c or "
                                "temperature_f, or give --temperature-unit")
    if "gas" not in cols and not opts.gas:
        raise LogError(file, 1, "the breathing gas is not given; add a gas column or give "
                                "--gas (it is never assumed)")
    if not rows:
        raise LogError(file, len(lines), "no samples after the header")
    if len(rows) < 2:
        raise LogError(file, rows[0][0], "only one sample; a profile needs at least two")
    return _build(file, source, cols, rows, depth_unit,  # type: ignore[arg-type]
                  time_unit, temp_unit, opts)


def _build(file: str, source: LogSource, cols: list[str], rows: list[tuple[int, list[str]]],
           unit: DepthUnit, time_unit: str | None, temp_unit: str | None,
           opts: CsvOptions) -> ImportedLog:
    n = len(rows)
    idx = {c: i for i, c in enumerate(cols)}
    t = np.empty(n)
    d = np.empty(n)
    temps: list[list[float]] = []
    gases: list[Gas] = []
    line_of = np.empty(n, dtype=int)
    gas = _gas(opts.gas, file, 1) if opts.gas else None
    deepest, offset = depth_limit(unit), offset_limit(unit)
    start: dt.datetime | None = None
    issues = _Issues()
    for k, (line, cells) in enumerate(rows):
        if len(cells) != len(cols):
            raise LogError(file, line, f"{len(cells)} fields; the header has {len(cols)} "
                                       f"({', '.join(cols)})")
        line_of[k] = line
        if "clock" in idx:
            when = _clock(cells[idx["clock"]], file, line)
            if start is None:
                start = when
            try:
                t[k] = (when - start).total_seconds() / 60.0
            except TypeError:
                raise LogError(file, line, "mixed clock times: some with a UTC offset, some "
                                           "without") from None
        else:
            t[k] = _value(cells[idx["time"]], "time", time_unit or "", file, line) \
                * _TIME_FACTORS[time_unit or "s"]
        if "time" in idx and t[k] < 0:
            raise LogError(file, line, f"negative time {cells[idx['time']].strip()}; "
                                       "times count from the start of the log")
        if k and t[k] < t[k - 1]:
            raise LogError(file, line, "unsorted times: this sample is earlier than the one "
                                       f"on line {line_of[k - 1]}; samples must be in time "
                                       "order")
        depth = _value(cells[idx["depth"]], "depth", unit, file, line)
        if depth > deepest:
            raise LogError(file, line, f"depth {depth:g} {unit} is absurd (deeper than "
                                       f"{deepest:.0f} {unit})")
        if depth < -offset:
            raise LogError(file, line, f"depth {depth:g} {unit} is absurd (negative beyond "
                                       f"the surface offset of {offset:.1f} {unit})")
        if depth < 0:
            issues.add("surface-offset", line, f"depth {depth:g} {unit} taken as 0 (gauge "
                                               "offset at the surface)")
            depth = 0.0
        d[k] = depth
        if "gas" in idx and cells[idx["gas"]].strip():
            gas = _gas(cells[idx["gas"]], file, line)
        if gas is None:
            raise LogError(file, line, "no gas given yet; fill the gas column of the first "
                                       "sample or give --gas")
        gases.append(gas)
        if "temperature" in idx and cells[idx["temperature"]].strip():
            value = _value(cells[idx["temperature"]], "temperature", temp_unit or "", file,
                           line)
            c = value if temp_unit == "C" else (value - 32.0) * 5.0 / 9.0
            lo, hi = TEMPERATURE_RANGE_C
            if not lo <= c <= hi:
                raise LogError(file, line, f"temperature {value:g} {temp_unit} is absurd "
                                           f"for water (expected {lo:g} to {hi:g} degC)")
            temps.append([float(t[k]), round(c, 3)])
    keep = _duplicates(t, d, line_of, unit, issues)
    t, d, line_of = t[keep], d[keep], line_of[keep]
    gases = [g for g, k in zip(gases, keep, strict=True) if k]
    if t.size < 2:
        raise LogError(file, int(line_of[-1]), "all samples share one time stamp; a profile "
                                               "needs at least two times")
    _gaps(t, d, line_of, unit, issues)
    _spikes(t, d, line_of, unit, issues)
    profile = Profile.from_samples(t, d, gases[:-1], unit=unit,
                                   p_surface_bar=opts.p_surface_bar, water=opts.water)
    bt, basis = derived_bottom_time(t, d, unit)
    return ImportedLog(
        source=source,
        profile=profile, started_at=start, max_depth=float(d.max()), bottom_time_min=bt,
        bottom_time_basis=basis, issues=issues.done(), temperature_c=temps or None,
        meta={"samples": int(t.size),
              "median_interval_s": round(float(np.median(np.diff(t))) * 60.0, 3)},
    )


def _duplicates(t: NDArray[np.float64], d: NDArray[np.float64], line_of: NDArray[np.int_],
                unit: str, issues: _Issues) -> NDArray[np.bool_]:
    """Keep one sample per time stamp, the deepest; report the others."""
    keep = np.ones(t.size, dtype=bool)
    same = np.flatnonzero(np.diff(t) == 0)
    for k in same:
        a, b = int(k), int(k) + 1
        # keep the deeper of the pair (the later one when equal); the run continues from it
        if d[a] > d[b]:
            d[b] = d[a]
        keep[a] = False
        issues.add("duplicate", int(line_of[b]),
                   f"time stamp repeated (line {int(line_of[a])}); kept the deeper depth "
                   f"{d[b]:g} {unit}")
    return keep


def _gaps(t: NDArray[np.float64], d: NDArray[np.float64], line_of: NDArray[np.int_],
          unit: str, issues: _Issues) -> None:
    dt_min = np.diff(t)
    limit = max(GAP_FACTOR * float(np.median(dt_min)), GAP_FLOOR_MIN)
    for k in np.flatnonzero(dt_min > limit):
        a, b = int(k), int(k) + 1
        issues.add("gap", int(line_of[b]),
                   f"no samples for {dt_min[a] * 60:.0f} s after line {int(line_of[a])} "
                   f"({d[a]:g} to {d[b]:g} {unit}); the profile is a straight line across "
                   "the gap and what happened in it is not known")


def _spikes(t: NDArray[np.float64], d: NDArray[np.float64], line_of: NDArray[np.int_],
            unit: DepthUnit, issues: _Issues) -> None:
    if t.size < 3:
        return
    limit = float(convert_depth(SPIKE_RATE_FSW_MIN, "fsw", unit))
    rate = np.diff(d) / np.diff(t)
    a, b = rate[:-1], rate[1:]
    spike = (np.abs(a) > limit) & (np.abs(b) > limit) & (np.sign(a) != np.sign(b))
    for k in np.flatnonzero(spike) + 1:
        i = int(k)
        w = (t[i] - t[i - 1]) / (t[i + 1] - t[i - 1])
        new = float(d[i - 1] + w * (d[i + 1] - d[i - 1]))
        issues.add("spike", int(line_of[i]),
                   f"depth {d[i]:g} {unit} leaves and returns faster than {limit:.0f} "
                   f"{unit}/min; replaced by {new:.1f} {unit} between its neighbours")
        d[i] = new
