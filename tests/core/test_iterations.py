"""Iteration links between classes, checked against explicit nets and nauty.

The relation (zoo/core/iterations.py, docs/theory/iterations.md): class X is an n-fold iteration
of class Y when some system of X is C(α, β, nγ, nδ) for a system C(α, β, γ, δ) of Y. The reference
below decides the same question by brute force: it builds the explicit net of C(α, β, nγ, nδ) for
every parameter set of every class Y and compares its nauty canonical form with X's.
"""

from __future__ import annotations

from collections import defaultdict

import pytest

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core.canonical import system_form
from zoo.core.invariants import reachable_state_count
from zoo.core.iterations import class_iteration_bases, class_iterations, system_iteration_bases
from zoo.core.params import ParameterSet as C

MAX_AREA = 20


@pytest.fixture(scope="module")
def classes_by_form() -> dict[int, dict[str, list[C]]]:
    """Every parameter set of area <= MAX_AREA grouped by area, then by nauty fingerprint."""
    found: dict[int, dict[str, list[C]]] = defaultdict(lambda: defaultdict(list))
    for area in range(2, MAX_AREA + 1):
        for p in iter_parameter_sets(area):
            found[area][system_form(p).fingerprint].append(p)
    return {area: dict(classes) for area, classes in found.items()}


def test_iteration_bases_match_brute_force_over_explicit_nets(
    classes_by_form: dict[int, dict[str, list[C]]],
) -> None:
    checked = linked = 0
    for area, classes in classes_by_form.items():
        for fingerprint, members in classes.items():
            expected: set[tuple[str, int]] = set()
            for n in range(2, area + 1):
                if area % n:
                    continue
                for base_fingerprint, base_members in classes_by_form.get(area // n, {}).items():
                    if any(
                        system_form(C(q.alpha, q.beta, n * q.gamma, n * q.delta)).fingerprint
                        == fingerprint
                        for q in base_members
                    ):
                        expected.add((base_fingerprint, n))
            label = min(members)
            got = {(system_form(base).fingerprint, n) for base, n in class_iteration_bases(label)}
            assert got == expected, label
            checked += 1
            linked += bool(expected)
    assert checked > 400 and linked > 80


def test_iterations_are_the_inverse_relation(
    classes_by_form: dict[int, dict[str, list[C]]],
) -> None:
    for classes in classes_by_form.values():
        for members in classes.values():
            label = min(members)
            for member, n in class_iterations(label, MAX_AREA):
                bases = {
                    system_form(b).fingerprint for b, k in class_iteration_bases(member) if k == n
                }
                assert system_form(label).fingerprint in bases, (label, member, n)


def test_the_three_fold_iteration_of_a_ring_of_3_items_and_4_slots() -> None:
    # A ring of c = 3 anonymous items and g = 4 free slots is C(g, c, 1, 1) = C(4,3,1,1); with
    # individually named items it is C(g, c, c, c) = C(4,3,3,3), its c-fold iteration
    # (docs/theory/ring-designs.md; [TQ20] for the traffic-queue models).
    assert system_iteration_bases(C(4, 3, 3, 3)) == [(C(4, 3, 1, 1), 3)]
    assert (C(3, 4, 3, 3), 3) in class_iterations(C(4, 3, 1, 1), 21)


@pytest.mark.parametrize(
    ("p", "counts"),
    [
        # Reachable states of the n-fold iterations for n = 1, 2, 3 (docs/theory/iterations.md;
        # derived, the explicit searches in test_explicit_search.py confirm the formula).
        (C(1, 1, 1, 1), (2, 4, 6)),
        (C(2, 2, 1, 1), (6, 12, 18)),
        (C(3, 3, 1, 3), (40, 80, 120)),
        (C(2, 3, 1, 2), (14, 28, 42)),
    ],
)
def test_state_counts_multiply_along_an_iteration(p: C, counts: tuple[int, ...]) -> None:
    for n, expected in enumerate(counts, 1):
        q = C(p.alpha, p.beta, n * p.gamma, n * p.delta)
        assert reachable_state_count(q) == expected
        if n > 1:
            assert (p, n) in system_iteration_bases(q) or any(
                k == n and reachable_state_count(b) == counts[0]
                for b, k in system_iteration_bases(q)
            )
