"""Command ``serve``: the web catalog (``zoo.web``) on a local address, read-only.

A thin layer: it checks the options, opens the catalog read-only and runs uvicorn.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Annotated

import typer

from zoo.cli.app import app, fail
from zoo.cli.options import ReadOnlyCatalogOption
from zoo.errors import ParameterError, ZooError
from zoo.version import DISTRIBUTION_NAME

#: Most server processes ``--workers`` starts (each holds its own catalog connections).
MAX_WORKERS = 64


@app.command("serve")
def serve(
    db: ReadOnlyCatalogOption = None,
    host: Annotated[
        str, typer.Option("--host", help="Address to listen on (loopback unless you mean it).")
    ] = "127.0.0.1",
    port: Annotated[int, typer.Option("--port", "-p", help="Port to listen on.")] = 8000,
    workers: Annotated[
        int,
        typer.Option(
            "--workers",
            "-w",
            help="Server processes answering in parallel (one per CPU core is a good start); "
            "each opens the catalog read-only itself.",
        ),
    ] = 1,
) -> None:
    """Serve the catalog in the browser: search, entry pages, pictures, downloads, identify,
    and a JSON API (/api/openapi.json). Read-only; stop with Ctrl-C.

    Example: zoo serve --db catalog.sqlite3 --port 8000 --workers 2
    """
    try:
        if not 0 < port < 65536:
            raise ParameterError(f"--port must be between 1 and 65535, got {port}")
        if not 1 <= workers <= MAX_WORKERS:
            raise ParameterError(f"--workers must be between 1 and {MAX_WORKERS}, got {workers}")
        try:
            import uvicorn

            from zoo.web.app import SERVE_CATALOG_VARIABLE, create_app
        except ImportError as exc:
            raise ZooError(
                f"the web catalog needs the 'web' extra ({exc.name} is missing); install it "
                f"with: pip install '{DISTRIBUTION_NAME}[web]'"
            ) from None
        web_app = create_app(db)
    except ZooError as exc:
        raise fail(exc) from None
    typer.echo(
        f"Serving the catalog at http://{host}:{port}/ (read-only"
        + (f", {workers} processes" if workers > 1 else "")
        + "); Ctrl-C stops.",
        err=True,
    )
    if workers == 1:
        uvicorn.run(web_app, host=host, port=port, log_level="warning")
        return
    # Several processes: uvicorn starts each from an import string, so each one opens the
    # catalog it is told of through the environment (checked above, in this process).
    web_app.state.catalog.close()
    if db is None:
        os.environ.pop(SERVE_CATALOG_VARIABLE, None)  # the default catalog, as resolved here
    else:
        os.environ[SERVE_CATALOG_VARIABLE] = db
    uvicorn.run(
        "zoo.web.app:create_app_from_environment",
        factory=True,
        host=host,
        port=port,
        workers=workers,
        log_level="warning",
    )


@app.command("site")
def site(
    outdir: Annotated[
        Path,
        typer.Argument(
            metavar="OUTDIR",
            help="Folder to write the site into (created if missing).",
            show_default=False,
        ),
    ],
    db: ReadOnlyCatalogOption = None,
) -> None:
    """Write the web catalog's pages as static files: home, one page per class and frame with
    their downloads, an index per area, and a search over a shipped JSON index.

    Serve the folder at the root of a web site, e.g. python3 -m http.server -d OUTDIR.

    Example: zoo site public --db catalog.sqlite3
    """
    try:
        try:
            from zoo.web.site import write_site
        except ImportError as exc:
            raise ZooError(
                f"the static site needs the 'web' extra ({exc.name} is missing); install it "
                f"with: pip install '{DISTRIBUTION_NAME}[web]'"
            ) from None
        if outdir.exists() and not outdir.is_dir():
            raise ParameterError(f"{outdir} is a file; give a folder for the site")
        report = write_site(db, outdir, progress=lambda text: typer.echo(text, err=True))
    except ZooError as exc:
        raise fail(exc) from None
    except OSError as exc:
        raise fail(ZooError(f"cannot write the site into {outdir}: {exc.strerror}")) from None
    typer.echo(
        f"Wrote {report.pages:,} pages and {report.files:,} files for {report.classes:,} classes "
        f"into {outdir} (complete up to area {report.complete_to})."
    )
