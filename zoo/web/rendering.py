"""Rendering answers: HTML pages from the Jinja2 templates (autoescaped), error answers, and
JSON as the command line prints it."""

from __future__ import annotations

import json
from typing import Any

from jinja2 import Environment, PackageLoader, select_autoescape
from starlette.requests import Request
from starlette.responses import HTMLResponse, JSONResponse, Response

_ENV = Environment(
    loader=PackageLoader("zoo.web", "templates"),
    autoescape=select_autoescape(["html"]),
    trim_blocks=True,
    lstrip_blocks=True,
    # Templates ship with the package: compile each once per process, never stat it again.
    auto_reload=False,
)
_ENV.filters["number"] = lambda value: f"{value:,}" if isinstance(value, int) else str(value)


def render(request: Request | None, template: str, status: int = 200, **values: Any) -> Response:
    """A page from a template, with the catalog's completeness bound in every footer."""
    # A static site (zoo site) has no server behind it: its pages leave out the forms that
    # need one and search a shipped JSON index instead.
    static_site = request is not None and getattr(request.app.state, "static_site", False)
    html = _ENV.get_template(template).render(static_site=static_site, **values)
    return HTMLResponse(html, status_code=status)


def render_error(message: str, status: int) -> Response:
    titles = {400: "Cannot answer", 404: "Not in the catalog", 413: "Too large"}
    return render(
        None, "error.html", status, title=titles.get(status, "Error"), message=message, code=status
    )


def error_response(path: str, status: int, message: str) -> Response:
    """An error for a reader: JSON ``{"error": ...}`` under /api, else a short HTML page."""
    if path.startswith("/api/") or path.endswith((".json", ".csv")):
        return JSONResponse({"error": message, "status": status}, status_code=status)
    return render_error(message, status)


def json_text(value: Any) -> str:
    """JSON as ``zoo ... --format json`` prints it (indented, UTF-8 kept)."""
    return json.dumps(value, ensure_ascii=False, indent=2) + "\n"


__all__ = ["error_response", "json_text", "render", "render_error"]
