"""What the commands of zoo share: option definitions, PARAMS|ID arguments, output and files.

Every command that takes ``--db``, a ``PARAMS|ID`` argument, ``--format table|json`` or
``--state-limit`` declares it with the definitions below, so that the same option reads and
behaves the same everywhere. Errors go through ``zoo.cli.app.fail``.
"""

from __future__ import annotations

import json
import re
import sys
from collections.abc import Iterable, Sequence
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any

import typer

from zoo.cli.app import USAGE_ERROR, fail
from zoo.core.params import ParameterSet, parse_params
from zoo.errors import CatalogError, ParameterError

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


#: The metavar of an on/off flag: empty, so that --help shows no value type for it (a flag
#: takes no value).
FLAG = ""


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


# Text that starts with letters, other than the C of C( ... ), is no parameter set (which starts
# with a number); such text is taken for a misspelt identifier.
_LETTERS_FIRST = re.compile(r"^\s*(?![Cc]\s*\()[A-Za-z]")


def parse_typed_params(ref: str) -> ParameterSet:
    """A parameter set written in ``ref``; text that looks like no reference at all says so.

    ``parse_params`` explains a malformed parameter set (``4,2,2`` has three values, ``4,2,x,3``
    a value that is no number); text that starts with letters, such as a misspelt identifier
    (``XY16-3``, ``CY16--1``), is neither, and the message names both shapes instead of
    counting values.
    """
    if _LETTERS_FIRST.match(ref):
        raise ParameterError(
            f"{ref.strip()!r} is neither a parameter set (4,2,2,3 or C(4,2,2,3)) nor a catalog "
            "identifier (CY16-3, FR16-2)"
        )
    return parse_params(ref)


def resolve_params(ref: str, db: str | None) -> ParameterSet:
    """A parameter set typed directly (or a label), or the label of a catalog class identifier.

    Only an identifier opens the catalog (read only). A frame identifier is refused at once: a
    frame is an unmarked net, so it has no system to draw, export or explore.
    """
    from zoo.catalog.identifiers import read_identifier

    identifier = read_identifier(ref)
    if identifier is None:
        return parse_typed_params(ref)
    if identifier.kind == "frame":
        raise ParameterError(
            f"{identifier} is a frame (an unmarked net, no initial marking); give a class "
            f"such as CY{identifier.area}-1 or a parameter set"
        )
    from zoo.catalog.service import Catalog

    with Catalog.open(db) as catalog:
        entry = catalog.get(ref.strip())
    return parse_params(entry.label)


def class_id_of(p: ParameterSet, db: str | None) -> str | None:
    """The catalog identifier of the class of p, or None; never builds a catalog.

    A local catalog of the current schema is asked without loading the database stack
    (``zoo.catalog.quicklookup``). An unreadable or outdated catalog must not hide what needs
    no catalog: its error becomes a note on standard error and the identifier is None.
    """
    from zoo.catalog.quicklookup import class_id_of as lookup

    try:
        return lookup(p, db)
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


def fraction_cell(text: str) -> str:
    """A fraction ``num/den`` for a table: ``16/1`` reads ``16`` (JSON keeps ``num/den``)."""
    numerator, slash, denominator = text.partition("/")
    return numerator if slash and denominator.strip() == "1" else text


def print_whole_lines(lines: Iterable[tuple[str, str]]) -> None:
    """``name: value`` lines that are never wrapped or folded (fingerprints, for copy-paste)."""
    for name, value in lines:
        typer.echo(f"{name}: {value}")


def print_property_table(
    title: str,
    headings: Sequence[str],
    rows: Iterable[Sequence[str]],
    whole_lines: Iterable[tuple[str, str]] = (),
) -> None:
    """A titled rich table of properties (``show``, ``explore``, ``ring``).

    The first column names the property and never wraps, the second holds its value and folds
    when long, an optional third says how it was found, dimmed. ``whole_lines`` follow the
    table as ``name: value`` lines, never wrapped: values meant to be copied, such as
    fingerprints.
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
    print_whole_lines(whole_lines)


def write_file_atomically(path: Path, data: bytes) -> None:
    """Write an output file the way every command does (``zoo.publish.outfile.write_output``:
    atomic replacement, written through symbolic links, special files refused)."""
    from zoo.publish.outfile import write_output

    write_output(path, data)
