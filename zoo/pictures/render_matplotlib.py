"""A Scene (zoo.pictures.scene) as SVG, PNG or PDF, drawn with matplotlib's Agg backend.

Arcs and nodes of one style go into one collection each: one matplotlib artist per node or arc
costs milliseconds, collections keep an area-400 net at about two seconds. Node groups get an
SVG id (``gid``, e.g. ``transitions``) and every marker its own (``transition-t_0_0``, through
``_links_to_ids``).
"""

from __future__ import annotations

import io
import re
from typing import Any

from zoo.errors import import_extra
from zoo.pictures.scene import Key, Scene, arrow_head

#: The file formats matplotlib writes for us.
RASTER_FORMATS = ("svg", "png", "pdf")
#: Resolution of PNG pictures, dots per inch.
PNG_DPI = 110
#: Arrow heads, in points: length and half width.
HEAD_LENGTH, HEAD_HALF_WIDTH = 6.0, 2.4
#: Lines of side text per column (the markings of the states view).
SIDE_ROWS = 40

_MARKERS = {"square": "s", "circle": "o"}
_HA = {"left": "left", "center": "center", "right": "right"}


def render(scene: Scene, fmt: str) -> bytes:
    """The file of the scene in ``fmt`` (svg, png or pdf), as bytes.

    The axes fill the figure exactly, so that marker sizes in points and lengths in page units
    agree; legend and side text sit outside the axes and ``bbox_inches="tight"`` keeps them.
    """
    matplotlib = import_extra("matplotlib", "plots", "drawing a picture")
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    x0, x1, y0, y1 = scene.extent
    metadatas: dict[str, dict[str, Any]] = {
        "svg": {"Date": None},
        "png": {"Software": "zoo"},
        "pdf": {"Creator": "zoo", "Producer": "zoo", "CreationDate": None},
    }
    metadata = metadatas[fmt]
    with matplotlib.rc_context(
        {
            "svg.fonttype": "none",
            "svg.hashsalt": "zoo",
            "font.family": "DejaVu Sans",
            "pdf.fonttype": 42,  # TrueType fonts embedded whole: text stays text in the PDF
        }
    ):
        fig = plt.figure(figsize=(scene.width_inches, scene.height_inches))
        try:
            ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
            ax.set_xlim(x0, x1)
            ax.set_ylim(y0, y1)
            ax.set_aspect("equal", adjustable="box")
            ax.axis("off")
            _draw(ax, scene)
            buffer = io.BytesIO()
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


def _draw(ax: Any, scene: Scene) -> None:
    from matplotlib.collections import LineCollection, PolyCollection
    from matplotlib.patches import Polygon

    for area in scene.areas:
        patch = Polygon(
            area.points,
            closed=True,
            facecolor=area.face,
            edgecolor=area.edge,
            linewidth=area.width,
            linestyle="--" if area.dashed else "-",
            zorder=0,
        )
        patch.set_gid("parallelogram")
        ax.add_patch(patch)
    for arrow in scene.arrows:
        ax.annotate(
            "",
            xy=arrow.end,
            xytext=arrow.start,
            arrowprops={
                "arrowstyle": "-|>,head_width=0.35,head_length=0.7",
                "color": arrow.colour,
                "linewidth": arrow.width,
                "shrinkA": 0,
                "shrinkB": 0,
            },
            zorder=1,
        )
    lines: dict[tuple[str, bool, float], list[list[tuple[float, float]]]] = {}
    heads: dict[str, list[list[tuple[float, float]]]] = {}
    length, half = scene.units(HEAD_LENGTH), scene.units(HEAD_HALF_WIDTH)
    for arc in scene.arcs:
        head = arrow_head(arc.path, length, half)
        heads.setdefault(arc.colour, []).append(head)
        # The line stops inside the head, so that its end does not poke through the tip.
        path = list(arc.path)
        tip = path[-1]
        base = ((head[1][0] + head[2][0]) / 2, (head[1][1] + head[2][1]) / 2)
        path[-1] = (tip[0] + (base[0] - tip[0]) * 0.6, tip[1] + (base[1] - tip[1]) * 0.6)
        lines.setdefault((arc.colour, arc.dashed, arc.width), []).append(path)
    for (colour, dashed, width), paths in lines.items():
        ax.add_collection(
            LineCollection(
                paths, colors=colour, linewidths=width, linestyles="--" if dashed else "-", zorder=2
            )
        )
    for colour, triangles in heads.items():
        ax.add_collection(
            PolyCollection(
                triangles, facecolors=colour, edgecolors=colour, linewidths=0.3, zorder=2
            )
        )
    for group in scene.nodes:
        art = ax.scatter(
            [x for x, _ in group.points],
            [y for _, y in group.points],
            s=group.size**2,
            marker=_MARKERS[group.shape],
            facecolors=list(group.faces),
            edgecolors=list(group.edges),
            linewidths=group.linewidth,
            linestyle="--" if group.dashed else "-",
            zorder=group.layer,
        )
        art.set_gid(group.gid)
        art.set_urls([f"#{name}" for name in group.names])
    for label in scene.labels:
        options: dict[str, Any] = {}
        if label.boxed:
            options["bbox"] = {
                "boxstyle": "round,pad=0.1",
                "facecolor": "white",
                "edgecolor": "none",
                "alpha": 0.85,
            }
        ax.annotate(
            label.text,
            label.at,
            xytext=label.offset,
            textcoords="offset points",
            fontsize=label.size,
            color=label.colour,
            ha=_HA[label.ha],
            va=label.va,
            fontweight="bold" if label.bold else "normal",
            family="DejaVu Sans Mono" if label.monospace else "DejaVu Sans",
            zorder=6,
            **options,
        )
    if scene.title:
        ax.set_title(scene.title, fontsize=scene.title_size)
    if scene.legend:
        ax.legend(
            handles=[_handle(key) for key in scene.legend],
            loc="upper left",
            bbox_to_anchor=(0.0, 0.0),
            fontsize=scene.legend_size,
            frameon=False,
            ncol=1 if scene.width_inches < 7 else 2,
            handlelength=2.6,
        )
    if scene.side_text:
        columns = [
            scene.side_text[i : i + SIDE_ROWS] for i in range(0, len(scene.side_text), SIDE_ROWS)
        ]
        x = 1.02
        for number, column in enumerate(columns):
            heading = scene.side_heading + "\n" if scene.side_heading and number == 0 else "\n"
            text = ax.text(
                x,
                1.0,
                heading + "\n".join(column),
                transform=ax.transAxes,
                ha="left",
                va="top",
                fontsize=7,
                family="DejaVu Sans Mono",
            )
            text.set_gid("markings" if number == 0 else f"markings-{number}")
            # The next column starts right of the widest line of this one.
            width = max(len(line) for line in [heading, *column])
            x += width * 7 * 0.62 / 72.0 / scene.width_inches + 0.03


def _handle(key: Key) -> Any:
    from matplotlib.lines import Line2D

    if key.glyph in ("line", "dashed"):
        return Line2D(
            [0],
            [0],
            color=key.colour,
            linewidth=1.5,
            linestyle="--" if key.glyph == "dashed" else "-",
            marker="none" if key.face == "none" else "s",
            markerfacecolor=key.face,
            markersize=6,
            label=key.meaning,
        )
    marker = {"square": "s", "dashed-square": "s", "circle": "o", "dot": "o"}[key.glyph]
    return Line2D(
        [0],
        [0],
        linestyle="none",
        marker=marker,
        markersize=5 if key.glyph == "dot" else 8,
        markerfacecolor=key.colour if key.glyph == "dot" else key.face,
        markeredgecolor=key.colour,
        label=key.meaning,
    )


_LINK = re.compile(rb'<a xlink:href="#([^"]+)" target="_blank">')


def _links_to_ids(svg: bytes) -> bytes:
    """Turn matplotlib's per-point links into groups with ids: ``<g id="transition-t_0_0">``.

    matplotlib can name a whole collection (gid) but a single point only through a link;
    the only links in our pictures are those, so every ``</a>`` closes one of them.
    """
    return _LINK.sub(rb'<g id="\1">', svg).replace(b"</a>", b"</g>")


__all__ = ["PNG_DPI", "RASTER_FORMATS", "render"]
