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
from pathlib import Path
from types import TracebackType
from typing import TYPE_CHECKING, Any

from zoo.catalog.identifiers import Identifier, read_identifier
from zoo.core import registry
from zoo.core.entries import AreaStats, ClassEntry, FrameEntry, ReadingEntry, SeedEntry
from zoo.core.params import ParameterSet, parse_params
from zoo.errors import CatalogError, NotInCatalog, ParameterError
from zoo.storage import database
from zoo.storage.buildlock import build_in_progress
from zoo.storage.location import CATALOG_ENV_VAR, chosen_location
from zoo.storage.repository import Repository

if TYPE_CHECKING:
    from zoo.storage.database import Engine

__all__ = [
    "DEFAULT_MAX_AREA",
    "AreaStats",
    "Catalog",
    "ClassEntry",
    "FindResult",
    "FrameEntry",
    "ReadingEntry",
    "SeedEntry",
    "build_command",
    "column_cell",
    "extend_advice",
    "lookup_class_id",
]

#: Largest area a build accepts: beyond it a full enumeration is hours of nauty work.
MAX_BUILD_AREA = 2_000
#: The area up to which ``zoo find`` builds a catalog when none exists yet (issue 3).
DEFAULT_MAX_AREA = 100

#: ``catalog_info`` key holding the state bound S the behaviour keys were computed with
#: (docs/theory/behaviour.md).
BEHAVIOUR_BOUND_KEY = "behaviour_state_bound"
_HTML_ROWS = 50  # rows a notebook shows of a result


# --- value types ---------------------------------------------------------------------------


# Class, reading, frame and seed entries are the frozen typed values of zoo.core.entries.


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
    #: Whether another process was building the catalog when the answer was read.
    building: bool = False
    #: When the query reads ``behaviour_count``: (the state bound S, the area up to which
    #: behaviour identifiers are given), so that the note says what an undecided 0 means.
    behaviour: tuple[int | None, int] | None = None

    # A result is the sequence of its entries: ``result[0]``, ``len(result)``, ``for e in result``.
    def __len__(self) -> int:
        return len(self.entries)

    def __iter__(self) -> Iterator[ClassEntry]:
        return iter(self.entries)

    def __getitem__(self, index: int) -> ClassEntry:
        return self.entries[index]

    def to_pandas(self) -> Any:
        """The entries as a ``pandas.DataFrame``, one row per class, indexed by identifier:
        label, area, then every class and frame invariant by registry name, with exact values
        (Python ``int`` of any size, ``fractions.Fraction``, ``bool``; object columns where
        a value does not fit a machine type). Needs pandas (``pip install pandas``)."""
        try:
            import pandas as pd
        except ModuleNotFoundError:
            raise CatalogError(
                "FindResult.to_pandas needs pandas, which is not installed; install it with: "
                "pip install pandas"
            ) from None
        names = [
            inv.name
            for inv in registry.INVARIANTS
            if inv.level in (registry.Level.CLASS, registry.Level.FRAME) and not inv.structural
        ]
        rows = [
            {"id": e.id, "label": e.label, "area": e.area}
            | {name: e.invariant_values.get(name) for name in names}
            for e in self.entries
        ]
        frame = pd.DataFrame(rows, columns=["id", "label", "area", *names], dtype=object)
        frame = frame.set_index("id")
        frame.attrs["query"] = self.query
        frame.attrs["complete_to"] = self.complete_to
        frame.attrs["note"] = self.completeness_note()
        return frame

    def _repr_html_(self) -> str:
        """The first rows as an HTML table with the completeness note, for notebooks."""
        import html

        shown = self.entries[:_HTML_ROWS]
        head = "".join(f"<th>{h}</th>" for h in ("id", "label", "area", "members", "loop"))
        body = "".join(
            "<tr>"
            + "".join(
                f"<td>{html.escape(str(v))}</td>"
                for v in (e.id, e.label, e.area, len(e.members), e.invariant_values.get("loop"))
            )
            + "</tr>"
            for e in shown
        )
        more = (
            f"<p>{len(self.entries) - len(shown):,} more rows (index the result to see them).</p>"
            if len(self.entries) > len(shown)
            else ""
        )
        count = "1 class matches" if self.total == 1 else f"{self.total:,} classes match"
        return (
            f"<p>{html.escape(count)} <code>{html.escape(self.query)}</code></p>"
            f"<table><tr>{head}</tr>{body}</table>{more}"
            f"<p>{html.escape(self.completeness_note())}</p>"
        )

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
        if self.building:
            note += (
                " A build of this catalog is in progress: this answer holds the areas complete "
                "when it was read; ask again later for more."
            )
        if self.behaviour is not None:
            bound, named_to = self.behaviour
            states = f"at most {bound:,} reachable states" if bound else "no classes yet"
            note += (
                f" Behaviour is decided for the classes with {states}, named up to area "
                f"{named_to}; behaviour_count is 0 for the others."
            )
        return note


def column_cell(value: object) -> str:
    """A typed column value as CSV text, written as the dump writes it: true/false, whole
    numbers as digits, fractions as num/den (``2``, not ``2/1``), lists as compact JSON (``[1,2]``,
    ``[false,true]``), nothing for None."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, list):
        return json.dumps([_whole(v) for v in value], separators=(",", ":"))
    return str(_whole(value))


def _whole(value: object) -> object:
    """A fraction text ``n/1`` as ``n``: in CSV a whole fraction is written as an integer."""
    if isinstance(value, str) and value.endswith("/1") and value[:-2].lstrip("-").isdigit():
        return value[:-2]
    return value


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
        self.repository = Repository(engine)
        self.url = url
        #: Whether this open created the catalog (``create=True`` on a missing one).
        self.created = created

    # lifecycle

    @classmethod
    def open(
        cls, location: str | None = None, *, create: bool = False, read_only: bool = False
    ) -> Catalog:
        """Open the catalog at location (``--db`` value, else $ZOO_CATALOG, else the default).

        With ``create=True`` a missing catalog is created empty (schema by Alembic); without it
        a missing catalog is a ``CatalogError`` naming the build command. A catalog with an
        older schema is refused with the exact ``zoo migrate`` command. ``read_only=True``
        makes every connection refuse writes (the web catalog).
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
        engine = database.open_engine(url, read_only=read_only)
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
        for suffix in ("", "-wal", "-shm", "-journal", "-buildlock"):
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
        with self.repository.read() as reader:
            return reader.complete_areas()

    def complete_to(self) -> int:
        """The largest N such that areas 1..N are all stored completely (0 when empty)."""
        return _complete_prefix(self.complete_areas())

    def behaviour_complete_to(self) -> int:
        """The largest N such that the classes of areas 1..N all have their behaviour
        identifiers: a behaviour class of s states is listed completely when N >= s."""
        with self.repository.read() as reader:
            return _complete_prefix(reader.behaviour_areas(named=True))

    def behaviour_members(self, behaviour_id: str) -> list[str]:
        """The stored classes of a behaviour class (``BE...``), in catalog order."""
        with self.repository.read() as reader:
            return reader.behaviour_members(behaviour_id)

    def info(self) -> dict[str, str]:
        """The catalog_info table: versions, encoding, creation time."""
        with self.repository.read() as reader:
            return reader.info()

    # reading

    def stats(self) -> list[AreaStats]:
        """Counts per stored area, in increasing area."""
        with self.repository.read() as reader:
            return reader.area_stats()

    def class_for_params(self, p: ParameterSet) -> ClassEntry | None:
        """The entry of the class holding p, or None when p's area is not stored."""
        with self.repository.read() as reader:
            class_id = reader.class_id_for(p)
            return None if class_id is None else reader.entries([class_id])[0]

    def class_id_for(self, p: ParameterSet) -> str | None:
        """The identifier of the class holding p, or None when p's area is not stored."""
        with self.repository.read() as reader:
            return reader.class_id_for(p)

    def class_for_fingerprint(self, fingerprint: str) -> ClassEntry | None:
        """The entry whose marked-net fingerprint (``v1:...``) is the given one, or None."""
        with self.repository.read() as reader:
            class_id = reader.class_id_with_fingerprint(fingerprint)
            return None if class_id is None else reader.entries([class_id])[0]

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
            with self.repository.read() as reader:
                entries = reader.entries([str(identifier)])
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
        with self.repository.read() as reader:
            entry = reader.frame(str(identifier))
        if entry is None:
            raise self._missing(identifier)
        return entry

    def seeds(self) -> list[SeedEntry]:
        """Every seed stored in the catalog, by name."""
        with self.repository.read() as reader:
            return reader.seeds()

    def _missing(self, identifier: Identifier) -> NotInCatalog:
        complete = self.complete_to()
        if identifier.area > complete and identifier.area not in self.complete_areas():
            return self._missing_area(identifier.area, str(identifier))
        kind = "classes" if identifier.kind == "class" else "frames"
        with self.repository.read() as reader:
            count = reader.stored_count(kind, identifier.area)
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
        names = _field_names(columns or ())
        # One snapshot for the answer and the completeness it states: a build that stores an
        # area meanwhile changes neither (issue: completeness overclaim under concurrency).
        with self.repository.read() as reader:
            ids, total = reader.query_class_ids(node, sort, limit, seed)
            values = reader.column_texts(ids, names)
            typed = reader.column_values(ids, names)
            entries = reader.entries(ids)
            matched = reader.matched_readings(ids, node)
            complete_to = _complete_prefix(reader.complete_areas())
            behaviour = _behaviour_reach(reader, node)
        return FindResult(
            behaviour=behaviour,
            building=build_in_progress(self.engine),
            query=query,
            entries=tuple(entries),
            total=total,
            complete_to=complete_to,
            area_bound=None if node is None else referenced_area_bound(node),
            columns=tuple(values.get(e.id, {}) for e in entries),
            location=self.url,
            values=tuple(typed.get(e.id, {}) for e in entries),
            matched=tuple(matched[e.id] for e in entries) if matched else (),
        )

    def completeness_note(self, query: str) -> str:
        """The completeness sentence of ``FindResult`` for a query, without running it."""
        from zoo.query.parser import parse_query, referenced_area_bound

        node = parse_query(query) if query.strip() else None
        with self.repository.read() as reader:
            complete_to = _complete_prefix(reader.complete_areas())
            behaviour = _behaviour_reach(reader, node)
        result = FindResult(
            query,
            (),
            0,
            complete_to,
            None if node is None else referenced_area_bound(node),
            location=self.url,
            building=build_in_progress(self.engine),
            behaviour=behaviour,
        )
        return result.completeness_note()

    def count(self, query: str, *, seed: str | None = None) -> int:
        """How many classes match a query."""
        from zoo.query.parser import parse_query

        node = parse_query(query) if query.strip() else None
        with self.repository.read() as reader:
            return reader.query_count(node, seed)

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
        for area in [None] if areas is None else areas:
            after = (0, 0)  # (area, rank) of the last entry yielded; ranks start at 1
            while True:
                with self.repository.read() as reader:
                    rows = reader.class_page(area, after, batch_size)
                    entries = reader.entries([row.id for row in rows])
                yield from entries
                if len(rows) < batch_size:
                    break
                after = (rows[-1].area, rows[-1].rank)


def describe_location(location: str | None = None) -> tuple[str, bool]:
    """How the catalog at ``location`` (``--db``, else $ZOO_CATALOG, else the default file) is
    named to the user, and whether a catalog with content exists there; creates nothing but its
    folder. A schema that nothing was ever stored in (``zoo migrate`` on a new file) and that no
    build is filling counts as no catalog, so that ``zoo find`` says it builds one.
    """
    url = database.resolve_location(require_named_catalog(location))
    shown = database.display_location(url)
    if not database.catalog_exists(url):
        if chosen_location(location):
            raise CatalogError(no_catalog_message(url))
        return shown, False
    engine = database.open_engine(url)
    try:
        with Repository(engine).read() as reader:
            empty = not reader.complete_areas() and "encoding" not in reader.info()
        return shown, not empty or build_in_progress(engine)
    finally:
        engine.dispose()


def require_named_catalog(location: str | None) -> str | None:
    """``location`` unless it is given but empty (``--db ''``), which is an error: an empty
    value must not quietly mean the default catalog to a command that would build it."""
    if location is not None and not location.strip():
        raise CatalogError(
            "--db is empty; give a catalog file or database URL, or leave --db out for the "
            "default catalog"
        )
    return location


def no_catalog_message(url: str) -> str:
    """The one line for a named catalog that does not exist, with the command that builds it."""
    shown = database.display_location(url)
    return (
        f"no catalog at {shown}; a named catalog (--db or {CATALOG_ENV_VAR}) is built only by "
        f"zoo build: zoo build --max-area {DEFAULT_MAX_AREA} --db {shlex.quote(shown)} (check "
        "the spelling if you meant an existing one)"
    )


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
        with Repository(engine).read() as reader:
            return reader.class_id_for(p)
    finally:
        engine.dispose()


def _behaviour_reach(reader: Any, node: Any) -> tuple[int | None, int] | None:
    """For a query that reads ``behaviour_count``: (the catalog's state bound, the area up to
    which behaviour classes are named), read in the answer's snapshot; else None."""
    from zoo.query.parser import referenced_fields

    if node is None or "behaviour_count" not in {f.name for f in referenced_fields(node)}:
        return None
    bound = reader.info().get(BEHAVIOUR_BOUND_KEY)
    return (int(bound) if bound else None, _complete_prefix(reader.behaviour_areas(named=True)))


def _complete_prefix(areas: Iterable[int]) -> int:
    stored = set(areas)
    n = 0
    while n + 1 in stored:
        n += 1
    return n


def _field_names(columns: Sequence[str]) -> list[str]:
    """The field names of ``--columns`` values (each may list several), without repeats."""
    from zoo.query.parser import parse_field_names

    names: list[str] = []
    for column in columns:
        names.extend(n for n in parse_field_names(column) if n not in names)
    return names
