"""What the commands of zoo share: option definitions, PARAMS|ID arguments, output and files.

Every command that takes ``--db``, a ``PARAMS|ID`` argument, ``--format table|json`` or
``--state-limit`` declares it with the definitions below, so that the same option reads and
behaves the same everywhere. Errors go through ``zoo.cli.app.fail``.
"""

from __future__ import annotations

import json
import os
import sys
from collections.abc import Iterable, Sequence
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any

import typer

from zoo.cli.app import USAGE_ERROR, fail
from zoo.errors import CatalogError, ParameterError
from zoo.params import ParameterSet, parse_params

# Parameter sets such as -1,2,2,3 must reach our parser (which explains what is wrong) instead
# of being taken for unknown options; ``refuse_unknown_options`` catches real ones.
LOOSE_ARGUMENTS = {"ignore_unknown_options": True}

_DB_HELP = (
    "Catalog file or database URL (postgresql+psycopg://...). Default: $ZOO_CATALOG, else "
    "catalog.sqlite3 in the user data directory."
)

#: ``--db`` of the commands that create or change a catalog (build, find, migrate, ...).
CatalogOption = Annotated[str | None, typer.Option("--db", help=_DB_HELP)]

#: ``--db`` of the commands that only look things up in a catalog.
ReadOnlyCatalogOption = Annotated[
    str | None,
    typer.Option("--db", help=f"{_DB_HELP} Only read: never built or changed."),
]


class TableOrJson(StrEnum):
    """How a command prints one answer: a readable table or one JSON object."""

    table = "table"
    json = "json"


TableOrJsonOption = Annotated[
    TableOrJson,
    typer.Option("--format", "-f", help="table: a readable table; json: one JSON object."),
]

#: A parameter set or a catalog identifier, in one or several words (``4 2 2 3``).
ReferenceArgument = Annotated[
    list[str],
    typer.Argument(
        metavar="PARAMS|ID",
        help="A parameter set (4,2,2,3 or '4 2 2 3' or C(4,2,2,3)) or a catalog identifier "
        "such as CY16-3.",
        show_default=False,
    ),
]

#: ``--state-limit`` of every command that searches a reachability graph explicitly; each
#: command gives its own default.
StateLimitOption = Annotated[
    int,
    typer.Option(
        "--state-limit",
        min=1,
        help="Largest number of states an explicit search may visit; a larger state graph stops "
        "the command with an error.",
    ),
]


# --- arguments ----------------------------------------------------------------------------


def refuse_unknown_options(command: str, arguments: list[str]) -> None:
    """Unknown options reach the arguments (so that -1,2,2,3 can); refuse them as usage errors."""
    for argument in arguments:
        if argument.startswith("-") and not argument[1:2].isdigit():
            raise fail(f"no such option: {argument}; see zoo {command} --help", USAGE_ERROR)


def resolve_params(ref: str, db: str | None) -> ParameterSet:
    """A parameter set typed directly (or a label), or the label of a catalog class identifier.

    Only an identifier opens the catalog (read only). A frame identifier is refused at once: a
    frame is an unmarked net, so it has no system to draw, export or explore.
    """
    from zoo.identifiers import read_identifier

    identifier = read_identifier(ref)
    if identifier is None:
        return parse_params(ref)
    if identifier.kind == "frame":
        raise ParameterError(
            f"{identifier} is a frame (an unmarked net, no initial marking); give a class "
            f"such as CY{identifier.area}-1 or a parameter set"
        )
    from zoo.catalog import Catalog

    with Catalog.open(db) as catalog:
        entry = catalog.get(ref.strip())
    return parse_params(entry.label)


def _catalog_may_exist(db: str | None) -> bool:
    """False when the catalog location is a file that does not exist (docs/architecture.md).

    Importing the catalog service pulls in SQLAlchemy (about half a second); without a catalog
    there is nothing to look up, so ``zoo show`` stays fast on a fresh installation.
    """
    location = (db or "").strip() or os.environ.get("ZOO_CATALOG", "").strip()
    if location and "://" in location:
        return True
    if location:
        return Path(location).expanduser().exists()
    import platformdirs

    return (Path(platformdirs.user_data_dir("zoo")) / "catalog.sqlite3").exists()


def class_id_of(p: ParameterSet, db: str | None) -> str | None:
    """The catalog identifier of the class of p, or None; never builds a catalog.

    An unreadable or outdated catalog must not hide what needs no catalog: its error becomes a
    note on standard error and the identifier is None.
    """
    if not _catalog_may_exist(db):
        return None
    try:
        from zoo.catalog import lookup_class_id
    except ModuleNotFoundError as exc:  # the catalog service is optional for these commands
        if exc.name != "zoo.catalog":
            raise
        return None
    try:
        return lookup_class_id(p, db)
    except CatalogError as exc:
        typer.echo(f"Note: no catalog identifier: {exc}", err=True)
        return None


# --- output -------------------------------------------------------------------------------


def print_json(value: object) -> None:
    """One indented JSON document on standard output; integers of any size printed exactly."""
    sys.set_int_max_str_digits(0)  # reachable-state counts can have tens of thousands of digits
    typer.echo(json.dumps(value, indent=2, ensure_ascii=False))


def number_text(value: int) -> str:
    """A readable exact integer; very long ones are shortened (the JSON output is exact)."""
    sys.set_int_max_str_digits(0)
    digits = str(abs(value))
    if len(digits) <= 40:
        return f"{value:,}"
    sign = "-" if value < 0 else ""
    mantissa = f"{sign}{digits[0]}.{digits[1:9]}e{len(digits) - 1}"
    return f"{mantissa} ({len(digits):,} digits; exact in --format json)"


def print_property_table(
    title: str, headings: Sequence[str], rows: Iterable[Sequence[str]]
) -> None:
    """A titled rich table of properties (``show``, ``explore``, ``ring``).

    The first column names the property and never wraps, the second holds its value and folds
    when long, an optional third says how it was found, dimmed.
    """
    from rich.console import Console
    from rich.table import Table

    table = Table(title=title, title_justify="left")
    styles: tuple[dict[str, Any], ...] = ({"no_wrap": True}, {"overflow": "fold"}, {"style": "dim"})
    for heading, style in zip(headings, styles, strict=False):
        table.add_column(heading, **style)
    for row in rows:
        table.add_row(*row)
    Console(soft_wrap=False).print(table)


def write_file_atomically(path: Path, data: bytes) -> None:
    """Write a file through a temporary file renamed at the end (every command that writes one).

    A failure half-way leaves any existing file at ``path`` as it was
    (``zoo.release.write_bytes_atomically``).
    """
    from zoo.release import write_bytes_atomically

    write_bytes_atomically(path, data)
