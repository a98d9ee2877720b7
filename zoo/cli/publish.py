"""Commands ``cite``, ``dump`` and ``release``: citations, catalog dumps and releases.

A thin layer over ``zoo.publish``: it parses arguments, resolves references through the
catalog service and writes files.
"""

from __future__ import annotations

import sys
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any

import typer

from zoo.catalog.identifiers import read_identifier
from zoo.cli.app import app, fail
from zoo.cli.options import (
    LOOSE_ARGUMENTS,
    ReadOnlyCatalogOption,
    parse_typed_params,
    print_json,
    refuse_unknown_options,
)
from zoo.errors import ZooError


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
    from zoo.catalog.service import Catalog
    from zoo.publish.cite import cite as make_citation

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
        typer.Option(
            "--format", "-f", help="csv or jsonl (JSON Lines). Default: from the --output suffix."
        ),
    ] = None,
    output: Annotated[
        Path | None,
        typer.Option(
            "--output",
            "-o",
            dir_okay=False,
            help="File to write (replaced only when the dump is complete), with its data "
            "dictionary datapackage.json beside it; standard output when omitted.",
        ),
    ] = None,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Write every class of the catalog with invariants, readings and members (CSV, JSON Lines).

    CSV has one row per reading and one column per value; a file dump is described column by
    column in datapackage.json beside it.

    Streams one batch of classes at a time. Example: zoo dump --format jsonl --output all.jsonl
    """
    from zoo.catalog.service import Catalog
    from zoo.publish.release import (
        check_package_slot,
        iter_catalog_entries,
        iter_dump_lines,
        write_dump,
        write_dump_package,
    )

    try:
        chosen = _dump_format(fmt, output)
        with Catalog.open(db) as catalog:
            if output is None:
                for line in iter_dump_lines(iter_catalog_entries(catalog), chosen.value):
                    sys.stdout.write(line)
                return
            check_package_slot(output)
            summary = write_dump(iter_catalog_entries(catalog), chosen.value, output)
            complete = catalog.complete_to()
            described = write_dump_package(summary, complete)
    except ZooError as exc:
        raise fail(exc) from None
    typer.echo(
        f"Wrote {summary.path}: {summary.classes:,} classes, {summary.bytes:,} bytes, "
        f"catalog complete to area {complete}; SHA-256 {summary.sha256}; "
        f"columns described in {described}",
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
        typer.Option(
            "--output",
            "-o",
            file_okay=False,
            help="New folder for the release (must not exist or be empty).",
        ),
    ] = None,
    verify: Annotated[
        Path | None,
        typer.Option(
            "--verify",
            file_okay=False,
            help="Check an existing release folder against its manifest instead.",
        ),
    ] = None,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Write a catalog release (CSV and JSON Lines dumps, manifest, SHA256SUMS), or verify one.

    Examples: zoo release --output release-a12 ; zoo release --verify release-a12
    """
    from zoo.publish.release import verify_release

    if (output is None) == (verify is None):
        raise fail("give exactly one of --output DIR (write a release) or --verify DIR (check one)")
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
    from zoo.catalog.service import Catalog
    from zoo.publish.release import release_catalog

    with Catalog.open(db) as catalog:
        return release_catalog(catalog, output)
