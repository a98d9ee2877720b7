"""The direct SVG writer (zoo.pictures.svg): well-formed SVG that draws the whole scene.

References: XML parsing by defusedxml (an independent reader), matplotlib's SVG of the same scene
(zoo.pictures.render_matplotlib, a second renderer: both must name the same markers), the number
of transitions A = alpha*delta + beta*gamma and places 2A of C(alpha,beta,gamma,delta) (Valk,
"Petri's cycloids"), the reachable state count A*C(alpha+beta, alpha)/(alpha+beta)
(docs/theory/state-counts.md), and the lattice vectors P = (alpha, -beta), R = (gamma, delta)
drawn by the convention of docs/theory/petri-space.md "Drawing" (a rotation and scaling of the
Petri space, so lengths keep their ratio and angles their size).
"""

from __future__ import annotations

import math
import re
from collections import Counter
from typing import Any

import pytest
from defusedxml import ElementTree

from zoo.core.params import ParameterSet
from zoo.pictures import style
from zoo.pictures.render_matplotlib import render
from zoo.pictures.svg import svg_document, text_width
from zoo.pictures.views import picture_scene

SVG = "{http://www.w3.org/2000/svg}"
CASES = [
    (ParameterSet(4, 2, 2, 3), "parallelogram"),
    (ParameterSet(4, 2, 2, 3), "net"),
    (ParameterSet(3, 2, 6, 6), "processes"),
    (ParameterSet(4, 2, 2, 3), "states"),
    (ParameterSet(4, 3, 5, 19), "parallelogram"),  # area 91: no labels, a large page
    (ParameterSet(3, 3, 3, 30), "net"),
]


def _ids(root: Any) -> Counter[str]:
    """Element ids by prefix (``transition-t_0_0`` counts as ``transition``)."""
    found: Counter[str] = Counter()
    for element in root.iter():
        ident = element.get("id", "")
        if "-" in ident:
            found[ident.split("-", 1)[0]] += 1
    return found


def _full_ids(root: Any) -> set[str]:
    return {e.get("id") for e in root.iter() if e.get("id")}


def _colours(text: str) -> set[str]:
    return {c.lower() for c in re.findall(r"#[0-9a-fA-F]{6}\b", text)}


@pytest.mark.parametrize(("p", "view"), CASES, ids=lambda c: str(c))
def test_svg_parses_and_counts_every_node(p: ParameterSet, view: str) -> None:
    scene = picture_scene(p, view)
    text = svg_document(scene)
    root = ElementTree.fromstring(text)
    assert root.tag == f"{SVG}svg"
    ids = _ids(root)
    if view != "states":
        assert ids["transition"] == p.area
        assert ids["place"] == 2 * p.area
        assert ids["token"] > 0
    else:
        count = p.area * math.comb(p.alpha + p.beta, p.alpha) // (p.alpha + p.beta)
        assert ids["state"] == count
    # The second renderer names exactly the same markers.
    reference = ElementTree.fromstring(render(scene, "svg"))
    markers = {i for i in _full_ids(reference) if i.split("-", 1)[0] in ids}
    assert {i for i in _full_ids(root) if i.split("-", 1)[0] in ids} >= markers


@pytest.mark.parametrize(("p", "view"), CASES, ids=lambda c: str(c))
def test_svg_uses_the_colours_of_the_scene(p: ParameterSet, view: str) -> None:
    scene = picture_scene(p, view)
    used = _colours(svg_document(scene)) - {"#ffffff"}
    palette = (
        {ink.colour for ink in vars(style).values() if isinstance(ink, style.Ink)}
        | set(style.PROCESS_COLOURS)
        | {style.LABEL, style.FAINT_LABEL, "#000000"}
    )
    assert used <= palette
    assert used == {c.lower() for c in scene.colours()} - {"#ffffff"} | (
        {"#000000"} if scene.legend or scene.side_text else set()  # legend and side text
    )


def test_every_element_lies_inside_the_view_box() -> None:
    root = ElementTree.fromstring(svg_document(picture_scene(ParameterSet(4, 3, 5, 19), "net")))
    left, top, width, height = (float(v) for v in root.get("viewBox").split())
    for element in root.iter(f"{SVG}rect"):
        x, y = float(element.get("x")), float(element.get("y"))
        assert left <= x <= left + width and top <= y <= top + height
    for element in root.iter(f"{SVG}circle"):
        x, y = float(element.get("cx")), float(element.get("cy"))
        assert left <= x <= left + width and top <= y <= top + height


def _lattice_arrows(root: Any) -> list[tuple[tuple[float, float], tuple[float, float]]]:
    """(start, tip) of each lattice-vector arrow: its line starts at O, its head's first
    corner is the tip."""
    found = []
    for group in root.iter(f"{SVG}g"):
        if group.get("stroke") != style.LATTICE_VECTOR.colour:
            continue
        line, head = list(group)
        start = tuple(float(v) for v in line.get("d")[1:].split("L")[0].split(","))
        tip = tuple(float(v) for v in head.get("d")[1:].split("L")[0].split(","))
        found.append((start, tip))
    return found


@pytest.mark.parametrize("p", [ParameterSet(4, 2, 2, 3), ParameterSet(3, 1, 2, 5)], ids=str)
def test_lattice_vectors_keep_their_lengths_and_angle(p: ParameterSet) -> None:
    root = ElementTree.fromstring(svg_document(picture_scene(p, "parallelogram")))
    (o1, tip_p), (o2, tip_r) = _lattice_arrows(root)
    assert o1 == o2  # both start at O
    vp = (tip_p[0] - o1[0], -(tip_p[1] - o1[1]))  # SVG y points down
    vr = (tip_r[0] - o1[0], -(tip_r[1] - o1[1]))
    length_p, length_r = math.hypot(*vp), math.hypot(*vr)
    assert length_p / length_r == pytest.approx(
        math.hypot(p.alpha, p.beta) / math.hypot(p.gamma, p.delta), rel=2e-3
    )
    cosine = (vp[0] * vr[0] + vp[1] * vr[1]) / (length_p * length_r)
    expected = (p.alpha * p.gamma - p.beta * p.delta) / (
        math.hypot(p.alpha, p.beta) * math.hypot(p.gamma, p.delta)
    )
    assert cosine == pytest.approx(expected, abs=2e-3)
    # Time up: R (gamma, delta > 0) points up the page, P to the right.
    assert vr[1] > 0 and vp[0] > 0


def test_text_is_escaped_and_kept() -> None:
    scene = picture_scene(ParameterSet(4, 2, 2, 3), "parallelogram")
    scene.label('a < b & "c"', (0.0, 0.0), 8.0)
    root = ElementTree.fromstring(svg_document(scene))
    texts = ["".join(t.itertext()) for t in root.iter(f"{SVG}text")]
    assert 'a < b & "c"' in texts
    assert any(t.startswith("\u2261 t_") for t in texts)  # the folded copies' names


def test_text_width_grows_with_text_and_size() -> None:
    assert text_width("mmmm", 10) > text_width("iiii", 10) > 0
    assert text_width("abc", 20) == pytest.approx(2 * text_width("abc", 10))
    assert text_width("abcd", 10, monospace=True) == pytest.approx(4 * 6.02)


def test_svg_is_deterministic() -> None:
    p = ParameterSet(4, 2, 2, 3)
    assert svg_document(picture_scene(p, "net")) == svg_document(picture_scene(p, "net"))
