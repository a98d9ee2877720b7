"""Command ``draw``: pictures of a cycloid (``zoo.pictures.views``; DOT text from
``zoo.interchange.dot``) written to a file."""

from __future__ import annotations

import sys
from enum import StrEnum
from pathlib import Path
from typing import Annotated

import typer

from zoo.cli.app import app, fail
from zoo.cli.options import (
    LOOSE_ARGUMENTS,
    ReadOnlyCatalogOption,
    ReferenceArgument,
    refuse_unknown_options,
    resolve_params,
    write_file_atomically,
)
from zoo.errors import FormatError, ZooError


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


# --- draw ------------------------------------------------------------------------------


@app.command("draw", context_settings=LOOSE_ARGUMENTS)
def draw(
    ref: ReferenceArgument,
    fmt: Annotated[
        PictureFormat | None,
        typer.Option(
            "--format",
            "-f",
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
        typer.Option(
            "--output",
            "-o",
            help="File to write; svg and dot go to standard output when omitted.",
            dir_okay=False,
        ),
    ] = None,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Draw a cycloid: its fundamental parallelogram, net, processes or reachability graph.

    Example: zoo draw 4,2,2,3 --view parallelogram --output c4223.png
    """
    from zoo.pictures.views import draw as draw_picture

    refuse_unknown_options("draw", ref)
    try:
        chosen = _picture_format(fmt, output)
        p = resolve_params(" ".join(ref), db)
        if chosen is PictureFormat.dot:
            from zoo.interchange.dot import picture_dot

            data = picture_dot(p, view.value).encode()
        else:
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
    typer.echo(
        f"Wrote {output} ({view.value} view of {p}, {chosen.value}, {len(data):,} bytes)", err=True
    )


#: Output suffixes ``draw`` tells the picture format from.
PICTURE_SUFFIXES = {
    ".svg": PictureFormat.svg,
    ".png": PictureFormat.png,
    ".dot": PictureFormat.dot,
    ".gv": PictureFormat.dot,
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
