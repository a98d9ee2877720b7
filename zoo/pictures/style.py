"""The colours of every picture of a cycloid, each with what it means.

One table for the SVG and PNG views (zoo.pictures.views) and the Graphviz DOT text
(zoo.interchange.dot), so that a forward place is the same blue everywhere and the legend a file
prints is the one its colours follow. An ``Ink`` is a colour with its meaning; the DOT writer lists
the meaning of every ink it uses in its legend.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Ink:
    """A colour (``#rrggbb``) and what it marks in a picture."""

    colour: str
    meaning: str


#: Forward places and their arcs (the items on the ring buffer, the carts on the loop).
FORWARD = Ink("#1f5fa8", "forward places and their arcs")
#: Backward places and their arcs (the free slots, the gaps between carts).
BACKWARD = Ink("#c0392b", "backward places and their arcs")
#: Transitions, drawn as filled boxes.
TRANSITION = Ink("#222222", "transitions")
#: Tokens, drawn as filled dots inside their places.
TOKEN = Ink("#000000", "tokens")
#: The backward arcs of the processes view: the messages that release a process.
RELEASE = Ink("#9a9a9a", "backward places and their arcs (release messages between processes)")
#: The dashed copy of a transition that an arc leaving the parallelogram reaches.
FOLDED_COPY = Ink("#777777", "folded copies of transitions outside the parallelogram")
#: The fundamental parallelogram and its lattice vectors.
PARALLELOGRAM_EDGE = Ink("#8a8160", "edge of the fundamental parallelogram")
PARALLELOGRAM_FACE = Ink("#f3f1e7", "inside of the fundamental parallelogram")
LATTICE_VECTOR = Ink("#5d5640", "lattice vectors P and R")
#: The states view: the initial marking, steps away from it and steps back.
INITIAL_STATE = Ink("#f7d774", "initial marking M0")
STATE = Ink("#222222", "reachable markings")
STEP_UP = Ink("#333333", "occurrences leading one layer further from M0")
STEP_BACK = Ink("#b07d2b", "occurrences leading back to an earlier layer (dashed)")

#: One colour per process (forward cycle) in the processes view, repeated after ten.
PROCESS_COLOURS = (
    "#1f77b4",
    "#d62728",
    "#2ca02c",
    "#9467bd",
    "#ff7f0e",
    "#17becf",
    "#8c564b",
    "#e377c2",
    "#7f7f7f",
    "#bcbd22",
)

#: Text of node labels, and the fainter text naming a folded copy.
LABEL = "#111111"
FAINT_LABEL = "#666666"

#: The glyph of a token inside a place in text pictures (DOT labels).
TOKEN_GLYPH = "\u25cf"


def place_ink(kind: str) -> Ink:
    """The ink of a place of kind ``"forward"`` or ``"backward"`` and of its two arcs."""
    return FORWARD if kind == "forward" else BACKWARD


def process_ink(process: int) -> Ink:
    """The ink of process number ``process`` (its transitions, forward places and arcs)."""
    return Ink(
        PROCESS_COLOURS[process % len(PROCESS_COLOURS)],
        f"process {process}: its transitions, forward places and arcs",
    )


__all__ = [
    "BACKWARD",
    "FOLDED_COPY",
    "FORWARD",
    "FAINT_LABEL",
    "INITIAL_STATE",
    "Ink",
    "LABEL",
    "LATTICE_VECTOR",
    "PARALLELOGRAM_EDGE",
    "PARALLELOGRAM_FACE",
    "PROCESS_COLOURS",
    "RELEASE",
    "STATE",
    "STEP_BACK",
    "STEP_UP",
    "TOKEN",
    "TOKEN_GLYPH",
    "TRANSITION",
    "place_ink",
    "process_ink",
]
