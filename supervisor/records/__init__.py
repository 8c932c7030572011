"""After the dive: the record store and the log importers.

* :mod:`~supervisor.records.database`: where the store is (``--db``,
  ``SUPERVISOR_DB``, the per-user default) and how it is opened (SQLite in WAL
  mode, or PostgreSQL by URL);
* :mod:`~supervisor.records.schema`, :mod:`~supervisor.records.migrate`: the
  tables and their Alembic migrations, shipped in ``migrations/``;
* :mod:`~supervisor.records.chain`: canonical JSON, record hashes, the walk;
* :mod:`~supervisor.records.store`: appending, reading, verifying, purging;
* :mod:`~supervisor.records.kinds`: the content of each kind of record;
* :mod:`~supervisor.records.signing`: a supervisor's signature on a record;
* :mod:`~supervisor.records.retention`: what may be archived, under which rule;
* :mod:`~supervisor.records.export`: CSV and JSON exports;
* :mod:`~supervisor.records.importers`: depth-recorder CSV and the timed log (TOML)
  to a :class:`~supervisor.profile.Profile`.

The database libraries (SQLAlchemy, Alembic, psycopg, sqlite3) are used in this
package only.
"""
