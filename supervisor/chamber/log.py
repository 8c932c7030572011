"""A treatment as run, against its plan: ``supervisor treatment log PLANFILE EVENTS``.

PLANFILE is the JSON of ``supervisor treatment plan --json`` or a TOML treatment
plan (:func:`supervisor.chamber.treatment.load_request_file`); the plan is rebuilt
from its inputs with the bundled table, with the extensions actually run.
EVENTS is a TOML file of what happened (schema ``supervisor.treatment-events/1``)::

    schema = "supervisor.treatment-events/1"
    start = "21:42"                  # the chamber left the surface (HH:MM or HH:MM:SS)
    [extensions]                     # optional: extensions actually run (default: as planned)
    oxygen = 0
    air = 1
    decided_by = "..."               # optional
    [[steps]]                        # one per line of the timeline as run, in order
    end = "21:45"                    # when the line ended; it started when the one before ended
    start = "21:45"                  # optional: only to record a gap before this line
    depth = 60                       # optional cross-checks of the line (end depth, gas)
    gas = "oxygen"
    patient = "..."                  # optional: the patient's state at the end of the line
    relief = "none"                  # optional: none | partial | full | worse
    note = "..."
    [[interruptions]]                # optional: oxygen taken off and put back on
    start = "22:20"
    end = "22:38"
    cause = "oxygen-symptom"         # oxygen-symptom | convulsion | equipment | other
    symptoms_gone = "22:22"          # for oxygen-symptom and convulsion
    [[readings]]                     # optional: chamber atmosphere
    at = "22:30"
    oxygen_percent = 21.8
    co2_percent_sev = 0.3
    temperature_f = 78

Clock times are in time order; a time earlier than the one before it is on the
next day.  Every deviation is a finding in the check's form (rule id, severity,
measured, limit, citation, status): ``fail`` where a default guards against
immediate harm (an ascent faster than the table's rate, chamber oxygen above the
fire limit or below 19 %, carbon dioxide above its limit), otherwise ``warn``
(the steps are from memory or an older edition) or ``info``.  The clock is read
to the minute, so durations are compared with a tolerance of half a minute.
"""

from __future__ import annotations

import datetime as dt
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from supervisor import __version__
from supervisor.chamber.atmosphere import judge_reading
from supervisor.chamber.attendant import attendant_oxygen
from supervisor.chamber.catalogue import load_treatment
from supervisor.chamber.cautions import treatment_cautions
from supervisor.chamber.clock import parse_clock, split_clock
from supervisor.chamber.procedures import rules_for
from supervisor.chamber.timeline import Timeline, TimelineLine, build_timeline
from supervisor.chamber.treatment import TABLE_CITE, TreatmentRequest, load_request_file
from supervisor.errors import InputError
from supervisor.findings import Finding, counts, sort_findings, verdict
from supervisor.text import excerpt

SCHEMA = "supervisor.treatment-log/1"
EVENTS_SCHEMA = "supervisor.treatment-events/1"
#: Clock read to the minute: durations agree within this [min].
TOLERANCE_MIN = 0.5
R4 = "U.S. Navy Diving Manual, Revision 4 Change A (2001)"
DECISION = f"{R4}, Figure 21-5 (p. 21-38), treatment of gas embolism and decompression sickness"

_STRICT = ConfigDict(extra="forbid", str_strip_whitespace=True)
Clock = str | dt.time


class _Step(BaseModel):
    model_config = _STRICT
    end: Clock
    start: Clock | None = None
    depth: float | None = Field(None, ge=0, le=400)
    gas: str | None = None
    patient: str = Field("", max_length=500)
    relief: Literal["none", "partial", "full", "worse"] | None = None
    note: str = Field("", max_length=500)


class _Interruption(BaseModel):
    model_config = _STRICT
    start: Clock
    end: Clock
    cause: Literal["oxygen-symptom", "convulsion", "equipment", "other"]
    symptoms_gone: Clock | None = None
    note: str = Field("", max_length=500)


class _Reading(BaseModel):
    model_config = _STRICT
    at: Clock
    oxygen_percent: float | None = Field(None, ge=0, le=100)
    co2_percent_sev: float | None = Field(None, ge=0, le=100)
    temperature_f: float | None = Field(None, ge=-40, le=200)


class _Extensions(BaseModel):
    model_config = _STRICT
    oxygen: int = Field(0, ge=0, le=20)
    air: int = Field(0, ge=0, le=20)
    decided_by: str = Field("", max_length=200)


class _Events(BaseModel):
    model_config = _STRICT
    schema_: Literal["supervisor.treatment-events/1"] = Field(alias="schema")
    start: Clock
    operator: str = Field("", max_length=200)
    attendant: str = Field("", max_length=200)
    patient: str = Field("", max_length=200)
    extensions: _Extensions | None = None
    steps: list[_Step] = Field(min_length=1, max_length=500)
    interruptions: list[_Interruption] = Field(default_factory=list, max_length=100)
    readings: list[_Reading] = Field(default_factory=list, max_length=1000)


def _loc(loc: tuple[Any, ...]) -> str:
    out = ""
    for p in loc:
        if isinstance(p, int):
            out += f"[{p + 1}]"
        elif p in ("str", "time", "function-after") or str(p).startswith("literal"):
            continue
        else:
            out += ("." if out else "") + str(p)
    return out or "EVENTS"


def read_events(path: str | Path) -> _Events:
    """Read and check an EVENTS file (module docstring).

    Raises
    ------
    InputError
        ``EVENTS: FIELD`` naming the first problem and the accepted form.
    """
    p = Path(path)
    try:
        doc = tomllib.loads(p.read_text("utf-8"))
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("EVENTS", f"{p}: cannot be read ({exc})") from None
    except tomllib.TOMLDecodeError as exc:
        raise InputError("EVENTS", f"{p}: not valid TOML ({exc})") from None
    try:
        ev = _Events.model_validate(doc)
    except ValidationError as exc:
        errs = exc.errors(include_url=False)
        # a misspelt key explains the missing one: report it first
        e = sorted(errs, key=lambda x: x["type"] != "extra_forbidden")[0]
        where = _loc(tuple(e["loc"]))
        msg = e["msg"].removeprefix("Value error, ")
        if e["type"] == "extra_forbidden":
            msg = ("unknown key (a typo?); see the EVENTS format in "
                   "`supervisor treatment log --help`")
        elif e["type"] == "missing":
            msg = "missing; this field is required"
        else:
            msg = f"got {excerpt(e.get('input'))}; {msg[:1].lower()}{msg[1:]}"
        raise InputError(f"EVENTS: {where}", msg) from None
    for k, s in enumerate(ev.steps, start=1):
        for name in ("end", "start"):
            v = getattr(s, name)
            if v is not None:
                parse_clock(v, f"EVENTS: steps[{k}].{name}", seconds=True)
        if s.gas is not None:
            from supervisor.gas import parse_gas
            parse_gas(s.gas, f"EVENTS: steps[{k}].gas")
    return ev


class _Clock:
    """Turn clock times in time order into minutes after the actual start (next day on wrap)."""

    def __init__(self, start: Clock) -> None:
        self.origin = parse_clock(start, "EVENTS: start", seconds=True)
        self.last = 0.0

    def rel(self, value: Clock, field: str, monotone: bool = True) -> float:
        t = parse_clock(value, field, seconds=True) - self.origin
        base = self.last if monotone else 0.0
        while t < base - 1e-9:
            t += 1440.0
        if monotone:
            self.last = t
        return t


@dataclass
class LoggedLine:
    """One planned line and what was recorded for it."""

    planned: TimelineLine
    start_min: float | None = None
    end_min: float | None = None
    interrupted_min: float = 0.0
    patient: str = ""
    relief: str | None = None
    note: str = ""
    rules: list[str] = field(default_factory=list)

    @property
    def actual_min(self) -> float | None:
        """Recorded duration [min]."""
        if self.start_min is None or self.end_min is None:
            return None
        return self.end_min - self.start_min


@dataclass
class TreatmentLog:
    """A treatment as run against its plan (module docstring)."""

    request: TreatmentRequest
    timeline: Timeline
    actual_start_clock: float
    lines: list[LoggedLine]
    findings: list[Finding]
    events: _Events
    attendant_periods: list[dict[str, Any]]
    cautions: list[str]

    @property
    def verdict(self) -> str:
        """The verdict of the findings."""
        return verdict(self.findings)

    def to_json(self) -> dict[str, Any]:
        """The ``supervisor.treatment-log/1`` object."""
        tl = self.timeline
        c = tl.table.model.conventions

        def clock(t: float | None) -> dict[str, Any] | None:
            if t is None:
                return None
            text, day = split_clock(self.actual_start_clock + t)
            return {"clock": text, "day": day, "min": round(t, 4)}

        fs = sort_findings(self.findings)
        return {
            "schema": SCHEMA, "tool_version": __version__,
            "generated_at": dt.datetime.now(dt.UTC).replace(microsecond=0).isoformat(),
            "inputs": self.request.to_json(),
            "table": {"number": tl.number, "name": tl.table.name,
                      "citation": c.citation or f"{TABLE_CITE}, Treatment Table {tl.number}",
                      "source_status": tl.status},
            "unit": tl.unit,
            "planned_start": split_clock(tl.start_clock)[0],
            "actual_start": split_clock(self.actual_start_clock)[0],
            "extensions": tl.extensions.to_json(),
            "operator": self.events.operator, "attendant": self.events.attendant,
            "patient": self.events.patient,
            "lines": [{
                "line": x.planned.line, "role": x.planned.role,
                "from_depth": x.planned.from_depth, "to_depth": x.planned.to_depth,
                "gas": x.planned.gas, "planned_min": round(x.planned.minutes, 4),
                "actual_start": clock(x.start_min), "actual_end": clock(x.end_min),
                "actual_min": None if x.actual_min is None else round(x.actual_min, 4),
                "interrupted_min": round(x.interrupted_min, 4), "patient": x.patient,
                "relief": x.relief, "note": x.note, "deviations": x.rules}
                for x in self.lines],
            "attendant_oxygen": self.attendant_periods,
            "verdict": self.verdict, "counts": counts(fs),
            "findings": [f.to_json() for f in fs],
            "cautions": list(self.cautions),
        }


def _f(rule: str, severity: str, message: str, citation: str, status: str | None,
       measured: Any = None, limit: Any = None, unit: str | None = None,
       verified: bool = False) -> Finding:
    return Finding(rule, severity, message, measured, limit, unit, citation, None,  # type: ignore[arg-type]
                   status, verified, "treatment-log")


def _rule(number: str, rule_id: str) -> Any:
    for r in rules_for(number):
        if r.rule == rule_id:
            return r
    return None


def log_treatment(planfile: str | Path, events_file: str | Path) -> TreatmentLog:
    """Compare a treatment as run with its plan (module docstring).

    Raises
    ------
    InputError
        ``PLANFILE`` / ``EVENTS: FIELD`` for files that cannot be read or checked.
    """
    req = load_request_file(planfile)
    ev = read_events(events_file)
    table = load_treatment(req.table)
    planned_ext = {"oxygen": req.extend_oxygen, "air": req.extend_air}
    run_ext = planned_ext if ev.extensions is None else {"oxygen": ev.extensions.oxygen,
                                                         "air": ev.extensions.air}
    planned = build_timeline(table, req.start, planned_ext)
    tl = build_timeline(table, req.start, run_ext, beyond_limit=True)
    clk = _Clock(ev.start)
    lines = [LoggedLine(x) for x in tl.lines]
    findings: list[Finding] = []
    c = table.model.conventions
    cite = c.citation or f"{TABLE_CITE}, Treatment Table {tl.number}"
    notes_cite = f"{R4}, ch. 21, Treatment Table {tl.number} figure notes"
    trusted = tl.all_verified and tl.status == "VERIFIED"
    findings.append(_f("treatment-log-table", "pass" if trusted else "warn",
                       f"compared with Treatment Table {tl.number} as bundled: steps {tl.status}, "
                       f"{table.n_verified} of {len(table.rows)} rows verified", cite, tl.status,
                       verified=trusted))
    late = (clk.origin - planned.start_clock + 720.0) % 1440.0 - 720.0  # nearest, across midnight
    if abs(late) > TOLERANCE_MIN:
        findings.append(_f("treatment-log-start", "info",
                           f"left the surface {abs(late):g} min "
                           f"{'after' if late > 0 else 'before'} the planned start", cite,
                           None, measured=round(late, 1), unit="min"))
    findings += _extension_findings(table, planned_ext, run_ext, ev, cite)
    prev_end = 0.0
    for k, s in enumerate(ev.steps):
        field = f"EVENTS: steps[{k + 1}]"
        start = clk.rel(s.start, f"{field}.start") if s.start is not None else prev_end
        end = clk.rel(s.end, f"{field}.end")
        if end < start - 1e-9:
            raise InputError(f"{field}.end", "earlier than the step's start")
        if k >= len(lines):
            continue
        x = lines[k]
        x.start_min, x.end_min = start, end
        x.patient, x.relief, x.note = s.patient, s.relief, s.note
        if start - prev_end > TOLERANCE_MIN:
            x.rules.append("treatment-log-gap")
            findings.append(_f("treatment-log-gap", "warn",
                               f"line {x.planned.line}: {start - prev_end:g} min between the end "
                               "of the line before and its start are not accounted for", cite,
                               tl.status, measured=round(start - prev_end, 1), limit=0.0,
                               unit="min"))
        if s.depth is not None and abs(s.depth - x.planned.to_depth) > 1e-6:
            x.rules.append("treatment-log-step-check")
            findings.append(_f("treatment-log-step-check", "warn",
                               f"line {x.planned.line}: recorded at {s.depth:g} {tl.unit}, the "
                               f"table's line ends at {x.planned.to_depth:g} {tl.unit}: the log "
                               "and the table are out of step", cite, tl.status, measured=s.depth,
                               limit=x.planned.to_depth, unit=tl.unit))
        if s.gas is not None and s.gas.strip().lower() != x.planned.gas.lower():
            x.rules.append("treatment-log-step-check")
            findings.append(_f("treatment-log-step-check", "warn",
                               f"line {x.planned.line}: recorded on {s.gas}, the table's line is "
                               f"on {x.planned.gas}", cite, tl.status, measured=s.gas,
                               limit=x.planned.gas))
        prev_end = end
    n_rec = min(len(ev.steps), len(lines))
    if len(ev.steps) < len(lines):
        findings.append(_f("treatment-log-incomplete", "warn",
                           f"lines {lines[n_rec].planned.line} to {lines[-1].planned.line} have no "
                           "recorded times: the treatment log is incomplete (or the treatment was "
                           "changed); needs review", cite, tl.status, measured=n_rec,
                           limit=len(lines), unit="lines"))
    elif len(ev.steps) > len(lines):
        findings.append(_f("treatment-log-extra", "warn",
                           f"{len(ev.steps) - len(lines)} more step(s) recorded than the table "
                           "has with these extensions: record the extensions run under "
                           "[extensions]", cite, tl.status, measured=len(ev.steps),
                           limit=len(lines), unit="lines"))
    findings += _interruptions(tl, lines, ev, clk)
    for x in lines[:n_rec]:
        findings += _line_findings(tl, x, cite, notes_cite)
    findings += _patient(tl, lines[:n_rec])
    findings += _readings(ev, clk)
    if n_rec == len(lines) and lines:
        total = lines[-1].end_min or 0.0
        if abs(total - tl.elapsed_min) > TOLERANCE_MIN:
            findings.append(_f("treatment-log-total", "info",
                               f"surfaced after {total:g} min against {tl.elapsed_min:g} min "
                               "planned", cite, tl.status, measured=round(total, 1),
                               limit=round(tl.elapsed_min, 1), unit="min"))
    from supervisor.chamber.procedures import window_h

    rd = req.attendant_recent_dive
    recent = rd is not None and rd.since_min <= window_h(tl.number) * 60
    return TreatmentLog(req, tl, clk.origin, lines, findings, ev,
                        _attendant_actual(tl, lines, clk.origin, recent), treatment_cautions())


def _extension_findings(table: Any, planned: dict[str, int], run: dict[str, int], ev: _Events,
                        cite: str) -> list[Finding]:
    out = []
    if run != planned:
        who = f" (decided by {ev.extensions.decided_by})" if ev.extensions and \
            ev.extensions.decided_by else ""
        out.append(_f("treatment-log-extensions", "info",
                      f"extensions run: oxygen {run['oxygen']}, air {run['air']}; planned oxygen "
                      f"{planned['oxygen']}, air {planned['air']}{who}: the attendant's oxygen and "
                      "the chamber gas follow the extensions run", cite, "FROM MEMORY",
                      measured=sum(run.values()), limit=sum(planned.values()),
                      unit="extensions"))
    for e in table.model.conventions.extensions:
        n = run.get(e.option, 0)
        if n > e.max_count:
            out.append(_f("treatment-log-extensions", "warn",
                          f"{n} extensions ({e.option}) run, past the table's {e.max_count}: "
                          "beyond the table, on the diving medical officer's decision; the "
                          "extra periods are logged as the table's extension periods",
                          e.citation, e.source_status, measured=n, limit=e.max_count,
                          unit="extensions"))
    return out


def _line_findings(tl: Timeline, x: LoggedLine, cite: str, notes_cite: str) -> list[Finding]:
    out: list[Finding] = []
    p = x.planned
    actual = x.actual_min
    if actual is None:
        return out
    effective = actual - x.interrupted_min
    diff = effective - p.minutes
    where = f"line {p.line} ({p.from_depth:g}" + (f"→{p.to_depth:g}" if p.travel else "") + \
        f" {tl.unit}, {p.role})"
    status = p.source_status

    def add(rule: str, severity: str, msg: str, citation: str, st: str | None = status) -> None:
        x.rules.append(rule)
        out.append(_f(rule, severity, msg, citation, st, measured=round(effective, 2),
                      limit=round(p.minutes, 2), unit="min"))

    if p.travel and p.role != "compression":
        if diff < -TOLERANCE_MIN:
            rate = abs(p.to_depth - p.from_depth) / max(effective, 1e-9)
            add("treatment-log-travel", "fail",
                f"{where}: travel took {effective:g} min against {p.minutes:g} min, "
                f"{rate:.2f} {tl.unit}/min against the table's {p.travel_rate:g}: too fast; the "
                "procedure stops the chamber and waits rather than travel faster", notes_cite,
                "OLDER-EDITION")
        elif diff > TOLERANCE_MIN:
            add("treatment-log-travel", "info",
                f"{where}: travel took {effective:g} min against {p.minutes:g} min: slow travel "
                "is not made up", notes_cite, "OLDER-EDITION")
    elif p.role == "compression":
        if abs(diff) > TOLERANCE_MIN:
            add("treatment-log-compression", "info",
                f"{where}: compression took {effective:g} min against {p.minutes:g} min", cite)
    elif p.role == "oxygen":
        if diff > TOLERANCE_MIN:
            add("treatment-log-oxygen-period", "warn",
                f"{where}: {effective:g} min on oxygen against the table's {p.minutes:g} min: "
                "the air break came late", cite)
        elif diff < -TOLERANCE_MIN:
            add("treatment-log-oxygen-period", "warn",
                f"{where}: {effective:g} min on oxygen against the table's {p.minutes:g} min: "
                "oxygen time short", cite)
    elif p.role == "air-break":
        if diff < -TOLERANCE_MIN:
            add("treatment-log-air-break", "warn",
                f"{where}: air break {effective:g} min against the table's {p.minutes:g} min: "
                "too short (air breaks guard against oxygen toxicity)", cite)
        elif diff > TOLERANCE_MIN:
            add("treatment-log-air-break", "info",
                f"{where}: air break {effective:g} min against the table's {p.minutes:g} min",
                cite)
    elif abs(diff) > TOLERANCE_MIN:
        add("treatment-log-hold", "warn",
            f"{where}: {effective:g} min against the table's {p.minutes:g} min", cite)
    return out


def _interruptions(tl: Timeline, lines: list[LoggedLine], ev: _Events,
                   clk: _Clock) -> list[Finding]:
    out: list[Finding] = []
    number = tl.number
    first = _rule(number, "oxygen-symptom-first") or _rule(number, "oxygen-symptom-table9")
    again = _rule(number, "oxygen-symptom-again")
    deep = _rule(number, "oxygen-interruption-deep")
    lost = _rule(number, "oxygen-system-lost")
    symptoms = 0
    for k, it in enumerate(ev.interruptions, start=1):
        field = f"EVENTS: interruptions[{k}]"
        a = clk.rel(it.start, f"{field}.start", monotone=False)
        b = clk.rel(it.end, f"{field}.end", monotone=False)
        while b < a:
            b += 1440.0
        off = b - a
        for x in lines:
            if x.start_min is None or x.end_min is None or not x.planned.on_oxygen:
                continue
            overlap = min(b, x.end_min) - max(a, x.start_min)
            if overlap > 0:
                x.interrupted_min += overlap
        if it.cause in ("oxygen-symptom", "convulsion"):
            symptoms += 1
            rule = first if symptoms == 1 and it.cause == "oxygen-symptom" else (again or first)
            if deep is not None:
                out.append(_f("treatment-log-interruption", "warn",
                              f"interruption {k}: {deep.text}", deep.citation, deep.source_status,
                              measured=round(off, 1), unit="min"))
            elif rule is None:
                out.append(_f("treatment-log-interruption", "warn",
                              f"interruption {k} ({it.cause}): no rule bundled for Treatment "
                              f"Table {number}: the diving medical officer decides", DECISION,
                              "OLDER-EDITION", measured=round(off, 1), unit="min"))
            elif rule is first:
                out += _resume_check(k, it, a, b, first, clk, field)
            elif symptoms <= 2:
                out.append(_f("treatment-log-interruption", "warn",
                              f"interruption {k} ({it.cause}): {rule.text}; check that the log "
                              "shows the chamber brought up as the rule says", rule.citation,
                              rule.source_status, measured=round(off, 1), unit="min"))
            else:
                out.append(_f("treatment-log-interruption", "warn",
                              f"interruption {k}: a further oxygen-toxicity symptom "
                              f"({symptoms} in all): the diving medical officer re-plans the "
                              "treatment", rule.citation, rule.source_status,
                              measured=symptoms, unit="symptoms"))
        elif it.cause == "equipment" and lost is not None and off > lost.value:
            out.append(_f("treatment-log-interruption", "warn",
                          f"interruption {k}: oxygen off {off:g} min: {lost.text}", lost.citation,
                          lost.source_status, measured=round(off, 1), limit=lost.value,
                          unit="min"))
        else:
            out.append(_f("treatment-log-interruption", "info",
                          f"interruption {k} ({it.cause}): oxygen off {off:g} min; the line's "
                          "oxygen time resumes where it was interrupted",
                          f"{R4}, p. 21-20", "OLDER-EDITION", measured=round(off, 1),
                          unit="min"))
    return out


def _resume_check(k: int, it: _Interruption, a: float, b: float, rule: Any, clk: _Clock,
                  field: str) -> list[Finding]:
    if it.symptoms_gone is None:
        return [_f("treatment-log-interruption", "warn",
                   f"interruption {k}: when the symptoms had fully gone is not recorded "
                   f"(symptoms_gone); the procedure resumes oxygen {rule.value:g} min after it; "
                   "needs review", rule.citation, rule.source_status)]
    gone = clk.rel(it.symptoms_gone, f"{field}.symptoms_gone", monotone=False)
    while gone < a:
        gone += 1440.0
    wait = b - gone
    if wait + TOLERANCE_MIN < rule.value:
        return [_f("treatment-log-interruption", "warn",
                   f"interruption {k}: oxygen resumed {wait:g} min after the symptoms had gone, "
                   f"the procedure waits {rule.value:g} min: {rule.text}", rule.citation,
                   rule.source_status, measured=round(wait, 1), limit=rule.value, unit="min")]
    return [_f("treatment-log-interruption", "info",
               f"interruption {k}: oxygen resumed {wait:g} min after the symptoms had gone "
               f"(the procedure: {rule.value:g} min)", rule.citation, rule.source_status,
               measured=round(wait, 1), limit=rule.value, unit="min")]


def _patient(tl: Timeline, lines: list[LoggedLine]) -> list[Finding]:
    out: list[Finding] = []
    for x in lines:
        if x.relief == "worse":
            x.rules.append("treatment-log-patient")
            out.append(_f("treatment-log-patient", "warn",
                          f"line {x.planned.line}: patient worse ({x.patient or 'no detail'}): "
                          "the diving medical officer re-assesses the treatment", DECISION,
                          "OLDER-EDITION"))
    if tl.number == "5":
        deep = [x for x in lines if x.planned.to_depth >= 60 and x.relief in
                ("none", "partial", "worse")]
        if deep:
            x = deep[0]
            x.rules.append("treatment-log-patient")
            out.append(_f("treatment-log-patient", "warn",
                          f"line {x.planned.line}: relief {x.relief} at 60 fsw on Table 5, which "
                          "is for full relief within 10 min at 60 fsw: the procedure calls for "
                          "Table 6", DECISION, "OLDER-EDITION"))
    return out


def _readings(ev: _Events, clk: _Clock) -> list[Finding]:
    out: list[Finding] = []
    seen_pass: set[str] = set()
    for k, r in enumerate(ev.readings, start=1):
        t = clk.rel(r.at, f"EVENTS: readings[{k}].at", monotone=False)
        del t
        for kind, value, unit in (("oxygen_percent", r.oxygen_percent, "%"),
                                  ("co2_percent_sev", r.co2_percent_sev, "% SEV"),
                                  ("temperature_f", r.temperature_f, "degF")):
            if value is None:
                continue
            for v in judge_reading(kind, value):
                lim = v.limit
                assert lim is not None
                if v.severity == "pass":
                    if lim.limit in seen_pass:
                        continue
                    seen_pass.add(lim.limit)
                    msg = f"chamber readings within {lim.limit} ({lim.text})"
                else:
                    msg = (f"reading {k} at {r.at}: {value:g} {unit} against {lim.limit} "
                           f"({'at most' if lim.bound == 'max' else 'at least'} {lim.value:g} "
                           f"{unit}): {lim.text}")
                out.append(_f("treatment-log-atmosphere", v.severity, msg, lim.citation,
                              lim.source_status, measured=value, limit=lim.value, unit=unit))
    return out


def _attendant_actual(tl: Timeline, lines: list[LoggedLine], origin: float, recent: bool
                      ) -> list[dict[str, Any]]:
    """The attendant's oxygen periods in actual clock time (from the recorded line times)."""
    ox = attendant_oxygen(tl, recent)
    out = []
    for iv in ox.intervals:
        def actual(t: float) -> str | None:
            for x in lines:
                p = x.planned
                if p.start_min - 1e-9 <= t <= p.end_min + 1e-9 and x.start_min is not None:
                    frac = 0.0 if p.minutes <= 0 else (t - p.start_min) / p.minutes
                    text, day = split_clock(origin + x.start_min + frac * (x.actual_min or 0.0))
                    return text if day == 0 else f"{text} +{day}d"
            return None
        out.append({"planned_minutes": round(iv.minutes, 4), "start": actual(iv.start_min),
                    "end": actual(iv.end_min)})
    return out
