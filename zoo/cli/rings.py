"""Command ``ring``: the cycloid of a circular queue of items and free slots.

A thin layer over ``zoo.core.rings``: it parses arguments, asks the catalog for an identifier and
prints the design as a table or as JSON.
"""

from __future__ import annotations

from typing import Annotated, Any

import typer

from zoo.cli.app import app, fail
from zoo.cli.options import (
    FLAG,
    ReadOnlyCatalogOption,
    StateLimitOption,
    TableOrJson,
    TableOrJsonOption,
    class_id_of,
    fraction_cell,
    number_text,
    print_json,
    print_property_table,
)
from zoo.errors import ZooError

#: Default --state-limit of ``ring --simulate``: the default of zoo.core.rings.simulation_report
#: (tests/cli/test_examine.py keeps the two equal).
RING_STATE_LIMIT = 20_000


# --- ring ------------------------------------------------------------------------------


@app.command("ring")
def ring(
    items: Annotated[int, typer.Option("--items", "-c", help="Number of items C in the ring.")],
    slots: Annotated[int, typer.Option("--slots", "-g", help="Number of free slots G.")],
    individual_items: Annotated[
        bool, typer.Option("--individual-items", metavar=FLAG, help="Items are told apart (named).")
    ] = False,
    individual_slots: Annotated[
        bool,
        typer.Option("--individual-slots", metavar=FLAG, help="Free slots are told apart (named)."),
    ] = False,
    simulate: Annotated[
        bool,
        typer.Option(
            "--simulate",
            metavar=FLAG,
            help="Also simulate the ring cell by cell and check that its state graph is "
            "isomorphic to the cycloid's reachability graph (small rings only).",
        ),
    ] = False,
    state_limit: StateLimitOption = RING_STATE_LIMIT,
    fmt: TableOrJsonOption = TableOrJson.table,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """The cycloid of a circular queue of C items and G free slots.

    "iterates" names the catalog entries of which the designed system is an
    n-fold temporal iteration (named items or slots: the anonymous ring's
    class, n-fold), when the catalog holds them.

    --simulate explores the ring's states and the cycloid's reachability graph, each up to
    --state-limit states.

    Example: zoo ring --items 2 --slots 3 --individual-items
    """
    from zoo.catalog.lookup import iterated_entries
    from zoo.core.rings import RingDesign, describe_ring

    try:
        design = RingDesign(items, slots, individual_items, individual_slots)
        report = describe_ring(
            design, class_id_of(design.params, db), state_limit if simulate else None
        )
        # The catalog entries this system is an n-fold iteration of (docs/theory/iterations.md):
        # named items or slots repeat the anonymous ring's behaviour n times over.
        report["iterates"] = iterated_entries(design.params, lambda q: class_id_of(q, db))
    except ZooError as exc:
        raise fail(exc) from None
    if fmt is TableOrJson.json:
        print_json(report)
        return
    _print_ring_table(report)


def _print_ring_table(report: dict[str, Any]) -> None:

    inv = report["invariants"]
    fwd, bwd = inv["forward_cycles"], inv["backward_cycles"]
    rows = [
        ("ring", f"{report['items']} items, {report['slots']} slots, {report['cells']} cells"),
        ("model", report["model"]),
        ("cycloid", report["params"]),
        ("catalog id", report["class_id"] or "—"),
        (
            "iterates",
            ", ".join(f"{link['id']} ({link['n']}-fold)" for link in report["iterates"]) or "—",
        ),
        ("area", f"{report['area']:,} (shortest return to the start, in moves)"),
        ("reachable states", number_text(report["states"])),
        ("reachability arcs", number_text(inv["state_arcs"])),
        ("loop (shortest cycle)", str(inv["loop"])),
        (
            "forward cycles",
            f"{fwd['count']} × {fwd['length']} ({_count(fwd['tokens'], 'item')} each)",
        ),
        (
            "backward cycles",
            f"{bwd['count']} × {bwd['length']} ({_count(bwd['tokens'], 'slot')} each)",
        ),
        ("processes", f"{inv['processes']}{' (regular)' if inv['regular'] else ''}"),
        ("slowness", fraction_cell(inv["slowness"])),
    ]
    sim = report.get("simulation")
    if sim is not None:
        verdict = "isomorphic" if sim["isomorphic"] else "NOT isomorphic"
        rows.append(
            (
                "simulation",
                f"{sim['states']:,} states, {sim['moves']:,} moves: {verdict} "
                "to the cycloid's reachability graph",
            )
        )
    print_property_table(
        f"ring design → {report['params']}",
        ("property", "value"),
        rows,
        [("fingerprint", inv["fingerprint"] or "—")],
    )


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}{'' if n == 1 else 's'}"
