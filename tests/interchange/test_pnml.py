"""PNML export and import (zoo.interchange.pnml), and the DOT and JSON net exports.

The exported documents are checked against the structure of the PT-net grammar of
ISO/IEC 15909-2 (PNML), written out below as an independent checker: root ``pnml`` in the
PNML namespace, ``net[@id,@type]`` with ``page`` children, pages holding ``place``,
``transition``, ``arc`` (and nested pages), labels ``name/text``, ``initialMarking/text``,
``inscription/text``, node graphics ``graphics/position[@x,@y]``, arc ``source``/``target``
referring to node ids, and ids unique in the document.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import xml.etree.ElementTree as ET
from pathlib import Path

import networkx as nx
import pytest

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core.net import build_net, to_networkx
from zoo.core.params import ParameterSet
from zoo.errors import FormatError
from zoo.interchange.dot import dot_document
from zoo.interchange.netjson import json_document
from zoo.interchange.pnml import (
    GRID,
    PNML_NAMESPACE,
    PTNET_TYPE,
    parse_pnml,
    pnml_document,
    read_pnml,
)
from zoo.pictures.layout import drawing_coordinates

DATA = Path(__file__).parents[1] / "data" / "pnml"
NS = "{" + PNML_NAMESPACE + "}"

# ISO/IEC 15909-2, PT-net type: which child elements each element may have. Labels not
# listed for an element are not part of the PT-net grammar for it. ``toolspecific`` may appear
# on nets, pages, nodes and arcs and hold anything (the standard leaves its content open).
_ALLOWED_CHILDREN = {
    "pnml": {"net"},
    "net": {"name", "page", "toolspecific"},
    "page": {
        "name",
        "page",
        "place",
        "transition",
        "arc",
        "referencePlace",
        "referenceTransition",
        "graphics",
        "toolspecific",
    },
    "place": {"name", "initialMarking", "graphics", "toolspecific"},
    "transition": {"name", "graphics", "toolspecific"},
    "arc": {"name", "inscription", "graphics", "toolspecific"},
    "name": {"text", "graphics", "toolspecific"},
    "initialMarking": {"text", "graphics", "toolspecific"},
    "inscription": {"text", "graphics", "toolspecific"},
    "graphics": {"position", "dimension", "fill", "line", "offset"},
}


def check_pnml_structure(document: str) -> dict[str, str]:
    """Raise AssertionError unless ``document`` follows the PT-net grammar; return id -> kind."""
    root = ET.fromstring(document)
    assert root.tag == NS + "pnml", root.tag
    kinds: dict[str, str] = {}
    arcs: list[ET.Element] = []

    def local(element: ET.Element) -> str:
        assert element.tag.startswith(NS), f"element {element.tag} outside the PNML namespace"
        return element.tag[len(NS) :]

    def walk(element: ET.Element) -> None:
        name = local(element)
        if name == "toolspecific":
            assert element.get("tool") and element.get("version"), "toolspecific attributes"
            return  # content is tool-defined
        allowed = _ALLOWED_CHILDREN.get(name, set())
        for child in element:
            child_name = local(child)
            assert child_name in allowed, f"<{child_name}> not allowed inside <{name}>"
            walk(child)
        if name in ("net", "page", "place", "transition", "arc"):
            element_id = element.get("id")
            assert element_id, f"<{name}> without id"
            assert re.fullmatch(r"[A-Za-z_][A-Za-z0-9_.\-]*", element_id), element_id  # xs:ID
            assert element_id not in kinds, f"id {element_id} used twice"
            kinds[element_id] = name
        if name == "net":
            assert element.get("type") == PTNET_TYPE
            assert element.findall(NS + "page"), "a net needs at least one page"
        if name in ("name", "initialMarking", "inscription"):
            texts = element.findall(NS + "text")
            assert len(texts) == 1, f"<{name}> needs exactly one <text>"
            if name == "initialMarking":
                assert re.fullmatch(r"\d+", texts[0].text or ""), "marking is a natural number"
            if name == "inscription":
                assert re.fullmatch(r"[1-9]\d*", texts[0].text or ""), "inscription is positive"
        if name == "graphics":
            positions = element.findall(NS + "position")
            assert len(positions) <= 1
            for position in positions:
                float(position.get("x", "x"))  # decimals, both present
                float(position.get("y", "y"))
        if name == "arc":
            arcs.append(element)
        for label in ("name", "initialMarking", "inscription", "graphics"):
            assert len(element.findall(NS + label)) <= 1, f"two <{label}> in <{name}>"

    assert len(root.findall(NS + "net")) >= 1
    walk(root)
    for arc in arcs:
        source, target = kinds.get(arc.get("source", "")), kinds.get(arc.get("target", ""))
        assert {source, target} == {"place", "transition"}, (arc.get("id"), source, target)
    return kinds


def _positions(document: str) -> dict[str, tuple[float, float]]:
    root = ET.fromstring(document)
    found = {}
    for element in root.iter():
        if element.tag in (NS + "place", NS + "transition"):
            position = element.find(f"{NS}graphics/{NS}position")
            assert position is not None
            found[element.get("id")] = (float(position.get("x")), float(position.get("y")))
    return found


SAMPLE = [
    ParameterSet(*v)
    for v in [
        (1, 1, 1, 1),
        (2, 1, 1, 1),
        (4, 2, 2, 3),
        (2, 4, 3, 2),
        (3, 3, 1, 3),
        (2, 2, 2, 2),
        (1, 10, 1, 5),
        (3, 2, 6, 6),
        (12, 4, 1, 1),
        (8, 1, 5, 1),
    ]
]  # docs/theory/check-values.md table


@pytest.mark.parametrize("p", SAMPLE, ids=str)
def test_export_follows_the_pt_net_grammar(p: ParameterSet) -> None:
    document = pnml_document(build_net(p))
    kinds = check_pnml_structure(document)
    assert sum(k == "transition" for k in kinds.values()) == p.area  # docs/theory/folding.md
    assert sum(k == "place" for k in kinds.values()) == 2 * p.area
    assert sum(k == "arc" for k in kinds.values()) == 4 * p.area


def test_every_small_export_follows_the_grammar() -> None:
    for area in range(2, 13):
        for p in iter_parameter_sets(area):
            check_pnml_structure(pnml_document(build_net(p)))


@pytest.mark.parametrize("p", SAMPLE, ids=str)
def test_round_trip_gives_the_same_net(p: ParameterSet) -> None:
    net = build_net(p)
    read = parse_pnml(pnml_document(net).encode(), "x.pnml")
    assert read.transitions == net.transitions
    assert read.places == net.places
    assert read.tokens == net.tokens
    expected = set()
    for j, place in enumerate(net.places):
        expected.add((net.transitions[net.pre[j]], place, 1))
        expected.add((place, net.transitions[net.post[j]], 1))
    assert {(a.source, a.target, a.weight) for a in read.arcs} == expected
    assert read.name == str(p)
    assert sum(read.tokens) == p.alpha + p.beta  # docs/theory/initial-marking.md


@pytest.mark.parametrize("p", SAMPLE, ids=str)
def test_positions_draw_the_parallelogram_with_time_up(p: ParameterSet) -> None:
    # docs/theory/petri-space.md Drawing: x ∝ xi - eta, y ∝ -(xi + eta) on screen; places at arc
    # midpoints.
    net = build_net(p)
    at = _positions(pnml_document(net))
    t0 = net.transitions[0]
    xi0, eta0 = net.coordinates[0]
    for name, (xi, eta) in zip(net.transitions, net.coordinates, strict=True):
        assert at[name][0] - at[t0][0] == pytest.approx(GRID * ((xi - eta) - (xi0 - eta0)))
        assert at[name][1] - at[t0][1] == pytest.approx(-GRID * ((xi + eta) - (xi0 + eta0)))
    for j, name in enumerate(net.places):
        xi, eta = net.coordinates[net.pre[j]]
        end = (xi + 1, eta) if net.kinds[j] == "forward" else (xi, eta + 1)
        mid = ((xi + end[0]) / 2, (eta + end[1]) / 2)
        assert at[name][0] - at[t0][0] == pytest.approx(GRID * ((mid[0] - mid[1]) - (xi0 - eta0)))
        assert at[name][1] - at[t0][1] == pytest.approx(-GRID * ((mid[0] + mid[1]) - (xi0 + eta0)))
    assert len(set(at.values())) == len(at), "two nodes drawn on the same spot"
    assert min(min(x, y) for x, y in at.values()) > 0


def test_forward_places_lie_up_right_and_backward_up_left() -> None:
    net = build_net(ParameterSet(4, 2, 2, 3))
    transitions, places = drawing_coordinates(net)
    for j, kind in enumerate(net.kinds):
        x0, y0 = transitions[net.pre[j]]
        x, y = places[j]
        assert y > y0  # later in time
        assert (x > x0) == (kind == "forward")


def test_multi_page_file_is_flattened_with_references_resolved() -> None:
    flat = read_pnml(DATA / "pipeline-ring.pnml")
    paged = read_pnml(DATA / "pipeline-ring-pages.pnml")
    assert paged.pages == 3
    assert set(paged.places) == set(flat.places)
    assert set(paged.transitions) == set(flat.transitions)
    assert {(a.source, a.target) for a in paged.arcs} == {(a.source, a.target) for a in flat.arcs}
    assert dict(zip(paged.places, paged.tokens, strict=True)) == dict(
        zip(flat.places, flat.tokens, strict=True)
    )


def _net(body: str, namespace: bool = True, net_type: str = PTNET_TYPE) -> bytes:
    xmlns = f' xmlns="{PNML_NAMESPACE}"' if namespace else ""
    return (
        f'<pnml{xmlns}><net id="n" type="{net_type}"><page id="pg">{body}</page></net></pnml>'
    ).encode()


_PAIR = (
    '<transition id="t"/><place id="p"><initialMarking><text>1</text></initialMarking>'
    '</place><arc id="a" source="t" target="p"/><arc id="b" source="p" target="t"/>'
)


def test_reader_accepts_pnml_without_namespace() -> None:
    net = parse_pnml(_net(_PAIR, namespace=False), "x")
    assert net.places == ("p",) and net.transitions == ("t",) and net.tokens == (1,)


@pytest.mark.parametrize(
    ("document", "message"),
    [
        (
            b'<pnml xmlns="urn:other"><net/></pnml>',
            "x: root element is <pnml> in the namespace urn:other, not <pnml> in the namespace "
            f"{PNML_NAMESPACE}; this is not a PNML file",
        ),
        (b"<pnml/>", "x: the <pnml> element holds no <net>"),
        (
            _net(_PAIR).replace(b"</net>", b'</net><net id="m" type="x"/>'),
            "x: the file holds 2 nets; zoo reads one net per file, split them into separate files",
        ),
        (
            _net(_PAIR, net_type="http://www.pnml.org/version-2009/grammar/symmetricnet"),
            "x: net type 'http://www.pnml.org/version-2009/grammar/symmetricnet' is not a "
            f"place/transition net; zoo reads the type {PTNET_TYPE}",
        ),
        (
            f'<pnml xmlns="{PNML_NAMESPACE}"><net id="n" type="{PTNET_TYPE}"/></pnml>'.encode(),
            "x: the net has no <page>; PNML places, transitions and arcs live on a page",
        ),
        (
            _net('<place id="p"/><transition id="p"/>'),
            "x: id 'p' is used twice; PNML ids must be unique in a file",
        ),
        (_net("<place/>"), "x: a <place> has no id attribute; every PNML object needs one"),
        (
            _net('<place id="p"/><place id="q"/><arc id="a" source="p" target="q"/>'),
            "x: arc 'a' joins place 'p' to place 'q'; an arc must join a place and a transition",
        ),
        (
            _net('<place id="p"/><arc id="a" source="p" target="nowhere"/>'),
            "x: the target of arc 'a' refers to 'nowhere', which is no place or transition in the "
            "file",
        ),
        (
            _net('<place id="p"><initialMarking><text>many</text></initialMarking></place>'),
            "x: the initial marking of place 'p' is 'many', not a whole number >= 0; write e.g. 1",
        ),
        (
            _net(
                '<place id="p"><initialMarking><text>1000000000000000</text></initialMarking>'
                "</place>"
            ),
            "x: the initial marking of place 'p' must be at most 999,999,999,999,999 (15 digits), "
            "got '1000000000000000'",
        ),
        (
            _net(
                _PAIR.replace(
                    'target="p"/>', 'target="p"><inscription><text>0</text></inscription></arc>'
                )
            ),
            "x: arc 'a' has inscription 0; a PT-net arc weight is at least 1",
        ),
        (
            _net(
                '<referencePlace id="r1" ref="r2"/><referencePlace id="r2" ref="r1"/>'
                '<transition id="t"/><arc id="a" source="r1" target="t"/>'
            ),
            "x: reference nodes form a cycle (r1 -> r2 -> r1)",
        ),
        (
            _net(
                '<referencePlace id="r" ref="t"/><transition id="t"/>'
                '<arc id="a" source="r" target="t"/>'
            ),
            "x: reference 'r' must point to a place, but 't' is a transition",
        ),
        (
            _net(
                '<referenceTransition id="r" ref="gone"/><place id="p"/>'
                '<arc id="a" source="p" target="r"/>'
            ),
            "x: reference 'r' points to 'gone', which is not in the file",
        ),
    ],
)
def test_reader_refuses_broken_nets_with_one_line(document: bytes, message: str) -> None:
    with pytest.raises(FormatError) as caught:
        parse_pnml(document, "x")
    assert str(caught.value) == message


def test_dot_export_is_a_graph_of_the_net() -> None:
    p = ParameterSet(4, 2, 2, 3)
    net = build_net(p)
    text = dot_document(net)
    nodes = re.findall(r'^  "([^"]+)" \[', text, flags=re.M)
    edges = re.findall(r'^  "([^"]+)" -> "([^"]+)"', text, flags=re.M)
    assert set(nodes) == set(net.transitions) | set(net.places)
    assert len(edges) == 4 * p.area and set(edges) == set(to_networkx(net).edges)
    # one dot per token, docs/theory/initial-marking.md
    assert text.count("\u25cf") == p.alpha + p.beta


@pytest.mark.skipif(shutil.which("dot") is None, reason="Graphviz is not installed")
def test_dot_export_is_accepted_by_graphviz(tmp_path: Path) -> None:
    source = tmp_path / "net.dot"
    source.write_text(dot_document(build_net(ParameterSet(3, 2, 2, 2))))
    done = subprocess.run(["dot", "-Tsvg", str(source)], capture_output=True, timeout=60)
    assert done.returncode == 0, done.stderr


def test_json_export_describes_the_net() -> None:
    p = ParameterSet(4, 2, 2, 3)
    net = build_net(p)
    data = json.loads(json_document(net))
    assert data["params"] == {"alpha": 4, "beta": 2, "gamma": 2, "delta": 3}
    assert data["area"] == 16 and data["label"] == "C(4,2,2,3)"
    rebuilt = nx.DiGraph()
    for t in data["transitions"]:
        rebuilt.add_node(t["name"], kind="transition")
    for place in data["places"]:
        rebuilt.add_node(place["name"], kind="place", tokens=place["tokens"])
        rebuilt.add_edge(place["from"], place["name"])
        rebuilt.add_edge(place["name"], place["to"])
    assert set(rebuilt.edges) == set(to_networkx(net).edges)
    assert set(rebuilt.nodes) == set(to_networkx(net).nodes)
    forward = [pl for pl in data["places"] if pl["kind"] == "forward"]
    # docs/theory/initial-marking.md: beta cars
    assert sum(pl["tokens"] for pl in forward) == p.beta
    coordinates = {t["name"]: (t["xi"], t["eta"]) for t in data["transitions"]}
    assert coordinates == dict(zip(net.transitions, net.coordinates, strict=True))


def test_safe_input_page_states_the_real_canonical_form_limit() -> None:
    # docs/pnml.md quotes the canonical-form limit; a cycloid of area A has T + 2P = 5A encoding
    # vertices (docs/architecture.md, canonical forms), so the limit is area CANONICAL_LIMIT // 5.
    from zoo.core.canonical import CANONICAL_LIMIT
    from zoo.interchange.netmodel import MAX_INPUT_BYTES

    page = (Path(__file__).resolve().parents[2] / "docs" / "pnml.md").read_text("utf-8")
    assert (
        f"`zoo.core.canonical.CANONICAL_LIMIT` = {CANONICAL_LIMIT:,} encoding vertices, cycloids "
        f"up to area {CANONICAL_LIMIT // 5:,}"
    ) in page
    assert "(the canonical-form limit)" not in page
    # "every net up to area ~12,000 fits": zoo's own PNML of area 12,000 is under the limit
    per_transition = len(pnml_document(build_net(ParameterSet(4, 2, 2, 3))).encode()) / 16
    assert 840 <= per_transition <= 855  # "about 840–855 bytes per transition"
    assert 12_000 * per_transition <= MAX_INPUT_BYTES
