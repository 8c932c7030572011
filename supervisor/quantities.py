"""Gas quantities in the plan's unit system: one system per plan.

An fsw plan prints gauge pressures in psig, free-gas volumes in scf and flows in
scfm (the Navy's breathing rates in acfm); an msw plan prints bar, litres and
litres per minute.  Inside the package volumes are litres, flows litres per
minute and pressures bar; these helpers convert at the edge.  A figure that a
source states in the other system is shown converted, with the stated figure in
parentheses (:meth:`UnitSystem.stated_psig`).

References
----------
.. [1] NIST Special Publication 811 (2008), Appendix B: 1 ft³ = 0.028316846592 m³,
       1 psi = 6894.757 Pa.
"""

from __future__ import annotations

from dataclasses import dataclass

from supervisor import constants as C

#: Litres in one cubic foot [L/ft³]: the international foot (NIST SP 811), 28.316846592 L.
LITRES_PER_CUBIC_FOOT: float = 1000.0 / C.FT_PER_M**3


@dataclass(frozen=True)
class UnitSystem:
    """Formatting of gas quantities for a plan.

    Parameters
    ----------
    depth : {"fsw", "msw"}
        The plan's depth unit; fsw plans use imperial gas units, msw plans metric.
    """

    depth: str

    @property
    def imperial(self) -> bool:
        """Whether the plan is in fsw (psig, scf)."""
        return self.depth == "fsw"

    @property
    def gas_unit(self) -> str:
        """Free-gas volume unit: ``scf`` or ``L``."""
        return "scf" if self.imperial else "L"

    @property
    def flow_unit(self) -> str:
        """Free-gas flow unit: ``scfm`` or ``L/min``."""
        return "scfm" if self.imperial else "L/min"

    @property
    def gauge_unit(self) -> str:
        """Gauge pressure unit: ``psig`` or ``bar``."""
        return "psig" if self.imperial else "bar"

    def to_gas(self, litres: float) -> float:
        """A free-gas volume [L] in the plan's unit."""
        return litres / LITRES_PER_CUBIC_FOOT if self.imperial else litres

    def to_flow(self, lpm: float) -> float:
        """A free-gas flow [L/min] in the plan's unit."""
        return lpm / LITRES_PER_CUBIC_FOOT if self.imperial else lpm

    def to_gauge(self, bar_gauge: float) -> float:
        """A gauge pressure [bar] in the plan's unit."""
        return bar_gauge / C.BAR_PER_PSI if self.imperial else bar_gauge

    def show_gas(self, litres: float) -> str:
        """``"2010 scf"`` or ``"56909 L"``."""
        return f"{self.to_gas(litres):.0f} {self.gas_unit}"

    def show_flow(self, lpm: float) -> str:
        """``"12.2 scfm"`` or ``"344 L/min"``."""
        v = self.to_flow(lpm)
        return f"{v:.1f} {self.flow_unit}" if self.imperial else f"{v:.0f} {self.flow_unit}"

    def show_rmv(self, lpm: float) -> str:
        """A breathing rate at depth: ``"1.4 acfm"`` or ``"39.6 L/min"``."""
        if self.imperial:
            return f"{lpm / LITRES_PER_CUBIC_FOOT:.1f} acfm"
        return f"{lpm:.1f} L/min"

    def show_pressure(self, bar_gauge: float) -> str:
        """``"2901 psig"`` or ``"200 bar"`` (gauge)."""
        v = self.to_gauge(bar_gauge)
        return f"{v:.0f} psig" if self.imperial else f"{round(v, 1):g} bar"

    def stated_psig(self, psig: float) -> str:
        """A pressure stated in psig: as is for fsw plans, else ``"7.4 bar (108 psig)"``."""
        if self.imperial:
            return f"{psig:.0f} psig"
        return f"{round(psig * C.BAR_PER_PSI, 1):g} bar ({psig:.0f} psig)"

    def stated_scf(self, scf: float) -> str:
        """A volume a source states in scf: as is for fsw plans, else ``"557 L (19.7 scf)"``."""
        if self.imperial:
            return f"{scf:.1f} scf"
        return f"{scf * LITRES_PER_CUBIC_FOOT:.0f} L ({scf:.1f} scf)"


#: What a negative gradient factor means, said wherever one is printed.
NEGATIVE_GF_NOTE = ("below 0 %: the compartment holds less inert gas than the surrounding "
                    "pressure (undersaturated)")


def gf_percent_value(percent: float) -> float:
    """The one rounding of a gradient factor for the record: 0.1 % (the check JSON's figure)."""
    return round(float(percent) + 0.0, 1)


def gf_percent_text(percent: float) -> str:
    """A gradient factor as printed everywhere (text, PDF, chart): whole percent.

    Rounds the record's figure (:func:`gf_percent_value`) half up, so one quantity
    never prints as "166 %" in one place and "165 %" in another.  A negative value
    carries its explanation.

    Parameters
    ----------
    percent : float
        Supersaturation as a percentage of the M-value gradient [%].

    Returns
    -------
    str
        E.g. ``"83 %"``; ``"-12 % (below 0 %: ...)"``.
    """
    from decimal import ROUND_HALF_UP, Decimal

    v = Decimal(repr(gf_percent_value(percent))).quantize(Decimal("1"), ROUND_HALF_UP)
    text = f"{int(v)} %"
    return f"{text} ({NEGATIVE_GF_NOTE})" if v < 0 else text
