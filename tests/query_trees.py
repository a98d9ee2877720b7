"""Hypothesis strategy of well-typed query trees, shared by the parser and the SQL tests.

Each test file supplies the literals (``values_for``): the parser tests draw from the whole
range a field accepts, the SQL tests from values next to the stored ones.
"""

from __future__ import annotations

from collections.abc import Callable

from hypothesis import strategies as st

from zoo.query.fields import FIELDS, Field, FieldType, Level
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
    referenced_fields,
)

ValuesFor = Callable[[Field], st.SearchStrategy[Value]]


def query_trees(
    values_for: ValuesFor, *, width: int, max_leaves: int, scopes: bool = False
) -> st.SearchStrategy[Node]:
    """Trees of every node kind over every field; ``width`` bounds lists and operand counts.

    With ``scopes`` a leaf may also be a scope (``every reading (...)``) around a scope-free
    tree; a tree with parameter-set fields gets a member scope.
    """

    @st.composite
    def leaves(draw: st.DrawFn) -> Node:
        field = draw(st.sampled_from(FIELDS))
        values = values_for(field)
        if field.type is FieldType.BOOLEAN:
            if draw(st.booleans()):
                return BoolField(field.name)
            return Comparison(field.name, draw(st.sampled_from(["=", "!="])), draw(values))
        kind = draw(st.sampled_from(["compare", "compare", "range", "member"]))
        if kind == "compare":
            op = draw(st.sampled_from(["=", "!=", "<", "<=", ">", ">="]))
            return Comparison(field.name, op, draw(values))
        if kind == "range":
            low, high = sorted((draw(values), draw(values)))
            return Range(field.name, low, high)
        return Membership(field.name, tuple(draw(st.lists(values, min_size=1, max_size=width))))

    def grow(base: st.SearchStrategy[Node], leaves_at_most: int) -> st.SearchStrategy[Node]:
        return st.recursive(
            base,
            lambda children: st.one_of(
                children.map(Not),
                st.lists(children, min_size=2, max_size=width).map(lambda ops: And(tuple(ops))),
                st.lists(children, min_size=2, max_size=width).map(lambda ops: Or(tuple(ops))),
            ),
            max_leaves=leaves_at_most,
        )

    if not scopes:
        return grow(leaves(), max_leaves)

    @st.composite
    def scoped(draw: st.DrawFn) -> Node:
        operand = draw(grow(leaves(), max(1, max_leaves // 2)))
        per_member = any(f.level is Level.PARAMETER_SET for f in referenced_fields(operand))
        scope = "member" if per_member else draw(st.sampled_from(["reading", "member"]))
        return Scoped(draw(st.sampled_from(["every", "some", "no"])), scope, operand)

    return grow(leaves() | scoped(), max_leaves)
