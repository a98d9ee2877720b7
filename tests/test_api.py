"""The Python interface at the top of the package (docs/api/): names, typed results, notebook
views, networkx graphs. Nets are checked against networkx's own isomorphism test."""

from __future__ import annotations

import subprocess
import sys
import xml.etree.ElementTree as ET
from fractions import Fraction
from html.parser import HTMLParser
from pathlib import Path

import networkx as nx
import pytest
from networkx.algorithms.isomorphism import DiGraphMatcher

import zoo
from zoo.interchange.export import export_document


def _same_marked_net(g: nx.DiGraph, h: nx.DiGraph) -> bool:
    def match(a: dict[str, object], b: dict[str, object]) -> bool:
        return a["kind"] == b["kind"] and a.get("tokens") == b.get("tokens")

    return DiGraphMatcher(g, h, node_match=match).is_isomorphic()


class _Tags(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.open: list[str] = []
        self.text: list[str] = []

    def handle_starttag(self, tag: str, attrs: object) -> None:
        self.open.append(tag)

    def handle_endtag(self, tag: str) -> None:
        assert self.open and self.open[-1] == tag, f"</{tag}> closes {self.open[-1:]}"
        self.open.pop()

    def handle_data(self, data: str) -> None:
        self.text.append(data)


def _html_text(markup: str) -> str:
    parser = _Tags()
    parser.feed(markup)
    parser.close()
    assert parser.open == [], f"unclosed tags {parser.open}"
    return "".join(parser.text)


def test_the_documented_names_are_at_the_top_of_the_package() -> None:
    for name in zoo.__all__:
        assert getattr(zoo, name) is not None, name
    assert zoo.Catalog.__module__ == "zoo.catalog.service"
    assert set(zoo.__all__) <= set(dir(zoo))


def test_import_zoo_loads_no_database_code() -> None:
    code = "import sys, zoo; zoo.ParameterSet(4,2,2,3); print('sqlalchemy' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_to_networkx_carries_parameters_and_marking() -> None:
    p = zoo.ParameterSet(4, 2, 2, 3)
    g = p.to_networkx()
    assert g.graph["params"] == (4, 2, 2, 3) and g.graph["label"] == "C(4,2,2,3)"
    marked = {n for n, d in g.nodes(data=True) if d["kind"] == "place" and d["tokens"]}
    assert set(g.graph["marking"]) == marked
    # A = alpha*delta + beta*gamma = 16 transitions; the initial marking holds beta forward and
    # alpha backward tokens (docs/theory/initial-marking.md).
    assert sum(1 for _, d in g.nodes(data=True) if d["kind"] == "transition") == p.area == 16
    assert len(marked) == p.alpha + p.beta


def test_members_of_a_class_have_isomorphic_marked_nets_and_other_classes_do_not(
    small_catalog: str,
) -> None:
    with zoo.Catalog.open(small_catalog) as catalog:
        result = catalog.find("area = 10")
    assert len(result) == result.total > 3
    graphs = {entry.id: entry.to_networkx() for entry in result}
    for entry in result:
        for member in entry.members[1:3]:
            assert _same_marked_net(member.to_networkx(), graphs[entry.id]), (entry.id, member)
    ids = list(graphs)
    for i, a in enumerate(ids):
        for b in ids[i + 1 :]:
            assert not _same_marked_net(graphs[a], graphs[b]), (a, b)


def test_a_result_is_a_sequence_of_typed_entries_with_exact_values(small_catalog: str) -> None:
    with zoo.Catalog.open(small_catalog) as catalog:
        result = catalog.find("processes = 2 and area <= 12", sort="loop")
    assert isinstance(result, zoo.FindResult)
    assert len(result) == len(result.entries) == result.total
    assert list(result) == list(result.entries) and result[0] == result.entries[0]
    assert result[-1] is result.entries[-1]
    for entry in result:
        assert isinstance(entry, zoo.ClassEntry)
        assert type(entry.value("cycle_time")) is Fraction
        assert type(entry.value("states")) is int
        assert type(entry.value("cyclic")) is bool


def test_to_pandas_keeps_exact_values(small_catalog: str) -> None:
    pytest.importorskip("pandas")  # an optional extra; the dev extra installs it
    with zoo.Catalog.open(small_catalog) as catalog:
        result = catalog.find("area <= 12")
    table = result.to_pandas()
    assert list(table.index) == [e.id for e in result]
    for entry in result:
        row = table.loc[entry.id]
        assert row["label"] == entry.label
        assert row["cycle_time"] == entry.value("cycle_time")
        assert type(row["cycle_time"]) is Fraction and type(row["states"]) is int
    assert table.attrs["complete_to"] == 12


def test_notebook_views_are_well_formed(small_catalog: str) -> None:
    svg = zoo.ParameterSet(4, 2, 2, 3)._repr_svg_()
    assert svg is not None and ET.fromstring(svg).tag.endswith("svg")
    with zoo.Catalog.open(small_catalog) as catalog:
        result = catalog.find("area = 12")
        entry = catalog.get("C(4,2,2,2)")
    text = _html_text(result._repr_html_())
    assert f"{result.total} classes match" in text and "complete up to area 12" in text
    entry_text = _html_text(entry._repr_html_())
    assert entry.id in entry_text and "shortest cycle" in entry_text


def test_identify_names_the_class_of_an_exported_net(small_catalog: str, tmp_path: Path) -> None:
    path = tmp_path / "ring.pnml"
    path.write_text(export_document(zoo.ParameterSet(3, 2, 1, 2), "pnml"), encoding="utf-8")
    answer = zoo.identify(path, db=small_catalog)
    with zoo.Catalog.open(small_catalog) as catalog:
        expected = catalog.get("C(3,2,1,2)")
    assert answer.cycloid and answer.class_id == expected.id
    assert str(answer.params) == expected.label
