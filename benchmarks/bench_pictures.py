"""How long ``zoo draw`` takes per view and format, and how large the files are.

Prints figures (not a test): for nets of area 16, 100 and 400 and each view, the seconds to
build the scene (zoo.pictures.views.picture_scene) and to write it as SVG, PNG, PDF and TikZ,
with the size of each file.

    .venv/bin/python benchmarks/bench_pictures.py
"""

from __future__ import annotations

import time

from zoo.core.params import ParameterSet
from zoo.pictures.render_matplotlib import render
from zoo.pictures.tikz import tikz_document
from zoo.pictures.views import picture_scene

#: C(4,2,2,3): 4*3 + 2*2 = 16; C(5,5,5,15): 5*15 + 5*5 = 100; C(10,10,10,30): 300 + 100 = 400.
CASES = (
    ("parallelogram", ParameterSet(4, 2, 2, 3)),
    ("net", ParameterSet(4, 2, 2, 3)),
    ("parallelogram", ParameterSet(5, 5, 5, 15)),
    ("net", ParameterSet(5, 5, 5, 15)),
    ("net", ParameterSet(10, 10, 10, 30)),
    ("processes", ParameterSet(3, 2, 6, 6)),
    ("states", ParameterSet(2, 3, 2, 3)),
)


def main() -> None:
    print(f"{'view':<14} {'net':<16} {'scene s':>8}  format  seconds     bytes")
    for view, p in CASES:
        start = time.perf_counter()
        scene = picture_scene(p, view)
        built = time.perf_counter() - start
        for fmt in ("svg", "png", "pdf", "tikz"):
            start = time.perf_counter()
            data = tikz_document(scene).encode() if fmt == "tikz" else render(scene, fmt)
            seconds = time.perf_counter() - start
            print(
                f"{view:<14} {str(p):<16} {built:>8.3f}  {fmt:<6} {seconds:>7.2f} {len(data):>9,}"
            )


if __name__ == "__main__":
    main()
