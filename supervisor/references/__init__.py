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

import importlib
from typing import TYPE_CHECKING, Any

# name -> submodule; imported on first use, so importing one submodule (the row hash
# of ``canonical``, say) does not load the loader, validator and pydantic schema
_EXPORTS: dict[str, str] = {
    "context_hash": "canonical",
    "row_hash": "canonical",
    "ImportOptions": "importer",
    "import_csv": "importer",
    "Issue": "issues",
    "InvalidTableError": "loader",
    "RowState": "loader",
    "Table": "loader",
    "UnreadableTableError": "loader",
    "bundled_paths": "loader",
    "bundled_tables": "loader",
    "load_table": "loader",
    "validate_file": "loader",
    "LookupResult": "lookup",
    "lookup_no_stop": "lookup",
    "lookup_schedule": "lookup",
    "parse_row_spec": "verify",
    "verify_rows": "verify",
}

if TYPE_CHECKING:
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


def __getattr__(name: str) -> Any:
    """Import the submodule that defines ``name`` on first use (PEP 562)."""
    try:
        module = _EXPORTS[name]
    except KeyError:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}") from None
    value = getattr(importlib.import_module(f"{__name__}.{module}"), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted({*globals(), *_EXPORTS})


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
