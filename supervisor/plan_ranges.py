"""The accepted depth and rate ranges of a plan, as plain numbers.

The reasons for each range are tabled in :mod:`supervisor.plan_fields`, which
re-exports these names for the plan validator and its JSON Schema.  They live here,
without the validation library, so that a command that only needs a range (the
``schedule`` command's rate check) does not import the plan machinery.
"""

from __future__ import annotations

import math

from supervisor.units import convert_pressure

#: Deepest depth a plan may state [fsw]; anything deeper is taken as a typing error.
MAX_PLAN_DEPTH_FSW = 2000.0
#: Slowest and fastest rate a plan may state [fsw/min] (reasons: supervisor.plan_fields).
MIN_RATE_FSW_PER_MIN = 1.0
MAX_RATE_FSW_PER_MIN = 300.0


def _round_down(x: float) -> float:
    return math.floor(x * 10 + 1e-9) / 10


def _to_unit(x_fsw: float, unit: str) -> float:
    return x_fsw if unit == "fsw" else float(convert_pressure(x_fsw, "fsw", "msw"))


def depth_range(unit: str) -> tuple[float, float]:
    """Accepted depths ``(lowest, highest)`` in ``unit`` (``"fsw"`` or ``"msw"``).

    Returns 0 and the deepest accepted depth (the msw figure rounded to 0.1).
    """
    return 0.0, round(_to_unit(MAX_PLAN_DEPTH_FSW, unit), 1)


def rate_range(unit: str) -> tuple[float, float]:
    """Accepted rates ``(slowest, fastest)`` in ``unit``/min (fsw or msw).

    Parameters
    ----------
    unit:
        ``"fsw"`` or ``"msw"``.

    Returns
    -------
    tuple of float
        The slowest (rounded down to 0.1) and fastest (rounded to 0.1) rate.
    """
    if unit == "fsw":
        return MIN_RATE_FSW_PER_MIN, MAX_RATE_FSW_PER_MIN
    return (_round_down(_to_unit(MIN_RATE_FSW_PER_MIN, unit)),
            round(_to_unit(MAX_RATE_FSW_PER_MIN, unit), 1))
