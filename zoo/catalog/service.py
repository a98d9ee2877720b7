"""The catalog service: open, query and read the stored catalog of cycloid classes.

This is the Python API that the command line (``zoo/cli/catalog.py``), ``zoo show`` and
``zoo identify`` use (docs/architecture.md, "The catalog service")::

    from zoo.catalog.service import Catalog
    with Catalog.open("catalog.sqlite3", create=True) as catalog:
        build_catalog(catalog, 40)        # zoo.catalog.build
        result = catalog.find("processes = 3 and area < 30", sort="loop", limit=5)
        entry = catalog.get("CY16-3")          # or a label / any member: "C(4,2,2,3)"
        for entry in catalog.iter_entries():   # every class, by area then rank, streamed
            ...

Writing the catalog (enumeration, classification, the nauty check, one transaction per area,
resuming) is ``zoo.catalog.build``; ``Catalog.build`` hands over to it.
"""

from __future__ import annotations

import json
import shlex
from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass
from fractions import Fraction
from functools import partial
from pathlib import Path
from types import TracebackType
from typing import Any

from sqlalchemy import Engine, and_, func, or_, select
from sqlalchemy.engine import Connection

from zoo.catalog.identifiers import Identifier, read_identifier
from zoo.core.params import MAX_AREA, ParameterSet, parse_params
from zoo.errors import CatalogError, NotInCatalog, ParameterError
from zoo.storage import database
from zoo.storage.models import (
    AreaRecord,
    Base,
    CatalogInfo,
    ClassRecord,
    FrameRecord,
    ParameterSetRecord,
    ReadingRecord,
    SeedRecord,
)

__all__ = [
    "DEFAULT_MAX_AREA",
    "AreaStats",
    "Catalog",
    "ClassEntry",
    "FindResult",
    "FrameEntry",
    "SeedEntry",
    "build_command",
    "column_cell",
    "extend_advice",
    "stored_class_id",
    "lookup_class_id",
]

#: Largest area a build accepts: beyond it a full enumeration is hours of nauty work.
MAX_BUILD_AREA = 2_000
#: The area up to which ``zoo find`` builds a catalog when none exists yet (issue 3).
DEFAULT_MAX_AREA = 100
_CHUNK = 900  # bound parameters per IN (...) list, below SQLite's historical limit of 999

_TABLES = Base.metadata.tables
_AREAS = _TABLES["areas"]
_FRAMES = _TABLES["frames"]
_CLASSES = _TABLES["classes"]
_READINGS = _TABLES["readings"]
_SEEDS = _TABLES["seeds"]


# --- value types ---------------------------------------------------------------------------


@dataclass(frozen=True)
class SeedEntry:
    """A named seed (seeds_data/) and the class it belongs to, if that area is stored."""

    name: str
    description: str
    params: ParameterSet
    class_id: str | None

    def as_dict(self) -> dict[str, object]:
        return {
            "name": self.name,
            "description": self.description,
            "params": str(self.params),
            "class_id": self.class_id,
        }


@dataclass(frozen=True)
class ClassEntry:
    """A catalog entry: an isomorphism class of marked nets, places untyped
    (docs/theory/isomorphism.md)."""

    id: str
    label: str
    area: int
    frame_id: str
    fingerprint: str
    members: tuple[ParameterSet, ...]  # sorted
    readings: tuple[dict[str, object], ...]  # reading-level invariants, by smallest member
    invariants: dict[str, object]  # class-level invariants (keys as zoo show prints them)
    seeds: tuple[SeedEntry, ...] = ()

    @property
    def rank(self) -> int:
        return int(self.id.rsplit("-", 1)[1])

    def as_dict(self) -> dict[str, object]:
        """A JSON-ready dict: id, label, area, members first, then every invariant."""
        return {
            "id": self.id,
            "label": self.label,
            "area": self.area,
            "members": [str(p) for p in self.members],
            "frame_id": self.frame_id,
            "fingerprint": self.fingerprint,
            **self.invariants,
            "readings": [dict(r) for r in self.readings],
            "seeds": [s.as_dict() for s in self.seeds],
        }


@dataclass(frozen=True)
class FrameEntry:
    """A frame: an isomorphism class of unmarked nets, with the classes that lie on it."""

    id: str
    label: str
    area: int
    fingerprint: str
    automorphisms: int
    lattice_key: tuple[int, int, int]
    class_ids: tuple[str, ...]

    def as_dict(self) -> dict[str, object]:
        return {
            "id": self.id,
            "label": self.label,
            "area": self.area,
            "fingerprint": self.fingerprint,
            "net_automorphisms": self.automorphisms,
            "lattice_key": list(self.lattice_key),
            "classes": list(self.class_ids),
        }


@dataclass(frozen=True)
class AreaStats:
    """Counts of one stored area."""

    area: int
    parameter_sets: int
    readings: int
    classes: int
    frames: int
    complete: bool = True
    seconds: float | None = None

    def as_dict(self) -> dict[str, object]:
        return {
            "area": self.area,
            "parameter_sets": self.parameter_sets,
            "readings": self.readings,
            "classes": self.classes,
            "frames": self.frames,
        }


@dataclass(frozen=True)
class FindResult:
    """The answer to a query: the matching classes and how far the catalog answers for."""

    query: str
    entries: tuple[ClassEntry, ...]
    total: int  # matches before --limit
    complete_to: int
    area_bound: int | None  # largest area the query can match, None if it leaves area open
    columns: tuple[dict[str, str | None], ...] = ()  # requested field values, per entry
    #: The catalog's URL, so that a suggested ``zoo build`` names it (None: the default one).
    location: str | None = None
    #: The requested fields per entry as typed values for machine formats (JSON, JSON Lines,
    #: CSV): class-level fields as their JSON value (int, bool, "num/den"), reading- and
    #: parameter-level fields as the sorted list of distinct values over the class's members.
    values: tuple[dict[str, object], ...] = ()
    #: Per entry, the readings (normal forms) holding a member that satisfies the query; empty
    #: when the query reads no reading or parameter-set field (every reading matches alike).
    matched: tuple[str | None, ...] = ()

    def cell(self, index: int, name: str) -> str:
        """The typed value of a requested field as CSV text (``column_cell``)."""
        return column_cell(self.values[index].get(name) if self.values else None)

    @property
    def reaches_beyond(self) -> bool:
        """Whether the query can match areas the catalog does not hold completely."""
        return self.area_bound is None or self.area_bound > self.complete_to

    def completeness_note(self) -> str:
        """The sentence every answer carries: complete up to which area, and any warning."""
        note = f"The catalog is complete up to area {self.complete_to}."
        if self.area_bound is not None and self.area_bound > self.complete_to:
            note += (
                f" Warning: the query reaches area {self.area_bound}; classes of areas "
                f"{self.complete_to + 1}..{self.area_bound} are missing "
                f"({extend_advice(self.area_bound, self.location)})."
            )
        elif self.area_bound is None:
            note += " The query does not bound the area; larger areas are not in the answer."
        return note


def column_cell(value: object) -> str:
    """A typed column value as CSV text, written as the dump writes it: true/false, whole
    numbers as digits, fractions as num/den, lists as compact JSON (``[1,2]``,
    ``[false,true]``), nothing for None."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, list):
        return json.dumps(value, separators=(",", ":"))
    return str(value)


def build_command(max_area: int, location: str | None = None) -> str:
    """The ``zoo build`` command that extends the catalog at ``location`` to ``max_area``.

    ``--db`` is named unless ``location`` is the catalog zoo opens anyway; the bound is capped
    at the build limit ``MAX_BUILD_AREA``.
    """
    db = "" if location is None else database.db_option(location)
    return f"zoo build --max-area {min(max_area, MAX_BUILD_AREA)}{db}"


def extend_advice(area: int, location: str | None = None) -> str:
    """``extend with: zoo build ...``, saying so when ``area`` is beyond the build limit."""
    advice = f"extend with: {build_command(area, location)}"
    if area > MAX_BUILD_AREA:
        advice += f"; areas above the build limit {MAX_BUILD_AREA:,} cannot be built"
    return advice


# --- the service ---------------------------------------------------------------------------


class Catalog:
    """An open catalog database (SQLite file or PostgreSQL URL); see the module docstring."""

    def __init__(self, engine: Engine, url: str, *, created: bool = False) -> None:
        self.engine = engine
        self.url = url
        #: Whether this open created the catalog (``create=True`` on a missing one).
        self.created = created

    # lifecycle

    @classmethod
    def open(cls, location: str | None = None, *, create: bool = False) -> Catalog:
        """Open the catalog at location (``--db`` value, else $ZOO_CATALOG, else the default).

        With ``create=True`` a missing catalog is created empty (schema by Alembic); without it
        a missing catalog is a ``CatalogError`` naming the build command. A catalog with an
        older schema is refused with the exact ``zoo migrate`` command.
        """
        url = database.resolve_location(location)
        if not database.catalog_exists(url):
            if not create:
                shown = database.display_location(url)
                raise CatalogError(
                    f"no catalog at {shown}; build one with: zoo build --max-area "
                    f"{DEFAULT_MAX_AREA} --db {shlex.quote(shown)}"
                )
            database.upgrade(url)
            created = True
        else:
            created = False
        engine = database.open_engine(url)
        try:
            database.require_current(engine)
        except CatalogError:
            engine.dispose()
            raise
        return cls(engine, url, created=created)

    def close(self) -> None:
        self.engine.dispose()

    def discard_if_unused(self) -> bool:
        """Remove the catalog file this open created when nothing was ever stored in it.

        A build that rejects its arguments calls this, so that ``zoo build --max-area 0
        --db new.db`` leaves no empty catalog behind. Only a SQLite file created by this very
        open, holding no area and no recorded encoding, is removed; True when it was.
        """
        if not self.created:
            return False
        file = database.sqlite_file(self.url)
        if file is None or self.complete_areas() or self.stats() or "encoding" in self.info():
            return False
        self.engine.dispose()
        for suffix in ("", "-wal", "-shm", "-journal"):
            Path(f"{file}{suffix}").unlink(missing_ok=True)
        self.created = False
        return True

    def __enter__(self) -> Catalog:
        return self

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        self.close()

    @property
    def location(self) -> str:
        """The catalog as the user named it: a file path or a URL without password."""
        return database.display_location(self.url)

    # completeness and facts

    def complete_areas(self) -> list[int]:
        with self.engine.connect() as connection:
            rows = connection.execute(
                select(AreaRecord.area)
                .where(AreaRecord.complete.is_(True))
                .order_by(AreaRecord.area)
            )
            return [row[0] for row in rows]

    def complete_to(self) -> int:
        """The largest N such that areas 1..N are all stored completely (0 when empty)."""
        return _complete_prefix(self.complete_areas())

    def info(self) -> dict[str, str]:
        """The catalog_info table: versions, encoding, creation time."""
        with self.engine.connect() as connection:
            rows = connection.execute(select(CatalogInfo.key, CatalogInfo.value))
            return {key: value for key, value in rows}

    # reading

    def stats(self) -> list[AreaStats]:
        """Counts per stored area, in increasing area."""
        with self.engine.connect() as connection:
            rows = connection.execute(select(_AREAS).order_by(AreaRecord.area))
            return [
                AreaStats(
                    r.area, r.parameter_sets, r.readings, r.classes, r.frames, r.complete, r.seconds
                )
                for r in rows
            ]

    def class_for_params(self, p: ParameterSet) -> ClassEntry | None:
        """The entry of the class holding p, or None when p's area is not stored."""
        with self.engine.connect() as connection:
            class_id = stored_class_id(connection, p)
            if class_id is None:
                return None
            return self._entries(connection, [class_id])[0]

    def class_id_for(self, p: ParameterSet) -> str | None:
        """The identifier of the class holding p, or None when p's area is not stored."""
        with self.engine.connect() as connection:
            return stored_class_id(connection, p)

    def class_for_fingerprint(self, fingerprint: str) -> ClassEntry | None:
        """The entry whose marked-net fingerprint (``v1:...``) is the given one, or None."""
        with self.engine.connect() as connection:
            row = connection.execute(
                select(ClassRecord.id).where(ClassRecord.fingerprint == fingerprint)
            ).first()
            return None if row is None else self._entries(connection, [row[0]])[0]

    def get(self, ref: str) -> ClassEntry:
        """The class named by an identifier (``CY16-3``), its label or any member parameter set.

        Raises NotInCatalog, explaining whether the area is not stored yet or the entry does
        not exist.
        """
        identifier = read_identifier(ref)
        if identifier is not None:
            if identifier.kind == "frame":
                raise NotInCatalog(
                    f"{identifier} is a frame identifier, not a class; ask for the frame with "
                    f"zoo show {identifier}, or for a class such as CY{identifier.area}-1"
                )
            with self.engine.connect() as connection:
                entries = self._entries(connection, [str(identifier)])
            if entries:
                return entries[0]
            raise self._missing(identifier)
        try:
            p = parse_params(ref)
        except ParameterError:
            raise NotInCatalog(
                f"{ref.strip()!r} is neither a catalog identifier (CY16-3, FR16-1) nor a "
                "parameter set (4,2,2,3 or C(4,2,2,3)); check the spelling"
            ) from None
        entry = self.class_for_params(p)
        if entry is None:
            raise self._missing_area(p.area, str(p))
        return entry

    def frame(self, frame_id: str) -> FrameEntry:
        """The frame named by an identifier (``FR16-1``) and the classes on it."""
        identifier = read_identifier(frame_id)
        if identifier is None or identifier.kind != "frame":
            raise NotInCatalog(
                f"{frame_id.strip()!r} is not a frame identifier; write FR{{area}}-{{rank}}, "
                "e.g. FR16-1"
            )
        with self.engine.connect() as connection:
            row = connection.execute(
                select(_FRAMES).where(FrameRecord.id == str(identifier))
            ).first()
            if row is None:
                raise self._missing(identifier)
            class_ids = [
                r[0]
                for r in connection.execute(
                    select(ClassRecord.id)
                    .where(ClassRecord.frame_id == row.id)
                    .order_by(ClassRecord.rank)
                )
            ]
        return FrameEntry(
            id=row.id,
            label=row.label,
            area=row.area,
            fingerprint=row.fingerprint,
            automorphisms=int(row.automorphisms),
            lattice_key=(row.area, row.lattice_g, row.lattice_r),
            class_ids=tuple(class_ids),
        )

    def seeds(self) -> list[SeedEntry]:
        """Every seed stored in the catalog, by name."""
        with self.engine.connect() as connection:
            rows = connection.execute(select(_SEEDS).order_by(SeedRecord.name))
            return [_seed_entry(r) for r in rows]

    def _missing(self, identifier: Identifier) -> NotInCatalog:
        complete = self.complete_to()
        if identifier.area > complete and identifier.area not in self.complete_areas():
            return self._missing_area(identifier.area, str(identifier))
        kind = "classes" if identifier.kind == "class" else "frames"
        table = _TABLES[kind]
        with self.engine.connect() as connection:
            count = connection.execute(
                select(func.count()).select_from(table).where(table.c.area == identifier.area)
            ).scalar_one()
        return NotInCatalog(
            f"{identifier} does not exist: area {identifier.area} has {count} {kind}, "
            f"ranked 1..{count}"
        )

    def _missing_area(self, area: int, what: str) -> NotInCatalog:
        complete = self.complete_to()
        return NotInCatalog(
            f"{what} has area {area}, beyond the catalog {self.location}, which is complete up "
            f"to area {complete}; {extend_advice(area, self.url).replace('with:', 'it with:')}"
        )

    # queries

    def find(
        self,
        query: str,
        sort: str | None = None,
        limit: int | None = None,
        *,
        seed: str | None = None,
        columns: Sequence[str] | None = None,
    ) -> FindResult:
        """The classes matching a query (zoo/query/parser.py syntax), sorted and limited.

        ``sort`` is a field name, ``-field`` for descending (default: area, then rank);
        ``seed`` keeps only classes with a seed whose name contains that text (any case);
        ``columns`` names fields whose values come back as display text in
        ``FindResult.columns`` and typed in ``FindResult.values``.
        """
        from zoo.query.parser import parse_query, referenced_area_bound

        if limit is not None and limit < 0:
            raise ParameterError(f"--limit must be zero or more, got {limit}")
        node = parse_query(query) if query.strip() else None
        ids, total = _query_class_ids(self.engine, node, sort, limit, seed)
        values = _column_values(self.engine, ids, columns or ())
        typed = _typed_column_values(self.engine, ids, columns or ())
        matched = _matched_readings(self.engine, ids, node)
        with self.engine.connect() as connection:
            entries = self._entries(connection, ids)
        return FindResult(
            query=query,
            entries=tuple(entries),
            total=total,
            complete_to=self.complete_to(),
            area_bound=None if node is None else referenced_area_bound(node),
            columns=tuple(values.get(e.id, {}) for e in entries),
            location=self.url,
            values=tuple(typed.get(e.id, {}) for e in entries),
            matched=tuple(matched[e.id] for e in entries) if matched else (),
        )

    def completeness_note(self, query: str) -> str:
        """The completeness sentence of ``FindResult`` for a query, without running it."""
        from zoo.query.parser import parse_query, referenced_area_bound

        bound = referenced_area_bound(parse_query(query)) if query.strip() else None
        result = FindResult(query, (), 0, self.complete_to(), bound, location=self.url)
        return result.completeness_note()

    def count(self, query: str, *, seed: str | None = None) -> int:
        """How many classes match a query."""
        from zoo.query.parser import parse_query

        node = parse_query(query) if query.strip() else None
        return _query_count(self.engine, node, seed)

    def iter_entries(
        self, areas: Iterable[int] | None = None, *, batch_size: int = 500
    ) -> Iterator[ClassEntry]:
        """Every stored class (or those of the given areas), by area, then rank, streamed.

        Entries are loaded ``batch_size`` at a time (by keyset on the unique (area, rank), each
        batch on its own connection), so memory holds one batch however large the catalog, and
        no read transaction stays open while the caller works. An area that is not stored
        yields nothing; ``complete_areas()`` says which are.
        """
        if isinstance(batch_size, bool) or not isinstance(batch_size, int) or batch_size < 1:
            raise ParameterError(f"batch_size must be a positive whole number, got {batch_size!r}")
        classes = _CLASSES
        for area in [None] if areas is None else areas:
            after = (0, 0)  # (area, rank) of the last entry yielded; ranks start at 1
            while True:
                statement = select(classes.c.id, classes.c.area, classes.c.rank).where(
                    # (area, rank) > after, written so that an index on (area, rank) serves it
                    classes.c.area >= after[0],
                    or_(classes.c.area > after[0], classes.c.rank > after[1]),
                )
                if area is not None:
                    statement = statement.where(classes.c.area == area)
                statement = statement.order_by(classes.c.area, classes.c.rank).limit(batch_size)
                with self.engine.connect() as connection:
                    rows = connection.execute(statement).all()
                    entries = self._entries(connection, [row.id for row in rows])
                yield from entries
                if len(rows) < batch_size:
                    break
                after = (rows[-1].area, rows[-1].rank)

    def _entries(self, connection: Connection, ids: Sequence[str]) -> list[ClassEntry]:
        """Load whole entries for class ids, in the order given (missing ids are skipped)."""
        if not ids:
            return []
        classes: dict[str, Any] = {}
        readings: dict[str, list[Any]] = {}
        members_of_reading: dict[int, list[tuple[int, int, int, int]]] = {}
        seeds: dict[str, list[SeedEntry]] = {}
        for chunk in _chunks(list(ids)):
            for row in connection.execute(
                select(_CLASSES, _FRAMES.c.automorphisms.label("net_automorphisms"))
                .join(_FRAMES, _FRAMES.c.id == _CLASSES.c.frame_id)
                .where(_CLASSES.c.id.in_(chunk))
            ):
                classes[row.id] = row
            for row in connection.execute(
                select(_READINGS)
                .where(ReadingRecord.class_id.in_(chunk))
                .order_by(ReadingRecord.id)
            ):
                readings.setdefault(row.class_id, []).append(row)
            for alpha, beta, gamma, delta, reading_id in connection.execute(
                select(
                    ParameterSetRecord.alpha,
                    ParameterSetRecord.beta,
                    ParameterSetRecord.gamma,
                    ParameterSetRecord.delta,
                    ParameterSetRecord.reading_id,
                ).where(ParameterSetRecord.class_id.in_(chunk))
            ):
                members_of_reading.setdefault(reading_id, []).append((alpha, beta, gamma, delta))
            for row in connection.execute(select(_SEEDS).where(SeedRecord.class_id.in_(chunk))):
                seeds.setdefault(row.class_id, []).append(_seed_entry(row))
        entries: list[ClassEntry] = []
        for class_id in ids:
            class_row = classes.get(class_id)
            if class_row is None:
                continue
            row = class_row
            ordered: list[tuple[tuple[int, int, int, int], dict[str, object]]] = []
            members: list[ParameterSet] = []
            for reading in readings.get(class_id, []):
                values = sorted(members_of_reading.get(reading.id, []))
                reading_members = [ParameterSet(*v) for v in values]
                members.extend(reading_members)
                first = values[0] if values else (MAX_AREA, 0, 0, 0)
                ordered.append((first, _reading_dict(reading, reading_members)))
            ordered.sort(key=lambda pair: pair[0])
            reading_dicts = [d for _, d in ordered]
            entries.append(
                ClassEntry(
                    id=row.id,
                    label=row.label,
                    area=row.area,
                    frame_id=row.frame_id,
                    fingerprint=row.fingerprint,
                    members=tuple(sorted(members)),
                    readings=tuple(reading_dicts),
                    invariants=_class_invariants(row),
                    seeds=tuple(sorted(seeds.get(class_id, []), key=lambda s: s.name)),
                )
            )
        return entries


def describe_location(location: str | None = None) -> tuple[str, bool]:
    """How the catalog at ``location`` (``--db``, else $ZOO_CATALOG, else the default file) is
    named to the user, and whether a catalog exists there; creates nothing but its folder."""
    url = database.resolve_location(location)
    return database.display_location(url), database.catalog_exists(url)


def migrate_catalog(location: str | None = None) -> tuple[str, str | None, str | None]:
    """Create or upgrade the schema of the catalog at ``location``: (name, revision before,
    revision after); no data is lost (``zoo migrate``)."""
    url = database.resolve_location(location)
    change = database.upgrade(url)
    return database.display_location(url), change.before, change.after


# --- module-level helpers ------------------------------------------------------------------


def lookup_class_id(p: ParameterSet, location: str | None = None) -> str | None:
    """The identifier of p's class in the catalog at location, or None; never builds.

    None when no catalog exists there or it does not hold p's area. A catalog with an outdated
    schema raises CatalogError naming ``zoo migrate``.
    """
    url = database.resolve_location(location)
    if not database.catalog_exists(url):
        return None
    engine = database.open_engine(url)
    try:
        database.require_current(engine)
        with engine.connect() as connection:
            return stored_class_id(connection, p)
    finally:
        engine.dispose()


def stored_class_id(connection: Connection, p: ParameterSet) -> str | None:
    """The identifier of p's class over an open connection, None when p's area is not stored.

    The one query from a parameter set to its class; a build calls it inside its own write
    transaction (``zoo.catalog.build``), where a fresh connection would not see the area yet.
    """
    row = connection.execute(
        select(ParameterSetRecord.class_id).where(
            and_(
                ParameterSetRecord.alpha == p.alpha,
                ParameterSetRecord.beta == p.beta,
                ParameterSetRecord.gamma == p.gamma,
                ParameterSetRecord.delta == p.delta,
            )
        )
    ).first()
    return None if row is None else str(row[0])


def _complete_prefix(areas: Iterable[int]) -> int:
    stored = set(areas)
    n = 0
    while n + 1 in stored:
        n += 1
    return n


def _fraction_text(numerator: int, denominator: int) -> str:
    value = Fraction(numerator, denominator)
    return f"{value.numerator}/{value.denominator}"


def _class_invariants(row: Any) -> dict[str, object]:
    cycle_time = Fraction(row.cycle_time_num, row.cycle_time_den)
    return {
        "loop": row.loop,
        "states": int(row.states),
        "state_arcs": int(row.state_arcs),
        "automorphisms": int(row.automorphisms),
        "net_automorphisms": int(row.net_automorphisms),
        "tokens": row.tokens,
        "enabled": row.enabled,
        "semi_enabled": row.semi_enabled,
        "cycle_time": _fraction_text(row.cycle_time_num, row.cycle_time_den),
        "cycle_time_float": float(cycle_time),
        "group": [row.group_d1, row.area // row.group_d1],
        "cyclic": row.group_d1 == 1,
        "iteration": row.iteration,
        "reading_count": row.reading_count,
        "member_count": row.member_count,
    }


def _reading_dict(row: Any, members: list[ParameterSet]) -> dict[str, object]:
    slowness = Fraction(row.slowness_num, row.slowness_den)
    return {
        "label": str(members[0]) if members else "",
        "alpha": row.alpha,
        "beta": row.beta,
        "tokens_forward": row.beta,
        "tokens_backward": row.alpha,
        "lattice_key": [row.area, row.lattice_g, row.lattice_r],
        "processes": row.processes,
        "regular": bool(row.regular),
        "slowness": _fraction_text(row.slowness_num, row.slowness_den),
        "slowness_float": float(slowness),
        "forward_cycles": {
            "count": row.forward_count,
            "length": row.forward_length,
            "tokens": row.forward_tokens,
        },
        "backward_cycles": {
            "count": row.backward_count,
            "length": row.backward_length,
            "tokens": row.backward_tokens,
        },
        "normal_form_beta_delta": row.nf_beta_delta,
        "normal_form_alpha_gamma": row.nf_alpha_gamma,
        "members": [str(p) for p in members],
    }


def _seed_entry(row: Any) -> SeedEntry:
    return SeedEntry(
        name=row.name,
        description=row.description,
        params=ParameterSet(row.alpha, row.beta, row.gamma, row.delta),
        class_id=row.class_id,
    )


def _chunks(values: list[str]) -> Iterator[list[str]]:
    for start in range(0, len(values), _CHUNK):
        yield values[start : start + _CHUNK]


# --- queries (through zoo.storage.querysql) ------------------------------------------------


def _matching_statement(node: Any, seed: str | None) -> Any:
    """``SELECT classes.id`` of the classes matching a query tree and a seed-name filter."""
    from zoo.storage.querysql import compile_query

    classes = _CLASSES
    statement = compile_query(node) if node is not None else select(classes.c.id)
    if seed is not None:
        seeds = _SEEDS
        needle = seed.strip().lower()
        statement = statement.where(
            classes.c.id.in_(
                select(seeds.c.class_id).where(
                    seeds.c.class_id.is_not(None), func.lower(seeds.c.name).contains(needle)
                )
            )
        )
    return statement


def _query_class_ids(
    engine: Engine, node: Any, sort: str | None, limit: int | None, seed: str | None
) -> tuple[list[str], int]:
    from zoo.storage.querysql import sort_clause

    classes = _CLASSES
    statement = _matching_statement(node, seed)
    order = sort_clause(sort) if sort else (classes.c.area.asc(), classes.c.rank.asc())
    with engine.connect() as connection:
        if limit is None:
            ids = [row[0] for row in connection.execute(statement.order_by(*order))]
            return ids, len(ids)
        if limit == 0:
            total = connection.execute(
                select(func.count()).select_from(statement.subquery())
            ).scalar_one()
            return [], int(total)
        # One pass: the window count is taken over every match before LIMIT applies.
        rows = connection.execute(
            statement.add_columns(func.count().over().label("total")).order_by(*order).limit(limit)
        ).all()
        return [row[0] for row in rows], int(rows[0][1]) if rows else 0


def _query_count(engine: Engine, node: Any, seed: str | None) -> int:
    statement = _matching_statement(node, seed)
    with engine.connect() as connection:
        return int(
            connection.execute(select(func.count()).select_from(statement.subquery())).scalar_one()
        )


def _matched_readings(engine: Engine, ids: Sequence[str], node: Any) -> dict[str, str | None]:
    """Per class, the readings that made it match (querysql.matched_readings_clause), or {}."""
    from zoo.storage.querysql import matched_readings_clause

    clause = None if node is None else matched_readings_clause(node)
    if clause is None or not ids:
        return {}
    found: dict[str, str | None] = {}
    with engine.connect() as connection:
        for chunk in _chunks(list(ids)):
            rows = connection.execute(select(_CLASSES.c.id, clause).where(_CLASSES.c.id.in_(chunk)))
            found.update({row[0]: row[1] for row in rows})
    return found


def _column_values(
    engine: Engine, ids: Sequence[str], columns: Sequence[str]
) -> dict[str, dict[str, str | None]]:
    """The requested fields of each class as text (``3``, ``1/3``, ``yes``, ``1..2``)."""
    from zoo.query.parser import parse_field_names
    from zoo.storage.querysql import column_clauses

    names: list[str] = []
    for column in columns:
        names.extend(parse_field_names(column))
    classes = _CLASSES
    values: dict[str, dict[str, str | None]] = {}
    if not ids or not names:
        return {class_id: {} for class_id in ids}
    labels = column_clauses(names)
    with engine.connect() as connection:
        for chunk in _chunks(list(ids)):
            for row in connection.execute(
                select(classes.c.id, *labels).where(classes.c.id.in_(chunk))
            ):
                mapping = row._mapping
                values[row.id] = {label.name: mapping[label.name] for label in labels}
    return values


def _typed_value(field: Any, raw: Sequence[Any]) -> object:
    """A stored field value (its columns, in ``Field.columns`` order) as its JSON value."""
    from zoo.query.fields import FieldType

    if raw[0] is None:
        return None
    if field.type is FieldType.BOOLEAN:
        return bool(raw[0])
    if field.type is FieldType.FRACTION:
        return _fraction_text(raw[0], raw[1])
    return int(raw[0])  # INTEGER, and BIG_INTEGER from its exact decimal text


def _sort_key(field: Any, value: object) -> Any:
    from zoo.query.fields import FieldType

    if field.type is FieldType.FRACTION and isinstance(value, str):
        return Fraction(value)
    return value


def _typed_column_values(
    engine: Engine, ids: Sequence[str], columns: Sequence[str]
) -> dict[str, dict[str, object]]:
    """The requested fields of each class as typed values (see ``FindResult.values``).

    Class-level fields give one value; reading- and parameter-level fields give every distinct
    value over the class's readings or parameter sets, sorted, always as a list (even of one),
    so that a reader of JSON sees one type per column.
    """
    from zoo.query.fields import require_field
    from zoo.query.parser import parse_field_names

    names: list[str] = []
    for column in columns:
        names.extend(n for n in parse_field_names(column) if n not in names)
    result: dict[str, dict[str, object]] = {class_id: {} for class_id in ids}
    if not ids or not names:
        return result
    with engine.connect() as connection:
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
                for row in connection.execute(statement.where(owner.in_(chunk))):
                    value = _typed_value(field, tuple(row)[1:])
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
