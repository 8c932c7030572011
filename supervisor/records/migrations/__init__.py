"""Alembic migration scripts of the record store, run by :mod:`supervisor.records.migrate`."""
