"""Breathing-gas mixtures of oxygen, helium and nitrogen.

A gas is written ``air``, ``oxygen`` (or ``o2``), ``nitrox32``, or as ``O2/He``
percentages such as ``32/0``, ``16/84`` or ``18/45`` (nitrogen is the rest).

References
----------
.. [1] Dalton's law of partial pressures.
.. [2] NOAA Diving Manual, 4th ed., §16.3: equivalent narcotic depth with the
       non-helium fraction counted narcotic.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from supervisor import constants as C
from supervisor.errors import InputError

_TOL = 1e-9


@dataclass(frozen=True)
class Gas:
    """A breathing gas given by its oxygen and helium fractions; nitrogen is the rest.

    Parameters
    ----------
    fo2 : float
        Oxygen fraction [-], 0 < fo2 <= 1.
    fhe : float
        Helium fraction [-], 0 <= fhe, fo2 + fhe <= 1.
    """

    fo2: float
    fhe: float = 0.0

    def __post_init__(self) -> None:
        if not (0.0 < self.fo2 <= 1.0 + _TOL):
            raise InputError("gas", f"oxygen fraction {self.fo2!r} must be in (0, 1]")
        if not (0.0 <= self.fhe <= 1.0 + _TOL):
            raise InputError("gas", f"helium fraction {self.fhe!r} must be in [0, 1]")
        if self.fo2 + self.fhe > 1.0 + _TOL:
            raise InputError(
                "gas",
                f"O2 {self.fo2 * 100:g} % + He {self.fhe * 100:g} % is over 100 %; "
                "write O2/He percentages that add up to 100 or less",
            )

    @property
    def fn2(self) -> float:
        """Nitrogen fraction [-] (the rest of the mixture)."""
        return max(0.0, 1.0 - self.fo2 - self.fhe)

    @property
    def name(self) -> str:
        """Canonical name: ``air``, ``oxygen`` or ``O2/He`` percentages."""
        if abs(self.fo2 - C.FO2_AIR) < _TOL and self.fhe == 0.0:
            return "air"
        if abs(self.fo2 - 1.0) < _TOL:
            return "oxygen"
        return f"{_pct(self.fo2)}/{_pct(self.fhe)}"

    def __str__(self) -> str:
        return self.name


def _pct(x: float) -> str:
    return f"{x * 100:.10g}"


AIR = Gas(C.FO2_AIR, 0.0)
OXYGEN = Gas(1.0, 0.0)

_MIX = re.compile(r"^\s*(\d+(?:\.\d+)?)\s*/\s*(\d+(?:\.\d+)?)\s*$")
_NITROX = re.compile(r"^\s*(?:nitrox|ean|eanx)\s*(\d+(?:\.\d+)?)\s*$", re.IGNORECASE)


def parse_gas(text: str, field: str = "gas") -> Gas:
    """Parse a gas written ``air``, ``oxygen``, ``nitrox32`` or ``O2/He`` percentages.

    Parameters
    ----------
    text : str
        Gas text.
    field : str
        Name of the input field, used in error messages.

    Returns
    -------
    Gas
        The mixture.

    Raises
    ------
    InputError
        If the text is not a known gas or the fractions do not add up.
    """
    if isinstance(text, Gas):
        return text
    if not isinstance(text, str):
        raise InputError(field, f"got {text!r}; expected a gas such as air, oxygen, 32/0 or 16/84")
    t = text.strip().lower()
    if t == "air":
        return AIR
    if t in ("oxygen", "o2", "100/0"):
        return OXYGEN
    m = _NITROX.match(t)
    if m:
        fo2 = float(m.group(1)) / 100.0
        return _checked(fo2, 0.0, field, text)
    m = _MIX.match(t)
    if m:
        return _checked(float(m.group(1)) / 100.0, float(m.group(2)) / 100.0, field, text)
    raise InputError(
        field,
        f"unknown gas {text!r}; expected air, oxygen, nitroxNN or O2/He percentages "
        "such as 32/0, 16/84 or 18/45",
    )


def _checked(fo2: float, fhe: float, field: str, text: str) -> Gas:
    try:
        return Gas(fo2, fhe)
    except InputError as exc:
        raise InputError(field, f"{text!r}: {exc.message}") from None


def partial_pressure(p_amb_bar: ArrayLike, fraction: ArrayLike):
    """Partial pressure of a gas component by Dalton's law [1].

    Parameters
    ----------
    p_amb_bar : array_like
        Absolute ambient pressure [bar].
    fraction : array_like
        Fraction of the component in the breathing gas [-].

    Returns
    -------
    ndarray or float
        Partial pressure [bar].
    """
    out = np.asarray(p_amb_bar, dtype=float) * np.asarray(fraction, dtype=float)
    return float(out) if out.ndim == 0 else out
