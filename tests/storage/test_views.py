"""The SQL views of revision 0003 answer like the catalog service, on SQLite and PostgreSQL.

References: the catalog service's entries (the same rows through the ORM), the count of
parameter sets per area from the enumeration (docs/parameters.md), and Python's own integer
order for the sort keys of exact big integers.
"""

from __future__ import annotations

import pytest
from sqlalchemy import text

from zoo.catalog.build import build_catalog
from zoo.catalog.enumeration import parameter_set_count
from zoo.catalog.service import Catalog
from zoo.storage.database import open_engine

BOUND = 8


@pytest.fixture
def built(db_url: str) -> str:
    with Catalog.open(db_url, create=True) as catalog:
        build_catalog(catalog, BOUND, jobs=1)
    return db_url


def test_class_summary_has_one_readable_row_per_class(built: str) -> None:
    engine = open_engine(built)
    try:
        with engine.connect() as connection:
            rows = {
                r.class_id: r
                for r in connection.execute(text("SELECT * FROM class_summary")).mappings()
            }
    finally:
        engine.dispose()
    with Catalog.open(built) as catalog:
        entries = list(catalog.iter_entries())
    assert set(rows) == {e.id for e in entries}
    for entry in entries:
        row = rows[entry.id]
        assert row["label"] == entry.label and row["area"] == entry.area
        assert int(row["states"]) == entry.invariants["states"]
        assert int(row["net_automorphisms"]) == entry.invariants["net_automorphisms"]
        assert row["cycle_time"] == entry.invariants["cycle_time"]
        assert row["member_count"] == len(entry.members)
        assert bool(row["cyclic"]) == entry.invariants["cyclic"]


def test_parameter_set_lookup_finds_every_parameter_set(built: str) -> None:
    engine = open_engine(built)
    try:
        with engine.connect() as connection:
            per_area = dict(
                connection.execute(
                    text("SELECT area, COUNT(*) FROM parameter_set_lookup GROUP BY area")
                ).all()
            )
            row = (
                connection.execute(
                    text("SELECT * FROM parameter_set_lookup WHERE parameters = 'C(2,2,1,1)'")
                )
                .mappings()
                .one()
            )
    finally:
        engine.dispose()
    expected = {a: parameter_set_count(a) for a in range(1, BOUND + 1)}
    assert per_area == {a: n for a, n in expected.items() if n}
    with Catalog.open(built) as catalog:
        assert row["class_id"] == catalog.get("2,2,1,1").id
        assert row["class_label"] == catalog.get("2,2,1,1").label


def test_sort_keys_order_exact_big_integers_numerically(built: str) -> None:
    engine = open_engine(built)
    try:
        with engine.connect() as connection:
            by_key = [
                int(r[0])
                for r in connection.execute(
                    text("SELECT states FROM class_summary ORDER BY states_sort_key, class_id")
                )
            ]
            by_text = [
                r[0]
                for r in connection.execute(
                    text("SELECT states FROM class_summary ORDER BY states")
                )
            ]
    finally:
        engine.dispose()
    assert by_key == sorted(by_key)
    assert [int(s) for s in by_text] != sorted(int(s) for s in by_text)  # why the key exists
