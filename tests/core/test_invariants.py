"""Closed-form invariants against docs/theory/initial-marking.md,
docs/theory/minimal-cycle-length.md, docs/theory/ring-designs.md, docs/theory/state-counts.md,
docs/theory/check-values.md and explicit search.

``BruteNet`` folds the Petri space by the definition of docs/theory/folding.md (x and y fold
together
iff y - x is an integer combination of P and R, found by enumerating the combinations), marks
it by the published form of M0 recalled in docs/theory/initial-marking.md (a place carries a token
iff its arc
crosses from level <= 0 to level > 0), and then answers every question by plain search:
breadth-first girth, orbits of the forward and backward successor maps, the reachability graph
by breadth-first search over markings, and cycle ratios by networkx's simple-cycle search. None
of it uses zoo.core.algebra or zoo.core.invariants.
"""

from __future__ import annotations

import itertools
from collections import deque
from dataclasses import dataclass
from fractions import Fraction
from functools import cache
from math import comb, gcd

import networkx as nx
import pytest
from hypothesis import given
from hypothesis import strategies as st
from networkx.algorithms.isomorphism import DiGraphMatcher

from zoo.core import algebra, invariants
from zoo.core.params import ParameterSet

C = ParameterSet
Point = tuple[int, int]


@dataclass(frozen=True)
class BruteNet:
    """An explicit cycloid system: transitions 0..A-1, forward/backward successors, M0."""

    params: ParameterSet
    points: tuple[Point, ...]  # a Petri-space point of every transition
    forward: tuple[int, ...]  # forward[t]: output transition of t's forward output place
    backward: tuple[int, ...]
    forward_marked: tuple[bool, ...]  # the forward place from t to forward[t] carries a token
    backward_marked: tuple[bool, ...]


def _crosses_level_zero(low: int, high: int, area: int) -> bool:
    """Whether some lift of an arc from level ``low`` to ``high`` has low' <= 0 < high'."""
    # Lifts of one node differ in level by multiples of A (L(P) = 0, L(R) = A).
    return any(
        low + k * area <= 0 < high + k * area
        for k in range(-(abs(low) // area) - 2, abs(low) // area + 3)
    )


@cache
def brute_net(p: ParameterSet) -> BruteNet:
    a, b, c, d = p.as_tuple()
    area = a * d + b * c
    bound = 2 * max(a, b, c, d) + 2
    lattice = {
        (m * a + n * c, -m * b + n * d)
        for m in range(-bound, bound + 1)
        for n in range(-bound, bound + 1)
    }
    points: list[Point] = [(0, 0)]

    def find(x: Point) -> int:
        for i, r in enumerate(points):
            if (x[0] - r[0], x[1] - r[1]) in lattice:
                return i
        points.append(x)
        return len(points) - 1

    forward: dict[int, int] = {}
    backward: dict[int, int] = {}
    queue = deque([0])
    while queue:
        t = queue.popleft()
        xi, eta = points[t]
        for succ, step in ((forward, (xi + 1, eta)), (backward, (xi, eta + 1))):
            known = len(points)
            succ[t] = find(step)
            if succ[t] == known:
                queue.append(succ[t])
    assert len(points) == area  # |T| = A, docs/theory/folding.md
    level = [b * x + a * y for x, y in points]
    return BruteNet(
        p,
        tuple(points),
        tuple(forward[t] for t in range(area)),
        tuple(backward[t] for t in range(area)),
        tuple(_crosses_level_zero(level[t], level[t] + b, area) for t in range(area)),
        tuple(_crosses_level_zero(level[t], level[t] + a, area) for t in range(area)),
    )


def brute_girth(net: BruteNet) -> int:
    """Shortest cycle length in transitions, by breadth-first search from every transition."""
    best = len(net.points) + 1
    for start in range(len(net.points)):
        dist = {start: 0}
        queue = deque([start])
        while queue:
            t = queue.popleft()
            for u in (net.forward[t], net.backward[t]):
                if u == start:
                    best = min(best, dist[t] + 1)
                elif u not in dist:
                    dist[u] = dist[t] + 1
                    queue.append(u)
    return best


def brute_orbits(succ: tuple[int, ...], marked: tuple[bool, ...]) -> list[tuple[int, int]]:
    """(length, tokens) of every orbit of a successor permutation."""
    seen: set[int] = set()
    orbits = []
    for start in range(len(succ)):
        if start in seen:
            continue
        t, length, tokens = start, 0, 0
        while True:
            seen.add(t)
            length += 1
            tokens += marked[t]
            t = succ[t]
            if t == start:
                break
        orbits.append((length, tokens))
    return sorted(orbits)


def input_places(net: BruteNet) -> tuple[list[int], list[int]]:
    """For every transition the source transition of its forward and its backward input place."""
    area = len(net.points)
    f_in, b_in = [0] * area, [0] * area
    for t in range(area):
        f_in[net.forward[t]] = t
        b_in[net.backward[t]] = t
    return f_in, b_in


def enabled_at(net: BruteNet, marking: int) -> tuple[list[int], list[int]]:
    """Enabled and semi-enabled transitions; place bits: t for forward, A + t for backward."""
    area = len(net.points)
    f_in, b_in = input_places(net)
    enabled, semi = [], []
    for t in range(area):
        marks = ((marking >> f_in[t]) & 1) + ((marking >> (area + b_in[t])) & 1)
        if marks == 2:
            enabled.append(t)
        elif marks == 1:
            semi.append(t)
    return enabled, semi


def initial_marking(net: BruteNet) -> int:
    area = len(net.points)
    bits = 0
    for t in range(area):
        bits |= net.forward_marked[t] << t
        bits |= net.backward_marked[t] << (area + t)
    return bits


def brute_reachability(net: BruteNet, limit: int = 6000) -> tuple[int, int]:
    """(states, arcs) of the reachability graph by breadth-first search; checks 1-safeness."""
    area = len(net.points)
    f_in, b_in = input_places(net)
    start = initial_marking(net)
    seen = {start}
    queue = deque([start])
    arcs = 0
    while queue:
        marking = queue.popleft()
        for t in enabled_at(net, marking)[0]:
            arcs += 1
            after = marking & ~(1 << f_in[t]) & ~(1 << (area + b_in[t]))
            for bit in (t, area + t):
                # docs/theory/cycles-and-tokens.md
                assert not (after >> bit) & 1, "the net is not 1-safe"
                after |= 1 << bit
            if after not in seen:
                seen.add(after)
                queue.append(after)
                assert len(seen) <= limit
    return len(seen), arcs


def place_graph(net: BruteNet) -> nx.DiGraph:
    """The net as a bipartite digraph: transitions t, places ("f", t) and ("b", t)."""
    graph = nx.DiGraph()
    for t in range(len(net.points)):
        graph.add_node(t, kind="transition", marked=False)
        for kind, succ, marked in (
            ("f", net.forward, net.forward_marked),
            ("b", net.backward, net.backward_marked),
        ):
            graph.add_node((kind, t), kind="place", marked=marked[t], typed=kind)
            graph.add_edge(t, (kind, t))
            graph.add_edge((kind, t), succ[t])
    return graph


def tuples(limit: int) -> list[ParameterSet]:
    return [C(*t) for t in itertools.product(range(1, limit + 1), repeat=4)]


# --- docs/theory/check-values.md table
# -----------------------------------------------------------------------

# cycloid, A, fwd (count, length, tokens), bwd, cyc, cyc1, beta|delta, en, semi, states, edges, w
TABLE_11 = [
    ((1, 1, 1, 1), 2, (1, 2, 1), (1, 2, 1), 2, 2, True, 1, 0, 2, 2, "0"),
    ((2, 1, 1, 1), 3, (1, 3, 1), (1, 3, 2), 2, 2, True, 1, 1, 3, 3, "1/3"),
    ((1, 2, 1, 1), 3, (1, 3, 2), (1, 3, 1), 2, 2, False, 1, 1, 3, 3, "-1/3"),
    ((2, 2, 1, 1), 4, (1, 4, 2), (1, 4, 2), 2, 2, False, 2, 0, 6, 8, "0"),
    ((3, 2, 1, 1), 5, (1, 5, 2), (1, 5, 3), 2, 2, False, 2, 1, 10, 15, "1/5"),
    ((2, 3, 1, 1), 5, (1, 5, 3), (1, 5, 2), 2, 2, False, 2, 1, 10, 15, "-1/5"),
    ((4, 2, 2, 3), 16, (1, 16, 2), (2, 8, 2), 5, 5, False, 2, 2, 40, 64, "1/3"),
    ((2, 4, 3, 2), 16, (2, 8, 2), (1, 16, 2), 5, 5, False, 2, 2, 40, 64, "-1/3"),
    ((3, 3, 1, 3), 12, (3, 4, 1), (1, 12, 3), 4, 4, True, 3, 0, 40, 72, "0"),
    ((3, 3, 2, 2), 12, (1, 12, 3), (1, 12, 3), 4, 4, False, 3, 0, 40, 72, "0"),
    ((3, 3, 3, 1), 12, (1, 12, 3), (3, 4, 1), 4, 4, False, 3, 0, 40, 72, "0"),
    ((2, 2, 1, 3), 8, (1, 8, 2), (1, 8, 2), 4, 4, False, 2, 0, 12, 16, "0"),
    ((2, 2, 2, 2), 8, (2, 4, 1), (2, 4, 1), 4, 4, True, 2, 0, 12, 16, "0"),
    ((1, 2, 1, 2), 4, (2, 2, 1), (1, 4, 1), 2, 2, True, 1, 1, 4, 4, "-1/3"),
    ((2, 3, 1, 2), 7, (1, 7, 3), (1, 7, 2), 3, 3, False, 2, 1, 14, 21, "-1/5"),
    ((1, 10, 1, 5), 15, (5, 3, 2), (1, 15, 1), 3, 6, False, 1, 9, 15, 15, "-9/11"),
    ((2, 5, 1, 5), 15, (5, 3, 1), (1, 15, 2), 3, 3, True, 2, 3, 45, 75, "-3/7"),
    ((1, 6, 1, 3), 9, (3, 3, 2), (1, 9, 1), 3, 4, False, 1, 5, 9, 9, "-5/7"),
    ((1, 7, 1, 4), 11, (1, 11, 7), (1, 11, 1), 4, 5, False, 1, 6, 11, 11, "-3/4"),
    ((1, 8, 1, 12), 20, (4, 5, 2), (1, 20, 1), 5, 6, False, 1, 7, 20, 20, "-7/9"),
    ((3, 4, 2, 4), 20, (4, 5, 1), (1, 20, 3), 5, 5, True, 3, 1, 100, 200, "-1/7"),
    ((8, 1, 5, 1), 13, (1, 13, 1), (1, 13, 8), 5, 6, True, 1, 7, 13, 13, "7/9"),
    ((3, 2, 2, 2), 10, (2, 5, 1), (1, 10, 3), 4, 4, True, 2, 1, 20, 30, "1/5"),
    ((2, 3, 3, 3), 15, (3, 5, 1), (1, 15, 2), 5, 5, True, 2, 1, 30, 45, "-1/5"),
    ((2, 1, 2, 2), 6, (1, 6, 1), (2, 3, 1), 3, 3, True, 1, 1, 6, 6, "1/3"),
    ((3, 2, 6, 6), 30, (2, 15, 1), (3, 10, 1), 10, 10, True, 2, 1, 60, 90, "1/5"),
    ((4, 2, 4, 4), 24, (2, 12, 1), (4, 6, 1), 6, 6, True, 2, 2, 60, 96, "1/3"),
    ((12, 4, 1, 1), 16, (1, 16, 4), (1, 16, 12), 2, 2, False, 4, 8, 1820, 5824, "1/2"),
    ((2, 2, 1, 5), 12, (1, 12, 2), (1, 12, 2), 6, 6, False, 2, 0, 18, 24, "0"),
    ((1, 2, 2, 4), 8, (2, 4, 1), (1, 8, 1), 4, 4, True, 1, 1, 8, 8, "-1/3"),
]


@pytest.mark.parametrize("row", TABLE_11, ids=lambda row: str(C(*row[0])))
def test_table_11_closed_forms(row: tuple) -> None:  # type: ignore[type-arg]
    # docs/theory/check-values.md table [VERIFIED: BFS girth, explicit reachability graphs]
    (params, area, fwd, bwd, cyc, cyc1, regular, en, semi, states, edges, w) = row
    p = C(*params)
    assert p.area == area
    names = ("count", "length", "tokens")
    assert invariants.forward_cycles(p).as_dict() == dict(zip(names, fwd, strict=True))
    assert invariants.backward_cycles(p).as_dict() == dict(zip(names, bwd, strict=True))
    assert invariants.minimal_cycle_length(p) == cyc
    assert invariants.minimal_cycle_length_exact(p) == cyc
    assert invariants.one_token_loop(p) == cyc1
    assert invariants.is_regular(p) is regular
    assert invariants.enabled_count(p) == en
    assert invariants.semi_enabled_count(p) == semi
    assert len(invariants.enabled_transitions(p)) == en
    assert len(invariants.semi_enabled_transitions(p)) == semi
    assert invariants.reachable_state_count(p) == states
    assert invariants.state_arc_count(p) == edges
    assert invariants.slowness(p) == Fraction(w)


@pytest.mark.parametrize("row", [r for r in TABLE_11 if r[1] <= 20], ids=lambda r: str(C(*r[0])))
def test_table_11_rows_by_explicit_search(row: tuple) -> None:  # type: ignore[type-arg]
    # The same rows recomputed here from the explicit net, independently of zoo.
    (params, area, fwd, bwd, cyc, _cyc1, _reg, en, semi, states, edges, _w) = row
    net = brute_net(C(*params))
    assert brute_girth(net) == cyc
    assert brute_orbits(net.forward, net.forward_marked) == [fwd[1:]] * fwd[0]
    assert brute_orbits(net.backward, net.backward_marked) == [bwd[1:]] * bwd[0]
    enabled, semi_enabled = enabled_at(net, initial_marking(net))
    assert (len(enabled), len(semi_enabled)) == (en, semi)
    assert brute_reachability(net) == (states, edges)


def test_c4223_initial_marking() -> None:
    # docs/theory/initial-marking.md example C(4,2,2,3) (<= 0 / > 0 convention) [VERIFIED]
    p = C(4, 2, 2, 3)
    assert invariants.enabled_transitions(p) == [(1, 0), (3, -1)]
    assert invariants.semi_enabled_transitions(p) == [(2, 0), (4, -1)]
    net = brute_net(p)
    rep = {algebra.representative(p, x): t for t, x in enumerate(net.points)}
    f_in, b_in = input_places(net)
    marked_forward = sorted(x for x, t in rep.items() if net.forward_marked[f_in[t]])
    marked_backward = sorted(x for x, t in rep.items() if net.backward_marked[b_in[t]])
    assert marked_forward == [(1, 0), (3, -1)]
    assert marked_backward == [(1, 0), (2, 0), (3, -1), (4, -1)]


# --- explicit search over all small parameter sets --------------------------------------------


@pytest.mark.parametrize("p", [p for p in tuples(4) if p.area <= 16], ids=str)
def test_invariants_against_explicit_net(p: ParameterSet) -> None:
    net = brute_net(p)
    assert brute_girth(net) == invariants.minimal_cycle_length(p)
    fwd, bwd = invariants.forward_cycles(p), invariants.backward_cycles(p)
    assert brute_orbits(net.forward, net.forward_marked) == [(fwd.length, fwd.tokens)] * fwd.count
    assert brute_orbits(net.backward, net.backward_marked) == [(bwd.length, bwd.tokens)] * bwd.count
    assert invariants.process_count(p) == fwd.count
    # regular <=> every forward cycle carries exactly one token (docs/theory/processes.md)
    assert invariants.is_regular(p) == (fwd.tokens == 1)
    enabled, semi = enabled_at(net, initial_marking(net))
    to_rep = [algebra.representative(p, x) for x in net.points]
    assert sorted(to_rep[t] for t in enabled) == invariants.enabled_transitions(p)
    assert sorted(to_rep[t] for t in semi) == invariants.semi_enabled_transitions(p)
    # tokens: beta cars on forward places, alpha gaps on backward places
    # (docs/theory/initial-marking.md)
    assert sum(net.forward_marked) == p.beta and sum(net.backward_marked) == p.alpha
    if invariants.reachable_state_count(p) <= 3000:
        assert brute_reachability(net) == (
            invariants.reachable_state_count(p),
            invariants.state_arc_count(p),
        )


def test_reachability_formula_on_larger_token_counts() -> None:
    # docs/theory/state-counts.md [VERIFIED on 639 cycloids with alpha, beta <= 6]: a few with more
    # tokens.
    for p in (C(5, 3, 1, 2), C(6, 2, 1, 1), C(4, 4, 1, 1), C(2, 6, 2, 1)):
        net = brute_net(p)
        assert brute_reachability(net) == (
            invariants.reachable_state_count(p),
            invariants.state_arc_count(p),
        )


def cycle_ratio_maximum(net: BruteNet) -> Fraction:
    """max over simple cycles of (transitions on it)/(tokens on it), by networkx."""
    graph = place_graph(net)
    best = Fraction(0)
    for cycle in nx.simple_cycles(graph):
        transitions = sum(1 for v in cycle if graph.nodes[v]["kind"] == "transition")
        tokens = sum(1 for v in cycle if graph.nodes[v]["marked"])
        assert tokens >= 1  # live: every cycle carries a token (docs/theory/cycles-and-tokens.md)
        best = max(best, Fraction(transitions, tokens))
    return best


@pytest.mark.parametrize("p", [p for p in tuples(3) if p.area <= 9], ids=str)
def test_cycle_time_is_the_largest_cycle_ratio(p: ParameterSet) -> None:
    # Timed marked graphs with unit delays: the period is the maximum over cycles of
    # length/tokens (common practice: the cycle-time theorem of timed marked graphs).
    assert invariants.cycle_time(p) == cycle_ratio_maximum(brute_net(p))


def test_class_key_against_networkx_isomorphism() -> None:
    # Independent of nauty: untyped marked isomorphism <=> equal class key; untyped net
    # isomorphism <=> equal frame key; typed net isomorphism <=> equal lattice key (§5.1).
    def marked(u: dict, v: dict) -> bool:  # type: ignore[type-arg]
        return bool(u["kind"] == v["kind"] and u["marked"] == v["marked"])

    def plain(u: dict, v: dict) -> bool:  # type: ignore[type-arg]
        return bool(u["kind"] == v["kind"])

    def typed(u: dict, v: dict) -> bool:  # type: ignore[type-arg]
        return bool(u["kind"] == v["kind"] and u.get("typed") == v.get("typed"))

    for area in range(2, 9):
        sets = [p for p in tuples(area) if p.area == area]
        graphs = {p: place_graph(brute_net(p)) for p in sets}
        for p, q in itertools.combinations(sets, 2):
            for match, key in (
                (marked, algebra.class_key),
                (plain, algebra.frame_key),
                (typed, algebra.lattice_key),
            ):
                iso = DiGraphMatcher(graphs[p], graphs[q], node_match=match).is_isomorphic()
                assert iso == (key(p) == key(q)), (p, q, key.__name__)


def test_automorphism_orders_against_networkx() -> None:
    # zoo show's automorphisms (nauty, via zoo.core.canonical) against counting self-isomorphisms.
    from zoo.core.report import invariant_report

    for p in [
        C(4, 2, 2, 3),
        C(2, 2, 2, 2),
        C(2, 2, 1, 3),
        C(3, 3, 1, 3),
        C(1, 1, 1, 1),
        C(2, 1, 1, 1),
        C(3, 2, 1, 1),
        C(1, 2, 1, 2),
        C(2, 2, 1, 1),
    ]:
        graph = place_graph(brute_net(p))
        marked = sum(
            1
            for _ in DiGraphMatcher(
                graph,
                graph,
                node_match=lambda u, v: u["kind"] == v["kind"] and u["marked"] == v["marked"],
            ).isomorphisms_iter()
        )
        plain = sum(
            1
            for _ in DiGraphMatcher(
                graph, graph, node_match=lambda u, v: u["kind"] == v["kind"]
            ).isomorphisms_iter()
        )
        report = invariant_report(p)
        assert report["automorphisms"] == marked, p
        assert report["net_automorphisms"] == plain, p
        # docs/theory/state-counts.md [VERIFIED]: the typed net has A automorphisms, the typed
        # system
        # gcd(alpha, beta); the untyped groups contain them.
        assert plain % p.area == 0 and marked % gcd(p.alpha, p.beta) == 0


# --- docs/theory/minimal-cycle-length.md: the minimal cycle length
# ----------------------------------------------------


def brute_lattice_loop(p: ParameterSet) -> int:
    """min{xi + eta : (xi, eta) in L, xi, eta >= 0, not both 0} by trying every vector."""
    a, b, c, d = p.as_tuple()
    area = a * d + b * c
    for length in range(1, c + d + 1):  # R itself has length gamma + delta
        for xi in range(length + 1):
            eta = length - xi
            m, n = d * xi - c * eta, b * xi + a * eta  # A * (m, n) by Cramer's rule
            if m % area == 0 and n % area == 0:
                return length
    raise AssertionError("R is a cycle of length gamma + delta")


def test_loop_theorem_on_all_parameters_up_to_8() -> None:
    # docs/theory/minimal-cycle-length.md: cyc is the shortest non-negative lattice vector; the
    # one-token formula is
    # exact under the theorem's condition [VERIFIED on all 50,625 tuples <= 15; here <= 8].
    for p in tuples(8):
        exact = brute_lattice_loop(p)
        assert invariants.minimal_cycle_length_exact(p) == exact, p
        assert invariants.minimal_cycle_length(p) == exact, p
        if invariants.one_token_formula_applies(p):
            assert invariants.one_token_loop(p) == exact, p
        assert invariants.one_token_loop(p) >= exact


def test_one_token_formula_failures_up_to_15() -> None:
    # docs/theory/minimal-cycle-length.md: of the 50,625 tuples <= 15, cyc_1 differs from cyc on
    # exactly 296, and
    # never where the theorem's condition holds.
    failures = 0
    for p in tuples(15):
        exact = invariants.minimal_cycle_length_exact(p)
        if invariants.one_token_loop(p) != exact:
            failures += 1
            assert not invariants.one_token_formula_applies(p), p
    assert failures == 296


@pytest.mark.parametrize(
    ("params", "area", "cyc", "cyc1", "witness", "tokens"),
    [  # docs/theory/minimal-cycle-length.md counterexample table [VERIFIED]
        ((1, 6, 1, 3), 9, 3, 4, (3, 0), 2),
        ((1, 7, 1, 4), 11, 4, 5, (3, 1), 2),
        ((1, 10, 1, 5), 15, 3, 6, (3, 0), 2),
        ((1, 8, 1, 12), 20, 5, 6, (5, 0), 2),
        ((8, 1, 5, 1), 13, 5, 6, (2, 3), 2),
    ],
)
def test_loop_counterexamples(
    params: tuple[int, ...], area: int, cyc: int, cyc1: int, witness: Point, tokens: int
) -> None:
    p = C(*params)
    assert p.area == area
    assert invariants.minimal_cycle_length(p) == cyc
    assert invariants.one_token_loop(p) == cyc1
    assert not invariants.one_token_formula_applies(p)
    assert invariants.shortest_cycle_vector(p) == witness
    assert algebra.level(p, witness) // p.area == tokens  # n = (beta xi + alpha eta)/A, §3.2
    assert brute_girth(brute_net(p)) == cyc


def test_shortest_cycle_vector_is_a_cycle() -> None:
    for p in tuples(6):
        xi, eta = invariants.shortest_cycle_vector(p)
        assert xi >= 0 and eta >= 0 and xi + eta == invariants.minimal_cycle_length(p)
        assert algebra.are_equivalent(p, (0, 0), (xi, eta))


# --- docs/theory/ring-designs.md: circular traffic queues
# -----------------------------------------------------

RING_TABLE = [  # c, g, then A/cyc/RG for anonymous, individual cars, individual gaps, both
    (1, 1, (2, 2, 2), (2, 2, 2), (2, 2, 2), (2, 2, 2)),
    (1, 2, (3, 2, 3), (3, 2, 3), (6, 3, 6), (6, 3, 6)),
    (2, 1, (3, 2, 3), (6, 3, 6), (3, 2, 3), (6, 3, 6)),
    (2, 2, (4, 2, 6), (8, 4, 12), (8, 4, 12), (8, 4, 12)),
    (2, 3, (5, 2, 10), (10, 4, 20), (15, 5, 30), (30, 10, 60)),
    (3, 2, (5, 2, 10), (15, 5, 30), (10, 4, 20), (30, 10, 60)),
    (2, 4, (6, 2, 15), (12, 4, 30), (24, 6, 60), (24, 6, 60)),
    (3, 3, (6, 2, 20), (18, 6, 60), (18, 6, 60), (18, 6, 60)),
    (4, 12, (16, 2, 1820), (64, 8, 7280), (192, 16, 21840), (192, 16, 21840)),
]


@pytest.mark.parametrize("row", RING_TABLE, ids=lambda r: f"c{r[0]}g{r[1]}")
def test_ring_cycloids(row: tuple) -> None:  # type: ignore[type-arg]
    # docs/theory/ring-designs.md table [VERIFIED by reachability-graph isomorphism with a
    # simulator]
    c, g, *columns = row
    ell = c * g // gcd(c, g)
    for p, (area, cyc, states) in zip(
        (C(g, c, 1, 1), C(g, c, c, c), C(g, c, g, g), C(g, c, ell, ell)), columns, strict=True
    ):
        assert p.area == area, p
        assert invariants.minimal_cycle_length(p) == cyc, p
        assert invariants.reachable_state_count(p) == states, p
        assert states == p.area * comb(c + g, c) // (c + g)


# --- docs/theory/state-counts.md identities and exactness
# ---------------------------------------------------


@given(st.builds(C, *(st.integers(1, 30) for _ in range(4))))
def test_counting_identities(p: ParameterSet) -> None:
    a, b, c, d = p.as_tuple()
    states, arcs = invariants.reachable_state_count(p), invariants.state_arc_count(p)
    # docs/theory/state-counts.md: the two forms of |RG|, and the mean enabled count
    # alpha*beta/(alpha+beta-1)
    assert states == d * comb(a + b - 1, a - 1) + c * comb(a + b - 1, a)
    assert Fraction(arcs, states) == Fraction(a * b, a + b - 1)
    # docs/theory/initial-marking.md: 2*#enabled + #semi-enabled = alpha + beta = |M0|
    assert 2 * invariants.enabled_count(p) + invariants.semi_enabled_count(p) == a + b
    assert invariants.cycle_time(p) == Fraction(p.area, min(a, b))


@given(st.builds(C, *(st.integers(1, 60) for _ in range(4))))
def test_swap_invariance(p: ParameterSet) -> None:
    # docs/theory/isomorphism.md: the swap is a net isomorphism mapping M0 to M0 with alpha, beta
    # exchanged.
    q = p.swap()
    for invariant in (
        invariants.minimal_cycle_length,
        invariants.reachable_state_count,
        invariants.state_arc_count,
        invariants.cycle_time,
        invariants.enabled_count,
        invariants.semi_enabled_count,
    ):
        assert invariant(p) == invariant(q), invariant.__name__
    # reading-level invariants trade places
    assert invariants.forward_cycles(p) == invariants.backward_cycles(q)
    assert invariants.slowness(p) == -invariants.slowness(q)


def test_huge_state_counts_are_exact() -> None:
    # C(100,100,1,1): A = 200, |RG| = A*C(200,100)/200 = C(200,100) (docs/theory/state-counts.md)
    p = C(100, 100, 1, 1)
    assert invariants.reachable_state_count(p) == comb(200, 100)
    assert invariants.reachable_state_count(p) > 2**190
    assert invariants.state_arc_count(p) == 200 * comb(198, 99)


def test_slowness_published_values() -> None:
    # [P18] intro: w = (12 - 4)/(12 + 4) = 1/2 for 12 gaps and 4 cars; docs/theory/state-counts.md
    # C(4,2,2,3)
    assert invariants.slowness(C(12, 4, 1, 1)) == Fraction(1, 2)
    assert invariants.slowness(C(4, 2, 2, 3)) == Fraction(1, 3)
    # symmetric cycloids, docs/theory/state-counts.md
    assert invariants.slowness(C(3, 3, 2, 2)) == 0


def test_symmetric_cycloids() -> None:
    # docs/theory/state-counts.md: for alpha = beta, w = 0, cyc = gamma + delta, A = alpha*cyc, and
    # every
    # cycle length is a multiple of gamma + delta (the last by networkx on the explicit nets).
    for a, c, d in itertools.product(range(1, 7), repeat=3):
        p = C(a, a, c, d)
        assert invariants.minimal_cycle_length(p) == c + d
        assert p.area == a * invariants.minimal_cycle_length(p)
        assert invariants.slowness(p) == 0
    for p in (C(2, 2, 1, 2), C(3, 3, 1, 2), C(2, 2, 2, 1), C(1, 1, 2, 3), C(2, 2, 1, 3)):
        graph = place_graph(brute_net(p))
        for cycle in nx.simple_cycles(graph):
            transitions = sum(1 for v in cycle if graph.nodes[v]["kind"] == "transition")
            assert transitions % (p.gamma + p.delta) == 0, (p, cycle)


def test_enabled_count_bounds_over_all_reachable_markings() -> None:
    # docs/theory/initial-marking.md [VERIFIED A <= 22]: every reachable marking enables between 1
    # and
    # min(alpha, beta) transitions, and M0 reaches the maximum.
    for p in (C(4, 2, 2, 3), C(3, 3, 1, 3), C(2, 3, 1, 2), C(3, 2, 2, 2), C(12, 4, 1, 1)):
        net = brute_net(p)
        area = len(net.points)
        f_in, b_in = input_places(net)
        start = initial_marking(net)
        seen, queue = {start}, deque([start])
        while queue:
            marking = queue.popleft()
            enabled = enabled_at(net, marking)[0]
            assert 1 <= len(enabled) <= min(p.alpha, p.beta)
            for t in enabled:
                after = marking & ~(1 << f_in[t]) & ~(1 << (area + b_in[t]))
                after |= (1 << t) | (1 << (area + t))
                if after not in seen:
                    seen.add(after)
                    queue.append(after)
        assert len(enabled_at(net, start)[0]) == min(p.alpha, p.beta)
