"""Tests of zoo.core.reachability: reachability graphs, liveness, 1-safeness, reversibility."""

from __future__ import annotations

import networkx as nx
import pytest

from zoo.core.net import MarkedGraph, build_net
from zoo.core.params import ParameterSet
from zoo.core.reachability import (
    DEFAULT_STATE_LIMIT,
    ReachabilityGraph,
    dead_transitions,
    explicit_behaviour,
    is_live,
    is_one_safe,
    is_reversible,
    place_bound,
    reachability_graph,
    reachability_to_networkx,
    strongly_connected_components,
)
from zoo.errors import FormatError, LimitExceeded, ParameterError

C = ParameterSet

# docs/theory/check-values.md table [VERIFIED by explicit BFS there]: RG states, RG edges, enabled
# at M0
THEORY_TABLE = [
    (C(1, 1, 1, 1), 2, 2, 1), (C(2, 1, 1, 1), 3, 3, 1), (C(1, 2, 1, 1), 3, 3, 1),
    (C(2, 2, 1, 1), 6, 8, 2), (C(3, 2, 1, 1), 10, 15, 2), (C(2, 3, 1, 1), 10, 15, 2),
    (C(4, 2, 2, 3), 40, 64, 2), (C(2, 4, 3, 2), 40, 64, 2), (C(3, 3, 1, 3), 40, 72, 3),
    (C(3, 3, 2, 2), 40, 72, 3), (C(3, 3, 3, 1), 40, 72, 3), (C(2, 2, 1, 3), 12, 16, 2),
    (C(2, 2, 2, 2), 12, 16, 2), (C(1, 2, 1, 2), 4, 4, 1), (C(2, 3, 1, 2), 14, 21, 2),
    (C(1, 10, 1, 5), 15, 15, 1), (C(2, 5, 1, 5), 45, 75, 2), (C(1, 6, 1, 3), 9, 9, 1),
    (C(1, 7, 1, 4), 11, 11, 1), (C(1, 8, 1, 12), 20, 20, 1), (C(3, 4, 2, 4), 100, 200, 3),
    (C(8, 1, 5, 1), 13, 13, 1), (C(3, 2, 2, 2), 20, 30, 2), (C(2, 3, 3, 3), 30, 45, 2),
    (C(2, 1, 2, 2), 6, 6, 1), (C(3, 2, 6, 6), 60, 90, 2), (C(4, 2, 4, 4), 60, 96, 2),
    (C(12, 4, 1, 1), 1820, 5824, 4), (C(2, 2, 1, 5), 18, 24, 2), (C(1, 2, 2, 4), 8, 8, 1),
]  # fmt: skip


@pytest.mark.parametrize(("p", "states", "arcs", "enabled"), THEORY_TABLE)
def test_theory_table(p: ParameterSet, states: int, arcs: int, enabled: int) -> None:
    rg = reachability_graph(build_net(p))
    assert (rg.state_count, rg.arc_count) == (states, arcs)
    assert sum(1 for source, _t, _u in rg.arcs if source == 0) == enabled
    assert is_live(rg) and is_one_safe(rg) and is_reversible(rg)  # docs/theory/cycles-and-tokens.md


# docs/theory/check-values.md "n-fold iteration" [VERIFIED]: reachable states for n = 1, 2, 3
ITERATIONS = [
    (C(1, 1, 1, 1), (2, 4, 6)), (C(2, 1, 1, 1), (3, 6, 9)), (C(2, 2, 1, 1), (6, 12, 18)),
    (C(3, 2, 1, 1), (10, 20, 30)), (C(2, 3, 1, 2), (14, 28, 42)), (C(3, 3, 1, 3), (40, 80, 120)),
    (C(3, 3, 2, 2), (40, 80, 120)), (C(2, 2, 1, 3), (12, 24, 36)), (C(2, 2, 2, 2), (12, 24, 36)),
    (C(1, 2, 1, 2), (4, 8, 12)), (C(3, 1, 2, 1), (5, 10, 15)), (C(4, 2, 2, 3), (40, 80)),
    (C(2, 5, 1, 5), (45, 90)), (C(1, 10, 1, 5), (15, 30)),
]  # fmt: skip


@pytest.mark.parametrize(("p", "counts"), ITERATIONS)
def test_iterations_multiply_the_states(p: ParameterSet, counts: tuple[int, ...]) -> None:
    for n, expected in enumerate(counts, start=1):
        q = ParameterSet(p.alpha, p.beta, n * p.gamma, n * p.delta)
        assert reachability_graph(build_net(q)).state_count == expected, (q, n)


# docs/theory/ring-designs.md table [VERIFIED against a traffic simulator there]: (c cars, g gaps)
# -> RG size
# of the anonymous C(g,c,1,1), individual-cars C(g,c,c,c), individual-gaps C(g,c,g,g) and
# individual C(g,c,l,l) models, l = lcm(c, g)
TRAFFIC = [
    (1, 1, 2, 2, 2, 2), (1, 2, 3, 3, 6, 6), (2, 1, 3, 6, 3, 6), (2, 2, 6, 12, 12, 12),
    (2, 3, 10, 20, 30, 60), (3, 2, 10, 30, 20, 60), (2, 4, 15, 30, 60, 60),
    (3, 3, 20, 60, 60, 60), (4, 12, 1820, 7280, 21840, 21840),
]  # fmt: skip


@pytest.mark.parametrize(("c", "g", "anonymous", "cars", "gaps", "both"), TRAFFIC)
def test_traffic_queue_sizes(
    c: int, g: int, anonymous: int, cars: int, gaps: int, both: int
) -> None:
    from math import lcm

    ell = lcm(c, g)
    models = [(C(g, c, 1, 1), anonymous), (C(g, c, c, c), cars), (C(g, c, g, g), gaps),
              (C(g, c, ell, ell), both)]  # fmt: skip
    for p, expected in models:
        assert reachability_graph(build_net(p)).state_count == expected, p


def ring(tokens: tuple[int, int]) -> MarkedGraph:
    """Transitions a, b; place p from a to b and q from b to a."""
    return MarkedGraph(("a", "b"), ("p", "q"), (0, 1), (1, 0), tokens)


def test_two_tokens_on_a_ring() -> None:
    # Hand count: markings (p, q) = (2,0), (1,1), (0,2); b fires in the first two, a in the
    # last two: 3 states, 4 arcs; live and reversible, bound 2, so not 1-safe.
    rg = reachability_graph(ring((2, 0)))
    assert sorted(rg.iter_markings()) == [(0, 2), (1, 1), (2, 0)]
    assert rg.marking(0) == (2, 0) and rg.arc_count == 4
    assert is_live(rg) and is_reversible(rg) and not is_one_safe(rg)
    assert place_bound(rg) == 2


def test_dead_end() -> None:
    # Hand count: t1 consumes the only token, t0 and t2 wait on each other for ever:
    # 2 states, 1 arc; 1-safe, neither live nor reversible; every transition is dead.
    g = MarkedGraph(("t0", "t1", "t2"), ("p", "r", "s"), (0, 2, 0), (1, 0, 2), (1, 0, 0))
    rg = reachability_graph(g)
    assert (rg.state_count, rg.arc_count) == (2, 1)
    assert rg.arcs == ((0, 1, 1),)
    assert is_one_safe(rg) and not is_live(rg) and not is_reversible(rg)
    assert dead_transitions(rg) == (0, 1, 2)
    behaviour = explicit_behaviour(g)
    assert behaviour.as_dict() == {
        "states": 2, "arcs": 1, "live": False, "one_safe": True, "reversible": False, "bound": 1,
    }  # fmt: skip


def test_self_loops_and_one_shot_transitions() -> None:
    # Hand count: c has a marked self-loop; d and e pass one token round a ring.
    # M0 = (loop, once, wait) = (1,1,0): c loops, d fires -> (1,0,1), e fires back to M0.
    g = MarkedGraph(("c", "d", "e"), ("loop", "once", "wait"), (0, 2, 1), (0, 1, 2), (1, 1, 0))
    rg = reachability_graph(g)
    assert (rg.state_count, rg.arc_count) == (2, 4)
    assert is_reversible(rg) and is_live(rg) and is_one_safe(rg)
    # Hand count: z waits on its own empty self-loop, so d fires once and never again, while
    # c loops for ever: 2 states, 3 arcs; not reversible, d and z dead.
    h = MarkedGraph(("c", "d", "z"), ("loop", "once", "stuck"), (0, 2, 2), (0, 1, 2), (1, 1, 0))
    rg = reachability_graph(h)
    assert (rg.state_count, rg.arc_count) == (2, 3)
    assert not is_reversible(rg) and dead_transitions(rg) == (1, 2) and not is_live(rg)


def test_against_networkx_components() -> None:
    # Reference: networkx strong connectivity and attracting components (common practice:
    # a transition is live iff it fires inside every bottom strongly connected component)
    graphs = [build_net(p) for p, *_ in THEORY_TABLE[:12]]
    graphs += [
        ring((2, 0)),
        MarkedGraph(("c", "d", "z"), ("l", "o", "s"), (0, 2, 2), (0, 1, 2), (1, 1, 0)),
    ]
    graphs.append(MarkedGraph(("t0", "t1", "t2"), ("p", "r", "s"), (0, 2, 0), (1, 0, 2), (1, 0, 0)))
    for g in graphs:
        rg = reachability_graph(g)
        digraph = reachability_to_networkx(rg)
        assert digraph.number_of_nodes() == rg.state_count
        assert digraph.number_of_edges() == rg.arc_count
        assert is_reversible(rg) == nx.is_strongly_connected(digraph)
        ours = sorted(sorted(c) for c in strongly_connected_components(rg))
        theirs = sorted(sorted(c) for c in nx.strongly_connected_components(digraph))
        assert ours == theirs
        live = set(g.transitions)
        for component in nx.attracting_components(digraph):
            inside = digraph.subgraph(component)
            live &= {data["transition"] for _u, _v, data in inside.edges(data=True)}
        assert is_live(rg) == (live == set(g.transitions))


def test_state_limit() -> None:
    net = build_net(C(12, 4, 1, 1))  # 1820 states, docs/theory/check-values.md
    with pytest.raises(LimitExceeded) as info:
        reachability_graph(net, limit=1000)
    assert str(info.value) == (
        "reachability graph of C(12,4,1,1) has more than 1,000 states; "
        "raise --state-limit or choose a smaller system"
    )
    assert reachability_graph(net, limit=1820).state_count == 1820
    unbounded = MarkedGraph(("source", "sink"), ("p",), (0,), (1,), (0,))
    with pytest.raises(LimitExceeded) as info:
        reachability_graph(unbounded, limit=500)
    assert "the net with 2 transitions and 1 place has more than 500 states" in str(info.value)
    assert DEFAULT_STATE_LIMIT >= 100_000


@pytest.mark.parametrize("limit", [0, -5, 2.5, "100", True])
def test_bad_limit(limit: object) -> None:
    with pytest.raises(ParameterError, match="state limit must be a positive whole number"):
        reachability_graph(build_net(C(1, 1, 1, 1)), limit=limit)  # type: ignore[arg-type]


def test_not_a_graph() -> None:
    with pytest.raises(FormatError, match="needs a MarkedGraph, got tuple"):
        reachability_graph((1, 2))  # type: ignore[arg-type]


def test_marking_codes() -> None:
    rg = reachability_graph(build_net(C(4, 2, 2, 3)))
    assert isinstance(rg, ReachabilityGraph) and rg.width == 1
    assert rg.marking(0) == build_net(C(4, 2, 2, 3)).tokens
    # every cycloid transition has two input and two output places: 6 tokens throughout
    assert all(sum(m) == 6 for m in rg.iter_markings())
