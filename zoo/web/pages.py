"""The HTML pages of the web catalog; every answer comes from the catalog service.

Addresses (stable, for papers to link; docs/web.md):
``/classes/CY16-3`` a class, ``/frames/FR16-2`` a frame, ``/parameter-sets/4,2,2,3`` redirects
to the class of that parameter set, ``/search?q=...`` a query, ``/identify``, ``/rings``,
``/docs/NAME``. Downloads hang below an entry: ``/classes/CY16-3/net.pnml`` and so on.
"""

from __future__ import annotations

import sys
from functools import lru_cache
from typing import Any
from urllib.parse import urlencode

from markupsafe import Markup
from starlette.exceptions import HTTPException
from starlette.requests import Request
from starlette.responses import PlainTextResponse, RedirectResponse, Response
from starlette.routing import Route

from zoo.catalog.identifiers import read_identifier
from zoo.catalog.service import Catalog
from zoo.core.params import ParameterSet, parse_params
from zoo.errors import LimitExceeded, NotInCatalog, ParameterError, QuerySyntaxError, ZooError
from zoo.query.fields import field_named
from zoo.web import answers
from zoo.web.catalog_access import MAX_UPLOAD_BYTES, UploadTooLarge, identify_answer
from zoo.web.plots import counts_svg
from zoo.web.rendering import json_text, render

#: Rows a CSV or JSON download of a search holds at most.
MAX_DOWNLOAD_ROWS = 10_000
#: Queries shown on the home page, each a link to its search.
EXAMPLE_QUERIES = (
    ("processes = 3 and area < 40", "three processes, small nets"),
    ("regular and loop >= 6", "regular systems whose shortest cycle is long"),
    ("tokens = 4 and area <= 12", "four tokens, areas up to 12"),
    ("cyclic and not regular", "cyclic transition group, not regular"),
)


def _catalog(request: Request) -> Catalog:
    catalog: Catalog = request.app.state.catalog
    return catalog


def _status_of(exc: ZooError) -> int:
    return 404 if isinstance(exc, NotInCatalog) else 400


# --- home ------------------------------------------------------------------------------------


def home(request: Request) -> Response:
    catalog = _catalog(request)
    rows = [s for s in catalog.stats() if s.complete]
    totals = {
        "parameter_sets": sum(r.parameter_sets for r in rows),
        "classes": sum(r.classes for r in rows),
        "frames": sum(r.frames for r in rows),
    }
    return render(
        request,
        "home.html",
        complete_to=catalog.complete_to(),
        rows=rows,
        totals=totals,
        plot=Markup(counts_svg(rows)),
        examples=[(q, why, urlencode({"q": q})) for q, why in EXAMPLE_QUERIES],
    )


# --- search ----------------------------------------------------------------------------------


def _search_from(request: Request, *, download: bool = False) -> answers.SearchPage:
    params = request.query_params
    largest = MAX_DOWNLOAD_ROWS if download else answers.MAX_LIMIT
    limit = answers.read_bound(
        params.get("limit"), "limit", largest if download else answers.DEFAULT_LIMIT, largest
    )
    offset = answers.read_bound(params.get("offset"), "offset", 0, answers.MAX_OFFSET)
    return answers.search(
        _catalog(request),
        params.get("q", ""),
        sort=params.get("sort") or None,
        limit=limit,
        offset=offset,
        columns=params.getlist("col"),
        max_limit=largest,
    )


def _address(path: str, **values: Any) -> str:
    pairs: list[tuple[str, Any]] = []
    for key, value in values.items():
        if isinstance(value, list | tuple):
            pairs.extend((key, v) for v in value)
        elif value not in (None, ""):
            pairs.append((key, value))
    return path + ("?" + urlencode(pairs) if pairs else "")


def search_page(request: Request) -> Response:
    params = request.query_params
    query = params.get("q", "")
    chosen = params.getlist("col")
    values: dict[str, Any] = {
        "query": query,
        "sort": params.get("sort", ""),
        "chosen": chosen,
        "choices": answers.COLUMN_CHOICES,
        "page": None,
        "error": None,
        "caret": None,
    }
    try:
        page = _search_from(request)
    except QuerySyntaxError as exc:
        values["error"] = str(exc)
        values["caret"] = {"query": exc.query or query, "position": exc.position}
        return render(request, "search.html", 400, **values)
    except ZooError as exc:
        values["error"] = str(exc)
        return render(request, "search.html", 400, **values)
    columns = [c for c in page.columns if c != "members"]
    keep = {"q": query, "col": chosen}

    def sort_link(name: str) -> str:
        current = page.sort or ""
        target = f"-{name}" if current == name else name
        return _address("/search", **keep, sort=target, limit=page.limit)

    def sort_mark(name: str) -> str:
        if page.sort == name:
            return "ascending"
        if page.sort == f"-{name}":
            return "descending"
        return "none"

    pages = {
        "previous": _address(
            "/search",
            **keep,
            sort=page.sort,
            limit=page.limit,
            offset=max(0, page.offset - page.limit),
        )
        if page.offset > 0
        else None,
        "next": _address(
            "/search", **keep, sort=page.sort, limit=page.limit, offset=page.offset + page.limit
        )
        if page.offset + page.limit < page.total and page.offset + page.limit <= answers.MAX_OFFSET
        else None,
    }
    values.update(
        page=page,
        columns=columns,
        sortable=["area", *(c for c in columns if field_named(c) is not None)],
        sort_link=sort_link,
        sort_mark=sort_mark,
        pages=pages,
        first=page.offset + 1,
        last=page.offset + len(page.entries),
        note=page.result.completeness_note(),
        csv_link=_address("/search.csv", **keep, sort=page.sort),
        json_link=_address("/search.json", **keep, sort=page.sort),
        max_download=MAX_DOWNLOAD_ROWS,
    )
    return render(request, "search.html", **values)


def _download_headers(page: answers.SearchPage, name: str) -> dict[str, str]:
    shown = len(page.entries)
    headers = {
        "content-disposition": f'attachment; filename="{name}"',
        "x-zoo-complete-to": str(page.result.complete_to),
        "x-zoo-total": str(page.total),
        "x-zoo-rows": str(shown),
    }
    return headers


def search_csv(request: Request) -> Response:
    page = _search_from(request, download=True)
    return Response(
        page.csv_text(),
        media_type="text/csv; charset=utf-8",
        headers=_download_headers(page, "zoo-search.csv"),
    )


def search_json(request: Request) -> Response:
    page = _search_from(request, download=True)
    return Response(
        json_text(page.items()),
        media_type="application/json",
        headers=_download_headers(page, "zoo-search.json"),
    )


# --- areas ---------------------------------------------------------------------------------


def area_page(request: Request) -> Response:
    """Every class of one area, by rank, with its frame: the index of an area."""
    text = request.path_params["area"]
    area = answers.read_bound(text, "area", 0, 10**6) if text.isdigit() else -1
    catalog = _catalog(request)
    if area not in catalog.complete_areas():
        raise HTTPException(404, f"area {text} is not a complete area of this catalog")
    entries = list(catalog.iter_entries([area]))
    areas = set(catalog.complete_areas())
    return render(
        request,
        "area.html",
        area=area,
        entries=entries,
        previous=area - 1 if area - 1 in areas else None,
        next=area + 1 if area + 1 in areas else None,
        title=f"Area {area}",
    )


# --- entries ---------------------------------------------------------------------------------


#: Pictures kept in memory: the two views of this many classes. A picture depends only on the
#: parameter set (its label), never on the catalog, so the label is the whole key. At about
#: 55 kB per area-100 picture this bounds the cache near 55 MB per server process.
PICTURE_CACHE_CLASSES = 512


@lru_cache(maxsize=2 * PICTURE_CACHE_CLASSES)
def picture(label: str, view: str) -> str:
    """The SVG of a view of C(label), for an inline picture and its download.

    Written straight from the view's scene by zoo.pictures.svg (milliseconds) rather than
    through matplotlib (about half a second for an area-100 class): the same elements, ids and
    colours, laid out by the same rules.
    """
    from zoo.pictures.svg import svg_document
    from zoo.pictures.views import picture_scene

    return svg_document(picture_scene(parse_params(label), view))


def _pictures(label: str) -> list[dict[str, Any]]:
    shown: list[dict[str, Any]] = []
    for view, caption in (
        ("parallelogram", "Fundamental parallelogram"),
        ("net", "The net, transitions on rings"),
    ):
        try:
            shown.append({"view": view, "caption": caption, "svg": Markup(picture(label, view))})
        except (LimitExceeded, ParameterError) as exc:
            shown.append({"view": view, "caption": caption, "svg": None, "reason": str(exc)})
    return shown


def _entry_report(request: Request, ref: str) -> dict[str, Any]:
    from zoo.publish.entry_report import entry_report

    try:
        return entry_report(_catalog(request), ref)
    except ZooError as exc:
        raise HTTPException(_status_of(exc), str(exc)) from None


def class_page(request: Request) -> Response:
    ref = request.path_params["ref"]
    identifier = read_identifier(ref)
    if identifier is not None and identifier.kind == "frame":
        return RedirectResponse(f"/frames/{identifier}", status_code=301)
    report = _entry_report(request, ref)
    if ref != report["id"]:  # a label, member or lower-case spelling: the one stable address
        return RedirectResponse(f"/classes/{report['id']}", status_code=301)
    from zoo.publish.cite import cite

    citation = cite(_catalog(request), report["id"])
    return render(
        request,
        "class.html",
        e=report,
        pictures=_pictures(report["label"]),
        bibtex=citation.bibtex(),
        title=f"{report['id']} {report['label']}",
    )


def frame_page(request: Request) -> Response:
    ref = request.path_params["ref"]
    identifier = read_identifier(ref)
    if identifier is None or identifier.kind != "frame":
        raise HTTPException(404, f"{ref!r} is not a frame identifier such as FR16-2")
    report = _entry_report(request, str(identifier))
    if ref != report["id"]:
        return RedirectResponse(f"/frames/{report['id']}", status_code=301)
    return render(request, "frame.html", f=report, title=f"{report['id']} {report['label']}")


def parameter_set_page(request: Request) -> Response:
    text = request.path_params["params"]
    try:
        p = parse_params(text)
    except ZooError as exc:
        raise HTTPException(400, str(exc)) from None
    catalog = _catalog(request)
    entry = catalog.class_for_params(p)
    if entry is None:
        bound = catalog.complete_to()
        where = (
            f"{p} has area {p.area}, beyond the area {bound} up to which this catalog is complete"
            if p.area > bound
            else f"{p} is not a cycloid of this catalog"
        )
        raise HTTPException(404, where)
    return RedirectResponse(f"/classes/{entry.id}", status_code=301)


def _class_params(request: Request) -> tuple[str, ParameterSet]:
    ref = request.path_params["ref"]
    identifier = read_identifier(ref)
    if identifier is None or identifier.kind != "class":
        raise HTTPException(404, f"{ref!r} is not a class identifier such as CY16-3")
    try:
        entry = _catalog(request).get(str(identifier))
    except ZooError as exc:
        raise HTTPException(_status_of(exc), str(exc)) from None
    return entry.id, parse_params(entry.label)


def class_download(request: Request) -> Response:
    """A file of an entry: net.pnml, net.dot, net.json, entry.json, cite.bib, VIEW.svg."""
    name = request.path_params["file"]
    class_id, p = _class_params(request)
    from zoo.core.net import build_net

    if name == "net.pnml":
        from zoo.interchange.pnml import pnml_document

        body, media = pnml_document(build_net(p)), "application/xml"
    elif name == "net.dot":
        from zoo.interchange.dot import dot_document

        body, media = dot_document(build_net(p)), "text/vnd.graphviz"
    elif name == "net.json":
        from zoo.interchange.netjson import json_document

        body, media = json_document(build_net(p)), "application/json"
    elif name == "entry.json":
        body, media = json_text(_entry_report(request, class_id)), "application/json"
    elif name == "cite.bib":
        from zoo.publish.cite import cite

        body, media = cite(_catalog(request), class_id).bibtex(), "application/x-bibtex"
    elif name in ("parallelogram.svg", "net.svg"):
        try:
            body, media = picture(str(p), name.removesuffix(".svg")), "image/svg+xml"
        except ZooError as exc:
            raise HTTPException(400, str(exc)) from None
    else:
        raise HTTPException(404, f"no file {name!r} for {class_id}")
    filename = f"{class_id}-{name}"
    return Response(
        body,
        media_type=media,
        headers={"content-disposition": f'attachment; filename="{filename}"'}
        if not name.endswith(".svg")
        else {},
    )


# --- identify --------------------------------------------------------------------------------


def identify_form(request: Request) -> Response:
    return render(request, "identify.html", answer=None, error=None, limit=MAX_UPLOAD_BYTES)


async def identify_post(request: Request) -> Response:
    try:
        answer = await identify_answer(request)
    except ZooError as exc:
        status = 413 if isinstance(exc, UploadTooLarge) else 400
        return render(
            request, "identify.html", status, answer=None, error=str(exc), limit=MAX_UPLOAD_BYTES
        )
    return render(request, "identify.html", answer=answer, error=None, limit=MAX_UPLOAD_BYTES)


# --- rings -----------------------------------------------------------------------------------


def ring_page(request: Request) -> Response:
    from zoo.core.rings import RingDesign, describe_ring

    params = request.query_params
    items_text, slots_text = params.get("items", ""), params.get("slots", "")
    named_items = params.get("individual_items") == "on"
    named_slots = params.get("individual_slots") == "on"
    form: dict[str, Any] = {
        "items": items_text,
        "slots": slots_text,
        "individual_items": named_items,
        "individual_slots": named_slots,
    }
    report = None
    error = None
    if items_text or slots_text:
        try:
            items = answers.read_bound(items_text or None, "items", 0, 10_000)
            slots = answers.read_bound(slots_text or None, "slots", 0, 10_000)
            design = RingDesign(items, slots, named_items, named_slots)
            entry = _catalog(request).class_for_params(design.params)
            report = describe_ring(design, None if entry is None else entry.id)
        except ZooError as exc:
            error = str(exc)
    return render(request, "ring.html", 400 if error else 200, form=form, r=report, error=error)


# --- docs ------------------------------------------------------------------------------------


def docs_index(request: Request) -> Response:
    docs = request.app.state.docs
    return render(request, "docs.html", pages=list(docs.pages.values()), page=None)


def doc_page(request: Request) -> Response:
    docs = request.app.state.docs
    name = request.path_params["name"].removesuffix(".md")
    page = docs.pages.get(name)
    if page is None:
        raise HTTPException(404, f"no docs page {name!r}")
    return render(request, "docs.html", pages=None, page=page, html=Markup(page.html))


def doc_image(request: Request) -> Response:
    found = request.app.state.docs.images.get(request.path_params["name"])
    if found is None:
        raise HTTPException(404, "no such picture")
    return Response(found, media_type="image/png")


def site_search(request: Request) -> Response:
    """The search page of a static site: filters ``/search-index.json`` in the browser."""
    return render(request, "site-search.html", title="Search")


def robots(request: Request) -> Response:
    return PlainTextResponse("User-agent: *\nDisallow: /search\nDisallow: /api/\n")


def routes() -> list[Route]:
    sys.set_int_max_str_digits(0)  # state counts of large classes have many digits
    return [
        Route("/", home),
        Route("/search", search_page),
        Route("/search.csv", search_csv),
        Route("/search.json", search_json),
        Route("/classes/{ref}", class_page),
        Route("/classes/{ref}/{file}", class_download),
        Route("/frames/{ref}", frame_page),
        Route("/areas/{area}", area_page),
        Route("/parameter-sets/{params}", parameter_set_page),
        Route("/identify", identify_form, methods=["GET"]),
        Route("/identify", identify_post, methods=["POST"]),
        Route("/rings", ring_page),
        Route("/docs", docs_index),
        Route("/docs/images/{name}", doc_image),
        Route("/docs/{name:path}", doc_page),
        Route("/robots.txt", robots),
        Route("/search.html", site_search),
    ]
