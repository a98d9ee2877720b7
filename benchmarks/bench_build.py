"""Benchmark of the catalog build and of typical queries (prints figures; not a timed test).

Run from the repository root::

    .venv/bin/python benchmarks/bench_build.py                 # area <= 100, 2 jobs
    .venv/bin/python benchmarks/bench_build.py --max-area 60 --jobs 1 --naive-area 30

It prints, for a fresh build into a temporary SQLite file:

* wall time, and per stage the seconds summed over the worker processes (enumeration and
  algebra, nauty canonical forms with the nets they need) and in the writer (SQLite);
* CPU seconds of the writer and of the workers, the machine's load average (the development
  machine is shared, so wall time depends on what else runs), peak resident memory;
* side by side for a smaller bound: the catalog's approach (algebra, then nauty once per class
  and per frame) against the naive one (nauty on every parameter set, grouped by fingerprint),
  single process both, and their ratio;
* the median time of typical queries on the built catalog (20 runs each).
"""

from __future__ import annotations

import argparse
import os
import resource
import statistics
import sys
import tempfile
import time
from pathlib import Path

from zoo.catalog.build import build_catalog
from zoo.catalog.classify import classify_area
from zoo.catalog.enumeration import iter_parameter_sets
from zoo.catalog.service import Catalog
from zoo.core.canonical import net_form, system_form

QUERIES = (
    ("count", "processes = 3 and area < 100", None),
    ("find, limit 20", "processes = 3 and area < 100", 20),
    ("find, sorted -states, limit 20", "regular and loop >= 5", 20),
    ("find, all 2,381 matches", "processes = 3 and area < 100", None),
    ("find, exact big number range", "states > 10^25", 20),
    ("find, parameter level", "gamma = 1 and delta = 1 and area in 50..60", 50),
)


def _megabytes(kilobytes: int) -> float:
    return kilobytes / 1024


def bench_build(max_area: int, jobs: int) -> Path:
    directory = Path(tempfile.mkdtemp(prefix="zoo-bench-"))
    location = directory / "catalog.sqlite3"
    cpu_before = time.process_time()
    children_before = resource.getrusage(resource.RUSAGE_CHILDREN)
    started = time.perf_counter()
    with Catalog.open(str(location), create=True) as catalog:
        opened = time.perf_counter()
        report = build_catalog(catalog, max_area, jobs=jobs)
    wall = time.perf_counter() - started
    children = resource.getrusage(resource.RUSAGE_CHILDREN)
    own = resource.getrusage(resource.RUSAGE_SELF)
    worker_cpu = (children.ru_utime + children.ru_stime) - (
        children_before.ru_utime + children_before.ru_stime
    )
    print(f"Fresh build, area <= {max_area}, --jobs {jobs}")
    print(
        f"  stored: {report.parameter_sets:,} parameter sets, {report.readings:,} readings, "
        f"{report.classes:,} classes, {report.frames:,} frames"
    )
    print(
        f"  nauty canonical forms: {report.canonical_forms:,} "
        f"(classes + frames + {report.canonical_forms - report.classes - report.frames} "
        "checks of merges without an explicit isomorphism)"
    )
    print(f"  wall time: {wall:.2f} s (schema creation {opened - started:.2f} s)")
    stages = report.stage_seconds
    print(
        f"  stage seconds, summed over workers: enumeration+algebra "
        f"{stages['classify_algebra']:.2f}, nauty forms (nets included) "
        f"{stages['classify_canonical']:.2f}; writer (SQLite): {stages['write']:.2f}"
    )
    print(f"  CPU seconds: writer {time.process_time() - cpu_before:.2f}, workers {worker_cpu:.2f}")
    print(
        f"  peak resident memory: writer {_megabytes(own.ru_maxrss):.0f} MB, largest worker "
        f"{_megabytes(children.ru_maxrss):.0f} MB"
    )
    print(
        f"  load average at the end: {os.getloadavg()[0]:.2f} on {os.cpu_count()} cores "
        "(other work on the machine stretches wall time, not CPU time)"
    )
    print(
        f"  wall time if the {jobs} worker(s) had their cores to themselves: about "
        f"{max(worker_cpu / jobs, time.process_time() - cpu_before):.1f} s (CPU-bound estimate)"
    )
    print(f"  catalog file: {location.stat().st_size / 2**20:.1f} MB")
    return location


def bench_naive(max_area: int) -> None:
    started = time.process_time()
    ours_classes = ours_frames = 0
    for area in range(1, max_area + 1):
        result = classify_area(area)
        ours_classes += len(result.classes)
        ours_frames += len(result.frames)
    ours = time.process_time() - started
    started = time.process_time()
    classes: set[str] = set()
    frames: set[str] = set()
    calls = 0
    for area in range(1, max_area + 1):
        for p in iter_parameter_sets(area):
            classes.add(system_form(p).fingerprint)
            frames.add(net_form(p).fingerprint)
            calls += 2
    naive = time.process_time() - started
    assert (len(classes), len(frames)) == (ours_classes, ours_frames), "the two ways disagree"
    print(f"Classification of area <= {max_area}, one process, CPU seconds")
    print(f"  catalog approach (algebra, nauty once per class and frame): {ours:.2f} s")
    print(f"  naive approach (nauty on every parameter set, {calls:,} forms): {naive:.2f} s")
    print(
        f"  ratio naive / catalog: {naive / ours:.1f}x "
        f"(both found {ours_classes:,} classes and {ours_frames:,} frames)"
    )


def bench_queries(location: Path, runs: int = 20) -> None:
    print(
        f"Queries on {location.name} (median of {runs} runs, catalog already open; "
        "wall ms / CPU ms)"
    )
    with Catalog.open(str(location)) as catalog:
        for name, query, limit in QUERIES:
            walls, cpus = [], []
            size = 0
            for _ in range(runs):
                started, cpu = time.perf_counter(), time.process_time()
                if name == "count":
                    size = catalog.count(query)
                else:
                    sort = "-states" if "sorted" in name else None
                    size = len(catalog.find(query, sort=sort, limit=limit).entries)
                walls.append(time.perf_counter() - started)
                cpus.append(time.process_time() - cpu)
            print(
                f"  {name:32s} {statistics.median(walls) * 1000:7.1f} / "
                f"{statistics.median(cpus) * 1000:6.1f} ms  "
                f"({size:,} {'counted' if name == 'count' else 'entries'}): {query}"
            )
        walls, cpus = [], []
        for _ in range(runs):
            started, cpu = time.perf_counter(), time.process_time()
            catalog.get("C(4,2,2,3)")
            walls.append(time.perf_counter() - started)
            cpus.append(time.process_time() - cpu)
        print(
            f"  {'get by parameter set':32s} {statistics.median(walls) * 1000:7.1f} / "
            f"{statistics.median(cpus) * 1000:6.1f} ms"
        )


def bench_existing(location: Path) -> None:
    """Only the queries, on an existing catalog (--queries-only PATH)."""
    bench_queries(location)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--max-area", type=int, default=100)
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--naive-area", type=int, default=40)
    parser.add_argument("--skip-naive", action="store_true")
    parser.add_argument(
        "--queries-only",
        type=Path,
        metavar="CATALOG",
        help="only time the queries on an existing catalog file",
    )
    args = parser.parse_args(argv)
    if args.queries_only is not None:
        bench_existing(args.queries_only)
        return 0
    location = bench_build(args.max_area, args.jobs)
    print()
    bench_queries(location)
    if not args.skip_naive:
        print()
        bench_naive(args.naive_area)
    return 0


if __name__ == "__main__":
    sys.exit(main())
