"""Synthesis: the parameter sets of a cycloid system from net-level observables
(docs/theory/synthesis.md).

The synthesis theorem of [P18]/[FI19] (cited in the introduction of [RC22]) recovers the
parameters from the number of transitions A, the minimal cycle length cyc and the token counts.
Its closed form, gamma = (alpha*cyc - A)/(alpha - beta) and delta = (A - beta*cyc)/(alpha - beta),
needs alpha != beta and a shortest cycle along R; docs/theory/synthesis.md shows it fails on many
tuples and
that (A, cyc, alpha, beta) is not even a complete invariant (A = 45, 48, 54). This module
therefore implements the robust method: try every candidate and keep those whose exact loop
matches, one per distinct folding lattice.
"""

from __future__ import annotations

from fractions import Fraction

from zoo.core.algebra import LatticeKey, lattice_key
from zoo.core.invariants import minimal_cycle_length
from zoo.core.params import MAX_AREA, ParameterSet
from zoo.errors import ParameterError


def _check_positive(name: str, value: int, limit: int | None = None) -> None:
    if isinstance(value, bool) or not isinstance(value, int):
        raise ParameterError(f"{name} must be a whole number, got {value!r}")
    if value < 1:
        raise ParameterError(f"{name} must be a positive integer, got {value}")
    if limit is not None and value > limit:
        raise ParameterError(f"{name} may be at most {limit:,}, got {value:,}")


def candidates(area: int, alpha: int, beta: int) -> list[ParameterSet]:
    """All parameter sets with the given area and token counts (alpha backward, beta forward).

    alpha*delta + beta*gamma = A with gamma, delta >= 1: for every delta in 1..(A - beta)/alpha
    with beta | (A - alpha*delta), gamma = (A - alpha*delta)/beta (docs/theory/synthesis.md, step
    1).
    Sorted by (gamma, delta).

    >>> [str(p) for p in candidates(16, 4, 2)]
    ['C(4,2,2,3)', 'C(4,2,4,2)', 'C(4,2,6,1)']
    """
    _check_positive("area", area, MAX_AREA)
    _check_positive("alpha", alpha)
    _check_positive("beta", beta)
    found: list[ParameterSet] = []
    for delta in range(1, (area - beta) // alpha + 1):
        rest = area - alpha * delta
        if rest >= beta and rest % beta == 0:
            found.append(ParameterSet(alpha, beta, rest // beta, delta))
    return sorted(found)


def synthesize(area: int, loop: int, alpha: int, beta: int) -> list[ParameterSet]:
    """The systems with A transitions, minimal cycle length ``loop`` and token counts alpha, beta.

    One parameter set per distinct folding lattice (the smallest of its candidates), sorted.
    With alpha and beta fixed, distinct lattices are distinct readings; two readings may still
    be the same class when alpha = beta (the swap, docs/theory/synthesis.md tables), which
    ``zoo.core.algebra.class_key`` tells apart. An empty list means no cycloid has these
    observables. (docs/theory/synthesis.md "robust synthesis"; checked against its tables in
    tests/core/test_synthesis.py.)

    >>> [str(p) for p in synthesize(16, 5, 4, 2)]
    ['C(4,2,2,3)']
    >>> [str(p) for p in synthesize(45, 5, 3, 18)]
    ['C(3,18,1,9)', 'C(3,18,2,3)']
    """
    _check_positive("loop", loop)
    by_lattice: dict[LatticeKey, ParameterSet] = {}
    for p in candidates(area, alpha, beta):
        if minimal_cycle_length(p) == loop:
            by_lattice.setdefault(lattice_key(p), p)
    return sorted(by_lattice.values())


def closed_form_parameters(area: int, loop: int, alpha: int, beta: int) -> ParameterSet | None:
    """The 2018-style closed form (docs/theory/synthesis.md), or None where it gives no parameter
    set.

    gamma = (alpha*cyc - A)/(alpha - beta), delta = (A - beta*cyc)/(alpha - beta). It is valid
    only when alpha != beta and cyc = gamma + delta; the result is *not* checked against the
    loop here, so callers compare it with ``synthesize`` (docs/theory/synthesis.md counts where it
    fails).

    >>> str(closed_form_parameters(16, 5, 4, 2))
    'C(4,2,2,3)'
    """
    if alpha == beta:
        return None
    gamma = Fraction(alpha * loop - area, alpha - beta)
    delta = Fraction(area - beta * loop, alpha - beta)
    if gamma.denominator != 1 or delta.denominator != 1 or gamma < 1 or delta < 1:
        return None
    return ParameterSet(alpha, beta, int(gamma), int(delta))
