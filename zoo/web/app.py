"""The ASGI app of the web catalog: routes, security headers, request limits and error pages.

``create_app(location)`` opens the catalog read-only once and serves pages (``zoo.web.pages``) and
the JSON API (``zoo.web.api``). Static files and docs pages are read into memory at start, so no
path taken from a request ever reaches the file system.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from importlib import resources

from starlette.applications import Starlette
from starlette.exceptions import HTTPException
from starlette.requests import Request
from starlette.responses import Response
from starlette.routing import Route
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from zoo.catalog.service import Catalog
from zoo.web.catalog_access import MAX_UPLOAD_BYTES, UploadTooLarge, open_read_only
from zoo.web.rendering import error_response

#: The content security policy of every answer: scripts and styles from this server only (the
#: inline SVG pictures carry their own <style>, hence 'unsafe-inline' for styles, never for
#: scripts), no frames, no plug-ins, forms post back here only.
CONTENT_SECURITY_POLICY = (
    "default-src 'none'; script-src 'self'; style-src 'self' 'unsafe-inline'; "
    "img-src 'self' data:; connect-src 'self'; form-action 'self'; base-uri 'none'; "
    "frame-ancestors 'none'"
)
SECURITY_HEADERS = (
    (b"content-security-policy", CONTENT_SECURITY_POLICY.encode()),
    (b"x-content-type-options", b"nosniff"),
    (b"referrer-policy", b"no-referrer"),
    (b"x-frame-options", b"DENY"),
    (b"cross-origin-opener-policy", b"same-origin"),
    (b"permissions-policy", b"camera=(), microphone=(), geolocation=()"),
)
_OURS = frozenset(name for name, _ in SECURITY_HEADERS)
#: How ``zoo serve --workers N`` tells its server processes which catalog to open.
SERVE_CATALOG_VARIABLE = "ZOO_SERVE_CATALOG"
#: Largest request body (an upload plus the multipart envelope).
MAX_BODY_BYTES = MAX_UPLOAD_BYTES + 64 * 1024


@dataclass(frozen=True)
class StaticFile:
    body: bytes
    media_type: str


class SecurityHeaders:
    """ASGI middleware: the security headers on every answer."""

    def __init__(self, app: ASGIApp) -> None:
        self.app = app

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return

        async def send_with_headers(message: Message) -> None:
            if message["type"] == "http.response.start":
                headers = [(k, v) for k, v in message.get("headers", []) if k not in _OURS]
                message = {**message, "headers": [*headers, *SECURITY_HEADERS]}
            await send(message)

        await self.app(scope, receive, send_with_headers)


class BodyLimit:
    """ASGI middleware: refuse a request body over ``MAX_BODY_BYTES`` with 413, whether its
    length is declared or streamed, before a byte of it is parsed further."""

    def __init__(self, app: ASGIApp, limit: int = MAX_BODY_BYTES) -> None:
        self.app = app
        self.limit = limit

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        declared = dict(scope.get("headers", [])).get(b"content-length")
        if declared is not None and (not declared.isdigit() or int(declared) > self.limit):
            await _too_large(scope, send, self.limit)
            return
        seen = 0
        started = False

        async def counting_receive() -> Message:
            nonlocal seen
            message = await receive()
            if message["type"] == "http.request":
                seen += len(message.get("body", b""))
                if seen > self.limit:
                    raise UploadTooLarge(too_large_text(self.limit))
            return message

        async def tracking_send(message: Message) -> None:
            nonlocal started
            started = started or message["type"] == "http.response.start"
            await send(message)

        try:
            await self.app(scope, counting_receive, tracking_send)
        except UploadTooLarge:
            if not started:
                await _too_large(scope, send, self.limit)


def too_large_text(limit: int) -> str:
    return f"the request body is over the limit of {limit:,} bytes; upload a smaller file"


async def _too_large(scope: Scope, send: Send, limit: int) -> None:
    response = error_response(scope.get("path", ""), 413, too_large_text(limit))
    await response(scope, _empty_receive, send)


async def _empty_receive() -> Message:
    return {"type": "http.request", "body": b"", "more_body": False}


def _static_files() -> dict[str, StaticFile]:
    types = {".css": "text/css", ".js": "text/javascript", ".svg": "image/svg+xml"}
    files: dict[str, StaticFile] = {}
    for item in resources.files("zoo.web").joinpath("static").iterdir():
        suffix = "." + item.name.rsplit(".", 1)[-1]
        if item.is_file() and suffix in types:
            files[item.name] = StaticFile(item.read_bytes(), types[suffix])
    return files


def create_app(
    location: str | None = None, catalog: Catalog | None = None, *, static_site: bool = False
) -> Starlette:
    """The web catalog of the catalog at ``location`` (a file path or database URL);
    ``static_site`` renders pages for ``zoo site`` (no forms that need a server)."""
    from zoo.web import api, pages
    from zoo.web.docs import load_docs

    opened = catalog if catalog is not None else open_read_only(location)
    static = _static_files()

    def static_file(request: Request) -> Response:
        found = static.get(request.path_params["name"])
        if found is None:
            raise HTTPException(404, "no such file")
        return Response(
            found.body, media_type=found.media_type, headers={"cache-control": "max-age=3600"}
        )

    async def http_error(request: Request, exc: Exception) -> Response:
        assert isinstance(exc, HTTPException)
        detail = exc.detail if exc.status_code != 404 else f"nothing at {request.url.path}"
        return error_response(request.url.path, exc.status_code, str(detail))

    async def server_error(request: Request, exc: Exception) -> Response:
        # Never a stack trace to the reader; the server log keeps it.
        return error_response(
            request.url.path, 500, "the server failed to answer this request; please report it"
        )

    routes = [
        *pages.routes(),
        *api.routes(),
        Route("/static/{name}", static_file),
    ]
    app = Starlette(
        routes=routes,
        exception_handlers={HTTPException: http_error, Exception: server_error},
    )
    app.state.catalog = opened
    app.state.docs = load_docs()
    app.state.static_site = static_site
    app.add_middleware(BodyLimit)
    app.add_middleware(SecurityHeaders)
    return app


def create_app_from_environment() -> Starlette:
    """The app of one server process of ``zoo serve --workers N``: the catalog named by
    ``$ZOO_SERVE_CATALOG`` (unset: the default catalog, as ``zoo serve`` without ``--db``)."""
    return create_app(os.environ.get(SERVE_CATALOG_VARIABLE))


__all__ = [
    "CONTENT_SECURITY_POLICY",
    "MAX_BODY_BYTES",
    "SERVE_CATALOG_VARIABLE",
    "create_app",
    "create_app_from_environment",
]
