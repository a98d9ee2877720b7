"""A Scene (zoo.pictures.scene) as SVG text, written directly: the pictures of the web catalog.

matplotlib (zoo.pictures.render_matplotlib) lays a picture out as a figure, draws it twice for
its tight bounding box and writes every marker as a path: about half a second for an area-100
net, which an entry page of ``zoo serve`` cannot afford on every visit. This writer turns the
same scene into SVG elements in one pass (milliseconds), with the same layout rules: the page
rectangle at ``scale`` inches per unit, the title above it, the legend below it, side text to the
right, sizes in points (one SVG user unit is one point, 1/72 inch). Node groups keep their ids
(``transitions``) and every marker its own (``transition-t_0_0``), as in the matplotlib SVG.

Text is left to the browser (DejaVu Sans, else any sans-serif font); its width, needed only to
size the picture around the legend and title, is estimated from typical glyph widths.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from xml.sax.saxutils import escape, quoteattr

from zoo.pictures.layout import Point
from zoo.pictures.scene import Key, Label, NodeGroup, Scene, arrow_head

#: Arrow heads of arcs, in points: length and half width (as zoo.pictures.render_matplotlib).
HEAD_LENGTH, HEAD_HALF_WIDTH = 6.0, 2.4
#: Heads of the lattice-vector arrows, in points (matplotlib's ``-|>`` at 10 pt, as rendered).
VECTOR_HEAD_LENGTH, VECTOR_HEAD_HALF_WIDTH = 7.0, 3.5
#: White margin around the picture, in points (0.15 inch, as the matplotlib pictures).
MARGIN = 10.8
#: Dash pattern of a dashed line, in multiples of its width (matplotlib's default).
DASH = (3.7, 1.6)
#: Lines of side text per column, and its size in points.
SIDE_ROWS, SIDE_SIZE = 40, 7.0
#: Where the baseline of a line of text sits below the top of its box, and above its bottom,
#: in ems (DejaVu Sans: ascent of ``l`` 0.76, descent of ``p`` 0.24).
ASCENT, DESCENT = 0.76, 0.24
SANS = "'DejaVu Sans', 'Bitstream Vera Sans', sans-serif"
MONO = "'DejaVu Sans Mono', monospace"

_ANCHOR = {"left": "start", "center": "middle", "right": "end"}
# Average advance of DejaVu Sans glyphs in ems, by kind: enough to size the page, not to set type.
_NARROW = set("iljtfrI.,:;'!|()[]{} ")
_WIDE = set("mwMW@%")


def text_width(text: str, size: float, monospace: bool = False) -> float:
    """Estimated width in points of one line of text at ``size`` points."""
    if monospace:
        return len(text) * 0.602 * size
    ems = 0.0
    for c in text:
        if c in _NARROW:
            ems += 0.33
        elif c in _WIDE:
            ems += 0.92
        elif c.isupper() or c.isdigit():
            ems += 0.68
        else:
            ems += 0.6
    return ems * size


def _n(value: float) -> str:
    """A coordinate or size with one decimal: a tenth of a point, finer than a screen shows
    at any usual zoom (and formatting is most of this writer's time)."""
    return f"{value:.1f}"


def _dash(dashed: bool, width: float) -> str:
    if not dashed:
        return ""
    return f' stroke-dasharray="{_n(DASH[0] * width)},{_n(DASH[1] * width)}"'


class _Page:
    """Page units to SVG points: x to the right, y downwards, the page rectangle from (0, 0);
    ``grow`` keeps the box that everything drawn outside the page rectangle needs."""

    def __init__(self, scene: Scene) -> None:
        x0, x1, y0, y1 = scene.extent
        self.x0, self.y1 = x0, y1
        self.unit = scene.scale * 72.0
        self.width = (x1 - x0) * self.unit
        self.height = (y1 - y0) * self.unit
        self.box = [0.0, 0.0, self.width, self.height]

    def at(self, point: Point) -> tuple[float, float]:
        return (point[0] - self.x0) * self.unit, (self.y1 - point[1]) * self.unit

    def xy(self, point: Point) -> str:
        return f"{(point[0] - self.x0) * self.unit:.1f},{(self.y1 - point[1]) * self.unit:.1f}"

    def grow(self, left: float, top: float, right: float, bottom: float) -> None:
        box = self.box
        box[0], box[1] = min(box[0], left), min(box[1], top)
        box[2], box[3] = max(box[2], right), max(box[3], bottom)


def _text(
    x: float,
    y_top: float,
    lines: Sequence[str],
    size: float,
    *,
    anchor: str = "start",
    colour: str = "#000000",
    bold: bool = False,
    monospace: bool = False,
    extra: str = "",
) -> str:
    """A text element whose first line's box starts at ``y_top``, one tspan per line."""
    attributes = (
        f' font-size="{_n(size)}" font-family="{MONO if monospace else SANS}" fill="{colour}"'
    )
    if anchor != "start":
        attributes += f' text-anchor="{anchor}"'
    if bold:
        attributes += ' font-weight="bold"'
    baseline = y_top + ASCENT * size
    if len(lines) == 1:
        return f'<text x="{_n(x)}" y="{_n(baseline)}"{attributes}{extra}>{escape(lines[0])}</text>'
    spans = "".join(
        f'<tspan x="{_n(x)}" y="{_n(baseline + i * 1.2 * size)}">{escape(line)}</tspan>'
        for i, line in enumerate(lines)
    )
    return f"<text{attributes}{extra}>{spans}</text>"


def _label(page: _Page, label: Label) -> list[str]:
    x, y = page.at(label.at)
    x, y = x + label.offset[0], y - label.offset[1]  # offsets are in points, y upwards
    lines = label.text.split("\n")
    height = label.size * (ASCENT + DESCENT + 1.2 * (len(lines) - 1))
    top = {"top": y, "bottom": y - height, "baseline": y - ASCENT * label.size}.get(
        label.va, y - height / 2
    )
    width = max(text_width(line, label.size, label.monospace) for line in lines)
    left = {"left": x, "right": x - width}.get(label.ha, x - width / 2)
    out = []
    if label.boxed:  # a white box under the text, so that it stays legible over arcs
        pad = 0.1 * label.size
        out.append(
            f'<rect x="{_n(left - pad)}" y="{_n(top - pad)}" width="{_n(width + 2 * pad)}" '
            f'height="{_n(height + 2 * pad)}" rx="{_n(pad)}" fill="#ffffff" fill-opacity="0.85"/>'
        )
    out.append(
        _text(
            x,
            top,
            lines,
            label.size,
            anchor=_ANCHOR[label.ha],
            colour=label.colour,
            bold=label.bold,
            monospace=label.monospace,
        )
    )
    page.grow(left, top, left + width, top + height)
    return out


def _marker(shape: str, x: float, y: float, size: float, extra: str = "") -> str:
    """A square ``size`` points wide or a circle ``size`` points across, centred at (x, y)."""
    if shape == "square":
        return (
            f'<rect x="{_n(x - size / 2)}" y="{_n(y - size / 2)}" width="{_n(size)}" '
            f'height="{_n(size)}"{extra}/>'
        )
    return f'<circle cx="{_n(x)}" cy="{_n(y)}" r="{_n(size / 2)}"{extra}/>'


def _nodes(page: _Page, group: NodeGroup) -> list[str]:
    """One group of markers: shared colours on the group, the others on each marker."""
    one_face = len(set(group.faces)) == 1
    one_edge = len(set(group.edges)) == 1
    shared = f' stroke-width="{_n(group.linewidth)}"' + _dash(group.dashed, group.linewidth)
    if one_face:
        shared += f' fill="{group.faces[0]}"'
    if one_edge:
        shared += f' stroke="{group.edges[0]}"'
    out = [f"<g id={quoteattr(group.gid)}{shared}>"]
    for name, point, face, edge in zip(
        group.names, group.points, group.faces, group.edges, strict=True
    ):
        own = f" id={quoteattr(name)}"
        if not one_face:
            own += f' fill="{face}"'
        if not one_edge:
            own += f' stroke="{edge}"'
        out.append(_marker(group.shape, *page.at(point), group.size, own))
    out.append("</g>")
    return out


def _polygon(page: _Page, points: Iterable[Point]) -> str:
    return "M" + "L".join(page.xy(p) for p in points) + "Z"


def _arcs(page: _Page, scene: Scene) -> list[str]:
    """Arcs of one style as one path (each arc a sub-path), heads of one colour as another."""
    lines: dict[tuple[str, bool, float], list[str]] = {}
    heads: dict[str, list[str]] = {}
    length, half = scene.units(HEAD_LENGTH), scene.units(HEAD_HALF_WIDTH)
    for arc in scene.arcs:
        head = arrow_head(arc.path, length, half)
        heads.setdefault(arc.colour, []).append(_polygon(page, head))
        # The line stops inside the head, so that its end does not poke through the tip.
        path = list(arc.path)
        tip = path[-1]
        base = ((head[1][0] + head[2][0]) / 2, (head[1][1] + head[2][1]) / 2)
        path[-1] = (tip[0] + (base[0] - tip[0]) * 0.6, tip[1] + (base[1] - tip[1]) * 0.6)
        d = "M" + "L".join(page.xy(p) for p in path)
        lines.setdefault((arc.colour, arc.dashed, arc.width), []).append(d)
    out = []
    for (colour, dashed, width), paths in lines.items():
        out.append(
            f'<path d="{"".join(paths)}" fill="none" stroke="{colour}" '
            f'stroke-width="{_n(width)}"{_dash(dashed, width)}/>'
        )
    for colour, triangles in heads.items():
        out.append(
            f'<path d="{"".join(triangles)}" fill="{colour}" stroke="{colour}" stroke-width="0.3"/>'
        )
    return out


def _arrows(page: _Page, scene: Scene) -> list[str]:
    out = []
    for arrow in scene.arrows:
        # The head in points, turned into page units for arrow_head.
        length, half = scene.units(VECTOR_HEAD_LENGTH), scene.units(VECTOR_HEAD_HALF_WIDTH)
        head = arrow_head([arrow.start, arrow.end], length, half)
        base = ((head[1][0] + head[2][0]) / 2, (head[1][1] + head[2][1]) / 2)
        out.append(
            f'<g fill="{arrow.colour}" stroke="{arrow.colour}" stroke-width="{_n(arrow.width)}">'
            f'<path d="M{page.xy(arrow.start)}L{page.xy(base)}" fill="none" '
            f'stroke-linecap="round"/><path d="{_polygon(page, head)}"/></g>'
        )
    return out


def _glyph(key: Key, x: float, y: float, size: float) -> str:
    """A legend glyph ``2.6 * size`` points long starting at x, centred on y."""
    length = 2.6 * size
    if key.glyph in ("line", "dashed"):
        out = (
            f'<path d="M{_n(x)},{_n(y)}h{_n(length)}" stroke="{key.colour}" stroke-width="1.5"'
            f"{_dash(key.glyph == 'dashed', 1.5)}/>"
        )
        if key.face != "none":
            out += _marker(
                "square", x + length / 2, y, 6.0, f' fill="{key.face}" stroke="{key.colour}"'
            )
        return out
    middle = x + length / 2
    if key.glyph == "dot":
        return _marker("circle", middle, y, 5.0, f' fill="{key.colour}" stroke="{key.colour}"')
    shape = "circle" if key.glyph == "circle" else "square"
    return _marker(
        shape,
        middle,
        y,
        8.0,
        f' fill="{key.face}" stroke="{key.colour}"' + _dash(key.glyph == "dashed-square", 1.0),
    )


def _legend(page: _Page, scene: Scene) -> list[str]:
    """The keys below the page rectangle, in one column on a narrow page, else two (filled
    column by column)."""
    size = scene.legend_size
    columns = 1 if scene.width_inches < 7 else 2
    rows = math.ceil(len(scene.legend) / columns)
    row_height = 1.5 * size
    top = page.height + 0.9 * size
    out = ['<g id="legend">']
    x = 0.4 * size
    for column in range(columns):
        keys = scene.legend[column * rows : (column + 1) * rows]
        if not keys:
            break
        widest = 0.0
        for row, key in enumerate(keys):
            middle = top + (row + 0.5) * row_height
            out.append(_glyph(key, x, middle, size))
            text_x = x + 3.4 * size
            baseline_top = middle - (ASCENT + DESCENT) * size / 2
            out.append(_text(text_x, baseline_top, [key.meaning], size))
            widest = max(widest, 3.4 * size + text_width(key.meaning, size))
        page.grow(x, top, x + widest, top + len(keys) * row_height)
        x += widest + 2.0 * size
    out.append("</g>")
    return out


def _side_text(page: _Page, scene: Scene) -> list[str]:
    """Columns of monospaced lines right of the page rectangle (the markings of the states
    view), each column right of the widest line of the one before."""
    out = []
    x = page.width * 1.02
    columns = [
        scene.side_text[i : i + SIDE_ROWS] for i in range(0, len(scene.side_text), SIDE_ROWS)
    ]
    for number, column in enumerate(columns):
        heading = scene.side_heading if scene.side_heading and number == 0 else ""
        lines = [heading, *column]
        gid = "markings" if number == 0 else f"markings-{number}"
        out.append(_text(x, 0.0, lines, SIDE_SIZE, monospace=True, extra=f' id="{gid}"'))
        width = max(text_width(line, SIDE_SIZE, monospace=True) for line in lines)
        page.grow(x, 0.0, x + width, len(lines) * 1.2 * SIDE_SIZE)
        x += width + 0.03 * page.width
    return out


def _title(page: _Page, scene: Scene) -> list[str]:
    lines = scene.title.split("\n")
    size = scene.title_size
    height = size * (ASCENT + DESCENT + 1.2 * (len(lines) - 1))
    top = -6.0 - height  # 6 points above the page rectangle
    width = max(text_width(line, size) for line in lines)
    middle = page.width / 2
    page.grow(middle - width / 2, top, middle + width / 2, 0.0)
    return [_text(middle, top, lines, size, anchor="middle", extra=' id="title"')]


def svg_document(scene: Scene) -> str:
    """The scene as a standalone SVG document (UTF-8 text, no XML prologue needed inline)."""
    page = _Page(scene)
    body: list[str] = []
    for area in scene.areas:
        body.append(
            f'<path id="parallelogram" d="{_polygon(page, area.points)}" fill="{area.face}" '
            f'stroke="{area.edge}" stroke-width="{_n(area.width)}"'
            f"{_dash(area.dashed, area.width)}/>"
        )
    body += _arrows(page, scene)
    body += _arcs(page, scene)
    for group in sorted(scene.nodes, key=lambda g: g.layer):  # stable: scene order per layer
        body += _nodes(page, group)
    for label in scene.labels:
        body += _label(page, label)
    if scene.title:
        body += _title(page, scene)
    if scene.legend:
        body += _legend(page, scene)
    if scene.side_text:
        body += _side_text(page, scene)
    left, top, right, bottom = page.box
    left, top = left - MARGIN, top - MARGIN
    width, height = right + MARGIN - left, bottom + MARGIN - top
    title = scene.title.replace("\n", "; ")
    head = (
        f'<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="{_n(width)}pt" '
        f'height="{_n(height)}pt" viewBox="{_n(left)} {_n(top)} {_n(width)} {_n(height)}" '
        f'role="img" aria-label={quoteattr(title)} stroke-linejoin="round">'
    )
    return (
        "\n".join(
            [
                head,
                f"<title>{escape(title)}</title>",
                f'<rect x="{_n(left)}" y="{_n(top)}" width="{_n(width)}" height="{_n(height)}" '
                'fill="#ffffff"/>',
                *body,
                "</svg>",
            ]
        )
        + "\n"
    )


__all__ = ["svg_document", "text_width"]
