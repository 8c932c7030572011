"""Import a contractor's own table from CSV (``supervisor tables import``).

Every imported row is unverified and the provenance comes from the options.
The CSV has a header line; the columns by kind:

no-stop
    ``depth``, ``no_stop_limit`` (minutes or ``unlimited``), and optionally one
    ``group_X`` column per repetitive group X (longest bottom time for the
    group, empty when the row has none) and ``note``.
decompression
    ``depth``, ``bottom_time``, optionally ``mode`` (``air``, ``air_o2`` or
    ``surd_o2``; default ``air``), ``time_to_first_stop``, one ``stop_D``
    column per stop depth D (minutes, or ``minutes:gas`` such as ``12:oxygen``;
    empty for no stop), ``total_ascent``, ``chamber_o2_periods``,
    ``repetitive_group``, ``exceptional_exposure`` (yes/no) and ``note``.
    Lines with the same depth and bottom time but different modes become one row.
treatment
    ``step``, ``from_depth``, ``to_depth``, ``minutes``, ``gas``, optionally
    ``travel_rate``, ``elapsed_min`` and ``note``.
limits, model-coefficients
    any columns; numbers are read as numbers, everything else as text.

A bad cell gives one line naming the file, row and column and the accepted
form; an existing output file is never overwritten without ``force``.
"""

from __future__ import annotations

import csv
import datetime as _dt
import io
import re
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from supervisor.errors import InputError
from supervisor.references.canonical import atomic_write_text, dumps_table
from supervisor.references.issues import Issue
from supervisor.references.loader import InvalidTableError, inspect_document
from supervisor.references.schema import KINDS, MODES, NAME_RE, SCHEMA_ID, SOURCE_STATUSES

_GROUP = re.compile(r"^group_([A-Za-z0-9]+)$")
_STOP = re.compile(r"^stop_(\d+(?:\.\d+)?)$")
_TRUE = {"yes", "y", "true", "1", "x"}
_FALSE = {"no", "n", "false", "0", ""}


@dataclass(frozen=True)
class ImportOptions:
    """Provenance and conventions for an imported table.

    Every text defaults to ``"not stated"`` except ``source`` (required).
    """

    source: str
    name: str | None = None
    title: str | None = None
    issuing_body: str = "not stated"
    edition: str = "not stated"
    table: str = "not stated"
    date: str = "not stated"
    licence: str = "not stated"
    source_status: str = "SECONDARY"
    transcribed_by: str = "not stated"
    transcribed_on: str = ""
    unit: str = "fsw"
    ascent_rate: float = 30.0
    bottom_time_definition: str = "not stated"
    stop_depth_reference: str = "not stated"
    stop_step: float = 10.0
    last_stop: float = 10.0
    stop_time_includes_travel: bool = False
    place: str = "water"
    gas: str = "air"


class _Cells:
    """Typed access to one CSV row, with errors naming file, row and column."""

    def __init__(self, file: str, number: int, row: dict[str, str]) -> None:
        self.file, self.row_no, self.row = file, number, row

    def fail(self, column: str, message: str) -> InputError:
        return InputError(f"{self.file}: row {self.row_no}, column {column}", message)

    def text(self, column: str, default: str = "") -> str:
        return (self.row.get(column) or default).strip()

    def number(self, column: str, required: bool = True, positive: bool = False
               ) -> float | int | None:
        raw = self.text(column)
        if raw == "":
            if required:
                raise self.fail(column, "empty; expected a number")
            return None
        try:
            v = float(raw)
        except ValueError:
            raise self.fail(column, f"got {raw!r}; expected a number") from None
        if v != v or v in (float("inf"), float("-inf")) or v < 0 or (positive and v == 0):
            raise self.fail(column, f"got {raw!r}; expected a number "
                            f"{'> 0' if positive else '>= 0'}")
        return int(v) if v.is_integer() else v

    def flag(self, column: str) -> bool:
        raw = self.text(column).lower()
        if raw in _TRUE:
            return True
        if raw in _FALSE:
            return False
        raise self.fail(column, f"got {raw!r}; expected yes or no")


def _read_csv(path: Path) -> tuple[list[str], list[dict[str, str]]]:
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except OSError as exc:
        raise InputError(str(path), f"cannot read the file ({exc.strerror or exc})") from None
    except UnicodeDecodeError as exc:
        raise InputError(str(path), f"not UTF-8 text (byte {exc.start}); save the CSV as "
                         "UTF-8") from None
    reader = csv.DictReader(io.StringIO(text, newline=""))
    if not reader.fieldnames:
        raise InputError(str(path), "empty; expected a header line and one line per row")
    header = [h.strip() for h in reader.fieldnames]
    reader.fieldnames = header
    rows = []
    for rec in reader:
        if None in rec:
            raise InputError(f"{path}: row {len(rows) + 1}", "more cells than header columns")
        if all(not (v or "").strip() for v in rec.values()):
            continue
        rows.append({k: (v or "") for k, v in rec.items()})
    if not rows:
        raise InputError(str(path), "no data rows after the header line")
    return header, rows


def _require(path: Path, header: list[str], columns: tuple[str, ...], kind: str) -> None:
    missing = [c for c in columns if c not in header]
    if missing:
        raise InputError(f"{path}: header", f"missing column {', '.join(missing)}; a {kind} CSV "
                         f"needs {', '.join(columns)} (see tables/README.md)")


def _unverified(row: dict[str, Any]) -> dict[str, Any]:
    row.update({"verification": "unverified", "verified_by": "", "verified_on": "",
                "verification_method": "", "row_hash": ""})
    return row


def _no_stop_rows(path: Path, header: list[str], rows: list[dict[str, str]]
                  ) -> tuple[list[dict[str, Any]], list[str]]:
    _require(path, header, ("depth", "no_stop_limit"), "no-stop")
    groups = [(c, _GROUP.match(c).group(1)) for c in header if _GROUP.match(c)]  # type: ignore
    out = []
    for n, rec in enumerate(rows, start=1):
        c = _Cells(str(path), n, rec)
        lim_text = c.text("no_stop_limit").lower()
        lim: Any = "unlimited"
        if lim_text != "unlimited":
            try:
                lim = c.number("no_stop_limit")
            except InputError:
                raise c.fail("no_stop_limit", f"got {c.text('no_stop_limit')!r}; expected "
                             "minutes (a number >= 0) or unlimited") from None
        row: dict[str, Any] = {"depth": c.number("depth", positive=True), "no_stop_limit": lim}
        row["repetitive_groups"] = {g: c.number(col, required=False, positive=True)
                                    for col, g in groups if c.text(col)}
        if c.text("note"):
            row["note"] = c.text("note")
        out.append(_unverified(row))
    return out, [g for _, g in groups]


def _stop_cell(c: _Cells, column: str, depth: float, default_gas: str, place: str
               ) -> dict[str, Any] | None:
    raw = c.text(column)
    if not raw:
        return None
    minutes_text, _, gas = raw.partition(":")
    try:
        minutes = float(minutes_text)
    except ValueError:
        raise c.fail(column, f"got {raw!r}; expected minutes or minutes:gas such as 12 or "
                     "12:oxygen") from None
    if not minutes >= 0 or minutes == float("inf"):
        raise c.fail(column, f"got {raw!r}; expected minutes >= 0")
    return {"depth": int(depth) if float(depth).is_integer() else depth,
            "minutes": int(minutes) if minutes.is_integer() else minutes,
            "gas": gas.strip() or default_gas, "place": place}


def _decompression_rows(path: Path, header: list[str], rows: list[dict[str, str]],
                        opts: ImportOptions) -> tuple[list[dict[str, Any]], list[str]]:
    _require(path, header, ("depth", "bottom_time"), "decompression")
    stops = sorted(((float(_STOP.match(col).group(1)), col) for col in header  # type: ignore
                    if _STOP.match(col)), reverse=True)
    merged: dict[tuple[float, float], dict[str, Any]] = {}
    groups: list[str] = []
    for n, rec in enumerate(rows, start=1):
        c = _Cells(str(path), n, rec)
        depth = c.number("depth", positive=True)
        bt = c.number("bottom_time", positive=True)
        mode = c.text("mode", "air")
        if mode not in MODES:
            raise c.fail("mode", f"got {mode!r}; expected one of {', '.join(MODES)}")
        row = merged.get((depth, bt))  # type: ignore[arg-type]
        if row is None:
            row = {"depth": depth, "bottom_time": bt}
            ttfs = c.number("time_to_first_stop", required=False)
            if ttfs is not None:
                row["time_to_first_stop"] = ttfs
            group = c.text("repetitive_group")
            row["repetitive_group"] = group
            if group and group not in groups:
                groups.append(group)
            row["exceptional_exposure"] = c.flag("exceptional_exposure")
            if c.text("note"):
                row["note"] = c.text("note")
            merged[(depth, bt)] = row  # type: ignore[index]
        elif mode in row:
            raise c.fail("mode", f"a second {mode} line for {depth:g}/{bt:g}; one line per "
                         "depth, bottom time and mode")
        sched: dict[str, Any] = {"stops": [s for d, col in stops
                                           if (s := _stop_cell(c, col, d, opts.gas, "water"))]}
        periods = c.number("chamber_o2_periods", required=False)
        if periods is not None:
            sched["chamber_o2_periods"] = periods
        total = c.number("total_ascent", required=False)
        if total is not None:
            sched["total_ascent"] = total
        row[mode] = sched
    out = [_unverified(r) for _, r in sorted(merged.items())]
    return out, sorted(groups)


def _treatment_rows(path: Path, header: list[str], rows: list[dict[str, str]]
                    ) -> list[dict[str, Any]]:
    _require(path, header, ("step", "from_depth", "to_depth", "minutes", "gas"), "treatment")
    out = []
    for n, rec in enumerate(rows, start=1):
        c = _Cells(str(path), n, rec)
        step = c.number("step", positive=True)
        if not isinstance(step, int):
            raise c.fail("step", f"got {c.text('step')!r}; expected a whole step number")
        row: dict[str, Any] = {"step": step, "from_depth": c.number("from_depth"),
                               "to_depth": c.number("to_depth"), "minutes": c.number("minutes"),
                               "gas": c.text("gas")}
        for col in ("travel_rate", "elapsed_min"):
            v = c.number(col, required=False, positive=(col == "travel_rate"))
            if v is not None:
                row[col] = v
        if c.text("note"):
            row["note"] = c.text("note")
        out.append(_unverified(row))
    return out


def _generic_rows(path: Path, rows: list[dict[str, str]]) -> list[dict[str, Any]]:
    out = []
    for rec in rows:
        row: dict[str, Any] = {}
        for k, v in rec.items():
            v = v.strip()
            try:
                f = float(v)
                row[k] = int(f) if f.is_integer() and "." not in v else f
            except ValueError:
                row[k] = v
        out.append(_unverified(row))
    return out


def build_document(csv_path: str | Path, kind: str, opts: ImportOptions) -> dict[str, Any]:
    """Build a table document from a CSV file.

    Parameters
    ----------
    csv_path : str or Path
        The CSV.
    kind : str
        One of the table kinds.
    opts : ImportOptions
        Provenance and conventions.

    Returns
    -------
    dict
        The document (every row unverified).

    Raises
    ------
    InputError
        For a bad option, an unreadable CSV or a bad cell (naming file, row and column).
    """
    path = Path(csv_path)
    if kind not in KINDS:
        raise InputError("--kind", f"got {kind!r}; expected one of {', '.join(KINDS)}")
    if opts.source_status not in SOURCE_STATUSES:
        raise InputError("--source-status", f"got {opts.source_status!r}; expected one of "
                         f"{', '.join(SOURCE_STATUSES)}")
    if not opts.source.strip():
        raise InputError("--source", "empty; name the document the table comes from")
    if opts.unit not in ("fsw", "msw"):
        raise InputError("--unit", f"got {opts.unit!r}; expected fsw or msw")
    name = opts.name or path.stem
    if not NAME_RE.match(name):
        raise InputError("--out", f"file stem {name!r} is not a table name; use lower-case "
                         "letters, digits, '.', '_' or '-'")
    header, rows = _read_csv(path)
    conventions: dict[str, Any]
    base = {"depth_unit": opts.unit, "bottom_time_definition": opts.bottom_time_definition,
            "depth_rounding": "next-deeper", "time_rounding": "next-longer",
            "ascent_rate": float(opts.ascent_rate),
            "stop_depth_reference": opts.stop_depth_reference, "gas": opts.gas,
            "place": opts.place}
    if kind == "no-stop":
        data, groups = _no_stop_rows(path, header, rows)
        conventions = {**base, "repetitive_groups": groups}
    elif kind == "decompression":
        data, groups = _decompression_rows(path, header, rows, opts)
        conventions = {**base, "repetitive_groups": groups, "stop_step": float(opts.stop_step),
                       "last_stop": float(opts.last_stop),
                       "stop_time_includes_travel": opts.stop_time_includes_travel}
    elif kind == "treatment":
        data = _treatment_rows(path, header, rows)
        conventions = {"depth_unit": opts.unit, "place": "chamber",
                       "time_definition": opts.bottom_time_definition,
                       "travel_in_step_time": opts.stop_time_includes_travel}
    else:
        data = _generic_rows(path, rows)
        conventions = {"imported_from": path.name}
    return {
        "schema": SCHEMA_ID,
        "name": name,
        "kind": kind,
        "title": opts.title or f"{opts.source} (imported from {path.name})",
        "provenance": {
            "source_document": opts.source.strip(),
            "issuing_body": opts.issuing_body,
            "edition": opts.edition,
            "table": opts.table,
            "date": opts.date,
            "licence": opts.licence,
            "source_status": opts.source_status,
            "transcribed_by": opts.transcribed_by,
            "transcribed_on": opts.transcribed_on,
            "notes": f"Imported from {path.name}; every row unverified until a second person "
                     "checks it with `supervisor tables verify`.",
        },
        "conventions": conventions,
        "rows": data,
    }


def import_csv(csv_path: str | Path, kind: str, opts: ImportOptions,
               out: str | Path | None = None, force: bool = False) -> tuple[Path, list[Issue]]:
    """Import a CSV table and write it as a table file.

    Parameters
    ----------
    csv_path : str or Path
        The CSV.
    kind : str
        Table kind.
    opts : ImportOptions
        Provenance and conventions (``transcribed_on`` defaults to today).
    out : str or Path, optional
        Output file; default the CSV's name with ``.toml``.
    force : bool
        Overwrite an existing output file.

    Returns
    -------
    tuple
        (the file written, the warnings found).

    Raises
    ------
    InputError
        Bad options or cells; an existing output without ``force``.
    InvalidTableError
        The imported table fails validation (nothing is written).
    """
    csv_path = Path(csv_path)
    target = Path(out) if out is not None else csv_path.with_suffix(".toml")
    if target.suffix != ".toml":
        raise InputError("--out", f"got {str(target)!r}; expected a file name ending in .toml")
    if target.exists() and not force:
        raise InputError("--out", f"{target} exists; give --force to overwrite it")
    if not opts.transcribed_on:
        opts = replace(opts, transcribed_on=_dt.date.today().isoformat())
    opts = replace(opts, name=opts.name or target.stem)
    doc = build_document(csv_path, kind, opts)
    table, issues = inspect_document(doc, target, strict=True)
    if table is None:
        raise InvalidTableError(target, issues)
    atomic_write_text(target, dumps_table(doc))
    return target, [i for i in issues if i.severity == "warning"]
