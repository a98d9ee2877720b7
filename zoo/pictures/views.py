"""Pictures of a cycloid: its fundamental parallelogram, its net, its processes, its states.

Four views, each as SVG or PNG (matplotlib, Agg backend); the same views as Graphviz DOT text are
zoo.interchange.dot's (``picture_dot``). Node positions come from zoo.pictures.layout and colours
from zoo.pictures.style, which the DOT text shares:

* ``parallelogram``: the fundamental parallelogram O, P, Q = P + R, R in the Petri space with
  the lattice vectors P = (alpha, -beta) and R = (gamma, delta), the A folded transitions (one
  representative each, docs/theory/equivalence.md), their places with the initial marking, and for
  arcs
  that leave the parallelogram a dashed copy of the target transition with its name. Drawn as
  in docs/theory/petri-space.md "Drawing": time up, space across, the Petri point (xi, eta) at
  (xi - eta, xi + eta), so forward arcs run to the upper right and backward arcs to the upper
  left.
* ``net``: the net as a graph, every node once. Transitions sit on concentric rings, one ring
  per forward cycle, at the angle of their Hermite coordinate (docs/theory/lattice-key.md); forward
  arcs
  run counter-clockwise along a ring, backward arcs outwards to the next ring.
* ``processes``: the same layout for a regular cycloid (beta | delta), each process (forward
  cycle, docs/theory/processes.md) in its own colour and the backward arcs, the release messages
  between
  processes, in grey.
* ``states``: the reachability graph of a small system, layered by distance from the initial
  marking (which is at the bottom), with a state limit checked against the closed formula of
  docs/theory/state-counts.md before anything is explored.
"""

from __future__ import annotations

import io
import math
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from itertools import pairwise
from typing import Any

from zoo.core.invariants import is_regular, reachable_state_count
from zoo.core.params import ParameterSet
from zoo.errors import LimitExceeded, ParameterError, import_extra
from zoo.pictures import style
from zoo.pictures.layout import (
    Point,
    along,
    drawing_coordinates,
    parallelogram_arcs,
    parallelogram_corners,
    petri_to_page,
    ring_place_points,
    ring_positions,
    state_layers,
    state_positions,
)

VIEWS = ("parallelogram", "net", "processes", "states")
FORMATS = ("svg", "png")

#: Largest area drawn in the net views: beyond it nodes and labels no longer fit a page.
DRAW_AREA_LIMIT = 400
#: Largest reachability graph drawn in the ``states`` view.
DRAW_STATE_LIMIT = 300
#: Above this many transitions (or states) the pictures leave out node labels.
LABEL_LIMIT = 64
#: Where along an arc of the states view its transition label sits (0 source, 1 target).
STATE_LABEL_AT = 0.3


# --- the net, in the form the pictures need ------------------------------------------------


@dataclass(frozen=True)
class NetPicture:
    """The nodes and arcs of C(p) with Petri-space coordinates (docs/theory/petri-space.md,
    docs/theory/folding.md, docs/theory/equivalence.md, docs/theory/initial-marking.md)."""

    params: ParameterSet
    transitions: tuple[str, ...]
    coordinates: tuple[tuple[int, int], ...]  # representative (xi, eta) of each transition
    places: tuple[str, ...]
    kinds: tuple[str, ...]  # "forward" | "backward"
    pre: tuple[int, ...]  # input transition of each place
    post: tuple[int, ...]  # output transition of each place
    tokens: tuple[int, ...]


def net_picture(p: ParameterSet) -> NetPicture:
    """The explicit net of C(p) from ``zoo.core.net.build_net``, with its coordinates and kinds."""
    if p.area > DRAW_AREA_LIMIT:
        raise LimitExceeded(
            f"{p} has area {p.area}, over the drawing limit {DRAW_AREA_LIMIT}; "
            "draw a cycloid with fewer transitions"
        )
    from zoo.core.net import build_net

    net = build_net(p)
    return NetPicture(
        params=p,
        transitions=tuple(net.transitions),
        coordinates=tuple(net.coordinates),
        places=tuple(net.places),
        kinds=tuple(net.kinds),
        pre=tuple(net.pre),
        post=tuple(net.post),
        tokens=tuple(net.tokens),
    )


# --- public entry points ----------------------------------------------------------------


def draw(p: ParameterSet, view: str = "parallelogram", fmt: str = "svg") -> bytes:
    """The picture of C(p) in the given view and format, as the bytes of the file.

    Raises ParameterError for an unknown view or format, or for the processes view of a
    cycloid that is not regular; LimitExceeded for a system too large to draw.
    """
    if fmt not in FORMATS:
        hint = " (DOT text: zoo.interchange.dot.picture_dot)" if fmt == "dot" else ""
        raise ParameterError(
            f"unknown picture format {fmt!r}; choose one of {', '.join(FORMATS)}{hint}"
        )
    check_view(p, view)
    if view == "states":
        return _draw_states(p, fmt)
    net = net_picture(p)
    if view == "parallelogram":
        return _render(
            lambda canvas: _plot_parallelogram(canvas, net), _parallelogram_size(net), fmt
        )
    return _render(
        lambda canvas: _plot_rings(canvas, net, coloured=view == "processes"), _rings_size(net), fmt
    )


def check_view(p: ParameterSet, view: str) -> None:
    """Refuse (ParameterError) an unknown view, or the processes view of a cycloid that is not
    regular; shared by every writer of a view, pictures and DOT text alike."""
    if view not in VIEWS:
        raise ParameterError(f"unknown view {view!r}; choose one of {', '.join(VIEWS)}")
    if view == "processes" and not is_regular(p):
        raise ParameterError(
            f"the processes view needs a regular cycloid (beta divides delta), but {p} has "
            f"beta = {p.beta}, delta = {p.delta}; use --view net or a regular cycloid"
        )


def draw_net_svg(p: ParameterSet, view: str = "net") -> str:
    """SVG text of the net of C(p) (for ``zoo export --format svg``)."""
    return draw(p, view, "svg").decode()


# --- parallelogram view ------------------------------------------------------------------


def _parallelogram_extent(p: ParameterSet) -> tuple[float, float, float, float]:
    pts = [petri_to_page(c) for c in parallelogram_corners(p)]
    xs = [x for x, _ in pts]
    ys = [y for _, y in pts]
    return (min(xs) - 2.5, max(xs) + 2.5, min(ys) - 1.5, max(ys) + 1.8)


#: Resolution of PNG pictures, dots per inch.
PNG_DPI = 110
#: Longest side of a picture, in inches: at PNG_DPI about 2,000 pixels, a size an image viewer
#: or a paper's figure shows whole (common practice); larger nets are drawn smaller instead.
LARGEST_INCHES = 17.5


def _scale(
    width: float, height: float, unit: float = 0.75, largest: float = LARGEST_INCHES
) -> float:
    """Inches per page unit: ``unit`` unless the picture would pass ``largest`` inches."""
    return min(unit, largest / max(width, height, 1.0))


def _title_size(canvas: _Canvas, base: float) -> float:
    """A title font size in points that stays readable on a large page (about 1/60 of its
    width, never below ``base``)."""
    width_inches = float(canvas.ax.figure.get_size_inches()[0])
    return max(base, min(28.0, width_inches * 72.0 / 60.0))


def _parallelogram_size(net: NetPicture) -> Extent:
    x0, x1, y0, y1 = _parallelogram_extent(net.params)
    return (x0, x1, y0, y1, _scale(x1 - x0, y1 - y0))


def _plot_parallelogram(canvas: _Canvas, net: NetPicture) -> None:
    from matplotlib.patches import Polygon

    ax, s = canvas.ax, canvas.scale
    p = net.params
    show_labels = len(net.transitions) <= LABEL_LIMIT
    corners = [petri_to_page(c) for c in parallelogram_corners(p)]
    poly = Polygon(
        corners,
        closed=True,
        facecolor=style.PARALLELOGRAM_FACE.colour,
        edgecolor=style.PARALLELOGRAM_EDGE.colour,
        linewidth=1.0,
        linestyle="--",
        zorder=0,
    )
    poly.set_gid("parallelogram")
    ax.add_patch(poly)
    for name, corner in zip("OPQR", corners, strict=True):
        ax.annotate(
            name,
            corner,
            xytext=(-10, -4) if name in "OR" else (6, -4),
            textcoords="offset points",
            fontsize=11 * s / 0.75 + 1,
            color=style.LATTICE_VECTOR.colour,
            fontweight="bold",
            ha="center",
            va="top",
        )
    # The arrows O->P and O->R are the lattice vectors; their tips carry the corner letters and
    # their coordinates go in the title (labels beside the arrows collide with folded copies).
    _lattice_vector(ax, corners[0], corners[1])
    _lattice_vector(ax, corners[0], corners[3])

    marker = 11 * s / 0.75
    gap = marker / 2 + 1
    ghosts: dict[tuple[int, int], int] = {}
    place_points: list[Point] = []
    place_colours: list[str] = []
    _, place_at = drawing_coordinates(net)
    for arc in parallelogram_arcs(net):
        source = petri_to_page(arc.source)
        target = petri_to_page(arc.target)
        middle = place_at[arc.place]
        colour = style.place_ink(net.kinds[arc.place]).colour
        canvas.arc([source, middle], colour, gap, gap)
        canvas.arc([middle, target], colour, gap, gap, dashed=arc.folded)
        place_points.append(middle)
        place_colours.append(colour)
        if arc.folded:
            ghosts[arc.target] = net.post[arc.place]
    canvas.places(net, place_points, place_colours, marker)
    ghost_points = [petri_to_page(point) for point in ghosts]
    canvas.nodes(
        "folded-copies",
        [f"copy-{net.transitions[t]}" for t in ghosts.values()],
        ghost_points,
        marker="s",
        size=marker,
        face="white",
        edge=style.FOLDED_COPY.colour,
        linewidth=0.8,
        linestyle="--",
        zorder=3,
    )
    transition_points = [petri_to_page(point) for point in net.coordinates]
    canvas.nodes(
        "transitions",
        [f"transition-{name}" for name in net.transitions],
        transition_points,
        marker="s",
        size=marker,
        face=style.TRANSITION.colour,
        edge=style.TRANSITION.colour,
        zorder=4,
    )
    if show_labels:
        for (x, y), t in zip(ghost_points, ghosts.values(), strict=True):
            ax.annotate(
                f"\u2261 {net.transitions[t]}",
                (x, y),
                xytext=(0, marker * 0.7),
                textcoords="offset points",
                fontsize=max(5.0, 6.5 * s / 0.75),
                color=style.FAINT_LABEL,
                ha="center",
                va="bottom",
            )
        for (x, y), name in zip(transition_points, net.transitions, strict=True):
            ax.annotate(
                name,
                (x, y),
                xytext=(marker * 0.75, 0),
                textcoords="offset points",
                fontsize=max(5.0, 7.5 * s / 0.75),
                ha="left",
                va="center",
                color=style.LABEL,
                zorder=6,
            )
    ax.set_title(
        f"{p}: fundamental parallelogram, A = {p.area}, lattice vectors "
        f"P = ({p.alpha}, {-p.beta}), R = ({p.gamma}, {p.delta})\n"
        "time up; forward arcs (blue) to the upper right, backward arcs (red) to the upper left",
        fontsize=9.5,
    )


def _lattice_vector(ax: Any, start: Point, end: Point) -> None:
    """A thick arrow for a lattice vector from O."""
    ax.annotate(
        "",
        xy=end,
        xytext=start,
        arrowprops={
            "arrowstyle": "-|>,head_width=0.35,head_length=0.7",
            "color": style.LATTICE_VECTOR.colour,
            "linewidth": 1.8,
            "shrinkA": 0,
            "shrinkB": 0,
        },
        zorder=1,
    )


# --- net and processes views ------------------------------------------------------------


def _rings_extent(net: NetPicture) -> float:
    positions, _ = ring_positions(net)
    return max(math.hypot(x, y) for x, y in positions) + 2.2


def _rings_size(net: NetPicture) -> Extent:
    r = _rings_extent(net)
    return (-r, r, -r, r, _scale(2 * r, 2 * r))


def _plot_rings(canvas: _Canvas, net: NetPicture, coloured: bool) -> None:
    ax, s = canvas.ax, canvas.scale
    p = net.params
    positions, rings = ring_positions(net)
    show_labels = len(net.transitions) <= LABEL_LIMIT
    marker = 11 * s / 0.75
    gap = marker / 2 + 1
    place_points: list[Point] = []
    place_colours: list[str] = []
    points = ring_place_points(net, positions, rings)
    for place, kind in enumerate(net.kinds):
        a, b = net.pre[place], net.post[place]
        source, target = positions[a], positions[b]
        middle = points[place]
        if kind == "forward":
            colour = style.process_ink(rings[a]).colour if coloured else style.FORWARD.colour
        else:
            colour = style.RELEASE.colour if coloured else style.BACKWARD.colour
        wrap = kind == "backward" and rings[b] < rings[a]
        canvas.arc([source, middle], colour, gap, gap, dashed=wrap)
        canvas.arc([middle, target], colour, gap, gap, dashed=wrap)
        place_points.append(middle)
        place_colours.append(colour)
    canvas.places(net, place_points, place_colours, marker)
    colours = [
        style.process_ink(ring).colour if coloured else style.TRANSITION.colour for ring in rings
    ]
    canvas.nodes(
        "transitions",
        [f"transition-{name}" for name in net.transitions],
        positions,
        marker="s",
        size=marker,
        face=colours,
        edge=colours,
        zorder=4,
    )
    if show_labels:
        for (x, y), name in zip(positions, net.transitions, strict=True):
            norm = math.hypot(x, y) or 1.0
            ax.annotate(
                name,
                (x, y),
                xytext=(x / norm * marker * 1.1, y / norm * marker),
                textcoords="offset points",
                fontsize=max(5.0, 7.5 * s / 0.75),
                ha="left" if x >= -1e-9 else "right",
                va="center",
                zorder=6,
            )
    if coloured:
        from matplotlib.lines import Line2D

        count = max(rings) + 1
        length = p.area // count
        handles = [
            Line2D(
                [0],
                [0],
                color=style.process_ink(i).colour,
                marker="s",
                linewidth=2,
                label=f"process {i} ({length} steps)",
            )
            for i in range(count)
        ]
        handles.append(
            Line2D(
                [0],
                [0],
                color=style.RELEASE.colour,
                linewidth=2,
                label="release messages (backward places)",
            )
        )
        if count > 1:
            handles.append(
                Line2D(
                    [0],
                    [0],
                    color=style.RELEASE.colour,
                    linewidth=2,
                    linestyle="--",
                    label=f"release from process {count - 1} to process 0",
                )
            )
        ax.legend(handles=handles, loc="upper left", fontsize=8, frameon=False)
        title = f"{p}: {count} processes of {length} steps"
    else:
        title = f"{p}: the net, A = {p.area} transitions, {len(net.places)} places"
    ax.set_title(title + " (forward arcs counter-clockwise)", fontsize=_title_size(canvas, 10))


# --- states view ------------------------------------------------------------------------


@dataclass(frozen=True)
class StateGraph:
    """A reachability graph: markings as sorted tuples of marked place indices."""

    states: tuple[tuple[int, ...], ...]  # states[0] is the initial marking
    arcs: tuple[tuple[int, int, int], ...]  # (from state, to state, transition)


def state_graph(p: ParameterSet, limit: int = DRAW_STATE_LIMIT) -> tuple[NetPicture, StateGraph]:
    """The reachability graph of C(p) for drawing, refused beyond ``limit`` states.

    The size is known in advance from docs/theory/state-counts.md (A C(alpha+beta,
    alpha)/(alpha+beta)), so
    the refusal happens before any search; the search itself is zoo.core.reachability's.
    """
    expected = reachable_state_count(p)
    if expected > limit:
        raise LimitExceeded(
            f"the reachability graph of {p} has {expected:,} states, over the drawing limit "
            f"{limit:,}; draw a system with fewer tokens or a smaller area"
        )
    from zoo.core.net import build_net
    from zoo.core.reachability import reachability_graph

    net = net_picture(p)
    rg = reachability_graph(build_net(p), limit=limit)
    states = tuple(tuple(j for j, k in enumerate(marking) if k) for marking in rg.iter_markings())
    arcs = tuple((source, target, t) for source, t, target in rg.arcs)
    return net, StateGraph(states, arcs)


def _draw_states(p: ParameterSet, fmt: str) -> bytes:
    net, graph = state_graph(p)
    positions = state_positions(len(graph.states), graph.arcs)
    xs = [x for x, _ in positions]
    ys = [y for _, y in positions]
    x0, x1, y0, y1 = min(xs) - 1.5, max(xs) + 1.5, min(ys) - 1.5, max(ys) + 1.5
    extent = (x0, x1, y0, y1, _scale(x1 - x0, y1 - y0, unit=0.7))
    return _render(lambda canvas: _plot_states(canvas, net, graph, positions), extent, fmt)


def _plot_states(
    canvas: _Canvas, net: NetPicture, graph: StateGraph, positions: list[Point]
) -> None:
    ax, s = canvas.ax, canvas.scale
    marker = 15 * s / 0.7
    gap = marker / 2 + 1
    labelled = len(graph.states) <= LABEL_LIMIT
    layers = state_layers(len(graph.states), graph.arcs)
    for a, b, t in graph.arcs:
        upward = layers[b] > layers[a]
        colour = style.STEP_UP.colour if upward else style.STEP_BACK.colour
        # Arcs back to earlier layers (the system is reversible, docs/theory/cycles-and-tokens.md)
        # bow out to
        # the side so that they do not run over the layers in between.
        path = [positions[a], positions[b]] if upward else _curve(positions[a], positions[b], 0.3)
        canvas.arc(path, colour, gap, gap, dashed=not upward, width=0.8)
        if labelled and upward and len(graph.arcs) <= 2 * LABEL_LIMIT:
            # A third of the way from the source, not halfway: two arcs that cross between
            # the same two layers cross at their midpoints, so their labels would coincide.
            mx, my = along(positions[a], positions[b], STATE_LABEL_AT)
            ax.annotate(
                net.transitions[t],
                (mx, my),
                fontsize=max(4.5, 6 * s / 0.7),
                color=colour,
                ha="center",
                va="center",
                zorder=3,
                bbox={
                    "boxstyle": "round,pad=0.1",
                    "facecolor": "white",
                    "edgecolor": "none",
                    "alpha": 0.85,
                },
            )
    faces = [style.INITIAL_STATE.colour if i == 0 else "white" for i in range(len(positions))]
    canvas.nodes(
        "states",
        [f"state-{i}" for i in range(len(positions))],
        positions,
        marker="o",
        size=marker,
        face=faces,
        edge=style.STATE.colour,
        linewidth=1.0,
        zorder=4,
    )
    if labelled:
        for i, (x, y) in enumerate(positions):
            ax.annotate(
                f"M{i}",
                (x, y),
                fontsize=max(4.5, 6.5 * s / 0.7),
                ha="center",
                va="center",
                zorder=5,
            )
    p = net.params
    ax.set_title(
        f"{p}: reachability graph, {len(graph.states)} states, {len(graph.arcs)} arcs "
        "(M0 at the bottom; arcs back to earlier layers dashed)",
        fontsize=_title_size(canvas, 9),
    )


# --- shared matplotlib helpers --------------------------------------------------------------

Extent = tuple[float, float, float, float, float]  # x0, x1, y0, y1, inches per page unit


class _Canvas:
    """Collects the arcs of a picture and draws each kind of node and arc as one collection.

    One matplotlib artist per node or arc costs milliseconds each; collections keep an area-400
    net at about two seconds. Node collections get an SVG id (``gid``, e.g. ``transitions``)
    and every marker its own (``transition-t_0_0``, through ``_links_to_ids``).
    """

    def __init__(self, ax: Any, scale: float) -> None:
        self.ax = ax
        self.scale = scale
        self._lines: dict[tuple[str, bool, float], list[list[Point]]] = {}
        self._heads: dict[str, list[list[Point]]] = {}

    def units(self, points: float) -> float:
        """A length in typographic points as page units."""
        return points / 72.0 / self.scale

    def arc(
        self,
        path: Sequence[Point],
        colour: str,
        gap_start: float,
        gap_end: float,
        dashed: bool = False,
        width: float = 1.0,
    ) -> None:
        """An arrow along ``path``, leaving ``gap_*`` points free at both ends for the nodes."""
        trimmed = _trim(path, self.units(gap_start), self.units(gap_end))
        if len(trimmed) < 2:
            return
        head_length, half_width = self.units(6.0), self.units(2.4)
        tip = trimmed[-1]
        before = trimmed[-2]
        dx, dy = tip[0] - before[0], tip[1] - before[1]
        norm = math.hypot(dx, dy) or 1.0
        ux, uy = dx / norm, dy / norm
        base = (tip[0] - ux * head_length, tip[1] - uy * head_length)
        self._heads.setdefault(colour, []).append(
            [
                tip,
                (base[0] - uy * half_width, base[1] + ux * half_width),
                (base[0] + uy * half_width, base[1] - ux * half_width),
            ]
        )
        trimmed[-1] = (tip[0] - ux * head_length * 0.6, tip[1] - uy * head_length * 0.6)
        self._lines.setdefault((colour, dashed, width), []).append(trimmed)

    def nodes(
        self,
        gid: str,
        names: Sequence[str],
        points: Sequence[Point],
        *,
        marker: str,
        size: float,
        face: str | Sequence[str],
        edge: str | Sequence[str],
        linewidth: float = 1.0,
        linestyle: str = "-",
        zorder: int = 4,
    ) -> None:
        """One scatter collection of markers, ``size`` points across."""
        if not points:
            return
        art = self.ax.scatter(
            [x for x, _ in points],
            [y for _, y in points],
            s=size**2,
            marker=marker,
            facecolors=face,
            edgecolors=edge,
            linewidths=linewidth,
            linestyle=linestyle,
            zorder=zorder,
        )
        art.set_gid(gid)
        art.set_urls([f"#{name}" for name in names])

    def places(
        self, net: NetPicture, points: Sequence[Point], colours: Sequence[str], marker: float
    ) -> None:
        """The places (white circles edged in their arc colour) and their tokens (dots)."""
        self.nodes(
            "places",
            [f"place-{name}" for name in net.places],
            points,
            marker="o",
            size=marker,
            face="white",
            edge=list(colours),
            linewidth=1.2,
            zorder=4,
        )
        marked = [i for i, k in enumerate(net.tokens) if k]
        # A token stays at least 2.5 points across (about 4 pixels) on a crowded picture.
        self.nodes(
            "tokens",
            [f"token-{net.places[i]}" for i in marked],
            [points[i] for i in marked],
            marker="o",
            size=max(marker * 0.5, 2.5),
            face=style.TOKEN.colour,
            edge=style.TOKEN.colour,
            zorder=5,
        )

    def finish(self) -> None:
        """Hand the collected arcs to matplotlib: one line and one head collection per style."""
        from matplotlib.collections import LineCollection, PolyCollection

        for (colour, dashed, width), paths in self._lines.items():
            self.ax.add_collection(
                LineCollection(
                    paths,
                    colors=colour,
                    linewidths=width,
                    linestyles="--" if dashed else "-",
                    zorder=2,
                )
            )
        for colour, heads in self._heads.items():
            self.ax.add_collection(
                PolyCollection(
                    heads,
                    facecolors=colour,
                    edgecolors=colour,
                    linewidths=0.3,
                    zorder=2,
                )
            )


def _trim(path: Sequence[Point], start: float, end: float) -> list[Point]:
    """The part of a polyline that is at least ``start`` from its beginning and ``end`` from
    its end (measured along it); empty when the polyline is shorter than that."""
    lengths = [math.hypot(b[0] - a[0], b[1] - a[1]) for a, b in pairwise(path)]
    total = sum(lengths)
    if total <= start + end:
        return []

    def point_at(distance: float) -> tuple[int, Point]:
        walked = 0.0
        for i, length in enumerate(lengths):
            if walked + length >= distance and length > 0:
                f = (distance - walked) / length
                a, b = path[i], path[i + 1]
                return i, (a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f)
            walked += length
        return len(lengths) - 1, path[-1]

    i, first = point_at(start)
    j, last = point_at(total - end)
    return [first, *path[i + 1 : j + 1], last]


def _curve(start: Point, end: Point, rad: float, samples: int = 24) -> list[Point]:
    """A quadratic Bezier from start to end bent to the right by ``rad`` of its length."""
    mx, my = (start[0] + end[0]) / 2, (start[1] + end[1]) / 2
    dx, dy = end[0] - start[0], end[1] - start[1]
    control = (mx + dy * rad, my - dx * rad)
    points = []
    for k in range(samples + 1):
        t = k / samples
        a, b, c = (1 - t) ** 2, 2 * (1 - t) * t, t * t
        points.append(
            (a * start[0] + b * control[0] + c * end[0], a * start[1] + b * control[1] + c * end[1])
        )
    return points


def _render(plot: Callable[[_Canvas], None], extent: Extent, fmt: str) -> bytes:
    """Draw with matplotlib's Agg backend and return the SVG or PNG file as bytes.

    ``extent`` is the page rectangle and the scale in inches per page unit; the axes fill the
    figure exactly, so that marker sizes in points and lengths in page units agree.
    """
    matplotlib = import_extra("matplotlib", "plots", "drawing a picture")
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    x0, x1, y0, y1, scale = extent
    # Very small pictures are widened (at the same scale) so that the title fits.
    min_width, min_height = 4.5, 3.0
    if (x1 - x0) * scale < min_width:
        pad = (min_width / scale - (x1 - x0)) / 2
        x0, x1 = x0 - pad, x1 + pad
    if (y1 - y0) * scale < min_height:
        pad = (min_height / scale - (y1 - y0)) / 2
        y0, y1 = y0 - pad, y1 + pad
    width, height = (x1 - x0) * scale, (y1 - y0) * scale
    with matplotlib.rc_context(
        {"svg.fonttype": "none", "svg.hashsalt": "zoo", "font.family": "DejaVu Sans"}
    ):
        fig = plt.figure(figsize=(width, height))
        try:
            ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
            ax.set_xlim(x0, x1)
            ax.set_ylim(y0, y1)
            ax.set_aspect("equal", adjustable="box")
            ax.axis("off")
            canvas = _Canvas(ax, scale)
            plot(canvas)
            canvas.finish()
            buffer = io.BytesIO()
            metadata = {"Date": None} if fmt == "svg" else {"Software": "zoo"}
            fig.savefig(
                buffer,
                format=fmt,
                dpi=PNG_DPI,
                metadata=metadata,
                bbox_inches="tight",
                pad_inches=0.15,
            )
        finally:
            plt.close(fig)
    data = buffer.getvalue()
    if fmt == "svg":
        data = _links_to_ids(data)
    return data


_LINK = re.compile(rb'<a xlink:href="#([^"]+)" target="_blank">')


def _links_to_ids(svg: bytes) -> bytes:
    """Turn matplotlib's per-point links into groups with ids: ``<g id="transition-t_0_0">``.

    matplotlib can name a whole collection (gid) but a single point only through a link;
    the only links in our pictures are those, so every ``</a>`` closes one of them.
    """
    return _LINK.sub(rb'<g id="\1">', svg).replace(b"</a>", b"</g>")
