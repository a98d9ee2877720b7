"""Pictures (zoo.pictures.views): they are produced, parse as PNG/SVG/DOT, and show the right
things.

References: the PNG signature (PNG specification, ISO/IEC 15948 §5.2), XML parsing of SVG
(defusedxml), DOT parsing by pydot (an independent parser of the Graphviz DOT grammar), the
marking of C(4,2,2,3) listed in docs/theory/initial-marking.md [VERIFIED], the reachability graph
sizes of
docs/theory/check-values.md [VERIFIED] and the drawing convention of docs/theory/petri-space.md
"Drawing".
"""

from __future__ import annotations

import math
import re
from collections import Counter
from pathlib import Path

import pydot
import pytest
from defusedxml import ElementTree
from typer.testing import CliRunner

from zoo.catalog.build import build_catalog
from zoo.cli import app
from zoo.core.algebra import representative
from zoo.core.params import ParameterSet
from zoo.errors import LimitExceeded, ParameterError
from zoo.pictures.views import (
    draw,
    draw_net_svg,
    net_picture,
    parallelogram_arcs,
    parallelogram_corners,
    petri_to_page,
    state_graph,
)

# pydot's parser calls pyparsing names that pyparsing 3 deprecates; not ours to fix.
pytestmark = pytest.mark.filterwarnings("ignore:.*deprecated - use:DeprecationWarning")

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"  # PNG specification §5.2
SVG_NS = "{http://www.w3.org/2000/svg}"
C4223 = ParameterSet(4, 2, 2, 3)


def _svg_ids(svg: bytes) -> Counter[str]:
    """Count element ids of the SVG by their prefix (transition-, place-, token-, state-)."""
    root = ElementTree.fromstring(svg)
    assert root.tag == f"{SVG_NS}svg"
    found: Counter[str] = Counter()
    for element in root.iter():
        ident = element.get("id", "")
        if "-" in ident:
            found[ident.split("-", 1)[0]] += 1
    return found


def _svg_id_set(svg: bytes, prefix: str) -> set[str]:
    root = ElementTree.fromstring(svg)
    return {
        e.get("id", "")[len(prefix) + 1 :]
        for e in root.iter()
        if e.get("id", "").startswith(prefix + "-")
    }


@pytest.mark.parametrize("view", ["parallelogram", "net", "processes"])
def test_svg_has_one_marker_per_node(view: str) -> None:
    p = ParameterSet(3, 2, 6, 6) if view == "processes" else C4223  # regular for processes
    ids = _svg_ids(draw(p, view, "svg"))
    assert ids["transition"] == p.area
    assert ids["place"] == 2 * p.area
    # docs/theory/initial-marking.md: beta cars and alpha gaps
    assert ids["token"] == p.alpha + p.beta


@pytest.mark.parametrize("view", ["parallelogram", "net", "processes", "states"])
def test_png_signature(view: str) -> None:
    p = ParameterSet(2, 3, 3, 3) if view == "processes" else ParameterSet(2, 2, 1, 3)
    data = draw(p, view, "png")
    assert data.startswith(PNG_SIGNATURE)
    assert len(data) > 5_000  # a real picture, not an empty canvas


def test_marked_places_of_the_worked_example() -> None:
    """docs/theory/initial-marking.md, C(4,2,2,3): the marked forward places are the forward inputs
    of t_{1,0}
    and t_{3,-1}; the marked backward places the backward inputs of t_{1,0}, t_{2,0},
    t_{3,-1}, t_{4,-1}. A place is named after its input transition's representative."""

    def forward_input(xi: int, eta: int) -> str:
        a, b = representative(C4223, (xi - 1, eta))
        return f"f_{a}_{b}"

    def backward_input(xi: int, eta: int) -> str:
        a, b = representative(C4223, (xi, eta - 1))
        return f"b_{a}_{b}"

    expected = {forward_input(1, 0), forward_input(3, -1)} | {
        backward_input(*t) for t in [(1, 0), (2, 0), (3, -1), (4, -1)]
    }
    svg = draw(C4223, "parallelogram", "svg")
    assert _svg_id_set(svg, "token") == expected
    assert len(_svg_id_set(svg, "transition")) == 16


def test_parallelogram_geometry_follows_the_drawing_convention() -> None:
    """docs/theory/petri-space.md "Drawing": time up; forward arcs to the upper right, backward arcs
    to the
    upper left; the page position is (xi - eta, xi + eta)."""
    net = net_picture(C4223)
    for arc in parallelogram_arcs(net):
        sx, sy = petri_to_page(arc.source)
        tx, ty = petri_to_page(arc.target)
        assert ty > sy  # time goes up
        if net.kinds[arc.place] == "forward":
            assert tx > sx
        else:
            assert tx < sx
        # A folded arc's dashed copy stands for the transition the place really leads to.
        assert representative(C4223, arc.target) == net.coordinates[net.post[arc.place]]
        assert arc.folded == (arc.target != net.coordinates[net.post[arc.place]])
    # docs/theory/folding.md: O, P, Q = P + R, R.
    assert parallelogram_corners(C4223) == ((0, 0), (4, -2), (6, 1), (2, 3))


def test_states_view_matches_theory_table() -> None:
    # docs/theory/check-values.md table: C(4,2,2,3) has 40 states and 64 edges.
    # The DOT text of this view: tests/interchange/test_dot.py.
    assert _svg_ids(draw(C4223, "states", "svg"))["state"] == 40
    _, states = state_graph(C4223)
    assert len(states.states[0]) == C4223.alpha + C4223.beta  # M0 has alpha + beta tokens


def test_limits_and_bad_requests() -> None:
    # docs/theory/check-values.md: C(12,4,1,1) has 1820 states, over the drawing limit.
    with pytest.raises(LimitExceeded, match="1,820 states, over the drawing limit"):
        draw(ParameterSet(12, 4, 1, 1), "states", "svg")
    with pytest.raises(ParameterError, match="needs a regular cycloid"):
        draw(C4223, "processes", "svg")
    with pytest.raises(ParameterError, match="unknown view"):
        draw(C4223, "sideways", "svg")
    with pytest.raises(ParameterError, match="unknown picture format"):
        draw(C4223, "net", "gif")
    with pytest.raises(LimitExceeded, match="drawing limit"):
        draw(ParameterSet(1, 1, 300, 300), "net", "svg")


def test_draw_net_svg_for_export() -> None:
    text = draw_net_svg(C4223)
    assert text.lstrip().startswith("<?xml")
    assert _svg_ids(text.encode())["transition"] == 16


def test_svg_is_deterministic() -> None:
    assert draw(C4223, "net", "svg") == draw(C4223, "net", "svg")


# --- command line ------------------------------------------------------------------------


def test_cli_draw_png_file(tmp_path: Path) -> None:
    out = tmp_path / "c4223.png"
    result = CliRunner().invoke(app, ["draw", "4,2,2,3", "--output", str(out)])
    assert result.exit_code == 0, result.output
    assert out.read_bytes().startswith(PNG_SIGNATURE)  # format taken from the suffix


def test_cli_draw_dot_to_stdout() -> None:
    result = CliRunner().invoke(app, ["draw", "C(2,2,1,3)", "--format", "dot", "--view", "net"])
    assert result.exit_code == 0, result.output
    (graph,) = pydot.graph_from_dot_data(result.stdout)
    assert len(graph.get_edges()) == 32


def test_cli_draw_refuses_png_to_terminal() -> None:
    result = CliRunner().invoke(app, ["draw", "4,2,2,3", "--format", "png"])
    assert result.exit_code == 1
    assert result.stderr.startswith("Error: a PNG picture is binary")


def test_cli_draw_error_keeps_existing_file(tmp_path: Path) -> None:
    out = tmp_path / "keep.svg"
    out.write_text("old picture")
    result = CliRunner().invoke(app, ["draw", "4,2,2,3", "--view", "processes", "-o", str(out)])
    assert result.exit_code == 1
    assert "needs a regular cycloid" in result.stderr
    assert out.read_text() == "old picture"


def test_cli_draw_catalog_identifier(tmp_path: Path) -> None:
    from zoo.catalog.service import Catalog

    db = tmp_path / "catalog.sqlite3"
    with Catalog.open(str(db), create=True) as catalog:
        build_catalog(catalog, 8)
        entry = catalog.get("C(2,2,1,3)")
    out = tmp_path / "entry.svg"
    result = CliRunner().invoke(app, ["draw", entry.id, "--db", str(db), "-o", str(out)])
    assert result.exit_code == 0, result.output
    assert _svg_ids(out.read_bytes())["transition"] == 8


def test_large_net_png_stays_near_2000_pixels_with_a_readable_title() -> None:
    """C(7,5,6,8), A = 7*8 + 5*6 = 86 (docs/theory/folding.md): PNG is capped, not 4000 px wide."""
    import io

    from PIL import Image

    from zoo.pictures.views import LARGEST_INCHES, PNG_DPI

    image = Image.open(io.BytesIO(draw(ParameterSet(7, 5, 6, 8), "net", "png")))
    assert max(image.size) <= 2000  # LARGEST_INCHES * PNG_DPI, plus the title and the pad
    assert LARGEST_INCHES * PNG_DPI < 2000
    assert max(image.size) >= 1500  # still large enough to show 172 places
    svg = draw(ParameterSet(7, 5, 6, 8), "net", "svg").decode()
    title = re.search(r"font-size: ([\d.]+)px[^>]*>C\(7,5,6,8\): the net", svg)
    assert title is not None and float(title.group(1)) >= 14


def test_backward_places_stay_clear_of_the_chord_envelope() -> None:
    """One ring (gcd(5, 8) = 1 process, docs/theory/processes.md): every backward chord skips the
    same
    number of transitions, so all chords touch one inner circle at their midpoints; no
    backward place may sit on that circle, where the chords pile up."""
    from zoo.pictures.views import net_picture, ring_place_points, ring_positions

    net = net_picture(ParameterSet(7, 5, 6, 8))
    positions, _rings = ring_positions(net)
    outer = math.hypot(*positions[0])
    chords = [
        (positions[net.pre[i]], positions[net.post[i]])
        for i, kind in enumerate(net.kinds)
        if kind == "backward"
    ]
    envelope = min(math.hypot((a[0] + b[0]) / 2, (a[1] + b[1]) / 2) for a, b in chords)
    places = ring_place_points(net)
    backward = [places[i] for i, kind in enumerate(net.kinds) if kind == "backward"]
    assert len(backward) == net.params.area  # one backward place per transition
    for point in backward:
        assert math.hypot(*point) > envelope + 0.1 * (outer - envelope)
    svg = draw(ParameterSet(7, 5, 6, 8), "net", "svg").decode()
    assert svg.count('id="place-') == len(net.places)
    assert svg.count('id="token-') == sum(1 for k in net.tokens if k)


def test_state_arc_labels_of_crossing_arcs_do_not_coincide() -> None:
    """C(3,2,2,2): 20 states, 30 arcs (docs/theory/state-counts.md formula); some arcs cross between
    two
    layers, and their labels must not land on the same spot."""
    svg = draw(ParameterSet(3, 2, 2, 2), "states", "svg").decode()
    spots = [
        (float(x), float(y))
        for x, y in re.findall(r'x="([\d.]+)" y="([\d.]+)"[^>]*>t_[^<]*</text>', svg)
    ]
    assert len(spots) >= 20
    for i, (x1, y1) in enumerate(spots):
        for x2, y2 in spots[i + 1 :]:
            assert math.hypot(x1 - x2, y1 - y2) > 10, (x1, y1)


# --- legends, markings and return arcs (one scene for every format) -------------------------


@pytest.mark.parametrize(
    ("view", "p"),
    [
        ("parallelogram", C4223),
        ("net", C4223),
        ("net", ParameterSet(1, 2, 1, 2)),
        ("processes", ParameterSet(3, 2, 6, 6)),
        ("states", ParameterSet(2, 2, 1, 3)),
    ],
)
def test_legend_explains_every_colour_and_line_style(view: str, p: ParameterSet) -> None:
    from zoo.pictures.views import picture_scene

    scene = picture_scene(p, view)
    keys = {(key.colour, key.glyph) for key in scene.legend}
    for arc in scene.arcs:
        assert (arc.colour, "dashed" if arc.dashed else "line") in keys, arc
    explained = {key.colour for key in scene.legend} | {key.face for key in scene.legend}
    for group in scene.nodes:
        for colour in (*group.faces, *group.edges):
            assert colour in explained or colour == "#ffffff", (group.gid, colour)


def test_states_view_lists_each_marking() -> None:
    """C(2,2,1,3): A * C(alpha+beta, alpha)/(alpha+beta) = 8 * 6 / 4 = 12 markings
    (docs/theory/state-counts.md), each with alpha + beta = 4 tokens
    (docs/theory/initial-marking.md), all different; M0 is the initial marking."""
    from zoo.pictures.views import picture_scene

    p = ParameterSet(2, 2, 1, 3)
    net = net_picture(p)
    scene = picture_scene(p, "states")
    assert len(scene.side_text) == 12
    markings = []
    for i, line in enumerate(scene.side_text):
        name, *places = line.split()
        assert name == f"M{i}"
        assert len(places) == p.alpha + p.beta
        assert set(places) <= set(net.places)
        markings.append(frozenset(places))
    assert len(set(markings)) == 12
    assert markings[0] == {net.places[j] for j, k in enumerate(net.tokens) if k}
    svg = draw(p, "states", "svg").decode()
    assert "M11" in svg and scene.side_text[11].split()[1] in svg


def test_states_view_return_arcs_do_not_converge_on_one_point() -> None:
    """Arcs back to earlier layers run outside the layered graph and reach their target at
    different points: no two arrow tips coincide."""
    from zoo.pictures.views import picture_scene

    for p in (ParameterSet(2, 2, 1, 3), ParameterSet(2, 3, 1, 2), ParameterSet(3, 2, 2, 1)):
        scene = picture_scene(p, "states")
        states = next(group for group in scene.nodes if group.gid == "states")
        left = min(x for x, _ in states.points)
        right = max(x for x, _ in states.points)
        back = [arc for arc in scene.arcs if arc.dashed]
        assert back
        tips = [(round(a.path[-1][0], 3), round(a.path[-1][1], 3)) for a in back]
        assert len(set(tips)) == len(tips), p
        for arc in back:
            assert any(x < left or x > right for x, _ in arc.path), p


def test_export_svg_draws_the_parallelogram() -> None:
    from zoo.interchange.export import export_document

    svg = export_document(C4223, "svg").encode()
    root = ElementTree.fromstring(svg)
    assert any(e.get("id") == "parallelogram" for e in root.iter())
    result = CliRunner().invoke(app, ["export", "--help"])
    assert "parallelogram" in " ".join(result.output.split())
