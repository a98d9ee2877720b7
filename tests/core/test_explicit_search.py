"""The closed formulas of zoo.core.invariants against explicit search on every small parameter set.

Each formula (docs/theory/initial-marking.md, docs/theory/cycles-and-tokens.md,
docs/theory/minimal-cycle-length.md, docs/theory/processes.md, docs/theory/state-counts.md) is
compared with a computation on the explicit net
that does not use it: breadth-first search for shortest cycles (and networkx as a second
reference), following arcs for forward and backward cycles, the reachability graph for states,
arcs, enabling, liveness, safeness and reversibility, and networkx.simple_cycles for the cycle
time.
"""

from __future__ import annotations

from collections import deque
from fractions import Fraction

import networkx as nx
import pytest

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core import invariants
from zoo.core.net import FORWARD, CycloidNet, build_net, to_networkx
from zoo.core.params import ParameterSet
from zoo.core.reachability import is_live, is_one_safe, is_reversible, reachability_graph


def parameter_sets(max_area: int) -> list[ParameterSet]:
    return [p for a in range(2, max_area + 1) for p in iter_parameter_sets(a)]


def transition_digraph(net: CycloidNet) -> nx.DiGraph:
    """Transitions joined by an arc when a place leads from one to the other."""
    graph = nx.DiGraph()
    graph.add_nodes_from(range(net.transition_count))
    graph.add_edges_from(zip(net.pre, net.post, strict=True))
    return graph


def bfs_girth(net: CycloidNet) -> int:
    """Length (in transitions) of a shortest cycle: BFS from every transition."""
    successors = [net.post[j] for j in range(net.place_count)]
    out: list[list[int]] = [[] for _ in net.transitions]
    for j, t in enumerate(net.pre):
        out[t].append(successors[j])
    best = net.transition_count + 1
    for start in range(net.transition_count):
        distance = {start: 0}
        queue = deque([start])
        while queue:
            t = queue.popleft()
            if distance[t] + 1 >= best:
                break
            for u in out[t]:
                if u == start:
                    best = min(best, distance[t] + 1)
                elif u not in distance:
                    distance[u] = distance[t] + 1
                    queue.append(u)
    return best


def networkx_girth(net: CycloidNet) -> int:
    """Shortest directed cycle by networkx: min over arcs (u, v) of 1 + dist(v, u)."""
    graph = transition_digraph(net)
    lengths = dict(nx.all_pairs_shortest_path_length(graph))
    return min(1 + lengths[v][u] for u, v in graph.edges if u in lengths[v])


def test_minimal_cycle_length_against_bfs() -> None:
    # docs/theory/minimal-cycle-length.md exact algorithm [VERIFIED = BFS girth for all parameters
    # <= 7 there]
    for p in parameter_sets(32):
        assert invariants.minimal_cycle_length(p) == bfs_girth(build_net(p)), p


def test_bfs_girth_against_networkx() -> None:
    # the BFS above against networkx shortest paths (general-purpose reference)
    for p in parameter_sets(16):
        net = build_net(p)
        assert bfs_girth(net) == networkx_girth(net), p


def test_minimal_cycle_length_counterexamples() -> None:
    # docs/theory/minimal-cycle-length.md table [VERIFIED]: true cyc where the one-token formula is
    # too large
    for p, cyc in [
        (ParameterSet(1, 6, 1, 3), 3),
        (ParameterSet(1, 7, 1, 4), 4),
        (ParameterSet(1, 10, 1, 5), 3),
        (ParameterSet(1, 8, 1, 12), 5),
        (ParameterSet(8, 1, 5, 1), 5),
    ]:
        assert bfs_girth(build_net(p)) == cyc == invariants.minimal_cycle_length(p)


def cycles_of_kind(net: CycloidNet, kind: str) -> list[tuple[int, int]]:
    """(length, tokens) of each cycle of places of one kind, found by following the arcs."""
    place_of = {net.pre[j]: j for j in range(net.place_count) if net.kinds[j] == kind}
    seen: set[int] = set()
    found = []
    for start in range(net.transition_count):
        if start in seen:
            continue
        length = tokens = 0
        t = start
        while t not in seen:
            seen.add(t)
            j = place_of[t]
            length += 1
            tokens += net.tokens[j]
            t = net.post[j]
        assert t == start  # each kind's arcs permute the transitions, so these are cycles
        found.append((length, tokens))
    return found


def test_forward_and_backward_cycles() -> None:
    # docs/theory/processes.md [VERIFIED all parameters <= 5 there]: gcd(beta, delta) forward cycles
    # of
    # length A/g with beta/g tokens; gcd(alpha, gamma) backward cycles of A/h with alpha/h
    for p in parameter_sets(30):
        net = build_net(p)
        for kind, family in (
            (FORWARD, invariants.forward_cycles(p)),
            ("backward", invariants.backward_cycles(p)),
        ):
            cycles = cycles_of_kind(net, kind)
            assert cycles == [(family.length, family.tokens)] * family.count, (p, kind)


def test_enabled_and_semi_enabled_at_m0() -> None:
    # docs/theory/initial-marking.md [VERIFIED]: min(alpha, beta) enabled, |alpha - beta|
    # semi-enabled
    for p in parameter_sets(30):
        net = build_net(p)
        marked_inputs = [0] * net.transition_count
        for j in range(net.place_count):
            marked_inputs[net.post[j]] += net.tokens[j]
        assert marked_inputs.count(2) == invariants.enabled_count(p), p
        assert marked_inputs.count(1) == invariants.semi_enabled_count(p), p


def test_reachability_graph_against_formulas() -> None:
    # docs/theory/state-counts.md [VERIFIED on 639 cycloids there]: |RG| = A*C(a+b,a)/(a+b) states
    # and
    # A*C(a+b-2,a-1) arcs; §3.2: live, 1-safe, reversible ([P18]/[FI19] recalled)
    for p in parameter_sets(16):
        rg = reachability_graph(build_net(p))
        assert rg.state_count == invariants.reachable_state_count(p), p
        assert rg.arc_count == invariants.state_arc_count(p), p
        assert is_one_safe(rg) and is_reversible(rg) and is_live(rg), p


def test_enabled_transitions_in_every_marking() -> None:
    # docs/theory/initial-marking.md [VERIFIED A <= 22 there]: every reachable marking enables
    # between 1 and
    # min(alpha, beta) transitions, and M0 enables the most
    for p in parameter_sets(16):
        rg = reachability_graph(build_net(p))
        enabled = [0] * rg.state_count
        for source, _t, _target in rg.arcs:
            enabled[source] += 1
        assert min(enabled) >= 1 and max(enabled) == enabled[0] == min(p.alpha, p.beta), p


def test_shortest_return_to_m0_fires_every_transition_once() -> None:
    # docs/theory/cycles-and-tokens.md: a shortest non-empty firing sequence from M0 back to M0 has
    # length A and
    # fires every transition exactly once
    for p in parameter_sets(14):
        rg = reachability_graph(build_net(p))
        parent: dict[int, tuple[int, int]] = {}
        queue = deque([0])
        seen = {0}
        found = None
        out: list[list[tuple[int, int]]] = [[] for _ in range(rg.state_count)]
        for source, t, target in rg.arcs:
            out[source].append((t, target))
        while queue and found is None:
            state = queue.popleft()
            for t, target in out[state]:
                if target == 0:
                    found = (state, t)
                    break
                if target not in seen:
                    seen.add(target)
                    parent[target] = (state, t)
                    queue.append(target)
        assert found is not None
        state, t = found
        fired = [t]
        while state != 0:
            state, t = parent[state]
            fired.append(t)
        assert sorted(fired) == list(range(p.area)), p


def test_cycle_time_against_simple_cycles() -> None:
    # zoo.core.invariants.cycle_time: max over simple cycles of length/tokens (common practice for
    # timed marked graphs), every simple cycle listed by networkx.simple_cycles
    for p in parameter_sets(10):
        net = build_net(p)
        graph = to_networkx(net)
        best = Fraction(0)
        for cycle in nx.simple_cycles(graph):
            places = [node for node in cycle if graph.nodes[node]["kind"] == "place"]
            tokens = sum(graph.nodes[node]["tokens"] for node in places)
            # live: every cycle is marked (docs/theory/cycles-and-tokens.md)
            assert tokens >= 1, (p, cycle)
            best = max(best, Fraction(len(places), tokens))
        assert best == invariants.cycle_time(p), p


@pytest.mark.parametrize("p", [ParameterSet(4, 2, 2, 3), ParameterSet(12, 4, 1, 1)])
def test_explicit_examples(p: ParameterSet) -> None:
    # docs/theory/check-values.md table rows, through the same explicit route as above
    net = build_net(p)
    rg = reachability_graph(net)
    assert rg.state_count == invariants.reachable_state_count(p)
    assert bfs_girth(net) == invariants.minimal_cycle_length(p)
