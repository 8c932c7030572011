"""The policy's PO2 limits of a check, per phase, in ata, with who chose them.

The oxygen and gas rules (``oxygen-po2-*``, ``gas-mod``) read their limits here, so
that both judge one PO2 the same way:

* a limit the contractor states (``policy.po2_<phase>_max_ata``, or the older bar
  key) fails when exceeded;
* the bottom default, 1.4 ata (NOAA working maximum), is a default the contractor did
  not choose: above it warns; it fails only above the in-water limit;
* the in-water decompression default, 1.6 ata (commercial practice, from memory),
  guards against oxygen convulsion in the water and fails when exceeded, except that
  where the policy's reference table itself prescribes oxygen deeper in the water
  (the air/oxygen tables breathe oxygen from 30 fsw / 9 msw, 1.9 ata) the default is
  that table's own oxygen PO2;
* the chamber default, 2.8 ata (Navy treatment practice, OLDER-EDITION), fails.

Every comparison tolerates :data:`supervisor.engine.oxygen.PO2_TOLERANCE_ATM`
(0.01 atm): the trade's standard oxygen depths (20 fsw / 6 msw in the water) never
fail through the rounding of a depth convention.

References
----------
.. [1] NOAA, nitrox no-decompression tables, working maximum PO2 1.4 ATA (NOAA
       Office of Marine and Aviation Operations).
.. [2] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 21: treatment oxygen
       at 2.8 ata (OLDER-EDITION).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from supervisor import constants as C
from supervisor.engine.oxygen import PO2_TOLERANCE_ATM
from supervisor.gas import OXYGEN, inspired_po2
from supervisor.plan import PO2_DEFAULTS_ATA, Policy

#: Where each phase's default PO2 limit comes from (printed with the finding).
DEFAULT_SOURCES: dict[str, str] = {
    "bottom": "NOAA working maximum 1.4 ATA (NOAA Diving Manual; VERIFIED), a default the "
    "contractor did not choose",
    "decompression": "commercial practice, from memory; guards against oxygen convulsion "
    "in the water",
    "chamber": "U.S. Navy treatment practice 2.8 ata (U.S. Navy Diving Manual Rev 4 Change A; "
    "OLDER-EDITION); guards against oxygen convulsion in the chamber",
}
PHASE_KEYS: dict[str, str] = {
    "bottom": "po2_bottom_max_ata",
    "decompression": "po2_decompression_max_ata",
    "chamber": "po2_chamber_max_ata",
}


@dataclass(frozen=True)
class Po2Limit:
    """The PO2 limits of one phase [ata].

    Attributes
    ----------
    phase : {"bottom", "decompression", "chamber"}
    fail_ata : float
        A PO2 above it (plus the tolerance) fails.
    warn_ata : float or None
        A PO2 above it (plus the tolerance) warns; None when there is no warning step.
    own : bool
        The contractor states the limit in the policy.
    basis : str
        Where the limit comes from, for the finding's text.
    """

    phase: str
    fail_ata: float
    warn_ata: float | None
    own: bool
    basis: str

    @property
    def key(self) -> str:
        """The policy key of the limit."""
        return PHASE_KEYS[self.phase]

    @property
    def citation(self) -> str:
        """The finding's citation."""
        return f"contractor policy (policy.{self.key})"

    def judge(self, po2_ata: float) -> str:
        """``"fail"``, ``"warn"`` or ``"pass"`` for a PO2 [ata]."""
        if po2_ata > self.fail_ata + PO2_TOLERANCE_ATM:
            return "fail"
        if self.warn_ata is not None and po2_ata > self.warn_ata + PO2_TOLERANCE_ATM:
            return "warn"
        return "pass"

    def limit_for(self, severity: str) -> float:
        """The limit a finding of ``severity`` reports [ata]."""
        return self.warn_ata if severity == "warn" and self.warn_ata is not None \
            else self.fail_ata


def table_oxygen_po2_ata(table: Any) -> float | None:
    """PO2 of the deepest in-water oxygen stop a decompression table prescribes [ata].

    Parameters
    ----------
    table : supervisor.references.Table or None
        The policy's reference table.

    Returns
    -------
    float or None
        Oxygen at that stop at sea level (Dalton's law, dry gas) [ata]; None when the
        table has no in-water oxygen stop (or is not a decompression table).
    """
    model = getattr(table, "model", None)
    if model is None or getattr(model, "kind", None) != "decompression":
        return None
    depths = [s.depth for row in model.rows for sched in row.schedules().values()
              for s in sched.stops if s.place == "water" and s.gas == "oxygen"]
    if not depths:
        return None
    unit = model.conventions.depth_unit
    return float(inspired_po2(max(depths), OXYGEN, unit)) / C.P_ATM_BAR


def _stated(policy: Policy, phase: str) -> float | None:
    return policy.po2_limit_ata(phase) if policy.po2_stated(phase) else None


def po2_limit(policy: Policy, phase: str, table: Any = None) -> Po2Limit:
    """The PO2 limits of ``phase`` under the plan's own (unresolved) ``policy``.

    Parameters
    ----------
    policy : Policy
        The plan's policy as written (``plan.policy``: what it states is the
        contractor's own).
    phase : {"bottom", "decompression", "chamber"}
    table : supervisor.references.Table, optional
        The policy's reference table; its in-water oxygen stops raise the in-water
        default (module docstring).

    Returns
    -------
    Po2Limit
    """
    own = _stated(policy, phase)
    if own is not None:
        return Po2Limit(phase, own, None, True,
                        f"policy.{PHASE_KEYS[phase]}, the contractor's own")
    default = PO2_DEFAULTS_ATA[phase]
    basis = f"default {default:g} ata: {DEFAULT_SOURCES[phase]}"
    if phase == "chamber":
        return Po2Limit(phase, default, None, False, basis)
    if phase == "bottom":
        water = _stated(policy, "decompression")
        ceiling = PO2_DEFAULTS_ATA["decompression"] if water is None else water
        return Po2Limit(phase, max(ceiling, default), default, False,
                        basis + f"; fails above the in-water limit {max(ceiling, default):g} ata")
    table_po2 = table_oxygen_po2_ata(table)
    if table_po2 is not None and table_po2 > default:
        name = getattr(table, "name", "the reference table")
        return Po2Limit(phase, float(np.round(table_po2, 3)), None, False,
                        basis + f", raised to {table_po2:.2f} ata, the oxygen PO2 of the "
                        f"deepest in-water oxygen stop of {name}, the policy's table")
    return Po2Limit(phase, default, None, False, basis)
