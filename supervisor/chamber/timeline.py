"""A treatment table as a timeline: its steps, with extensions, in clock time.

The timeline is the one typed model of a chamber run that everything else
reads: the patient's and the attendant's doses, the chamber's gas, the clock
times of the rules after a treatment, and the treatment log (planned against
actual).  Each line is one step of the table, one part of an extension, or the
compression to the first step when the table's clock starts on arrival there.

Each line has a role:

``compression``  surface to the first step, before the table's clock starts
``oxygen``       the patient breathes oxygen (a hold or travel on oxygen)
``air-break``    air between oxygen periods
``air``          air before any oxygen (an air table, or the deep part of Table 6A)
``gas``          another treatment gas

Times are minutes after the start (leaving the surface); ``table_min`` is the
running time as the table counts it (compression outside it, when the table's
clock starts on arrival at depth) and ``oxygen_min`` the running oxygen time of
the patient.  A line carries the source status and verification of the row (or
extension) it comes from, so every figure drawn from it can say how good it is.

A table whose first step includes the compression (Table 6A: "time at 165 fsw
includes compression") has no compression line; its first hold is taken at full
depth for its whole time, an upper bound for the doses and the attendant's
inert-gas load.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Literal

from supervisor.chamber.clock import clock_label, parse_clock, split_clock
from supervisor.chamber.extensions import ExtensionRequest, allowed, check_request
from supervisor.engine.buhlmann import least_certain
from supervisor.gas import parse_gas
from supervisor.references.loader import Table

Role = Literal["compression", "oxygen", "air-break", "air", "gas"]
SCHEMA_LINE_KEYS = ("line", "role", "start", "end", "start_day", "end_day", "start_min",
                    "end_min", "from_depth", "to_depth", "minutes", "gas", "travel_rate",
                    "table_step", "extension", "table_min", "oxygen_min", "source_status",
                    "verified", "note")
_EPS = 1e-9


def _is_oxygen(gas: str) -> bool:
    return parse_gas(gas).fo2 >= 1.0 - _EPS


@dataclass(frozen=True)
class TimelineLine:
    """One line of a treatment timeline (module docstring).

    Attributes
    ----------
    line : int
        1-based line number, as printed.
    role : str
        ``compression``, ``oxygen``, ``air-break``, ``air`` or ``gas``.
    start_min : float
        Start after leaving the surface [min].
    from_depth, to_depth : float
        Depth at the start and end [table unit].
    minutes : float
        Duration [min].
    gas : str
        The patient's gas.
    travel_rate : float or None
        Rate of a depth change [unit/min].
    table_step : int or None
        Step number in the table (None for compression and extension lines).
    extension : str or None
        ``"oxygen 1"``, ``"air 2"`` ...: the option and ordinal of an extension line.
    table_min : float or None
        Running table time at the end [min]; None for a compression outside it.
    oxygen_min : float
        Running oxygen time of the patient at the end [min].
    source_status : str
        Status of the row or extension.
    verified : bool
        Whether a second person's check of the row still holds.
    note : str
        The row's note.
    """

    line: int
    role: Role
    start_min: float
    from_depth: float
    to_depth: float
    minutes: float
    gas: str
    travel_rate: float | None
    table_step: int | None
    extension: str | None
    table_min: float | None
    oxygen_min: float
    source_status: str
    verified: bool
    note: str = ""

    @property
    def end_min(self) -> float:
        """End after leaving the surface [min]."""
        return self.start_min + self.minutes

    @property
    def travel(self) -> bool:
        """True when the depth changes on this line."""
        return abs(self.from_depth - self.to_depth) > _EPS

    @property
    def on_oxygen(self) -> bool:
        """True when the patient breathes oxygen."""
        return self.role == "oxygen"

    def to_json(self, start_clock: float) -> dict[str, Any]:
        """JSON-ready dict; clock times from ``start_clock`` [min after midnight]."""
        s, sd = split_clock(start_clock + self.start_min)
        e, ed = split_clock(start_clock + self.end_min)
        return {"line": self.line, "role": self.role, "start": s, "end": e, "start_day": sd,
                "end_day": ed, "start_min": round(self.start_min, 4),
                "end_min": round(self.end_min, 4), "from_depth": self.from_depth,
                "to_depth": self.to_depth, "minutes": round(self.minutes, 4), "gas": self.gas,
                "travel_rate": self.travel_rate, "table_step": self.table_step,
                "extension": self.extension,
                "table_min": None if self.table_min is None else round(self.table_min, 4),
                "oxygen_min": round(self.oxygen_min, 4), "source_status": self.source_status,
                "verified": self.verified, "note": self.note}


@dataclass
class Timeline:
    """A treatment table laid out in time, with its extensions.

    Attributes
    ----------
    table : Table
        The loaded table.
    start_clock : float
        Clock time of the start (leaving the surface) [min after midnight].
    extensions : ExtensionRequest
        The extensions run.
    lines : list of TimelineLine
    """

    table: Table
    start_clock: float
    extensions: ExtensionRequest
    lines: list[TimelineLine] = field(default_factory=list)

    @property
    def number(self) -> str:
        """Published table number."""
        return self.table.model.conventions.table_number

    @property
    def unit(self) -> str:
        """Depth unit of the table."""
        return self.table.model.conventions.depth_unit

    @property
    def elapsed_min(self) -> float:
        """From leaving the surface to surfacing [min]."""
        return self.lines[-1].end_min if self.lines else 0.0

    @property
    def total_min(self) -> float:
        """Table time as the table counts it (a compression before its clock excluded) [min]."""
        return float(sum(x.minutes for x in self.lines if x.table_min is not None))

    @property
    def compression_min(self) -> float:
        """Compression outside the table time [min]."""
        return float(sum(x.minutes for x in self.lines if x.role == "compression"))

    @property
    def oxygen_min(self) -> float:
        """Patient oxygen time [min]."""
        return self.lines[-1].oxygen_min if self.lines else 0.0

    @property
    def max_depth(self) -> float:
        """Deepest depth [unit]."""
        return max(max(x.from_depth, x.to_depth) for x in self.lines)

    @property
    def status(self) -> str:
        """Least certain source status of the lines."""
        return least_certain([x.source_status for x in self.lines])

    @property
    def all_verified(self) -> bool:
        """True when every line comes from a verified row."""
        return all(x.verified for x in self.lines)

    def clock(self, t_min: float) -> str:
        """Clock label of a time after the start: ``HH:MM`` or ``HH:MM (+1 d)``."""
        return clock_label(self.start_clock + t_min)

    def to_json(self) -> list[dict[str, Any]]:
        """The lines as JSON-ready dicts."""
        return [x.to_json(self.start_clock) for x in self.lines]


def _role(gas: str, seen_oxygen: bool) -> Role:
    g = parse_gas(gas)
    if g.fo2 >= 1.0 - _EPS:
        return "oxygen"
    if g.name == "air" or (abs(g.fo2 - 0.21) < 1e-6 and g.fhe == 0):
        return "air-break" if seen_oxygen else "air"
    return "gas"


def build_timeline(table: Table, start: str | float,
                   extensions: ExtensionRequest | dict[str, int | None] | None = None,
                   beyond_limit: bool = False) -> Timeline:
    """Lay a treatment table out in time.

    Parameters
    ----------
    table : Table
        A treatment table (plannable).
    start : str or float
        Clock time of leaving the surface: ``"HH:MM"`` or minutes after midnight.
    extensions : ExtensionRequest or dict, optional
        Extensions to run, checked against the table (none by default).
    beyond_limit : bool
        Accept extension counts past the table's limit (for a treatment log).

    Returns
    -------
    Timeline

    Raises
    ------
    InputError
        ``--start`` for a bad clock time, ``--extend-oxygen`` / ``--extend-air``
        for an extension the table does not allow.
    """
    start_clock = parse_clock(start) if isinstance(start, str) else float(start)
    if isinstance(extensions, ExtensionRequest):
        req = check_request(table, dict(extensions.counts), beyond_limit)
    else:
        req = check_request(table, dict(extensions or {}), beyond_limit)
    c = table.model.conventions
    ext = allowed(table)
    lines: list[TimelineLine] = []
    t = 0.0
    table_t = 0.0
    o2 = 0.0
    seen_o2 = False

    def add(role: Role, d0: float, d1: float, minutes: float, gas: str, rate: float | None,
            step: int | None, extension: str | None, status: str, verified: bool,
            note: str = "", counted: bool = True) -> None:
        nonlocal t, table_t, o2
        if counted:
            table_t += minutes
        if role == "oxygen":
            o2 += minutes
        lines.append(TimelineLine(len(lines) + 1, role, t, d0, d1, minutes, gas, rate, step,
                                  extension, table_t if counted else None, o2, status,
                                  verified, note))
        t += minutes

    first = table.rows[0]
    if first.from_depth > _EPS and not c.compression_in_first_step:
        rate = c.compression_rate
        assert rate is not None  # the validator requires it
        add("compression", 0.0, first.from_depth, first.from_depth / rate, "air", rate, None,
            None, c.compression_status or "FROM MEMORY", False,
            f"compression at {rate:g} {c.depth_unit}/min; outside the table time",
            counted=False)
    for i, row in enumerate(table.rows):
        state = table.row_states[i]
        role = _role(row.gas, seen_o2)
        seen_o2 = seen_o2 or role == "oxygen"
        note = row.note
        if i == 0 and c.compression_in_first_step:
            note = "; ".join(x for x in (note, "includes the compression from the surface "
                                         "(taken at full depth for the whole step)") if x)
        add(role, row.from_depth, row.to_depth, row.minutes, row.gas, row.travel_rate,
            row.step, None, state.source_status, state.verified, note)
        for key, e in ext.items():
            if e.after_step != row.step:
                continue
            for k in range(req.counts.get(key, 0)):
                over = k >= e.max_count
                for p in e.periods:
                    prole = _role(p.gas, seen_o2)
                    seen_o2 = seen_o2 or prole == "oxygen"
                    add(prole, e.depth, e.depth, p.minutes, p.gas, None, None,
                        f"{key} {k + 1}", e.source_status, False,
                        "past the table's limit: the diving medical officer's extension"
                        if over else e.meaning)
    return Timeline(table, start_clock, req, lines)


def oxygen_periods(tl: Timeline) -> list[list[TimelineLine]]:
    """The patient's oxygen periods: runs of consecutive oxygen lines."""
    out: list[list[TimelineLine]] = []
    run: list[TimelineLine] = []
    for x in tl.lines:
        if x.on_oxygen:
            run.append(x)
        elif run:
            out.append(run)
            run = []
    if run:
        out.append(run)
    return out
