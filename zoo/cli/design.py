"""Commands of zoo: ``ring``, ``draw``, ``cite``, ``dump`` and ``release``.

A thin layer: ring designs come from ``zoo.ring``, pictures from ``zoo.draw``, citations from
``zoo.cite`` and catalog dumps and releases from ``zoo.release``; this module parses arguments,
resolves references through the catalog service and writes files.
"""

from __future__ import annotations

import json
import sys
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any

import typer

from zoo.cli.app import app, fail
from zoo.errors import CatalogError, ZooError
from zoo.params import ParameterSet, parse_params

DbOption = Annotated[
    str | None,
    typer.Option(
        "--db",
        help="Catalog file or database URL (default: $ZOO_CATALOG, else the user data "
        "directory). Read only: never built or changed.",
    ),
]

# Parameter sets such as -1,2,2,3 must reach our parser (which explains what is wrong) instead
# of being taken for unknown options.
_LOOSE = {"ignore_unknown_options": True}


class RingFormat(StrEnum):
    """How ``ring`` prints its answer."""

    table = "table"
    json = "json"


class PictureFormat(StrEnum):
    """File formats of ``draw``."""

    svg = "svg"
    png = "png"
    dot = "dot"


class PictureView(StrEnum):
    """What ``draw`` shows."""

    parallelogram = "parallelogram"
    net = "net"
    processes = "processes"
    states = "states"


class CiteFormat(StrEnum):
    """What ``cite`` prints."""

    both = "both"
    bibtex = "bibtex"
    text = "text"
    json = "json"


class DumpFormat(StrEnum):
    """File formats of ``dump``."""

    csv = "csv"
    jsonl = "jsonl"


# --- shared helpers ---------------------------------------------------------------------


def _print_json(value: object) -> None:
    sys.set_int_max_str_digits(0)  # reachable-state counts can be very long; print them exactly
    typer.echo(json.dumps(value, indent=2, ensure_ascii=False))


def _class_id(p: ParameterSet, db: str | None) -> str | None:
    """The catalog identifier of p's class, or None; never builds a catalog.

    An unreadable catalog must not hide what needs no catalog: its error becomes a note.
    """
    from zoo.catalog import lookup_class_id

    try:
        return lookup_class_id(p, db)
    except CatalogError as exc:
        typer.echo(f"Note: no catalog identifier: {exc}", err=True)
        return None


def _resolve_params(ref: str, db: str | None) -> ParameterSet:
    """A parameter set typed directly, or the label of a catalog identifier."""
    from zoo.identifiers import read_identifier

    if read_identifier(ref) is None:
        return parse_params(ref)
    from zoo.catalog import Catalog

    catalog = Catalog.open(db)
    try:
        entry = catalog.get(ref.strip())
    finally:
        catalog.close()
    return parse_params(entry.label)


def write_file_atomically(path: Path, data: bytes) -> None:
    """Write a file through a temporary file renamed at the end (also used by ``zoo export``).

    A failure half-way leaves any existing file at ``path`` as it was.
    """
    from zoo.release import write_bytes_atomically

    write_bytes_atomically(path, data)


# --- ring ------------------------------------------------------------------------------


@app.command("ring")
def ring(
    items: Annotated[int, typer.Option("--items", "-c", help="Number of items C in the ring.")],
    slots: Annotated[int, typer.Option("--slots", "-g", help="Number of free slots G.")],
    individual_items: Annotated[
        bool, typer.Option("--individual-items", help="Items are told apart (named).")
    ] = False,
    individual_slots: Annotated[
        bool, typer.Option("--individual-slots", help="Free slots are told apart (named).")
    ] = False,
    simulate: Annotated[
        bool,
        typer.Option(
            "--simulate",
            help="Also simulate the ring cell by cell and check that its state graph is "
            "isomorphic to the cycloid's reachability graph (small rings only).",
        ),
    ] = False,
    fmt: Annotated[
        RingFormat, typer.Option("--format", "-f", help="table: readable; json: one object.")
    ] = RingFormat.table,
    db: DbOption = None,
) -> None:
    """The cycloid of a circular queue of C items and G free slots.

    Example: zoo ring --items 2 --slots 3 --individual-items
    """
    from zoo.ring import RingDesign, describe_ring, simulation_report

    try:
        design = RingDesign(items, slots, individual_items, individual_slots)
        report: dict[str, Any] = describe_ring(design, _class_id(design.params, db))
        if simulate:
            report["simulation"] = simulation_report(design)
    except ZooError as exc:
        raise fail(str(exc)) from None
    if fmt is RingFormat.json:
        _print_json(report)
        return
    _print_ring_table(report)


def _print_ring_table(report: dict[str, Any]) -> None:
    from rich.console import Console
    from rich.table import Table

    inv = report["invariants"]
    fwd, bwd = inv["forward_cycles"], inv["backward_cycles"]
    rows = [
        ("ring", f"{report['items']} items, {report['slots']} slots, {report['cells']} cells"),
        ("model", report["model"]),
        ("cycloid", report["params"]),
        ("catalog id", report["class_id"] or "—"),
        ("area", f"{report['area']:,} (shortest return to the start, in moves)"),
        ("reachable states", _short_number(report["states"])),
        ("reachability arcs", _short_number(inv["state_arcs"])),
        ("loop (shortest cycle)", str(inv["loop"])),
        ("forward cycles", f"{fwd['count']} × {fwd['length']} ({_count(fwd['tokens'], 'item')} "
         "each)"),
        ("backward cycles", f"{bwd['count']} × {bwd['length']} ({_count(bwd['tokens'], 'slot')} "
         "each)"),
        ("processes", f"{inv['processes']}{' (regular)' if inv['regular'] else ''}"),
        ("slowness", inv["slowness"].removesuffix("/1")),
        ("fingerprint", inv["fingerprint"] or "—"),
    ]
    sim = report.get("simulation")
    if sim is not None:
        verdict = "isomorphic" if sim["isomorphic"] else "NOT isomorphic"
        rows.append(
            ("simulation", f"{sim['states']:,} states, {sim['moves']:,} moves: {verdict} "
             "to the cycloid's reachability graph")
        )
    table = Table(title=f"ring design → {report['params']}", title_justify="left")
    table.add_column("property", no_wrap=True)
    table.add_column("value", overflow="fold")
    for row in rows:
        table.add_row(*row)
    Console(soft_wrap=False).print(table)


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}{'' if n == 1 else 's'}"


def _short_number(value: int) -> str:
    sys.set_int_max_str_digits(0)
    digits = str(value)
    if len(digits) <= 40:
        return f"{value:,}"
    return f"{digits[0]}.{digits[1:9]}e{len(digits) - 1} (exact in --format json)"


# --- draw ------------------------------------------------------------------------------


@app.command("draw", context_settings=_LOOSE)
def draw(
    ref: Annotated[
        list[str],
        typer.Argument(
            metavar="PARAMS|ID",
            help="A parameter set (4,2,2,3) or a catalog identifier such as CY16-3.",
            show_default=False,
        ),
    ],
    fmt: Annotated[
        PictureFormat | None,
        typer.Option(
            "--format", "-f",
            help="svg, png or dot (Graphviz text). Default: from the --output suffix, else svg.",
        ),
    ] = None,
    view: Annotated[
        PictureView,
        typer.Option(
            "--view",
            help="parallelogram: the Petri space picture; net: the net as a graph; "
            "processes: one colour per process (regular cycloids); states: the reachability "
            "graph (small systems).",
        ),
    ] = PictureView.parallelogram,
    output: Annotated[
        Path | None,
        typer.Option("--output", "-o", help="File to write; svg and dot go to standard "
                     "output when omitted.", dir_okay=False),
    ] = None,
    db: DbOption = None,
) -> None:
    """Draw a cycloid: its fundamental parallelogram, net, processes or reachability graph.

    Example: zoo draw 4,2,2,3 --view parallelogram --output c4223.png
    """
    from zoo.draw import draw as draw_picture

    try:
        chosen = _picture_format(fmt, output)
        p = _resolve_params(" ".join(ref), db)
        data = draw_picture(p, view.value, chosen.value)
        if output is None:
            if chosen is PictureFormat.png:
                raise ZooError(
                    "a PNG picture is binary and is not written to the terminal; "
                    "give --output FILE.png"
                )
            sys.stdout.write(data.decode())
            return
        write_file_atomically(output, data)
    except ZooError as exc:
        raise fail(str(exc)) from None
    typer.echo(f"Wrote {output} ({view.value} view of {p}, {chosen.value}, {len(data):,} bytes)",
               err=True)


def _picture_format(fmt: PictureFormat | None, output: Path | None) -> PictureFormat:
    if fmt is not None:
        return fmt
    if output is not None:
        suffix = output.suffix.lower().lstrip(".")
        if suffix in {f.value for f in PictureFormat}:
            return PictureFormat(suffix)
        if suffix == "gv":
            return PictureFormat.dot
    return PictureFormat.svg


# --- cite ------------------------------------------------------------------------------


@app.command("cite")
def cite(
    ref: Annotated[
        str,
        typer.Argument(
            metavar="ID",
            help="A class identifier (CY16-3), its label or any member, or a frame "
            "identifier (FR16-2).",
        ),
    ],
    fmt: Annotated[
        CiteFormat,
        typer.Option("--format", "-f", help="both (default), bibtex, text, or json."),
    ] = CiteFormat.both,
    db: DbOption = None,
) -> None:
    """Print a BibTeX entry and a plain-text citation of a catalog entry.

    Example: zoo cite CY16-3 --format bibtex >> references.bib
    """
    from zoo.catalog import Catalog
    from zoo.cite import cite as make_citation

    try:
        with Catalog.open(db) as catalog:
            citation = make_citation(catalog, ref)
    except ZooError as exc:
        raise fail(str(exc)) from None
    if fmt is CiteFormat.json:
        _print_json(citation.as_dict())
    elif fmt is CiteFormat.bibtex:
        typer.echo(citation.bibtex(), nl=False)
    elif fmt is CiteFormat.text:
        typer.echo(citation.text())
    else:
        typer.echo(citation.bibtex())
        typer.echo(citation.text())


# --- dump and release ------------------------------------------------------------------


@app.command("dump")
def dump(
    fmt: Annotated[
        DumpFormat | None,
        typer.Option("--format", "-f",
                     help="csv or jsonl (JSON Lines). Default: from the --output suffix."),
    ] = None,
    output: Annotated[
        Path | None,
        typer.Option("--output", "-o", dir_okay=False,
                     help="File to write (replaced only when the dump is complete); "
                     "standard output when omitted."),
    ] = None,
    db: DbOption = None,
) -> None:
    """Write every class of the catalog with invariants, readings and members (CSV, JSON Lines).

    Streams one batch of classes at a time. Example: zoo dump --format jsonl --output all.jsonl
    """
    from zoo.catalog import Catalog
    from zoo.release import iter_catalog_entries, iter_dump_lines, write_dump

    try:
        chosen = _dump_format(fmt, output)
        with Catalog.open(db) as catalog:
            if output is None:
                for line in iter_dump_lines(iter_catalog_entries(catalog), chosen.value):
                    sys.stdout.write(line)
                return
            summary = write_dump(iter_catalog_entries(catalog), chosen.value, output)
            complete = catalog.complete_to()
    except ZooError as exc:
        raise fail(str(exc)) from None
    typer.echo(
        f"Wrote {summary.path}: {summary.classes:,} classes, {summary.bytes:,} bytes, "
        f"catalog complete to area {complete}; SHA-256 {summary.sha256}",
        err=True,
    )


def _dump_format(fmt: DumpFormat | None, output: Path | None) -> DumpFormat:
    if fmt is not None:
        return fmt
    suffix = output.suffix.lower().lstrip(".") if output is not None else ""
    if suffix in {"csv", "jsonl"}:
        return DumpFormat(suffix)
    raise ZooError(
        "dump format not given; add --format csv or --format jsonl "
        "(or an output file ending in .csv or .jsonl)"
    )


@app.command("release")
def release(
    output: Annotated[
        Path | None,
        typer.Option("--output", "-o", file_okay=False,
                     help="New folder for the release (must not exist or be empty)."),
    ] = None,
    verify: Annotated[
        Path | None,
        typer.Option("--verify", file_okay=False,
                     help="Check an existing release folder against its manifest instead."),
    ] = None,
    db: DbOption = None,
) -> None:
    """Write a catalog release (CSV and JSON Lines dumps, manifest, SHA256SUMS), or verify one.

    Examples: zoo release --output release-a12 ; zoo release --verify release-a12
    """
    from zoo.release import verify_release

    if (output is None) == (verify is None):
        raise fail("give exactly one of --output DIR (write a release) or --verify DIR "
                   "(check one)")
    try:
        if verify is not None:
            report = verify_release(verify)
            if not report.ok:
                for problem in report.problems:
                    typer.echo(f"MISMATCH {problem}", err=True)
                raise ZooError(
                    f"release {str(verify)!r} does not verify: {len(report.problems)} "
                    f"problem{'s' if len(report.problems) != 1 else ''} (listed above); "
                    "fetch the release again"
                )
            catalog_part = report.manifest.get("catalog", {})
            typer.echo(
                f"OK {verify}: {len(report.checked)} files match the manifest and SHA256SUMS "
                f"({catalog_part.get('classes', '?')} classes, catalog complete to area "
                f"{catalog_part.get('complete_to', '?')})"
            )
            return
        assert output is not None
        summary = _write_release(output, db)
    except ZooError as exc:
        raise fail(str(exc)) from None
    for item in summary.files:
        typer.echo(f"{item.sha256}  {item.path.name}  ({item.bytes:,} bytes)")
    typer.echo(
        f"Wrote release {summary.folder}: {summary.classes:,} classes, {summary.version}",
        err=True,
    )


def _write_release(output: Path, db: str | None) -> Any:
    from zoo.catalog import Catalog
    from zoo.cite import catalog_version
    from zoo.release import catalog_areas, iter_catalog_entries, make_release

    with Catalog.open(db) as catalog:
        version = catalog_version(catalog)
        areas = catalog_areas(catalog)  # fixed up front: both dumps hold the same classes
        return make_release(lambda: iter_catalog_entries(catalog, areas), version, output)
