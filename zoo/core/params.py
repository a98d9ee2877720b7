"""Parameter sets: the four positive integers (alpha, beta, gamma, delta) of a cycloid.

A parameter set is a frozen value type validated on construction. It parses from the forms a
researcher types: ``4,2,2,3``, ``4 2 2 3`` and ``C(4,2,2,3)``.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from zoo.errors import ParameterError

#: Largest area accepted anywhere. Beyond it a typo is far more likely than intent, and even the
#: closed formulas slow down: the reachable-state count of C(50000,50000,1,1) already has 30,101
#: digits (0.1 s); at area 10^6 it takes seconds (measured).
MAX_AREA = 100_000

#: Operations on a parameter set that live above this module (the explicit net, the pictures).
#: The package interface (zoo/__init__.py, which Python loads before any zoo module) installs
#: them, so that this module stays at the bottom of the import graph.
EXTENSIONS: dict[str, Callable[[ParameterSet], Any]] = {}

_FORM = re.compile(r"^\s*(?:[cC]\s*\(\s*(?P<inner>[^()]*)\)|(?P<bare>[^()]*))\s*$")
_INTEGER = re.compile(r"[+-]?[0-9]+")
_NAMES = ("alpha", "beta", "gamma", "delta")


@dataclass(frozen=True, order=True)
class ParameterSet:
    """The parameters of the cycloid C(alpha, beta, gamma, delta) ([P18] §2,
    docs/theory/folding.md).

    Ordering is lexicographic on (alpha, beta, gamma, delta); the catalog uses it to pick the
    smallest member of a class as its label.

    >>> ParameterSet(4, 2, 2, 3).area
    16
    >>> str(ParameterSet(4, 2, 2, 3).swap())
    'C(2,4,3,2)'
    """

    alpha: int
    beta: int
    gamma: int
    delta: int

    def __post_init__(self) -> None:
        for name in _NAMES:
            value = getattr(self, name)
            if isinstance(value, bool) or not isinstance(value, int):
                raise ParameterError(
                    f"{name} must be a whole number, got {value!r}; "
                    "give four positive integers such as 4,2,2,3"
                )
            if value < 1:
                raise ParameterError(
                    f"{name} must be a positive integer, got {value}; "
                    "every cycloid parameter is at least 1"
                )
        if self.area > MAX_AREA:
            raise ParameterError(
                f"area alpha*delta + beta*gamma = {self.area:,} of {self} is over the limit "
                f"{MAX_AREA:,}; choose smaller parameters"
            )

    @property
    def area(self) -> int:
        """A = alpha*delta + beta*gamma, the transitions ([FR24]; docs/theory/folding.md)."""
        return self.alpha * self.delta + self.beta * self.gamma

    def as_tuple(self) -> tuple[int, int, int, int]:
        """(alpha, beta, gamma, delta) as a plain tuple."""
        return (self.alpha, self.beta, self.gamma, self.delta)

    def swap(self) -> ParameterSet:
        """C(beta, alpha, delta, gamma): the mirror (xi, eta) -> (eta, xi)
        (docs/theory/isomorphism.md)."""
        return ParameterSet(self.beta, self.alpha, self.delta, self.gamma)

    def __str__(self) -> str:
        return f"C({self.alpha},{self.beta},{self.gamma},{self.delta})"

    def to_networkx(self) -> Any:
        """The explicit net of C(self) as a ``networkx.DiGraph``: transition and place nodes,
        tokens on the places, and the graph attributes ``params``, ``label`` and ``marking``
        (``zoo.core.net.to_networkx``)."""
        return EXTENSIONS["to_networkx"](self)

    def _repr_svg_(self) -> str | None:
        """The fundamental parallelogram as SVG, so that a notebook shows a parameter set
        (None, so no picture, when the drawing is refused, e.g. beyond the picture limit)."""
        draw = EXTENSIONS.get("svg")
        return None if draw is None else draw(self)

    @classmethod
    def parse(cls, text: str) -> ParameterSet:
        """Parse any accepted written form; see ``parse_params``."""
        return parse_params(text)


def parse_params(text: str) -> ParameterSet:
    """Parse ``4,2,2,3``, ``4 2 2 3`` or ``C(4,2,2,3)`` into a ParameterSet.

    Grammar (spaces allowed around every token)::

        params  := "C(" values ")" | "c(" values ")" | values
        values  := value ("," value){3} | value (" " value){3}
        value   := ["+" | "-"] digit+          (checked to be >= 1 afterwards)

    Every malformed input raises ParameterError with a one-line message that says what is
    wrong and what is allowed.

    >>> parse_params("C(4, 2, 2, 3)")
    ParameterSet(alpha=4, beta=2, gamma=2, delta=3)
    >>> parse_params("4 2 2 3") == parse_params("4,2,2,3")
    True
    """
    if not isinstance(text, str):
        raise ParameterError(f"parameter set must be text, got {type(text).__name__}")
    shown = text.strip()
    if not shown:
        raise ParameterError(
            "empty parameter set; give four positive integers alpha,beta,gamma,delta "
            "such as 4,2,2,3"
        )
    match = _FORM.match(text)
    if match is None:
        raise ParameterError(
            f"cannot read parameter set {shown!r}; write it as 4,2,2,3 or '4 2 2 3' or C(4,2,2,3)"
        )
    body = match.group("inner") if match.group("inner") is not None else match.group("bare")
    body = body.strip()
    parts = [part.strip() for part in body.split(",")] if "," in body else body.split()
    if len(parts) != 4:
        raise ParameterError(
            f"a parameter set has four values (alpha, beta, gamma, delta), got {len(parts)} in "
            f"{shown!r}; write it as 4,2,2,3"
        )
    values: list[int] = []
    for name, part in zip(_NAMES, parts, strict=True):
        if not part:
            raise ParameterError(
                f"{name} is missing in {shown!r}; write four positive integers such as 4,2,2,3"
            )
        if not _INTEGER.fullmatch(part):
            raise ParameterError(
                f"{name} must be a whole number, got {part!r} in {shown!r}; "
                "write four positive integers such as 4,2,2,3"
            )
        if len(part.lstrip("+-")) > 12:
            raise ParameterError(
                f"{name} = {part} is absurdly large; the area alpha*delta + beta*gamma may be "
                f"at most {MAX_AREA:,}"
            )
        values.append(int(part))
    return ParameterSet(*values)
