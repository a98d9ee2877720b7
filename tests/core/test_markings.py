"""Reachability of markings by circuit token counts, checked against explicit search.

The rule (Commoner, Holt, Even, Pnueli 1971; Murata 1989 §V): in a live, strongly connected
marked graph, M' is reachable from M iff every directed circuit carries as many tokens under M'
as under M. The reference here is the explicit reachability graph (breadth-first search) and
networkx's shortest paths on it.
"""

from __future__ import annotations

import random

import networkx as nx
import pytest

from zoo.core.markings import firing_counts, firing_sequence, unequal_circuit
from zoo.core.net import build_net
from zoo.core.params import ParameterSet as C
from zoo.core.reachability import reachability_graph, reachability_to_networkx

SYSTEMS = [
    C(4, 2, 2, 3),
    C(3, 3, 1, 3),
    C(3, 3, 2, 2),
    C(2, 2, 1, 3),
    C(1, 10, 1, 5),
    C(2, 5, 1, 5),
]


def fire(net, marking, t):  # type: ignore[no-untyped-def]
    after = list(marking)
    for j in net.input_places(t):
        after[j] -= 1
    for j in net.output_places(t):
        after[j] += 1
    return after


@pytest.mark.parametrize("p", SYSTEMS, ids=str)
def test_shortest_firing_sequences_match_breadth_first_search(p: C) -> None:
    net = build_net(p)
    rg = reachability_graph(net)
    graph = reachability_to_networkx(rg)
    distances = nx.single_source_shortest_path_length(graph, 0)
    for state in range(rg.state_count):
        target = rg.marking(state)
        sequence = firing_sequence(net, net.tokens, target)
        assert sequence is not None and len(sequence) == distances[state]
        marking = list(net.tokens)
        for t in sequence:
            assert all(marking[j] for j in net.input_places(t)), "fired a disabled transition"
            marking = fire(net, marking, t)
        assert tuple(marking) == target
        assert unequal_circuit(net, net.tokens, target) is None


@pytest.mark.parametrize("p", SYSTEMS, ids=str)
def test_moved_tokens_are_reachable_exactly_when_explicit_search_finds_them(p: C) -> None:
    net = build_net(p)
    reachable = set(reachability_graph(net).iter_markings())
    rng = random.Random(p.area)
    start = list(net.tokens)
    refused = 0
    for _ in range(200):
        marking = start[:]
        for _ in range(rng.randint(0, 6)):  # a random walk in the reachability graph
            enabled = [
                t
                for t in range(net.transition_count)
                if all(marking[j] for j in net.input_places(t))
            ]
            marking = fire(net, marking, rng.choice(enabled))
        source, target = (
            [j for j, k in enumerate(marking) if k],
            [j for j, k in enumerate(marking) if not k],
        )
        moved = marking[:]
        moved[rng.choice(source)] -= 1  # move one token to another place
        moved[rng.choice(target)] += 1
        expected = tuple(moved) in reachable
        assert (firing_counts(net, net.tokens, moved) is not None) is expected
        circuit = unequal_circuit(net, net.tokens, moved)
        if expected:
            assert circuit is None
            continue
        refused += 1
        assert circuit is not None
        # a directed circuit: each place's output transition is the next place's input one
        for here, nxt in zip(circuit, circuit[1:] + circuit[:1], strict=True):
            assert net.post[here] == net.pre[nxt]
        assert len({net.pre[j] for j in circuit}) == len(circuit)  # simple
        assert sum(net.tokens[j] for j in circuit) != sum(moved[j] for j in circuit)
        assert firing_sequence(net, net.tokens, moved) is None
    assert refused > 50


@pytest.mark.parametrize("p", SYSTEMS[:4], ids=str)
def test_backward_search_finds_the_initial_marking_at_the_forward_distance(p: C) -> None:
    from dataclasses import replace

    from zoo.core.markings import nearest_earlier_marking

    net = build_net(p)
    rg = reachability_graph(net)
    distances = nx.single_source_shortest_path_length(reachability_to_networkx(rg), 0)
    for state in range(0, rg.state_count, max(1, rg.state_count // 15)):
        moved = replace(net, tokens=rg.marking(state))
        found = nearest_earlier_marking(moved, lambda m: m == net.tokens, 10_000)
        assert found is not None
        marking, sequence = found
        assert marking == net.tokens and len(sequence) == distances[state]
        current = list(marking)
        for t in sequence:
            assert all(current[j] for j in net.input_places(t))
            current = fire(net, current, t)
        assert tuple(current) == rg.marking(state)


@pytest.mark.parametrize("p", SYSTEMS[:4], ids=str)
def test_class_signature_names_exactly_the_reachable_markings(p: C) -> None:
    # Equal signatures iff the state equation has a solution (the explicit reachability graph
    # gives the reachable markings; moved tokens give others, reachable or not).
    from zoo.core.markings import class_signature

    net = build_net(p)
    reachable = set(reachability_graph(net).iter_markings())
    start = class_signature(net, net.tokens)
    assert {class_signature(net, m) for m in reachable} == {start}
    rng = random.Random(p.area)
    for _ in range(100):
        moved = list(rng.choice(sorted(reachable)))
        moved[rng.choice([j for j, k in enumerate(moved) if k])] -= 1
        moved[rng.randrange(len(moved))] += 1
        same = class_signature(net, moved) == start
        assert same == (firing_counts(net, net.tokens, moved) is not None)
        assert same == (tuple(moved) in reachable)  # Commoner et al.: live, so no gap


@pytest.mark.parametrize("p", [C(2, 2, 1, 1), C(3, 2, 1, 1), C(2, 1, 2, 2), C(1, 4, 1, 2)], ids=str)
def test_orbit_of_the_initial_marking_matches_networkx_isomorphisms(p: C) -> None:
    # The images of M0 under every automorphism of the unmarked net, enumerated by networkx's
    # matcher on the net as a directed graph, are exactly the orbit built from nauty's
    # generators; each recorded automorphism keeps the arcs and maps M0 onto its image.
    from networkx.algorithms.isomorphism import DiGraphMatcher

    from zoo.core.markings import marking_orbit, net_automorphisms, orbit_automorphism

    net = build_net(p)
    graph = nx.DiGraph()
    for t in range(net.transition_count):
        graph.add_node(("t", t), kind="t")
    for j in range(net.place_count):
        graph.add_node(("p", j), kind="p")
        graph.add_edge(("t", net.pre[j]), ("p", j))
        graph.add_edge(("p", j), ("t", net.post[j]))
    matcher = DiGraphMatcher(graph, graph, node_match=lambda a, b: a["kind"] == b["kind"])
    expected = set()
    for iso in matcher.isomorphisms_iter():
        image = [0] * net.place_count
        for j in range(net.place_count):
            image[iso[("p", j)][1]] = net.tokens[j]
        expected.add(tuple(image))
    generators = net_automorphisms(net)
    orbit = marking_orbit(net, net.tokens, generators, 10_000)
    assert set(orbit) == expected
    for image in orbit:
        moves, place_moves = orbit_automorphism(net, orbit, generators, image)
        for j, k in enumerate(place_moves):
            assert net.pre[k] == moves[net.pre[j]] and net.post[k] == moves[net.post[j]]
            assert image[k] == net.tokens[j]


@pytest.mark.parametrize("p", SYSTEMS[:4], ids=str)
def test_nearest_source_agrees_with_firing_counts_one_by_one(p: C) -> None:
    # The batched state equation gives, for every source, the answer of firing_counts; the chosen
    # source has the smallest total, and breadth-first distances (networkx) confirm it.
    from zoo.core.markings import nearest_source

    net = build_net(p)
    rg = reachability_graph(net)
    markings = list(rg.iter_markings())
    rng = random.Random(p.area)
    sources = rng.sample(markings, min(12, len(markings)))
    moved = list(sources[0])
    moved[moved.index(1)] -= 1
    moved[moved.index(0)] += 1
    sources.append(tuple(moved))  # in no class of the others, or in theirs: either is fine
    graph = reachability_to_networkx(rg)
    index = {m: s for s, m in enumerate(markings)}
    for target in rng.sample(markings, min(8, len(markings))):
        found = nearest_source(net, sources, target, chunk=5)
        one_by_one = [firing_counts(net, s, target) for s in sources]
        totals = [sum(c) for c in one_by_one if c is not None]
        assert found is not None
        chosen, counts = found
        assert counts == one_by_one[chosen] and sum(counts) == min(totals)
        lengths = [
            nx.shortest_path_length(graph, index[s], index[target]) for s in sources if s in index
        ]
        assert sum(counts) == min(lengths)
    assert nearest_source(net, [tuple(moved)], net.tokens) is None or tuple(moved) in index
