"""Parameter sets: construction, ordering, the three input forms, and every kind of bad input.

The error messages are part of the interface (a researcher reads them), so they are pinned in
full. The accepted forms are those of issue 2: ``4,2,2,3``, ``4 2 2 3`` and ``C(4,2,2,3)``.
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from zoo.core.params import MAX_AREA, ParameterSet, parse_params
from zoo.errors import ParameterError

C4223 = ParameterSet(4, 2, 2, 3)  # docs/theory/equivalence.md running example


@pytest.mark.parametrize(
    "text",
    [
        "4,2,2,3",
        "4 2 2 3",
        "C(4,2,2,3)",
        "c(4,2,2,3)",
        "C(4, 2, 2, 3)",
        "  C ( 4 ,2, 2 ,3 )  ",
        "4,  2,2 , 3",
        "4\t2  2\n3",
        "+4,2,2,3",
        "C(4 2 2 3)",
    ],
)
def test_accepted_forms(text: str) -> None:
    assert parse_params(text) == C4223


def test_value_type() -> None:
    p = ParameterSet(4, 2, 2, 3)
    assert str(p) == "C(4,2,2,3)"
    assert p.area == 16  # A = alpha*delta + beta*gamma, docs/theory/folding.md
    assert p.as_tuple() == (4, 2, 2, 3)
    assert p.swap() == ParameterSet(2, 4, 3, 2)  # docs/theory/isomorphism.md
    assert hash(p) == hash(ParameterSet(4, 2, 2, 3))
    assert ParameterSet.parse("4 2 2 3") == p
    with pytest.raises(AttributeError):
        p.alpha = 5  # type: ignore[misc]


def test_ordering_is_lexicographic() -> None:
    # docs/citing.md: the label of a class is its lexicographically smallest member.
    items = [ParameterSet(2, 1, 1, 1), ParameterSet(1, 2, 1, 1), ParameterSet(1, 1, 2, 1)]
    assert sorted(items) == [ParameterSet(1, 1, 2, 1), ParameterSet(1, 2, 1, 1), items[0]]
    assert min(items) == ParameterSet(1, 1, 2, 1)


BAD_TEXT = [
    (
        "",
        "empty parameter set; give four positive integers alpha,beta,gamma,delta such as 4,2,2,3",
    ),
    (
        "   ",
        "empty parameter set; give four positive integers alpha,beta,gamma,delta such as 4,2,2,3",
    ),
    (
        "4,2,2",
        "a parameter set has four values (alpha, beta, gamma, delta), got 3 in '4,2,2'; "
        "write it as 4,2,2,3",
    ),
    (
        "4 2 2 3 5",
        "a parameter set has four values (alpha, beta, gamma, delta), got 5 in '4 2 2 3 5'; "
        "write it as 4,2,2,3",
    ),
    ("4,,2,3", "beta is missing in '4,,2,3'; write four positive integers such as 4,2,2,3"),
    ("4,2,2,", "delta is missing in '4,2,2,'; write four positive integers such as 4,2,2,3"),
    (
        "4,2,2.5,3",
        "gamma must be a whole number, got '2.5' in '4,2,2.5,3'; "
        "write four positive integers such as 4,2,2,3",
    ),
    (
        "a b c d",
        "alpha must be a whole number, got 'a' in 'a b c d'; "
        "write four positive integers such as 4,2,2,3",
    ),
    (
        "4,2,2,3e2",
        "delta must be a whole number, got '3e2' in '4,2,2,3e2'; "
        "write four positive integers such as 4,2,2,3",
    ),
    ("0,1,1,1", "alpha must be a positive integer, got 0; every cycloid parameter is at least 1"),
    ("4,-2,2,3", "beta must be a positive integer, got -2; every cycloid parameter is at least 1"),
    (
        "C(4,2,2,3",
        "cannot read parameter set 'C(4,2,2,3'; write it as 4,2,2,3 or '4 2 2 3' or C(4,2,2,3)",
    ),
    (
        "D(4,2,2,3)",
        "cannot read parameter set 'D(4,2,2,3)'; write it as 4,2,2,3 or '4 2 2 3' or C(4,2,2,3)",
    ),
    (
        "1,1,1,99999999999999999999",
        "delta = 99999999999999999999 is absurdly large; the area alpha*delta + beta*gamma may be "
        "at most 100,000",
    ),
    (
        "400,1,1,300",
        "area alpha*delta + beta*gamma = 120,001 of C(400,1,1,300) is over the limit 100,000; "
        "choose smaller parameters",
    ),
]


@pytest.mark.parametrize(("text", "message"), BAD_TEXT)
def test_bad_text_has_one_line_message(text: str, message: str) -> None:
    with pytest.raises(ParameterError) as info:
        parse_params(text)
    assert str(info.value) == message
    assert "\n" not in str(info.value)


def test_non_ascii_digits_are_refused() -> None:
    # int() would accept Arabic-Indic digits; a parameter set is plain ASCII.
    with pytest.raises(ParameterError, match="must be a whole number"):
        parse_params("4 2 2 \u0663")


@pytest.mark.parametrize(
    ("values", "message"),
    [
        (
            (4, 2, 2, 3.0),
            "delta must be a whole number, got 3.0; give four positive integers such as 4,2,2,3",
        ),
        (
            (True, 2, 2, 3),
            "alpha must be a whole number, got True; give four positive integers such as 4,2,2,3",
        ),
        (
            (4, 2, "2", 3),
            "gamma must be a whole number, got '2'; give four positive integers such as 4,2,2,3",
        ),
        (
            (4, 0, 2, 3),
            "beta must be a positive integer, got 0; every cycloid parameter is at least 1",
        ),
    ],
)
def test_bad_constructor_values(values: tuple[object, ...], message: str) -> None:
    with pytest.raises(ParameterError) as info:
        ParameterSet(*values)  # type: ignore[arg-type]
    assert str(info.value) == message


def test_parse_refuses_non_text() -> None:
    with pytest.raises(ParameterError, match="must be text, got int"):
        parse_params(4223)  # type: ignore[arg-type]


def test_area_limit_is_inclusive() -> None:
    assert ParameterSet(1, 1, MAX_AREA - 1, 1).area == MAX_AREA
    with pytest.raises(ParameterError, match="over the limit"):
        ParameterSet(1, 1, MAX_AREA, 1)


def test_parameter_error_is_a_value_error() -> None:
    # Common practice: subclasses also inherit the builtin a caller would catch.
    with pytest.raises(ValueError):
        parse_params("1,2,3")


params_strategy = st.builds(
    ParameterSet,
    st.integers(1, 200),
    st.integers(1, 200),
    st.integers(1, 200),
    st.integers(1, 200),
)


@given(params_strategy)
def test_str_parse_round_trip(p: ParameterSet) -> None:
    assert parse_params(str(p)) == p


@given(params_strategy, st.sampled_from([", ", ",", " ", "  "]), st.booleans())
def test_every_written_form_round_trips(p: ParameterSet, sep: str, wrapped: bool) -> None:
    body = sep.join(str(v) for v in p.as_tuple())
    assert parse_params(f"C({body})" if wrapped else body) == p


@given(st.text(max_size=30))
def test_arbitrary_text_never_crashes(text: str) -> None:
    # Any text either parses or raises ParameterError with a one-line message: never another error.
    try:
        p = parse_params(text)
    except ParameterError as exc:
        assert "\n" not in str(exc)
    else:
        assert isinstance(p, ParameterSet)
