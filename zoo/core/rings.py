"""Ring designs: circular queues of items and free slots, and the cycloids that model them.

A ring design is a closed loop of N = C + G cells holding C items (frames of a stream, carts on
a factory loop) and G free slots. One move is an item stepping into the free cell ahead of it;
the slot it fills moves one cell back. Items and slots are either anonymous or individually
named. [TQ20] shows that such circular traffic queues are cycloid systems; the mapping used
here is the one of docs/theory/ring-designs.md (derived there and verified by reachability-graph
isomorphism):

========================  ===================  ==========================
model                     cycloid              A
========================  ===================  ==========================
anonymous                 C(G, C, 1, 1)        C + G
individual items          C(G, C, C, C)        C (C + G)
individual slots          C(G, C, G, G)        G (C + G)
individual both           C(G, C, l, l)        l (C + G),  l = lcm(C, G)
========================  ===================  ==========================

Items are the forward tokens (beta) and slots the backward tokens (alpha), following [RS24].

The module also holds a cell-by-cell simulator of the ring (``ring_state_graph``). It knows
nothing about cycloids: tests/core/test_rings.py compares its state graph with the cycloid's
reachability graph by graph isomorphism, which is what makes the table above trustworthy.
"""

from __future__ import annotations

from collections import deque
from collections.abc import Iterator
from dataclasses import dataclass
from math import lcm
from typing import Any

import networkx as nx

from zoo.core.params import MAX_AREA, ParameterSet
from zoo.core.report import invariant_report
from zoo.errors import LimitExceeded, ParameterError

#: Default bound on the states the simulator explores before it gives up.
SIMULATION_LIMIT = 200_000

#: Largest number of cells a ring design may have (C + G); beyond it the cycloid's area
#: (up to lcm(C, G) * (C + G)) passes the parameter-set limit quickly.
MAX_CELLS = 10_000


@dataclass(frozen=True)
class RingDesign:
    """A circular queue of ``items`` items and ``slots`` free slots (docs/theory/ring-designs.md).

    >>> str(RingDesign(2, 3).params)
    'C(3,2,1,1)'
    >>> str(RingDesign(2, 3, individual_items=True, individual_slots=True).params)
    'C(3,2,6,6)'
    """

    items: int
    slots: int
    individual_items: bool = False
    individual_slots: bool = False

    def __post_init__(self) -> None:
        for name in ("items", "slots"):
            value = getattr(self, name)
            if isinstance(value, bool) or not isinstance(value, int) or value < 1:
                raise ParameterError(
                    f"a ring needs at least one of its {name}, got {value!r}; "
                    f"give --{name} as a positive whole number"
                )
        if self.cells > MAX_CELLS:
            raise ParameterError(
                f"a ring of {self.items} items and {self.slots} slots has {self.cells} cells, "
                f"over the limit {MAX_CELLS:,}; choose a smaller ring"
            )
        area = self.cells * self.fold
        if area > MAX_AREA:
            raise ParameterError(
                f"the cycloid of this ring would have area {area:,}, over the limit "
                f"{MAX_AREA:,}; choose fewer items or slots, or anonymous ones"
            )

    @property
    def cells(self) -> int:
        """N = C + G, the number of cells of the ring."""
        return self.items + self.slots

    @property
    def model(self) -> str:
        """One of ``anonymous``, ``individual items``, ``individual slots``, ``individual both``."""
        if self.individual_items and self.individual_slots:
            return "individual both"
        if self.individual_items:
            return "individual items"
        if self.individual_slots:
            return "individual slots"
        return "anonymous"

    @property
    def fold(self) -> int:
        """k in C(G, C, k, k): how many anonymous rounds make the ring return to itself.

        Naming the items multiplies the period by C (the items must rotate back into place),
        naming the slots by G, naming both by lcm(C, G) (docs/theory/iterations.md,
        docs/theory/ring-designs.md: temporal iterations
        of the anonymous ring).
        """
        if self.individual_items and self.individual_slots:
            return lcm(self.items, self.slots)
        if self.individual_items:
            return self.items
        if self.individual_slots:
            return self.slots
        return 1

    @property
    def params(self) -> ParameterSet:
        """The cycloid C(G, C, k, k) of the ring (docs/theory/ring-designs.md; [TQ20])."""
        k = self.fold
        return ParameterSet(self.slots, self.items, k, k)

    def __str__(self) -> str:
        return f"ring of {self.items} items and {self.slots} slots ({self.model})"


# --- the simulator -----------------------------------------------------------------------
#
# A cell holds ("item", name) or ("slot", name); an anonymous item or slot has name None. Cells are
# numbered 0..N-1 in the direction of travel, so the cell ahead of cell i is (i + 1) mod N.
# Nothing below refers to cycloids or to the formulas of docs/theory/README.md.

Cell = tuple[str, int | None]
RingState = tuple[Cell, ...]


def initial_ring_state(design: RingDesign) -> RingState:
    """Items 0..C-1 in cells 0..C-1 (item 0 last in the queue), slots in the cells after them."""
    items = tuple(("item", i if design.individual_items else None) for i in range(design.items))
    slots = tuple(("slot", j if design.individual_slots else None) for j in range(design.slots))
    return items + slots


def iter_ring_moves(state: RingState) -> Iterator[tuple[int, RingState]]:
    """Every move from ``state``: (cell of the moving item, state after the move).

    An item in cell i moves when cell i+1 (around the ring) holds a slot; item and slot trade
    places.
    """
    n = len(state)
    for i in range(n):
        ahead = (i + 1) % n
        if state[i][0] == "item" and state[ahead][0] == "slot":
            cells = list(state)
            cells[i], cells[ahead] = state[ahead], state[i]
            yield i, tuple(cells)


def ring_state_graph(design: RingDesign, max_states: int = SIMULATION_LIMIT) -> nx.MultiDiGraph:
    """The state graph of the simulated ring: every reachable state, one arc per move.

    Explored breadth first from ``initial_ring_state``; node attribute ``initial`` marks the
    start, arc attribute ``cell`` names the cell of the moving item. Raises LimitExceeded when
    more than ``max_states`` states are reachable.
    """
    start = initial_ring_state(design)
    graph: nx.MultiDiGraph = nx.MultiDiGraph()
    graph.add_node(start, initial=True)
    queue: deque[RingState] = deque([start])
    while queue:
        state = queue.popleft()
        for cell, after in iter_ring_moves(state):
            if after not in graph:
                if graph.number_of_nodes() >= max_states:
                    raise LimitExceeded(
                        f"the simulated {design} has more than {max_states:,} states; "
                        "simulate a smaller ring or raise the state limit"
                    )
                graph.add_node(after, initial=False)
                queue.append(after)
            graph.add_edge(state, after, cell=cell)
    return graph


def format_ring_state(state: RingState) -> str:
    """A one-line picture of a state: ``I`` an item, ``_`` a slot, followed by its name if any.

    >>> format_ring_state((("item", None), ("slot", None), ("slot", None)))
    'I _ _'
    >>> format_ring_state((("item", 1), ("slot", None), ("item", 0)))
    'I1 _ I0'
    """
    parts = []
    for kind, name in state:
        mark = "I" if kind == "item" else "_"
        parts.append(mark if name is None else f"{mark}{name}")
    return " ".join(parts)


def describe_ring(
    design: RingDesign, class_id: str | None, simulate_states: int | None = None
) -> dict[str, Any]:
    """Everything ``zoo ring`` prints, as a plain JSON-ready dict (the catalog lookup is the
    caller's, so that nothing here touches storage); with ``simulate_states``, also the
    ``simulation`` of ``simulation_report`` up to that many states.

    ``states`` is the closed formula of docs/theory/state-counts.md; ``area`` is also the length of
    the
    shortest firing sequence that returns the ring to its start (docs/theory/cycles-and-tokens.md,
    docs/theory/ring-designs.md).
    ``invariants`` is ``zoo show``'s report of the cycloid (zoo.core.report).
    """
    p = design.params
    invariants = invariant_report(p)
    invariants["id"] = class_id
    report: dict[str, Any] = {
        "items": design.items,
        "slots": design.slots,
        "cells": design.cells,
        "individual_items": design.individual_items,
        "individual_slots": design.individual_slots,
        "model": design.model,
        "params": str(p),
        "area": p.area,
        "states": invariants["states"],
        "class_id": class_id,
        "invariants": invariants,
    }
    if simulate_states is not None:
        report["simulation"] = simulation_report(design, simulate_states)
    return report


def cycloid_state_graph(design: RingDesign, max_states: int = SIMULATION_LIMIT) -> nx.MultiDiGraph:
    """The reachability graph of the ring's cycloid (zoo.core.reachability), as a networkx graph."""
    from zoo.core.net import build_net
    from zoo.core.reachability import reachability_graph, reachability_to_networkx

    return reachability_to_networkx(reachability_graph(build_net(design.params), max_states))


def simulation_report(design: RingDesign, max_states: int = 20_000) -> dict[str, Any]:
    """Simulate the ring and compare its state graph with the cycloid's reachability graph.

    The two are compared by networkx's directed-graph isomorphism (VF2), after the cheap
    checks of state and arc counts. ``isomorphic`` false would mean docs/theory/ring-designs.md's
    mapping is
    wrong for this ring.
    """
    ring_graph = ring_state_graph(design, max_states)
    cycloid_graph = cycloid_state_graph(design, max_states)
    same_size = (
        ring_graph.number_of_nodes() == cycloid_graph.number_of_nodes()
        and ring_graph.number_of_edges() == cycloid_graph.number_of_edges()
    )
    isomorphic = same_size and nx.is_isomorphic(ring_graph, cycloid_graph)
    return {
        "states": ring_graph.number_of_nodes(),
        "moves": ring_graph.number_of_edges(),
        "cycloid_states": cycloid_graph.number_of_nodes(),
        "cycloid_arcs": cycloid_graph.number_of_edges(),
        "isomorphic": isomorphic,
    }
