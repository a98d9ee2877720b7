"""Pictures of a cycloid: its fundamental parallelogram, its net, its processes, its states.

Four views, each built once as a Scene of drawing primitives (zoo.pictures.scene) and rendered as
SVG, PNG or PDF (zoo.pictures.render_matplotlib) or TikZ (zoo.pictures.tikz), so every format has
the same picture and legend; the same views as Graphviz DOT text are zoo.interchange.dot's
(``picture_dot``). Node positions come from zoo.pictures.layout and colours from
zoo.pictures.style, which the DOT text shares:

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
  marking (which is at the bottom), each marking listed beside it as its marked places, arcs
  back to earlier layers in lanes of their own outside the graph, with a state limit checked
  against the closed formula of docs/theory/state-counts.md before anything is explored.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from zoo.core.invariants import is_regular, reachable_state_count
from zoo.core.params import ParameterSet
from zoo.errors import LimitExceeded, ParameterError
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
from zoo.pictures.render_matplotlib import PNG_DPI as PNG_DPI  # the resolution, for callers
from zoo.pictures.scene import Area, Arrow, Scene

VIEWS = ("parallelogram", "net", "processes", "states")
FORMATS = ("svg", "png", "pdf", "tikz")

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

    svg, png and pdf come from matplotlib, tikz (a standalone LaTeX document) from
    zoo.pictures.tikz; all four draw the same scene. Raises ParameterError for an unknown view
    or format, or for the processes view of a cycloid that is not regular; LimitExceeded for a
    system too large to draw.
    """
    if fmt not in FORMATS:
        hint = " (DOT text: zoo.interchange.dot.picture_dot)" if fmt == "dot" else ""
        raise ParameterError(
            f"unknown picture format {fmt!r}; choose one of {', '.join(FORMATS)}{hint}"
        )
    scene = picture_scene(p, view)
    if fmt == "tikz":
        from zoo.pictures.tikz import tikz_document

        return tikz_document(scene).encode()
    from zoo.pictures.render_matplotlib import render

    return render(scene, fmt)


def draw_tikz(p: ParameterSet, view: str = "parallelogram", standalone: bool = True) -> str:
    """TikZ text of the picture: a standalone document, or (``standalone=False``) only the
    ``tikzpicture`` environment, for ``\\input`` in a paper that loads tikz."""
    from zoo.pictures.tikz import tikz_document, tikz_picture

    scene = picture_scene(p, view)
    return tikz_document(scene) if standalone else tikz_picture(scene)


def picture_scene(p: ParameterSet, view: str) -> Scene:
    """The drawing primitives of a view of C(p) (zoo.pictures.scene), before any format."""
    check_view(p, view)
    if view == "states":
        return _states_scene(p)
    net = net_picture(p)
    if view == "parallelogram":
        scene = Scene(*_parallelogram_size(net))
        _plot_parallelogram(scene, net)
        return scene
    scene = Scene(*_rings_size(net))
    _plot_rings(scene, net, coloured=view == "processes")
    return scene


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


def draw_net_svg(p: ParameterSet, view: str = "parallelogram") -> str:
    """SVG text of a view of C(p), the parallelogram by default (``zoo export --format svg``)."""
    return draw(p, view, "svg").decode()


# --- parallelogram view ------------------------------------------------------------------


def _parallelogram_extent(p: ParameterSet) -> tuple[float, float, float, float]:
    pts = [petri_to_page(c) for c in parallelogram_corners(p)]
    xs = [x for x, _ in pts]
    ys = [y for _, y in pts]
    return (min(xs) - 2.5, max(xs) + 2.5, min(ys) - 1.5, max(ys) + 1.8)


#: Longest side of a picture, in inches: at PNG_DPI about 2,000 pixels, a size an image viewer
#: or a paper's figure shows whole with its title and legend (common practice); larger nets are
#: drawn smaller instead.
LARGEST_INCHES = 16.5

Extent = tuple[tuple[float, float, float, float], float]  # (x0, x1, y0, y1), inches per unit


def _scale(
    width: float, height: float, unit: float = 0.75, largest: float = LARGEST_INCHES
) -> float:
    """Inches per page unit: ``unit`` unless the picture would pass ``largest`` inches."""
    return min(unit, largest / max(width, height, 1.0))


def _parallelogram_size(net: NetPicture) -> Extent:
    x0, x1, y0, y1 = _parallelogram_extent(net.params)
    return (x0, x1, y0, y1), _scale(x1 - x0, y1 - y0)


def _plot_parallelogram(scene: Scene, net: NetPicture) -> None:
    s = scene.scale
    p = net.params
    show_labels = len(net.transitions) <= LABEL_LIMIT
    corners = [petri_to_page(c) for c in parallelogram_corners(p)]
    scene.areas.append(
        Area(
            tuple(corners),
            face=style.PARALLELOGRAM_FACE.colour,
            edge=style.PARALLELOGRAM_EDGE.colour,
            dashed=True,
        )
    )
    for name, corner in zip("OPQR", corners, strict=True):
        scene.label(
            name,
            corner,
            11 * s / 0.75 + 1,
            offset=(-10, -4) if name in "OR" else (6, -4),
            colour=style.LATTICE_VECTOR.colour,
            bold=True,
            va="top",
        )
    # The arrows O->P and O->R are the lattice vectors; their tips carry the corner letters and
    # their coordinates go in the title (labels beside the arrows collide with folded copies).
    scene.arrows.append(Arrow(corners[0], corners[1], style.LATTICE_VECTOR.colour))
    scene.arrows.append(Arrow(corners[0], corners[3], style.LATTICE_VECTOR.colour))

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
        scene.arc([source, middle], colour, gap, gap)
        scene.arc([middle, target], colour, gap, gap, dashed=arc.folded)
        place_points.append(middle)
        place_colours.append(colour)
        if arc.folded:
            ghosts[arc.target] = net.post[arc.place]
    _places(scene, net, place_points, place_colours, marker)
    ghost_points = [petri_to_page(point) for point in ghosts]
    scene.node_group(
        "folded-copies",
        [f"copy-{net.transitions[t]}" for t in ghosts.values()],
        ghost_points,
        shape="square",
        size=marker,
        face="#ffffff",
        edge=style.FOLDED_COPY.colour,
        linewidth=0.8,
        dashed=True,
        layer=3,
    )
    transition_points = [petri_to_page(point) for point in net.coordinates]
    scene.node_group(
        "transitions",
        [f"transition-{name}" for name in net.transitions],
        transition_points,
        shape="square",
        size=marker,
        face=style.TRANSITION.colour,
        edge=style.TRANSITION.colour,
    )
    if show_labels:
        for point, t in zip(ghost_points, ghosts.values(), strict=True):
            scene.label(
                f"\u2261 {net.transitions[t]}",
                point,
                max(5.0, 6.5 * s / 0.75),
                offset=(0, marker * 0.7),
                colour=style.FAINT_LABEL,
                va="bottom",
            )
        for point, name in zip(transition_points, net.transitions, strict=True):
            scene.label(
                name,
                point,
                max(5.0, 7.5 * s / 0.75),
                offset=(marker * 0.75, 0),
                ha="left",
                colour=style.LABEL,
            )
    scene.key("square", style.TRANSITION.colour, style.TRANSITION.meaning, style.TRANSITION.colour)
    scene.key("line", style.FORWARD.colour, "forward place and its arcs")
    scene.key("line", style.BACKWARD.colour, "backward place and its arcs")
    scene.key("dot", style.TOKEN.colour, "token of the initial marking")
    for drawn in scene.arcs:
        if drawn.dashed:
            kind = "forward" if drawn.colour == style.FORWARD.colour else "backward"
            scene.key("dashed", drawn.colour, f"{kind} arc leaving the parallelogram (dashed)")
    if ghosts:
        scene.key(
            "dashed-square",
            style.FOLDED_COPY.colour,
            "folded copy \u2261 of the transition such an arc reaches",
            "#ffffff",
        )
    scene.key("line", style.LATTICE_VECTOR.colour, style.LATTICE_VECTOR.meaning)
    scene.title = (
        f"{p}: fundamental parallelogram, A = {p.area}, lattice vectors "
        f"P = ({p.alpha}, {-p.beta}), R = ({p.gamma}, {p.delta})\n"
        "time up; forward arcs (blue) to the upper right, backward arcs (red) to the upper left"
    )
    scene.title_size = 9.5


def _places(
    scene: Scene,
    net: NetPicture,
    points: Sequence[Point],
    colours: Sequence[str],
    marker: float,
) -> None:
    """The places (white circles edged in their arc colour) and their tokens (dots)."""
    scene.node_group(
        "places",
        [f"place-{name}" for name in net.places],
        points,
        shape="circle",
        size=marker,
        face="#ffffff",
        edge=list(colours),
        linewidth=1.2,
    )
    marked = [i for i, k in enumerate(net.tokens) if k]
    # A token stays at least 2.5 points across (about 4 pixels) on a crowded picture.
    scene.node_group(
        "tokens",
        [f"token-{net.places[i]}" for i in marked],
        [points[i] for i in marked],
        shape="circle",
        size=max(marker * 0.5, 2.5),
        face=style.TOKEN.colour,
        edge=style.TOKEN.colour,
        layer=5,
    )


# --- net and processes views ------------------------------------------------------------


def _rings_extent(net: NetPicture) -> float:
    positions, _ = ring_positions(net)
    return max(math.hypot(x, y) for x, y in positions) + 2.2


def _rings_size(net: NetPicture) -> Extent:
    r = _rings_extent(net)
    return (-r, r, -r, r), _scale(2 * r, 2 * r)


def _plot_rings(scene: Scene, net: NetPicture, coloured: bool) -> None:
    s = scene.scale
    p = net.params
    positions, rings = ring_positions(net)
    show_labels = len(net.transitions) <= LABEL_LIMIT
    marker = 11 * s / 0.75
    gap = marker / 2 + 1
    place_points: list[Point] = []
    place_colours: list[str] = []
    points = ring_place_points(net, positions, rings)
    wraps = False
    for place, kind in enumerate(net.kinds):
        a, b = net.pre[place], net.post[place]
        source, target = positions[a], positions[b]
        middle = points[place]
        if kind == "forward":
            colour = style.process_ink(rings[a]).colour if coloured else style.FORWARD.colour
        else:
            colour = style.RELEASE.colour if coloured else style.BACKWARD.colour
        # A backward arc from the outermost ring back to an inner one closes the cycle of
        # rings; it is dashed so that it reads apart from the arcs to the next ring.
        wrap = kind == "backward" and rings[b] < rings[a]
        wraps = wraps or wrap
        scene.arc([source, middle], colour, gap, gap, dashed=wrap)
        scene.arc([middle, target], colour, gap, gap, dashed=wrap)
        place_points.append(middle)
        place_colours.append(colour)
    _places(scene, net, place_points, place_colours, marker)
    colours = [
        style.process_ink(ring).colour if coloured else style.TRANSITION.colour for ring in rings
    ]
    scene.node_group(
        "transitions",
        [f"transition-{name}" for name in net.transitions],
        positions,
        shape="square",
        size=marker,
        face=colours,
        edge=colours,
    )
    if show_labels:
        for (x, y), name in zip(positions, net.transitions, strict=True):
            norm = math.hypot(x, y) or 1.0
            scene.label(
                name,
                (x, y),
                max(5.0, 7.5 * s / 0.75),
                offset=(x / norm * marker * 1.1, y / norm * marker),
                ha="left" if x >= -1e-9 else "right",
                colour=style.LABEL,
            )
    count = max(rings) + 1
    if coloured:
        length = p.area // count
        for i in range(count):
            ink = style.process_ink(i)
            # A line with a square: the process's arcs and its transitions.
            scene.key("line", ink.colour, f"process {i} ({length} steps)", ink.colour)
        scene.key("line", style.RELEASE.colour, "release messages (backward places)")
        if wraps:
            scene.key(
                "dashed",
                style.RELEASE.colour,
                f"release from process {count - 1} back to process 0",
            )
        title = f"{p}: {count} processes of {length} steps"
    else:
        scene.key(
            "square",
            style.TRANSITION.colour,
            "transition (one ring per forward cycle)",
            style.TRANSITION.colour,
        )
        scene.key("line", style.FORWARD.colour, "forward place and its arcs (along a ring)")
        scene.key(
            "line",
            style.BACKWARD.colour,
            "backward place and its arcs (across, or out to the next ring)",
        )
        if wraps:
            scene.key(
                "dashed",
                style.BACKWARD.colour,
                f"backward arcs from the outer ring {count - 1} back to the inner rings",
            )
        title = f"{p}: the net, A = {p.area} transitions, {len(net.places)} places"
    scene.key("dot", style.TOKEN.colour, "token of the initial marking")
    scene.title = title + " (forward arcs counter-clockwise)"
    scene.title_size = scene.title_font(10)


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


def marking_lines(net: NetPicture, graph: StateGraph) -> list[str]:
    """One line per marking: its name and the places that carry a token (``M3: f_0_0 b_1_2``)."""
    width = len(f"M{len(graph.states) - 1}")
    return [
        f"{f'M{i}':<{width}}  " + " ".join(net.places[j] for j in state)
        for i, state in enumerate(graph.states)
    ]


#: Page units between two lanes of the arcs back to earlier layers.
LANE_GAP = 0.45


def return_routes(
    positions: Sequence[Point], layers: Sequence[int], arcs: Sequence[tuple[int, int, int]]
) -> dict[int, list[Point]]:
    """Paths of the arcs back to earlier layers, by arc index.

    Each runs in a lane of its own outside the layered graph, on the side of its target (left
    half to the left, right half to the right): out sideways from its source, down its lane,
    and into its target from that side at a height of its own, so that arcs to one marking
    (the reversible system returns to M0 often, docs/theory/cycles-and-tokens.md) arrive
    side by side instead of piling up at one point.
    """
    if not positions:
        return {}
    left_edge = min(x for x, _ in positions)
    right_edge = max(x for x, _ in positions)
    back = [i for i, (a, b, _) in enumerate(arcs) if layers[b] <= layers[a]]
    # Longer returns take the outer lanes, so that lanes do not cross one another.
    back.sort(key=lambda i: positions[arcs[i][0]][1] - positions[arcs[i][1]][1])
    lanes = {"left": 0, "right": 0}
    arrivals: dict[tuple[int, str], int] = {}
    routes: dict[int, list[Point]] = {}
    for i in back:
        a, b, _ = arcs[i]
        (xa, ya), (xb, yb) = positions[a], positions[b]
        # The side of the target, so that the arc enters it from outside the graph (the side of
        # the source for a target in the middle, the emptier side when both are).
        toward = xb if abs(xb) > 1e-9 else xa
        if abs(toward) <= 1e-9:
            toward = -1.0 if lanes["left"] <= lanes["right"] else 1.0
        side = "left" if toward < 0 else "right"
        lanes[side] += 1
        sign = -1.0 if side == "left" else 1.0
        edge = left_edge if side == "left" else right_edge
        lane_x = edge + sign * (0.6 + LANE_GAP * lanes[side])
        k = arrivals.get((b, side), 0)
        arrivals[(b, side)] = k + 1
        # Arrivals at one target fan out over +-0.35 page units of its height.
        entry_y = yb + 0.35 * (((k + 1) // 2) * (1 if k % 2 else -1)) / max(1, (k + 2) // 2)
        routes[i] = [
            (xa, ya),
            (lane_x, ya + 0.25),
            (lane_x, entry_y + 0.25),
            (xb + sign * 0.55, entry_y),
            (xb, yb),
        ]
    return routes


def _states_scene(p: ParameterSet) -> Scene:
    net, graph = state_graph(p)
    positions = state_positions(len(graph.states), graph.arcs)
    layers = state_layers(len(graph.states), graph.arcs)
    routes = return_routes(positions, layers, graph.arcs)
    xs = [x for x, _ in positions] + [x for path in routes.values() for x, _ in path]
    ys = [y for _, y in positions]
    x0, x1, y0, y1 = min(xs) - 1.5, max(xs) + 1.5, min(ys) - 1.5, max(ys) + 1.5
    scene = Scene((x0, x1, y0, y1), _scale(x1 - x0, y1 - y0, unit=0.7))
    _plot_states(scene, net, graph, positions, layers, routes)
    return scene


def _plot_states(
    scene: Scene,
    net: NetPicture,
    graph: StateGraph,
    positions: list[Point],
    layers: list[int],
    routes: dict[int, list[Point]],
) -> None:
    s = scene.scale
    marker = 15 * s / 0.7
    gap = marker / 2 + 1
    labelled = len(graph.states) <= LABEL_LIMIT
    for index, (a, b, t) in enumerate(graph.arcs):
        upward = index not in routes
        colour = style.STEP_UP.colour if upward else style.STEP_BACK.colour
        path = [positions[a], positions[b]] if upward else routes[index]
        scene.arc(path, colour, gap, gap, dashed=not upward, width=0.8)
        if labelled and upward and len(graph.arcs) <= 2 * LABEL_LIMIT:
            # A third of the way from the source, not halfway: two arcs that cross between
            # the same two layers cross at their midpoints, so their labels would coincide.
            scene.label(
                net.transitions[t],
                along(positions[a], positions[b], STATE_LABEL_AT),
                max(4.5, 6 * s / 0.7),
                colour=colour,
                boxed=True,
            )
    faces = [style.INITIAL_STATE.colour if i == 0 else "#ffffff" for i in range(len(positions))]
    scene.node_group(
        "states",
        [f"state-{i}" for i in range(len(positions))],
        positions,
        shape="circle",
        size=marker,
        face=faces,
        edge=style.STATE.colour,
    )
    if labelled:
        for i, point in enumerate(positions):
            scene.label(f"M{i}", point, max(4.5, 6.5 * s / 0.7))
        scene.side_heading = "marking: places with a token"
        scene.side_text = marking_lines(net, graph)
    scene.key("circle", style.STATE.colour, "reachable marking", "#ffffff")
    scene.key("circle", style.STATE.colour, style.INITIAL_STATE.meaning, style.INITIAL_STATE.colour)
    scene.key("line", style.STEP_UP.colour, "occurrence of a transition, one layer further from M0")
    scene.key("dashed", style.STEP_BACK.colour, "occurrence leading back to an earlier layer")
    p = net.params
    scene.title = (
        f"{p}: reachability graph, {len(graph.states)} states, {len(graph.arcs)} arcs "
        "(M0 at the bottom)"
    )
    scene.title_size = scene.title_font(9)
