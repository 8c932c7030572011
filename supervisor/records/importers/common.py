"""What every log importer shares: reading a file safely, line-numbered errors, the result.

A log is refused (exit status 2, nothing stored) with one line naming the file,
the line number and the problem when it is empty, larger than
:data:`MAX_LOG_BYTES`, not UTF-8 text (binary garbage), or when a value in it
is unusable.  Problems that a real recorder produces and that can be handled
(gaps, duplicate time stamps, spikes, a small negative depth at the surface)
are handled and reported as :class:`LogIssue` entries, kept with the record.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import numpy as np
from numpy.typing import NDArray

from supervisor.errors import InputError
from supervisor.profile import Profile
from supervisor.text import excerpt, printable
from supervisor.units import DepthUnit, convert_depth

#: Largest log accepted [bytes].  A recorder sampling once a second for a week
#: writes about 20 MiB of CSV; a file past this limit is not a dive log.
MAX_LOG_BYTES = 32 * 1024 * 1024
#: Deepest depth accepted in a log [fsw], as for a plan (``supervisor.plan``).
MAX_LOG_DEPTH_FSW = 2000.0
#: A negative depth down to this is a surface offset of the gauge, taken as 0 [fsw]
#: (about 1 msw; own choice, common practice, no source); deeper negatives are refused.
SURFACE_OFFSET_FSW = 3.3

_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")

IssueKind = Literal["gap", "duplicate", "spike", "surface-offset", "note"]


class LogError(InputError):
    """A log that cannot be imported: names the file, the line and the problem."""

    def __init__(self, file: str, line: int, message: str) -> None:
        self.file = file
        self.line = line
        super().__init__(f"{printable(file)}, line {line}", message)


@dataclass(frozen=True)
class LogIssue:
    """Something in the log that was handled on import, and how."""

    kind: IssueKind
    line: int
    message: str

    def to_json(self) -> dict[str, Any]:
        """JSON-ready form."""
        return {"kind": self.kind, "line": self.line, "message": self.message}


@dataclass(frozen=True)
class LogSource:
    """The file a log came from."""

    file: str
    format: Literal["csv", "toml"]
    sha256: str
    bytes: int

    def to_json(self) -> dict[str, Any]:
        """JSON-ready form."""
        return {"file": self.file, "format": self.format, "sha256": self.sha256,
                "bytes": self.bytes}


@dataclass
class ImportedLog:
    """A log turned into a profile, with what was found on the way.

    Attributes
    ----------
    source : LogSource
        The file.
    profile : Profile
        The executed profile (depths in ``profile.unit``, minutes from the
        first sample or from leaving the surface).
    started_at : datetime or None
        Clock time of time zero, when the log gives it.
    max_depth : float
        Deepest point [profile unit].
    bottom_time_min : float or None
        From leaving the surface to leaving the bottom [min], with
        ``bottom_time_basis`` saying how it was found.
    issues : list of LogIssue
        What was handled on import.
    meta : dict
        Header fields of the log (the timed log's dive, diver, table, ...).
    events : list of dict
        The timed log's events as given (empty for a recorder's CSV).
    temperature_c : list of [t_min, degC] or None
        Water temperature samples, when the recorder gives them.
    """

    source: LogSource
    profile: Profile
    started_at: dt.datetime | None
    max_depth: float
    bottom_time_min: float | None
    bottom_time_basis: str
    issues: list[LogIssue] = field(default_factory=list)
    meta: dict[str, Any] = field(default_factory=dict)
    events: list[dict[str, Any]] = field(default_factory=list)
    temperature_c: list[list[float]] | None = None

    def to_json(self) -> dict[str, Any]:
        """The log part of a dive record (source, issues, events, temperatures)."""
        return {
            "source": self.source.to_json(),
            "started_at": self.started_at.isoformat() if self.started_at else None,
            "max_depth": self.max_depth,
            "bottom_time_min": self.bottom_time_min,
            "bottom_time_basis": self.bottom_time_basis,
            "issues": [i.to_json() for i in self.issues],
            "events": self.events,
            "temperature_c": self.temperature_c,
        }


def depth_limit(unit: DepthUnit) -> float:
    """:data:`MAX_LOG_DEPTH_FSW` in ``unit``."""
    return float(convert_depth(MAX_LOG_DEPTH_FSW, "fsw", unit))


def offset_limit(unit: DepthUnit) -> float:
    """:data:`SURFACE_OFFSET_FSW` in ``unit``."""
    return float(convert_depth(SURFACE_OFFSET_FSW, "fsw", unit))


def read_log_text(path: Path, fmt: Literal["csv", "toml"], limit: int = MAX_LOG_BYTES
                  ) -> tuple[str, LogSource]:
    """Read a log file as text, refusing empty, oversized and binary files.

    Parameters
    ----------
    path : Path
        The log.
    fmt : {"csv", "toml"}
        Its format, for the source record.
    limit : int
        Largest size accepted [bytes].

    Returns
    -------
    (str, LogSource)
        The text (a byte-order mark removed) and the source description.

    Raises
    ------
    LogError
        Empty, too large, not UTF-8, or containing NUL or other control bytes.
    InputError
        The file cannot be read.
    """
    name = str(path)
    try:
        with path.open("rb") as fh:
            raw = fh.read(limit + 1)
    except IsADirectoryError:
        raise InputError("LOG", f"{printable(name)} is a folder; expected a log file") from None
    except OSError as exc:
        raise InputError("LOG", f"cannot read {printable(name)} "
                                f"({exc.strerror or exc})") from None
    if len(raw) > limit:
        line = raw[:limit].count(b"\n") + 1
        raise LogError(name, line, f"the file passes {limit // (1024 * 1024)} MiB here; no "
                                   "dive log is that large (one sample a second for a week "
                                   "is about 20 MiB)")
    if not raw.strip():
        raise LogError(name, 1, "the file is empty; expected a depth log")
    nul = raw.find(b"\x00")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        bad = exc.start if nul < 0 else min(nul, exc.start)
        raise LogError(name, raw[:bad].count(b"\n") + 1,
                       f"byte {bad} is not UTF-8 text: a binary file, not a log") from None
    if nul >= 0:
        raise LogError(name, raw[:nul].count(b"\n") + 1,
                       "the file holds NUL bytes: a binary file, not a log")
    bad_char = _CONTROL.search(text)
    if bad_char is not None:
        raise LogError(name, text.count("\n", 0, bad_char.start()) + 1,
                       f"control character {printable(bad_char.group())} in the line: a "
                       "binary file, not a log")
    text = text.removeprefix("\ufeff")
    source = LogSource(file=path.name, format=fmt, sha256=hashlib.sha256(raw).hexdigest(),
                       bytes=len(raw))
    return text, source


def parse_number(text: str, file: str, line: int, what: str) -> float:
    """Parse a finite number, or raise a :class:`LogError` naming the line."""
    try:
        value = float(text)
    except ValueError:
        raise LogError(file, line, f"{what} {excerpt(text.strip())} is not a number") from None
    if not np.isfinite(value):
        raise LogError(file, line, f"{what} {excerpt(text.strip())} is not a finite number")
    return value


def derived_bottom_time(t: NDArray[np.float64], d: NDArray[np.float64], unit: DepthUnit
                        ) -> tuple[float | None, str]:
    """Bottom time of a sampled log, by a stated, conservative rule.

    Leaving the surface is the last sample at the surface (within the surface
    offset) before the first deeper one; leaving the bottom is the last sample
    deeper than half the maximum depth.  This counts the first part of the
    ascent as bottom time (never less than a bottom time ending at the start of
    the ascent, when the work was deeper than half the maximum depth).

    Returns
    -------
    (float or None, str)
        Bottom time [min] (``None`` when the log never leaves the surface) and
        the rule as text for the record.
    """
    band = offset_limit(unit)
    deep = np.flatnonzero(d > band)
    if deep.size == 0:
        return None, "the log never leaves the surface"
    first = int(deep[0])
    t_left = float(t[first - 1]) if first > 0 else float(t[0])
    half = np.flatnonzero(d > 0.5 * float(d.max()))
    t_bottom = float(t[int(half[-1])])
    return (t_bottom - t_left,
            "derived from the samples: from the last sample at the surface to the last "
            "sample deeper than half the maximum depth (check it against the supervisor's "
            "timed log)")
