"""Graphviz DOT text of a cycloid's net, laid out on its fundamental parallelogram.

Transitions are boxes, places circles (a dot inside for a token), forward places and their arcs
in one colour and backward ones in another. Every node carries a pinned ``pos`` in inches
(Graphviz's y axis points up, so time points up as in docs/theory/petri-space.md, Drawing): render
with
``neato -Tsvg`` or ``fdp -Tsvg`` to keep the layout (pinned positions are in inches), or with
``dot`` to let Graphviz choose one.
Pictures (SVG) are zoo.pictures.views's business; this module writes the graph as text.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from zoo.interchange.netmodel import drawing_coordinates

if TYPE_CHECKING:
    from zoo.core.net import CycloidNet

#: Inches per step of xi or eta.
SCALE = 0.6
FORWARD_COLOUR = "#1f5fa8"
BACKWARD_COLOUR = "#b8420f"
TOKEN = "\u25cf"


def _quote(text: str) -> str:
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


def _pos(x: float, y: float) -> str:
    return _quote(f"{x * SCALE:.3f},{y * SCALE:.3f}!")


def dot_document(net: CycloidNet) -> str:
    """The net of a cycloid system as a Graphviz ``digraph`` with pinned positions."""
    from zoo.version import __version__

    p = net.params
    transitions_at, places_at = drawing_coordinates(net)
    lines = [
        f"// {p}: net of the cycloid system, area {p.area}, written by zoo {__version__}",
        "// boxes: transitions t_XI_ETA; circles: places f_ (forward, blue) and b_ (backward,"
        " orange)",
        f"digraph {_quote(str(p))} {{",
        f"  graph [label={_quote(f'{p}  (A = {p.area})')}, labelloc=t, splines=true,"
        " outputorder=edgesfirst];",
        '  node [fontname="Helvetica", fontsize=9];',
        "  edge [arrowsize=0.6];",
    ]
    for name, (x, y) in zip(net.transitions, transitions_at, strict=True):
        lines.append(
            f'  {_quote(name)} [shape=box, width=0.35, height=0.2, label="", '
            f"xlabel={_quote(name)}, pos={_pos(x, y)}];"
        )
    for j, name in enumerate(net.places):
        colour = FORWARD_COLOUR if net.kinds[j] == "forward" else BACKWARD_COLOUR
        x, y = places_at[j]
        label = TOKEN * net.tokens[j]
        lines.append(
            f"  {_quote(name)} [shape=circle, width=0.22, fixedsize=true, color={_quote(colour)},"
            f" label={_quote(label)}, xlabel={_quote(name)}, tooltip={_quote(net.kinds[j])},"
            f" pos={_pos(x, y)}];"
        )
    for j, name in enumerate(net.places):
        colour = _quote(FORWARD_COLOUR if net.kinds[j] == "forward" else BACKWARD_COLOUR)
        source = net.transitions[net.pre[j]]
        target = net.transitions[net.post[j]]
        lines.append(f"  {_quote(source)} -> {_quote(name)} [color={colour}];")
        lines.append(f"  {_quote(name)} -> {_quote(target)} [color={colour}];")
    lines.append("}")
    return "\n".join(lines) + "\n"


__all__ = ["dot_document"]
