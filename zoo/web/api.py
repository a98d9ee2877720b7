"""The JSON API of the web catalog and its OpenAPI 3.1 description (``/api/openapi.json``).

Each answer is the object the matching command prints with ``--format json``, built by the same
functions: ``GET /api/classes`` (``zoo find``, wrapped with ``total`` and ``complete_to``),
``GET /api/classes/{id}`` (``zoo show ID``), ``GET /api/parameter-sets/{params}`` (``zoo show
PARAMS``), ``GET /api/frames/{id}``, ``POST /api/identify`` (``zoo identify``). Bad input gets a
4xx answer ``{"error": ..., "status": ...}``.
"""

from __future__ import annotations

from typing import Any

from starlette.requests import Request
from starlette.responses import JSONResponse, Response
from starlette.routing import Route

from zoo.catalog.identifiers import read_identifier
from zoo.catalog.service import Catalog
from zoo.core.params import parse_params
from zoo.errors import NotInCatalog, ZooError
from zoo.version import __version__
from zoo.web import answers


def _catalog(request: Request) -> Catalog:
    catalog: Catalog = request.app.state.catalog
    return catalog


def problem(status: int, message: str) -> JSONResponse:
    return JSONResponse({"error": message, "status": status}, status_code=status)


def _failure(exc: ZooError) -> JSONResponse:
    from zoo.web.catalog_access import UploadTooLarge

    if isinstance(exc, UploadTooLarge):
        return problem(413, str(exc))
    return problem(404 if isinstance(exc, NotInCatalog) else 400, str(exc))


def classes(request: Request) -> Response:
    params = request.query_params
    try:
        page = answers.search(
            _catalog(request),
            params.get("q", ""),
            sort=params.get("sort") or None,
            limit=answers.read_bound(
                params.get("limit"), "limit", answers.DEFAULT_LIMIT, answers.MAX_LIMIT
            ),
            offset=answers.read_bound(params.get("offset"), "offset", 0, answers.MAX_OFFSET),
        )
    except ZooError as exc:
        response = _failure(exc)
        position = getattr(exc, "position", None)
        if position is not None:  # a query syntax error: where, for a caret
            response = JSONResponse(
                {"error": str(exc), "status": 400, "position": position}, status_code=400
            )
        return response
    return JSONResponse(
        {
            "total": page.total,
            "complete_to": page.result.complete_to,
            "note": page.result.completeness_note(),
            "limit": page.limit,
            "offset": page.offset,
            "items": page.items(),
        }
    )


def one_class(request: Request) -> Response:
    from zoo.publish.entry_report import entry_report

    ref = request.path_params["ref"]
    identifier = read_identifier(ref)
    if identifier is None or identifier.kind != "class":
        return problem(404, f"{ref!r} is not a class identifier such as CY16-3")
    try:
        return JSONResponse(entry_report(_catalog(request), str(identifier)))
    except ZooError as exc:
        return _failure(exc)


def one_frame(request: Request) -> Response:
    from zoo.publish.entry_report import entry_report

    ref = request.path_params["ref"]
    identifier = read_identifier(ref)
    if identifier is None or identifier.kind != "frame":
        return problem(404, f"{ref!r} is not a frame identifier such as FR16-2")
    try:
        return JSONResponse(entry_report(_catalog(request), str(identifier)))
    except ZooError as exc:
        return _failure(exc)


def parameter_set(request: Request) -> Response:
    try:
        p = parse_params(request.path_params["params"])
        return JSONResponse(answers.parameter_set_report(_catalog(request), p))
    except ZooError as exc:
        return _failure(exc)


async def identify(request: Request) -> Response:
    from zoo.web.catalog_access import identify_answer

    try:
        return JSONResponse(await identify_answer(request))
    except ZooError as exc:
        return _failure(exc)


def openapi(request: Request) -> Response:
    return JSONResponse(openapi_document())


def _error_responses() -> dict[str, Any]:
    error = {"content": {"application/json": {"schema": {"$ref": "#/components/schemas/Error"}}}}
    return {
        "400": {"description": "Bad input, named in the error", **error},
        "404": {"description": "Not in the catalog", **error},
    }


def _query_parameter(name: str, description: str, kind: str = "string") -> dict[str, Any]:
    return {"name": name, "in": "query", "required": False, "description": description,
            "schema": {"type": kind}}  # fmt: skip


def openapi_document() -> dict[str, Any]:
    """The OpenAPI 3.1 description of the API."""
    ok_object = {"content": {"application/json": {"schema": {"type": "object"}}}}
    path_id = {"name": "id", "in": "path", "required": True, "schema": {"type": "string"}}
    return {
        "openapi": "3.1.0",
        "info": {
            "title": "zoo catalog of cycloids",
            "version": __version__,
            "description": "Read-only access to a catalog of Petri's cycloids: query classes, "
            "read an entry, identify a net. Objects are those of the zoo command line's "
            "--format json.",
        },
        "paths": {
            "/api/classes": {
                "get": {
                    "summary": "Classes matching a query (zoo find)",
                    "parameters": [
                        _query_parameter("q", "A query, e.g. 'processes = 3 and area < 40'"),
                        _query_parameter("sort", "A field; prefix - for descending"),
                        _query_parameter("limit", f"At most {answers.MAX_LIMIT}", "integer"),
                        _query_parameter("offset", f"At most {answers.MAX_OFFSET}", "integer"),
                    ],
                    "responses": {
                        "200": {
                            "description": "One page of matching classes",
                            "content": {
                                "application/json": {
                                    "schema": {"$ref": "#/components/schemas/ClassPage"}
                                }
                            },
                        },
                        **_error_responses(),
                    },
                }
            },
            "/api/classes/{id}": {
                "get": {
                    "summary": "A class entry (zoo show ID)",
                    "parameters": [{**path_id, "description": "e.g. CY16-3"}],
                    "responses": {
                        "200": {"description": "The entry", **ok_object},
                        **_error_responses(),
                    },
                }
            },  # fmt: skip
            "/api/frames/{id}": {
                "get": {
                    "summary": "A frame entry (zoo show FRAME_ID)",
                    "parameters": [{**path_id, "description": "e.g. FR16-2"}],
                    "responses": {
                        "200": {"description": "The frame", **ok_object},
                        **_error_responses(),
                    },
                }
            },  # fmt: skip
            "/api/parameter-sets/{params}": {
                "get": {
                    "summary": "Every invariant of a parameter set (zoo show PARAMS)",
                    "parameters": [
                        {
                            "name": "params",
                            "in": "path",
                            "required": True,
                            "description": "alpha,beta,gamma,delta, e.g. 4,2,2,3",
                            "schema": {"type": "string"},
                        }  # fmt: skip
                    ],
                    "responses": {
                        "200": {"description": "The report", **ok_object},
                        **_error_responses(),
                    },
                }
            },  # fmt: skip
            "/api/identify": {
                "post": {
                    "summary": "Identify the net of a PNML or net text file (zoo identify)",
                    "requestBody": {
                        "required": True,
                        "content": {
                            "multipart/form-data": {
                                "schema": {
                                    "type": "object",
                                    "properties": {"file": {"type": "string", "format": "binary"}},
                                    "required": ["file"],
                                }
                            }
                        },
                    },
                    "responses": {
                        "200": {"description": "The identification", **ok_object},
                        "413": {"description": "The upload is too large"},
                        **_error_responses(),
                    },
                }
            },
        },
        "components": {
            "schemas": {
                "Error": {
                    "type": "object",
                    "properties": {
                        "error": {"type": "string"},
                        "status": {"type": "integer"},
                        "position": {"type": "integer"},
                    },
                    "required": ["error", "status"],
                },
                "ClassPage": {
                    "type": "object",
                    "properties": {
                        "total": {"type": "integer"},
                        "complete_to": {"type": "integer"},
                        "note": {"type": "string"},
                        "limit": {"type": "integer"},
                        "offset": {"type": "integer"},
                        "items": {"type": "array", "items": {"type": "object"}},
                    },
                    "required": ["total", "complete_to", "items"],
                },
            }
        },
    }


def routes() -> list[Route]:
    return [
        Route("/api/openapi.json", openapi),
        Route("/api/classes", classes),
        Route("/api/classes/{ref}", one_class),
        Route("/api/frames/{ref}", one_frame),
        Route("/api/parameter-sets/{params}", parameter_set),
        Route("/api/identify", identify, methods=["POST"]),
    ]
