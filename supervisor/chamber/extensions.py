"""The extensions a treatment table allows, and the arithmetic of asking for them.

A table file lists its extensions (``[[conventions.extensions]]``), each under
the planning option that asks for it:

``--extend-oxygen N``
    Table 5: N more 20-min oxygen periods at 30 fsw (no air break between them
    or before the ascent); Tables 6 and 6A: N more 25-min periods at 60 fsw
    (20 min oxygen, then a 5-min air break).
``--extend-air N``
    Tables 6 and 6A: N more 75-min periods at 30 fsw (a 15-min air break, then
    60 min oxygen).

Each extension is inserted after a given step of the table (after the earlier
extensions of the same option), and each option has a largest count.  A negative
count, an option the table does not allow, or a count past its limit is bad
input: one line naming the option and what the table accepts.  The diving
medical officer may extend further; this tool does not plan that.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), §21-5.6.8.1.3 and
       the Treatment Table 5 and 6 figure notes (extensions; OLDER-EDITION); the
       period lengths and limits are from memory (see each table file).
"""

from __future__ import annotations

from dataclasses import dataclass

from supervisor.errors import InputError
from supervisor.references.loader import Table
from supervisor.references.schema import TreatmentExtension

#: The planning option of each extension kind, as the command line spells it.
OPTIONS: dict[str, str] = {"oxygen": "--extend-oxygen", "air": "--extend-air"}


@dataclass(frozen=True)
class ExtensionRequest:
    """How many extensions of each option a treatment runs.

    Attributes
    ----------
    counts : dict
        ``{"oxygen": n, "air": m}``; options not asked for are 0.
    """

    counts: dict[str, int]

    @property
    def total(self) -> int:
        """Number of extensions of every option together."""
        return sum(self.counts.values())

    def to_json(self) -> dict[str, int]:
        """JSON-ready counts, keyed ``extend_oxygen`` and ``extend_air``."""
        return {f"extend_{k}": int(self.counts.get(k, 0)) for k in OPTIONS}


def allowed(table: Table) -> dict[str, TreatmentExtension]:
    """The extensions ``table`` allows, keyed by option (``oxygen``, ``air``)."""
    return {e.option: e for e in table.model.conventions.extensions}


def describe(table: Table) -> str:
    """One line: what each option adds on this table, or that it allows none."""
    ext = allowed(table)
    if not ext:
        return "no extension"
    return "; ".join(f"{OPTIONS[k]} up to {e.max_count}: {e.meaning}" for k, e in ext.items())


def check_request(table: Table, counts: dict[str, int | None],
                  beyond_limit: bool = False) -> ExtensionRequest:
    """Check the asked-for extension counts against what ``table`` allows.

    Parameters
    ----------
    table : Table
        A treatment table.
    counts : dict
        ``{"oxygen": n or None, "air": m or None}``.
    beyond_limit : bool
        Accept a count past the table's limit (a treatment log records what was
        run; the plan never does).

    Returns
    -------
    ExtensionRequest

    Raises
    ------
    InputError
        Naming the option (``--extend-oxygen`` / ``--extend-air``) for a count
        that is not a whole number >= 0, an option the table does not allow, or
        a count past the table's limit.
    """
    number = table.model.conventions.table_number or table.name
    ext = allowed(table)
    out: dict[str, int] = {}
    for key, option in OPTIONS.items():
        n = counts.get(key)
        if n is None or n == 0:
            out[key] = 0
            continue
        if isinstance(n, bool) or not isinstance(n, int) or n < 0:
            raise InputError(option, f"got {n!r}; expected a whole number of extensions >= 0")
        e = ext.get(key)
        if e is None:
            raise InputError(option, f"Treatment Table {number} allows no {option}; it allows "
                             f"{describe(table)}")
        if n > e.max_count and not beyond_limit:
            raise InputError(option, f"got {n}; Treatment Table {number} allows at most "
                             f"{e.max_count} ({e.meaning}); further extension is the diving "
                             "medical officer's decision and is not planned here")
        out[key] = n
    return ExtensionRequest(out)


def extended_minutes(table: Table, request: ExtensionRequest) -> float:
    """Minutes the extensions of ``request`` add to the table [min]."""
    ext = allowed(table)
    return float(sum(ext[k].minutes * n for k, n in request.counts.items() if n))


def full_request(table: Table) -> ExtensionRequest:
    """Every extension the table allows, each to its limit."""
    return ExtensionRequest({k: (allowed(table)[k].max_count if k in allowed(table) else 0)
                             for k in OPTIONS})
