"""The catalog query language: tokenizer, recursive-descent parser and syntax tree.

A query is a boolean expression over the fields of ``zoo/query/fields.py``::

    processes = 3 and area < 100
    (regular or slowness >= 1/3) and not cyclic and states in 10^3..10^6

``parse_query(text)`` returns a tree of frozen nodes (``Comparison``, ``Range``,
``Membership``, ``BoolField``, ``And``, ``Or``, ``Not``); ``node.render()`` gives its canonical
text, which parses back to an equal tree. Field names are resolved to their canonical names and
every literal is checked against its field's type while parsing, so a tree is always well typed;
errors are ``QuerySyntaxError`` carrying the query and the offset of the offending text.

The grammar rules sit in the docstrings of the parser methods (``grammar_rules()`` collects
them); ``zoo.query.docs`` builds the page ``docs/query-language.md`` from them and from the
field registry.
"""

from __future__ import annotations

import re
from collections.abc import Iterator
from dataclasses import dataclass
from fractions import Fraction

from zoo.errors import QuerySyntaxError
from zoo.query.fields import (
    FIELDS,
    Field,
    FieldType,
    Level,
    closest_field,
    field_list_text,
    field_named,
    require_field,
)

#: Comparison operators, in the order the documentation lists them.
COMPARISON_OPERATORS: tuple[str, ...] = ("=", "!=", "<", "<=", ">", ">=")
KEYWORDS = frozenset({"and", "or", "not", "in", "yes", "no", "true", "false", "every", "some"})
_BOOLEAN_WORDS = {"yes": True, "true": True, "no": False, "false": False}

#: Numbers in a query may have at most this many digits (10^1000 and beyond are typos).
MAX_DIGITS = 1000
#: Numerators and denominators of fraction literals stay below this, so that the exact
#: cross-multiplied comparison of querysql.py fits a 64-bit integer in every database.
MAX_FRACTION_PART = 10**12

# Size limits: every query within them parses without deep Python recursion and its SQL runs on
# SQLite (expression depth 1,000; a parser stack of 100 entries before version 3.46, which 31
# levels of nested and/or overflow) and on PostgreSQL (65,535 bound parameters);
# tests/storage/test_querysql.py runs queries at each limit on both.
#: Levels of nesting: each '(' (a scope's included) and each 'not' opens one.
MAX_NESTING = 20
#: Conditions (comparisons, ranges, lists, bare yes/no fields) in one query.
MAX_CONDITIONS = 1000
#: Literal values (numbers, yes/no) in one query, the values of every list included.
MAX_VALUES = 10_000

#: Quantifier words and the scopes they range over (docs/query-language.md, "Scopes").
QUANTIFIERS: tuple[str, ...] = ("every", "some", "no")
SCOPES: tuple[str, ...] = ("reading", "member")

Value = int | Fraction | bool


# --- syntax tree ----------------------------------------------------------------------------


def render_value(value: Value) -> str:
    """Canonical text of a literal: yes/no, a whole number, or numerator/denominator.

    Whole numbers ending in six or more zeros are written with an exponent (``1e20``), which
    parses back to the same exact integer.
    """
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, Fraction):
        if value.denominator != 1:
            return str(value)
        value = value.numerator
    digits = str(abs(value))
    zeros = len(digits) - len(digits.rstrip("0"))
    if zeros >= 6:  # 10^20 reads better as 1e20; the text stays exact
        return f"{'-' if value < 0 else ''}{digits[:-zeros]}e{zeros}"
    return str(value)


def _check_field(name: str) -> Field:
    field = require_field(name)
    if field.name != name:
        raise ValueError(f"use the canonical field name {field.name!r}, not {name!r}")
    return field


def _typed_value(field: Field, value: Value) -> Value:
    """The value in the field's type (int -> Fraction for fractions), or ValueError."""
    if field.type is FieldType.BOOLEAN:
        if isinstance(value, bool):
            return value
    elif isinstance(value, bool):
        pass
    elif field.type is FieldType.FRACTION and isinstance(value, int | Fraction):
        fraction = Fraction(value)
        if max(abs(fraction.numerator), fraction.denominator) < MAX_FRACTION_PART:
            return fraction
    elif isinstance(value, int):
        return value
    elif isinstance(value, Fraction) and value.denominator == 1:
        return int(value)
    raise ValueError(f"{value!r} is not a valid {field.type.value} value for {field.name}")


@dataclass(frozen=True)
class Comparison:
    """``field op value``, e.g. ``area < 100`` or ``regular = no``."""

    field: str
    op: str
    value: Value

    def __post_init__(self) -> None:
        field = _check_field(self.field)
        if self.op not in COMPARISON_OPERATORS:
            raise ValueError(f"unknown comparison operator {self.op!r}")
        if field.type is FieldType.BOOLEAN and self.op not in ("=", "!="):
            raise ValueError(f"{self.field} is yes/no and allows only = and !=")
        object.__setattr__(self, "value", _typed_value(field, self.value))

    def render(self) -> str:
        return f"{self.field} {self.op} {render_value(self.value)}"


@dataclass(frozen=True)
class Range:
    """``field in low..high``: both ends included."""

    field: str
    low: Value
    high: Value

    def __post_init__(self) -> None:
        field = _check_field(self.field)
        if field.type is FieldType.BOOLEAN:
            raise ValueError(f"{self.field} is yes/no and has no ranges")
        object.__setattr__(self, "low", _typed_value(field, self.low))
        object.__setattr__(self, "high", _typed_value(field, self.high))
        if self.high < self.low:
            raise ValueError(f"empty range {self.low}..{self.high}")

    def render(self) -> str:
        return f"{self.field} in {render_value(self.low)}..{render_value(self.high)}"


@dataclass(frozen=True)
class Membership:
    """``field in (v1, v2, ...)``: equal to one of the listed values."""

    field: str
    values: tuple[Value, ...]

    def __post_init__(self) -> None:
        field = _check_field(self.field)
        if field.type is FieldType.BOOLEAN:
            raise ValueError(f"{self.field} is yes/no and takes no 'in'")
        if not self.values:
            raise ValueError("a membership test needs at least one value")
        object.__setattr__(self, "values", tuple(_typed_value(field, v) for v in self.values))

    def render(self) -> str:
        return f"{self.field} in ({', '.join(render_value(v) for v in self.values)})"


@dataclass(frozen=True)
class BoolField:
    """A yes/no field written bare, e.g. ``regular``: true when the field is yes."""

    field: str

    def __post_init__(self) -> None:
        if _check_field(self.field).type is not FieldType.BOOLEAN:
            raise ValueError(f"{self.field} is not a yes/no field")

    def render(self) -> str:
        return self.field


@dataclass(frozen=True)
class Not:
    """``not operand``."""

    operand: Node

    def render(self) -> str:
        inner = self.operand.render()
        return f"not ({inner})" if isinstance(self.operand, And | Or) else f"not {inner}"


@dataclass(frozen=True)
class And:
    """``a and b and ...``: two or more operands."""

    operands: tuple[Node, ...]

    def __post_init__(self) -> None:
        if len(self.operands) < 2:
            raise ValueError("'and' needs at least two operands")

    def render(self) -> str:
        # Parenthesise nested and/or so that the text parses back to the same tree.
        return " and ".join(
            f"({o.render()})" if isinstance(o, And | Or) else o.render() for o in self.operands
        )


@dataclass(frozen=True)
class Or:
    """``a or b or ...``: two or more operands."""

    operands: tuple[Node, ...]

    def __post_init__(self) -> None:
        if len(self.operands) < 2:
            raise ValueError("'or' needs at least two operands")

    def render(self) -> str:
        return " or ".join(
            f"({o.render()})" if isinstance(o, Or) else o.render() for o in self.operands
        )


@dataclass(frozen=True)
class Scoped:
    """``every reading (q)``, ``some member (q)``, ``no reading (q)``: a class-level condition.

    ``q`` is evaluated on each reading (or member parameter set) of the class on its own;
    ``every`` holds when q holds on all of them, ``some`` when on at least one, ``no`` when on
    none. A reading scope takes class and reading fields; scopes do not nest.
    """

    quantifier: str
    scope: str
    operand: Node

    def __post_init__(self) -> None:
        if self.quantifier not in QUANTIFIERS:
            raise ValueError(f"unknown quantifier {self.quantifier!r}")
        if self.scope not in SCOPES:
            raise ValueError(f"unknown scope {self.scope!r}")
        for leaf in iter_conditions(self.operand):
            if isinstance(leaf, Scoped):
                raise ValueError("scopes do not nest")
            if self.scope == "reading" and require_field(leaf.field).level is Level.PARAMETER_SET:
                raise ValueError(f"{leaf.field} is a parameter-set field, not in a reading scope")

    def render(self) -> str:
        return f"{self.quantifier} {self.scope} ({self.operand.render()})"


Node = Comparison | Range | Membership | BoolField | Not | And | Or | Scoped
Condition = Comparison | Range | Membership | BoolField


def iter_conditions(node: Node, *, into_scopes: bool = True) -> Iterator[Condition | Scoped]:
    """The leaf conditions of a tree, left to right (without recursion: trees may be deep).

    With ``into_scopes=False`` a scope is yielded whole instead of its conditions.
    """
    stack: list[Node] = [node]
    while stack:
        current = stack.pop()
        if isinstance(current, Not):
            stack.append(current.operand)
        elif isinstance(current, And | Or):
            stack.extend(reversed(current.operands))
        elif isinstance(current, Scoped):
            if into_scopes:
                stack.append(current.operand)
            else:
                yield current
        else:
            yield current


def referenced_fields(node: Node) -> frozenset[Field]:
    """The registry fields a query mentions, inside scopes included."""
    return frozenset(
        require_field(leaf.field) for leaf in iter_conditions(node) if not isinstance(leaf, Scoped)
    )


def referenced_levels(node: Node) -> frozenset[Level]:
    """The levels (class, reading, parameter set) a query mentions."""
    return frozenset(field.level for field in referenced_fields(node))


# --- tokenizer ------------------------------------------------------------------------------


@dataclass(frozen=True)
class Token:
    """One token: its kind (name, number, op, lparen, rparen, comma, range, end), text, offset."""

    kind: str
    text: str
    position: int
    number: Fraction | None = None


_NUMBER = re.compile(
    r"""-?(?P<int>[0-9]+)
        (?: \.(?P<frac>[0-9]+) )?
        (?: [eE]\+?(?P<exp>[0-9]+) | \^(?P<pow>[0-9]+) | /(?P<den>[0-9]+) )?""",
    re.VERBOSE,
)
_PUNCTUATION = {"(": "lparen", ")": "rparen", ",": "comma"}
_DIGITS = "0123456789"  # str.isdigit() would also accept superscripts and other scripts
_DIGITS_NONEMPTY = frozenset(_DIGITS)


def _number_value(match: re.Match[str], query: str, position: int) -> Fraction:
    """The exact value of a number token; rejects huge numbers and zero denominators."""
    text = match.group(0)
    sign = -1 if text.startswith("-") else 1
    whole, frac = match.group("int"), match.group("frac") or ""
    exp, power, den = match.group("exp"), match.group("pow"), match.group("den")
    # Leading zeros carry no value; without them every digit string below is short enough for
    # int(), whose conversion limit is 4,300 digits.
    whole = whole.lstrip("0") or "0"
    if den is not None:
        den = den.lstrip("0") or "0"
    if power is not None and frac:
        raise QuerySyntaxError(
            f"Number '{text}' raises a decimal to a power; write whole-number powers such as "
            "10^20 or decimal exponents such as 2.5e20",
            query,
            position,
        )
    if den is not None and frac:
        raise QuerySyntaxError(
            f"Number '{text}' mixes a decimal point and a fraction bar; write 1/4 or 0.25",
            query,
            position,
        )
    digits = len(whole.lstrip("0")) + len(frac)
    if exp is not None:
        digits += int(exp) if len(exp) < 6 else MAX_DIGITS + 1
    if power is not None:
        base = int(whole)
        size = len(str(base)) * int(power) if len(power) < 6 else MAX_DIGITS + 1
        digits = size if base > 1 else 1
    if den is not None:
        digits = max(digits, len(den))
    if digits > MAX_DIGITS:
        raise QuerySyntaxError(
            f"Number '{text}' has more than {MAX_DIGITS} digits; no catalog value is that large",
            query,
            position,
        )
    if power is not None:
        return Fraction(sign * int(whole) ** int(power))
    value = Fraction(int(whole + frac), 10 ** len(frac))
    if exp is not None:
        value *= 10 ** int(exp)
    if den is not None:
        if int(den) == 0:
            raise QuerySyntaxError(
                f"Fraction '{text}' divides by zero; give a positive denominator",
                query,
                position + text.index("/") + 1,
            )
        value /= int(den)
    return sign * value


def tokenize(query: str) -> list[Token]:
    """Split a query into tokens, ending with an ``end`` token at the end of the text.

    ``number ::= ["-"] digits ["." digits] [("e" | "E") ["+"] digits | "^" digits | "/" digits]``
    (``1e20`` and ``10^20`` are exact integers, ``1/3``, ``-1/5`` and ``0.25`` exact
    fractions); ``name ::= letter (letter | digit | "_")*`` (Greek letters included).
    """
    tokens: list[Token] = []
    i = 0
    while i < len(query):
        ch = query[i]
        if ch.isspace():
            i += 1
            continue
        if ch in _DIGITS or (ch == "-" and query[i + 1 : i + 2] in _DIGITS_NONEMPTY):
            match = _NUMBER.match(query, i)
            assert match is not None  # an ASCII digit always starts a number
            value = _number_value(match, query, i)
            tokens.append(Token("number", match.group(0), i, value))
            i = match.end()
            continue
        if ch.isalpha() or ch == "_":
            j = i + 1
            while j < len(query) and (query[j].isalnum() or query[j] == "_"):
                j += 1
            tokens.append(Token("name", query[i:j], i))
            i = j
            continue
        two = query[i : i + 2]
        if two in ("!=", "<=", ">=", ".."):
            tokens.append(Token("range" if two == ".." else "op", two, i))
            i += 2
            continue
        if ch in "=<>":
            tokens.append(Token("op", ch, i))
            i += 1
            continue
        if ch in _PUNCTUATION:
            tokens.append(Token(_PUNCTUATION[ch], ch, i))
            i += 1
            continue
        hint = {
            "&": "; write 'and'",
            "|": "; write 'or'",
            "!": "; write 'not', or '!=' for not equal",
            "-": "; a minus sign must stand right before a number, as in -1/5",
        }.get(
            ch,
            "; a query uses field names, numbers, = != < <= > >=, 'in', '..', 'and', 'or', "
            "'not' and parentheses",
        )
        raise QuerySyntaxError(f"Unexpected character '{ch}' in the query{hint}", query, i)
    tokens.append(Token("end", "", len(query)))
    return tokens


# --- parser ---------------------------------------------------------------------------------


def _describe(token: Token) -> str:
    return "the end of the query" if token.kind == "end" else f"'{token.text}'"


def _is_word(token: Token, *words: str) -> bool:
    return token.kind == "name" and token.text.casefold() in words


class _Parser:
    """Recursive descent over the token list; one method per grammar rule."""

    def __init__(self, query: str) -> None:
        self.query = query
        self.tokens = tokenize(query)
        self.index = 0
        self.depth = 0  # open '(', 'not' and scopes; bounded, so recursion stays shallow
        self.conditions = 0
        self.values = 0
        self.scope: Token | None = None  # the quantifier word of the scope being read

    @property
    def current(self) -> Token:
        return self.tokens[self.index]

    def advance(self) -> Token:
        token = self.tokens[self.index]
        self.index += 1
        return token

    def error(self, message: str, token: Token) -> QuerySyntaxError:
        return QuerySyntaxError(message, self.query, token.position)

    def enter(self, token: Token) -> None:
        """Open one nesting level at ``token``; refuse the level past MAX_NESTING."""
        self.depth += 1
        if self.depth > MAX_NESTING:
            raise self.error(
                f"The query nests deeper than {MAX_NESTING} levels (each '(' and 'not' opens "
                "one); remove redundant parentheses and double 'not', or list values "
                "with 'field in (v1, v2, ...)'",
                token,
            )

    def parse_query(self) -> Node:
        """``query ::= or_expr end``"""
        if self.current.kind == "end":
            raise self.error(
                "The query is empty; write a condition such as 'processes = 3 and area < 100'",
                self.current,
            )
        node = self.parse_or()
        if self.current.kind != "end":
            if self.current.kind == "rparen":
                raise self.error(
                    "Unmatched ')' in the query; remove it or add '(' before", self.current
                )
            raise self.error(
                f"Expected 'and', 'or' or the end of the query, found {_describe(self.current)}",
                self.current,
            )
        return node

    def parse_or(self) -> Node:
        """``or_expr ::= and_expr ("or" and_expr)*``"""
        operands = [self.parse_and()]
        while _is_word(self.current, "or"):
            self.advance()
            operands.append(self.parse_and())
        return operands[0] if len(operands) == 1 else Or(tuple(operands))

    def parse_and(self) -> Node:
        """``and_expr ::= not_expr ("and" not_expr)*``"""
        operands = [self.parse_not()]
        while _is_word(self.current, "and"):
            self.advance()
            operands.append(self.parse_not())
        return operands[0] if len(operands) == 1 else And(tuple(operands))

    def parse_not(self) -> Node:
        """``not_expr ::= "not" not_expr | atom``"""
        if _is_word(self.current, "not"):
            self.enter(self.advance())
            node = Not(self.parse_not())
            self.depth -= 1
            return node
        return self.parse_atom()

    def parse_atom(self) -> Node:
        """``atom ::= "(" or_expr ")" | scope | condition``"""
        if self.current.kind == "lparen":
            return self.parse_group()
        if self.at_scope():
            return self.parse_scope()
        return self.parse_condition()

    def parse_group(self) -> Node:
        opening = self.advance()
        self.enter(opening)
        node = self.parse_or()
        if self.current.kind != "rparen":
            raise self.error(
                f"Expected ')' to close the '(' at position {opening.position}, "
                f"found {_describe(self.current)}",
                self.current,
            )
        self.advance()
        self.depth -= 1
        return node

    def at_scope(self) -> bool:
        """Whether a scope starts here: 'every'/'some' always, 'no' before a scope word."""
        if _is_word(self.current, "every", "some"):
            return True
        following = self.tokens[min(self.index + 1, len(self.tokens) - 1)]
        return _is_word(self.current, "no") and _is_word(following, *SCOPES)

    def parse_scope(self) -> Node:
        """``scope ::= ("every" | "some" | "no") ("reading" | "member") "(" or_expr ")"``

        A scope is a class-level condition: its inner query is evaluated on each reading
        (or member parameter set) of the class on its own.
        """
        word = self.advance()
        quantifier = word.text.casefold()
        example = f"'{quantifier} reading (regular)' or '{quantifier} member (gamma = 1)'"
        if self.scope is not None:
            raise self.error(
                f"Scopes do not nest: '{word.text}' stands inside the scope opened by "
                f"'{self.scope.text}' at position {self.scope.position}; write them side by "
                "side, joined with 'and' or 'or'",
                word,
            )
        if not _is_word(self.current, *SCOPES):
            raise self.error(
                f"Expected 'reading' or 'member' after '{word.text}', found "
                f"{_describe(self.current)}; write {example}",
                self.current,
            )
        scope = self.advance().text.casefold()
        if self.current.kind != "lparen":
            raise self.error(
                f"Expected '(' after '{word.text} {scope}', found {_describe(self.current)}; "
                f"write {example}",
                self.current,
            )
        self.scope = word
        start = self.index
        operand = self.parse_group()
        self.scope = None
        if scope == "reading":
            for token in self.tokens[start : self.index]:
                field = field_named(token.text) if token.kind == "name" else None
                if field is not None and field.level is Level.PARAMETER_SET:
                    raise self.error(
                        f"Field '{field.name}' differs between the parameter sets of one "
                        f"reading; inside '{word.text} reading (...)' use class and reading "
                        f"fields, or write '{quantifier} member (...)'",
                        token,
                    )
        return Scoped(quantifier, scope, operand)

    def parse_field(self) -> Field:
        """``field ::= name`` (a field name or alias from the registry, any letter case)"""
        token = self.current
        if token.kind != "name" or token.text.casefold() in KEYWORDS:
            raise self.error(f"Expected a field name, found {_describe(token)}", token)
        field = field_named(token.text)
        if field is None:
            near = closest_field(token.text)
            hint = f" (did you mean '{near.name}'?)" if near else ""
            raise self.error(
                f"Unknown field '{token.text}'{hint}; valid fields: {field_list_text()}", token
            )
        self.advance()
        return field

    def parse_condition(self) -> Node:
        """``condition ::= field op value | field "in" range | field "in" membership | field``

        ``op ::= "=" | "!=" | "<" | "<=" | ">" | ">="``. Only a yes/no field may stand bare;
        it is compared only with ``=`` and ``!=`` to ``yes``, ``no``, ``true`` or ``false``.
        """
        start = self.current
        field = self.parse_field()
        self.conditions += 1
        if self.conditions > MAX_CONDITIONS:
            raise self.error(
                f"The query has more than {MAX_CONDITIONS} conditions; list values with "
                "'field in (v1, v2, ...)' or 'field in low..high', or split the query",
                start,
            )
        token = self.current
        boolean = field.type is FieldType.BOOLEAN
        if token.kind == "op":
            self.advance()
            if boolean and token.text not in ("=", "!="):
                raise self.error(
                    f"Field '{field.name}' is yes/no and allows only = and !=, not "
                    f"'{token.text}'; write '{field.name}', 'not {field.name}' or "
                    f"'{field.name} = no'",
                    token,
                )
            return Comparison(field.name, token.text, self.parse_value(field, token))
        if _is_word(token, "in"):
            if boolean:
                raise self.error(
                    f"Field '{field.name}' is yes/no and takes no 'in'; write '{field.name}' "
                    f"or 'not {field.name}'",
                    token,
                )
            self.advance()
            if self.current.kind == "lparen":
                return self.parse_membership(field)
            return self.parse_range(field, token)
        if boolean:
            return BoolField(field.name)
        raise self.error(
            f"Field '{field.name}' needs a comparison after it, found {_describe(token)}; "
            f"for example '{field.example}'",
            token if token.kind != "end" else start,
        )

    def parse_range(self, field: Field, keyword: Token) -> Node:
        """``range ::= value ".." value`` (both ends included)"""
        first = self.current
        low = self.parse_value(field, keyword)
        if self.current.kind != "range":
            raise self.error(
                f"Expected '..' in the range after '{field.name} in {first.text}', found "
                f"{_describe(self.current)}; write '{field.name} in 10..20' or "
                f"'{field.name} in (12, 16)'",
                self.current,
            )
        dots = self.advance()
        high = self.parse_value(field, dots)
        if high < low:
            raise self.error(
                f"Range {render_value(low)}..{render_value(high)} of '{field.name}' is empty; "
                f"write the smaller end first: {render_value(high)}..{render_value(low)}",
                first,
            )
        return Range(field.name, low, high)

    def parse_membership(self, field: Field) -> Node:
        """``membership ::= "(" value ("," value)* ")"``"""
        opening = self.advance()
        values = [self.parse_value(field, opening)]
        while self.current.kind == "comma":
            comma = self.advance()
            values.append(self.parse_value(field, comma))
        if self.current.kind != "rparen":
            raise self.error(
                f"Expected ',' or ')' in the list of values of '{field.name}', found "
                f"{_describe(self.current)}",
                self.current,
            )
        self.advance()
        return Membership(field.name, tuple(values))

    def parse_value(self, field: Field, after: Token) -> Value:
        """``value ::= number | "yes" | "no" | "true" | "false"`` (checked against the field)"""
        token = self.current
        self.values += 1
        if self.values > MAX_VALUES:
            raise self.error(
                f"The query holds more than {MAX_VALUES} values; use ranges "
                "('field in low..high') for runs of values, or split the query",
                token,
            )
        if field.type is FieldType.BOOLEAN:
            if not _is_word(token, *_BOOLEAN_WORDS):
                raise self.error(
                    f"Field '{field.name}' is yes/no; compare it with yes, no, true or false, "
                    f"not {_describe(token)}",
                    token,
                )
            self.advance()
            return _BOOLEAN_WORDS[token.text.casefold()]
        if token.kind != "number" or token.number is None:
            found = _describe(token)
            if _is_word(token, *_BOOLEAN_WORDS):
                found = f"'{token.text}' ({field.type.value} fields take numbers)"
            raise self.error(
                f"Expected a number after '{after.text}' for field '{field.name}', found {found}",
                token,
            )
        self.advance()
        number = token.number
        if field.type is FieldType.FRACTION:
            if max(abs(number.numerator), number.denominator) >= MAX_FRACTION_PART:
                raise self.error(
                    f"Fraction '{token.text}' for field '{field.name}' is too fine or too large; "
                    "numerator and denominator must stay below 10^12",
                    token,
                )
            return number
        if number.denominator != 1:
            raise self.error(
                f"Field '{field.name}' takes whole numbers ({field.type.value}); "
                f"'{token.text}' is not whole",
                token,
            )
        return int(number)


def parse_query(text: str) -> Node:
    """Parse a catalog query into its syntax tree; QuerySyntaxError with a caret position.

    >>> parse_query("processes = 3 and area < 100").render()
    'processes = 3 and area < 100'
    >>> parse_query("α in 1..3 and REGULAR").render()
    'alpha in 1..3 and regular'
    """
    return _Parser(text).parse_query()


# --- sort keys ------------------------------------------------------------------------------


@dataclass(frozen=True)
class SortKey:
    """A sort order: a field, ascending or descending (``loop``, ``-states``)."""

    field: str
    descending: bool = False

    def render(self) -> str:
        return f"-{self.field}" if self.descending else self.field


def parse_sort_key(text: str) -> SortKey:
    """Parse ``field``, ``+field`` or ``-field`` (descending) into a SortKey.

    >>> parse_sort_key("-states")
    SortKey(field='states', descending=True)
    """
    offset = len(text) - len(text.lstrip())
    stripped = text.strip()
    descending = stripped.startswith("-")
    if stripped[:1] in ("+", "-"):
        rest = stripped[1:]
        offset += 1 + len(rest) - len(rest.lstrip())
        stripped = rest.strip()
    if not stripped:
        raise QuerySyntaxError(
            "The sort key is empty; give a field such as 'loop' or '-states' (descending)",
            text,
            offset,
        )
    field = field_named(stripped)
    if field is None:
        near = closest_field(stripped)
        hint = f" (did you mean '{near.name}'?)" if near else ""
        raise QuerySyntaxError(
            f"Unknown sort field '{stripped}'{hint}; valid fields: {field_list_text()}",
            text,
            offset,
        )
    return SortKey(field.name, descending)


def parse_field_names(text: str) -> tuple[str, ...]:
    """Parse a comma-separated list of fields (for column selection) into canonical names.

    >>> parse_field_names("area, loop,β")
    ('area', 'loop', 'beta')
    """
    names: list[str] = []
    position = 0
    for part in text.split(","):
        name = part.strip()
        offset = position + len(part) - len(part.lstrip())
        position += len(part) + 1
        field = field_named(name)
        if field is None:
            near = closest_field(name) if name else None
            hint = f" (did you mean '{near.name}'?)" if near else ""
            what = f"Unknown column field '{name}'" if name else "Empty column field name"
            raise QuerySyntaxError(f"{what}{hint}; valid fields: {field_list_text()}", text, offset)
        names.append(field.name)
    return tuple(names)


# --- area bound -----------------------------------------------------------------------------


def referenced_area_bound(node: Node) -> int | None:
    """The largest area a query can match if it bounds the area, else None.

    ``area < 100`` gives 99, ``area in 10..20`` gives 20, ``not area > 50`` gives 50, and a
    query that leaves the area open (``processes = 3``, ``area > 5``) gives None. The CLI
    uses it to warn when a query reaches past the area up to which the catalog is complete.

    >>> referenced_area_bound(parse_query("processes = 3 and area < 100"))
    99
    """
    bound = _area_bound(node, negated=False)
    return None if bound is None else max(bound, 0)


def _area_bound(node: Node, negated: bool) -> int | None:
    if isinstance(node, Not):
        return _area_bound(node.operand, not negated)
    if isinstance(node, Scoped):
        # area is the same on every reading and member, and every class has one: 'every'
        # and 'some' bound it as their operand does, 'no' as the operand's negation.
        return _area_bound(node.operand, negated != (node.quantifier == "no"))
    if isinstance(node, And | Or):
        bounds = [_area_bound(o, negated) for o in node.operands]
        # "and" (or a negated "or", by De Morgan) is bounded when any operand is.
        if isinstance(node, And) != negated:
            known = [b for b in bounds if b is not None]
            return min(known) if known else None
        if any(b is None for b in bounds):
            return None
        return max(b for b in bounds if b is not None)
    if node.field != "area":
        return None
    if isinstance(node, Range):
        return None if negated else int(node.high)
    if isinstance(node, Membership):
        return None if negated else max(int(v) for v in node.values)
    if isinstance(node, Comparison):
        op = node.op
        if negated:
            op = {"=": "!=", "!=": "=", "<": ">=", "<=": ">", ">": "<=", ">=": "<"}[op]
        value = int(node.value)
        return {"=": value, "<": value - 1, "<=": value}.get(op)
    return None


# --- grammar --------------------------------------------------------------------------------


def grammar_rules() -> tuple[str, ...]:
    """The grammar rules quoted in the parser's docstrings, in the order a reader meets them.

    Read from the docstrings so that the documented grammar is always the one parsed
    (zoo.query.docs prints it on docs/query-language.md).
    """
    methods = (
        _Parser.parse_query,
        _Parser.parse_or,
        _Parser.parse_and,
        _Parser.parse_not,
        _Parser.parse_atom,
        _Parser.parse_scope,
        _Parser.parse_condition,
        _Parser.parse_range,
        _Parser.parse_membership,
        _Parser.parse_value,
        _Parser.parse_field,
        tokenize,
    )
    rules = []
    for method in methods:
        for quoted in re.findall(r"``(.+?)``", method.__doc__ or "", re.DOTALL):
            if "::=" in quoted:
                rules.append(" ".join(quoted.split()))
    return tuple(rules)


__all__ = [
    "FIELDS",
    "And",
    "BoolField",
    "Comparison",
    "Membership",
    "Node",
    "Not",
    "Or",
    "Range",
    "Scoped",
    "SortKey",
    "grammar_rules",
    "iter_conditions",
    "parse_field_names",
    "parse_query",
    "parse_sort_key",
    "referenced_area_bound",
    "referenced_fields",
    "referenced_levels",
    "render_value",
    "tokenize",
]
