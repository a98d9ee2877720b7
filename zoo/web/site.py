"""``zoo site OUTDIR``: the pages of the web catalog written as static files.

Every page is rendered by the web app itself (called in-process, no server, no network), so the
static site shows exactly what ``zoo serve`` shows: the home page, one page per class and per
frame with their downloads, an index per area, and a search page that filters a shipped JSON index
(``search-index.json``) for small queries (``field op value`` joined by ``and``, and the yes/no
fields ``regular`` and ``cyclic``, each possibly after ``not``). Serve the folder at the root of a
web site (addresses start with ``/``), e.g. ``python3 -m http.server -d OUTDIR``.
"""

from __future__ import annotations

import asyncio
import json
import os
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from zoo.errors import ZooError
from zoo.publish.outfile import write_output
from zoo.web.app import create_app
from zoo.web.catalog_access import open_read_only

#: The files under each class page.
CLASS_FILES = ("net.pnml", "net.dot", "net.json", "entry.json", "cite.bib")


@dataclass(frozen=True)
class SiteReport:
    folder: Path
    pages: int
    files: int
    classes: int
    complete_to: int


async def _get(app: Any, path: str) -> tuple[int, bytes]:
    """One GET through the ASGI app, in-process."""
    scope = {
        "type": "http", "asgi": {"version": "3.0"}, "http_version": "1.1", "method": "GET",
        "scheme": "http", "path": path, "raw_path": path.encode(), "query_string": b"",
        "root_path": "", "headers": [(b"host", b"site")], "client": ("127.0.0.1", 0),
        "server": ("site", 80),
    }  # fmt: skip
    status = 0
    body = bytearray()

    async def receive() -> dict[str, Any]:
        return {"type": "http.request", "body": b"", "more_body": False}

    async def send(message: dict[str, Any]) -> None:
        nonlocal status
        if message["type"] == "http.response.start":
            status = message["status"]
        elif message["type"] == "http.response.body":
            body.extend(message.get("body", b""))

    await app(scope, receive, send)
    return status, bytes(body)


def _target(folder: Path, path: str) -> Path:
    """Where the answer of an address goes: pages as NAME/index.html, files as themselves."""
    parts = [p for p in path.split("/") if p]
    for part in parts:  # addresses come from catalog identifiers and fixed names only
        if part in (".", "..") or os.sep in part:
            raise ZooError(f"refusing to write the address {path!r}")
    if not parts:
        return folder / "index.html"
    if "." in parts[-1] and parts[0] not in ("classes", "frames", "areas") or len(parts) > 2:
        return folder.joinpath(*parts)
    return folder.joinpath(*parts, "index.html")


def search_index(entries: Any) -> list[dict[str, Any]]:
    """The rows the static search filters: identifiers and the fields it can compare."""
    rows = []
    for e in entries:
        inv = e.invariants
        rows.append(
            {
                "id": e.id,
                "label": e.label,
                "area": e.area,
                "frame": e.frame_id,
                "members": len(e.members),
                "loop": inv["loop"],
                "tokens": inv["tokens"],
                "states": inv["states"] if inv["states"] < 2**53 else float(inv["states"]),
                "enabled": inv["enabled"],
                "automorphisms": inv["automorphisms"],
                "net_automorphisms": inv["net_automorphisms"],
                "iteration": inv["iteration"],
                "cyclic": inv["cyclic"],
                "processes": sorted({int(str(r["processes"])) for r in e.readings}),
                "regular": sorted({bool(r["regular"]) for r in e.readings}),
            }
        )
    return rows


def write_site(
    location: str | None, folder: Path, progress: Callable[[str], None] | None = None
) -> SiteReport:
    """Render every page of the catalog at ``location`` into ``folder`` (created if missing)."""
    catalog = open_read_only(location)
    try:
        app = create_app(catalog=catalog, static_site=True)
        entries = list(catalog.iter_entries())
        frames = sorted({e.frame_id for e in entries}, key=lambda f: (len(f), f))
        areas = catalog.complete_areas()
        addresses = ["/", "/search.html", "/static/style.css", "/static/keys.js",
                     "/static/mark.svg", "/static/site-search.js"]  # fmt: skip
        addresses += [f"/areas/{a}" for a in areas]
        for e in entries:
            addresses.append(f"/classes/{e.id}")
            addresses += [f"/classes/{e.id}/{name}" for name in CLASS_FILES]
        addresses += [f"/frames/{f}" for f in frames]
        folder.mkdir(parents=True, exist_ok=True)
        pages = files = 0

        async def render_all() -> tuple[int, int]:
            nonlocal pages, files
            for n, path in enumerate(addresses):
                status, body = await _get(app, path)
                if status != 200:
                    raise ZooError(f"the page {path} answered {status}; the site is incomplete")
                target = _target(folder, path)
                target.parent.mkdir(parents=True, exist_ok=True)
                _write(target, body)
                if target.name == "index.html":
                    pages += 1
                else:
                    files += 1
                if progress is not None and n % 50 == 0:
                    progress(f"{n:,}/{len(addresses):,} {path}")
            return pages, files

        # A thread of its own, so that a caller already inside an event loop (a notebook, a
        # browser-driving test) can write a site too.
        with ThreadPoolExecutor(max_workers=1) as pool:
            pool.submit(asyncio.run, render_all()).result()
        index = {"complete_to": catalog.complete_to(), "classes": search_index(entries)}
        _write(folder / "search-index.json", json.dumps(index, separators=(",", ":")).encode())
        return SiteReport(folder, pages, files + 1, len(entries), catalog.complete_to())
    finally:
        catalog.close()


def _write(target: Path, body: bytes) -> None:
    """Write a page whole or not at all (``zoo.publish.outfile``, as every command writes)."""
    write_output(target, body)


__all__ = ["SiteReport", "search_index", "write_site"]
