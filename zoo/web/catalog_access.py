"""The catalog as the web catalog reads it: opened read-only, and the identify adapter.

The web catalog never writes: every connection it opens is put in read-only mode by the database
itself (SQLite ``PRAGMA query_only``, PostgreSQL ``default_transaction_read_only``), so a bug in a
page cannot change stored data.
"""

from __future__ import annotations

import re
import shlex
from typing import Any

import anyio
from starlette.datastructures import UploadFile
from starlette.requests import Request

from zoo.catalog.lookup import catalog_file, catalog_lookup
from zoo.catalog.service import DEFAULT_MAX_AREA, Catalog
from zoo.errors import CatalogError, FormatError, LimitExceeded, ParameterError
from zoo.interchange import nettext, pnml
from zoo.interchange.identify import Identification, identify_net
from zoo.interchange.netfile import refuse_unread_formats
from zoo.interchange.netmodel import PlaceTransitionNet, looks_like_xml

#: Largest upload the identify page and API accept (common practice: a few MiB for a form
#: upload; the largest PNML of an area-1000 cycloid is well under this).
MAX_UPLOAD_BYTES = 2 * 1024 * 1024
#: Seconds an identification may take before the page gives up (common practice: answer a web
#: request within tens of seconds; identify of a catalog-sized net takes well under one).
IDENTIFY_SECONDS = 20.0


class UploadTooLarge(LimitExceeded):
    """A request body over the limit (answered with 413)."""


def open_read_only(location: str | None) -> Catalog:
    """Open an existing catalog (never creating one) with every connection read-only.

    A file path that names no file is refused before the catalog service resolves it, which
    would create the missing parent folders: a reader leaves nothing behind.
    """
    path = catalog_file(location)
    if path is not None and not path.is_file():
        raise CatalogError(
            f"no catalog at {path}; build one with: zoo build --max-area {DEFAULT_MAX_AREA} "
            f"--db {shlex.quote(str(path))}"
        )
    return Catalog.open(location, read_only=True)


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
    return identify_net(net, catalog_lookup(catalog.url))


_SAFE_NAME = re.compile(r"[^A-Za-z0-9._-]+")


def upload_name(name: str | None) -> str:
    """A display name for an uploaded file: its last path part, plain characters, short. It
    only labels the answer; nothing is ever read or written under it."""
    base = (name or "upload").replace("\\", "/").rsplit("/", 1)[-1]
    return (_SAFE_NAME.sub("_", base).strip("._") or "upload")[:80]


async def identify_answer(request: Request) -> dict[str, Any]:
    """The object of ``zoo identify --format json`` for the uploaded file, or a ZooError."""
    try:
        form = await request.form(max_files=1, max_fields=4)
    except UploadTooLarge:
        raise
    except Exception as exc:  # a malformed multipart body
        raise ParameterError(f"cannot read the upload ({exc}); send a form with a file") from None
    upload = form.get("file")
    if not isinstance(upload, UploadFile):
        raise ParameterError("no file in the upload; choose a PNML or net text file")
    data = await upload.read(MAX_UPLOAD_BYTES + 1)
    name = upload_name(upload.filename)
    net = parse_upload(data, name)
    catalog: Catalog = request.app.state.catalog
    try:
        with anyio.fail_after(IDENTIFY_SECONDS):
            answer = await anyio.to_thread.run_sync(
                identify_upload, catalog, net, abandon_on_cancel=True
            )
    except TimeoutError:
        raise LimitExceeded(
            f"identifying {name} took over {IDENTIFY_SECONDS:.0f} s; run zoo identify FILE "
            "on your own machine for nets this large"
        ) from None
    return answer.as_dict()


__all__ = [
    "MAX_UPLOAD_BYTES",
    "UploadTooLarge",
    "identify_upload",
    "open_read_only",
    "parse_upload",
]
