"""Classes and regular classes per area, as a plot and a table (a survey figure for a paper).

A class is regular when one of its readings is regular (its processes all have one length).

    python examples/classes_per_area.py --db catalog.sqlite3 --max-area 30 --plot classes.pdf

Uses only the documented Python interface (docs/api/).
"""

from __future__ import annotations

import argparse

import zoo


def survey(db: str | None, max_area: int) -> list[tuple[int, int, int]]:
    """(area, classes, regular classes) for every area up to max_area held by the catalog."""
    with zoo.Catalog.open(db) as catalog:
        bound = min(max_area, catalog.complete_to())
        rows = []
        for area in range(1, bound + 1):
            classes = catalog.count(f"area = {area}")
            regular = catalog.count(f"area = {area} and regular")
            rows.append((area, classes, regular))
        return rows


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--db", help="catalog file or URL (default: zoo's default catalog)")
    parser.add_argument("--max-area", type=int, default=30)
    parser.add_argument("--plot", help="write the figure to this file (.pdf, .png or .svg)")
    args = parser.parse_args()
    rows = survey(args.db, args.max_area)
    print(f"{'area':>5} {'classes':>8} {'regular':>8}")
    for area, classes, regular in rows:
        print(f"{area:>5} {classes:>8} {regular:>8}")
    if args.plot:
        import matplotlib

        matplotlib.use("Agg")
        import matplotlib.pyplot as plt

        figure, axes = plt.subplots(figsize=(5, 3))
        areas = [r[0] for r in rows]
        axes.plot(areas, [r[1] for r in rows], marker="o", markersize=3, label="classes")
        axes.plot(areas, [r[2] for r in rows], marker="s", markersize=3, label="regular classes")
        axes.set_xlabel("area (transitions)")
        axes.set_ylabel("classes")
        axes.legend()
        figure.tight_layout()
        figure.savefig(args.plot)
        print(f"wrote {args.plot}")


if __name__ == "__main__":
    main()
