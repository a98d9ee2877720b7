"""Classification of one area: parameter sets -> readings -> classes -> frames, checked by nauty.

The four levels of sameness are those of docs/theory/isomorphism.md. The partition is computed
algebraically
(``algebra.reading_key``, ``class_key``, ``frame_key``; docs/theory/isomorphism.md) and then
confirmed with
nauty canonical forms (``canonical.system_form`` and ``net_form``):

* parameter sets with equal reading keys have the same lattice and the same (alpha, beta), so
  they define literally the same system (the initial marking depends only on the level function
  beta*xi + alpha*eta, docs/theory/initial-marking.md): no check is needed;
* a class whose readings are one reading and its swap is merged by an explicit isomorphism,
  (xi, eta) -> (eta, xi) (docs/theory/isomorphism.md); every other merge (the exceptional (2,-2)
  family) is
  checked by computing the canonical form of every reading: they must all agree;
* one canonical form per class (of its label) must differ from that of every other class of
  the area, which catches a class the algebra split wrongly;
* frames are checked in the same way with the unmarked net forms.

Any disagreement raises ``ClassificationDisagreement`` (a ``CatalogError``) carrying a report;
the catalog build then stores nothing for that area. Areas are independent, so
``classify_area`` is the unit of work a build hands to a worker process.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Protocol, cast

from zoo.catalog.enumeration import iter_parameter_tuples
from zoo.catalog.identifiers import class_identifier, frame_identifier
from zoo.core import algebra, invariants, registry
from zoo.core.params import ParameterSet
from zoo.errors import CatalogError

__all__ = [
    "AreaClassification",
    "ClassSummary",
    "ClassificationDisagreement",
    "FrameSummary",
    "ReadingSummary",
    "classify_area",
    "explicit_functions",
]

Members = tuple[ParameterSet, ...]


class ClassificationDisagreement(CatalogError):
    """The algebraic classification and nauty disagree; ``report`` lists every disagreement."""

    def __init__(self, message: str, report: tuple[str, ...]) -> None:
        super().__init__(message)
        self.report = report

    def __reduce__(self) -> tuple[type, tuple[str, tuple[str, ...]]]:
        # Pickled whole, so that a cluster worker's disagreement reaches the writer intact.
        return (type(self), (str(self), self.report))


@dataclass(frozen=True)
class ReadingSummary:
    """A reading (same lattice, same alpha and beta) and its reading-level invariants."""

    alpha: int
    beta: int
    lattice_g: int
    lattice_r: int
    members: Members  # sorted
    processes: int
    regular: bool
    slowness: Fraction
    forward: invariants.CycleFamily
    backward: invariants.CycleFamily
    nf_beta_delta: ParameterSet
    nf_alpha_gamma: ParameterSet
    #: Every reading-level invariant of the registry (zoo.core.registry), by name: what is stored.
    values: Mapping[str, object] = field(default_factory=dict)

    @property
    def label(self) -> ParameterSet:
        return self.members[0]

    def as_dict(self) -> dict[str, object]:
        """The reading-level invariants as plain values (the keys ``zoo show`` prints)."""
        return {
            "label": str(self.label),
            "alpha": self.alpha,
            "beta": self.beta,
            "lattice": [self.members[0].area, self.lattice_g, self.lattice_r],
            "processes": self.processes,
            "regular": self.regular,
            "slowness": str(self.slowness),
            "forward_cycles": self.forward.as_dict(),
            "backward_cycles": self.backward.as_dict(),
            "nf_beta_delta": str(self.nf_beta_delta),
            "nf_alpha_gamma": str(self.nf_alpha_gamma),
            "members": [str(p) for p in self.members],
        }


@dataclass(frozen=True)
class ClassSummary:
    """A class (isomorphic marked nets, places untyped) with its class-level invariants."""

    id: str
    area: int
    rank: int
    frame_id: str
    fingerprint: str
    automorphisms: int  # of the marked net, places untyped, from nauty
    readings: tuple[ReadingSummary, ...]  # ordered by their smallest member
    loop: int
    states: int
    state_arcs: int
    tokens: int
    enabled: int
    semi_enabled: int
    cycle_time: Fraction
    group_d1: int
    iteration: int
    #: Every class-level invariant of the registry (zoo.core.registry), by name: what is stored.
    values: Mapping[str, object] = field(default_factory=dict)
    #: The behaviour key and its evidence (zoo.core.behaviour.behaviour_key); None above the
    #: state bound. The behaviour identifier is given when the area is stored.
    behaviour_key: str | None = None
    behaviour_evidence: str | None = None

    @property
    def label(self) -> ParameterSet:
        return self.readings[0].members[0]

    @property
    def members(self) -> Members:
        return tuple(sorted(p for reading in self.readings for p in reading.members))


@dataclass(frozen=True)
class FrameSummary:
    """A frame (isomorphic unmarked nets) and the classes that lie on it."""

    id: str
    area: int
    rank: int
    label: ParameterSet
    fingerprint: str
    automorphisms: int  # of the unmarked net, places untyped, from nauty
    lattice_g: int
    lattice_r: int
    class_ids: tuple[str, ...]
    #: Every frame-level invariant of the registry (zoo.core.registry), by name: what is stored.
    values: Mapping[str, object] = field(default_factory=dict)


@dataclass(frozen=True)
class AreaClassification:
    """Everything the catalog stores for one area, plus how long each stage took."""

    area: int
    parameter_set_count: int
    classes: tuple[ClassSummary, ...]  # by rank
    frames: tuple[FrameSummary, ...]  # by rank
    canonical_forms: int  # nauty calls made
    seconds: dict[str, float] = field(default_factory=dict)

    @property
    def reading_count(self) -> int:
        return sum(len(c.readings) for c in self.classes)


class CanonicalLike(Protocol):
    """What the classification needs of a canonical form (zoo.core.canonical.CanonicalForm)."""

    @property
    def fingerprint(self) -> str: ...

    @property
    def automorphisms(self) -> int: ...


FormFunction = Callable[[ParameterSet], CanonicalLike]


def _canonical_functions() -> tuple[FormFunction, FormFunction]:
    """The fast forms of zoo.core.canonical (``cycloid_form``), computed from the algebra.

    They give the same fingerprints and group orders as ``canonical.system_form`` and
    ``net_form`` on the explicit net (``explicit_functions``), which stay as the check
    (tests/catalog/test_classify.py). Imported late so that enumeration alone stays light.
    """
    from zoo.core.canonical import cycloid_form

    def system_form(p: ParameterSet) -> CanonicalLike:
        return cycloid_form(p, marked=True)

    def net_form(p: ParameterSet) -> CanonicalLike:
        return cycloid_form(p, marked=False)

    return system_form, net_form


def explicit_functions() -> tuple[FormFunction, FormFunction]:
    """zoo.core.canonical's system_form and net_form on explicit nets, sharing the last net.

    The reference path: a frame's label is the label of its first class, so its net form
    follows that class's system form directly (see classify_area) and the net is built once
    for both.
    """
    from zoo.core.canonical import canonical_form
    from zoo.core.net import CycloidNet, build_net

    last: dict[ParameterSet, CycloidNet] = {}

    def net_of(p: ParameterSet) -> CycloidNet:
        net = last.get(p)
        if net is None:
            last.clear()
            net = last[p] = build_net(p)
        return net

    def system_form(p: ParameterSet) -> CanonicalLike:
        return canonical_form(net_of(p), marked=True)

    def net_form(p: ParameterSet) -> CanonicalLike:
        return canonical_form(net_of(p), marked=False)

    return system_form, net_form


def _summarise_reading(members: Members) -> ReadingSummary:
    p = members[0]
    key = algebra.lattice_key(p)
    values = {name: compute(p) for name, compute in _READING_FORMULAS}
    return ReadingSummary(
        alpha=p.alpha,
        beta=p.beta,
        lattice_g=key.g,
        lattice_r=key.r,
        members=members,
        processes=cast(int, values["processes"]),
        regular=bool(values["regular"]),
        slowness=cast(Fraction, values["slowness"]),
        forward=invariants.CycleFamily(
            cast(int, values["forward_count"]),
            cast(int, values["forward_length"]),
            cast(int, values["forward_tokens"]),
        ),
        backward=invariants.CycleFamily(
            cast(int, values["backward_count"]),
            cast(int, values["backward_length"]),
            cast(int, values["backward_tokens"]),
        ),
        nf_beta_delta=cast(ParameterSet, values["normal_form_beta_delta"]),
        nf_alpha_gamma=cast(ParameterSet, values["normal_form_alpha_gamma"]),
        values=values,
    )


#: (name, rule over the readings, formula) of every registry invariant stored per class.
_CLASS_FORMULAS = tuple(
    (inv.name, inv.over_readings, inv.compute)
    for inv in registry.stored_on("classes")
    if inv.compute is not None
)


def _over(rule: str, compute: Callable[[ParameterSet], object], labels: Members) -> object:
    """A class value from its reading labels by the registry's rule (``Invariant.of_class``)."""
    if rule == registry.FIRST or len(labels) == 1:
        return compute(labels[0])
    values = [compute(label) for label in labels]
    return all(values) if rule == registry.EVERY else max(values)  # type: ignore[type-var]


#: (name, formula) of every registry invariant stored per reading, looked up once.
_READING_FORMULAS = tuple(
    (inv.name, inv.compute) for inv in registry.stored_on("readings") if inv.compute is not None
)


def _group(items: Iterable[tuple[object, ParameterSet]]) -> list[Members]:
    """Group parameter sets by key; each group sorted, groups ordered by smallest member."""
    groups: dict[object, list[ParameterSet]] = {}
    for key, p in items:
        groups.setdefault(key, []).append(p)
    return sorted((tuple(sorted(g)) for g in groups.values()), key=lambda g: g[0])


def _reading_groups(parameter_sets: list[ParameterSet]) -> list[Members]:
    """The parameter sets grouped by reading key, one lattice key per chain of steps.

    C(alpha, beta, gamma + k*alpha, delta - k*beta) differ by k*(alpha, -beta), a lattice
    vector, so they have the same lattice and the same (alpha, beta): the same reading
    (docs/theory/normal-forms.md). The chains (alpha, beta, gamma mod alpha) are therefore
    computed first and the reading key once per chain, not once per parameter set; chains with
    equal reading keys are still merged.
    """
    chains: dict[tuple[int, int, int], list[ParameterSet]] = {}
    for p in parameter_sets:
        chains.setdefault((p.alpha, p.beta, p.gamma % p.alpha), []).append(p)
    return _group((algebra.reading_key(chain[0]), p) for chain in chains.values() for p in chain)


def _is_swap_pair(readings: list[Members]) -> bool:
    """One reading, or two readings that are each other's swap (an explicit isomorphism)."""
    if len(readings) == 1:
        return True
    if len(readings) != 2:
        return False
    return algebra.reading_key(readings[0][0].swap()) == algebra.reading_key(readings[1][0])


def _untyped_lattice(p: ParameterSet) -> algebra.LatticeKey:
    """The lattice key up to the swap: equal for a net and its mirror image."""
    return min(algebra.lattice_key(p), algebra.lattice_key(p.swap()))


def classify_area(
    area: int,
    *,
    system_form: FormFunction | None = None,
    net_form: FormFunction | None = None,
    behaviour_limit: int | None = None,
) -> AreaClassification:
    """Classify every parameter set of one area and confirm the result with nauty.

    ``system_form`` and ``net_form`` default to those of ``zoo.core.canonical``; each returns an
    object with ``fingerprint`` and ``automorphisms``. Raises ClassificationDisagreement when
    the algebraic partition and the canonical forms do not agree. Classes with at most
    ``behaviour_limit`` reachable states (default ``BEHAVIOUR_STATE_LIMIT``, 0 for none) get
    their behaviour key.
    """
    from zoo.core.behaviour import BEHAVIOUR_STATE_LIMIT, behaviour_key

    if behaviour_limit is None:
        behaviour_limit = BEHAVIOUR_STATE_LIMIT
    behaviour_seconds = 0.0
    if system_form is None or net_form is None:
        default_system, default_net = _canonical_functions()
        system_form = system_form or default_system
        net_form = net_form or default_net
    started = time.perf_counter()
    parameter_sets = [ParameterSet(*t) for t in iter_parameter_tuples(area)]

    # Algebra: readings by reading key, classes by class key, frames by frame key.
    reading_groups = _reading_groups(parameter_sets)
    readings_of_class: dict[object, list[Members]] = {}
    for members in reading_groups:
        readings_of_class.setdefault(algebra.class_key(members[0]), []).append(members)
    class_groups = sorted(readings_of_class.values(), key=lambda rs: rs[0][0])
    problems: list[str] = []
    class_frame_keys: list[algebra.LatticeKey] = []
    for readings in class_groups:
        keys = {algebra.frame_key(members[0]) for members in readings}
        if len(keys) != 1:
            problems.append(
                f"class of {readings[0][0]}: its readings have different frame keys "
                f"{sorted(str(k) for k in keys)}"
            )
        class_frame_keys.append(min(keys))
    classes_of_frame: dict[algebra.LatticeKey, list[int]] = {}
    for index, key in enumerate(class_frame_keys):
        classes_of_frame.setdefault(key, []).append(index)
    frame_groups = sorted(classes_of_frame.values(), key=lambda ids: class_groups[ids[0]][0][0])
    algebra_done = time.perf_counter()

    # nauty: one system form per class, one net form per frame, more where the algebra merged
    # readings (or lattices) without an explicit isomorphism.
    calls = 0
    class_forms: list[CanonicalLike] = []
    frame_of_label = {class_groups[ids[0]][0][0]: index for index, ids in enumerate(frame_groups)}
    label_net_forms: dict[int, CanonicalLike] = {}
    for readings in class_groups:
        form = system_form(readings[0][0])
        calls += 1
        class_forms.append(form)
        frame_index = frame_of_label.get(readings[0][0])
        if frame_index is not None:  # the same net, unmarked: the frame's own form
            label_net_forms[frame_index] = net_form(readings[0][0])
            calls += 1
        if not _is_swap_pair(readings):
            for members in readings[1:]:
                other = system_form(members[0])
                calls += 1
                if other.fingerprint != form.fingerprint:
                    problems.append(
                        f"class of {readings[0][0]}: the algebra merges {members[0]} into it, "
                        "but nauty finds the two marked nets non-isomorphic"
                    )
    _report_collisions(
        "classes",
        [(rs[0][0], f.fingerprint) for rs, f in zip(class_groups, class_forms, strict=True)],
        problems,
    )
    frame_forms: list[CanonicalLike] = []
    for frame_index, class_indexes in enumerate(frame_groups):
        label = class_groups[class_indexes[0]][0][0]
        form = label_net_forms[frame_index]
        frame_forms.append(form)
        lattices: dict[algebra.LatticeKey, ParameterSet] = {}
        for index in class_indexes:
            for members in class_groups[index]:
                lattices.setdefault(_untyped_lattice(members[0]), members[0])
        if len(lattices) > 1:
            for p in sorted(lattices.values()):
                if p == label:
                    continue
                other = net_form(p)
                calls += 1
                if other.fingerprint != form.fingerprint:
                    problems.append(
                        f"frame of {label}: the algebra puts the net of {p} on it, but nauty "
                        "finds the two unmarked nets non-isomorphic"
                    )
    _report_collisions(
        "frames",
        [
            (class_groups[ids[0]][0][0], f.fingerprint)
            for ids, f in zip(frame_groups, frame_forms, strict=True)
        ],
        problems,
    )
    if problems:
        raise ClassificationDisagreement(
            f"area {area}: the algebraic classification and nauty disagree in "
            f"{len(problems)} place(s), first: {problems[0]}; nothing was stored for this area "
            "(this is a bug in zoo, please report it with the parameter sets named)",
            tuple(problems),
        )
    nauty_done = time.perf_counter()

    frame_id_of_class: dict[int, str] = {}
    frames: list[FrameSummary] = []
    for rank, (class_indexes, form) in enumerate(zip(frame_groups, frame_forms, strict=True), 1):
        frame_id = frame_identifier(area, rank)
        label = class_groups[class_indexes[0]][0][0]
        key = algebra.lattice_key(label)
        for index in class_indexes:
            frame_id_of_class[index] = frame_id
        frames.append(
            FrameSummary(
                id=frame_id,
                area=area,
                rank=rank,
                label=label,
                fingerprint=form.fingerprint,
                automorphisms=int(form.automorphisms),
                lattice_g=key.g,
                lattice_r=key.r,
                class_ids=tuple(class_identifier(area, i + 1) for i in sorted(class_indexes)),
                values={"net_automorphisms": int(form.automorphisms)},  # nauty
            )
        )
    classes: list[ClassSummary] = []
    for index, (readings, form) in enumerate(zip(class_groups, class_forms, strict=True)):
        summaries = tuple(_summarise_reading(members) for members in readings)
        p = readings[0][0]
        labels = tuple(r[0] for r in readings)
        values: dict[str, object] = {
            **{name: _over(rule, compute, labels) for name, rule, compute in _CLASS_FORMULAS},
            "automorphisms": int(form.automorphisms),  # nauty
            "reading_count": len(readings),
            "member_count": sum(len(r) for r in readings),
            "behaviour_count": None,  # counted over the catalog when the area is stored
        }
        tick = time.perf_counter()
        behaviour = behaviour_key(p, form.fingerprint, behaviour_limit) if behaviour_limit else None
        behaviour_seconds += time.perf_counter() - tick
        classes.append(
            ClassSummary(
                id=class_identifier(area, index + 1),
                area=area,
                rank=index + 1,
                frame_id=frame_id_of_class[index],
                fingerprint=form.fingerprint,
                automorphisms=int(form.automorphisms),
                readings=summaries,
                loop=cast(int, values["loop"]),
                states=cast(int, values["states"]),
                state_arcs=cast(int, values["state_arcs"]),
                tokens=cast(int, values["tokens"]),
                enabled=cast(int, values["enabled"]),
                semi_enabled=cast(int, values["semi_enabled"]),
                cycle_time=cast(Fraction, values["cycle_time"]),
                # Both depend on the typed structure, so the exceptional (2,-2) merges can join
                # readings that differ here: a class is an n-fold iteration (or has a
                # non-cyclic transition group) when one of its readings is (the registry's rule
                # over readings, zoo.core.registry.LARGEST).
                group_d1=cast(int, values["group_d1"]),
                iteration=cast(int, values["iteration"]),
                values=values,
                behaviour_key=behaviour.key if behaviour else None,
                behaviour_evidence=behaviour.evidence if behaviour else None,
            )
        )
    finished = time.perf_counter()
    return AreaClassification(
        area=area,
        parameter_set_count=len(parameter_sets),
        classes=tuple(classes),
        frames=tuple(frames),
        canonical_forms=calls,
        seconds={
            "algebra": algebra_done - started + finished - nauty_done - behaviour_seconds,
            "canonical": nauty_done - algebra_done,
            "behaviour": behaviour_seconds,
        },
    )


def _report_collisions(
    level: str, labelled: list[tuple[ParameterSet, str]], problems: list[str]
) -> None:
    """Record every pair of distinct algebraic groups with the same fingerprint (a wrong split)."""
    seen: dict[str, ParameterSet] = {}
    for label, fingerprint in labelled:
        if fingerprint in seen:
            problems.append(
                f"{level} of {seen[fingerprint]} and {label}: the algebra keeps them apart, "
                "but nauty finds them isomorphic"
            )
        else:
            seen[fingerprint] = label
