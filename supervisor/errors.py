"""Package error hierarchy.

Every error the package raises on purpose derives from :class:`SupervisorError`
and also from a builtin, so callers may catch either.  The command line maps
:class:`InputError` and its subclasses to exit status 2 with a one-line message.
"""

from __future__ import annotations


class SupervisorError(Exception):
    """Base class of all errors raised on purpose by this package."""


class InputError(SupervisorError, ValueError):
    """Bad input: the message names the field, the value and the accepted form."""

    def __init__(self, field: str, message: str) -> None:
        self.field = field
        self.message = message
        super().__init__(f"{field}: {message}")


class PlanError(InputError):
    """A plan file that cannot be read or does not validate."""


class TableError(SupervisorError, ValueError):
    """A reference table that is malformed, lacks provenance or fails validation."""


class ScheduleError(SupervisorError, RuntimeError):
    """A decompression schedule that cannot be computed (for example it cannot clear)."""
