"""Graphviz DOT text of a cycloid: its net in each view, and its reachability graph.

The one DOT writer of zoo: ``zoo export --format dot``, ``zoo draw --format dot`` and the web
catalog's ``net.dot`` all come from here. Node positions are zoo.pictures.layout's and colours
zoo.pictures.style's, the same as in the SVG and PNG pictures; every colour the text uses is named
in a ``// legend:`` comment at its top, and no other.

Every node carries a pinned position (``pos="x,y!"``, inches; Graphviz's y axis points up, so time
points up as in docs/theory/petri-space.md, Drawing). ``neato -Tsvg`` keeps the layout; ``dot
-Tsvg`` lays the graph out in ranks instead. Arcs are straight lines (``splines=false``) and the
rank search of ``dot`` is bounded: spline routing around hundreds of nodes took neato minutes on
an area-200 net, straight lines take well under a second (benchmarks/bench_dot.py measures both
programs).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING, Protocol

from zoo.pictures import style
from zoo.pictures.layout import (
    LaidOutNet,
    Point,
    drawing_coordinates,
    ring_place_points,
    ring_positions,
    state_layers,
    state_positions,
)

if TYPE_CHECKING:
    from zoo.core.params import ParameterSet
    from zoo.pictures.views import StateGraph

#: Inches per page unit (one step of xi or eta).
INCHES = 0.6
#: Graph attributes chosen for rendering time (benchmarks/bench_dot.py): straight arcs instead
#: of splines routed around nodes; no overlap removal (pinned positions never overlap); and for
#: ``dot``, a bounded crossing minimisation (mclimit) and network simplex (nslimit, nslimit1),
#: which otherwise take tens of seconds on an area-100 net.
FAST_RENDERING = (
    "splines=false",
    "overlap=true",
    "outputorder=edgesfirst",
    "mclimit=0.1",
    "nslimit=2",
    "nslimit1=2",
)
NET_VIEWS = ("parallelogram", "net", "processes")


class DrawnNet(LaidOutNet, Protocol):
    """What the writer needs of a net: its layout data and the names and tokens of its nodes."""

    @property
    def transitions(self) -> Sequence[str]: ...
    @property
    def places(self) -> Sequence[str]: ...
    @property
    def tokens(self) -> Sequence[int]: ...


def quote(text: str) -> str:
    """A DOT double-quoted identifier (Graphviz DOT language: quotes and backslashes escaped)."""
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


class _Document:
    """DOT lines and the legend of the inks they use, written together so they cannot differ."""

    def __init__(self) -> None:
        self.lines: list[str] = []
        self.legend: dict[str, list[str]] = {}

    def ink(self, ink: style.Ink) -> str:
        """The quoted colour of ``ink``, recorded for the legend."""
        meanings = self.legend.setdefault(ink.colour, [])
        if ink.meaning not in meanings:
            meanings.append(ink.meaning)
        return quote(ink.colour)

    def text(self, header: Sequence[str], name: str) -> str:
        legend = [
            f"// legend: {colour} {'; '.join(meanings)}" for colour, meanings in self.legend.items()
        ]
        body = [f"digraph {quote(name)} {{", *self.lines, "}"]
        return "\n".join([*(f"// {line}" for line in header), *legend, *body]) + "\n"


def _pos(point: Point) -> str:
    x, y = point
    return quote(f"{x * INCHES:.3f},{y * INCHES:.3f}!")


def net_dot(net: DrawnNet, view: str = "parallelogram") -> str:
    """DOT text of the net in a view: transitions as filled boxes, places as circles with one dot
    per token, names beside the nodes, positions pinned from zoo.pictures.layout.

    ``parallelogram`` lays the net out in the Petri space; ``net`` and ``processes`` on rings,
    one per forward cycle; ``processes`` (regular cycloids) colours each process and puts its
    transitions in a cluster.
    """
    from zoo.version import __version__

    if view not in NET_VIEWS:
        raise ValueError(f"unknown net view {view!r}; choose one of {', '.join(NET_VIEWS)}")
    p = net.params
    doc = _Document()
    rings: list[int] = []
    if view == "parallelogram":
        transition_at, place_at = drawing_coordinates(net)
    else:
        transition_at, rings = ring_positions(net)
        place_at = ring_place_points(net, transition_at, rings)
    coloured = view == "processes"
    doc.lines += [
        f"  graph [label={quote(f'{p}: {view} view, A = {p.area}')}, labelloc=t, "
        + ", ".join(FAST_RENDERING)
        + "];",
        '  node [fontname="Helvetica", fontsize=9];',
        "  edge [arrowsize=0.6];",
    ]
    transition_lines = []
    for t, name in enumerate(net.transitions):
        ink = doc.ink(style.process_ink(rings[t]) if coloured else style.TRANSITION)
        transition_lines.append(
            f"  {quote(name)} [shape=box, style=filled, color={ink}, fillcolor={ink}, "
            f'width=0.3, height=0.2, fixedsize=true, label="", xlabel={quote(name)}, '
            f"pos={_pos(transition_at[t])}];"
        )
    if coloured:
        by_ring: dict[int, list[str]] = {}
        for t, line in enumerate(transition_lines):
            by_ring.setdefault(rings[t], []).append(line)
        for ring, members in sorted(by_ring.items()):
            doc.lines.append(f"  subgraph cluster_process_{ring} {{")
            doc.lines.append(
                f"    label={quote(f'process {ring}')}; color={doc.ink(style.process_ink(ring))};"
            )
            doc.lines.extend("  " + member for member in members)
            doc.lines.append("  }")
    else:
        doc.lines.extend(transition_lines)
    place_inks = []
    for s, kind in enumerate(net.kinds):
        if coloured:
            place = style.process_ink(rings[net.pre[s]]) if kind == "forward" else style.RELEASE
        else:
            place = style.place_ink(kind)
        place_inks.append(doc.ink(place))
    for s, name in enumerate(net.places):
        doc.lines.append(
            f"  {quote(name)} [shape=circle, width=0.22, fixedsize=true, color={place_inks[s]}, "
            f"label={quote(style.TOKEN_GLYPH * net.tokens[s])}, xlabel={quote(name)}, "
            f"tokens={net.tokens[s]}, tooltip={quote(net.kinds[s])}, pos={_pos(place_at[s])}];"
        )
    for s, name in enumerate(net.places):
        source, target = net.transitions[net.pre[s]], net.transitions[net.post[s]]
        doc.lines.append(f"  {quote(source)} -> {quote(name)} [color={place_inks[s]}];")
        doc.lines.append(f"  {quote(name)} -> {quote(target)} [color={place_inks[s]}];")
    header = [
        f"{p}: {view} view of the net of the cycloid system, area {p.area}, "
        f"written by zoo {__version__}",
        "boxes: transitions; circles: places, with one dot inside per token; names beside",
        "positions are pinned (inches): neato -Tsvg keeps them, dot -Tsvg ranks the graph anew",
    ]
    return doc.text(header, f"{p} {view}")


def dot_document(net: DrawnNet) -> str:
    """The net of a cycloid system as DOT, laid out on its fundamental parallelogram (the
    ``zoo export --format dot`` document)."""
    return net_dot(net, "parallelogram")


def states_dot(net: DrawnNet, graph: StateGraph) -> str:
    """DOT text of a reachability graph: states M0, M1, ... (their marked places as tooltips) in
    rows by distance from M0, which is at the bottom; arcs back to earlier rows dashed."""
    from zoo.version import __version__

    p = net.params
    doc = _Document()
    count = len(graph.states)
    positions = state_positions(count, graph.arcs)
    layers = state_layers(count, graph.arcs)
    doc.lines += [
        f"  graph [label={quote(f'{p}: reachability graph, {count} states')}, labelloc=t, "
        "rankdir=BT, " + ", ".join(FAST_RENDERING) + "];",
        '  node [shape=ellipse, fontname="Helvetica", fontsize=10];',
        '  edge [arrowsize=0.6, fontname="Helvetica", fontsize=8];',
    ]
    for i, marking in enumerate(graph.states):
        marked = " ".join(net.places[s] for s in marking)
        fill = f", style=filled, fillcolor={doc.ink(style.INITIAL_STATE)}" if i == 0 else ""
        doc.lines.append(
            f"  M{i} [label={quote(f'M{i}')}, color={doc.ink(style.STATE)}{fill}, "
            f"tooltip={quote(marked)}, pos={_pos(positions[i])}];"
        )
    for a, b, t in graph.arcs:
        if layers[b] > layers[a]:
            attrs = f"color={doc.ink(style.STEP_UP)}"
        else:
            attrs = f"color={doc.ink(style.STEP_BACK)}, style=dashed"
        doc.lines.append(f"  M{a} -> M{b} [label={quote(net.transitions[t])}, {attrs}];")
    header = [
        f"{p}: reachability graph, {count} states, {len(graph.arcs)} arcs, "
        f"written by zoo {__version__}",
        "ellipses: markings M0, M1, ... (tooltip: the marked places); arcs: occurrences",
    ]
    return doc.text(header, f"{p} states")


def picture_dot(p: ParameterSet, view: str = "parallelogram") -> str:
    """DOT text of a view of C(p), the text counterpart of zoo.pictures.views.draw: the same
    views, limits and refusals (ParameterError, LimitExceeded)."""
    from zoo.pictures.views import check_view, net_picture, state_graph

    check_view(p, view)
    if view == "states":
        net, graph = state_graph(p)
        return states_dot(net, graph)
    return net_dot(net_picture(p), view)


__all__ = ["FAST_RENDERING", "dot_document", "net_dot", "picture_dot", "quote", "states_dot"]
