"""The counts plot of the home page, drawn as a small SVG of our own (no plotting library).

Classes per area as bars on a logarithmic scale (counts grow fast with the area), with the
frames as a line over them; every bar carries a tooltip title with the exact numbers.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from html import escape

from zoo.catalog.service import AreaStats

WIDTH, HEIGHT = 720, 260
LEFT, RIGHT, TOP, BOTTOM = 52, 12, 14, 36


def counts_svg(rows: Sequence[AreaStats]) -> str:
    """An inline SVG of classes (bars) and frames (line) per area, log scale; '' without rows."""
    if not rows:
        return ""
    largest = max(max(r.classes, r.frames, 1) for r in rows)
    top_power = max(1, math.ceil(math.log10(largest + 1)))
    plot_w, plot_h = WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM
    step = plot_w / len(rows)

    def y(value: int) -> float:
        return TOP + plot_h * (1 - math.log10(value + 1) / top_power)

    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {WIDTH} {HEIGHT}" '
        'class="counts" role="img" aria-labelledby="counts-title">',
        '<title id="counts-title">Classes (bars) and frames (line) per area, log scale</title>',
    ]
    for power in range(top_power + 1):
        value = 10**power
        level = y(value - 1)
        parts.append(
            f'<line x1="{LEFT}" x2="{WIDTH - RIGHT}" y1="{level:.1f}" y2="{level:.1f}" '
            'class="grid"/>'
            f'<text x="{LEFT - 6}" y="{level + 4:.1f}" class="tick" text-anchor="end">'
            f"{value:,}</text>"
        )
    for index, r in enumerate(rows):
        x = LEFT + index * step
        top = y(r.classes)
        tip = escape(
            f"area {r.area}: {r.classes:,} classes, {r.frames:,} frames, "
            f"{r.parameter_sets:,} parameter sets"
        )
        parts.append(
            f'<rect x="{x + step * 0.12:.1f}" y="{top:.1f}" width="{step * 0.76:.1f}" '
            f'height="{TOP + plot_h - top:.1f}" class="bar"><title>{tip}</title></rect>'
        )
    line = " ".join(f"{LEFT + (i + 0.5) * step:.1f},{y(r.frames):.1f}" for i, r in enumerate(rows))
    parts.append(f'<polyline points="{line}" class="frames"/>')
    every = max(1, math.ceil(len(rows) / 12))
    for index, r in enumerate(rows):
        if index % every == 0 or index == len(rows) - 1:
            x = LEFT + (index + 0.5) * step
            parts.append(
                f'<text x="{x:.1f}" y="{HEIGHT - BOTTOM + 16}" class="tick" '
                f'text-anchor="middle">{r.area}</text>'
            )
    parts.append(
        f'<text x="{LEFT + plot_w / 2:.1f}" y="{HEIGHT - 4}" class="axis" '
        'text-anchor="middle">area A (transitions)</text></svg>'
    )
    return "".join(parts)


__all__ = ["counts_svg"]
