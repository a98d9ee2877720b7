"""The JSON object of one catalog entry, as ``zoo show ID --format json`` prints it.

Built here, above the catalog and beside the citation it carries, so that the command line and the
web catalog (``zoo serve``) answer with the same object from one code path.
"""

from __future__ import annotations

from typing import Any, cast

from zoo.catalog.identifiers import read_identifier
from zoo.catalog.service import BEHAVIOUR_BOUND_KEY, Catalog
from zoo.core import registry
from zoo.core.iterations import class_iteration_bases, class_iterations
from zoo.core.params import ParameterSet, parse_params
from zoo.publish.cite import cite


def entry_report(catalog: Catalog, ref: str) -> dict[str, Any]:
    """Everything stored about a class or a frame (identifier, label or member parameter set).

    A class: every invariant, members, readings, seeds, its frame with the other classes on
    it, the citation line and the area up to which the catalog is complete. A frame: its
    fields, the labels of its classes, the citation and the completeness bound. Raises
    ``NotInCatalog`` (a ``ZooError``) when the entry is not there.
    """
    citation = cite(catalog, ref).text()
    identifier = read_identifier(ref)
    if identifier is not None and identifier.kind == "frame":
        frame = catalog.frame(str(identifier))
        report: dict[str, Any] = {**frame.as_dict(), "citation": citation}
        report["complete_to"] = catalog.complete_to()
        report["class_labels"] = {c: catalog.get(c).label for c in frame.class_ids}
        return report
    entry = catalog.get(ref)
    frame = catalog.frame(entry.frame_id)
    report = entry.as_dict()
    report["readings"] = [_with_reading_values(dict(r), entry.area) for r in entry.readings]
    report["frame"] = {
        "id": frame.id,
        "label": frame.label,
        "net_automorphisms": frame.automorphisms,
        "lattice_key": list(frame.lattice_key),
        "other_classes": [c for c in frame.class_ids if c != entry.id],
    }
    report["citation"] = citation
    complete_to = catalog.complete_to()
    report["complete_to"] = complete_to
    report.update(iteration_links(catalog, parse_params(entry.label), complete_to))
    report["behaviour"] = behaviour_report(
        catalog,
        entry.behaviour_id,
        cast(dict[str, Any], report["behaviour"]),
        int(str(report["states"])),
    )
    return report


def behaviour_report(
    catalog: Catalog, behaviour_id: str | None, stored: dict[str, Any], states: int
) -> dict[str, Any]:
    """The entry's ``behaviour`` object: its behaviour identifier, how many stored classes
    share it (``count``), the evidence, every class of it in catalog order (``classes``), and
    whether that list is complete (every member of a behaviour class of s states has area at
    most s, so it is once the catalog is named up to area s). Without an identifier (above
    the catalog's state bound) ``classes`` is null and ``state_bound`` says the bound. Every
    class of a behaviour class has the entry's number of ``states``."""
    bound = catalog.info().get(BEHAVIOUR_BOUND_KEY)
    report = {**stored, "state_bound": int(bound) if bound is not None else None}
    if behaviour_id is None:
        return {**report, "classes": None, "complete": None}
    classes = catalog.behaviour_members(behaviour_id)  # all with the entry's ``states``
    return {**report, "classes": classes, "complete": catalog.behaviour_complete_to() >= states}


def _with_reading_values(reading: dict[str, Any], area: int) -> dict[str, Any]:
    """A reading's JSON with its own values of the class invariants made from every reading
    (transition group, cyclic, iteration: docs/theory/isomorphism.md), so that every
    per-reading value shown belongs to that reading."""
    label = parse_params(reading["label"])
    values = dict(reading)
    for inv in registry.INVARIANTS:
        if inv.over_readings != registry.FIRST and inv.compute is not None:
            values[inv.key] = registry.json_value(inv, inv.compute(label), area)
    return values


def iteration_links(
    catalog: Catalog, label: ParameterSet, complete_to: int
) -> dict[str, list[dict[str, Any]]]:
    """``iteration_of``: the classes of which this class is an n-fold temporal iteration;
    ``iterations``: the stored classes that are n-fold iterations of it (area n·A up to the
    complete bound). Each a list of ``{"id", "n"}`` sorted by n, then identifier
    (docs/theory/iterations.md)."""

    def linked(pairs: list[tuple[ParameterSet, int]]) -> list[dict[str, Any]]:
        found = []
        for member, n in pairs:
            class_id = catalog.class_id_for(member)
            if class_id is not None:
                found.append({"id": class_id, "n": n})
        return sorted(found, key=lambda link: (link["n"], _id_order(link["id"])))

    return {
        "iteration_of": linked(class_iteration_bases(label)),
        "iterations": linked(class_iterations(label, complete_to)),
    }


def _id_order(identifier: str) -> tuple[int, int]:
    area, _, rank = identifier[2:].partition("-")
    return (int(area), int(rank))


__all__ = ["entry_report"]
