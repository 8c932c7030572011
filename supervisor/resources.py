"""Locate bundled data (``tables/`` and ``templates/``) relative to the package.

In an installed wheel the data sits in ``supervisor/_bundled``; in a source
checkout (editable install) it is the project's top-level ``tables/`` and
``templates/``.  Data is never looked up relative to the current directory.
"""

from __future__ import annotations

import os
from pathlib import Path

#: Environment variable naming a folder that replaces the bundled ``tables/``: a
#: contractor's own copy whose rows a second person has verified.
TABLES_ENV = "SUPERVISOR_TABLES"

_PKG = Path(__file__).resolve().parent


def _bundled(name: str) -> Path:
    inside = _PKG / "_bundled" / name
    if inside.is_dir():
        return inside
    source = _PKG.parent / name
    if source.is_dir():
        return source
    raise FileNotFoundError(f"bundled data folder {name!r} not found beside the package")


def tables_dir() -> Path:
    """Return the folder holding the reference tables.

    The bundled ``tables/`` unless the environment variable ``SUPERVISOR_TABLES``
    names another folder (a contractor's verified copy, laid out the same way).

    Raises
    ------
    InputError
        If ``SUPERVISOR_TABLES`` is set but is not a folder.
    """
    own = os.environ.get(TABLES_ENV, "").strip()
    if own:
        path = Path(own).expanduser()
        if not path.is_dir():
            from supervisor.errors import InputError

            raise InputError(TABLES_ENV, f"the environment variable {TABLES_ENV} names {own!r}, "
                             "which is not a folder; expected a folder laid out like the "
                             "bundled tables/ (limits/, models/, no-stop/ ...)")
        return path.resolve()
    return _bundled("tables")


def templates_dir() -> Path:
    """Return the folder holding the bundled checklist and caution templates."""
    return _bundled("templates")
