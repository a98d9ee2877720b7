"""Commands of zoo: ``build``, ``find``, ``stats``, ``migrate`` and ``show ID`` (``show_entry``).

A thin layer over ``zoo.catalog.service``: it parses options, shows a progress bar on standard error
and formats answers. Every answer says up to which area the catalog is complete: on standard output
under a table, on standard error for the machine formats (csv, json, jsonl, ``--count``), so that
standard output stays parseable.
"""

from __future__ import annotations

import csv
import json
import sys
from collections.abc import Sequence
from enum import StrEnum
from pathlib import Path
from typing import TYPE_CHECKING, Annotated, Any

import typer

from zoo.cli.app import app, fail
from zoo.cli.options import (
    FLAG,
    CatalogOption,
    ReadOnlyCatalogOption,
    TableOrJson,
    fraction_cell,
    number_text,
    print_json,
    print_whole_lines,
)
from zoo.errors import ParameterError, ZooError

if TYPE_CHECKING:
    from rich.progress import Progress, TaskID

    from zoo.catalog.build import BuildReport
    from zoo.catalog.service import AreaStats, Catalog, ClassEntry, FindResult


class FindFormat(StrEnum):
    """How ``find`` prints its answer."""

    table = "table"
    csv = "csv"
    json = "json"
    jsonl = "jsonl"
    markdown = "markdown"
    latex = "latex"


JobsOption = Annotated[
    int | None,
    typer.Option(
        "--jobs",
        "-j",
        min=1,
        help="Worker processes that classify areas (the writer is one more). Default: the "
        "usable cores, at most 4.",
    ),
]

#: A --limit at least this large cannot cut any catalog: it means no limit.
_NO_LIMIT = 2**62

#: Rows ``find`` prints on a terminal when neither --limit nor --all is given: a screenful or two,
#: not the thousands a broad query matches. Pipes and the machine formats keep every row.
TERMINAL_LIMIT = 50

#: Columns of ``find`` when --columns is not given.
DEFAULT_COLUMNS = ("loop", "tokens", "processes", "states", "frame")


def _console(stderr: bool = False) -> Any:
    """A rich console; off a terminal it never folds lines, so pipes get whole rows."""
    from rich.console import Console

    console = Console(stderr=stderr, highlight=False, soft_wrap=False)
    if not console.is_terminal:
        console = Console(stderr=stderr, highlight=False, soft_wrap=True, width=10_000)
    return console


# --- progress --------------------------------------------------------------------------------


class ProgressBar:
    """A ``zoo.catalog.service.BuildProgress`` drawn with rich.progress on standard error.

    The bar advances by estimated work, not by parameter sets: the nauty work of an area grows
    with the number of its parameter sets times the size of its nets (the area), so weighting
    each area by parameter sets x area keeps the time-left estimate honest while small areas
    rush by. The text shows the parameter sets and areas done.
    """

    def __init__(self, title: str = "Building catalog") -> None:
        self.title = title
        self._progress: Progress | None = None
        self._task: TaskID | None = None
        self._areas_total = 0
        self._areas_done = 0
        self._sets_total = 0
        self._sets_done = 0
        #: Said on standard error when a build really starts ({first}, {last}: its areas), so
        #: that a query that has to build first never works silently.
        self.announce: str | None = None

    def started(self, areas: Sequence[int], parameter_sets: int) -> None:
        from rich.progress import (
            BarColumn,
            Progress,
            TextColumn,
            TimeElapsedColumn,
            TimeRemainingColumn,
        )

        from zoo.catalog.enumeration import parameter_set_count

        if not areas:
            return
        if self.announce:
            typer.echo(self.announce.format(first=areas[0], last=areas[-1]), err=True)
        self._areas_total = len(areas)
        self._sets_total = parameter_sets
        self._progress = Progress(
            TextColumn("{task.description}"),
            BarColumn(),
            TextColumn("{task.fields[sets]} parameter sets, {task.fields[areas]}"),
            TimeElapsedColumn(),
            TextColumn("elapsed,"),
            TimeRemainingColumn(),
            TextColumn("left"),
            console=_console(stderr=True),
        )
        work = sum(max(1, parameter_set_count(a) * a) for a in areas)
        self._task = self._progress.add_task(
            self.title, total=work, sets=self._sets_text(), areas=f"areas 0/{len(areas)}"
        )
        self._progress.start()

    def _sets_text(self) -> str:
        return f"{self._sets_done:,}/{self._sets_total:,}"

    def area_done(self, stats: AreaStats) -> None:
        if self._progress is None or self._task is None:
            return
        self._areas_done += 1
        self._sets_done += stats.parameter_sets
        self._progress.update(
            self._task,
            advance=max(1, stats.parameter_sets * stats.area),
            sets=self._sets_text(),
            areas=f"areas {self._areas_done}/{self._areas_total} (area {stats.area}: "
            f"{stats.classes} {'class' if stats.classes == 1 else 'classes'})",
        )

    def finished(self, report: BuildReport) -> None:
        self.stop()

    def stop(self) -> None:
        if self._progress is not None:
            self._progress.stop()
            self._progress = None


def _build_summary(report: BuildReport) -> str:
    if not report.added:
        if report.behaviour_named:
            from zoo.catalog.build import area_span

            return (
                f"Named the behaviour classes of {area_span(report.behaviour_named)} in "
                f"{report.wall_seconds:.1f} s. The catalog is complete up to area "
                f"{report.complete_to}."
            )
        return f"Nothing to do: the catalog is already complete up to area {report.complete_to}."
    from zoo.catalog.build import area_span

    span = report.added_text()
    if report.stored_elsewhere:
        span += f" ({area_span(report.stored_elsewhere)} stored meanwhile by another build)"
    return (
        f"Stored {span}: {report.parameter_sets:,} parameter sets, "
        f"{report.readings:,} "
        f"readings, {report.classes:,} classes, {report.frames:,} frames "
        f"({report.canonical_forms:,} nauty canonical forms, all agreeing with the algebra) in "
        f"{report.wall_seconds:.1f} s. The catalog is complete up to area {report.complete_to}."
    )


def _run_build(build: Any) -> BuildReport:
    """Run a build with a progress bar; report disagreements and interruptions clearly."""
    from zoo.catalog.classify import ClassificationDisagreement

    bar = ProgressBar()
    try:
        report: BuildReport = build(bar)
    except ClassificationDisagreement as exc:
        bar.stop()
        for line in exc.report:
            typer.echo(f"  {line}", err=True)
        raise fail(exc) from None
    except KeyboardInterrupt:
        bar.stop()
        typer.echo(
            "Every area stored so far is complete and kept; run the same command again to resume.",
            err=True,
        )
        raise  # the entry point prints "Interrupted." and exits with status 130
    except ZooError as exc:
        bar.stop()
        raise fail(exc) from None
    return report


# --- build -----------------------------------------------------------------------------------


@app.command("build")
def build(
    max_area: Annotated[
        int,
        typer.Option(
            "--max-area",
            "-n",
            help="Store every parameter set of area at most N (areas already stored are kept).",
        ),
    ] = 100,
    db: CatalogOption = None,
    jobs: JobsOption = None,
    cluster: Annotated[
        str | None,
        typer.Option(
            "--cluster",
            help="Classify on a Dask cluster: a scheduler address (tcp://HOST:8786) or local:N "
            "for N local worker processes; this process still writes. Needs the cluster extra "
            "(pip install 'cycloid-zoo[cluster]').",
        ),
    ] = None,
) -> None:
    """Enumerate, classify and store every cycloid up to an area; resumes where it stopped.

    Each area is stored in one transaction, so an interrupted build keeps every area it
    finished. The build also decides which classes behave alike (reachability graphs with at
    most 10,000 states) and names their behaviour classes, also for areas that the first
    `zoo find` stored without them.

    Example: zoo build --max-area 60 --jobs 2   (or --cluster local:2)
    """
    from zoo.catalog.build import build_catalog, default_jobs
    from zoo.catalog.service import Catalog

    try:
        catalog = Catalog.open(db, create=True)
    except ZooError as exc:
        raise fail(exc) from None
    try:
        report = _run_build(
            lambda bar: build_catalog(
                catalog, max_area, jobs=jobs or default_jobs(), progress=bar, cluster=cluster
            )
        )
    finally:
        catalog.close()
    typer.echo(_build_summary(report))


# --- find ------------------------------------------------------------------------------------


@app.command("find")
def find(
    query: Annotated[
        str,
        typer.Argument(
            help="A query such as 'processes = 3 and area < 100' (see docs/query-language.md); "
            "'' matches every class.",
            show_default=False,
        ),
    ] = "",
    sort: Annotated[
        str | None,
        typer.Option("--sort", "-s", help="Sort by a field; prefix - for descending (-states)."),
    ] = None,
    limit: Annotated[
        int | None,
        typer.Option(
            "--limit",
            "-l",
            min=0,
            help=f"Print at most this many classes. Default: {TERMINAL_LIMIT} for a table on a "
            "terminal, every class otherwise (pipes, csv, json, jsonl).",
        ),
    ] = None,
    show_all: Annotated[
        bool,
        typer.Option(
            "--all", "-a", metavar=FLAG, help="Print every matching class, even on a terminal."
        ),
    ] = False,
    columns: Annotated[
        list[str] | None,
        typer.Option(
            "--columns",
            "-c",
            help="Fields to show, comma-separated or repeated (e.g. loop,states,regular).",
        ),
    ] = None,
    fmt: Annotated[
        FindFormat,
        typer.Option(
            "--format",
            "-f",
            help="table, csv, json (one array), jsonl (JSON Lines), or for a paper markdown or "
            "latex (a table float; the completeness note is its caption).",
        ),
    ] = FindFormat.table,
    count: Annotated[
        bool,
        typer.Option("--count", metavar=FLAG, help="Print only the number of matching classes."),
    ] = False,
    seed: Annotated[
        str | None,
        typer.Option("--seed", help="Keep only classes with a seed whose name contains this text."),
    ] = None,
    db: CatalogOption = None,
    jobs: JobsOption = None,
) -> None:
    """Find the catalog classes that match a query.

    When no catalog exists yet, the default one (area up to 100) is built first, once.
    On a terminal a table shows the first TERMINAL_LIMIT classes and says how many match;
    --all prints them all.
    Example: zoo find "processes = 3 and area < 100" --sort -states --limit 10
    """
    from zoo.catalog import service as catalog_service
    from zoo.catalog.build import ensure_catalog

    if show_all and limit is not None:
        raise fail("--all and --limit contradict each other: give one of them.", status=2)
    # A person at a terminal gets a screenful and the total; a script reading a pipe gets all.
    cut_for_terminal = (
        limit is None
        and not show_all
        and fmt is FindFormat.table
        and not count
        and _stdout_is_terminal()
    )
    if cut_for_terminal:
        limit = TERMINAL_LIMIT
    try:
        # A mistyped query must fail at once, not after building the default catalog.
        from zoo.query.parser import parse_query, parse_sort_key

        if query.strip():
            parse_query(query)
        if sort:
            parse_sort_key(sort)
        _requested_columns(columns)
        shown, exists = catalog_service.describe_location(db)
        if not exists:
            typer.echo(
                f"No catalog at {shown} yet: building areas "
                f"1..{catalog_service.DEFAULT_MAX_AREA} "
                "once (later queries answer at once; `zoo build` adds the behaviour classes).",
                err=True,
            )
        holder: dict[str, Catalog] = {}

        def _open(bar: ProgressBar) -> BuildReport | None:
            if exists:  # e.g. an empty catalog made by `zoo migrate`, or an interrupted build
                bar.announce = (
                    f"The catalog at {shown} lacks areas {{first}}..{{last}}: building them "
                    "once before answering (later queries answer at once)."
                )
            catalog, report = ensure_catalog(db, jobs=jobs, progress=bar)
            holder["catalog"] = catalog
            return report

        _run_build(_open)
        catalog = holder["catalog"]
        try:
            if count:
                number = catalog.count(query, seed=seed)
                note = catalog.completeness_note(query)
                typer.echo(str(number))
                typer.echo(note, err=True)
                return
            # Aliases collapsed, each field once (the service would see `loop,cyc` as two
            # columns of one name); a limit beyond any catalog means no limit (SQL has 64 bits).
            asked = _requested_columns(columns) if columns else None
            if limit is not None and limit >= _NO_LIMIT:
                limit = None
            result = catalog.find(query, sort=sort, limit=limit, seed=seed, columns=asked)
        finally:
            catalog.close()
    except ZooError as exc:  # a query syntax error also gets its caret line
        raise fail(exc) from None
    _print_find(result, fmt, columns, hint_all=cut_for_terminal)


def _stdout_is_terminal() -> bool:
    try:
        return sys.stdout.isatty()
    except (AttributeError, ValueError):  # a closed or replaced stdout is no terminal
        return False


def _requested_columns(columns: Sequence[str] | None) -> list[str]:
    if not columns:
        return list(DEFAULT_COLUMNS)
    from zoo.query.parser import parse_field_names

    names: list[str] = []
    for text in columns:
        for name in parse_field_names(text):
            if name not in names and name not in ("area",):
                names.append(name)
    return names


def _members_text(entry: ClassEntry, short: bool) -> str:
    """The member labels: ", "-separated in the table, space-separated in csv. ``members`` is
    always this list (one vocabulary, docs/catalog.md); its number is ``member_count``."""
    return (", " if short else " ").join(str(p) for p in entry.members)


def _default_value(entry: ClassEntry, name: str) -> str:
    """Default column values, read from the loaded entry (no extra query)."""
    if name == "frame":
        return entry.frame_id
    if name == "processes":
        values = sorted({int(str(r.value("processes"))) for r in entry.readings})
        return ",".join(map(str, values))  # a set: '1..3' would read as a range
    value = entry.invariants.get(name)
    return "" if value is None else str(value)


def _cell(result: FindResult, index: int, name: str, custom: bool) -> str:
    entry = result.entries[index]
    if custom:
        value = result.columns[index].get(name) if result.columns else None
        return "" if value is None else str(value)
    return _default_value(entry, name)


def _print_find(
    result: FindResult, fmt: FindFormat, columns: Sequence[str] | None, hint_all: bool = False
) -> None:
    sys.set_int_max_str_digits(0)
    custom = bool(columns)
    # One column per field; the member list is always the last column.
    names = _requested_columns(columns)
    note = result.completeness_note()
    shown = len(result.entries)
    summary = ("1 class matches" if result.total == 1 else f"{result.total:,} classes match") + (
        f"; showing {shown:,}." if shown < result.total else "."
    )
    if hint_all and shown < result.total:
        summary += f" All {result.total:,}: add --all (or --limit N for N)."
    if fmt in (FindFormat.markdown, FindFormat.latex):
        _print_paper_table(result, fmt, names, custom, f"{summary} {note}")
        return
    if fmt is FindFormat.table:
        from rich.table import Table

        table = Table(show_header=True, header_style="bold", box=None, pad_edge=False)
        # A query on reading fields says which reading matched (a class has one or two).
        matched = ("matched reading",) if result.matched else ()
        for heading in ("id", "label", "area", *names, "members", *matched):
            table.add_column(heading, no_wrap=True)
        for index, entry in enumerate(result.entries):
            table.add_row(
                entry.id,
                entry.label,
                str(entry.area),
                *(_cell(result, index, n, custom) for n in names),
                _members_text(entry, short=True),
                *((result.matched[index] or "",) if matched else ()),
            )
        console = _console()
        if result.entries:
            console.print(table)
        console.print(summary)
        console.print(note)
        return
    typer.echo(summary, err=True)
    typer.echo(note, err=True)
    if fmt is FindFormat.csv:
        writer = csv.writer(sys.stdout, lineterminator="\n")
        headings = ["id", "label", "area", *names, "members"]
        writer.writerow(headings)
        for index, entry in enumerate(result.entries):
            writer.writerow(
                [
                    entry.id,
                    entry.label,
                    entry.area,
                    *(result.cell(index, n) if custom else _default_value(entry, n) for n in names),
                    _members_text(entry, short=False),
                ]
            )
        return
    objects: list[dict[str, object]] = []
    for index, entry in enumerate(result.entries):
        if custom:
            item: dict[str, object] = {
                "id": entry.id,
                "label": entry.label,
                "area": entry.area,
                "members": [str(p) for p in entry.members],
            }
            for name in names:
                if name not in item:
                    item[name] = result.values[index].get(name)
            objects.append(item)
        else:
            objects.append(entry.as_dict())
    if fmt is FindFormat.json:
        print_json(objects)
    else:
        for item in objects:
            typer.echo(json.dumps(item, ensure_ascii=False))


def _print_paper_table(
    result: FindResult, fmt: FindFormat, names: Sequence[str], custom: bool, caption: str
) -> None:
    """A table for a paper (zoo.publish.tables) with exact typed values and the note."""
    from zoo.publish.tables import render

    rows = [
        [
            entry.id,
            entry.label,
            entry.area,
            *(
                (result.values[index].get(n) if result.values else None)
                if custom
                else _default_value(entry, n)
                for n in names
            ),
            len(entry.members),
        ]
        for index, entry in enumerate(result.entries)
    ]
    sys.stdout.write(render(fmt.value, ["id", "label", "area", *names, "members"], rows, caption))


# --- show ID ---------------------------------------------------------------------------------


def show_entry(ref: str, fmt: str, db: str | None) -> None:
    """Print the catalog entry of a class or frame identifier (``zoo show CY16-3``).

    Everything stored: every invariant, every member, the readings, the frame and the other
    classes on it, the seeds, and a citation line. ``fmt`` is ``table`` or ``json``. Never
    builds a catalog; raises ZooError (the caller prints it) when the entry is not there.
    """
    from zoo.catalog.service import Catalog
    from zoo.publish.entry_report import entry_report

    with Catalog.open(db) as catalog:
        report = entry_report(catalog, ref)
    if fmt == "json":
        print_json(report)
        return
    if "classes" in report:
        _print_frame_table(report)
    else:
        _print_entry_table(report)


def _number_text(value: object) -> str:
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return number_text(value)
    if isinstance(value, list):
        return " x ".join(str(v) for v in value) if value else "-"
    return str(value)


def _invariant_text(inv: Any, value: object) -> str:
    """A registry invariant's JSON value as table text: one group notation (Z_8, Z_2 × Z_4),
    fractions without a denominator of 1, yes/no, exact whole numbers with separators."""
    from zoo.core.registry import ValueType, group_text

    if inv.json_pair and isinstance(value, list):
        return group_text(*value)
    if inv.type is ValueType.FRACTION:
        return fraction_cell(str(value))
    return _number_text(value)


def _entry_rows(level_filter: Any) -> list[Any]:
    from zoo.core import registry

    return [inv for inv in registry.INVARIANTS if level_filter(inv) and not inv.structural]


def _print_entry_table(report: dict[str, Any]) -> None:
    from rich.table import Table

    from zoo.core import registry

    console = _console()
    console.print(f"[bold]{report['id']}[/bold]  {report['label']}  (area {report['area']})")
    table = Table(show_header=False, box=None, pad_edge=False)
    table.add_column("field", style="bold")
    table.add_column("value")
    # Every class-level value, labelled from the registry; one made from every reading says how
    # (each reading's own value is in the readings table below).
    class_level = (registry.Level.CLASS, registry.Level.FRAME)
    for inv in _entry_rows(lambda i: i.level in class_level):
        label = inv.label
        if inv.over_readings != registry.FIRST:
            label += f" (class: {inv.over_readings})"
        table.add_row(label, _invariant_text(inv, registry.value_in(report, inv)))
    console.print(table)
    print_whole_lines([("fingerprint", report["fingerprint"])])  # never folded: copied whole
    members = ", ".join(report["members"])
    console.print(f"[bold]Members[/bold] ({len(report['members'])}): {members}")
    readings = Table(show_header=True, header_style="bold", box=None, pad_edge=False)
    columns = _entry_rows(lambda i: i.level is registry.Level.READING) + _entry_rows(
        lambda i: i.over_readings != registry.FIRST
    )
    for heading in ("reading", *(inv.label for inv in columns), "members"):
        readings.add_column(heading)
    for r in report["readings"]:
        readings.add_row(
            r["label"],
            *(_invariant_text(inv, registry.value_in(r, inv)) for inv in columns),
            ", ".join(r["members"]),
        )
    console.print("[bold]Readings[/bold]")
    console.print(readings)
    frame = report["frame"]
    others = ", ".join(frame["other_classes"]) or "none"
    console.print(
        f"[bold]Frame[/bold] {frame['id']} {frame['label']} (net automorphisms "
        f"{_number_text(frame['net_automorphisms'])}); other classes on it: {others}"
    )
    _print_relations(console, report)
    if report["seeds"]:
        console.print("[bold]Seeds[/bold]")
        for s in report["seeds"]:
            console.print(f"  {s['name']}: {s['description']} ({s['params']})")
    console.print(f"The catalog is complete up to area {report['complete_to']}.")
    console.print(f"[bold]Cite as[/bold]: {report['citation']}")


def _print_relations(console: Any, report: dict[str, Any]) -> None:
    """Iteration links and the behaviour class of an entry (docs/theory/iterations.md,
    docs/theory/behaviour.md)."""

    def links(items: list[dict[str, Any]]) -> str:
        return ", ".join(f"{link['id']} (n = {link['n']})" for link in items) or "none"

    console.print(f"[bold]Iteration of[/bold]: {links(report['iteration_of'])}")
    console.print(
        f"[bold]Iterations[/bold] up to area {report['complete_to']}: {links(report['iterations'])}"
    )
    behaviour = report["behaviour"]
    if behaviour["id"] is None:
        bound = behaviour["state_bound"]
        reason = f"more than {bound:,} reachable states" if bound else "not computed yet"
        console.print(f"[bold]Behaviour[/bold]: not decided ({reason})")
        return
    others = [c for c in behaviour["classes"] if c != report["id"]]
    listed = ", ".join(others) or "none"
    note = "" if behaviour["complete"] else " (so far: the catalog does not reach its state count)"
    console.print(
        f"[bold]Behaviour[/bold] {behaviour['id']}: other classes that behave alike{note}: "
        f"{listed}; {behaviour['evidence']}"
    )


def _print_frame_table(report: dict[str, Any]) -> None:
    console = _console()
    console.print(f"[bold]{report['id']}[/bold]  {report['label']}  (area {report['area']}, frame)")
    console.print(f"net automorphisms: {_number_text(report['net_automorphisms'])}")
    console.print(f"lattice key (A, g, r): {tuple(report['lattice_key'])}")
    print_whole_lines([("fingerprint", report["fingerprint"])])
    console.print(f"[bold]Classes on this frame[/bold] ({len(report['classes'])}):")
    for class_id, label in report["class_labels"].items():
        console.print(f"  {class_id}  {label}")
    console.print(f"The catalog is complete up to area {report['complete_to']}.")
    console.print(f"[bold]Cite as[/bold]: {report['citation']}")


# --- stats -----------------------------------------------------------------------------------


@app.command("stats")
def stats(
    fmt: Annotated[
        TableOrJson, typer.Option("--format", "-f", help="table, or json (a list of objects).")
    ] = TableOrJson.table,
    plot: Annotated[
        Path | None,
        typer.Option(
            "--plot", dir_okay=False, help="Also draw the counts to a .png, .svg or .pdf file."
        ),
    ] = None,
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Per area: numbers of parameter sets, readings, classes and frames.

    Example: zoo stats --plot counts.svg
    """
    from zoo.catalog.service import Catalog

    try:
        if plot is not None and plot.suffix.lower() not in (".png", ".svg", ".pdf"):
            raise ParameterError(
                f"--plot {plot} has suffix {plot.suffix or '(none)'!r}; "
                "write to a .png, .svg or .pdf file"
            )
        with Catalog.open(db) as catalog:
            rows = [s for s in catalog.stats() if s.complete]
            complete = catalog.complete_to()
        if plot is not None:
            draw_stats(rows, plot)
    except ZooError as exc:
        raise fail(exc) from None
    note = f"The catalog is complete up to area {complete}."
    if fmt is TableOrJson.json:
        print_json([s.as_dict() for s in rows])
        typer.echo(note, err=True)
    else:
        from rich.table import Table

        table = Table(show_header=True, header_style="bold", box=None, pad_edge=False)
        for heading in ("area", "parameter sets", "readings", "classes", "frames"):
            table.add_column(heading, justify="right")
        for s in rows:
            table.add_row(
                str(s.area),
                f"{s.parameter_sets:,}",
                f"{s.readings:,}",
                f"{s.classes:,}",
                f"{s.frames:,}",
            )
        table.add_row(
            "total",
            f"{sum(s.parameter_sets for s in rows):,}",
            f"{sum(s.readings for s in rows):,}",
            f"{sum(s.classes for s in rows):,}",
            f"{sum(s.frames for s in rows):,}",
            style="bold",
        )
        console = _console()
        console.print(table)
        console.print(note)
    if plot is not None:
        typer.echo(f"Wrote {plot}", err=True)


def draw_stats(rows: Sequence[AreaStats], path: Path) -> None:
    """Draw the per-area counts (log scale) to a PNG, SVG or PDF file with matplotlib's Agg
    backend (PDF for a paper: vector lines, fonts embedded, no creation date)."""
    from zoo.errors import import_extra

    matplotlib = import_extra("matplotlib", "plots", "zoo stats --plot")
    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    if not rows:
        raise ZooError("the catalog holds no complete area yet; build one with: zoo build")
    figure = Figure(figsize=(8, 5), dpi=120)
    axes = figure.subplots()
    areas = [s.area for s in rows]
    series = (
        ("parameter sets", [s.parameter_sets for s in rows], "o"),
        ("readings", [s.readings for s in rows], "s"),
        ("classes", [s.classes for s in rows], "^"),
        ("frames", [s.frames for s in rows], "D"),
    )
    for name, values, marker in series:
        points = [(a, v) for a, v in zip(areas, values, strict=True) if v > 0]
        axes.plot(
            [a for a, _ in points],
            [v for _, v in points],
            marker=marker,
            markersize=3,
            linewidth=1,
            label=name,
        )
    axes.set_yscale("log")
    axes.set_xlabel("area A = number of transitions")
    axes.set_ylabel("count (log scale)")
    axes.set_title(f"Cycloids per area, areas {areas[0]}..{areas[-1]}")
    axes.grid(True, which="major", alpha=0.3)
    axes.legend()
    figure.tight_layout()
    try:
        fmt = path.suffix.lower().lstrip(".")
        metadata = {"svg": {"Date": None}, "pdf": {"CreationDate": None}}.get(fmt)
        with matplotlib.rc_context({"pdf.fonttype": 42, "svg.hashsalt": "zoo"}):
            figure.savefig(path, format=fmt, metadata=metadata)
    except OSError as exc:
        raise ZooError(f"cannot write the plot {path}: {exc.strerror}") from None


# --- migrate ---------------------------------------------------------------------------------


@app.command("migrate")
def migrate(db: CatalogOption = None) -> None:
    """Create the catalog schema, or upgrade it to this zoo's revision (no data is lost).

    Example: zoo migrate --db catalog.sqlite3
    """
    from zoo.catalog.service import migrate_catalog

    try:
        shown, before, after = migrate_catalog(db)
    except ZooError as exc:
        raise fail(exc) from None
    if before != after:
        typer.echo(f"Catalog {shown}: schema revision {before or 'none'} -> {after}.")
    else:
        typer.echo(f"Catalog {shown}: schema revision {after} is current; nothing to do.")
