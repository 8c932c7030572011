"""The per-dive sections of the checklist PDF, each built from the checklist record.

A dive's section holds its facts, the proposed, reference-table and model
schedules side by side (a stop with air breaks prints as its breathing
periods, never as one continuous oxygen stop), the ceiling check, the
profile and compartment charts, oxygen exposure (a lower bound marked as one;
chamber oxygen counted against the chamber procedure, never as an in-water
CNS percentage), gas supply in the plan's unit system, and the contingency
schedules.  Sections start where there is room, not on a new page each, and
every table may split across pages.  A section whose data are missing
prints :data:`~supervisor.report.formatting.NOT_COMPUTED`.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import Any

from reportlab.platypus import CondPageBreak, Flowable, KeepTogether, Spacer, Table

from supervisor import constants as C
from supervisor.quantities import gf_percent_text
from supervisor.report import charts
from supervisor.report.blocks import SignerNote, kv_lines, m, model_label, not_computed, stated
from supervisor.report.blocks import text as _text
from supervisor.report.findings_list import information_lines
from supervisor.report.fonts import REGULAR
from supervisor.report.formatting import (
    NOT_COMPUTED,
    VERDICT_LABEL,
    effective_verdict,
    flatten,
    fmt_number,
    fmt_quantity,
    fmt_scalar,
    fmt_stop_depth,
    fmt_stop_minutes,
    humanize_key,
    is_number,
    stop_periods,
    stops_line,
)
from supervisor.report.styles import (
    BODY,
    CELL,
    CELL_BOLD,
    H2,
    H3,
    SMALL,
    TINY,
    grid,
    para,
    rich,
)
from supervisor.report.summary import dive_counts
from supervisor.report.units import UnitSystem, unit_system

__all__ = ["SignerNote", "dive_section", "has_surface_interval", "model_label"]

_m = m
_stated = stated
_not_computed = not_computed
_kv_lines = kv_lines

#: Height of each chart of a dive (drawn side by side) [pt].
CHART_HEIGHT = 108.0


# ----------------------------------------------------------------------------- dives


def stop_gas_cell(stop: Mapping[str, Any]) -> list[Flowable]:
    """A stop's gas, or its breathing periods when it has them (air breaks).

    A stop with ``periods`` never prints as one continuous gas: the periods
    replace the gas name (``"O2 15, air 5, O2 15 min"``).
    """
    periods = stop_periods(stop)
    if periods is None:
        return [para(_text(stop.get("gas")), CELL)]
    return [para(periods, CELL), para("(air breaks)" if "air" in periods.lower() else
                                      "(periods)", SMALL)]


def _stops_table(stops: Any, unit: str, width: float) -> Flowable:
    """A schedule's stops, one row each; a stop with air breaks shows its periods."""
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
                     stop_gas_cell(stop),
                     para(_text(stop.get("place")), CELL)])
    return grid(rows, [0.22 * width, 0.16 * width, 0.36 * width, 0.26 * width], repeat=False)


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


def _stops(stops: Any, unit: str, width: float, compact: bool, lead: str = "") -> Flowable:
    if not compact:
        return _stops_table(stops, unit, width)
    line = stops_line(stops, unit)
    return rich([(f"{lead}: " if lead else "", True), (line, line == NOT_COMPUTED)], CELL)


def reference_cells(ref: Any, unit: str, width: float, *,
                    compact: bool = False, lead: str = "",
                    brief_row: bool = False) -> list[Flowable]:
    """A reference-table schedule: its stops, or why there are none, and its row.

    "no decompression stops" is printed only for a whole schedule (no
    ``reason``, inside the table, stops given); a missing or partial one
    prints its reason and "needs review" instead, and a row that is not
    verified says so.  ``compact`` prints the stops and the row in lines
    instead of a table (contingency schedules).
    """
    if not isinstance(ref, Mapping):
        return [rich([(f"{lead}: " if lead else "", True), (NOT_COMPUTED, True)], CELL)]
    cells: list[Flowable] = []
    gaps = reference_gaps(ref)
    stops = ref.get("stops")
    if gaps:
        if isinstance(stops, list) and stops:
            cells.append(_stops(stops, unit, width, compact, lead))
            cells.append(para("Partial reference schedule — needs review:", CELL_BOLD))
        else:
            if lead:
                cells.append(para(lead, CELL_BOLD))
            cells.append(para("No reference schedule — needs review:", CELL_BOLD))
        cells += [para(gap, CELL) for gap in gaps]
    else:
        cells.append(_stops(stops, unit, width, compact, lead))
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
    if compact or brief_row:
        cells.append(para(f"row {row}; repetitive group {_text(ref.get('repetitive_group'))}; "
                          f"source {_stated(ref.get('source_status'))}", SMALL))
        return cells
    cells += _kv_lines([("row", row), ("repetitive group", _text(ref.get("repetitive_group"))),
                        ("source status", _stated(ref.get("source_status")))])
    return cells


def _model_cells(sched: Any, unit: str, width: float, *,
                 totals: Sequence[tuple[str, str]] = (),
                 compact: bool = False, lead: str = "") -> list[Flowable]:
    """A model schedule's stops and totals, or why it was not computed."""
    head = [para(lead, CELL_BOLD)] if lead else []
    if not isinstance(sched, Mapping):
        return [*head, para(NOT_COMPUTED, CELL_BOLD)]
    error = sched.get("error")
    if error:
        return [*head, para(NOT_COMPUTED, CELL_BOLD), para(str(error), CELL)]
    if "total_stop_min" in sched and sched.get("total_stop_min") is None \
            and not sched.get("stops"):
        return [*head, para(NOT_COMPUTED, CELL_BOLD)]  # an empty list here means "no schedule"
    cells: list[Flowable] = [_stops(sched.get("stops"), unit, width, compact, lead)]
    pairs = [
        ("total stop time", _minutes(sched.get("total_stop_min"))),
        ("total ascent time", _minutes(sched.get("total_ascent_min"))),
        ("no-stop limit", "not reported" if sched.get("no_stop_limit_min") is None
         else _minutes(sched.get("no_stop_limit_min"))),
        *totals,
    ]
    if compact:
        cells.append(para("; ".join(f"{k} {v}" for k, v in pairs), SMALL))
    else:
        cells += _kv_lines(pairs)
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
    ref_cells = reference_cells(ref, unit, inner, brief_row=True)
    ref_head = (f"Reference table: {_text(_m(ref).get('table'))}" if isinstance(ref, Mapping)
                else "Reference table")
    model_cells = _model_cells(dive.get("model_schedule"), unit, inner)
    model_head = (f"Model: {model_label(model)} "
                  f"(coefficients {_text(model.get('coefficient_status'))})")

    rows = [[para("Proposed (plan)", CELL_BOLD), para(ref_head, CELL_BOLD),
             para(model_head, CELL_BOLD)],
            [proposed, ref_cells, model_cells]]
    return grid(rows, [col, col, col], repeat=False)


def dive_facts(dive: Mapping[str, Any], record: Mapping[str, Any], width: float) -> Flowable:
    """Diver, mode, gas, depth, bottom time and decompression mode, in one line."""
    unit = _text(record.get("unit"))
    pairs = [
        ("Diver", _text(dive.get("diver"))),
        ("mode", _text(dive.get("mode"))),
        ("gas", _text(dive.get("gas"))),
        ("maximum depth", fmt_quantity(dive.get("max_depth"), unit)),
        ("bottom time", _minutes(dive.get("bottom_time_min"))),
        ("decompression", _text(dive.get("decompression"))),
    ]
    parts: list[tuple[object, bool]] = []
    for n, (key, value) in enumerate(pairs):
        parts += [(("" if n == 0 else "; ") + f"{key}: ", True), (value, False)]
    return rich(parts, BODY)


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
                   "M-value gradient, judged apart against the policy's surface-interval limit "
                   "(finding proc-surd-supersaturation).")


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
        f" Surfacing gradient factor of the planned profile "
        f"{gf_percent_text(pct) if is_number(pct) else fmt_quantity(pct, '%', 0)}; "
        f"controlling compartment "
        f"{_text(margin.get('controlling_compartment'))}; margin "
        f"{_minutes(margin.get('margin_min'))}. (Model coefficients {status}.)", False)]
    if surd:
        parts.append((" " + surface_interval_note(dive), True))
    return [rich(parts, BODY)]


def _atm(bar: object) -> str:
    """A PO2 given in bar, printed in atm (ata), the unit of the oxygen limits."""
    if not is_number(bar):
        return fmt_number(bar)
    return fmt_number(float(bar) / C.P_ATM_BAR, 2)  # type: ignore[arg-type]


def cns_text(oxygen: Mapping[str, Any]) -> tuple[str, bool]:
    """The CNS figure as printed, and whether it needs attention (bold).

    A lower bound (``cns_is_lower_bound``) prints as ``"at least 13.8
    (lower bound)"``, rounded down; a missing figure as not computed.
    """
    value = oxygen.get("cns_percent")
    if not is_number(value):
        return NOT_COMPUTED, True
    if oxygen.get("cns_is_lower_bound") is True:
        low = math.floor(float(value) * 10 + 1e-9) / 10  # type: ignore[arg-type]
        return f"at least {fmt_number(low, 1)} (lower bound)", True
    return fmt_number(value, 1), False


def chamber_oxygen_text(chamber: Mapping[str, Any]) -> str:
    """Chamber oxygen as the chamber procedure counts it: minutes, periods, PO2, limit."""
    parts = [f"{fmt_quantity(chamber.get('minutes'), 'min', 0)} in "
             f"{fmt_number(chamber.get('periods'), 1)} period(s)"]
    if is_number(chamber.get("max_po2_atm")):
        parts.append(f"PO2 up to {fmt_number(chamber.get('max_po2_atm'), 2)} atm")
    counted = chamber.get("counted_by")
    parts.append(f"counted by {counted}" if counted else "counting rule not stated — needs "
                 "review")
    limit = chamber.get("limit")
    parts.append(f"limit: {limit}" if limit else "limit: none stated — needs review")
    return "; ".join(parts)


def oxygen_table(dive: Mapping[str, Any], width: float) -> list[Flowable]:
    """PO2 per phase [atm], CNS % (in-water, a lower bound marked), chamber oxygen, OTU."""
    out: list[Flowable] = [para("Oxygen exposure", H3)]
    oxygen = dive.get("oxygen")
    if not isinstance(oxygen, Mapping):
        return out + [_not_computed("Oxygen exposure")]
    by_phase = oxygen.get("po2_by_phase")
    rows: list[list[object]] = [[para("Phase", CELL_BOLD), para("PO2 [atm]", CELL_BOLD)]]
    surd = has_surface_interval(dive)
    if isinstance(by_phase, Mapping) and by_phase:
        order = ("bottom", "decompression", "chamber")
        phases = sorted(by_phase.items(), key=lambda kv: (order.index(kv[0])
                                                          if kv[0] in order else 3))
        for phase, value in phases:
            if phase == "chamber" and value is None and not surd:
                continue  # no chamber phase in this dive
            rows.append([para(str(phase), CELL), para(_atm(value), CELL)])
    else:
        rows.append([para("by phase", CELL), para(NOT_COMPUTED, CELL_BOLD)])
    top = oxygen.get("max_po2_atm")
    rows.append([para("maximum PO2 [atm]", CELL_BOLD),
                 para(fmt_number(top, 2) if is_number(top) else _atm(oxygen.get("max_po2")),
                      CELL)])
    chamber = oxygen.get("chamber_oxygen")
    chamber_po2 = _m(by_phase).get("chamber")
    cns, attention = cns_text(oxygen)
    if isinstance(chamber, Mapping):
        label = "in-water CNS [% of limit]"
    elif "chamber_oxygen" not in oxygen and is_number(chamber_po2):
        label = "CNS [% of limit], water and chamber counted on the in-water table"
        attention = True
    else:
        label = "in-water CNS [% of limit]" if "chamber_oxygen" in oxygen else "CNS [% of limit]"
    rows.append([para(label, CELL_BOLD), para(cns, CELL_BOLD if attention else CELL)])
    if isinstance(chamber, Mapping):
        rows.append([para("chamber oxygen (no CNS %: counted against the chamber procedure)",
                          CELL_BOLD), para(chamber_oxygen_text(chamber), CELL)])
    elif "chamber_oxygen" not in oxygen and is_number(chamber_po2):
        rows.append([para("chamber oxygen", CELL_BOLD),
                      para("not counted against the chamber procedure's limits by this check — "
                           "needs review", CELL_BOLD)])
    rows.append([para("pulmonary dose [OTU]", CELL_BOLD),
                 para(fmt_number(oxygen.get("otu"), 0), CELL)])
    notes = []
    if oxygen.get("cns_note"):
        notes.append(str(oxygen["cns_note"]))
    above = oxygen.get("minutes_above_table")
    if is_number(above) and float(above) > 0:
        tol = oxygen.get("po2_tolerance_atm")
        notes.append(f"{fmt_number(above, 1)} min in the water above the CNS table's top row"
                     + (f" (PO2 tolerance {fmt_number(tol, 3)} atm)" if is_number(tol) else ""))
    out.append(grid(rows, [0.55 * width, 0.45 * width], repeat=False))
    out += [para(n, SMALL) for n in notes]
    return out


def _has_oxygen_stops(dive: Mapping[str, Any]) -> bool:
    stops = dive.get("proposed_stops")
    if not isinstance(stops, list):
        return True  # unknown: assume oxygen may be breathed
    return any("oxygen" in str(_m(s).get("gas", "")).lower() for s in stops)


def _supply_row(label: str, have: Any, need: Any, shown: tuple[str, str]) -> list[object]:
    """One "available against need" row; any missing figure prints as not computed."""
    have_text, need_text = shown
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


_SUPPLY_LABELS: dict[str, str] = {
    "rmv_lpm": "breathing rate assumed",
    "people": "people counted",
    "diver_need_l": "one diver's need, whole dive",
    "need_l": "need of all counted, whole dive",
    "over_bottom_psig": "over-bottom pressure",
    "mmp_psig": "minimum manifold pressure",
    "bailout_required_psig_rounded": "bailout required, rounded up",
    "bottom_psig": "water pressure at the bottom",
    "chamber_required": "chamber required",
}


def supply_details(supply: Mapping[str, Any], shown: set[str], units: UnitSystem) -> str:
    """The other gas-supply figures in one line, each in the plan's unit system."""
    parts = []
    if supply.get("basis"):  # the basis already names the breathing rate and the people counted
        shown = shown | {"rmv_lpm", "people"}
    for key, value in flatten({k: v for k, v in supply.items() if k not in shown}):
        if value is None or value == [] or value == "":
            continue
        converted = units.by_key(key, value)
        label = _SUPPLY_LABELS.get(key) or humanize_key(key)[0]
        if converted is not None:
            parts.append(f"{label} {converted[1]}")
        else:
            unit = humanize_key(key)[1]
            value_text = fmt_quantity(value, unit, 1) if is_number(value) else fmt_scalar(value)
            parts.append(f"{label} {value_text}" if key != "basis" else f"basis: {value_text}")
    return "; ".join(parts)


def gas_supply_table(dive: Mapping[str, Any], width: float,
                     units: UnitSystem) -> list[Flowable]:
    """Gas supply against need: what the check compares, then the other figures.

    A compressor is compared by flow (its delivery against the peak flow the
    divers need at the maximum depth), a bank or cylinder by free gas against
    the need; a figure the check does not give prints as not computed.  Free
    gas prints in litres (msw plans) or standard cubic feet (fsw plans),
    gauge pressures in bar or psig.
    """
    out: list[Flowable] = [para("Gas supply against need", H3)]
    supply = dive.get("gas_supply")
    if not isinstance(supply, Mapping):
        return out + [_not_computed("Gas supply")]
    rows: list[list[object]] = [[para(h, CELL_BOLD) for h in
                                 ("Supply", "available", "needed", "available / needed")]]

    def flows(a: str, b: str) -> tuple[str, str]:
        return units.flow(supply.get(a)), units.flow(supply.get(b))

    def gases(a: str, b: str) -> tuple[str, str]:
        return units.gas(supply.get(a)), units.gas(supply.get(b))

    kind = supply.get("primary_kind")
    if _is_compressor(supply, "primary"):
        rows.append(_supply_row("primary compressor: delivery against peak flow",
                                supply.get("primary_delivery_lpm"), supply.get("peak_flow_lpm"),
                                flows("primary_delivery_lpm", "peak_flow_lpm")))
    else:
        label = f"primary {kind}" if isinstance(kind, str) and kind else "primary"
        rows.append(_supply_row(f"{label}: free gas against the whole dive",
                                supply.get("available_l"), supply.get("need_l"),
                                gases("available_l", "need_l")))
    if any(k.startswith("secondary_") for k in supply):
        second = supply.get("secondary_kind")
        if second is None:
            rows.append([para("secondary", CELL), para("none in the plan", CELL_BOLD), "", ""])
        elif _is_compressor(supply, "secondary"):
            rows.append(_supply_row("secondary compressor: delivery against peak flow",
                                    supply.get("secondary_delivery_lpm"),
                                    supply.get("peak_flow_lpm"),
                                    flows("secondary_delivery_lpm", "peak_flow_lpm")))
        else:
            rows.append(_supply_row(f"secondary {second}: free gas against the ascent and "
                                    "decompression", supply.get("secondary_available_l"),
                                    supply.get("recovery_need_l"),
                                    gases("secondary_available_l", "recovery_need_l")))
    if "oxygen_need_l" in supply:
        if supply.get("oxygen_need_l") is None and not _has_oxygen_stops(dive):
            rows.append([para("decompression oxygen", CELL),
                         para("no oxygen stops in the plan", CELL), "", ""])
        else:
            rows.append(_supply_row("decompression oxygen", supply.get("oxygen_available_l"),
                                    supply.get("oxygen_need_l"),
                                    gases("oxygen_available_l", "oxygen_need_l")))
    if "bailout_psig" in supply or "bailout_required_psig" in supply:
        rows.append(_supply_row("bailout cylinder: charge against required",
                                supply.get("bailout_psig"), supply.get("bailout_required_psig"),
                                (units.gauge(supply.get("bailout_psig"), "psig"),
                                 units.gauge(supply.get("bailout_required_psig"), "psig"))))
    w = width
    out.append(grid(rows, [0.4 * w, 0.19 * w, 0.19 * w, 0.22 * w], repeat=False,
                    extra=[("SPAN", (1, r), (3, r)) for r, row in enumerate(rows)
                           if r and row[2] == ""]))
    shown = set(_SUPPLY_SHOWN) - ({"need_l"} if _is_compressor(supply, "primary") else set())
    details = supply_details(supply, shown, units)
    if details:
        out.append(Spacer(1, 2))
        out.append(para(details, TINY))
    return out


_CONTINGENCIES = (
    ("overrun", "Bottom-time overrun"),
    ("deeper", "Deeper than planned"),
    ("oxygen_failure", "Loss of decompression oxygen"),
)

_CONTINGENCY_SHOWN = ("kind", "depth", "bottom_time_min", "basis", "stops", "total_stop_min",
                      "total_ascent_min", "no_stop_limit_min", "oxygen", "reference", "error")


_NOT_APPLICABLE = "not applicable: the plan breathes no oxygen at its stops"


def _not_applicable(key: str, sched: Any, dive: Mapping[str, Any]) -> bool:
    """Loss of oxygen for a dive that breathes none at its stops (and the check gave none)."""
    return (key == "oxygen_failure" and sched is None
            and dive.get("decompression") in ("none", "in-water")
            and not _has_oxygen_stops(dive))


def _contingency_cell(key: str, title: str, sched: Any, dive: Mapping[str, Any], unit: str,
                      width: float) -> list[Flowable]:
    cell: list[Flowable] = [para(title, CELL_BOLD)]
    if not isinstance(sched, Mapping):
        if _not_applicable(key, sched, dive):
            return cell + [para(_NOT_APPLICABLE, CELL)]
        return cell + [para(NOT_COMPUTED, CELL_BOLD)]
    depth, time = sched.get("depth"), sched.get("bottom_time_min")
    basis = f" ({sched['basis']})" if sched.get("basis") else ""
    if is_number(depth) and is_number(time):
        cell.append(rich([("dive: ", True), (f"{fmt_quantity(depth, unit)} for {_minutes(time)}",
                                             False), (basis, False)], CELL))
    else:
        cell += _kv_lines([("depth", fmt_quantity(depth, unit)), ("bottom time", _minutes(time))])
        if basis:
            cell.append(para(basis.strip(" ()"), SMALL))
    oxygen = _m(sched.get("oxygen"))
    cns, _ = cns_text(oxygen)
    cell += _model_cells(sched, unit, width, totals=[
        ("in-water CNS" if "chamber_oxygen" in oxygen else "CNS",
         cns + (" %" if is_number(oxygen.get("cns_percent")) else "")),
        ("OTU", fmt_number(oxygen.get("otu"), 0)),
    ], compact=True, lead="Model")
    table = _m(sched.get("reference")).get("table")
    cell += reference_cells(sched.get("reference"), unit, width, compact=True,
                            lead=f"Table {table}" if table else "Reference table")
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
    keys = [(key, title) for key, title in _CONTINGENCIES
            if not _not_applicable(key, cont.get(key), dive)]
    col = width / len(keys) if keys else width
    cells = [_contingency_cell(key, title, cont.get(key), dive, unit, col - 8)
             for key, title in keys]
    if cells:
        out.append(grid([cells], [col] * len(cells), header=False))
    for key, title in _CONTINGENCIES:
        if _not_applicable(key, cont.get(key), dive):
            out.append(rich([(f"{title}: ", True), (_NOT_APPLICABLE, False)], SMALL))
    return [KeepTogether(out)]


def dive_verdict(dive: Mapping[str, Any], record: Mapping[str, Any]) -> Flowable:
    """The dive's verdict and counts, over its own findings and the job-wide ones."""
    counts = dive_counts(record, dive.get("id"))
    verdict, _ = effective_verdict(dive.get("verdict"), counts)
    return rich([("Dive verdict: ", False), (VERDICT_LABEL[verdict], True), (
        f" ({counts['fail']} fail, {counts['warn']} warn, {counts['info']} info, "
        f"{counts['pass']} pass; this dive's findings and the job-wide ones)", False)],
        BODY)


def _side_by_side(left: object, right: object, width: float, split: float = 0.5) -> Table:
    """Two blocks next to each other; the row may split across pages."""
    pair = Table([[left, right]], colWidths=[width * split, width * (1 - split)], splitInRow=1)
    pair.setStyle([("VALIGN", (0, 0), (-1, -1), "TOP"), ("LEFTPADDING", (0, 0), (-1, -1), 0),
                   ("RIGHTPADDING", (0, 0), (-1, -1), 6),
                   ("FONTNAME", (0, 0), (-1, -1), REGULAR)])
    return pair


def dive_charts(dive: Mapping[str, Any], record: Mapping[str, Any], width: float) -> Flowable:
    """The depth-time profile with the model ceiling beside the compartment loading."""
    model = _m(record.get("model"))
    status = _text(model.get("coefficient_status"))
    surd = has_surface_interval(dive)
    w_left, w_right = 0.58 * width - 6, 0.42 * width - 6
    profile = charts.profile_chart(dive.get("chart"), _text(record.get("unit")),
                                   model_label(model), width=w_left, height=CHART_HEIGHT,
                                   surface_interval=surd)
    left: list[Flowable] = [
        para(f"Planned profile and model ceiling ({status})", H3),
        profile if profile is not None else _not_computed("Depth-time chart")]
    if surd:
        left.append(para("Dotted box: the surface interval of surface decompression, "
                         "excluded from the ceiling check (see the ceiling check above); "
                         "shading marks only breaks outside it.", SMALL))
    bars = charts.compartment_chart(dive.get("compartments"), width=w_right, height=CHART_HEIGHT,
                                    gf_high=model.get("gf_high"))
    right: list[Flowable] = [
        para(f"Surfacing gradient factor by compartment ({status})", H3),
        bars if bars is not None else _not_computed("Compartment loading")]
    pair = Table([[left, right]], colWidths=[width * 0.58, width * 0.42])
    pair.setStyle([("VALIGN", (0, 0), (-1, -1), "TOP"), ("LEFTPADDING", (0, 0), (-1, -1), 0),
                   ("FONTNAME", (0, 0), (-1, -1), REGULAR)])
    return pair  # one row that never splits: a chart stays with its heading


def dive_section(dive: Mapping[str, Any], record: Mapping[str, Any],
                 width: float) -> list[Flowable]:
    """Everything about one dive; it starts on the current page when there is room."""
    out: list[Flowable] = [
        CondPageBreak(150),
        para(f"Dive {_text(dive.get('id'))}: {_text(dive.get('diver'))}", H2),
        dive_verdict(dive, record),
        Spacer(1, 3),
        dive_facts(dive, record, width),
        para("Schedules", H3),
        schedules_side_by_side(dive, record, width),
        Spacer(1, 3),
        *model_margin(dive, record),
        dive_charts(dive, record, width),
    ]
    units = unit_system(record)
    # kept on one page when it fits one: the figures of a table stay with its heading
    out.append(KeepTogether([_side_by_side(oxygen_table(dive, width * 0.45 - 6),
                                           gas_supply_table(dive, width * 0.55 - 6, units),
                                           width, 0.45)]))
    out += contingency_section(dive, record, width)
    out += information_lines(record, dive.get("id"), width)
    return out
