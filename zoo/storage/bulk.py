"""Bulk writes of a build: many rows of one table in the caller's transaction, fast.

* SQLite: one prepared INSERT run by the driver's ``executemany`` in batches. Profiling the
  build showed SQLAlchemy's per-row parameter processing as most of the writer's time; the
  values here are plain ints, strings, bools and datetimes that sqlite3 binds directly.
* PostgreSQL: ``COPY ... FROM STDIN`` through psycopg 3's ``cursor.copy``, one round trip for
  the whole table instead of one statement per batch (PostgreSQL manual, "COPY").
* Any other database: SQLAlchemy's ordinary executemany.

Rows are written in batches of ``BATCH_ROWS``, so beyond the rows the caller holds (one area
of a build) no copy of the whole table is made.
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping, Sequence
from itertools import islice
from typing import Any

from sqlalchemy import Table
from sqlalchemy.engine import Connection
from sqlalchemy.exc import DBAPIError

__all__ = ["BATCH_ROWS", "insert_rows"]

#: Rows per driver call (SQLite) or per write to the COPY stream (PostgreSQL).
BATCH_ROWS = 5_000


def _batches(
    rows: Sequence[Mapping[str, object]], keys: list[str]
) -> Iterator[list[tuple[object, ...]]]:
    values = (tuple(row[key] for key in keys) for row in rows)
    while batch := list(islice(values, BATCH_ROWS)):
        yield batch


def _quoted(name: str) -> str:
    return '"' + name.replace('"', '""') + '"'


def insert_rows(connection: Connection, table: Table, rows: Sequence[Mapping[str, object]]) -> None:
    """Insert ``rows`` (dicts with the same keys, column names of ``table``) into ``table``.

    Runs inside the caller's transaction: a failure rolls back with it.
    """
    if not rows:
        return
    keys = list(rows[0])
    columns = ", ".join(_quoted(key) for key in keys)
    dialect = connection.dialect.name
    if dialect == "sqlite":
        marks = ", ".join("?" for _ in keys)
        statement = f"INSERT INTO {_quoted(table.name)} ({columns}) VALUES ({marks})"
        for batch in _batches(rows, keys):
            connection.exec_driver_sql(statement, batch)
        return
    if dialect == "postgresql" and connection.dialect.driver == "psycopg":
        import psycopg

        statement = f"COPY {_quoted(table.name)} ({columns}) FROM STDIN"
        raw: Any = connection.connection.driver_connection
        try:
            with raw.cursor() as cursor, cursor.copy(statement) as copy:
                for batch in _batches(rows, keys):
                    for values in batch:
                        copy.write_row(values)
        except psycopg.Error as exc:
            # Wrapped as SQLAlchemy wraps the driver's errors (IntegrityError, ...), so that
            # callers handle a failed COPY like a failed INSERT.
            raise DBAPIError.instance(statement, None, exc, psycopg.Error) from None
        return
    connection.execute(table.insert(), list(rows))
