"""Canonical forms of marked graphs with nauty: a portable canonical text and its fingerprint.

Two marked graphs get the same canonical text iff they are isomorphic: a bijection of
transitions and of places that keeps every arc, and with ``marked=True`` also the initial
tokens, and with ``typed=True`` also the place colours (forward/backward for a cycloid). The
levels are those of docs/theory/isomorphism.md: ``system_form`` (marked, untyped) decides classes,
``net_form`` (unmarked, untyped) decides frames.

The net goes to nauty (McKay and Piperno, "Practical graph isomorphism II", J. Symbolic
Computation 60 (2014), the nauty that pynauty ships, one run per form: ``zoo.core.nautycall``)
as an *undirected* coloured graph, because nauty's directed mode is pathologically slow on
these nets (docs/architecture.md): a vertex per transition, and each place split into a tail
vertex (adjacent to its input transition) and a head vertex (adjacent to its output transition)
joined by an edge. The text is read off nauty's canonical labelling and never contains nauty's
raw certificate, whose bytes depend on the machine word size. docs/canonical-encoding.md is
the normative description; ``ENCODING_VERSION`` names it.
"""

from __future__ import annotations

import hashlib
import re
from collections.abc import Sequence
from dataclasses import dataclass
from math import factorial

import numpy as np
import numpy.typing as npt

from zoo.core import nautycall
from zoo.core.net import CycloidNet, MarkedGraph, build_net
from zoo.core.params import ParameterSet
from zoo.errors import FormatError, LimitExceeded

#: Version of the canonical encoding (docs/canonical-encoding.md, "Version history"). Any
#: change to the text of any graph is a new version.
ENCODING_VERSION = "v1"

#: Largest net (transitions + 2 * places) handed to nauty: area 1,200 for a cycloid. Dense
#: nauty's time grows steeply with size and symmetry; measured on the 2-core machine:
#: C(20,20,20,20) (area 800) 1.6 s, C(30,30,30,30) (area 1,800) 25 s, the asymmetric
#: C(3,7,300,301) (area 3,003) 7 s and C(7,11,400,401) (area 7,207) 98 s.
CANONICAL_LIMIT = 6_000

_COLOUR = re.compile(r"[A-Za-z0-9_.-]+")


@dataclass(frozen=True)
class CanonicalForm:
    """The canonical form of a marked graph at one level (docs/canonical-encoding.md).

    ``text`` is the portable canonical string, ``fingerprint`` is ``"v1:" + sha256(text)``,
    ``automorphisms`` the exact order of the automorphism group at that level, and
    ``labelling[i]`` the vertex of the encoding graph at canonical position i.
    """

    text: str
    fingerprint: str
    automorphisms: int
    labelling: tuple[int, ...]


TransitionLabel = tuple[int, ...]  # () for one transition, (k,) + member label for k twins
PlaceLabel = tuple[str, int, int]  # (colour, tokens, parallel copies)


@dataclass(frozen=True)
class EncodingGraph:
    """The undirected coloured graph handed to nauty (docs/canonical-encoding.md §3).

    It encodes the *reduced* net: parallel equal places bundled, twin transitions merged
    (``reduce_twins``). Vertex i < T' is reduced transition i; T' + j is the tail and
    T' + P' + j the head of reduced place j. ``cells`` is the ordered colour partition and
    ``cell_labels`` names each cell. ``leaves[i]`` lists the original transitions that reduced
    transition i stands for, in their hierarchical order; ``twin_factor`` is the number of
    automorphisms that the reduction removed (the product of k! over every bundle and class).
    """

    transition_count: int
    place_count: int
    edges: tuple[tuple[int, int], ...]
    cells: tuple[tuple[int, ...], ...]
    cell_labels: tuple[tuple[object, ...], ...]
    leaves: tuple[tuple[int, ...], ...]
    twin_factor: int

    @property
    def vertex_count(self) -> int:
        return self.transition_count + 2 * self.place_count


@dataclass(frozen=True)
class ReducedNet:
    """A marked graph with parallel equal places bundled and twin transitions merged.

    A reduced place (pre, post, label) with pre != post stands for ``label[2]`` parallel places
    of colour ``label[0]`` with ``label[1]`` tokens from *every* original transition of ``pre``
    to *every* one of ``post``; with pre == post, for that many loops at each of them.
    """

    labels: tuple[TransitionLabel, ...]
    places: tuple[tuple[int, int, PlaceLabel], ...]
    leaves: tuple[tuple[int, ...], ...]
    twin_factor: int


def _place_colours(
    graph: MarkedGraph, typed: bool, place_colours: Sequence[str] | None
) -> tuple[str, ...]:
    if not typed:
        if place_colours is not None:
            raise FormatError(
                "place colours only count for a typed canonical form; pass typed=True or drop them"
            )
        return ("",) * graph.place_count
    if place_colours is None:
        if isinstance(graph, CycloidNet):
            return graph.kinds
        raise FormatError(
            f"a typed canonical form of {graph.describe()} needs a colour per place; "
            "pass place_colours=(...) or a cycloid net"
        )
    if isinstance(place_colours, str):
        raise FormatError("place colours must be a sequence of names, one per place, not one text")
    colours = tuple(place_colours)
    if len(colours) != graph.place_count:
        raise FormatError(
            f"{len(colours)} place colours were given for {graph.describe()}; "
            "give one colour per place"
        )
    for colour in colours:
        if not isinstance(colour, str) or not _COLOUR.fullmatch(colour):
            raise FormatError(
                f"place colour {colour!r} is not allowed; use letters, digits, '_', '.' or '-'"
            )
    return colours


def reduce_twins(graph: MarkedGraph, place_keys: Sequence[tuple[str, int]]) -> ReducedNet:
    """Bundle parallel equal places, then merge twin transitions until none are left.

    Twins are transitions with equal labels and equal incidences (same colour, tokens and far
    end of every place); any permutation of a twin class is an automorphism, so
    |Aut(net)| = twin_factor * |Aut(reduced net)| and the reduced net, with its labels, is
    isomorphic to another reduced net iff the nets are (docs/canonical-encoding.md §2). nauty
    needs this: a class of k twins costs it a search-tree level per generator, and cycloids with
    (1,-1) or (2,-2) in the lattice have A or A/2 of them (measured: 0.9 s at area 200 without,
    under 5 ms with).
    """
    factor = 1
    bundles: dict[tuple[int, int, str, int], int] = {}
    for j, (colour, tokens) in enumerate(place_keys):
        key = (graph.pre[j], graph.post[j], colour, tokens)
        bundles[key] = bundles.get(key, 0) + 1
    places = []
    for (pre, post, colour, tokens), copies in bundles.items():
        places.append((pre, post, (colour, tokens, copies)))
        factor *= factorial(copies)
    labels: list[TransitionLabel] = [()] * graph.transition_count
    leaves: list[tuple[int, ...]] = [(t,) for t in range(graph.transition_count)]
    while True:
        incident: list[list[tuple[int, int, PlaceLabel]]] = [[] for _ in labels]
        for pre, post, place_label in places:
            if pre == post:
                incident[pre].append((0, -1, place_label))
            else:
                incident[pre].append((2, post, place_label))
                incident[post].append((1, pre, place_label))
        classes: dict[tuple[object, ...], list[int]] = {}
        for t, t_label in enumerate(labels):
            classes.setdefault((t_label, tuple(sorted(incident[t]))), []).append(t)
        if len(classes) == len(labels):
            break
        new_id = [0] * len(labels)
        new_labels: list[TransitionLabel] = []
        new_leaves: list[tuple[int, ...]] = []
        for members in classes.values():
            for t in members:
                new_id[t] = len(new_labels)
            if len(members) == 1:
                new_labels.append(labels[members[0]])
                new_leaves.append(leaves[members[0]])
            else:
                new_labels.append((len(members), *labels[members[0]]))
                new_leaves.append(tuple(leaf for t in members for leaf in leaves[t]))
                factor *= factorial(len(members))
        # Places from or to the members of a class coincide after the merge (the class is a
        # module: every member has the same incidences), so a set removes exactly those.
        places = list(dict.fromkeys((new_id[pre], new_id[post], lab) for pre, post, lab in places))
        labels, leaves = new_labels, new_leaves
    return ReducedNet(tuple(labels), tuple(places), tuple(leaves), factor)


def encoding_graph(
    graph: MarkedGraph,
    marked: bool = True,
    typed: bool = False,
    place_colours: Sequence[str] | None = None,
) -> EncodingGraph:
    """The undirected coloured graph that encodes ``graph`` for nauty (docs/architecture.md).

    Cells, in this order: reduced transitions by label; tails by place label; heads by place
    label; labels in increasing order (docs/canonical-encoding.md §3).
    """
    if not isinstance(graph, MarkedGraph):
        raise FormatError(
            f"a canonical form needs a MarkedGraph, got {type(graph).__name__}; "
            "build one with zoo.core.net.build_net or read a net file"
        )
    colours = _place_colours(graph, typed, place_colours)
    n_t, n_p = graph.transition_count, graph.place_count
    if n_t + 2 * n_p > CANONICAL_LIMIT:
        raise LimitExceeded(
            f"the canonical form of {graph.describe()} needs {n_t + 2 * n_p:,} nauty vertices, "
            f"more than the limit {CANONICAL_LIMIT:,}; choose a smaller net"
        )
    tokens = graph.tokens if marked else (0,) * n_p
    reduced = reduce_twins(graph, tuple(zip(colours, tokens, strict=True)))
    r_t, r_p = len(reduced.labels), len(reduced.places)
    edges: list[tuple[int, int]] = []
    place_cells: dict[PlaceLabel, list[int]] = {}
    for j, (pre, post, place_label) in enumerate(reduced.places):
        tail, head = r_t + j, r_t + r_p + j
        edges.append((pre, tail))
        edges.append((tail, head))
        edges.append((post, head))
        place_cells.setdefault(place_label, []).append(j)
    transition_cells: dict[TransitionLabel, list[int]] = {}
    for t, t_label in enumerate(reduced.labels):
        transition_cells.setdefault(t_label, []).append(t)
    cells: list[tuple[int, ...]] = []
    cell_labels: list[tuple[object, ...]] = []
    for t_label in sorted(transition_cells):
        cells.append(tuple(transition_cells[t_label]))
        cell_labels.append(("transition", t_label))
    order = sorted(place_cells)
    for side, offset in (("tail", r_t), ("head", r_t + r_p)):
        for p_label in order:
            cells.append(tuple(offset + j for j in place_cells[p_label]))
            cell_labels.append((side, p_label))
    return EncodingGraph(
        r_t,
        r_p,
        tuple(edges),
        tuple(cells),
        tuple(cell_labels),
        reduced.leaves,
        reduced.twin_factor,
    )


def _nauty_input(
    encoding: EncodingGraph,
) -> tuple[int, list[int], list[int], list[set[int]]]:
    """(n, tails, heads, cells) of the encoding for ``nautycall.canonical_run``.

    The cells are sets, read in their iteration order as pynauty reads its ``vertex_coloring``,
    so the labelling is the one pynauty's ``canon_label`` gives for ``_nauty_graph``.
    """
    tails = [u for u, _ in encoding.edges]
    heads = [v for _, v in encoding.edges]
    return encoding.vertex_count, tails, heads, [set(cell) for cell in encoding.cells]


def _nauty_graph(encoding: EncodingGraph) -> object:
    """The pynauty graph of the encoding: the outside reference in tests and benchmarks."""
    import pynauty

    adjacency: dict[int, list[int]] = {}
    for u, v in encoding.edges:
        adjacency.setdefault(u, []).append(v)
    return pynauty.Graph(
        encoding.vertex_count,
        directed=False,
        adjacency_dict=adjacency,
        vertex_coloring=[set(cell) for cell in encoding.cells],
    )


def _exact_group_order(
    run: nautycall.NautyRun,
    graph: nautycall.NautyInput,
    encoding: EncodingGraph,
) -> int:
    """The exact order of the automorphism group of the encoding graph.

    With ``run.exact`` the order is nauty's double itself (``nautycall.NautyRun.exact``).
    Otherwise it is recomputed exactly by Schreier-Sims (sympy) on the generators (the
    fallback's, or a second nauty run on ``graph`` = (n, tails, heads, cells)), restricted to
    transitions and tails, on which the group acts faithfully (each head hangs on exactly one
    tail), and checked against nauty's estimate.
    """
    if run.exact:
        return int(run.grpsize1)
    from sympy.combinatorics import Permutation, PermutationGroup

    generators = run.generators
    if generators is None:
        generators = nautycall.automorphism_generators(*graph)
    keep = encoding.transition_count + encoding.place_count
    perms = [Permutation([g[i] for i in range(keep)]) for g in generators]
    order = int(PermutationGroup(perms).order())
    approx = run.grpsize1 * 10.0**run.grpsize2
    if abs(order - approx) > 1e-9 * approx:  # a disagreement would be a bug in one of the two
        raise ArithmeticError(f"group order {order} disagrees with nauty's {approx:g}")
    return order


def _canonical_numbering(encoding: EncodingGraph, labelling: Sequence[int]) -> list[int]:
    """Canonical number of every original transition: reduced transitions in canonical order,
    each expanded into its leaves in their hierarchical order."""
    number = [0] * sum(len(leaves) for leaves in encoding.leaves)
    next_number = 0
    for vertex in labelling[: encoding.transition_count]:  # transition cells come first
        for leaf in encoding.leaves[vertex]:
            number[leaf] = next_number
            next_number += 1
    return number


def _canonical_text(
    graph: MarkedGraph,
    number: Sequence[int],
    place_keys: Sequence[tuple[str, int]],
    marked: bool,
    typed: bool,
) -> tuple[str, list[int]]:
    """The canonical text and the places in canonical order (docs/canonical-encoding.md §4)."""
    entries = sorted(
        (number[graph.pre[j]], number[graph.post[j]], key[1], key[0], j)
        for j, key in enumerate(place_keys)
    )
    words = []
    for pre, post, tokens, colour, _j in entries:
        word = f"{pre}>{post}"
        if marked:
            word += f"*{tokens}"
        if typed:
            word += f"/{colour}"
        words.append(word)
    level = "system" if marked else "net"
    typing = "typed" if typed else "untyped"
    header = (
        f"zoo-canon {ENCODING_VERSION} {level} {typing} "
        f"T={graph.transition_count} P={graph.place_count}"
    )
    return header + " | " + " ".join(words), [entry[4] for entry in entries]


def canonical_form(
    graph: MarkedGraph,
    marked: bool = True,
    typed: bool = False,
    place_colours: Sequence[str] | None = None,
) -> CanonicalForm:
    """The canonical form of a marked graph (docs/canonical-encoding.md).

    ``marked`` keeps the initial tokens; ``typed`` keeps the place colours: ``place_colours``
    (one short name per place) or, for a cycloid net, its forward/backward kinds.
    ``labelling`` lists the vertices of the plain encoding (transition i is vertex i, the tail
    of place j is T + j, its head T + P + j) in canonical order.

    >>> from zoo.core.params import ParameterSet
    >>> net = build_net(ParameterSet(4, 2, 2, 3))
    >>> form = canonical_form(net)
    >>> form.text.split(" | ")[0], form.automorphisms
    ('zoo-canon v1 system untyped T=16 P=32', 2)
    >>> canonical_form(net, typed=True).automorphisms  # gcd(4, 2), docs/theory/state-counts.md
    2
    """
    encoding = encoding_graph(graph, marked, typed, place_colours)
    colours = _place_colours(graph, typed, place_colours)
    tokens = graph.tokens if marked else (0,) * graph.place_count
    place_keys = tuple(zip(colours, tokens, strict=True))
    nauty_input = _nauty_input(encoding)
    run = nautycall.canonical_run(*nauty_input)
    reduced_labelling = run.labelling
    order = _exact_group_order(run, nauty_input, encoding)
    number = _canonical_numbering(encoding, reduced_labelling)
    text, place_order = _canonical_text(graph, number, place_keys, marked, typed)
    n_t, n_p = graph.transition_count, graph.place_count
    transitions_in_order = sorted(range(n_t), key=number.__getitem__)
    labelling = (
        tuple(transitions_in_order)
        + tuple(n_t + j for j in place_order)
        + tuple(n_t + n_p + j for j in place_order)
    )
    fingerprint = f"{ENCODING_VERSION}:{hashlib.sha256(text.encode('ascii')).hexdigest()}"
    return CanonicalForm(text, fingerprint, order * encoding.twin_factor, labelling)


# --- the fast path for cycloids: nauty's input straight from the lattice algebra -------------

_Ints = npt.NDArray[np.int64]


@dataclass(frozen=True)
class CycloidForm:
    """The canonical text, fingerprint and group order of a cycloid, computed without a net.

    Equal to the ``text``, ``fingerprint`` and ``automorphisms`` of ``canonical_form`` on
    ``build_net(p)`` (checked in tests/catalog/test_classify_fast.py); it has no labelling
    because its transitions are numbered on the lattice grid, not as in the net.
    """

    text: str
    fingerprint: str
    automorphisms: int


def _grid_incidence(p: ParameterSet, marked: bool) -> tuple[_Ints, _Ints, _Ints]:
    """(pre, post, tokens) of the net of C(p), transitions numbered on the Hermite grid.

    The transitions are the points (xi, eta), 0 <= xi < A/g, 0 <= eta < g, of the lattice key
    (A, g, r) (docs/theory/lattice-key.md), numbered eta * A/g + xi; the forward place of a
    point goes to (xi + 1, eta), the backward place to (xi, eta + 1), which the basis vector
    (r, g) reduces to (xi - r, 0) on the top row. A place is marked iff the level
    L = beta*xi + alpha*eta of its output transition, taken mod A (L is A on (gamma, delta) and 0
    on (alpha, -beta), so it is well defined), lies in 1..beta (forward) or 1..alpha (backward),
    as in ``build_net`` (docs/theory/initial-marking.md). Forward places are 0..A-1 (place j
    leaves transition j), backward places A..2A-1 (place A + j leaves transition j).
    """
    from zoo.core.algebra import lattice_key

    key = lattice_key(p)
    a, g, period, r = key.area, key.g, key.period, key.r
    own = np.arange(a)
    forward = own + 1  # (xi + 1, eta), wrapping at the end of each row
    forward[period - 1 :: period] -= period
    backward = own + period  # (xi, eta + 1), and (xi - r, 0) from the top row
    backward[a - period :] = (np.arange(period) - r) % period
    pre = np.concatenate((own, own))
    post = np.concatenate((forward, backward))
    if not marked:
        return pre, post, np.zeros(2 * a, dtype=np.int64)
    alpha, beta = p.alpha, p.beta
    levels = np.add.outer(alpha * np.arange(g), beta * np.arange(period)).ravel()
    # L mod A in 1..beta iff (L - 1) mod A < beta, as beta < A (likewise alpha).
    tokens = np.concatenate(((levels + (beta - 1)) % a < beta, (levels + (alpha - 1)) % a < alpha))
    return pre, post, tokens.astype(np.int64)


def _may_have_twins(p: ParameterSet) -> bool:
    """Whether ``reduce_twins`` may change the net of C(p); False proves it would not.

    Every transition t has one forward output place (to t + (1,0)) and one backward output
    place (to t + (0,1)), and both maps are bijections. Parallel equal places need
    t + (1,0) = t + (0,1), so (1,-1) in the lattice; twins t != t' need equal output sets, so
    t + (1,0) = t' + (0,1) and t + (0,1) = t' + (1,0), whence (2,-2) in the lattice, which
    (1,-1) implies too (docs/canonical-encoding.md §2).
    """
    from zoo.core.algebra import lattice_key

    return lattice_key(p).contains((2, -2))


def _grid_nauty_input(pre: _Ints, post: _Ints, tokens: _Ints, a: int) -> nautycall.NautyInput:
    """(n, tails, heads, cells) of the encoding of a twin-free net, as arrays.

    The same graph as ``encoding_graph`` gives (one transition cell, then tails and heads by
    place label, labels ascending: tokens 0 before 1) up to the order of vertices inside a
    cell, which a canonical labelling does not see: transition t is vertex t, the tail of place
    j is a + j and its head 3a + j.
    """
    places = 2 * a
    tail = np.arange(a, a + places)
    head = tail + places
    tails = np.concatenate((pre, tail, head))
    heads = np.concatenate((tail, head, post))
    marked = tokens.astype(bool)
    cells = [np.arange(a)]
    for side in (tail, head):
        cells.extend(cell for cell in (side[~marked], side[marked]) if len(cell))
    return a + 2 * places, tails, heads, cells


def cycloid_form(p: ParameterSet, marked: bool = True) -> CycloidForm:
    """The untyped canonical form of C(p) (marked: the system; else the net), fast.

    The same text, fingerprint and automorphism count as ``canonical_form(build_net(p),
    marked)``, computed from the lattice algebra with arrays: no net object, no per-node Python
    objects. Nets with twins (lattices holding (1,-1) or (2,-2), docs/canonical-encoding.md §2)
    take the general reduction.

    >>> form = cycloid_form(ParameterSet(4, 2, 2, 3))
    >>> form.fingerprint == system_form(ParameterSet(4, 2, 2, 3)).fingerprint
    True
    """
    a = p.area
    if 5 * a > CANONICAL_LIMIT:
        raise LimitExceeded(
            f"the canonical form of C{p.as_tuple()} needs {5 * a:,} nauty vertices, more than "
            f"the limit {CANONICAL_LIMIT:,}; choose a smaller net"
        )
    pre, post, tokens = _grid_incidence(p, marked)
    if _may_have_twins(p):
        net = MarkedGraph(
            tuple(f"t{i}" for i in range(a)),
            tuple(f"p{j}" for j in range(2 * a)),
            tuple(pre.tolist()),
            tuple(post.tolist()),
            tuple(tokens.tolist()),
        )
        form = canonical_form(net, marked=marked)
        return CycloidForm(form.text, form.fingerprint, form.automorphisms)
    nauty_input = _grid_nauty_input(pre, post, tokens, a)
    run = nautycall.canonical_run(*nauty_input)
    order = _exact_group_order(run, nauty_input, EncodingGraph(a, 2 * a, (), (), (), (), 1))
    number = np.empty(a, dtype=np.int64)
    number[run.labelling[:a]] = np.arange(a)  # the transition cell comes first
    source, target = number[pre], number[post]
    entries = np.lexsort((tokens, target, source))  # places sorted by (pre, post, tokens)
    pairs = zip(source[entries].tolist(), target[entries].tolist(), strict=True)
    if marked:
        words = [f"{x}>{y}*{z}" for (x, y), z in zip(pairs, tokens[entries].tolist(), strict=True)]
    else:
        words = [f"{x}>{y}" for x, y in pairs]
    level = "system" if marked else "net"
    text = f"zoo-canon {ENCODING_VERSION} {level} untyped T={a} P={2 * a} | " + " ".join(words)
    fingerprint = f"{ENCODING_VERSION}:{hashlib.sha256(text.encode('ascii')).hexdigest()}"
    return CycloidForm(text, fingerprint, order)


def system_form(p: ParameterSet) -> CanonicalForm:
    """Canonical form of the marked system C(p), places untyped: decides classes
    (docs/theory/isomorphism.md)."""
    return canonical_form(build_net(p), marked=True)


def net_form(p: ParameterSet) -> CanonicalForm:
    """Canonical form of the unmarked net of C(p), places untyped: decides frames
    (docs/theory/isomorphism.md)."""
    return canonical_form(build_net(p), marked=False)


def isomorphism(
    g1: MarkedGraph,
    g2: MarkedGraph,
    marked: bool = True,
    typed: bool = False,
    colours1: Sequence[str] | None = None,
    colours2: Sequence[str] | None = None,
) -> tuple[tuple[int, ...], tuple[int, ...]] | None:
    """An explicit isomorphism from g1 to g2, or None when they are not isomorphic.

    Returns (transition map, place map): ``transition_map[i]`` is the transition of g2 that
    transition i of g1 goes to, likewise for places. The map is read off the two canonical
    labellings and checked arc by arc before it is returned (``isomorphism_from_forms``).
    """
    form1 = canonical_form(g1, marked, typed, colours1)
    form2 = canonical_form(g2, marked, typed, colours2)
    return isomorphism_from_forms(g1, form1, g2, form2, marked, typed, colours1, colours2)


def isomorphism_from_forms(
    g1: MarkedGraph,
    form1: CanonicalForm,
    g2: MarkedGraph,
    form2: CanonicalForm,
    marked: bool = True,
    typed: bool = False,
    colours1: Sequence[str] | None = None,
    colours2: Sequence[str] | None = None,
) -> tuple[tuple[int, ...], tuple[int, ...]] | None:
    """The isomorphism g1 -> g2 read off two canonical forms already computed, or None.

    ``form1`` and ``form2`` must be the forms of g1 and g2 at the level given by ``marked``,
    ``typed`` and the colours; unequal texts mean "not isomorphic". Equal texts give the map
    that sends the vertex at each canonical position of g1's encoding to the vertex at the same
    position of g2's (transitions first, then the tails of the places:
    docs/canonical-encoding.md), checked arc by arc. Callers that already hold both forms
    (``zoo.interchange.identify``) use this directly: nauty is the expensive part, and on large
    symmetric nets one call takes seconds.
    """
    if form1.text != form2.text:
        return None
    n_t, n_p = g1.transition_count, g1.place_count
    vertex_map = [0] * (n_t + 2 * n_p)
    for v1, v2 in zip(form1.labelling, form2.labelling, strict=True):
        vertex_map[v1] = v2
    transition_map = tuple(vertex_map[:n_t])
    place_map = tuple(vertex_map[n_t + j] - n_t for j in range(n_p))
    keys1 = _place_colours(g1, typed, colours1)
    keys2 = _place_colours(g2, typed, colours2)
    for j, k in enumerate(place_map):
        if (
            not 0 <= k < n_p
            or g2.pre[k] != transition_map[g1.pre[j]]
            or g2.post[k] != transition_map[g1.post[j]]
            or keys2[k] != keys1[j]
            or (marked and g2.tokens[k] != g1.tokens[j])
        ):
            raise ArithmeticError(f"canonical labellings of equal forms disagree at place {j}")
    if sorted(transition_map) != list(range(n_t)) or sorted(place_map) != list(range(n_p)):
        raise ArithmeticError("equal canonical forms but the vertex map is not a bijection")
    return transition_map, place_map
