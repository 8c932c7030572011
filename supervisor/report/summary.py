"""Page 1 of the checklist: a one-page summary the supervisor reads before signing.

It holds the job, the verdict with its counts and what failed, every dive
with its planned schedule and verdict, the emergency contacts and site
conditions, the chamber, the minimum time before travel to altitude, who
signs digitally (and in place of whom), the first caution, and the identity
of the plan and of the document.  Nothing on it is more reassuring than the
check result: a missing figure prints as "not computed — needs review",
and a wait before flying is never shorter than the check's
``minimum_wait_min``.
"""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence
from typing import Any

from reportlab.platypus import Flowable, Spacer, Table

from supervisor.report.blocks import SignerNote, m, signer_statement, text
from supervisor.report.fonts import REGULAR
from supervisor.report.formatting import (
    NOT_COMPUTED,
    VERDICT_LABEL,
    count_findings,
    effective_verdict,
    fmt_quantity,
    fmt_scalar,
    is_number,
    stops_line,
)
from supervisor.report.styles import (
    BODY,
    CELL,
    CELL_BOLD,
    H3,
    PANEL_FILL,
    RULE,
    SMALL,
    SUBTITLE,
    TITLE,
    VERDICT,
    grid,
    para,
    rich,
)
from supervisor.report.units import fmt_wait, unit_system

#: Failing checks named on page 1 before "and N more".
MAX_NAMED_FAILS = 8

_CONTACTS = (
    ("chamber", "Chamber"),
    ("hospital", "Hospital"),
    ("physician", "Physician"),
    ("transport", "Transport"),
    ("uscg_rcc", "Rescue coordination (USCG RCC)"),
)
_JURISDICTION = {
    "osha-1910-t": "OSHA, 29 CFR 1910 Subpart T",
    "uscg-46-197-b": "USCG, 46 CFR 197 Subpart B",
    "none": "none chosen: regulatory rules not applied",
}


def findings_of(record: Mapping[str, Any]) -> list[Mapping[str, Any]]:
    """The record's findings that are mappings (anything else is ignored)."""
    raw = record.get("findings")
    return [f for f in raw if isinstance(f, Mapping)] if isinstance(raw, list) else []


#: The last record's findings by dive: ``[findings list, {dive: findings}, unindexed]``.
_BY_DIVE: list[Any] = [None, {}, []]


def dive_findings(record: Mapping[str, Any], dive_id: object) -> list[Mapping[str, Any]]:
    """The findings of one dive (``None``: the job-wide ones), in the record's order.

    Parameters
    ----------
    record : mapping
        The checklist record.
    dive_id : object
        A dive's id, or ``None`` for the findings of no dive.

    Returns
    -------
    list of mapping
        The findings whose ``dive`` equals ``dive_id``.  The record's findings are
        indexed by dive once (the last record's index is kept), so asking for every
        dive of a job costs time linear in its findings, not dives times findings.
    """
    raw = record.get("findings")
    if _BY_DIVE[0] is not raw:
        index: dict[object, list[Mapping[str, Any]]] = {}
        odd: list[Mapping[str, Any]] = []
        for f in findings_of(record):
            try:
                index.setdefault(f.get("dive"), []).append(f)
            except TypeError:  # a dive that is no hashable value: looked up one by one
                odd.append(f)
        _BY_DIVE[:] = [raw, index, odd]
    index, odd = _BY_DIVE[1], _BY_DIVE[2]
    try:
        hash(dive_id)
    except TypeError:
        odd = [None]
    if odd:  # keep the record's order exactly when some keys could not be indexed
        return [f for f in findings_of(record) if f.get("dive") == dive_id]
    return list(index.get(dive_id, ()))


def title_block(record: Mapping[str, Any]) -> list[Flowable]:
    """Title and job line."""
    job = m(record.get("job"))
    return [para(m(record.get("checklist")).get("title") or "Pre-dive checklist", TITLE),
            para(text(job.get("title")), SUBTITLE)]


def job_table(record: Mapping[str, Any], width: float) -> Table:
    """Job, site, date, people, rules and depth unit."""
    job = m(record.get("job"))
    jurisdiction = job.get("jurisdiction")
    pairs = [
        ("Site", job.get("site")), ("Date", job.get("date")),
        ("Client", job.get("client")), ("Contractor", job.get("contractor")),
        ("Diving supervisor", job.get("supervisor")),
        ("Rules", _JURISDICTION.get(str(jurisdiction), jurisdiction)),
    ]
    rows: list[list[object]] = []
    for i in range(0, len(pairs), 2):
        row: list[object] = []
        for key, value in pairs[i : i + 2]:
            row += [para(key, CELL_BOLD), para(text(value), CELL)]
        rows.append(row)
    key_w = 0.15 * width
    val_w = width / 2 - key_w
    return grid(rows, [key_w, val_w, key_w, val_w], header=False)


def _fail_names(findings: Sequence[Mapping[str, Any]]) -> str:
    fails = [f"{text(f.get('rule'))}" + (f" ({f['dive']})" if f.get("dive") is not None else "")
             for f in findings if f.get("severity") == "fail"]
    if not fails:
        return ""
    shown = ", ".join(fails[:MAX_NAMED_FAILS])
    more = len(fails) - MAX_NAMED_FAILS
    return shown + (f", and {more} more" if more > 0 else "")


def verdict_panel(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """The verdict with its counts, the failing checks by name, where the rest is."""
    findings = findings_of(record)
    counts = count_findings(findings)
    verdict, changed = effective_verdict(record.get("verdict"), counts)
    lines: list[Flowable] = [
        rich([("Verdict: ", False), (VERDICT_LABEL[verdict], True)], VERDICT),
        para(f"{counts['fail']} fail, {counts['warn']} warn, {counts['info']} info, "
             f"{counts['pass']} pass", BODY),
    ]
    failing = _fail_names(findings)
    if failing:
        lines.append(rich([("Failing: ", True), (failing, False)], SMALL))
    if not findings:
        lines.append(para("The check reported no findings. That is not a pass: the supervisor "
                          "reviews the plan in full.", SMALL))
    else:
        lines.append(para("Failures and warnings are listed from page 2 by dive, each with its "
                          "citation; information is in each dive's section and passed checks "
                          "are in the appendix.", SMALL))
    stated = m(record.get("counts"))
    if changed or any(stated.get(k) not in (None, v) for k, v in counts.items()):
        lines.append(para(
            f"Stated by the check: verdict {text(record.get('verdict'))}, counts "
            + ", ".join(f"{k} {fmt_scalar(stated.get(k))}" for k in counts)
            + ". The verdict and counts above are recomputed from the findings listed; "
            "the worse of the two is shown.", SMALL))
    panel = Table([[lines]], colWidths=[width], splitInRow=1)
    panel.setStyle([("FONTNAME", (0, 0), (-1, -1), REGULAR),
                    ("BOX", (0, 0), (-1, -1), 0.8, RULE),
                    ("BACKGROUND", (0, 0), (-1, -1), PANEL_FILL),
                    ("LEFTPADDING", (0, 0), (-1, -1), 6),
                    ("TOPPADDING", (0, 0), (-1, -1), 4),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 5)])
    return [Spacer(1, 5), panel]


def dive_counts(record: Mapping[str, Any], dive_id: object) -> dict[str, int]:
    """Counts of one dive's own findings and the job-wide ones."""
    own = dive_findings(record, dive_id) if dive_id is not None else []
    return count_findings(own + dive_findings(record, None))


def dives_table(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """Every dive: diver, the dive, its planned schedule and its verdict."""
    unit = text(record.get("unit"))
    dives = [m(d) for d in record.get("dives") or [] if isinstance(d, Mapping)]
    out: list[Flowable] = [para("Dives and their planned schedules", H3)]
    if not dives:
        return out + [rich([("Dives: ", False), (NOT_COMPUTED, True)], BODY)]
    rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                 ("Dive", "Diver", "Dive as planned", "Planned stops",
                                  "Dive verdict")]]
    for dive in dives:
        counts = dive_counts(record, dive.get("id"))
        verdict, _ = effective_verdict(dive.get("verdict"), counts)
        what = (f"{text(dive.get('mode'))}, {text(dive.get('gas'))}; "
                f"{fmt_quantity(dive.get('max_depth'), unit)} for "
                f"{fmt_quantity(dive.get('bottom_time_min'), 'min')}; "
                f"decompression {text(dive.get('decompression'))}")
        after = dive.get("previous_dive")
        if after:
            what += (f"; repetitive after {after}, surface interval "
                     f"{fmt_quantity(dive.get('surface_interval_min'), 'min')}")
        people = [para(text(dive.get("diver")), CELL)]
        crew = [f"{role} {dive[key]}" for role, key in (("standby", "standby_diver"),
                                                         ("tender", "tender")) if dive.get(key)]
        if crew:
            people.append(para("; ".join(crew), SMALL))
        rows.append([para(text(dive.get("id")), CELL_BOLD), people, para(what, CELL),
                     para(stops_line(dive.get("proposed_stops"), unit), CELL),
                     [para(VERDICT_LABEL[verdict], CELL_BOLD),
                      para(f"{counts['fail']} fail, {counts['warn']} warn", SMALL)]])
    w = width
    out.append(grid(rows, [0.06 * w, 0.22 * w, 0.28 * w, 0.28 * w, 0.16 * w]))
    return out


def _given(value: Any) -> tuple[str, bool]:
    if isinstance(value, str) and value.strip():
        return value, False
    return "not stated in the plan — needs review", True


def emergency_and_site(record: Mapping[str, Any], width: float) -> Table:
    """Emergency contacts beside the site conditions."""
    site = m(record.get("site"))
    units = unit_system(record)
    contacts = m(site.get("emergency_contacts"))
    left: list[Flowable] = [para("Emergency contacts", H3)]
    for key, label in _CONTACTS:
        value, missing = _given(contacts.get(key))
        left.append(rich([(f"{label}: ", True), (value, missing)], CELL))
    right: list[Flowable] = [para("Site conditions", H3)]
    if not site:
        right.append(rich([("Site: ", True), (NOT_COMPUTED, True)], CELL))
    else:
        def yes_no(v: Any) -> str:
            return "yes" if v is True else "no" if v is False else "not stated"

        facts = [
            ("Water", text(site.get("water"))),
            ("Altitude of the water surface", units.length(site.get("altitude_m"), 0)),
            ("Current", fmt_quantity(site.get("current_kt"), "kt")),
            ("Visibility", units.length(site.get("visibility_m"))),
            ("Water temperature", units.temperature(site.get("water_temperature_c"))),
            ("Night", yes_no(site.get("night"))),
            ("Confined space", yes_no(site.get("confined_space"))),
            ("From a vessel", yes_no(site.get("from_vessel"))),
            ("Marine traffic", yes_no(site.get("marine_traffic"))),
        ]
        for label, value in facts:
            right.append(rich([(f"{label}: ", True), (value, value.startswith("not "))], CELL))
    table = Table([[left, right]], colWidths=[0.56 * width, 0.44 * width], splitInRow=1)
    table.setStyle([("VALIGN", (0, 0), (-1, -1), "TOP"), ("LEFTPADDING", (0, 0), (-1, -1), 0),
                    ("FONTNAME", (0, 0), (-1, -1), REGULAR)])
    return table


def chamber_line(record: Mapping[str, Any]) -> Flowable:
    """Whether a chamber is at the dive location, and which one to call if not."""
    chamber = m(record.get("chamber"))
    if chamber.get("on_site") is True:
        ready = chamber.get("ready")
        state = "ready" if ready is True else "NOT ready" if ready is False \
            else "readiness not stated — needs review"
        return rich([("Chamber: ", True), (f"at the dive location, {state}.", ready is not True)],
                    CELL)
    if chamber.get("on_site") is False:
        contact, missing = _given(m(m(record.get("site")).get("emergency_contacts"))
                                  .get("chamber"))
        return rich([("Chamber: ", True), ("none at the dive location; nearest: ", False),
                     (contact, missing)], CELL)
    return rich([("Chamber: ", True), (NOT_COMPUTED, True)], CELL)


def _travel(entry: Mapping[str, Any]) -> str:
    trips = entry.get("travel")
    if not isinstance(trips, list) or not trips:
        return "none planned"
    parts = []
    for trip in trips:
        t = m(trip)
        ok = t.get("ok")
        verdict = "too early: FAILS the minimum wait" if ok is False else (
            "after the minimum wait" if ok is True else "not checked — needs review")
        parts.append(f"{fmt_quantity(t.get('altitude'), text(t.get('unit')), 0)} departing "
                     f"{fmt_time(t.get('departure'))} ({verdict})")
    return "; ".join(parts)


def fmt_time(value: object) -> str:
    """An ISO time as ``"2031-07-10 09:15"`` (seconds dropped); anything else as given."""
    text_value = text(value)
    match = re.fullmatch(r"(\d{4}-\d\d-\d\d)[T ](\d\d:\d\d)(:\d\d(\.\d+)?)?(Z|[+-]\d\d:?\d\d)?",
                         text_value)
    if not match:
        return text_value
    zone = match.group(5) or ""
    return f"{match.group(1)} {match.group(2)}" + (" UTC" if zone == "Z" else
                                                   f" {zone}" if zone else "")


def altitude_block(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """Minimum surface time before travel to altitude (flying) per diver.

    Only the check's ``minimum_wait_min`` is printed as the wait; the model's
    figure appears beside it only when it is longer.  A missing or zero
    minimum prints as not computed.
    """
    out: list[Flowable] = [para("Before travel to altitude (flying) after the dives", H3)]
    entries = record.get("altitude")
    if not isinstance(entries, list) or not entries:
        return out + [rich([("Minimum surface time before altitude: ", True), (
            f"{NOT_COMPUTED}: the check gave no minimum wait; follow the contractor's manual "
            "and the diving medical officer.", True)], CELL)]
    rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                 ("Diver (after dive)", "Minimum surface time (basis, status)",
                                  "Earliest departure", "Planned travel")]]
    for raw in entries:
        e = m(raw)
        minimum = e.get("minimum_wait_min")
        if is_number(minimum) and float(minimum) > 0:
            wait = [rich([(fmt_wait(minimum), True),
                          (f" {text(e.get('basis'))} ({text(e.get('source_status'))})", False)],
                         SMALL)]
            model = e.get("model_wait_min")
            if is_number(model) and float(model) > float(minimum):
                wait.append(para(f"model: {fmt_wait(model)}, longer "
                                 f"({text(e.get('model_basis'))})", SMALL))
        else:
            wait = [para(NOT_COMPUTED, CELL_BOLD)]
        earliest = e.get("earliest_departure")
        rows.append([para(f"{text(e.get('diver'))} ({text(e.get('after_dive'))})", CELL), wait,
                     para(fmt_time(earliest) if earliest else "not computed", CELL),
                     para(_travel(e), SMALL)])
    w = width
    out.append(grid(rows, [0.2 * w, 0.4 * w, 0.14 * w, 0.26 * w]))
    return out


def identity_table(record: Mapping[str, Any], document_sha256: str, width: float) -> Table:
    """Plan file, its hash, the document hash, the tool and when the check ran."""
    rows = [
        [para("Plan file", CELL_BOLD), para(text(record.get("plan_path")), CELL),
         para("Check generated (UTC)", CELL_BOLD), para(text(record.get("generated_at")), CELL)],
        [para("Plan sha256", CELL_BOLD), para(text(record.get("plan_sha256")), CELL),
         para("Tool version", CELL_BOLD),
         para(f"supervisor {text(record.get('tool_version'))}", CELL)],
        [para("Document sha256", CELL_BOLD), para(document_sha256, CELL), "", ""],
    ]
    return grid(rows, [0.14 * width, 0.62 * width, 0.11 * width, 0.13 * width], header=False,
                extra=[("SPAN", (1, 2), (3, 2))])


def summary_page(record: Mapping[str, Any], document_sha256: str, width: float,
                 signer: SignerNote | None) -> list[Flowable]:
    """Everything on page 1, in order."""
    cautions = m(record.get("checklist")).get("cautions") or []
    out: list[Flowable] = [
        *title_block(record),
        job_table(record, width),
        *verdict_panel(record, width),
        *dives_table(record, width),
        emergency_and_site(record, width),
        Spacer(1, 2),
        chamber_line(record),
        *altitude_block(record, width),
        Spacer(1, 4),
        signer_statement(record, signer),
    ]
    if cautions:
        out += [Spacer(1, 3), rich([("Caution. ", True), (str(cautions[0]), False)], SMALL)]
    out += [Spacer(1, 4), identity_table(record, document_sha256, width)]
    return out
