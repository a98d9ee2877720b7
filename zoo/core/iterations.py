"""Temporal iterations between systems: which cycloid is the n-fold iteration of which.

The n-fold temporal iteration of C(α, β, γ, δ) is C(α, β, nγ, nδ): its folding lattice
⟨P, nR⟩ has index n in ⟨P, R⟩, so it covers the base system n to 1, keeping the forward and
backward places and the initial marking (docs/theory/iterations.md).

On systems the relation is read off the parameters: a system X is an n-fold iteration of a
system Y when some parameter set of X (the parameter sets of one system are the shears
C(α, β, γ + kα, δ − kβ) with positive entries, which keep the lattice and the marking) has n
dividing gcd(γ', δ'), and Y is C(α, β, γ'/n, δ'/n). Every basis of X's lattice that contains P is
of that form, so the search below finds every base. On catalog classes (marked nets up to
isomorphism, places untyped): class X is an n-fold iteration of class Y when some system of X is
an n-fold iteration of some system of Y. The swap commutes with iteration, so it does not matter
which reading is taken. zoo's tests check the relation against explicit nets: the canonical form of
C(α, β, nγ, nδ) against that of every class.
"""

from __future__ import annotations

from math import gcd

from zoo.core.algebra import class_key, class_reading_representatives, iterate, reading_key
from zoo.core.params import MAX_AREA, ParameterSet


def _divisors_above_one(n: int) -> list[int]:
    small = [d for d in range(2, int(n**0.5) + 1) if n % d == 0]
    return sorted(set(small + [n // d for d in small] + ([n] if n > 1 else [])))


def system_iteration_bases(p: ParameterSet) -> list[tuple[ParameterSet, int]]:
    """Every (base, n), n >= 2, with C(p) the n-fold iteration of the system C(base).

    One base parameter set per (n, base system); sorted by n, then base.

    >>> system_iteration_bases(ParameterSet(4, 3, 3, 3))
    [(ParameterSet(alpha=4, beta=3, gamma=1, delta=1), 3)]
    """
    found: dict[tuple[int, object], ParameterSet] = {}
    k_lo = -((p.gamma - 1) // p.alpha)
    k_hi = (p.delta - 1) // p.beta
    for k in range(k_lo, k_hi + 1):
        gamma, delta = p.gamma + k * p.alpha, p.delta - k * p.beta
        for n in _divisors_above_one(gcd(gamma, delta)):
            base = ParameterSet(p.alpha, p.beta, gamma // n, delta // n)
            key = (n, reading_key(base))
            if key not in found or base < found[key]:
                found[key] = base
    return sorted(
        ((base, n) for (n, _), base in found.items()), key=lambda item: (item[1], item[0])
    )


def class_iteration_bases(p: ParameterSet) -> list[tuple[ParameterSet, int]]:
    """Every (base class label, n): the classes of which the class of p is an n-fold iteration.

    Bases are given by one parameter set of their class (the smallest found); callers look the
    class up. Sorted by n, then base.

    >>> class_iteration_bases(ParameterSet(2, 2, 1, 3))  # C(2,2,1,3) is isomorphic to C(2,2,2,2)
    [(ParameterSet(alpha=2, beta=2, gamma=1, delta=1), 2)]
    """
    found: dict[tuple[int, object], ParameterSet] = {}
    for reading in class_reading_representatives(p):
        for base, n in system_iteration_bases(reading):
            key = (n, class_key(base))
            if key not in found or base < found[key]:
                found[key] = base
    return sorted(
        ((base, n) for (n, _), base in found.items()), key=lambda item: (item[1], item[0])
    )


def class_iterations(p: ParameterSet, max_area: int) -> list[tuple[ParameterSet, int]]:
    """Every (iterated parameter set, n), n >= 2, area n·A <= max_area: one member of each class
    that is an n-fold iteration of the class of p. Sorted by n, then parameter set.

    >>> [(str(q), n) for q, n in class_iterations(ParameterSet(4, 3, 1, 1), 21)]
    [('C(3,4,2,2)', 2), ('C(3,4,3,3)', 3)]
    """
    found: dict[tuple[int, object], ParameterSet] = {}
    bound = min(max_area, MAX_AREA)
    for reading in class_reading_representatives(p):
        for n in range(2, bound // p.area + 1):
            member = iterate(reading, n)
            key = (n, class_key(member))
            if key not in found or member < found[key]:
                found[key] = member
    return sorted(((q, n) for (n, _), q in found.items()), key=lambda item: (item[1], item[0]))


__all__ = ["class_iteration_bases", "class_iterations", "system_iteration_bases"]
