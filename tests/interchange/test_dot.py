"""The DOT writer (zoo.interchange.dot): every view parses, the legend names exactly the colours
drawn, positions are the shared page layout, and the text asks Graphviz for a fast rendering.

References: pydot, an independent parser of the Graphviz DOT grammar; the Graphviz attribute
documentation for ``pos`` ("x,y!" pins a node, in inches) and ``splines``; the marking of
C(4,2,2,3) in docs/theory/initial-marking.md and the reachability graph sizes of
docs/theory/check-values.md.
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pydot
import pytest

from zoo.core.net import build_net
from zoo.core.params import ParameterSet
from zoo.errors import LimitExceeded, ParameterError
from zoo.interchange.dot import INCHES, dot_document, picture_dot
from zoo.pictures import style
from zoo.pictures.layout import drawing_coordinates, ring_place_points, ring_positions

# pydot's parser calls pyparsing names that pyparsing 3 deprecates; not ours to fix.
pytestmark = pytest.mark.filterwarnings("ignore:.*deprecated - use:DeprecationWarning")

C4223 = ParameterSet(4, 2, 2, 3)
REGULAR = ParameterSet(3, 2, 6, 6)  # beta | delta: beta = 2 processes (docs/theory/processes.md)
COLOUR_ATTRIBUTES = ("color", "fillcolor", "fontcolor", "pencolor", "bgcolor")


def _parse(text: str) -> pydot.Dot:
    (graph,) = pydot.graph_from_dot_data(text)
    return graph


def _nodes(graph: pydot.Dot) -> list[pydot.Node]:
    found = [n for n in graph.get_nodes() if n.get_name() not in {"node", "edge", "graph"}]
    for cluster in graph.get_subgraphs():
        found += [n for n in cluster.get_nodes() if n.get_name() not in {"node", "edge", "graph"}]
    return found


def _colours_drawn(graph: pydot.Dot) -> set[str]:
    """Every colour attribute of the graph, its clusters, nodes and edges, as pydot read it."""
    elements: list[object] = [graph, *graph.get_subgraphs(), *_nodes(graph), *graph.get_edges()]
    elements += [n for n in graph.get_nodes() if n.get_name() in {"node", "edge", "graph"}]
    colours = set()
    for element in elements:
        attributes = element.get_attributes()  # type: ignore[attr-defined]
        for name in COLOUR_ATTRIBUTES:
            if name in attributes:
                colours.add(attributes[name].strip('"'))
    return colours


def _legend(text: str) -> dict[str, str]:
    return dict(re.findall(r"^// legend: (#[0-9a-f]{6}) (.+)$", text, flags=re.M))


def _all_views() -> list[tuple[ParameterSet, str]]:
    return [
        (C4223, "parallelogram"),
        (C4223, "net"),
        (REGULAR, "processes"),
        (ParameterSet(1, 11, 1, 11), "processes"),  # 11 processes: the colours repeat
        (C4223, "states"),
    ]


@pytest.mark.parametrize(("p", "view"), _all_views())
def test_legend_names_exactly_the_colours_drawn(p: ParameterSet, view: str) -> None:
    text = picture_dot(p, view)
    drawn = _colours_drawn(_parse(text))
    legend = _legend(text)
    assert drawn, "no colour drawn at all"
    assert drawn == set(legend), f"drawn {sorted(drawn)}, legend {sorted(legend)}"
    assert all(meaning.strip() for meaning in legend.values())


def test_legend_and_colours_are_the_pictures_colours() -> None:
    # The SVG/PNG views take their colours from zoo.pictures.style too: one table for both.
    legend = _legend(picture_dot(C4223, "parallelogram"))
    assert legend[style.FORWARD.colour] == style.FORWARD.meaning
    assert legend[style.BACKWARD.colour] == style.BACKWARD.meaning
    assert legend[style.TRANSITION.colour] == style.TRANSITION.meaning
    processes = _legend(picture_dot(REGULAR, "processes"))
    assert set(processes) == {
        style.PROCESS_COLOURS[0],
        style.PROCESS_COLOURS[1],
        style.RELEASE.colour,
    }


def test_dot_net_parses_with_the_right_nodes_and_arcs() -> None:
    text = picture_dot(C4223, "net")
    (graph,) = pydot.graph_from_dot_data(text)
    nodes = [n for n in graph.get_nodes() if n.get_name() not in {"node", "edge", "graph"}]
    assert len(nodes) == 3 * C4223.area  # A transitions and 2A places (docs/theory/folding.md)
    assert len(graph.get_edges()) == 4 * C4223.area
    marked = [n for n in nodes if n.get("tokens") == "1"]
    assert len(marked) == C4223.alpha + C4223.beta


def test_dot_parallelogram_pins_positions() -> None:
    (graph,) = pydot.graph_from_dot_data(picture_dot(C4223, "parallelogram"))
    pinned = [n for n in graph.get_nodes() if n.get("pos")]
    assert len(pinned) == 3 * C4223.area
    assert all(n.get("pos").strip('"').endswith("!") for n in pinned)


def test_dot_processes_has_one_cluster_per_process() -> None:
    p = ParameterSet(3, 2, 6, 6)  # regular, beta = 2 processes (docs/theory/processes.md)
    (graph,) = pydot.graph_from_dot_data(picture_dot(p, "processes"))
    clusters = graph.get_subgraphs()
    assert len(clusters) == p.beta
    assert sum(len(c.get_nodes()) for c in clusters) == p.area


def test_states_dot_matches_theory_table() -> None:
    # docs/theory/check-values.md table: C(4,2,2,3) has 40 states and 64 edges.
    (graph,) = pydot.graph_from_dot_data(picture_dot(C4223, "states"))
    nodes = [n for n in graph.get_nodes() if n.get_name() not in {"node", "edge", "graph"}]
    assert len(nodes) == 40
    assert len(graph.get_edges()) == 64


def _positions(graph: pydot.Dot) -> dict[str, tuple[float, float]]:
    at = {}
    for node in _nodes(graph):
        x, y = node.get("pos").strip('"').rstrip("!").split(",")
        at[node.get_name().strip('"')] = (float(x) / INCHES, float(y) / INCHES)
    return at


def test_positions_are_the_shared_page_layout() -> None:
    net = build_net(C4223)
    transitions, places = drawing_coordinates(net)
    at = _positions(_parse(dot_document(net)))
    for name, point in [
        *zip(net.transitions, transitions, strict=True),
        *zip(net.places, places, strict=True),
    ]:
        assert at[name] == pytest.approx(point, abs=1e-3)
    rings_at, rings = ring_positions(net)
    on_rings = _positions(_parse(picture_dot(C4223, "net")))
    for name, point in zip(net.transitions, rings_at, strict=True):
        assert on_rings[name] == pytest.approx(point, abs=1e-3)
    for name, point in zip(net.places, ring_place_points(net, rings_at, rings), strict=True):
        assert on_rings[name] == pytest.approx(point, abs=1e-3)


def test_graph_asks_for_straight_arcs() -> None:
    # Graphviz attribute docs: splines=false draws straight arcs, no routing around nodes.
    for p, view in _all_views():
        (attributes,) = [
            n.get_attributes()
            for n in _parse(picture_dot(p, view)).get_nodes()
            if n.get_name() == "graph"
        ]
        assert attributes["splines"] == "false"


def test_refusals_are_the_pictures_refusals() -> None:
    with pytest.raises(ParameterError, match="needs a regular cycloid"):
        picture_dot(C4223, "processes")
    with pytest.raises(ParameterError, match="unknown view"):
        picture_dot(C4223, "sideways")
    with pytest.raises(LimitExceeded, match="1,820 states, over the drawing limit"):
        picture_dot(ParameterSet(12, 4, 1, 1), "states")


@pytest.mark.skipif(shutil.which("neato") is None, reason="Graphviz is not installed")
@pytest.mark.parametrize(("p", "view"), _all_views()[:3])
def test_graphviz_renders_every_view(tmp_path: Path, p: ParameterSet, view: str) -> None:
    source = tmp_path / "net.dot"
    source.write_text(picture_dot(p, view))
    for program in ("neato", "dot"):
        done = subprocess.run([program, "-Tsvg", str(source)], capture_output=True, timeout=60)
        assert done.returncode == 0, done.stderr
        assert b"<svg" in done.stdout
