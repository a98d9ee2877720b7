"""Classification of an area: algebra against nauty, counts against outside formulas."""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache

import pytest
from sympy import divisor_count, divisor_sigma

from zoo.catalog.classify import AreaClassification, ClassificationDisagreement, classify_area
from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core import algebra
from zoo.core.canonical import net_form, system_form
from zoo.core.params import ParameterSet, parse_params
from zoo.errors import CatalogError

NAIVE_MAX_AREA = 30  # nauty on every parameter set: the independent second way


@cache
def classified(area: int) -> AreaClassification:
    return classify_area(area)


def _naive_partition(area: int, form: object) -> list[tuple[ParameterSet, ...]]:
    """Group every parameter set of an area by its nauty fingerprint; groups by smallest member."""
    groups: dict[str, list[ParameterSet]] = {}
    for p in iter_parameter_sets(area):
        groups.setdefault(form(p).fingerprint, []).append(p)  # type: ignore[operator]
    return sorted((tuple(sorted(g)) for g in groups.values()), key=lambda g: g[0])


@pytest.mark.parametrize("area", range(2, NAIVE_MAX_AREA + 1))
def test_classes_and_frames_equal_nauty_on_every_parameter_set(area: int) -> None:
    result = classified(area)
    classes = [c.members for c in result.classes]
    assert classes == _naive_partition(area, system_form)
    frames = [
        tuple(sorted(p for c in result.classes if c.frame_id == f.id for p in c.members))
        for f in result.frames
    ]
    assert frames == _naive_partition(area, net_form)


def test_identifiers_recomputed_from_scratch_agree() -> None:
    # Rank = position among the classes of the area ordered by smallest member (docs/citing.md),
    # recomputed here from the nauty partition alone.
    for area in (8, 12, 16, 20):
        result = classified(area)
        naive = _naive_partition(area, system_form)
        expected = {f"CY{area}-{rank}": group[0] for rank, group in enumerate(naive, 1)}
        assert {c.id: c.label for c in result.classes} == expected
        naive_frames = _naive_partition(area, net_form)
        assert [f.label for f in result.frames] == [g[0] for g in naive_frames]
        assert [f.id for f in result.frames] == [
            f"FR{area}-{rank}" for rank in range(1, len(naive_frames) + 1)
        ]


@pytest.mark.parametrize("area", range(2, 101))
def test_typed_net_classes_per_area_are_sigma_minus_tau(area: int) -> None:
    # docs/theory/lattice-key.md: sigma(A) - tau(A) typed nets per area [VERIFIED A <= 24 there];
    # the
    # distinct lattice keys are the typed net classes (docs/theory/isomorphism.md).
    lattices = {algebra.lattice_key(p) for p in iter_parameter_sets(area)}
    assert len(lattices) == int(divisor_sigma(area)) - int(divisor_count(area))


def _class_of(result: AreaClassification, text: str) -> str:
    p = parse_params(text)
    return next(c.id for c in result.classes if p in c.members)


def _frame_of(result: AreaClassification, text: str) -> str:
    p = parse_params(text)
    return next(c.frame_id for c in result.classes if p in c.members)


def test_published_isomorphisms() -> None:
    # docs/theory/isomorphism.md: swap pair, exceptional family, same net with different markings.
    a16 = classified(16)
    assert _class_of(a16, "C(4,2,2,3)") == _class_of(a16, "C(2,4,3,2)")
    assert _class_of(a16, "C(2,2,1,7)") == _class_of(a16, "C(2,2,2,6)")
    a8 = classified(8)
    assert _class_of(a8, "C(2,2,1,3)") == _class_of(a8, "C(2,2,2,2)")
    # C(1,5,1,3) has the net of C(2,2,2,2) but other token counts: same frame, other class.
    assert _frame_of(a8, "C(1,5,1,3)") == _frame_of(a8, "C(2,2,2,2)")
    assert _class_of(a8, "C(1,5,1,3)") != _class_of(a8, "C(2,2,2,2)")
    a5 = classified(5)
    same_net = ["C(3,2,1,1)", "C(2,3,1,1)", "C(4,1,1,1)", "C(1,4,1,1)"]
    assert len({_frame_of(a5, t) for t in same_net}) == 1
    assert _class_of(a5, "C(3,2,1,1)") == _class_of(a5, "C(2,3,1,1)")
    assert _class_of(a5, "C(4,1,1,1)") == _class_of(a5, "C(1,4,1,1)")
    assert _class_of(a5, "C(3,2,1,1)") != _class_of(a5, "C(4,1,1,1)")
    # docs/theory/synthesis.md table: (A, cyc, alpha = beta) = (12, 4, 3) has two classes.
    a12 = classified(12)
    assert _class_of(a12, "C(3,3,1,3)") == _class_of(a12, "C(3,3,3,1)")
    assert _class_of(a12, "C(3,3,1,3)") != _class_of(a12, "C(3,3,2,2)")


def test_invariants_of_the_running_example() -> None:
    # docs/theory/check-values.md table, rows C(4,2,2,3) and C(2,4,3,2) [VERIFIED].
    result = classified(16)
    entry = next(c for c in result.classes if ParameterSet(4, 2, 2, 3) in c.members)
    assert (entry.loop, entry.states, entry.state_arcs) == (5, 40, 64)
    assert (entry.tokens, entry.enabled, entry.semi_enabled) == (6, 2, 2)
    readings = {str(r.label): r for r in entry.readings}
    assert len(readings) == 2
    first = next(r for r in entry.readings if ParameterSet(4, 2, 2, 3) in r.members)
    assert (first.forward.count, first.forward.length, first.forward.tokens) == (1, 16, 2)
    assert (first.backward.count, first.backward.length, first.backward.tokens) == (2, 8, 2)
    assert str(first.nf_beta_delta) == "C(10,1,6,1)" and str(first.nf_alpha_gamma) == "C(2,5,2,3)"
    assert str(first.slowness) == "1/3"
    assert entry.label == min(entry.members)


def test_labels_are_smallest_members_and_ranks_follow_them() -> None:
    for area in range(2, 31):
        result = classified(area)
        labels = [c.label for c in result.classes]
        assert labels == sorted(labels)
        assert all(c.label == min(c.members) for c in result.classes)
        assert [f.label for f in result.frames] == sorted(f.label for f in result.frames)
        members = [p for c in result.classes for p in c.members]
        assert sorted(members) == list(iter_parameter_sets(area))


@dataclass(frozen=True)
class _Form:
    fingerprint: str
    automorphisms: int = 1


def test_a_wrong_split_stops_the_classification() -> None:
    # A "nauty" that finds every marked net isomorphic: distinct classes collide.
    with pytest.raises(ClassificationDisagreement) as caught:
        classify_area(6, system_form=lambda p: _Form("same"), net_form=net_form)
    assert isinstance(caught.value, CatalogError)
    assert "area 6" in str(caught.value) and "nothing was stored" in str(caught.value)
    assert len(caught.value.report) >= 1 and "isomorphic" in caught.value.report[0]


def test_a_wrong_merge_stops_the_classification() -> None:
    # A "nauty" that tells every parameter set apart: the exceptional merge
    # C(2,2,1,3) ~ C(2,2,2,2) of area 8 is then contradicted, and nothing else.
    with pytest.raises(ClassificationDisagreement) as caught:
        classify_area(8, system_form=lambda p: _Form(str(p)), net_form=net_form)
    report = caught.value.report
    assert len(report) == 1
    assert "C(2,2,2,2)" in report[0] and "non-isomorphic" in report[0]


def test_canonical_forms_are_needed_once_per_class_and_frame_plus_merges() -> None:
    result = classified(24)
    exceptional = sum(1 for c in result.classes if len(c.readings) > 2) + sum(
        1
        for c in result.classes
        if len(c.readings) == 2
        and algebra.reading_key(c.readings[0].label.swap())
        != algebra.reading_key(c.readings[1].label)
    )
    assert exceptional >= 1  # the (2,-2) family at A = 24 = 4 * 6
    assert result.canonical_forms >= len(result.classes) + len(result.frames) + exceptional
    assert result.canonical_forms <= len(result.classes) + 2 * len(result.frames) + exceptional
