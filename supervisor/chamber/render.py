"""Plain-text views of a treatment plan and a treatment log, for the chamber operator.

Both take the JSON-ready dicts (``supervisor.treatment/1``,
``supervisor.treatment-log/1``) so the printed page and the JSON can never say
different things.  Every line of user text goes through
:func:`supervisor.text.printable`.
"""

from __future__ import annotations

from typing import Any

from supervisor.chamber.clock import hours_minutes
from supervisor.text import printable

_ROLE = {"compression": "compression", "oxygen": "oxygen", "air-break": "air break",
         "air": "air", "gas": "treatment gas"}


def _clock(text: str, day: int) -> str:
    return text if day == 0 else f"{text} +{day}d"


def _depth(a: float, b: float) -> str:
    return f"{a:g}" if a == b else f"{a:g}→{b:g}"


def _num(x: float | None, nd: int = 0) -> str:
    if x is None:
        return "-"
    return f"{x:.{nd}f}" if nd else f"{x:g}"


def _attendant_gas(step: dict[str, Any], periods: list[dict[str, Any]]) -> str:
    s, e = step["start_min"], step["end_min"]
    parts = []
    for p in periods:
        a, b = max(s, p["start_min"]), min(e, p["end_min"])
        if b - a > 1e-6:
            parts.append((a, b))
    if not parts:
        return "air"
    if len(parts) == 1 and abs(parts[0][0] - s) < 1e-6 and abs(parts[0][1] - e) < 1e-6:
        return "oxygen"
    return "oxygen from +" + f"{parts[0][0] - s:g} min"


def step_table(plan: dict[str, Any]) -> list[str]:
    """The timeline as aligned lines (header first)."""
    unit = plan["unit"]
    periods = plan["attendant"]["oxygen_periods"]
    head = (f"{'line':>4}  {'start':<11} {'end':<11} {'depth ' + unit:>10}  {'patient':<13} "
            f"{'min':>5} {'table':>6} {'O2 sum':>6}  {'attendant':<16} note")
    out = [head]
    for s in plan["steps"]:
        rate = f" at {s['travel_rate']:g} {unit}/min" if s["travel_rate"] and \
            s["from_depth"] != s["to_depth"] and s["role"] != "compression" else ""
        note = s["note"] if s["role"] == "compression" else ""
        if s["extension"]:
            note = f"extension {s['extension']}"
        if rate:
            note = (note + "; " if note else "") + "travel" + rate
        out.append(
            f"{s['line']:>4}  {_clock(s['start'], s['start_day']):<11} "
            f"{_clock(s['end'], s['end_day']):<11} {_depth(s['from_depth'], s['to_depth']):>10}  "
            f"{_ROLE[s['role']]:<13} {_num(s['minutes']):>5} {_num(s['table_min']):>6} "
            f"{_num(s['oxygen_min']):>6}  {_attendant_gas(s, periods):<16} {printable(note)}"
            .rstrip())
    return out


def _finding_line(f: dict[str, Any]) -> str:
    vals = ""
    if f.get("measured") is not None or f.get("limit") is not None:
        unit = f" {f['unit']}" if f.get("unit") else ""
        m = "-" if f.get("measured") is None else f["measured"]
        lim = "" if f.get("limit") is None else f", limit {f['limit']}"
        vals = f" (measured {m}{lim}{unit})"
    src = f["citation"] + (f"; {f['source_status']}" if f.get("source_status") else "")
    return f"  {f['severity']:<5} {f['rule']}: {printable(f['message'])}{vals} [{src}]"


def plan_lines(plan: dict[str, Any]) -> list[str]:
    """The printed treatment plan (module docstring)."""
    t = plan["table"]
    ext = plan["extensions"]
    asked = ", ".join(f"--{k.replace('_', '-')} {n}" for k, n in ext.items() if n) or "none"
    out = [f"Treatment Table {t['number']}: planned to start {plan['start']}; extensions: {asked}",
           f"{t['citation']}; steps {t['source_status']}, {t['rows_verified']} of {t['rows']} "
           "rows verified",
           f"use: {t['indication']}",
           f"time: {t['time_definition']}"]
    if plan.get("job_plan"):
        out.append(f"chamber, policy and site from the job plan: {printable(plan['job_plan'])}")
    out.append("")
    out += step_table(plan)
    end = _clock(plan["end"], plan["end_day"])
    stated = ""
    if t["stated_total_min"] is not None and not any(ext.values()):
        stated = f"; stated total {t['stated_total_min']:g} min ({t['stated_total_status']})"
    out.append(f"total: {plan['total_min']:g} min table time ({hours_minutes(plan['total_min'])})"
               f"{stated}; {plan['elapsed_min']:g} min from leaving the surface; surfacing {end}; "
               f"patient oxygen {plan['oxygen_min']:g} min")
    out.append(f"extensions allowed: {t['extensions_allowed']}")
    out += [""] + patient_lines(plan) + [""] + attendant_lines(plan) + [""] + rules_lines(plan)
    out += [""] + atmosphere_lines(plan) + ["", "findings (worst first):"]
    out += [_finding_line(f) for f in plan["findings"]]
    c = plan["counts"]
    out.append(f"verdict: {plan['verdict']} ({c['fail']} fail, {c['warn']} warn, {c['info']} "
               f"info, {c['pass']} pass)")
    out += [f"caution: {x}" for x in plan["cautions"]]
    return out


def patient_lines(plan: dict[str, Any]) -> list[str]:
    """The patient's dose."""
    d = plan["doses"]["patient"]
    cns = d["cns"]
    out = ["patient dose:",
           f"  pulmonary: {d['otu']:.0f} OTU over the treatment ({d['otu_oxygen']:.0f} on oxygen); "
           f"{d['otu_rule']}",
           f"  CNS: {len(cns['oxygen_periods'])} oxygen periods, longest "
           f"{cns['longest_period_min']:g} min, PO2 up to {d['max_po2_atm']:.2f} atm; "
           f"{cns['minutes_above_in_water_table']:g} min above the in-water table: "
           f"{cns['in_water_percent_reason']}",
           f"  CNS rule: {cns['rule']} [{cns['citation']}]",
           f"  {d['pulmonary_note']}"]
    cc = d.get("cross_check")
    if cc:
        out.append(f"  cross-check: {cc['what']} is about {cc['quoted_otu']:g} OTU "
                   f"({cc['status']}); computed {cc['computed_otu']:g} OTU "
                   f"({cc['difference_percent']:+g} %)")
    return out


def attendant_lines(plan: dict[str, Any]) -> list[str]:
    """The inside attendant."""
    a = plan["attendant"]
    n = max(plan["occupants"] - 1, 0)
    out = [f"inside attendant ({n} in the lock with the patient; each follows this rule):"]
    for c in a["oxygen_rule"]:
        out.append(f"  rule: {c['case']} [{c['citation']}; {c['source_status']}]"
                   + (f" ({c['note']})" if c["note"] else ""))
    if not a["oxygen_rule"]:
        out.append("  rule: none bundled for this table")
    if a["chamber_air_only"]:
        out.append("  oxygen: none (chamber air only)")
    for p in a["oxygen_periods"]:
        out.append(f"  oxygen {_clock(p['start'], p['start_day'])} to "
                   f"{_clock(p['end'], p['end_day'])}: {p['minutes']:g} min, "
                   f"{_depth(p['from_depth'], p['to_depth'])} {plan['unit']}")
    rd = a["recent_dive"]
    if rd:
        case = "applies" if a["recent_exposure_case"] else "does not apply"
        out.append(f"  recent dive {rd['depth_fsw']:g} fsw / {rd['bottom_min']:g} min "
                   f"({rd['gas']}), surfaced {hours_minutes(rd['since_min'])} before the start: "
                   f"the {a['recent_exposure_window_h']:g}-h recent-exposure case {case}")
    m, g = a["model"], a["margin"]
    gf = g["surfacing_gf_percent"]
    surf = f"{gf:.0f} % of the M-value gradient" if gf > 0 else "no supersaturation"
    out.append(f"  own decompression: {m['name']} GF {100 * m['gf_low']:.0f}/"
               f"{100 * m['gf_high']:.0f} (coefficients {m['coefficient_status']}): ceiling "
               f"{'BROKEN' if g['ceiling_broken'] else 'not broken'}; surfacing {surf} "
               f"(compartment {g['controlling_compartment']})")
    out.append(f"  dose: {a['otu']:.0f} OTU ({a['otu_oxygen']:.0f} on oxygen); single-day "
               f"allowance {a['otu_allowance']:g} OTU (REPEX, {a['otu_allowance_status']})")
    out += [f"  note: {x}" for x in a["notes"]]
    out += [f"  WARNING: {x}" for x in a["warnings"]]
    return out


def rules_lines(plan: dict[str, Any]) -> list[str]:
    """The rules around the treatment, grouped by topic."""
    titles = {"attendant": "attendant", "patient": "patient", "retreatment": "re-treatment",
              "oxygen": "oxygen toxicity"}
    out = ["after the treatment and during it (each rule cited; none improvised):"]
    for topic, title in titles.items():
        for r in plan["rules"]:
            if r["topic"] != topic:
                continue
            when = f" -> until {r['until']}" if r["until"] and r["unit"] == "h" else (
                f" -> {r['until']}" if r["until"] else "")
            out.append(f"  {title}: {r['text']} ({r['value']:g} {r['unit']}){when} "
                       f"[{r['citation']}; {r['source_status']}]"
                       + (f" ({r['note']})" if r["note"] else ""))
    for text in plan["rules_missing"]:
        out.append(f"  not bundled: {text}; ask the diving medical officer")
    return out


def atmosphere_lines(plan: dict[str, Any]) -> list[str]:
    """Chamber atmosphere, ventilation and the chamber's own gas."""
    at = plan["atmosphere"]
    out = ["chamber atmosphere and fire safety:"]
    for x in at["limits"]:
        bound = "at most" if x["bound"] == "max" else "at least"
        out.append(f"  {x['limit']}: {bound} {x['value']:g} {x['unit']}: {x['text']} "
                   f"[{x['citation']}; {x['source_status']}]")
    g = plan["chamber_gas"]
    for v in g["ventilation"]:
        out.append(f"  ventilation {v['lpm']:.0f} L/min ({v['acfm']:g} acfm) for {v['minutes']:g} "
                   f"min: {v['situation']}")
    out += [f"  WARNING: {w}" for w in at["warnings"]]
    out += [f"  note: {w}" for w in at["notes"]]
    if g["need_l"] is None:
        out.append(f"  chamber gas: not sized ({', '.join(g['missing'])})")
    else:
        out.append(f"  chamber gas: {g['available_l']:.0f} L in the flasks against "
                   f"{g['need_l']:.0f} L for the whole treatment "
                   f"({'SHORT' if g['short'] else 'enough'}; "
                   + ", ".join(f"{k} {v:.0f} L" for k, v in g["parts_l"].items())
                   + f"; {g['source_status']})")
        out += [f"    basis: {b}" for b in g["basis"]]
        if g.get("need_every_extension_l") is not None:
            out.append(f"  with every extension the table allows: {g['need_every_extension_l']:.0f}"
                       f" L ({'SHORT' if g['short_with_every_extension'] else 'enough'})")
    return out


def log_lines(log: dict[str, Any]) -> list[str]:
    """The printed treatment log: planned against actual, then the deviations."""
    t = log["table"]
    unit = log["unit"]
    out = [f"Treatment Table {t['number']} as run: started {log['actual_start']} (planned "
           f"{log['planned_start']}); extensions run: "
           + (", ".join(f"--{k.replace('_', '-')} {n}" for k, n in log["extensions"].items() if n)
              or "none"),
           f"compared with {t['citation']} (steps {t['source_status']})"]
    for who in ("operator", "attendant", "patient"):
        if log.get(who):
            out.append(f"{who}: {printable(log[who])}")
    out += ["", f"{'line':>4}  {'depth ' + unit:>10}  {'patient':<11} {'plan':>6} "
            f"{'actual':>7} {'start':<10} {'end':<10} {'O2 off':>6}  deviation / patient state"]
    for x in log["lines"]:
        a, e = x["actual_start"], x["actual_end"]
        start = "-" if a is None else _clock(a["clock"], a["day"])
        end = "-" if e is None else _clock(e["clock"], e["day"])
        state = "; ".join(v for v in (", ".join(x["deviations"]), x["patient"],
                                      f"relief {x['relief']}" if x["relief"] else "",
                                      x["note"]) if v)
        off = f"{x['interrupted_min']:g}" if x["interrupted_min"] else ""
        out.append(f"{x['line']:>4}  {_depth(x['from_depth'], x['to_depth']):>10}  "
                   f"{_ROLE[x['role']]:<11} {_num(x['planned_min']):>6} "
                   f"{_num(x['actual_min']):>7} {start:<10} {end:<10} {off:>6}  "
                   f"{printable(state)}".rstrip())
    if log["attendant_oxygen"]:
        out.append("")
        for p in log["attendant_oxygen"]:
            out.append(f"attendant oxygen as run: {p['start'] or '-'} to {p['end'] or '-'} "
                       f"({p['planned_minutes']:g} min planned)")
    out += ["", "findings (worst first):"]
    out += [_finding_line(f) for f in log["findings"] if f["severity"] != "pass"]
    c = log["counts"]
    out.append(f"verdict: {log['verdict']} ({c['fail']} fail, {c['warn']} warn, {c['info']} info, "
               f"{c['pass']} pass)")
    out += [f"caution: {x}" for x in log["cautions"]]
    return out
