"""The registry of query fields: the one place that says what a query can ask about.

Every field of the query language (``zoo/query/parser.py``) is a ``Field`` here: its name and
aliases, the level it belongs to (class, reading or parameter set, docs/theory/isomorphism.md), its
value type,
the database columns that hold it (docs/architecture.md, "Schema"), a one-line description and an
example. The parser, its error messages, the compilation to SQL (``zoo/storage/querysql.py``), sort
keys, column selection and the page ``docs/query-language.md`` are all derived from it.

This module is pure: it names columns as ``table.column`` text and imports no database code.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass
from enum import Enum


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


def _f(
    name: str,
    level: Level,
    type_: FieldType,
    columns: str,
    description: str,
    example: str,
    aliases: tuple[str, ...] = (),
) -> Field:
    table = "frames" if columns.startswith("frames.") else LEVEL_TABLES[level]
    names = tuple(c if "." in c else f"{table}.{c}" for c in columns.split())
    return Field(name, aliases, level, type_, names, description, example)


_C, _R, _P = Level.CLASS, Level.READING, Level.PARAMETER_SET
_INT, _BIG, _FRAC, _BOOL = (
    FieldType.INTEGER,
    FieldType.BIG_INTEGER,
    FieldType.FRACTION,
    FieldType.BOOLEAN,
)

#: Every field, in the order of the documentation: class level, reading level, parameter level.
FIELDS: tuple[Field, ...] = (
    _f("area", _C, _INT, "area",
       "number of transitions A = αδ + βγ", "area <= 30"),
    _f("loop", _C, _INT, "loop",
       "length of a shortest cycle, in transitions"
       " (docs/theory/minimal-cycle-length.md)", "loop = 5",
       aliases=("cyc",)),
    _f("states", _C, _BIG, "states states_key",
       "reachable markings of the system, exact (docs/theory/state-counts.md)", "states > 10^20"),
    _f("state_arcs", _C, _BIG, "state_arcs state_arcs_key",
       "arcs of the reachability graph, exact"
       " (docs/theory/state-counts.md)", "state_arcs in 100..1000"),
    _f("tokens", _C, _INT, "tokens",
       "tokens of the initial marking, α + β", "tokens = 4"),
    _f("enabled", _C, _INT, "enabled",
       "transitions enabled at the initial marking, min(α, β)"
       " (docs/theory/initial-marking.md)", "enabled >= 2"),
    _f("semi_enabled", _C, _INT, "semi_enabled",
       "transitions with exactly one marked input place at the initial marking, |α − β|",
       "semi_enabled = 0"),
    _f("automorphisms", _C, _BIG, "automorphisms automorphisms_key",
       "order of the automorphism group of the marked net, exact", "automorphisms > 1"),
    _f("net_automorphisms", _C, _BIG, "frames.automorphisms frames.automorphisms_key",
       "order of the automorphism group of the unmarked net (the frame), exact",
       "net_automorphisms >= 20"),
    _f("cycle_time", _C, _FRAC, "cycle_time_num cycle_time_den",
       "time between two firings of a transition at one time unit per firing, A / min(α, β)",
       "cycle_time <= 7/2"),
    _f("group_d1", _C, _INT, "group_d1",
       "d1 of the transition group Z_d1 × Z_(A/d1), gcd(α, β, γ, δ) (docs/theory/lattice-key.md)",
       "group_d1 > 1"),
    _f("cyclic", _C, _BOOL, "cyclic",
       "the transition group is cyclic (group_d1 = 1)", "not cyclic"),
    _f("iteration", _C, _INT, "iteration",
       "largest n such that the system is an n-fold iteration of a smaller one"
       " (docs/theory/iterations.md)",
       "iteration >= 2"),
    _f("readings", _C, _INT, "reading_count",
       "readings in the class: 1, or 2 when the swap gives a different reading",
       "readings = 1"),
    _f("members", _C, _INT, "member_count",
       "parameter sets in the class", "members in 2..4"),
    _f("alpha", _R, _INT, "alpha",
       "tokens on backward places (free slots, gaps)", "alpha = 4", aliases=("α",)),
    _f("beta", _R, _INT, "beta",
       "tokens on forward places (items, cars)", "β in (1, 2)", aliases=("β",)),
    _f("processes", _R, _INT, "processes",
       "sequential processes: the forward cycles, gcd(β, δ)"
       " (docs/theory/processes.md)", "processes = 3"),
    _f("regular", _R, _BOOL, "regular",
       "β divides δ: every forward cycle carries one token (docs/theory/processes.md)", "regular"),
    _f("slowness", _R, _FRAC, "slowness_num slowness_den",
       "Petri's slowness (α − β)/(α + β) (docs/theory/state-counts.md)", "slowness in -1/5..1/3"),
    _f("forward_count", _R, _INT, "forward_count",
       "forward cycles, gcd(β, δ) (docs/theory/processes.md)", "forward_count >= 2"),
    _f("forward_length", _R, _INT, "forward_length",
       "length of each forward cycle, A / gcd(β, δ)", "forward_length < 10"),
    _f("forward_tokens", _R, _INT, "forward_tokens",
       "tokens on each forward cycle, β / gcd(β, δ)", "forward_tokens = 1"),
    _f("backward_count", _R, _INT, "backward_count",
       "backward cycles, gcd(α, γ) (docs/theory/processes.md)", "backward_count = 1"),
    _f("backward_length", _R, _INT, "backward_length",
       "length of each backward cycle, A / gcd(α, γ)", "backward_length != 12"),
    _f("backward_tokens", _R, _INT, "backward_tokens",
       "tokens on each backward cycle, α / gcd(α, γ)", "backward_tokens > 1"),
    _f("gamma", _P, _INT, "gamma",
       "the third parameter γ (forward offset)", "gamma = 1", aliases=("γ",)),
    _f("delta", _P, _INT, "delta",
       "the fourth parameter δ (backward offset)", "δ <= 3", aliases=("δ",)),
)  # fmt: skip

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
