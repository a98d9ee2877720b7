"""Bulk inserts (batched executemany on SQLite, COPY on PostgreSQL) against plain SELECTs."""

from __future__ import annotations

from datetime import UTC, datetime

import pytest
from sqlalchemy import (
    Boolean,
    Column,
    DateTime,
    Integer,
    MetaData,
    String,
    Table,
    create_engine,
    select,
)
from sqlalchemy.exc import IntegrityError

from zoo.storage import bulk


def _table() -> Table:
    return Table(
        "bulk_rows",
        MetaData(),
        Column("id", Integer, primary_key=True),
        Column("label", String(40)),
        Column("flag", Boolean),
        Column("at", DateTime(timezone=True)),
    )


def test_rows_across_batches_come_back_unchanged(
    db_url: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(bulk, "BATCH_ROWS", 3)  # several batches, a partial last one
    table = _table()
    engine = create_engine(db_url)
    table.metadata.create_all(engine)
    when = datetime(2026, 1, 2, 3, 4, 5, tzinfo=UTC)
    rows: list[dict[str, object]] = [
        {"id": i, "label": f'C(1,{i},"x"\t\\y)', "flag": i % 2 == 0, "at": when}
        for i in range(1, 11)
    ]
    with engine.begin() as connection:
        bulk.insert_rows(connection, table, rows)
    with engine.connect() as connection:
        got = [dict(r._mapping) for r in connection.execute(select(table).order_by(table.c.id))]
    engine.dispose()
    for row in got:  # SQLite gives back naive datetimes
        row["at"] = row["at"].replace(tzinfo=UTC)  # type: ignore[union-attr]
    assert got == rows


def test_a_failing_bulk_insert_stores_nothing_and_raises_integrity_error(db_url: str) -> None:
    table = _table()
    engine = create_engine(db_url)
    table.metadata.create_all(engine)
    rows: list[dict[str, object]] = [
        {"id": i, "label": "a", "flag": True, "at": None} for i in (1, 2, 2)
    ]
    with pytest.raises(IntegrityError), engine.begin() as connection:
        bulk.insert_rows(connection, table, rows)
    with engine.connect() as connection:
        assert connection.execute(select(table)).all() == []
    engine.dispose()
