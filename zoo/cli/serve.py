"""Command ``serve``: the web catalog (``zoo.web``) on a local address, read-only.

A thin layer: it checks the options, opens the catalog read-only and runs uvicorn.
"""

from __future__ import annotations

from typing import Annotated

import typer

from zoo.cli.app import app, fail
from zoo.cli.options import ReadOnlyCatalogOption
from zoo.errors import ParameterError, ZooError


@app.command("serve")
def serve(
    db: ReadOnlyCatalogOption = None,
    host: Annotated[
        str, typer.Option("--host", help="Address to listen on (loopback unless you mean it).")
    ] = "127.0.0.1",
    port: Annotated[int, typer.Option("--port", "-p", help="Port to listen on.")] = 8000,
) -> None:
    """Serve the catalog in the browser: search, entry pages, pictures, downloads, identify,
    and a JSON API (/api/openapi.json). Read-only; stop with Ctrl-C.

    Example: zoo serve --db catalog.sqlite3 --port 8000
    """
    try:
        if not 0 < port < 65536:
            raise ParameterError(f"--port must be between 1 and 65535, got {port}")
        try:
            import uvicorn

            from zoo.web.app import create_app
        except ImportError as exc:
            raise ZooError(
                f"the web catalog needs the 'web' extra ({exc.name} is missing); install it "
                "with: pip install 'zoo[web]'"
            ) from None
        web_app = create_app(db)
    except ZooError as exc:
        raise fail(exc) from None
    typer.echo(f"Serving the catalog at http://{host}:{port}/ (read-only); Ctrl-C stops.", err=True)
    uvicorn.run(web_app, host=host, port=port, log_level="warning")
