"""Fuzzing the query parser: generated and mutated query texts give a tree or one zoo error.

Texts come from a grammar of the language (docs/query-language.md, "Grammar") with fields,
keywords, numbers and punctuation drawn at random, so most are near-valid, and from random
mutations of them: characters inserted, deleted or replaced, and slices repeated many times,
which makes deep nesting, long chains and long lists. Whatever the text, ``parse_query`` must
return a tree whose canonical text parses back to it, or raise the error of zoo.errors with a
one-line message and a caret inside the text; any other exception (RecursionError, ValueError
from int(), IndexError, ...) is a bug. tests/storage/test_querysql.py runs a subset through
SQLite.
"""

from __future__ import annotations

import random
import string

from hypothesis import given, settings
from hypothesis import strategies as st

from zoo.errors import QuerySyntaxError, ZooError
from zoo.query.fields import FIELDS, FieldType
from zoo.query.parser import COMPARISON_OPERATORS, QUANTIFIERS, SCOPES, parse_query

_SPELLINGS = [s for f in FIELDS for s in f.spellings] + ["procesess", "reading", "Members", "x_1"]
_NUMBERS = [
    "0", "3", "-7", "12", "100", "123456789012345678901234567890", "1e20", "10^20", "2.5e3",
    "1/3", "-1/5", "0.25", "1/0", "2.5^3", "1.5/2", "1e999999", "9^999999", "0" * 5000 + "7",
    "1/" + "0" * 5000 + "3", "2147483648", "-0", "1e+5", "7/", "3.", "-", "1..2", "1e", "^2",
]  # fmt: skip
_WORDS = ["yes", "no", "true", "false", "and", "or", "not", "in", *QUANTIFIERS, *SCOPES]
_OPERATORS = ["=", "!=", "<", "<=", ">", ">=", "==", "=<", "<>"]
_JOINTS = [" and ", " or ", " AND ", " Or ", " & ", " "]
_ALPHABET = string.printable + "αβγδ²³½−–·…×÷\u00a0\u200b\U0001d7d9é中"


def _value(rng: random.Random) -> str:
    if rng.random() < 0.8:
        return rng.choice(_NUMBERS) if rng.random() < 0.5 else str(rng.randint(-50, 10**6))
    return rng.choice(_WORDS)


def _valid_condition(rng: random.Random) -> str:
    field = rng.choice(FIELDS)
    if field.type is FieldType.BOOLEAN:
        return rng.choice([field.name, f"{field.name} = no", f"{field.name} != yes"])
    low, high = sorted(rng.randint(-2, 40) for _ in range(2))
    return rng.choice(
        [
            f"{rng.choice(field.spellings)} {rng.choice(COMPARISON_OPERATORS)} {low}",
            f"{field.name} in {low}..{high}",
            f"{field.name} in ({low}, {high}, {low + high})",
        ]
    )


def _condition(rng: random.Random, valid: bool = False) -> str:
    if valid:
        return _valid_condition(rng)
    field = rng.choice(_SPELLINGS)
    kind = rng.randrange(4)
    if kind == 0:
        return field
    if kind == 1:
        return f"{field} {rng.choice(_OPERATORS)} {_value(rng)}"
    if kind == 2:
        return f"{field} in {_value(rng)}..{_value(rng)}"
    return f"{field} in ({', '.join(_value(rng) for _ in range(rng.randrange(7)))})"


def grammar_text(rng: random.Random, budget: int = 10, *, valid: bool = False) -> str:
    """A text from the grammar with random fields, values and keywords (mostly near-valid).

    With ``valid`` the conditions are well typed and joints are 'and'/'or', so most texts
    parse (a scope may still nest or hold a parameter field in a reading scope).
    """
    if budget <= 1 or rng.random() < 0.3:
        return _condition(rng, valid)
    kind = rng.randrange(4)
    if kind == 0:
        return f"not {grammar_text(rng, budget - 1, valid=valid)}"
    if kind == 1:
        return f"({grammar_text(rng, budget - 1, valid=valid)})"
    if kind == 2:
        inner = grammar_text(rng, budget - 1, valid=valid)
        return f"{rng.choice(QUANTIFIERS)} {rng.choice(SCOPES)} ({inner})"
    parts = [grammar_text(rng, budget // 2, valid=valid) for _ in range(rng.randint(2, 4))]
    return rng.choice(_JOINTS[:4] if valid else _JOINTS).join(parts)


def mutated_text(rng: random.Random, text: str) -> str:
    """Random edits: characters inserted, deleted, replaced; a slice repeated many times."""
    for _ in range(rng.randint(1, 4)):
        at = rng.randint(0, len(text))
        end = rng.randint(at, min(len(text), at + 12))
        action = rng.randrange(4)
        noise = "".join(rng.choice(_ALPHABET) for _ in range(rng.randint(1, 3)))
        if action == 0:
            text = text[:at] + noise + text[at:]
        elif action == 1:
            text = text[:at] + text[end:]
        elif action == 2:
            text = text[:at] + noise + text[end:]
        else:  # deep nesting, long chains, long lists
            text = text[:at] + text[at:end] * rng.choice([2, 3, 30, 300, 3000]) + text[end:]
    return text


def check_parse(text: str) -> None:
    """Parse ``text``: a tree that round-trips, or a one-line zoo error pointing into the text."""
    try:
        tree = parse_query(text)
    except ZooError as error:
        assert isinstance(error, QuerySyntaxError)
        assert "\n" not in str(error) and str(error)
        assert 0 <= error.position <= len(text)
        return
    rendered = tree.render()
    assert parse_query(rendered) == tree


# Each example checks a grammar text and four mutations of it: 5 x 2,000 = 10,000 queries. The
# texts come from a Random that Hypothesis seeds, so a failure replays from its seed.
@settings(max_examples=2_000, deadline=None)
@given(rng=st.randoms(use_true_random=False))
def test_ten_thousand_generated_queries_parse_or_raise_a_zoo_error(rng: random.Random) -> None:
    text = grammar_text(rng, valid=rng.random() < 0.3)
    check_parse(text)
    for _ in range(4):
        check_parse(mutated_text(rng, text))
