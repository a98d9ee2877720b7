"""Tests of zoo.core.net: the explicit net of a cycloid system and marked graphs in general."""

from __future__ import annotations

import networkx as nx
import pytest

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core import algebra
from zoo.core.net import (
    BACKWARD,
    FORWARD,
    NET_LIMIT,
    CycloidNet,
    MarkedGraph,
    build_net,
    fundamental_points,
    to_networkx,
)
from zoo.core.params import ParameterSet
from zoo.errors import FormatError, LimitExceeded, ZooError

C4223 = ParameterSet(4, 2, 2, 3)


def small_parameter_sets(max_area: int) -> list[ParameterSet]:
    return [p for a in range(2, max_area + 1) for p in iter_parameter_sets(a)]


def test_fundamental_points_equal_the_algebra_module() -> None:
    # Same set and order as algebra.parallelogram_points (architecture.md naming contract).
    for p in small_parameter_sets(30):
        assert fundamental_points(p) == algebra.parallelogram_points(p), p


def test_transitions_of_c4223() -> None:
    # docs/theory/equivalence.md example, the 16 representatives [VERIFIED]
    expected = [(0, 0), (1, 0), (1, 1), (2, -1), (2, 0), (2, 1), (2, 2), (3, -1), (3, 0),
                (3, 1), (3, 2), (4, -1), (4, 0), (4, 1), (5, 0), (5, 1)]  # fmt: skip
    net = build_net(C4223)
    assert list(net.coordinates) == expected
    assert net.transitions == tuple(f"t_{x}_{y}" for x, y in expected)
    assert "t_3_-1" in net.transitions  # architecture.md naming example


def _fold_explicitly(p: ParameterSet) -> dict[tuple[int, int], tuple[int, int]]:
    """Fold a window of the Petri space by the lattice generators P and R with union-find.

    The definition of the cycloid as a quotient (docs/theory/folding.md), without the integer test.
    Returns a map from every window point to the root of its class.
    """
    radius = 3 * max(p.as_tuple()) + 2
    parent: dict[tuple[int, int], tuple[int, int]] = {}
    window = [(x, y) for x in range(-radius, radius + 1) for y in range(-radius, radius + 1)]
    for point in window:
        parent[point] = point

    def find(x: tuple[int, int]) -> tuple[int, int]:
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    for x, y in window:
        for dx, dy in ((p.alpha, -p.beta), (p.gamma, p.delta)):
            other = (x + dx, y + dy)
            if other in parent:
                parent[find((x, y))] = find(other)
    return {point: find(point) for point in window}


def test_net_structure_matches_explicit_folding() -> None:
    # docs/theory/folding.md (the quotient) and §1 (flow: forward to (xi+1, eta), backward to
    # (xi, eta+1)); window folding is independent of the integer test used by build_net.
    for p in small_parameter_sets(9):
        net = build_net(p)
        root = _fold_explicitly(p)
        classes = {root[c] for c in net.coordinates}
        assert len(classes) == net.transition_count == p.area, p
        by_root = {root[c]: i for i, c in enumerate(net.coordinates)}
        for j in range(net.place_count):
            x, y = net.coordinates[net.pre[j]]
            step = (x + 1, y) if net.kinds[j] == FORWARD else (x, y + 1)
            assert by_root[root[step]] == net.post[j], (p, net.places[j])


def test_counts_and_tokens() -> None:
    # A transitions, 2A places, 4A arcs (docs/theory/folding.md); beta tokens on forward places and
    # alpha on backward places (docs/theory/initial-marking.md, [VERIFIED])
    for p in small_parameter_sets(30):
        net = build_net(p)
        a = p.area
        assert net.transition_count == a and net.place_count == 2 * a
        assert net.kinds == (FORWARD,) * a + (BACKWARD,) * a
        assert sum(net.tokens[:a]) == p.beta and sum(net.tokens[a:]) == p.alpha, p
        assert net.pre == tuple(range(a)) * 2
        assert sorted(net.post[:a]) == list(range(a))  # forward steps permute transitions
        assert sorted(net.post[a:]) == list(range(a))
        for j, name in enumerate(net.places):
            x, y = net.coordinates[net.pre[j]]
            assert name == ("f" if j < a else "b") + f"_{x}_{y}"


def test_initial_marking_of_c4223() -> None:
    # docs/theory/initial-marking.md example C(4,2,2,3) [VERIFIED]
    net = build_net(C4223)
    index = {name: i for i, name in enumerate(net.transitions)}

    def marked_inputs(kind: str) -> set[int]:
        return {
            net.post[j] for j in range(net.place_count) if net.kinds[j] == kind and net.tokens[j]
        }

    assert marked_inputs(FORWARD) == {index["t_1_0"], index["t_3_-1"]}
    assert marked_inputs(BACKWARD) == {index[n] for n in ("t_1_0", "t_2_0", "t_3_-1", "t_4_-1")}


def test_transition_at_folds_points() -> None:
    # docs/theory/equivalence.md: t_{6,1} = t_Q is equivalent to t_{0,0} in C(4,2,2,3)
    net = build_net(C4223)
    assert net.transitions[net.transition_at((6, 1))] == "t_0_0"
    assert net.transitions[net.transition_at((16, 0))] == "t_0_0"
    assert net.transitions[net.transition_at((1, 0))] == "t_1_0"


def test_to_networkx() -> None:
    net = build_net(C4223)
    graph = to_networkx(net)
    assert isinstance(graph, nx.DiGraph)
    assert graph.number_of_nodes() == 3 * 16 and graph.number_of_edges() == 4 * 16
    assert graph.nodes["t_3_-1"] == {"kind": "transition", "coordinates": (3, -1)}
    assert graph.nodes["f_0_0"]["kind"] == "place" and graph.nodes["f_0_0"]["tokens"] == 1
    assert graph.nodes["b_0_0"]["direction"] == BACKWARD
    assert set(graph.successors("f_0_0")) == {"t_1_0"}
    assert set(graph.predecessors("f_0_0")) == {"t_0_0"}
    foreign = MarkedGraph(("a", "b"), ("p", "q"), (0, 1), (1, 0), (1, 0))
    g = to_networkx(foreign)
    assert g.nodes["p"] == {"kind": "place", "tokens": 1}
    assert sorted(g.edges) == [("a", "p"), ("b", "q"), ("p", "b"), ("q", "a")]


def test_marked_graph_presets_and_postsets() -> None:
    g = MarkedGraph(("a", "b"), ("p", "q", "r"), (0, 1, 1), (1, 0, 1), (1, 0, 2))
    assert g.input_places(0) == (1,) and g.output_places(0) == (0,)
    assert g.input_places(1) == (0, 2) and g.output_places(1) == (1, 2)
    assert g.token_count == 3
    assert g.describe() == "the net with 2 transitions and 3 places"


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"pre": (0, 2)}, "transition indices 0..1"),
        ({"post": (0, -1)}, "transition indices 0..1"),
        ({"tokens": (1, -1)}, "whole numbers >= 0"),
        ({"tokens": (1,)}, "2 places but 1 entries in tokens"),
        ({"places": ("a", "q")}, "'a' is used twice"),
        ({"places": ("", "q")}, "non-empty text name"),
        ({"pre": [0, 1]}, "must be a tuple"),
        ({"tokens": (1, True)}, "whole numbers"),
    ],
)
def test_malformed_marked_graphs_are_refused(kwargs: dict[str, object], message: str) -> None:
    fields: dict[str, object] = {
        "transitions": ("a", "b"),
        "places": ("p", "q"),
        "pre": (0, 1),
        "post": (1, 0),
        "tokens": (1, 0),
    }
    fields.update(kwargs)
    with pytest.raises(FormatError) as info:
        MarkedGraph(**fields)  # type: ignore[arg-type]
    assert message in str(info.value)
    assert "\n" not in str(info.value)


def test_net_limit() -> None:
    big = ParameterSet(1, 1, 1, NET_LIMIT)  # area NET_LIMIT + 1
    with pytest.raises(LimitExceeded) as info:
        build_net(big)
    assert str(info.value) == (
        "the net of C(1,1,1,20000) has 20,001 transitions, more than the explicit-net limit "
        "20,000; choose a smaller system or use the closed formulas"
    )
    with pytest.raises(ZooError):
        build_net((4, 2, 2, 3))  # type: ignore[arg-type]


def test_area_200_nets_build() -> None:
    # How fast (a few milliseconds each): benchmarks/bench_net.py prints the figures.
    for p in (
        ParameterSet(1, 1, 100, 100),
        ParameterSet(10, 10, 10, 10),
        ParameterSet(199, 1, 1, 1),
    ):
        net = build_net(p)
        assert isinstance(net, CycloidNet) and net.transition_count == 200
