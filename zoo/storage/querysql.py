"""Compile query syntax trees (``zoo/query/parser.py``) to SQLAlchemy statements over the catalog.

Semantics (docs/query-language.md, "What a query matches"): the whole boolean expression is
evaluated for each member parameter set joined with its reading and its class, and a class
matches when at least one member satisfies it. ``compile_query`` builds

* ``SELECT classes.id FROM classes WHERE <condition>`` when only class-level fields occur
  (class-level values are the same for every member, and every class has a member);
* otherwise ``... WHERE EXISTS (SELECT 1 FROM readings [JOIN parameter_sets] WHERE
  readings.class_id = classes.id AND <condition>)``, joining the parameter sets only when a
  parameter-level field occurs. Top-level class-only conjuncts stay outside the subquery,
  where an index on the class table can serve them; that changes nothing, as they are
  constant over the members.

Why a correlated EXISTS and not ``classes.id IN (SELECT class_id FROM readings WHERE ...)``:
measured (median of 25 runs, ``SELECT count(*)`` of the statement) on a catalog of area ≤ 100
on SQLite, IN is faster where the reading condition is broad (``processes = 3 and area < 100``:
8 ms against 30 ms) but much slower where a class-level condition is narrow, because the IN list
is always computed over the whole readings (or parameter_sets) table (``area = 16 and
processes = 2``: 4.8 ms against 0.05 ms; ``area = 60 and gamma = 1``: 13 ms against 0.3 ms), and
slower for an ``or`` that mixes levels (31 ms against 21 ms). On PostgreSQL (area ≤ 40) both
forms become the same semi-join and take the same time (0.8 to 0.9 ms for the first query).
So EXISTS stays: no query gets slower by much, and narrow lookups stay instant.

Every literal is a bound parameter: exact big integers become their sortable key text
(``models.sortable_key``), fractions are compared by cross-multiplication in 64-bit integers
(denominators in the database are positive), and integers beyond any stored value fold to a
constant truth value (INTEGER columns are 32-bit on PostgreSQL).
"""

from __future__ import annotations

import operator
from collections.abc import Callable, Sequence
from fractions import Fraction
from typing import Any

from sqlalchemy import (
    BigInteger,
    Boolean,
    ColumnElement,
    Float,
    FromClause,
    Integer,
    Label,
    Select,
    String,
    Table,
    and_,
    case,
    cast,
    exists,
    false,
    func,
    literal,
    not_,
    or_,
    select,
    true,
)
from sqlalchemy.ext.compiler import compiles
from sqlalchemy.sql.visitors import InternalTraversal

from zoo.core import registry
from zoo.query.fields import Field, FieldType, Level, require_field
from zoo.query.parser import (
    And,
    BoolField,
    Comparison,
    Membership,
    Node,
    Not,
    Or,
    Range,
    Scoped,
    Value,
    iter_conditions,
    parse_field_names,
    parse_sort_key,
    referenced_fields,
)
from zoo.storage.models import Base, sortable_key

_TABLES = Base.metadata.tables
_CLASSES = _TABLES["classes"]
_FRAMES = _TABLES["frames"]
_READINGS = _TABLES["readings"]
_PARAMETER_SETS = _TABLES["parameter_sets"]

#: Integer columns are 32-bit on PostgreSQL (INTEGER) and every stored value fits them, so a
#: literal beyond this bound folds to true or false; binding it would fail there ("integer out
#: of range") while SQLite answers, and both stores must give the same answer.
_INTEGER_LIMIT = 2**31 - 1

_OPERATORS: dict[str, Callable[[Any, Any], ColumnElement[bool]]] = {
    "=": operator.eq,
    "!=": operator.ne,
    "<": operator.lt,
    "<=": operator.le,
    ">": operator.gt,
    ">=": operator.ge,
}
# Whether "column op value" holds for every stored value when the literal lies above all of
# them, and when it lies below all of them.
_HOLDS_BELOW_LITERAL = {"=": False, "!=": True, "<": True, "<=": True, ">": False, ">=": False}
_HOLDS_ABOVE_LITERAL = {"=": False, "!=": True, "<": False, "<=": False, ">": True, ">=": True}


#: Which table (or alias) stands for each catalog table in a condition; scopes use aliases.
Tables = dict[str, FromClause]


def _column(spec: str, tables: Tables | None = None) -> ColumnElement[Any]:
    """A field's column for conditions and sorting. An empty value (a count not decided, such
    as ``behaviour_count`` above the state bound) compares as 0, as docs/query-language.md
    says: a query never treats an undecided value as known, and never meets SQL's NULL."""
    table, _, name = spec.partition(".")
    source = tables.get(table) if tables else None
    column = (source if source is not None else _TABLES[table]).c[name]
    return func.coalesce(column, 0) if spec in _EMPTY_AS_ZERO else column


def _stored_column(spec: str) -> ColumnElement[Any]:
    """A field's column as stored (empty stays empty), for showing values."""
    table, _, name = spec.partition(".")
    return _TABLES[table].c[name]


#: The columns of the invariants that may be empty (zoo.core.registry, ``nullable``).
_EMPTY_AS_ZERO = frozenset(
    f"{inv.table}.{column}" for inv in registry.INVARIANTS if inv.nullable for column in inv.columns
)


#: Operands per SQL group: longer and/or lists are split into nested parenthesised groups, so
#: 1,000 terms have expression depth 4 rather than 1,000 (SQLite parses a flat 'a OR b OR c'
#: as a left-deep tree and refuses depth beyond 1,000).
_GROUP = 10


class _Parenthesised(ColumnElement[bool]):
    """A boolean clause in parentheses that SQLAlchemy keeps (it flattens nested and/or)."""

    inherit_cache = True
    type = Boolean()
    _traverse_internals = [("clause", InternalTraversal.dp_clauseelement)]

    def __init__(self, clause: ColumnElement[bool]) -> None:
        self.clause = clause


@compiles(_Parenthesised)
def _compile_parenthesised(element: _Parenthesised, compiler: Any, **kw: Any) -> str:
    return f"({compiler.process(element.clause, **kw)})"


def _grouped(
    combine: Callable[..., ColumnElement[bool]], clauses: Sequence[ColumnElement[bool]]
) -> list[ColumnElement[bool]]:
    """At most _GROUP clauses that ``combine`` like ``clauses``: nested parenthesised groups."""
    items = list(clauses)
    while len(items) > _GROUP:
        items = [
            _Parenthesised(combine(*items[i : i + _GROUP])) for i in range(0, len(items), _GROUP)
        ]
    return items


def _balanced(
    combine: Callable[..., ColumnElement[bool]], clauses: Sequence[ColumnElement[bool]]
) -> ColumnElement[bool]:
    """``combine(*clauses)`` as a balanced tree of parenthesised groups of at most _GROUP."""
    return combine(*_grouped(combine, clauses))


def _constant(value: bool) -> ColumnElement[bool]:
    return true() if value else false()


def _compare(
    field: Field, op: str, value: Value, tables: Tables | None = None
) -> ColumnElement[bool]:
    """One comparison ``field op value`` as SQL, with the literal bound."""
    compare = _OPERATORS[op]
    if field.type is FieldType.BOOLEAN:
        column = _column(field.columns[0], tables)
        wanted = bool(value) if op == "=" else not bool(value)
        return column == _constant(wanted)
    if field.type is FieldType.FRACTION:
        fraction = Fraction(value)
        numerator = cast(_column(field.columns[0], tables), BigInteger)
        denominator = cast(_column(field.columns[1], tables), BigInteger)
        # num/den op p/q  <=>  num*q op p*den, as den > 0 and q > 0: exact, no floating point.
        return compare(numerator * fraction.denominator, denominator * fraction.numerator)
    number = int(value)
    if field.type is FieldType.BIG_INTEGER:
        if number < 0:  # every stored count is >= 0, so it lies above the literal
            return _constant(_HOLDS_ABOVE_LITERAL[op])
        return compare(_column(field.columns[1], tables), sortable_key(number))
    if number > _INTEGER_LIMIT:
        return _constant(_HOLDS_BELOW_LITERAL[op])
    if number < -_INTEGER_LIMIT:
        return _constant(_HOLDS_ABOVE_LITERAL[op])
    return compare(_column(field.columns[0], tables), number)


def _member_of(field: Field, values: Sequence[Value], tables: Tables | None) -> ColumnElement[bool]:
    """``field in (v1, ...)``: one SQL IN list (depth 1 however long), or grouped equalities."""
    if field.type is FieldType.FRACTION:
        return _balanced(or_, [_compare(field, "=", v, tables) for v in values])
    numbers = sorted({int(v) for v in values})
    if field.type is FieldType.BIG_INTEGER:
        keys = [sortable_key(n) for n in numbers if n >= 0]  # stored counts are >= 0
        return _column(field.columns[1], tables).in_(keys) if keys else false()
    # Literals past 32 bits match no stored value (see _INTEGER_LIMIT).
    fitting = [n for n in numbers if -_INTEGER_LIMIT <= n <= _INTEGER_LIMIT]
    return _column(field.columns[0], tables).in_(fitting) if fitting else false()


def compile_condition(node: Node, tables: Tables | None = None) -> ColumnElement[bool]:
    """The SQL condition of a tree over the columns of classes, readings, parameter_sets, frames.

    It is meant for one row of the member join (a parameter set with its reading and class);
    ``compile_query`` puts it in context. ``tables`` replaces catalog tables by aliases.
    """
    if isinstance(node, And | Or):
        combine = and_ if isinstance(node, And) else or_
        # Leaves go into balanced groups; compound operands stay in the flat list, so that
        # groups add no parentheses along the nesting (SQLite's parser stack is ~100 deep).
        leaves = [o for o in node.operands if not isinstance(o, And | Or | Not)]
        compound = [o for o in node.operands if isinstance(o, And | Or | Not)]
        grouped = _grouped(combine, [compile_condition(o, tables) for o in leaves])
        return combine(*grouped, *(compile_condition(o, tables) for o in compound))
    if isinstance(node, Not):
        return not_(compile_condition(node.operand, tables))
    if isinstance(node, Scoped):
        return _compile_scope(node)
    field = require_field(node.field)
    if isinstance(node, Comparison):
        return _compare(field, node.op, node.value, tables)
    if isinstance(node, Range):
        return and_(
            _compare(field, ">=", node.low, tables), _compare(field, "<=", node.high, tables)
        )
    if isinstance(node, Membership):
        return _member_of(field, node.values, tables)
    if isinstance(node, BoolField):
        return _compare(field, "=", True, tables)
    raise TypeError(f"not a query node: {node!r}")


def _compile_scope(node: Scoped) -> ColumnElement[bool]:
    """``every/some/no reading|member (q)`` as [NOT] EXISTS over the class's readings or members.

    ``some S (q)`` is EXISTS(an S of the class with q), ``no S (q)`` its negation, and
    ``every S (q)`` is NOT EXISTS(an S of the class with not q). The subquery reads aliases of
    the tables, correlated with the class row only, so that it can stand inside the member
    subquery of compile_query, which reads the same tables.
    """
    readings = _READINGS.alias()
    tables: Tables = {"readings": readings}
    members: FromClause = readings
    link = readings.c.class_id == _CLASSES.c.id
    used = frozenset().union(*(f.tables for f in referenced_fields(node.operand)))
    if node.scope == "member":
        parameter_sets = _PARAMETER_SETS.alias()
        tables["parameter_sets"] = parameter_sets
        members = parameter_sets.join(readings, parameter_sets.c.reading_id == readings.c.id)
        link = parameter_sets.c.class_id == _CLASSES.c.id
    conditions = [link]
    if "frames" in used:
        frames = _FRAMES.alias()
        tables["frames"] = frames
        members = members.join(frames, frames.c.id == _CLASSES.c.frame_id)
    inner = compile_condition(node.operand, tables)
    conditions.append(not_(inner) if node.quantifier == "every" else inner)
    found = exists(select(literal(1)).select_from(members).where(*conditions).correlate(_CLASSES))
    return found if node.quantifier == "some" else not_(found)


def _member_fields(node: Node) -> frozenset[Field]:
    """The fields read per member row: those outside scopes (a scope is class-level)."""
    return frozenset(
        require_field(leaf.field)
        for leaf in iter_conditions(node, into_scopes=False)
        if not isinstance(leaf, Scoped)
    )


def _is_class_only(node: Node) -> bool:
    return all(f.level is Level.CLASS for f in _member_fields(node))


def compile_query(node: Node) -> Select[Any]:
    """``SELECT classes.id`` of the classes matching a query (see the module docstring).

    The statement correlates nothing, so it can stand alone or sit inside another statement,
    e.g. ``select(ClassRecord).where(ClassRecord.id.in_(compile_query(tree)))``.
    """
    tables = frozenset().union(*(f.tables for f in _member_fields(node)))
    source: FromClause = _CLASSES
    if "frames" in tables:
        source = _CLASSES.join(_FRAMES, _CLASSES.c.frame_id == _FRAMES.c.id)
    statement = select(_CLASSES.c.id).select_from(source)
    if _is_class_only(node):
        return statement.where(compile_condition(node)).correlate(None)
    operands = node.operands if isinstance(node, And) else (node,)
    outside = [o for o in operands if _is_class_only(o)]
    inside = [o for o in operands if not _is_class_only(o)]
    member_condition = _balanced(and_, [compile_condition(o) for o in inside])
    members: FromClause
    if "parameter_sets" in tables:
        members = _PARAMETER_SETS.join(_READINGS, _PARAMETER_SETS.c.reading_id == _READINGS.c.id)
        link = _PARAMETER_SETS.c.class_id == _CLASSES.c.id
    else:
        members, link = _READINGS, _READINGS.c.class_id == _CLASSES.c.id
    member = select(literal(1)).select_from(members).where(link, member_condition)
    where = [compile_condition(o) for o in outside]
    return statement.where(_balanced(and_, [*where, exists(member)])).correlate(None)


# --- sorting and columns --------------------------------------------------------------------


def _sort_expression(field: Field) -> ColumnElement[Any]:
    """A per-row expression whose order is the field's order."""
    if field.type is FieldType.BIG_INTEGER:
        return _column(field.columns[1])
    if field.type is FieldType.FRACTION:
        # Stored fractions have small denominators, so doubles order them exactly.
        return cast(_column(field.columns[0]), Float) / cast(_column(field.columns[1]), Float)
    if field.type is FieldType.BOOLEAN:
        return cast(_column(field.columns[0]), Integer)
    return _column(field.columns[0])


def _member_source(field: Field) -> tuple[Table, ColumnElement[bool]]:
    """The table holding a field and its link to the class row of the enclosing statement."""
    table = next(iter(field.tables))
    if table == "frames":
        return _FRAMES, _FRAMES.c.id == _CLASSES.c.frame_id
    if table == "readings":
        return _READINGS, _READINGS.c.class_id == _CLASSES.c.id
    return _PARAMETER_SETS, _PARAMETER_SETS.c.class_id == _CLASSES.c.id


def sort_clause(field_name: str, descending: bool = False) -> tuple[ColumnElement[Any], ...]:
    """ORDER BY elements for a statement over ``classes``: the field, then area and rank.

    ``field_name`` is a field name or alias, optionally prefixed with ``-`` for descending
    (``parse_sort_key``; an unknown field raises QuerySyntaxError listing the valid ones).
    A reading- or parameter-level field sorts a class by its smallest value among the members,
    by its largest when descending.
    """
    key = parse_sort_key(field_name)
    descending = descending or key.descending
    field = require_field(key.field)
    expression = _sort_expression(field)
    if "classes" not in field.tables:
        table, link = _member_source(field)
        aggregate = func.max if descending else func.min
        if table is _FRAMES:
            aggregate = func.min  # one frame per class
        expression = select(aggregate(expression)).where(link).correlate(_CLASSES).scalar_subquery()
    ordered = expression.desc() if descending else expression.asc()
    return (ordered, _CLASSES.c.area.asc(), _CLASSES.c.rank.asc())


def _text_expression(field: Field) -> ColumnElement[str]:
    """A per-row expression giving the field's value as text (``3``, ``1/3``, ``yes``)."""
    if field.type is FieldType.BIG_INTEGER:
        return _stored_column(field.columns[0])
    if field.type is FieldType.BOOLEAN:
        return case((_stored_column(field.columns[0]) == true(), "yes"), else_="no")
    if field.type is FieldType.FRACTION:
        numerator, denominator = (_stored_column(c) for c in field.columns)
        return case(
            (denominator == 1, cast(numerator, String)),
            else_=cast(numerator, String) + "/" + cast(denominator, String),
        )
    return cast(_stored_column(field.columns[0]), String)


def column_clause(field_name: str) -> Label[str]:
    """The value of a field for the class row of the enclosing statement, as labelled text.

    Class-level fields give their value; reading- and parameter-level fields give the set of
    values over the readings or members, smallest first, as ``1,3`` (never ``1..3``, which in
    the query language means a range and would claim 2). The label is the field's canonical
    name.
    """
    (name,) = parse_field_names(field_name)
    field = require_field(name)
    text = _text_expression(field)
    if "classes" in field.tables:
        return text.label(field.name)
    table, link = _member_source(field)
    order = _sort_expression(field)
    # Correlate only the class row: the enclosing statement may join frames itself.
    values = select(text).where(link).correlate(_CLASSES)
    if table is _FRAMES:
        return values.limit(1).scalar_subquery().label(field.name)
    # Distinct values in order, then joined; both stores keep the order of an ordered subquery
    # for a plain aggregate, and the tests check it on both.
    distinct = (
        select(text.label("value"), order.label("position"))
        .where(link)
        .distinct()
        .order_by(order)
        .correlate(_CLASSES)
        .subquery()
    )
    # No space after the comma: a table cell stays one word for tools that split on blanks.
    joined = select(func.aggregate_strings(distinct.c.value, ",")).scalar_subquery()
    return joined.label(field.name)


def matched_readings_clause(node: Node, label: str = "matched") -> Label[str] | None:
    """Which readings of the class row made it match, as their labels (``C(1,3,1,3)``).

    A class matches when one member satisfies the query (docs/query-language.md); this names
    the readings holding such a member, by normal form, smallest first. None when the query
    reads no reading or parameter-set field outside scopes: then every reading matches alike.
    """
    fields = _member_fields(node)
    if all(f.level is Level.CLASS for f in fields):
        return None
    tables = frozenset().union(*(f.tables for f in fields))
    members: FromClause = _READINGS
    if "parameter_sets" in tables:
        members = _READINGS.join(_PARAMETER_SETS, _PARAMETER_SETS.c.reading_id == _READINGS.c.id)
    if "frames" in tables:
        members = members.join(_FRAMES, _FRAMES.c.id == _CLASSES.c.frame_id)
    name = _READINGS.c.nf_beta_delta
    matched = (
        select(name.label("value"))
        .select_from(members)
        .where(_READINGS.c.class_id == _CLASSES.c.id, compile_condition(node))
        .distinct()
        .order_by(name)
        .correlate(_CLASSES)
        .subquery()
    )
    return select(func.aggregate_strings(matched.c.value, ", ")).scalar_subquery().label(label)


def column_clauses(field_names: Sequence[str]) -> list[Label[str]]:
    """``column_clause`` for each of several field names (validate with parse_field_names)."""
    return [column_clause(name) for name in field_names]


__all__ = [
    "column_clause",
    "column_clauses",
    "compile_condition",
    "compile_query",
    "matched_readings_clause",
    "sort_clause",
]
