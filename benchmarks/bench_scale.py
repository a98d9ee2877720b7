"""Benchmark of the build at scale: fast path against nauty alone, jobs against a Dask cluster.

Prints figures; not a timed test. Run from the repository root::

    .venv/bin/python benchmarks/bench_scale.py                  # to area 100 (about a minute)
    .venv/bin/python benchmarks/bench_scale.py --area-200 --area-300   # adds the long builds

In one run it measures, each build in a fresh process and a fresh temporary SQLite file:

1. a single-process build to 60: wall, CPU per stage (algebra, nauty with its input, writer),
   and nauty's own calls alone for the same forms (graphs built beforehand: one
   ``canon_label`` run per form, and the ``autgrp`` run the build no longer makes), and the
   ratio;
2. the build to 100 (and 200, 300 with the flags): wall, CPU per stage, peak memory, size;
3. the build to 100 with ``--jobs 2`` and with ``--cluster local:2`` (Dask);
4. the former explicit-net path against the fast path on a small bound (``--old-area``);
5. the classification CPU of single areas (``--sample-areas``, up to 300) beside nauty's own
   run for each of their forms, both fitted as c * A^k: the builds to 200 and 300 and their
   floor (nauty's runs alone on two cores), and every area up to 1,000 predicted from it.

The machine's load average is printed with the figures: the machine is shared.
"""

from __future__ import annotations

import argparse
import math
import multiprocessing
import os
import resource
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))


def _peak_mb(who: int) -> float:
    return resource.getrusage(who).ru_maxrss / 1024  # kilobytes on Linux


def _children_cpu() -> float:
    """CPU seconds of the worker processes this process started and waited for."""
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def _own_peak_mb() -> float:
    """This process's peak resident memory. Linux keeps ru_maxrss across exec, so a spawned
    process would report the peak of the benchmark that forked it; VmHWM starts afresh."""
    try:
        with open("/proc/self/status") as status:
            for line in status:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1]) / 1024
    except OSError:
        pass
    return _peak_mb(resource.RUSAGE_SELF)


def _build_in_child(max_area: int, jobs: int, cluster: str | None, path: str) -> dict[str, Any]:
    """One build into ``path``; runs in a spawned process, so its peak memory is its own."""
    from sqlalchemy import text

    from zoo.catalog.build import build_catalog
    from zoo.catalog.service import Catalog

    cpu = time.process_time()
    with Catalog.open(path, create=True) as catalog:
        report = build_catalog(catalog, max_area, jobs=jobs, seeds=[], cluster=cluster)
        with catalog.engine.connect() as connection:
            per_area = [
                tuple(r)
                for r in connection.execute(
                    text("SELECT area, seconds, parameter_sets, classes FROM areas ORDER BY area")
                )
            ]
    return {
        "wall": report.wall_seconds,
        "stages": dict(report.stage_seconds),
        "writer_cpu": time.process_time() - cpu,
        "peak_writer_mb": _own_peak_mb(),
        "workers_cpu": _children_cpu(),
        "peak_child_mb": _peak_mb(resource.RUSAGE_CHILDREN),
        "size_mb": Path(path).stat().st_size / 1e6,
        "parameter_sets": report.parameter_sets,
        "classes": report.classes,
        "frames": report.frames,
        "forms": report.canonical_forms,
        "per_area": per_area,
    }


def _child(queue: Any, *args: Any) -> None:
    queue.put(_build_in_child(*args))


def build(max_area: int, jobs: int = 1, cluster: str | None = None) -> dict[str, Any]:
    """A build in a fresh spawned process (not a pool's daemon: it may start its own workers)."""
    with tempfile.TemporaryDirectory() as folder:
        path = str(Path(folder) / "catalog.sqlite3")
        context = multiprocessing.get_context("spawn")
        queue = context.Queue()
        started = time.perf_counter()
        process = context.Process(target=_child, args=(queue, max_area, jobs, cluster, path))
        process.start()
        result: dict[str, Any] = queue.get()
        process.join()
        result["outer_wall"] = time.perf_counter() - started
    return result


def _recorded_forms(areas: list[int]) -> tuple[list[Any], float]:
    """Classify ``areas``, recording the nauty input of every form the classification makes;
    returns the inputs and the CPU seconds of the classification itself."""
    from zoo.catalog.classify import classify_area
    from zoo.core import canonical
    from zoo.core.net import build_net

    wanted: list[tuple[Any, bool]] = []

    def system(p: Any) -> Any:
        wanted.append((p, True))
        return canonical.cycloid_form(p, True)

    def net(p: Any) -> Any:
        wanted.append((p, False))
        return canonical.cycloid_form(p, False)

    started = time.process_time()
    for area in areas:
        classify_area(area, system_form=system, net_form=net)
    seconds = time.process_time() - started
    inputs: list[Any] = []
    for p, marked in wanted:
        if canonical._may_have_twins(p):
            encoding = canonical.encoding_graph(build_net(p), marked)
            inputs.append(canonical._nauty_input(encoding))
        else:
            incidence = canonical._grid_incidence(p, marked)
            inputs.append(canonical._grid_nauty_input(*incidence, p.area))
    return inputs, seconds


def _canon_label_seconds(inputs: list[Any]) -> float:
    """CPU seconds of nauty's one run per form (pynauty's canon_label), graphs built before."""
    import pynauty

    from zoo.core import nautycall

    graphs = [nautycall._pynauty_graph(*nauty_input) for nauty_input in inputs]
    started = time.process_time()
    for graph in graphs:
        pynauty.canon_label(graph)
    return time.process_time() - started


def nauty_alone(max_area: int) -> dict[str, float]:
    """CPU seconds of nauty's own calls for the forms a build to ``max_area`` makes.

    The graphs are built beforehand as pynauty graphs; ``canon_label`` is nauty's one run per
    form (the labelling, which is all nauty must do), ``autgrp`` the second run that the build
    made before it read the group order from the same run (``zoo.core.nautycall``).
    """
    import pynauty

    from zoo.core import nautycall

    inputs, _seconds = _recorded_forms(list(range(1, max_area + 1)))
    labelling = _canon_label_seconds(inputs)
    graphs = [nautycall._pynauty_graph(*nauty_input) for nauty_input in inputs]
    started = time.process_time()
    for graph in graphs:
        pynauty.autgrp(graph)
    group = time.process_time() - started
    started = time.process_time()
    for nauty_input in inputs:
        nautycall.canonical_run(*nauty_input)
    single = time.process_time() - started
    return {"forms": len(graphs), "canon_label": labelling, "autgrp": group, "single": single}


def old_against_fast(max_area: int) -> tuple[float, float]:
    from zoo.catalog.classify import classify_area, explicit_functions

    started = time.process_time()
    for area in range(1, max_area + 1):
        system, net = explicit_functions()
        classify_area(area, system_form=system, net_form=net)
    old = time.process_time() - started
    started = time.process_time()
    for area in range(1, max_area + 1):
        classify_area(area)
    return old, time.process_time() - started


def sample_costs(areas: list[int]) -> list[tuple[int, float, int, float]]:
    """Per area: (area, classification CPU s, nauty forms, nauty's own CPU s for them)."""
    costs = []
    for area in areas:
        inputs, seconds = _recorded_forms([area])
        nauty = _canon_label_seconds(inputs)
        costs.append((area, seconds, len(inputs), nauty))
        print(
            f"  area {area}: classification {seconds:.2f} s CPU, {len(inputs):,} nauty forms; "
            f"nauty alone {nauty:.2f} s ({1000 * nauty / len(inputs):.1f} ms per form, "
            f"{100 * nauty / seconds:.0f}% of the classification)",
            flush=True,
        )
    return costs


def fit(points: list[tuple[int, float]]) -> tuple[float, float]:
    """Least squares of log(seconds) = log(c) + k log(A) over (area, seconds) points."""
    logs = [(math.log(a), math.log(s)) for a, s in points if s > 0]
    n = len(logs)
    mx = sum(x for x, _ in logs) / n
    my = sum(y for _, y in logs) / n
    k = sum((x - mx) * (y - my) for x, y in logs) / sum((x - mx) ** 2 for x, _ in logs)
    return math.exp(my - k * mx), k


def _load() -> str:
    one, five, fifteen = os.getloadavg()
    return f"{one:.2f} {five:.2f} {fifteen:.2f} (1, 5, 15 min)"


def _stages(result: dict[str, Any]) -> str:
    s = result["stages"]
    return (
        f"algebra {s.get('classify_algebra', 0):.1f} s, nauty+input "
        f"{s.get('classify_canonical', 0):.1f} s, writer {s.get('write', 0):.1f} s"
    )


def _line(label: str, r: dict[str, Any]) -> str:
    return (
        f"{label}: wall {r['wall']:.1f} s, CPU of the writer process {r['writer_cpu']:.1f} s, "
        f"of its workers {r['workers_cpu']:.1f} s "
        f"({_stages(r)}, wall per stage); peak memory writer "
        f"{r['peak_writer_mb']:.0f} MB, workers {r['peak_child_mb']:.0f} MB; catalog "
        f"{r['size_mb']:.1f} MB; {r['parameter_sets']:,} parameter sets, {r['classes']:,} "
        f"classes, {r['frames']:,} frames, {r['forms']:,} nauty forms; load average at the "
        f"end {_load()}"
    )


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--area-200", action="store_true", help="also build to 200 (minutes)")
    parser.add_argument("--area-300", action="store_true", help="also build to 300 (minutes)")
    parser.add_argument("--old-area", type=int, default=30, help="bound of the old-path check")
    parser.add_argument("--machines", type=int, nargs="*", default=[1, 4, 16])
    parser.add_argument("--cores", type=int, default=2, help="worker processes per machine")
    parser.add_argument(
        "--sample-areas", type=int, nargs="*", default=[60, 80, 100, 120, 150, 200, 250, 300]
    )
    parser.add_argument(
        "--parts",
        nargs="*",
        default=["60", "100", "cluster"],
        help="builds to run: 60 (against nauty alone), 100 (1 process), cluster (100 with "
        "--jobs 2 and --cluster local:2); the old-path check and the fit always run",
    )
    args = parser.parse_args()
    from zoo.catalog.enumeration import parameter_set_count
    from zoo.core import nautycall

    print(f"load average at start: {_load()} (2-core machine, shared)")
    print(f"nauty: {nautycall.single_run_status()}")
    biggest: dict[str, Any] | None = None
    if "60" in args.parts:
        single60 = build(60, jobs=1)
        nauty60 = nauty_alone(60)
        print(_line("build to 60, 1 process", single60))
        once, cpu = nauty60["canon_label"], single60["writer_cpu"]
        print(
            f"  nauty alone for the same {nauty60['forms']:,} forms, graphs built beforehand: "
            f"{once:.2f} s CPU for one run each (canon_label), {nauty60['autgrp']:.2f} s for the "
            f"second run (autgrp) the build no longer makes; the single run with its input "
            f"(zoo.core.nautycall) {nauty60['single']:.2f} s"
        )
        print(
            f"  build CPU {cpu:.2f} s / nauty's one run per form {once:.2f} s = {cpu / once:.2f} "
            f"(target <= 2; against the former two runs {cpu / (once + nauty60['autgrp']):.2f}; "
            f"wall / nauty {single60['wall'] / once:.2f} at this load)"
        )
    if "100" in args.parts:
        biggest = build(100, jobs=1)
        print(_line("build to 100, 1 process", biggest))
    if "cluster" in args.parts:
        jobs2 = build(100, jobs=2)
        print(_line("build to 100, --jobs 2", jobs2))
        cluster2 = build(100, cluster="local:2")
        print(
            _line("build to 100, --cluster local:2", cluster2)
            + f" (with cluster start {cluster2['outer_wall']:.1f} s)"
        )
    for bound, wanted in ((200, args.area_200), (300, args.area_300)):
        if wanted:
            biggest = build(bound, jobs=2)
            print(_line(f"build to {bound}, --jobs 2", biggest))
    old, fast = old_against_fast(args.old_area)
    print(
        f"classification to {args.old_area}, 1 process: explicit-net path {old:.2f} s CPU, "
        f"fast path {fast:.2f} s CPU ({old / fast:.1f}x)"
    )
    print(f"classification CPU of single areas (load {_load()}):")
    samples = sample_costs(args.sample_areas)
    c, k = fit([(a, seconds) for a, seconds, _f, _n in samples])
    nc, nk = fit([(a, nauty) for a, _s, _f, nauty in samples])
    print(f"cost per area, fitted on those: {c:.3g} * A^{k:.2f} s CPU")
    print(f"nauty's own cost per area (one run per form): {nc:.3g} * A^{nk:.2f} s CPU")

    def per_area(a: int) -> float:
        # The classification of an area costs at least nauty's runs in it: far beyond the
        # samples the steeper of the two fits decides.
        return float(max(c * a**k, nc * a**nk))

    for bound in (200, 300):
        cpu = sum(per_area(a) for a in range(1, bound + 1))
        floor = sum(nc * a**nk for a in range(1, bound + 1))
        print(
            f"  build to {bound} by the fits: classification {cpu:.0f} s CPU ({cpu / 2:.0f} s wall "
            f"on 2 cores), of which nauty's own runs {floor:.0f} s CPU: the floor is "
            f"{floor / 2:.0f} s wall on 2 cores"
        )
    if biggest is not None:
        top = biggest["per_area"][-1][0]
        measured = biggest["writer_cpu"] + biggest["workers_cpu"]
        predicted = sum(per_area(a) for a in range(1, top + 1))
        print(
            f"  check: the build to {top} took {measured:.0f} s CPU (writer and workers), the "
            f"fits predict {predicted:.0f} s CPU for its classification"
        )
    total = sum(per_area(a) for a in range(1, 1001))
    largest = per_area(1000)
    sets = sum(parameter_set_count(a) for a in range(1, 1001))
    size = (
        ""
        if biggest is None
        else (
            f", catalog about {biggest['size_mb'] * sets / biggest['parameter_sets'] / 1000:.1f} GB"
        )
    )  # bytes grow with the parameter sets stored
    print(
        f"prediction to 1,000: {total / 3600:.2f} CPU hours over 1,000 tasks (largest "
        f"{largest:.0f} s), {sets:,} parameter sets{size}"
    )
    for machines in args.machines:
        workers = machines * args.cores
        wall = max(total / workers, largest)
        print(f"  {machines} machine(s) x {args.cores} workers: about {wall / 60:.0f} min wall")


if __name__ == "__main__":
    main()
