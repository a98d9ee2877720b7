"""The catalog as the web catalog reads it: opened read-only, and the identify adapter.

The web catalog never writes: every connection it opens is put in read-only mode by the database
itself (SQLite ``PRAGMA query_only``, PostgreSQL ``default_transaction_read_only``), so a bug in a
page cannot change stored data.
"""

from __future__ import annotations

from typing import Any

from sqlalchemy import event

from zoo.catalog.service import Catalog
from zoo.errors import FormatError, LimitExceeded
from zoo.interchange import nettext, pnml
from zoo.interchange.identify import Identification, identify_net
from zoo.interchange.netfile import refuse_unread_formats
from zoo.interchange.netmodel import PlaceTransitionNet, looks_like_xml

#: Largest upload the identify page and API accept (common practice: a few MiB for a form
#: upload; the largest PNML of an area-1000 cycloid is well under this).
MAX_UPLOAD_BYTES = 2 * 1024 * 1024


class UploadTooLarge(LimitExceeded):
    """A request body over the limit (answered with 413)."""


def open_read_only(location: str | None) -> Catalog:
    """Open an existing catalog (never creating one) with every connection read-only."""
    catalog = Catalog.open(location)
    engine = catalog.engine
    backend = engine.url.get_backend_name()

    @event.listens_for(engine, "connect")
    def _read_only(dbapi_connection: Any, _record: Any) -> None:
        cursor = dbapi_connection.cursor()
        try:
            if backend == "sqlite":
                cursor.execute("PRAGMA query_only = ON")
            else:
                cursor.execute("SET default_transaction_read_only = on")
        finally:
            cursor.close()
        if backend != "sqlite":
            dbapi_connection.commit()  # psycopg opened a transaction for the SET

    engine.dispose()  # the connection Catalog.open checked with was made before the listener
    return catalog


def parse_upload(data: bytes, filename: str) -> PlaceTransitionNet:
    """The net of an uploaded PNML or net text file, told apart by content as ``zoo identify``
    does (``zoo.interchange.netfile``); the PNML reader keeps its XML defences."""
    if len(data) > MAX_UPLOAD_BYTES:
        raise FormatError(
            f"{filename} has {len(data):,} bytes, over the upload limit of "
            f"{MAX_UPLOAD_BYTES:,}; identify larger nets with: zoo identify FILE"
        )
    if looks_like_xml(data):
        return pnml.parse_pnml(data, filename)
    refuse_unread_formats(data, filename)
    return nettext.parse_net_text(data, filename)


def identify_upload(catalog: Catalog, net: PlaceTransitionNet) -> Identification:
    """The one call of ``zoo.interchange.identify.identify_net``: the only line to change when
    its signature changes."""
    return identify_net(net, catalog.url, use_catalog=True)


__all__ = [
    "MAX_UPLOAD_BYTES",
    "UploadTooLarge",
    "identify_upload",
    "open_read_only",
    "parse_upload",
]
