"""The Typer application object and the entry point that turns ZooError into one line."""

from __future__ import annotations

import sys

import typer

from zoo.errors import QuerySyntaxError, ZooError

app = typer.Typer(
    name="zoo",
    help="A research catalog of Petri's cycloids C(alpha, beta, gamma, delta).",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
)


def fail(message: str) -> typer.Exit:
    """Print ``Error: message`` on standard error and return the exit to raise."""
    typer.echo(f"Error: {message}", err=True)
    return typer.Exit(1)


def main() -> None:
    """Console entry point: run the app; a ZooError becomes ``Error: ...`` and exit status 1."""
    import zoo.cli  # noqa: F401  (registers every command on ``app``)

    try:
        # Outside standalone mode an Exit raised by a command comes back as the return value.
        status = app(standalone_mode=False)
        if isinstance(status, int) and status:
            sys.exit(status)
    except QuerySyntaxError as exc:
        typer.echo(f"Error: {exc}", err=True)
        if exc.query:
            typer.echo(exc.caret_text(), err=True)
        sys.exit(1)
    except ZooError as exc:
        typer.echo(f"Error: {exc}", err=True)
        sys.exit(1)
    except KeyboardInterrupt:
        typer.echo("Interrupted.", err=True)
        sys.exit(130)
    except typer.Exit as exc:
        sys.exit(exc.exit_code)
    except typer.Abort:
        typer.echo("Aborted.", err=True)
        sys.exit(1)
    except typer.TyperException as exc:  # usage errors arrive here in non-standalone mode
        show = getattr(exc, "show", None)
        if callable(show):
            show()
        else:
            typer.echo(f"Error: {exc}", err=True)
        sys.exit(getattr(exc, "exit_code", 2))


@app.callback()
def _root() -> None:
    """A research catalog of Petri's cycloids C(alpha, beta, gamma, delta)."""
