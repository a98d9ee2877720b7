"""Ring designs of up to 6 items and 6 free slots (a ring buffer of video frames in a
stream-processing pipeline), with the cycloid of each and its catalog identifier.

    python examples/ring_designs.py --db catalog.sqlite3 --max-cells 6

A design whose cycloid lies beyond the catalog's complete area is listed without identifier.
Uses only the documented Python interface (docs/api/).
"""

from __future__ import annotations

import argparse

import zoo

MODELS = (
    ("anonymous", False, False),
    ("individual items", True, False),
    ("individual slots", False, True),
    ("individual both", True, True),
)


def designs(db: str | None, max_cells: int) -> list[tuple[int, int, str, str, str]]:
    """(items, slots, model, cycloid, class id or '') for every design with at most max_cells
    items and at most max_cells slots."""
    rows = []
    with zoo.Catalog.open(db) as catalog:
        bound = catalog.complete_to()
        for items in range(1, max_cells + 1):
            for slots in range(1, max_cells + 1):
                for model, named_items, named_slots in MODELS:
                    design = zoo.RingDesign(items, slots, named_items, named_slots)
                    p = design.params
                    class_id = catalog.get(str(p)).id if p.area <= bound else ""
                    rows.append((items, slots, model, str(p), class_id))
    return rows


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--db", help="catalog file or URL (default: zoo's default catalog)")
    parser.add_argument("--max-cells", type=int, default=6)
    args = parser.parse_args()
    print("| items | slots | model | cycloid | class |")
    print("|---:|---:|---|---|---|")
    for items, slots, model, cycloid, class_id in designs(args.db, args.max_cells):
        print(f"| {items} | {slots} | {model} | {cycloid} | {class_id or '(beyond the catalog)'} |")


if __name__ == "__main__":
    main()
