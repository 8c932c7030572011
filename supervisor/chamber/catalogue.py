"""Find a bundled treatment table by its published number (``5``, ``6``, ``6A``, ``9`` ...).

The files under ``tables/treatment/`` carry the trade's table number in
``conventions.table_number``.  Only the headers are read to find the file (a
plain TOML read); the one table asked for is then loaded and checked in full
(:func:`supervisor.references.load_table`), so a plan never rests on a file that
fails validation.

A table whose file says ``plannable = false`` (its source lacks steps, travel or
oxygen periods) is refused with what is missing: it is never completed by guess.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from supervisor.errors import InputError
from supervisor.references.loader import Table, load_table
from supervisor.resources import tables_dir

#: Folder of the bundled treatment tables, under the tables folder.
TREATMENT_FOLDER = "treatment"


@dataclass(frozen=True)
class CatalogueEntry:
    """One bundled treatment table: its number, file, title and whether it can be planned."""

    number: str
    path: Path
    title: str
    plannable: bool


def _key(number: str) -> str:
    return number.strip().upper()


_NUMBER = re.compile(r'^table_number\s*=\s*"([^"]*)"\s*$', re.MULTILINE)
_PLANNABLE = re.compile(r"^plannable\s*=\s*(true|false)\s*$", re.MULTILINE)
_TITLE = re.compile(r'^title\s*=\s*"([^"]*)"\s*$', re.MULTILINE)


@lru_cache(maxsize=4)
def _entries(root: Path) -> tuple[CatalogueEntry, ...]:
    # Only the header lines are read here (a full TOML parse of every file would cost more
    # than planning the treatment); the table chosen is then loaded and checked in full.
    out = []
    for path in sorted((root / TREATMENT_FOLDER).glob("*.toml")):
        if path.name.startswith("."):
            continue
        try:
            text = path.read_text("utf-8")
        except (OSError, UnicodeDecodeError):
            continue  # reported by `supervisor tables list`; never planned from
        head = text.split("\n[[rows]]", 1)[0]
        number = _NUMBER.search(head)
        if number is None or not number.group(1).strip():
            continue
        plannable = _PLANNABLE.search(head)
        title = _TITLE.search(head)
        out.append(CatalogueEntry(_key(number.group(1)), path,
                                  title.group(1) if title else path.stem,
                                  plannable is None or plannable.group(1) == "true"))
    return tuple(out)


def catalogue(root: Path | None = None) -> tuple[CatalogueEntry, ...]:
    """Return the bundled treatment tables in file order.

    Parameters
    ----------
    root : Path, optional
        Tables folder (default: the bundled one).

    Returns
    -------
    tuple of CatalogueEntry
    """
    return _entries(root or tables_dir())


def table_numbers(root: Path | None = None) -> list[str]:
    """The published numbers of the bundled tables, in a natural order (5, 6, 6A, 9 ...)."""
    def order(n: str) -> tuple[int, str]:
        digits = "".join(ch for ch in n if ch.isdigit())
        return (int(digits) if digits else 0, n)

    return sorted((e.number for e in catalogue(root)), key=order)


def find_entry(number: str, root: Path | None = None) -> CatalogueEntry:
    """Return the catalogue entry of ``number``.

    Raises
    ------
    InputError
        ``TABLE`` when no bundled table has that number.
    """
    key = _key(number)
    for e in catalogue(root):
        if e.number == key:
            return e
    raise InputError("TABLE", f"got {number!r}; expected a bundled treatment table number: "
                     f"{', '.join(table_numbers(root))}")


def load_treatment(number: str, root: Path | None = None, plannable_only: bool = True) -> Table:
    """Load the bundled treatment table ``number`` (checked in full).

    Parameters
    ----------
    number : str
        The published table number (``"6"``, ``"6a"`` and ``"6A"`` are the same).
    root : Path, optional
        Tables folder (default: the bundled one).
    plannable_only : bool
        Refuse a table that its file marks as not plannable (default).

    Returns
    -------
    Table

    Raises
    ------
    InputError
        ``TABLE`` for an unknown number, or a table that cannot be planned (the
        message says what its source lacks).
    """
    entry = find_entry(number, root)
    table = load_table(entry.path)
    c = table.model.conventions
    if table.kind != "treatment" or _key(c.table_number) != entry.number:
        raise InputError("TABLE", f"{entry.path.name}: not the treatment table {entry.number} "
                         "it names in its header")
    if plannable_only and not c.plannable:
        plannable = [e.number for e in catalogue(root) if e.plannable]
        raise InputError(
            "TABLE", f"Treatment Table {entry.number} cannot be planned from the bundled source: "
            f"it lacks {'; '.join(c.missing)}; use the current manual's figure with the "
            f"diving medical officer (plannable here: {', '.join(plannable)}; `supervisor tables "
            f"show {entry.path.stem}` shows what is bundled)")
    return table
