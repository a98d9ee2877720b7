"""The answers of the web catalog, built from the catalog service exactly as the CLI builds them.

A search page, the CSV and JSON downloads and ``GET /api/classes`` all come from ``search``; an
entry page and ``GET /api/classes/{ID}`` from ``zoo.publish.entry_report`` (the object of ``zoo
show ID --format json``); a parameter set from ``zoo.core.report.invariant_report`` (the object of
``zoo show PARAMS --format json``).
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from typing import Any

from zoo.catalog.service import Catalog, ClassEntry, FindResult
from zoo.core.params import ParameterSet
from zoo.errors import ParameterError
from zoo.query.fields import FIELDS
from zoo.query.parser import parse_field_names

#: Columns shown when none are chosen: those of ``zoo find``.
DEFAULT_COLUMNS = ("loop", "tokens", "processes", "states", "frame")
#: Rows per page when none is asked for, and the most a page or API call returns.
DEFAULT_LIMIT = 50
MAX_LIMIT = 500
#: Deepest row a page may start at; the catalog service reads offset + limit rows.
MAX_OFFSET = 20_000
#: Longest query text accepted (common practice: bound request inputs; real queries are short).
MAX_QUERY_CHARS = 2_000
#: Every field a column may show, in the order of the query-field registry.
COLUMN_CHOICES = tuple(f.name for f in FIELDS if f.name not in ("area",))


@dataclass(frozen=True)
class SearchPage:
    """One page of a query's answer: ``result`` holds rows 0..offset+limit, ``rows`` the page."""

    query: str
    sort: str | None
    limit: int
    offset: int
    columns: tuple[str, ...]
    custom: bool  # columns chosen by the reader (typed values), else the default ones
    result: FindResult

    @property
    def total(self) -> int:
        return self.result.total

    @property
    def entries(self) -> tuple[ClassEntry, ...]:
        return self.result.entries[self.offset :]

    def cell(self, index: int, name: str) -> str:
        """Display text of a column for the page's row ``index``."""
        at = self.offset + index
        entry = self.result.entries[at]
        if self.custom:
            value = self.result.columns[at].get(name) if self.result.columns else None
            return "" if value is None else str(value)
        return default_cell(entry, name)

    def table(self) -> list[dict[str, str]]:
        """The display text of every column, one dict per row of the page: each entry's
        invariants are decoded once for the row, not once per cell."""
        rows: list[dict[str, str]] = []
        for index, entry in enumerate(self.entries):
            if self.custom:
                rows.append({name: self.cell(index, name) for name in self.columns})
            else:
                invariants = entry.invariants
                rows.append({n: default_cell(entry, n, invariants) for n in self.columns})
        return rows

    def items(self) -> list[dict[str, Any]]:
        """The rows as ``zoo find --format json`` prints them."""
        objects: list[dict[str, Any]] = []
        for index, entry in enumerate(self.entries):
            at = self.offset + index
            if not self.custom:
                objects.append(entry.as_dict())
                continue
            item: dict[str, Any] = {
                "id": entry.id,
                "label": entry.label,
                "area": entry.area,
                "members": [str(p) for p in entry.members],
            }
            for name in self.columns:
                if name not in item:
                    item[name] = self.result.values[at].get(name)
            objects.append(item)
        return objects

    def csv_text(self) -> str:
        """The rows as ``zoo find --format csv`` writes them."""
        out = io.StringIO()
        writer = csv.writer(out, lineterminator="\n")
        names = [n for n in self.columns if n != "members"]
        writer.writerow(["id", "label", "area", *names, "members"])
        for index, entry in enumerate(self.entries):
            at = self.offset + index
            invariants = None if self.custom else entry.invariants
            writer.writerow(
                [
                    entry.id,
                    entry.label,
                    entry.area,
                    *(
                        self.result.cell(at, n)
                        if self.custom
                        else default_cell(entry, n, invariants)
                        for n in names
                    ),
                    " ".join(str(p) for p in entry.members),
                ]
            )
        return out.getvalue()


def default_cell(entry: ClassEntry, name: str, invariants: dict[str, object] | None = None) -> str:
    """The default columns of ``zoo find``, read from the loaded entry (``invariants``: its
    ``entry.invariants`` when the caller has them already; decoding them is not free)."""
    if name == "frame":
        return entry.frame_id
    if name == "processes":
        values = sorted({int(str(r["processes"])) for r in entry.readings})
        return str(values[0]) if len(values) == 1 else f"{values[0]}..{values[-1]}"
    value = (entry.invariants if invariants is None else invariants).get(name)
    return "" if value is None else str(value)


def read_columns(chosen: list[str]) -> tuple[tuple[str, ...], bool]:
    """The columns a reader chose (names or aliases; empty: the default columns)."""
    names: list[str] = []
    for text in chosen:
        for name in parse_field_names(text):
            if name not in names and name != "area":
                names.append(name)
    if not names:
        return DEFAULT_COLUMNS, False
    return tuple(names), True


def read_bound(text: str | None, name: str, default: int, largest: int) -> int:
    """A whole-number request parameter between 0 and ``largest``, or a ParameterError."""
    if text is None or not text.strip():
        return default
    try:
        value = int(text.strip())
    except ValueError:
        raise ParameterError(f"{name} must be a whole number, got {text!r}") from None
    if not 0 <= value <= largest:
        raise ParameterError(f"{name} must be between 0 and {largest:,}, got {value:,}")
    return value


def search(
    catalog: Catalog,
    query: str,
    *,
    sort: str | None = None,
    limit: int = DEFAULT_LIMIT,
    offset: int = 0,
    columns: list[str] | None = None,
    max_limit: int = MAX_LIMIT,
) -> SearchPage:
    """Run a query through ``Catalog.find`` (the code path of ``zoo find``) and keep one page."""
    if len(query) > MAX_QUERY_CHARS:
        raise ParameterError(
            f"the query has {len(query):,} characters, over the limit of {MAX_QUERY_CHARS:,}; "
            "write a shorter query"
        )
    if limit > max_limit or offset > MAX_OFFSET:
        raise ParameterError(
            f"a page holds at most {max_limit:,} rows from row {MAX_OFFSET:,} at the deepest; "
            "narrow the query or download with: zoo find QUERY --format csv"
        )
    names, custom = read_columns(columns or [])
    result = catalog.find(
        query, sort=sort or None, limit=offset + limit, columns=names if custom else None
    )
    return SearchPage(query, sort or None, limit, offset, names, custom, result)


def parameter_set_report(catalog: Catalog, p: ParameterSet) -> dict[str, Any]:
    """The object of ``zoo show PARAMS --format json``: every invariant and the class identifier."""
    from zoo.core.report import invariant_report

    report = invariant_report(p)
    entry = catalog.class_for_params(p)
    report["id"] = None if entry is None else entry.id
    return report


__all__ = [
    "COLUMN_CHOICES",
    "DEFAULT_COLUMNS",
    "DEFAULT_LIMIT",
    "MAX_LIMIT",
    "MAX_OFFSET",
    "MAX_QUERY_CHARS",
    "SearchPage",
    "default_cell",
    "parameter_set_report",
    "read_bound",
    "read_columns",
    "search",
]
