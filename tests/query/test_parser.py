"""The query language: parser round trips, pinned error messages, area bounds, generated docs."""

from __future__ import annotations

from fractions import Fraction
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from tests.query_trees import query_trees
from zoo.errors import QuerySyntaxError
from zoo.query.docs import REGENERATE_COMMAND, render_query_docs
from zoo.query.fields import FIELDS, Field, FieldType, Level, field_named
from zoo.query.parser import (
    MAX_CONDITIONS,
    MAX_FRACTION_PART,
    MAX_NESTING,
    MAX_VALUES,
    And,
    BoolField,
    Comparison,
    Membership,
    Node,
    Not,
    Or,
    Range,
    Scoped,
    SortKey,
    Value,
    iter_conditions,
    parse_field_names,
    parse_query,
    parse_sort_key,
    referenced_area_bound,
    tokenize,
)

DOCS = Path(__file__).resolve().parents[2] / "docs" / "query-language.md"
FIELD_LIST = (  # issue 8, one vocabulary: the counts are reading_count and member_count
    "area, loop (cyc), states, state_arcs, automorphisms, net_automorphisms, tokens, enabled, "
    "semi_enabled, cycle_time, group_d1, cyclic, iteration, iterates, behaviour_count, "
    "reading_count (readings), member_count (members), alpha (α), "
    "beta (β), processes, regular, slowness, forward_count, forward_length, forward_tokens, "
    "backward_count, backward_length, backward_tokens, gamma (γ), delta (δ)"
)


# --- strategies: every well-typed tree -------------------------------------------------------


def values_for(field: Field) -> st.SearchStrategy[Value]:
    if field.type is FieldType.BOOLEAN:
        return st.booleans()
    if field.type is FieldType.FRACTION:
        part = MAX_FRACTION_PART - 1
        small = st.fractions(min_value=-3, max_value=30, max_denominator=20)
        return small | st.builds(Fraction, st.integers(-part, part), st.integers(1, part))
    if field.type is FieldType.BIG_INTEGER:
        return st.integers(0, 10**60) | st.integers(0, 60).map(lambda k: 7 * 10**k)
    return st.integers(-(10**12), 10**12) | st.integers(-3, 300)


trees = query_trees(values_for, width=4, max_leaves=12)
scoped_trees = query_trees(values_for, width=3, max_leaves=8, scopes=True)


@settings(max_examples=250, deadline=None)
@given(tree=trees)
def test_render_then_parse_gives_the_same_tree(tree: Node) -> None:
    text = tree.render()
    assert parse_query(text) == tree
    assert parse_query(text).render() == text


@settings(max_examples=150, deadline=None)
@given(tree=trees, data=st.data())
def test_spacing_case_and_aliases_do_not_change_the_tree(tree: Node, data: st.DataObject) -> None:
    # Re-spell the canonical text: extra spaces around tokens, upper-case keywords, aliases.
    pieces = []
    for token in tokenize(tree.render())[:-1]:
        text = token.text
        if token.kind == "name":
            field = field_named(text)
            if field is not None:
                text = data.draw(st.sampled_from(field.spellings))
            if data.draw(st.booleans()):
                text = text.upper()
        pieces.append(text)
    spaced = "".join(p + data.draw(st.sampled_from([" ", "  ", "\t"])) for p in pieces)
    assert parse_query(spaced) == tree


# --- structure and numbers -------------------------------------------------------------------


def test_precedence_not_and_or() -> None:
    tree = parse_query("not regular and cyclic or area = 3")
    assert tree == Or(
        (And((Not(BoolField("regular")), BoolField("cyclic"))), Comparison("area", "=", 3))
    )
    assert parse_query("not (regular and cyclic)") == Not(
        And((BoolField("regular"), BoolField("cyclic")))
    )
    # Parentheses keep their grouping in the tree and in the canonical text.
    nested = parse_query("(area = 1 and loop = 2) and tokens = 3")
    assert nested == And(
        (
            And((Comparison("area", "=", 1), Comparison("loop", "=", 2))),
            Comparison("tokens", "=", 3),
        )
    )
    assert nested.render() == "(area = 1 and loop = 2) and tokens = 3"
    assert parse_query("area = 1 or loop = 2 and tokens = 3").render() == (
        "area = 1 or loop = 2 and tokens = 3"
    )


def test_users_example_is_plain() -> None:
    # Issue 3: "all non-isomorphic rings with 3 processes and area under 100".
    assert parse_query("processes = 3 and area < 100") == And(
        (Comparison("processes", "=", 3), Comparison("area", "<", 100))
    )


@pytest.mark.parametrize(
    ("text", "value"),
    [
        ("states > 1e20", 10**20),
        ("states > 10^20", 10**20),
        ("states > 1E+20", 10**20),
        ("states > 2.5e3", 2500),
        ("states > 2^64", 2**64),
        ("states > 10^58", 10**58),
        ("area > -3", -3),
        ("area > 007", 7),
    ],
)
def test_integer_literals_are_exact(text: str, value: int) -> None:
    (tree,) = [parse_query(text)]
    assert isinstance(tree, Comparison) and tree.value == value
    assert type(tree.value) is int


@pytest.mark.parametrize(
    ("text", "value"),
    [
        ("slowness = 1/3", Fraction(1, 3)),
        ("slowness = -1/5", Fraction(-1, 5)),
        ("slowness = 0.25", Fraction(1, 4)),
        ("slowness = -0.2", Fraction(-1, 5)),
        ("slowness = 2/6", Fraction(1, 3)),
        ("cycle_time < 7", Fraction(7)),
        ("cycle_time < 1.5e1", Fraction(15)),
    ],
)
def test_fraction_literals_are_exact(text: str, value: Fraction) -> None:
    tree = parse_query(text)
    assert isinstance(tree, Comparison) and tree.value == value
    assert isinstance(tree.value, Fraction)


def test_canonical_text_uses_exponents_for_round_numbers() -> None:
    assert parse_query("states >= 100000000000000000000").render() == "states >= 1e20"
    assert parse_query("states in 10^3..10^6").render() == "states in 1000..1e6"
    assert parse_query("slowness in (0.25, -1/5, 1)").render() == "slowness in (1/4, -1/5, 1)"
    assert parse_query("regular = TRUE and cyclic != no").render() == (
        "regular = yes and cyclic != no"
    )


def test_aliases_and_letter_case() -> None:
    assert parse_query("α = 2 and β in 1..3 and γ = 1 and δ = 4 and CYC < 5").render() == (
        "alpha = 2 and beta in 1..3 and gamma = 1 and delta = 4 and loop < 5"
    )
    assert parse_query("Regular AND NOT Cyclic") == And(
        (BoolField("regular"), Not(BoolField("cyclic")))
    )


# --- pinned error messages -------------------------------------------------------------------


def _error(text: str) -> QuerySyntaxError:
    with pytest.raises(QuerySyntaxError) as info:
        parse_query(text)
    assert info.value.query == text
    return info.value


@pytest.mark.parametrize(
    ("text", "message", "caret"),
    [
        (
            "procesess = 3",
            f"Unknown field 'procesess' (did you mean 'processes'?); valid fields: {FIELD_LIST}",
            "^",
        ),
        ("colour = 3", f"Unknown field 'colour'; valid fields: {FIELD_LIST}", "^"),
        (
            "regular < 3",
            "Field 'regular' is yes/no and allows only = and !=, not '<'; write 'regular', "
            "'not regular' or 'regular = no'",
            "        ^",
        ),
        (
            "regular = 3",
            "Field 'regular' is yes/no; compare it with yes, no, true or false, not '3'",
            "          ^",
        ),
        (
            "regular in 1..2",
            "Field 'regular' is yes/no and takes no 'in'; write 'regular' or 'not regular'",
            "        ^",
        ),
        (
            "area = 1/2",
            "Field 'area' takes whole numbers (integer); '1/2' is not whole",
            "       ^",
        ),
        (
            "states > 1.5",
            "Field 'states' takes whole numbers (exact integer); '1.5' is not whole",
            "         ^",
        ),
        (
            "area = yes",
            "Expected a number after '=' for field 'area', found 'yes' (integer fields take "
            "numbers)",
            "       ^",
        ),
        (
            "area in 20..10",
            "Range 20..10 of 'area' is empty; write the smaller end first: 10..20",
            "        ^",
        ),
        (
            "area in 10",
            "Expected '..' in the range after 'area in 10', found the end of the query; write "
            "'area in 10..20' or 'area in (12, 16)'",
            "          ^",
        ),
        (
            "area in (1, 2",
            "Expected ',' or ')' in the list of values of 'area', found the end of the query",
            "             ^",
        ),
        (
            "(processes = 3 and area < 100",
            "Expected ')' to close the '(' at position 0, found the end of the query",
            "                             ^",
        ),
        ("area < 3)", "Unmatched ')' in the query; remove it or add '(' before", "        ^"),
        (
            "area <",
            "Expected a number after '<' for field 'area', found the end of the query",
            "      ^",
        ),
        (
            "area",
            "Field 'area' needs a comparison after it, found the end of the query; for example "
            "'area <= 30'",
            "^",
        ),
        (
            "loop 5",
            "Field 'loop' needs a comparison after it, found '5'; for example 'loop = 5'",
            "     ^",
        ),
        ("and area = 3", "Expected a field name, found 'and'", "^"),
        (
            "area = 3 regular",
            "Expected 'and', 'or' or the end of the query, found 'regular'",
            "         ^",
        ),
        ("area == 3", "Expected a number after '=' for field 'area', found '='", "      ^"),
        (
            "area = 3 && loop = 2",
            "Unexpected character '&' in the query; write 'and'",
            "         ^",
        ),
        (
            "area # 3",
            "Unexpected character '#' in the query; a query uses field names, numbers, "
            "= != < <= > >=, 'in', '..', 'and', 'or', 'not' and parentheses",
            "     ^",
        ),
        (
            "area = 1/0",
            "Fraction '1/0' divides by zero; give a positive denominator",
            "         ^",
        ),
        (
            "states > 10^1001",
            "Number '10^1001' has more than 1000 digits; no catalog value is that large",
            "         ^",
        ),
        (
            "slowness < 1/10^13",
            "Expected 'and', 'or' or the end of the query, found '^'",
            "",  # checked below: the caret stands under '^'
        ),
        (
            "slowness < 1/10000000000000",
            "Fraction '1/10000000000000' for field 'slowness' is too fine or too large; "
            "numerator and denominator must stay below 10^12",
            "           ^",
        ),
        ("", "The query is empty; write a condition such as 'processes = 3 and area < 100'", "^"),
    ],
)
def test_error_messages_are_pinned(text: str, message: str, caret: str) -> None:
    if text == "slowness < 1/10^13":
        # A power is not allowed in a denominator: '^' is then an unexpected character.
        with pytest.raises(QuerySyntaxError) as info:
            parse_query(text)
        assert str(info.value).startswith("Unexpected character '^'")
        assert info.value.caret_text() == f"{text}\n{' ' * text.index('^')}^"
        return
    error = _error(text)
    assert str(error) == message
    assert error.caret_text() == f"{text}\n{caret}"


_QUERYISH = st.sampled_from(
    ["area", "regular", "slowness", "states", "α", "and", "or", "not", "in", "yes", "(", ")",
     ",", "..", "=", "!=", "<", "<=", ">=", "-", "1", "0", "/", "e", "^", ".", " ", "7", "²"]
)  # fmt: skip


@settings(max_examples=200, deadline=None)
@given(text=st.text(max_size=40) | st.lists(_QUERYISH, max_size=14).map("".join))
def test_any_text_parses_or_raises_query_syntax_error(text: str) -> None:
    try:
        tree = parse_query(text)
    except QuerySyntaxError as error:
        assert 0 <= error.position <= len(text)
        assert "\n" not in str(error)
    else:
        assert parse_query(tree.render()) == tree


def test_errors_are_value_errors_with_one_line() -> None:
    error = _error("aera < 100")
    assert isinstance(error, ValueError)
    assert "\n" not in str(error)


# --- sort keys and column lists -------------------------------------------------------------


def test_sort_keys() -> None:
    assert parse_sort_key("loop") == SortKey("loop")
    assert parse_sort_key("-states") == SortKey("states", descending=True)
    assert parse_sort_key("+α") == SortKey("alpha")
    assert parse_sort_key("-states").render() == "-states"
    with pytest.raises(QuerySyntaxError) as info:
        parse_sort_key("-lop")
    assert str(info.value) == (
        f"Unknown sort field 'lop' (did you mean 'loop'?); valid fields: {FIELD_LIST}"
    )
    assert info.value.caret_text() == "-lop\n ^"
    with pytest.raises(QuerySyntaxError, match="The sort key is empty"):
        parse_sort_key("-")


def test_column_lists() -> None:
    assert parse_field_names("area, loop,β , slowness") == ("area", "loop", "beta", "slowness")
    with pytest.raises(QuerySyntaxError) as info:
        parse_field_names("area, lop")
    assert str(info.value).startswith("Unknown column field 'lop' (did you mean 'loop'?)")
    assert info.value.caret_text() == "area, lop\n      ^"
    with pytest.raises(QuerySyntaxError, match="Empty column field name"):
        parse_field_names("area,,loop")


# --- area bound -----------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "bound"),
    [
        ("area < 100", 99),
        ("area <= 100", 100),
        ("area = 12", 12),
        ("area in 10..20", 20),
        ("area in (12, 16, 8)", 16),
        ("processes = 3 and area < 100", 99),
        ("area < 50 and area < 40", 39),
        ("area < 50 or area < 40", 49),
        ("area < 50 or processes = 3", None),
        ("area > 5", None),
        ("area != 5", None),
        ("processes = 3", None),
        ("not area > 50", 50),
        ("not area >= 50", 49),
        ("not (area > 50 or loop = 3)", 50),
        ("not (area > 50 and loop = 3)", None),
        ("not area != 7", 7),
        ("not area in 1..5", None),
        ("not not area < 10", 9),
        ("area < 1", 0),
        ("area < -5", 0),
    ],
)
def test_referenced_area_bound(text: str, bound: int | None) -> None:
    assert referenced_area_bound(parse_query(text)) == bound


def possible(node: Node, want: bool, area: int) -> bool:
    """Whether some assignment of the non-area conditions makes node evaluate to want."""
    if isinstance(node, Not):
        return possible(node.operand, not want, area)
    if isinstance(node, Scoped):
        # area is the same on every reading and member: a scope is its operand ('no': negated)
        return possible(node.operand, want != (node.quantifier == "no"), area)
    if isinstance(node, And | Or):
        need_all = isinstance(node, And) == want
        checks = [possible(o, want, area) for o in node.operands]
        return all(checks) if need_all else any(checks)
    if node.field != "area":
        return True
    if isinstance(node, Range):
        truth = node.low <= area <= node.high
    elif isinstance(node, Membership):
        truth = area in node.values
    else:
        assert isinstance(node, Comparison)
        truth = {
            "=": area == node.value,
            "!=": area != node.value,
            "<": area < node.value,
            "<=": area <= node.value,
            ">": area > node.value,
            ">=": area >= node.value,
        }[node.op]
    return truth == want


@settings(max_examples=200, deadline=None)
@given(tree=trees, area=st.integers(1, 400))
def test_area_bound_is_sound(tree: Node, area: int) -> None:
    # No class of an area above the bound can match: evaluating the tree with every area-
    # independent condition free (both true and false reachable) must be false past the bound.
    bound = referenced_area_bound(tree)
    if bound is None or area <= bound:
        return
    assert not possible(tree, True, area)


@settings(max_examples=150, deadline=None)
@given(tree=scoped_trees, area=st.integers(1, 400))
def test_area_bound_is_sound_with_scopes(tree: Node, area: int) -> None:
    bound = referenced_area_bound(tree)
    if bound is None or area <= bound:
        return
    assert not possible(tree, True, area)


@settings(max_examples=150, deadline=None)
@given(tree=scoped_trees)
def test_scopes_render_then_parse_to_the_same_tree(tree: Node) -> None:
    text = tree.render()
    assert parse_query(text) == tree
    assert parse_query(text).render() == text


@pytest.mark.parametrize(
    ("text", "message", "caret"),
    [
        (
            "every reading (delta = 1)",
            "Field 'delta' differs between the parameter sets of one reading; inside 'every "
            "reading (...)' use class and reading fields, or write 'every member (...)'",
            "every reading (delta = 1)\n               ^",
        ),
        (
            "regular and no member (some reading (regular))",
            "Scopes do not nest: 'some' stands inside the scope opened by 'no' at position 12; "
            "write them side by side, joined with 'and' or 'or'",
            "regular and no member (some reading (regular))\n                       ^",
        ),
        (
            "every readings (regular)",
            "Expected 'reading' or 'member' after 'every', found 'readings'; write 'every "
            "reading (regular)' or 'every member (gamma = 1)'",
            "every readings (regular)\n      ^",
        ),
        (
            "some member regular",
            "Expected '(' after 'some member', found 'regular'; write 'some reading (regular)' "
            "or 'some member (gamma = 1)'",
            "some member regular\n            ^",
        ),
        ("no = 1", "Expected a field name, found 'no'", "no = 1\n^"),
    ],
)
def test_scope_errors_are_pinned(text: str, message: str, caret: str) -> None:
    with pytest.raises(QuerySyntaxError) as info:
        parse_query(text)
    assert str(info.value) == message
    assert info.value.caret_text() == caret


def test_scope_syntax_and_meaning_of_no() -> None:
    tree = parse_query("NO Reading (regular) and no member (γ = 1 or regular = no)")
    assert tree == And(
        (
            Scoped("no", "reading", BoolField("regular")),
            Scoped(
                "no", "member", Or((Comparison("gamma", "=", 1), Comparison("regular", "=", False)))
            ),
        )
    )
    # 'no' still reads as a yes/no value after a comparison
    assert parse_query("regular = no") == Comparison("regular", "=", False)


@pytest.mark.parametrize(
    ("text", "position"),
    [
        ("(" * (MAX_NESTING + 1) + "regular" + ")" * (MAX_NESTING + 1), MAX_NESTING),
        ("not " * (MAX_NESTING + 1) + "regular", 4 * MAX_NESTING),
        (
            "every reading " + "(" * (MAX_NESTING + 1) + "regular" + ")" * (MAX_NESTING + 1),
            14 + MAX_NESTING,
        ),
        (" or ".join(["regular"] * (MAX_CONDITIONS + 1)), 11 * MAX_CONDITIONS),
        ("area in (" + "1, " * MAX_VALUES + "1)", 9 + 3 * MAX_VALUES),
    ],
)
def test_size_limits_name_the_limit_with_a_caret(text: str, position: int) -> None:
    with pytest.raises(QuerySyntaxError) as info:
        parse_query(text)
    message = str(info.value)
    assert any(str(n) in message for n in (MAX_NESTING, MAX_CONDITIONS, MAX_VALUES))
    assert info.value.position == position


def test_no_input_reaches_python_recursion() -> None:
    # Far past every limit, in every nesting form: refused with one QuerySyntaxError.
    for text in (
        "(" * 100_000,
        "not " * 100_000 + "regular",
        "every reading (" * 10_000,
        "(" * 50_000 + ")" * 50_000,
        "area in (" + "1," * 200_000,
    ):
        with pytest.raises(QuerySyntaxError):
            parse_query(text)


# --- the registry and its documentation -----------------------------------------------------


def test_registry_spellings_are_unique_and_examples_parse() -> None:
    spellings = [s.casefold() for f in FIELDS for s in f.spellings]
    assert len(spellings) == len(set(spellings))
    for field in FIELDS:
        tree = parse_query(field.example)
        assert field.name in {leaf.field for leaf in iter_conditions(tree)}, field.example
        assert field.name.casefold() not in {"and", "or", "not", "in", "yes", "no"}


def test_issue_fields_are_present() -> None:
    # Issue 3 names these fields and levels (docs/theory/isomorphism.md).
    wanted = {
        "area": Level.CLASS, "loop": Level.CLASS, "states": Level.CLASS,
        "processes": Level.READING, "regular": Level.READING, "slowness": Level.READING,
        "alpha": Level.READING, "beta": Level.READING,
        "gamma": Level.PARAMETER_SET, "delta": Level.PARAMETER_SET,
    }  # fmt: skip
    for name, level in wanted.items():
        field = field_named(name)
        assert field is not None and field.level is level


def test_committed_docs_page_is_generated_from_the_registry() -> None:
    assert DOCS.read_text(encoding="utf-8") == render_query_docs(), (
        f"docs/query-language.md is stale; regenerate it with: {REGENERATE_COMMAND}"
    )


def test_docs_page_lists_every_field_and_its_example() -> None:
    page = render_query_docs()
    for field in FIELDS:
        assert f"| `{field.name}` |" in page
        assert f"`{field.example}`" in page


@pytest.mark.parametrize(
    ("query", "plain"),
    [
        # leading zeros past Python's 4,300-digit int() conversion limit
        ("area = " + "0" * 5000 + "7", "area = 7"),
        ("slowness = 1/" + "0" * 5000 + "3", "slowness = 1/3"),
        ("states > " + "0" * 5000 + "2^3", "states > 2^3"),
    ],
)
def test_numbers_with_thousands_of_leading_zeros_read_exactly(query: str, plain: str) -> None:
    assert parse_query(query) == parse_query(plain)


def test_a_denominator_longer_than_the_digit_limit_is_refused() -> None:
    with pytest.raises(QuerySyntaxError, match="more than 1000 digits"):
        parse_query("slowness = 1/" + "7" * 5000)
