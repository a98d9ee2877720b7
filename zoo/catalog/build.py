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

import os
import time
from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field
from functools import partial
from typing import Protocol

from zoo.catalog import service as catalog_service
from zoo.catalog.behaviour import name_behaviour
from zoo.catalog.classify import AreaClassification, classify_area
from zoo.catalog.cluster import ClusterClassifier, check_cluster_address
from zoo.catalog.enumeration import parameter_set_count
from zoo.catalog.seeds import Seed, load_seed_directory
from zoo.catalog.service import MAX_BUILD_AREA, AreaStats, Catalog
from zoo.catalog.workers import in_workers
from zoo.errors import CatalogError, ParameterError
from zoo.storage import database
from zoo.storage.buildlock import build_in_progress, build_lock
from zoo.storage.convert import READING_ID_STRIDE, area_rows
from zoo.storage.location import chosen_location
from zoo.storage.repository import StoreConflict
from zoo.version import __version__

__all__ = [
    "BUILD_TARGET_KEY",
    "MAX_BUILD_AREA",
    "READING_ID_STRIDE",
    "BuildProgress",
    "BuildReport",
    "area_span",
    "build_catalog",
    "check_build_bound",
    "default_jobs",
    "ensure_catalog",
    "write_area",
]


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
    #: Areas this build classified but found stored by another build when it came to write
    #: them; the counts above leave them out.
    stored_elsewhere: tuple[int, ...] = ()
    #: Areas whose classes this build gave behaviour identifiers to (docs/theory/behaviour.md).
    behaviour_named: tuple[int, ...] = ()

    def added_text(self) -> str:
        """The areas this build stored: ``area 3`` or ``areas 1..2, 5..40``."""
        return area_span(self.added)


def area_span(areas: Sequence[int]) -> str:
    """Areas as runs: ``area 3``, ``areas 1..2, 5..40`` (sorted, no gaps hidden)."""
    runs: list[list[int]] = []
    for area in sorted(areas):
        if runs and area == runs[-1][1] + 1:
            runs[-1][1] = area
        else:
            runs.append([area, area])
    text = ", ".join(str(a) if a == b else f"{a}..{b}" for a, b in runs)
    return f"area {text}" if len(areas) == 1 else f"areas {text}"


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
    cluster: str | None = None,
    behaviour: bool = True,
) -> BuildReport:
    """Store every area 1..max_area that is not stored yet; one transaction per area.

    ``jobs`` worker processes classify areas (nauty included); this process writes them in
    increasing order. Areas already complete are never rewritten. ``seeds`` defaults to the
    shipped seeds_data/; each is attached to its class when its area is stored. Raises
    ``CatalogError`` (nothing stored for the failing area) when the classification and
    nauty disagree. ``cluster`` (a Dask scheduler address or ``local:N``) classifies on a
    Dask cluster instead of ``jobs`` local processes (``zoo.catalog.cluster``).

    With ``behaviour`` (the default) the build also decides the behaviour of every class with
    at most ``BEHAVIOUR_STATE_LIMIT`` states and names the behaviour classes
    (``zoo.catalog.behaviour``), including those of areas stored earlier without it; without,
    the areas are stored with their behaviour left for a later build.

    Holds the catalog's build lock while it runs (``zoo.storage.buildlock``), so that readers
    know a build is in progress and answer from what is complete instead of building too.
    """
    started = time.perf_counter()
    try:
        check_build_bound(max_area)
        if cluster is not None:
            cluster = check_cluster_address(cluster)
    except ParameterError:
        catalog.discard_if_unused()  # a rejected build leaves no empty catalog file behind
        raise
    with build_lock(catalog.engine):
        jobs = max(1, int(jobs))
        seed_list = list(load_seed_directory() if seeds is None else seeds)
        _record_encoding(catalog, max_area)
        done = set(catalog.complete_areas())
        todo = [a for a in range(1, max_area + 1) if a not in done]
        _sync_seeds(catalog, seed_list)
        stage = {"classify_algebra": 0.0, "classify_canonical": 0.0, "behaviour": 0.0, "write": 0.0}
        named: list[int] = []
        if behaviour:
            tick = time.perf_counter()
            # Areas stored without behaviour (an older zoo, a first-use build, a stopped build).
            named += name_behaviour(catalog, jobs)
            stage["behaviour"] += time.perf_counter() - tick
        totals = {"parameter_sets": 0, "readings": 0, "classes": 0, "frames": 0, "forms": 0}
        added: list[int] = []
        elsewhere: list[int] = []
        if progress is not None:
            progress.started(todo, sum(parameter_set_count(a) for a in todo))
        seeds_by_area: dict[int, list[Seed]] = {}
        for seed in seed_list:
            seeds_by_area.setdefault(seed.params.area, []).append(seed)
        limit = None if behaviour else 0  # classify_area's behaviour_limit: default, or none
        classified = (
            _cluster_classified(todo, cluster, limit)
            if cluster
            else _iter_classified(todo, jobs, limit)
        )
        for result in classified:
            write_started = time.perf_counter()
            wrote = write_area(catalog, result, seeds_by_area.get(result.area, []))
            write_seconds = time.perf_counter() - write_started
            stage["classify_algebra"] += result.seconds.get("algebra", 0.0)
            stage["classify_canonical"] += result.seconds.get("canonical", 0.0)
            stage["behaviour"] += result.seconds.get("behaviour", 0.0)
            stage["write"] += write_seconds
            if behaviour:
                tick = time.perf_counter()
                named += name_behaviour(catalog)  # once every area below is stored
                stage["behaviour"] += time.perf_counter() - tick
            if not wrote:
                elsewhere.append(result.area)  # a concurrent build stored it first
                continue
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
            stored_elsewhere=tuple(elsewhere),
            behaviour_named=tuple(named),
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

    with catalog.repository.write() as writer:
        stored = writer.info().get("encoding")
        if stored is None:
            writer.put_info("encoding", ENCODING_VERSION)
        elif stored != ENCODING_VERSION:
            raise CatalogError(
                f"catalog {catalog.location} holds fingerprints of encoding {stored}, this zoo "
                f"computes {ENCODING_VERSION}; build a new catalog with --db NEW_FILE "
                "(mixing encodings would make fingerprints incomparable)"
            )
        writer.put_info("built_by", __version__)
        writer.put_info(BUILD_TARGET_KEY, str(max_area))


def _sync_seeds(catalog: Catalog, seeds: Sequence[Seed]) -> None:
    """Make the seeds table equal to the seed files, linking seeds of stored areas."""
    with catalog.repository.write() as writer:
        writer.sync_seeds(seeds)


def write_area(catalog: Catalog, result: AreaClassification, seeds: Sequence[Seed] = ()) -> bool:
    """Store one classified area in one transaction; False if it was already complete.

    ``seeds`` of that area are linked to their classes in the same transaction. Areas are
    independent, so an area may be stored alone (the catalog is then complete only up to
    the first missing area).
    """
    started = time.perf_counter()
    area = result.area
    rows = area_rows(result)
    try:
        with catalog.repository.write() as writer:
            state = writer.area_complete(area)
            if state:
                return False
            if state is not None:  # an incomplete leftover: replace it whole
                writer.delete_area(area)
            writer.insert_area(rows)
            for seed in seeds:
                writer.link_seed(seed.name, seed.params)
            writer.mark_area_complete(
                AreaStats(
                    area,
                    result.parameter_set_count,
                    result.reading_count,
                    len(result.classes),
                    len(result.frames),
                    seconds=sum(result.seconds.values()) + (time.perf_counter() - started),
                )
            )
    except StoreConflict as exc:
        # Another build may have stored this area meanwhile; anything else is an error.
        if area in catalog.complete_areas():
            return False
        if exc.busy:
            raise database.busy_error(catalog.location) from None
        reason = exc.reason
        raise CatalogError(
            f"cannot store area {area} in catalog {catalog.location}: {reason}; nothing of "
            "this area was stored (if another build writes the same catalog, run one at a "
            "time, then build again to resume)"
        ) from None
    return True


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

    A named catalog (``location`` or ``$ZOO_CATALOG``) that does not exist is a
    ``CatalogError``: only the default location is built on first use.

    A catalog that a user built to another bound is never extended here (that is
    ``zoo build``'s decision); queries beyond it get the completeness warning instead. Nor is
    one that another process is building now: the reader answers from what is complete
    (issue 8), and the other build's target stays as it set it.
    """
    bound = catalog_service.DEFAULT_MAX_AREA if max_area is None else max_area
    check_build_bound(bound)
    url = database.resolve_location(catalog_service.require_named_catalog(location))
    if not database.catalog_exists(url) and chosen_location(location):
        # Only the default catalog is built on first use; a named one that is not there is
        # most likely mistyped, and building it would put a catalog somewhere unexpected.
        raise CatalogError(catalog_service.no_catalog_message(url))
    if database.catalog_exists(url):
        catalog = Catalog.open(location)
        try:
            if build_in_progress(catalog.engine):
                return catalog, None
            if not _is_unfinished_default_build(catalog, bound):
                return catalog, None
        except BaseException:
            catalog.close()
            raise
    else:
        catalog = Catalog.open(location, create=True)
    try:
        # The first answer does not wait for the behaviour classes (three times the
        # classification's cost, docs/scale.md): ``zoo build`` names them later.
        report = build_catalog(
            catalog, bound, jobs=jobs or default_jobs(), progress=progress, behaviour=False
        )
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


def _iter_classified(
    areas: Sequence[int], jobs: int, behaviour_limit: int | None = None
) -> Iterator[AreaClassification]:
    """Classify areas in order, in ``jobs`` worker processes when that helps
    (``classify_area`` with its ``behaviour_limit``)."""
    yield from in_workers(partial(classify_area, behaviour_limit=behaviour_limit), areas, jobs)


def _cluster_classified(
    areas: Sequence[int], address: str, behaviour_limit: int | None = None
) -> Iterator[AreaClassification]:
    """Classify areas in order on a Dask cluster (``zoo.catalog.cluster``); this process writes."""
    if not areas:
        return
    with ClusterClassifier(address) as cluster:
        yield from cluster.classify(areas, behaviour_limit)
