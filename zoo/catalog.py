"""The catalog service: build, query and read the stored catalog of cycloid classes.

This is the Python API that the command line (``zoo/cli/catalog.py``), ``zoo show`` and
``zoo identify`` use (docs/architecture.md, "The catalog service")::

    from zoo.catalog import Catalog
    with Catalog.open("catalog.sqlite3", create=True) as catalog:
        catalog.build(40)
        result = catalog.find("processes = 3 and area < 30", sort="loop", limit=5)
        entry = catalog.get("CY16-3")          # or a label / any member: "C(4,2,2,3)"

A build classifies one area at a time (``zoo.classify``, in worker processes when ``jobs`` > 1)
and writes each area in one transaction together with its row in ``areas``; the writer is this
process alone. So an interrupted build leaves complete areas only, the next build resumes with
the first missing area, and building further never touches an area already stored: identifiers
never change (design.md §2).
"""

from __future__ import annotations

import multiprocessing
import os
import time
from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from fractions import Fraction
from types import TracebackType
from typing import Any, Protocol

from sqlalchemy import Engine, Table, and_, delete, func, inspect, select, update
from sqlalchemy.engine import Connection
from sqlalchemy.exc import IntegrityError, OperationalError

from zoo import __version__
from zoo.classify import AreaClassification, ClassSummary, classify_area
from zoo.enumeration import parameter_set_count
from zoo.errors import CatalogError, NotInCatalog, ParameterError
from zoo.identifiers import Identifier, read_identifier
from zoo.params import MAX_AREA, ParameterSet, parse_params
from zoo.seeds import Seed, load_seed_directory
from zoo.storage import database
from zoo.storage.models import (
    AreaRecord,
    CatalogInfo,
    ClassRecord,
    FrameRecord,
    ParameterSetRecord,
    ReadingRecord,
    SeedRecord,
    sortable_key,
)

__all__ = [
    "DEFAULT_MAX_AREA",
    "AreaStats",
    "BuildProgress",
    "BuildReport",
    "Catalog",
    "ClassEntry",
    "FindResult",
    "FrameEntry",
    "SeedEntry",
    "ensure_catalog",
    "lookup_class_id",
]

#: The area up to which ``zoo find`` builds a catalog when none exists yet (issue 3).
DEFAULT_MAX_AREA = 100
#: Readings get the explicit id area * READING_ID_STRIDE + index, so that the same build gives
#: the same ids whatever was interrupted before (PostgreSQL sequences do not roll back).
READING_ID_STRIDE = 100_000
#: Largest area a build accepts: beyond it a full enumeration is hours of nauty work.
MAX_BUILD_AREA = 2_000
_CHUNK = 900  # bound parameters per IN (...) list, below SQLite's historical limit of 999


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
    """A catalog entry: an isomorphism class of marked nets, places untyped (design.md §1)."""

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
                f"(extend with: zoo build --max-area {self.area_bound})."
            )
        elif self.area_bound is None:
            note += " The query does not bound the area; larger areas are not in the answer."
        return note


@dataclass(frozen=True)
class BuildReport:
    """What a build did: the areas it added and where the time went."""

    added: tuple[int, ...]
    complete_to: int
    parameter_sets: int
    readings: int
    classes: int
    frames: int
    canonical_forms: int
    wall_seconds: float
    stage_seconds: dict[str, float] = field(default_factory=dict)
    jobs: int = 1
    seeds: int = 0


class BuildProgress(Protocol):
    """Receives the progress of a build (the CLI draws a progress bar)."""

    def started(self, areas: Sequence[int], parameter_sets: int) -> None:
        """The build will classify these areas holding this many parameter sets in total."""

    def area_done(self, stats: AreaStats) -> None:
        """One area was stored."""

    def finished(self, report: BuildReport) -> None:
        """The build ended normally."""


# --- the service ---------------------------------------------------------------------------


class Catalog:
    """An open catalog database (SQLite file or PostgreSQL URL); see the module docstring."""

    def __init__(self, engine: Engine, url: str) -> None:
        self.engine = engine
        self.url = url
        columns = inspect(engine).get_columns("frames")
        self._frame_class_count = any(c["name"] == "class_count" for c in columns)

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
                    f"{DEFAULT_MAX_AREA} --db {shown}"
                )
            database.upgrade(url)
        engine = database.open_engine(url)
        try:
            database.require_current(engine)
        except CatalogError:
            engine.dispose()
            raise
        return cls(engine, url)

    def close(self) -> None:
        self.engine.dispose()

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
                select(AreaRecord.area).where(AreaRecord.complete.is_(True)).order_by(
                    AreaRecord.area
                )
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

    # build

    def build(
        self,
        max_area: int,
        jobs: int = 1,
        progress: BuildProgress | None = None,
        *,
        seeds: Sequence[Seed] | None = None,
    ) -> BuildReport:
        """Store every area 1..max_area that is not stored yet; one transaction per area.

        ``jobs`` worker processes classify areas (nauty included); this process writes them in
        increasing order. Areas already complete are never rewritten. ``seeds`` defaults to the
        shipped seeds_data/; each is attached to its class when its area is stored. Raises
        ``CatalogError`` (nothing stored for the failing area) when the classification and
        nauty disagree.
        """
        started = time.perf_counter()
        if isinstance(max_area, bool) or not isinstance(max_area, int) or max_area < 1:
            raise ParameterError(f"--max-area must be a positive whole number, got {max_area!r}")
        if max_area > MAX_BUILD_AREA:
            raise ParameterError(
                f"--max-area {max_area} is above the build limit {MAX_BUILD_AREA}; a full "
                "enumeration that large takes days of nauty work, choose a smaller bound"
            )
        jobs = max(1, int(jobs))
        seed_list = list(load_seed_directory() if seeds is None else seeds)
        self._record_encoding()
        done = set(self.complete_areas())
        todo = [a for a in range(1, max_area + 1) if a not in done]
        self._sync_seeds(seed_list)
        stage = {"classify_algebra": 0.0, "classify_canonical": 0.0, "write": 0.0}
        totals = {"parameter_sets": 0, "readings": 0, "classes": 0, "frames": 0, "forms": 0}
        added: list[int] = []
        if progress is not None:
            progress.started(todo, sum(parameter_set_count(a) for a in todo))
        seeds_by_area: dict[int, list[Seed]] = {}
        for seed in seed_list:
            seeds_by_area.setdefault(seed.params.area, []).append(seed)
        for result in _iter_classified(todo, jobs):
            write_started = time.perf_counter()
            wrote = self._write_area(result, seeds_by_area.get(result.area, []))
            write_seconds = time.perf_counter() - write_started
            stage["classify_algebra"] += result.seconds.get("algebra", 0.0)
            stage["classify_canonical"] += result.seconds.get("canonical", 0.0)
            stage["write"] += write_seconds
            if not wrote:
                continue  # a concurrent build stored it first
            added.append(result.area)
            totals["parameter_sets"] += result.parameter_set_count
            totals["readings"] += result.reading_count
            totals["classes"] += len(result.classes)
            totals["frames"] += len(result.frames)
            totals["forms"] += result.canonical_forms
            if progress is not None:
                progress.area_done(
                    AreaStats(
                        result.area,
                        result.parameter_set_count,
                        result.reading_count,
                        len(result.classes),
                        len(result.frames),
                    )
                )
        report = BuildReport(
            added=tuple(added),
            complete_to=self.complete_to(),
            parameter_sets=totals["parameter_sets"],
            readings=totals["readings"],
            classes=totals["classes"],
            frames=totals["frames"],
            canonical_forms=totals["forms"],
            wall_seconds=time.perf_counter() - started,
            stage_seconds=stage,
            jobs=jobs,
            seeds=len(seed_list),
        )
        if progress is not None:
            progress.finished(report)
        return report

    def _record_encoding(self) -> None:
        """Record the fingerprint encoding; refuse to mix encodings in one catalog."""
        from zoo.canonical import ENCODING_VERSION

        with self.engine.begin() as connection:
            row = connection.execute(
                select(CatalogInfo.value).where(CatalogInfo.key == "encoding")
            ).first()
            if row is None:
                connection.execute(
                    _table(CatalogInfo).insert(), [{"key": "encoding", "value": ENCODING_VERSION}]
                )
            elif row[0] != ENCODING_VERSION:
                raise CatalogError(
                    f"catalog {self.location} holds fingerprints of encoding {row[0]}, this zoo "
                    f"computes {ENCODING_VERSION}; build a new catalog with --db NEW_FILE "
                    "(mixing encodings would make fingerprints incomparable)"
                )
            _put_info(connection, "built_by", __version__)

    def _sync_seeds(self, seeds: Sequence[Seed]) -> None:
        """Make the seeds table equal to the seed files, linking seeds of stored areas."""
        table = _table(SeedRecord)
        wanted = {s.name: s for s in seeds}
        with self.engine.begin() as connection:
            stored = {row.name: row for row in connection.execute(select(table))}
            gone = sorted(set(stored) - set(wanted))
            if gone:
                connection.execute(delete(table).where(table.c.name.in_(gone)))
            for name, seed in wanted.items():
                class_id = _class_id_of(connection, seed.params)
                values = {
                    "name": name,
                    "description": seed.description,
                    "alpha": seed.params.alpha,
                    "beta": seed.params.beta,
                    "gamma": seed.params.gamma,
                    "delta": seed.params.delta,
                    "class_id": class_id,
                }
                old = stored.get(name)
                if old is None:
                    connection.execute(table.insert(), [values])
                elif any(getattr(old, k) != v for k, v in values.items()):
                    connection.execute(update(table).where(table.c.name == name).values(**values))

    def _write_area(self, result: AreaClassification, seeds: Sequence[Seed]) -> bool:
        """Store one area in one transaction; False if it was already complete."""
        started = time.perf_counter()
        area = result.area
        try:
            with self.engine.begin() as connection:
                row = connection.execute(
                    select(AreaRecord.complete).where(AreaRecord.area == area)
                ).first()
                if row is not None and row[0]:
                    return False
                if row is not None:  # an incomplete leftover: replace it whole
                    _delete_area(connection, area)
                self._insert_area_rows(connection, result)
                for seed in seeds:
                    connection.execute(
                        update(_table(SeedRecord))
                        .where(_table(SeedRecord).c.name == seed.name)
                        .values(class_id=_class_id_of(connection, seed.params))
                    )
                connection.execute(
                    _table(AreaRecord).insert(),
                    [
                        {
                            "area": area,
                            "complete": True,
                            "parameter_sets": result.parameter_set_count,
                            "readings": result.reading_count,
                            "classes": len(result.classes),
                            "frames": len(result.frames),
                            "built_at": datetime.now(UTC),
                            "seconds": sum(result.seconds.values())
                            + (time.perf_counter() - started),
                        }
                    ],
                )
        except (IntegrityError, OperationalError) as exc:
            # Another build may have stored this area meanwhile; anything else is an error.
            if area in self.complete_areas():
                return False
            reason = str(getattr(exc, "orig", exc)).strip().splitlines()[0]
            raise CatalogError(
                f"cannot store area {area} in catalog {self.location}: {reason}; nothing of "
                "this area was stored (if another build writes the same catalog, run one at a "
                "time, then build again to resume)"
            ) from None
        return True

    def _insert_area_rows(self, connection: Connection, result: AreaClassification) -> None:
        frames = []
        for frame in result.frames:
            row: dict[str, object] = {
                "id": frame.id,
                "area": frame.area,
                "rank": frame.rank,
                "label": str(frame.label),
                "fingerprint": frame.fingerprint,
                "automorphisms": str(frame.automorphisms),
                "automorphisms_key": sortable_key(frame.automorphisms),
                "lattice_g": frame.lattice_g,
                "lattice_r": frame.lattice_r,
            }
            if self._frame_class_count:
                row["class_count"] = len(frame.class_ids)
            frames.append(row)
        classes = [_class_row(c) for c in result.classes]
        readings: list[dict[str, object]] = []
        parameter_sets: list[dict[str, object]] = []
        index = 0
        for summary in result.classes:
            for reading in summary.readings:
                index += 1
                if index >= READING_ID_STRIDE:
                    raise CatalogError(
                        f"area {result.area} has more than {READING_ID_STRIDE - 1} readings, "
                        "more than the reading ids of this schema allow"
                    )
                reading_id = result.area * READING_ID_STRIDE + index
                readings.append(
                    {
                        "id": reading_id,
                        "class_id": summary.id,
                        "area": result.area,
                        "alpha": reading.alpha,
                        "beta": reading.beta,
                        "lattice_g": reading.lattice_g,
                        "lattice_r": reading.lattice_r,
                        "processes": reading.processes,
                        "regular": reading.regular,
                        "slowness_num": reading.slowness.numerator,
                        "slowness_den": reading.slowness.denominator,
                        "forward_count": reading.forward.count,
                        "forward_length": reading.forward.length,
                        "forward_tokens": reading.forward.tokens,
                        "backward_count": reading.backward.count,
                        "backward_length": reading.backward.length,
                        "backward_tokens": reading.backward.tokens,
                        "nf_beta_delta": str(reading.nf_beta_delta),
                        "nf_alpha_gamma": str(reading.nf_alpha_gamma),
                    }
                )
                parameter_sets.extend(
                    {
                        "alpha": p.alpha,
                        "beta": p.beta,
                        "gamma": p.gamma,
                        "delta": p.delta,
                        "area": result.area,
                        "reading_id": reading_id,
                        "class_id": summary.id,
                    }
                    for p in reading.members
                )
        for model, rows in (
            (FrameRecord, frames),
            (ClassRecord, classes),
            (ReadingRecord, readings),
            (ParameterSetRecord, parameter_sets),
        ):
            _bulk_insert(connection, _table(model), rows)

    # reading

    def stats(self) -> list[AreaStats]:
        """Counts per stored area, in increasing area."""
        with self.engine.connect() as connection:
            rows = connection.execute(select(_table(AreaRecord)).order_by(AreaRecord.area))
            return [
                AreaStats(
                    r.area, r.parameter_sets, r.readings, r.classes, r.frames, r.complete, r.seconds
                )
                for r in rows
            ]

    def class_for_params(self, p: ParameterSet) -> ClassEntry | None:
        """The entry of the class holding p, or None when p's area is not stored."""
        with self.engine.connect() as connection:
            class_id = _class_id_of(connection, p)
            if class_id is None:
                return None
            return self._entries(connection, [class_id])[0]

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
                select(_table(FrameRecord)).where(FrameRecord.id == str(identifier))
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
            rows = connection.execute(select(_table(SeedRecord)).order_by(SeedRecord.name))
            return [_seed_entry(r) for r in rows]

    def _missing(self, identifier: Identifier) -> NotInCatalog:
        complete = self.complete_to()
        if identifier.area > complete and identifier.area not in self.complete_areas():
            return self._missing_area(identifier.area, str(identifier))
        table = ClassRecord if identifier.kind == "class" else FrameRecord
        with self.engine.connect() as connection:
            count = connection.execute(
                select(func.count()).select_from(_table(table)).where(
                    _table(table).c.area == identifier.area
                )
            ).scalar_one()
        kind = "classes" if identifier.kind == "class" else "frames"
        return NotInCatalog(
            f"{identifier} does not exist: area {identifier.area} has {count} {kind}, "
            f"ranked 1..{count}"
        )

    def _missing_area(self, area: int, what: str) -> NotInCatalog:
        complete = self.complete_to()
        return NotInCatalog(
            f"{what} has area {area}, beyond the catalog {self.location}, which is complete up "
            f"to area {complete}; extend it with: zoo build --max-area {area}"
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
        """The classes matching a query (zoo/query.py syntax), sorted and limited.

        ``sort`` is a field name, ``-field`` for descending (default: area, then rank);
        ``seed`` keeps only classes with a seed whose name contains that text (any case);
        ``columns`` names fields whose values (as text) come back in ``FindResult.columns``.
        """
        from zoo.query import parse_query, referenced_area_bound

        if limit is not None and limit < 0:
            raise ParameterError(f"--limit must be zero or more, got {limit}")
        node = parse_query(query) if query.strip() else None
        ids, total = _query_class_ids(self.engine, node, sort, limit, seed)
        values = _column_values(self.engine, ids, columns or ())
        with self.engine.connect() as connection:
            entries = self._entries(connection, ids)
        return FindResult(
            query=query,
            entries=tuple(entries),
            total=total,
            complete_to=self.complete_to(),
            area_bound=None if node is None else referenced_area_bound(node),
            columns=tuple(values.get(e.id, {}) for e in entries),
        )

    def count(self, query: str, *, seed: str | None = None) -> int:
        """How many classes match a query."""
        from zoo.query import parse_query

        node = parse_query(query) if query.strip() else None
        return _query_count(self.engine, node, seed)

    def _entries(self, connection: Connection, ids: Sequence[str]) -> list[ClassEntry]:
        """Load whole entries for class ids, in the order given (missing ids are skipped)."""
        if not ids:
            return []
        classes: dict[str, Any] = {}
        readings: dict[str, list[Any]] = {}
        members_of_reading: dict[int, list[tuple[int, int, int, int]]] = {}
        seeds: dict[str, list[SeedEntry]] = {}
        class_table = _table(ClassRecord)
        frame_table = _table(FrameRecord)
        for chunk in _chunks(list(ids)):
            for row in connection.execute(
                select(class_table, frame_table.c.automorphisms.label("net_automorphisms"))
                .join(frame_table, frame_table.c.id == class_table.c.frame_id)
                .where(class_table.c.id.in_(chunk))
            ):
                classes[row.id] = row
            for row in connection.execute(
                select(_table(ReadingRecord))
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
            for row in connection.execute(
                select(_table(SeedRecord)).where(SeedRecord.class_id.in_(chunk))
            ):
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
            return _class_id_of(connection, p)
    finally:
        engine.dispose()


def ensure_catalog(
    location: str | None = None,
    *,
    max_area: int | None = None,
    jobs: int | None = None,
    progress: BuildProgress | None = None,
) -> tuple[Catalog, BuildReport | None]:
    """Open the catalog at location; when none exists yet, create and build it to max_area.

    ``max_area`` defaults to ``DEFAULT_MAX_AREA`` (read at call time).

    This is what makes ``zoo find`` work right after installation. An existing catalog is
    never extended here (that is ``zoo build``'s decision).
    """
    url = database.resolve_location(location)
    if database.catalog_exists(url):
        catalog = Catalog.open(location)
        if catalog.complete_areas() or catalog.info().get("encoding"):
            return catalog, None
    else:
        catalog = Catalog.open(location, create=True)
    try:
        bound = DEFAULT_MAX_AREA if max_area is None else max_area
        report = catalog.build(bound, jobs=jobs or default_jobs(), progress=progress)
    except BaseException:
        catalog.close()
        raise
    return catalog, report


def default_jobs() -> int:
    """Worker processes for a build: the usable cores, at most 4 (the writer is one more)."""
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:  # pragma: no cover - not Linux
        cores = os.cpu_count() or 1
    return max(1, min(4, cores))


def _complete_prefix(areas: Iterable[int]) -> int:
    stored = set(areas)
    n = 0
    while n + 1 in stored:
        n += 1
    return n


def _iter_classified(areas: Sequence[int], jobs: int) -> Iterator[AreaClassification]:
    """Classify areas in order, in ``jobs`` worker processes when that helps."""
    if jobs <= 1 or len(areas) <= 1:
        for area in areas:
            yield classify_area(area)
        return
    methods = multiprocessing.get_all_start_methods()
    context = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
    # Largest areas cost most: keep the pool busy with them while small ones stream through.
    pool = context.Pool(processes=min(jobs, len(areas)))
    try:
        yield from pool.imap(classify_area, areas, chunksize=1)
        pool.close()
    finally:
        pool.terminate()
        pool.join()


def _table(model: type[Any]) -> Table:
    table = model.__table__
    assert isinstance(table, Table)
    return table


def _bulk_insert(connection: Connection, table: Table, rows: list[dict[str, object]]) -> None:
    """Insert many rows of the same keys; on SQLite straight through the driver's executemany.

    Profiling the build showed SQLAlchemy's per-row parameter processing as most of the
    writer's time on SQLite; the values here are plain ints, strings, bools and datetimes that
    sqlite3 binds directly. Other databases take the ordinary SQLAlchemy path.
    """
    if not rows:
        return
    if connection.dialect.name != "sqlite":
        connection.execute(table.insert(), rows)
        return
    keys = list(rows[0])
    columns = ", ".join(f'"{key}"' for key in keys)
    marks = ", ".join("?" for _ in keys)
    connection.exec_driver_sql(
        f'INSERT INTO "{table.name}" ({columns}) VALUES ({marks})',
        [tuple(row[key] for key in keys) for row in rows],
    )


def _put_info(connection: Connection, key: str, value: str) -> None:
    table = _table(CatalogInfo)
    if connection.execute(select(table.c.key).where(table.c.key == key)).first() is None:
        connection.execute(table.insert(), [{"key": key, "value": value}])
    else:
        connection.execute(update(table).where(table.c.key == key).values(value=value))


def _delete_area(connection: Connection, area: int) -> None:
    seeds = _table(SeedRecord)
    classes = _table(ClassRecord)
    connection.execute(
        update(seeds)
        .where(seeds.c.class_id.in_(select(classes.c.id).where(classes.c.area == area)))
        .values(class_id=None)
    )
    for model in (ParameterSetRecord, ReadingRecord, ClassRecord, FrameRecord, AreaRecord):
        table = _table(model)
        connection.execute(delete(table).where(table.c.area == area))


def _class_id_of(connection: Connection, p: ParameterSet) -> str | None:
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


def _class_row(c: ClassSummary) -> dict[str, object]:
    label = c.label
    return {
        "id": c.id,
        "area": c.area,
        "rank": c.rank,
        "label": str(label),
        "label_alpha": label.alpha,
        "label_beta": label.beta,
        "label_gamma": label.gamma,
        "label_delta": label.delta,
        "frame_id": c.frame_id,
        "fingerprint": c.fingerprint,
        "loop": c.loop,
        "states": str(c.states),
        "states_key": sortable_key(c.states),
        "state_arcs": str(c.state_arcs),
        "state_arcs_key": sortable_key(c.state_arcs),
        "automorphisms": str(c.automorphisms),
        "automorphisms_key": sortable_key(c.automorphisms),
        "tokens": c.tokens,
        "enabled": c.enabled,
        "semi_enabled": c.semi_enabled,
        "cycle_time_num": c.cycle_time.numerator,
        "cycle_time_den": c.cycle_time.denominator,
        "group_d1": c.group_d1,
        "cyclic": c.group_d1 == 1,
        "iteration": c.iteration,
        "reading_count": len(c.readings),
        "member_count": sum(len(r.members) for r in c.readings),
    }


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

    classes = _table(ClassRecord)
    statement = compile_query(node) if node is not None else select(classes.c.id)
    if seed is not None:
        seeds = _table(SeedRecord)
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

    classes = _table(ClassRecord)
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


def _column_values(
    engine: Engine, ids: Sequence[str], columns: Sequence[str]
) -> dict[str, dict[str, str | None]]:
    """The requested fields of each class as text (``3``, ``1/3``, ``yes``, ``1..2``)."""
    from zoo.query import parse_field_names
    from zoo.storage.querysql import column_clauses

    names: list[str] = []
    for column in columns:
        names.extend(parse_field_names(column))
    classes = _table(ClassRecord)
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
