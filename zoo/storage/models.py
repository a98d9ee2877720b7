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

from collections.abc import Callable
from datetime import datetime
from typing import Any

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
)
from sqlalchemy.engine.default import DefaultExecutionContext
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column, relationship


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

    __table_args__ = (CheckConstraint("area >= 1", name="area_positive"),)


class FrameRecord(Base):
    """A frame: an isomorphism class of unmarked nets (docs/theory/isomorphism.md),
    ``FR{area}-{rank}``."""

    __tablename__ = "frames"

    id: Mapped[str] = mapped_column(Text, primary_key=True)
    area: Mapped[int] = mapped_column(Integer, index=True)
    rank: Mapped[int] = mapped_column(Integer)
    label: Mapped[str] = mapped_column(Text)
    fingerprint: Mapped[str] = mapped_column(Text, unique=True)
    automorphisms: Mapped[str] = mapped_column(Text)  # exact order as decimal text
    automorphisms_key: Mapped[str] = mapped_column(Text, default=_key_of("automorphisms"))
    lattice_g: Mapped[int] = mapped_column(Integer)
    lattice_r: Mapped[int] = mapped_column(Integer)

    classes: Mapped[list[ClassRecord]] = relationship(
        back_populates="frame", order_by="ClassRecord.rank"
    )

    __table_args__ = (UniqueConstraint("area", "rank"),)


class ClassRecord(Base):
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
    # minimal cycle length, docs/theory/minimal-cycle-length.md
    loop: Mapped[int] = mapped_column(Integer, index=True)
    states: Mapped[str] = mapped_column(Text)  # reachable markings, exact decimal text
    states_key: Mapped[str] = mapped_column(Text, index=True, default=_key_of("states"))
    state_arcs: Mapped[str] = mapped_column(Text)
    state_arcs_key: Mapped[str] = mapped_column(Text, default=_key_of("state_arcs"))
    automorphisms: Mapped[str] = mapped_column(Text)  # exact order as decimal text
    automorphisms_key: Mapped[str] = mapped_column(
        Text, index=True, default=_key_of("automorphisms")
    )
    tokens: Mapped[int] = mapped_column(Integer)  # alpha + beta
    enabled: Mapped[int] = mapped_column(Integer)
    semi_enabled: Mapped[int] = mapped_column(Integer)
    cycle_time_num: Mapped[int] = mapped_column(Integer)
    cycle_time_den: Mapped[int] = mapped_column(Integer)
    group_d1: Mapped[int] = mapped_column(Integer)  # transition group Z_d1 x Z_(A/d1)
    cyclic: Mapped[bool] = mapped_column(Boolean, default=_cyclic_default)  # group_d1 == 1
    iteration: Mapped[int] = mapped_column(Integer)  # iteration depth, docs/theory/iterations.md
    reading_count: Mapped[int] = mapped_column(Integer)
    member_count: Mapped[int] = mapped_column(Integer)

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


class ReadingRecord(Base):
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
    processes: Mapped[int] = mapped_column(Integer)
    regular: Mapped[bool] = mapped_column(Boolean)
    slowness_num: Mapped[int] = mapped_column(Integer)
    slowness_den: Mapped[int] = mapped_column(Integer)
    forward_count: Mapped[int] = mapped_column(Integer)
    forward_length: Mapped[int] = mapped_column(Integer)
    forward_tokens: Mapped[int] = mapped_column(Integer)
    backward_count: Mapped[int] = mapped_column(Integer)
    backward_length: Mapped[int] = mapped_column(Integer)
    backward_tokens: Mapped[int] = mapped_column(Integer)
    nf_beta_delta: Mapped[str] = mapped_column(Text)  # C(a,b,c,d), docs/theory/normal-forms.md
    nf_alpha_gamma: Mapped[str] = mapped_column(Text)

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
