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


#: Exit status of a user error (bad input, missing catalog entry, limit exceeded, ...).
USER_ERROR = 1
#: Exit status of a command-line usage error (unknown option, missing argument), as click's.
USAGE_ERROR = 2
#: Exit status after Ctrl-C (128 + SIGINT, common practice for shells).
INTERRUPTED = 130


def fail(problem: str | ZooError, status: int = USER_ERROR) -> typer.Exit:
    """Print ``Error: ...`` on standard error and return the exit to raise: ``raise fail(...)``.

    The one way every command reports an error. A query syntax error also gets the query with
    a caret under the offending text. The exit works both under typer's test runner and under
    ``main`` (which runs the app outside standalone mode and exits with the returned status).
    """
    print_error(problem)
    return typer.Exit(status)


def print_error(problem: str | ZooError) -> None:
    """Print ``Error: ...`` (and a query's caret line) without exiting, for a batch that goes on."""
    typer.echo(f"Error: {problem}", err=True)
    if isinstance(problem, QuerySyntaxError) and problem.query:
        typer.echo(problem.caret_text(), err=True)


def main() -> None:
    """Console entry point: run the app; a ZooError becomes ``Error: ...`` and exit status 1."""
    import zoo.cli  # noqa: F401  (registers every command on ``app``)

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


@app.callback()
def _root() -> None:
    """A research catalog of Petri's cycloids C(alpha, beta, gamma, delta)."""
