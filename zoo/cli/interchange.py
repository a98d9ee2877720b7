"""Commands of zoo: ``export`` (a cycloid's net as PNML, DOT, SVG, JSON or net text) and
``identify`` (is a net in a file a cycloid system, and which one).

A thin layer: the documents come from ``zoo.interchange.export`` and the answers from
``zoo.interchange.identify``; this module parses
arguments, resolves references through the catalog service and writes files.
"""

from __future__ import annotations

import json
import sys
from enum import StrEnum
from pathlib import Path
from typing import Annotated

import typer

from zoo.cli.app import NOT_A_CYCLOID, USER_ERROR, app, fail, print_error
from zoo.cli.options import (
    FLAG,
    LOOSE_ARGUMENTS,
    ReadOnlyCatalogOption,
    ReferenceArgument,
    refuse_unknown_options,
    resolve_params,
    write_file_atomically,
)
from zoo.core.params import ParameterSet
from zoo.errors import FormatError, ZooError


class ExportFormat(StrEnum):
    """File formats of ``export``."""

    pnml = "pnml"
    dot = "dot"
    svg = "svg"
    json = "json"
    text = "text"


_SUFFIXES = {
    ".pnml": ExportFormat.pnml,
    ".xml": ExportFormat.pnml,
    ".dot": ExportFormat.dot,
    ".gv": ExportFormat.dot,
    ".svg": ExportFormat.svg,
    ".json": ExportFormat.json,
    ".mgraph": ExportFormat.text,
    ".txt": ExportFormat.text,
}


class AnswerFormat(StrEnum):
    """How ``identify`` prints its answers."""

    text = "text"
    json = "json"


def export_document(p: ParameterSet, fmt: ExportFormat) -> str:
    """The net of C(p) as text in the chosen format (zoo.interchange.export)."""
    from zoo.interchange.export import export_document as document_of

    return document_of(p, fmt.value)


def _export_format(fmt: ExportFormat | None, output: Path | None) -> ExportFormat:
    if fmt is not None:
        return fmt
    if output is not None:
        suffix = output.suffix.lower()
        if suffix in _SUFFIXES:
            return _SUFFIXES[suffix]
        raise FormatError(
            f"cannot tell the format from the suffix {suffix or '(none)'!r} of {output}; "
            "give --format pnml, dot, svg, json or text"
        )
    return ExportFormat.pnml


@app.command("export", context_settings=LOOSE_ARGUMENTS)
def export(
    ref: ReferenceArgument,
    fmt: Annotated[
        ExportFormat | None,
        typer.Option(
            "--format",
            "-f",
            help="pnml (ISO/IEC 15909-2 PT net), dot (Graphviz text), svg (the fundamental "
            "parallelogram picture of zoo draw), json, or "
            "text (zoo's marked-graph text). Default: from the --output suffix, else pnml.",
        ),
    ] = None,
    output: Annotated[
        Path | None,
        typer.Option(
            "--output", "-o", help="File to write (default: standard output).", dir_okay=False
        ),
    ] = None,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Write the net of a cycloid system, laid out on its fundamental parallelogram.

    A class identifier such as CY16-3 exports the net of the class's label.

    Example: zoo export 4,2,2,3 --output c4223.pnml
    """
    refuse_unknown_options("export", ref)
    try:
        chosen = _export_format(fmt, output)
        p = resolve_params(" ".join(ref), db)
        document = export_document(p, chosen)
        if output is None:
            sys.stdout.write(document)
            return
        write_file_atomically(output, document.encode("utf-8"))
    except ZooError as exc:
        raise fail(exc) from None
    typer.echo(
        f"Wrote {output} (net of {p}, {chosen.value}, {len(document):,} characters)", err=True
    )


@app.command("identify")
def identify(
    files: Annotated[
        list[Path],
        typer.Argument(
            metavar="FILE",
            help="PNML files or marked-graph text files (told apart by their content).",
            show_default=False,
        ),
    ],
    fmt: Annotated[
        AnswerFormat,
        typer.Option(
            "--format", "-f", help="text: one line per file; json: one JSON object per line."
        ),
    ] = AnswerFormat.text,
    mapping: Annotated[
        bool,
        typer.Option(
            "--mapping",
            "-m",
            metavar=FLAG,
            help="Text format: also list which element is which coordinate.",
        ),
    ] = False,
    db: ReadOnlyCatalogOption = None,
    no_catalog: Annotated[
        bool, typer.Option("--no-catalog", metavar=FLAG, help="Do not look up class identifiers.")
    ] = False,
) -> None:
    """Decide whether the net in each file is a cycloid system, and which one.

    A cycloid gets its class label, its catalog identifier and the
    isomorphism onto the label's coordinates. A cycloid's net drawn in
    another reachable marking is recognised too, with a shortest firing
    sequence from the initial marking (a "firing:" line); a marking that is
    not reachable is refused with a circuit whose token count differs. Any
    other net gets the first rule it breaks (docs/identify.md).

    Exit status 1 when a file cannot be read, else 4 when a net is not a cycloid system.

    Example: zoo identify ring.pnml --format json
    """
    from zoo.catalog.lookup import catalog_lookup
    from zoo.interchange.identify import identify_file

    unreadable = not_cycloid = 0
    for path in files:
        try:
            answer = identify_file(path, None if no_catalog else catalog_lookup(db))
        except ZooError as exc:
            # One unreadable file must not stop the others: report it now, fail at the end.
            unreadable += 1
            if fmt is AnswerFormat.json:
                typer.echo(
                    json.dumps(
                        {"file": str(path), "cycloid": None, "error": str(exc)}, ensure_ascii=False
                    )
                )
            print_error(exc)
            continue
        not_cycloid += not answer.cycloid
        for warning in answer.warnings:
            typer.echo(f"Warning: {warning}", err=True)
        if fmt is AnswerFormat.json:
            typer.echo(json.dumps(answer.as_dict(), ensure_ascii=False))
            continue
        typer.echo(answer.summary())
        if answer.marking == "reachable":
            typer.echo(f"  firing: {' '.join(answer.firing)}")
        if mapping and answer.transition_map:
            for foreign, ours in answer.transition_map:
                typer.echo(f"  transition {foreign} = {ours}")
            for foreign, ours in answer.place_map:
                typer.echo(f"  place {foreign} = {ours}")
    if unreadable:
        raise typer.Exit(USER_ERROR)
    if not_cycloid:
        raise typer.Exit(NOT_A_CYCLOID)


__all__ = ["ExportFormat", "export_document"]
