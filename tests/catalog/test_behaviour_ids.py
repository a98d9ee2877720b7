"""Behaviour identifiers stored by the build (docs/theory/behaviour.md).

The reference is networkx's general isomorphism test (VF2) on the explicit reachability graphs,
initial marking to initial marking; identifiers are recomputed from their definition (the first
class of each behaviour class in catalog order) and compared across backends, bounds and a
migrated catalog.
"""

from __future__ import annotations

import shutil
from itertools import combinations
from pathlib import Path

import networkx as nx
import pytest

from zoo.catalog.build import build_catalog
from zoo.catalog.service import Catalog
from zoo.core.behaviour import BEHAVIOUR_STATE_LIMIT, state_graph
from zoo.core.params import parse_params
from zoo.storage.database import resolve_location, upgrade

OLD_CATALOG = Path(__file__).resolve().parents[1] / "data" / "catalog-r0001.sqlite3"


def behaviour_rows(catalog: Catalog) -> list[tuple[str, str | None, int | None, str | None]]:
    """(class id, behaviour id, behaviour_count, evidence) of every stored class, in order."""
    rows = []
    for entry in catalog.iter_entries():
        count = entry.invariant_values["behaviour_count"]
        rows.append((entry.id, entry.behaviour_id, count, entry.behaviour_evidence))
    return rows


def as_networkx(p: str) -> nx.DiGraph:
    graph = state_graph(parse_params(p))
    result = nx.DiGraph()
    for state, targets in enumerate(graph.successors):
        result.add_node(state, start=state == 0)
        result.add_edges_from((state, t) for t in targets)
    return result


def test_identifiers_agree_with_explicit_isomorphism(tmp_path: Path) -> None:
    with Catalog.open(str(tmp_path / "c.sqlite3"), create=True) as catalog:
        build_catalog(catalog, 13, jobs=1)
        entries = list(catalog.iter_entries())
        complete_to = catalog.behaviour_complete_to()
    assert complete_to == 13
    decided = [e for e in entries if e.behaviour_id is not None]
    assert len(decided) == len(entries)  # every class up to area 13 has under 10^4 states
    by_size: dict[tuple[object, object], list[object]] = {}
    for e in decided:
        by_size.setdefault((e.value("states"), e.value("state_arcs")), []).append(e)
    pairs = same = 0
    for group in by_size.values():
        for first, second in combinations(group, 2):
            reference = nx.is_isomorphic(
                as_networkx(first.label),  # type: ignore[attr-defined]
                as_networkx(second.label),  # type: ignore[attr-defined]
                node_match=lambda a, b: a["start"] == b["start"],
            )
            assert (first.behaviour_id == second.behaviour_id) is reference  # type: ignore[attr-defined]
            pairs += 1
            same += reference
    assert pairs > 100 and same > 30
    # Named after the first class of each behaviour class, in catalog order; counts agree.
    members: dict[str, list[str]] = {}
    for e in decided:
        members.setdefault(str(e.behaviour_id), []).append(e.id)
    for behaviour_id, ids in members.items():
        assert behaviour_id == "BE" + ids[0][2:]
        for e in decided:
            if e.behaviour_id == behaviour_id:
                assert e.value("behaviour_count") == len(ids)
    # C(1,2,1,3) and C(1,3,1,2): different classes, one directed cycle of 5 markings each.
    five = {e.label: e for e in decided if e.area == 5}
    assert five["C(1,2,1,3)"].behaviour_id == five["C(1,3,1,2)"].behaviour_id == "BE5-1"


def test_identifiers_do_not_depend_on_the_bound_or_the_backend(
    tmp_path: Path, postgres_url: str
) -> None:
    with Catalog.open(str(tmp_path / "whole.sqlite3"), create=True) as catalog:
        build_catalog(catalog, 14, jobs=1)
        whole = behaviour_rows(catalog)
    with Catalog.open(str(tmp_path / "steps.sqlite3"), create=True) as catalog:
        build_catalog(catalog, 9, jobs=1)
        early = behaviour_rows(catalog)
        build_catalog(catalog, 14, jobs=2)
        steps = behaviour_rows(catalog)
    assert steps == whole
    # Counts of classes up to area 9 stay: their behaviour classes have at most 9 states.
    assert early == [row for row in whole if int(row[0][2:].split("-")[0]) <= 9]
    with Catalog.open(postgres_url, create=True) as catalog:
        build_catalog(catalog, 14, jobs=1)
        assert behaviour_rows(catalog) == whole


def test_an_upgraded_catalog_gets_its_identifiers_from_the_next_build(tmp_path: Path) -> None:
    copy = tmp_path / "old.sqlite3"
    shutil.copyfile(OLD_CATALOG, copy)
    upgrade(resolve_location(str(copy)))
    with Catalog.open(str(copy)) as catalog:
        bound = max(catalog.complete_areas())  # 5; the file holds areas 2..5
        assert all(row[1] is None for row in behaviour_rows(catalog))
        build_catalog(catalog, bound, jobs=1)  # stores the empty area 1, names areas 2..5
        upgraded = behaviour_rows(catalog)
    with Catalog.open(str(tmp_path / "fresh.sqlite3"), create=True) as catalog:
        build_catalog(catalog, bound, jobs=1)
        assert behaviour_rows(catalog) == upgraded


@pytest.mark.parametrize("limit", [BEHAVIOUR_STATE_LIMIT])
def test_classes_above_the_bound_stay_undecided(tmp_path: Path, limit: int) -> None:
    with Catalog.open(str(tmp_path / "c.sqlite3"), create=True) as catalog:
        build_catalog(catalog, 22, jobs=2)
        entries = list(catalog.iter_entries())
        assert catalog.count("behaviour_count = 0") == sum(
            1 for e in entries if e.behaviour_id is None
        )
    above = [e for e in entries if int(e.value("states")) > limit]  # type: ignore[call-overload]
    assert above and all(e.behaviour_id is None for e in above)
    assert all(e.value("behaviour_count") is None for e in above)
    assert all(e.behaviour_id is not None for e in entries if e not in above)
