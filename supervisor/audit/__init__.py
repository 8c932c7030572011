"""The audit: the executed dive, from its log, against the approved plan.

``supervisor audit LOG --plan PLAN`` reads a log with the record store's
importers and the plan with the plan reader, and answers in the check's form
(findings, counts, verdict; ``supervisor.audit/1``).  Modules, one job each:

==============  ================================================================
``executed``    the executed profile from a log, as arrays in the plan's unit
``rates``       descent and ascent rates over a sliding window
``stops``       stops against the approved stops (omitted decompression)
``surd``        the surface interval of surface decompression
``oxygen``      oxygen exposure as breathed
``margin``      model margin of the executed profile
``required``    the schedule the actual exposure requires (table and model)
``logfacts``    gaps in the log, the diver
``context``     what the rules read; the rule family
``run``         the plan read once, many logs audited in batches
``result``      the result, its verdict and JSON
==============  ================================================================
"""

from __future__ import annotations

from supervisor.audit.executed import Executed, from_log, from_samples
from supervisor.audit.result import SCHEMA, AuditResult
from supervisor.audit.run import Item, audit_many, audit_one, prepare

__all__ = ["SCHEMA", "AuditResult", "Executed", "Item", "audit_many", "audit_one", "from_log",
           "from_samples", "prepare"]
