"""Rule families: one module per family, each a :class:`~supervisor.rules.base.Family`.

``FAMILIES`` lists the families the check runs, in report order.  To add a family:

1. write ``supervisor/rules/<name>.py`` with ``FAMILY = Family("<name>", "<title>")``
   and its rules (see :mod:`supervisor.rules.base`);
2. import it here and append ``<module>.FAMILY`` to ``FAMILIES``;
3. if the family's name is a key of ``supervisor.check.EXPECTED_FAMILIES``, its
   "not checked" warning disappears by itself once the family is registered.
"""

from __future__ import annotations

from supervisor.rules import (
    contingency,
    exposure,
    gas,
    model,
    oxygen,
    procedure,
    references,
    regulatory,
    site,
    supply,
    tables,
    team,
    uscg,
)
from supervisor.rules.base import CheckContext, Family, Rule

FAMILIES: tuple[Family, ...] = (
    regulatory.FAMILY,
    uscg.FAMILY,
    procedure.FAMILY,
    team.FAMILY,
    site.FAMILY,
    tables.FAMILY,
    model.FAMILY,
    oxygen.FAMILY,
    gas.FAMILY,
    supply.FAMILY,
    exposure.FAMILY,
    contingency.FAMILY,
    references.FAMILY,  # last: it reads the references and rules of the others
)

__all__ = ["FAMILIES", "CheckContext", "Family", "Rule"]
