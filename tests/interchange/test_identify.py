"""Identification of foreign nets (zoo.interchange.identify) and the ``export``/``identify``
commands.

The central test exports every class of area <= 30 as PNML, renames every element and shuffles
their order, and checks that identification finds the same class with a mapping that is an
actual isomorphism of the two marked graphs. Hand-written nets of our own pipeline scenario are
checked against an independent construction of the cycloid (folding Z^2 by the integer test of
docs/theory/equivalence.md, written out here) with networkx's isomorphism matcher.
"""

from __future__ import annotations

import json
import random
import xml.etree.ElementTree as ET
from collections import deque
from pathlib import Path

import networkx as nx
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from networkx.algorithms.isomorphism import DiGraphMatcher
from typer.testing import CliRunner

from zoo.catalog.build import build_catalog
from zoo.catalog.enumeration import iter_parameter_sets
from zoo.catalog.lookup import catalog_lookup
from zoo.cli import app
from zoo.cli.app import NOT_A_CYCLOID
from zoo.core.algebra import class_key
from zoo.core.canonical import net_form
from zoo.core.net import build_net
from zoo.core.params import ParameterSet
from zoo.interchange.identify import Identification, identify_file, identify_net, place_bound
from zoo.interchange.netfile import read_net_file
from zoo.interchange.netmodel import PlaceTransitionNet
from zoo.interchange.nettext import net_text, parse_net_text
from zoo.interchange.pnml import PNML_NAMESPACE, parse_pnml, pnml_document

DATA = Path(__file__).parents[1] / "data" / "pnml"
NS = "{" + PNML_NAMESPACE + "}"
MAX_AREA = 30


# --- helpers ---------------------------------------------------------------------------------


def scrambled(document: str, rng: random.Random) -> bytes:
    """The PNML document with every id renamed, names dropped and every page's order shuffled."""
    root = ET.fromstring(document)
    ids = [e.get("id") for e in root.iter() if e.get("id") is not None]
    fresh = {old: f"n{rng.getrandbits(40):x}_{i}" for i, old in enumerate(ids)}
    for element in root.iter():
        for attribute in ("id", "source", "target"):
            if element.get(attribute) is not None:
                element.set(attribute, fresh[element.get(attribute)])
        for name in element.findall(NS + "name"):
            element.remove(name)
        for tool in element.findall(NS + "toolspecific"):
            element.remove(tool)
    for page in root.iter(NS + "page"):
        children = list(page)
        rng.shuffle(children)
        for child in children:
            page.remove(child)
        page.extend(children)
    return ET.tostring(root)


def arcs_of(net: PlaceTransitionNet) -> tuple[dict[str, str], dict[str, str]]:
    """(input transition, output transition) of every place, read from the arcs."""
    places = set(net.places)
    pre = {a.target: a.source for a in net.arcs if a.target in places}
    post = {a.source: a.target for a in net.arcs if a.source in places}
    return pre, post


def assert_mapping_is_isomorphism(net: PlaceTransitionNet, answer: Identification) -> None:
    """The reported maps are bijections onto build_net(params) keeping arcs and tokens."""
    assert answer.params is not None
    target = build_net(answer.params)
    tmap, pmap = dict(answer.transition_map), dict(answer.place_map)
    assert sorted(tmap) == sorted(net.transitions)
    assert sorted(tmap.values()) == sorted(target.transitions)
    assert sorted(pmap) == sorted(net.places)
    assert sorted(pmap.values()) == sorted(target.places)
    pre, post = arcs_of(net)
    tokens = dict(zip(net.places, net.tokens, strict=True))
    index = {name: j for j, name in enumerate(target.places)}
    for place, image in pmap.items():
        j = index[image]
        assert target.transitions[target.pre[j]] == tmap[pre[place]]
        assert target.transitions[target.post[j]] == tmap[post[place]]
        assert target.tokens[j] == tokens[place]


def as_digraph(net: PlaceTransitionNet) -> nx.DiGraph:
    graph = nx.DiGraph()
    for t in net.transitions:
        graph.add_node(t, kind="transition", tokens=0)
    for place, k in zip(net.places, net.tokens, strict=True):
        graph.add_node(place, kind="place", tokens=k)
    graph.add_edges_from((a.source, a.target) for a in net.arcs)
    return graph


def independent_cycloid(p: ParameterSet) -> nx.DiGraph:
    """C(p) built from the definition, without zoo's net code.

    Transitions are the classes of Z^2 modulo the lattice (integer test of
    docs/theory/equivalence.md:
    x ~ y iff delta*v_xi - gamma*v_eta = 0 and beta*v_xi + alpha*v_eta = 0 mod A); every
    transition has a forward place to x + (1,0) and a backward place to x + (0,1) (§1); a
    forward place is marked iff its output's level beta*xi + alpha*eta mod A is in 1..beta, a
    backward one iff it is in 1..alpha (§3.1, convention-free form).
    """
    alpha, beta, gamma, delta = p.as_tuple()
    area = p.area
    reps: list[tuple[int, int]] = []

    def find(x: tuple[int, int]) -> int:
        for i, r in enumerate(reps):
            v0, v1 = x[0] - r[0], x[1] - r[1]
            if (delta * v0 - gamma * v1) % area == 0 and (beta * v0 + alpha * v1) % area == 0:
                return i
        reps.append(x)
        return len(reps) - 1

    for xi in range(area):  # A*Z^2 lies in the lattice, so this box meets every class
        for eta in range(area):
            find((xi, eta))
    assert len(reps) == area  # docs/theory/folding.md: A = |T|
    graph = nx.DiGraph()
    for i, (xi, eta) in enumerate(reps):
        graph.add_node(("t", i), kind="transition", tokens=0)
        for kind, step, bound in (("f", (1, 0), beta), ("b", (0, 1), alpha)):
            out = (xi + step[0], eta + step[1])
            level = (beta * out[0] + alpha * out[1]) % area
            graph.add_node((kind, i), kind="place", tokens=1 if 1 <= level <= bound else 0)
            graph.add_edge(("t", i), (kind, i))
            graph.add_edge((kind, i), ("t", find(out)))
    return graph


def isomorphic(g1: nx.DiGraph, g2: nx.DiGraph) -> bool:
    same = lambda a, b: a["kind"] == b["kind"] and a["tokens"] == b["tokens"]  # noqa: E731
    return DiGraphMatcher(g1, g2, node_match=same).is_isomorphic()


# --- every class up to area 30 -----------------------------------------------------------------


def class_representatives(max_area: int) -> dict[tuple[int, ...], ParameterSet]:
    found: dict[tuple[int, ...], ParameterSet] = {}
    for area in range(2, max_area + 1):
        for p in iter_parameter_sets(area):
            found.setdefault(class_key(p), p)
    return found


def test_every_class_up_to_area_30_survives_export_renaming_and_shuffling() -> None:
    rng = random.Random(20261201)
    representatives = class_representatives(MAX_AREA)
    assert len(representatives) > 1000  # a sanity floor: 1,261 classes for area <= 30
    # How long the round trip takes: benchmarks/bench_identify.py prints the figures.
    for key, p in representatives.items():
        document = scrambled(pnml_document(build_net(p)), rng)
        foreign = parse_pnml(document, str(p))
        answer = identify_net(foreign, use_catalog=False)
        assert answer.cycloid, (p, answer.reason)
        assert answer.params is not None
        assert class_key(answer.params) == key, (p, answer.params)
        assert any(class_key(q) == key for q in answer.synthesized)  # found by synthesis
        assert_mapping_is_isomorphism(foreign, answer)


def test_label_is_the_smallest_member_of_the_class() -> None:
    # docs/citing.md: the label is the smallest member parameter set of the class.
    for key, p in class_representatives(12).items():
        answer = identify_net(parse_net_text(net_text(build_net(p)), str(p)), use_catalog=False)
        members = [q for q in iter_parameter_sets(p.area) if class_key(q) == key]
        assert answer.params == min(members)


@pytest.mark.parametrize(
    "p",
    [
        ParameterSet(*v)
        for v in [
            (4, 2, 2, 3),
            (3, 18, 1, 9),
            (3, 18, 2, 3),
            (2, 2, 1, 3),
            (2, 2, 2, 2),
            (3, 3, 2, 2),
            (3, 3, 1, 3),
            (1, 10, 1, 5),
            (4, 16, 1, 8),
            (4, 16, 2, 4),
        ]
    ],
    ids=str,
)
def test_hard_synthesis_cases_are_told_apart(p: ParameterSet) -> None:
    # docs/theory/synthesis.md: (A, cyc, alpha, beta) is not complete for A = 45, 48; alpha = beta
    # classes;
    # §5.1 exceptional pair C(2,2,1,3) ~ C(2,2,2,2). The canonical form decides.
    answer = identify_net(parse_pnml(pnml_document(build_net(p)).encode()), use_catalog=False)
    assert answer.cycloid and answer.params is not None
    assert class_key(answer.params) == class_key(p)
    assert isomorphic(independent_cycloid(answer.params), independent_cycloid(p))


def test_renaming_and_order_never_change_the_answer() -> None:
    rng = random.Random(7)
    for p in [ParameterSet(4, 2, 2, 3), ParameterSet(3, 2, 6, 6), ParameterSet(2, 2, 1, 5)]:
        answers = set()
        for _ in range(5):
            answer = identify_net(
                parse_pnml(scrambled(pnml_document(build_net(p)), rng), "x"), use_catalog=False
            )
            data = answer.as_dict()
            del data["mapping"]
            answers.add(json.dumps(data, sort_keys=True))
        assert len(answers) == 1


@settings(max_examples=40, deadline=None)
@given(
    st.sampled_from([(2, 1, 1, 1), (4, 2, 2, 3), (3, 3, 2, 2), (2, 2, 1, 3), (1, 6, 1, 3)]),
    st.randoms(use_true_random=False),
)
def test_any_renaming_gives_the_same_class(values: tuple[int, ...], rng: random.Random) -> None:
    p = ParameterSet(*values)
    foreign = parse_pnml(scrambled(pnml_document(build_net(p)), rng), "x")
    answer = identify_net(foreign, use_catalog=False)
    assert answer.params is not None and class_key(answer.params) == class_key(p)
    assert_mapping_is_isomorphism(foreign, answer)


# --- our scenario: a pipeline ring buffer ------------------------------------------------------


def test_pipeline_ring_with_two_frames_and_one_slot() -> None:
    # 3 stages, 2 anonymous frames, 1 free slot: docs/theory/ring-designs.md gives C(g, c, 1, 1) =
    # C(1,2,1,1)
    # (anonymous cars and gaps); confirmed here by an independent construction.
    for name in ("pipeline-ring.pnml", "pipeline-ring.mgraph", "pipeline-ring-pages.pnml"):
        foreign = read_net_file(DATA / name)
        answer = identify_net(foreign, use_catalog=False)
        assert answer.cycloid, answer.reason
        assert answer.params == ParameterSet(1, 2, 1, 1)
        assert isomorphic(as_digraph(foreign), independent_cycloid(ParameterSet(1, 2, 1, 1)))
        assert_mapping_is_isomorphism(foreign, answer)
        assert answer.observables is not None
        assert (answer.observables.transitions, answer.observables.tokens) == (3, 3)


def test_pipeline_ring_with_individual_frames() -> None:
    # Frames told apart: docs/theory/ring-designs.md "individual cars" gives C(g, c, c, c) =
    # C(1,2,2,2), A = 6.
    foreign = read_net_file(DATA / "pipeline-ring-frames.mgraph")
    answer = identify_net(foreign, use_catalog=False)
    assert answer.cycloid, answer.reason
    assert answer.params is not None
    assert class_key(answer.params) == class_key(ParameterSet(1, 2, 2, 2))
    assert isomorphic(as_digraph(foreign), independent_cycloid(ParameterSet(1, 2, 2, 2)))
    assert_mapping_is_isomorphism(foreign, answer)


# --- nets that are not cycloid systems ---------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "reason"),
    [
        (
            "transition a",
            "transition 'a' has 0 input and 0 output places; every transition of "
            "a cycloid has exactly 2 of each",
        ),
        (
            "place p: a -> b\nplace q: b -> a tokens 1",
            "transition 'a' has 1 input and 1 output places; every transition of a cycloid has "
            "exactly 2 of each",
        ),
        (
            "place p1: a -> b tokens 2\nplace p2: a -> b\nplace q1: b -> a\nplace q2: b -> a",
            "not safe: place 'p1' holds 2 tokens initially; a cycloid system never has more than "
            "one token on a place",
        ),
        (
            "place p1: a -> b tokens 1\nplace p2: a -> b tokens 1\nplace q1: b -> a\n"
            "place q2: b -> a tokens 1",
            "not safe: place 'q2' can come to hold 2 tokens (every cycle through it carries at "
            "least 2); a cycloid system is 1-safe",
        ),
        (
            "place p1: a -> b tokens 1\nplace p2: a -> b\nplace q1: b -> a\nplace q2: b -> a "
            "tokens 1\nplace r1: c -> d tokens 1\nplace r2: c -> d\nplace s1: d -> c\nplace s2: "
            "d -> c tokens 1",
            "not strongly connected: there is no path from 'a' to 'c'; a cycloid's transitions "
            "all lie on one strongly connected net",
        ),
        (
            "place p1: a -> b tokens 1\nplace p2: a -> b\nplace q1: b -> a\nplace q2: b -> a",
            "not live: the cycle a -> p2 -> b -> q1 -> a carries no token, so its transitions can "
            "never fire",
        ),
        (
            "place p0: t0 -> t1\nplace p1: t0 -> t0 tokens 1\nplace p2: t1 -> t0 tokens 1\n"
            "place p3: t1 -> t1 tokens 1",
            "wrong token count: 3 tokens on 2 transitions, but a cycloid carries alpha + beta <= "
            "alpha*delta + beta*gamma = A tokens",
        ),
        (
            "place p0: t0 -> t1\nplace p1: t0 -> t0 tokens 1\nplace p2: t1 -> t2 tokens 1\n"
            "place p3: t1 -> t2 tokens 1\nplace p4: t2 -> t0\nplace p5: t2 -> t1",
            "its transitions are not all alike: the shortest cycle through 't0' has length 1, "
            "through 't1' more than 1; in a cycloid every transition lies on a shortest cycle",
        ),
        (
            "place p0: t0 -> t4 tokens 1\nplace p1: t0 -> t1 tokens 1\nplace p2: t1 -> t0\n"
            "place p3: t1 -> t2\nplace p4: t2 -> t3 tokens 1\nplace p5: t2 -> t0\n"
            "place p6: t3 -> t2\nplace p7: t3 -> t4\nplace p8: t4 -> t3 tokens 1\n"
            "place p9: t4 -> t1",
            "no cycloid system has its observables (5 transitions, 4 tokens, 1 enabled "
            "transition, shortest cycle length 2)",
        ),
        (
            "place p0: t0 -> t2\nplace p1: t0 -> t2\nplace p2: t1 -> t0\nplace p3: t1 -> t3\n"
            "place p4: t2 -> t3\nplace p5: t2 -> t0 tokens 1\nplace p6: t3 -> t1 tokens 1\n"
            "place p7: t3 -> t1 tokens 1",
            "not isomorphic to C(2,1,2,1), the only cycloid system with its observables (4 "
            "transitions, 3 tokens, 1 enabled transition, shortest cycle length 2)",
        ),
    ],
)
def test_reasons_are_one_clear_line(text: str, reason: str) -> None:
    answer = identify_net(parse_net_text(text, "n.mgraph"), use_catalog=False)
    assert not answer.cycloid
    assert answer.reason == reason
    assert answer.summary() == f"n.mgraph: not a cycloid system: {reason}"


def test_unsafe_witness_really_reaches_two_tokens() -> None:
    # The net above: firing b (both inputs marked) puts a second token on q2.
    text = (
        "place p1: a -> b tokens 1\nplace p2: a -> b tokens 1\nplace q1: b -> a\n"
        "place q2: b -> a tokens 1"
    )
    net = parse_net_text(text)
    pre, post = arcs_of(net)
    marking = dict(zip(net.places, net.tokens, strict=True))
    for place in [p for p in net.places if post[p] == "b"]:
        marking[place] -= 1
    for place in [p for p in net.places if pre[p] == "b"]:
        marking[place] += 1
    assert marking["q2"] == 2


def _reachable_markings(p: ParameterSet, limit: int = 40) -> list[tuple[int, ...]]:
    net = build_net(p)
    start = net.tokens
    seen = {start}
    queue = deque([start])
    while queue and len(seen) < limit:
        marking = queue.popleft()
        for t in range(net.transition_count):
            if all(marking[j] for j in net.input_places(t)):
                after = list(marking)
                for j in net.input_places(t):
                    after[j] -= 1
                for j in net.output_places(t):
                    after[j] += 1
                key = tuple(after)
                if key not in seen:
                    seen.add(key)
                    queue.append(key)
    return sorted(seen)


def fire_by_name(net: PlaceTransitionNet, marking: dict[str, int], transition: str) -> None:
    """Fire a transition of a file's net in place, refusing when it is not enabled."""
    pre, post = arcs_of(net)
    inputs = [p for p in net.places if post[p] == transition]
    assert all(marking[p] for p in inputs), f"{transition} is not enabled"
    for p in inputs:
        marking[p] -= 1
    for p in [p for p in net.places if pre[p] == transition]:
        marking[p] += 1


def assert_reached(net: PlaceTransitionNet, answer: Identification) -> None:
    """The mapping is an isomorphism of the unmarked nets, and firing ``answer.firing`` on the
    file's own net from the initial marking the mapping pulls back ends in the file's marking,
    every step enabled."""
    assert answer.cycloid and answer.params is not None
    target = build_net(answer.params)
    tmap, pmap = dict(answer.transition_map), dict(answer.place_map)
    assert sorted(tmap.values()) == sorted(target.transitions)
    assert sorted(pmap.values()) == sorted(target.places)
    pre, post = arcs_of(net)
    index = {name: j for j, name in enumerate(target.places)}
    for place, image in pmap.items():
        j = index[image]
        assert target.transitions[target.pre[j]] == tmap[pre[place]]
        assert target.transitions[target.post[j]] == tmap[post[place]]
    marking = {place: target.tokens[index[pmap[place]]] for place in net.places}
    for transition in answer.firing:
        fire_by_name(net, marking, transition)
    assert marking == dict(zip(net.places, net.tokens, strict=True))
    assert answer.marking == ("initial" if not answer.firing else "reachable")


def explicit_distances(net: nx.DiGraph) -> dict[tuple[int, ...], int]:
    """Every marking reachable in a net built by ``independent_cycloid``, with its distance from
    the initial marking: breadth-first on networkx's reachability graph."""
    places = sorted(n for n, d in net.nodes(data=True) if d["kind"] == "place")
    transitions = [n for n, d in net.nodes(data=True) if d["kind"] == "transition"]
    index = {p: j for j, p in enumerate(places)}
    start = tuple(net.nodes[p]["tokens"] for p in places)
    states = nx.DiGraph()
    queue = deque([start])
    states.add_node(start)
    while queue:
        marking = queue.popleft()
        for t in transitions:
            inputs = [index[p] for p in net.predecessors(t)]
            if all(marking[j] for j in inputs):
                after = list(marking)
                for j in inputs:
                    after[j] -= 1
                for p in net.successors(t):
                    after[index[p]] += 1
                if tuple(after) not in states:
                    queue.append(tuple(after))
                states.add_edge(marking, tuple(after))
    return dict(nx.single_source_shortest_path_length(states, start))


def marked_as(net: nx.DiGraph, marking: tuple[int, ...]) -> nx.DiGraph:
    places = sorted(n for n, d in net.nodes(data=True) if d["kind"] == "place")
    copy = net.copy()
    for place, k in zip(places, marking, strict=True):
        copy.nodes[place]["tokens"] = k
    return copy


@pytest.mark.parametrize(
    "p",
    [
        ParameterSet(*v)
        for v in [
            (2, 2, 1, 1),
            (3, 2, 1, 1),
            (2, 3, 1, 2),
            (3, 3, 1, 1),
            (2, 2, 1, 3),
            (2, 1, 2, 2),
        ]
    ],
    ids=str,
)
def test_answers_agree_with_networkx_on_reachable_markings(p: ParameterSet) -> None:
    # Issue 10 redefines this test: a reachable marking of a cycloid used to be refused as "not a
    # cycloid system"; now it is recognised in the class of p with a shortest firing sequence.
    # Checked without zoo's code: the reachability graph of the cycloid built from the definition
    # (networkx breadth-first search) gives every reachable marking and its distance from M0; a
    # marking is "initial" iff networkx finds it isomorphic, tokens included, to the initial
    # marking; the sequence may start at any placement of M0, so it is at most that distance.
    net = build_net(p)
    reference = independent_cycloid(p)
    distance = explicit_distances(reference)
    initial = {m for m in distance if isomorphic(marked_as(reference, m), reference)}
    for marking in _reachable_markings(p):
        foreign = PlaceTransitionNet(
            source="m",
            name="",
            places=net.places,
            transitions=net.transitions,
            tokens=marking,
            arcs=parse_net_text(net_text(net)).arcs,
        )
        answer = identify_net(foreign, use_catalog=False)
        assert answer.cycloid, (marking, answer.reason)
        assert answer.params is not None and class_key(answer.params) == class_key(p)
        assert_reached(foreign, answer)
        explicit = next(
            m for m in distance if isomorphic(marked_as(reference, m), as_digraph(foreign))
        )
        assert (answer.marking == "initial") == (explicit in initial)
        assert len(answer.firing) <= distance[explicit]


def _explore(net: PlaceTransitionNet, limit: int = 3000) -> tuple[bool, set[str]]:
    """(some place reaches 2 tokens, transitions that ever fire) by explicit search."""
    pre, post = arcs_of(net)
    inputs = {t: [p for p in net.places if post[p] == t] for t in net.transitions}
    outputs = {t: [p for p in net.places if pre[p] == t] for t in net.transitions}
    start = tuple(net.tokens)
    index = {p: j for j, p in enumerate(net.places)}
    seen, queue, fired, unsafe = {start}, deque([start]), set(), max(start) > 1
    while queue and len(seen) < limit:
        marking = queue.popleft()
        for t in net.transitions:
            if all(marking[index[p]] for p in inputs[t]):
                fired.add(t)
                after = list(marking)
                for p in inputs[t]:
                    after[index[p]] -= 1
                for p in outputs[t]:
                    after[index[p]] += 1
                unsafe = unsafe or max(after) > 1
                if tuple(after) not in seen:
                    seen.add(tuple(after))
                    queue.append(tuple(after))
    return unsafe, fired


def test_random_marked_graphs_agree_with_independent_checks() -> None:
    # Random nets in which every transition has two input and two output places: each answer is
    # checked by means that share no code with zoo.interchange.identify (networkx, explicit firing).
    rng = random.Random(15909)
    references: dict[int, list[nx.DiGraph]] = {}
    verdicts = set()
    for _ in range(400):
        n = rng.randint(2, 5)
        outs = [i for i in range(n) for _ in range(2)]
        ins = outs[:]
        rng.shuffle(ins)
        text = "\n".join(
            f"place p{j}: t{outs[j]} -> t{ins[j]} tokens {rng.choice([0, 0, 1])}"
            for j in range(2 * n)
        )
        net = parse_net_text(text, "r")
        answer = identify_net(net, use_catalog=False)
        graph = as_digraph(net)
        verdict = "cycloid" if answer.cycloid else (answer.reason or "").split(":")[0]
        verdicts.add(verdict)
        transitions = nx.DiGraph()
        transitions.add_nodes_from(net.transitions)
        pre, post = arcs_of(net)
        transitions.add_edges_from((pre[p], post[p]) for p in net.places)
        empty = nx.DiGraph(
            (pre[p], post[p]) for p, k in zip(net.places, net.tokens, strict=True) if k == 0
        )
        if verdict == "not strongly connected":
            assert not nx.is_strongly_connected(transitions)
            continue
        assert nx.is_strongly_connected(transitions), text
        if verdict == "not live":
            assert not nx.is_directed_acyclic_graph(empty)
            continue
        assert nx.is_directed_acyclic_graph(empty), text  # Commoner et al.: live
        unsafe, fired = _explore(net)
        assert fired == set(net.transitions)
        if verdict == "not safe":
            assert unsafe, text
            continue
        assert not unsafe, text
        if n not in references:
            references[n] = [independent_cycloid(q) for q in iter_parameter_sets(n)]
        matches = [g for g in references[n] if isomorphic(graph, g)]
        assert answer.cycloid == bool(matches), (text, answer.reason)
        if answer.cycloid:
            assert_mapping_is_isomorphism(net, answer)
    assert {"cycloid", "not live", "not safe", "not strongly connected"} <= verdicts


def test_place_bound_matches_simulation() -> None:
    # Commoner et al. 1971: in a live marked graph the bound of a place is the fewest tokens on a
    # cycle through it. Cycloids are 1-safe (docs/theory/cycles-and-tokens.md), so every bound is
    # exactly 1.
    for p in [ParameterSet(4, 2, 2, 3), ParameterSet(1, 10, 1, 5), ParameterSet(3, 3, 2, 2)]:
        net = build_net(p)
        assert {place_bound(net, j) for j in range(net.place_count)} == {1}


# --- the catalog: looked up, never built ---------------------------------------------------------


def test_without_a_catalog_identify_still_answers(tmp_path: Path) -> None:
    location = tmp_path / "missing" / "catalog.sqlite3"
    answer = identify_file(DATA / "pipeline-ring.pnml", catalog_lookup(str(location)))
    assert answer.cycloid and answer.class_id is None
    assert answer.catalog == f"no catalog at {location}"
    assert not location.parent.exists()  # nothing was created, not even the folder


def test_with_a_catalog_the_class_identifier_is_reported(tmp_path: Path) -> None:
    from zoo.catalog.service import Catalog

    location = str(tmp_path / "catalog.sqlite3")
    with Catalog.open(location, create=True) as catalog:
        build_catalog(catalog, 8)
        expected = catalog.get("C(1,2,1,1)").id
    answer = identify_file(DATA / "pipeline-ring.pnml", catalog_lookup(location))
    assert answer.class_id == expected and answer.catalog == expected
    assert answer.summary().endswith(
        f"C(1,2,1,1) = {expected}: area 3, 2 forward + 1 backward tokens"
    )
    beyond = identify_net(
        parse_pnml(pnml_document(build_net(ParameterSet(4, 2, 2, 3)))), catalog_lookup(location)
    )
    assert beyond.class_id is None and beyond.catalog == "beyond the catalog bound 8"


# --- command line --------------------------------------------------------------------------------

runner = CliRunner()


def test_identify_prints_one_line_per_file(tmp_path: Path) -> None:
    files = [DATA / "pipeline-ring.pnml", DATA / "dead-cycle.pnml", DATA / "arc-weights.pnml"]
    result = runner.invoke(app, ["identify", *map(str, files), "--no-catalog"])
    assert result.exit_code == NOT_A_CYCLOID, result.output
    lines = result.output.splitlines()
    assert lines == [
        f"{files[0]}: cycloid system C(1,2,1,1) (catalog not consulted): area 3, 2 forward + 1 "
        "backward tokens",
        f"{files[1]}: not a cycloid system: not live: the cycle advance2 -> free2 -> advance1 "
        "-> busy2 -> advance2 carries no token, so its transitions can never fire",
        f"{files[2]}: not a cycloid system: arc weights must all be 1, but arc 'e1' (a -> ab) "
        "has weight 2 (2 such arcs)",
    ]


def test_identify_json_gives_one_object_per_file(tmp_path: Path) -> None:
    files = [DATA / "pipeline-ring.mgraph", DATA / "not-marked-graph.pnml"]
    result = runner.invoke(
        app,
        ["identify", *map(str, files), "--format", "json", "--db", str(tmp_path / "none.sqlite3")],
    )
    assert result.exit_code == NOT_A_CYCLOID, result.output
    first, second = (json.loads(line) for line in result.output.splitlines())
    assert first["cycloid"] is True and first["id"] is None
    assert first["params"] == {"alpha": 1, "beta": 2, "gamma": 1, "delta": 1}
    assert first["catalog"].startswith("no catalog at ")
    assert set(first["mapping"]["transitions"]) == {"advance_0", "advance_1", "advance_2"}
    assert second["cycloid"] is False and second["params"] is None and second["id"] is None
    assert second["reason"].startswith("not a marked graph: place 'switch' has 1 input")


def test_identify_mapping_lines_and_unreadable_files(tmp_path: Path) -> None:
    result = runner.invoke(
        app,
        [
            "identify",
            str(DATA / "pipeline-ring.mgraph"),
            "--mapping",
            "--no-catalog",
            str(tmp_path / "gone.pnml"),
        ],
    )
    assert result.exit_code == 1
    assert "  transition advance_0 = t_" in result.output
    assert "  place busy_0 = " in result.output
    assert f"Error: {tmp_path / 'gone.pnml'}: no such file; check the path" in result.output


@pytest.mark.parametrize(
    ("fmt", "suffix", "start"),
    [
        ("pnml", ".pnml", "<?xml"),
        ("dot", ".dot", "// C(4,2,2,3)"),
        ("json", ".json", "{"),
        ("text", ".mgraph", "# C(4,2,2,3)"),
        ("svg", ".svg", "<"),
    ],
)
def test_export_writes_each_format(tmp_path: Path, fmt: str, suffix: str, start: str) -> None:
    by_option = tmp_path / f"a{suffix}"
    result = runner.invoke(app, ["export", "4,2,2,3", "--format", fmt, "--output", str(by_option)])
    assert result.exit_code == 0, result.output
    assert by_option.read_text().lstrip().startswith(start)
    by_suffix = tmp_path / f"b{suffix}"
    assert runner.invoke(app, ["export", "C(4,2,2,3)", "-o", str(by_suffix)]).exit_code == 0
    assert by_suffix.read_bytes() == by_option.read_bytes()
    if fmt in ("pnml", "text"):
        answer = identify_file(by_option, use_catalog=False)
        assert answer.params is not None and class_key(answer.params) == class_key(
            ParameterSet(4, 2, 2, 3)
        )


def test_export_of_a_class_identifier_uses_its_label(tmp_path: Path) -> None:
    from zoo.catalog.service import Catalog

    location = str(tmp_path / "catalog.sqlite3")
    with Catalog.open(location, create=True) as catalog:
        build_catalog(catalog, 5)
        entry = catalog.get("C(2,1,1,1)")
    result = runner.invoke(app, ["export", entry.id, "--db", location, "--format", "text"])
    assert result.exit_code == 0, result.output
    assert f"net {entry.label}\n" in result.output


def test_export_refuses_unknown_suffix_and_missing_catalog(tmp_path: Path) -> None:
    result = runner.invoke(app, ["export", "4,2,2,3", "-o", str(tmp_path / "x.doc")])
    assert result.exit_code == 1
    assert "Error: cannot tell the format from the suffix '.doc'" in result.output
    result = runner.invoke(app, ["export", "CY16-3", "--db", str(tmp_path / "no.sqlite3")])
    assert result.exit_code == 1
    assert "Error: no catalog at" in result.output


def test_stated_size_limits_match_the_constants() -> None:
    # docs/identify.md and zoo/interchange/netmodel.py quote the canonical-form limit; a cycloid
    # of area A has T + 2P = 5A encoding vertices (docs/architecture.md, canonical forms).
    from zoo.core.canonical import CANONICAL_LIMIT
    from zoo.interchange.netmodel import MAX_INPUT_BYTES

    largest_area = CANONICAL_LIMIT // 5
    page = (Path(__file__).resolve().parents[2] / "docs" / "identify.md").read_text("utf-8")
    assert f"up to {CANONICAL_LIMIT:,} encoding vertices" in page
    assert f"cycloids up to area {largest_area:,};" in page
    # The largest identifiable cycloid, exported by zoo itself, is far below the input limit.
    p = ParameterSet(1, 1, 1, largest_area - 1)
    assert p.area == largest_area
    assert 10 * len(pnml_document(build_net(p)).encode()) <= MAX_INPUT_BYTES


def test_json_of_a_fired_cycloid_names_the_class_and_the_firing(tmp_path: Path) -> None:
    # Issue 10 redefines this test: firing t_1_0 of C(4,2,2,3) used to give "not a cycloid
    # system" (not isomorphic to C(4,2,2,3)); the fired net is now recognised in a reachable
    # marking, with a one-step firing sequence in the file's names. Fewer transitions are enabled
    # than at the initial marking, so it is not an initial marking of any placement.
    exported = tmp_path / "a.mgraph"
    assert (
        runner.invoke(app, ["export", "4,2,2,3", "--format", "text", "-o", str(exported)]).exit_code
        == 0
    )
    net = parse_net_text(exported.read_text(), str(exported))
    marking = dict(zip(net.places, net.tokens, strict=True))
    fire_by_name(net, marking, "t_1_0")
    lines = [f"net {net.name} after t_1_0"]
    pre, post = arcs_of(net)
    for place, count in marking.items():
        lines.append(f"place {place}: {pre[place]} -> {post[place]} tokens {count}")
    fired = tmp_path / "fired.mgraph"
    fired.write_text("\n".join(lines) + "\n")
    result = runner.invoke(app, ["identify", str(fired), "--format", "json", "--no-catalog"])
    assert result.exit_code == 0, result.output
    answer = json.loads(result.output)
    assert answer["cycloid"] is True and answer["marking"] == "reachable"
    assert answer["label"] == str(_class_label_of(ParameterSet(4, 2, 2, 3)))
    assert len(answer["firing"]) == 1
    observables = answer["observables"]
    assert observables["transitions"] == 16 and observables["places"] == 32
    assert observables["tokens"] == 6
    foreign = read_net_file(fired)
    assert_reached(foreign, identify_net(foreign, use_catalog=False))
    text = runner.invoke(app, ["identify", str(fired), "--no-catalog"])
    assert text.exit_code == 0
    assert "in a reachable marking, 1 firing from the initial one" in text.output
    assert f"  firing: {answer['firing'][0]}" in text.output


def _class_label_of(p: ParameterSet) -> ParameterSet:
    members = [q for q in iter_parameter_sets(p.area) if class_key(q) == class_key(p)]
    return min(members)


def test_identify_explains_json_dot_and_empty_files(tmp_path: Path) -> None:
    for fmt in ("json", "dot"):
        assert (
            runner.invoke(
                app, ["export", "4,2,2,3", "--format", fmt, "-o", str(tmp_path / f"c.{fmt}")]
            ).exit_code
            == 0
        )
    empty = tmp_path / "empty.mgraph"
    empty.write_bytes(b"")
    blank = tmp_path / "blank.pnml"
    blank.write_bytes(b"\xef\xbb\xbf \n\n")
    result = runner.invoke(
        app,
        [
            "identify",
            "--no-catalog",
            str(tmp_path / "c.json"),
            str(tmp_path / "c.dot"),
            str(empty),
            str(blank),
        ],
    )
    assert result.exit_code == 1
    assert (
        f"Error: {tmp_path / 'c.json'} is JSON; JSON nets from zoo export are not read by "
        "identify, use PNML (zoo export --format pnml) or the net text format "
        "(--format text)"
    ) in result.output
    assert (
        f"Error: {tmp_path / 'c.dot'} is a Graphviz DOT file; DOT files are drawings, not "
        "read by identify"
    ) in result.output
    assert f"Error: {empty} is empty; give a PNML or net text file" in result.output
    assert f"Error: {blank} is empty; give a PNML or net text file" in result.output
    assert "no transitions" not in result.output


# --- reachable markings: the done-when of issue 10 ----------------------------------------------


def fired_at_random(document: bytes, rng: random.Random, steps: int) -> PlaceTransitionNet:
    """The net of a PNML document after ``steps`` random firings, each of an enabled transition
    chosen on the file's own net (no zoo code decides what is enabled)."""
    net = parse_pnml(document, "fired.pnml")
    marking = dict(zip(net.places, net.tokens, strict=True))
    pre, post = arcs_of(net)
    for _ in range(steps):
        enabled = [
            t for t in net.transitions if all(marking[p] for p in net.places if post[p] == t)
        ]
        fire_by_name(net, marking, rng.choice(enabled))
    return PlaceTransitionNet(
        source=net.source,
        name=net.name,
        places=net.places,
        transitions=net.transitions,
        tokens=tuple(marking[p] for p in net.places),
        arcs=net.arcs,
    )


def test_sampled_classes_up_to_area_30_are_recognised_after_random_firings() -> None:
    # Issue 10, done when: export a class, fire a random sequence, identify the file: the class
    # comes back with a valid firing sequence. A sample of classes (every class takes ~10 ms; the
    # benchmark covers them all), plus C(1,16,1,14), whose 2^14 automorphic placements send it to
    # the explicit search.
    rng = random.Random(1971)
    classes = list(class_representatives(MAX_AREA).values())
    sample = [*rng.sample(classes, 60), ParameterSet(1, 16, 1, 14)]
    kinds = set()
    for p in sample:
        document = scrambled(pnml_document(build_net(p)), rng)
        net = fired_at_random(document, rng, rng.randint(1, 2 * p.area))
        answer = identify_net(net, use_catalog=False)
        assert answer.cycloid, (p, answer.reason)
        assert answer.params is not None and class_key(answer.params) == class_key(p)
        assert_reached(net, answer)
        kinds.add(answer.marking)
    assert "reachable" in kinds


@given(
    values=st.tuples(*(st.integers(1, 4) for _ in range(4))).filter(
        lambda v: 2 <= v[0] * v[3] + v[1] * v[2] <= 12
    ),
    steps=st.integers(0, 30),
    rng=st.randoms(use_true_random=False),
)
@settings(max_examples=40, deadline=None)
def test_any_random_firing_sequence_is_recognised(
    values: tuple[int, ...], steps: int, rng: random.Random
) -> None:
    p = ParameterSet(*values)
    net = fired_at_random(pnml_document(build_net(p)).encode(), rng, steps)
    answer = identify_net(net, use_catalog=False)
    assert answer.cycloid, answer.reason
    assert answer.params is not None and class_key(answer.params) == class_key(p)
    assert_reached(net, answer)
    assert len(answer.firing) <= steps


def _live_markings(p: ParameterSet, rng: random.Random, count: int) -> list[tuple[int, ...]]:
    """Distinct markings of C(p)'s net with alpha + beta tokens on distinct places, drawn at
    random and kept when live (networkx: the places without tokens form no cycle, Commoner et
    al. 1971)."""
    net = build_net(p)
    found: set[tuple[int, ...]] = set()
    for _ in range(20_000):
        if len(found) == count:
            break
        chosen = set(rng.sample(range(net.place_count), p.alpha + p.beta))
        unmarked = nx.DiGraph()
        unmarked.add_nodes_from(range(net.transition_count))
        unmarked.add_edges_from(
            (net.pre[j], net.post[j]) for j in range(net.place_count) if j not in chosen
        )
        if nx.is_directed_acyclic_graph(unmarked):
            found.add(tuple(int(j in chosen) for j in range(net.place_count)))
    assert len(found) == count
    return sorted(found)


SMALL_NETS = [ParameterSet(3, 2, 1, 1), ParameterSet(2, 3, 1, 2), ParameterSet(3, 3, 1, 1)]


def test_live_markings_agree_with_explicit_reachability_up_to_isomorphism() -> None:
    # Marked-graph theorem (Commoner, Holt, Even, Pnueli 1971; Murata 1989 §V) against explicit
    # search: the marking is reachable under some isomorphism iff networkx finds a marking of the
    # cycloid's reachability graph (built from the definition) isomorphic to the file's marked
    # net. Refusals carry a directed circuit of the file whose token count differs.
    verdicts = set()
    for p in SMALL_NETS:
        net = build_net(p)
        reference = independent_cycloid(p)
        reachable = [marked_as(reference, m) for m in explicit_distances(reference)]
        arcs = parse_net_text(net_text(net)).arcs
        for marking in _live_markings(p, random.Random(p.area), 12):
            foreign = PlaceTransitionNet("m", "", net.places, net.transitions, marking, arcs)
            answer = identify_net(foreign, use_catalog=False)
            explicit = any(isomorphic(as_digraph(foreign), g) for g in reachable)
            if answer.cycloid and answer.params is not None:
                assert_reached(foreign, answer)  # reachable from the reported class's M0
                if class_key(answer.params) == class_key(p):
                    assert explicit
                    verdicts.add("reachable")
                continue
            assert not explicit, answer.reason
            assert answer.marking == "unreachable" and answer.circuit is not None
            assert answer.net_params is not None
            assert net_form(answer.net_params).text == net_form(p).text
            verdicts.add("unreachable")
            circuit = answer.circuit
            pre, post = arcs_of(foreign)
            tokens = dict(zip(foreign.places, marking, strict=True))
            places = list(circuit.places)
            for here, nxt in zip(places, places[1:] + places[:1], strict=True):
                assert post[here] == pre[nxt]  # a directed circuit of the file's net
            assert [pre[q] for q in places] == list(circuit.transitions)
            assert sum(tokens[q] for q in places) == circuit.tokens != circuit.initial_tokens
            assert answer.reason is not None and "not reachable" in answer.reason
    # C(3,2,1,1) and C(3,3,1,1) share their net with other classes (C(G,C,1,1) for one C + G),
    # whose initial markings some of the drawn markings are; C(2,3,1,2) gives refusals.
    assert {"reachable", "unreachable"} <= verdicts


def test_an_unreachable_marking_is_refused_with_its_circuit(tmp_path: Path) -> None:
    # Five tokens put down at random on the net of C(2,3,1,2) until it is live but no reachable
    # marking of the cycloid, built from the definition, is isomorphic to it (networkx):
    # identify must refuse it and name a circuit whose token count differs from the one it
    # carries at the initial marking.
    p = ParameterSet(2, 3, 1, 2)
    net = build_net(p)
    reference = independent_cycloid(p)
    reachable = [marked_as(reference, m) for m in explicit_distances(reference)]
    arcs = parse_net_text(net_text(net)).arcs
    chosen = next(
        m
        for m in _live_markings(p, random.Random(3), 10)
        if not any(
            isomorphic(
                as_digraph(PlaceTransitionNet("m", "", net.places, net.transitions, m, arcs)), g
            )
            for g in reachable
        )
    )
    lines = ["net loop"]
    for j, name in enumerate(net.places):
        lines.append(
            f"place {name}: {net.transitions[net.pre[j]]} -> {net.transitions[net.post[j]]} "
            f"tokens {chosen[j]}"
        )
    path = tmp_path / "loop.mgraph"
    path.write_text("\n".join(lines) + "\n")
    result = runner.invoke(app, ["identify", str(path), "--format", "json", "--no-catalog"])
    assert result.exit_code == NOT_A_CYCLOID, result.output
    answer = json.loads(result.output)
    assert answer["cycloid"] is False and answer["marking"] == "unreachable"
    assert answer["net_of"] == str(_class_label_of(p))
    circuit = answer["circuit"]
    assert circuit["tokens"] != circuit["initial_tokens"]
    tokens = dict(zip(net.places, chosen, strict=True))
    assert sum(tokens[q] for q in circuit["places"]) == circuit["tokens"]
    # The initial count is read through the mapping the answer gives (an unmarked isomorphism).
    label_net = build_net(_class_label_of(p))
    initial = dict(zip(label_net.places, label_net.tokens, strict=True))
    places = answer["mapping"]["places"]
    assert sum(initial[places[q]] for q in circuit["places"]) == circuit["initial_tokens"]
    assert answer["reason"].startswith(f"the net of {answer['net_of']} in a marking not reachable")
    text = runner.invoke(app, ["identify", str(path), "--no-catalog"])
    assert text.exit_code == NOT_A_CYCLOID
    assert f"carries {circuit['tokens']} token" in text.output
