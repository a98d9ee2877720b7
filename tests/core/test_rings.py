"""Ring designs against an independent cell-by-cell simulation of the ring (zoo.core.rings).

The reference is the simulator itself (a ring of C + G cells, an item steps into the free cell
ahead), which knows nothing of cycloids, and networkx's graph isomorphism (VF2): for every small
ring the simulated state graph must be isomorphic to the reachability graph of the cycloid that
zoo.core.rings assigns (docs/theory/ring-designs.md mapping, [TQ20] for the statement that such
queues are
cycloids).
"""

from __future__ import annotations

import json
from math import comb
from pathlib import Path

import networkx as nx
import pytest
from typer.testing import CliRunner

from zoo.cli import app
from zoo.core.invariants import minimal_cycle_length, reachable_state_count
from zoo.core.rings import (
    RingDesign,
    cycloid_state_graph,
    describe_ring,
    format_ring_state,
    initial_ring_state,
    iter_ring_moves,
    ring_state_graph,
    simulation_report,
)
from zoo.errors import LimitExceeded, ParameterError

MODELS = [(False, False), (True, False), (False, True), (True, True)]
MODEL_IDS = ["anonymous", "items", "slots", "both"]

# Every ring with c, g <= 4 and c + g <= 7 (the range of docs/theory/ring-designs.md's
# verification).
SMALL_RINGS = [(c, g) for c in range(1, 5) for g in range(1, 5) if c + g <= 7]


@pytest.mark.parametrize(("named_items", "named_slots"), MODELS, ids=MODEL_IDS)
def test_simulated_ring_is_isomorphic_to_its_cycloid(named_items: bool, named_slots: bool) -> None:
    for c, g in SMALL_RINGS:
        design = RingDesign(c, g, named_items, named_slots)
        simulated = ring_state_graph(design)
        cycloid = cycloid_state_graph(design)
        assert simulated.number_of_nodes() == cycloid.number_of_nodes(), design
        assert simulated.number_of_edges() == cycloid.number_of_edges(), design
        assert nx.is_isomorphic(simulated, cycloid), f"{design}: {design.params}"


def test_a_wrong_cycloid_of_the_same_size_is_told_apart() -> None:
    """The check has teeth: C(3,3,1,5) has as many states and arcs as the ring's C(3,3,3,3)
    (both A = 18, alpha = beta = 3) but is another system (docs/theory/synthesis.md, (18, 6, 3)
    row)."""
    from zoo.core.net import build_net
    from zoo.core.params import ParameterSet
    from zoo.core.reachability import reachability_graph, reachability_to_networkx

    simulated = ring_state_graph(RingDesign(3, 3, individual_items=True))
    rival = reachability_to_networkx(reachability_graph(build_net(ParameterSet(3, 3, 1, 5))))
    assert simulated.number_of_nodes() == rival.number_of_nodes() == 60
    assert simulated.number_of_edges() == rival.number_of_edges()
    assert not nx.is_isomorphic(simulated, rival)


# docs/theory/ring-designs.md, table "c | g | anonymous A/cyc/RG | ind. cars ... | ind. gaps ... |
# both",
# [VERIFIED] there by simulator-against-cycloid isomorphism. Items are cars, slots are gaps.
THEORY_TABLE = {
    (1, 1): [(2, 2, 2), (2, 2, 2), (2, 2, 2), (2, 2, 2)],
    (1, 2): [(3, 2, 3), (3, 2, 3), (6, 3, 6), (6, 3, 6)],
    (2, 1): [(3, 2, 3), (6, 3, 6), (3, 2, 3), (6, 3, 6)],
    (2, 2): [(4, 2, 6), (8, 4, 12), (8, 4, 12), (8, 4, 12)],
    (2, 3): [(5, 2, 10), (10, 4, 20), (15, 5, 30), (30, 10, 60)],
    (3, 2): [(5, 2, 10), (15, 5, 30), (10, 4, 20), (30, 10, 60)],
    (2, 4): [(6, 2, 15), (12, 4, 30), (24, 6, 60), (24, 6, 60)],
    (3, 3): [(6, 2, 20), (18, 6, 60), (18, 6, 60), (18, 6, 60)],
    (4, 12): [(16, 2, 1820), (64, 8, 7280), (192, 16, 21840), (192, 16, 21840)],
}


@pytest.mark.parametrize("ring", sorted(THEORY_TABLE), ids=lambda r: f"c{r[0]}g{r[1]}")
def test_theory_table_rows(ring: tuple[int, int]) -> None:
    c, g = ring
    for (named_items, named_slots), (area, loop, states) in zip(
        MODELS, THEORY_TABLE[ring], strict=True
    ):
        design = RingDesign(c, g, named_items, named_slots)
        p = design.params
        assert p.area == area, design
        assert minimal_cycle_length(p) == loop, design
        assert reachable_state_count(p) == states, design
        # The simulation agrees with the table, without any formula.
        assert ring_state_graph(design).number_of_nodes() == states, design


def test_theory_mapping_rows() -> None:
    """docs/theory/ring-designs.md first table: C(g,c,1,1), C(g,c,c,c), C(g,c,g,g), C(g,c,l,l), l =
    lcm."""
    assert str(RingDesign(3, 2).params) == "C(2,3,1,1)"
    assert str(RingDesign(3, 2, individual_items=True).params) == "C(2,3,3,3)"
    assert str(RingDesign(3, 2, individual_slots=True).params) == "C(2,3,2,2)"
    assert str(RingDesign(4, 6, True, True).params) == "C(6,4,12,12)"


def test_anonymous_ring_states_are_the_subsets_of_cells() -> None:
    # Anonymous items on N cells can be anywhere: C(N, c) states (common practice: every
    # subset of cells is reachable because any arrangement rotates into any other).
    for c, g in SMALL_RINGS:
        assert ring_state_graph(RingDesign(c, g)).number_of_nodes() == comb(c + g, c)


def test_moves_and_initial_state() -> None:
    design = RingDesign(2, 2, individual_items=True)
    start = initial_ring_state(design)
    assert format_ring_state(start) == "I0 I1 _ _"
    moves = list(iter_ring_moves(start))
    assert [(cell, format_ring_state(after)) for cell, after in moves] == [(1, "I0 _ I1 _")]
    # An item in the last cell steps into cell 0 when it is free (the ring closes).
    state = (("slot", None), ("item", None))
    assert [format_ring_state(after) for _, after in iter_ring_moves(state)] == ["I _"]


def test_every_state_is_reached_and_left() -> None:
    """A ring never deadlocks and can always come back (live and reversible,
    docs/theory/cycles-and-tokens.md)."""
    graph = ring_state_graph(RingDesign(3, 2, True, True))
    assert nx.is_strongly_connected(graph)
    assert all(graph.out_degree(node) >= 1 for node in graph)


def test_bad_designs_are_refused() -> None:
    with pytest.raises(ParameterError, match="at least one of its items"):
        RingDesign(0, 3)
    with pytest.raises(ParameterError, match="slots"):
        RingDesign(2, -1)
    with pytest.raises(ParameterError, match="over the limit"):
        RingDesign(5000, 5001, True, True)
    with pytest.raises(LimitExceeded, match="more than 10 states"):
        ring_state_graph(RingDesign(3, 3), max_states=10)


def test_describe_ring_fields() -> None:
    report = describe_ring(RingDesign(2, 3, individual_items=True), None)
    assert report["params"] == "C(3,2,2,2)"
    # docs/theory/ring-designs.md table, row 2/3
    assert report["area"] == 10 and report["states"] == 20
    assert report["class_id"] is None
    assert report["invariants"]["loop"] == 4
    assert report["invariants"]["label"] == "C(3,2,2,2)"


def test_simulation_report() -> None:
    report = simulation_report(RingDesign(2, 2, True, True))
    assert report == {
        "states": 12,
        "moves": 16,
        "cycloid_states": 12,
        "cycloid_arcs": 16,
        "isomorphic": True,
    }


# --- command line ------------------------------------------------------------------------


def test_cli_ring_json_with_catalog(small_catalog: str) -> None:
    from zoo.catalog.service import Catalog

    result = CliRunner().invoke(
        app,
        [
            "ring",
            "--items",
            "2",
            "--slots",
            "2",
            "--individual-items",
            "--format",
            "json",
            "--db",
            small_catalog,
        ],
    )
    assert result.exit_code == 0, result.output
    report = json.loads(result.stdout)
    assert report["params"] == "C(2,2,2,2)" and report["area"] == 8 and report["states"] == 12
    with Catalog.open(small_catalog) as catalog:
        assert report["class_id"] == catalog.get("C(2,2,2,2)").id
    assert report["invariants"]["id"] == report["class_id"]


def test_cli_ring_never_builds_a_catalog(tmp_path: Path) -> None:
    missing = tmp_path / "none.sqlite3"
    result = CliRunner().invoke(
        app, ["ring", "-c", "4", "-g", "12", "--format", "json", "--db", str(missing)]
    )
    assert result.exit_code == 0, result.output
    report = json.loads(result.stdout)
    assert report["class_id"] is None and report["states"] == 1820
    assert not missing.exists()


def test_cli_ring_simulate_table() -> None:
    result = CliRunner().invoke(
        app, ["ring", "-c", "3", "-g", "2", "--individual-slots", "--simulate"]
    )
    assert result.exit_code == 0, result.output
    assert "C(2,3,2,2)" in result.stdout
    assert "isomorphic" in result.stdout and "NOT" not in result.stdout


def test_cli_ring_error_is_one_line() -> None:
    result = CliRunner().invoke(app, ["ring", "--items", "0", "--slots", "2"])
    assert result.exit_code == 1
    assert result.stderr.startswith("Error: a ring needs at least one of its items")
    assert len(result.stderr.strip().splitlines()) == 1


def test_describe_ring_with_simulation_is_the_simulation_report() -> None:
    design = RingDesign(2, 2, True, True)
    report = describe_ring(design, None, simulate_states=1000)
    assert report["simulation"] == simulation_report(design, 1000)
    assert "simulation" not in describe_ring(design, None)
