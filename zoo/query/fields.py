"""The registry of query fields: the one place that says what a query can ask about.

Every field of the query language (``zoo/query/parser.py``) is a ``Field`` here, made from one
entry of the registry of invariants (``zoo/core/registry.py``): its name and aliases, the level it
belongs to (class, reading or parameter set, docs/theory/isomorphism.md), its value type, the
database columns that hold it (docs/architecture.md, "Schema"), a one-line description and an
example. The parser, its error messages, the compilation to SQL (``zoo/storage/querysql.py``), sort
keys, column selection and the page ``docs/query-language.md`` are all derived from it.

This module is pure: it names columns as ``table.column`` text and imports no database code.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass
from enum import Enum

from zoo.core import registry


class Level(Enum):
    """Where a field's value lives; a class matches when one of its members satisfies a query."""

    CLASS = "class"  # the same for every member of a class
    READING = "reading"  # depends on which place kind is called forward
    PARAMETER_SET = "parameter set"  # differs between parameter sets of one reading


class FieldType(Enum):
    """The value type of a field, which decides the comparisons and literals it accepts."""

    INTEGER = "integer"  # fits a 64-bit column
    BIG_INTEGER = "exact integer"  # any size: decimal text beside a sortable key
    FRACTION = "fraction"  # numerator and denominator columns, compared exactly
    BOOLEAN = "yes/no"


#: The database table behind each level (docs/architecture.md, "Schema").
LEVEL_TABLES: dict[Level, str] = {
    Level.CLASS: "classes",
    Level.READING: "readings",
    Level.PARAMETER_SET: "parameter_sets",
}


@dataclass(frozen=True)
class Field:
    """One query field.

    ``columns`` names the stored columns as ``table.column``: one column for integers and
    booleans, (decimal text, sortable key) for exact integers, (numerator, denominator) for
    fractions. A class-level field may live on the class's frame (table ``frames``).
    """

    name: str
    aliases: tuple[str, ...]
    level: Level
    type: FieldType
    columns: tuple[str, ...]
    description: str
    example: str

    def __post_init__(self) -> None:
        expected = {FieldType.BIG_INTEGER: 2, FieldType.FRACTION: 2}.get(self.type, 1)
        if len(self.columns) != expected:
            raise ValueError(f"field {self.name}: {self.type.value} needs {expected} column(s)")
        for column in self.columns:
            table, _, name = column.partition(".")
            if not name or table not in (*LEVEL_TABLES.values(), "frames"):
                raise ValueError(f"field {self.name}: column {column!r} is not table.column")

    @property
    def tables(self) -> frozenset[str]:
        """The tables this field reads."""
        return frozenset(column.partition(".")[0] for column in self.columns)

    @property
    def spellings(self) -> tuple[str, ...]:
        """The name followed by the aliases, every spelling a query may use."""
        return (self.name, *self.aliases)


def _field(inv: registry.Invariant) -> Field:
    """The query field of a registry invariant: a frame value is asked about per class."""
    level = _QUERY_LEVEL[inv.level]
    columns = tuple(f"{inv.table}.{column}" for column in inv.columns)
    return Field(
        inv.field_name, inv.aliases, level, _QUERY_TYPE[inv.type], columns, inv.meaning, inv.example
    )


_QUERY_LEVEL: dict[registry.Level, Level] = {
    registry.Level.CLASS: Level.CLASS,
    registry.Level.FRAME: Level.CLASS,  # the frame of a class is one value per class
    registry.Level.READING: Level.READING,
    registry.Level.PARAMETER_SET: Level.PARAMETER_SET,
}
_QUERY_TYPE: dict[registry.ValueType, FieldType] = {
    registry.ValueType.INTEGER: FieldType.INTEGER,
    registry.ValueType.BIG_INTEGER: FieldType.BIG_INTEGER,
    registry.ValueType.FRACTION: FieldType.FRACTION,
    registry.ValueType.BOOLEAN: FieldType.BOOLEAN,
}

#: Every field, in the order of the documentation: class level, reading level, parameter level;
#: derived from the registry of invariants (``zoo.core.registry``), which holds the meanings.
FIELDS: tuple[Field, ...] = tuple(_field(inv) for inv in registry.INVARIANTS if inv.query)

_BY_SPELLING: dict[str, Field] = {
    spelling.casefold(): field for field in FIELDS for spelling in field.spellings
}


def field_named(spelling: str) -> Field | None:
    """The field a query spelling (name or alias, any letter case) means, or None."""
    return _BY_SPELLING.get(spelling.casefold())


def require_field(name: str) -> Field:
    """The field with this canonical name or alias; KeyError for a name not in the registry."""
    field = field_named(name)
    if field is None:
        raise KeyError(f"no query field named {name!r}")
    return field


def field_list_text() -> str:
    """All fields as one comma-separated line, aliases in parentheses, for error messages."""
    parts = []
    for field in FIELDS:
        aliases = f" ({', '.join(field.aliases)})" if field.aliases else ""
        parts.append(field.name + aliases)
    return ", ".join(parts)


def closest_field(spelling: str) -> Field | None:
    """The field whose spelling is closest to a mistyped one, if any is close enough."""
    matches = difflib.get_close_matches(spelling.casefold(), list(_BY_SPELLING), n=1, cutoff=0.7)
    return _BY_SPELLING[matches[0]] if matches else None


def render_field_table(level: Level) -> str:
    """The Markdown table of the fields of one level, for docs/query-language.md."""
    lines = [
        "| field | aliases | type | description | example |",
        "|---|---|---|---|---|",
    ]
    for field in FIELDS:
        if field.level is level:
            aliases = ", ".join(f"`{a}`" for a in field.aliases)
            description = field.description.replace("|", "\\|")  # a bar would end the cell
            lines.append(
                f"| `{field.name}` | {aliases} | {field.type.value} | {description} "
                f"| `{field.example}` |"
            )
    return "\n".join(lines)
