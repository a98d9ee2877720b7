"""Reachability between markings of a marked graph, decided by token counts on circuits.

For a live marked graph whose net is strongly connected, a marking M' is reachable from a
marking M exactly when every directed circuit carries the same number of tokens under both
(Commoner, Holt, Even and Pnueli, "Marked directed graphs", J. Computer and System Sciences
5 (1971) 511–523; also Murata, "Petri nets: properties, analysis and applications",
Proc. IEEE 77 (1989), §V; docs/theory/cycles-and-tokens.md). Equivalently the state equation
M' = M + C·x has an integer solution x, the number of firings of each transition.

For a strongly connected net the solutions differ by a constant vector, so the one with smallest
entry 0 is the firing count of every shortest firing sequence (any other solution fires every
transition more often). It can always be fired greedily: if no transition with firings left were
enabled, following their unmarked input places backwards would close a circuit without tokens,
which liveness rules out. ``firing_sequence`` does exactly that.

When the counts differ, ``unequal_circuit`` names a directed circuit whose token count differs:
the evidence a user can check by hand.

Net automorphisms move markings between classes: the same net may carry a marking that is
reachable from one placement of an initial marking and not from another. ``marking_orbit``
lists every image of a marking under the automorphisms of the unmarked net (generators from
nauty), and ``class_signature`` names the reachability class of a marking, so that a marking can
be compared with all of them at once.
"""

from __future__ import annotations

from collections import deque
from collections.abc import Callable, Sequence

from zoo.core.net import MarkedGraph
from zoo.errors import FormatError, LimitExceeded


def _check(graph: MarkedGraph, *markings: Sequence[int]) -> None:
    for marking in markings:
        if len(marking) != graph.place_count or any(k < 0 for k in marking):
            raise FormatError(
                f"a marking of {graph.describe()} needs {graph.place_count} token counts >= 0"
            )


def firing_counts(
    graph: MarkedGraph, source: Sequence[int], target: Sequence[int]
) -> tuple[int, ...] | None:
    """The smallest x >= 0 with ``target = source + C·x`` (firings per transition), or None.

    The net must be connected (every cycloid net is). Firing transition t adds a token to each
    place whose input transition is t and takes one from each place whose output transition is
    t, so for a place p from u to v: target(p) = source(p) + x[u] − x[v].

    >>> from zoo.core.net import build_net
    >>> from zoo.core.params import ParameterSet
    >>> net = build_net(ParameterSet(2, 1, 1, 1))
    >>> firing_counts(net, net.tokens, net.tokens)
    (0, 0, 0)
    """
    _check(graph, source, target)
    n = graph.transition_count
    if n == 0:
        return ()
    x: list[int | None] = [None] * n
    x[0] = 0
    touching: list[list[int]] = [[] for _ in range(n)]
    for place in range(graph.place_count):
        touching[graph.pre[place]].append(place)
        touching[graph.post[place]].append(place)
    queue = deque([0])
    while queue:
        t = queue.popleft()
        for place in touching[t]:
            u, v = graph.pre[place], graph.post[place]
            change = target[place] - source[place]  # = x[u] - x[v]
            xu, xv = x[u], x[v]
            if xu is not None and xv is None:
                x[v] = xu - change
                queue.append(v)
            elif xv is not None and xu is None:
                x[u] = xv + change
                queue.append(u)
    if any(value is None for value in x):
        raise FormatError(f"{graph.describe()} is not connected; reachability needs one net")
    known = [value for value in x if value is not None]
    for place in range(graph.place_count):
        u, v = graph.pre[place], graph.post[place]
        if target[place] - source[place] != known[u] - known[v]:
            return None
    low = min(known)
    return tuple(value - low for value in known)


def firing_sequence(
    graph: MarkedGraph, source: Sequence[int], target: Sequence[int]
) -> list[int] | None:
    """A shortest firing sequence (transition indices) from ``source`` to ``target``, or None
    when ``target`` is not reachable. ``source`` must make the net live (every circuit marked).

    >>> from zoo.core.net import build_net
    >>> from zoo.core.params import ParameterSet
    >>> net = build_net(ParameterSet(4, 2, 2, 3))
    >>> t = net.transitions.index("t_1_0")  # enabled at M0 (docs/theory/initial-marking.md)
    >>> after = list(net.tokens)
    >>> for j in net.input_places(t): after[j] -= 1
    >>> for j in net.output_places(t): after[j] += 1
    >>> [net.transitions[k] for k in firing_sequence(net, net.tokens, after)]
    ['t_1_0']
    """
    counts = firing_counts(graph, source, target)
    if counts is None:
        return None
    left = list(counts)
    marking = list(source)
    sequence: list[int] = []
    inputs = [graph.input_places(t) for t in range(graph.transition_count)]
    outputs = [graph.output_places(t) for t in range(graph.transition_count)]
    ready = deque(
        t for t in range(graph.transition_count) if left[t] and all(marking[j] for j in inputs[t])
    )
    total = sum(left)
    while ready:
        t = ready.popleft()
        if not left[t] or not all(marking[j] for j in inputs[t]):
            continue
        for j in inputs[t]:
            marking[j] -= 1
        for j in outputs[t]:
            marking[j] += 1
        left[t] -= 1
        sequence.append(t)
        # Only t itself and the consumers of its output places can have become enabled.
        for u in (t, *(graph.post[j] for j in outputs[t])):
            if left[u] and all(marking[j] for j in inputs[u]):
                ready.append(u)
    if len(sequence) != total:
        raise FormatError(
            f"{graph.describe()} is not live at the given marking: a circuit carries no token"
        )
    return sequence


def _shortest_path(graph: MarkedGraph, start: int, goal: int) -> list[int]:
    """Places of a shortest directed path from transition ``start`` to ``goal`` ([] if equal)."""
    if start == goal:
        return []
    via: dict[int, int] = {start: -1}
    queue = deque([start])
    while queue:
        t = queue.popleft()
        for place in graph.output_places(t):
            nxt = graph.post[place]
            if nxt not in via:
                via[nxt] = place
                if nxt == goal:
                    path = []
                    while nxt != start:
                        place = via[nxt]
                        path.append(place)
                        nxt = graph.pre[place]
                    return path[::-1]
                queue.append(nxt)
    raise FormatError(f"{graph.describe()} is not strongly connected")


def _circuits_of_walk(graph: MarkedGraph, walk: Sequence[int]) -> list[list[int]]:
    """Split a closed walk (places in order) into simple directed circuits."""
    circuits: list[list[int]] = []
    stack: list[int] = []  # places on the current simple path
    position: dict[int, int] = {}  # transition -> index in stack where it was left
    if not walk:
        return circuits
    position[graph.pre[walk[0]]] = 0
    for place in walk:
        stack.append(place)
        head = graph.post[place]
        if head in position:
            start = position[head]
            circuits.append(stack[start:])
            for removed in stack[start:]:
                position.pop(graph.post[removed], None)
            del stack[start:]
            position[head] = start
        else:
            position[head] = len(stack)
    return circuits


def unequal_circuit(
    graph: MarkedGraph, source: Sequence[int], target: Sequence[int]
) -> list[int] | None:
    """A directed circuit (places in order) whose token count differs between the two markings,
    or None when every circuit carries the same count (then ``target`` is reachable).

    The net must be strongly connected. Every circuit through a place p and back along a
    shortest path is tried first; otherwise two closed walks around the place where the firing
    counts cannot be solved differ, and one of their simple circuits is returned.
    """
    _check(graph, source, target)
    difference = [t - s for s, t in zip(source, target, strict=True)]
    for place in range(graph.place_count):
        circuit = [place, *_shortest_path(graph, graph.post[place], graph.pre[place])]
        if sum(difference[j] for j in circuit):
            return circuit
    if firing_counts(graph, source, target) is not None:
        return None
    root = 0
    for place in range(graph.place_count):
        u, v = graph.pre[place], graph.post[place]
        back = _shortest_path(graph, v, root)
        walks = (
            [*_shortest_path(graph, root, u), place, *back],
            [*_shortest_path(graph, root, v), *back],
        )
        if sum(difference[j] for j in walks[0]) != sum(difference[j] for j in walks[1]):
            for walk in walks:
                for circuit in _circuits_of_walk(graph, walk):
                    if sum(difference[j] for j in circuit):
                        return circuit
    raise ArithmeticError("the firing counts have no solution but every circuit agrees")


def nearest_earlier_marking(
    graph: MarkedGraph,
    accept: Callable[[tuple[int, ...]], bool],
    limit: int,
) -> tuple[tuple[int, ...], list[int]] | None:
    """The marking M closest before the graph's own marking that ``accept`` takes, and a
    shortest firing sequence from M to the graph's marking; None when no marking from which
    the graph's marking is reachable is accepted.

    Breadth-first search backwards (un-firing: a transition whose output places all hold a token
    gives them back to its input places), so the first accepted marking is at the smallest
    distance. ``LimitExceeded`` after ``limit`` markings. For a live, strongly connected marked
    graph the markings found this way are exactly those reachable from the graph's marking
    (its reachability graph is strongly connected).
    """
    start = tuple(graph.tokens)
    inputs = [graph.input_places(t) for t in range(graph.transition_count)]
    outputs = [graph.output_places(t) for t in range(graph.transition_count)]
    previous: dict[tuple[int, ...], tuple[tuple[int, ...], int] | None] = {start: None}
    queue = deque([start])
    while queue:
        marking = queue.popleft()
        if accept(marking):
            sequence: list[int] = []
            here = marking
            step = previous[here]
            while step is not None:  # walk forwards from the accepted marking to the start
                later, t = step
                sequence.append(t)
                here = later
                step = previous[here]
            return marking, sequence
        for t in range(graph.transition_count):
            if all(marking[j] for j in outputs[t]):
                earlier = list(marking)
                for j in outputs[t]:
                    earlier[j] -= 1
                for j in inputs[t]:
                    earlier[j] += 1
                key = tuple(earlier)
                if key not in previous:
                    if len(previous) >= limit:
                        raise LimitExceeded(
                            f"more than {limit:,} markings lead to the marking of "
                            f"{graph.describe()}; raise the state limit"
                        )
                    previous[key] = (marking, t)
                    queue.append(key)
    return None


Permutation = tuple[tuple[int, ...], tuple[int, ...]]  # (transition images, place images)


def class_signature(graph: MarkedGraph, marking: Sequence[int]) -> tuple[int, ...]:
    """A name of the reachability class of ``marking``: equal exactly for mutually reachable
    markings of a live, strongly connected marked graph.

    The token sums around the fundamental cycles of a spanning tree (each place off the tree
    closes one; arcs walked against their direction count negatively). These cycles span the
    cycle space, and two markings are linked by the state equation iff they agree on it (the
    incidence matrix's image is the orthogonal complement of the cycle space; Murata 1989 §V).

    >>> from zoo.core.net import build_net
    >>> from zoo.core.params import ParameterSet
    >>> net = build_net(ParameterSet(2, 1, 1, 1))
    >>> len(class_signature(net, net.tokens)) == net.place_count - net.transition_count + 1
    True
    """
    _check(graph, marking)
    n = graph.transition_count
    potential: list[int | None] = [None] * n
    tree = [False] * graph.place_count
    touching: list[list[int]] = [[] for _ in range(n)]
    for place in range(graph.place_count):
        touching[graph.pre[place]].append(place)
        touching[graph.post[place]].append(place)
    for root in range(n):
        if potential[root] is not None:
            continue
        potential[root] = 0
        queue = deque([root])
        while queue:
            t = queue.popleft()
            for place in touching[t]:
                u, v = graph.pre[place], graph.post[place]
                pu, pv = potential[u], potential[v]
                if pu is not None and pv is None:
                    potential[v] = pu + marking[place]
                    tree[place] = True
                    queue.append(v)
                elif pv is not None and pu is None:
                    potential[u] = pv - marking[place]
                    tree[place] = True
                    queue.append(u)
    known = [value or 0 for value in potential]
    return tuple(
        marking[place] + known[graph.pre[place]] - known[graph.post[place]]
        for place in range(graph.place_count)
        if not tree[place]
    )


def net_automorphisms(graph: MarkedGraph) -> list[Permutation]:
    """Generators of the automorphism group of the unmarked net (McKay and Piperno 2014, nauty).

    Each is (transition images, place images): transition i goes to ``images[0][i]``, place j
    to ``images[1][j]``. The net is encoded as in ``zoo.core.canonical`` (a vertex per
    transition, a tail and a head vertex per place) but without merging twins, so that the
    generators act on every place.
    """
    import pynauty

    n_t, n_p = graph.transition_count, graph.place_count
    adjacency: dict[int, list[int]] = {}
    for j in range(n_p):
        tail, head = n_t + j, n_t + n_p + j
        adjacency.setdefault(graph.pre[j], []).append(tail)
        adjacency.setdefault(tail, []).append(head)
        adjacency.setdefault(graph.post[j], []).append(head)
    cells = [set(range(n_t)), set(range(n_t, n_t + n_p)), set(range(n_t + n_p, n_t + 2 * n_p))]
    nauty_graph = pynauty.Graph(
        n_t + 2 * n_p,
        directed=False,
        adjacency_dict=adjacency,
        vertex_coloring=[cell for cell in cells if cell],
    )
    generators = pynauty.autgrp(nauty_graph)[0]
    return [(tuple(g[:n_t]), tuple(g[n_t + j] - n_t for j in range(n_p))) for g in generators]


def _apply(permutation: Permutation, marking: Sequence[int]) -> tuple[int, ...]:
    moved = [0] * len(marking)
    for j, image in enumerate(permutation[1]):
        moved[image] = marking[j]
    return tuple(moved)


def _compose(second: Permutation, first: Permutation) -> Permutation:
    """``second`` after ``first``."""
    return (
        tuple(second[0][i] for i in first[0]),
        tuple(second[1][j] for j in first[1]),
    )


#: For every image in an orbit: the image it was reached from and the generator used (None for
#: the start).
Orbit = dict[tuple[int, ...], tuple[tuple[int, ...], int] | None]


def marking_orbit(
    graph: MarkedGraph,
    marking: Sequence[int],
    generators: Sequence[Permutation],
    limit: int,
) -> Orbit:
    """Every image of ``marking`` under the group the generators span, breadth-first over the
    generators (a finite group's orbit is closed under its generators alone); each image
    records how it was reached, for ``orbit_automorphism``. ``LimitExceeded`` past ``limit``."""
    _check(graph, marking)
    start = tuple(marking)
    found: Orbit = {start: None}
    queue = deque([start])
    while queue:
        here = queue.popleft()
        for index, generator in enumerate(generators):
            image = _apply(generator, here)
            if image not in found:
                if len(found) >= limit:
                    raise LimitExceeded(
                        f"the automorphisms of {graph.describe()} move its marking to more than "
                        f"{limit:,} places"
                    )
                found[image] = (here, index)
                queue.append(image)
    return found


def orbit_automorphism(
    graph: MarkedGraph, orbit: Orbit, generators: Sequence[Permutation], image: tuple[int, ...]
) -> Permutation:
    """An automorphism that maps the orbit's start onto ``image`` (composed along the path by
    which ``marking_orbit`` reached it)."""
    steps: list[int] = []
    link = orbit[image]
    while link is not None:
        earlier, index = link
        steps.append(index)
        link = orbit[earlier]
    result: Permutation = (tuple(range(graph.transition_count)), tuple(range(graph.place_count)))
    for index in reversed(steps):
        result = _compose(generators[index], result)
    return result


def nearest_source(
    graph: MarkedGraph, sources: Sequence[Sequence[int]], target: Sequence[int], chunk: int = 256
) -> tuple[int, tuple[int, ...]] | None:
    """The source marking from which ``target`` is reached by the fewest firings, as (its index,
    the firing counts), or None when ``target`` is reachable from none of them.

    ``firing_counts`` for many sources at once (numpy, a chunk of sources per pass): the counts
    are propagated along one breadth-first spanning tree of the net, then every place is checked
    against the state equation. The graph must be connected.
    """
    import numpy as np

    _check(graph, target, *sources[:1])
    n = graph.transition_count
    touching: list[list[int]] = [[] for _ in range(n)]
    for place in range(graph.place_count):
        touching[graph.pre[place]].append(place)
        touching[graph.post[place]].append(place)
    seen = [False] * n
    seen[0] = True
    order: list[tuple[int, int, int, int]] = []  # (new transition, known one, place, sign)
    queue = deque([0])
    while queue:
        t = queue.popleft()
        for place in touching[t]:
            u, v = graph.pre[place], graph.post[place]
            if u == t and not seen[v]:  # x[v] = x[u] - change
                seen[v] = True
                order.append((v, u, place, -1))
                queue.append(v)
            elif v == t and not seen[u]:  # x[u] = x[v] + change
                seen[u] = True
                order.append((u, v, place, 1))
                queue.append(u)
    if not all(seen):
        raise FormatError(f"{graph.describe()} is not connected; reachability needs one net")
    pre, post = np.array(graph.pre), np.array(graph.post)
    goal = np.array(target, dtype=np.int64)
    best: tuple[int, int, tuple[int, ...]] | None = None
    for begin in range(0, len(sources), chunk):
        block = np.array(sources[begin : begin + chunk], dtype=np.int64)
        change = goal[None, :] - block  # = x[pre] - x[post], per source
        x = np.zeros((len(block), n), dtype=np.int64)
        for new, known, place, sign in order:
            x[:, new] = x[:, known] + sign * change[:, place]
        solved = np.all(change == x[:, pre] - x[:, post], axis=1)
        x -= x.min(axis=1, keepdims=True)
        totals = x.sum(axis=1)
        for row in np.flatnonzero(solved):
            if best is None or totals[row] < best[0]:
                best = (int(totals[row]), begin + int(row), tuple(int(k) for k in x[row]))
    return None if best is None else (best[1], best[2])


__all__ = [
    "Orbit",
    "Permutation",
    "class_signature",
    "firing_counts",
    "firing_sequence",
    "marking_orbit",
    "nearest_earlier_marking",
    "nearest_source",
    "orbit_automorphism",
    "net_automorphisms",
    "unequal_circuit",
]
