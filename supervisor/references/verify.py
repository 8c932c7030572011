"""Record a second person's check of table rows (``supervisor tables verify``).

A check is recorded per row: ``verification = "verified"``, who checked, on
which date, by what method, and the row's hash (see
:mod:`supervisor.references.canonical`).  The file also gets the context hash
of its conventions and source and one log entry per check.  The transcriber
named in the provenance cannot be the checker.

The file is edited in place where possible (only the verification lines
change, comments and layout stay); the edited text must read back exactly as
intended, otherwise the file is rewritten in the canonical layout.  Either
way it is written atomically, so a failed command leaves it byte-identical.
"""

from __future__ import annotations

import copy
import datetime as _dt
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from supervisor.errors import InputError
from supervisor.references.canonical import (
    atomic_write_text,
    context_hash,
    dumps_table,
    row_hash,
    toml_value,
)
from supervisor.references.issues import errors
from supervisor.references.loader import (
    InvalidTableError,
    Table,
    inspect_document,
    read_document,
)
from supervisor.references.schema import VERIFICATION_COLUMNS, is_iso_date

ROW_SPEC_HELP = (
    "all; row numbers and ranges such as 1-5,9; or table keys such as @60 (every row at "
    "depth 60) and @60/40 (depth 60, bottom time 40)"
)

_NUM = r"(\d+(?:\.\d+)?)"
_RANGE = re.compile(r"^(\d+)\s*-\s*(\d+)$")
_KEY = re.compile(rf"^@\s*{_NUM}(?:\s*/\s*{_NUM})?$")


def parse_row_spec(spec: str, table: Table) -> list[int]:
    """Turn a row selection into 0-based row indices.

    Parameters
    ----------
    spec : str
        ``all``; comma-separated 1-based row numbers and ranges (``1-5,9``);
        or keys ``@DEPTH`` (every row at that depth) and ``@DEPTH/TIME``
        (decompression tables).  Row numbers are those ``tables validate`` and
        ``tables show`` print.
    table : Table
        The table the rows belong to.

    Returns
    -------
    list of int
        Sorted, distinct indices.

    Raises
    ------
    InputError
        Field ``--rows``: an unreadable token, a row that does not exist or a key
        with no row.
    """
    n = len(table.rows)
    chosen: set[int] = set()
    tokens = [t.strip() for t in str(spec).split(",")]
    if not any(tokens):
        raise InputError("--rows", f"empty selection; accepted: {ROW_SPEC_HELP}")
    for tok in tokens:
        if not tok:
            raise InputError("--rows", f"empty item in {spec!r}; accepted: {ROW_SPEC_HELP}")
        if tok.lower() == "all":
            chosen.update(range(n))
            continue
        if tok.isdigit() or _RANGE.match(tok):
            m = _RANGE.match(tok)
            a, b = (int(m.group(1)), int(m.group(2))) if m else (int(tok), int(tok))
            if a > b:
                raise InputError("--rows", f"range {tok!r} runs backwards; write low-high")
            if a < 1 or b > n:
                bad = a if a < 1 else b
                raise InputError("--rows", f"row {bad} does not exist; {table.name} has rows "
                                 f"1-{n}")
            chosen.update(range(a - 1, b))
            continue
        m = _KEY.match(tok)
        if m is None:
            raise InputError("--rows", f"cannot read {tok!r}; accepted: {ROW_SPEC_HELP}")
        if table.kind not in ("no-stop", "decompression"):
            raise InputError("--rows", f"{tok!r}: depth keys work for no-stop and "
                             f"decompression tables; {table.name} is a {table.kind} table, "
                             "use row numbers")
        depth = float(m.group(1))
        bt = float(m.group(2)) if m.group(2) else None
        if bt is not None and table.kind != "decompression":
            raise InputError("--rows", f"{tok!r}: a no-stop table has one row per depth; "
                             f"write @{m.group(1)}")
        hits = [i for i, r in enumerate(table.rows) if r.depth == depth
                and (bt is None or r.bottom_time == bt)]
        if not hits:
            raise InputError("--rows", f"no row at {tok[1:]} in {table.name}")
        chosen.update(hits)
    return sorted(chosen)


@dataclass(frozen=True)
class VerifyOutcome:
    """What ``verify_rows`` did.

    Attributes
    ----------
    path : Path
        The file written.
    rows : list of int
        1-based rows recorded as verified.
    voided : list of int
        1-based rows whose earlier check no longer held (changed row, or
        conventions or source changed) and were reset to unverified.
    canonical_rewrite : bool
        True when the file had to be rewritten in the canonical layout.
    """

    path: Path
    rows: list[int]
    voided: list[int]
    canonical_rewrite: bool


def _compress(rows: list[int]) -> str:
    out: list[str] = []
    for r in rows:
        if out and "-" in out[-1] and int(out[-1].split("-")[1]) == r - 1:
            out[-1] = f"{out[-1].split('-')[0]}-{r}"
        elif out and "-" not in out[-1] and int(out[-1]) == r - 1:
            out[-1] = f"{out[-1]}-{r}"
        else:
            out.append(str(r))
    return ",".join(out)


def verify_rows(path: str | Path, spec: str, by: str, method: str,
                on: str | None = None) -> VerifyOutcome:
    """Record a second person's check of the selected rows of a table file.

    Parameters
    ----------
    path : str or Path
        The table file.
    spec : str
        Row selection, see :func:`parse_row_spec`.
    by : str
        Name of the person who checked (not the transcriber).
    method : str
        How the rows were checked, e.g. "read aloud against the printed table".
    on : str, optional
        Date of the check, YYYY-MM-DD; today when omitted.

    Returns
    -------
    VerifyOutcome

    Raises
    ------
    UnreadableTableError
        If the file cannot be read.
    InvalidTableError
        If the file fails validation (an invalid table cannot be verified).
    InputError
        If an option is bad (field ``--rows``, ``--by``, ``--method`` or ``--on``).
    """
    path = Path(path)
    original = path.read_bytes().decode("utf-8") if path.exists() else None
    doc = read_document(path)
    table, issues = inspect_document(doc, path, strict=True)
    if table is None:
        raise InvalidTableError(path, issues)
    by = (by or "").strip()
    method = (method or "").strip()
    if not by:
        raise InputError("--by", "empty; give the name of the person who checked the rows")
    if by.lower() == table.model.provenance.transcribed_by.strip().lower():
        raise InputError("--by", f"{by!r} is the transcriber (provenance.transcribed_by); the "
                         "check must be made by a second person")
    if not method:
        raise InputError("--method", "empty; say how the rows were checked, e.g. 'read aloud "
                         "against the printed table, page 9-63'")
    on = on or _dt.date.today().isoformat()
    if not is_iso_date(on):
        raise InputError("--on", f"got {on!r}; expected a date YYYY-MM-DD")
    if _dt.date.fromisoformat(on) > _dt.date.today():
        raise InputError("--on", f"got {on}; a check cannot be dated in the future "
                         f"(today is {_dt.date.today().isoformat()})")
    transcribed = table.model.provenance.transcribed_on
    if transcribed and _dt.date.fromisoformat(on) < _dt.date.fromisoformat(transcribed):
        raise InputError("--on", f"got {on}; a check cannot come before the transcription "
                         f"(provenance.transcribed_on = {transcribed})")
    indices = parse_row_spec(spec, table)

    new = copy.deepcopy(doc)
    changed: dict[int, dict[str, Any]] = {}
    voided: list[int] = []
    chosen = set(indices)
    for i, state in enumerate(table.row_states):
        raw = new["rows"][i]
        if i in chosen:
            fields = {"verification": "verified", "verified_by": by, "verified_on": on,
                      "verification_method": method, "row_hash": row_hash(raw)}
        elif raw.get("verification") == "verified" and not state.verified:
            fields = {k: ("unverified" if k == "verification" else "")
                      for k in VERIFICATION_COLUMNS}
            voided.append(i + 1)
        else:
            continue
        raw.update(fields)
        changed[i] = fields
    ver = new.setdefault("verification", {})
    ver["context_hash"] = context_hash(new)
    entry = {"by": by, "on": on, "method": method, "rows": _compress([i + 1 for i in indices]),
             "row_count": len(indices)}
    ver.setdefault("log", []).append(entry)

    check, check_issues = inspect_document(new, path, strict=True)
    if check is None or errors(check_issues):  # pragma: no cover - defensive
        raise InvalidTableError(path, check_issues)
    text, canonical = _edited_text(original or "", new, changed, ver["context_hash"], entry)
    atomic_write_text(path, text)
    return VerifyOutcome(path, [i + 1 for i in indices], voided, canonical)


_ANY_HEADER = re.compile(r"^\s*\[")
_ROWS_HEADER = re.compile(r"^\s*\[\[\s*rows\s*\]\]\s*(#.*)?$")
_VER_HEADER = re.compile(r"^\s*\[\s*verification\s*\]\s*(#.*)?$")


def _key_re(key: str) -> re.Pattern[str]:
    return re.compile(rf"^(\s*){re.escape(key)}\s*=")


def _set_keys(lines: list[str], start: int, values: dict[str, Any]) -> None:
    """Set ``key = value`` lines in the section beginning at ``start`` (after its header)."""
    end = next((j for j in range(start, len(lines)) if _ANY_HEADER.match(lines[j])), len(lines))
    for key, value in values.items():
        line = f"{key} = {toml_value(value)}\n"
        pat = _key_re(key)
        idx = next((j for j in range(start, end) if pat.match(lines[j])), None)
        if idx is None:
            ins = end
            while ins > start and not lines[ins - 1].strip():
                ins -= 1
            lines.insert(ins, line)
            end += 1
        else:
            lines[idx] = pat.match(lines[idx]).group(1) + line  # type: ignore[union-attr]


def _edited_text(text: str, new: dict[str, Any], changed: dict[int, dict[str, Any]],
                 ctx: str, entry: dict[str, Any]) -> tuple[str, bool]:
    """Edit the verification lines of ``text``; fall back to the canonical layout."""
    try:
        lines = text.splitlines(keepends=True)
        if lines and not lines[-1].endswith("\n"):
            lines[-1] += "\n"
        headers = [j for j, line in enumerate(lines) if _ROWS_HEADER.match(line)]
        if len(headers) != len(new["rows"]):
            raise ValueError("row headers not found one per row")
        for i in sorted(changed, reverse=True):
            _set_keys(lines, headers[i] + 1, changed[i])
        ver = next((j for j, line in enumerate(lines) if _VER_HEADER.match(line)), None)
        if ver is None:
            lines += ["\n", "[verification]\n", f"context_hash = {toml_value(ctx)}\n"]
        else:
            _set_keys(lines, ver + 1, {"context_hash": ctx})
        lines += ["\n", "[[verification.log]]\n"]
        lines += [f"{k} = {toml_value(v)}\n" for k, v in entry.items()]
        out = "".join(lines)
        if tomllib.loads(out) == new:
            return out, False
    except (ValueError, tomllib.TOMLDecodeError):
        pass
    return dumps_table(new), True
