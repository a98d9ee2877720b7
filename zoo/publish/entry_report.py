"""The JSON object of one catalog entry, as ``zoo show ID --format json`` prints it.

Built here, above the catalog and beside the citation it carries, so that the command line and the
web catalog (``zoo serve``) answer with the same object from one code path.
"""

from __future__ import annotations

from typing import Any

from zoo.catalog.identifiers import read_identifier
from zoo.catalog.service import Catalog
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
    report["frame"] = {
        "id": frame.id,
        "label": frame.label,
        "net_automorphisms": frame.automorphisms,
        "lattice_key": list(frame.lattice_key),
        "other_classes": [c for c in frame.class_ids if c != entry.id],
    }
    report["citation"] = citation
    report["complete_to"] = catalog.complete_to()
    return report


__all__ = ["entry_report"]
