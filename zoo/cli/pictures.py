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
    FLAG,
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
    pdf = "pdf"
    tikz = "tikz"
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
            help="svg, png, pdf, tikz (LaTeX: a standalone document, or with --fragment a "
            "tikzpicture for \\input) or dot (Graphviz text). Default: from the --output "
            "suffix, else svg.",
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
    fragment: Annotated[
        bool,
        typer.Option(
            "--fragment",
            metavar=FLAG,
            help="With --format tikz: only the tikzpicture environment, to \\input in a paper "
            "that loads tikz and the arrows.meta library.",
        ),
    ] = False,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Draw a cycloid: its fundamental parallelogram, net, processes or reachability graph.

    Example: zoo draw 4,2,2,3 --view parallelogram --output c4223.png
    """
    from zoo.pictures.views import draw as draw_picture
    from zoo.pictures.views import draw_tikz

    refuse_unknown_options("draw", ref)
    try:
        chosen = _picture_format(fmt, output)
        if fragment and chosen is not PictureFormat.tikz:
            raise ZooError(
                f"--fragment applies to TikZ pictures only, not {chosen.value}; "
                "add --format tikz or leave out --fragment"
            )
        p = resolve_params(" ".join(ref), db)
        if chosen is PictureFormat.tikz:
            data = draw_tikz(p, view.value, standalone=not fragment).encode()
        elif chosen is PictureFormat.dot:
            from zoo.interchange.dot import picture_dot

            data = picture_dot(p, view.value).encode()
        else:
            data = draw_picture(p, view.value, chosen.value)
        if output is None:
            if chosen in (PictureFormat.png, PictureFormat.pdf):
                raise ZooError(
                    f"a {chosen.value.upper()} picture is binary and is not written to the "
                    f"terminal; give --output FILE.{chosen.value}"
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
    ".pdf": PictureFormat.pdf,
    ".tex": PictureFormat.tikz,
    ".tikz": PictureFormat.tikz,
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
        f"name the file {', '.join(PICTURE_SUFFIXES)} or give --format svg, png, pdf, tikz or dot"
    )
