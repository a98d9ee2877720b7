"""Building the catalog: enumerate, classify, check with nauty, store one area at a time.

A build classifies one area at a time (``zoo.catalog.classify``, in worker processes when ``jobs`` >
1) and writes each area in one transaction together with its row in ``areas``; the writer is this
process alone. So an interrupted build leaves complete areas only, the next build resumes with the
first missing area, and building further never touches an area already stored: identifiers never
change (docs/citing.md). Reading the catalog is ``zoo.catalog.service``'s concern::

    from zoo.catalog.build import build_catalog
    from zoo.catalog.service import Catalog
    with Catalog.open("catalog.sqlite3", create=True) as catalog:
        report = build_catalog(catalog, 40, jobs=2)
"""

from __future__ import annotations

import multiprocessing
import os
import signal
import sys
import threading
import time
from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from typing import Protocol

from sqlalchemy import Table, delete, select, update
from sqlalchemy.engine import Connection
from sqlalchemy.exc import IntegrityError, OperationalError

from zoo.catalog import service as catalog_service
from zoo.catalog.classify import AreaClassification, ClassSummary, classify_area
from zoo.catalog.enumeration import parameter_set_count
from zoo.catalog.seeds import Seed, load_seed_directory
from zoo.catalog.service import MAX_BUILD_AREA, AreaStats, Catalog, stored_class_id
from zoo.errors import CatalogError, ParameterError
from zoo.storage import database
from zoo.storage.models import Base, sortable_key
from zoo.version import __version__

__all__ = [
    "BUILD_TARGET_KEY",
    "MAX_BUILD_AREA",
    "READING_ID_STRIDE",
    "BuildProgress",
    "BuildReport",
    "build_catalog",
    "check_build_bound",
    "default_jobs",
    "ensure_catalog",
    "write_area",
]

#: Readings get the explicit id area * READING_ID_STRIDE + index, so that the same build gives
#: the same ids whatever was interrupted before (PostgreSQL sequences do not roll back).
READING_ID_STRIDE = 100_000

_TABLES = Base.metadata.tables
_INFO = _TABLES["catalog_info"]
_AREAS = _TABLES["areas"]
_FRAMES = _TABLES["frames"]
_CLASSES = _TABLES["classes"]
_READINGS = _TABLES["readings"]
_PARAMETER_SETS = _TABLES["parameter_sets"]
_SEEDS = _TABLES["seeds"]


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


def build_catalog(
    catalog: Catalog,
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
    try:
        check_build_bound(max_area)
    except ParameterError:
        catalog.discard_if_unused()  # a rejected build leaves no empty catalog file behind
        raise
    jobs = max(1, int(jobs))
    seed_list = list(load_seed_directory() if seeds is None else seeds)
    _record_encoding(catalog, max_area)
    done = set(catalog.complete_areas())
    todo = [a for a in range(1, max_area + 1) if a not in done]
    _sync_seeds(catalog, seed_list)
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
        wrote = write_area(catalog, result, seeds_by_area.get(result.area, []))
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
        complete_to=catalog.complete_to(),
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


def check_build_bound(max_area: object) -> int:
    """``max_area`` if a build accepts it (a whole number 1..MAX_BUILD_AREA); else an error."""
    if isinstance(max_area, bool) or not isinstance(max_area, int) or max_area < 1:
        raise ParameterError(f"--max-area must be a positive whole number, got {max_area!r}")
    if max_area > MAX_BUILD_AREA:
        raise ParameterError(
            f"--max-area {max_area} is above the build limit {MAX_BUILD_AREA}; a full "
            "enumeration that large takes days of nauty work, choose a smaller bound"
        )
    return max_area


#: ``catalog_info`` key holding the bound of the latest build started on the catalog; an
#: interrupted default build is resumed by ``ensure_catalog`` when this says it was one.
BUILD_TARGET_KEY = "build_target"


def _record_encoding(catalog: Catalog, max_area: int) -> None:
    """Record the fingerprint encoding and the build's bound; refuse to mix encodings."""
    from zoo.core.canonical import ENCODING_VERSION

    with database.write_transaction(catalog.engine) as connection:
        row = connection.execute(select(_INFO.c.value).where(_INFO.c.key == "encoding")).first()
        if row is None:
            connection.execute(_INFO.insert(), [{"key": "encoding", "value": ENCODING_VERSION}])
        elif row[0] != ENCODING_VERSION:
            raise CatalogError(
                f"catalog {catalog.location} holds fingerprints of encoding {row[0]}, this zoo "
                f"computes {ENCODING_VERSION}; build a new catalog with --db NEW_FILE "
                "(mixing encodings would make fingerprints incomparable)"
            )
        _put_info(connection, "built_by", __version__)
        _put_info(connection, BUILD_TARGET_KEY, str(max_area))


def _sync_seeds(catalog: Catalog, seeds: Sequence[Seed]) -> None:
    """Make the seeds table equal to the seed files, linking seeds of stored areas."""
    table = _SEEDS
    wanted = {s.name: s for s in seeds}
    with database.write_transaction(catalog.engine) as connection:
        stored = {row.name: row for row in connection.execute(select(table))}
        gone = sorted(set(stored) - set(wanted))
        if gone:
            connection.execute(delete(table).where(table.c.name.in_(gone)))
        for name, seed in wanted.items():
            class_id = stored_class_id(connection, seed.params)
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


def write_area(catalog: Catalog, result: AreaClassification, seeds: Sequence[Seed] = ()) -> bool:
    """Store one classified area in one transaction; False if it was already complete.

    ``seeds`` of that area are linked to their classes in the same transaction. Areas are
    independent, so an area may be stored alone (the catalog is then complete only up to
    the first missing area).
    """
    started = time.perf_counter()
    area = result.area
    try:
        with database.write_transaction(catalog.engine) as connection:
            row = connection.execute(select(_AREAS.c.complete).where(_AREAS.c.area == area)).first()
            if row is not None and row[0]:
                return False
            if row is not None:  # an incomplete leftover: replace it whole
                _delete_area(connection, area)
            _insert_area_rows(connection, result)
            for seed in seeds:
                connection.execute(
                    update(_SEEDS)
                    .where(_SEEDS.c.name == seed.name)
                    .values(class_id=stored_class_id(connection, seed.params))
                )
            connection.execute(
                _AREAS.insert(),
                [
                    {
                        "area": area,
                        "complete": True,
                        "parameter_sets": result.parameter_set_count,
                        "readings": result.reading_count,
                        "classes": len(result.classes),
                        "frames": len(result.frames),
                        "built_at": datetime.now(UTC),
                        "seconds": sum(result.seconds.values()) + (time.perf_counter() - started),
                    }
                ],
            )
    except (IntegrityError, OperationalError) as exc:
        # Another build may have stored this area meanwhile; anything else is an error.
        if area in catalog.complete_areas():
            return False
        if database.is_busy(exc):
            raise database.busy_error(catalog.location) from None
        reason = str(getattr(exc, "orig", exc)).strip().splitlines()[0]
        raise CatalogError(
            f"cannot store area {area} in catalog {catalog.location}: {reason}; nothing of "
            "this area was stored (if another build writes the same catalog, run one at a "
            "time, then build again to resume)"
        ) from None
    return True


def _insert_area_rows(connection: Connection, result: AreaClassification) -> None:
    """The rows of one area for frames, classes, readings and parameter_sets, bulk-inserted."""
    frames: list[dict[str, object]] = [
        {
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
        for frame in result.frames
    ]
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
    for table, rows in (
        (_FRAMES, frames),
        (_CLASSES, classes),
        (_READINGS, readings),
        (_PARAMETER_SETS, parameter_sets),
    ):
        _bulk_insert(connection, table, rows)


def ensure_catalog(
    location: str | None = None,
    *,
    max_area: int | None = None,
    jobs: int | None = None,
    progress: BuildProgress | None = None,
) -> tuple[Catalog, BuildReport | None]:
    """Open the catalog at location, building the default one first when it is not there.

    ``max_area`` defaults to ``zoo.catalog.service.DEFAULT_MAX_AREA`` (read at call time). This is
    what makes ``zoo find`` work right after installation. It builds to ``max_area`` when

    * no catalog exists yet (or one exists that nothing was ever stored in), or
    * the latest build started on the catalog was this same default build (its recorded
      ``build_target`` equals ``max_area``) and it was interrupted before reaching it: the
      main job resumes where Ctrl-C stopped it.

    A catalog that a user built to another bound is never extended here (that is
    ``zoo build``'s decision); queries beyond it get the completeness warning instead.
    """
    bound = catalog_service.DEFAULT_MAX_AREA if max_area is None else max_area
    check_build_bound(bound)
    url = database.resolve_location(location)
    if database.catalog_exists(url):
        catalog = Catalog.open(location)
        try:
            if not _is_unfinished_default_build(catalog, bound):
                return catalog, None
        except BaseException:
            catalog.close()
            raise
    else:
        catalog = Catalog.open(location, create=True)
    try:
        report = build_catalog(catalog, bound, jobs=jobs or default_jobs(), progress=progress)
    except BaseException:
        catalog.close()
        raise
    return catalog, report


def _is_unfinished_default_build(catalog: Catalog, bound: int) -> bool:
    """Whether ``ensure_catalog`` should (re)build: never built, or its own build interrupted."""
    info = catalog.info()
    if not catalog.complete_areas() and not info.get("encoding"):
        return True  # created but never built
    target = info.get(BUILD_TARGET_KEY, "")
    return target.isdigit() and int(target) == bound and catalog.complete_to() < bound


def default_jobs() -> int:
    """Worker processes for a build: the usable cores, at most 4 (the writer is one more)."""
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:  # pragma: no cover - not Linux
        cores = os.cpu_count() or 1
    return max(1, min(4, cores))


def _iter_classified(areas: Sequence[int], jobs: int) -> Iterator[AreaClassification]:
    """Classify areas in order, in ``jobs`` worker processes when that helps.

    With workers, Ctrl-C is this process's alone: workers ignore SIGINT, and here SIGINT only
    sets a flag that is turned into ``KeyboardInterrupt`` between two results, never inside a
    garbage-collector callback or a database write (which would print "Exception ignored"
    tracebacks). Workers end quietly when this process dies (``_pool_worker_start``).
    """
    if jobs <= 1 or len(areas) <= 1:
        for area in areas:
            yield classify_area(area)
        return
    methods = multiprocessing.get_all_start_methods()
    context = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
    interrupted: list[int] = []
    own_handler = threading.current_thread() is threading.main_thread()
    previous = (
        # Installed before the fork, so a worker hit before its initializer runs stays quiet.
        signal.signal(signal.SIGINT, lambda number, _frame: interrupted.append(number))
        if own_handler
        else None
    )

    def check() -> None:
        if interrupted:
            raise KeyboardInterrupt

    try:
        # Largest areas cost most: keep the pool busy with them while small ones stream through.
        pool = context.Pool(
            processes=min(jobs, len(areas)), initializer=_pool_worker_start, initargs=(os.getpid(),)
        )
        try:
            results = pool.imap(classify_area, areas, chunksize=1)
            for _ in areas:
                while True:
                    check()
                    try:
                        result = results.next(timeout=_INTERRUPT_POLL_SECONDS)
                        break
                    except multiprocessing.TimeoutError:
                        continue
                yield result
            check()
            pool.close()
        finally:
            pool.terminate()
            pool.join()
    finally:
        if own_handler:
            signal.signal(signal.SIGINT, previous)


#: How often the builder looks for a Ctrl-C while it waits for a worker's result.
_INTERRUPT_POLL_SECONDS = 0.2


def _pool_worker_start(parent: int) -> None:
    """Initializer of a build worker: no tracebacks on Ctrl-C or when the builder dies.

    Ctrl-C reaches every process of the terminal's group; the builder handles it and stops the
    pool. A worker whose builder was killed would otherwise finish its area and then print a
    BrokenPipeError traceback when it sends the result: on Linux it is told of the death
    (PR_SET_PDEATHSIG) and ends at once; elsewhere the default SIGPIPE action ends it silently
    at the send.
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if hasattr(signal, "SIGPIPE"):
        signal.signal(signal.SIGPIPE, signal.SIG_DFL)
    if sys.platform.startswith("linux"):
        try:
            import ctypes

            libc = ctypes.CDLL(None, use_errno=True)
            libc.prctl(_PR_SET_PDEATHSIG, signal.SIGTERM)
        except (OSError, AttributeError):  # pragma: no cover - no usable libc
            pass
    if os.getppid() != parent:  # the builder died before the request above took effect
        os._exit(0)


#: prctl option of Linux: the signal a process receives when its parent dies.
_PR_SET_PDEATHSIG = 1


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
    table = _INFO
    if connection.execute(select(table.c.key).where(table.c.key == key)).first() is None:
        connection.execute(table.insert(), [{"key": key, "value": value}])
    else:
        connection.execute(update(table).where(table.c.key == key).values(value=value))


def _delete_area(connection: Connection, area: int) -> None:
    connection.execute(
        update(_SEEDS)
        .where(_SEEDS.c.class_id.in_(select(_CLASSES.c.id).where(_CLASSES.c.area == area)))
        .values(class_id=None)
    )
    for table in (_PARAMETER_SETS, _READINGS, _CLASSES, _FRAMES, _AREAS):
        connection.execute(delete(table).where(table.c.area == area))


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
