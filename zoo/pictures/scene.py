"""A picture as drawing primitives, before any file format.

The views (zoo.pictures.views) describe a picture once, as a ``Scene`` of arcs, node groups,
labels, areas, arrows and a legend, in page units with sizes in typographic points; then
zoo.pictures.render_matplotlib writes it as SVG, PNG or PDF and zoo.pictures.tikz as TikZ. So
every format shows the same nodes in the same colours of zoo.pictures.style, with the same legend.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from itertools import pairwise

from zoo.pictures.layout import Point

#: Smallest picture, in inches: very small nets are widened (same scale) so the title fits.
MIN_WIDTH_INCHES, MIN_HEIGHT_INCHES = 4.5, 3.0


@dataclass(frozen=True)
class Arc:
    """An arrow along ``path`` (page units), its tip at the last point."""

    path: tuple[Point, ...]
    colour: str
    dashed: bool = False
    width: float = 1.0  # points


@dataclass(frozen=True)
class NodeGroup:
    """Markers of one kind (``shape`` square or circle, ``size`` points across); ``gid`` and
    ``names`` become SVG ids."""

    gid: str
    names: tuple[str, ...]
    points: tuple[Point, ...]
    shape: str
    size: float
    faces: tuple[str, ...]  # one per point; "none" for no fill
    edges: tuple[str, ...]
    linewidth: float = 1.0
    dashed: bool = False
    layer: int = 4


@dataclass(frozen=True)
class Label:
    """Text at a page point, shifted by ``offset`` points; ``ha``/``va`` say which side of the
    text sits at that point (left/center/right, top/center/bottom)."""

    text: str
    at: Point
    size: float  # points
    colour: str = "#111111"
    offset: tuple[float, float] = (0.0, 0.0)
    ha: str = "center"
    va: str = "center"
    bold: bool = False
    boxed: bool = False  # on a white box, so that it stays legible over arcs
    monospace: bool = False


@dataclass(frozen=True)
class Area:
    """A filled polygon (the fundamental parallelogram)."""

    points: tuple[Point, ...]
    face: str
    edge: str
    dashed: bool = False
    width: float = 1.0


@dataclass(frozen=True)
class Arrow:
    """A thick straight arrow (a lattice vector)."""

    start: Point
    end: Point
    colour: str
    width: float = 1.8


@dataclass(frozen=True)
class Key:
    """One legend line: a glyph in a colour and what it means. ``glyph`` is ``line``,
    ``dashed``, ``square``, ``dashed-square``, ``circle`` or ``dot`` (a token); ``face`` fills
    square and circle glyphs."""

    glyph: str
    colour: str
    meaning: str
    face: str = "none"


@dataclass
class Scene:
    """Everything a picture shows. ``extent`` is the page rectangle (x0, x1, y0, y1) and
    ``scale`` the inches per page unit."""

    extent: tuple[float, float, float, float]
    scale: float
    title: str = ""
    title_size: float = 10.0
    arcs: list[Arc] = field(default_factory=list)
    nodes: list[NodeGroup] = field(default_factory=list)
    labels: list[Label] = field(default_factory=list)
    areas: list[Area] = field(default_factory=list)
    arrows: list[Arrow] = field(default_factory=list)
    legend: list[Key] = field(default_factory=list)
    #: Lines of text beside the picture, on the right (the markings of the states view).
    side_text: list[str] = field(default_factory=list)
    side_heading: str = ""

    def __post_init__(self) -> None:
        x0, x1, y0, y1 = self.extent
        if (x1 - x0) * self.scale < MIN_WIDTH_INCHES:
            pad = (MIN_WIDTH_INCHES / self.scale - (x1 - x0)) / 2
            x0, x1 = x0 - pad, x1 + pad
        if (y1 - y0) * self.scale < MIN_HEIGHT_INCHES:
            pad = (MIN_HEIGHT_INCHES / self.scale - (y1 - y0)) / 2
            y0, y1 = y0 - pad, y1 + pad
        self.extent = (x0, x1, y0, y1)

    @property
    def width_inches(self) -> float:
        return (self.extent[1] - self.extent[0]) * self.scale

    @property
    def height_inches(self) -> float:
        return (self.extent[3] - self.extent[2]) * self.scale

    def units(self, points: float) -> float:
        """A length in typographic points as page units."""
        return points / 72.0 / self.scale

    def title_font(self, base: float) -> float:
        """A title size in points that stays readable on a large page (about 1/60 of its
        width, never below ``base``)."""
        return max(base, min(28.0, self.width_inches * 72.0 / 60.0))

    @property
    def legend_size(self) -> float:
        """The legend's font size in points: 8, larger on a large page (1/90 of its width)."""
        return max(8.0, min(16.0, self.width_inches * 72.0 / 90.0))

    # --- building ------------------------------------------------------------------------

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
        trimmed = trim(path, self.units(gap_start), self.units(gap_end))
        if len(trimmed) >= 2:
            self.arcs.append(Arc(tuple(trimmed), colour, dashed, width))

    def node_group(
        self,
        gid: str,
        names: Sequence[str],
        points: Sequence[Point],
        *,
        shape: str,
        size: float,
        face: str | Sequence[str],
        edge: str | Sequence[str],
        linewidth: float = 1.0,
        dashed: bool = False,
        layer: int = 4,
    ) -> None:
        """One group of markers; a single face or edge colour applies to all."""
        if not points:
            return
        count = len(points)
        faces = (face,) * count if isinstance(face, str) else tuple(face)
        edges = (edge,) * count if isinstance(edge, str) else tuple(edge)
        self.nodes.append(
            NodeGroup(
                gid,
                tuple(names),
                tuple(points),
                shape,
                size,
                faces,
                edges,
                linewidth,
                dashed,
                layer,
            )
        )

    def label(self, text: str, at: Point, size: float, **options: object) -> None:
        self.labels.append(Label(text, at, size, **options))  # type: ignore[arg-type]

    def key(self, glyph: str, colour: str, meaning: str, face: str = "none") -> None:
        """A legend line, once per meaning."""
        if all(k.meaning != meaning for k in self.legend):
            self.legend.append(Key(glyph, colour, meaning, face))

    def colours(self) -> list[str]:
        """Every colour the scene uses, in first-use order (``#rrggbb``)."""
        seen: dict[str, None] = {}
        for arc in self.arcs:
            seen[arc.colour] = None
        for group in self.nodes:
            for colour in (*group.faces, *group.edges):
                seen[colour] = None
        for label in self.labels:
            seen[label.colour] = None
        for area in self.areas:
            seen[area.face] = seen[area.edge] = None
        for arrow in self.arrows:
            seen[arrow.colour] = None
        for key in self.legend:
            seen[key.colour] = seen[key.face] = None
        return [c for c in seen if c.startswith("#")]


def arrow_head(path: Sequence[Point], length: float, half_width: float) -> list[Point]:
    """The triangle of an arrow head at the end of ``path`` (page units)."""
    tip, before = path[-1], path[-2]
    dx, dy = tip[0] - before[0], tip[1] - before[1]
    norm = math.hypot(dx, dy) or 1.0
    ux, uy = dx / norm, dy / norm
    base = (tip[0] - ux * length, tip[1] - uy * length)
    return [
        tip,
        (base[0] - uy * half_width, base[1] + ux * half_width),
        (base[0] + uy * half_width, base[1] - ux * half_width),
    ]


def trim(path: Sequence[Point], start: float, end: float) -> list[Point]:
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


__all__ = ["Arc", "Area", "Arrow", "Key", "Label", "NodeGroup", "Scene", "arrow_head", "trim"]
