"""SQLAlchemy 2 typed models of the catalog tables (docs/architecture.md, "Schema").

The tables are created and changed only by the Alembic revisions in ``migrations/``; these
classes describe the schema at the newest revision, and ``tests/storage/test_migrations.py`` checks
that the two agree. ORM records are storage types only: the catalog service converts them to its
frozen value types in one place.

Exact integers that can pass 64 bits (reachable states, state arcs, automorphism orders) are
stored as decimal text beside a sortable key (``database.sortable_key``) so that comparing and
ordering keys as text is numeric order on SQLite and PostgreSQL alike.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from datetime import datetime
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from sqlalchemy import (
    Boolean,
    CheckConstraint,
    DateTime,
    Float,
    ForeignKey,
    Integer,
    MetaData,
    Text,
    UniqueConstraint,
    false,
)
from sqlalchemy.engine.default import DefaultExecutionContext
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column, relationship

from zoo.core import registry


def sortable_key(n: int) -> str:
    """Text that sorts like the non-negative integer n: four digits of length, then the digits.

    Text order of keys is numeric order on SQLite and PostgreSQL alike (architecture.md).

    >>> sortable_key(40), sortable_key(1820)
    ('000240', '00041820')
    >>> sortable_key(9) < sortable_key(10)
    True
    """
    if isinstance(n, bool) or not isinstance(n, int):
        raise TypeError(f"sortable_key needs an int, got {type(n).__name__}")
    if n < 0:
        raise ValueError(f"sortable_key needs a non-negative integer, got {n}")
    digits = str(n)
    if len(digits) > 9999:
        raise ValueError(f"sortable_key holds at most 9999 digits, got {len(digits)}")
    return f"{len(digits):04d}{digits}"


def _current_parameters(context: DefaultExecutionContext) -> dict[str, Any]:
    """The values of the row being inserted (one row of an executemany, too)."""
    parameters: dict[str, Any] = context.get_current_parameters()  # type: ignore[no-untyped-call]
    return parameters


def _key_of(column: str) -> Callable[[DefaultExecutionContext], str]:
    """An insert default that derives the sortable key from the exact text in ``column``."""

    def default(context: DefaultExecutionContext) -> str:
        return sortable_key(int(_current_parameters(context)[column]))

    return default


def _cyclic_default(context: DefaultExecutionContext) -> bool:
    # The transition group Z_d1 x Z_(A/d1) is cyclic iff d1 = 1 (docs/theory/lattice-key.md).
    return int(_current_parameters(context)["group_d1"]) == 1


#: Insert defaults of stored values that follow from other columns of the same row.
_DERIVED_DEFAULTS: dict[str, Callable[[DefaultExecutionContext], Any]] = {
    "cyclic": _cyclic_default,
}


def invariant_columns(table: str) -> dict[str, Any]:
    """The mapped columns of every registry invariant stored on ``table``, in registry order.

    Exact integers are decimal text beside a sortable key filled on insert; fractions are a
    numerator and a denominator; an indexed invariant is indexed on the column it sorts by.
    """
    columns: dict[str, Any] = {}
    for inv in registry.stored_on(table):
        names = inv.columns
        if inv.type is registry.ValueType.BIG_INTEGER:
            columns[names[0]] = mapped_column(Text, nullable=False)
            columns[names[1]] = mapped_column(
                Text, nullable=False, index=inv.indexed or None, default=_key_of(names[0])
            )
        elif inv.type is registry.ValueType.FRACTION:
            columns[names[0]] = mapped_column(Integer, nullable=False)
            columns[names[1]] = mapped_column(Integer, nullable=False)
        elif inv.type is registry.ValueType.BOOLEAN:
            columns[names[0]] = mapped_column(
                Boolean, nullable=False, default=_DERIVED_DEFAULTS.get(names[0])
            )
        elif inv.type is registry.ValueType.TEXT:
            columns[names[0]] = mapped_column(Text, nullable=False)
        else:
            columns[names[0]] = mapped_column(
                Integer, nullable=inv.nullable, index=inv.indexed or None
            )
    return columns


def stored_values(inv: registry.Invariant, value: object) -> dict[str, object]:
    """The column values that store one invariant's value (the one converter of values to
    rows): exact integers as decimal text beside their sortable key, fractions as numerator
    and denominator.

    >>> from fractions import Fraction
    >>> stored_values(registry.invariant("states"), 40)
    {'states': '40', 'states_key': '000240'}
    >>> stored_values(registry.invariant("slowness"), Fraction(-1, 3))
    {'slowness_num': -1, 'slowness_den': 3}
    """
    names = inv.columns
    if inv.type is registry.ValueType.BIG_INTEGER:
        number = value if isinstance(value, int) else int(str(value))
        return {names[0]: str(number), names[1]: sortable_key(number)}
    if inv.type is registry.ValueType.FRACTION:
        fraction = value if isinstance(value, Fraction) else Fraction(str(value))
        return {names[0]: fraction.numerator, names[1]: fraction.denominator}
    if inv.type is registry.ValueType.BOOLEAN:
        return {names[0]: bool(value)}
    if inv.type is registry.ValueType.TEXT:
        return {names[0]: str(value)}
    return {names[0]: value if isinstance(value, int) else int(str(value))}


def stored_row(table: str, values: Mapping[str, object]) -> dict[str, object]:
    """The columns of every registry invariant stored on ``table``, from values by name."""
    row: dict[str, object] = {}
    for name, kind, first, second in _STORED_LAYOUT[table]:
        try:
            value = values[name]
        except KeyError:
            raise KeyError(f"no value of {name} for a row of {table}") from None
        # A build writes every row through here: plain ints, bools and fractions go straight in.
        if value is None and name in _NULLABLE:
            row[first] = None  # not decided here; filled in later (behaviour_count)
        elif kind == _WHOLE and type(value) is int:
            row[first] = value
        elif kind == _EXACT and type(value) is int:
            row[first] = str(value)
            row[second] = sortable_key(value)
        elif kind == _RATIO and type(value) is Fraction:
            row[first] = value.numerator
            row[second] = value.denominator
        elif kind == _YES_NO and type(value) is bool:
            row[first] = value
        else:
            row.update(stored_values(registry.invariant(name), value))
    return row


_WHOLE, _EXACT, _RATIO, _YES_NO = (
    registry.ValueType.INTEGER.value,
    registry.ValueType.BIG_INTEGER.value,
    registry.ValueType.FRACTION.value,
    registry.ValueType.BOOLEAN.value,
)

_NULLABLE = frozenset(inv.name for inv in registry.INVARIANTS if inv.nullable)

#: (name, type, first column, second column or "") of the invariants stored on each table.
_STORED_LAYOUT: dict[str, tuple[tuple[str, str, str, str], ...]] = {
    table: tuple(
        (inv.name, inv.type.value, inv.columns[0], inv.columns[-1] if len(inv.columns) > 1 else "")
        for inv in registry.stored_on(table)
    )
    for table in registry.LEVEL_TABLES.values()
}


def loaded_values(table: str, row: Any, prefix: str = "") -> dict[str, registry.Value | None]:
    """Every registry invariant stored on ``table``, read back from a result row (the inverse
    of ``stored_row``); ``prefix`` is put before the column labels of a joined table."""
    mapping = row._mapping
    values: dict[str, registry.Value | None] = {}
    for inv in registry.stored_on(table):
        first = mapping[prefix + inv.columns[0]]
        if inv.type is registry.ValueType.FRACTION:
            values[inv.name] = Fraction(first, mapping[prefix + inv.columns[1]])
        elif inv.type is registry.ValueType.BOOLEAN:
            values[inv.name] = bool(first)
        elif inv.type is registry.ValueType.TEXT:
            values[inv.name] = str(first)
        elif first is None and inv.nullable:
            values[inv.name] = None  # not decided (behaviour above the state bound)
        else:  # whole numbers, and exact integers from their decimal text
            values[inv.name] = int(first)
    return values


def _invariant_mixin(name: str, table: str) -> type:
    """A declarative mixin holding the registry's columns of one table."""
    return type(name, (), invariant_columns(table))


if TYPE_CHECKING:  # the type checker sees plain bases; the columns are made at import

    class ClassInvariantColumns: ...

    class ReadingInvariantColumns: ...

    class FrameInvariantColumns: ...

else:
    ClassInvariantColumns = _invariant_mixin("ClassInvariantColumns", "classes")
    ReadingInvariantColumns = _invariant_mixin("ReadingInvariantColumns", "readings")
    FrameInvariantColumns = _invariant_mixin("FrameInvariantColumns", "frames")


#: Constraint and index names, fixed from the first revision on so that every later migration
#: can name what it alters (SQLite leaves constraints unnamed otherwise; common practice with
#: Alembic). Changing this would break every existing revision.
NAMING_CONVENTION: dict[str, str] = {
    "ix": "ix_%(table_name)s_%(column_0_N_name)s",
    "uq": "uq_%(table_name)s_%(column_0_N_name)s",
    "ck": "ck_%(table_name)s_%(constraint_name)s",
    "fk": "fk_%(table_name)s_%(column_0_name)s_%(referred_table_name)s",
    "pk": "pk_%(table_name)s",
}


class Base(DeclarativeBase):
    """Declarative base of every catalog table, with the naming convention above."""

    metadata = MetaData(naming_convention=NAMING_CONVENTION)


class CatalogInfo(Base):
    """Facts about the catalog file itself: schema revision, encoding, versions, creation time.

    Keys written by zoo: ``created_at`` (ISO 8601, UTC), ``created_by`` (zoo version that made
    the schema), ``zoo_version`` (zoo version that last migrated it), ``schema_revision``
    (Alembic revision, kept current by every migration run), ``encoding`` (canonical-form
    encoding version of the fingerprints, written by the build).
    """

    __tablename__ = "catalog_info"

    key: Mapped[str] = mapped_column(Text, primary_key=True)
    value: Mapped[str] = mapped_column(Text)


class AreaRecord(Base):
    """One area A: whether it was stored completely (one transaction per area) and its counts."""

    __tablename__ = "areas"

    area: Mapped[int] = mapped_column(Integer, primary_key=True, autoincrement=False)
    complete: Mapped[bool] = mapped_column(Boolean, default=False)
    parameter_sets: Mapped[int] = mapped_column(Integer)
    readings: Mapped[int] = mapped_column(Integer)
    classes: Mapped[int] = mapped_column(Integer)
    frames: Mapped[int] = mapped_column(Integer)
    built_at: Mapped[datetime | None] = mapped_column(DateTime(timezone=True))
    seconds: Mapped[float | None] = mapped_column(Float)
    # Behaviour identifiers given to this area's classes (all areas below have them too).
    behaviour_done: Mapped[bool] = mapped_column(Boolean, default=False, server_default=false())

    __table_args__ = (CheckConstraint("area >= 1", name="area_positive"),)


class FrameRecord(FrameInvariantColumns, Base):
    """A frame: an isomorphism class of unmarked nets (docs/theory/isomorphism.md),
    ``FR{area}-{rank}``."""

    __tablename__ = "frames"

    id: Mapped[str] = mapped_column(Text, primary_key=True)
    area: Mapped[int] = mapped_column(Integer, index=True)
    rank: Mapped[int] = mapped_column(Integer)
    label: Mapped[str] = mapped_column(Text)
    fingerprint: Mapped[str] = mapped_column(Text, unique=True)
    # automorphisms (exact decimal text) and its sortable key come from the registry of
    # invariants (net_automorphisms) through FrameInvariantColumns.
    lattice_g: Mapped[int] = mapped_column(Integer)
    lattice_r: Mapped[int] = mapped_column(Integer)

    classes: Mapped[list[ClassRecord]] = relationship(
        back_populates="frame", order_by="ClassRecord.rank"
    )

    __table_args__ = (UniqueConstraint("area", "rank"),)


class ClassRecord(ClassInvariantColumns, Base):
    """A catalog entry: an isomorphism class of marked nets, places not typed, ``CY{area}-{rank}``.

    Holds the class-level invariants (the same for every reading, docs/theory/isomorphism.md).
    """

    __tablename__ = "classes"

    id: Mapped[str] = mapped_column(Text, primary_key=True)
    area: Mapped[int] = mapped_column(Integer, index=True)
    rank: Mapped[int] = mapped_column(Integer)
    label: Mapped[str] = mapped_column(Text)  # smallest member, C(a,b,c,d)
    label_alpha: Mapped[int] = mapped_column(Integer)
    label_beta: Mapped[int] = mapped_column(Integer)
    label_gamma: Mapped[int] = mapped_column(Integer)
    label_delta: Mapped[int] = mapped_column(Integer)
    frame_id: Mapped[str] = mapped_column(ForeignKey("frames.id"), index=True)
    fingerprint: Mapped[str] = mapped_column(Text, unique=True)
    # Behaviour (docs/theory/behaviour.md): the key computed with the class (equal keys, same
    # behaviour), how it was found, and the behaviour identifier ``BE{area}-{rank}`` of the
    # first class with that key, given by the build in catalog order. Empty above the bound.
    behaviour_key: Mapped[str | None] = mapped_column(Text, index=True, nullable=True)
    behaviour_evidence: Mapped[str | None] = mapped_column(Text, nullable=True)
    behaviour_id: Mapped[str | None] = mapped_column(Text, index=True, nullable=True)
    # The invariant columns (loop, states, ..., member_count) come from the registry of
    # invariants through ClassInvariantColumns.

    frame: Mapped[FrameRecord] = relationship(back_populates="classes")
    readings: Mapped[list[ReadingRecord]] = relationship(
        back_populates="class_record", order_by="ReadingRecord.id"
    )
    members: Mapped[list[ParameterSetRecord]] = relationship(
        back_populates="class_record",
        order_by="(ParameterSetRecord.alpha, ParameterSetRecord.beta, "
        "ParameterSetRecord.gamma, ParameterSetRecord.delta)",
        viewonly=True,
    )

    __table_args__ = (UniqueConstraint("area", "rank"),)


class ReadingRecord(ReadingInvariantColumns, Base):
    """A reading: same lattice and same (alpha, beta), places typed (docs/theory/isomorphism.md).

    A class has one or two readings; reading-level properties depend on which place kind is
    called forward.
    """

    __tablename__ = "readings"

    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    class_id: Mapped[str] = mapped_column(ForeignKey("classes.id"), index=True)
    area: Mapped[int] = mapped_column(Integer)
    alpha: Mapped[int] = mapped_column(Integer)
    beta: Mapped[int] = mapped_column(Integer)
    lattice_g: Mapped[int] = mapped_column(Integer)
    lattice_r: Mapped[int] = mapped_column(Integer)
    # The invariant columns (processes, ..., normal forms) come from the registry of invariants
    # through ReadingInvariantColumns.

    class_record: Mapped[ClassRecord] = relationship(back_populates="readings")
    members: Mapped[list[ParameterSetRecord]] = relationship(
        back_populates="reading",
        order_by="(ParameterSetRecord.alpha, ParameterSetRecord.beta, "
        "ParameterSetRecord.gamma, ParameterSetRecord.delta)",
    )


class ParameterSetRecord(Base):
    """One parameter set (alpha, beta, gamma, delta) with its reading and class."""

    __tablename__ = "parameter_sets"

    alpha: Mapped[int] = mapped_column(Integer, primary_key=True, autoincrement=False)
    beta: Mapped[int] = mapped_column(Integer, primary_key=True, autoincrement=False)
    gamma: Mapped[int] = mapped_column(Integer, primary_key=True, autoincrement=False)
    delta: Mapped[int] = mapped_column(Integer, primary_key=True, autoincrement=False)
    area: Mapped[int] = mapped_column(Integer, index=True)
    reading_id: Mapped[int] = mapped_column(ForeignKey("readings.id"), index=True)
    class_id: Mapped[str] = mapped_column(ForeignKey("classes.id"), index=True)

    reading: Mapped[ReadingRecord] = relationship(back_populates="members")
    class_record: Mapped[ClassRecord] = relationship()

    __table_args__ = (
        CheckConstraint("alpha >= 1 AND beta >= 1 AND gamma >= 1 AND delta >= 1", name="positive"),
    )


class SeedRecord(Base):
    """A named cycloid from ``seeds_data/`` (published or demo examples), linked to its class."""

    __tablename__ = "seeds"

    name: Mapped[str] = mapped_column(Text, primary_key=True)
    description: Mapped[str] = mapped_column(Text)
    alpha: Mapped[int] = mapped_column(Integer)
    beta: Mapped[int] = mapped_column(Integer)
    gamma: Mapped[int] = mapped_column(Integer)
    delta: Mapped[int] = mapped_column(Integer)
    class_id: Mapped[str | None] = mapped_column(ForeignKey("classes.id"), index=True)

    class_record: Mapped[ClassRecord | None] = relationship()


__all__ = [
    "NAMING_CONVENTION",
    "sortable_key",
    "AreaRecord",
    "Base",
    "CatalogInfo",
    "ClassRecord",
    "FrameRecord",
    "ParameterSetRecord",
    "ReadingRecord",
    "SeedRecord",
]
