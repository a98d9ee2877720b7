"""How long ``identify`` takes to recognise a cycloid's net in a reachable marking.

Prints figures (not a test): for each area up to --max-area, every class's label net after a
random firing sequence (seeded, up to 3·A steps, chosen on the net itself), read back from PNML
and identified without a catalog; the seconds, how many answers were "initial" and "reachable",
the longest firing sequence reported, and the slowest net. Then a few larger nets, among them the
ones whose automorphisms are many (C(1,1,1,n), C(2,2,1,n)) or too many to list
(C(1, n+2, 1, n), decided by explicit search). tests/interchange/test_identify.py checks the
answers on a sample up to area 30 and against networkx on small nets.

    .venv/bin/python benchmarks/bench_identify_reachable.py --max-area 30
"""

from __future__ import annotations

import argparse
import random
import time
from dataclasses import replace

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core.algebra import class_key
from zoo.core.net import build_net
from zoo.core.params import ParameterSet
from zoo.interchange.identify import identify_net
from zoo.interchange.pnml import parse_pnml, pnml_document

LARGER = [
    ParameterSet(4, 2, 2, 3),
    ParameterSet(1, 1, 1, 99),
    ParameterSet(2, 2, 1, 99),
    ParameterSet(1, 52, 1, 50),
    ParameterSet(3, 5, 40, 1),
    ParameterSet(4, 2, 50, 75),
    ParameterSet(3, 5, 200, 1),
    ParameterSet(10, 10, 50, 50),
]


def fired(p: ParameterSet, rng: random.Random, steps: int) -> tuple[object, int]:
    net = build_net(p)
    marking = list(net.tokens)
    for _ in range(steps):
        enabled = [
            t for t in range(net.transition_count) if all(marking[j] for j in net.input_places(t))
        ]
        t = rng.choice(enabled)
        for j in net.input_places(t):
            marking[j] -= 1
        for j in net.output_places(t):
            marking[j] += 1
    foreign = parse_pnml(pnml_document(build_net(p)).encode(), str(p))
    return replace(foreign, tokens=tuple(marking)), steps


def identify_fired(p: ParameterSet, rng: random.Random, steps: int) -> tuple[float, object]:
    net, _ = fired(p, rng, steps)
    started = time.perf_counter()
    answer = identify_net(net, use_catalog=False)  # type: ignore[arg-type]
    seconds = time.perf_counter() - started
    if not answer.cycloid or answer.params is None or class_key(answer.params) != class_key(p):
        raise SystemExit(f"{p} after {steps} firings was not recognised: {answer.reason}")
    return seconds, answer


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--max-area", type=int, default=30)
    parser.add_argument("--seed", type=int, default=1971)
    args = parser.parse_args()
    rng = random.Random(args.seed)
    print(
        f"{'area':>4} {'classes':>8} {'seconds':>8} {'initial':>8} {'reachable':>9} "
        f"{'longest':>7} {'slowest net':>24}"
    )
    total = 0.0
    for area in range(2, args.max_area + 1):
        representatives: dict[object, ParameterSet] = {}
        for p in iter_parameter_sets(area):
            representatives.setdefault(class_key(p), p)
        spent, slowest, slowest_p, kinds, longest = 0.0, 0.0, None, [0, 0], 0
        for p in representatives.values():
            seconds, answer = identify_fired(p, rng, rng.randint(1, 3 * area))
            spent += seconds
            kinds[answer.marking == "reachable"] += 1  # type: ignore[attr-defined]
            longest = max(longest, len(answer.firing))  # type: ignore[attr-defined]
            if seconds > slowest:
                slowest, slowest_p = seconds, p
        total += spent
        print(
            f"{area:>4} {len(representatives):>8} {spent:>8.3f} {kinds[0]:>8} {kinds[1]:>9} "
            f"{longest:>7} {f'{slowest_p} {slowest:.3f}':>24}"
        )
    print(f"total {total:.2f} s")
    print(f"\n{'net':>18} {'area':>5} {'seconds':>8} {'marking':>10} {'firings':>8}")
    for p in LARGER:
        seconds, answer = identify_fired(p, rng, 2 * p.area)
        print(
            f"{str(p):>18} {p.area:>5} {seconds:>8.3f} {answer.marking:>10} "  # type: ignore[attr-defined]
            f"{len(answer.firing):>8}"  # type: ignore[attr-defined]
        )


if __name__ == "__main__":
    main()
