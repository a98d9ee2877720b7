"""Enumeration of parameter sets by area: every (alpha, beta, gamma, delta) >= 1 of a given area.

The area of C(alpha, beta, gamma, delta) is A = alpha*delta + beta*gamma (docs/theory/folding.md),
so
the parameter sets of area A are the ordered ways of writing A = j + (A - j) with j = alpha*delta
and A - j = beta*gamma. Their number is sum_{j=1}^{A-1} d(j)*d(A-j), d the divisor-count
function: OEIS A055507 at index A-1 (checked against the sequence's published terms and against
sympy in tests/catalog/test_enumeration.py).
"""

from __future__ import annotations

from collections.abc import Iterator
from functools import lru_cache

from zoo.core.params import MAX_AREA, ParameterSet
from zoo.errors import ParameterError

__all__ = [
    "iter_parameter_sets",
    "iter_parameter_tuples",
    "parameter_set_count",
    "cumulative_parameter_set_count",
]


@lru_cache(maxsize=4096)
def _divisors(n: int) -> tuple[int, ...]:
    """The positive divisors of n in increasing order (trial division; n is small here)."""
    small: list[int] = []
    large: list[int] = []
    k = 1
    while k * k <= n:
        if n % k == 0:
            small.append(k)
            if k * k != n:
                large.append(n // k)
        k += 1
    return tuple(small + large[::-1])


def _check_area(area: int) -> None:
    if isinstance(area, bool) or not isinstance(area, int):
        raise ParameterError(f"area must be a whole number, got {area!r}")
    if area < 1 or area > MAX_AREA:
        raise ParameterError(f"area must lie between 1 and {MAX_AREA:,}, got {area}")


def iter_parameter_tuples(area: int) -> Iterator[tuple[int, int, int, int]]:
    """Every (alpha, beta, gamma, delta) of the given area as plain tuples, lexicographic order.

    The catalog build uses tuples because they are several times cheaper than validated
    ParameterSet objects; every tuple yielded is a valid parameter set.

    >>> list(iter_parameter_tuples(3))
    [(1, 1, 1, 2), (1, 1, 2, 1), (1, 2, 1, 1), (2, 1, 1, 1)]
    """
    _check_area(area)
    found: list[tuple[int, int, int, int]] = []
    for j in range(1, area):  # j = alpha*delta, area - j = beta*gamma
        rest = area - j
        rest_divisors = _divisors(rest)
        for alpha in _divisors(j):
            delta = j // alpha
            for beta in rest_divisors:
                found.append((alpha, beta, rest // beta, delta))
    found.sort()
    yield from found


def iter_parameter_sets(area: int) -> Iterator[ParameterSet]:
    """Every parameter set of the given area, in lexicographic order of (alpha, beta, gamma, delta).

    >>> [str(p) for p in iter_parameter_sets(2)]
    ['C(1,1,1,1)']
    """
    for values in iter_parameter_tuples(area):
        yield ParameterSet(*values)


def parameter_set_count(area: int) -> int:
    """The number of parameter sets of the given area: sum_{j=1}^{A-1} d(j)*d(A-j) (OEIS A055507).

    >>> [parameter_set_count(a) for a in range(1, 7)]
    [0, 1, 4, 8, 14, 20]
    """
    _check_area(area)
    return sum(len(_divisors(j)) * len(_divisors(area - j)) for j in range(1, area))


def cumulative_parameter_set_count(max_area: int) -> int:
    """The number of parameter sets of area at most max_area (25,331 for 60)."""
    if max_area < 1:
        return 0
    return sum(parameter_set_count(a) for a in range(1, max_area + 1))
