"""Commands of zoo: ``show`` (every invariant of a parameter set), ``compare`` (two of them) and
``explore`` (the explicit reachability graph next to the closed formulas).

A thin layer: the numbers come from ``zoo.core.report`` (which asks ``zoo.core.reachability`` and
``zoo.core.invariants``); this module only parses arguments, asks the catalog for an identifier and
formats the dicts as a rich table or as one JSON object.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Annotated, Any

import typer

from zoo.cli.app import app, fail
from zoo.cli.options import (
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
)
from zoo.core.reachability import DEFAULT_STATE_LIMIT
from zoo.errors import CatalogError, ZooError


@app.command("version")
def version() -> None:
    """Print the zoo version."""
    from zoo.version import __version__

    print(__version__)


@app.command("show", context_settings=LOOSE_ARGUMENTS)
def show(
    ref: ReferenceArgument,
    fmt: TableOrJsonOption = TableOrJson.table,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Print every invariant of a parameter set, or the catalog entry of an identifier.

    Example: zoo show 4,2,2,3 --format json
    """
    refuse_unknown_options("show", ref)
    text = " ".join(ref)
    try:
        from zoo.catalog.identifiers import read_identifier

        if read_identifier(text) is not None:
            _show_catalog_entry(text.strip(), fmt.value, db)
            return
        p = parse_typed_params(text)
        from zoo.core.report import invariant_report

        report = invariant_report(p)
        report["id"] = class_id_of(p, db)
    except ZooError as exc:
        raise fail(exc) from None
    _print_report(report, fmt, _print_show_table)


@app.command("compare", context_settings=LOOSE_ARGUMENTS)
def compare(
    first: Annotated[
        str,
        typer.Argument(
            metavar="P1", help="First parameter set (4,2,2,3), label or class identifier (CY16-3)."
        ),
    ],
    second: Annotated[
        str, typer.Argument(metavar="P2", help="Second parameter set (2,4,3,2) or identifier.")
    ],
    fmt: TableOrJsonOption = TableOrJson.table,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Decide whether two parameter sets are the same reading, class and frame, and on what basis.

    A class identifier (CY16-3) stands for its label, as in show, draw and export.
    Reading: same folding lattice and token counts. Class: isomorphic marked nets. Frame:
    isomorphic unmarked nets. Class and frame are decided by algebra and by nauty; if the two
    ever disagree the command says so and exits with status 1.
    """
    refuse_unknown_options("compare", [first, second])
    try:
        p1, p2 = resolve_params(first, db), resolve_params(second, db)
        from zoo.core.report import compare_report, disagreement_message

        report = compare_report(p1, p2)
        report["ids"] = [class_id_of(p1, db), class_id_of(p2, db)]
    except ZooError as exc:
        raise fail(exc) from None
    _print_report(report, fmt, _print_compare_table)
    alarm = disagreement_message(report)
    if alarm:
        raise fail(alarm)


@app.command("explore", context_settings=LOOSE_ARGUMENTS)
def explore(
    ref: ReferenceArgument,
    state_limit: StateLimitOption = DEFAULT_STATE_LIMIT,
    fmt: TableOrJsonOption = TableOrJson.table,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Search the reachability graph explicitly and check it against the closed formulas.

    Builds the net, visits every reachable marking from M0 (breadth first, at most
    --state-limit states) and prints the explicit numbers of states and arcs beside the closed
    formulas of zoo show, whether they agree, and liveness, 1-safeness, reversibility, dead
    transitions, the largest place bound and the time taken. A disagreement would be a bug in
    zoo: the command then exits with status 1. Explicit search is exponential in the tokens;
    zoo show gives the counts of any size at once.

    Example: zoo explore 4,2,2,3 --state-limit 1000
    """
    refuse_unknown_options("explore", ref)
    try:
        p = resolve_params(" ".join(ref), db)
        from zoo.core.report import exploration_disagreement, exploration_report

        report = exploration_report(p, state_limit)
    except ZooError as exc:
        raise fail(exc) from None
    _print_report(report, fmt, _print_explore_table)
    alarm = exploration_disagreement(report)
    if alarm:
        raise fail(alarm)


def _print_report(
    report: dict[str, Any], fmt: TableOrJson, print_table: Callable[[dict[str, Any]], None]
) -> None:
    """Notes on standard error, then the report as JSON or as the command's table."""
    for note in report.get("notes", ()):
        typer.echo(f"Note: {note}", err=True)
    if fmt is TableOrJson.json:
        print_json(report)
    else:
        print_table(report)


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


def _seconds_text(seconds: float) -> str:
    return f"{seconds * 1000:.1f} ms" if seconds < 1 else f"{seconds:.2f} s"


def _yes_no(value: bool) -> str:
    return "yes" if value else "no"


def _print_explore_table(report: dict[str, Any]) -> None:

    def agreement(agree: bool) -> str:
        return "agree" if agree else "DISAGREE"

    dead = report["dead_transitions"]
    dead_text = (", ".join(dead[:8]) + (", …" if len(dead) > 8 else "")) if dead else "none"
    rows: list[tuple[str, str, str]] = [
        (
            "reachable states",
            number_text(report["states"]),
            f"formula {number_text(report['formula_states'])}: {agreement(report['states_agree'])}",
        ),
        (
            "reachability arcs",
            number_text(report["arcs"]),
            f"formula {number_text(report['formula_arcs'])}: {agreement(report['arcs_agree'])}",
        ),
        ("live", _yes_no(report["live"]), "every transition can always fire again"),
        ("1-safe", _yes_no(report["one_safe"]), "no place ever holds two tokens"),
        ("reversible", _yes_no(report["reversible"]), "M0 is reachable from every state"),
        ("dead transitions", dead_text, "can stop firing for good"),
        ("largest place bound", str(report["bound"]), "tokens on one place"),
        (
            "search time",
            _seconds_text(report["seconds"]),
            f"state limit {number_text(report['state_limit'])}",
        ),
    ]
    title = (
        f"{report['label']}: explicit reachability graph (area {report['area']}, "
        f"{report['tokens']} tokens)"
    )
    print_property_table(title, ("property", "explicit search", "check"), rows)


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
    from zoo.core.registry import group_text

    return group_text(*group)  # the one group notation, as in zoo show ID


def _group_text(group: list[int], class_group: list[int]) -> str:
    # The two differ only in the exceptional family of docs/theory/isomorphism.md.
    if group == class_group:
        return _group_name(group)
    return f"{_group_name(group)} (class: {_group_name(class_group)})"


def _with_class_value(value: int, class_value: int) -> str:
    return str(value) if value == class_value else f"{value} (class: {class_value})"


def _or_dash(value: object) -> str:
    if value is None:
        return "—"
    if isinstance(value, int) and not isinstance(value, bool):
        return number_text(value)
    return str(value)


def _label(name: str) -> str:
    """The table label of a registry invariant (zoo.core.registry), as in zoo show ID."""
    from zoo.core.registry import invariant

    return invariant(name).label


def _print_show_table(report: dict[str, Any]) -> None:

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
        (_label("group_d1"), _group_text(report["group"], report["class_group"]), "Smith form"),
        (_label("area"), number_text(report["area"]), "A = αδ + βγ"),
        ("places", number_text(report["places"]), "2A"),
        (
            _label("tokens"),
            f"{report['tokens']} ({report['tokens_forward']} fwd, {report['tokens_backward']} bwd)",
            "α + β",
        ),
        (
            _label("loop"),
            f"{report['loop']} (vector ({xi},{eta}), {report['loop_tokens']} token"
            f"{'s' if report['loop_tokens'] != 1 else ''})",
            loop_note,
        ),
        ("forward cycles", _cycles_text(report["forward_cycles"]), "gcd(β,δ)"),
        ("backward cycles", _cycles_text(report["backward_cycles"]), "gcd(α,γ)"),
        (_label("processes"), str(report["processes"]), "forward cycles"),
        (_label("regular"), "yes" if report["regular"] else "no", "β divides δ"),
        (
            _label("iteration"),
            _with_class_value(report["iteration"], report["class_iteration"]),
            "largest n-fold",
        ),
        (
            _label("enabled"),
            _names_text(report["enabled_transitions"], report["enabled"]),
            "min(α,β)",
        ),
        (
            _label("semi_enabled"),
            _names_text(report["semi_enabled_transitions"], report["semi_enabled"]),
            "|α − β|",
        ),
        (_label("states"), number_text(report["states"]), "A·C(α+β,α)/(α+β)"),
        (_label("state_arcs"), number_text(report["state_arcs"]), "A·C(α+β−2,α−1)"),
        (_label("slowness"), fraction_cell(report["slowness"]), "(α − β)/(α + β)"),
        (_label("cycle_time"), fraction_cell(report["cycle_time"]), "A/min(α,β)"),
        (_label("automorphisms"), _or_dash(report["automorphisms"]), "nauty"),
        (_label("net_automorphisms"), _or_dash(report["net_automorphisms"]), "nauty"),
    ]
    # Fingerprints go on lines of their own: a folded one cannot be copied (nauty, v1:sha256).
    fingerprints = [
        ("fingerprint (system)", _or_dash(report["fingerprint"])),
        ("fingerprint (net)", _or_dash(report["net_fingerprint"])),
    ]
    print_property_table(report["label"], ("invariant", "value", "how"), rows, fingerprints)


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
    behaviour = report["same_behaviour"]
    answer = "not decided" if behaviour is None else ("yes" if behaviour else "no")
    typer.echo(f"same behaviour: {answer} ({report['behaviour']['evidence']})")
    ids = report.get("ids") or [None, None]
    if any(ids):
        typer.echo(f"catalog: {first} is {_or_dash(ids[0])}, {second} is {_or_dash(ids[1])}")


def _key_text(key: list[int]) -> str:
    return "(" + ",".join(str(k) for k in key) + ")"


def _fingerprint_relation(pair: list[str | None]) -> str:
    if pair[0] is None or pair[1] is None:
        return "not computed (area above the explicit-net limit)"
    return "equal" if pair[0] == pair[1] else "differ"
