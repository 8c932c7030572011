"""Reference tables: the open table format, its loader, validator, look-up and records.

Public API
----------
load_table(name_or_path, strict=True) -> Table
bundled_tables() -> list[Table]
lookup_no_stop(table, depth, bottom_time) -> LookupResult
lookup_schedule(table, depth, bottom_time, mode="air") -> LookupResult
validate_file(path) -> list[Issue]
verify_rows(path, spec, by, method, on=None) -> VerifyOutcome
import_csv(csv_path, kind, options, out=None, force=False)
row_hash(raw_row) -> str

The file format is described in ``tables/README.md``.
"""

from __future__ import annotations

from supervisor.references.canonical import context_hash, row_hash
from supervisor.references.importer import ImportOptions, import_csv
from supervisor.references.issues import Issue
from supervisor.references.loader import (
    InvalidTableError,
    RowState,
    Table,
    UnreadableTableError,
    bundled_paths,
    bundled_tables,
    load_table,
    validate_file,
)
from supervisor.references.lookup import LookupResult, lookup_no_stop, lookup_schedule
from supervisor.references.verify import parse_row_spec, verify_rows

__all__ = [
    "ImportOptions",
    "InvalidTableError",
    "Issue",
    "LookupResult",
    "RowState",
    "Table",
    "UnreadableTableError",
    "bundled_paths",
    "bundled_tables",
    "context_hash",
    "import_csv",
    "load_table",
    "lookup_no_stop",
    "lookup_schedule",
    "parse_row_spec",
    "row_hash",
    "validate_file",
    "verify_rows",
]
