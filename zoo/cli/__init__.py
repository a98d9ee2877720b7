"""Command line of zoo: a thin layer over the core and the catalog service.

One module per command group; each registers its commands on ``zoo.cli.app.app`` when this
package is imported, and none builds SQL, nets or reports itself.
"""

import os
import sys
from typing import Any

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
from zoo.cli.app import INTERRUPTED, USAGE_ERROR, USER_ERROR, app, exit_status, print_error
from zoo.errors import ZooError


def main() -> None:
    """Console entry point: run the app; a ZooError becomes ``Error: ...`` and its exit status.

    A reader that stops early (``zoo find | head``) closes the pipe: that ends the command
    quietly with status 0, as a pipeline expects, instead of a BrokenPipeError.
    """
    watch = _PipeWatch(sys.stdout)
    sys.stdout = watch
    try:
        # Outside standalone mode an Exit raised by a command comes back as the return value.
        status = app(standalone_mode=False)
        sys.stdout.flush()  # a closed pipe shows up here at the latest, not at interpreter exit
        if status == INTERRUPTED:  # typer turns Ctrl-C inside a command into Exit(130)
            typer.echo("Interrupted.", err=True)
        if isinstance(status, int) and status:
            sys.exit(status)
    except BrokenPipeError:
        _silence_stdout()
        sys.exit(0)
    except SystemExit:
        # typer and rich turn a closed pipe into SystemExit(1) themselves
        if watch.broken:
            _silence_stdout()
            sys.exit(0)
        raise
    except ZooError as exc:  # a command that let one through: still one line, no traceback
        print_error(exc)
        sys.exit(exit_status(exc))
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


class _PipeWatch:
    """Standard output that remembers whether the reader closed the pipe (then re-raises)."""

    def __init__(self, stream: Any) -> None:
        self._stream = stream
        self.broken = False

    def write(self, text: str) -> int:
        try:
            return int(self._stream.write(text))
        except BrokenPipeError:
            self.broken = True
            raise

    def flush(self) -> None:
        try:
            self._stream.flush()
        except BrokenPipeError:
            self.broken = True
            raise

    def __getattr__(self, name: str) -> Any:
        return getattr(self._stream, name)


def _silence_stdout() -> None:
    """Point standard output at the null device, so that the final flush cannot fail again
    (the recipe of Python's documentation on SIGPIPE)."""
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, sys.__stdout__.fileno() if sys.__stdout__ else 1)


__all__ = ["app", "main"]
