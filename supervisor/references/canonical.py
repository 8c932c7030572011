"""Canonical serialisation, row hashes, a deterministic TOML writer and atomic writes.

Row hash
    sha256 (hex) of the row's canonical form: the row's data columns (every key
    but :data:`VERIFICATION_COLUMNS`) as JSON with
    keys sorted at every level, no whitespace, UTF-8, strings in Unicode NFC,
    floats with an integral value written as integers (``20.0`` hashes as
    ``20``) and TOML dates as ``YYYY-MM-DD`` strings.  Anyone can recompute it
    from the file with a JSON library and sha256.

Context hash
    The same over the table's ``kind``, ``conventions`` and the provenance fields
    that identify the source (document, issuing body, edition, table, date).  A
    row check is only valid for the conventions and the source it was made
    against; changing them voids every check in the file.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import os
import re
import stat
import tempfile
import tomllib
import unicodedata
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from supervisor.errors import TableError

#: Row columns that record the two-person check; they are not hashed.
VERIFICATION_COLUMNS: tuple[str, ...] = (
    "verification",
    "verified_by",
    "verified_on",
    "verification_method",
    "row_hash",
)

CONTEXT_PROVENANCE_KEYS: tuple[str, ...] = (
    "source_document",
    "issuing_body",
    "edition",
    "table",
    "date",
)


def _norm(value: Any) -> Any:
    if isinstance(value, Mapping):
        return {unicodedata.normalize("NFC", str(k)): _norm(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_norm(v) for v in value]
    if isinstance(value, bool):
        return value
    if isinstance(value, int):
        return value
    if isinstance(value, float):
        if not math.isfinite(value):
            raise TableError(f"cannot hash a non-finite number {value!r}")
        if value.is_integer() and abs(value) < 2**53:
            return int(value)
        return value
    if isinstance(value, str):
        return unicodedata.normalize("NFC", value)
    if isinstance(value, (_dt.date, _dt.time)):
        return value.isoformat()
    raise TableError(f"cannot hash a value of type {type(value).__name__}")


def canonical_json(value: Any) -> bytes:
    """Return the canonical JSON bytes of a TOML value (see the module notes)."""
    return json.dumps(
        _norm(value), sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False
    ).encode("utf-8")


def row_data(row: Mapping[str, Any]) -> dict[str, Any]:
    """Return the data columns of a raw row (everything but the verification columns)."""
    return {k: v for k, v in row.items() if k not in VERIFICATION_COLUMNS}


def row_hash(row: Mapping[str, Any]) -> str:
    """Return the sha256 hex digest of a raw row's data columns.

    Parameters
    ----------
    row : mapping
        One ``[[rows]]`` entry as read from TOML.

    Returns
    -------
    str
        64 hexadecimal digits.
    """
    return hashlib.sha256(canonical_json(row_data(row))).hexdigest()


def context_hash(doc: Mapping[str, Any]) -> str:
    """Return the sha256 hex digest of a table's kind, conventions and source identity."""
    prov = doc.get("provenance") or {}
    ctx = {
        "kind": doc.get("kind", ""),
        "conventions": doc.get("conventions") or {},
        "provenance": {k: prov.get(k, "") for k in CONTEXT_PROVENANCE_KEYS},
    }
    return hashlib.sha256(canonical_json(ctx)).hexdigest()


# --------------------------------------------------------------------------- TOML writer

_BARE = re.compile(r"^[A-Za-z0-9_-]+$")
_HEADER_ORDER = ("schema", "name", "kind", "title")
_SECTION_ORDER = ("provenance", "conventions")


def _key(k: str) -> str:
    return k if _BARE.match(k) else _string(k)


def _string(s: str) -> str:
    out = []
    for ch in s:
        code = ord(ch)
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif ch == "\n":
            out.append("\\n")
        elif ch == "\t":
            out.append("\\t")
        elif ch == "\r":
            out.append("\\r")
        elif code < 0x20 or code == 0x7F:
            out.append(f"\\u{code:04X}")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def toml_value(value: Any) -> str:
    """Format one value as TOML (inline tables for mappings)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise TableError(f"cannot write a non-finite number {value!r} to a table file")
        return repr(value)
    if isinstance(value, str):
        return _string(value)
    if isinstance(value, _dt.datetime):
        return value.isoformat()
    if isinstance(value, _dt.date):
        return value.isoformat()
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, Mapping):
        if not value:
            return "{}"
        return "{ " + ", ".join(f"{_key(k)} = {toml_value(v)}" for k, v in value.items()) + " }"
    raise TableError(f"cannot write a value of type {type(value).__name__} to a table file")


def _table_body(d: Mapping[str, Any], prefix: str, lines: list[str], array: bool) -> None:
    """Write ``d`` under header ``prefix``: scalars first, then sub-tables."""
    lines.append(f"[[{prefix}]]" if array else f"[{prefix}]")
    subs = []
    for k, v in d.items():
        if isinstance(v, Mapping) and v and all(not isinstance(x, Mapping) for x in v.values()):
            subs.append((k, v))
        else:
            lines.append(f"{_key(k)} = {toml_value(v)}")
    for k, v in subs:
        lines.append("")
        _table_body(v, f"{prefix}.{_key(k)}", lines, array=False)


def dumps_table(doc: Mapping[str, Any]) -> str:
    """Serialise a table document to TOML deterministically.

    The header keys come first, then ``[provenance]``, ``[conventions]``, the
    ``[[rows]]`` (scalar columns, then one ``[rows.X]`` sub-table per nested
    table, stop lists as arrays of inline tables), then ``[verification]`` and
    its log.  The result is parsed back and must equal ``doc``.

    Parameters
    ----------
    doc : mapping
        Table document as read from TOML.

    Returns
    -------
    str
        TOML text ending in a newline.

    Raises
    ------
    TableError
        If a value cannot be written or the text does not read back equal.
    """
    lines: list[str] = []
    for k in _HEADER_ORDER:
        if k in doc:
            lines.append(f"{k} = {toml_value(doc[k])}")
    rest = [k for k in doc if k not in _HEADER_ORDER and k not in _SECTION_ORDER
            and k not in ("rows", "verification")]
    for k in rest:
        v = doc[k]
        if isinstance(v, Mapping) or (isinstance(v, list) and v and isinstance(v[0], Mapping)):
            raise TableError(f"unexpected top-level table {k!r}")
        lines.append(f"{_key(k)} = {toml_value(v)}")
    for k in _SECTION_ORDER:
        if k in doc:
            lines.append("")
            _table_body(doc[k], k, lines, array=False)
    for row in doc.get("rows", []):
        lines.append("")
        _table_body(row, "rows", lines, array=True)
    ver = doc.get("verification")
    if ver is not None:
        lines.append("")
        lines.append("[verification]")
        for k, v in ver.items():
            if k != "log":
                lines.append(f"{_key(k)} = {toml_value(v)}")
        for entry in ver.get("log", []):
            lines.append("")
            lines.append("[[verification.log]]")
            for k, v in entry.items():
                lines.append(f"{_key(k)} = {toml_value(v)}")
    text = "\n".join(lines) + "\n"
    if tomllib.loads(text) != _plain(doc):
        raise TableError("internal error: the written table does not read back equal")
    return text


def _plain(value: Any) -> Any:
    if isinstance(value, Mapping):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, tuple):
        return [_plain(v) for v in value]
    if isinstance(value, list):
        return [_plain(v) for v in value]
    return value


def _umask() -> int:
    old = os.umask(0o022)
    os.umask(old)
    return old


def atomic_write_text(path: Path, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file and a rename.

    The temporary file is created in the target folder, flushed and synced,
    given the old file's permissions and renamed over the target, so a reader
    sees the old bytes or the new bytes, never a mix, and a failure leaves the
    old file byte-identical.

    Parameters
    ----------
    path : Path
        Target file.
    text : str
        New content (written as UTF-8).
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(text.encode("utf-8"))
            fh.flush()
            os.fsync(fh.fileno())
        if path.exists():
            os.chmod(tmp, stat.S_IMODE(path.stat().st_mode))
        else:
            os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
