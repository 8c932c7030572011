"""One unit system per checklist: what an msw plan and an fsw plan print (no reportlab).

The check JSON keeps its figures in fixed units whatever the plan's system
(free gas in litres ``*_l``, flows in litres per minute ``*_lpm``, gauge
pressures in psig ``*_psig`` or bar ``*_bar``, site figures in metres and
degrees Celsius).  The checklist prints every figure in the plan's system:

============  =====================  ===========================
quantity      msw plan               fsw plan
============  =====================  ===========================
depth         msw                    fsw
free gas      L (at 1 atm)           scf (standard cubic feet)
gas flow      L/min                  scfm (ft³/min at 1 atm)
gauge         bar                    psig
length        m                      ft (with m in parentheses)
temperature   °C                     °F (with °C in parentheses)
============  =====================  ===========================

Conversions (exact by definition): 1 ft = 0.3048 m (international foot,
``supervisor.constants.FT_PER_M``), so 1 ft³ = 28.316846592 L;
1 psi = 0.0689475729 bar (NIST SP 811, ``supervisor.constants.BAR_PER_PSI``);
°F = °C × 9/5 + 32.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from supervisor import constants as C
from supervisor import quantities
from supervisor.report.formatting import MISSING, fmt_number, fmt_quantity, is_number

#: Litres in one cubic foot [L/ft³] (0.3048 m per foot, exact).
L_PER_FT3 = quantities.LITRES_PER_CUBIC_FOOT


@dataclass(frozen=True)
class UnitSystem(quantities.UnitSystem):
    """How one plan's checklist prints figures (the package's unit system, PDF formatting)."""

    def gas(self, litres: object, decimals: int = 0) -> str:
        """Free gas, given in litres, in the plan's system (``"371 scf"``)."""
        if not is_number(litres):
            return fmt_number(litres)
        value = float(litres) / L_PER_FT3 if self.imperial else float(litres)  # type: ignore[arg-type]
        return fmt_quantity(value, self.gas_unit, decimals)

    def flow(self, lpm: object, decimals: int = 0) -> str:
        """A gas flow, given in L/min, in the plan's system."""
        if not is_number(lpm):
            return fmt_number(lpm)
        value = float(lpm) / L_PER_FT3 if self.imperial else float(lpm)  # type: ignore[arg-type]
        return fmt_quantity(value, self.flow_unit, 1 if self.imperial else decimals)

    def gauge(self, value: object, unit: str, decimals: int = 0) -> str:
        """A gauge pressure given in ``unit`` (``"psig"`` or ``"bar"``), in the plan's system."""
        if not is_number(value):
            return fmt_number(value)
        x = float(value)  # type: ignore[arg-type]
        if unit == "psig" and not self.imperial:
            return fmt_quantity(x * C.BAR_PER_PSI, "bar", 1)
        if unit == "bar" and self.imperial:
            return fmt_quantity(x / C.BAR_PER_PSI, "psig", decimals)
        return fmt_quantity(x, unit, decimals)

    def length(self, metres: object, decimals: int = 1) -> str:
        """A length given in metres (site altitude, visibility)."""
        if not is_number(metres):
            return fmt_number(metres)
        m = float(metres)  # type: ignore[arg-type]
        if self.imperial:
            return f"{fmt_number(m * C.FT_PER_M, 0)} ft ({fmt_number(m, decimals)} m)"
        return fmt_quantity(m, "m", decimals)

    def temperature(self, celsius: object) -> str:
        """A water temperature given in degrees Celsius."""
        if not is_number(celsius):
            return fmt_number(celsius)
        c = float(celsius)  # type: ignore[arg-type]
        if self.imperial:
            return f"{fmt_number(c * 9 / 5 + 32, 0)} °F ({fmt_number(c, 1)} °C)"
        return f"{fmt_number(c, 1)} °C"

    def quantity(self, value: object, unit: str | None, decimals: int = 2) -> str:
        """A finding's figure with its unit, in the plan's system, the given one beside it.

        Depths, gauge pressures, free gas and flows stated in the other system
        print converted, with the figure as stated in parentheses: an msw plan
        shows ``"12 bar (174 psig)"`` and ``"39.9 msw (130 fsw)"``; an fsw plan
        ``"371 scf (10503 L)"``.  Any other unit prints as given.  Depth
        conversion is by pressure (1 fsw = 1.01325/33 bar, 1 msw = 0.1 bar,
        ``supervisor.constants``).
        """
        given = fmt_quantity(value, unit, decimals)
        if not is_number(value) or unit is None:
            return given
        x = float(value)  # type: ignore[arg-type]
        shown: str | None = None
        if unit in ("fsw", "msw") and unit != self.depth:
            bar = x * (C.BAR_PER_FSW if unit == "fsw" else C.BAR_PER_MSW)
            other = bar / (C.BAR_PER_FSW if self.depth == "fsw" else C.BAR_PER_MSW)
            shown = fmt_quantity(other, self.depth, 1)
        elif unit in ("psig", "bar") and unit != self.gauge_unit:
            shown = self.gauge(x, unit)
        elif unit == "L" and self.imperial:
            shown = self.gas(x)
        elif unit == "scf" and not self.imperial:
            shown = fmt_quantity(x * L_PER_FT3, "L", 0)
        elif unit == "L/min" and self.imperial:
            shown = self.flow(x)
        elif unit in ("scfm", "acfm") and not self.imperial:
            shown = fmt_quantity(x * L_PER_FT3, "L/min", 0)
        return given if shown is None else f"{shown} ({given})"

    def by_key(self, key: str, value: Any) -> tuple[str, str] | None:
        """A JSON figure named by its unit suffix, as (label unit, printed value).

        ``_l`` free gas, ``_lpm`` flow, ``_psig``/``_bar`` gauge; ``None`` for
        any other key (printed as it is).
        """
        base = key.removesuffix("_rounded")  # "bailout_required_psig_rounded" is a psig figure
        for suffix, kind in (("_lpm", "flow"), ("_psig", "psig"), ("_bar", "bar"),
                             ("_l", "gas")):
            if base.endswith(suffix) and len(base) > len(suffix):
                if kind == "flow":
                    return self.flow_unit, self.flow(value)
                if kind == "gas":
                    return self.gas_unit, self.gas(value)
                return self.gauge_unit, self.gauge(value, kind)
        return None


def unit_system(record: Mapping[str, Any]) -> UnitSystem:
    """The unit system of a checklist record (its plan's ``unit``; msw unless ``fsw``)."""
    return UnitSystem("fsw" if record.get("unit") == "fsw" else "msw")


def fmt_wait(minutes: object) -> str:
    """A wait in hours and minutes, rounded up (``1080`` gives ``"18 h 00 min"``).

    A printed wait is never shorter than the one given; not a number gives
    :data:`~supervisor.report.formatting.MISSING`.
    """
    if not is_number(minutes):
        return MISSING
    total = math.ceil(float(minutes) - 1e-9)  # type: ignore[arg-type]
    return f"{total // 60} h {total % 60:02d} min"
