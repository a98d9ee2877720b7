"""Command line of zoo: a thin layer over the core and the catalog service.

One module per command group; each registers its commands on ``zoo.cli.app.app`` when this
package is imported, and none builds SQL, nets or reports itself.
"""

import sys

import typer

from zoo.cli import (  # noqa: F401  (command registration)
    catalog,
    examine,
    interchange,
    pictures,
    publish,
    rings,
    serve,
)
from zoo.cli.app import INTERRUPTED, USAGE_ERROR, USER_ERROR, app, print_error
from zoo.errors import ZooError


def main() -> None:
    """Console entry point: run the app; a ZooError becomes ``Error: ...`` and exit status 1."""
    try:
        # Outside standalone mode an Exit raised by a command comes back as the return value.
        status = app(standalone_mode=False)
        if status == INTERRUPTED:  # typer turns Ctrl-C inside a command into Exit(130)
            typer.echo("Interrupted.", err=True)
        if isinstance(status, int) and status:
            sys.exit(status)
    except ZooError as exc:  # a command that let one through: still one line, no traceback
        print_error(exc)
        sys.exit(USER_ERROR)
    except KeyboardInterrupt:
        typer.echo("Interrupted.", err=True)
        sys.exit(INTERRUPTED)
    except typer.Exit as exc:
        sys.exit(exc.exit_code)
    except typer.Abort:
        typer.echo("Aborted.", err=True)
        sys.exit(USER_ERROR)
    except typer.TyperException as exc:  # usage errors arrive here in non-standalone mode
        show = getattr(exc, "show", None)
        if callable(show):
            show()
        else:
            typer.echo(f"Error: {exc}", err=True)
        sys.exit(getattr(exc, "exit_code", USAGE_ERROR))


__all__ = ["app", "main"]
