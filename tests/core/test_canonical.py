"""Tests of zoo.core.canonical: nauty canonical forms against networkx, algebra and
docs/theory/README.md."""

from __future__ import annotations

import hashlib
import random
import sys
import warnings
from collections import defaultdict
from functools import cache
from math import factorial, gcd

import networkx as nx
import pynauty
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from networkx.algorithms.isomorphism import DiGraphMatcher
from sympy import divisor_count, divisor_sigma

from zoo.catalog.enumeration import iter_parameter_sets
from zoo.core import algebra
from zoo.core.canonical import (
    ENCODING_VERSION,
    CanonicalForm,
    _nauty_graph,
    canonical_form,
    encoding_graph,
    isomorphism,
    net_form,
    system_form,
)
from zoo.core.net import CycloidNet, MarkedGraph, build_net, to_networkx
from zoo.core.params import ParameterSet
from zoo.errors import FormatError, LimitExceeded, ZooError

C = ParameterSet


@cache
def net_of(p: ParameterSet) -> CycloidNet:
    return build_net(p)


@cache
def form_of(p: ParameterSet, marked: bool, typed: bool = False) -> CanonicalForm:
    return canonical_form(net_of(p), marked=marked, typed=typed)


def parameter_sets(max_area: int) -> list[ParameterSet]:
    return [p for a in range(2, max_area + 1) for p in iter_parameter_sets(a)]


# --- networkx references ---------------------------------------------------------------------


def reference_digraph(graph: MarkedGraph, colours: tuple[str, ...] | None = None) -> nx.DiGraph:
    g = to_networkx(graph)
    if colours is None and isinstance(graph, CycloidNet):
        colours = graph.kinds
    for j, name in enumerate(graph.places):
        g.nodes[name]["colour"] = colours[j] if colours is not None else ""
    return g


def node_match(marked: bool, typed: bool):  # type: ignore[no-untyped-def]
    def match(a: dict[str, object], b: dict[str, object]) -> bool:
        if a["kind"] != b["kind"]:
            return False
        if a["kind"] == "transition":
            return True
        if marked and a["tokens"] != b["tokens"]:
            return False
        return not typed or a["colour"] == b["colour"]

    return match


def nx_isomorphic(g1: MarkedGraph, g2: MarkedGraph, marked: bool, typed: bool = False) -> bool:
    """networkx's answer: a Weisfeiler-Lehman hash first (different hashes prove
    non-isomorphism), then VF2 with node-colour matching."""
    d1, d2 = reference_digraph(g1), reference_digraph(g2)
    for g in (d1, d2):
        for _node, data in g.nodes(data=True):
            data["wl"] = "|".join(
                [str(data["kind"]), str(data.get("tokens", "")) if marked else "",
                 str(data.get("colour", "")) if typed else ""]
            )  # fmt: skip
    with warnings.catch_warnings():  # networkx 3.5 notes that its directed hashes changed
        warnings.simplefilter("ignore", UserWarning)
        h1 = nx.weisfeiler_lehman_graph_hash(d1, node_attr="wl")
        h2 = nx.weisfeiler_lehman_graph_hash(d2, node_attr="wl")
    if h1 != h2:
        return False
    return bool(nx.is_isomorphic(d1, d2, node_match=node_match(marked, typed)))


def nx_automorphism_count(graph: MarkedGraph, marked: bool, typed: bool, cap: int = 10**5) -> int:
    """Automorphisms counted by VF2, or cap + 1 when there are more than cap."""
    g = reference_digraph(graph)
    matcher = DiGraphMatcher(g, g, node_match=node_match(marked, typed))
    count = 0
    for _ in matcher.isomorphisms_iter():
        count += 1
        if count > cap:
            break
    return count


# --- random marked graphs ---------------------------------------------------------------------


def random_marked_graph(rng: random.Random, n_t: int, n_p: int, max_tokens: int) -> MarkedGraph:
    pre = tuple(rng.randrange(n_t) for _ in range(n_p))
    post = tuple(rng.randrange(n_t) for _ in range(n_p))
    tokens = tuple(rng.randint(0, max_tokens) for _ in range(n_p))
    return MarkedGraph(
        tuple(f"t{i}" for i in range(n_t)), tuple(f"p{j}" for j in range(n_p)), pre, post, tokens
    )


def relabelled(graph: MarkedGraph, rng: random.Random) -> MarkedGraph:
    """The same net with transitions and places renamed and stored in a random order."""
    return relabelling(graph, rng)[0]


def relabelling(graph: MarkedGraph, rng: random.Random) -> tuple[MarkedGraph, list[int]]:
    """``relabelled`` and the new place order (new place k is old place order[k])."""
    t_order = list(range(graph.transition_count))
    p_order = list(range(graph.place_count))
    rng.shuffle(t_order)
    rng.shuffle(p_order)
    new_index = {old: new for new, old in enumerate(t_order)}
    other = MarkedGraph(
        tuple(f"x{rng.random():.12f}_{i}" for i in range(graph.transition_count)),
        tuple(f"y{rng.random():.12f}_{j}" for j in range(graph.place_count)),
        tuple(new_index[graph.pre[j]] for j in p_order),
        tuple(new_index[graph.post[j]] for j in p_order),
        tuple(graph.tokens[j] for j in p_order),
    )
    return other, p_order


def twin_rich_graph(rng: random.Random) -> MarkedGraph:
    """A random marked graph with many parallel places and interchangeable transitions."""
    base = random_marked_graph(rng, rng.randint(1, 4), rng.randint(0, 5), 1)
    copies = [rng.randint(1, 2) for _ in base.transitions]
    leaves = [[(t, c) for c in range(k)] for t, k in enumerate(copies)]
    index = {leaf: i for i, leaf in enumerate(x for group in leaves for x in group)}
    pre: list[int] = []
    post: list[int] = []
    tokens: list[int] = []
    for j in range(base.place_count):
        u, v = base.pre[j], base.post[j]
        pairs = (
            [(a, a) for a in leaves[u]]
            if u == v
            else [(a, b) for a in leaves[u] for b in leaves[v]]
        )
        for a, b in pairs:
            for _ in range(rng.randint(1, 2)):
                pre.append(index[a])
                post.append(index[b])
                tokens.append(base.tokens[j])
    return MarkedGraph(
        tuple(f"t{i}" for i in range(len(index))),
        tuple(f"p{j}" for j in range(len(pre))),
        tuple(pre),
        tuple(post),
        tuple(tokens),
    )


# --- pinned values of encoding v1 -------------------------------------------------------------


def test_pinned_v1_values() -> None:
    # Regression pins computed with encoding v1 (docs/canonical-encoding.md §4 examples);
    # a change here means a new encoding version, never an edit of these values.
    form = system_form(C(1, 1, 1, 1))
    assert form.text == "zoo-canon v1 system untyped T=2 P=4 | 0>1*0 0>1*0 1>0*1 1>0*1"
    assert form.fingerprint == (
        "v1:ec548c41dccace551085d4248e0b34830252dad1c7c812f1e596d460a5364992"
    )
    form = net_form(C(2, 1, 1, 1))
    assert form.text == "zoo-canon v1 net untyped T=3 P=6 | 0>1 0>2 1>0 1>2 2>0 2>1"
    assert form.fingerprint == (
        "v1:080fa565ef86e5e34857dcb55a01737d4455fcb96aa9587c498c5fed25ce6872"
    )
    assert system_form(C(4, 2, 2, 3)).fingerprint == (
        "v1:dc7ffa512b63a7a0ec9bebdcbc784f724325d1b0911ea1e8328eefa1e1390d56"
    )


def test_fingerprint_is_sha256_of_the_text() -> None:
    form = system_form(C(4, 2, 2, 3))
    assert ENCODING_VERSION == "v1"
    assert form.fingerprint == "v1:" + hashlib.sha256(form.text.encode("ascii")).hexdigest()
    assert form.text.startswith("zoo-canon v1 system untyped T=16 P=32 | ")


def test_text_is_a_net_isomorphic_to_the_input() -> None:
    # docs/canonical-encoding.md §4: each word of the text is a place
    for p in (C(4, 2, 2, 3), C(2, 2, 1, 3), C(1, 1, 1, 3), C(3, 2, 6, 6)):
        for marked in (True, False):
            form = form_of(p, marked)
            words = form.text.split(" | ")[1].split()
            pre, post, tokens = [], [], []
            for word in words:
                arc, _, count = word.partition("*")
                a, b = arc.split(">")
                pre.append(int(a))
                post.append(int(b))
                tokens.append(int(count) if marked else 0)
            rebuilt = MarkedGraph(
                tuple(f"t{i}" for i in range(p.area)),
                tuple(f"p{j}" for j in range(len(words))),
                tuple(pre),
                tuple(post),
                tuple(tokens) if marked else (0,) * len(words),
            )
            original = net_of(p)
            if not marked:
                original = MarkedGraph(
                    original.transitions, original.places, original.pre, original.post,
                    (0,) * original.place_count,
                )  # fmt: skip
            assert nx_isomorphic(rebuilt, original, marked=True), (p, marked)
            assert canonical_form(rebuilt, marked=marked).text == form.text


def test_labelling_matches_nauty_certificate() -> None:
    # Cross-check of how canon_label is read (position -> vertex): relabelling the encoding
    # graph by it gives exactly the graph in nauty's certificate (rows of setwords, bit 0 of a
    # row is the most significant bit of its first word; nauty user guide, "set" type).
    for p in (C(4, 2, 2, 3), C(3, 3, 2, 2), C(1, 1, 1, 5), C(2, 2, 1, 5)):
        encoding = encoding_graph(net_of(p), marked=True)
        graph = _nauty_graph(encoding)
        lab = pynauty.canon_label(graph)
        cert = pynauty.certificate(graph)
        n = encoding.vertex_count
        for wordsize in (64, 32):
            m = (n + wordsize - 1) // wordsize
            if len(cert) == n * m * wordsize // 8:
                break
        else:  # pragma: no cover
            pytest.fail(f"unexpected certificate length {len(cert)} for {n} vertices")
        step = wordsize // 8
        decoded = set()
        for i in range(n):
            for k in range(m):
                offset = (i * m + k) * step
                word = int.from_bytes(cert[offset : offset + step], sys.byteorder)
                for bit in range(wordsize):
                    if word >> (wordsize - 1 - bit) & 1:
                        decoded.add((i, k * wordsize + bit))
        position = {v: i for i, v in enumerate(lab)}
        relabelled_edges = set()
        for u, v in encoding.edges:
            relabelled_edges.add((position[u], position[v]))
            relabelled_edges.add((position[v], position[u]))
        assert decoded == relabelled_edges, p


# --- nauty against networkx ------------------------------------------------------------------


def test_nauty_agrees_with_vf2_on_random_cycloid_pairs() -> None:
    # Reference: networkx VF2 with node-colour matching, both levels (issue 2 item 8)
    rng = random.Random(20261201)
    by_area = {a: list(iter_parameter_sets(a)) for a in range(4, 15)}
    pairs = [(C(4, 2, 2, 3), C(2, 4, 3, 2)), (C(3, 3, 1, 3), C(3, 3, 2, 2)),
             (C(3, 3, 1, 3), C(3, 3, 3, 1)), (C(3, 2, 1, 1), C(4, 1, 1, 1))]  # fmt: skip
    for _ in range(120):
        members = by_area[rng.choice(list(by_area))]
        p = rng.choice(members)
        # half the time a partner with the same token counts, where the question is hard
        same = [q for q in members if {q.alpha, q.beta} == {p.alpha, p.beta}]
        pairs.append((p, rng.choice(same if rng.random() < 0.5 else members)))
    outcomes = set()
    for p, q in pairs:
        for marked in (True, False):
            expected = nx_isomorphic(net_of(p), net_of(q), marked)
            assert (form_of(p, marked).text == form_of(q, marked).text) == expected, (p, q)
            outcomes.add((marked, expected))
    assert outcomes == {(True, True), (True, False), (False, True), (False, False)}


def test_nauty_agrees_with_vf2_on_random_foreign_graphs() -> None:
    rng = random.Random(7)
    for _ in range(150):
        if rng.random() < 0.5:
            g1 = twin_rich_graph(rng)
        else:
            g1 = random_marked_graph(rng, rng.randint(1, 6), rng.randint(0, 9), 2)
        if rng.random() < 0.5:
            g2 = relabelled(g1, rng)
        else:  # a small change: move one arc end or one token
            j = rng.randrange(g1.place_count) if g1.place_count else None
            post = list(g1.post)
            tokens = list(g1.tokens)
            if j is not None:
                if rng.random() < 0.5:
                    post[j] = rng.randrange(g1.transition_count)
                else:
                    tokens[j] = 1 - min(tokens[j], 1)
            g2 = relabelled(
                MarkedGraph(g1.transitions, g1.places, g1.pre, tuple(post), tuple(tokens)), rng
            )
        for marked in (True, False):
            expected = nx_isomorphic(g1, g2, marked)
            f1, f2 = canonical_form(g1, marked), canonical_form(g2, marked)
            assert (f1.text == f2.text) == expected
            if expected:
                assert f1.automorphisms == f2.automorphisms


def test_automorphism_counts_against_networkx() -> None:
    # Exact group orders against automorphisms counted by VF2 on small nets, all four levels
    # (VF2 lists each automorphism, about a millisecond apiece, so the unmarked untyped nets of
    # C(1,1,c,d) with 2^A * A of them stop at area 5)
    examples = [C(2, 2, 1, 3), C(2, 2, 2, 2), C(3, 3, 1, 3), C(3, 3, 2, 2), C(4, 2, 2, 3)]
    for p in parameter_sets(7) + examples:
        for marked in (True, False):
            for typed in (True, False):
                if not marked and not typed and p.area > 5 and p not in examples:
                    continue
                expected = nx_automorphism_count(net_of(p), marked, typed)
                assert form_of(p, marked, typed).automorphisms == expected, (p, marked, typed)
    rng = random.Random(3)
    for _ in range(25):
        g = twin_rich_graph(rng)
        for marked in (True, False):
            counted = nx_automorphism_count(g, marked, False, cap=300)
            order = canonical_form(g, marked).automorphisms
            assert order == counted if counted <= 300 else order > 300


def test_typed_automorphisms_are_translations() -> None:
    # docs/theory/state-counts.md [VERIFIED parameters <= 4, A <= 16]: a typed net has exactly A
    # automorphisms, a typed marked system exactly gcd(alpha, beta)
    for p in parameter_sets(16):
        assert form_of(p, False, True).automorphisms == p.area, p
        assert form_of(p, True, True).automorphisms == gcd(p.alpha, p.beta), p


def test_large_groups_are_exact() -> None:
    # 15 disjoint rings of 3 transitions: Aut = (Z_3 wr S_15) unmarked, S_15 with one token per
    # ring; both orders pass 10^10, where nauty's double is no longer exact.
    rings = 15
    pre = tuple(3 * r + i for r in range(rings) for i in range(3))
    post = tuple(3 * r + (i + 1) % 3 for r in range(rings) for i in range(3))
    tokens = tuple(1 if i == 0 else 0 for r in range(rings) for i in range(3))
    g = MarkedGraph(
        tuple(f"t{i}" for i in range(3 * rings)),
        tuple(f"p{j}" for j in range(3 * rings)),
        pre,
        post,
        tokens,
    )
    assert canonical_form(g, marked=True).automorphisms == factorial(rings)
    assert canonical_form(g, marked=False).automorphisms == 3**rings * factorial(rings)
    # C(1,1,1,199): A parallel pairs of places, swapped independently (twin bundles); the
    # untyped net also turns (A rotations): 2^A and 2^A * A
    p = C(1, 1, 1, 199)
    assert system_form(p).automorphisms == 2**200
    assert net_form(p).automorphisms == 2**200 * 200


# --- invariance under relabelling (Hypothesis) --------------------------------------------------


small_cycloids = st.builds(
    ParameterSet,
    st.integers(1, 4),
    st.integers(1, 4),
    st.integers(1, 4),
    st.integers(1, 4),
)


@settings(max_examples=60, deadline=None)
@given(p=small_cycloids, seed=st.integers(0, 2**32 - 1))
def test_canonical_text_is_invariant_under_relabelling(p: ParameterSet, seed: int) -> None:
    rng = random.Random(seed)
    net = net_of(p)
    other, place_order = relabelling(net, rng)
    for marked in (True, False):
        assert canonical_form(other, marked).text == form_of(p, marked).text
    colours = tuple(net.kinds[j] for j in place_order)  # the kinds travel with their places
    for marked in (True, False):
        typed = canonical_form(other, marked, typed=True, place_colours=colours)
        assert typed.text == form_of(p, marked, True).text


@settings(max_examples=60, deadline=None)
@given(seed=st.integers(0, 2**32 - 1))
def test_foreign_canonical_text_is_invariant_under_relabelling(seed: int) -> None:
    rng = random.Random(seed)
    g = twin_rich_graph(rng) if seed % 2 else random_marked_graph(rng, rng.randint(1, 8), 10, 2)
    other = relabelled(g, rng)
    for marked in (True, False):
        f1, f2 = canonical_form(g, marked), canonical_form(other, marked)
        assert f1.text == f2.text and f1.automorphisms == f2.automorphisms
        found = isomorphism(g, other, marked)
        assert found is not None
        t_map, p_map = found
        assert sorted(t_map) == list(range(g.transition_count))
        assert sorted(p_map) == list(range(g.place_count))
        for j, k in enumerate(p_map):
            assert other.pre[k] == t_map[g.pre[j]] and other.post[k] == t_map[g.post[j]]
            assert not marked or other.tokens[k] == g.tokens[j]


# --- docs/theory/isomorphism.md
# ---------------------------------------------------------------------------


@pytest.mark.parametrize("k", [2, 3, 4, 5, 6])
def test_exceptional_family(k: int) -> None:
    # docs/theory/isomorphism.md [VERIFIED A <= 40]: C(2,2,1,2k-1) ~ C(2,2,2,2k-2) as nets and
    # systems,
    # although their lattices differ also after the swap
    p, q = C(2, 2, 1, 2 * k - 1), C(2, 2, 2, 2 * k - 2)
    assert algebra.lattice_key(p) not in (algebra.lattice_key(q), algebra.lattice_key(q.swap()))
    assert system_form(p).fingerprint == system_form(q).fingerprint
    assert net_form(p).fingerprint == net_form(q).fingerprint
    # C(1,2k+1,1,2k-1) has the lattice of C(2,2,1,2k-1): net-isomorphic, not as systems
    r = C(1, 2 * k + 1, 1, 2 * k - 1)
    assert algebra.lattice_key(r) == algebra.lattice_key(p)
    assert net_form(r).fingerprint == net_form(q).fingerprint
    assert system_form(r).fingerprint != system_form(q).fingerprint
    if k <= 3:  # independent reference
        assert nx_isomorphic(net_of(p), net_of(q), marked=True)
        assert nx_isomorphic(net_of(r), net_of(q), marked=False)
        assert not nx_isomorphic(net_of(r), net_of(q), marked=True)


def test_c1513_and_c2222() -> None:
    # docs/theory/isomorphism.md: C(1,5,1,3) vs C(2,2,2,2) net-isomorphic but not system-isomorphic
    p, q = C(1, 5, 1, 3), C(2, 2, 2, 2)
    assert net_form(p).text == net_form(q).text
    assert system_form(p).text != system_form(q).text
    assert nx_isomorphic(net_of(p), net_of(q), marked=False)
    assert not nx_isomorphic(net_of(p), net_of(q), marked=True)


def test_same_net_different_systems() -> None:
    # docs/theory/check-values.md further check values: C(3,2,1,1), C(2,3,1,1), C(4,1,1,1),
    # C(1,4,1,1) are
    # the same net with different markings; the first two are one class by the swap
    nets = {net_form(p).text for p in (C(3, 2, 1, 1), C(2, 3, 1, 1), C(4, 1, 1, 1), C(1, 4, 1, 1))}
    assert len(nets) == 1
    systems = [system_form(p).text for p in (C(3, 2, 1, 1), C(2, 3, 1, 1), C(4, 1, 1, 1))]
    assert systems[0] == systems[1] != systems[2]


def test_swap_symmetry() -> None:
    # docs/theory/isomorphism.md swap symmetry: C(a,b,c,d) ~ C(b,a,d,c) as systems
    for p in parameter_sets(12):
        assert form_of(p, True).text == form_of(p.swap(), True).text, p


def test_typed_net_classes_per_area() -> None:
    # docs/theory/lattice-key.md [VERIFIED A <= 24]: sigma(A) - tau(A) typed net classes of area A
    # (OEIS
    # A065608, from memory; the terms are computed here with sympy, not pasted); equal to the
    # number of distinct lattice keys (docs/theory/isomorphism.md: typed isomorphism <=> equal
    # lattices)
    for a in range(2, 25):
        members = list(iter_parameter_sets(a))
        typed = {form_of(p, False, True).fingerprint for p in members}
        keys = {algebra.lattice_key(p) for p in members}
        assert len(typed) == int(divisor_sigma(a)) - int(divisor_count(a)) == len(keys), a


def test_nauty_classes_equal_algebraic_classes() -> None:
    # docs/theory/isomorphism.md / docs/theory/isomorphism.md [VERIFIED with nauty for A <= 60
    # there]: the partition of
    # every area into nauty classes equals the one by algebra.class_key, likewise frames and
    # algebra.frame_key, and typed readings and algebra.reading_key
    for a in range(2, 31):
        members = list(iter_parameter_sets(a))
        checks = (
            (lambda p: form_of(p, True).fingerprint, algebra.class_key),
            (lambda p: form_of(p, False).fingerprint, algebra.frame_key),
        )
        for by_nauty, by_algebra in checks:
            nauty_blocks: dict[object, set[ParameterSet]] = defaultdict(set)
            algebra_blocks: dict[object, set[ParameterSet]] = defaultdict(set)
            for p in members:
                nauty_blocks[by_nauty(p)].add(p)
                algebra_blocks[by_algebra(p)].add(p)
            nauty_partition = {frozenset(b) for b in nauty_blocks.values()}
            algebra_partition = {frozenset(b) for b in algebra_blocks.values()}
            assert nauty_partition == algebra_partition, a


# --- isomorphism helper and errors ------------------------------------------------------------


def test_isomorphism_of_swap_pair() -> None:
    g1, g2 = net_of(C(4, 2, 2, 3)), net_of(C(2, 4, 3, 2))
    found = isomorphism(g1, g2)
    assert found is not None
    t_map, p_map = found
    for j, k in enumerate(p_map):
        assert g2.pre[k] == t_map[g1.pre[j]] and g2.post[k] == t_map[g1.post[j]]
        assert g2.tokens[k] == g1.tokens[j]
        # docs/theory/isomorphism.md: the swap exchanges the kinds
        assert g2.kinds[k] != g1.kinds[j]
    assert isomorphism(g1, g2, typed=True) is None
    assert isomorphism(net_of(C(3, 3, 1, 3)), net_of(C(3, 3, 2, 2))) is None


def test_empty_and_tiny_graphs() -> None:
    empty = MarkedGraph((), (), (), (), ())
    form = canonical_form(empty)
    assert form.text == "zoo-canon v1 system untyped T=0 P=0 | "
    assert form.automorphisms == 1 and form.labelling == ()
    lone = MarkedGraph(("a", "b", "c"), (), (), (), ())
    assert canonical_form(lone).automorphisms == 6


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: canonical_form("C(4,2,2,3)"), "needs a MarkedGraph, got str"),  # type: ignore[arg-type]
        (
            lambda: canonical_form(MarkedGraph(("a",), ("p",), (0,), (0,), (1,)), typed=True),
            "needs a colour per place",
        ),
        (
            lambda: canonical_form(
                MarkedGraph(("a",), ("p",), (0,), (0,), (1,)), typed=True, place_colours=("x y",)
            ),
            "place colour 'x y' is not allowed",
        ),
        (
            lambda: canonical_form(
                MarkedGraph(("a",), ("p",), (0,), (0,), (1,)), typed=True, place_colours=("a", "b")
            ),
            "2 place colours were given for the net with 1 transition",
        ),
        (
            lambda: canonical_form(net_of(C(1, 1, 1, 1)), place_colours=("a",) * 4),
            "only count for a typed canonical form",
        ),
    ],
)
def test_wrong_input_gives_one_line_errors(call, message: str) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(ZooError) as info:
        call()
    assert isinstance(info.value, FormatError)
    assert message in str(info.value) and "\n" not in str(info.value)


def test_canonical_limit() -> None:
    # CANONICAL_LIMIT = 6,000 encoding vertices: a cycloid of area 1,201 has 6,005
    with pytest.raises(LimitExceeded) as info:
        system_form(C(1, 1, 1, 1200))
    assert str(info.value) == (
        "the canonical form of C(1,1,1,1200) needs 6,005 nauty vertices, more than the limit "
        "6,000; choose a smaller net"
    )
