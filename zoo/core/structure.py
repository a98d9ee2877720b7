"""Graph searches shared by the structure checks of marked graphs and their state graphs.

One iterative implementation of each search, used wherever zoo walks a directed graph: the
checks that a foreign net is a strongly connected, live marked graph (zoo.interchange.identify),
the reversibility and liveness of explicit reachability graphs (zoo.core.reachability), the
layers of state graphs (zoo.core.behaviour, zoo.pictures.layout). Graphs are adjacency lists over
the nodes 0..n-1; every search is iterative, so deep graphs never hit Python's recursion limit.
tests/core/test_structure.py checks each search against networkx.

>>> successors = [[1], [2], [0], [0]]
>>> reachable(successors, 0)
[True, True, True, False]
>>> is_strongly_connected(successors)
False
>>> sorted(sorted(c) for c in strongly_connected_components(successors))
[[0, 1, 2], [3]]
>>> distances(successors, 3)
[1, 2, 3, 0]
"""

from __future__ import annotations

from collections import deque
from collections.abc import Sequence

Adjacency = Sequence[Sequence[int]]


def reversed_arcs(successors: Adjacency) -> list[list[int]]:
    """The predecessors of every node: the same graph with every arc turned round."""
    found: list[list[int]] = [[] for _ in successors]
    for u, targets in enumerate(successors):
        for v in targets:
            found[v].append(u)
    return found


def reachable(successors: Adjacency, start: int) -> list[bool]:
    """Which nodes a directed path from ``start`` reaches (``start`` itself included);
    depth-first."""
    seen = [False] * len(successors)
    seen[start] = True
    stack = [start]
    while stack:
        u = stack.pop()
        for v in successors[u]:
            if not seen[v]:
                seen[v] = True
                stack.append(v)
    return seen


def first_unreached(successors: Adjacency, start: int = 0) -> tuple[int, int] | None:
    """A witness that the graph is not strongly connected, or None when it is.

    ``(0, v)``: no path from ``start`` to v; ``(1, v)``: no path from v to ``start``. A graph
    is strongly connected iff one node reaches every node and every node reaches it.
    """
    for direction, arcs in enumerate((successors, reversed_arcs(successors))):
        seen = reachable(arcs, start)
        if not all(seen):
            return direction, seen.index(False)
    return None


def is_strongly_connected(successors: Adjacency) -> bool:
    """Whether every node reaches every other one (an empty graph is not)."""
    return len(successors) > 0 and first_unreached(successors) is None


def distances(successors: Adjacency, start: int) -> list[int]:
    """Breadth-first distance of every node from ``start`` (-1 where unreachable)."""
    distance = [-1] * len(successors)
    distance[start] = 0
    queue = deque([start])
    while queue:
        u = queue.popleft()
        for v in successors[u]:
            if distance[v] < 0:
                distance[v] = distance[u] + 1
                queue.append(v)
    return distance


def strongly_connected_components(successors: Adjacency) -> list[list[int]]:
    """The strongly connected components (Tarjan's algorithm, iterative).

    Components come out in reverse topological order: a component is listed before any
    component that has an arc into it.
    """
    n = len(successors)
    index = [-1] * n
    low = [0] * n
    on_stack = [False] * n
    stack: list[int] = []
    components: list[list[int]] = []
    counter = 0
    for root in range(n):
        if index[root] >= 0:
            continue
        work = [(root, 0)]
        index[root] = low[root] = counter
        counter += 1
        stack.append(root)
        on_stack[root] = True
        while work:
            v, i = work[-1]
            if i < len(successors[v]):
                work[-1] = (v, i + 1)
                w = successors[v][i]
                if index[w] < 0:
                    index[w] = low[w] = counter
                    counter += 1
                    stack.append(w)
                    on_stack[w] = True
                    work.append((w, 0))
                elif on_stack[w] and index[w] < low[v]:
                    low[v] = index[w]
                continue
            work.pop()
            if work:
                parent = work[-1][0]
                if low[v] < low[parent]:
                    low[parent] = low[v]
            if low[v] == index[v]:
                component = []
                while True:
                    w = stack.pop()
                    on_stack[w] = False
                    component.append(w)
                    if w == v:
                        break
                components.append(component)
    return components


def find_cycle(
    labelled: Sequence[Sequence[tuple[int, int]]],
) -> tuple[int, list[tuple[int, int]]] | None:
    """A directed cycle of a graph with labelled arcs, or None when it has none (depth-first).

    ``labelled[u]`` lists the arcs leaving u as (label, target) pairs, e.g. (place, next
    transition) in a marked graph. The answer is ``(start, steps)``: the walk from ``start``
    along ``steps``, each (node reached, label of the arc taken), ending at ``start`` again.

    >>> find_cycle([[(7, 1)], [(8, 2)], [(9, 1)]])
    (1, [(2, 8), (1, 9)])
    >>> find_cycle([[(7, 1)], []]) is None
    True
    """
    state = [0] * len(labelled)  # 0 new, 1 on the current path, 2 done
    for root in range(len(labelled)):
        if state[root]:
            continue
        path: list[tuple[int, int]] = [(root, -1)]  # (node, label by which it was entered)
        iterators = [iter(labelled[root])]
        state[root] = 1
        while iterators:
            step = next(iterators[-1], None)
            if step is None:
                iterators.pop()
                done, _ = path.pop()
                state[done] = 2
                continue
            label, v = step
            if state[v] == 1:
                start = next(k for k, (node, _) in enumerate(path) if node == v)
                return v, [*path[start + 1 :], (v, label)]
            if state[v] == 0:
                state[v] = 1
                path.append((v, label))
                iterators.append(iter(labelled[v]))
    return None


__all__ = [
    "Adjacency",
    "distances",
    "find_cycle",
    "first_unreached",
    "is_strongly_connected",
    "reachable",
    "reversed_arcs",
    "strongly_connected_components",
]
