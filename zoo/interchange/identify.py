"""Identification of foreign nets: is this net a cycloid system, which one, and how do they match?

A net read from a file (``zoo.interchange.netfile``) is put through the definition of a cycloid
system step by step (docs/identify.md), so that a net which is not one gets the first rule it breaks
as its answer:

1. every arc has weight 1 (docs/theory/petri-space.md: the Petri space is an ordinary net);
2. it is a marked graph: every place has exactly one input and one output transition (§1);
3. every transition has two input and two output places (§1);
4. no place holds more than one token initially, the net is strongly connected, and every
   cycle carries a token (live) (§3.2);
5. synthesis by the robust method of docs/theory/synthesis.md: A = |T|, the token counts (alpha +
beta
   tokens, min(alpha, beta) transitions enabled, docs/theory/initial-marking.md) and the minimal
   cycle length
   give the candidate parameter sets (``zoo.core.synthesis.synthesize``); a candidate is accepted
   only when its canonical form equals the net's (``zoo.core.canonical``);
6. when no candidate is accepted, the reason is the first of: a place can come to hold two
   tokens (not 1-safe), more tokens than transitions, transitions that are not all alike, no
   cycloid with these observables, not isomorphic to the ones that have them.
7. when no candidate is accepted as drawn, the marking may still be a *reachable* one: the
   unmarked net is compared with the nets of every class of A transitions, alpha + beta tokens
   and the same minimal cycle length, and for a match the marking is tested against every
   placement of the initial marking that the net's automorphisms allow, by token counts on
   circuits (``zoo.core.markings``: Commoner, Holt, Even and Pnueli 1971). A reachable marking
   is reported with a shortest firing sequence from the initial marking, checked by firing it
   on the file's own net; an unreachable one with a circuit whose token count differs.

Identification goes by canonical form, so names and the order of elements in the file never
change the answer. The accepted class is reported by its label (its smallest member), its
catalog identifier when a catalog holds it (looked up, never built), and an explicit
isomorphism from the foreign net onto the label's net with the coordinate names of
docs/architecture.md.
"""

from __future__ import annotations

import os
from collections import Counter, deque
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace

from zoo.core.net import CycloidNet, MarkedGraph
from zoo.core.params import ParameterSet
from zoo.core.structure import find_cycle, first_unreached
from zoo.interchange.netfile import read_net_file
from zoo.interchange.netmodel import PLACE, PlaceTransitionNet

#: Largest net for which the quadratic diagnostics run (safeness by token distances, the
#: shortest cycle through every transition). They only sharpen the reason a net is *not* a
#: cycloid; a larger net still gets a correct answer, with a less specific reason.
DIAGNOSTIC_LIMIT = 2_000

_SHOWN_CYCLE = 8


@dataclass(frozen=True)
class Observables:
    """The net-level numbers synthesis starts from (docs/theory/synthesis.md)."""

    transitions: int
    places: int
    tokens: int
    enabled: int
    loop: int | None  # length of a shortest cycle (through the first transition)

    def as_dict(self) -> dict[str, int | None]:
        return {
            "transitions": self.transitions,
            "places": self.places,
            "tokens": self.tokens,
            "enabled": self.enabled,
            "loop": self.loop,
        }


@dataclass(frozen=True)
class Identification:
    """The answer for one net: a cycloid system (with class and mapping) or the reason it is not.

    ``params`` is the class label (smallest member parameter set); ``synthesized`` are the
    candidates of the robust synthesis; ``transition_map`` and ``place_map`` pair each foreign
    element name with the coordinate name in ``build_net(params)``.
    """

    source: str
    cycloid: bool
    reason: str | None = None
    params: ParameterSet | None = None
    class_id: str | None = None
    catalog: str = "catalog not consulted"
    synthesized: tuple[ParameterSet, ...] = ()
    observables: Observables | None = None
    transition_map: tuple[tuple[str, str], ...] = field(default=())
    place_map: tuple[tuple[str, str], ...] = field(default=())
    marking: str | None = None  # "initial", "reachable" or "unreachable"
    firing: tuple[str, ...] = ()
    net_params: ParameterSet | None = None  # the class whose net it is, marking unreachable
    net_class_id: str | None = None
    circuit: Circuit | None = None
    #: What the file reader had to assume (from ``PlaceTransitionNet.warnings``).
    warnings: tuple[str, ...] = ()

    def as_dict(self) -> dict[str, object]:
        """JSON-ready form (docs/identify.md lists the keys)."""
        p = self.params
        return {
            "file": self.source,
            "cycloid": self.cycloid,
            "params": None
            if p is None
            else {"alpha": p.alpha, "beta": p.beta, "gamma": p.gamma, "delta": p.delta},
            "label": None if p is None else str(p),
            "id": self.class_id,
            "catalog": self.catalog,
            "reason": self.reason,
            "warnings": list(self.warnings),
            "synthesized": [str(q) for q in self.synthesized],
            "observables": None if self.observables is None else self.observables.as_dict(),
            "mapping": None
            if not self.transition_map
            else {
                "transitions": dict(self.transition_map),
                "places": dict(self.place_map),
            },
            "marking": self.marking,
            "firing": list(self.firing) if self.cycloid else None,
            "net_of": None if self.net_params is None else str(self.net_params),
            "net_id": self.net_class_id,
            "circuit": None if self.circuit is None else self.circuit.as_dict(),
        }

    def summary(self) -> str:
        """One line: ``FILE: cycloid system C(...), class ID`` or ``FILE: not a cycloid ...``."""
        if not self.cycloid or self.params is None:
            return f"{self.source}: not a cycloid system: {self.reason}"
        p = self.params
        where = f"= {self.class_id}" if self.class_id else f"({self.catalog})"
        state = ""
        if self.marking == "reachable":
            count = len(self.firing)
            state = (
                f" in a reachable marking, {count} firing{'s' if count != 1 else ''} from "
                "the initial one"
            )
        return (
            f"{self.source}: cycloid system {p} {where}{state}: area {p.area}, "
            f"{p.beta} forward + {p.alpha} backward tokens"
        )


@dataclass(frozen=True)
class Circuit:
    """A directed circuit of the file's net whose token count differs from the one it carries
    under the cycloid's initial marking (mapped by ``Identification.transition_map``'s
    unmarked isomorphism): the evidence that a marking is not reachable."""

    transitions: tuple[str, ...]
    places: tuple[str, ...]
    tokens: int
    initial_tokens: int

    def as_dict(self) -> dict[str, object]:
        return {
            "transitions": list(self.transitions),
            "places": list(self.places),
            "tokens": self.tokens,
            "initial_tokens": self.initial_tokens,
        }

    def text(self) -> str:
        nodes: list[str] = []
        for t, place in zip(self.transitions, self.places, strict=True):
            nodes += [t, place]
        if len(nodes) > 2 * _SHOWN_CYCLE:
            shown = " -> ".join(nodes[: 2 * _SHOWN_CYCLE]) + f" -> ... ({len(self.places)} places)"
        else:
            shown = " -> ".join([*nodes, self.transitions[0]])
        return shown


class _NotCycloid(Exception):
    """Internal: carries the one-line reason a net is not a cycloid system."""

    def __init__(
        self,
        reason: str,
        synthesized: tuple[ParameterSet, ...] = (),
        observables: Observables | None = None,
    ) -> None:
        super().__init__(reason)
        self.reason = reason
        # Filled once the net has passed the structural checks (docs/identify.md), so that
        # the JSON answer shows the numbers its reason quotes.
        self.synthesized = synthesized
        self.observables = observables
        self.unreachable: Identification | None = None


# --- structural checks ---------------------------------------------------------------------


def _names(names: Sequence[str], limit: int = 3) -> str:
    shown = ", ".join(repr(n) for n in names[:limit])
    return shown + (", ..." if len(names) > limit else "")


def marked_graph_of(net: PlaceTransitionNet) -> MarkedGraph:
    """The net as a ``MarkedGraph``, or ``_NotCycloid`` naming the first rule 1-3 it breaks."""
    if not net.transitions:
        raise _NotCycloid("the net has no transitions (a cycloid has at least 2)")
    heavy = [arc for arc in net.arcs if arc.weight != 1]
    if heavy:
        arc = heavy[0]
        raise _NotCycloid(
            f"arc weights must all be 1, but {arc.where} ({arc.source} -> {arc.target}) has "
            f"weight {arc.weight}" + (f" ({len(heavy)} such arcs)" if len(heavy) > 1 else "")
        )
    pairs = Counter((arc.source, arc.target) for arc in net.arcs)
    doubled = [pair for pair, count in pairs.items() if count > 1]
    if doubled:
        source, target = doubled[0]
        raise _NotCycloid(
            f"arc weights must all be 1, but {source} -> {target} is drawn "
            f"{pairs[doubled[0]]} times, which makes an arc of weight {pairs[doubled[0]]}"
        )
    kind_of = {name: PLACE for name in net.places}
    inputs: dict[str, list[str]] = {name: [] for name in net.places}
    outputs: dict[str, list[str]] = {name: [] for name in net.places}
    for arc in net.arcs:
        if kind_of.get(arc.target) == PLACE:
            inputs[arc.target].append(arc.source)
        else:
            outputs[arc.source].append(arc.target)
    for name in net.places:
        ins, outs = inputs[name], outputs[name]
        if len(ins) != 1 or len(outs) != 1:
            raise _NotCycloid(
                f"not a marked graph: place {name!r} has {_count(len(ins), 'input')}"
                f"{' (' + _names(ins) + ')' if ins else ''} and {_count(len(outs), 'output')}"
                f"{' (' + _names(outs) + ')' if outs else ''}; every place of a marked graph "
                "has exactly one input and one output transition"
            )
    index = {name: i for i, name in enumerate(net.transitions)}
    pre = tuple(index[inputs[name][0]] for name in net.places)
    post = tuple(index[outputs[name][0]] for name in net.places)
    in_degree = Counter(post)
    out_degree = Counter(pre)
    for i, name in enumerate(net.transitions):
        if in_degree[i] != 2 or out_degree[i] != 2:
            raise _NotCycloid(
                f"transition {name!r} has {in_degree[i]} input and {out_degree[i]} output "
                "places; every transition of a cycloid has exactly 2 of each"
            )
    return MarkedGraph(net.transitions, net.places, pre, post, net.tokens)


def _count(n: int, what: str) -> str:
    if n == 0:
        return f"no {what} transition"
    return f"{n} {what} transition{'s' if n != 1 else ''}"


def _successors(graph: MarkedGraph) -> list[list[tuple[int, int]]]:
    """For every transition, its (place, next transition) pairs."""
    found: list[list[tuple[int, int]]] = [[] for _ in graph.transitions]
    for j, (u, v) in enumerate(zip(graph.pre, graph.post, strict=True)):
        found[u].append((j, v))
    return found


def check_connected(graph: MarkedGraph) -> None:
    """``_NotCycloid`` unless every transition can reach every other one
    (docs/theory/cycles-and-tokens.md)."""
    missing = first_unreached([[v for _, v in out] for out in _successors(graph)], 0)
    if missing is not None:
        backwards, unreached = missing
        first, other = graph.transitions[0], graph.transitions[unreached]
        path = f"{other!r} to {first!r}" if backwards else f"{first!r} to {other!r}"
        raise _NotCycloid(
            f"not strongly connected: there is no path from {path}; a cycloid's "
            "transitions all lie on one strongly connected net"
        )


def check_live(graph: MarkedGraph) -> None:
    """``_NotCycloid`` with a token-free cycle, if there is one (a marked graph is live iff none).

    Commoner, Holt, Even, Pnueli, "Marked directed graphs", J. Comput. Syst. Sci. 5 (1971):
    a marked graph is live iff every cycle carries a token. Found by the depth-first search of
    zoo.core.structure on the token-free places only.
    """
    empty: list[list[tuple[int, int]]] = [[] for _ in graph.transitions]
    for j, (u, v) in enumerate(zip(graph.pre, graph.post, strict=True)):
        if graph.tokens[j] == 0:
            empty[u].append((j, v))
    found = find_cycle(empty)
    if found is not None:
        start, cycle = found
        raise _NotCycloid(
            f"not live: the cycle {_cycle_text(graph, start, cycle)} carries no token, "
            "so its transitions can never fire"
        )


def _cycle_text(graph: MarkedGraph, start: int, steps: Sequence[tuple[int, int]]) -> str:
    nodes = [graph.transitions[start]]
    for t, place in steps:
        nodes.append(graph.places[place])
        nodes.append(graph.transitions[t])
    if len(nodes) > 2 * _SHOWN_CYCLE + 1:
        return " -> ".join(nodes[: 2 * _SHOWN_CYCLE]) + f" -> ... ({len(steps)} places)"
    return " -> ".join(nodes)


def place_bound(
    graph: MarkedGraph, place: int, successors: Sequence[Sequence[tuple[int, int]]] | None = None
) -> int:
    """The most tokens ``place`` can ever hold, for a live strongly connected marked graph.

    It equals the fewest tokens on a cycle through the place (Commoner et al. 1971, Thm 3 /
    Genrich and Lautenbach 1973): its own tokens plus the least number of tokens on a path
    from its output back to its input transition, found by a 0-1 breadth-first search.
    """
    successors = successors if successors is not None else _successors(graph)
    source, target = graph.post[place], graph.pre[place]
    infinity = graph.token_count + 1
    distance = [infinity] * graph.transition_count
    distance[source] = 0
    queue: deque[int] = deque([source])
    while queue:
        u = queue.popleft()
        for j, v in successors[u]:
            d = distance[u] + graph.tokens[j]
            if d < distance[v]:
                distance[v] = d
                if graph.tokens[j]:
                    queue.append(v)
                else:
                    queue.appendleft(v)
    return graph.tokens[place] + distance[target]


def check_initial_tokens(graph: MarkedGraph) -> None:
    """``_NotCycloid`` if a place holds more than one token initially
    (docs/theory/cycles-and-tokens.md)."""
    for j, tokens in enumerate(graph.tokens):
        if tokens > 1:
            raise _NotCycloid(
                f"not safe: place {graph.places[j]!r} holds {tokens} tokens initially; "
                "a cycloid system never has more than one token on a place"
            )


def check_safe(graph: MarkedGraph) -> None:
    """``_NotCycloid`` if some place can come to hold two tokens (docs/theory/cycles-and-tokens.md:
    1-safe).

    Quadratic in the size of the net, so skipped above ``DIAGNOSTIC_LIMIT`` transitions.
    """
    if graph.transition_count > DIAGNOSTIC_LIMIT:
        return
    successors = _successors(graph)
    for j in range(graph.place_count):
        bound = place_bound(graph, j, successors)
        if bound > 1:
            raise _NotCycloid(
                f"not safe: place {graph.places[j]!r} can come to hold {bound} tokens (every "
                f"cycle through it carries at least {bound}); a cycloid system is 1-safe"
            )


def shortest_cycle_through(
    graph: MarkedGraph,
    transition: int,
    bound: int | None = None,
    successors: Sequence[Sequence[tuple[int, int]]] | None = None,
) -> int:
    """Length (in transitions) of a shortest cycle through a transition, by breadth-first search.

    With ``bound``, the search stops after that depth and returns ``bound + 1`` if it found no
    cycle; 0 means the transition lies on no cycle.
    """
    successors = successors if successors is not None else _successors(graph)
    depth = {transition: 0}
    frontier = [transition]
    level = 0
    while frontier:
        level += 1
        if bound is not None and level > bound:
            return bound + 1
        following: list[int] = []
        for u in frontier:
            for _, v in successors[u]:
                if v == transition:
                    return level
                if v not in depth:
                    depth[v] = level
                    following.append(v)
        frontier = following
    return 0


def closed_walk_counts(graph: MarkedGraph, start: int, max_length: int) -> tuple[int, ...]:
    """How many closed walks of each length 1..max_length start and end at a transition.

    An invariant of the unmarked net under isomorphism, the same at every transition of a
    cycloid (its translations act transitively, docs/theory/lattice-key.md); used to set candidates
    apart
    cheaply. Dynamic programming over walk lengths, O(max_length * |P|).
    """
    successors = _successors(graph)
    current = {start: 1}
    counts: list[int] = []
    for _ in range(max_length):
        following: dict[int, int] = {}
        for u, ways in current.items():
            for _, v in successors[u]:
                following[v] = following.get(v, 0) + ways
        current = following
        counts.append(current.get(start, 0))
    return tuple(counts)


def enabled_transitions(graph: MarkedGraph) -> int:
    """Transitions whose input places are all marked (min(alpha, beta) for C(p),
    docs/theory/initial-marking.md)."""
    return sum(
        1
        for t in range(graph.transition_count)
        if all(graph.tokens[j] for j in graph.input_places(t))
    )


def observables_of(graph: MarkedGraph) -> Observables:
    """A, |P|, tokens, enabled transitions and the shortest cycle through the first transition.

    Every transition of a cycloid looks the same (its translations are automorphisms,
    docs/theory/lattice-key.md), so the shortest cycle through one transition is the minimal cycle
    length.
    For a net that is not a cycloid the canonical-form check rejects every candidate anyway.
    """
    return Observables(
        transitions=graph.transition_count,
        places=graph.place_count,
        tokens=graph.token_count,
        enabled=enabled_transitions(graph),
        loop=shortest_cycle_through(graph, 0),
    )


def _uneven_transition(graph: MarkedGraph, loop: int) -> str | None:
    """A reason naming a transition whose shortest cycle differs from the first transition's."""
    if graph.transition_count > DIAGNOSTIC_LIMIT:
        return None
    successors = _successors(graph)
    for t in range(1, graph.transition_count):
        here = shortest_cycle_through(graph, t, bound=loop, successors=successors)
        if here != loop:
            shown = f"{here}" if here <= loop else f"more than {loop}"
            return (
                f"its transitions are not all alike: the shortest cycle through "
                f"{graph.transitions[0]!r} has length {loop}, through {graph.transitions[t]!r} "
                f"{shown}; in a cycloid every transition lies on a shortest cycle"
            )
    return None


# --- identification ------------------------------------------------------------------------


def _class_label(p: ParameterSet) -> ParameterSet:
    """The smallest member of the class of p (docs/citing.md), found algebraically.

    Members share the area and, as a multiset, the token counts {alpha, beta} (the swap keeps
    them; the exceptional family has alpha = beta = 2), so the candidates with either order of
    the token counts contain the whole class.
    """
    from zoo.core.algebra import class_key
    from zoo.core.synthesis import candidates

    key = class_key(p)
    pool = candidates(p.area, p.alpha, p.beta) + candidates(p.area, p.beta, p.alpha)
    return min(q for q in pool if class_key(q) == key)


#: Asks a catalog for the class of a parameter set: (params, fingerprint of the file's net) ->
#: (class identifier or None, a short status). ``zoo.catalog.lookup.catalog_lookup`` makes one.
CatalogLookup = Callable[[ParameterSet, str | None], tuple[str | None, str]]


def identify_net(
    net: PlaceTransitionNet, lookup: CatalogLookup | None = None, *, use_catalog: bool = True
) -> Identification:
    """Decide whether ``net`` is a cycloid system and, if it is, which one (docs/identify.md).

    ``lookup`` asks a catalog for the class (``zoo.catalog.lookup.catalog_lookup``); without
    one, or with ``use_catalog=False``, no catalog is consulted (``catalog`` says so). This
    layer never opens a database itself.
    """
    try:
        answer = _identify(net, lookup if use_catalog else None)
    except _NotCycloid as refusal:
        if refusal.unreachable is not None:
            answer = refusal.unreachable
        else:
            answer = Identification(
                source=net.source,
                cycloid=False,
                reason=refusal.reason,
                synthesized=refusal.synthesized,
                observables=refusal.observables,
            )
    return replace(answer, warnings=net.warnings) if net.warnings else answer


def _identify(net: PlaceTransitionNet, lookup: CatalogLookup | None) -> Identification:
    from zoo.core.canonical import canonical_form, isomorphism_from_forms
    from zoo.core.net import build_net
    from zoo.core.synthesis import synthesize

    graph = marked_graph_of(net)
    check_initial_tokens(graph)
    check_connected(graph)
    check_live(graph)
    seen = observables_of(graph)
    loop = seen.loop or 0
    # alpha + beta tokens, min(alpha, beta) enabled (docs/theory/initial-marking.md); one order of
    # the two
    # counts suffices because the swap C(b,a,d,c) is the same class.
    alpha, beta = seen.tokens - seen.enabled, seen.enabled
    found = synthesize(seen.transitions, loop, alpha, beta) if beta >= 1 else []
    form = canonical_form(graph, marked=True)
    # One nauty call per class, not per candidate: candidates with equal algebraic class keys
    # are isomorphic (docs/theory/isomorphism.md, confirmed with nauty by every catalog build), so
    # only
    # their label needs comparing.
    labels = list(dict.fromkeys(_class_label(candidate) for candidate in found))
    if len(labels) > 1:
        # Several classes share the observables (docs/theory/synthesis.md): drop those whose nets
        # already
        # differ in a cheap invariant before paying for their canonical forms.
        length = loop + 4
        profile = closed_walk_counts(graph, 0, length)
        labels = [q for q in labels if closed_walk_counts(build_net(q), 0, length) == profile]
    for params in labels:
        target = build_net(params)
        # Both forms are at hand, so the isomorphism costs no further nauty call.
        mapping = isomorphism_from_forms(graph, form, target, canonical_form(target, marked=True))
        if mapping is None:
            continue
        transition_map, place_map = mapping
        return _cycloid_answer(
            net, graph, target, form.fingerprint, lookup, found, seen, transition_map, place_map
        )
    # Not a cycloid system as drawn; perhaps a cycloid net in a reachable marking.
    later = _identify_reachable(net, graph, seen, lookup)
    if later is not None:
        if later.cycloid:
            return later
        refusal = _NotCycloid(later.reason or "", later.synthesized, seen)
        refusal.unreachable = later
        raise refusal
    # The net passed the structural checks: the answer carries its observables and the
    # candidates, which the reason quotes (docs/identify.md).
    raise _NotCycloid(_refusal_reason(graph, seen, found), tuple(found), seen)


#: Most images of the initial marking under net automorphisms that are compared with the file's
#: marking one by one. Up to area 30 only the family C(1, n+2, 1, n) has more (2^n of them,
#: twin transitions), and its state space is tiny; such nets are decided by an explicit search.
ORBIT_LIMIT = 20_000

#: Most reachable markings of the candidate class for the explicit search that takes over past
#: ``ORBIT_LIMIT`` (docs/theory/state-counts.md gives the count in closed form).
SEARCH_LIMIT = 200_000


@dataclass(frozen=True)
class _Reached:
    """How the file's marking is reached from one placement of a candidate's initial marking."""

    firing: tuple[int, ...]  # transitions of the file's net
    transition_map: tuple[int, ...]  # file transition -> candidate transition
    place_map: tuple[int, ...]


def _identify_reachable(
    net: PlaceTransitionNet, graph: MarkedGraph, seen: Observables, lookup: CatalogLookup | None
) -> Identification | None:
    """The class whose net this is and from whose initial marking the file's marking is
    reachable; an answer with ``cycloid=False`` and a circuit when the net is a cycloid net whose
    marking is not reachable; None when the unmarked net is no cycloid's net."""
    from zoo.core.canonical import canonical_form, isomorphism_from_forms
    from zoo.core.net import build_net
    from zoo.core.synthesis import synthesize

    loop = seen.loop or 0
    if loop < 1 or seen.tokens < 2:
        return None
    # The token count and the minimal cycle length are the same in every reachable marking
    # (each transition takes two tokens and gives two back), the number enabled is not: every
    # split of the tokens is a candidate; one order per pair, the swap gives the same classes.
    found: list[ParameterSet] = []
    for alpha in range(1, seen.tokens // 2 + 1):
        found += synthesize(seen.transitions, loop, alpha, seen.tokens - alpha)
    labels = sorted(dict.fromkeys(_class_label(candidate) for candidate in found))
    if not labels:
        return None
    if len(labels) > 1:
        length = loop + 4
        profile = closed_walk_counts(graph, 0, length)
        labels = [q for q in labels if closed_walk_counts(build_net(q), 0, length) == profile]
    form = canonical_form(graph, marked=False)
    answers: list[tuple[int, ParameterSet, _Reached]] = []
    unreachable: tuple[ParameterSet, Circuit, MarkedGraph, tuple[tuple[int, ...], ...]] | None = (
        None
    )
    for params in labels:
        target = build_net(params)
        mapping = isomorphism_from_forms(
            graph, form, target, canonical_form(target, marked=False), marked=False
        )
        if mapping is None:
            continue
        reached = _reach(graph, target, mapping)
        if isinstance(reached, Circuit):
            unreachable = unreachable or (params, reached, target, mapping)
            continue
        _check_firing(graph, target, reached)
        answers.append((len(reached.firing), params, reached))
    if answers:
        _, params, reached = min(answers, key=lambda item: (item[0], item[1]))
        target = build_net(params)
        return _cycloid_answer(
            net,
            graph,
            target,
            canonical_form(target, marked=True).fingerprint,
            lookup,
            found,
            seen,
            reached.transition_map,
            reached.place_map,
            reached.firing,
        )
    if unreachable is None:
        return None
    params, circuit, net_of, (transition_map, place_map) = unreachable
    class_id, status = (
        lookup(params, None) if lookup is not None else (None, "catalog not consulted")
    )
    where = f" = {class_id}" if class_id else ""
    return Identification(
        source=net.source,
        cycloid=False,
        reason=(
            f"the net of {params}{where} in a marking not reachable from its initial marking "
            f"under any isomorphism: the circuit {circuit.text()} carries {circuit.tokens} "
            f"token{'s' if circuit.tokens != 1 else ''}, {circuit.initial_tokens} at the "
            "initial marking under the mapping given"
        ),
        catalog=status,
        synthesized=tuple(found),
        observables=seen,
        transition_map=tuple(
            (graph.transitions[i], net_of.transitions[k]) for i, k in enumerate(transition_map)
        ),
        place_map=tuple((graph.places[j], net_of.places[k]) for j, k in enumerate(place_map)),
        marking="unreachable",
        net_params=params,
        net_class_id=class_id,
        circuit=circuit,
    )


def _reach(
    graph: MarkedGraph, target: MarkedGraph, mapping: tuple[tuple[int, ...], tuple[int, ...]]
) -> _Reached | Circuit:
    """A shortest way from some placement of the target's initial marking to the file's
    marking, over every isomorphism of the unmarked nets, or the circuit that refutes
    ``mapping`` when there is none.

    Isomorphisms are ``mapping`` followed by an automorphism of the target net; an automorphism
    sigma turns the question into: is the mapped marking reachable from sigma(M0)? The images
    sigma(M0) are listed (``marking_orbit``) and the state equation is solved from all of them
    at once (``nearest_source``); the smallest firing counts give the shortest sequence.
    """
    from zoo.core.markings import (
        firing_sequence,
        marking_orbit,
        nearest_source,
        net_automorphisms,
        orbit_automorphism,
        unequal_circuit,
    )
    from zoo.errors import LimitExceeded

    transition_map, place_map = mapping
    mapped = [0] * target.place_count
    for j, k in enumerate(place_map):
        mapped[k] = graph.tokens[j]
    generators = net_automorphisms(target)
    try:
        orbit = marking_orbit(target, target.tokens, generators, ORBIT_LIMIT)
    except LimitExceeded:
        found = _reach_by_search(graph, target)
        if found is not None:
            return found
    else:
        images = list(orbit)
        best = nearest_source(target, images, mapped)
        if best is not None:
            image = images[best[0]]
            moves, place_moves = orbit_automorphism(target, orbit, generators, image)
            sequence = firing_sequence(target, image, mapped) or []
            back_t = [0] * target.transition_count
            for i, k in enumerate(moves):
                back_t[k] = i
            back_p = [0] * target.place_count
            for j, k in enumerate(place_moves):
                back_p[k] = j
            file_of = {k: i for i, k in enumerate(transition_map)}
            return _Reached(
                firing=tuple(file_of[t] for t in sequence),
                transition_map=tuple(back_t[k] for k in transition_map),
                place_map=tuple(back_p[k] for k in place_map),
            )
    circuit = unequal_circuit(target, target.tokens, mapped)
    if circuit is None:  # pragma: no cover - the orbit contains M0 itself
        raise ArithmeticError("the mapped marking is reachable but no placement reached it")
    file_place = {k: j for j, k in enumerate(place_map)}
    places = [file_place[k] for k in circuit]
    return Circuit(
        transitions=tuple(graph.transitions[graph.pre[j]] for j in places),
        places=tuple(graph.places[j] for j in places),
        tokens=sum(graph.tokens[j] for j in places),
        initial_tokens=sum(target.tokens[k] for k in circuit),
    )


def _reach_by_search(graph: MarkedGraph, target: MarkedGraph) -> _Reached | None:
    """The same question by explicit search, for nets with too many automorphic placements.

    Breadth-first backwards from the file's marking (``nearest_earlier_marking``) until a
    marking whose marked net is isomorphic to the target's initial one: the first one found is
    at the smallest distance over every isomorphism. If the marking is reachable, its states are
    exactly those of the target system, so a search that passes their number (closed formula,
    docs/theory/state-counts.md) proves it unreachable.
    """
    from dataclasses import replace

    from zoo.core.canonical import canonical_form, isomorphism_from_forms
    from zoo.core.invariants import reachable_state_count
    from zoo.core.markings import nearest_earlier_marking
    from zoo.core.net import CycloidNet
    from zoo.errors import LimitExceeded

    assert isinstance(target, CycloidNet)
    states = reachable_state_count(target.params)
    if states > SEARCH_LIMIT:
        raise LimitExceeded(
            f"{graph.describe()} is the net of {target.params}, whose automorphisms place its "
            f"initial marking in more than {ORBIT_LIMIT:,} ways and which has {states:,} "
            f"reachable markings (search limit {SEARCH_LIMIT:,}); whether this marking is "
            "reachable is not decided"
        )
    goal = canonical_form(target, marked=True)
    enabled = enabled_transitions(target)

    def initial_like(marking: tuple[int, ...]) -> bool:
        candidate = replace(graph, tokens=marking)
        if enabled_transitions(candidate) != enabled:
            return False
        return canonical_form(candidate, marked=True).text == goal.text

    try:
        found = nearest_earlier_marking(graph, initial_like, states)
    except LimitExceeded:
        return None
    if found is None:
        return None
    marking, sequence = found
    start = replace(graph, tokens=marking)
    mapping = isomorphism_from_forms(start, canonical_form(start, marked=True), target, goal)
    if mapping is None:  # pragma: no cover - initial_like compared the same forms
        raise ArithmeticError("equal canonical forms but no isomorphism")
    return _Reached(tuple(sequence), mapping[0], mapping[1])


def _check_firing(graph: MarkedGraph, target: MarkedGraph, reached: _Reached) -> None:
    """Fire the sequence on the file's own net from the initial marking that the reported
    mapping pulls back: every step must be enabled and the last marking the file's."""
    marking = [target.tokens[k] for k in reached.place_map]
    for t in reached.firing:
        inputs = graph.input_places(t)
        if not all(marking[j] for j in inputs):
            raise ArithmeticError(f"firing sequence step {graph.transitions[t]!r} is not enabled")
        for j in inputs:
            marking[j] -= 1
        for j in graph.output_places(t):
            marking[j] += 1
    if tuple(marking) != graph.tokens:
        raise ArithmeticError("the firing sequence does not end in the file's marking")


def _cycloid_answer(
    net: PlaceTransitionNet,
    graph: MarkedGraph,
    target: CycloidNet,
    fingerprint: str,
    lookup: CatalogLookup | None,
    found: Sequence[ParameterSet],
    seen: Observables,
    transition_map: Sequence[int],
    place_map: Sequence[int],
    firing: Sequence[int] = (),
) -> Identification:
    """The answer for a net that is the cycloid net ``target`` (its initial marking when
    ``firing`` is empty, else reached by those transitions of the file's net)."""
    params = target.params
    class_id, status = (
        lookup(params, fingerprint) if lookup is not None else (None, "catalog not consulted")
    )
    return Identification(
        source=net.source,
        cycloid=True,
        params=params,
        class_id=class_id,
        catalog=status,
        synthesized=tuple(found),
        observables=seen,
        transition_map=tuple(
            (graph.transitions[i], target.transitions[k]) for i, k in enumerate(transition_map)
        ),
        place_map=tuple((graph.places[j], target.places[k]) for j, k in enumerate(place_map)),
        marking="reachable" if firing else "initial",
        firing=tuple(graph.transitions[t] for t in firing),
    )


def _refusal_reason(graph: MarkedGraph, seen: Observables, found: Sequence[ParameterSet]) -> str:
    """The most specific reason a net that passed the structural checks matches no candidate."""
    loop = seen.loop or 0
    try:
        check_safe(graph)
    except _NotCycloid as refusal:
        return refusal.reason
    if seen.tokens > seen.transitions:
        return (
            f"wrong token count: {seen.tokens} tokens on {seen.transitions} transitions, but a "
            "cycloid carries alpha + beta <= alpha*delta + beta*gamma = A tokens"
        )
    uneven = _uneven_transition(graph, loop)
    if uneven is not None:
        return uneven
    observed = (
        f"{seen.transitions} transitions, {seen.tokens} tokens, {seen.enabled} enabled "
        f"transition{'s' if seen.enabled != 1 else ''}, shortest cycle length {loop}"
    )
    if not found:
        return f"no cycloid system has its observables ({observed})"
    shown = ", ".join(str(p) for p in found[:4]) + (", ..." if len(found) > 4 else "")
    only = "the only cycloid system" if len(found) == 1 else "the cycloid systems"
    return f"not isomorphic to {shown}, {only} with its observables ({observed})"


def identify_file(
    path: str | os.PathLike[str], lookup: CatalogLookup | None = None, *, use_catalog: bool = True
) -> Identification:
    """Read a PNML or net text file and identify its net; unreadable files raise ``FormatError``."""
    return identify_net(read_net_file(path), lookup, use_catalog=use_catalog)


__all__ = [
    "Circuit",
    "DIAGNOSTIC_LIMIT",
    "ORBIT_LIMIT",
    "SEARCH_LIMIT",
    "Identification",
    "Observables",
    "CatalogLookup",
    "identify_file",
    "identify_net",
    "marked_graph_of",
    "place_bound",
    "shortest_cycle_through",
]
