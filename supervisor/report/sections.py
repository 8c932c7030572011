"""The sections of the checklist PDF, each built from the checklist record.

Every function takes parts of the record (a ``supervisor.check/1`` object
with ``plan_text`` and ``checklist`` added, see :mod:`supervisor.report.document`)
and the usable page width [pt], and returns reportlab flowables.  A section
whose data are missing prints :data:`~supervisor.report.formatting.NOT_COMPUTED`.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from reportlab.platypus import CondPageBreak, Flowable, KeepTogether, Spacer, Table

from supervisor.report import charts
from supervisor.report.fonts import REGULAR
from supervisor.report.formatting import (
    MISSING,
    NOT_COMPUTED,
    VERDICT_LABEL,
    count_findings,
    effective_verdict,
    flatten,
    fmt_gf,
    fmt_number,
    fmt_quantity,
    fmt_scalar,
    fmt_stop_depth,
    fmt_stop_minutes,
    humanize_key,
    is_number,
    severity_label,
    severity_rank,
)
from supervisor.report.pdf_meta import same_person
from supervisor.report.styles import (
    BODY,
    CELL,
    CELL_BOLD,
    H2,
    H3,
    PANEL_FILL,
    RULE,
    SMALL,
    SUBTITLE,
    TITLE,
    VERDICT,
    TickBox,
    grid,
    para,
    rich,
)


@dataclass(frozen=True)
class SignerNote:
    """Who applies the digital signature, printed in the signature section."""

    name: str
    fingerprint_sha256: str
    self_signed: bool


def signer_statement(record: Mapping[str, Any], signer: SignerNote | None) -> Flowable:
    """Who signs this PDF digitally, and in place of whom when it is not the plan's supervisor."""
    if signer is None:
        return rich([("Digital signature. ", True),
                     ("This copy carries no digital signature.", False)], SMALL)
    supervisor = _m(record.get("job")).get("supervisor")
    kind = ("a self-signed certificate: whether it may approve dives is checked by "
            "'supervisor verify' against the contractor's keyring of trusted supervisors"
            if signer.self_signed else "a certificate issued by another party")
    parts: list[tuple[object, bool]] = [("Digital signature. ", True)]
    if isinstance(supervisor, str) and supervisor.strip() \
            and not same_person(signer.name, supervisor):
        parts.append((f"Digitally signed by {signer.name} in place of the plan's supervisor "
                      f"{supervisor}. ", True))
    else:
        parts.append((f"Digitally signed by {signer.name}. ", False))
    parts.append((f"The PDF carries a PDF (PAdES) signature and its JSON record a detached CMS "
                  f"signature; certificate SHA-256 fingerprint {signer.fingerprint_sha256}; "
                  f"{kind}.", False))
    return rich(parts, SMALL)


def _m(value: Any) -> Mapping[str, Any]:
    return value if isinstance(value, Mapping) else {}


def _text(value: Any) -> str:
    return MISSING if value is None or value == "" else str(value)


def _stated(value: Any) -> str:
    """A descriptive field (status, edition) that the source may leave out."""
    return "not stated" if value is None or value == "" else str(value)


def _given(value: Any, unit: str | None) -> str:
    """A finding's measured value or limit; ``None`` means the rule states none."""
    return "—" if value is None else fmt_quantity(value, unit, 2)


def _not_computed(what: str) -> Flowable:
    return rich([(f"{what}: ", False), (NOT_COMPUTED, True)], BODY)


def model_label(model: Mapping[str, Any]) -> str:
    """``"zhl16c GF 30/85"`` from the record's ``model`` entry."""
    name = _text(model.get("name"))
    return f"{name} GF {fmt_gf(model.get('gf_low'), model.get('gf_high'))}"


# ----------------------------------------------------------------------------- page 1


def title_block(record: Mapping[str, Any], document_sha256: str) -> list[Flowable]:
    """Title and job line."""
    job = _m(record.get("job"))
    return [
        para(_m(record.get("checklist")).get("title") or "Pre-dive checklist", TITLE),
        para(_text(job.get("title")), SUBTITLE),
    ]


def header_table(record: Mapping[str, Any], document_sha256: str, width: float) -> Table:
    """Job, site, people, plan file, tool and document identity."""
    job = _m(record.get("job"))
    pairs = [
        ("Job", job.get("title")),
        ("Site", job.get("site")),
        ("Date", job.get("date")),
        ("Client", job.get("client")),
        ("Contractor", job.get("contractor")),
        ("Diving supervisor", job.get("supervisor")),
        ("Jurisdiction", job.get("jurisdiction")),
        ("Depth unit", record.get("unit")),
        ("Tool version", f"supervisor {_text(record.get('tool_version'))}"),
        ("Check generated (UTC)", record.get("generated_at")),
    ]
    rows: list[list[object]] = []
    for i in range(0, len(pairs), 2):
        row: list[object] = []
        for key, value in pairs[i : i + 2]:
            row += [para(key, CELL_BOLD), para(_text(value), CELL)]
        rows.append(row)
    wide = [
        ("Plan file", record.get("plan_path")),
        ("Plan sha256", record.get("plan_sha256")),
        ("Document sha256", document_sha256),
    ]
    for key, value in wide:
        rows.append([para(key, CELL_BOLD), para(_text(value), CELL), "", ""])
    key_w = 0.17 * width
    val_w = width / 2 - key_w
    extra = [("SPAN", (1, r), (3, r)) for r in range(len(rows) - len(wide), len(rows))]
    return grid(rows, [key_w, val_w, key_w, val_w], header=False, extra=extra)


def references_table(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """Reference tables and coefficient sets used, with edition and status."""
    out: list[Flowable] = [para("Reference tables and model", H3)]
    refs = record.get("references")
    if not isinstance(refs, list) or not refs:
        out.append(_not_computed("References used"))
    else:
        rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                     ("Name", "Title", "Edition", "Source status", "Verification")]]
        for ref in refs:
            ref = _m(ref)
            rows.append([para(_stated(ref.get(k)), CELL) for k in
                         ("name", "title", "edition", "source_status", "verification")])
        w = width
        out.append(grid(rows, [0.19 * w, 0.31 * w, 0.22 * w, 0.14 * w, 0.14 * w]))
    model = record.get("model")
    if isinstance(model, Mapping):
        out.append(Spacer(1, 3))
        out.append(rich([("Model: ", True), (model_label(model), False),
                         ("; coefficient status: ", False),
                         (_text(model.get("coefficient_status")), True),
                         (" (printed beside every model figure below)", False)], SMALL))
    else:
        out.append(_not_computed("Decompression model"))
    return out


def verdict_block(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """The verdict with the count of findings by severity."""
    findings = [f for f in record.get("findings") or [] if isinstance(f, Mapping)]
    counts = count_findings(findings)
    verdict, changed = effective_verdict(record.get("verdict"), counts)
    lines: list[Flowable] = [
        rich([("Verdict: ", False), (VERDICT_LABEL[verdict], True)], VERDICT),
        para(f"{counts['fail']} fail, {counts['warn']} warn, {counts['info']} info, "
             f"{counts['pass']} pass", BODY),
    ]
    stated = _m(record.get("counts"))
    if changed or any(stated.get(k) not in (None, v) for k, v in counts.items()):
        lines.append(para(
            f"Stated by the check: verdict {_text(record.get('verdict'))}, counts "
            + ", ".join(f"{k} {fmt_scalar(stated.get(k))}" for k in counts)
            + ". The verdict and counts above are recomputed from the findings listed; "
            "the worse of the two is shown.", SMALL))
    lines.append(para("The tool supports the supervisor's decision; it does not make it. "
                      "See the cautions before the signature blocks.", SMALL))
    panel = Table([[lines]], colWidths=[width])
    panel.setStyle([("FONTNAME", (0, 0), (-1, -1), REGULAR),
                    ("BOX", (0, 0), (-1, -1), 0.8, RULE),
                    ("BACKGROUND", (0, 0), (-1, -1), PANEL_FILL),
                    ("LEFTPADDING", (0, 0), (-1, -1), 6),
                    ("TOPPADDING", (0, 0), (-1, -1), 5),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 6)])
    return [Spacer(1, 6), panel]


def findings_table(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """All findings, worst first, each with its citation and source status."""
    out: list[Flowable] = [para("Findings, worst first", H2)]
    raw = record.get("findings")
    if not isinstance(raw, list):
        return out + [_not_computed("Findings")]
    findings = sorted((f for f in raw if isinstance(f, Mapping)),
                      key=lambda f: severity_rank(f.get("severity")))
    if not findings:
        return out + [para("The check reported no findings. That is not a pass: "
                           "the supervisor reviews the plan in full.", BODY)]
    rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                 ("Result", "Rule / dive", "Finding", "Measured / limit",
                                  "Citation (source status)")]]
    if any(f.get("severity") == "pass" for f in findings):
        out.append(para("Passed checks are listed last in smaller type, as measured / limit.",
                        SMALL))
    for f in findings:
        unit = f.get("unit") if isinstance(f.get("unit"), str) else None
        measured = _given(f.get("measured"), unit)
        limit = _given(f.get("limit"), unit)
        dive = f.get("dive")
        status = f"({_stated(f.get('source_status'))})"
        if f.get("severity") == "pass":
            # passed checks print compactly, one paragraph per cell
            where = f" (dive {dive})" if dive is not None else ""
            rows.append([
                para(severity_label("pass"), SMALL),
                para(f"{_text(f.get('rule'))}{where}", SMALL),
                para(_text(f.get("message")), SMALL),
                para("—" if measured == limit == "—" else f"{measured} / {limit}", SMALL),
                para(f"{_text(f.get('citation'))} {status}", SMALL),
            ])
            continue
        rule_cell = [para(_text(f.get("rule")), CELL)]
        if dive is not None:
            rule_cell.append(para(f"dive {dive}", CELL))
        rows.append([
            para(severity_label(f.get("severity")), CELL_BOLD),
            rule_cell,
            para(_text(f.get("message")), CELL),
            [para(f"measured: {measured}", CELL), para(f"limit: {limit}", CELL)],
            [para(_text(f.get("citation")), CELL), para(status, CELL)],
        ])
    w = width
    out.append(grid(rows, [0.08 * w, 0.17 * w, 0.36 * w, 0.16 * w, 0.23 * w]))
    return out


def caution_lead(record: Mapping[str, Any]) -> list[Flowable]:
    """The first caution, printed on page 1."""
    cautions = _m(record.get("checklist")).get("cautions") or []
    if not cautions:
        return []
    return [Spacer(1, 4), rich([("Caution. ", True), (cautions[0], False)], SMALL)]


# ----------------------------------------------------------------------------- dives


def _stops_table(stops: Any, unit: str, width: float) -> Flowable:
    if stops is None:
        return para(NOT_COMPUTED, CELL_BOLD)
    if not isinstance(stops, list):
        return para(NOT_COMPUTED, CELL_BOLD)
    if not stops:
        return para("no decompression stops", CELL)
    rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                 (f"stop [{unit}]", "min", "gas", "place")]]
    for stop in stops:
        stop = _m(stop)
        rows.append([para(fmt_stop_depth(stop.get("depth")), CELL),
                     para(fmt_stop_minutes(stop.get("minutes")), CELL),
                     para(_text(stop.get("gas")), CELL),
                     para(_text(stop.get("place")), CELL)])
    return grid(rows, [0.24 * width, 0.18 * width, 0.3 * width, 0.28 * width], repeat=False)


def _kv_lines(pairs: Sequence[tuple[str, str]]) -> list[Flowable]:
    return [rich([(f"{k}: ", True), (v, False)], CELL) for k, v in pairs]


def _minutes(value: Any) -> str:
    return fmt_quantity(value, "min", 1)


def reference_gaps(ref: Mapping[str, Any]) -> list[str]:
    """Why a reference-table schedule is missing or partial; empty when it is whole.

    The check's ``reason``, then "outside the table" when ``outside_table``
    is set, then "no stops given" when ``stops`` is not a list.  Row
    verification is reported separately (:func:`reference_cells`).
    """
    gaps: list[str] = []
    reason = ref.get("reason")
    if isinstance(reason, str) and reason.strip():
        gaps.append(reason.strip())
    if ref.get("outside_table") is True:
        gaps.append("outside the table")
    if not isinstance(ref.get("stops"), list):
        gaps.append("no stops given")
    return gaps


def reference_cells(ref: Any, unit: str, width: float) -> list[Flowable]:
    """A reference-table schedule: its stops, or why there are none, and its row.

    "no decompression stops" is printed only for a whole schedule (no
    ``reason``, inside the table, stops given); a missing or partial one
    prints its reason and "needs review" instead, and a row that is not
    verified says so.
    """
    if not isinstance(ref, Mapping):
        return [para(NOT_COMPUTED, CELL_BOLD)]
    cells: list[Flowable] = []
    gaps = reference_gaps(ref)
    stops = ref.get("stops")
    if gaps:
        if isinstance(stops, list) and stops:
            cells.append(_stops_table(stops, unit, width))
            cells.append(para("Partial reference schedule — needs review:", CELL_BOLD))
        else:
            cells.append(para("No reference schedule — needs review:", CELL_BOLD))
        cells += [para(gap, CELL) for gap in gaps]
    else:
        cells.append(_stops_table(stops, unit, width))
    verification = ref.get("row_verification")
    if verification == "unverified":
        cells.append(para("row unverified — needs review", CELL_BOLD))
    elif verification != "verified":
        cells.append(para(f"row verification {_stated(verification)} — needs review",
                          CELL_BOLD))
    if ref.get("exceptional_exposure") is True:
        cells.append(para("Exceptional exposure schedule: needs review.", CELL_BOLD))
    row = f"{fmt_quantity(ref.get('depth'), unit)} for {_minutes(ref.get('bottom_time_min'))}"
    asked_depth, asked_time = ref.get("depth_requested"), ref.get("bottom_time_requested")
    asked = []
    if is_number(asked_depth) and is_number(ref.get("depth")) \
            and abs(float(asked_depth) - float(ref["depth"])) > 1e-9:
        asked.append(fmt_quantity(asked_depth, unit))
    if is_number(asked_time) and is_number(ref.get("bottom_time_min")) \
            and abs(float(asked_time) - float(ref["bottom_time_min"])) > 1e-9:
        asked.append(_minutes(asked_time))
    if asked:
        row += f" (looked up for {', '.join(asked)})"
    cells += _kv_lines([("row", row), ("repetitive group", _text(ref.get("repetitive_group"))),
                        ("source status", _stated(ref.get("source_status")))])
    return cells


def _model_cells(sched: Any, unit: str, width: float, *,
                 totals: Sequence[tuple[str, str]] = ()) -> list[Flowable]:
    """A model schedule's stops and totals, or why it was not computed."""
    if not isinstance(sched, Mapping):
        return [para(NOT_COMPUTED, CELL_BOLD)]
    error = sched.get("error")
    if error:
        return [para(NOT_COMPUTED, CELL_BOLD), para(str(error), CELL)]
    if "total_stop_min" in sched and sched.get("total_stop_min") is None \
            and not sched.get("stops"):
        return [para(NOT_COMPUTED, CELL_BOLD)]  # an empty list here means "no schedule"
    cells: list[Flowable] = [_stops_table(sched.get("stops"), unit, width)]
    cells += _kv_lines([
        ("total stop time", _minutes(sched.get("total_stop_min"))),
        ("total ascent time", _minutes(sched.get("total_ascent_min"))),
        ("no-stop limit", "not reported" if sched.get("no_stop_limit_min") is None
         else _minutes(sched.get("no_stop_limit_min"))),
        *totals,
    ])
    return cells


def schedules_side_by_side(dive: Mapping[str, Any], record: Mapping[str, Any],
                           width: float) -> Flowable:
    """Proposed, reference-table and model schedules in three columns."""
    unit = _text(record.get("unit"))
    col = width / 3
    inner = col - 8
    model = _m(record.get("model"))
    ref = dive.get("reference_schedule")

    proposed = [_stops_table(dive.get("proposed_stops"), unit, inner)]
    ref_cells = reference_cells(ref, unit, inner)
    ref_head = (f"Reference table: {_text(_m(ref).get('table'))}" if isinstance(ref, Mapping)
                else "Reference table")
    model_cells = _model_cells(dive.get("model_schedule"), unit, inner)
    model_head = (f"Model: {model_label(model)} "
                  f"(coefficients {_text(model.get('coefficient_status'))})")

    rows = [[para("Proposed (plan)", CELL_BOLD), para(ref_head, CELL_BOLD),
             para(model_head, CELL_BOLD)],
            [proposed, ref_cells, model_cells]]
    return grid(rows, [col, col, col], repeat=False)


def dive_facts(dive: Mapping[str, Any], record: Mapping[str, Any], width: float) -> Table:
    """Diver, mode, gas, depth, bottom time and decompression mode."""
    unit = _text(record.get("unit"))
    pairs = [
        ("Diver", _text(dive.get("diver"))),
        ("Mode", _text(dive.get("mode"))),
        ("Breathing gas", _text(dive.get("gas"))),
        ("Maximum depth", fmt_quantity(dive.get("max_depth"), unit)),
        ("Bottom time", _minutes(dive.get("bottom_time_min"))),
        ("Decompression", _text(dive.get("decompression"))),
    ]
    rows = []
    for i in range(0, len(pairs), 3):
        row: list[object] = []
        for key, value in pairs[i : i + 3]:
            row += [para(key, CELL_BOLD), para(value, CELL)]
        rows.append(row)
    k, v = 0.15 * width, width / 3 - 0.15 * width
    return grid(rows, [k, v, k, v, k, v], header=False)


def has_surface_interval(dive: Mapping[str, Any]) -> bool:
    """True for surface decompression: the diver leaves the water between water and chamber."""
    if dive.get("decompression") == "surface-oxygen":
        return True
    stops = dive.get("proposed_stops")
    return isinstance(stops, list) and any(_m(s).get("place") == "chamber" for s in stops)


def surface_interval_peak(dive: Mapping[str, Any]) -> float | None:
    """Peak supersaturation in the surface interval [% of the M-value gradient], if reported.

    Read from ``model_margin`` (or ``chart``) as ``surface_interval_max_gf_percent``,
    or as the fraction ``surface_interval_max_gf``; ``None`` when neither is a number.
    """
    for source in (dive.get("model_margin"), dive.get("chart")):
        found = _m(source)
        if is_number(found.get("surface_interval_max_gf_percent")):
            return float(found["surface_interval_max_gf_percent"])
        if is_number(found.get("surface_interval_max_gf")):
            return 100.0 * float(found["surface_interval_max_gf"])
    return None


def surface_interval_note(dive: Mapping[str, Any]) -> str:
    """What the ceiling check leaves out for surface decompression, and what is known of it."""
    head = ("The surface interval (leaving the last water stop to arriving at chamber depth) "
            "is excluded from the ceiling check; ")
    peak = surface_interval_peak(dive)
    if peak is None:
        return head + "surface interval: not assessed by the ceiling check — needs review."
    return head + (f"surface interval: peak supersaturation {fmt_number(peak, 0)} % of the "
                   "M-value gradient, reported by the model and not judged against a limit "
                   "— needs review.")


def model_margin(dive: Mapping[str, Any], record: Mapping[str, Any]) -> list[Flowable]:
    """Ceiling check of the proposed profile against the model."""
    margin = dive.get("model_margin")
    status = _text(_m(record.get("model")).get("coefficient_status"))
    if not isinstance(margin, Mapping):
        return [_not_computed("Model margin")]
    surd = has_surface_interval(dive)
    where = " in the water and in the chamber" if surd else ""
    broken = margin.get("ceiling_broken")
    if margin.get("error"):
        verdict = (f"Ceiling check: {NOT_COMPUTED} ({margin['error']}).", True)
    elif broken is True:
        verdict = (f"The proposed profile goes shallower than the model ceiling{where}.", True)
    elif broken is False:
        verdict = (f"The proposed profile stays at or below the model ceiling{where}.", False)
    else:
        verdict = (f"Ceiling check: {NOT_COMPUTED}.", True)
    pct = margin.get("surfacing_gf_percent")
    parts: list[tuple[object, bool]] = [verdict, (
        f" Surfacing gradient factor {fmt_quantity(pct, '%', 0)}; controlling compartment "
        f"{_text(margin.get('controlling_compartment'))}; margin "
        f"{_minutes(margin.get('margin_min'))}. (Model coefficients {status}.)", False)]
    if surd:
        parts.append((" " + surface_interval_note(dive), True))
    return [rich(parts, BODY)]


def oxygen_table(dive: Mapping[str, Any], width: float) -> list[Flowable]:
    """PO2 per phase, CNS % and OTU."""
    out: list[Flowable] = [para("Oxygen exposure", H3)]
    oxygen = dive.get("oxygen")
    if not isinstance(oxygen, Mapping):
        return out + [_not_computed("Oxygen exposure")]
    by_phase = oxygen.get("po2_by_phase")
    rows: list[list[object]] = [[para("Phase", CELL_BOLD), para("PO2 [bar]", CELL_BOLD)]]
    if isinstance(by_phase, Mapping) and by_phase:
        for phase, value in by_phase.items():
            rows.append([para(str(phase), CELL), para(fmt_number(value, 2), CELL)])
    else:
        rows.append([para("by phase", CELL), para(NOT_COMPUTED, CELL_BOLD)])
    rows.append([para("maximum PO2 [bar]", CELL_BOLD), para(fmt_number(oxygen.get("max_po2"), 2),
                                                          CELL)])
    rows.append([para("CNS [% of limit]", CELL_BOLD),
                 para(fmt_number(oxygen.get("cns_percent"), 1), CELL)])
    rows.append([para("pulmonary dose [OTU]", CELL_BOLD),
                 para(fmt_number(oxygen.get("otu"), 0), CELL)])
    return out + [grid(rows, [0.6 * width, 0.4 * width], repeat=False)]


def _has_oxygen_stops(dive: Mapping[str, Any]) -> bool:
    stops = dive.get("proposed_stops")
    if not isinstance(stops, list):
        return True  # unknown: assume oxygen may be breathed
    return any("oxygen" in str(_m(s).get("gas", "")).lower() for s in stops)


def _supply_row(label: str, have: Any, need: Any, unit: str) -> list[object]:
    """One "available against need" row; any missing figure prints as not computed."""
    have_text = fmt_quantity(have, unit, 0)
    need_text = fmt_quantity(need, unit, 0)
    if is_number(have) and is_number(need) and float(need) > 0:
        short = float(have) < float(need)
        style = CELL_BOLD if short else CELL
        ratio = fmt_number(float(have) / float(need), 2) + (" (short of need)" if short else "")
        return [para(label, style), para(have_text, CELL), para(need_text, CELL),
                para(ratio, style)]
    return [para(label, CELL), para(have_text, CELL), para(need_text, CELL),
            para(NOT_COMPUTED, CELL_BOLD)]


def _is_compressor(supply: Mapping[str, Any], which: str) -> bool:
    return (supply.get(f"{which}_kind") == "compressor"
            or is_number(supply.get(f"{which}_delivery_lpm")))


_SUPPLY_SHOWN = ("need_l", "available_l", "primary_kind", "primary_delivery_lpm",
                 "peak_flow_lpm", "recovery_need_l", "secondary_kind", "secondary_available_l",
                 "secondary_delivery_lpm", "oxygen_need_l", "oxygen_available_l",
                 "bailout_psig", "bailout_required_psig")


_SUPPLY_LABELS: dict[str, tuple[str, str | None]] = {
    "rmv_lpm": ("breathing rate assumed", "L/min"),
    "people": ("people counted", None),
    "diver_need_l": ("one diver's need, whole dive", "L"),
    "need_l": ("need of all counted, whole dive", "L"),
    "over_bottom_psig": ("over-bottom pressure", "psig"),
    "mmp_psig": ("minimum manifold pressure", "psig"),
    "bailout_required_psig_rounded": ("bailout required, rounded up", "psig"),
}


def gas_supply_table(dive: Mapping[str, Any], width: float) -> list[Flowable]:
    """Gas supply against need: what the check compares, then the other figures.

    A compressor is compared by flow (its delivery against the peak flow the
    divers need at the maximum depth), a bank or cylinder by free gas against
    the need; a figure the check does not give prints as not computed.
    """
    out: list[Flowable] = [para("Gas supply against need", H3)]
    supply = dive.get("gas_supply")
    if not isinstance(supply, Mapping):
        return out + [_not_computed("Gas supply")]
    rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                 ("Supply", "available", "needed", "available / needed")]]
    kind = supply.get("primary_kind")
    if _is_compressor(supply, "primary"):
        rows.append(_supply_row("primary compressor: delivery against peak flow",
                                supply.get("primary_delivery_lpm"), supply.get("peak_flow_lpm"),
                                "L/min"))
    else:
        label = f"primary {kind}" if isinstance(kind, str) and kind else "primary"
        rows.append(_supply_row(f"{label}: free gas against the whole dive",
                                supply.get("available_l"), supply.get("need_l"), "L"))
    if any(k.startswith("secondary_") for k in supply):
        second = supply.get("secondary_kind")
        if second is None:
            rows.append([para("secondary", CELL), para("none in the plan", CELL_BOLD), "", ""])
        elif _is_compressor(supply, "secondary"):
            rows.append(_supply_row("secondary compressor: delivery against peak flow",
                                    supply.get("secondary_delivery_lpm"),
                                    supply.get("peak_flow_lpm"), "L/min"))
        else:
            rows.append(_supply_row(f"secondary {second}: free gas against the ascent and "
                                    "decompression", supply.get("secondary_available_l"),
                                    supply.get("recovery_need_l"), "L"))
    if "oxygen_need_l" in supply:
        if supply.get("oxygen_need_l") is None and not _has_oxygen_stops(dive):
            rows.append([para("decompression oxygen", CELL),
                         para("no oxygen stops in the plan", CELL), "", ""])
        else:
            rows.append(_supply_row("decompression oxygen", supply.get("oxygen_available_l"),
                                    supply.get("oxygen_need_l"), "L"))
    if "bailout_psig" in supply or "bailout_required_psig" in supply:
        rows.append(_supply_row("bailout cylinder: charge against required",
                                supply.get("bailout_psig"), supply.get("bailout_required_psig"),
                                "psig"))
    w = width
    out.append(grid(rows, [0.4 * w, 0.19 * w, 0.19 * w, 0.22 * w], repeat=False,
                    extra=[("SPAN", (1, r), (3, r)) for r, row in enumerate(rows)
                           if r and row[2] == ""]))
    shown = set(_SUPPLY_SHOWN) - ({"need_l"} if _is_compressor(supply, "primary") else set())
    details: list[list[object]] = []
    for key, value in flatten({k: v for k, v in supply.items() if k not in shown}):
        label, unit = _SUPPLY_LABELS.get(key) or humanize_key(key)
        details.append([para(f"{label} [{unit}]" if unit else label, CELL),
                        para(fmt_scalar(value), CELL)])
    if details:
        out.append(Spacer(1, 3))
        out.append(grid(details, [0.55 * width, 0.45 * width], header=False, repeat=False))
    return out


_CONTINGENCIES = (
    ("overrun", "Bottom-time overrun"),
    ("deeper", "Deeper than planned"),
    ("oxygen_failure", "Loss of decompression oxygen"),
)

_CONTINGENCY_SHOWN = ("kind", "depth", "bottom_time_min", "basis", "stops", "total_stop_min",
                      "total_ascent_min", "no_stop_limit_min", "oxygen", "reference", "error")


def _contingency_cell(key: str, title: str, sched: Any, dive: Mapping[str, Any], unit: str,
                      width: float) -> list[Flowable]:
    cell: list[Flowable] = [para(title, CELL_BOLD)]
    if not isinstance(sched, Mapping):
        if key == "oxygen_failure" and sched is None \
                and dive.get("decompression") in ("none", "in-water") \
                and not _has_oxygen_stops(dive):
            return cell + [para("not applicable: the plan breathes no oxygen at its stops",
                                CELL)]
        return cell + [para(NOT_COMPUTED, CELL_BOLD)]
    depth, time = sched.get("depth"), sched.get("bottom_time_min")
    if is_number(depth) and is_number(time):
        cell += _kv_lines([("dive", f"{fmt_quantity(depth, unit)} for {_minutes(time)}")])
    else:
        cell += _kv_lines([("depth", fmt_quantity(depth, unit)), ("bottom time", _minutes(time))])
    if sched.get("basis"):
        cell.append(para(str(sched["basis"]), SMALL))
    oxygen = _m(sched.get("oxygen"))
    cell.append(para("Model schedule", CELL_BOLD))
    cell += _model_cells(sched, unit, width, totals=[
        ("CNS", fmt_quantity(oxygen.get("cns_percent"), "%", 1)),
        ("OTU", fmt_number(oxygen.get("otu"), 0)),
    ])
    cell.append(para("Reference table" + (f": {sched['reference']['table']}"
                                          if _m(sched.get("reference")).get("table") else ""),
                     CELL_BOLD))
    cell += reference_cells(sched.get("reference"), unit, width)
    for k, value in flatten({k: v for k, v in sched.items() if k not in _CONTINGENCY_SHOWN}):
        label, u = humanize_key(k)
        shown = fmt_quantity(value, u, 1) if is_number(value) else fmt_scalar(value)
        cell.append(rich([(f"{label}: ", True), (shown, False)], CELL))
    return cell


def contingency_section(dive: Mapping[str, Any], record: Mapping[str, Any],
                        width: float) -> list[Flowable]:
    """Contingency schedules: overrun, deeper, loss of oxygen (model and reference table)."""
    unit = _text(record.get("unit"))
    out: list[Flowable] = [para("Contingency schedules", H3)]
    cont = dive.get("contingency")
    if not isinstance(cont, Mapping):
        return out + [_not_computed("Contingency schedules")]
    col = width / 3
    cells = [_contingency_cell(key, title, cont.get(key), dive, unit, col - 8)
             for key, title in _CONTINGENCIES]
    out.append(grid([cells], [col, col, col], header=False))
    return [KeepTogether(out)]


def dive_verdict(dive: Mapping[str, Any], record: Mapping[str, Any]) -> Flowable:
    """The dive's verdict and counts, over its own findings and the job-wide ones."""
    findings = [f for f in record.get("findings") or [] if isinstance(f, Mapping)
                and f.get("dive") in (dive.get("id"), None)]
    counts = count_findings(findings)
    verdict, _ = effective_verdict(dive.get("verdict"), counts)
    return rich([("Dive verdict: ", False), (VERDICT_LABEL[verdict], True), (
        f" ({counts['fail']} fail, {counts['warn']} warn, {counts['info']} info, "
        f"{counts['pass']} pass, counting this dive's findings and the job-wide ones)", False)],
        BODY)


def dive_section(dive: Mapping[str, Any], record: Mapping[str, Any],
                 width: float) -> list[Flowable]:
    """Everything about one dive."""
    model = _m(record.get("model"))
    status = _text(model.get("coefficient_status"))
    out: list[Flowable] = [
        para(f"Dive {_text(dive.get('id'))}: {_text(dive.get('diver'))}", H2),
        dive_verdict(dive, record),
        Spacer(1, 3),
        dive_facts(dive, record, width),
        para("Schedules", H3),
        schedules_side_by_side(dive, record, width),
        Spacer(1, 4),
    ]
    out += model_margin(dive, record)
    surd = has_surface_interval(dive)
    profile = charts.profile_chart(dive.get("chart"), _text(record.get("unit")),
                                   model_label(model), width=width, surface_interval=surd)
    head = para(f"Planned depth-time profile and model ceiling (coefficients {status})", H3)
    block: list[Flowable] = [head, profile if profile is not None
                             else _not_computed("Depth-time chart")]
    if surd:
        block.append(para("Dotted box: the surface interval of surface decompression, "
                          "excluded from the ceiling check (see the ceiling check above); "
                          "shading marks only breaks outside it.", SMALL))
    out.append(KeepTogether(block))
    bars = charts.compartment_chart(dive.get("compartments"), width=width)
    head = para(f"Compartment loading at surfacing (coefficients {status})", H3)
    out.append(KeepTogether([head, bars if bars is not None
                             else _not_computed("Compartment loading")]))
    half = width / 2 - 6
    left = oxygen_table(dive, half)
    right = gas_supply_table(dive, half)
    pair = Table([[left, right]], colWidths=[width / 2, width / 2])
    pair.setStyle([("VALIGN", (0, 0), (-1, -1), "TOP"), ("LEFTPADDING", (0, 0), (-1, -1), 0),
                   ("FONTNAME", (0, 0), (-1, -1), REGULAR)])
    out.append(pair)
    out += contingency_section(dive, record, width)
    return out


# ----------------------------------------------------------------------------- team, checklist


def team_and_chamber(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """Dive team with roles and first-aid training, and the chamber section of the plan."""
    out: list[Flowable] = [para("Team and chamber", H2), para("Dive team", H3)]
    team = record.get("team")
    if not isinstance(team, list) or not team:
        out.append(_not_computed("Dive team"))
    else:
        rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                     ("Name", "Role", "CPR and first aid")]]
        for member in team:
            member = _m(member)
            cpr = member.get("first_aid_cpr")
            rows.append([para(_text(member.get("name")), CELL),
                         para(", ".join(_roles(member)) or MISSING, CELL),
                         para("yes" if cpr is True else "no" if cpr is False else "not stated",
                              CELL_BOLD if cpr is not True else CELL)])
        out.append(grid(rows, [0.5 * width, 0.3 * width, 0.2 * width]))
    out.append(para("Chamber", H3))
    chamber = record.get("chamber")
    if not isinstance(chamber, Mapping) or not chamber:
        out.append(_not_computed("Chamber"))
    else:
        rows = [[para("Item", CELL_BOLD), para("As planned", CELL_BOLD)]]
        for key, value in flatten(chamber):
            label, unit = humanize_key(key)
            rows.append([para(f"{label} [{unit}]" if unit else label, CELL),
                         para(fmt_scalar(value), CELL)])
        out.append(grid(rows, [0.4 * width, 0.6 * width]))
    return out


_MODE_TITLE = {
    "scuba": "SCUBA",
    "surface-supplied-air": "surface-supplied air",
    "mixed-gas": "mixed gas",
}


def _item_groups(items: Sequence[Any]) -> list[tuple[str, list[Mapping[str, Any]]]]:
    """Consecutive items with the same ``group``, in template order."""
    groups: list[tuple[str, list[Mapping[str, Any]]]] = []
    for raw in items:
        item = _m(raw)
        name = _text(item.get("group"))
        if not groups or groups[-1][0] != name:
            groups.append((name, []))
        groups[-1][1].append(item)
    return groups


def _item_cells(item: Mapping[str, Any]) -> list[object]:
    body = [para(_text(item.get("text")), CELL)]
    if item.get("applies_when"):
        body.append(para(f"Applies when: {item['applies_when']}.", SMALL))
    status = _stated(item.get("source_status"))
    cite = [para("; ".join(str(c) for c in item.get("citations") or []) or MISSING, CELL),
            para(f"({status})", CELL_BOLD if status != "VERIFIED" else CELL)]
    if item.get("status_note"):
        cite.append(para(str(item["status_note"]), SMALL))
    return [body, cite]


def predive_checklist(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """The pre-dive items for each diving mode of the job, with tick boxes."""
    section = _m(record.get("checklist"))
    out: list[Flowable] = []
    groups = section.get("modes") or []
    for group in groups:
        group = _m(group)
        mode = group.get("mode")
        dives = [str(d) for d in group.get("dives") or []]
        if mode in _MODE_TITLE:
            title = f"Pre-dive checklist: {_MODE_TITLE[mode]}"
        else:
            given = ", ".join(str(m) for m in group.get("mode_as_given") or []) or "none given"
            title = f"Pre-dive checklist: mode not recognised ({given}), every item shown"
        out.append(para(title, H2))
        if dives:
            out.append(para("Dives: " + ", ".join(dives), BODY))
        out.append(para(_text(section.get("note")), SMALL))
        out.append(Spacer(1, 4))
        w = width
        widths = [0.055 * w, 0.055 * w, 0.58 * w, 0.31 * w]
        out.append(grid([[para("done", CELL_BOLD), para("n/a", CELL_BOLD), para("Item", CELL_BOLD),
                          para("Citation (source status)", CELL_BOLD)]], widths, repeat=False))
        for name, items in _item_groups(group.get("items") or []):
            rows: list[list[object]] = [[para(name, CELL_BOLD), "", "", ""]]
            for item in items:
                rows.append([TickBox(), TickBox(), *_item_cells(item)])
            # one table per group: its heading repeats if the group runs onto a new page,
            # and a group never starts in the last few lines of a page
            out.append(CondPageBreak(70))
            out.append(grid(rows, widths, extra=[("SPAN", (0, 0), (-1, 0)),
                                                 ("BACKGROUND", (0, 0), (-1, 0), PANEL_FILL),
                                                 ("ALIGN", (0, 1), (1, -1), "CENTER")]))
    return out


def cautions_section(record: Mapping[str, Any]) -> list[Flowable]:
    """All cautions, numbered."""
    cautions = _m(record.get("checklist")).get("cautions") or []
    out: list[Flowable] = [para("Cautions", H2)]
    if not cautions:
        return out + [_not_computed("Cautions")]
    for n, text in enumerate(cautions, start=1):
        out.append(rich([(f"{n}. ", True), (str(text), False)], BODY))
        out.append(Spacer(1, 2))
    return out


def _roles(member: Mapping[str, Any]) -> list[str]:
    role = member.get("role")
    items = role if isinstance(role, list) else [role]
    return [str(r) for r in items if r is not None and str(r).strip()]


def _signers(record: Mapping[str, Any]) -> list[str | None]:
    """Names for a diver's acknowledgement: each dive's diver, then divers and standby divers."""
    names: list[str | None] = []
    for dive in record.get("dives") or []:
        name = _m(dive).get("diver")
        if isinstance(name, str) and name.strip() and name not in names:
            names.append(name)
    for member in record.get("team") or []:
        member = _m(member)
        name = member.get("name")
        for role in _roles(member):
            words = role.lower().replace("_", " ").replace("-", " ").split()
            if ("diver" in words or "standby" in words) and isinstance(name, str) \
                    and name.strip() and name not in names:
                names.append(name)
    return names or [None]


def _sig_block(role: str, name: object, statement: str, width: float) -> Flowable:
    line = "_" * 34
    rows = [
        [para(role, CELL_BOLD)],
        [para(statement, SMALL)],
        [rich([("Printed name: ", True), (name if name else line, False)], CELL)],
        [Spacer(1, 12)],
        [rich([("Signature: ", True), (line, False)], CELL)],
        [Spacer(1, 6)],
        [rich([("Date and time: ", True), ("_" * 28, False)], CELL)],
    ]
    table = Table(rows, colWidths=[width])
    table.setStyle([("FONTNAME", (0, 0), (-1, -1), REGULAR),
                    ("BOX", (0, 0), (-1, -1), 0.6, RULE),
                    ("LEFTPADDING", (0, 0), (-1, -1), 5),
                    ("TOPPADDING", (0, 0), (-1, -1), 1.5),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5)])
    return table


def signature_section(record: Mapping[str, Any], width: float,
                      signer: SignerNote | None) -> list[Flowable]:
    """Signature blocks: supervisor, client's representative, each diver."""
    job = _m(record.get("job"))
    col = width / 2 - 6
    blocks = [
        _sig_block("Diving supervisor", job.get("supervisor"),
                   "I have reviewed this plan and the findings above and decide whether the "
                   "dive proceeds.", col),
        _sig_block(f"Client's representative ({_text(job.get('client'))})", None,
                   "I have received this plan and its findings.", col),
    ]
    for name in _signers(record):
        blocks.append(_sig_block("Diver's acknowledgement", name,
                                 "I have been briefed on this plan, its schedules and the "
                                 "emergency procedures, and I know of nothing that makes me "
                                 "unfit to dive.", col))
    rows = [blocks[i : i + 2] + ([""] if len(blocks[i : i + 2]) == 1 else [])
            for i in range(0, len(blocks), 2)]
    out: list[Flowable] = [CondPageBreak(180), para("Signatures", H2)]
    table = Table(rows, colWidths=[width / 2, width / 2])
    table.setStyle([("VALIGN", (0, 0), (-1, -1), "TOP"), ("LEFTPADDING", (0, 0), (-1, -1), 0),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 8),
                    ("FONTNAME", (0, 0), (-1, -1), REGULAR)])
    out.append(table)
    out.append(signer_statement(record, signer))
    return out
