"""The class of a parameter set, found without loading the database stack when possible.

``zoo show PARAMS`` and ``zoo compare`` name the catalog identifier beside answers that need
no catalog. A local SQLite catalog of the current schema is asked by the light lookup of
``zoo.storage.quicklookup``; only a URL or a file that lookup cannot vouch for goes through the
catalog service, which loads SQLAlchemy and Alembic (about half a second).
"""

from __future__ import annotations

from zoo.core.params import ParameterSet
from zoo.storage.location import catalog_file
from zoo.storage.quicklookup import UNANSWERED, quick_class_id


def class_id_of(p: ParameterSet, location: str | None) -> str | None:
    """The identifier of p's class in the catalog at ``location``, or None (no catalog there,
    or p's area not stored); never builds, never creates a file. A catalog that cannot be read
    raises ``CatalogError``."""
    file = catalog_file(location)
    if file is not None:
        if not file.exists():
            return None
        quick = quick_class_id(p, file)
        if quick is not UNANSWERED:
            assert quick is None or isinstance(quick, str)
            return quick
    from zoo.catalog.service import lookup_class_id  # the full path, only when needed

    return lookup_class_id(p, location)
