"""Clock times of a treatment: ``HH:MM`` in, ``HH:MM`` (and seconds when needed) out.

A treatment starts at a clock time and runs for hours, often across midnight.
Inside the package times are minutes after the start; at the edges they are
clock times with a day offset (0 the start day, 1 the next day ...).  Seconds
are shown only when a time is not a whole minute (a 2.25-min ascent).
"""

from __future__ import annotations

import math
import re

from supervisor.errors import InputError
from supervisor.text import excerpt

_CLOCK = re.compile(r"^\s*(\d{1,2}):(\d{2})(?::(\d{2}))?\s*$")
#: Accepted form of a clock time, for error messages.
CLOCK_FORM = "a clock time HH:MM from 00:00 to 23:59"
DAY_MIN = 24 * 60


def parse_clock(text: object, field: str = "--start", seconds: bool = False) -> float:
    """Read a clock time.

    Parameters
    ----------
    text : object
        ``"HH:MM"`` (``"HH:MM:SS"`` when ``seconds``); a TOML time is accepted too.
    field : str
        Name of the option or field, for the error message.
    seconds : bool
        Accept seconds.

    Returns
    -------
    float
        Minutes after midnight [min], 0 <= t < 1440.

    Raises
    ------
    InputError
        For anything else, naming ``field`` and the accepted form.
    """
    import datetime as dt

    if isinstance(text, dt.time):
        return text.hour * 60 + text.minute + text.second / 60.0
    form = CLOCK_FORM + (" (HH:MM:SS allowed)" if seconds else "")
    if not isinstance(text, str):
        raise InputError(field, f"got {excerpt(text)}; expected {form}")
    m = _CLOCK.match(text)
    if not m or (m.group(3) is not None and not seconds):
        raise InputError(field, f"got {excerpt(text)}; expected {form}")
    h, mi, s = int(m.group(1)), int(m.group(2)), int(m.group(3) or 0)
    if h > 23 or mi > 59 or s > 59:
        raise InputError(field, f"got {excerpt(text)}; expected {form}")
    return h * 60 + mi + s / 60.0


def split_clock(minutes_after_midnight: float) -> tuple[str, int]:
    """Return ``("HH:MM", day)`` or ``("HH:MM:SS", day)`` for a time counted from midnight.

    Parameters
    ----------
    minutes_after_midnight : float
        Time after midnight of the start day [min], >= 0.

    Returns
    -------
    tuple
        The clock text and the day offset (0 the start day).
    """
    total_s = int(round(minutes_after_midnight * 60.0))
    day, rest = divmod(total_s, DAY_MIN * 60)
    h, rest = divmod(rest, 3600)
    m, s = divmod(rest, 60)
    text = f"{h:02d}:{m:02d}" + (f":{s:02d}" if s else "")
    return text, int(day)


def clock_label(minutes_after_midnight: float) -> str:
    """``"HH:MM"``, with ``" (+1 d)"`` on the days after the start day."""
    text, day = split_clock(minutes_after_midnight)
    return text if day == 0 else f"{text} (+{day} d)"


def hours_minutes(minutes: float) -> str:
    """A duration as ``"4 h 45 min"`` (seconds shown as a decimal minute)."""
    if not math.isfinite(minutes):
        return "unlimited"
    h, m = divmod(round(minutes * 100) / 100, 60)
    m_text = f"{m:g}" if m != int(m) else f"{int(m)}"
    return f"{int(h)} h {m_text} min" if h else f"{m_text} min"
