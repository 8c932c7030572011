"""The checklist's closing pages: team, chamber, pre-dive items, cautions, signature blocks.

Pre-dive items that the plan already states (its ``site``, ``chamber``,
``team`` and ``dives`` sections, as the check result carries them) are
marked "stated in plan", with what the plan says; their tick boxes stay
empty, because the supervisor still confirms them on site.  Which plan
fields state an item is data, the ``stated_by`` list of the item in
``templates/predive-checklist.toml`` (see :func:`stated_in_plan`).

Signature blocks follow the jurisdiction: the diving supervisor always; for
46 CFR 197 Subpart B also the person-in-charge of the vessel or facility
(46 CFR 197.210 designates both, 197.404 has the supervisor report to the
person-in-charge); a chamber operator when a chamber is used; the client's
representative; and an acknowledgement by each diver and standby diver.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from reportlab.platypus import CondPageBreak, Flowable, Spacer, Table

from supervisor import constants as C
from supervisor.report.blocks import (
    SignerNote,
    m,
    not_computed,
    signer_statement,
    stated,
    text,
)
from supervisor.report.fonts import REGULAR
from supervisor.report.formatting import MISSING, flatten, fmt_scalar, humanize_key, is_number
from supervisor.report.sections import has_surface_interval
from supervisor.report.styles import (
    BODY,
    CELL,
    CELL_BOLD,
    H2,
    ITEM,
    PANEL_FILL,
    RULE,
    SMALL,
    TickBox,
    grid,
    para,
    rich,
)

USCG = "uscg-46-197-b"


# ----------------------------------------------------------------------------- stated in plan


def _lookup(record: Mapping[str, Any], path: str) -> list[Any] | None:
    """Values at ``a.b.c`` or ``a[].b`` in the record; ``None`` when the path is absent."""
    values: list[Any] = [record]
    for part in path.split("."):
        every = part.endswith("[]")
        key = part[:-2] if every else part
        found: list[Any] = []
        for value in values:
            if not isinstance(value, Mapping) or key not in value:
                return None
            item = value[key]
            if every:
                if not isinstance(item, list) or not item:
                    return None
                found.extend(item)
            else:
                found.append(item)
        values = found
    return values


def _holds(value: Any, negate: bool) -> bool:
    if negate:
        return value is False
    if isinstance(value, bool):
        return value
    if isinstance(value, str):
        return bool(value.strip())
    return is_number(value) and float(value) > 0


def stated_in_plan(record: Mapping[str, Any], stated_by: Sequence[str]) -> bool:
    """Whether the plan states everything an item's ``stated_by`` list names.

    Parameters
    ----------
    record : mapping
        The checklist record (its ``site``, ``chamber``, ``team``, ``dives``).
    stated_by : sequence of str
        Conditions that must all hold.  A condition is a path (``"site.resuscitator"``,
        ``"team[].first_aid_cpr"`` for every member), optionally negated with ``!``
        (the value is explicitly ``false``), and may list alternatives separated by
        ``" | "``.  A path holds for ``true``, a non-empty text or a number above 0.

    Returns
    -------
    bool
        ``False`` for an empty list, and whenever a path is absent (not stated).
    """
    if not stated_by:
        return False
    for condition in stated_by:
        ok = False
        for alternative in condition.split("|"):
            path = alternative.strip()
            negate = path.startswith("!")
            values = _lookup(record, path.lstrip("!"))
            if values is not None and all(_holds(v, negate) for v in values):
                ok = True
                break
        if not ok:
            return False
    return True


# ----------------------------------------------------------------------------- team, chamber


def _roles(member: Mapping[str, Any]) -> list[str]:
    role = member.get("role")
    items = role if isinstance(role, list) else [role]
    return [str(r) for r in items if r is not None and str(r).strip()]


def chamber_used(record: Mapping[str, Any]) -> bool:
    """A chamber at the dive location, or a dive with chamber stops (surface decompression)."""
    if m(record.get("chamber")).get("on_site") is True:
        return True
    return any(has_surface_interval(m(d)) for d in record.get("dives") or [])


def _chamber(record: Mapping[str, Any], width: float) -> list[Flowable]:
    chamber = record.get("chamber")
    if not isinstance(chamber, Mapping) or not chamber:
        return [not_computed("Chamber")]
    if chamber.get("on_site") is False:
        contact = m(m(record.get("site")).get("emergency_contacts")).get("chamber")
        nearest = (str(contact) if isinstance(contact, str) and contact.strip()
                   else "not stated in the plan — needs review")
        return [rich([("No chamber at the dive location ", True),
                      ("(the plan states chamber.on_site = false). Nearest operational chamber: ",
                       False), (nearest, not (isinstance(contact, str) and contact.strip()))],
                     BODY)]
    rows = [[para("Item", CELL_BOLD), para("As planned", CELL_BOLD)]]
    missing: list[str] = []
    for key, value in flatten(chamber):
        label, unit = humanize_key(key)
        if value is None:
            missing.append(label)
            continue
        rows.append([para(f"{label} [{unit}]" if unit else label, CELL),
                     para(fmt_scalar(value), CELL)])
    out: list[Flowable] = [grid(rows, [0.4 * width, 0.6 * width])] if len(rows) > 1 else []
    if missing:
        out.append(rich([("Not stated in the plan (needs review on site): ", True),
                         (", ".join(missing), False)], SMALL))
    return out


def chamber_section(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """The chamber as planned; nothing when the plan states there is none (page 1 says so)."""
    if m(record.get("chamber")).get("on_site") is False:
        return []
    return [CondPageBreak(120), para("Chamber", H2), *_chamber(record, width)]


# ----------------------------------------------------------------------------- pre-dive items


_MODE_TITLE = {
    "scuba": "SCUBA",
    "surface-supplied-air": "surface-supplied air",
    "mixed-gas": "mixed gas",
}


def _item_groups(items: Sequence[Any]) -> list[tuple[str, list[Mapping[str, Any]]]]:
    """Consecutive items with the same ``group``, in template order."""
    groups: list[tuple[str, list[Mapping[str, Any]]]] = []
    for raw in items:
        item = m(raw)
        name = text(item.get("group"))
        if not groups or groups[-1][0] != name:
            groups.append((name, []))
        groups[-1][1].append(item)
    return groups


#: The rule set of each jurisdiction, as its citations begin.
_HOME_CFR = {"osha-1910-t": "29 CFR", USCG: "46 CFR"}


def cited_for(citations: Sequence[object], jurisdiction: object) -> str:
    """An item's citations for the job's jurisdiction: its own rule set first, the other's
    labelled "cross-reference: " (a plan without a jurisdiction keeps them as written)."""
    cits = [str(c) for c in citations]
    home = _HOME_CFR.get(str(jurisdiction))
    if home is None:
        return "; ".join(cits)
    own = [c for c in cits if c.startswith(home)]
    return "; ".join(own + [f"cross-reference: {c}" for c in cits if c not in own])


def _deep_or_decompression(dive: Mapping[str, Any], unit: str) -> bool:
    """Deeper than 100 fsw, decompression planned, or stops in the model's or table's schedule."""
    depth = dive.get("max_depth")
    fsw = (float(depth) if unit == "fsw" else float(depth) * C.BAR_PER_MSW / C.BAR_PER_FSW) \
        if is_number(depth) else None
    if fsw is None or fsw > 100 + 1e-9:
        return True
    if dive.get("decompression") not in ("none", None) or dive.get("proposed_stops"):
        return True
    for key in ("model_schedule", "reference_schedule"):
        sec = m(dive.get(key))
        if sec.get("stops") or sec.get("outside_table") or (key == "model_schedule"
                                                             and sec.get("error")):
            return True
    return False


def _condition(name: str, dive: Mapping[str, Any], unit: str) -> bool:
    """Whether ``dive`` may meet the named condition (unknown counts as met)."""
    if name == "deep-or-decompression":
        return _deep_or_decompression(dive, unit)
    if name == "mixed-gas":
        return str(dive.get("mode")) not in ("scuba", "surface-supplied-air")
    if name == "chamber-required":
        need = m(dive.get("gas_supply")).get("chamber_required")
        return need is not False
    return True  # "heavy-gear" and anything the check does not state


def required(item: Mapping[str, Any], record: Mapping[str, Any], dives: Sequence[str]) -> bool:
    """Whether an item with ``required_if`` conditions applies to any of ``dives``.

    An item without conditions is always required; so is one whose conditions cannot
    be judged (a dive missing from the record, a depth that is not a number).
    """
    conds = [str(c) for c in item.get("required_if") or []]
    if not conds:
        return True
    unit = str(record.get("unit"))
    by_id = {str(m(d).get("id")): m(d) for d in record.get("dives") or []}
    chosen = [by_id.get(i) for i in dives] or [None]
    return any(d is None or any(_condition(c, d, unit) for c in conds) for d in chosen)


def _short(item: Mapping[str, Any], jurisdiction: object) -> str:
    """An item in a few words with its first citation (for the "not required" line)."""
    words = text(item.get("text")).split(":")[0].split(";")[0].split(",")[0].rstrip(".")
    cites = cited_for(item.get("citations") or [], jurisdiction).split("; ")
    return f"{words} ({cites[0]})" if cites and cites[0] else words


def _item_cells(item: Mapping[str, Any], record: Mapping[str, Any]) -> list[object]:
    body = [para(text(item.get("text")), ITEM)]
    if item.get("applies_when"):
        body.append(para(f"Applies when: {item['applies_when']}.", SMALL))
    status = stated(item.get("source_status"))
    where = m(record.get("job")).get("jurisdiction")
    cite = [rich([(cited_for(item.get("citations") or [], where) or MISSING, False),
                  (f" ({status})", status != "VERIFIED")], SMALL)]
    if stated_in_plan(record, [str(x) for x in item.get("stated_by") or []]):
        cite.append(rich([("Stated in plan", True), ("; confirm on site.", False)],
                         SMALL))
    if item.get("status_note"):
        cite.append(para(str(item["status_note"]), SMALL))
    return [body, cite]


def predive_checklist(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """The pre-dive items for each diving mode of the job, with tick boxes."""
    section = m(record.get("checklist"))
    out: list[Flowable] = []
    for group in section.get("modes") or []:
        group = m(group)
        mode = group.get("mode")
        dives = [str(d) for d in group.get("dives") or []]
        if mode in _MODE_TITLE:
            title = f"Pre-dive checklist: {_MODE_TITLE[mode]}"
        else:
            given = ", ".join(str(x) for x in group.get("mode_as_given") or []) or "none given"
            title = f"Pre-dive checklist: mode not recognised ({given}), every item shown"
        out.append(para(title, H2))
        intro = ("Dives: " + ", ".join(dives) + ". ") if dives else ""
        where_ = m(record.get("job")).get("jurisdiction")
        home = _HOME_CFR.get(str(where_))
        rule_set = (f" This job is under {home}: its paragraphs come first; a paragraph of the "
                    "other rule set is marked as a cross-reference." if home else "")
        out.append(rich([(intro, True), (text(section.get("note")) + rule_set, False),
                         (" An item marked \"stated in plan\" is what the plan says; tick it "
                          "only when it is confirmed on site.", False)], SMALL))
        out.append(Spacer(1, 3))
        w = width
        widths = [0.045 * w, 0.045 * w, 0.66 * w, 0.25 * w]
        out.append(grid([[para("done", CELL_BOLD), para("n/a", CELL_BOLD), para("Item", CELL_BOLD),
                          para("Citation (source status)", CELL_BOLD)]], widths, repeat=False))
        skipped: list[Mapping[str, Any]] = []
        for name, items in _item_groups(group.get("items") or []):
            kept = [i for i in items if required(i, record, dives)]
            skipped += [i for i in items if i not in kept]
            if not kept:
                continue
            rows: list[list[object]] = [[para(name, CELL_BOLD), "", "", ""]]
            for item in kept:
                rows.append([TickBox(), TickBox(), *_item_cells(item, record)])
            # one table per group: its heading repeats if the group runs onto a new page,
            # and a group never starts in the last few lines of a page
            out.append(CondPageBreak(45))
            out.append(grid(rows, widths, extra=[("SPAN", (0, 0), (-1, 0)),
                                                 ("BACKGROUND", (0, 0), (-1, 0), PANEL_FILL),
                                                 ("ALIGN", (0, 1), (1, -1), "CENTER")]))
        if skipped:
            out.append(Spacer(1, 3))
            out.append(rich([("Not required for these dives", True),
                             (" (by the check: within 100 fsw, no decompression, no mixed gas, "
                              "no chamber required; confirm on site): ", False),
                             ("; ".join(_short(i, where_) for i in skipped) + ".", False)],
                            SMALL))
    return out


# ----------------------------------------------------------------------------- cautions, signatures


def cautions_section(record: Mapping[str, Any]) -> list[Flowable]:
    """All cautions, numbered (the record's list, duplicates already removed)."""
    cautions = m(record.get("checklist")).get("cautions") or []
    out: list[Flowable] = [para("Cautions", H2)]
    if not cautions:
        return out + [not_computed("Cautions")]
    for n, caution in enumerate(cautions, start=1):
        out.append(rich([(f"{n}. ", True), (str(caution), False)], SMALL))
        out.append(Spacer(1, 1.5))
    return out


def _signers(record: Mapping[str, Any]) -> list[str | None]:
    """Names for a diver's acknowledgement: each dive's diver, then divers and standby divers."""
    names: list[str | None] = []
    for dive in record.get("dives") or []:
        name = m(dive).get("diver")
        if isinstance(name, str) and name.strip() and name not in names:
            names.append(name)
    for member in record.get("team") or []:
        member = m(member)
        name = member.get("name")
        for role in _roles(member):
            words = role.lower().replace("_", " ").replace("-", " ").split()
            if ("diver" in words or "standby" in words) and isinstance(name, str) \
                    and name.strip() and name not in names:
                names.append(name)
    return names or [None]


def _with_role(record: Mapping[str, Any], role: str) -> str | None:
    names = [str(m(t).get("name")) for t in record.get("team") or []
             if role in _roles(m(t)) and m(t).get("name")]
    return ", ".join(names) if names else None


def _sig_block(role: str, name: object, statement: str, width: float) -> Flowable:
    line = "_" * 34
    rows = [
        [para(role, CELL_BOLD)],
        [para(statement, SMALL)],
        [rich([("Printed name: ", True), (name if name else line, False)], CELL)],
        [Spacer(1, 8)],
        [rich([("Signature: ", True), (line, False)], CELL)],
        [Spacer(1, 2)],
        [rich([("Date and time: ", True), ("_" * 28, False)], CELL)],
    ]
    table = Table(rows, colWidths=[width], splitInRow=1)
    table.setStyle([("FONTNAME", (0, 0), (-1, -1), REGULAR),
                    ("BOX", (0, 0), (-1, -1), 0.6, RULE),
                    ("LEFTPADDING", (0, 0), (-1, -1), 5),
                    ("TOPPADDING", (0, 0), (-1, -1), 1.5),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5)])
    return table


def signature_blocks(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """The blocks to sign by hand, as the jurisdiction and the job need them."""
    job = m(record.get("job"))
    col = width / 2 - 6
    blocks = [_sig_block("Diving supervisor", job.get("supervisor"),
                         "I have reviewed this plan and the findings above and decide whether "
                         "the dive proceeds.", col)]
    if job.get("jurisdiction") == USCG:
        blocks.append(_sig_block(
            "Person-in-charge of the vessel or facility", None,
            "I have received the diving supervisor's report on this diving operation "
            "(46 CFR 197.210, 197.404).", col))
    if chamber_used(record):
        blocks.append(_sig_block(
            "Chamber operator", _with_role(record, "chamber-operator"),
            "I have checked the chamber and its gas for these dives and will be at the chamber "
            "while it may be needed.", col))
    blocks.append(_sig_block(f"Client's representative ({text(job.get('client'))})", None,
                             "I have received this plan and its findings.", col))
    rows = [blocks[i : i + 2] + ([""] if len(blocks[i : i + 2]) == 1 else [])
            for i in range(0, len(blocks), 2)]
    table = Table(rows, colWidths=[width / 2, width / 2], splitInRow=1)
    table.setStyle([("VALIGN", (0, 0), (-1, -1), "TOP"), ("LEFTPADDING", (0, 0), (-1, -1), 0),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 6),
                    ("FONTNAME", (0, 0), (-1, -1), REGULAR)])
    return [table, *team_and_acknowledgement(record, width)]


def _diver_roles(roles: Sequence[str]) -> bool:
    return any("diver" in r.lower().replace("_", " ").replace("-", " ").split()
               or "standby" in r.lower().replace("_", " ").replace("-", " ").split()
               for r in roles)


def team_and_acknowledgement(record: Mapping[str, Any], width: float) -> list[Flowable]:
    """The dive team (roles, CPR and first aid) with each diver's signed acknowledgement.

    Every dive's diver and every team member with a diver or standby-diver
    role signs; a diver named by a dive but missing from the team is added,
    marked as such.
    """
    line = "_" * 24
    team = [m(t) for t in record.get("team") or [] if isinstance(t, Mapping)]
    signers = [n for n in _signers(record) if n is not None]
    rows: list[list[object]] = [
        [para("Dive team and divers' acknowledgement", CELL_BOLD), "", "", "", ""],
        [para("Divers and standby divers sign: I have been briefed on this plan, its schedules "
              "and the emergency procedures, and I know of nothing that makes me unfit to dive.",
              SMALL), "", "", "", ""],
        [para(h, CELL_BOLD) for h in ("Name", "Role", "CPR and first aid", "Signature",
                                      "Date and time")]]
    named: set[str] = set()
    for member in team:
        name = member.get("name")
        cpr = member.get("first_aid_cpr")
        roles = _roles(member)
        signs = isinstance(name, str) and name in signers or _diver_roles(roles)
        rows.append([para(text(name), CELL), para(", ".join(roles) or MISSING, CELL),
                     para("yes" if cpr is True else "no" if cpr is False else "not stated",
                          CELL_BOLD if cpr is not True else CELL),
                     para(line if signs else "—", CELL), para(line if signs else "—", CELL)])
        if isinstance(name, str):
            named.add(name)
    for name in signers:
        if name not in named:
            rows.append([para(name, CELL), para("diver (not in the plan's team)", CELL_BOLD),
                         para("not stated", CELL_BOLD), para(line, CELL), para(line, CELL)])
    lead: list[Flowable] = [] if team else [not_computed("Dive team")]
    if len(rows) == 3:
        rows.append([para("none named", CELL_BOLD), "", "", para(line, CELL), para(line, CELL)])
    w = width
    table = Table(rows, colWidths=[0.27 * w, 0.2 * w, 0.13 * w, 0.22 * w, 0.18 * w],
                  splitInRow=1, repeatRows=3)
    table.setStyle([("FONTNAME", (0, 0), (-1, -1), REGULAR),
                    ("SPAN", (0, 0), (-1, 0)), ("SPAN", (0, 1), (-1, 1)),
                    ("BOX", (0, 0), (-1, -1), 0.6, RULE),
                    ("LINEBELOW", (0, 2), (-1, -1), 0.3, RULE),
                    ("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
                    ("LEFTPADDING", (0, 0), (-1, -1), 4),
                    ("TOPPADDING", (0, 3), (-1, -1), 5),
                    ("BOTTOMPADDING", (0, 0), (-1, -1), 2)])
    return [Spacer(1, 4), *lead, table]


def signature_section(record: Mapping[str, Any], width: float,
                      signer: SignerNote | None) -> list[Flowable]:
    """Signature blocks and the digital-signature statement."""
    return [CondPageBreak(100), para("Signatures", H2), *signature_blocks(record, width),
            signer_statement(record, signer)]
