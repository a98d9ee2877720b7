"""The worked examples in examples/ run on a small catalog and agree with what the catalog
says through other paths (counts per area, explicit nets searched with networkx)."""

from __future__ import annotations

import math
import os
import subprocess
import sys
from pathlib import Path

import networkx as nx
import pytest

import zoo

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def _run(name: str, *args: str) -> str:
    env = {**os.environ, "PYTHONPATH": str(EXAMPLES.parent)}
    done = subprocess.run(
        [sys.executable, str(EXAMPLES / name), *args],
        capture_output=True,
        text=True,
        env=env,
        timeout=120,
    )
    assert done.returncode == 0, done.stderr
    assert "Traceback" not in done.stderr
    return done.stdout


def _shortest_cycle_in_transitions(graph: nx.DiGraph) -> int:
    """The shortest directed cycle of a net, counted in transitions, by networkx search."""
    best = None
    for node, data in graph.nodes(data=True):
        if data["kind"] != "transition":
            continue
        for successor in graph.successors(node):
            length = nx.shortest_path_length(graph, successor, node) + 1
            best = length if best is None else min(best, length)
    assert best is not None
    return best // 2


def test_classes_per_area_matches_the_stored_counts(small_catalog: str, tmp_path: Path) -> None:
    figure = tmp_path / "classes.pdf"
    out = _run("classes_per_area.py", "--db", small_catalog, "--plot", str(figure))
    rows = [line.split() for line in out.splitlines()[1:] if line.split()[0].isdigit()]
    with zoo.Catalog.open(small_catalog) as catalog:
        stats = {s.area: s.classes for s in catalog.stats()}
        for area, classes, regular in ((int(a), int(c), int(r)) for a, c, r in rows):
            assert classes == stats.get(area, 0)
            entries = catalog.find(f"area = {area}")
            explicit = sum(any(r.value("regular") for r in e.readings) for e in entries)
            assert regular == explicit
    assert len(rows) == 12
    assert figure.read_bytes().startswith(b"%PDF")


def test_shortest_loop_table_agrees_with_networkx(small_catalog: str) -> None:
    out = _run("shortest_loop.py", "--db", small_catalog)
    rows = [line.strip("|").split("|") for line in out.splitlines()[2:]]
    assert len(rows) == 11  # areas 2..12: no cycloid has area 1
    with zoo.Catalog.open(small_catalog) as catalog:
        for area, low, high, class_id in (
            (int(a), int(b), int(c), d.strip()) for a, b, c, d in rows
        ):
            entries = catalog.find(f"area = {area}")
            loops = [_shortest_cycle_in_transitions(e.to_networkx()) for e in entries]
            assert (low, high) == (min(loops), max(loops))
            assert _shortest_cycle_in_transitions(catalog.get(class_id).to_networkx()) == high


@pytest.mark.parametrize("cells", [3])
def test_ring_designs_name_the_class_of_their_cycloid(small_catalog: str, cells: int) -> None:
    out = _run("ring_designs.py", "--db", small_catalog, "--max-cells", str(cells))
    rows = [[c.strip() for c in line.strip("|").split("|")] for line in out.splitlines()[2:]]
    assert len(rows) == cells * cells * 4
    with zoo.Catalog.open(small_catalog) as catalog:
        for items, slots, model, cycloid, class_id in rows:
            p = zoo.parse_params(cycloid)
            # [TQ20]: a ring of C items and G slots is C(G, C, k, k), k the rounds after which
            # the named tokens are back in place (docs/theory/ring-designs.md)
            c, g = int(items), int(slots)
            fold = {"anonymous": 1, "individual items": c, "individual slots": g}.get(
                model, c * g // math.gcd(c, g)
            )
            assert (p.alpha, p.beta, p.gamma, p.delta) == (g, c, fold, fold)
            if p.area <= 12:
                assert class_id == catalog.get(cycloid).id
            else:
                assert class_id == "(beyond the catalog)"
