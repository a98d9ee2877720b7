"""Cycloid algebra: the folding lattice of C(alpha, beta, gamma, delta) and what it decides.

The cycloid is the quotient of the Petri space Z^2 by the lattice L spanned by the columns
P = (alpha, -beta) and R = (gamma, delta) of the cycloid matrix ([P18] §2; [LA24] Thm 4, via
review; theory.md §2). Everything here is integer arithmetic on four numbers: no net is built.

The classification functions at the end give the *algebraic* answer to the four levels of
sameness of design.md §1; the catalog build confirms every one of them with nauty.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import gcd

from zoo.params import ParameterSet

Point = tuple[int, int]


def _extended_gcd(a: int, b: int) -> tuple[int, int, int]:
    """Return (g, x, y) with a*x + b*y = g = gcd(a, b) >= 0."""
    x0, y0, x1, y1 = 1, 0, 0, 1
    while b:
        q, a, b = a // b, b, a % b
        x0, x1 = x1, x0 - q * x1
        y0, y1 = y1, y0 - q * y1
    if a < 0:
        a, x0, y0 = -a, -x0, -y0
    return a, x0, y0


def area(p: ParameterSet) -> int:
    """A = det [[alpha, gamma], [-beta, delta]] = alpha*delta + beta*gamma = |T| (theory.md §2.1)."""
    return p.area


def cycloid_matrix(p: ParameterSet) -> tuple[tuple[int, int], tuple[int, int]]:
    """The cycloid matrix [[alpha, gamma], [-beta, delta]] whose columns span L (theory.md §2.1)."""
    return ((p.alpha, p.gamma), (-p.beta, p.delta))


def step_counts(p: ParameterSet, v: Point) -> tuple[Fraction, Fraction]:
    """pi(v) = B v / A: how many P- and R-steps make up the vector v ([LA24] Thm 4).

    B = [[delta, -gamma], [beta, alpha]] is the adjugate of the cycloid matrix. v lies in L iff
    both entries are integers.

    >>> step_counts(ParameterSet(4, 2, 2, 3), (6, 1))
    (Fraction(1, 1), Fraction(1, 1))
    """
    a = p.area
    xi, eta = v
    return (Fraction(p.delta * xi - p.gamma * eta, a), Fraction(p.beta * xi + p.alpha * eta, a))


def are_equivalent(p: ParameterSet, x1: Point, x2: Point) -> bool:
    """Whether the Petri-space points x1 and x2 fold onto the same node of C(p) (theory.md §2.3).

    >>> are_equivalent(ParameterSet(4, 2, 2, 3), (6, 1), (0, 0))
    True
    """
    a = p.area
    v0, v1 = x2[0] - x1[0], x2[1] - x1[1]
    return (p.delta * v0 - p.gamma * v1) % a == 0 and (p.beta * v0 + p.alpha * v1) % a == 0


def representative(p: ParameterSet, x: Point) -> Point:
    """The representative of x in the half-open fundamental parallelogram (theory.md §2.3).

    The parallelogram is {(xi, eta): 0 <= delta*xi - gamma*eta < A, 0 <= beta*xi + alpha*eta < A};
    it holds exactly one point of every class. [Derived; checked against explicit folding in
    tests/test_algebra.py.]

    >>> representative(ParameterSet(4, 2, 2, 3), (6, 1))
    (0, 0)
    """
    a = p.area
    xi, eta = x
    m = (p.delta * xi - p.gamma * eta) // a
    n = (p.beta * xi + p.alpha * eta) // a
    return (xi - m * p.alpha - n * p.gamma, eta + m * p.beta - n * p.delta)


def parallelogram_points(p: ParameterSet) -> list[Point]:
    """All A points of the half-open fundamental parallelogram, sorted (theory.md §2.3)."""
    a = p.area
    lo_xi = -p.gamma  # the parallelogram's vertices are O, P, P+R, R
    hi_xi = p.alpha + p.gamma
    lo_eta = -p.beta
    hi_eta = p.delta
    points = [
        (xi, eta)
        for xi in range(min(0, lo_xi), hi_xi + 1)
        for eta in range(lo_eta, hi_eta + 1)
        if 0 <= p.delta * xi - p.gamma * eta < a and 0 <= p.beta * xi + p.alpha * eta < a
    ]
    return sorted(points)


@dataclass(frozen=True, order=True)
class LatticeKey:
    """(A, g, r): the Hermite basis {(A/g, 0), (r, g)} of the folding lattice (theory.md §2.4).

    Equal keys <=> equal lattices <=> isomorphic nets with forward and backward places told
    apart. [Derived; checked against nauty in tests.]
    """

    area: int
    g: int
    r: int

    @property
    def period(self) -> int:
        """p = A/g, the length of every forward cycle."""
        return self.area // self.g

    def contains(self, v: Point) -> bool:
        """Whether v lies in the lattice."""
        xi, eta = v
        if eta % self.g:
            return False
        return (xi - (eta // self.g) * self.r) % self.period == 0

    def reduce(self, v: Point) -> Point:
        """The grid point (xi, eta), 0 <= xi < A/g, 0 <= eta < g, equivalent to v."""
        xi, eta = v
        k = eta // self.g
        return ((xi - k * self.r) % self.period, eta - k * self.g)

    def __str__(self) -> str:
        return f"({self.area},{self.g},{self.r})"


def lattice_key(p: ParameterSet) -> LatticeKey:
    """The lattice key (A, g, r) of C(p) (theory.md §2.4).

    g = gcd(beta, delta); solve -x*beta + y*delta = g, then r = (x*alpha + y*gamma) mod A/g.

    >>> lattice_key(ParameterSet(4, 2, 2, 3))
    LatticeKey(area=16, g=1, r=6)
    """
    g, u, y = _extended_gcd(-p.beta, p.delta)  # u*(-beta) + y*delta = g, so x = u
    period = p.area // g
    r = (u * p.alpha + y * p.gamma) % period
    return LatticeKey(p.area, g, r)


def swap(p: ParameterSet) -> ParameterSet:
    """C(beta, alpha, delta, gamma), isomorphic to C(p) by (xi, eta) -> (eta, xi) (theory.md §5.1)."""
    return p.swap()


def normal_form_beta_delta(p: ParameterSet) -> ParameterSet:
    """NF_betadelta = C(p - r, g, r, g): the end of beta-/delta-reductions (theory.md §5.2).

    >>> str(normal_form_beta_delta(ParameterSet(4, 2, 2, 3)))
    'C(10,1,6,1)'
    """
    key = lattice_key(p)
    return ParameterSet(key.period - key.r, key.g, key.r, key.g)


def normal_form_alpha_gamma(p: ParameterSet) -> ParameterSet:
    """NF_alphagamma = C(h, q - s, h, s): the end of alpha-/gamma-reductions (theory.md §5.2).

    h = gcd(alpha, gamma), q = A/h and s in (0, q) with (h, s) in L.

    >>> str(normal_form_alpha_gamma(ParameterSet(4, 2, 2, 3)))
    'C(2,5,2,3)'
    """
    h, x, y = _extended_gcd(p.alpha, p.gamma)
    q = p.area // h
    s = (-x * p.beta + y * p.delta) % q
    return ParameterSet(h, q - s, h, s)


def transition_group(p: ParameterSet) -> tuple[int, int]:
    """Smith normal form (d1, A/d1) of the cycloid matrix: T = Z_d1 x Z_(A/d1) (theory.md §2.4).

    d1 = gcd(alpha, beta, gamma, delta); the group is cyclic iff d1 = 1. [Checked against
    sympy's smith_normal_form in tests.]
    """
    d1 = gcd(gcd(p.alpha, p.beta), gcd(p.gamma, p.delta))
    return (d1, p.area // d1)


def iterate(p: ParameterSet, n: int) -> ParameterSet:
    """The n-fold temporal iteration C(alpha, beta, n*gamma, n*delta) (theory.md §8)."""
    return ParameterSet(p.alpha, p.beta, n * p.gamma, n * p.delta)


def iteration_depth(p: ParameterSet) -> int:
    """The largest n such that C(p) is, as a system, the n-fold iteration of a smaller cycloid.

    The parameter sets of the same system (same lattice, same alpha and beta) are the
    C(alpha, beta, gamma + k*alpha, delta - k*beta) with both last entries positive (delta- and
    gamma-steps keep the marking, theory.md §5.2). C(p) is an n-fold iteration iff one of them
    has n | gcd(gamma', delta'). [Derived; checked by lattice inclusion in tests.]
    """
    best = 1
    k_lo = -((p.gamma - 1) // p.alpha)
    k_hi = (p.delta - 1) // p.beta
    for k in range(k_lo, k_hi + 1):
        best = max(best, gcd(p.gamma + k * p.alpha, p.delta - k * p.beta))
    return best


# --- classification (design.md §1) ---------------------------------------------------------

ReadingKey = tuple[int, int, int, int, int]  # (A, g, r, alpha, beta)


def reading_key(p: ParameterSet) -> ReadingKey:
    """Same reading <=> same lattice and same (alpha, beta) (theory.md §5.1, typed systems)."""
    key = lattice_key(p)
    return (key.area, key.g, key.r, p.alpha, p.beta)


def _exceptional_lattices(a: int) -> tuple[LatticeKey, LatticeKey] | None:
    """The two lattices merged by the (2,-2) family at area A = 4k, k >= 2 (theory.md §5.1)."""
    if a % 4 or a < 8:
        return None
    k = a // 4
    return (lattice_key(ParameterSet(2, 2, 1, 2 * k - 1)), lattice_key(ParameterSet(2, 2, 2, 2 * k - 2)))


def class_key(p: ParameterSet) -> ReadingKey:
    """The algebraic class key: isomorphic marked nets, places not typed (design.md §1).

    Minimum of the reading keys of p and its swap, merged along the exceptional family
    C(2,2,1,2k-1) ~ C(2,2,2,2k-2) (theory.md §5.1, verified with nauty for A <= 60 there and
    for every catalog build here).
    """
    key = min(reading_key(p), reading_key(p.swap()))
    if p.alpha == 2 and p.beta == 2:
        pair = _exceptional_lattices(p.area)
        if pair is not None:
            first = pair[0]
            return (first.area, first.g, first.r, 2, 2)
    return key


def frame_key(p: ParameterSet) -> LatticeKey:
    """The algebraic frame key: isomorphic unmarked nets (design.md §1, theory.md §5.1)."""
    key = min(lattice_key(p), lattice_key(p.swap()))
    pair = _exceptional_lattices(p.area)
    if pair is not None and key == min(pair[1], lattice_key(ParameterSet(2, 2, p.area // 2 - 2, 2))):
        first = pair[0]
        return min(first, lattice_key(ParameterSet(2, 2, p.area // 2 - 1, 1)))
    return key
