"""Fixtures of the record-store tests: one store per test, on SQLite and on PostgreSQL.

``db_url`` is parametrised over both backends, so every store test runs twice
through the same test function.  The PostgreSQL cluster is started once per
session (:mod:`tests.records._postgres`); each test gets a database of its own.
Without a PostgreSQL server the ``postgresql`` cases are skipped with the
reason, or fail when ``SUPERVISOR_REQUIRE_POSTGRES`` is set (as in CI).
"""

from __future__ import annotations

import itertools
import os
from collections.abc import Iterator
from pathlib import Path

import pytest

from supervisor.records.store import RecordStore
from tests.records._postgres import REQUIRE_ENV, Cluster, Unavailable, start_cluster

_names = itertools.count(1)
TEMPLATE = "records_template"


@pytest.fixture(scope="session")
def pg_cluster() -> Iterator[Cluster]:
    """A throwaway PostgreSQL cluster for the session (skipped, or failed in CI, without one)."""
    try:
        cluster = start_cluster()
    except (Unavailable, OSError, Exception) as exc:  # noqa: BLE001 - reported as the reason
        reason = f"PostgreSQL server not available: {exc}"
        if os.environ.get(REQUIRE_ENV):
            pytest.fail(f"{reason} ({REQUIRE_ENV} is set: the PostgreSQL tests must run)")
        pytest.skip(reason)
    try:
        # one migrated database, copied for each test (CREATE DATABASE ... TEMPLATE)
        RecordStore.open(cluster.create_database(TEMPLATE), create=True).close()
        yield cluster
    finally:
        cluster.stop()


@pytest.fixture(params=["sqlite", "postgresql"])
def db_url(request: pytest.FixtureRequest, tmp_path: Path) -> str:
    """A fresh, empty record-store location on each backend."""
    if request.param == "sqlite":
        return str(tmp_path / "records.sqlite3")
    cluster: Cluster = request.getfixturevalue("pg_cluster")
    template = None if request.node.get_closest_marker("fresh_database") else TEMPLATE
    return cluster.create_database(f"records_{os.getpid()}_{next(_names)}", template)


@pytest.fixture
def store(db_url: str) -> Iterator[RecordStore]:
    """An open, migrated, empty record store on each backend."""
    s = RecordStore.open(db_url, create=True)
    try:
        yield s
    finally:
        s.close()
