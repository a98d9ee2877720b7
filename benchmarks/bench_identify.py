"""How long ``identify`` takes to name every class up to an area from its exported PNML.

Prints figures (not a test): for each area up to --max-area, the classes, the seconds to export
their label's net, read it back and identify it without a catalog (zoo.interchange.identify),
and the slowest single net. tests/interchange/test_identify.py checks the answers for every
class up to area 30 (with renamed and shuffled files).

    .venv/bin/python benchmarks/bench_identify.py --max-area 30
"""

from __future__ import annotations

import argparse
import time

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core.algebra import class_key
from zoo.core.net import build_net
from zoo.core.params import ParameterSet
from zoo.interchange.identify import identify_net
from zoo.interchange.pnml import parse_pnml, pnml_document


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--max-area", type=int, default=30)
    args = parser.parse_args()
    print(f"{'area':>4} {'classes':>8} {'seconds':>9} {'slowest net':>24}")
    total = 0.0
    for area in range(2, args.max_area + 1):
        representatives: dict[object, ParameterSet] = {}
        for p in iter_parameter_sets(area):
            representatives.setdefault(class_key(p), p)
        spent, slowest, slowest_p = 0.0, 0.0, None
        for p in representatives.values():
            started = time.perf_counter()
            answer = identify_net(
                parse_pnml(pnml_document(build_net(p)).encode(), str(p)), use_catalog=False
            )
            seconds = time.perf_counter() - started
            if not answer.cycloid:
                raise SystemExit(f"{p} was not identified: {answer.reason}")
            spent += seconds
            if seconds > slowest:
                slowest, slowest_p = seconds, p
        total += spent
        print(
            f"{area:>4} {len(representatives):>8} {spent:>9.3f} {f'{slowest_p} {slowest:.3f}':>24}"
        )
    print(f"total {total:.2f} s")


if __name__ == "__main__":
    main()
