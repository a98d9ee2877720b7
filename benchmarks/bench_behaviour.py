"""Behaviour classes of every class up to an area: how many, which merge, and what it costs.

Prints figures (not a test): the classes of area <= --max-area with at most --states reachable
states, the groups with equal state and arc counts, the behaviour classes they split into, the
groups that hold more than one net class, and the seconds spent on state graphs and on
synthesized nets (zoo.core.behaviour; docs/theory/behaviour.md).

    .venv/bin/python benchmarks/bench_behaviour.py --max-area 100 --states 10000
"""

from __future__ import annotations

import argparse
import time
from collections import defaultdict

from zoo.catalog.enumeration import iter_parameter_tuples
from zoo.core import algebra, invariants
from zoo.core.behaviour import cycle_order, state_graph, synthesized_net
from zoo.core.canonical import canonical_form
from zoo.core.params import ParameterSet


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--max-area", type=int, default=40)
    parser.add_argument("--states", type=int, default=10_000)
    args = parser.parse_args()
    started = time.perf_counter()
    labels: dict[object, ParameterSet] = {}
    for area in range(2, args.max_area + 1):
        for values in iter_parameter_tuples(area):
            p = ParameterSet(*values)
            labels.setdefault(algebra.class_key(p), p)
    groups: dict[tuple[int, int], list[ParameterSet]] = defaultdict(list)
    for p in labels.values():
        states = invariants.reachable_state_count(p)
        if states <= args.states:
            groups[(states, invariants.state_arc_count(p))].append(p)
    shared = [g for g in groups.values() if len(g) > 1]
    print(f"classes with at most {args.states:,} states: {sum(map(len, groups.values())):,}")
    in_shared = sum(map(len, shared))
    print(f"groups with equal state and arc counts: {len(shared):,} ({in_shared:,} classes)")
    graph_seconds = synth_seconds = 0.0
    behaviour_classes = 0
    merged: list[list[ParameterSet]] = []
    for group in shared:
        tick = time.perf_counter()
        graphs = {p: state_graph(p, args.states) for p in group}
        graph_seconds += time.perf_counter() - tick
        tick = time.perf_counter()
        by_key: dict[object, list[ParameterSet]] = defaultdict(list)
        for p, graph in graphs.items():
            cycle = cycle_order(graph)
            if cycle is not None:
                by_key[("cycle", len(cycle))].append(p)
                continue
            net = synthesized_net(graph)
            key = ("unsynthesized", p) if net is None else canonical_form(net.net).fingerprint
            by_key[key].append(p)
        synth_seconds += time.perf_counter() - tick
        behaviour_classes += len(by_key)
        merged.extend(members for members in by_key.values() if len(members) > 1)
    print(f"behaviour classes in those groups: {behaviour_classes:,}")
    others = [m for m in merged if min(min(p.alpha, p.beta) for p in m) >= 2]
    print(
        f"behaviour classes with several net classes: {len(merged)} "
        f"({len(merged) - len(others)} directed cycles, {len(others)} others)"
    )
    for members in others:
        print("  ", ", ".join(str(p) for p in members))
    print(
        f"seconds: state graphs {graph_seconds:.1f}, synthesized nets {synth_seconds:.1f}, "
        f"total {time.perf_counter() - started:.1f}"
    )


if __name__ == "__main__":
    main()
