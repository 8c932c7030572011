"""Logs in: each format becomes an :class:`~supervisor.records.importers.common.ImportedLog`.

* :func:`~supervisor.records.importers.csvlog.read_csv_log`: a depth recorder's CSV;
* :func:`~supervisor.records.importers.timed.read_timed_log`: the supervisor's timed
  log (TOML, ``supervisor-log/1``).

:func:`read_log` picks the importer by the file's suffix or the ``fmt`` given.
"""

from __future__ import annotations

from pathlib import Path
from typing import Literal

from supervisor.errors import InputError
from supervisor.records.importers.common import ImportedLog, LogError, LogIssue
from supervisor.records.importers.csvlog import CsvOptions, read_csv_log
from supervisor.records.importers.timed import read_timed_log

__all__ = ["CsvOptions", "ImportedLog", "LogError", "LogIssue", "read_log"]

LogFormat = Literal["csv", "toml"]


def log_format(path: Path, fmt: str | None = None) -> LogFormat:
    """The format of a log: ``fmt`` when given, else from the suffix (.csv, .toml)."""
    if fmt:
        if fmt not in ("csv", "toml"):
            raise InputError("--format", f"got {fmt!r}; expected csv or toml")
        return fmt  # type: ignore[return-value]
    suffix = path.suffix.lower()
    if suffix in (".csv", ".txt"):
        return "csv"
    if suffix == ".toml":
        return "toml"
    raise InputError("--format", f"cannot tell the format of {path.name} from its name; give "
                                 "--format csv (depth recorder) or --format toml (timed log)")


def read_log(path: Path, fmt: str | None = None, csv: CsvOptions | None = None) -> ImportedLog:
    """Import a log of either format.

    Parameters
    ----------
    path : Path
        The log file.
    fmt : {"csv", "toml"}, optional
        Its format (default: from the suffix).
    csv : CsvOptions, optional
        Units and gas for a CSV log.

    Returns
    -------
    ImportedLog
    """
    if log_format(path, fmt) == "csv":
        return read_csv_log(path, csv)
    return read_timed_log(path)
