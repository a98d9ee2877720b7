"""Cycloid algebra: the folding lattice of C(alpha, beta, gamma, delta) and what it decides.

The cycloid is the quotient of the Petri space Z^2 by the lattice L spanned by the columns
P = (alpha, -beta) and R = (gamma, delta) of the cycloid matrix ([P18] §2; [LA24] Thm 4, via
review; docs/theory/folding.md). Everything here is integer arithmetic on four numbers: no net is
built.

The classification functions at the end give the *algebraic* answer to the four levels of
sameness of docs/theory/isomorphism.md; the catalog build confirms every one of them with nauty.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import gcd

from zoo.core.params import ParameterSet

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
    """A = det [[alpha, gamma], [-beta, delta]] = alpha*delta + beta*gamma = |T|
    (docs/theory/folding.md).

    >>> area(ParameterSet(4, 2, 2, 3))
    16
    """
    return p.area


def cycloid_matrix(p: ParameterSet) -> tuple[tuple[int, int], tuple[int, int]]:
    """The cycloid matrix [[alpha, gamma], [-beta, delta]] whose columns span L
    (docs/theory/folding.md)."""
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
    """Whether the Petri-space points x1 and x2 fold onto the same node of C(p)
    (docs/theory/equivalence.md).

    >>> are_equivalent(ParameterSet(4, 2, 2, 3), (6, 1), (0, 0))
    True
    """
    a = p.area
    v0, v1 = x2[0] - x1[0], x2[1] - x1[1]
    return (p.delta * v0 - p.gamma * v1) % a == 0 and (p.beta * v0 + p.alpha * v1) % a == 0


def representative(p: ParameterSet, x: Point) -> Point:
    """The representative of x in the half-open fundamental parallelogram
    (docs/theory/equivalence.md).

    The parallelogram is {(xi, eta): 0 <= delta*xi - gamma*eta < A, 0 <= beta*xi + alpha*eta < A};
    it holds exactly one point of every class. [Derived; checked against explicit folding in
    tests/core/test_algebra.py.]

    >>> representative(ParameterSet(4, 2, 2, 3), (6, 1))
    (0, 0)
    """
    a = p.area
    xi, eta = x
    m = (p.delta * xi - p.gamma * eta) // a
    n = (p.beta * xi + p.alpha * eta) // a
    return (xi - m * p.alpha - n * p.gamma, eta + m * p.beta - n * p.delta)


def parallelogram_points(p: ParameterSet) -> list[Point]:
    """All A points of the half-open fundamental parallelogram, sorted (docs/theory/equivalence.md).

    For each column xi the two strip conditions bound eta to an interval, so the work is
    proportional to A, not to the bounding box of the parallelogram (which can be far larger,
    e.g. for C(1000,1000,1,1)).

    >>> parallelogram_points(ParameterSet(2, 1, 1, 1))
    [(0, 0), (1, 0), (2, 0)]
    """
    a, b, c, d = p.as_tuple()
    area = p.area
    points: list[Point] = []
    # The vertices are O, P = (a, -b), P + R = (a + c, d - b) and R = (c, d): 0 <= xi <= a + c.
    for xi in range(0, a + c + 1):
        # 0 <= d*xi - c*eta < A  <=>  (d*xi - A)/c < eta <= d*xi/c
        hi1 = (d * xi) // c
        lo1 = (d * xi - area) // c + 1
        # 0 <= b*xi + a*eta < A  <=>  -b*xi/a <= eta < (A - b*xi)/a
        lo2 = -((b * xi) // a)
        hi2 = -((b * xi - area) // a) - 1
        points.extend((xi, eta) for eta in range(max(lo1, lo2), min(hi1, hi2) + 1))
    return points


def level(p: ParameterSet, x: Point) -> int:
    """The level L(xi, eta) = beta*xi + alpha*eta of a Petri-space point
    (docs/theory/initial-marking.md).

    L(P) = 0 and L(R) = A, so levels of nodes of the cycloid are defined modulo A; the initial
    marking cuts the Petri space between level 0 and level 1.
    """
    return p.beta * x[0] + p.alpha * x[1]


def points_at_level(p: ParameterSet, value: int) -> list[Point]:
    """The representatives t with L(t) = value, for 0 <= value < A, sorted
    (docs/theory/initial-marking.md).

    With e = gcd(alpha, beta) there are e of them when e divides the value and none otherwise:
    the solutions of beta*xi + alpha*eta = value step by (alpha/e, -beta/e), which moves
    delta*xi - gamma*eta by A/e, so exactly e of them lie in the strip [0, A). [Derived; checked
    against a scan of the parallelogram in tests.]
    """
    a, b, c, d = p.as_tuple()
    area = p.area
    if not 0 <= value < area:
        raise ValueError(f"level must lie in 0..A-1 = 0..{area - 1}, got {value}")
    e, x, y = _extended_gcd(b, a)  # b*x + a*y = e
    if value % e:
        return []
    xi0, eta0 = x * (value // e), y * (value // e)
    step_xi, step_eta, step_d = a // e, -(b // e), area // e
    d0 = d * xi0 - c * eta0
    k0 = -(d0 // step_d)  # the smallest k with d0 + k*step_d >= 0
    found = [(xi0 + k * step_xi, eta0 + k * step_eta) for k in range(k0, k0 + e)]
    return sorted(found)


def is_sublattice(fine: ParameterSet, coarse: ParameterSet) -> bool:
    """Whether L(fine) is contained in L(coarse), i.e. the equivalence of C(fine) refines that of
    C(coarse) and C(fine) covers C(coarse) (docs/theory/iterations.md).

    L' is contained in L iff both generators of L' pass the integer test of L.

    >>> is_sublattice(ParameterSet(4, 2, 4, 6), ParameterSet(4, 2, 2, 3))
    True
    """
    origin = (0, 0)
    return are_equivalent(coarse, origin, (fine.alpha, -fine.beta)) and are_equivalent(
        coarse, origin, (fine.gamma, fine.delta)
    )


@dataclass(frozen=True, order=True)
class LatticeKey:
    """(A, g, r): the Hermite basis {(A/g, 0), (r, g)} of the folding lattice
    (docs/theory/lattice-key.md).

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
    """The lattice key (A, g, r) of C(p) (docs/theory/lattice-key.md).

    g = gcd(beta, delta); solve -x*beta + y*delta = g, then r = (x*alpha + y*gamma) mod A/g.

    >>> lattice_key(ParameterSet(4, 2, 2, 3))
    LatticeKey(area=16, g=1, r=6)
    """
    g, u, y = _extended_gcd(-p.beta, p.delta)  # u*(-beta) + y*delta = g, so x = u
    period = p.area // g
    r = (u * p.alpha + y * p.gamma) % period
    return LatticeKey(p.area, g, r)


def swap(p: ParameterSet) -> ParameterSet:
    """C(beta, alpha, delta, gamma), isomorphic to C(p) by (xi, eta) -> (eta, xi)
    (docs/theory/isomorphism.md).

    The mirror exchanges forward and backward places and maps M0 onto the initial marking of
    the swapped cycloid, so both are the same class (docs/theory/isomorphism.md) but different
    readings.
    """
    return p.swap()


def normal_form_beta_delta(p: ParameterSet) -> ParameterSet:
    """NF_betadelta = C(p - r, g, r, g): the end of beta-/delta-reductions
    (docs/theory/normal-forms.md).

    >>> str(normal_form_beta_delta(ParameterSet(4, 2, 2, 3)))
    'C(10,1,6,1)'
    """
    key = lattice_key(p)
    return ParameterSet(key.period - key.r, key.g, key.r, key.g)


def normal_form_alpha_gamma(p: ParameterSet) -> ParameterSet:
    """NF_alphagamma = C(h, q - s, h, s): the end of alpha-/gamma-reductions
    (docs/theory/normal-forms.md).

    h = gcd(alpha, gamma), q = A/h and s in (0, q) with (h, s) in L.

    >>> str(normal_form_alpha_gamma(ParameterSet(4, 2, 2, 3)))
    'C(2,5,2,3)'
    """
    h, x, y = _extended_gcd(p.alpha, p.gamma)
    q = p.area // h
    s = (-x * p.beta + y * p.delta) % q
    return ParameterSet(h, q - s, h, s)


def transition_group(p: ParameterSet) -> tuple[int, int]:
    """Smith normal form (d1, A/d1) of the cycloid matrix: T = Z_d1 x Z_(A/d1)
    (docs/theory/lattice-key.md).

    d1 = gcd(alpha, beta, gamma, delta); the group is cyclic iff d1 = 1. [Checked against
    sympy's smith_normal_form in tests.]
    """
    d1 = gcd(gcd(p.alpha, p.beta), gcd(p.gamma, p.delta))
    return (d1, p.area // d1)


def iterate(p: ParameterSet, n: int) -> ParameterSet:
    """The n-fold temporal iteration C(alpha, beta, n*gamma, n*delta) (docs/theory/iterations)."""
    return ParameterSet(p.alpha, p.beta, n * p.gamma, n * p.delta)


def iteration_depth(p: ParameterSet) -> int:
    """The largest n such that C(p) is, as a system, the n-fold iteration of a smaller cycloid.

    The parameter sets of the same system (same lattice, same alpha and beta) are the
    C(alpha, beta, gamma + k*alpha, delta - k*beta) with both last entries positive (delta- and
    gamma-steps keep the marking, docs/theory/normal-forms.md). C(p) is an n-fold iteration iff one
    of them
    has n | gcd(gamma', delta'). [Derived; checked against a search over all smaller systems in
    tests/core/test_algebra.py.]
    """
    best = 1
    k_lo = -((p.gamma - 1) // p.alpha)
    k_hi = (p.delta - 1) // p.beta
    for k in range(k_lo, k_hi + 1):
        best = max(best, gcd(p.gamma + k * p.alpha, p.delta - k * p.beta))
    return best


# --- classification (docs/theory/isomorphism.md)
# ---------------------------------------------------------

ReadingKey = tuple[int, int, int, int, int]  # (A, g, r, alpha, beta)


def reading_key(p: ParameterSet) -> ReadingKey:
    """Same reading <=> same lattice and same (alpha, beta) (docs/theory/isomorphism.md, typed
    systems)."""
    key = lattice_key(p)
    return (key.area, key.g, key.r, p.alpha, p.beta)


def _exceptional_lattices(a: int) -> tuple[LatticeKey, LatticeKey] | None:
    """The two lattices merged by the (2,-2) family at area A = 4k, k >= 2
    (docs/theory/isomorphism.md)."""
    if a % 4 or a < 8:
        return None
    k = a // 4
    odd = lattice_key(ParameterSet(2, 2, 1, 2 * k - 1))
    even = lattice_key(ParameterSet(2, 2, 2, 2 * k - 2))
    return (odd, even)


def class_key(p: ParameterSet) -> ReadingKey:
    """The algebraic class key: isomorphic marked nets, places not typed
    (docs/theory/isomorphism.md).

    Minimum of the reading keys of p and its swap, merged along the exceptional family
    C(2,2,1,2k-1) ~ C(2,2,2,2k-2) (docs/theory/isomorphism.md, verified with nauty for A <= 60 there
    and
    in tests/core/test_algebra.py). With alpha = beta = 2 and A = 4k the parameter sets are the
    C(2,2,gamma,2k-gamma); delta-steps make every odd gamma one reading and every even gamma
    another, and the exception joins the two, so all of them are one class.

    >>> class_key(ParameterSet(4, 2, 2, 3)) == class_key(ParameterSet(2, 4, 3, 2))
    True
    """
    if p.alpha == 2 and p.beta == 2:
        pair = _exceptional_lattices(p.area)
        if pair is not None:
            odd = pair[0]
            return (odd.area, odd.g, odd.r, 2, 2)
    return min(reading_key(p), reading_key(p.swap()))


def frame_key(p: ParameterSet) -> LatticeKey:
    """The algebraic frame key: isomorphic unmarked nets (docs/theory/isomorphism.md,
    docs/theory/isomorphism.md).

    The smaller lattice key of p and of its swap; at A = 4k the frames of C(2,2,2,2k-2) and of
    C(2,2,1,2k-1) are merged (the exceptional family), onto the latter's key.

    >>> frame_key(ParameterSet(1, 5, 1, 3)) == frame_key(ParameterSet(2, 2, 2, 2))
    True
    """
    key = min(lattice_key(p), lattice_key(p.swap()))
    pair = _exceptional_lattices(p.area)
    if pair is not None:
        k = p.area // 4
        even_frame = min(pair[1], lattice_key(ParameterSet(2, 2, 2 * k - 2, 2)))
        if key == even_frame:
            return min(pair[0], lattice_key(ParameterSet(2, 2, 2 * k - 1, 1)))
    return key


def class_reading_representatives(p: ParameterSet) -> list[ParameterSet]:
    """One parameter set of every reading in the class of p, sorted (docs/theory/isomorphism.md).

    A class holds the reading of p and that of its swap, except in the exceptional family of
    docs/theory/isomorphism.md, where C(2,2,1,2k-1) and C(2,2,2,2k-2) (and their swaps) are one
    class.
    """
    members = {p, p.swap()}
    if p.alpha == 2 and p.beta == 2 and _exceptional_lattices(p.area) is not None:
        k = p.area // 4
        members |= {ParameterSet(2, 2, 1, 2 * k - 1), ParameterSet(2, 2, 2, 2 * k - 2)}
    by_reading = {reading_key(q): q for q in sorted(members, reverse=True)}
    return sorted(by_reading.values())


def class_iteration_depth(p: ParameterSet) -> int:
    """The largest n such that the *class* of p is an n-fold iteration: the maximum of
    ``iteration_depth`` over its readings (docs/theory/iterations.md with the classes of
    docs/theory/isomorphism.md).

    It differs from ``iteration_depth(p)`` only in the exceptional family: C(2,2,1,3) is no
    iteration as a parameter set, but it is isomorphic to C(2,2,2,2) = iterate(C(2,2,1,1), 2).

    >>> iteration_depth(ParameterSet(2, 2, 1, 3)), class_iteration_depth(ParameterSet(2, 2, 1, 3))
    (1, 2)
    """
    return max(iteration_depth(q) for q in class_reading_representatives(p))


def class_transition_group(p: ParameterSet) -> tuple[int, int]:
    """The transition group with the largest d1 among the readings of p's class.

    The group Z^2/L depends on the typed structure, so the readings of an exceptional class
    differ (C(2,2,1,3): Z_8, C(2,2,2,2): Z_2 x Z_4); the catalog stores this maximum.
    """
    return max(transition_group(q) for q in class_reading_representatives(p))
