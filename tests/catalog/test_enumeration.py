"""Enumeration of parameter sets by area, checked against outside counts."""

from __future__ import annotations

import pytest
from sympy import divisor_count

from zoo.catalog.enumeration import (
    cumulative_parameter_set_count,
    iter_parameter_sets,
    iter_parameter_tuples,
    parameter_set_count,
)
from zoo.core.params import ParameterSet
from zoo.errors import ParameterError

# OEIS A055507, a(n) = Sum_{k=1..n} d(k)*d(n+1-k): "the number of ordered ways to express n+1
# as a*b+c*d with a,b,c,d >= 1" (comment by D. W. Wilson), i.e. the parameter sets of area
# n + 1. Terms n = 1..55 copied from the sequence's page (oeis.org/A055507). The issue text
# named A000385 from memory; that entry is, also from memory, the self-convolution of sigma,
# a different sequence, so the divisor-count convolution is cited by its own number here.
A055507 = (
    1,
    4,
    8,
    14,
    20,
    28,
    37,
    44,
    58,
    64,
    80,
    86,
    108,
    108,
    136,
    134,
    169,
    160,
    198,
    192,
    236,
    216,
    276,
    246,
    310,
    288,
    348,
    310,
    400,
    344,
    433,
    396,
    474,
    408,
    544,
    450,
    564,
    512,
    614,
    522,
    688,
    560,
    716,
    638,
    756,
    636,
    860,
    676,
    859,
    772,
    926,
    758,
    1016,
    804,
    1032,
)


def test_counts_match_oeis_a055507() -> None:
    counts = tuple(parameter_set_count(area) for area in range(2, 2 + len(A055507)))
    assert counts == A055507


@pytest.mark.parametrize("area", [1, 2, 3, 17, 60, 97, 100, 144, 200])
def test_count_is_the_divisor_convolution_computed_by_sympy(area: int) -> None:
    expected = sum(int(divisor_count(j)) * int(divisor_count(area - j)) for j in range(1, area))
    assert parameter_set_count(area) == expected
    assert sum(1 for _ in iter_parameter_tuples(area)) == expected


def test_cumulative_totals_from_design_notes() -> None:
    # docs/architecture.md, measured facts: 25,331 with area <= 60, 90,253 <= 100, 486,508 <= 200.
    assert cumulative_parameter_set_count(60) == 25_331
    assert cumulative_parameter_set_count(100) == 90_253
    assert cumulative_parameter_set_count(200) == 486_508


@pytest.mark.parametrize("area", range(1, 21))
def test_enumeration_equals_brute_force_in_lexicographic_order(area: int) -> None:
    brute = [
        (a, b, c, d)
        for a in range(1, area + 1)
        for b in range(1, area + 1)
        for c in range(1, area + 1)
        for d in range(1, area + 1)
        if a * d + b * c == area
    ]  # already lexicographic: the loops run in (alpha, beta, gamma, delta) order
    assert list(iter_parameter_tuples(area)) == brute


def test_parameter_sets_are_valid_and_of_the_area() -> None:
    sets = list(iter_parameter_sets(16))
    assert all(isinstance(p, ParameterSet) and p.area == 16 for p in sets)
    assert ParameterSet(4, 2, 2, 3) in sets  # docs/theory/equivalence.md example, A = 16
    assert sets == sorted(set(sets))


def test_area_one_has_no_parameter_sets() -> None:
    assert list(iter_parameter_sets(1)) == []
    assert parameter_set_count(1) == 0


@pytest.mark.parametrize("bad", [0, -3, True, 2.5, 10**7])
def test_bad_area_is_refused(bad: object) -> None:
    with pytest.raises(ParameterError):
        list(iter_parameter_tuples(bad))  # type: ignore[arg-type]
    with pytest.raises(ParameterError):
        parameter_set_count(bad)  # type: ignore[arg-type]
