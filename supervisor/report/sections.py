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
    humanize_key,
    is_number,
    severity_label,
    severity_rank,
)
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
        rows.append([para(fmt_number(stop.get("depth"), 1), CELL),
                     para(fmt_number(stop.get("minutes"), 1), CELL),
                     para(_text(stop.get("gas")), CELL),
                     para(_text(stop.get("place")), CELL)])
    return grid(rows, [0.24 * width, 0.18 * width, 0.3 * width, 0.28 * width], repeat=False)


def _kv_lines(pairs: Sequence[tuple[str, str]]) -> list[Flowable]:
    return [rich([(f"{k}: ", True), (v, False)], CELL) for k, v in pairs]


def _minutes(value: Any) -> str:
    return fmt_quantity(value, "min", 1)


def schedules_side_by_side(dive: Mapping[str, Any], record: Mapping[str, Any],
                           width: float) -> Flowable:
    """Proposed, reference-table and model schedules in three columns."""
    unit = _text(record.get("unit"))
    col = width / 3
    inner = col - 8
    model = _m(record.get("model"))
    ref = dive.get("reference_schedule")
    msched = dive.get("model_schedule")

    proposed = [_stops_table(dive.get("proposed_stops"), unit, inner)]

    if isinstance(ref, Mapping):
        ref_cells: list[Flowable] = [_stops_table(ref.get("stops"), unit, inner)]
        notes = [
            ("row", f"{fmt_quantity(ref.get('depth'), unit)} for "
                    f"{_minutes(ref.get('bottom_time_min'))}"),
            ("repetitive group", _text(ref.get("repetitive_group"))),
            ("row verification", _text(ref.get("row_verification"))),
        ]
        ref_cells += _kv_lines(notes)
        if ref.get("outside_table") is True:
            ref_cells.append(para("Exposure outside the table: needs review.", CELL_BOLD))
        if ref.get("exceptional_exposure") is True:
            ref_cells.append(para("Exceptional exposure schedule: needs review.", CELL_BOLD))
        ref_head = f"Reference table: {_text(ref.get('table'))}"
    else:
        ref_cells = [para(NOT_COMPUTED, CELL_BOLD)]
        ref_head = "Reference table"

    if isinstance(msched, Mapping):
        model_cells: list[Flowable] = [_stops_table(msched.get("stops"), unit, inner)]
        model_cells += _kv_lines([
            ("total stop time", _minutes(msched.get("total_stop_min"))),
            ("total ascent time", _minutes(msched.get("total_ascent_min"))),
            ("no-stop limit", "not reported" if msched.get("no_stop_limit_min") is None
             else _minutes(msched.get("no_stop_limit_min"))),
        ])
    else:
        model_cells = [para(NOT_COMPUTED, CELL_BOLD)]
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


def model_margin(dive: Mapping[str, Any], record: Mapping[str, Any]) -> list[Flowable]:
    """Ceiling check of the proposed profile against the model."""
    margin = dive.get("model_margin")
    status = _text(_m(record.get("model")).get("coefficient_status"))
    if not isinstance(margin, Mapping):
        return [_not_computed("Model margin")]
    broken = margin.get("ceiling_broken")
    if broken is True:
        verdict = ("The proposed profile goes shallower than the model ceiling.", True)
    elif broken is False:
        verdict = ("The proposed profile stays at or below the model ceiling.", False)
    else:
        verdict = (f"Ceiling check: {NOT_COMPUTED}.", True)
    pct = margin.get("surfacing_gf_percent")
    return [rich([verdict, (
        f" Surfacing gradient factor {fmt_quantity(pct, '%', 0)}; controlling compartment "
        f"{_text(margin.get('controlling_compartment'))}; margin "
        f"{_minutes(margin.get('margin_min'))}. (Model coefficients {status}.)", False)], BODY)]


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


def gas_supply_table(dive: Mapping[str, Any], width: float) -> list[Flowable]:
    """Gas supply against need."""
    out: list[Flowable] = [para("Gas supply against need", H3)]
    supply = dive.get("gas_supply")
    if not isinstance(supply, Mapping):
        return out + [_not_computed("Gas supply")]
    need, available = supply.get("need_l"), supply.get("available_l")
    rows: list[list[object]] = [[para("Item", CELL_BOLD), para("Value", CELL_BOLD)]]
    rows.append([para("need [L]", CELL), para(fmt_number(need, 0), CELL)])
    rows.append([para("available [L]", CELL), para(fmt_number(available, 0), CELL)])
    if is_number(need) and is_number(available) and float(need) > 0:
        ratio = float(available) / float(need)
        short = float(available) < float(need)
        rows.append([para("available / need", CELL_BOLD if short else CELL),
                     para(f"{fmt_number(ratio, 2)}" + (" (short of need)" if short else ""),
                          CELL_BOLD if short else CELL)])
    else:
        rows.append([para("available / need", CELL), para(NOT_COMPUTED, CELL_BOLD)])
    for key, value in flatten({k: v for k, v in supply.items()
                               if k not in ("need_l", "available_l")}):
        label, unit = humanize_key(key)
        rows.append([para(f"{label} [{unit}]" if unit else label, CELL),
                     para(fmt_scalar(value), CELL)])
    return out + [grid(rows, [0.55 * width, 0.45 * width], repeat=False)]


_CONTINGENCIES = (
    ("overrun", "Bottom-time overrun"),
    ("deeper", "Deeper than planned"),
    ("oxygen_failure", "Loss of decompression oxygen"),
)


def contingency_section(dive: Mapping[str, Any], record: Mapping[str, Any],
                        width: float) -> list[Flowable]:
    """Contingency schedules: overrun, deeper, loss of oxygen."""
    unit = _text(record.get("unit"))
    out: list[Flowable] = [para("Contingency schedules", H3)]
    cont = dive.get("contingency")
    if not isinstance(cont, Mapping):
        return out + [_not_computed("Contingency schedules")]
    cells: list[list[Flowable]] = []
    col = width / 3
    for key, title in _CONTINGENCIES:
        sched = cont.get(key)
        cell: list[Flowable] = [para(title, CELL_BOLD)]
        if not isinstance(sched, Mapping):
            cell.append(para(NOT_COMPUTED, CELL_BOLD))
        else:
            cell.append(_stops_table(sched.get("stops"), unit, col - 8))
            for k, value in flatten({k: v for k, v in sched.items() if k != "stops"}):
                label, u = humanize_key(k)
                shown = fmt_quantity(value, u, 1) if is_number(value) else fmt_scalar(value)
                cell.append(rich([(f"{label}: ", True), (shown, False)], CELL))
        cells.append(cell)
    out.append(grid([cells], [col, col, col], header=False))
    return [KeepTogether(out)]


def dive_section(dive: Mapping[str, Any], record: Mapping[str, Any],
                 width: float) -> list[Flowable]:
    """Everything about one dive."""
    model = _m(record.get("model"))
    status = _text(model.get("coefficient_status"))
    out: list[Flowable] = [
        para(f"Dive {_text(dive.get('id'))}: {_text(dive.get('diver'))}", H2),
        dive_facts(dive, record, width),
        para("Schedules", H3),
        schedules_side_by_side(dive, record, width),
        Spacer(1, 4),
    ]
    out += model_margin(dive, record)
    profile = charts.profile_chart(dive.get("chart"), _text(record.get("unit")),
                                   model_label(model), width=width)
    head = para(f"Planned depth-time profile and model ceiling (coefficients {status})", H3)
    out.append(KeepTogether([head, profile if profile is not None
                             else _not_computed("Depth-time chart")]))
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
    if signer is not None:
        kind = ("a self-signed certificate: compare its fingerprint with the one the supervisor "
                "published; trust in the certificate is not checked by this tool"
                if signer.self_signed else "a certificate issued by another party")
        out.append(rich([("Digital signature. ", True), (
            f"This PDF carries a PDF (PAdES) signature by {signer.name}, and its JSON record a "
            f"detached CMS signature; certificate SHA-256 fingerprint "
            f"{signer.fingerprint_sha256}; {kind}. Check both with 'supervisor verify'.",
            False)], SMALL))
    else:
        out.append(rich([("Digital signature. ", True),
                         ("This copy carries no digital signature.", False)], SMALL))
    return out
