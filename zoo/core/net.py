"""Explicit nets: the place/transition net of a cycloid system, and marked graphs in general.

A *marked graph* (T-system) is a Petri net in which every place has exactly one input and one
output transition; a cycloid system C(alpha, beta, gamma, delta) is one ([RS24] introduction,
docs/theory/petri-space.md, docs/theory/folding.md, docs/theory/equivalence.md,
docs/theory/initial-marking.md). ``MarkedGraph`` holds any such net, also foreign ones read from
files;
``build_net`` builds the cycloid's own net with the naming of docs/architecture.md:

* transition ``t_{xi}_{eta}`` for every point (xi, eta) of the half-open fundamental
  parallelogram ``0 <= delta*xi - gamma*eta < A, 0 <= beta*xi + alpha*eta < A``
  (docs/theory/equivalence.md),
  in sorted order of (xi, eta), the order of ``algebra.parallelogram_points``;
* places ``f_{xi}_{eta}`` (forward, to the representative of (xi+1, eta)) at indices 0..A-1 and
  ``b_{xi}_{eta}`` (backward, to the representative of (xi, eta+1)) at indices A..2A-1, both
  in the order of their input transition;
* the initial marking in the convention-free form of docs/theory/initial-marking.md: a forward
  place is marked
  iff its output transition t has L(t) mod A in {1..beta}, a backward place iff L(t) mod A in
  {1..alpha}, where L(xi, eta) = beta*xi + alpha*eta.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property
from typing import TYPE_CHECKING

from zoo.core.params import ParameterSet
from zoo.errors import FormatError, LimitExceeded

if TYPE_CHECKING:
    import networkx as nx

Point = tuple[int, int]

#: Largest area (number of transitions) ``build_net`` accepts. An explicit net of this size
#: builds in well under a second; beyond it the closed formulas of zoo.core.invariants are the tool.
NET_LIMIT = 20_000

FORWARD = "forward"
BACKWARD = "backward"


def _is_index_tuple(values: object, bound: int) -> bool:
    return isinstance(values, tuple) and all(type(v) is int and 0 <= v < bound for v in values)


@dataclass(frozen=True)
class MarkedGraph:
    """A marked graph: every place has exactly one input and one output transition.

    ``pre[i]`` and ``post[i]`` are the indices of the input and output transition of place i,
    ``tokens[i]`` its initial tokens. Names are unique over transitions and places together, so
    that a node is known by its name alone (networkx, file formats). Validated on construction;
    a malformed net raises ``FormatError``.

    >>> g = MarkedGraph(("a", "b"), ("p", "q"), (0, 1), (1, 0), (1, 0))
    >>> g.input_places(1), g.output_places(1)
    ((0,), (1,))
    """

    transitions: tuple[str, ...]
    places: tuple[str, ...]
    pre: tuple[int, ...]
    post: tuple[int, ...]
    tokens: tuple[int, ...]

    def __post_init__(self) -> None:
        for field in ("transitions", "places", "pre", "post", "tokens"):
            if not isinstance(getattr(self, field), tuple):
                raise FormatError(
                    f"marked graph field {field} must be a tuple, "
                    f"got {type(getattr(self, field)).__name__}; pass tuple(...)"
                )
        names = self.transitions + self.places
        if not all(isinstance(name, str) and name for name in names):
            raise FormatError(
                "every transition and place of a marked graph needs a non-empty text name"
            )
        if len(set(names)) != len(names):
            seen: set[str] = set()
            duplicate = ""
            for name in names:
                if name in seen:
                    duplicate = name
                    break
                seen.add(name)
            raise FormatError(
                f"node name {duplicate!r} is used twice in the marked graph; "
                "transition and place names must all be distinct"
            )
        n_places = len(self.places)
        for field in ("pre", "post", "tokens"):
            if len(getattr(self, field)) != n_places:
                raise FormatError(
                    f"marked graph has {n_places} places but {len(getattr(self, field))} "
                    f"entries in {field}; give one entry per place"
                )
        n_transitions = len(self.transitions)
        for field in ("pre", "post"):
            if not _is_index_tuple(getattr(self, field), n_transitions):
                raise FormatError(
                    f"marked graph field {field} must hold transition indices "
                    f"0..{n_transitions - 1} (each place has one input and one output transition)"
                )
        if not all(type(k) is int and k >= 0 for k in self.tokens):
            raise FormatError("initial tokens of a marked graph must be whole numbers >= 0")

    @property
    def transition_count(self) -> int:
        return len(self.transitions)

    @property
    def place_count(self) -> int:
        return len(self.places)

    @property
    def token_count(self) -> int:
        """Tokens of the initial marking in total."""
        return sum(self.tokens)

    @cached_property
    def _presets(self) -> tuple[tuple[int, ...], ...]:
        found: list[list[int]] = [[] for _ in self.transitions]
        for place, t in enumerate(self.post):
            found[t].append(place)
        return tuple(tuple(places) for places in found)

    @cached_property
    def _postsets(self) -> tuple[tuple[int, ...], ...]:
        found: list[list[int]] = [[] for _ in self.transitions]
        for place, t in enumerate(self.pre):
            found[t].append(place)
        return tuple(tuple(places) for places in found)

    def input_places(self, transition: int) -> tuple[int, ...]:
        """Indices of the places whose output transition is ``transition`` (its preset)."""
        return self._presets[transition]

    def output_places(self, transition: int) -> tuple[int, ...]:
        """Indices of the places whose input transition is ``transition`` (its postset)."""
        return self._postsets[transition]

    def describe(self) -> str:
        """A short name for messages."""
        t, p = self.transition_count, self.place_count
        return (
            f"the net with {t} transition{'s' if t != 1 else ''} "
            f"and {p} place{'s' if p != 1 else ''}"
        )


@dataclass(frozen=True)
class CycloidNet(MarkedGraph):
    """The explicit net of the cycloid system C(params) (docs/theory/folding.md,
    docs/theory/equivalence.md, docs/theory/initial-marking.md).

    ``coordinates[i]`` is the representative (xi, eta) of transition i in the fundamental
    parallelogram; ``kinds[j]`` is ``"forward"`` or ``"backward"`` for place j.
    """

    params: ParameterSet
    coordinates: tuple[Point, ...]
    kinds: tuple[str, ...]

    def __post_init__(self) -> None:
        super().__post_init__()
        if not isinstance(self.params, ParameterSet):
            raise FormatError(f"a cycloid net needs a ParameterSet, got {self.params!r}")
        if len(self.coordinates) != self.transition_count or len(self.kinds) != self.place_count:
            raise FormatError(
                f"the net of {self.params} needs one coordinate pair per transition and one "
                "kind per place"
            )
        if not set(self.kinds) <= {FORWARD, BACKWARD}:
            raise FormatError(f"place kinds of {self.params} must be 'forward' or 'backward'")

    def describe(self) -> str:
        return str(self.params)

    @cached_property
    def _index_of(self) -> dict[Point, int]:
        return {point: i for i, point in enumerate(self.coordinates)}

    def transition_at(self, point: Point) -> int:
        """Index of the transition that the Petri-space point folds onto
        (docs/theory/equivalence.md)."""
        return self._index_of[_representative(self.params, point)]


def _representative(p: ParameterSet, x: Point) -> Point:
    # Same arithmetic as algebra.representative, inlined because build_net calls it 2A times.
    a = p.area
    xi, eta = x
    m = (p.delta * xi - p.gamma * eta) // a
    n = (p.beta * xi + p.alpha * eta) // a
    return (xi - m * p.alpha - n * p.gamma, eta + m * p.beta - n * p.delta)


def fundamental_points(p: ParameterSet) -> list[Point]:
    """The A points of the half-open fundamental parallelogram, sorted (docs/theory/equivalence.md).

    The same set and order as ``algebra.parallelogram_points``, found row by row in O(A): for a
    fixed eta the two conditions bound xi to an interval. [Checked equal to
    algebra.parallelogram_points in tests/core/test_net.py.]
    """
    alpha, beta, gamma, delta = p.as_tuple()
    a = p.area
    points: list[Point] = []
    # The vertices O, P, P+R, R have eta = 0, -beta, delta-beta, delta.
    for eta in range(-beta, delta + 1):
        lo = max(-((-gamma * eta) // delta), -((alpha * eta) // beta))  # ceil divisions
        hi = min((a + gamma * eta - 1) // delta, (a - alpha * eta - 1) // beta)
        points.extend((xi, eta) for xi in range(lo, hi + 1))
    points.sort()
    return points


def build_net(p: ParameterSet) -> CycloidNet:
    """Build the explicit net of the cycloid system C(p), named as in docs/architecture.md.

    Refuses areas above ``NET_LIMIT`` with ``LimitExceeded``.

    >>> net = build_net(ParameterSet(4, 2, 2, 3))
    >>> net.transition_count, net.place_count, net.token_count
    (16, 32, 6)
    >>> net.places[net.pre.index(net.transitions.index("t_1_0"))]
    'f_1_0'
    """
    if not isinstance(p, ParameterSet):
        raise FormatError(
            f"build_net needs a ParameterSet, got {type(p).__name__}; use parse_params('4,2,2,3')"
        )
    a = p.area
    if a > NET_LIMIT:
        raise LimitExceeded(
            f"the net of {p} has {a:,} transitions, more than the explicit-net limit "
            f"{NET_LIMIT:,}; choose a smaller system or use the closed formulas"
        )
    points = fundamental_points(p)
    index = {point: i for i, point in enumerate(points)}
    alpha, beta = p.alpha, p.beta
    forward_post: list[int] = []
    backward_post: list[int] = []
    forward_tokens: list[int] = []
    backward_tokens: list[int] = []
    for xi, eta in points:
        ahead = _representative(p, (xi + 1, eta))
        level = beta * ahead[0] + alpha * ahead[1]  # in [0, A) on a representative
        forward_post.append(index[ahead])
        forward_tokens.append(1 if 1 <= level <= beta else 0)
        above = _representative(p, (xi, eta + 1))
        level = beta * above[0] + alpha * above[1]
        backward_post.append(index[above])
        backward_tokens.append(1 if 1 <= level <= alpha else 0)
    names = tuple(f"{xi}_{eta}" for xi, eta in points)
    own = tuple(range(a))
    return CycloidNet(
        transitions=tuple("t_" + name for name in names),
        places=tuple("f_" + name for name in names) + tuple("b_" + name for name in names),
        pre=own + own,
        post=tuple(forward_post) + tuple(backward_post),
        tokens=tuple(forward_tokens) + tuple(backward_tokens),
        params=p,
        coordinates=tuple(points),
        kinds=(FORWARD,) * a + (BACKWARD,) * a,
    )


def to_networkx(graph: MarkedGraph) -> nx.DiGraph:
    """The net as a ``networkx.DiGraph`` with transition and place nodes named as in the net.

    Every node has ``kind`` ("transition" or "place"); places have ``tokens``. For a cycloid net
    transitions also carry ``coordinates`` (xi, eta) and places ``direction`` ("forward" or
    "backward"). The graph attribute ``marking`` lists the marked places; a cycloid net also
    carries ``params`` (alpha, beta, gamma, delta) and ``label`` (``C(4,2,2,3)``).

    >>> g = to_networkx(build_net(ParameterSet(4, 2, 2, 3)))
    >>> g.graph["label"], g.graph["params"], len(g.graph["marking"])
    ('C(4,2,2,3)', (4, 2, 2, 3), 6)
    """
    import networkx as nx

    if not isinstance(graph, MarkedGraph):
        raise FormatError(f"to_networkx needs a MarkedGraph, got {type(graph).__name__}")
    result = nx.DiGraph()
    cycloid = graph if isinstance(graph, CycloidNet) else None
    result.graph["marking"] = tuple(
        name for name, tokens in zip(graph.places, graph.tokens, strict=True) if tokens
    )
    if cycloid is not None:
        result.graph["params"] = cycloid.params.as_tuple()
        result.graph["label"] = str(cycloid.params)
    for i, name in enumerate(graph.transitions):
        if cycloid is not None:
            result.add_node(name, kind="transition", coordinates=cycloid.coordinates[i])
        else:
            result.add_node(name, kind="transition")
    for j, name in enumerate(graph.places):
        if cycloid is not None:
            result.add_node(name, kind="place", tokens=graph.tokens[j], direction=cycloid.kinds[j])
        else:
            result.add_node(name, kind="place", tokens=graph.tokens[j])
        result.add_edge(graph.transitions[graph.pre[j]], name)
        result.add_edge(name, graph.transitions[graph.post[j]])
    return result
