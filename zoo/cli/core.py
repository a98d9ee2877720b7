"""Commands of zoo: ``show`` (every invariant of a parameter set) and ``compare`` (two of them).

A thin layer: the numbers come from ``zoo.report``; this module only parses arguments, asks the
catalog for an identifier and formats the dicts as a rich table or as one JSON object.
"""

from __future__ import annotations

import json
import os
import sys
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any, NoReturn

import typer

from zoo.cli.app import app
from zoo.errors import CatalogError, ZooError
from zoo.params import ParameterSet, parse_params


class OutputFormat(StrEnum):
    """How ``show`` and ``compare`` print their answer."""

    table = "table"
    json = "json"


FormatOption = Annotated[
    OutputFormat,
    typer.Option("--format", "-f", help="table: a readable table; json: one JSON object."),
]
DbOption = Annotated[
    str | None,
    typer.Option(
        "--db",
        help="Catalog file or database URL used to look up class identifiers "
        "(default: $ZOO_CATALOG, else the user data directory). Never built or changed.",
    ),
]

# Parameter sets such as -1,2,2,3 must reach our parser (which explains what is wrong) instead
# of being taken for unknown options.
_LOOSE = {"ignore_unknown_options": True}


@app.command("version")
def version() -> None:
    """Print the zoo version."""
    from zoo import __version__

    print(__version__)


@app.command("show", context_settings=_LOOSE)
def show(
    ref: Annotated[
        list[str],
        typer.Argument(
            metavar="PARAMS|ID",
            help="A parameter set (4,2,2,3 or '4 2 2 3' or C(4,2,2,3)) or a catalog "
            "identifier such as CY16-3.",
            show_default=False,
        ),
    ],
    fmt: FormatOption = OutputFormat.table,
    db: DbOption = None,
) -> None:
    """Print every invariant of a parameter set, or the catalog entry of an identifier.

    Example: zoo show 4,2,2,3 --format json
    """
    _refuse_unknown_options("show", ref)
    text = " ".join(ref)
    try:
        from zoo.identifiers import read_identifier

        if read_identifier(text) is not None:
            _show_catalog_entry(text.strip(), fmt.value, db)
            return
        p = parse_params(text)
        from zoo.report import invariant_report

        report = invariant_report(p)
        report["id"] = _class_id(p, db)
    except ZooError as exc:
        _exit_with_error(str(exc))
    for note in report["notes"]:
        typer.echo(f"Note: {note}", err=True)
    if fmt is OutputFormat.json:
        _print_json(report)
    else:
        _print_show_table(report)


@app.command("compare", context_settings=_LOOSE)
def compare(
    first: Annotated[str, typer.Argument(metavar="P1", help="First parameter set, e.g. 4,2,2,3.")],
    second: Annotated[
        str, typer.Argument(metavar="P2", help="Second parameter set, e.g. 2,4,3,2.")
    ],
    fmt: FormatOption = OutputFormat.table,
    db: DbOption = None,
) -> None:
    """Decide whether two parameter sets are the same reading, class and frame, and on what basis.

    Reading: same folding lattice and token counts. Class: isomorphic marked nets. Frame:
    isomorphic unmarked nets. Class and frame are decided by algebra and by nauty; if the two
    ever disagree the command says so and exits with status 1.
    """
    _refuse_unknown_options("compare", [first, second])
    try:
        p1, p2 = parse_params(first), parse_params(second)
        from zoo.report import compare_report, disagreement_message

        report = compare_report(p1, p2)
        report["ids"] = [_class_id(p1, db), _class_id(p2, db)]
    except ZooError as exc:
        _exit_with_error(str(exc))
    for note in report["notes"]:
        typer.echo(f"Note: {note}", err=True)
    if fmt is OutputFormat.json:
        _print_json(report)
    else:
        _print_compare_table(report)
    alarm = disagreement_message(report)
    if alarm:
        _exit_with_error(alarm)


def _refuse_unknown_options(command: str, arguments: list[str]) -> None:
    """Unknown options reach the arguments (so that -1,2,2,3 can); refuse them as usage errors."""
    for argument in arguments:
        if argument.startswith("-") and not argument[1:2].isdigit():
            typer.echo(f"Error: no such option: {argument}; see zoo {command} --help", err=True)
            raise SystemExit(2)


def _exit_with_error(message: str) -> NoReturn:
    """Print ``Error: message`` on standard error and exit with status 1.

    SystemExit rather than typer.Exit: it ends the process with status 1 both under the console
    entry point (which runs the app with standalone_mode=False, where typer.Exit only becomes a
    return value) and under typer's test runner.
    """
    typer.echo(f"Error: {message}", err=True)
    raise SystemExit(1)


def _show_catalog_entry(ref: str, fmt: str, db: str | None) -> None:
    """``zoo show ID``: the catalog's own rendering of an entry (zoo.cli.catalog.show_entry)."""
    try:
        from zoo.cli.catalog import show_entry
    except ImportError:
        raise CatalogError(
            f"{ref!r} looks like a catalog identifier, but this installation has no catalog "
            "commands; give a parameter set such as 4,2,2,3 instead"
        ) from None
    show_entry(ref, fmt, db)


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


def _class_id(p: ParameterSet, db: str | None) -> str | None:
    """The catalog identifier of the class of p, or None; never builds a catalog.

    An unreadable or outdated catalog must not hide the invariants, which need no catalog: its
    error becomes a note on standard error and the identifier is null.
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


def _print_json(report: dict[str, Any]) -> None:
    # Reachable-state counts can have tens of thousands of digits; print them exactly.
    sys.set_int_max_str_digits(0)
    typer.echo(json.dumps(report, indent=2, ensure_ascii=False))


def _number_text(value: int) -> str:
    """A readable exact integer; very long ones are shortened (the JSON output is exact)."""
    sys.set_int_max_str_digits(0)
    digits = str(value)
    if len(digits) <= 40:
        return f"{value:,}"
    mantissa = f"{digits[0]}.{digits[1:9]}e{len(digits) - 1}"
    return f"{mantissa} ({len(digits):,} digits; exact in --format json)"


def _cycles_text(family: dict[str, int]) -> str:
    count, length, tokens = family["count"], family["length"], family["tokens"]
    plural = "s" if tokens != 1 else ""
    return f"{count} × {length} ({tokens} token{plural} each)"


def _names_text(names: list[str] | None, count: int) -> str:
    if names is None:
        return str(count)
    shown = ", ".join(names[:8]) + (", …" if len(names) > 8 else "")
    return f"{count}: {shown}" if names else "0"


def _group_name(group: list[int]) -> str:
    d1, rest = group
    return f"Z_{rest}" if d1 == 1 else f"Z_{d1} × Z_{rest}"


def _group_text(group: list[int], class_group: list[int]) -> str:
    # The two differ only in the exceptional family of theory.md §5.1.
    if group == class_group:
        return _group_name(group)
    return f"{_group_name(group)} (class: {_group_name(class_group)})"


def _with_class_value(value: int, class_value: int) -> str:
    return str(value) if value == class_value else f"{value} (class: {class_value})"


def _or_dash(value: object) -> str:
    if value is None:
        return "—"
    if isinstance(value, int) and not isinstance(value, bool):
        return _number_text(value)
    return str(value)


def _print_show_table(report: dict[str, Any]) -> None:
    from rich.console import Console
    from rich.table import Table

    loop_note = (
        "lattice search = cyc₁"
        if report["loop_one_token"] == report["loop"]
        else f"lattice search; cyc₁ = {report['loop_one_token']}"
    )
    xi, eta = report["loop_vector"]
    rows: list[tuple[str, str, str]] = [
        ("catalog id", _or_dash(report["id"]), "catalog lookup"),
        ("swap", report["swap"], "ξ ↔ η"),
        ("normal form βδ", report["normal_form_beta_delta"], "β/δ-steps"),
        ("normal form αγ", report["normal_form_alpha_gamma"], "α/γ-steps"),
        ("lattice key (A,g,r)", "({},{},{})".format(*report["lattice_key"]), "Hermite basis"),
        ("transition group", _group_text(report["group"], report["class_group"]), "Smith form"),
        ("area (transitions)", _number_text(report["area"]), "A = αδ + βγ"),
        ("places", _number_text(report["places"]), "2A"),
        (
            "tokens",
            f"{report['tokens']} ({report['tokens_forward']} fwd, "
            f"{report['tokens_backward']} bwd)",
            "α + β",
        ),
        (
            "loop (shortest cycle)",
            f"{report['loop']} (vector ({xi},{eta}), {report['loop_tokens']} token"
            f"{'s' if report['loop_tokens'] != 1 else ''})",
            loop_note,
        ),
        ("forward cycles", _cycles_text(report["forward_cycles"]), "gcd(β,δ)"),
        ("backward cycles", _cycles_text(report["backward_cycles"]), "gcd(α,γ)"),
        ("processes", str(report["processes"]), "forward cycles"),
        ("regular", "yes" if report["regular"] else "no", "β divides δ"),
        ("iteration", _with_class_value(report["iteration"], report["class_iteration"]),
         "largest n-fold"),
        (
            "enabled at M0",
            _names_text(report["enabled_transitions"], report["enabled"]),
            "min(α,β)",
        ),
        (
            "semi-enabled at M0",
            _names_text(report["semi_enabled_transitions"], report["semi_enabled"]),
            "|α − β|",
        ),
        ("reachable states", _number_text(report["states"]), "A·C(α+β,α)/(α+β)"),
        ("reachability arcs", _number_text(report["state_arcs"]), "A·C(α+β−2,α−1)"),
        ("slowness", report["slowness"].removesuffix("/1"), "(α − β)/(α + β)"),
        ("cycle time", report["cycle_time"].removesuffix("/1"), "A/min(α,β)"),
        ("automorphisms (system)", _or_dash(report["automorphisms"]), "nauty"),
        ("automorphisms (net)", _or_dash(report["net_automorphisms"]), "nauty"),
        ("fingerprint (system)", _or_dash(report["fingerprint"]), "nauty"),
        ("fingerprint (net)", _or_dash(report["net_fingerprint"]), "nauty"),
    ]
    table = Table(title=report["label"], title_justify="left")
    table.add_column("invariant", no_wrap=True)
    table.add_column("value", overflow="fold")
    table.add_column("how", style="dim")
    for row in rows:
        table.add_row(*row)
    Console(soft_wrap=False).print(table)


def _print_compare_table(report: dict[str, Any]) -> None:
    from rich.console import Console
    from rich.table import Table

    first, second = report["params"]
    reading_keys, class_keys, frame_keys = (
        report["reading_keys"],
        report["class_keys"],
        report["frame_keys"],
    )
    details = {
        "same_reading": "lattice key and (α,β): {} vs {}".format(
            *("({},{},{}) α={} β={}".format(*k) for k in reading_keys)
        ),
        "same_class": "class keys {} vs {}; system fingerprints {}".format(
            *(_key_text(k) for k in class_keys), _fingerprint_relation(report["fingerprints"])
        ),
        "same_frame": "frame keys {} vs {}; net fingerprints {}".format(
            *(_key_text(k) for k in frame_keys), _fingerprint_relation(report["net_fingerprints"])
        ),
    }
    names = {"same_reading": "same reading", "same_class": "same class", "same_frame": "same frame"}
    table = Table(title=f"{first} vs {second}", title_justify="left")
    table.add_column("level", no_wrap=True)
    table.add_column("answer", no_wrap=True)
    table.add_column("evidence", no_wrap=True)
    table.add_column("detail", style="dim", overflow="fold")
    for level, name in names.items():
        table.add_row(
            name,
            "yes" if report[level] else "no",
            report["evidence"][level],
            details[level],
        )
    Console(soft_wrap=False).print(table)
    ids = report.get("ids") or [None, None]
    if any(ids):
        typer.echo(f"catalog: {first} is {_or_dash(ids[0])}, {second} is {_or_dash(ids[1])}")


def _key_text(key: list[int]) -> str:
    return "(" + ",".join(str(k) for k in key) + ")"


def _fingerprint_relation(pair: list[str | None]) -> str:
    if pair[0] is None or pair[1] is None:
        return "not computed (area above the explicit-net limit)"
    return "equal" if pair[0] == pair[1] else "differ"
