"""The findings of the checklist: what to act on by dive, and the passed checks in an appendix.

Failures, warnings and information are printed from page 2, in one table per
group (job-wide findings first, then each dive in plan order), worst first
within a group.  Passed checks go to a compact appendix: one row per rule,
listing each dive's measured value against the limit.  Splitting the tables
keeps the layout time linear in the number of dives: no table grows with the
whole job.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from reportlab.platypus import CondPageBreak, Flowable, Spacer
from reportlab.platypus.flowables import BalancedColumns

from supervisor.report.blocks import m, model_label, not_computed, stated, text
from supervisor.report.formatting import fmt_quantity, severity_label, severity_rank
from supervisor.report.styles import (
    BODY,
    CELL,
    CELL_BOLD,
    H2,
    H3,
    HEAD_FILL,
    PANEL_FILL,
    SMALL,
    TINY,
    TINY_CELL,
    grid,
    para,
    rich,
)
from supervisor.report.summary import dive_findings, findings_of
from supervisor.report.units import UnitSystem, unit_system


def _given(value: Any, unit: str | None, units: UnitSystem | None = None) -> str:
    """A finding's measured value or limit in the plan's units; ``None``: the rule states none."""
    if value is None:
        return "—"
    return units.quantity(value, unit) if units is not None else fmt_quantity(value, unit, 2)


def _unit(f: Mapping[str, Any]) -> str | None:
    unit = f.get("unit")
    return unit if isinstance(unit, str) else None


def group_findings(record: Mapping[str, Any], severities: Sequence[str] = ("fail", "warn"),
                   ) -> list[tuple[str, list[Mapping[str, Any]]]]:
    """Findings of the given severities, grouped: job-wide, then by dive in plan order.

    A severity that is none of fail, warn, info and pass counts as a warning
    (:func:`~supervisor.report.formatting.count_findings`).

    Returns
    -------
    list of (str, list)
        Group title and its findings, worst first; empty groups are left out.
        A dive id that is not in the plan's dives keeps its own group, after
        the plan's dives.
    """
    order: list[object] = [None]
    for dive in record.get("dives") or []:
        dive_id = m(dive).get("id")
        if dive_id not in order:
            order.append(dive_id)
    groups: dict[object, list[Mapping[str, Any]]] = {}
    known = ("fail", "warn", "info", "pass")
    for f in findings_of(record):
        severity = f.get("severity") if f.get("severity") in known else "warn"
        if severity not in severities:
            continue
        key = f.get("dive")
        try:
            hash(key)
        except TypeError:
            key = str(key)
        if key not in order:
            order.append(key)
        groups.setdefault(key, []).append(f)
    out = []
    for key in order:
        items = sorted(groups.get(key, []), key=lambda f: severity_rank(f.get("severity")))
        if items:
            out.append(("Job-wide" if key is None else f"Dive {key}", items))
    return out


def _row(f: Mapping[str, Any], units: UnitSystem) -> list[object]:
    unit = _unit(f)
    measured, limit = _given(f.get("measured"), unit, units), _given(f.get("limit"), unit, units)
    status = f"({stated(f.get('source_status'))})"
    if f.get("severity") == "info":  # information prints compactly
        return [para(severity_label("info"), SMALL), para(text(f.get("rule")), SMALL),
                para(text(f.get("message")), SMALL),
                para("—" if measured == limit == "—" else f"{measured} / {limit}", SMALL),
                para(f"{text(f.get('citation'))} {status}", SMALL)]
    return [para(severity_label(f.get("severity")), CELL_BOLD), para(text(f.get("rule")), SMALL),
            para(text(f.get("message")), CELL),
            [para(f"measured: {measured}", SMALL), para(f"limit: {limit}", SMALL)],
            para(f"{text(f.get('citation'))} {status}", SMALL)]


def _tail(record: Mapping[str, Any]) -> str:
    passes = sum(1 for f in findings_of(record) if f.get("severity") == "pass")
    return ("1 passed check is" if passes == 1 else f"{passes} passed checks are") + \
        " listed in the appendix."


def findings_section(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """Failures and warnings, one table per group (job-wide, then each dive), worst first."""
    out: list[Flowable] = [para("Findings to act on: failures and warnings, by dive", H2)]
    if not isinstance(record.get("findings"), list):
        return out + [not_computed("Findings")]
    groups = group_findings(record)
    if not groups:
        out.append(para("No failure and no warning. " + _tail(record) + " That is not a pass: "
                        "the supervisor reviews the plan in full.", BODY))
        return out + information_lines(record, None, width)
    out.append(para("Worst first within each group. Information is printed in each dive's "
                    "section. " + _tail(record), SMALL))
    units = unit_system(record)
    w = width
    widths = [0.075 * w, 0.165 * w, 0.43 * w, 0.13 * w, 0.2 * w]
    head = [para(h, CELL_BOLD) for h in ("Result", "Rule", "Finding", "Measured / limit",
                                         "Citation (source status)")]
    for title, items in groups:
        out.append(CondPageBreak(80))
        rows = [[para(title, CELL_BOLD), "", "", "", ""], head, *(_row(f, units) for f in items)]
        table = grid(rows, widths, extra=[("SPAN", (0, 0), (-1, 0)),
                                          ("BACKGROUND", (0, 1), (-1, 1), HEAD_FILL),
                                          ("BACKGROUND", (0, 0), (-1, 0), PANEL_FILL)])
        table.repeatRows = 2
        out.append(Spacer(1, 4))
        out.append(table)
    out += information_lines(record, None, width)
    return out


def references_table(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """Reference tables and coefficient sets used, with edition and status."""
    out: list[Flowable] = [CondPageBreak(90), para("Reference tables and model", H3)]
    refs = record.get("references")
    if not isinstance(refs, list) or not refs:
        out.append(not_computed("References used"))
    else:
        rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                     ("Name", "Title", "Edition", "Source status", "Verification")]]
        for ref in refs:
            ref = m(ref)
            rows.append([para(stated(ref.get(k)), TINY_CELL) for k in
                         ("name", "title", "edition", "source_status", "verification")])
        w = width
        out.append(grid(rows, [0.2 * w, 0.32 * w, 0.24 * w, 0.12 * w, 0.12 * w]))
    model = record.get("model")
    if isinstance(model, Mapping):
        out.append(Spacer(1, 3))
        out.append(rich([("Model: ", True), (model_label(model), False),
                         ("; coefficient status: ", False),
                         (text(model.get("coefficient_status")), True),
                         (" (printed beside every model figure)", False)], SMALL))
    else:
        out.append(not_computed("Decompression model"))
    return out


def _pass_values(items: Sequence[Mapping[str, Any]], units: UnitSystem | None = None) -> str:
    """``"limit 58 msw: D1 12, D2 18"`` when the limits agree, else ``"D1 12 / 58; ..."``."""
    def who(f: Mapping[str, Any]) -> str:
        return "job" if f.get("dive") is None else str(f.get("dive"))

    limits = {(repr(f.get("limit")), _unit(f)) for f in items}
    if all(f.get("measured") is None and f.get("limit") is None for f in items):
        return "passed: " + ", ".join(who(f) for f in items)
    if len(limits) == 1 and items[0].get("limit") is not None:
        unit = _unit(items[0])
        values = ", ".join(f"{who(f)} {_given(f.get('measured'), unit, units)}" for f in items)
        return f"limit {_given(items[0].get('limit'), unit, units)}: {values}"
    return "; ".join(f"{who(f)} {_given(f.get('measured'), _unit(f), units)} / "
                     f"{_given(f.get('limit'), _unit(f), units)}" for f in items)


#: Families whose information findings restate what a dive's section already prints:
#: the contingency table (family ``contingency``) and the ceiling-check paragraph with
#: its margin (rule ``model-margin``).  They are not printed twice; the JSON keeps them.
SHOWN_IN_DIVE_SECTION = {"contingency": "contingency schedules",
                         "model-margin": "the ceiling check's margin",
                         "table-conformance": "the reference table row (Schedules; its "
                                              "status is in references-unverified)",
                         "exposure-flying": "the wait before travel to altitude (page 1)"}


def _shown_elsewhere(f: Mapping[str, Any]) -> str | None:
    if f.get("family") == "contingency":
        return SHOWN_IN_DIVE_SECTION["contingency"]
    return SHOWN_IN_DIVE_SECTION.get(str(f.get("rule")))


def information_lines(record: Mapping[str, Any], dive_id: object,
                      width: float) -> list[Flowable]:
    """Information findings of one dive (``None``: job-wide), one compact line each.

    Information is what the check reports without judging it (margins,
    exposure windows, contingency schedules); it is printed where its
    figures are, in the dive's section.  Information that the section
    prints already (:data:`SHOWN_IN_DIVE_SECTION`) is named, not repeated.
    """
    items = [f for f in dive_findings(record, dive_id) if f.get("severity") == "info"]
    if not items:
        return []
    elsewhere = sorted({w for f in items if dive_id is not None
                        and (w := _shown_elsewhere(f)) is not None})
    items = [f for f in items if dive_id is None or _shown_elsewhere(f) is None]
    if not items:
        return []
    out: list[Flowable] = [para("Information (reported, not judged)", H3)]
    if elsewhere:
        out.append(para("Also information, printed above and not repeated: "
                        + " and ".join(elsewhere) + ".", TINY))
    for f in items:
        unit = _unit(f)
        units = unit_system(record)
        measured = _given(f.get("measured"), unit, units)
        limit = _given(f.get("limit"), unit, units)
        figures = "" if measured == limit == "—" else f" [{measured} / {limit}]"
        out.append(rich([(f"{text(f.get('rule'))}: ", True),
                         (f"{text(f.get('message'))}{figures} — {text(f.get('citation'))} "
                          f"({stated(f.get('source_status'))})", False)], SMALL))
    return out


def appendix_passed(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """Passed checks, one compact line per rule with each dive's measured value."""
    passes = [f for f in findings_of(record) if f.get("severity") == "pass"]
    out: list[Flowable] = [CondPageBreak(100), para("Appendix: passed checks", H2)]
    if not passes:
        return out + [para("The check reported no passed checks.", BODY)]
    by_rule: dict[str, list[Mapping[str, Any]]] = {}
    for f in passes:
        by_rule.setdefault(text(f.get("rule")), []).append(f)
    out.append(para(f"{len(passes)} passed check(s) of {len(by_rule)} rule(s), as rule: dives and "
                    "measured values (limit) — citation (source status). A pass on a source "
                    "that is not VERIFIED still rests on that source.", SMALL))
    out.append(Spacer(1, 2))
    lines = []
    units = unit_system(record)
    for rule, items in by_rule.items():
        first = items[0]
        lines.append(rich([(f"{rule}: ", True), (f"{_pass_values(items, units)} — ", False),
                           (f"{text(first.get('citation'))} "
                            f"({stated(first.get('source_status'))})", False)], TINY))
    out.append(BalancedColumns(lines, nCols=2, innerPadding=10, leftPadding=0, rightPadding=0,
                               topPadding=0, bottomPadding=0))
    return out
