"""An audited dive as records: the ``dive`` record and its ``audit`` record.

The dive record keeps what the regulations ask of the record of a dive
(29 CFR 1910.423(d); 46 CFR 197.482): the executed profile, the table and
schedule used, the repetitive designation or the time since the last exposure.
Where the log does not say them, the table is the policy's reference table (or
the model and gradient factors when it names none) and the schedule is the
approved dive's depth and bottom time, each marked as taken from the plan.  The
audit record holds the findings in the check's form, the verdict and the
executed and required figures.  Both are built as callables for
:meth:`supervisor.records.store.RecordStore.append_batch`, so the dive, its
audit (and the plan, when it is not yet on record) go into one transaction.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from supervisor.audit.result import AuditResult
from supervisor.errors import InputError
from supervisor.records.importers.common import ImportedLog
from supervisor.records.store import NewRecord, StoredRecord

Item = Callable[[list[StoredRecord]], NewRecord]


@dataclass(frozen=True)
class Exposure:
    """The repetitive status given on the command line (a timed log states its own)."""

    group: str | None = None
    hours_since_last: float | None = None
    no_exposure_24h: bool = False


def _table(result: AuditResult, meta: dict[str, Any]) -> tuple[str, str]:
    if meta.get("table"):
        return str(meta["table"]), "from the log"
    pol = result.ctx.policy
    if pol.reference_table:
        return str(pol.reference_table), "the policy's reference table (the log names none)"
    return (f"{pol.model} GF {pol.gf_low:g}/{pol.gf_high:g}",
            "the policy's model (the log names no table)")


def dive_items(log: ImportedLog, result: AuditResult, exposure: Exposure, job: str,
               plan_seq: Callable[[list[StoredRecord]], int]) -> list[Item]:
    """The dive record and its audit record, as batch items.

    Parameters
    ----------
    log : ImportedLog
        The log audited (with ``started_at`` set).
    result : AuditResult
        Its audit.
    exposure : Exposure
        Repetitive status from the command line, where the log gives none.
    job : str
        Job reference.
    plan_seq : callable
        Given the records written so far in the batch, the plan record's number.

    Returns
    -------
    list of callable
        Two items: the dive record, then the audit record referring to it.

    Raises
    ------
    InputError
        If the repetitive status is missing or contradicts the log, or the log
        has no start time.
    """
    from supervisor.records.kinds import audit_record, dive_record

    meta = log.meta
    ctx = result.ctx
    group = exposure.group or meta.get("repetitive_group")
    since = (exposure.hours_since_last if exposure.hours_since_last is not None
             else meta.get("hours_since_last_exposure"))
    none24 = exposure.no_exposure_24h or bool(meta.get("no_exposure_24h"))
    for option, given, key in (("--group", exposure.group, "repetitive_group"),
                               ("--since-last", exposure.hours_since_last,
                                "hours_since_last_exposure")):
        held = meta.get(key)
        if given is not None and held is not None and given != held:
            raise InputError(option, f"{given!r} differs from the log's {key} {held!r}")
    if log.started_at is None:
        raise InputError("--started", "the log has no clock times; give the date and time it "
                                      "starts (e.g. 2031-05-14T09:00): the record of dive is "
                                      "dated (29 CFR 1910.423(d)(1); 46 CFR 197.482)")
    table, table_basis = _table(result, meta)
    schedule = meta.get("schedule") or {"depth": float(ctx.dive.max_depth),
                                        "bottom_time_min": float(ctx.dive.bottom_time_min)}
    diver = str(meta.get("diver") or ctx.dive.diver)
    # raises now (before anything is written) when the repetitive status is missing
    dive_record(log, dive=ctx.dive.id, diver=diver, table=table, schedule=schedule,
                repetitive_group=group, hours_since_last_exposure=since,
                no_exposure_24h=none24, ref=job, plan_seq=None, mode=ctx.dive.mode)
    audit = result.to_json()
    extra = {k: audit[k] for k in ("plan_sha256", "dive", "executed", "required_schedule",
                                   "cautions")}
    extra["table_basis"] = table_basis
    extra["schedule_basis"] = "from the log" if meta.get("schedule") else \
        "the approved dive's depth and bottom time (the log names no schedule)"

    def dive(done: list[StoredRecord]) -> NewRecord:
        return dive_record(log, dive=ctx.dive.id, diver=diver, table=table, schedule=schedule,
                           repetitive_group=group, hours_since_last_exposure=since,
                           no_exposure_24h=none24, ref=job, plan_seq=plan_seq(done),
                           mode=ctx.dive.mode)

    def audited(done: list[StoredRecord]) -> NewRecord:
        return audit_record(done[-1], audit["findings"], verdict=audit["verdict"], extra=extra)

    return [dive, audited]
