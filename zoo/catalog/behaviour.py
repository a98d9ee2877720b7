"""Behaviour identifiers: which stored classes behave alike (docs/theory/behaviour.md).

Each class of at most ``BEHAVIOUR_STATE_LIMIT`` reachable states carries a behaviour key,
computed with its area (``zoo.core.behaviour.behaviour_key``): equal keys, isomorphic
reachability graphs. The build then names the behaviour classes area by area, in catalog order
and only over the complete prefix of areas: a class whose key no earlier class has founds the
behaviour class ``BE{area}-{rank}`` after its own identifier; a class whose key is taken joins
that behaviour class, and a join of two different nets is confirmed by an explicit map of their
state graphs before it is stored.

Why the names never change meaning: a class with s states has area at most s, so every member
of a behaviour class lies at or below its state count, and the first member in catalog order is
found first whatever bound is built later. The listing of a behaviour class is complete once the
catalog is named up to area s (``Catalog.behaviour_complete_to``).
"""

from __future__ import annotations

from zoo.catalog.identifiers import behaviour_identifier
from zoo.catalog.service import BEHAVIOUR_BOUND_KEY, Catalog
from zoo.core.params import parse_params
from zoo.errors import CatalogError


def name_behaviour(catalog: Catalog, jobs: int = 1) -> list[int]:
    """Give behaviour identifiers to the classes of every complete area not named yet, in
    increasing area up to the first missing area; one transaction per area. Classes stored
    without a behaviour key (by an older zoo, or by a build that left behaviour for later) get
    it computed here first, in ``jobs`` worker processes. Returns the areas named."""
    from zoo.core.behaviour import BEHAVIOUR_STATE_LIMIT

    complete_to = catalog.complete_to()
    with catalog.repository.read() as reader:
        pending = [a for a in reader.behaviour_areas(named=False) if a <= complete_to]
        bound = reader.info().get(BEHAVIOUR_BOUND_KEY)
        unkeyed = [
            (row.id, row.label, row.fingerprint)
            for area in pending
            for row in reader.behaviour_rows(area)
            if row.behaviour_key is None
        ]
    if not pending:
        return []
    if bound is not None and int(bound) != BEHAVIOUR_STATE_LIMIT:
        raise CatalogError(
            f"catalog {catalog.location} holds behaviour keys up to {int(bound):,} states, this "
            f"zoo computes them up to {BEHAVIOUR_STATE_LIMIT:,}; build a new catalog with "
            "--db NEW_FILE"
        )
    computed = _keys_of(unkeyed, jobs)
    named: list[int] = []
    for area in pending:
        with catalog.repository.write() as writer:
            if not writer.claim_behaviour_area(area):
                continue  # a concurrent build named it
            if bound is None:
                writer.put_info(BEHAVIOUR_BOUND_KEY, str(BEHAVIOUR_STATE_LIMIT))
                bound = str(BEHAVIOUR_STATE_LIMIT)
            touched: list[str] = []
            for row in writer.behaviour_rows(area):
                key, evidence = row.behaviour_key, row.behaviour_evidence
                if key is None:  # above the bound, or stored without keys
                    key, evidence = computed.get(row.id, (None, None))
                if key is None:
                    continue
                holder = writer.behaviour_holder(key)
                if holder is None:
                    behaviour_id = behaviour_identifier(row.id)
                else:
                    behaviour_id, first_id, first_label = holder
                    evidence = _join_evidence(key, evidence, first_id, first_label, row.label)
                writer.set_behaviour(row.id, key, evidence, behaviour_id)
                touched.append(behaviour_id)
            writer.recount_behaviour(touched)
        named.append(area)
    return named


def _keys_of(
    classes: list[tuple[str, str, str]], jobs: int
) -> dict[str, tuple[str | None, str | None]]:
    """The behaviour keys of (id, label, fingerprint) classes within the state bound, computed
    in ``jobs`` worker processes (``zoo.catalog.workers.in_workers``)."""
    from zoo.catalog.workers import in_workers
    from zoo.core.behaviour import BEHAVIOUR_STATE_LIMIT
    from zoo.core.invariants import reachable_state_count

    within = [
        c for c in classes if reachable_state_count(parse_params(c[1])) <= BEHAVIOUR_STATE_LIMIT
    ]
    return dict(in_workers(_key_of, within, jobs))


def _key_of(item: tuple[str, str, str]) -> tuple[str, tuple[str | None, str | None]]:
    from zoo.core.behaviour import behaviour_key

    class_id, label, fingerprint = item
    found = behaviour_key(parse_params(label), fingerprint)
    return class_id, (found.key, found.evidence) if found is not None else (None, None)


def _join_evidence(
    key: str, evidence: str | None, first_id: str, first_label: str, label: str
) -> str:
    """The evidence for joining ``label`` to the behaviour class of ``first_id``.

    A directed cycle of s markings is the same graph whatever the net; other joins are checked
    with an explicit state map (``compare_behaviour``), arc by arc.
    """
    from zoo.core.behaviour import compare_behaviour

    if key.startswith("cycle:"):
        return f"{evidence}, as that of {first_id}"
    answer = compare_behaviour(parse_params(first_label), parse_params(label))
    if answer.same is not True or answer.state_map is None:
        raise CatalogError(
            f"{label} and {first_label} ({first_id}) have the same behaviour key, but no map of "
            f"their state graphs was found ({answer.evidence}); this is a bug in zoo, please "
            "report it with both parameter sets"
        )
    return f"explicit map of the state graph onto that of {first_id}, checked arc by arc"


__all__ = ["name_behaviour"]
