"""Explicit behaviour of small systems: the reachability graph, liveness, 1-safeness, reversibility.

The reachability graph is found by breadth-first search from the initial marking under the usual
firing rule of place/transition nets (a transition is enabled when each of its input places
holds a token; firing takes one token from each input place and puts one on each output place).
Markings of 1-safe nets are bit masks (bit j = place j), which keeps the search at about a
microsecond per arc; nets that turn out not to be 1-safe are searched again with token tuples.

This is the reference the closed formulas of zoo.core.invariants are checked against
(docs/theory/cycles-and-tokens.md, docs/theory/state-counts.md); it is exponential in the tokens
(docs/architecture.md), hence the state limit.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from typing import TYPE_CHECKING

from zoo.core import structure
from zoo.core.net import MarkedGraph
from zoo.errors import FormatError, LimitExceeded, ParameterError

if TYPE_CHECKING:
    import networkx as nx

#: Default largest number of states an explicit search may visit. 200,000 states with their
#: arcs take about 100 MB and a few seconds.
DEFAULT_STATE_LIMIT = 200_000

Marking = tuple[int, ...]
Arc = tuple[int, int, int]  # (source state, transition index, target state)


@dataclass(frozen=True)
class ReachabilityGraph:
    """The reachability graph of a marked graph: states, arcs, and the marking of each state.

    State 0 is the initial marking. ``codes[i]`` holds the marking of state i with ``width``
    bits per place (place j at bits j*width ... (j+1)*width - 1); ``marking(i)`` decodes it.
    ``arcs`` lists (source state, transition index, target state) in the order found.
    """

    graph: MarkedGraph
    width: int
    codes: tuple[int, ...]
    arcs: tuple[Arc, ...]

    @property
    def state_count(self) -> int:
        return len(self.codes)

    @property
    def arc_count(self) -> int:
        return len(self.arcs)

    def marking(self, state: int) -> Marking:
        """Tokens on each place in the given state."""
        code, width = self.codes[state], self.width
        mask = (1 << width) - 1
        return tuple((code >> (j * width)) & mask for j in range(self.graph.place_count))

    def iter_markings(self) -> Iterator[Marking]:
        """The markings of all states, in state order."""
        for state in range(self.state_count):
            yield self.marking(state)

    def successors(self) -> list[list[int]]:
        """Adjacency lists: the target states of the arcs leaving each state."""
        found: list[list[int]] = [[] for _ in self.codes]
        for source, _t, target in self.arcs:
            found[source].append(target)
        return found


def _check_limit(limit: object) -> int:
    if isinstance(limit, bool) or not isinstance(limit, int) or limit < 1:
        raise ParameterError(f"the state limit must be a positive whole number, got {limit!r}")
    return limit


def _too_many(graph: MarkedGraph, limit: int) -> LimitExceeded:
    return LimitExceeded(
        f"reachability graph of {graph.describe()} has more than {limit:,} states; "
        "raise --state-limit or choose a smaller system"
    )


class _NotSafe(Exception):
    """Raised inside the bit-mask search when a place would receive a second token."""


def _search_safe(graph: MarkedGraph, limit: int) -> tuple[list[int], list[Arc]]:
    inputs = [0] * graph.transition_count
    outputs = [0] * graph.transition_count
    for j in range(graph.place_count):
        outputs[graph.pre[j]] |= 1 << j
        inputs[graph.post[j]] |= 1 << j
    masks = list(zip(range(graph.transition_count), inputs, outputs, strict=True))
    start = sum(1 << j for j, k in enumerate(graph.tokens) if k)
    index = {start: 0}
    codes = [start]
    arcs: list[Arc] = []
    state = 0
    while state < len(codes):
        marking = codes[state]
        for t, needed, produced in masks:
            if marking & needed == needed:
                rest = marking ^ needed
                if rest & produced:
                    raise _NotSafe
                after = rest | produced
                target = index.get(after)
                if target is None:
                    target = len(codes)
                    if target >= limit:
                        raise _too_many(graph, limit)
                    index[after] = target
                    codes.append(after)
                arcs.append((state, t, target))
        state += 1
    return codes, arcs


def _search_general(graph: MarkedGraph, limit: int) -> tuple[list[Marking], list[Arc]]:
    pre_sets = [graph.input_places(t) for t in range(graph.transition_count)]
    post_sets = [graph.output_places(t) for t in range(graph.transition_count)]
    start = tuple(graph.tokens)
    index = {start: 0}
    states = [start]
    arcs: list[Arc] = []
    state = 0
    while state < len(states):
        marking = states[state]
        for t in range(graph.transition_count):
            if all(marking[j] for j in pre_sets[t]):
                after = list(marking)
                for j in pre_sets[t]:
                    after[j] -= 1
                for j in post_sets[t]:
                    after[j] += 1
                key = tuple(after)
                target = index.get(key)
                if target is None:
                    target = len(states)
                    if target >= limit:
                        raise _too_many(graph, limit)
                    index[key] = target
                    states.append(key)
                arcs.append((state, t, target))
        state += 1
    return states, arcs


def reachability_graph(graph: MarkedGraph, limit: int = DEFAULT_STATE_LIMIT) -> ReachabilityGraph:
    """The reachability graph of ``graph`` from its initial marking, by breadth-first search.

    Raises ``LimitExceeded`` when more than ``limit`` states are reachable (an unbounded net
    always does).

    >>> from zoo.core.net import build_net
    >>> from zoo.core.params import ParameterSet
    >>> rg = reachability_graph(build_net(ParameterSet(4, 2, 2, 3)))
    >>> rg.state_count, rg.arc_count  # docs/theory/check-values.md table: 40 states, 64 edges
    (40, 64)
    """
    if not isinstance(graph, MarkedGraph):
        raise FormatError(f"a reachability graph needs a MarkedGraph, got {type(graph).__name__}")
    limit = _check_limit(limit)
    if all(k <= 1 for k in graph.tokens):
        try:
            codes, arcs = _search_safe(graph, limit)
            return ReachabilityGraph(graph, 1, tuple(codes), tuple(arcs))
        except _NotSafe:
            pass
    states, arcs = _search_general(graph, limit)
    width = max(1, max((max(s, default=0) for s in states), default=0).bit_length())
    wide = tuple(sum(k << (j * width) for j, k in enumerate(marking)) for marking in states)
    return ReachabilityGraph(graph, width, wide, tuple(arcs))


def place_bound(rg: ReachabilityGraph) -> int:
    """The largest number of tokens any place holds in any reachable marking."""
    if rg.width == 1:
        return 1 if any(rg.codes) else 0
    return max((max(m, default=0) for m in rg.iter_markings()), default=0)


def is_one_safe(rg: ReachabilityGraph) -> bool:
    """1-safe: no reachable marking puts more than one token on a place."""
    if rg.width == 1:
        return True
    return place_bound(rg) <= 1


def strongly_connected_components(rg: ReachabilityGraph) -> list[list[int]]:
    """The strongly connected components of the reachability graph (zoo.core.structure).

    Components come out in reverse topological order: a component is listed before any
    component that has an arc into it.
    """
    return structure.strongly_connected_components(rg.successors())


def is_reversible(rg: ReachabilityGraph) -> bool:
    """Reversible: the initial marking is reachable from every reachable marking.

    Equivalently the reachability graph is strongly connected (docs/theory/cycles-and-tokens.md).
    """
    return all(structure.reachable(structure.reversed_arcs(rg.successors()), 0))


def dead_transitions(rg: ReachabilityGraph) -> tuple[int, ...]:
    """Transitions that are not live: from some reachable marking they can never fire again.

    A transition is live iff it labels an arc inside every bottom strongly connected component
    of the (finite) reachability graph: every state reaches a bottom component, and a bottom
    component is never left (common practice in Petri-net analysis).
    """
    components = strongly_connected_components(rg)
    component_of = [0] * rg.state_count
    for c, members in enumerate(components):
        for state in members:
            component_of[state] = c
    is_bottom = [True] * len(components)
    fired_in: list[set[int]] = [set() for _ in components]
    for source, t, target in rg.arcs:
        c = component_of[source]
        if component_of[target] != c:
            is_bottom[c] = False
        else:
            fired_in[c].add(t)
    everywhere = set(range(rg.graph.transition_count))
    for c, bottom in enumerate(is_bottom):
        if bottom:
            everywhere &= fired_in[c]
    return tuple(t for t in range(rg.graph.transition_count) if t not in everywhere)


def is_live(rg: ReachabilityGraph) -> bool:
    """Live: from every reachable marking every transition can fire again
    (docs/theory/cycles-and-tokens.md)."""
    return not dead_transitions(rg)


@dataclass(frozen=True)
class Behaviour:
    """The explicit behavioural facts of one system, from its reachability graph."""

    states: int
    arcs: int
    live: bool
    one_safe: bool
    reversible: bool
    bound: int

    def as_dict(self) -> dict[str, object]:
        return {
            "states": self.states,
            "arcs": self.arcs,
            "live": self.live,
            "one_safe": self.one_safe,
            "reversible": self.reversible,
            "bound": self.bound,
        }


def explicit_behaviour(graph: MarkedGraph, limit: int = DEFAULT_STATE_LIMIT) -> Behaviour:
    """Search the reachability graph once and report its size, liveness, safeness, reversibility."""
    rg = reachability_graph(graph, limit)
    return Behaviour(
        states=rg.state_count,
        arcs=rg.arc_count,
        live=is_live(rg),
        one_safe=is_one_safe(rg),
        reversible=is_reversible(rg),
        bound=place_bound(rg),
    )


def reachability_to_networkx(rg: ReachabilityGraph) -> nx.MultiDiGraph:
    """The reachability graph as a ``networkx.MultiDiGraph``.

    Nodes are state indices with attribute ``marking`` (tokens per place); every arc has
    ``transition`` (the name of the transition fired).
    """
    import networkx as nx

    result = nx.MultiDiGraph()
    for state in range(rg.state_count):
        result.add_node(state, marking=rg.marking(state))
    names = rg.graph.transitions
    for source, t, target in rg.arcs:
        result.add_edge(source, target, transition=names[t])
    return result
