"""Benchmark: canonical forms (nauty) and explicit nets of large-area cycloids.

Times ``build_net`` and ``canonical_form`` for one parameter set of every algebraic class
(system forms) and of every algebraic frame (net forms) of the given areas, and prints the
mean, median, 95th percentile and maximum, with the slowest cases. Issue 2 asks for canonical
forms of area-200 systems in under 50 ms each.

    .venv/bin/python benchmarks/bench_canonical.py              # area 200
    .venv/bin/python benchmarks/bench_canonical.py --area 100 --area 200 --sample 300
"""

from __future__ import annotations

import argparse
import random
import statistics
import time
from collections.abc import Callable

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core import algebra
from zoo.core.canonical import canonical_form
from zoo.core.net import build_net
from zoo.core.params import ParameterSet


def representatives(area: int, key: Callable[[ParameterSet], object]) -> list[ParameterSet]:
    """The smallest parameter set of each algebraic class (or frame) of the area."""
    chosen: dict[object, ParameterSet] = {}
    for p in iter_parameter_sets(area):
        chosen.setdefault(key(p), p)
    return list(chosen.values())


def measure(members: list[ParameterSet], marked: bool) -> list[tuple[float, float, ParameterSet]]:
    """(build seconds, canonical-form seconds, parameter set) for each member."""
    timings = []
    for p in members:
        start = time.perf_counter()
        net = build_net(p)
        built = time.perf_counter()
        canonical_form(net, marked=marked)
        done = time.perf_counter()
        timings.append((built - start, done - built, p))
    return timings


def report(title: str, timings: list[tuple[float, float, ParameterSet]]) -> None:
    build = sorted(t[0] * 1000 for t in timings)
    canon = sorted(t[1] * 1000 for t in timings)
    total = sorted((t[0] + t[1]) * 1000 for t in timings)

    def line(name: str, values: list[float]) -> str:
        p95 = values[min(len(values) - 1, int(0.95 * len(values)))]
        return (
            f"  {name:<16} mean {statistics.fmean(values):7.2f} ms   median "
            f"{statistics.median(values):7.2f} ms   p95 {p95:7.2f} ms   max {values[-1]:7.2f} ms"
        )

    print(f"{title}: {len(timings)} cases")
    print(line("build_net", build))
    print(line("canonical_form", canon))
    print(line("both", total))
    slowest = sorted(timings, key=lambda t: t[0] + t[1], reverse=True)[:5]
    print("  slowest: " + ", ".join(f"{p} {(b + c) * 1000:.1f} ms" for b, c, p in slowest))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--area", type=int, action="append", help="area to measure (repeatable)")
    parser.add_argument("--sample", type=int, default=0, help="measure at most this many cases")
    args = parser.parse_args()
    areas = args.area or [200]
    rng = random.Random(1)
    for area in areas:
        for marked, key, level in (
            (True, algebra.class_key, "system forms, one per class"),
            (False, algebra.frame_key, "net forms, one per frame"),
        ):
            members = representatives(area, key)
            if args.sample and len(members) > args.sample:
                members = rng.sample(members, args.sample)
            report(f"area {area}, {level}", measure(members, marked))


if __name__ == "__main__":
    main()
