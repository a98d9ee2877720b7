"""The shared graph searches (zoo.core.structure) agree with networkx, the reference library,
on random directed graphs and on cycloid nets; the structure checks of a marked graph use them.
"""

from __future__ import annotations

import random

import networkx as nx
import pytest

from zoo.core import structure
from zoo.core.net import build_net
from zoo.core.params import ParameterSet


def _random_graph(seed: int) -> list[list[int]]:
    rng = random.Random(seed)
    n = rng.randint(1, 30)
    density = rng.choice((0.02, 0.05, 0.1, 0.3))
    return [[v for v in range(n) if rng.random() < density] for _ in range(n)]


def _to_networkx(successors: list[list[int]]) -> nx.DiGraph:
    graph = nx.DiGraph()
    graph.add_nodes_from(range(len(successors)))
    graph.add_edges_from((u, v) for u, targets in enumerate(successors) for v in targets)
    return graph


SEEDS = range(300)


@pytest.mark.parametrize("seed", SEEDS)
def test_searches_agree_with_networkx(seed: int) -> None:
    successors = _random_graph(seed)
    graph = _to_networkx(successors)
    n = len(successors)
    start = seed % n
    seen = structure.reachable(successors, start)
    assert {v for v in range(n) if seen[v]} == nx.descendants(graph, start) | {start}
    lengths = nx.single_source_shortest_path_length(graph, start)
    assert structure.distances(successors, start) == [lengths.get(v, -1) for v in range(n)]
    assert structure.is_strongly_connected(successors) == nx.is_strongly_connected(graph)
    components = structure.strongly_connected_components(successors)
    assert {frozenset(c) for c in components} == {
        frozenset(c) for c in nx.strongly_connected_components(graph)
    }
    # Reverse topological order: no arc from an earlier component to a later one.
    position = {v: i for i, c in enumerate(components) for v in c}
    assert all(position[u] >= position[v] for u, v in graph.edges)
    missing = structure.first_unreached(successors, start)
    if missing is None:
        assert nx.is_strongly_connected(graph)
    else:
        backwards, node = missing
        assert not (
            nx.has_path(graph, node, start) if backwards else nx.has_path(graph, start, node)
        )


@pytest.mark.parametrize("seed", SEEDS)
def test_find_cycle_agrees_with_networkx(seed: int) -> None:
    successors = _random_graph(seed)
    labelled = [[(100 * u + v, v) for v in targets] for u, targets in enumerate(successors)]
    found = structure.find_cycle(labelled)
    graph = _to_networkx(successors)
    assert (found is None) == nx.is_directed_acyclic_graph(graph)
    if found is not None:
        start, steps = found
        assert steps[-1][0] == start
        walk = [start, *(node for node, _ in steps)]
        for (u, v), (_, label) in zip(zip(walk, walk[1:], strict=False), steps, strict=True):
            assert graph.has_edge(u, v) and label == 100 * u + v
        assert len(set(walk[1:])) == len(steps)  # a simple cycle


def test_deep_graphs_need_no_recursion() -> None:
    # A path of 100,000 nodes closed into one cycle: far past Python's recursion limit.
    n = 100_000
    successors = [[(v + 1) % n] for v in range(n)]
    assert structure.is_strongly_connected(successors)
    assert len(structure.strongly_connected_components(successors)) == 1
    assert structure.distances(successors, 0)[-1] == n - 1
    found = structure.find_cycle([[(v, (v + 1) % n)] for v in range(n)])
    assert found is not None and len(found[1]) == n


@pytest.mark.parametrize("p", [ParameterSet(4, 2, 2, 3), ParameterSet(3, 3, 1, 5)])
def test_cycloid_transition_graph_is_strongly_connected(p: ParameterSet) -> None:
    # docs/theory/cycles-and-tokens.md: a cycloid's net is strongly connected; networkx agrees.
    net = build_net(p)
    successors: list[list[int]] = [[] for _ in net.transitions]
    for u, v in zip(net.pre, net.post, strict=True):
        successors[u].append(v)
    assert structure.is_strongly_connected(successors)
    assert nx.is_strongly_connected(_to_networkx(successors))
    # Every cycle carries a token (live); the token-free places form no cycle.
    empty = [[] for _ in net.transitions]  # type: list[list[tuple[int, int]]]
    for j, (u, v) in enumerate(zip(net.pre, net.post, strict=True)):
        if net.tokens[j] == 0:
            empty[u].append((j, v))
    assert structure.find_cycle(empty) is None
