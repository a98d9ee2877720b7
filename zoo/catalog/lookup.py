"""Answering from a catalog without building one: the class of an identified net
(``zoo identify``) and the classes a designed system iterates (``zoo ring``).

``zoo.interchange.identify`` takes a lookup function and never opens a database itself;
``catalog_lookup(location)`` is that function for the catalog at a location (``--db``).
"""

from __future__ import annotations

from collections.abc import Callable
from functools import partial

from zoo.core.params import ParameterSet
from zoo.errors import CatalogError
from zoo.storage.location import catalog_file


def _missing_catalog_file(location: str | None) -> str | None:
    """``no catalog at PATH`` when the location is a file path with no file, else None.

    Checked before ``resolve_location``, which creates the parent folder of a SQLite file:
    identification only reads, so it must not leave folders behind either.
    """
    path = catalog_file(location)
    return None if path is None or path.is_file() else f"no catalog at {path}"


def catalog_status(
    params: ParameterSet, location: str | None, fingerprint: str | None = None
) -> tuple[str | None, str]:
    """(class identifier or None, a short status) for a class label; never creates a catalog.

    The status is the identifier, ``beyond the catalog bound N``, ``not in the catalog at X``,
    ``no catalog at X`` or ``catalog unavailable (...)``. With ``fingerprint`` the entry's
    stored fingerprint is compared with it, and a mismatch is reported in the status.
    """
    # Imported here: SQLAlchemy costs half a second, which ``zoo ring`` need not pay.
    from zoo.catalog.service import Catalog
    from zoo.storage.database import catalog_exists, display_location, resolve_location

    missing = _missing_catalog_file(location)
    if missing is not None:
        return None, missing
    try:
        url = resolve_location(location)
        shown = display_location(url)
        if not catalog_exists(url):
            return None, f"no catalog at {shown}"
        catalog = Catalog.open(location)
        try:
            entry = catalog.class_for_params(params)
            bound = catalog.complete_to()
        finally:
            catalog.close()
    except CatalogError as exc:
        return None, f"catalog unavailable ({exc})"
    if entry is not None:
        if fingerprint is not None and entry.fingerprint != fingerprint:
            return entry.id, (
                f"{entry.id}, but its stored fingerprint differs from this net's; the catalog "
                "may use another canonical encoding"
            )
        return entry.id, entry.id
    if params.area > bound:
        return None, f"beyond the catalog bound {bound}"
    return None, f"not in the catalog at {shown}"


def iterated_entries(
    p: ParameterSet, class_id: Callable[[ParameterSet], str | None]
) -> list[dict[str, object]]:
    """The catalog classes of which the class of p is an n-fold temporal iteration, as
    ``{"id", "n"}`` sorted by n then identifier (``zoo.core.iterations.class_iteration_bases``,
    docs/theory/iterations.md); ``class_id`` looks a parameter set up in the catalog (None when
    it is not held). Empty when the class iterates nothing the catalog holds."""
    from zoo.core.iterations import class_iteration_bases

    found = {(class_id(base), n) for base, n in class_iteration_bases(p)}
    links = [(identifier, n) for identifier, n in found if identifier is not None]
    return [{"id": identifier, "n": n} for identifier, n in sorted(links, key=_link_order)]


def _link_order(link: tuple[str, int]) -> tuple[int, int, int]:
    area, _, rank = link[0][2:].partition("-")
    return (link[1], int(area), int(rank))


def catalog_lookup(
    location: str | None,
) -> Callable[[ParameterSet, str | None], tuple[str | None, str]]:
    """The lookup ``identify_net`` takes, for the catalog at ``location`` (read only)."""
    return partial(_status, location=location)


def _status(
    params: ParameterSet, fingerprint: str | None, *, location: str | None
) -> tuple[str | None, str]:
    return catalog_status(params, location, fingerprint)


__all__ = ["catalog_file", "catalog_lookup", "catalog_status", "iterated_entries"]
