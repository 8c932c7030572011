"""Bring a record store to the schema this version of the tool uses (Alembic, run in-process).

The migration scripts ship inside the package (``supervisor/records/migrations``)
and run on an open connection; there is no ``alembic.ini``.  A store at an
older revision is upgraded when it is opened for writing; a store at a revision
this version does not know (written by a newer tool) is refused, never changed.
"""

from __future__ import annotations

from pathlib import Path

from alembic import command
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from alembic.script import ScriptDirectory
from sqlalchemy import Connection, Engine
from sqlalchemy.exc import DBAPIError

from supervisor.errors import InputError

MIGRATIONS = Path(__file__).resolve().parent / "migrations"


def _config() -> Config:
    cfg = Config()
    cfg.set_main_option("script_location", str(MIGRATIONS))
    return cfg


def head_revision() -> str:
    """The newest revision of the shipped migration scripts."""
    head = ScriptDirectory.from_config(_config()).get_current_head()
    assert head is not None  # the package ships at least one revision
    return head


def current_revision(conn: Connection) -> str | None:
    """The revision a database is at, or ``None`` for an empty database."""
    return MigrationContext.configure(conn).get_current_revision()


def _known(revision: str) -> bool:
    script = ScriptDirectory.from_config(_config())
    try:
        return script.get_revision(revision) is not None
    except Exception:
        return False


def check_revision(conn: Connection, where: str) -> str | None:
    """Return the database's revision; refuse one this version does not know.

    Raises
    ------
    InputError
        If the database was migrated by a newer version of the tool.
    """
    rev = current_revision(conn)
    if rev is not None and not _known(rev):
        raise InputError("--db", f"{where} has schema revision {rev!r}, newer than this "
                                 f"version knows ({head_revision()!r}); upgrade the tool")
    return rev


def upgrade(engine: Engine, where: str) -> None:
    """Run every migration the database has not had yet.

    Two processes that open a new store at once may both try; the one that
    loses finds the store at the head revision afterwards and goes on.

    Parameters
    ----------
    engine : sqlalchemy.Engine
        The store's engine.
    where : str
        The store as shown to users, for messages.
    """
    head = head_revision()
    with engine.connect() as conn:
        if check_revision(conn, where) == head:
            return
    try:
        with engine.begin() as conn:
            cfg = _config()
            cfg.attributes["connection"] = conn
            command.upgrade(cfg, "head")
    except DBAPIError:
        with engine.connect() as conn:
            if current_revision(conn) == head:
                return
        raise
