"""How long the explicit net of a cycloid takes to build (zoo.core.net.build_net).

Prints figures (not a test): for area-200 systems of different shapes, the best and the median
of --repeat builds in milliseconds. The target is a few milliseconds per area-200 net.

    .venv/bin/python benchmarks/bench_net.py --repeat 50
"""

from __future__ import annotations

import argparse
import statistics
import time

from zoo.core.net import build_net
from zoo.core.params import ParameterSet

#: Area 200 three ways: two long processes, a square, one long forward cycle.
SYSTEMS = (ParameterSet(1, 1, 100, 100), ParameterSet(10, 10, 10, 10), ParameterSet(199, 1, 1, 1))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=20)
    args = parser.parse_args()
    print(f"{'system':<18} {'area':>5} {'best ms':>9} {'median ms':>10}")
    for p in SYSTEMS:
        times = []
        for _ in range(args.repeat):
            started = time.perf_counter()
            build_net(p)
            times.append((time.perf_counter() - started) * 1000)
        print(f"{str(p):<18} {p.area:>5} {min(times):>9.2f} {statistics.median(times):>10.2f}")


if __name__ == "__main__":
    main()
