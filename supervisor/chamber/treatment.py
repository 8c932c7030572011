"""Plan a recompression treatment: the one entry point of ``supervisor treatment plan``.

:func:`plan_treatment` takes a :class:`TreatmentRequest` (the table number, the
start time, the extensions, the attendant's recent dive, optionally a job plan
whose chamber, policy and site are used) and returns a :class:`TreatmentPlan`:

* the timeline (:mod:`supervisor.chamber.timeline`), with clock times;
* the patient's dose (:mod:`supervisor.chamber.doses`);
* the inside attendant (:mod:`supervisor.chamber.attendant`);
* the rules around the treatment with their clock times
  (:mod:`supervisor.chamber.procedures`);
* the chamber atmosphere limits and ventilation, and, from a job plan's chamber,
  the chamber's own gas for the whole treatment
  (:mod:`supervisor.chamber.atmosphere`, :mod:`supervisor.chamber.ventilation`);
* findings in the check's form (rule id, severity, measured, limit, citation)
  and a verdict: every bundled treatment table is from memory or an older
  edition, so a plan is at best ``needs-review``; it is ``does-not-conform``
  when the plan's own chamber cannot run it (too shallow, or short of gas on the
  plan's own figures).

The JSON object (``supervisor.treatment/1``) keeps the request under ``inputs``,
so ``supervisor treatment log`` can rebuild the same plan from it.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from supervisor import __version__
from supervisor import constants as C
from supervisor.chamber.atmosphere import atmosphere_plan
from supervisor.chamber.attendant import (
    AttendantResult,
    RecentDive,
    attendant_oxygen,
    evaluate_attendant,
)
from supervisor.chamber.catalogue import load_treatment
from supervisor.chamber.cautions import treatment_cautions
from supervisor.chamber.clock import split_clock
from supervisor.chamber.doses import PatientDose, patient_dose
from supervisor.chamber.extensions import describe, full_request
from supervisor.chamber.procedures import missing_topics, rules_json, window_h
from supervisor.chamber.timeline import Timeline, build_timeline
from supervisor.chamber.ventilation import TreatmentGas, treatment_gas, ventilation_pieces
from supervisor.errors import InputError
from supervisor.findings import Finding, counts, sort_findings, verdict

SCHEMA = "supervisor.treatment/1"
#: Occupants of the treatment lock when no job plan says: patient and one attendant
#: (common practice, no source).
DEFAULT_OCCUPANTS = 2
TABLE_CITE = "U.S. Navy Diving Manual, Revision 7 Change A, ch. 17"


@dataclass(frozen=True)
class TreatmentRequest:
    """What to plan.

    Attributes
    ----------
    table : str
        Published table number (``5``, ``6``, ``6A``, ``9``).
    start : str
        Clock time of leaving the surface, ``HH:MM``.
    extend_oxygen, extend_air : int
        Extensions (``--extend-oxygen``, ``--extend-air``).
    attendant_recent_dive : RecentDive or None
    plan : str or None
        Path of a job plan whose chamber, policy and site are used.
    """

    table: str
    start: str
    extend_oxygen: int = 0
    extend_air: int = 0
    attendant_recent_dive: RecentDive | None = None
    plan: str | None = None

    def to_json(self) -> dict[str, Any]:
        """The ``inputs`` object of the plan JSON."""
        return {"table": self.table, "start": self.start, "extend_oxygen": self.extend_oxygen,
                "extend_air": self.extend_air,
                "attendant_recent_dive": None if self.attendant_recent_dive is None
                else self.attendant_recent_dive.to_json(), "plan": self.plan}

    @classmethod
    def from_json(cls, d: Any, where: str = "PLANFILE") -> TreatmentRequest:
        """Rebuild a request from an ``inputs`` object (JSON or the TOML treatment plan)."""
        if not isinstance(d, dict):
            raise InputError(where, "expected a table of inputs (table, start, extend_oxygen, "
                             "extend_air, attendant_recent_dive, plan)")
        unknown = sorted(set(d) - {"table", "start", "extend_oxygen", "extend_air",
                                   "attendant_recent_dive", "plan"})
        if unknown:
            raise InputError(f"{where}: {unknown[0]}", "unknown key (a typo?); expected table, "
                             "start, extend_oxygen, extend_air, attendant_recent_dive, plan")
        for key, what in (("table", 'the table number, e.g. "6"'),
                          ("start", "the start time HH:MM")):
            if not isinstance(d.get(key), str) or not d[key].strip():
                raise InputError(f"{where}: {key}", f"missing or not text; expected {what}")
        ext = {}
        for key in ("extend_oxygen", "extend_air"):
            v = d.get(key, 0)
            if isinstance(v, bool) or not isinstance(v, int) or v < 0:
                raise InputError(f"{where}: {key}", f"got {v!r}; expected a whole number >= 0")
            ext[key] = v
        rd = d.get("attendant_recent_dive")
        recent = None
        if rd is not None:
            if not isinstance(rd, dict):
                raise InputError(f"{where}: attendant_recent_dive", "expected a table with "
                                 "depth_fsw, bottom_min, since_min (and gas)")
            try:
                recent = RecentDive(float(rd["depth_fsw"]), float(rd["bottom_min"]),
                                    float(rd["since_min"]), str(rd.get("gas", "air")))
            except (KeyError, TypeError, ValueError):
                raise InputError(f"{where}: attendant_recent_dive", "expected depth_fsw, "
                                 "bottom_min and since_min as numbers (and gas)") from None
        plan = d.get("plan")
        if plan is not None and not isinstance(plan, str):
            raise InputError(f"{where}: plan", "expected the path of a job plan (text)")
        return cls(d["table"], d["start"], ext["extend_oxygen"], ext["extend_air"], recent, plan)


@dataclass
class TreatmentPlan:
    """A planned treatment (module docstring)."""

    request: TreatmentRequest
    timeline: Timeline
    patient: PatientDose
    attendant: AttendantResult
    rules: list[dict[str, Any]]
    rules_missing: list[str]
    atmosphere: dict[str, Any]
    chamber_gas: TreatmentGas
    findings: list[Finding]
    occupants: int
    p_surface_bar: float
    plan_title: str | None = None
    cautions: list[str] = field(default_factory=list)

    @property
    def verdict(self) -> str:
        """``needs-review`` or ``does-not-conform`` (never ``conforms`` on unverified steps)."""
        return verdict(self.findings)

    def to_json(self) -> dict[str, Any]:
        """The ``supervisor.treatment/1`` object."""
        tl = self.timeline
        t = tl.table
        c = t.model.conventions
        end_text, end_day = split_clock(tl.start_clock + tl.elapsed_min)
        fs = sort_findings(self.findings)
        return {
            "schema": SCHEMA,
            "tool_version": __version__,
            "generated_at": dt.datetime.now(dt.UTC).replace(microsecond=0).isoformat(),
            "inputs": self.request.to_json(),
            "table": {
                "number": c.table_number, "name": t.name, "title": t.model.title,
                "citation": c.citation or f"{TABLE_CITE}, Treatment Table {c.table_number}",
                "indication": c.indication, "time_definition": c.time_definition,
                "source_status": tl.status, "rows": len(t.rows), "rows_verified": t.n_verified,
                "stated_total_min": c.stated_total_min,
                "stated_total_status": c.stated_total_status,
                "stated_total_extended_min": c.stated_total_extended_min,
                "stated_total_extended_status": c.stated_total_extended_status,
                "extensions_allowed": describe(t), "missing": list(c.missing),
            },
            "unit": tl.unit,
            "start": split_clock(tl.start_clock)[0],
            "end": end_text, "end_day": end_day,
            "extensions": tl.extensions.to_json(),
            "total_min": round(tl.total_min, 4),
            "elapsed_min": round(tl.elapsed_min, 4),
            "compression_min": round(tl.compression_min, 4),
            "oxygen_min": round(tl.oxygen_min, 4),
            "steps": tl.to_json(),
            "doses": {"patient": self.patient.to_json(),
                      "attendant": {"otu": round(self.attendant.otu, 1),
                                    "otu_oxygen": round(self.attendant.otu_oxygen, 1),
                                    "oxygen_min": round(self.attendant.oxygen.minutes, 4)}},
            "attendant": self.attendant.to_json(tl),
            "occupants": self.occupants,
            "rules": self.rules,
            "rules_missing": self.rules_missing,
            "atmosphere": self.atmosphere,
            "chamber_gas": self.chamber_gas.to_json(),
            "job_plan": self.plan_title,
            "p_surface_bar": round(self.p_surface_bar, 5),
            "verdict": self.verdict,
            "counts": counts(fs),
            "findings": [f.to_json() for f in fs],
            "cautions": list(self.cautions),
        }


def _finding(rule: str, severity: str, message: str, citation: str, status: str | None,
             measured: Any = None, limit: Any = None, unit: str | None = None,
             verified: bool = False) -> Finding:
    return Finding(rule, severity, message, measured, limit, unit, citation, None,  # type: ignore[arg-type]
                   status, verified, "treatment")


def plan_treatment(request: TreatmentRequest) -> TreatmentPlan:
    """Plan a treatment (module docstring).

    Raises
    ------
    InputError
        Bad table number, start time, extension or job plan (one line each).
    """
    from supervisor.plan import PlanValidationError, Policy, load_plan

    table = load_treatment(request.table)
    tl = build_timeline(table, request.start, {"oxygen": request.extend_oxygen,
                                               "air": request.extend_air})
    job = None
    if request.plan is not None:
        try:
            job = load_plan(request.plan)
        except PlanValidationError as exc:
            raise PlanValidationError([("--plan" if f == "plan" else f"--plan: {f}", m)
                                       for f, m in exc.problems]) from None
        except InputError as exc:
            raise InputError("--plan", exc.message) from None
        if not job.chamber.on_site:
            raise InputError("--plan", f"{request.plan}: the plan has no chamber on site "
                             "(chamber.on_site = false); plan the treatment without --plan or "
                             "at the chamber that will run it")
    policy = job.policy.resolved(job.unit) if job is not None else Policy()
    p_surface = job.p_surface_bar if job is not None else C.P_ATM_BAR
    occupants = (job.chamber.treatment_occupants if job is not None and
                 job.chamber.treatment_occupants else DEFAULT_OCCUPANTS)
    number = tl.number
    win = window_h(number)
    patient = patient_dose(tl, p_surface)
    att = evaluate_attendant(tl, request.attendant_recent_dive, win, policy.model,
                             policy.gf_low / 100.0, policy.gf_high / 100.0,
                             policy.po2_chamber_max, p_surface)
    chamber = job.chamber if job is not None else None
    gas = treatment_gas(tl, att.oxygen.intervals, chamber, occupants, p_surface)
    full = full_request(table)
    if gas.need_l is not None and full.counts != tl.extensions.counts:
        tl_full = build_timeline(table, request.start, full)
        ox_full = attendant_oxygen(tl_full, att.oxygen.recent)
        gas.need_every_extension_l = treatment_gas(tl_full, ox_full.intervals, chamber,
                                                   occupants, p_surface).need_l
    dump = bool(chamber.bibs_overboard_dump) if chamber is not None else False
    rates = ventilation_pieces(tl, att.oxygen.intervals, occupants, dump)
    atmo = atmosphere_plan(rates, dump, chamber.ventilation_lpm if chamber else None, occupants)
    rules = rules_json(number, tl.start_clock + tl.elapsed_min)
    out = TreatmentPlan(request, tl, patient, att, rules, missing_topics(number), atmo, gas, [],
                        occupants, p_surface, job.job.title if job is not None else None,
                        treatment_cautions())
    out.findings = _findings(out, job)
    return out


def _findings(p: TreatmentPlan, job: Any) -> list[Finding]:
    tl = p.timeline
    c = tl.table.model.conventions
    cite = c.citation or f"{TABLE_CITE}, Treatment Table {tl.number}"
    trusted = tl.all_verified and tl.status == "VERIFIED"
    out = [_finding(
        "treatment-table-status", "pass" if trusted else "warn",
        f"Treatment Table {tl.number}: steps {tl.status}, {tl.table.n_verified} of "
        f"{len(tl.table.rows)} rows verified"
        + ("" if trusted else "; check every step against the current manual's figure before "
           "it drives the treatment"), cite, tl.status,
        measured=tl.table.n_verified, limit=len(tl.table.rows), unit="rows verified",
        verified=trusted)]
    if tl.extensions.total:
        out.append(_finding(
            "treatment-extensions", "info",
            f"extensions: {', '.join(f'{k} {n}' for k, n in tl.extensions.counts.items() if n)} "
            f"({describe(tl.table)})", "; ".join(dict.fromkeys(e.citation for e in c.extensions)),
            "FROM MEMORY", measured=tl.extensions.total))
    att = p.attendant
    for w in att.warnings:
        out.append(_finding("treatment-attendant", "warn", w,
                            "policy (model, gradient factors, chamber PO2); "
                            + "; ".join(x.citation for x in att.oxygen.cases),
                            att.evaluation.coefficient_status))
    if not att.warnings:
        out.append(_finding(
            "treatment-attendant", "pass",
            f"attendant within policy: surfacing at {100 * att.evaluation.surfacing_gf:.0f} % "
            f"of the M-value gradient (GF high {100 * att.gf_high:.0f} %), {att.otu:.0f} OTU; "
            f"model coefficients {att.evaluation.coefficient_status}: needs review",
            "; ".join(x.citation for x in att.oxygen.cases) or cite,
            att.evaluation.coefficient_status, measured=round(100 * att.evaluation.surfacing_gf, 1),
            limit=round(100 * att.gf_high, 1), unit="%"))
    atmo_cite = ("U.S. Navy Diving Manual, Rev 4 Change A, §22-5.4, §22-6.2.6; NFPA 99 "
                 "hyperbaric facilities chapter")
    for w in p.atmosphere["warnings"]:
        out.append(_finding("treatment-atmosphere", "warn", w, atmo_cite, "FROM MEMORY"))
    for w in p.atmosphere["notes"]:
        out.append(_finding("treatment-atmosphere", "info", w, atmo_cite, "FROM MEMORY"))
    g = p.chamber_gas
    if g.need_l is None:
        out.append(_finding("treatment-chamber-gas", "info" if job is None else "warn",
                            "chamber gas not sized: needs " + ", ".join(g.missing),
                            "U.S. Navy Diving Manual, Rev 4 Change A, §22-5.4", g.status))
    else:
        own = job is not None and job.chamber.ventilation_lpm is not None
        sev = "fail" if (g.short and own) else ("warn" if g.short else "pass")
        out.append(_finding(
            "treatment-chamber-gas", sev,
            f"chamber flasks {g.available_l:.0f} L against {g.need_l:.0f} L for the whole "
            f"treatment with its extensions ({'short' if g.short else 'enough'}; "
            f"{'; '.join(g.basis)})", "U.S. Navy Diving Manual, Rev 4 Change A, §22-5.4; "
            "plan consistency (chamber figures of the plan)" if own else
            "U.S. Navy Diving Manual, Rev 4 Change A, §22-5.4", None if own else g.status,
            measured=round(g.available_l or 0.0), limit=round(g.need_l), unit="L",
            verified=own and not g.short))
        if not g.short and g.short_with_every_extension:
            assert g.need_every_extension_l is not None
            out.append(_finding(
                "treatment-chamber-gas", "warn",
                f"enough for the treatment as planned, but {g.available_l:.0f} L falls short of "
                f"the {g.need_every_extension_l:.0f} L needed if every extension the table "
                f"allows is run ({describe(tl.table)}): plan the extra gas before extending",
                "U.S. Navy Diving Manual, Rev 4 Change A, §22-5.4", g.status,
                measured=round(g.available_l or 0.0), limit=round(g.need_every_extension_l),
                unit="L"))
    if job is not None:
        cap = job.chamber.depth_capability
        if cap is not None:
            cap_fsw = cap if job.unit == "fsw" else cap * C.BAR_PER_MSW / C.BAR_PER_FSW
            deep = tl.max_depth
            sev = "fail" if cap_fsw + 1e-6 < deep else "pass"
            out.append(_finding(
                "treatment-chamber-depth", sev,
                f"chamber rated to {cap:g} {job.unit}"
                + (f" ({cap_fsw:.0f} fsw)" if job.unit != "fsw" else "") + " against the table's "
                f"{deep:g} fsw" + ("; the chamber cannot run this table" if sev == "fail" else ""),
                "plan consistency (chamber.depth_capability)", None, measured=round(cap_fsw, 1),
                limit=deep, unit="fsw", verified=True))
        if job.site.altitude_m and job.site.altitude_m > 0:
            out.append(_finding(
                "treatment-altitude", "warn",
                f"site at {job.site.altitude_m:g} m: the attendant's oxygen time grows with "
                "altitude (Navy Table 21-6: 0-2499, 2500-7499, 7500-10000 ft; minutes not "
                "bundled) and chamber depths may need correcting; this plan is for the chamber "
                "gauge depths as tabled", "U.S. Navy Diving Manual, Rev 4 Change A, Table 21-6 "
                "(p. 21-28)", "OLDER-EDITION", measured=job.site.altitude_m, unit="m"))
    for text in p.rules_missing:
        out.append(_finding("treatment-rules", "warn",
                            f"no rule bundled for Treatment Table {tl.number}: {text}; ask the "
                            "diving medical officer", "U.S. Navy Diving Manual, Rev 4 Change A, "
                            "ch. 21", "OLDER-EDITION"))
    if c.missing:
        out.append(_finding("treatment-table-missing", "warn",
                            f"not planned by this tool: {'; '.join(c.missing)}", cite,
                            tl.status))
    return out


def load_request_file(path: str | Path) -> TreatmentRequest:
    """Read a treatment plan file: the JSON of ``treatment plan --json`` or a TOML request.

    The TOML form (schema ``supervisor.treatment-plan/1``)::

        schema = "supervisor.treatment-plan/1"
        table = "6"
        start = "21:40"
        extend_oxygen = 0
        extend_air = 1
        plan = "examples/demo-job.toml"          # optional
        [attendant_recent_dive]                   # optional
        depth_fsw = 60
        bottom_min = 30
        since_min = 240

    Raises
    ------
    InputError
        ``PLANFILE`` for a file that cannot be read or does not hold a request.
    """
    import json
    import tomllib

    p = Path(path)
    try:
        text = p.read_text("utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("PLANFILE", f"{p}: cannot be read ({exc})") from None
    if p.suffix.lower() == ".json" or text.lstrip().startswith("{"):
        try:
            doc = json.loads(text)
        except json.JSONDecodeError as exc:
            raise InputError("PLANFILE", f"{p}: not valid JSON ({exc.msg}, line {exc.lineno})") \
                from None
        if not isinstance(doc, dict) or doc.get("schema") != SCHEMA:
            raise InputError("PLANFILE", f"{p}: expected the JSON of `supervisor treatment plan "
                             f"--json` (schema {SCHEMA!r})")
        return TreatmentRequest.from_json(doc.get("inputs"), f"{p}: inputs")
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError("PLANFILE", f"{p}: not valid TOML or JSON ({exc})") from None
    if doc.get("schema") != "supervisor.treatment-plan/1":
        raise InputError("PLANFILE", f"{p}: schema must be 'supervisor.treatment-plan/1' (or give "
                         "the JSON of `supervisor treatment plan --json`)")
    doc = {k: v for k, v in doc.items() if k != "schema"}
    if isinstance(doc.get("start"), dt.time):
        doc["start"] = doc["start"].strftime("%H:%M")
    return TreatmentRequest.from_json(doc, str(p))
