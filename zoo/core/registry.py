"""The registry of invariants: the one place that says what zoo computes, stores and reports.

Every value a catalog entry carries is an ``Invariant`` here: its name, the level it belongs to
(class, reading, frame or parameter set; docs/theory/isomorphism.md), its value type, its JSON key,
its table label, unit, meaning, published source and how it is computed. The other places derive
from this tuple:

* the stored columns of ``zoo/storage/models.py`` (``Invariant.columns``, generated there) and
  the rows a build writes (``models.stored_row`` from the values ``zoo/catalog/classify.py``
  computes with ``compute``);
* the query fields of ``zoo/query/fields.py`` (and so the parser, the SQL, ``--columns``, sort
  keys and ``docs/query-language.md``);
* the JSON keys of the catalog entries (``zoo/core/entries.py``) and the table labels of
  ``zoo show``;
* the field table of ``docs/catalog.md`` (``render_invariant_table``, ``python -m
  zoo.core.registry``).

``tests/core/test_registry.py`` fails when an invariant is missing from any of these places.

Adding an invariant is: its formula with its source (``zoo/core/invariants.py``), one entry
here, a migration, and a check value (DEVELOPERS.md, "Adding an invariant").

The module is core and pure: it names columns as text and imports no database code.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from enum import Enum
from fractions import Fraction
from math import gcd
from typing import Any, cast

from zoo.core import algebra, invariants
from zoo.core.iterations import class_iteration_bases
from zoo.core.params import ParameterSet


class Level(Enum):
    """Where a value lives (docs/theory/isomorphism.md)."""

    CLASS = "class"  # the same for every member of a class (isomorphic marked nets)
    READING = "reading"  # depends on which place kind is called forward
    FRAME = "frame"  # a property of the unmarked net, shared by the classes on one frame
    PARAMETER_SET = "parameter set"  # differs between parameter sets of one reading


class ValueType(Enum):
    """The value type, which decides the stored columns, the JSON form and the comparisons."""

    INTEGER = "integer"  # fits a 64-bit column; a JSON integer
    BIG_INTEGER = "exact integer"  # any size: decimal text beside a sortable key; a JSON integer
    FRACTION = "fraction"  # numerator and denominator columns; JSON "num/den" plus <key>_float
    BOOLEAN = "yes/no"
    TEXT = "text"  # a parameter-set label C(a,b,c,d), computed as a ParameterSet


#: The table that holds each level's stored values (docs/architecture.md, "Schema").
LEVEL_TABLES: dict[Level, str] = {
    Level.CLASS: "classes",
    Level.READING: "readings",
    Level.FRAME: "frames",
    Level.PARAMETER_SET: "parameter_sets",
}

#: How the class value is made from the values of its readings. The classes of the exceptional
#: (2,-2) family join readings whose typed structure differs (docs/theory/isomorphism.md): a
#: class is an n-fold iteration, or has a non-cyclic group, when one of its readings is.
FIRST, LARGEST, EVERY = "label", "largest over the readings", "true of every reading"

Value = int | bool | Fraction | ParameterSet | str | None  # str: a label as stored; None: empty


@dataclass(frozen=True)
class Invariant:
    """One invariant (or counted or structural value) of a catalog entry.

    ``compute`` gives the value of one parameter set (the formula, with its source in
    ``source``); for a class-level invariant ``over_readings`` says how the class value is made
    from the labels of its readings. ``compute`` is None for what is not a formula of the
    parameters: nauty's automorphism orders and the counts of members and readings.
    ``column`` is the stored column (its base name for two-column types); ``structural`` marks
    the key columns that the tables define themselves (area, the parameters). ``query`` is
    False for a stored value that the query language does not ask about.
    """

    name: str  # the query field name and the catalog JSON key
    level: Level
    type: ValueType
    label: str  # the table label
    unit: str
    meaning: str
    source: str
    compute: Callable[[ParameterSet], Value] | None
    column: str
    example: str = ""
    aliases: tuple[str, ...] = ()
    json_key: str | None = None  # when the JSON key differs from the name
    over_readings: str = FIRST
    indexed: bool = False
    structural: bool = False
    query: bool = True
    json_pair: bool = False  # JSON writes the pair [value, A/value] (the transition group)
    nullable: bool = False  # may be empty: not decided for this entry (the behaviour bound)

    @property
    def key(self) -> str:
        """The JSON key of this invariant in a catalog entry and in ``zoo show`` (a dotted key
        names a member of a nested object: ``forward_cycles.count``)."""
        return self.json_key or self.name

    @property
    def field_name(self) -> str:
        """The name of this invariant's query field: its name."""
        return self.name

    @property
    def table(self) -> str:
        return LEVEL_TABLES[self.level]

    @property
    def columns(self) -> tuple[str, ...]:
        """The stored columns: one, (text, sortable key) for exact integers, (num, den) for
        fractions."""
        if self.type is ValueType.BIG_INTEGER:
            return (self.column, f"{self.column}_key")
        if self.type is ValueType.FRACTION:
            return (f"{self.column}_num", f"{self.column}_den")
        return (self.column,)

    def of_params(self, p: ParameterSet) -> Value:
        """The value of one parameter set (of its reading, for a reading-level invariant)."""
        if self.compute is None:
            raise ValueError(f"{self.name} is not a formula of the parameters")
        return self.compute(p)

    def of_class(self, readings: tuple[ParameterSet, ...]) -> Value:
        """The class value from the labels of its readings (the first is the class label)."""
        if self.compute is None:
            raise ValueError(f"{self.name} is not a formula of the parameters")
        if self.over_readings == LARGEST:
            return max(cast(int, self.compute(r)) for r in readings)
        if self.over_readings == EVERY:
            return all(self.compute(r) for r in readings)
        return self.compute(readings[0])


def _group_d1(p: ParameterSet) -> int:
    return algebra.transition_group(p)[0]


_C, _R, _F, _P = Level.CLASS, Level.READING, Level.FRAME, Level.PARAMETER_SET
_INT, _BIG, _FRAC, _BOOL, _TEXT = (
    ValueType.INTEGER,
    ValueType.BIG_INTEGER,
    ValueType.FRACTION,
    ValueType.BOOLEAN,
    ValueType.TEXT,
)
_NAUTY = "nauty canonical form (docs/theory/isomorphism.md)"

#: Every invariant, in the order of the catalog JSON and of the documentation.
INVARIANTS: tuple[Invariant, ...] = (
    Invariant("area", _C, _INT, "area (transitions)", "transitions",
              "number of transitions A = αδ + βγ", "docs/theory/folding.md",
              lambda p: p.area, "area", "area <= 30", structural=True),
    Invariant("loop", _C, _INT, "loop (shortest cycle)", "transitions",
              "length of a shortest cycle, in transitions (docs/theory/minimal-cycle-length.md)",
              "docs/theory/minimal-cycle-length.md (exact lattice algorithm)",
              invariants.minimal_cycle_length, "loop", "loop = 5", aliases=("cyc",),
              indexed=True),
    Invariant("states", _C, _BIG, "reachable states", "markings",
              "reachable markings of the system, exact (docs/theory/state-counts.md)",
              "docs/theory/state-counts.md: A·C(α+β, α)/(α+β)",
              invariants.reachable_state_count, "states", "states > 10^20", indexed=True),
    Invariant("state_arcs", _C, _BIG, "state arcs", "arcs",
              "arcs of the reachability graph, exact (docs/theory/state-counts.md)",
              "docs/theory/state-counts.md: A·C(α+β−2, α−1)",
              invariants.state_arc_count, "state_arcs", "state_arcs in 100..1000"),
    Invariant("automorphisms", _C, _BIG, "automorphisms (marked net)", "permutations",
              "order of the automorphism group of the marked net, exact", _NAUTY,
              None, "automorphisms", "automorphisms > 1", indexed=True),
    Invariant("net_automorphisms", _F, _BIG, "automorphisms (net)", "permutations",
              "order of the automorphism group of the unmarked net (the frame), exact", _NAUTY,
              None, "automorphisms", "net_automorphisms >= 20"),
    Invariant("tokens", _C, _INT, "tokens", "tokens",
              "tokens of the initial marking, α + β", "docs/theory/initial-marking.md",
              lambda p: p.alpha + p.beta, "tokens", "tokens = 4"),
    Invariant("enabled", _C, _INT, "enabled at M0", "transitions",
              "transitions enabled at the initial marking, min(α, β)"
              " (docs/theory/initial-marking.md)", "docs/theory/initial-marking.md",
              invariants.enabled_count, "enabled", "enabled >= 2"),
    Invariant("semi_enabled", _C, _INT, "semi-enabled at M0", "transitions",
              "transitions with exactly one marked input place at the initial marking, |α − β|",
              "docs/theory/initial-marking.md",
              invariants.semi_enabled_count, "semi_enabled", "semi_enabled = 0"),
    Invariant("cycle_time", _C, _FRAC, "cycle time", "time units",
              "time between two firings of a transition at one time unit per firing, A / min(α, β)",
              "derived; common practice for timed marked graphs (zoo.core.invariants.cycle_time)",
              invariants.cycle_time, "cycle_time", "cycle_time <= 7/2"),
    Invariant("group_d1", _C, _INT, "transition group", "",
              "d1 of the transition group Z_d1 × Z_(A/d1), gcd(α, β, γ, δ)"
              " (docs/theory/lattice-key.md)", "docs/theory/lattice-key.md (Smith normal form)",
              _group_d1, "group_d1", "group_d1 > 1", json_key="group", over_readings=LARGEST,
              json_pair=True),
    Invariant("cyclic", _C, _BOOL, "cyclic group", "",
              "the transition group is cyclic (group_d1 = 1)", "docs/theory/lattice-key.md",
              lambda p: _group_d1(p) == 1, "cyclic", "not cyclic", over_readings=EVERY),
    Invariant("iteration", _C, _INT, "iteration depth", "",
              "largest n such that the system is an n-fold iteration of a smaller one"
              " (docs/theory/iterations.md)", "docs/theory/iterations.md",
              algebra.iteration_depth, "iteration", "iteration >= 2", over_readings=LARGEST),
    Invariant("iterates", _C, _INT, "iteration of (count)", "classes",
              "number of classes of which this class is an n-fold temporal iteration, n >= 2"
              " (docs/theory/iterations.md)", "docs/theory/iterations.md",
              lambda p: len(class_iteration_bases(p)), "iterates", "iterates >= 1"),
    Invariant("behaviour_count", _C, _INT, "behaving alike (count)", "classes",
              "stored classes whose reachability graph is isomorphic to this one's, itself"
              " included; empty above the catalog's state bound (docs/theory/behaviour.md)",
              "counted by the build over the stored classes, checked with explicit isomorphisms"
              " (docs/theory/behaviour.md)", None, "behaviour_count",
              "behaviour_count > 1", json_key="behaviour.count", nullable=True),
    Invariant("reading_count", _C, _INT, "number of readings", "readings",
              "number of readings in the class: 1, or 2 when the swap gives a different reading",
              "counted by the classification (docs/theory/isomorphism.md)",
              None, "reading_count", "reading_count = 1", aliases=("readings",)),
    Invariant("member_count", _C, _INT, "number of members", "parameter sets",
              "number of parameter sets in the class",
              "counted by the classification",
              None, "member_count", "member_count in 2..4", aliases=("members",)),
    Invariant("alpha", _R, _INT, "α", "tokens",
              "tokens on backward places (free slots, gaps)", "docs/theory/initial-marking.md",
              lambda p: p.alpha, "alpha", "alpha = 4", aliases=("α",), structural=True),
    Invariant("beta", _R, _INT, "β", "tokens",
              "tokens on forward places (items, cars)", "docs/theory/initial-marking.md",
              lambda p: p.beta, "beta", "β in (1, 2)", aliases=("β",), structural=True),
    Invariant("processes", _R, _INT, "processes", "processes",
              "sequential processes: the forward cycles, gcd(β, δ) (docs/theory/processes.md)",
              "docs/theory/processes.md; [FR24] abstract",
              invariants.process_count, "processes", "processes = 3"),
    Invariant("regular", _R, _BOOL, "regular", "",
              "β divides δ: every forward cycle carries one token (docs/theory/processes.md)",
              "docs/theory/processes.md", invariants.is_regular, "regular", "regular"),
    Invariant("slowness", _R, _FRAC, "slowness", "",
              "Petri's slowness (α − β)/(α + β) (docs/theory/state-counts.md)",
              "[P18] §1; docs/theory/state-counts.md",
              invariants.slowness, "slowness", "slowness in -1/5..1/3"),
    Invariant("forward_count", _R, _INT, "fwd cycles", "cycles",
              "forward cycles, gcd(β, δ) (docs/theory/processes.md)", "docs/theory/processes.md",
              invariants.process_count, "forward_count", "forward_count >= 2",
              json_key="forward_cycles.count"),
    Invariant("forward_length", _R, _INT, "fwd length", "transitions",
              "length of each forward cycle, A / gcd(β, δ)", "docs/theory/processes.md",
              lambda p: p.area // gcd(p.beta, p.delta), "forward_length",
              "forward_length < 10", json_key="forward_cycles.length"),
    Invariant("forward_tokens", _R, _INT, "fwd tokens", "tokens",
              "tokens on each forward cycle, β / gcd(β, δ)", "docs/theory/processes.md",
              lambda p: p.beta // gcd(p.beta, p.delta), "forward_tokens",
              "forward_tokens = 1", json_key="forward_cycles.tokens"),
    Invariant("backward_count", _R, _INT, "bwd cycles", "cycles",
              "backward cycles, gcd(α, γ) (docs/theory/processes.md)", "docs/theory/processes.md",
              lambda p: gcd(p.alpha, p.gamma), "backward_count",
              "backward_count = 1", json_key="backward_cycles.count"),
    Invariant("backward_length", _R, _INT, "bwd length", "transitions",
              "length of each backward cycle, A / gcd(α, γ)", "docs/theory/processes.md",
              lambda p: p.area // gcd(p.alpha, p.gamma), "backward_length",
              "backward_length != 12", json_key="backward_cycles.length"),
    Invariant("backward_tokens", _R, _INT, "bwd tokens", "tokens",
              "tokens on each backward cycle, α / gcd(α, γ)", "docs/theory/processes.md",
              lambda p: p.alpha // gcd(p.alpha, p.gamma), "backward_tokens",
              "backward_tokens > 1", json_key="backward_cycles.tokens"),
    Invariant("normal_form_beta_delta", _R, _TEXT, "NF_bd", "",
              "normal form by β- and δ-steps", "docs/theory/normal-forms.md",
              algebra.normal_form_beta_delta, "nf_beta_delta", query=False),
    Invariant("normal_form_alpha_gamma", _R, _TEXT, "NF_ag", "",
              "normal form by α- and γ-steps", "docs/theory/normal-forms.md",
              algebra.normal_form_alpha_gamma, "nf_alpha_gamma", query=False),
    Invariant("gamma", _P, _INT, "γ", "transitions",
              "the third parameter γ (forward offset)", "docs/theory/folding.md",
              lambda p: p.gamma, "gamma", "gamma = 1", aliases=("γ",), structural=True),
    Invariant("delta", _P, _INT, "δ", "transitions",
              "the fourth parameter δ (backward offset)", "docs/theory/folding.md",
              lambda p: p.delta, "delta", "δ <= 3", aliases=("δ",), structural=True),
)  # fmt: skip

_BY_NAME: dict[str, Invariant] = {inv.name: inv for inv in INVARIANTS}


def invariant(name: str) -> Invariant:
    """The registry entry with this name; KeyError for a name not in the registry."""
    return _BY_NAME[name]


def of_level(level: Level) -> tuple[Invariant, ...]:
    """The invariants of one level, in registry order."""
    return tuple(inv for inv in INVARIANTS if inv.level is level)


def stored_on(table: str) -> tuple[Invariant, ...]:
    """The invariants whose columns the registry adds to ``table`` (not the structural keys)."""
    return _STORED_ON.get(table, ())


_STORED_ON: dict[str, tuple[Invariant, ...]] = {
    table: tuple(inv for inv in INVARIANTS if inv.table == table and not inv.structural)
    for table in LEVEL_TABLES.values()
}


def json_value(inv: Invariant, value: Value, area: int) -> object:
    """A value as the JSON of catalog entries and ``zoo show`` writes it: fractions as
    ``"num/den"`` (denominator always written), the transition group as ``[d1, A/d1]``.

    >>> json_value(invariant("slowness"), Fraction(0), 8), json_value(invariant("group_d1"), 2, 8)
    ('0/1', [2, 4])
    """
    if inv.json_pair and isinstance(value, int):
        return [value, area // value]
    if isinstance(value, Fraction):
        return f"{value.numerator}/{value.denominator}"
    if isinstance(value, ParameterSet):
        return str(value)
    return value


def value_in(obj: Mapping[str, Any], inv: Invariant) -> Any:
    """The value of an invariant in a JSON object, following a dotted key; KeyError if absent."""
    value: Any = obj
    for part in inv.key.split("."):
        value = value[part]
    return value


def render_invariant_table() -> str:
    """The Markdown table of every invariant, for docs/catalog.md ("Fields of an entry")."""
    lines = [
        "| name | level | type | JSON key | query field | unit | meaning | source |",
        "|---|---|---|---|---|---|---|---|",
    ]
    for inv in INVARIANTS:
        query = f"`{inv.field_name}`" if inv.query else "—"
        if inv.query and inv.aliases:
            query += " (" + ", ".join(f"`{a}`" for a in inv.aliases) + ")"
        cells = (
            f"`{inv.name}`",
            inv.level.value,
            inv.type.value,
            f"`{inv.key}`",
            query,
            inv.unit or "—",
            inv.meaning.replace("|", "\\|"),
            inv.source.replace("|", "\\|"),
        )
        lines.append("| " + " | ".join(cells) + " |")
    return "\n".join(lines)


def group_text(d1: int, order: int) -> str:
    """The one notation of a transition group Z_d1 × Z_(A/d1): ``Z_8``, ``Z_2 × Z_4``.

    >>> group_text(1, 16), group_text(2, 4)
    ('Z_16', 'Z_2 × Z_4')
    """
    return f"Z_{order}" if d1 == 1 else f"Z_{d1} × Z_{order}"


__all__ = [
    "EVERY",
    "FIRST",
    "INVARIANTS",
    "LARGEST",
    "LEVEL_TABLES",
    "Invariant",
    "Level",
    "ValueType",
    "group_text",
    "render_invariant_table",
    "invariant",
    "json_value",
    "value_in",
    "of_level",
    "stored_on",
]


if __name__ == "__main__":  # python -m zoo.core.registry: the table of docs/catalog.md
    print(render_invariant_table())
