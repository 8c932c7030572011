"""Schema migrations run in-process on both backends; a newer schema is refused.

Expected values are the project's own migration scripts (regression, own
definitions).
"""

from __future__ import annotations

import pytest
from sqlalchemy import inspect, text

from supervisor.errors import InputError
from supervisor.records.migrate import MIGRATIONS, current_revision, head_revision, upgrade
from supervisor.records.store import RecordStore


def test_migrations_ship_in_the_package() -> None:
    assert (MIGRATIONS / "env.py").exists()
    assert any(p.name.startswith("r0001") for p in (MIGRATIONS / "versions").iterdir())
    assert head_revision() == "r0001"


@pytest.mark.fresh_database
def test_new_store_is_at_head_with_all_tables(store: RecordStore) -> None:
    with store.engine.connect() as conn:
        assert current_revision(conn) == head_revision()
        names = set(inspect(conn).get_table_names())
    assert {"records", "record_bodies", "findings", "purges", "chain_lock",
            "alembic_version"} <= names


def test_upgrade_twice_changes_nothing(store: RecordStore) -> None:
    upgrade(store.engine, "test")
    with store.engine.connect() as conn:
        assert conn.execute(text("SELECT count(*) FROM chain_lock")).scalar() == 1


def test_a_newer_schema_is_refused(store: RecordStore, db_url: str) -> None:
    with store.engine.begin() as conn:
        conn.execute(text("UPDATE alembic_version SET version_num = 'r9999'"))
    store.close()
    with pytest.raises(InputError, match="newer than this version"):
        RecordStore.open(db_url, create=True)
