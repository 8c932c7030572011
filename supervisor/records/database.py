"""Where the record store lives and how it is opened.

The store is one database, named by ``--db``, else by the environment variable
``SUPERVISOR_DB``, else by the per-user default
``$XDG_DATA_HOME/supervisor/records.sqlite3`` (``~/.local/share/supervisor/
records.sqlite3`` when ``XDG_DATA_HOME`` is not set, following the XDG Base
Directory Specification).  A value is either a file path (an embedded SQLite
database) or a database URL: ``sqlite:///PATH`` or ``postgresql://USER@HOST:PORT/
NAME`` (the psycopg 3 driver is used for ``postgresql://``).

SQLite runs in write-ahead-log mode (readers never block the writer) with
foreign keys enforced and a busy timeout, so several processes on one vessel can
write at once; every transaction, reads and schema changes included, is an
explicit ``BEGIN … COMMIT``.  PostgreSQL is reached through the same SQLAlchemy Core code; no
statement is written for one database only, except the append-only triggers in
the migration scripts.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from sqlalchemy import Engine, create_engine, event
from sqlalchemy.engine import URL, make_url
from sqlalchemy.exc import ArgumentError

from supervisor.errors import InputError

#: Environment variable naming the record store when ``--db`` is not given.
DB_ENV = "SUPERVISOR_DB"
#: File name of the default store inside the per-user data folder.
DEFAULT_FILE = "records.sqlite3"
#: How long a writer waits for another writer's transaction [s].
BUSY_TIMEOUT_S = 60.0


@dataclass(frozen=True)
class Location:
    """A resolved record-store location.

    Attributes
    ----------
    url : sqlalchemy URL
        The URL handed to SQLAlchemy (``sqlite:///…`` or ``postgresql+psycopg://…``).
    origin : str
        Where it came from: ``"--db"``, ``"SUPERVISOR_DB"`` or ``"default"``.
    path : Path or None
        The SQLite file, or ``None`` for a server database.
    """

    url: URL
    origin: str
    path: Path | None

    @property
    def backend(self) -> str:
        """``"sqlite"`` or ``"postgresql"``."""
        return self.url.get_backend_name()

    def display(self) -> str:
        """The location as printed: the file path, or the URL without its password."""
        if self.path is not None:
            return str(self.path)
        return self.url.render_as_string(hide_password=True)


def default_path(env: dict[str, str] | None = None) -> Path:
    """The per-user default store: ``$XDG_DATA_HOME/supervisor/records.sqlite3``.

    Parameters
    ----------
    env : dict, optional
        Environment to read (default: ``os.environ``).

    Returns
    -------
    Path
        ``~/.local/share/supervisor/records.sqlite3`` when ``XDG_DATA_HOME`` is
        unset, empty or not absolute (XDG Base Directory Specification 0.8).
    """
    env = dict(os.environ) if env is None else env
    base = env.get("XDG_DATA_HOME") or ""
    root = Path(base) if base and Path(base).is_absolute() else Path.home() / ".local" / "share"
    return root / "supervisor" / DEFAULT_FILE


def resolve(db: str | None, env: dict[str, str] | None = None) -> Location:
    """Resolve the store from ``--db``, ``SUPERVISOR_DB`` or the default.

    Parameters
    ----------
    db : str or None
        The ``--db`` value: a file path or a database URL.
    env : dict, optional
        Environment to read (default: ``os.environ``).

    Returns
    -------
    Location

    Raises
    ------
    InputError
        If the value is an unsupported or malformed URL.
    """
    env = dict(os.environ) if env is None else env
    if db:
        value, origin = db, "--db"
    elif env.get(DB_ENV):
        value, origin = env[DB_ENV], DB_ENV
    else:
        return Location(_sqlite_url(default_path(env)), "default", default_path(env))
    return _parse(value, origin)


def _sqlite_url(path: Path) -> URL:
    return URL.create("sqlite", database=str(path))


def _parse(value: str, origin: str) -> Location:
    field = "--db" if origin == "--db" else origin
    text = value.strip()
    if "://" not in text:
        path = Path(text).expanduser()
        return Location(_sqlite_url(path), origin, path)
    try:
        url = make_url(text)
    except ArgumentError:
        raise InputError(field, "not a database URL; expected a file path, sqlite:///PATH or "
                                "postgresql://USER@HOST:PORT/NAME") from None
    backend = url.get_backend_name()
    if backend == "sqlite":
        if not url.database or url.database == ":memory:":
            raise InputError(field, "an SQLite URL needs a file (sqlite:///PATH); a store in "
                                    "memory would be lost at exit")
        path = Path(url.database).expanduser()
        return Location(_sqlite_url(path), origin, path)
    if backend in ("postgresql", "postgres"):
        if url.get_driver_name() not in ("psycopg", "postgresql", "postgres", ""):
            raise InputError(field, f"driver {url.get_driver_name()!r} is not supported; "
                                    "write postgresql://… (psycopg 3 is used)")
        if not url.database:
            raise InputError(field, "the PostgreSQL URL names no database; expected "
                                    "postgresql://USER@HOST:PORT/NAME")
        return Location(url.set(drivername="postgresql+psycopg"), origin, None)
    raise InputError(field, f"database {backend!r} is not supported; expected a file path, "
                            "sqlite:///PATH or postgresql://USER@HOST:PORT/NAME")


def _sqlite_pragmas(dbapi_connection: Any, _record: Any) -> None:
    # the sqlite3 module's own transaction handling is turned off: it would begin a
    # transaction only before a data change, leaving reads and DDL outside it
    # (SQLAlchemy documentation, "Serializable isolation / Savepoints / Transactional DDL")
    dbapi_connection.isolation_level = None
    cur = dbapi_connection.cursor()
    cur.execute("PRAGMA journal_mode=WAL")
    cur.execute("PRAGMA foreign_keys=ON")
    cur.execute("PRAGMA synchronous=FULL")
    cur.execute(f"PRAGMA busy_timeout={int(BUSY_TIMEOUT_S * 1000)}")
    cur.close()


def _sqlite_begin(conn: Any) -> None:
    conn.exec_driver_sql("BEGIN")


def make_engine(location: Location) -> Engine:
    """Create the SQLAlchemy engine of a store.

    SQLite connections are set to WAL mode, foreign keys on, full
    synchronisation and a busy timeout of :data:`BUSY_TIMEOUT_S`.

    Parameters
    ----------
    location : Location
        The resolved store.

    Returns
    -------
    sqlalchemy.Engine
    """
    if location.backend == "sqlite":
        engine = create_engine(location.url, connect_args={"timeout": BUSY_TIMEOUT_S})
        event.listen(engine, "connect", _sqlite_pragmas)
        event.listen(engine, "begin", _sqlite_begin)
        return engine
    return create_engine(location.url, pool_pre_ping=True,
                         connect_args={"connect_timeout": 10})
