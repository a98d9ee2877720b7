"""The shortest loop against the area: for every area, the smallest and largest shortest loop
of its classes, and which class reaches the largest (a table for a paper).

    python examples/shortest_loop.py --db catalog.sqlite3 --max-area 30

Uses only the documented Python interface (docs/api/).
"""

from __future__ import annotations

import argparse

import zoo


def loops_per_area(db: str | None, max_area: int) -> list[tuple[int, int, int, str]]:
    """(area, smallest loop, largest loop, first class with the largest loop) per area that
    has classes."""
    with zoo.Catalog.open(db) as catalog:
        bound = min(max_area, catalog.complete_to())
        rows = []
        for area in range(1, bound + 1):
            result = catalog.find(f"area = {area}", sort="-loop")
            loops = [entry.value("loop") for entry in result]
            if not loops:
                continue  # no cycloid has area 1
            longest = [entry for entry in result if entry.value("loop") == loops[0]]
            rows.append((area, min(loops), loops[0], longest[0].id))
        return rows


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--db", help="catalog file or URL (default: zoo's default catalog)")
    parser.add_argument("--max-area", type=int, default=30)
    args = parser.parse_args()
    print("| area | shortest loop, min | shortest loop, max | first class with the max |")
    print("|---:|---:|---:|---|")
    for area, low, high, class_id in loops_per_area(args.db, args.max_area):
        print(f"| {area} | {low} | {high} | {class_id} |")


if __name__ == "__main__":
    main()
