"""The columns of a CSV dump and the data dictionary shipped with every dump and release.

A CSV dump has **one row per reading** (a class read with one choice of forward places;
docs/theory/isomorphism.md) and one column per value, never a JSON blob: the class's values are
repeated on each of its rows, then the reading's own values (``alpha``, ``beta``, ``processes``,
``regular``, ...). Columns that are query fields carry the query field's name and meaning
(zoo/query/fields.py), so a column means in a CSV what its name means in ``zoo find``.

Cell conventions: integers as decimal digits however long, fractions in lowest terms as
``num/den`` and as ``n`` when whole (``2``, not ``2/1``), booleans ``true``/``false``, lists of
labels or names space-separated.

The data dictionary is a Frictionless Data Package (https://specs.frictionlessdata.io/,
Data Package and Table Schema v1): ``datapackage.json`` beside the data files, one resource per
file; the CSV resource has a Table Schema with each column's name, type and description, and
the properties ``unit`` and ``source`` of our own (the specs allow extra properties).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterator
from dataclasses import dataclass
from typing import Any

from zoo.query.fields import FieldType, field_named
from zoo.version import DISTRIBUTION_NAME, HOMEPAGE, __version__

#: Fields of a JSON Lines record that are exact integers of any size (query type "exact
#: integer"). Each is followed by ``<name>_decimal``, the same number as a decimal string,
#: because common JSON tools (JavaScript's JSON.parse, jq before 1.7) read numbers as
#: IEEE doubles and silently round integers beyond 2^53.
BIG_INTEGER_FIELDS = tuple(
    name
    for name in ("states", "state_arcs", "automorphisms", "net_automorphisms")
    if (f := field_named(name)) is not None and f.type is FieldType.BIG_INTEGER
)
DECIMAL_SUFFIX = "_decimal"

_FRACTION = re.compile(r"(-?\d+)/(\d+)")


def fraction_cell(text: str) -> str:
    """A fraction as CSV text: ``num/den``, or the whole number when the denominator is 1.

    >>> fraction_cell("2/1"), fraction_cell("-1/3"), fraction_cell("0/1")
    ('2', '-1/3', '0')
    """
    match = _FRACTION.fullmatch(text)
    if match and match.group(2) == "1":
        return match.group(1)
    return text


@dataclass(frozen=True)
class Column:
    """One CSV column: where its value comes from and what the data dictionary says of it."""

    name: str
    type: str  # Table Schema type: string, integer, number, boolean
    get: Callable[[dict[str, Any], dict[str, Any]], Any]  # (class record, reading) -> value
    description: str
    unit: str
    source: str
    fraction: bool = False

    def cell(self, record: dict[str, Any], reading: dict[str, Any]) -> str:
        value = self.get(record, reading)
        if value is None:
            return ""
        if isinstance(value, bool):
            return "true" if value else "false"
        if isinstance(value, (list, tuple)):
            return " ".join(str(item) for item in value)
        if self.fraction:
            return fraction_cell(str(value))
        return str(value)


_ALGEBRA = "closed formula of the parameters, computed by zoo"
_GRAPH = "counted exactly by zoo on the reachability graph"
_NAUTY = "computed by zoo with nauty (canonical form and automorphism group)"
_CATALOG = "assigned by the zoo catalog (docs/citing.md)"


def _class(name: str, key: str | None = None) -> Callable[[dict[str, Any], dict[str, Any]], Any]:
    return lambda record, reading: record[key or name]


def _reading(key: str) -> Callable[[dict[str, Any], dict[str, Any]], Any]:
    return lambda record, reading: reading[key]


def _query_column(
    name: str,
    key: str,
    level: str,
    unit: str,
    source: str,
    type_: str = "integer",
    get: Callable[[dict[str, Any], dict[str, Any]], Any] | None = None,
) -> Column:
    """A column that is a query field: its description is the field's."""
    field = field_named(name)
    assert field is not None, name
    fraction = field.type is FieldType.FRACTION
    if field.type is FieldType.BOOLEAN:
        type_ = "boolean"
    elif fraction:
        type_ = "string"
    if get is None:
        get = _class(name, key) if level == "class" else _reading(key)
    return Column(name, type_, get, field.description, unit, source, fraction)


#: Every column of a CSV dump, in order: class values, then reading values.
CSV_COLUMNS: tuple[Column, ...] = (
    Column("id", "string", _class("id"), "class identifier CY{area}-{rank}", "none", _CATALOG),
    Column("label", "string", _class("label"),
           "the class's smallest parameter set C(α,β,γ,δ)", "none", _CATALOG),
    _query_column("area", "area", "class", "transitions", _ALGEBRA),
    Column("frame_id", "string", _class("frame_id"),
           "identifier FR{area}-{rank} of the unmarked net (frame) the class lies on", "none",
           _CATALOG),
    Column("fingerprint", "string", _class("fingerprint"),
           "encoding version and SHA-256 of the portable canonical form of the marked net",
           "none", _NAUTY),
    _query_column("loop", "loop", "class", "transitions", _ALGEBRA),
    _query_column("states", "states", "class", "markings", _GRAPH),
    _query_column("state_arcs", "state_arcs", "class", "arcs", _GRAPH),
    _query_column("automorphisms", "automorphisms", "class", "automorphisms", _NAUTY),
    _query_column("net_automorphisms", "net_automorphisms", "class", "automorphisms", _NAUTY),
    _query_column("tokens", "tokens", "class", "tokens", _ALGEBRA),
    _query_column("enabled", "enabled", "class", "transitions", _ALGEBRA),
    _query_column("semi_enabled", "semi_enabled", "class", "transitions", _ALGEBRA),
    _query_column("cycle_time", "cycle_time", "class", "time units (one per firing)", _ALGEBRA),
    Column("cycle_time_float", "number", _class("cycle_time_float"),
           "cycle_time as the nearest double (for plotting; cycle_time is exact)",
           "time units (one per firing)", _ALGEBRA),
    _query_column("group_d1", "group", "class", "none", _ALGEBRA,
                  get=lambda record, reading: record["group"][0]),
    Column("group_d2", "integer", lambda record, reading: record["group"][1],
           "d2 = A/d1 of the transition group Z_d1 × Z_d2", "none", _ALGEBRA),
    _query_column("cyclic", "cyclic", "class", "none", _ALGEBRA),
    _query_column("iteration", "iteration", "class", "none", _ALGEBRA),
    _query_column("iterates", "iterates", "class", "classes", _ALGEBRA),
    Column("behaviour_id", "string", lambda record, reading: record["behaviour"]["id"],
           "behaviour class BE{area}-{rank}, named after its first class; empty above the "
           "catalog's state bound (docs/theory/behaviour.md)", "none", _CATALOG),
    _query_column("behaviour_count", "behaviour_count", "class", "classes", _CATALOG,
                  get=lambda record, reading: record["behaviour"]["count"]),
    _query_column("readings", "reading_count", "class", "readings", _CATALOG),
    _query_column("members", "member_count", "class", "parameter sets", _CATALOG),
    Column("seeds", "string", lambda record, reading: [s["name"] for s in record["seeds"]],
           "names of the named examples (seeds) in this class, space-separated", "none",
           "zoo's seed files (docs/seeds.md)"),
    Column("reading_label", "string", _reading("label"),
           "the reading's smallest parameter set C(α,β,γ,δ)", "none", _CATALOG),
    _query_column("alpha", "alpha", "reading", "tokens", "parameter α of the reading"),
    _query_column("beta", "beta", "reading", "tokens", "parameter β of the reading"),
    Column("tokens_forward", "integer", _reading("tokens_forward"),
           "tokens on forward places, β", "tokens", _ALGEBRA),
    Column("tokens_backward", "integer", _reading("tokens_backward"),
           "tokens on backward places, α", "tokens", _ALGEBRA),
    Column("lattice_g", "integer", lambda record, reading: reading["lattice_key"][1],
           "g of the lattice key (A, g, r) of the reading (docs/theory/lattice-key.md)", "none",
           _ALGEBRA),
    Column("lattice_r", "integer", lambda record, reading: reading["lattice_key"][2],
           "r of the lattice key (A, g, r) of the reading (docs/theory/lattice-key.md)", "none",
           _ALGEBRA),
    _query_column("processes", "processes", "reading", "processes", _ALGEBRA),
    _query_column("regular", "regular", "reading", "none", _ALGEBRA),
    _query_column("slowness", "slowness", "reading", "dimensionless ratio", _ALGEBRA),
    Column("slowness_float", "number", _reading("slowness_float"),
           "slowness as the nearest double (for plotting; slowness is exact)",
           "dimensionless ratio", _ALGEBRA),
    *(
        _query_column(f"{side}_{part}", f"{side}_{part}", "reading", unit, _ALGEBRA)
        for side in ("forward", "backward")
        for part, unit in (("count", "cycles"), ("length", "transitions"), ("tokens", "tokens"))
    ),
    Column("normal_form_beta_delta", "string", _reading("normal_form_beta_delta"),
           "normal form of the reading with β and δ reduced (docs/theory/normal-forms.md)",
           "none", _ALGEBRA),
    Column("normal_form_alpha_gamma", "string", _reading("normal_form_alpha_gamma"),
           "normal form of the reading with α and γ reduced (docs/theory/normal-forms.md)",
           "none", _ALGEBRA),
    Column("reading_members", "string", _reading("members"),
           "the parameter sets C(α,β,γ,δ) of the class with this reading, space-separated",
           "none", _CATALOG),
)  # fmt: skip


def _flat_cycles(reading: dict[str, Any]) -> dict[str, Any]:
    """The reading with its cycle objects flattened to forward_count, ... backward_tokens."""
    flat = dict(reading)
    for side in ("forward", "backward"):
        cycles = flat.get(f"{side}_cycles") or {}
        for part in ("count", "length", "tokens"):
            flat[f"{side}_{part}"] = cycles.get(part)
    return flat


def csv_rows(record: dict[str, Any]) -> Iterator[list[str]]:
    """The CSV rows of one class record (ClassEntry.as_dict): one per reading."""
    for reading in record["readings"]:
        flat = _flat_cycles(reading)
        yield [column.cell(record, flat) for column in CSV_COLUMNS]


def with_decimal_twins(record: dict[str, Any]) -> dict[str, Any]:
    """The JSON Lines record: every exact big integer followed by its ``_decimal`` string."""
    out: dict[str, Any] = {}
    for key, value in record.items():
        out[key] = value
        if key in BIG_INTEGER_FIELDS and isinstance(value, int):
            out[key + DECIMAL_SUFFIX] = str(value)
    return out


# --- the Data Package -------------------------------------------------------------------


def resource_name(file_name: str) -> str:
    """A Data Package resource name (lower case, digits, ``-._/``) for a file name; the whole
    name, so that a CSV and a JSON Lines dump of one stem stay apart.

    >>> resource_name("All Classes.CSV")
    'all-classes.csv'
    """
    name = re.sub(r"[^-a-z0-9._/]+", "-", file_name.lower()).strip("-")
    return name or "dump"


def table_schema() -> dict[str, Any]:
    """The Table Schema of a CSV dump."""
    fields = []
    for column in CSV_COLUMNS:
        field: dict[str, Any] = {
            "name": column.name,
            "type": column.type,
            "description": column.description,
            "unit": column.unit,
            "source": column.source,
        }
        if column.type == "boolean":
            field["trueValues"], field["falseValues"] = ["true"], ["false"]
        if column.fraction:
            field["constraints"] = {"pattern": r"-?\d+(/\d+)?"}
        fields.append(field)
    return {"fields": fields, "missingValues": [""]}


def dump_resource(file_name: str, fmt: str, size: int, sha256: str) -> dict[str, Any]:
    """The Data Package resource of one dump file."""
    if fmt == "csv":
        return {
            "name": resource_name(file_name),
            "path": file_name,
            "profile": "tabular-data-resource",
            "format": "csv",
            "mediatype": "text/csv",
            "encoding": "utf-8",
            "bytes": size,
            "hash": f"sha256:{sha256}",
            "description": "One row per reading of each class (a class has one or two "
            "readings); the class's values are repeated on each of its rows.",
            "dialect": {"delimiter": ",", "lineTerminator": "\r\n", "header": True},
            "schema": table_schema(),
        }
    twins = ", ".join(f"{name}{DECIMAL_SUFFIX}" for name in BIG_INTEGER_FIELDS)
    return {
        "name": resource_name(file_name),
        "path": file_name,
        "profile": "data-resource",
        "format": "jsonl",
        "mediatype": "application/jsonl",
        "encoding": "utf-8",
        "bytes": size,
        "hash": f"sha256:{sha256}",
        "description": "JSON Lines (https://jsonlines.org), one object per class: what "
        "`zoo show ID --format json` prints, with each exact big integer also written as a "
        f"decimal string ({twins}) for JSON tools that read numbers as doubles. The values "
        "mean what the columns of the same name in the CSV dump mean.",
    }


def data_package(resources: list[dict[str, Any]], complete_to: int | None) -> dict[str, Any]:
    """The ``datapackage.json`` descriptor of a dump or release."""
    package: dict[str, Any] = {
        "profile": "data-package",
        "name": "cycloid-catalog",
        "title": "Catalog of Petri's cycloids C(α,β,γ,δ)",
        "description": "Isomorphism classes of cycloid systems (safe marked graphs) with their "
        "invariants, one record per class, written by zoo"
        + (f"; complete to area {complete_to}." if complete_to is not None else "."),
        "homepage": HOMEPAGE,
        "version": __version__,
        "licenses": [
            {"name": "MIT", "path": "https://opensource.org/licenses/MIT", "title": "MIT License"}
        ],
        "contributors": [{"title": "zoo contributors", "role": "author"}],
        "resources": resources,
        "x-written-by": f"{DISTRIBUTION_NAME} {__version__}",
    }
    return package


__all__ = [
    "BIG_INTEGER_FIELDS",
    "CSV_COLUMNS",
    "DECIMAL_SUFFIX",
    "csv_rows",
    "data_package",
    "dump_resource",
    "fraction_cell",
    "table_schema",
    "with_decimal_twins",
]
