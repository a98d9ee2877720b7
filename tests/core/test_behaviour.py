"""Behaviour classes: systems whose reachability graphs are isomorphic.

The reference is networkx's general graph isomorphism (VF2) on the reachability graphs, with the
initial marking marked; zoo's decision uses its own invariants and VF2++ on refined colours.
"""

from __future__ import annotations

import random
from itertools import combinations

import networkx as nx
import pytest

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core.algebra import class_key
from zoo.core.behaviour import (
    StateGraph,
    behaviour_profile,
    check_state_map,
    compare_behaviour,
    state_graph,
    state_graph_isomorphism,
)
from zoo.core.invariants import reachable_state_count, state_arc_count
from zoo.core.params import ParameterSet as C


def as_networkx(graph: StateGraph) -> nx.DiGraph:
    result = nx.DiGraph()
    for state, targets in enumerate(graph.successors):
        result.add_node(state, start=state == 0)
        result.add_edges_from((state, t) for t in targets)
    return result


def class_labels(max_area: int) -> list[C]:
    labels: dict[object, C] = {}
    for area in range(2, max_area + 1):
        for p in iter_parameter_sets(area):
            labels.setdefault(class_key(p), p)
    return sorted(labels.values(), key=lambda p: (p.area, p))


def test_decisions_agree_with_networkx_on_every_pair_of_small_classes() -> None:
    labels = class_labels(14)
    by_size: dict[tuple[int, int], list[C]] = {}
    for p in labels:
        by_size.setdefault((reachable_state_count(p), state_arc_count(p)), []).append(p)
    pairs = merges = 0
    for group in by_size.values():
        for p, q in combinations(group, 2):
            answer = compare_behaviour(p, q)
            reference = nx.is_isomorphic(
                as_networkx(state_graph(p)),
                as_networkx(state_graph(q)),
                node_match=lambda a, b: a["start"] == b["start"],
            )
            assert answer.same is reference, (p, q, answer.evidence)
            if answer.same:
                merges += 1
                assert answer.state_map is not None
                check_state_map(state_graph(p), state_graph(q), answer.state_map)
            pairs += 1
    assert pairs > 200 and merges > 50


def test_different_classes_with_the_same_behaviour() -> None:
    # C(1,2,1,3) and C(1,3,1,2): area 5, different token counts (3 and 4), so different classes;
    # with min(α, β) = 1 one transition is enabled in every marking, and both state graphs are
    # one directed cycle through the 5 markings.
    assert class_key(C(1, 2, 1, 3)) != class_key(C(1, 3, 1, 2))
    answer = compare_behaviour(C(1, 2, 1, 3), C(1, 3, 1, 2))
    assert answer.same is True and answer.state_map is not None


def test_same_size_different_behaviour_names_its_evidence() -> None:
    # C(3,3,1,3) and C(3,3,2,2) both have 40 states and 72 arcs (docs/theory/check-values.md);
    # they are not isomorphic (networkx agrees in the test above).
    answer = compare_behaviour(C(3, 3, 1, 3), C(3, 3, 2, 2))
    assert answer.same is False and answer.evidence


def test_profile_and_isomorphism_survive_relabelling_the_states() -> None:
    rng = random.Random(7)
    for p in (C(4, 2, 2, 3), C(3, 3, 1, 3), C(2, 5, 1, 5)):
        graph = state_graph(p)
        order = list(range(1, graph.state_count))
        rng.shuffle(order)
        relabel = [0, *order]  # the initial marking stays state 0
        inverse = {old: new for new, old in enumerate(relabel)}
        shuffled = StateGraph(
            tuple(
                tuple(sorted(inverse[t] for t in graph.successors[relabel[new]]))
                for new in range(graph.state_count)
            )
        )
        assert behaviour_profile(shuffled) == behaviour_profile(graph)
        mapping = state_graph_isomorphism(graph, shuffled)
        assert mapping is not None
        check_state_map(graph, shuffled, mapping)


@pytest.mark.parametrize("max_area", [40])
def test_states_are_at_least_the_area(max_area: int) -> None:
    # Derived: A·C(α+β, α)/(α+β) >= A because C(n, α) >= n for 1 <= α <= n - 1; so a class
    # with s states has area at most s.
    for area in range(2, max_area + 1):
        for p in iter_parameter_sets(area):
            assert reachable_state_count(p) >= area


def test_a_minimal_recurrent_sequence_fires_each_transition_once_without_repeating() -> None:
    # Derived fact behind the bound above, checked by explicit firing on small systems: some
    # sequence of A firings from M0 returns to M0, firing every transition once and visiting
    # A distinct markings.
    from zoo.core.net import build_net

    for p in class_labels(10):
        net = build_net(p)
        marking = list(net.tokens)
        fired: list[int] = []
        seen = {tuple(marking)}
        for _ in range(p.area):
            t = next(
                t
                for t in range(net.transition_count)
                if t not in fired and all(marking[j] for j in net.input_places(t))
            )
            for j in net.input_places(t):
                marking[j] -= 1
            for j in net.output_places(t):
                marking[j] += 1
            fired.append(t)
            seen.add(tuple(marking))
        assert sorted(fired) == list(range(p.area)) and tuple(marking) == net.tokens
        assert len(seen) == p.area


def test_the_fast_read_back_agrees_with_the_synthesized_net() -> None:
    # own_net_read_back decides with the known transition names what synthesized_net computes
    # from the unlabelled graph; nauty's canonical forms are the reference for "gives back the
    # class's own net".
    from zoo.core.behaviour import firing_arcs, own_net_read_back, synthesized_net
    from zoo.core.canonical import canonical_form
    from zoo.core.net import build_net

    checked = given_back = 0
    for p in class_labels(22):
        if min(p.alpha, p.beta) == 1 or reachable_state_count(p) > 3_000:
            continue
        net = build_net(p)
        synthesized = synthesized_net(state_graph(p))
        expected = (
            synthesized is not None
            and canonical_form(synthesized.net).fingerprint == canonical_form(net).fingerprint
        )
        assert own_net_read_back(net, firing_arcs(net)[1]) is expected, p
        checked += 1
        given_back += expected
    assert checked > 250 and given_back == checked  # no cycloid up to 22 hides its net


def test_the_fast_read_back_refuses_a_net_with_a_place_too_many() -> None:
    # An implied place (a copy of the path t -> u -> v with its tokens) leaves the state graph
    # unchanged, so the net read back from it lacks that place: not the net itself.
    from zoo.core.behaviour import firing_arcs, own_net_read_back
    from zoo.core.net import MarkedGraph, build_net
    from zoo.core.reachability import reachability_graph

    net = build_net(C(3, 3, 1, 3))
    first = 0
    second = next(j for j in range(net.place_count) if net.pre[j] == net.post[first])
    extra = MarkedGraph(
        transitions=net.transitions,
        places=(*net.places, "implied"),
        pre=(*net.pre, net.pre[first]),
        post=(*net.post, net.post[second]),
        tokens=(*net.tokens, net.tokens[first] + net.tokens[second]),
    )
    assert own_net_read_back(net, firing_arcs(net)[1]) is True
    assert reachability_graph(extra).state_count == reachability_graph(net).state_count
    assert own_net_read_back(extra, firing_arcs(extra)[1]) is False


def test_firing_arcs_are_the_reachability_graph() -> None:
    # The build's fast search against zoo.core.reachability's general one (markings as place
    # bit masks in both), on every class up to area 14 and a few large ones.
    from zoo.core.behaviour import firing_arcs
    from zoo.core.net import build_net
    from zoo.core.reachability import reachability_graph

    labels = [p for p in class_labels(14) if reachable_state_count(p) <= 5_000]
    for p in [*labels, C(7, 7, 1, 4), C(4, 4, 10, 12)]:
        net = build_net(p)
        reference = reachability_graph(net)
        markings, arcs = firing_arcs(net)
        assert markings[0] == reference.codes[0] and len(markings) == reference.state_count
        assert {(markings[s], t, markings[u]) for s, t, u in arcs.tolist()} == {
            (reference.codes[s], t, reference.codes[u]) for s, t, u in reference.arcs
        }, p


def test_behaviour_keys_agree_with_networkx_on_every_pair_of_small_classes() -> None:
    # Equal keys exactly when the reachability graphs are isomorphic (networkx VF2, initial
    # marking to initial marking): the keys the catalog stores.
    from zoo.core.behaviour import behaviour_key
    from zoo.core.canonical import canonical_form
    from zoo.core.net import build_net

    by_size: dict[tuple[int, int], list[C]] = {}
    for p in class_labels(12):
        by_size.setdefault((reachable_state_count(p), state_arc_count(p)), []).append(p)
    keys = {
        p: behaviour_key(p, canonical_form(build_net(p)).fingerprint)
        for group in by_size.values()
        for p in group
    }
    same = 0
    for group in by_size.values():
        for p, q in combinations(group, 2):
            key_p, key_q = keys[p], keys[q]
            assert key_p is not None and key_q is not None
            reference = nx.is_isomorphic(
                as_networkx(state_graph(p)),
                as_networkx(state_graph(q)),
                node_match=lambda a, b: a["start"] == b["start"],
            )
            assert (key_p.key == key_q.key) is reference, (p, q)
            same += reference
    assert same > 20
