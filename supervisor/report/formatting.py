"""Plain-text formatting of check values for the checklist (no reportlab here).

A missing value never reads as a pass: ``None``, NaN and infinities print as
:data:`NOT_COMPUTED` (whole sections) or :data:`MISSING` (single cells).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

NOT_COMPUTED = "not computed — needs review"
MISSING = "not computed"

SEVERITY_ORDER = {"fail": 0, "warn": 1, "info": 2, "pass": 3}
SEVERITY_LABEL = {"fail": "FAIL", "warn": "WARN", "info": "INFO", "pass": "PASS"}

VERDICT_LABEL = {
    "conforms": "CONFORMS",
    "needs-review": "NEEDS REVIEW",
    "does-not-conform": "DOES NOT CONFORM",
}
_VERDICT_RANK = {"conforms": 0, "needs-review": 1, "does-not-conform": 2}

_UNIT_SUFFIXES = (
    ("_percent", "%"),
    ("_psig", "psig"),
    ("_acfm", "acfm"),
    ("_lpm", "L/min"),
    ("_min", "min"),
    ("_bar", "bar"),
    ("_fsw", "fsw"),
    ("_msw", "msw"),
    ("_ata", "ATA"),
    ("_l", "L"),
    ("_m", "m"),
    ("_kt", "kt"),
)


def is_number(value: object) -> bool:
    """True for a finite int or float (``bool`` excluded)."""
    if isinstance(value, bool) or not isinstance(value, int | float):
        return False
    return math.isfinite(value)


def fmt_number(value: object, decimals: int = 1) -> str:
    """Format a number with at most ``decimals`` decimals, trailing zeros dropped.

    Parameters
    ----------
    value : object
        A number, or anything else (returned as text; ``None`` and
        non-finite numbers give :data:`MISSING`; booleans give yes/no).
    decimals : int
        Largest number of decimals printed.

    Returns
    -------
    str
    """
    if value is None:
        return MISSING
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            return MISSING
        text = f"{value:.{decimals}f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
        return "0" if text in ("-0", "") else text
    return str(value)


def fmt_quantity(value: object, unit: str | None, decimals: int = 1) -> str:
    """Format a value with its unit (``"130 fsw"``); a missing value has no unit."""
    text = fmt_number(value, decimals)
    if text == MISSING or not unit or not is_number(value):
        return text
    if unit == "%":
        return f"{text} %"
    return f"{text} {unit}"


def fmt_stop_depth(value: object) -> str:
    """A stop depth to 0.1 of its unit (``16.6901`` gives ``"16.7"``, ``50.0`` ``"50"``)."""
    return fmt_number(value, 1)


def fmt_stop_minutes(value: object) -> str:
    """Stop minutes: whole minutes as whole numbers, others rounded *up* to 0.1 min.

    A printed stop is never shorter than the computed one (``2.01`` gives
    ``"2.1"``, ``15.0`` gives ``"15"``).
    """
    if not is_number(value):
        return fmt_number(value)
    x = float(value)  # type: ignore[arg-type]
    if abs(x - round(x)) < 1e-9:
        return str(int(round(x)))
    return fmt_number(math.ceil(x * 10 - 1e-9) / 10, 1)


_GAS_SHORT = {"oxygen": "O2", "o2": "O2"}


def fmt_periods(periods: object) -> str | None:
    """A stop's breathing periods, ``"O2 30, air 5, O2 23 min"``; ``None`` if not a list.

    Each period is ``{"gas": str, "minutes": number}``; a period whose
    minutes are not a number prints as not computed.  Minutes are rounded up
    to 0.1 min like stop times (:func:`fmt_stop_minutes`).
    """
    if not isinstance(periods, list) or not periods:
        return None
    parts = []
    for period in periods:
        p = period if isinstance(period, Mapping) else {}
        gas = str(p.get("gas") or MISSING)
        parts.append(f"{_GAS_SHORT.get(gas.lower(), gas)} {fmt_stop_minutes(p.get('minutes'))}")
    return ", ".join(parts) + " min"


def stop_periods(stop: Mapping[str, Any]) -> str | None:
    """A stop's periods in words when it has more than one (air breaks), else ``None``.

    Every stop of the check carries ``periods``; a stop breathed on one gas
    throughout prints as its gas alone.
    """
    periods = stop.get("periods")
    if isinstance(periods, list) and len(periods) == 1:
        return None
    return fmt_periods(periods)


def stops_line(stops: object, unit: str) -> str:
    """A schedule in one line: ``"water 50 fsw 3 min air; chamber 40 fsw 30 min oxygen: ..."``.

    A stop with breathing periods (air breaks) prints them after its gas; a
    schedule that is not a list prints as :data:`NOT_COMPUTED`.
    """
    if not isinstance(stops, list):
        return NOT_COMPUTED
    if not stops:
        return "no decompression stops"
    parts = []
    for stop in stops:
        s = stop if isinstance(stop, Mapping) else {}
        periods = stop_periods(s)
        gas = str(s.get("gas") or MISSING)
        what = f"{gas} ({periods})" if periods else gas
        parts.append(f"{s.get('place') or MISSING} {fmt_stop_depth(s.get('depth'))} {unit} "
                     f"{fmt_stop_minutes(s.get('minutes'))} min {what}")
    return "; ".join(parts)


def fmt_gf(gf_low: object, gf_high: object) -> str:
    """Gradient factors as percent, ``"30/85"`` (fractions or percent accepted)."""

    def pct(v: object) -> str:
        if not is_number(v):
            return "?"
        x = float(v)  # type: ignore[arg-type]
        return fmt_number(x * 100 if x <= 1.0 else x, 0)

    return f"{pct(gf_low)}/{pct(gf_high)}"


def humanize_key(key: str) -> tuple[str, str | None]:
    """Split a JSON key into a printable label and its unit.

    ``"need_l"`` gives ``("need", "L")``; ``"surfacing_gf_percent"`` gives
    ``("surfacing gf", "%")``.
    """
    for suffix, unit in _UNIT_SUFFIXES:
        if key.endswith(suffix) and len(key) > len(suffix):
            return key[: -len(suffix)].replace("_", " "), unit
    return key.replace("_", " "), None


def flatten(mapping: Mapping[str, Any], prefix: str = "") -> list[tuple[str, Any]]:
    """Flatten nested mappings into ``("a.b", value)`` pairs, in key order."""
    pairs: list[tuple[str, Any]] = []
    for key, value in mapping.items():
        name = f"{prefix}{key}"
        if isinstance(value, Mapping):
            inner = flatten(value, f"{name}.")
            pairs.extend(inner if inner else [(name, None)])
        else:
            pairs.append((name, value))
    return pairs


def fmt_scalar(value: object) -> str:
    """Format any JSON value for a key/value table of extra details.

    ``None`` prints as an em dash (the source gave no value); a list of stops
    prints as ``depth/minutes gas place`` entries; other mappings as
    ``key value`` pairs.
    """
    if value is None:
        return "—"
    if isinstance(value, Mapping):
        if "depth" in value and "minutes" in value:
            parts = [fmt_stop_depth(value.get("depth")), "/",
                     fmt_stop_minutes(value.get("minutes"))]
            extra = " ".join(str(value[k]) for k in ("gas", "place") if value.get(k))
            return "".join(parts) + (f" {extra}" if extra else "")
        return ", ".join(f"{k} {fmt_scalar(v)}" for k, v in value.items()) or "none"
    if isinstance(value, list):
        return "; ".join(fmt_scalar(v) for v in value) if value else "none"
    if isinstance(value, float | int) and not isinstance(value, bool):
        return fmt_number(value, 2)
    return fmt_number(value)


def severity_rank(severity: object) -> int:
    """Sort key: fail, warn, info, pass; anything unknown sorts with warn."""
    return SEVERITY_ORDER.get(str(severity), 1)


def severity_label(severity: object) -> str:
    """Printed label of a severity (an unknown one is printed as given, upper case)."""
    return SEVERITY_LABEL.get(str(severity), str(severity).upper() or "UNKNOWN")


def count_findings(findings: list[Mapping[str, Any]]) -> dict[str, int]:
    """Count findings by severity; an unknown severity counts as a warning."""
    counts = {"fail": 0, "warn": 0, "info": 0, "pass": 0}
    for finding in findings:
        severity = str(finding.get("severity"))
        counts[severity if severity in counts else "warn"] += 1
    return counts


def effective_verdict(verdict: object, counts: Mapping[str, int]) -> tuple[str, bool]:
    """The verdict to print: the worse of the stated one and the one the counts imply.

    Parameters
    ----------
    verdict : object
        The check's ``verdict`` (may be missing or unknown).
    counts : mapping
        Findings counted by :func:`count_findings`.

    Returns
    -------
    tuple
        The verdict key (``"conforms"``, ``"needs-review"``,
        ``"does-not-conform"``) and whether it differs from the stated one.
        A missing or unknown stated verdict is at best ``"needs-review"``.
    """
    implied = "conforms"
    if counts.get("warn", 0):
        implied = "needs-review"
    if counts.get("fail", 0):
        implied = "does-not-conform"
    stated = str(verdict) if verdict in _VERDICT_RANK else "needs-review"
    chosen = max(stated, implied, key=_VERDICT_RANK.__getitem__)
    return chosen, chosen != verdict


def short_hash(hex_digest: str, n: int = 16) -> str:
    """First ``n`` hex digits of a digest, for page footers."""
    return hex_digest[:n]
