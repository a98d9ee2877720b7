"""Synthesis of parameter sets from (A, cyc, alpha, beta) against docs/theory/synthesis.md.

Candidates are cross-checked against a plain search over all parameter sets of the area; the
class tables of docs/theory/synthesis.md are reproduced with zoo.core.algebra.class_key.
"""

from __future__ import annotations

import itertools

import pytest

from zoo.core import algebra, invariants
from zoo.core.params import ParameterSet
from zoo.core.synthesis import candidates, closed_form_parameters, synthesize
from zoo.errors import ParameterError

C = ParameterSet


def test_running_example() -> None:
    # docs/theory/synthesis.md: C(4,2,2,3), A = 16, cyc = 5, alpha = 4, beta = 2 gives gamma = 2,
    # delta = 3.
    assert closed_form_parameters(16, 5, 4, 2) == C(4, 2, 2, 3)
    assert synthesize(16, 5, 4, 2) == [C(4, 2, 2, 3)]


def test_candidates_against_search() -> None:
    for area in range(2, 31):
        for alpha, beta in itertools.product(range(1, area), repeat=2):
            expected = sorted(
                C(alpha, beta, gamma, delta)
                for gamma in range(1, area)
                for delta in range(1, area)
                if alpha * delta + beta * gamma == area
            )
            assert candidates(area, alpha, beta) == expected


@pytest.mark.parametrize(
    ("area", "loop", "alpha", "beta", "expected", "forward"),
    # docs/theory/synthesis.md: (A, cyc, alpha, beta) is not complete for alpha != beta [VERIFIED]
    [
        (45, 5, 3, 18, [C(3, 18, 1, 9), C(3, 18, 2, 3)], (9, 5)),  # 9 forward cycles of length 5
        (48, 6, 4, 16, [C(4, 16, 1, 8), C(4, 16, 2, 4)], (8, 6)),  # 8 forward cycles of length 6
        (54, 6, 3, 21, [C(3, 21, 1, 11), C(3, 21, 2, 4)], None),
    ],
)
def test_incompleteness_counterexamples(
    area: int,
    loop: int,
    alpha: int,
    beta: int,
    expected: list[ParameterSet],
    forward: tuple[int, int] | None,
) -> None:
    found = synthesize(area, loop, alpha, beta)
    assert found == expected
    # Non-isomorphic: different class keys, and different forward-cycle structure.
    assert len({algebra.class_key(p) for p in found}) == 2
    first, second = found
    if forward is not None:
        family = invariants.forward_cycles(first)
        assert (family.count, family.length) == forward
    assert first.gamma + first.delta != loop and second.gamma + second.delta == loop
    # and the swapped observables give the swapped answers (docs/theory/synthesis.md "plus their
    # swaps")
    assert synthesize(area, loop, beta, alpha) == sorted(p.swap() for p in found)


CLASS_TABLES = [  # docs/theory/synthesis.md, non-uniqueness when alpha = beta [VERIFIED]
    (12, 4, 3, [[(3, 3, 1, 3), (3, 3, 3, 1)], [(3, 3, 2, 2)]]),
    (15, 5, 3, [[(3, 3, 1, 4), (3, 3, 4, 1)], [(3, 3, 2, 3), (3, 3, 3, 2)]]),
    (18, 6, 3, [[(3, 3, 1, 5), (3, 3, 2, 4), (3, 3, 4, 2), (3, 3, 5, 1)], [(3, 3, 3, 3)]]),
    (24, 6, 4, [[(4, 4, 1, 5), (4, 4, 5, 1)], [(4, 4, 2, 4), (4, 4, 4, 2)], [(4, 4, 3, 3)]]),
    (16, 4, 4, [[(4, 4, 1, 3), (4, 4, 3, 1)], [(4, 4, 2, 2)]]),
]


@pytest.mark.parametrize(("area", "loop", "alpha", "classes"), CLASS_TABLES)
def test_symmetric_class_tables(
    area: int, loop: int, alpha: int, classes: list[list[tuple[int, ...]]]
) -> None:
    # Every candidate with the exact loop, grouped by class key, is the table's partition.
    matching = [
        p for p in candidates(area, alpha, alpha) if invariants.minimal_cycle_length(p) == loop
    ]
    groups: dict[object, list[ParameterSet]] = {}
    for p in matching:
        groups.setdefault(algebra.class_key(p), []).append(p)
    expected = sorted(sorted(C(*t) for t in group) for group in classes)
    assert sorted(sorted(g) for g in groups.values()) == expected
    # synthesize reports one parameter set per lattice, and covers every class of the table
    found = synthesize(area, loop, alpha, alpha)
    assert {algebra.class_key(p) for p in found} == set(groups)
    assert len({algebra.lattice_key(p) for p in found}) == len(found)


def test_symmetric_rule_gamma_mod_alpha() -> None:
    # docs/theory/synthesis.md: for alpha = beta >= 3 the class is fixed by gamma mod alpha, up to
    # gamma <-> cyc - gamma.
    for alpha in range(3, 6):
        for loop in range(2, 11):
            sets = [C(alpha, alpha, gamma, loop - gamma) for gamma in range(1, loop)]
            for p, q in itertools.combinations(sets, 2):
                rule = {p.gamma % alpha, (loop - p.gamma) % alpha} == {
                    q.gamma % alpha,
                    (loop - q.gamma) % alpha,
                }
                assert (algebra.class_key(p) == algebra.class_key(q)) == rule, (p, q)


def test_synthesis_recovers_every_small_system() -> None:
    # Round trip: every parameter set <= 6 is found (up to its lattice) from its observables.
    for t in itertools.product(range(1, 7), repeat=4):
        p = C(*t)
        found = synthesize(p.area, invariants.minimal_cycle_length(p), p.alpha, p.beta)
        assert algebra.lattice_key(p) in {algebra.lattice_key(q) for q in found}, p
        assert all(
            invariants.minimal_cycle_length(q) == invariants.minimal_cycle_length(p) for q in found
        )


def test_closed_form_failure_mode() -> None:
    # docs/theory/synthesis.md: regular cycloid with alpha < beta, C(1,2,1,2): A = 4, cyc = 2; the
    # formula
    # gives delta = 0, so no parameter set; the robust method still finds it.
    assert closed_form_parameters(4, 2, 1, 2) is None
    assert synthesize(4, 2, 1, 2) == [C(1, 2, 1, 2)]
    assert closed_form_parameters(12, 4, 3, 3) is None  # alpha = beta: undefined


def test_no_solution_and_bad_input() -> None:
    assert synthesize(16, 3, 4, 2) == []
    assert candidates(5, 9, 9) == []
    with pytest.raises(ParameterError, match="loop must be a positive integer, got 0"):
        synthesize(16, 0, 4, 2)
    with pytest.raises(ParameterError, match="area may be at most 100,000, got 1,000,000"):
        candidates(1_000_000, 1, 1)
    with pytest.raises(ParameterError, match="alpha must be a whole number"):
        candidates(16, 1.5, 2)  # type: ignore[arg-type]
