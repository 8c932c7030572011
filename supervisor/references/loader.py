"""Read, check and load reference-table files; find the bundled ones.

Loading runs three stages, and each reports :class:`Issue` objects naming the
row and column:

1. header and provenance: a file without a ``[provenance]`` table is refused
   outright (:class:`~supervisor.errors.TableError`), there is no option to
   skip it;
2. the schema of the file's kind (:mod:`supervisor.references.schema`);
3. the verification record: each verified row's stored ``row_hash`` is
   compared with the hash of its data now, and the file's context hash with
   its conventions and source now.  A mismatch is a warning, and the row (or
   every row) is then treated as unverified.

:func:`load_table` adds the sanity rules of :mod:`supervisor.references.validate`
when ``strict`` (the default), so a table that fails them cannot be used.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pydantic import ValidationError

from supervisor.errors import TableError
from supervisor.references.canonical import context_hash, row_hash
from supervisor.references.issues import Issue, errors
from supervisor.references.schema import (
    KINDS,
    SCHEMA_ID,
    TABLE_MODELS,
    AnyTable,
    is_iso_date,
)
from supervisor.references.validate import row_label, sanity_issues
from supervisor.resources import tables_dir
from supervisor.text import excerpt
from supervisor.tomlfile import TomlError, parse_toml

#: Source statuses that let a row decide on its own (with a verified transcription).
TRUSTED_STATUSES: tuple[str, ...] = ("VERIFIED",)


class UnreadableTableError(TableError):
    """A table file that cannot be read at all (missing, not UTF-8, not TOML)."""


class InvalidTableError(TableError):
    """A table file that reads but fails the schema, provenance or sanity rules.

    Attributes
    ----------
    path : Path or None
        The file.
    issues : list of Issue
        Everything found, errors first.
    """

    def __init__(self, path: Path | None, issues: list[Issue]) -> None:
        self.path = path
        self.issues = issues
        errs = errors(issues)
        where = str(path) if path is not None else "table"
        first = errs[0].line(where) if errs else where
        more = f" (and {len(errs) - 1} more; run `supervisor tables validate`)" if len(errs) > 1 \
            else ""
        super().__init__(first + more)


@dataclass(frozen=True)
class RowState:
    """Effective verification of one row after the hash checks.

    Attributes
    ----------
    index : int
        0-based row index.
    verified : bool
        True only if the row is recorded as verified and its hash and the
        file's context hash still match.
    source_status : str
        The row's source status (its own, or the file's).
    reason : str
        Why the row is not verified, or ``""``.
    """

    index: int
    verified: bool
    source_status: str
    reason: str = ""

    @property
    def trusted(self) -> bool:
        """True when the row may decide on its own: verified and from a VERIFIED source."""
        return self.verified and self.source_status in TRUSTED_STATUSES


@dataclass
class Table:
    """A loaded reference table: the validated model plus its verification state.

    Attributes
    ----------
    model : AnyTable
        The pydantic model of the file.
    raw : dict
        The document as read from TOML.
    path : Path or None
        The file it came from.
    row_states : tuple of RowState
        One per row.
    issues : list of Issue
        Warnings found while loading (e.g. rows changed since verification).
    """

    model: AnyTable
    raw: dict[str, Any]
    path: Path | None
    row_states: tuple[RowState, ...]
    issues: list[Issue] = field(default_factory=list)

    @property
    def name(self) -> str:
        """Table name (the file stem)."""
        return self.model.name

    @property
    def kind(self) -> str:
        """Table kind."""
        return self.model.kind

    @property
    def rows(self) -> list[Any]:
        """The validated rows."""
        return self.model.rows

    @property
    def n_verified(self) -> int:
        """Number of rows whose verification still holds."""
        return sum(s.verified for s in self.row_states)

    @property
    def source_status(self) -> str:
        """The file's source status."""
        return self.model.provenance.source_status

    @property
    def least_status(self) -> str:
        """The least certain source status over the file and its rows."""
        order = ("VERIFIED", "COMPUTED", "DERIVED", "SECONDARY", "OLDER-EDITION", "FROM MEMORY")
        statuses = {s.source_status for s in self.row_states} | {self.source_status}
        return max(statuses, key=order.index)

    def label(self, index: int) -> str:
        """Short key of row ``index`` (0-based)."""
        return row_label(self.model, index)


def read_document(path: str | Path) -> dict[str, Any]:
    """Read a TOML table file.

    Parameters
    ----------
    path : str or Path
        The file.

    Returns
    -------
    dict
        The parsed document.

    Raises
    ------
    UnreadableTableError
        If the file is missing, unreadable, not UTF-8 or not TOML.
    """
    p = Path(path)
    name = excerpt(str(p)) if len(str(p)) > 200 else str(p)
    try:
        data = p.read_bytes()
    except OSError as exc:
        raise UnreadableTableError(f"{name}: cannot read the file ({exc.strerror or exc})"
                                   ) from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise UnreadableTableError(f"{name}: not UTF-8 text (byte {exc.start}); table files are "
                                   "UTF-8 TOML") from None
    try:
        return parse_toml(text)
    except TomlError as exc:
        raise UnreadableTableError(f"{name}: {exc.reason}; table files are TOML, see "
                                   "tables/README.md") from None


def _fmt_loc(loc: tuple[Any, ...]) -> tuple[int | None, str]:
    row = None
    parts: list[str] = []
    rest = list(loc)
    if len(rest) >= 2 and rest[0] == "rows" and isinstance(rest[1], int):
        row = rest[1] + 1
        rest = rest[2:]
    for p in rest:
        if isinstance(p, int):
            if parts:
                parts[-1] += f"[{p + 1}]"
            else:
                parts.append(f"[{p + 1}]")
        elif isinstance(p, str) and (p.startswith("literal[") or p in ("float", "int", "str",
                                                                     "bool", "function-after")):
            continue
        else:
            parts.append(str(p))
    return row, ".".join(parts) or ("rows" if row is None and loc[:1] == ("rows",) else "")


def _short(value: Any) -> str:
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, bool):
        return "true (a boolean)" if value else "false (a boolean)"
    return excerpt(value)


#: Accepted forms for pydantic's type errors, in the words of tables/README.md.
_TYPE_FORMS: dict[str, str] = {
    "float_type": "expected a number (not quoted, not true/false)",
    "int_type": "expected a whole number (not quoted, not true/false)",
    "int_from_float": "expected a whole number",
    "string_type": "expected quoted text",
    "bool_type": "expected true or false",
    "list_type": "expected a list [...]",
    "dict_type": "expected a table",
    "model_type": "expected a table",
    "finite_number": "expected a finite number",
}


def _pydantic_issues(exc: ValidationError, model: AnyTable | None = None) -> list[Issue]:
    out: list[Issue] = []
    seen: set[tuple[int | None, str]] = set()
    for e in exc.errors(include_url=False):
        row, col = _fmt_loc(tuple(e["loc"]))
        if (row, col) in seen:
            continue  # a union reports each branch; one line per cell is enough
        seen.add((row, col))
        msg = e["msg"]
        if msg.startswith("Value error, "):
            msg = msg[len("Value error, "):]
        kind = e["type"]
        if kind == "missing":
            msg = "missing; this column is required (see tables/README.md)"
        elif kind == "extra_forbidden":
            msg = f"unknown key {excerpt(col.rsplit('.', 1)[-1])} (a typo?); see tables/README.md"
        elif kind in _TYPE_FORMS:
            msg = f"got {_short(e.get('input'))}; {_TYPE_FORMS[kind]}"
        elif kind == "literal_error":
            msg = f"got {_short(e.get('input'))}; expected {e.get('ctx', {}).get('expected', '?')}"
        elif not msg.startswith("got ") and not isinstance(e.get("input"), dict):
            msg = f"got {_short(e.get('input'))}; {msg[:1].lower()}{msg[1:]}"
        out.append(Issue("error", msg, row, col))
    return out


def check_document(doc: dict[str, Any], path: Path | None = None
                   ) -> tuple[AnyTable | None, list[Issue]]:
    """Check the header, provenance and schema of a parsed document.

    Parameters
    ----------
    doc : dict
        Parsed TOML.
    path : Path or None
        The file, to check that ``name`` equals its stem.

    Returns
    -------
    tuple
        (the model, or None when the schema fails; the issues found).
    """
    issues: list[Issue] = []
    if doc.get("schema") != SCHEMA_ID:
        issues.append(Issue("error", f"got {_short(doc.get('schema'))}; expected {SCHEMA_ID!r}",
                            None, "schema"))
    prov = doc.get("provenance")
    if not isinstance(prov, dict):
        issues.append(Issue("error", "no [provenance] table; every table file must say where "
                            "its values come from (see tables/README.md)", None, "provenance"))
    kind = doc.get("kind")
    if kind not in KINDS:
        issues.append(Issue("error", f"got {_short(kind)}; expected one of {', '.join(KINDS)}",
                            None, "kind"))
    if path is not None and doc.get("name") != path.stem:
        issues.append(Issue("error", f"got {_short(doc.get('name'))}; the name must equal the "
                            f"file stem {excerpt(path.stem)}", None, "name"))
    if not isinstance(kind, str) or kind not in KINDS or not isinstance(prov, dict):
        return None, issues
    try:
        model = TABLE_MODELS[kind].model_validate(doc)
    except ValidationError as exc:
        return None, issues + _pydantic_issues(exc)
    return model, issues  # type: ignore[return-value]


def _bad_rows(issues: list[Issue]) -> set[int] | None:
    """0-based rows named by schema errors; None when an error is outside the rows."""
    bad: set[int] = set()
    for i in errors(issues):
        if i.row is None:
            return None
        bad.add(i.row - 1)
    return bad


def _sanity_of_good_rows(doc: dict[str, Any], issues: list[Issue]) -> list[Issue]:
    """Sanity rules on the rows that pass the schema, when only some rows fail it.

    A row with a wrong type is reported by the schema; the order, monotony and key
    rules still run on the other rows (numbered as in the file), so one bad cell
    never hides another problem.
    """
    bad = _bad_rows(issues)
    rows = doc.get("rows")
    if not bad or not isinstance(rows, list):
        return []
    keep = [k for k in range(len(rows)) if k not in bad]
    if not keep:
        return []
    model, more = check_document({**doc, "rows": [rows[k] for k in keep]})
    if model is None or errors(more):
        return []
    return sanity_issues(model, [k + 1 for k in keep])


def verification_states(model: AnyTable, doc: dict[str, Any]
                        ) -> tuple[tuple[RowState, ...], list[Issue]]:
    """Work out which rows are still verified, and report changes since verification.

    Parameters
    ----------
    model : AnyTable
        The validated table.
    doc : dict
        The raw document (the hashes are over the raw rows).

    Returns
    -------
    tuple
        (one RowState per row; issues: errors for inconsistent records,
        warnings for rows or context changed since verification).
    """
    issues: list[Issue] = []
    states: list[RowState] = []
    stored_ctx = model.verification.context_hash
    ctx_now = context_hash(doc)
    any_verified = any(r.verification == "verified" for r in model.rows)
    ctx_ok = stored_ctx == ctx_now
    if any_verified and not ctx_ok:
        why = ("no context hash is recorded" if not stored_ctx else
               "the kind, conventions or source identity (document, issuing body, edition, "
               "table, date) changed since verification")
        issues.append(Issue("warning", f"{why}; every row is treated as unverified until "
                            "checked again", None, "verification.context_hash"))
    transcriber = model.provenance.transcribed_by.strip().lower()
    for i, (r, raw) in enumerate(zip(model.rows, doc["rows"], strict=True)):
        status = r.source_status or model.provenance.source_status
        label = row_label(model, i)
        if r.verification != "verified":
            states.append(RowState(i, False, status, "not verified"))
            continue
        problems = []
        if not r.verified_by:
            problems.append("verified_by is empty")
        elif r.verified_by.strip().lower() == transcriber:
            problems.append(f"verified_by {r.verified_by!r} is the transcriber; the check must "
                            "be made by a second person")
        if not is_iso_date(r.verified_on):
            problems.append(f"verified_on {r.verified_on!r} is not a date YYYY-MM-DD")
        if not r.verification_method:
            problems.append("verification_method is empty")
        if not r.row_hash:
            problems.append("row_hash is empty")
        if problems:
            issues.append(Issue("error", "marked verified but " + "; ".join(problems) +
                                "; record checks with `supervisor tables verify`", i + 1,
                                "verification", label))
            states.append(RowState(i, False, status, "incomplete verification record"))
            continue
        now = row_hash(raw)
        if now != r.row_hash:
            issues.append(Issue(
                "warning",
                f"changed since verification by {r.verified_by} on {r.verified_on} (stored hash "
                f"{r.row_hash[:12]}…, now {now[:12]}…); treated as unverified until checked again",
                i + 1, "row_hash", label))
            states.append(RowState(i, False, status, "changed since verification"))
            continue
        if not ctx_ok:
            states.append(RowState(i, False, status, "conventions or source changed since "
                                   "verification"))
            continue
        states.append(RowState(i, True, status))
    return tuple(states), issues


def inspect_document(doc: dict[str, Any], path: Path | None = None, strict: bool = True
                     ) -> tuple[Table | None, list[Issue]]:
    """Run every stage on a parsed document and return the table (if usable) and the issues.

    With ``strict`` the sanity rules run too.  The table is None when an error
    was found.
    """
    model, issues = check_document(doc, path)
    if model is None:
        if strict:
            issues += _sanity_of_good_rows(doc, issues)
        issues.sort(key=lambda i: (i.severity != "error",))
        return None, issues
    states, v_issues = verification_states(model, doc)
    issues += v_issues
    if strict:
        issues += sanity_issues(model)
    issues.sort(key=lambda i: (i.severity != "error",))
    if errors(issues):
        return None, issues
    return Table(model, doc, path, states, [i for i in issues if i.severity == "warning"]), issues


def resolve(name_or_path: str | Path) -> Path:
    """Return the file for a bundled table name or a path.

    A string naming an existing file, or ending in ``.toml``, is a path;
    otherwise it is looked up among the bundled tables by name.

    Raises
    ------
    TableError
        If no bundled table has that name.
    """
    p = Path(name_or_path)
    try:
        exists = p.exists()
    except OSError as exc:  # e.g. a name longer than the file system allows
        raise UnreadableTableError(f"{excerpt(str(p))}: cannot be read ({exc.strerror or exc})"
                                   ) from None
    if p.suffix == ".toml" or exists or len(p.parts) > 1:
        return p
    for candidate in bundled_paths():
        if candidate.stem == str(name_or_path):
            return candidate
    names = ", ".join(c.stem for c in bundled_paths())
    raise TableError(f"no bundled table named {excerpt(str(name_or_path))}; bundled: {names}")


def load_table(name_or_path: str | Path, strict: bool = True) -> Table:
    """Load a table by bundled name or path.

    Parameters
    ----------
    name_or_path : str or Path
        A bundled table name (e.g. ``"usn-rev7-air-ndl"``) or a file path.
    strict : bool
        Also run the sanity rules (default).  ``strict=False`` is for
        screening a table that may contain transcription errors; the header,
        provenance and schema are always checked.

    Returns
    -------
    Table

    Raises
    ------
    UnreadableTableError
        If the file cannot be read.
    InvalidTableError
        If the file lacks provenance or fails the schema (or, when strict,
        a sanity rule).
    """
    path = resolve(name_or_path)
    doc = read_document(path)
    table, issues = inspect_document(doc, path, strict=strict)
    if table is None:
        raise InvalidTableError(path, issues)
    return table


def bundled_paths() -> list[Path]:
    """Return the bundled table files, sorted by kind folder then name."""
    root = tables_dir()
    return sorted(p for p in root.rglob("*.toml") if not p.name.startswith("."))


def bundled_tables() -> list[Table]:
    """Load every bundled table (strictly).

    Raises
    ------
    TableError
        If any bundled file fails to load.
    """
    return [load_table(p) for p in bundled_paths()]


def validate_file(path: str | Path) -> list[Issue]:
    """Validate a table file: header, provenance, schema, verification record and sanity rules.

    Parameters
    ----------
    path : str or Path
        The file.

    Returns
    -------
    list of Issue
        Errors first, then warnings; empty for a clean file.

    Raises
    ------
    UnreadableTableError
        If the file cannot be read as UTF-8 TOML.
    """
    p = Path(path)
    doc = read_document(p)
    _, issues = inspect_document(doc, p, strict=True)
    return issues
