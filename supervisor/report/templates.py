"""Checklist items and cautions held as data in ``templates/``.

``templates/predive-checklist.toml`` lists the pre-dive items with their
citations, source status and the diving modes they apply to;
``templates/cautions.toml`` holds the cautions printed on every checklist.
Both are validated when loaded: a malformed template is a packaging fault and
raises :class:`TemplateError`.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from pathlib import Path

from supervisor.errors import SupervisorError
from supervisor.resources import templates_dir

MODES = ("scuba", "surface-supplied-air", "mixed-gas")
STATUSES = ("VERIFIED", "SECONDARY", "OLDER-EDITION", "DERIVED", "FROM MEMORY", "COMPUTED")

_MODE_ALIASES = {
    "scuba": "scuba",
    "open-circuit-scuba": "scuba",
    "surface-supplied-air": "surface-supplied-air",
    "surface-supplied": "surface-supplied-air",
    "ss-air": "surface-supplied-air",
    "ssa": "surface-supplied-air",
    "ssair": "surface-supplied-air",
    "mixed-gas": "mixed-gas",
    "surface-supplied-mixed-gas": "mixed-gas",
    "mixed": "mixed-gas",
    "heliox": "mixed-gas",
    "trimix": "mixed-gas",
    # Subpart T counts any breathing mixture other than air as mixed gas
    # (29 CFR 1910.402 definitions; the wording is from memory, see the
    # osha-402-b row of the reference notes), so nitrox and heliox take the
    # mixed-gas items.
    "surface-supplied-nitrox": "mixed-gas",
    "surface-supplied-heliox": "mixed-gas",
    "nitrox": "mixed-gas",
}


#: Conditions an item's ``required_if`` may name (judged in supervisor.report.signoff).
REQUIRED_IF: tuple[str, ...] = ("deep-or-decompression", "mixed-gas", "heavy-gear",
                                "chamber-required")


class TemplateError(SupervisorError, ValueError):
    """A bundled template that is missing or malformed."""


@dataclass(frozen=True)
class ChecklistItem:
    """One pre-dive item with its citation and how the paraphrase was confirmed."""

    id: str
    group: str
    text: str
    citations: tuple[str, ...]
    source_status: str
    modes: tuple[str, ...]
    applies_when: str | None = None
    status_note: str | None = None
    stated_by: tuple[str, ...] = ()
    required_if: tuple[str, ...] = ()

    def to_json(self) -> dict[str, object]:
        """Return the item as a JSON-ready dict."""
        return {
            "id": self.id,
            "group": self.group,
            "text": self.text,
            "citations": list(self.citations),
            "source_status": self.source_status,
            "status_note": self.status_note,
            "applies_when": self.applies_when,
            "stated_by": list(self.stated_by),
            "required_if": list(self.required_if),
        }


@dataclass(frozen=True)
class Checklist:
    """The pre-dive checklist template."""

    title: str
    revision: str
    note: str
    items: tuple[ChecklistItem, ...]

    def for_mode(self, mode: str) -> tuple[str | None, tuple[ChecklistItem, ...]]:
        """Items for one diving mode.

        Parameters
        ----------
        mode : str
            The mode as the plan spells it (``"scuba"``, ``"ss_air"``,
            ``"surface-supplied air"``, ``"mixed_gas"`` ...).

        Returns
        -------
        tuple
            The canonical mode (``None`` when the spelling is not recognised)
            and its items.  An unrecognised mode gets every item, so nothing
            is left out by a spelling mistake.
        """
        canonical = normalise_mode(mode)
        if canonical is None:
            return None, self.items
        return canonical, tuple(i for i in self.items if canonical in i.modes)


def normalise_mode(mode: object) -> str | None:
    """Map a plan's spelling of a diving mode onto ``MODES`` (``None`` if unknown)."""
    if not isinstance(mode, str):
        return None
    key = "-".join(mode.strip().lower().replace("_", " ").replace("-", " ").split())
    return _MODE_ALIASES.get(key)


def _read(name: str, base: Path | None) -> dict[str, object]:
    path = (base or templates_dir()) / name
    try:
        with path.open("rb") as fh:
            return tomllib.load(fh)
    except (OSError, tomllib.TOMLDecodeError) as exc:
        raise TemplateError(f"template {name}: cannot be read ({exc})") from None


def _text(entry: dict[str, object], key: str, where: str, *, required: bool = True) -> str | None:
    value = entry.get(key)
    if value is None and not required:
        return None
    if not isinstance(value, str) or not value.strip():
        raise TemplateError(f"{where}: {key!r} must be a non-empty string")
    return value


def load_checklist(base: Path | None = None) -> Checklist:
    """Load and validate ``predive-checklist.toml``.

    Parameters
    ----------
    base : Path, optional
        Folder holding the template (default: the bundled ``templates/``).

    Returns
    -------
    Checklist

    Raises
    ------
    TemplateError
        If the file is missing, has the wrong schema, or an item lacks its
        text, citation, status or modes.
    """
    data = _read("predive-checklist.toml", base)
    if data.get("schema") != "supervisor-checklist/1":
        raise TemplateError("predive-checklist.toml: schema must be 'supervisor-checklist/1'")
    raw_items = data.get("items")
    if not isinstance(raw_items, list) or not raw_items:
        raise TemplateError("predive-checklist.toml: needs at least one [[items]] entry")
    items = []
    seen: set[str] = set()
    for n, entry in enumerate(raw_items, start=1):
        where = f"predive-checklist.toml item {n}"
        if not isinstance(entry, dict):
            raise TemplateError(f"{where}: must be a table")
        item_id = _text(entry, "id", where)
        assert item_id is not None
        if item_id in seen:
            raise TemplateError(f"{where}: duplicate id {item_id!r}")
        seen.add(item_id)
        citations = entry.get("citations")
        if (
            not isinstance(citations, list)
            or not citations
            or not all(isinstance(c, str) and c.strip() for c in citations)
        ):
            raise TemplateError(f"{where} ({item_id}): 'citations' must list at least one citation")
        status = entry.get("source_status")
        if status not in STATUSES:
            raise TemplateError(f"{where} ({item_id}): 'source_status' must be one of {STATUSES}")
        modes = entry.get("modes")
        if not isinstance(modes, list) or not modes or not set(modes) <= set(MODES):
            raise TemplateError(
                f"{where} ({item_id}): 'modes' must be a non-empty subset of {MODES}"
            )
        stated_by = entry.get("stated_by", [])
        if not isinstance(stated_by, list) or not all(
                isinstance(p, str) and p.strip() for p in stated_by):
            raise TemplateError(f"{where} ({item_id}): 'stated_by' must list plan paths such as "
                                "'site.resuscitator'")
        required_if = entry.get("required_if", [])
        if not isinstance(required_if, list) or not set(required_if) <= set(REQUIRED_IF):
            raise TemplateError(f"{where} ({item_id}): 'required_if' must list conditions of "
                                f"{REQUIRED_IF}")
        items.append(
            ChecklistItem(
                id=item_id,
                group=str(_text(entry, "group", where)),
                text=str(_text(entry, "text", where)),
                citations=tuple(citations),
                source_status=str(status),
                modes=tuple(modes),
                applies_when=_text(entry, "applies_when", where, required=False),
                status_note=_text(entry, "status_note", where, required=False),
                stated_by=tuple(stated_by),
                required_if=tuple(required_if),
            )
        )
    return Checklist(
        title=str(_text(data, "title", "predive-checklist.toml")),
        revision=str(data.get("revision", "")),
        note=str(_text(data, "note", "predive-checklist.toml")),
        items=tuple(items),
    )


@dataclass(frozen=True)
class Caution:
    """One caution, and the check's caution texts it already says (printed once)."""

    id: str
    text: str
    covers: tuple[str, ...] = ()


def load_caution_entries(base: Path | None = None) -> tuple[Caution, ...]:
    """Load and validate ``cautions.toml`` with each caution's ``covers`` list.

    Parameters
    ----------
    base : Path, optional
        Folder holding the template (default: the bundled ``templates/``).

    Returns
    -------
    tuple of Caution
        In their printed order.

    Raises
    ------
    TemplateError
        If the file is missing, has the wrong schema or holds no caution.
    """
    data = _read("cautions.toml", base)
    if data.get("schema") != "supervisor-cautions/1":
        raise TemplateError("cautions.toml: schema must be 'supervisor-cautions/1'")
    entries = data.get("cautions")
    if not isinstance(entries, list) or not entries:
        raise TemplateError("cautions.toml: needs at least one [[cautions]] entry")
    out = []
    for n, entry in enumerate(entries, start=1):
        where = f"cautions.toml caution {n}"
        if not isinstance(entry, dict):
            raise TemplateError(f"{where}: must be a table")
        covers = entry.get("covers", [])
        if not isinstance(covers, list) or not all(isinstance(c, str) for c in covers):
            raise TemplateError(f"{where}: 'covers' must list caution texts")
        out.append(Caution(id=str(entry.get("id", n)), text=str(_text(entry, "text", where)),
                           covers=tuple(covers)))
    return tuple(out)


def load_cautions(base: Path | None = None) -> tuple[str, ...]:
    """Load and validate ``cautions.toml``: the caution texts in their printed order.

    Raises
    ------
    TemplateError
        If the file is missing, has the wrong schema or holds no caution.
    """
    return tuple(c.text for c in load_caution_entries(base))

