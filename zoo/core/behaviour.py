"""Behaviour: when two cycloid systems cannot be told apart by what they do.

Two systems *behave alike* when their reachability graphs are isomorphic as directed graphs,
initial marking to initial marking, with the names of the fired transitions ignored: a
bijection of reachable markings that maps the initial marking of one to that of the other and
an arc (a firing) onto an arc (docs/theory/behaviour.md). A marked graph never has two arcs
between the same pair of markings (two different transitions change different places), so the
reachability graph is a plain directed graph and the bijection is all the evidence needed.

Deciding it follows the usual pattern of cheap invariants before an exact test:

* ``behaviour_profile`` computes invariants of the state graph (states, arcs, the degree
  histograms, the sizes of the breadth-first layers from and to the initial marking, and a
  colour-refinement histogram); two systems with different profiles behave differently, and
  ``BehaviourProfile.first_difference`` names the invariant that tells them apart;
* ``state_graph_isomorphism`` looks for an explicit bijection (networkx's VF2++ on the
  refined colours) and checks it arc by arc before returning it.

For a cycloid the number of states and arcs depends only on α, β and A (docs/theory/
state-counts.md), and it is at least A (the binomial coefficient C(α+β, α) is at least α+β),
so a class with s reachable states has area at most s.
"""

from __future__ import annotations

import hashlib
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass, fields
from typing import Any

from zoo.core.canonical import CanonicalForm, canonical_form, isomorphism_from_forms
from zoo.core.net import MarkedGraph, build_net
from zoo.core.params import ParameterSet
from zoo.core.reachability import reachability_graph
from zoo.core.structure import distances
from zoo.errors import LimitExceeded

#: Default bound S on the reachable states of the classes whose behaviour the catalog decides.
#: Measured on the 2-core machine: the state graphs of every class of area <= 100 with at most
#: 10^4 states are searched and compared in about a minute (docs/theory/behaviour.md).
BEHAVIOUR_STATE_LIMIT = 10_000

#: Rounds of colour refinement in the profile; the refinement stops earlier when stable.
REFINEMENT_ROUNDS = 64


@dataclass(frozen=True)
class StateGraph:
    """A reachability graph with the transition names dropped: state 0 is the initial marking,
    ``successors[i]`` the states reached from state i by one firing, in increasing order."""

    successors: tuple[tuple[int, ...], ...]

    @property
    def state_count(self) -> int:
        return len(self.successors)

    @property
    def arc_count(self) -> int:
        return sum(len(s) for s in self.successors)

    def predecessors(self) -> tuple[tuple[int, ...], ...]:
        found: list[list[int]] = [[] for _ in self.successors]
        for source, targets in enumerate(self.successors):
            for target in targets:
                found[target].append(source)
        return tuple(tuple(p) for p in found)


def state_graph_of(graph: MarkedGraph, limit: int = BEHAVIOUR_STATE_LIMIT) -> StateGraph:
    """The state graph of any marked graph from its initial marking (``LimitExceeded`` above
    ``limit`` states)."""
    rg = reachability_graph(graph, limit)
    found: list[set[int]] = [set() for _ in range(rg.state_count)]
    for source, _t, target in rg.arcs:
        found[source].add(target)
    return StateGraph(tuple(tuple(sorted(s)) for s in found))


def state_graph(p: ParameterSet, limit: int = BEHAVIOUR_STATE_LIMIT) -> StateGraph:
    """The state graph of the cycloid system C(p)."""
    return state_graph_of(build_net(p), limit)


def cycle_order(graph: StateGraph) -> list[int] | None:
    """The states in firing order when the state graph is one directed cycle through all of
    them (every system with min(α, β) = 1: one transition is enabled in every marking), else
    None."""
    order = [0]
    while True:
        targets = graph.successors[order[-1]]
        if len(targets) != 1:
            return None
        if targets[0] == 0:
            return order if len(order) == graph.state_count else None
        if len(order) >= graph.state_count:
            return None
        order.append(targets[0])


def _histogram(values: Sequence[int]) -> tuple[tuple[int, int], ...]:
    return tuple(sorted(Counter(values).items()))


def refined_colours(graph: StateGraph, rounds: int = REFINEMENT_ROUNDS) -> list[str]:
    """Colour refinement (one-dimensional Weisfeiler–Leman) on the directed state graph.

    A state starts with its distances from and to the initial marking and its degrees; each round
    adds the multisets of its successors' and predecessors' colours. Colours are digests of
    those signatures, so equal colours mean equal signatures in any graph: the colours of two
    graphs can be compared directly. An isomorphism maps every state to one of equal colour.
    """
    successors = graph.successors
    predecessors = graph.predecessors()
    forward = distances(successors, 0)
    backward = distances(predecessors, 0)
    colours = [
        _digest((forward[i], backward[i], len(successors[i]), len(predecessors[i])))
        for i in range(graph.state_count)
    ]
    classes = len(set(colours))
    for _ in range(rounds):
        colours = [
            _digest(
                (
                    colours[i],
                    tuple(sorted(colours[j] for j in successors[i])),
                    tuple(sorted(colours[j] for j in predecessors[i])),
                )
            )
            for i in range(graph.state_count)
        ]
        now = len(set(colours))
        if now == classes:
            break
        classes = now
    return colours


def _digest(value: object) -> str:
    return hashlib.blake2b(repr(value).encode("ascii"), digest_size=12).hexdigest()


@dataclass(frozen=True)
class BehaviourProfile:
    """Invariants of a state graph: equal for systems that behave alike.

    Fields are compared in order by ``first_difference``; the cheap ones come first.
    """

    states: int
    arcs: int
    out_degrees: tuple[tuple[int, int], ...]  # (degree, number of states)
    in_degrees: tuple[tuple[int, int], ...]
    layers_from_start: tuple[int, ...]  # states at distance 0, 1, 2, ... from M0
    layers_to_start: tuple[int, ...]  # states from which M0 is 0, 1, 2, ... firings away
    refinement: str  # digest of the histogram of refined colours

    def first_difference(self, other: BehaviourProfile) -> str | None:
        """The name of the first invariant that differs, or None when all agree."""
        for field in fields(self):
            if getattr(self, field.name) != getattr(other, field.name):
                return field.name
        return None


def behaviour_profile(graph: StateGraph) -> BehaviourProfile:
    """The invariants of a state graph (see ``BehaviourProfile``)."""
    successors = graph.successors
    predecessors = graph.predecessors()
    forward = distances(successors, 0)
    backward = distances(predecessors, 0)
    colours = refined_colours(graph)
    return BehaviourProfile(
        states=graph.state_count,
        arcs=graph.arc_count,
        out_degrees=_histogram([len(s) for s in successors]),
        in_degrees=_histogram([len(p) for p in predecessors]),
        layers_from_start=tuple(c for _, c in _histogram(forward)),
        layers_to_start=tuple(c for _, c in _histogram(backward)),
        refinement=_digest(sorted(Counter(colours).items())),
    )


def state_graph_isomorphism(first: StateGraph, second: StateGraph) -> tuple[int, ...] | None:
    """A bijection of states (``mapping[i]`` is the state of ``second`` that state i of
    ``first`` goes to) that maps state 0 to state 0 and arcs onto arcs, or None when there is
    none. The map is checked arc by arc before it is returned.
    """
    if (first.state_count, first.arc_count) != (second.state_count, second.arc_count):
        return None
    colours1, colours2 = refined_colours(first), refined_colours(second)
    if Counter(colours1) != Counter(colours2):
        return None
    import networkx as nx

    def as_networkx(graph: StateGraph, colours: list[str]) -> nx.DiGraph:
        result = nx.DiGraph()
        for state, colour in enumerate(colours):
            result.add_node(state, colour=colour)
        for source, targets in enumerate(graph.successors):
            result.add_edges_from((source, target) for target in targets)
        return result

    found = nx.vf2pp_isomorphism(
        as_networkx(first, colours1), as_networkx(second, colours2), node_label="colour"
    )
    if found is None:
        return None
    mapping = tuple(found[i] for i in range(first.state_count))
    check_state_map(first, second, mapping)
    return mapping


def check_state_map(first: StateGraph, second: StateGraph, mapping: Sequence[int]) -> None:
    """Raise ``ArithmeticError`` unless ``mapping`` is an isomorphism of the two state graphs
    that keeps the initial marking (the evidence recorded for a merge is checked this way)."""
    n = first.state_count
    if len(mapping) != n or sorted(mapping) != list(range(second.state_count)):
        raise ArithmeticError("a state map must be a bijection of the states")
    if mapping[0] != 0:
        raise ArithmeticError("a state map must send the initial marking to the initial marking")
    for source, targets in enumerate(first.successors):
        image = tuple(sorted(mapping[t] for t in targets))
        if image != second.successors[mapping[source]]:
            raise ArithmeticError(f"state {source}: its successors are not mapped onto successors")


def arc_labels(graph: StateGraph) -> list[int] | None:
    """Transitions recovered from the unlabelled state graph, one label per arc (in the order
    of ``successors``), or None where the recovery fails.

    In a marked graph two transitions enabled together fire in either order and end in the same
    marking (a square); opposite sides of a square are firings of the same transition. Joining
    them labels the arcs by classes that any isomorphism of state graphs maps onto each other.
    The labels are accepted only when they behave like transitions: every arc of one label
    changes the firing counts alike, so the counts of each label along any path from the
    initial marking are well defined up to whole rounds (each round fires every label once,
    as a minimal recurrent firing sequence of a cycloid does).
    """
    arcs: dict[tuple[int, int], int] = {}
    for source, targets in enumerate(graph.successors):
        for target in targets:
            arcs[(source, target)] = len(arcs)
    parent = list(range(len(arcs)))

    def find(a: int) -> int:
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a

    reachable = [set(targets) for targets in graph.successors]
    for u, targets in enumerate(graph.successors):
        for i, v in enumerate(targets):
            for w in targets[i + 1 :]:
                for x in reachable[v] & reachable[w]:
                    for a, b in ((arcs[(u, v)], arcs[(w, x)]), (arcs[(u, w)], arcs[(v, x)])):
                        a, b = find(a), find(b)
                        if a != b:
                            parent[a] = b
    roots: dict[int, int] = {}
    labels = [roots.setdefault(find(a), len(roots)) for a in range(len(arcs))]
    return labels


@dataclass(frozen=True)
class SynthesizedNet:
    """The marked graph read back from a state graph (see ``synthesized_net``)."""

    net: MarkedGraph
    counts: tuple[tuple[int, ...], ...]  # firing counts of each state, per label


def synthesized_net(graph: StateGraph) -> SynthesizedNet | None:
    """The marked graph whose places are the non-redundant regions of the state graph.

    With arc labels from ``arc_labels`` and c_s the firing counts of a state s, a place from
    transition t to transition u holding m tokens is consistent with every state exactly when
    m + c_s(t) − c_s(u) stays within {0, 1}; such places are the one-token regions of the
    theory of regions (Ehrenfeucht and Rozenberg, "Partial (set) 2-structures", Acta
    Informatica 27 (1990)). Places implied by a path of two others with no more tokens are left
    out. Every step is defined from the unlabelled graph, so isomorphic state graphs give
    isomorphic nets: different canonical forms prove different behaviour. None when the arc
    labels do not behave like transitions.
    """
    import numpy as np

    labels = arc_labels(graph)
    if labels is None:
        return None
    k = max(labels, default=-1) + 1
    n = graph.state_count
    counts = np.full((n, k), -1, dtype=np.int64)
    counts[0] = 0
    order = [0]
    arc = 0
    arc_of: list[list[tuple[int, int]]] = []
    for targets in graph.successors:
        arc_of.append([(t, labels[arc + i]) for i, t in enumerate(targets)])
        arc += len(targets)
    seen = [False] * n
    seen[0] = True
    for state in order:
        for target, label in arc_of[state]:
            expected = counts[state].copy()
            expected[label] += 1
            if not seen[target]:
                seen[target] = True
                counts[target] = expected
                order.append(target)
            else:
                difference = expected - counts[target]
                if not (difference == difference[0]).all():
                    return None  # the labels are not transitions: counts depend on the path
    if not all(seen):
        return None
    counts -= counts.min(axis=1, keepdims=True)
    low = np.empty((k, k), dtype=np.int64)
    high = np.empty((k, k), dtype=np.int64)
    for t in range(k):
        difference = counts[:, t : t + 1] - counts
        low[t] = difference.min(axis=0)
        high[t] = difference.max(axis=0)
    tokens = {
        (t, u): int(-low[t, u])
        for t in range(k)
        for u in range(k)
        if t != u and high[t, u] - low[t, u] <= 1
    }
    kept = [
        (t, u, m)
        for (t, u), m in sorted(tokens.items())
        if not any(
            (t, x) in tokens and (x, u) in tokens and tokens[(t, x)] + tokens[(x, u)] <= m
            for x in range(k)
            if x not in (t, u)
        )
    ]
    net = MarkedGraph(
        transitions=tuple(f"t{i}" for i in range(k)),
        places=tuple(f"p{t}_{u}" for t, u, _ in kept),
        pre=tuple(t for t, _, _ in kept),
        post=tuple(u for _, u, _ in kept),
        tokens=tuple(m for _, _, m in kept),
    )
    return SynthesizedNet(net, tuple(tuple(int(v) for v in row) for row in counts))


@dataclass(frozen=True)
class BehaviourComparison:
    """Whether two systems behave alike, with the evidence: the invariant that differs (a
    split) or an explicit state map (a merge); ``same`` is None when the state graphs pass the
    state bound and nothing was decided."""

    same: bool | None
    evidence: str
    state_map: tuple[int, ...] | None = None

    def as_dict(self) -> dict[str, object]:
        return {
            "same_behaviour": self.same,
            "evidence": self.evidence,
            "state_map": list(self.state_map) if self.state_map is not None else None,
        }


def _state_map_from_nets(
    graphs: Sequence[StateGraph], nets: Sequence[SynthesizedNet], forms: Sequence[CanonicalForm]
) -> tuple[int, ...] | None:
    """The state map induced by an isomorphism of the two synthesized nets: a state is known
    by its firing counts, and the net isomorphism renames the transitions. Checked arc by arc;
    None if it is no isomorphism (the caller then searches)."""
    found = isomorphism_from_forms(nets[0].net, forms[0], nets[1].net, forms[1])
    if found is None:
        return None
    transition_map = found[0]
    state_of = {counts: state for state, counts in enumerate(nets[1].counts)}
    mapping: list[int] = []
    for counts in nets[0].counts:
        renamed = [0] * len(counts)
        for label, value in enumerate(counts):
            renamed[transition_map[label]] = value
        state = state_of.get(tuple(renamed))
        if state is None:
            return None
        mapping.append(state)
    try:
        check_state_map(graphs[0], graphs[1], mapping)
    except ArithmeticError:
        return None
    return tuple(mapping)


def compare_behaviour(
    first: ParameterSet, second: ParameterSet, limit: int = BEHAVIOUR_STATE_LIMIT
) -> BehaviourComparison:
    """Decide whether C(first) and C(second) behave alike (see the module docstring).

    The closed formulas for states and arcs settle most pairs at once; otherwise both state
    graphs are searched (at most ``limit`` states each) and compared.

    >>> compare_behaviour(ParameterSet(1, 2, 1, 3), ParameterSet(1, 3, 1, 2)).same
    True
    >>> compare_behaviour(ParameterSet(3, 3, 1, 3), ParameterSet(3, 3, 2, 2)).evidence
    'the nets synthesized from the state graphs are not isomorphic'
    """
    from zoo.core.invariants import reachable_state_count, state_arc_count

    counts = [(reachable_state_count(p), state_arc_count(p)) for p in (first, second)]
    if counts[0] != counts[1]:
        what = "states" if counts[0][0] != counts[1][0] else "arcs"
        return BehaviourComparison(False, f"the state graphs differ in {what} (closed formula)")
    if counts[0][0] > limit:
        return BehaviourComparison(
            None, f"not decided: {counts[0][0]:,} states, above the bound {limit:,}"
        )
    try:
        graphs = [state_graph(p, limit) for p in (first, second)]
    except LimitExceeded:  # pragma: no cover - the closed formula said it fits
        return BehaviourComparison(None, f"not decided: more than {limit:,} states")
    cycles = [cycle_order(g) for g in graphs]
    if cycles[0] is not None and cycles[1] is not None:
        # Two directed cycles of the same length: walk both from the initial marking.
        walk = [0] * graphs[0].state_count
        for first_state, second_state in zip(cycles[0], cycles[1], strict=True):
            walk[first_state] = second_state
        check_state_map(graphs[0], graphs[1], walk)
        return BehaviourComparison(
            True, "both state graphs are one directed cycle of the same length", tuple(walk)
        )
    profiles = [behaviour_profile(g) for g in graphs]
    difference = profiles[0].first_difference(profiles[1])
    if difference is not None:
        return BehaviourComparison(False, f"the state graphs differ in {difference}")
    synthesized = [synthesized_net(g) for g in graphs]
    if synthesized[0] is not None and synthesized[1] is not None:
        first_net, second_net = synthesized[0], synthesized[1]
        forms = [canonical_form(s.net) for s in (first_net, second_net)]
        if forms[0].fingerprint != forms[1].fingerprint:
            return BehaviourComparison(
                False, "the nets synthesized from the state graphs are not isomorphic"
            )
        mapping = _state_map_from_nets(graphs, (first_net, second_net), forms)
        if mapping is not None:
            return BehaviourComparison(
                True,
                "explicit isomorphism of the state graphs (from the synthesized nets)",
                mapping,
            )
    mapping = state_graph_isomorphism(graphs[0], graphs[1])
    if mapping is None:
        return BehaviourComparison(False, "no isomorphism of the state graphs (exhaustive search)")
    return BehaviourComparison(True, "explicit isomorphism of the state graphs", mapping)


@dataclass(frozen=True)
class BehaviourKey:
    """What the catalog stores to group classes by behaviour (``behaviour_key``).

    ``cycle:s`` for a state graph that is one directed cycle of s markings,
    ``net:FINGERPRINT`` (nauty, encoding v1) for the net synthesized from the state graph.
    Classes with different keys behave differently; the build joins classes with equal keys
    (after an explicit state map, unless both are cycles). ``evidence`` says how the key was
    found.
    """

    key: str
    evidence: str


#: Evidence texts of ``BehaviourKey`` (docs/theory/behaviour.md).
CYCLE_EVIDENCE = "the state graph is one directed cycle"
OWN_NET_EVIDENCE = "the net read back from the state graph is the class's own net"
SYNTHESIZED_EVIDENCE = "nauty fingerprint of the net read back from the state graph"


def behaviour_key(
    p: ParameterSet, class_fingerprint: str, limit: int = BEHAVIOUR_STATE_LIMIT
) -> BehaviourKey | None:
    """The behaviour key of the class of p (``class_fingerprint`` is its nauty fingerprint),
    or None above ``limit`` states or when no net can be read back from the state graph.

    A state graph that is one cycle (min(α, β) = 1) gets ``cycle:s``. Otherwise the net
    synthesized from the state graph (``synthesized_net``) names the behaviour: isomorphic
    state graphs give isomorphic synthesized nets, so different keys mean different behaviour;
    equal keys of two classes are confirmed by an explicit state map before the build joins
    them (``zoo.catalog.behaviour``). ``own_net_read_back`` decides the usual case without
    nauty: the net read back is the class's own net, so its fingerprint is the class's.

    >>> behaviour_key(ParameterSet(1, 2, 1, 3), "unused").key
    'cycle:5'
    """
    from zoo.core.invariants import reachable_state_count

    states = reachable_state_count(p)
    if states > limit:
        return None
    if min(p.alpha, p.beta) == 1:
        return BehaviourKey(f"cycle:{states}", CYCLE_EVIDENCE)
    net = build_net(p)
    if own_net_read_back(net, firing_arcs(net, limit)[1]):
        return BehaviourKey(f"net:{class_fingerprint}", OWN_NET_EVIDENCE)
    graph = state_graph_of(net, limit)
    synthesized = synthesized_net(graph)
    if synthesized is None:
        return None
    fingerprint = canonical_form(synthesized.net).fingerprint
    return BehaviourKey(f"net:{fingerprint}", SYNTHESIZED_EVIDENCE)


def firing_arcs(net: MarkedGraph, limit: int = BEHAVIOUR_STATE_LIMIT) -> tuple[list[int], Any]:
    """The reachability graph of a safe marked graph as (markings, arcs): ``markings[i]`` has
    bit j set when place j holds a token in state i, and ``arcs`` is an (arcs × 3) numpy array
    of (source state, transition, target state). State 0 is the initial marking; states are
    numbered breadth first, each after the state it was first reached from.

    The same graph as ``zoo.core.reachability.reachability_graph`` (the tests compare them),
    made faster for the thousands of classes a build decides: a place of a marked graph has one
    output transition, so firing t leaves every other enabled transition enabled, and only the
    transitions fed by t's output places can become enabled. ``LimitExceeded`` above
    ``limit`` states; ``ArithmeticError`` when a place would get a second token.
    """
    import numpy as np

    inputs = [0] * net.transition_count
    outputs = [0] * net.transition_count
    for j in range(net.place_count):
        outputs[net.pre[j]] |= 1 << j
        inputs[net.post[j]] |= 1 << j
    fed = [
        tuple(u for u in range(net.transition_count) if inputs[u] & outputs[t])
        for t in range(net.transition_count)
    ]
    if any(k > 1 for k in net.tokens):
        raise ArithmeticError(f"{net.describe()} is not safe in its initial marking")
    start = sum(1 << j for j, k in enumerate(net.tokens) if k)
    markings = [start]
    enabled_in = [tuple(t for t in range(net.transition_count) if start & inputs[t] == inputs[t])]
    index = {start: 0}
    found: list[int] = []
    state = 0
    while state < len(markings):
        marking, enabled = markings[state], enabled_in[state]
        for position, t in enumerate(enabled):
            rest = marking ^ inputs[t]
            if rest & outputs[t]:
                raise ArithmeticError(f"{net.describe()} is not safe: a place gets a second token")
            after = rest | outputs[t]
            target = index.get(after)
            if target is None:
                target = len(markings)
                if target >= limit:
                    raise LimitExceeded(
                        f"reachability graph of {net.describe()} has more than {limit:,} states"
                    )
                index[after] = target
                markings.append(after)
                still = enabled[:position] + enabled[position + 1 :]
                woken = tuple(
                    u for u in fed[t] if after & inputs[u] == inputs[u] and u not in still
                )
                enabled_in.append(still + woken)
            found.extend((state, t, target))
        state += 1
    return markings, np.array(found, dtype=np.int64).reshape(-1, 3)


def own_net_read_back(net: MarkedGraph, arcs: Any) -> bool:
    """True when ``synthesized_net`` of the unlabelled state graph gives back ``net`` itself,
    decided with the transition names that the arcs of its reachability graph carry
    (``firing_arcs(net)[1]``, or ``reachability_graph(net).arcs``: state 0 initial, arcs
    grouped by source state, every state numbered after the state it was first reached from),
    in numpy, without nauty.

    Two steps of ``synthesized_net``, each computed from the known labels:

    * the arc labels: ``arc_labels`` joins the arcs of a transition a at states u and w when a
      firing u → w of another transition keeps a enabled (in a marked graph a enabled at u
      stays enabled, and the two firings close a square). The joins never mix transitions
      (the markings of a strongly connected marked graph fix the firing counts up to whole
      rounds), so the labels are the transitions exactly when every transition's arcs form
      one joined group: as many groups as transitions.
    * the places: with those labels, every pair (t, u) whose count difference c(t) − c(u)
      takes at most two values over the reachable states is a place with m = −min tokens,
      less the places implied by two others with no more tokens. The net is given back when
      these are exactly its places, with its tokens.

    ``tests/core/test_behaviour.py`` checks this against ``synthesized_net`` on small classes.
    """
    import numpy as np

    transitions = net.transition_count
    arcs = np.asarray(arcs, dtype=np.int64).reshape(-1, 3)
    source, label, target = arcs[:, 0], arcs[:, 1], arcs[:, 2]
    states = int(target.max()) + 1 if len(arcs) else 1
    arc_at = np.full((states, transitions), -1, dtype=np.int64)
    arc_at[source, label] = np.arange(len(arcs))
    # Joins: arc (u, b, w) joins the arc of every other transition a enabled at u with the arc
    # of a at w, when a is enabled there (always, in a marked graph: firing b takes no token
    # from a's places). Arcs are grouped by source state, as the search lists them.
    degree = np.bincount(source, minlength=states)
    repeat = degree[source]
    first_of_source = np.cumsum(degree) - degree
    arc = np.repeat(np.arange(len(arcs)), repeat)
    group_start = np.repeat(np.cumsum(repeat) - repeat, repeat)
    other = first_of_source[source[arc]] + np.arange(len(arc)) - group_start
    keep = other != arc
    arc, other = arc[keep], other[keep]
    joined = arc_at[target[arc], label[other]]
    keep = joined >= 0
    if _component_count(len(arcs), other[keep], joined[keep]) != transitions:
        return False
    # Firing counts of every state, along the arcs that discovered the states.
    first_arc = np.full(states, -1, dtype=np.int64)
    order = np.arange(len(arcs))[::-1]
    first_arc[target[order]] = order  # the earliest arc into each state wins
    # A count is at most the state's depth, below the state bound: int16 holds every
    # difference, and halves the memory traffic of the ranges below.
    counts = np.zeros((states, transitions), dtype=np.int16 if states < 2**15 else np.int64)
    parents = source[first_arc[1:]]  # non-decreasing: states are numbered breadth first
    fired = label[first_arc[1:]]
    start = 1
    while start < states:  # one breadth-first layer at a time: parents lie before the layer
        stop = 1 + int(np.searchsorted(parents, start))
        layer = np.arange(start, stop)
        counts[layer] = counts[parents[layer - 1]]
        counts[layer, fired[layer - 1]] += 1
        start = stop
    # A pair (t, u) is a place when c(t) - c(u) takes at most two values over the states. Two
    # bounds settle most pairs without a scan. The tokens on a path from u to t are
    # M0(path) + c(u) - c(t) >= 0, so c(t) - c(u) lies in [-d(t, u), d(u, t)], d the fewest
    # tokens on a path in M0; and it takes at least two values (firing t changes it). A pair
    # with d(t, u) + d(u, t) = 1 is therefore a place with d(t, u) tokens. Any other pair is a
    # place only if its values stay within two: a sample of the states shows a third value
    # for most of them, and the rest are scanned over every state.
    distance = _token_distances(net)
    bounded = distance + distance.T
    np.fill_diagonal(bounded, 2)
    by_transition = np.ascontiguousarray(counts.T)  # one row per transition: contiguous scans
    sample = np.ascontiguousarray(by_transition[:, :: max(1, states // 256)])
    candidate = np.zeros((transitions, transitions), dtype=bool)
    for t in range(transitions):
        difference = sample[t] - sample
        candidate[t] = difference.max(axis=1) - difference.min(axis=1) <= 1
    candidate &= bounded >= 2
    np.fill_diagonal(candidate, False)
    first, second = np.nonzero(candidate)
    difference = by_transition[first] - by_transition[second]
    low = difference.min(axis=1).astype(np.int64)
    is_place = difference.max(axis=1) - low <= 1
    region = bounded <= 1
    tokens = np.full((transitions, transitions), np.iinfo(np.int64).max // 4, dtype=np.int64)
    tokens[region] = distance[region]
    region[first[is_place], second[is_place]] = True
    tokens[first[is_place], second[is_place]] = -low[is_place]
    via = (tokens[:, :, None] + tokens[None, :, :]).min(axis=1)  # best path t -> x -> u
    kept = region & (via > tokens)
    found = sorted(zip(*(a.tolist() for a in np.nonzero(kept)), strict=True))
    found_places = sorted((t, u, int(tokens[t, u])) for t, u in found)
    own_places = sorted(zip(net.pre, net.post, net.tokens, strict=True))
    return found_places == own_places


def _token_distances(net: MarkedGraph) -> Any:
    """d[t, u]: the fewest tokens of M0 on a directed path from transition t to transition u
    (0 from t to itself; a large number when there is no path), by Floyd and Warshall."""
    import numpy as np

    size = net.transition_count
    far = np.iinfo(np.int64).max // 4
    distance = np.full((size, size), far, dtype=np.int64)
    for t, u, k in zip(net.pre, net.post, net.tokens, strict=True):
        distance[t, u] = min(distance[t, u], k)
    np.fill_diagonal(distance, 0)
    for middle in range(size):
        np.minimum(distance, distance[:, middle : middle + 1] + distance[middle], out=distance)
    return distance


def _component_count(nodes: int, first: Any, second: Any) -> int:
    """The number of connected components of a graph on ``nodes`` nodes with the given edges."""
    import numpy as np
    from scipy.sparse import coo_array
    from scipy.sparse.csgraph import connected_components

    edges = coo_array(
        (np.ones(len(first), dtype=np.int8), (np.asarray(first), np.asarray(second))),
        shape=(nodes, nodes),
    )
    return int(connected_components(edges, directed=False)[0])


__all__ = [
    "BEHAVIOUR_STATE_LIMIT",
    "BehaviourComparison",
    "BehaviourKey",
    "BehaviourProfile",
    "StateGraph",
    "SynthesizedNet",
    "arc_labels",
    "synthesized_net",
    "behaviour_key",
    "behaviour_profile",
    "own_net_read_back",
    "check_state_map",
    "compare_behaviour",
    "cycle_order",
    "firing_arcs",
    "refined_colours",
    "state_graph",
    "state_graph_isomorphism",
    "state_graph_of",
]
