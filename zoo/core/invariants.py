"""Invariants of a cycloid computed from its four parameters by closed formulas.

Each function cites where its formula comes from (docs/theory/README.md section and paper) and says
how it
is checked: tests/core/test_invariants.py compares every one against explicit search on the nets of
all small parameter sets (shortest cycles by BFS, reachability graphs by search).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import comb, gcd

from zoo.core.algebra import points_at_level
from zoo.core.params import ParameterSet


@dataclass(frozen=True)
class CycleFamily:
    """A family of equal disjoint cycles covering every transition once."""

    count: int
    length: int
    tokens: int  # tokens of the initial marking on each cycle

    def as_dict(self) -> dict[str, int]:
        return {"count": self.count, "length": self.length, "tokens": self.tokens}


def forward_cycles(p: ParameterSet) -> CycleFamily:
    """gcd(beta, delta) forward cycles of length A/g, each with beta/g tokens
    (docs/theory/processes.md).

    [Derived; checked by following forward arcs in the explicit net.]
    """
    g = gcd(p.beta, p.delta)
    return CycleFamily(g, p.area // g, p.beta // g)


def backward_cycles(p: ParameterSet) -> CycleFamily:
    """gcd(alpha, gamma) backward cycles of length A/h, each with alpha/h tokens
    (docs/theory/processes.md)."""
    h = gcd(p.alpha, p.gamma)
    return CycleFamily(h, p.area // h, p.alpha // h)


def process_count(p: ParameterSet) -> int:
    """The number of sequential processes: the forward cycles, gcd(beta, delta)
    (docs/theory/processes.md).

    For a regular cycloid (beta | delta) each forward cycle carries one token (one car), so it is
    one sequential process of length A/beta ([FR24] abstract; docs/theory/processes.md).
    """
    return gcd(p.beta, p.delta)


def is_regular(p: ParameterSet) -> bool:
    """Regular cycloid: beta | delta, so every forward cycle carries one token
    (docs/theory/processes.md).

    Equivalently there are exactly beta forward cycles, the beta sequential processes.
    """
    return p.delta % p.beta == 0


def slowness(p: ParameterSet) -> Fraction:
    """Petri's slowness w = (gaps - cars)/(gaps + cars) = (alpha - beta)/(alpha + beta).

    [P18] §1 quotes the definition; the cycloid form is derived (docs/theory/state-counts.md).
    """
    return Fraction(p.alpha - p.beta, p.alpha + p.beta)


def enabled_count(p: ParameterSet) -> int:
    """Transitions enabled at the initial marking: min(alpha, beta) (docs/theory/initial-marking.md,
    verified)."""
    return min(p.alpha, p.beta)


def semi_enabled_count(p: ParameterSet) -> int:
    """Transitions with exactly one marked input place at M0: |alpha - beta|
    (docs/theory/initial-marking.md)."""
    return abs(p.alpha - p.beta)


def reachable_state_count(p: ParameterSet) -> int:
    """|RG| = A * C(alpha+beta, alpha) / (alpha+beta), exact (docs/theory/state-counts.md, derived
    and verified).

    Equivalently delta*C(alpha+beta-1, alpha-1) + gamma*C(alpha+beta-1, alpha).
    """
    return p.area * comb(p.alpha + p.beta, p.alpha) // (p.alpha + p.beta)


def state_arc_count(p: ParameterSet) -> int:
    """Arcs of the reachability graph: A*C(alpha+beta-2, alpha-1) (docs/theory/state-counts.md)."""
    return p.area * comb(p.alpha + p.beta - 2, p.alpha - 1)


def cycle_time(p: ParameterSet) -> Fraction:
    """Time between two firings of a transition when every firing takes one time unit.

    For a live marked graph this is the largest ratio length/tokens over its cycles (common
    practice for timed marked graphs). A cycle of C(p) lifts to (xi, eta) in L with
    xi, eta >= 0; its ratio A(xi + eta)/(beta*xi + alpha*eta) is largest on a pure forward
    (A/beta) or pure backward (A/alpha) cycle, so the cycle time is A / min(alpha, beta).
    [Derived; checked against the maximum over all simple cycles of small nets in tests.]
    """
    return Fraction(p.area, min(p.alpha, p.beta))


def one_token_loop(p: ParameterSet) -> int:
    """cyc_1: the shortest cycle with one token, by the closed formula of
    docs/theory/minimal-cycle-length.md."""
    if p.alpha < p.beta:
        return p.gamma + p.delta - (p.delta // p.beta) * (p.beta - p.alpha)
    if p.alpha > p.beta:
        return p.gamma + p.delta - (p.gamma // p.alpha) * (p.alpha - p.beta)
    return p.gamma + p.delta


def one_token_formula_applies(p: ParameterSet) -> bool:
    """The condition under which cyc = cyc_1 (docs/theory/minimal-cycle-length.md, verified on all
    tuples <= 15)."""
    if p.alpha == p.beta:
        return True
    if p.alpha < p.beta:
        return p.beta <= p.alpha + p.gamma
    return p.alpha <= p.beta + p.delta


def shortest_cycle_vector(p: ParameterSet) -> tuple[int, int]:
    """A lattice vector (xi, eta), xi, eta >= 0, of a shortest cycle, by the exact algorithm.

    A cycle of C(p) lifts to a path from x to x + mP + nR whose displacement
    (xi, eta) = (m*alpha + n*gamma, n*delta - m*beta) has xi, eta >= 0; it has xi + eta
    transitions and n tokens (docs/theory/cycles-and-tokens.md). For each n the admissible m form
    the interval
    ceil(-n*gamma/alpha) <= m <= floor(n*delta/beta) and the length
    n*(gamma + delta) + m*(alpha - beta) is linear in m, so only its ends matter; n need not pass
    (gamma + delta)*max(alpha, beta)/A because a vector with n tokens has length at least
    n*A/max(alpha, beta) and R itself has length gamma + delta
    (docs/theory/minimal-cycle-length.md). Among shortest
    vectors the one with fewest tokens, then smallest xi, is returned. [Derived; equal to the
    breadth-first girth of the explicit net in docs/theory/README.md (all parameters <= 7) and in
    tests/core/test_invariants.py.]

    >>> shortest_cycle_vector(ParameterSet(1, 6, 1, 3))
    (3, 0)
    """
    a, b, c, d = p.as_tuple()
    best = (c + d, 1, c, d)  # (length, tokens, xi, eta): R itself
    n_max = (c + d) * max(a, b) // p.area
    for n in range(1, n_max + 1):
        m_lo = -((n * c) // a)  # ceil(-n*gamma/alpha)
        m_hi = (n * d) // b
        if m_lo > m_hi:
            continue
        for m in (m_lo, m_hi):
            xi, eta = m * a + n * c, n * d - m * b
            candidate = (xi + eta, n, xi, eta)
            if candidate < best:
                best = candidate
    return (best[2], best[3])


def minimal_cycle_length_exact(p: ParameterSet) -> int:
    """cyc by the exact lattice algorithm of docs/theory/minimal-cycle-length.md alone, without the
    closed fast path."""
    xi, eta = shortest_cycle_vector(p)
    return xi + eta


def minimal_cycle_length(p: ParameterSet) -> int:
    """cyc ("loop"): the number of transitions on a shortest cycle of C(p)
    (docs/theory/minimal-cycle-length.md).

    cyc = min{xi + eta : (xi, eta) in L \\ {0}, xi, eta >= 0}, computed by the exact algorithm
    (``shortest_cycle_vector``). The one-token closed formula cyc_1 is used only as a fast path
    where the theorem of docs/theory/minimal-cycle-length.md guarantees it (checked against the
    exact algorithm on
    every parameter set <= 8 and against breadth-first girth in tests/core/test_invariants.py).

    >>> minimal_cycle_length(ParameterSet(4, 2, 2, 3))
    5
    >>> minimal_cycle_length(ParameterSet(1, 10, 1, 5))  # cyc_1 would say 6
    3
    """
    if one_token_formula_applies(p):
        return one_token_loop(p)
    return minimal_cycle_length_exact(p)


def enabled_transitions(p: ParameterSet) -> list[tuple[int, int]]:
    """The transitions enabled at M0, as parallelogram representatives
    (docs/theory/initial-marking.md).

    A forward place is marked iff its output transition t has L(t) mod A in 1..beta, a backward
    place iff L(t) mod A in 1..alpha; so t is enabled iff L(t) mod A in 1..min(alpha, beta).
    There are min(alpha, beta) of them [VERIFIED in docs/theory/README.md, all parameters <= 7].

    >>> enabled_transitions(ParameterSet(4, 2, 2, 3))
    [(1, 0), (3, -1)]
    """
    found: list[tuple[int, int]] = []
    for value in range(1, min(p.alpha, p.beta) + 1):
        found.extend(points_at_level(p, value))
    return sorted(found)


def semi_enabled_transitions(p: ParameterSet) -> list[tuple[int, int]]:
    """The transitions with exactly one marked input place at M0 (docs/theory/initial-marking.md).

    These are the t with min(alpha, beta) < L(t) mod A <= max(alpha, beta): |alpha - beta| of
    them. ("Semi-enabled" is this project's word, not confirmed as the papers' term.)

    >>> semi_enabled_transitions(ParameterSet(4, 2, 2, 3))
    [(2, 0), (4, -1)]
    """
    found: list[tuple[int, int]] = []
    for value in range(min(p.alpha, p.beta) + 1, max(p.alpha, p.beta) + 1):
        found.extend(points_at_level(p, value))
    return sorted(found)
