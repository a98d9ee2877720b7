"""Where every node of a cycloid's pictures sits: one page layout for the views and the files.

Page units are steps of the Petri space; y points up (time). The SVG/PNG views
(zoo.pictures.views), the DOT text (zoo.interchange.dot), the PNML ``graphics`` positions
(zoo.interchange.pnml) and the JSON drawing positions (zoo.interchange.netjson) all take their
coordinates from here, so a net looks the same in every format.

* Parallelogram layout: transition (xi, eta) at (xi - eta, xi + eta), space across and time up
  (docs/theory/petri-space.md, "Drawing"); a place at the midpoint of its arc in the Petri space.
* Ring layout: one ring per forward cycle, transitions at the angle of their Hermite coordinate
  (docs/theory/lattice-key.md).
* State layout: markings in rows by breadth-first distance from the initial marking.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Protocol

from zoo.core.algebra import lattice_key, representative
from zoo.core.params import ParameterSet
from zoo.core.structure import distances

Point = tuple[float, float]


class LaidOutNet(Protocol):
    """What a layout needs of a cycloid's net (``CycloidNet`` and the views' ``NetPicture``)."""

    @property
    def params(self) -> ParameterSet: ...
    @property
    def coordinates(self) -> Sequence[tuple[int, int]]: ...
    @property
    def kinds(self) -> Sequence[str]: ...
    @property
    def pre(self) -> Sequence[int]: ...
    @property
    def post(self) -> Sequence[int]: ...


# --- parallelogram layout ------------------------------------------------------------------


def petri_to_page(point: tuple[float, float]) -> Point:
    """Page position of the Petri point (xi, eta): space xi - eta across, time xi + eta up."""
    xi, eta = point
    return (xi - eta, xi + eta)


def parallelogram_corners(p: ParameterSet) -> tuple[tuple[int, int], ...]:
    """O, P, Q = P + R, R of the fundamental parallelogram (docs/theory/folding.md)."""
    return ((0, 0), (p.alpha, -p.beta), (p.alpha + p.gamma, p.delta - p.beta), (p.gamma, p.delta))


def arc_step(net: LaidOutNet, place: int) -> tuple[tuple[int, int], tuple[int, int]]:
    """The unfolded step a place makes: from its input transition's representative (xi, eta)
    to (xi + 1, eta) for a forward place, to (xi, eta + 1) for a backward one."""
    xi, eta = net.coordinates[net.pre[place]]
    return (xi, eta), ((xi + 1, eta) if net.kinds[place] == "forward" else (xi, eta + 1))


def drawing_coordinates(net: LaidOutNet) -> tuple[list[Point], list[Point]]:
    """Page positions of the transitions and places in the parallelogram layout.

    A place sits at the midpoint of its step in the Petri space, (xi + 1/2, eta) for a forward
    and (xi, eta + 1/2) for a backward place. No two nodes coincide: a forward place has a
    half-integer xi, a backward place a half-integer eta, a transition neither.
    """
    transitions = [petri_to_page((float(xi), float(eta))) for xi, eta in net.coordinates]
    places = []
    for j in range(len(net.kinds)):
        (xi, eta), (xi2, eta2) = arc_step(net, j)
        places.append(petri_to_page(((xi + xi2) / 2, (eta + eta2) / 2)))
    return transitions, places


@dataclass(frozen=True)
class PlacedArc:
    """One place between two drawn transition positions, for the parallelogram view."""

    place: int
    source: tuple[int, int]  # Petri point of the input transition (a representative)
    target: tuple[int, int]  # Petri point of the output transition as reached by the arc
    folded: bool  # the target lies outside the parallelogram: drawn as a dashed copy


def parallelogram_arcs(net: LaidOutNet) -> list[PlacedArc]:
    """Every place with the unfolded step it makes: (xi+1, eta) forward, (xi, eta+1) backward."""
    arcs = []
    for s in range(len(net.kinds)):
        source, target = arc_step(net, s)
        arcs.append(PlacedArc(s, source, target, representative(net.params, target) != target))
    return arcs


def screen_positions(
    net: LaidOutNet, grid: float, margin: float
) -> tuple[list[Point], list[Point]]:
    """The parallelogram layout in screen coordinates (y grows down), for file formats.

    Page positions scaled by ``grid``, y flipped so that time still points up on screen, and
    shifted so that ``margin`` stays free at the top left (every position is positive).
    """
    transitions, places = drawing_coordinates(net)
    xs = [x for x, _ in transitions + places]
    ys = [-y for _, y in transitions + places]
    dx, dy = margin - grid * min(xs), margin - grid * min(ys)
    return (
        [(grid * x + dx, -grid * y + dy) for x, y in transitions],
        [(grid * x + dx, -grid * y + dy) for x, y in places],
    )


# --- ring layout ---------------------------------------------------------------------------


def ring_positions(net: LaidOutNet) -> tuple[list[Point], list[int]]:
    """Page positions of the transitions on concentric rings and the ring of each transition.

    The Hermite coordinates (xi', eta') with 0 <= xi' < A/g, 0 <= eta' < g
    (docs/theory/lattice-key.md) put transition (xi', eta') on ring eta' at angle
    2 pi xi' g / A, so every forward cycle is one ring (g = gcd(beta, delta) rings,
    docs/theory/processes.md).
    """
    key = lattice_key(net.params)
    period = key.period
    radius0 = max(2.0, period * 1.15 / math.pi)
    positions: list[Point] = []
    rings: list[int] = []
    for point in net.coordinates:
        xi, eta = key.reduce(point)
        radius = radius0 + eta * max(2.2, radius0 * 0.35)
        angle = math.pi / 2 + 2 * math.pi * xi / period
        positions.append((radius * math.cos(angle), radius * math.sin(angle)))
        rings.append(eta)
    return positions, rings


def ring_place_points(
    net: LaidOutNet, positions: Sequence[Point] | None = None, rings: Sequence[int] | None = None
) -> list[Point]:
    """Page positions of the places in the ring layout.

    A forward place sits on its ring halfway between its transitions. A backward arc to the
    next ring keeps its place halfway; an arc from the outermost ring back to the innermost one
    crosses the picture, so its place stays near its input transition (the arc is dashed).
    All chords within one ring (one forward cycle) skip the same number of transitions, so they
    are tangent to one inner circle at their midpoints; places there would vanish into that
    dense envelope of arcs, so they sit a quarter of the way along, where the chords spread.
    """
    if positions is None or rings is None:
        positions, rings = ring_positions(net)
    points: list[Point] = []
    for place, kind in enumerate(net.kinds):
        a, b = net.pre[place], net.post[place]
        source, target = positions[a], positions[b]
        if kind == "forward":
            points.append(_ring_midpoint(source, target))
        elif rings[b] == rings[a] + 1:
            points.append(bow(source, target, 0.0))
        elif rings[b] < rings[a]:
            points.append(along(source, target, 0.22))
        else:
            points.append(along(source, target, 0.25))
    return points


def _ring_midpoint(source: Point, target: Point) -> Point:
    """The point on the ring halfway along the counter-clockwise step from source to target."""
    radius = math.hypot(*source)
    start = math.atan2(source[1], source[0])
    step = (math.atan2(target[1], target[0]) - start) % (2 * math.pi)
    angle = start + step / 2
    return (radius * math.cos(angle), radius * math.sin(angle))


def along(source: Point, target: Point, fraction: float) -> Point:
    """The point ``fraction`` of the way from source to target."""
    return (
        source[0] + (target[0] - source[0]) * fraction,
        source[1] + (target[1] - source[1]) * fraction,
    )


def bow(source: Point, target: Point, amount: float) -> Point:
    """The midpoint of source-target moved to the left of the arc by ``amount`` of its length."""
    mx, my = (source[0] + target[0]) / 2, (source[1] + target[1]) / 2
    dx, dy = target[0] - source[0], target[1] - source[1]
    return (mx - dy * amount, my + dx * amount)


# --- state layout --------------------------------------------------------------------------


def state_layers(state_count: int, arcs: Sequence[tuple[int, int, int]]) -> list[int]:
    """Breadth-first distance of every state from the initial marking (state 0); -1 when a
    state is not reached from it. ``arcs`` are (from state, to state, transition)."""
    successors: list[list[int]] = [[] for _ in range(state_count)]
    for a, b, _ in arcs:
        successors[a].append(b)
    return distances(successors, 0)


def state_positions(state_count: int, arcs: Sequence[tuple[int, int, int]]) -> list[Point]:
    """Layered layout: the initial marking at the bottom, each BFS layer one row higher."""
    layers = state_layers(state_count, arcs)
    rows: dict[int, list[int]] = {}
    for i, layer in enumerate(layers):
        rows.setdefault(layer, []).append(i)
    positions: list[Point] = [(0.0, 0.0)] * state_count
    for layer, members in rows.items():
        width = len(members)
        for k, i in enumerate(members):
            positions[i] = ((k - (width - 1) / 2) * 2.0, layer * 1.25)
    return positions


__all__ = [
    "LaidOutNet",
    "PlacedArc",
    "Point",
    "along",
    "arc_step",
    "bow",
    "drawing_coordinates",
    "parallelogram_arcs",
    "parallelogram_corners",
    "petri_to_page",
    "ring_place_points",
    "ring_positions",
    "screen_positions",
    "state_layers",
    "state_positions",
]
