"""The repository: the only code that reads or writes the catalog's tables.

The catalog service (``zoo.catalog.service``) and the build (``zoo.catalog.build``) orchestrate;
every statement they need is a method here. Reads go through ``Repository.read()``, one
transaction whose snapshot answers every question asked inside it, so that a result and the
completeness it states come from the same moment even while a build writes (on PostgreSQL
the transaction is REPEATABLE READ; SQLite in WAL mode keeps a reader's snapshot for its
transaction). Writes go through ``Repository.write()``, one write transaction.

Rows and values are mapped by ``zoo.storage.convert`` and ``zoo.storage.models``
(``stored_row``/``loaded_values``: invariant values from and to their columns).
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from datetime import UTC, datetime
from fractions import Fraction
from functools import partial
from typing import Any

from sqlalchemy import Engine, and_, delete, func, or_, select, update
from sqlalchemy.engine import Connection
from sqlalchemy.exc import IntegrityError, OperationalError

from zoo.core import registry
from zoo.core.entries import AreaStats, ClassEntry, FrameEntry, SeedEntry, frozen_values
from zoo.core.params import ParameterSet
from zoo.storage import bulk, convert, database
from zoo.storage.models import Base, loaded_values

__all__ = ["CatalogReader", "CatalogWriter", "Repository", "StoreConflict"]

_CHUNK = 900  # bound parameters per IN (...) list, below SQLite's historical limit of 999

_TABLES = Base.metadata.tables
_INFO = _TABLES["catalog_info"]
_AREAS = _TABLES["areas"]
_FRAMES = _TABLES["frames"]
_CLASSES = _TABLES["classes"]
_READINGS = _TABLES["readings"]
_PARAMETER_SETS = _TABLES["parameter_sets"]
_SEEDS = _TABLES["seeds"]
#: The frame's stored invariants, joined to a class row as ``frame_<column>``.
_FRAME_VALUE_COLUMNS = tuple(
    _FRAMES.c[column].label(f"frame_{column}")
    for inv in registry.stored_on("frames")
    for column in inv.columns
)


class StoreConflict(Exception):
    """A write met a constraint or lock error; the caller decides whether another builder
    stored the same rows first. ``busy`` says the database was locked by another writer."""

    def __init__(self, reason: str, busy: bool) -> None:
        super().__init__(reason)
        self.reason = reason
        self.busy = busy


class Repository:
    """The tables of one open catalog database (an engine from ``database.open_engine``)."""

    def __init__(self, engine: Engine) -> None:
        self.engine = engine

    @contextmanager
    def read(self) -> Iterator[CatalogReader]:
        """One read transaction: every answer inside it comes from the same snapshot."""
        with self.engine.connect() as connection:
            if connection.dialect.name == "postgresql":
                connection = connection.execution_options(isolation_level="REPEATABLE READ")
            with connection.begin():
                yield CatalogReader(connection)

    @contextmanager
    def write(self) -> Iterator[CatalogWriter]:
        """One write transaction (``database.write_transaction``); constraint and lock errors
        become ``StoreConflict``."""
        try:
            with database.write_transaction(self.engine) as connection:
                yield CatalogWriter(connection)
        except (IntegrityError, OperationalError) as exc:
            reason = str(getattr(exc, "orig", exc)).strip().splitlines()[0]
            raise StoreConflict(reason, database.is_busy(exc)) from None


class CatalogReader:
    """Reads over one connection (inside ``Repository.read()`` or a write transaction)."""

    def __init__(self, connection: Connection) -> None:
        self.connection = connection

    # completeness and facts

    def complete_areas(self) -> list[int]:
        rows = self.connection.execute(
            select(_AREAS.c.area).where(_AREAS.c.complete.is_(True)).order_by(_AREAS.c.area)
        )
        return [row[0] for row in rows]

    def area_complete(self, area: int) -> bool | None:
        """True when the area is stored completely, False for an incomplete leftover, None
        when nothing of it is stored."""
        row = self.connection.execute(
            select(_AREAS.c.complete).where(_AREAS.c.area == area)
        ).first()
        return None if row is None else bool(row[0])

    def info(self) -> dict[str, str]:
        rows = self.connection.execute(select(_INFO.c.key, _INFO.c.value))
        return {key: value for key, value in rows}

    def area_stats(self) -> list[AreaStats]:
        rows = self.connection.execute(select(_AREAS).order_by(_AREAS.c.area))
        return [
            AreaStats(
                r.area, r.parameter_sets, r.readings, r.classes, r.frames, r.complete, r.seconds
            )
            for r in rows
        ]

    def stored_count(self, kind: str, area: int) -> int:
        """How many ``classes`` or ``frames`` an area holds."""
        table = _TABLES[kind]
        return int(
            self.connection.execute(
                select(func.count()).select_from(table).where(table.c.area == area)
            ).scalar_one()
        )

    # entries

    def class_id_for(self, p: ParameterSet) -> str | None:
        """The identifier of p's class, None when p's area is not stored."""
        row = self.connection.execute(
            select(_PARAMETER_SETS.c.class_id).where(
                and_(
                    _PARAMETER_SETS.c.alpha == p.alpha,
                    _PARAMETER_SETS.c.beta == p.beta,
                    _PARAMETER_SETS.c.gamma == p.gamma,
                    _PARAMETER_SETS.c.delta == p.delta,
                )
            )
        ).first()
        return None if row is None else str(row[0])

    def class_id_with_fingerprint(self, fingerprint: str) -> str | None:
        row = self.connection.execute(
            select(_CLASSES.c.id).where(_CLASSES.c.fingerprint == fingerprint)
        ).first()
        return None if row is None else str(row[0])

    def entries(self, ids: Sequence[str]) -> list[ClassEntry]:
        """Whole entries for class ids, in the order given (missing ids are skipped)."""
        if not ids:
            return []
        connection = self.connection
        classes: dict[str, Any] = {}
        readings: dict[str, list[Any]] = {}
        members_of_reading: dict[int, list[tuple[int, int, int, int]]] = {}
        seeds: dict[str, list[SeedEntry]] = {}
        for chunk in _chunks(list(ids)):
            for row in connection.execute(
                select(_CLASSES, *_FRAME_VALUE_COLUMNS)
                .join(_FRAMES, _FRAMES.c.id == _CLASSES.c.frame_id)
                .where(_CLASSES.c.id.in_(chunk))
            ):
                classes[row.id] = row
            for row in connection.execute(
                select(_READINGS).where(_READINGS.c.class_id.in_(chunk)).order_by(_READINGS.c.id)
            ):
                readings.setdefault(row.class_id, []).append(row)
            for alpha, beta, gamma, delta, reading_id in connection.execute(
                select(
                    _PARAMETER_SETS.c.alpha,
                    _PARAMETER_SETS.c.beta,
                    _PARAMETER_SETS.c.gamma,
                    _PARAMETER_SETS.c.delta,
                    _PARAMETER_SETS.c.reading_id,
                ).where(_PARAMETER_SETS.c.class_id.in_(chunk))
            ):
                members_of_reading.setdefault(reading_id, []).append((alpha, beta, gamma, delta))
            for row in connection.execute(select(_SEEDS).where(_SEEDS.c.class_id.in_(chunk))):
                seeds.setdefault(row.class_id, []).append(convert.seed_entry(row))
        return [
            convert.class_entry(
                classes[class_id],
                readings.get(class_id, []),
                members_of_reading,
                seeds.get(class_id, []),
            )
            for class_id in ids
            if class_id in classes
        ]

    def class_page(self, area: int | None, after: tuple[int, int], size: int) -> list[Any]:
        """Up to ``size`` (id, area, rank) rows after ``after`` in (area, rank) order."""
        statement = select(_CLASSES.c.id, _CLASSES.c.area, _CLASSES.c.rank).where(
            # (area, rank) > after, written so that an index on (area, rank) serves it
            _CLASSES.c.area >= after[0],
            or_(_CLASSES.c.area > after[0], _CLASSES.c.rank > after[1]),
        )
        if area is not None:
            statement = statement.where(_CLASSES.c.area == area)
        statement = statement.order_by(_CLASSES.c.area, _CLASSES.c.rank).limit(size)
        return list(self.connection.execute(statement).all())

    def frame(self, frame_id: str) -> FrameEntry | None:
        row = self.connection.execute(select(_FRAMES).where(_FRAMES.c.id == frame_id)).first()
        if row is None:
            return None
        class_ids = [
            r[0]
            for r in self.connection.execute(
                select(_CLASSES.c.id).where(_CLASSES.c.frame_id == row.id).order_by(_CLASSES.c.rank)
            )
        ]
        return FrameEntry(
            id=row.id,
            label=row.label,
            area=row.area,
            fingerprint=row.fingerprint,
            lattice_key=(row.area, row.lattice_g, row.lattice_r),
            class_ids=tuple(class_ids),
            invariant_values=frozen_values(loaded_values("frames", row)),
        )

    def seeds(self) -> list[SeedEntry]:
        rows = self.connection.execute(select(_SEEDS).order_by(_SEEDS.c.name))
        return [convert.seed_entry(r) for r in rows]

    # queries (trees of zoo.query.parser, compiled by zoo.storage.querysql)

    def query_class_ids(
        self, node: Any, sort: str | None, limit: int | None, seed: str | None
    ) -> tuple[list[str], int]:
        """(class ids in order, total matches before the limit)."""
        from zoo.storage.querysql import sort_clause

        statement = _matching_statement(node, seed)
        order = sort_clause(sort) if sort else (_CLASSES.c.area.asc(), _CLASSES.c.rank.asc())
        connection = self.connection
        if limit is None:
            ids = [row[0] for row in connection.execute(statement.order_by(*order))]
            return ids, len(ids)
        if limit == 0:
            return [], self.query_count(node, seed)
        # Two statements in this one snapshot: the limited page can stop after ``limit`` rows
        # in index order, where a window count would first collect and sort every match (an
        # empty query on area 100: 0.6 ms against 16 ms, docs/web.md).
        ids = [row[0] for row in connection.execute(statement.order_by(*order).limit(limit))]
        if len(ids) < limit:
            return ids, len(ids)
        return ids, self.query_count(node, seed)

    def query_count(self, node: Any, seed: str | None) -> int:
        statement = _matching_statement(node, seed)
        return int(
            self.connection.execute(
                select(func.count()).select_from(statement.subquery())
            ).scalar_one()
        )

    def matched_readings(self, ids: Sequence[str], node: Any) -> dict[str, str | None]:
        """Per class, the readings that made it match (``querysql.matched_readings_clause``),
        or {} when the query reads no reading or parameter-set field."""
        from zoo.storage.querysql import matched_readings_clause

        clause = None if node is None else matched_readings_clause(node)
        if clause is None or not ids:
            return {}
        found: dict[str, str | None] = {}
        for chunk in _chunks(list(ids)):
            rows = self.connection.execute(
                select(_CLASSES.c.id, clause).where(_CLASSES.c.id.in_(chunk))
            )
            found.update({row[0]: row[1] for row in rows})
        return found

    def column_texts(
        self, ids: Sequence[str], names: Sequence[str]
    ) -> dict[str, dict[str, str | None]]:
        """The named fields of each class as display text (``3``, ``1/3``, ``yes``, ``1..2``)."""
        from zoo.storage.querysql import column_clauses

        values: dict[str, dict[str, str | None]] = {}
        if not ids or not names:
            return {class_id: {} for class_id in ids}
        labels = column_clauses(list(names))
        for chunk in _chunks(list(ids)):
            for row in self.connection.execute(
                select(_CLASSES.c.id, *labels).where(_CLASSES.c.id.in_(chunk))
            ):
                mapping = row._mapping
                values[row.id] = {label.name: mapping[label.name] for label in labels}
        return values

    def column_values(
        self, ids: Sequence[str], names: Sequence[str]
    ) -> dict[str, dict[str, object]]:
        """The named fields of each class as typed JSON values: class-level fields give one
        value; reading- and parameter-level fields every distinct value over the class's
        readings or parameter sets, sorted, always as a list (even of one)."""
        from zoo.query.fields import require_field

        result: dict[str, dict[str, object]] = {class_id: {} for class_id in ids}
        if not ids or not names:
            return result
        for name in names:
            field = require_field(name)
            table_name = next(iter(field.tables))
            table = _TABLES[table_name]
            stored = [table.c[spec.partition(".")[2]] for spec in field.columns]
            per_class = table_name in ("classes", "frames")
            for chunk in _chunks(list(ids)):
                if table_name == "frames":
                    statement = select(_CLASSES.c.id, *stored).join(
                        _FRAMES, _FRAMES.c.id == _CLASSES.c.frame_id
                    )
                    owner = _CLASSES.c.id
                elif table_name == "classes":
                    statement = select(_CLASSES.c.id, *stored)
                    owner = _CLASSES.c.id
                else:
                    owner = table.c.class_id
                    statement = select(owner, *stored).distinct()
                for row in self.connection.execute(statement.where(owner.in_(chunk))):
                    value = convert.field_value(field, tuple(row)[1:])
                    if per_class:
                        result[row[0]][field.name] = value
                    else:
                        listed = result[row[0]].setdefault(field.name, [])
                        assert isinstance(listed, list)
                        if value not in listed:
                            listed.append(value)
            if not per_class:
                for class_values in result.values():
                    listed = class_values.setdefault(field.name, [])
                    assert isinstance(listed, list)
                    listed.sort(key=partial(_sort_key, field))
        return result

    # behaviour (docs/theory/behaviour.md)

    def behaviour_members(self, behaviour_id: str) -> list[str]:
        """The stored classes of one behaviour class, in catalog order."""
        rows = self.connection.execute(
            select(_CLASSES.c.id)
            .where(_CLASSES.c.behaviour_id == behaviour_id)
            .order_by(_CLASSES.c.area, _CLASSES.c.rank)
        )
        return [row[0] for row in rows]

    def behaviour_areas(self, *, named: bool) -> list[int]:
        """Complete areas whose classes have (``named``) or lack their behaviour identifiers,
        in order."""
        rows = self.connection.execute(
            select(_AREAS.c.area)
            .where(_AREAS.c.complete.is_(True), _AREAS.c.behaviour_done.is_(named))
            .order_by(_AREAS.c.area)
        )
        return [row[0] for row in rows]

    def behaviour_rows(self, area: int) -> list[Any]:
        """(id, label, fingerprint, behaviour_key, behaviour_evidence) of an area's classes,
        by rank."""
        return list(
            self.connection.execute(
                select(
                    _CLASSES.c.id,
                    _CLASSES.c.label,
                    _CLASSES.c.fingerprint,
                    _CLASSES.c.behaviour_key,
                    _CLASSES.c.behaviour_evidence,
                )
                .where(_CLASSES.c.area == area)
                .order_by(_CLASSES.c.rank)
            )
        )

    def behaviour_holder(self, key: str) -> tuple[str, str, str] | None:
        """(behaviour id, class id, label) of the first class with this key that has its
        behaviour identifier, or None."""
        row = self.connection.execute(
            select(_CLASSES.c.behaviour_id, _CLASSES.c.id, _CLASSES.c.label)
            .where(_CLASSES.c.behaviour_key == key, _CLASSES.c.behaviour_id.is_not(None))
            .order_by(_CLASSES.c.area, _CLASSES.c.rank)
            .limit(1)
        ).first()
        return None if row is None else (row[0], row[1], row[2])


class CatalogWriter(CatalogReader):
    """Writes inside one write transaction (``Repository.write()``)."""

    def set_behaviour(
        self, class_id: str, key: str | None, evidence: str | None, behaviour_id: str | None
    ) -> None:
        """Store a class's behaviour key, its evidence and its behaviour identifier."""
        self.connection.execute(
            update(_CLASSES)
            .where(_CLASSES.c.id == class_id)
            .values(behaviour_key=key, behaviour_evidence=evidence, behaviour_id=behaviour_id)
        )

    def recount_behaviour(self, behaviour_ids: Sequence[str]) -> None:
        """Set ``behaviour_count`` of every member of these behaviour classes to their count."""
        for chunk in _chunks(sorted(set(behaviour_ids))):
            counts = self.connection.execute(
                select(_CLASSES.c.behaviour_id, func.count())
                .where(_CLASSES.c.behaviour_id.in_(chunk))
                .group_by(_CLASSES.c.behaviour_id)
            ).all()
            for behaviour_id, count in counts:
                self.connection.execute(
                    update(_CLASSES)
                    .where(_CLASSES.c.behaviour_id == behaviour_id)
                    .values(behaviour_count=count)
                )

    def claim_behaviour_area(self, area: int) -> bool:
        """Mark a complete area's classes as named, before naming them in this transaction;
        False when another build named them first (the update is atomic on both stores: a
        concurrent claim waits for this transaction, then finds nothing left to update)."""
        result = self.connection.execute(
            update(_AREAS)
            .where(
                _AREAS.c.area == area,
                _AREAS.c.complete.is_(True),
                _AREAS.c.behaviour_done.is_(False),
            )
            .values(behaviour_done=True)
        )
        return result.rowcount == 1

    def put_info(self, key: str, value: str) -> None:
        if self.connection.execute(select(_INFO.c.key).where(_INFO.c.key == key)).first() is None:
            self.connection.execute(_INFO.insert(), [{"key": key, "value": value}])
        else:
            self.connection.execute(update(_INFO).where(_INFO.c.key == key).values(value=value))

    def sync_seeds(self, seeds: Sequence[Any]) -> None:
        """Make the seeds table equal to ``seeds`` (objects with name, description, params),
        linking each to its class when its area is stored."""
        wanted = {s.name: s for s in seeds}
        stored = {row.name: row for row in self.connection.execute(select(_SEEDS))}
        gone = sorted(set(stored) - set(wanted))
        if gone:
            self.connection.execute(delete(_SEEDS).where(_SEEDS.c.name.in_(gone)))
        for name, seed in wanted.items():
            values = {
                "name": name,
                "description": seed.description,
                "alpha": seed.params.alpha,
                "beta": seed.params.beta,
                "gamma": seed.params.gamma,
                "delta": seed.params.delta,
                "class_id": self.class_id_for(seed.params),
            }
            old = stored.get(name)
            if old is None:
                self.connection.execute(_SEEDS.insert(), [values])
            elif any(getattr(old, k) != v for k, v in values.items()):
                self.connection.execute(
                    update(_SEEDS).where(_SEEDS.c.name == name).values(**values)
                )

    def link_seed(self, name: str, p: ParameterSet) -> None:
        """Point the seed ``name`` at the class of p (now stored)."""
        self.connection.execute(
            update(_SEEDS).where(_SEEDS.c.name == name).values(class_id=self.class_id_for(p))
        )

    def delete_area(self, area: int) -> None:
        """Remove every row of an area (an incomplete leftover), unlinking its seeds."""
        self.connection.execute(
            update(_SEEDS)
            .where(_SEEDS.c.class_id.in_(select(_CLASSES.c.id).where(_CLASSES.c.area == area)))
            .values(class_id=None)
        )
        for table in (_PARAMETER_SETS, _READINGS, _CLASSES, _FRAMES, _AREAS):
            self.connection.execute(delete(table).where(table.c.area == area))

    def insert_area(self, rows: convert.AreaRows) -> None:
        """The rows of one classified area (``convert.area_rows``), bulk-inserted."""
        for table, table_rows in (
            (_FRAMES, rows.frames),
            (_CLASSES, rows.classes),
            (_READINGS, rows.readings),
            (_PARAMETER_SETS, rows.parameter_sets),
        ):
            bulk.insert_rows(self.connection, table, table_rows)

    def mark_area_complete(self, stats: AreaStats) -> None:
        self.connection.execute(
            _AREAS.insert(),
            [
                {
                    "area": stats.area,
                    "complete": True,
                    "parameter_sets": stats.parameter_sets,
                    "readings": stats.readings,
                    "classes": stats.classes,
                    "frames": stats.frames,
                    "built_at": datetime.now(UTC),
                    "seconds": stats.seconds,
                }
            ],
        )


# --- helpers ---------------------------------------------------------------------------------


def _chunks(values: list[str]) -> Iterator[list[str]]:
    for start in range(0, len(values), _CHUNK):
        yield values[start : start + _CHUNK]


def _matching_statement(node: Any, seed: str | None) -> Any:
    """``SELECT classes.id`` of the classes matching a query tree and a seed-name filter.

    The seed filter is a case-insensitive substring test; LIKE wildcards in it are escaped,
    so ``%`` matches a percent sign, not every seed.
    """
    from zoo.storage.querysql import compile_query

    statement = compile_query(node) if node is not None else select(_CLASSES.c.id)
    if seed is not None:
        needle = seed.strip().lower()
        statement = statement.where(
            _CLASSES.c.id.in_(
                select(_SEEDS.c.class_id).where(
                    _SEEDS.c.class_id.is_not(None),
                    func.lower(_SEEDS.c.name).contains(needle, autoescape=True),
                )
            )
        )
    return statement


def _sort_key(field: Any, value: object) -> Any:
    from zoo.query.fields import FieldType

    if field.type is FieldType.FRACTION and isinstance(value, str):
        return Fraction(value)
    return value
