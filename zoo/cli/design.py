"""Commands of zoo: ``ring``, ``draw``, ``cite``, ``dump`` and ``release``.

A thin layer: ring designs come from ``zoo.ring``, pictures from ``zoo.draw``, citations from
``zoo.cite`` and catalog dumps and releases from ``zoo.release``; this module parses arguments,
resolves references through the catalog service and writes files.
"""

from __future__ import annotations

import sys
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any

import typer

from zoo.cli.app import app, fail
from zoo.cli.common import (
    FLAG,
    LOOSE_ARGUMENTS,
    ReadOnlyCatalogOption,
    ReferenceArgument,
    StateLimitOption,
    TableOrJson,
    TableOrJsonOption,
    class_id_of,
    fraction_cell,
    number_text,
    parse_typed_params,
    print_json,
    print_property_table,
    refuse_unknown_options,
    resolve_params,
    write_file_atomically,
)
from zoo.errors import FormatError, ZooError
from zoo.identifiers import read_identifier

#: Default --state-limit of ``ring --simulate``: the default of zoo.ring.simulation_report
#: (tests/test_cli_core.py keeps the two equal).
RING_STATE_LIMIT = 20_000


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


# --- ring ------------------------------------------------------------------------------


@app.command("ring")
def ring(
    items: Annotated[int, typer.Option("--items", "-c", help="Number of items C in the ring.")],
    slots: Annotated[int, typer.Option("--slots", "-g", help="Number of free slots G.")],
    individual_items: Annotated[
        bool,
        typer.Option("--individual-items", metavar=FLAG, help="Items are told apart (named).")
    ] = False,
    individual_slots: Annotated[
        bool,
        typer.Option("--individual-slots", metavar=FLAG, help="Free slots are told apart (named).")
    ] = False,
    simulate: Annotated[
        bool,
        typer.Option(
            "--simulate", metavar=FLAG,
            help="Also simulate the ring cell by cell and check that its state graph is "
            "isomorphic to the cycloid's reachability graph (small rings only).",
        ),
    ] = False,
    state_limit: StateLimitOption = RING_STATE_LIMIT,
    fmt: TableOrJsonOption = TableOrJson.table,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """The cycloid of a circular queue of C items and G free slots.

    --simulate explores the ring's states and the cycloid's reachability graph, each up to
    --state-limit states.

    Example: zoo ring --items 2 --slots 3 --individual-items
    """
    from zoo.ring import RingDesign, describe_ring, simulation_report

    try:
        design = RingDesign(items, slots, individual_items, individual_slots)
        report: dict[str, Any] = describe_ring(design, class_id_of(design.params, db))
        if simulate:
            report["simulation"] = simulation_report(design, state_limit)
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
        ("area", f"{report['area']:,} (shortest return to the start, in moves)"),
        ("reachable states", number_text(report["states"])),
        ("reachability arcs", number_text(inv["state_arcs"])),
        ("loop (shortest cycle)", str(inv["loop"])),
        ("forward cycles", f"{fwd['count']} × {fwd['length']} ({_count(fwd['tokens'], 'item')} "
         "each)"),
        ("backward cycles", f"{bwd['count']} × {bwd['length']} ({_count(bwd['tokens'], 'slot')} "
         "each)"),
        ("processes", f"{inv['processes']}{' (regular)' if inv['regular'] else ''}"),
        ("slowness", fraction_cell(inv["slowness"])),
    ]
    sim = report.get("simulation")
    if sim is not None:
        verdict = "isomorphic" if sim["isomorphic"] else "NOT isomorphic"
        rows.append(
            ("simulation", f"{sim['states']:,} states, {sim['moves']:,} moves: {verdict} "
             "to the cycloid's reachability graph")
        )
    print_property_table(
        f"ring design → {report['params']}", ("property", "value"), rows,
        [("fingerprint", inv["fingerprint"] or "—")],
    )


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}{'' if n == 1 else 's'}"


# --- draw ------------------------------------------------------------------------------


@app.command("draw", context_settings=LOOSE_ARGUMENTS)
def draw(
    ref: ReferenceArgument,
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
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Draw a cycloid: its fundamental parallelogram, net, processes or reachability graph.

    Example: zoo draw 4,2,2,3 --view parallelogram --output c4223.png
    """
    from zoo.draw import draw as draw_picture

    refuse_unknown_options("draw", ref)
    try:
        chosen = _picture_format(fmt, output)
        p = resolve_params(" ".join(ref), db)
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
        raise fail(exc) from None
    typer.echo(f"Wrote {output} ({view.value} view of {p}, {chosen.value}, {len(data):,} bytes)",
               err=True)


#: Output suffixes ``draw`` tells the picture format from.
PICTURE_SUFFIXES = {
    ".svg": PictureFormat.svg, ".png": PictureFormat.png,
    ".dot": PictureFormat.dot, ".gv": PictureFormat.dot,
}


def _picture_format(fmt: PictureFormat | None, output: Path | None) -> PictureFormat:
    """--format, else the --output suffix (an unknown one is refused, as by export), else svg."""
    if fmt is not None:
        return fmt
    if output is None:
        return PictureFormat.svg
    suffix = output.suffix.lower()
    if suffix in PICTURE_SUFFIXES:
        return PICTURE_SUFFIXES[suffix]
    raise FormatError(
        f"cannot tell the picture format from the suffix {suffix or '(none)'!r} of {output}; "
        f"name the file {', '.join(PICTURE_SUFFIXES)} or give --format svg, png or dot"
    )


# --- cite ------------------------------------------------------------------------------


@app.command("cite", context_settings=LOOSE_ARGUMENTS)
def cite(
    ref: Annotated[
        list[str],
        typer.Argument(
            metavar="ID",
            help="A class identifier (CY16-3), its label or any member (4,2,2,3 or '4 2 2 3'), "
            "or a frame identifier (FR16-2).",
            show_default=False,
        ),
    ],
    fmt: Annotated[
        CiteFormat,
        typer.Option("--format", "-f", help="both (default), bibtex, text, or json."),
    ] = CiteFormat.both,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Print a BibTeX entry and a plain-text citation of a catalog entry.

    Example: zoo cite CY16-3 --format bibtex >> references.bib
    """
    from zoo.catalog import Catalog
    from zoo.cite import cite as make_citation

    refuse_unknown_options("cite", ref)
    text = " ".join(ref).strip()
    try:
        if read_identifier(text) is None:
            # A parameter set in any spelling (four words too), or a clear refusal of text
            # that is neither, before the catalog is opened.
            text = str(parse_typed_params(text))
        with Catalog.open(db) as catalog:
            citation = make_citation(catalog, text)
    except ZooError as exc:
        raise fail(exc) from None
    if fmt is CiteFormat.json:
        print_json(citation.as_dict())
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
    db: ReadOnlyCatalogOption = None,
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
        raise fail(exc) from None
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
    db: ReadOnlyCatalogOption = None,
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
        raise fail(exc) from None
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
