"""Cycloid algebra against docs/theory/folding.md, docs/theory/isomorphism.md,
docs/theory/normal-forms.md, docs/theory/iterations.md, docs/theory/check-values.md, sympy, nauty
and a brute-force lattice.

The brute-force helpers below use only the definition of the folding (docs/theory/folding.md: x and
y
fold together iff y - x = m*P + n*R for integers m, n), never the closed tests under check.
"""

from __future__ import annotations

import itertools
from fractions import Fraction

import pytest
import sympy
from hypothesis import given
from hypothesis import strategies as st
from sympy.matrices.normalforms import smith_normal_form

from zoo.core import algebra
from zoo.core.invariants import reachable_state_count
from zoo.core.params import ParameterSet

C = ParameterSet
C4223 = C(4, 2, 2, 3)


def in_lattice_by_definition(p: ParameterSet, v: tuple[int, int]) -> bool:
    """Whether v = m*(alpha, -beta) + n*(gamma, delta) for integers m, n, by search over m."""
    xi, eta = v
    bound = abs(xi) + abs(eta) + 1  # |m| = |delta*xi - gamma*eta|/A <= |xi| + |eta|
    for m in range(-bound, bound + 1):
        rest = xi - m * p.alpha
        if rest % p.gamma == 0 and -m * p.beta + (rest // p.gamma) * p.delta == eta:
            return True
    return False


def tuples(limit: int) -> list[ParameterSet]:
    return [C(*t) for t in itertools.product(range(1, limit + 1), repeat=4)]


def parameter_sets_of_area(area: int) -> list[ParameterSet]:
    """All parameter sets of one area, by a direct double loop (independent of
    zoo.catalog.enumeration)."""
    found = []
    for alpha in range(1, area):
        for delta in range(1, (area - 1) // alpha + 1):
            rest = area - alpha * delta
            for beta in range(1, rest + 1):
                if rest % beta == 0:
                    found.append(C(alpha, beta, rest // beta, delta))
    return found


# --- §2: area, matrix, integer test, representatives -----------------------------------------


def test_area_and_matrix() -> None:
    assert algebra.area(C4223) == 16  # docs/theory/equivalence.md example, A = 16
    assert algebra.cycloid_matrix(C4223) == ((4, 2), (-2, 3))  # docs/theory/folding.md
    det = sympy.Matrix(algebra.cycloid_matrix(C4223)).det()
    assert det == 16  # A = det of the cycloid matrix, docs/theory/folding.md


def test_step_counts_worked_example() -> None:
    # docs/theory/equivalence.md example [VERIFIED]
    assert algebra.step_counts(C4223, (6, 1)) == (1, 1)
    assert algebra.step_counts(C4223, (16, 0)) == (3, 2)
    assert algebra.step_counts(C4223, (1, 0)) == (Fraction(3, 16), Fraction(2, 16))
    assert algebra.are_equivalent(C4223, (6, 1), (0, 0))
    assert algebra.are_equivalent(C4223, (0, 0), (16, 0))
    assert not algebra.are_equivalent(C4223, (1, 0), (0, 0))


def test_representatives_of_c4223() -> None:
    # docs/theory/equivalence.md: the 16 representatives in the half-open parallelogram [VERIFIED]
    expected = [
        (0, 0),
        (1, 0),
        (1, 1),
        (2, -1),
        (2, 0),
        (2, 1),
        (2, 2),
        (3, -1),
        (3, 0),
        (3, 1),
        (3, 2),
        (4, -1),
        (4, 0),
        (4, 1),
        (5, 0),
        (5, 1),
    ]
    assert algebra.parallelogram_points(C4223) == expected
    assert all(algebra.representative(C4223, x) == x for x in expected)
    # t_Q = t_{0,0}, docs/theory/equivalence.md
    assert algebra.representative(C4223, (6, 1)) == (0, 0)


@pytest.mark.parametrize("p", tuples(4), ids=str)
def test_equivalence_and_representative_against_definition(p: ParameterSet) -> None:
    # docs/theory/equivalence.md ([LA24] Thm 4 via review): the integer test equals the folding
    # definition,
    # and rep(x) is the unique parallelogram point of x's class.
    points = algebra.parallelogram_points(p)
    assert len(points) == p.area  # exactly A classes, docs/theory/folding.md
    window = [(x, y) for x in range(-6, 7) for y in range(-6, 7)]
    for x in window:
        assert algebra.are_equivalent(p, (0, 0), x) == in_lattice_by_definition(p, x)
        rep = algebra.representative(p, x)
        assert rep in points
        assert in_lattice_by_definition(p, (x[0] - rep[0], x[1] - rep[1]))
    for a, b in itertools.combinations(points, 2):
        assert not in_lattice_by_definition(p, (b[0] - a[0], b[1] - a[1]))


def test_parallelogram_points_match_a_box_scan() -> None:
    # The interval formula per column against a plain scan of the bounding box.
    for p in tuples(6):
        a = p.area
        box = sorted(
            (x, y)
            for x in range(0, p.alpha + p.gamma + 1)
            for y in range(-p.beta, p.delta + 1)
            if 0 <= p.delta * x - p.gamma * y < a and 0 <= p.beta * x + p.alpha * y < a
        )
        assert algebra.parallelogram_points(p) == box


def test_points_at_level() -> None:
    for p in tuples(5):
        points = algebra.parallelogram_points(p)
        for value in range(p.area):
            expected = [x for x in points if algebra.level(p, x) == value]
            assert algebra.points_at_level(p, value) == expected
    with pytest.raises(ValueError, match="level must lie in 0..A-1"):
        algebra.points_at_level(C4223, 16)


@given(
    st.builds(C, *(st.integers(1, 40) for _ in range(4))),
    st.integers(-500, 500),
    st.integers(-500, 500),
    st.integers(-9, 9),
    st.integers(-9, 9),
)
def test_representative_properties(p: ParameterSet, xi: int, eta: int, m: int, n: int) -> None:
    x = (xi, eta)
    shifted = (xi + m * p.alpha + n * p.gamma, eta - m * p.beta + n * p.delta)
    assert algebra.are_equivalent(p, x, shifted)  # docs/theory/folding.md folding
    rep = algebra.representative(p, x)
    assert rep == algebra.representative(p, shifted)
    s, u = algebra.step_counts(p, rep)
    # inside the half-open parallelogram, docs/theory/equivalence.md
    assert 0 <= s < 1 and 0 <= u < 1
    key = algebra.lattice_key(p)
    assert key.contains((shifted[0] - xi, shifted[1] - eta))
    assert key.reduce(x) == key.reduce(shifted)


# --- §2.4: lattice key and transition group ---------------------------------------------------


def test_lattice_key_example() -> None:
    assert algebra.lattice_key(C4223) == algebra.LatticeKey(16, 1, 6)
    assert str(algebra.lattice_key(C4223)) == "(16,1,6)"


@pytest.mark.parametrize("limit", [6])
def test_lattice_key_is_a_hermite_basis(limit: int) -> None:
    # docs/theory/lattice-key.md: L has the basis {(A/g, 0), (r, g)}, 0 < r < A/g.
    for p in tuples(limit):
        key = algebra.lattice_key(p)
        assert key.g == sympy.gcd(p.beta, p.delta)
        assert 0 < key.r < key.period  # r = 0 never occurs
        assert in_lattice_by_definition(p, (key.period, 0))
        assert in_lattice_by_definition(p, (key.r, key.g))
        assert key.period * key.g == p.area  # the basis has determinant A, so it spans L


def test_lattice_key_decides_equal_lattices() -> None:
    # docs/theory/lattice-key.md/§5.1: (A, g, r) is a complete invariant of the folding lattice.
    for area in range(2, 17):
        sets = parameter_sets_of_area(area)
        for p, q in itertools.combinations(sets, 2):
            same = algebra.is_sublattice(p, q) and algebra.is_sublattice(q, p)
            assert (algebra.lattice_key(p) == algebra.lattice_key(q)) == same, (p, q)


def test_typed_classes_per_area_are_sigma_minus_tau() -> None:
    # docs/theory/lattice-key.md: sigma(A) - tau(A) type-preserving net classes with A transitions
    # [VERIFIED A <= 24]
    for area in range(2, 25):
        keys = {algebra.lattice_key(p) for p in parameter_sets_of_area(area)}
        expected = sympy.divisor_sigma(area) - sympy.divisor_count(area)
        assert len(keys) == expected, area


@pytest.mark.parametrize(
    ("p", "snf"),
    [  # docs/theory/check-values.md table, SNF column [VERIFIED]
        (C(1, 1, 1, 1), (1, 2)),
        (C(2, 2, 2, 2), (2, 4)),
        (C(4, 2, 4, 4), (2, 12)),
        (C(4, 2, 2, 3), (1, 16)),
        (C(3, 2, 6, 6), (1, 30)),
        (C(12, 4, 1, 1), (1, 16)),
    ],
    ids=str,
)
def test_transition_group_table(p: ParameterSet, snf: tuple[int, int]) -> None:
    assert algebra.transition_group(p) == snf


def test_transition_group_against_sympy() -> None:
    # sympy's Smith normal form of the cycloid matrix, all parameters <= 5 plus larger samples.
    samples = tuples(5) + [C(6, 4, 10, 8), C(12, 18, 30, 6), C(9, 3, 27, 15), C(7, 7, 7, 7)]
    for p in samples:
        snf = smith_normal_form(sympy.Matrix(algebra.cycloid_matrix(p)), domain=sympy.ZZ)
        diagonal = sorted(abs(int(snf[i, i])) for i in range(2))
        assert tuple(diagonal) == algebra.transition_group(p), p


# --- §5: swap, normal forms, classification ---------------------------------------------------

# docs/theory/check-values.md table, columns NF_betadelta and NF_alphagamma [VERIFIED]
TABLE_NORMAL_FORMS = [
    ((1, 1, 1, 1), (1, 1, 1, 1), (1, 1, 1, 1)),
    ((2, 1, 1, 1), (2, 1, 1, 1), (1, 2, 1, 1)),
    ((1, 2, 1, 1), (2, 1, 1, 1), (1, 2, 1, 1)),
    ((2, 2, 1, 1), (3, 1, 1, 1), (1, 3, 1, 1)),
    ((3, 2, 1, 1), (4, 1, 1, 1), (1, 4, 1, 1)),
    ((2, 3, 1, 1), (4, 1, 1, 1), (1, 4, 1, 1)),
    ((4, 2, 2, 3), (10, 1, 6, 1), (2, 5, 2, 3)),
    ((2, 4, 3, 2), (5, 2, 3, 2), (1, 10, 1, 6)),
    ((3, 3, 1, 3), (3, 3, 1, 3), (1, 9, 1, 3)),
    ((3, 3, 2, 2), (5, 1, 7, 1), (1, 5, 1, 7)),
    ((3, 3, 3, 1), (9, 1, 3, 1), (3, 3, 3, 1)),
    ((2, 2, 1, 3), (5, 1, 3, 1), (1, 5, 1, 3)),
    ((2, 2, 2, 2), (2, 2, 2, 2), (2, 2, 2, 2)),
    ((1, 2, 1, 2), (1, 2, 1, 2), (1, 2, 1, 2)),
    ((2, 3, 1, 2), (3, 1, 4, 1), (1, 5, 1, 2)),
    ((1, 10, 1, 5), (2, 5, 1, 5), (1, 10, 1, 5)),
    ((2, 5, 1, 5), (2, 5, 1, 5), (1, 10, 1, 5)),
    ((1, 6, 1, 3), (2, 3, 1, 3), (1, 6, 1, 3)),
    ((1, 7, 1, 4), (8, 1, 3, 1), (1, 7, 1, 4)),
    ((1, 8, 1, 12), (3, 4, 2, 4), (1, 8, 1, 12)),
    ((3, 4, 2, 4), (3, 4, 2, 4), (1, 8, 1, 12)),
    ((8, 1, 5, 1), (8, 1, 5, 1), (1, 5, 1, 8)),
    ((3, 2, 2, 2), (3, 2, 2, 2), (1, 4, 1, 6)),
    ((2, 3, 3, 3), (2, 3, 3, 3), (1, 9, 1, 6)),
    ((2, 1, 2, 2), (2, 1, 4, 1), (2, 1, 2, 2)),
    ((3, 2, 6, 6), (3, 2, 12, 2), (3, 2, 3, 8)),
    ((4, 2, 4, 4), (4, 2, 8, 2), (4, 2, 4, 4)),
    ((12, 4, 1, 1), (15, 1, 1, 1), (1, 15, 1, 1)),
    ((2, 2, 1, 5), (7, 1, 5, 1), (1, 7, 1, 5)),
    ((1, 2, 2, 4), (1, 2, 3, 2), (1, 2, 1, 6)),
]


@pytest.mark.parametrize(("p", "nf_bd", "nf_ag"), TABLE_NORMAL_FORMS, ids=lambda t: str(t))
def test_normal_forms_table(
    p: tuple[int, ...], nf_bd: tuple[int, ...], nf_ag: tuple[int, ...]
) -> None:
    assert algebra.normal_form_beta_delta(C(*p)) == C(*nf_bd)
    assert algebra.normal_form_alpha_gamma(C(*p)) == C(*nf_ag)


def reduce_beta_delta(p: ParameterSet) -> ParameterSet:
    """Beta- and delta-steps (subtractive Euclid) until beta = delta (theory: normal forms)."""
    a, b, c, d = p.as_tuple()
    while b != d:
        if d > b:
            a, b, c, d = a, b, c + a, d - b  # delta-step, R <- R + P
        else:
            a, b, c, d = a + c, b - d, c, d  # beta-step, P <- P + R
    return C(a, b, c, d)


def reduce_alpha_gamma(p: ParameterSet) -> ParameterSet:
    """docs/theory/normal-forms.md: alpha- and gamma-steps until alpha = gamma."""
    a, b, c, d = p.as_tuple()
    while a != c:
        if c > a:
            a, b, c, d = a, b, c - a, d + b  # gamma-step, R <- R - P
        else:
            a, b, c, d = a - c, b + d, c, d  # alpha-step, P <- P - R
    return C(a, b, c, d)


def test_reduction_chain_example() -> None:
    # docs/theory/normal-forms.md worked chain:
    # C(4,2,2,3) -> delta-step -> C(4,2,6,1) -> beta-step -> C(10,1,6,1)
    assert algebra.lattice_key(C(4, 2, 6, 1)) == algebra.lattice_key(C4223)
    assert reduce_beta_delta(C4223) == C(10, 1, 6, 1)
    assert reduce_alpha_gamma(C4223) == C(2, 5, 2, 3)


def test_normal_forms_are_the_ends_of_the_reductions() -> None:
    for p in tuples(7):
        nf_bd = algebra.normal_form_beta_delta(p)
        nf_ag = algebra.normal_form_alpha_gamma(p)
        assert nf_bd == reduce_beta_delta(p), p
        assert nf_ag == reduce_alpha_gamma(p), p
        # shear mappings keep the net: the same lattice (docs/theory/normal-forms.md)
        assert algebra.lattice_key(nf_bd) == algebra.lattice_key(p)
        assert algebra.lattice_key(nf_ag) == algebra.lattice_key(p)


def test_swap() -> None:
    assert algebra.swap(C4223) == C(2, 4, 3, 2)  # docs/theory/isomorphism.md example
    assert algebra.class_key(C4223) == algebra.class_key(C(2, 4, 3, 2))
    assert algebra.frame_key(C4223) == algebra.frame_key(C(2, 4, 3, 2))
    assert algebra.reading_key(C4223) != algebra.reading_key(C(2, 4, 3, 2))


@given(st.builds(C, *(st.integers(1, 60) for _ in range(4))))
def test_swap_invariance_of_class_level_keys(p: ParameterSet) -> None:
    # docs/theory/isomorphism.md: C(alpha,beta,gamma,delta) and C(beta,alpha,delta,gamma) are one
    # class.
    q = p.swap()
    assert q.swap() == p
    assert algebra.class_key(p) == algebra.class_key(q)
    assert algebra.frame_key(p) == algebra.frame_key(q)
    assert algebra.transition_group(p) == algebra.transition_group(q)
    assert algebra.iteration_depth(p) == algebra.iteration_depth(q)
    assert algebra.area(p) == algebra.area(q)


def test_exceptional_family() -> None:
    # docs/theory/isomorphism.md [VERIFIED A <= 40]: C(2,2,1,2k-1) and C(2,2,2,2k-2) are one class
    # although
    # their lattices differ, also after the swap; C(1,2k+1,1,2k-1) shares only the frame.
    for k in range(2, 8):
        odd, even = C(2, 2, 1, 2 * k - 1), C(2, 2, 2, 2 * k - 2)
        assert algebra.lattice_key(odd) != algebra.lattice_key(even)
        assert algebra.lattice_key(odd.swap()) != algebra.lattice_key(even)
        assert algebra.class_key(odd) == algebra.class_key(even)
        assert algebra.frame_key(odd) == algebra.frame_key(even)
        thin = C(1, 2 * k + 1, 1, 2 * k - 1)
        assert algebra.lattice_key(thin) == algebra.lattice_key(odd)
        assert algebra.frame_key(thin) == algebra.frame_key(even)
        assert algebra.class_key(thin) != algebra.class_key(even)
    # A = 4k + 2 has no exception: C(2,2,1,2k) and C(2,2,2,2k-1) are swaps of readings only.
    assert algebra.class_key(C(2, 2, 1, 2)) == algebra.class_key(C(2, 2, 2, 1))


def test_same_net_different_systems() -> None:
    # docs/theory/check-values.md "Further check values": literally the same net (A = 5), four
    # systems.
    sets = [C(3, 2, 1, 1), C(2, 3, 1, 1), C(4, 1, 1, 1), C(1, 4, 1, 1)]
    assert len({algebra.lattice_key(p) for p in sets}) == 1
    assert len({algebra.frame_key(p) for p in sets}) == 1
    assert len({algebra.class_key(p) for p in sets}) == 2  # {3,2 ~ 2,3} and {4,1 ~ 1,4}
    assert len({algebra.reading_key(p) for p in sets}) == 4


def test_classification_agrees_with_nauty() -> None:
    # docs/theory/isomorphism.md [VERIFIED with nauty for area <= 60]: class and frame keys give
    # exactly the
    # partitions by the marked and the unmarked canonical forms.
    from zoo.core import canonical

    for area in range(1, 25):
        sets = parameter_sets_of_area(area)
        for level_key, form in (
            (algebra.class_key, canonical.system_form),
            (algebra.frame_key, canonical.net_form),
        ):
            by_key: dict[object, set[str]] = {}
            by_form: dict[str, set[object]] = {}
            for p in sets:
                fingerprint = form(p).fingerprint
                by_key.setdefault(level_key(p), set()).add(fingerprint)
                by_form.setdefault(fingerprint, set()).add(level_key(p))
            assert all(len(v) == 1 for v in by_key.values()), (area, level_key.__name__)
            assert all(len(v) == 1 for v in by_form.values()), (area, level_key.__name__)
        # The readings of every class, and the class-level iteration depth and group (the
        # maximum over the class's parameter sets), against the nauty partition.
        classes: dict[str, list[ParameterSet]] = {}
        for p in sets:
            classes.setdefault(canonical.system_form(p).fingerprint, []).append(p)
        for members in classes.values():
            readings = {algebra.reading_key(q) for q in members}
            deepest = max(algebra.iteration_depth(q) for q in members)
            group = max(algebra.transition_group(q) for q in members)
            for q in members:
                representatives = algebra.class_reading_representatives(q)
                assert {algebra.reading_key(r) for r in representatives} == readings, q
                assert algebra.class_iteration_depth(q) == deepest, q
                assert algebra.class_transition_group(q) == group, q


# --- §8: n-fold temporal iteration -----------------------------------------------------------


def test_iterate_definition_and_lattice_inclusion() -> None:
    # docs/theory/iterations.md: L_n = <P, nR> is contained in L with index n, and A_n = nA.
    for p in tuples(4):
        for n in range(1, 5):
            q = algebra.iterate(p, n)
            assert q == C(p.alpha, p.beta, n * p.gamma, n * p.delta)
            assert q.area == n * p.area
            assert algebra.is_sublattice(q, p)
            assert algebra.is_sublattice(p, q) == (n == 1)
            assert algebra.iteration_depth(q) >= n
            assert algebra.iteration_depth(q) % n == 0 or algebra.iteration_depth(q) > n


# docs/theory/check-values.md "n-fold iteration", reachable states for n = 1, 2, 3
ITERATED_STATES = [
    ((1, 1, 1, 1), [2, 4, 6]),
    ((2, 1, 1, 1), [3, 6, 9]),
    ((2, 2, 1, 1), [6, 12, 18]),
    ((3, 2, 1, 1), [10, 20, 30]),
    ((2, 3, 1, 2), [14, 28, 42]),
    ((3, 3, 1, 3), [40, 80, 120]),
    ((3, 3, 2, 2), [40, 80, 120]),
    ((2, 2, 1, 3), [12, 24, 36]),
    ((2, 2, 2, 2), [12, 24, 36]),
    ((1, 2, 1, 2), [4, 8, 12]),
    ((3, 1, 2, 1), [5, 10, 15]),
    ((4, 2, 2, 3), [40, 80]),
    ((2, 5, 1, 5), [45, 90]),
    ((1, 10, 1, 5), [15, 30]),
]


@pytest.mark.parametrize(("p", "states"), ITERATED_STATES, ids=lambda t: str(t))
def test_iterated_state_counts(p: tuple[int, ...], states: list[int]) -> None:
    for n, expected in enumerate(states, start=1):
        assert reachable_state_count(algebra.iterate(C(*p), n)) == expected


def test_iteration_depth_against_search() -> None:
    # The largest n such that some C(alpha, beta, gamma0, delta0) of area A/n iterated n times
    # is the same reading (same lattice and token counts) as p, by search over all candidates.
    for area in range(2, 25):
        sets = parameter_sets_of_area(area)
        readings = {
            n: {
                algebra.reading_key(algebra.iterate(q, n))
                for q in parameter_sets_of_area(area // n)
            }
            for n in range(2, area + 1)
            if area % n == 0 and area // n >= 2
        }
        for p in sets:
            expected = max(
                [1] + [n for n, keys in readings.items() if algebra.reading_key(p) in keys]
            )
            assert algebra.iteration_depth(p) == expected, p


def test_class_iteration_depth_of_the_exceptional_family() -> None:
    # docs/theory/isomorphism.md: C(2,2,1,3) ~ C(2,2,2,2) = iterate(C(2,2,1,1), 2) as marked nets.
    assert algebra.iteration_depth(C(2, 2, 1, 3)) == 1
    assert algebra.class_iteration_depth(C(2, 2, 1, 3)) == 2
    assert algebra.class_transition_group(C(2, 2, 1, 3)) == (2, 4)
    assert algebra.class_reading_representatives(C(4, 2, 2, 3)) == [C(2, 4, 3, 2), C(4, 2, 2, 3)]


def test_iteration_depth_examples() -> None:
    assert algebra.iteration_depth(C(3, 2, 6, 6)) == 6  # = iterate(C(3,2,1,1), 6)
    assert algebra.iteration_depth(C4223) == 1
    # C(4,2,4,6) is C(4,2,2,3) iterated twice (docs/theory/iterations.md), but a delta-step gives
    # the same
    # system C(4,2,8,4) = iterate(C(4,2,2,1), 4), so its depth is 4.
    assert algebra.reading_key(C(4, 2, 4, 6)) == algebra.reading_key(C(4, 2, 8, 4))
    assert algebra.iteration_depth(C(4, 2, 4, 6)) == 4
    # C(1,2,2,4) = iterate(C(1,2,1,2), 2), docs/theory/check-values.md table row
    assert algebra.iteration_depth(C(1, 2, 2, 4)) == 2
