"""The fast classification path against the explicit-net path it replaced.

The fast path (``canonical.cycloid_form``: nauty's input built from the lattice algebra, reading
keys once per chain of steps) must give byte-identical fingerprints, the same automorphism
counts and the same partitions as nauty on the explicit net of ``build_net``
(``canonical.canonical_form``), which stays the reference.
"""

from __future__ import annotations

import pytest

from zoo.catalog.classify import classify_area, explicit_functions
from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core import algebra
from zoo.core.canonical import canonical_form, cycloid_form
from zoo.core.net import build_net

FAST_CHECK_MAX_AREA = 30


@pytest.mark.parametrize("area", range(1, FAST_CHECK_MAX_AREA + 1))
def test_fast_classification_equals_the_explicit_net_path(area: int) -> None:
    system, net = explicit_functions()
    fast = classify_area(area)
    explicit = classify_area(area, system_form=system, net_form=net)
    assert fast.classes == explicit.classes
    assert fast.frames == explicit.frames
    assert fast.canonical_forms == explicit.canonical_forms
    # Readings as the per-parameter-set reading key groups them (the former pipeline).
    groups: dict[object, list[object]] = {}
    for p in iter_parameter_sets(area):
        groups.setdefault(algebra.reading_key(p), []).append(p)
    expected = sorted(tuple(sorted(g)) for g in groups.values())  # type: ignore[type-var]
    assert sorted(r.members for c in fast.classes for r in c.readings) == expected


@pytest.mark.parametrize("area", [1, 2, 3, 4, 8, 12, 17, 24])
def test_cycloid_form_equals_the_explicit_canonical_form(area: int) -> None:
    # Every parameter set, both levels: includes the nets with twins ((1,-1) or (2,-2) in the
    # lattice) and with loops (forward cycles of length 1).
    for p in iter_parameter_sets(area):
        explicit_net = build_net(p)
        for marked in (True, False):
            fast = cycloid_form(p, marked)
            slow = canonical_form(explicit_net, marked=marked)
            assert (fast.text, fast.fingerprint, fast.automorphisms) == (
                slow.text,
                slow.fingerprint,
                slow.automorphisms,
            )
