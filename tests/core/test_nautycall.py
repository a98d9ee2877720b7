"""Tests of zoo.core.nautycall: one nauty run against pynauty's own two calls.

pynauty (canon_label for the labelling, autgrp for the group) is the outside reference: the
single run must give exactly the labelling of ``canon_label`` and the group order of ``autgrp``
on the same graph with the same colouring, and the canonical forms built on it must be
byte-identical to those built on pynauty's two calls (the fallback path).
"""

from __future__ import annotations

import _ctypes
import logging
import random
from typing import Any

import pynauty
import pytest

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core import canonical, nautycall
from zoo.core.canonical import canonical_form, cycloid_form, encoding_graph
from zoo.core.net import MarkedGraph, build_net
from zoo.core.params import ParameterSet


def test_the_single_run_is_available() -> None:
    # pynauty's wheels export nauty(); without it every form costs two runs (still correct).
    assert nautycall.single_run_status().startswith("one nauty run per form")


def pynauty_reference(
    n: int, edges: list[tuple[int, int]], cells: list[set[int]]
) -> tuple[list[int], float, int]:
    """pynauty's labelling and group order, through its public constructor and calls."""
    adjacency: dict[int, list[int]] = {}
    for u, v in edges:
        adjacency.setdefault(u, []).append(v)
    graph = pynauty.Graph(n, directed=False, adjacency_dict=adjacency, vertex_coloring=cells)
    _generators, grpsize1, grpsize2, _orbits, _count = pynauty.autgrp(graph)
    return list(pynauty.canon_label(graph)), grpsize1, grpsize2


def single_run(n: int, edges: list[tuple[int, int]], cells: list[set[int]]) -> nautycall.NautyRun:
    run = nautycall.canonical_run(n, [u for u, _ in edges], [v for _, v in edges], cells)
    assert run.runs == 1
    return run


def cycloid_inputs(p: ParameterSet, marked: bool) -> tuple[int, list[tuple[int, int]], list[Any]]:
    """The graph the build hands to nauty for C(p), with its cells as sets."""
    if canonical._may_have_twins(p):
        n, tails, heads, cells = canonical._nauty_input(encoding_graph(build_net(p), marked))
    else:
        incidence = canonical._grid_incidence(p, marked)
        n, tails, heads, cells = canonical._grid_nauty_input(*incidence, p.area)
    edges = list(zip(list(tails), list(heads), strict=True))
    return n, [(int(u), int(v)) for u, v in edges], [{int(v) for v in cell} for cell in cells]


@pytest.mark.parametrize("area", range(1, 31))
def test_single_run_equals_canon_label_and_autgrp_on_every_cycloid(area: int) -> None:
    # Every parameter set of the area, both levels: the graphs of the fast path and, for the
    # lattices with twins, of the general reduction.
    for p in iter_parameter_sets(area):
        for marked in (True, False):
            n, edges, cells = cycloid_inputs(p, marked)
            run = single_run(n, edges, cells)
            assert (run.labelling, run.grpsize1, run.grpsize2) == pynauty_reference(
                n, edges, cells
            ), (p, marked)
            assert run.exact


def forms(p: ParameterSet) -> list[tuple[str, str, int]]:
    return [
        (form.text, form.fingerprint, form.automorphisms)
        for form in (cycloid_form(p, True), cycloid_form(p, False))
    ]


@pytest.mark.parametrize("area", [1, 2, 5, 8, 12, 16, 17, 24, 30])
def test_cycloid_forms_are_byte_identical_to_the_two_run_path(
    area: int, monkeypatch: pytest.MonkeyPatch
) -> None:
    sets = list(iter_parameter_sets(area))
    single = [forms(p) for p in sets]
    monkeypatch.setattr(nautycall, "_ENGINE", None)
    monkeypatch.setattr(nautycall, "_STATUS", "two runs (forced by the test)")
    assert [forms(p) for p in sets] == single


def random_graph(rng: random.Random) -> tuple[int, list[tuple[int, int]], list[set[int]]]:
    n = rng.randint(1, 200)
    density = rng.choice([0.0, 0.02, 0.1, 0.5, 1.0])
    edges = [(u, v) for u in range(n) for v in range(u + 1, n) if rng.random() < density]
    colour = [rng.randrange(rng.randint(1, 5)) for _ in range(n)]
    cells = [{v for v in range(n) if colour[v] == c} for c in sorted(set(colour))]
    rng.shuffle(cells)
    return n, edges, cells


def test_single_run_equals_pynauty_on_random_coloured_graphs() -> None:
    # Empty and complete graphs (density 0 and 1) have groups far past 10^10, where grpsize2
    # is not 0; rows of up to four 64-bit words.
    rng = random.Random(20261205)
    inexact = 0
    for _ in range(300):
        n, edges, cells = random_graph(rng)
        run = single_run(n, edges, cells)
        assert (run.labelling, run.grpsize1, run.grpsize2) == pynauty_reference(n, edges, cells)
        inexact += not run.exact
    assert inexact > 10


def test_single_run_equals_pynauty_on_symmetric_graphs() -> None:
    # Disjoint rings (a wreath product), a hypercube and the Petersen graph, one cell each:
    # pynauty passes one cell as nauty's default partition.
    def rings(count: int, length: int) -> list[tuple[int, int]]:
        ring = [(i, (i + 1) % length) for i in range(length)]
        return [(r * length + u, r * length + v) for r in range(count) for u, v in ring]

    cube = [(v, v ^ (1 << b)) for v in range(64) for b in range(6) if v < v ^ (1 << b)]
    petersen = [(i, (i + 1) % 5) for i in range(5)] + [(i, i + 5) for i in range(5)]
    petersen += [(5 + i, 5 + (i + 2) % 5) for i in range(5)]
    for n, edges in ((60, rings(20, 3)), (64, cube), (10, petersen), (130, rings(10, 13))):
        for cells in ([set(range(n))], [set(range(n - 1, -1, -1))], [{0}, set(range(1, n))]):
            run = single_run(n, edges, cells)
            assert (run.labelling, run.grpsize1, run.grpsize2) == pynauty_reference(n, edges, cells)


def rings_net(rings: int, tokens_per_ring: bool) -> MarkedGraph:
    pre = tuple(3 * r + i for r in range(rings) for i in range(3))
    post = tuple(3 * r + (i + 1) % 3 for r in range(rings) for i in range(3))
    tokens = tuple(1 if i == 0 and tokens_per_ring else 0 for r in range(rings) for i in range(3))
    names = tuple(f"t{i}" for i in range(3 * rings)), tuple(f"p{j}" for j in range(3 * rings))
    return MarkedGraph(*names, pre, post, tokens)


def test_canonical_forms_are_byte_identical_to_the_two_run_path(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # Explicit nets at every level, with groups past 10^10 (the generators then come from a
    # second run) and a net without places.
    graphs = [build_net(ParameterSet(*t)) for t in ((4, 2, 2, 3), (1, 1, 1, 199), (3, 3, 2, 2))]
    graphs += [rings_net(15, True), rings_net(15, False), MarkedGraph(("t0",), (), (), (), ())]
    levels = [(True, False), (False, False), (True, True), (False, True)]

    def all_forms() -> list[canonical.CanonicalForm]:
        return [
            canonical_form(g, marked, typed, ("x",) * g.place_count if typed else None)
            for g in graphs
            for marked, typed in levels
        ]

    single = all_forms()
    monkeypatch.setattr(nautycall, "_ENGINE", None)
    monkeypatch.setattr(nautycall, "_STATUS", "two runs (forced by the test)")
    assert all_forms() == single  # text, fingerprint, group order and labelling


def test_missing_symbol_falls_back_with_one_line(
    monkeypatch: pytest.MonkeyPatch, caplog: pytest.LogCaptureFixture
) -> None:
    # A shared object without nauty() (ctypes' own extension module): the reason is logged
    # once and the forms are those of pynauty's two calls.
    from pynauty import nautywrap

    expected = forms(ParameterSet(4, 2, 2, 3))
    monkeypatch.setattr(nautywrap, "__file__", _ctypes.__file__)
    monkeypatch.setattr(nautycall, "_ENGINE", None)
    monkeypatch.setattr(nautycall, "_STATUS", None)
    with caplog.at_level(logging.INFO, logger="zoo.core.nautycall"):
        assert forms(ParameterSet(4, 2, 2, 3)) == expected
        status = nautycall.single_run_status()
    assert status.startswith("two nauty runs per form") and "undefined symbol: nauty" in status
    assert [r.getMessage() for r in caplog.records] == [status]
    assert nautycall.canonical_run(3, [0, 1], [1, 2], [{0, 1, 2}]).runs == 2


def test_cells_must_partition_the_vertices() -> None:
    with pytest.raises(ValueError, match="partition"):
        nautycall.canonical_run(3, [0], [1], [{0, 1}])
    with pytest.raises(ValueError, match="partition"):
        nautycall.canonical_run(3, [0], [1], [{0, 1}, {1, 2}])


def test_unknown_nauty_version_falls_back(monkeypatch: pytest.MonkeyPatch) -> None:
    # Structures of another nauty could crash it: the single run is not even tried.
    expected = forms(ParameterSet(3, 3, 2, 2))
    monkeypatch.setattr(pynauty, "_nauty_version", "nauty2_9_0")
    monkeypatch.setattr(nautycall, "_ENGINE", None)
    monkeypatch.setattr(nautycall, "_STATUS", None)
    assert forms(ParameterSet(3, 3, 2, 2)) == expected
    assert "pynauty ships nauty2_9_0" in nautycall.single_run_status()
